//! JSON text into a checked JSON tree: [`parse`] reads the text with
//! serde_json's parser through a visitor of its own, which refuses a key
//! given twice in one object and nesting deeper than [`MAX_DEPTH`]; a
//! syntax error names its line and column ([`json_error`]). Also the UTF-8
//! check of a file's bytes ([`utf8_text`]).

use alloc::borrow::ToOwned;
use alloc::string::String;
use alloc::vec::Vec;
use core::cell::RefCell;
use core::fmt::{self, Write as _};

use serde::de::{self, DeserializeSeed, MapAccess, SeqAccess, Visitor};
use serde_json::{Map, Number, Value};

use crate::error::{Error, ErrorKind, Result, MAX_ECHO};

/// Deepest nesting of objects and lists a document may have. A design or
/// specification file needs two levels (the document, and a block such as
/// `parts`); the allowance leaves room for formats to grow.
pub const MAX_DEPTH: usize = 16;

/// `text` cut to [`MAX_ECHO`] characters, with "…" when it was longer.
pub(crate) fn echo(text: &str) -> String {
    match text.char_indices().nth(MAX_ECHO) {
        Some((end, _)) => {
            let mut out = text[..end].to_owned();
            out.push('…');
            out
        }
        None => text.to_owned(),
    }
}

/// The text of a file's bytes, which must be UTF-8 (as JSON text is).
///
/// # Errors
/// [`ErrorKind::Document`] naming `file`, with the offset and value of the
/// first byte that is not UTF-8, so that a file saved in another encoding
/// is named as such rather than read with its characters replaced.
pub fn utf8_text(bytes: &[u8]) -> Result<&str> {
    core::str::from_utf8(bytes).map_err(|e| {
        let at = e.valid_up_to();
        let mut reason = String::new();
        let _ = write!(
            reason,
            "not UTF-8 text: byte 0x{:02X} at offset {at} is not valid UTF-8; a design file is JSON text, saved as UTF-8",
            bytes[at]
        );
        Error::new("file", ErrorKind::Document { reason })
    })
}

/// `prefix.key`, or `key` at the top level.
pub(crate) fn path(prefix: &str, key: &str) -> String {
    if prefix.is_empty() {
        key.to_owned()
    } else {
        [prefix, ".", key].concat()
    }
}

/// Reads JSON text into a tree, refusing duplicate keys and nesting deeper
/// than [`MAX_DEPTH`]. `empty` is the hint for a document with no text.
///
/// # Errors
/// [`ErrorKind::Missing`] naming `format` for an empty document,
/// [`ErrorKind::Parse`] naming the line and column for a syntax error, and
/// [`ErrorKind::Document`] naming the key for a duplicate key or nesting
/// that is too deep.
pub(crate) fn parse(text: &str, empty: &'static str) -> Result<Value> {
    if text.trim().is_empty() {
        return Err(Error::missing("format", empty));
    }
    let problem = RefCell::new(None);
    let mut de = serde_json::Deserializer::from_str(text);
    let seed = Node {
        path: String::new(),
        depth: 0,
        problem: &problem,
    };
    let value = seed.deserialize(&mut de).and_then(|v| de.end().map(|()| v));
    match value {
        Ok(v) => Ok(v),
        Err(e) => match problem.into_inner() {
            Some((field, reason)) => {
                let mut reason: String = reason;
                let _ = write!(reason, " (line {}, column {})", e.line(), e.column());
                Err(Error::new(field, ErrorKind::Document { reason }))
            }
            None => Err(json_error(text, &e)),
        },
    }
}

/// A problem found by the visitor: the field and the reason.
type Problem = Option<(String, String)>;

/// One value of the tree being read, at `path` and `depth`.
struct Node<'a> {
    path: String,
    depth: usize,
    problem: &'a RefCell<Problem>,
}

impl Node<'_> {
    /// The error that stops the parser; the reason is kept in `problem`,
    /// where [`parse`] finds it.
    fn fail<E: de::Error>(&self, field: String, reason: String) -> E {
        *self.problem.borrow_mut() = Some((field, reason));
        E::custom("the document's structure is refused")
    }

    fn nested(&self) -> core::result::Result<usize, ()> {
        if self.depth >= MAX_DEPTH {
            Err(())
        } else {
            Ok(self.depth + 1)
        }
    }

    fn too_deep<E: de::Error>(&self) -> E {
        let mut reason = String::new();
        let _ = write!(
            reason,
            "the document nests objects and lists deeper than {MAX_DEPTH} levels; a design file has its keys at most one block deep"
        );
        self.fail(self.path.clone(), reason)
    }
}

impl<'de> DeserializeSeed<'de> for Node<'_> {
    type Value = Value;

    fn deserialize<D: de::Deserializer<'de>>(
        self,
        deserializer: D,
    ) -> core::result::Result<Value, D::Error> {
        deserializer.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for Node<'_> {
    type Value = Value;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str("a JSON value")
    }

    fn visit_bool<E>(self, v: bool) -> core::result::Result<Value, E> {
        Ok(Value::Bool(v))
    }

    fn visit_i64<E>(self, v: i64) -> core::result::Result<Value, E> {
        Ok(Value::Number(v.into()))
    }

    fn visit_u64<E>(self, v: u64) -> core::result::Result<Value, E> {
        Ok(Value::Number(v.into()))
    }

    fn visit_f64<E>(self, v: f64) -> core::result::Result<Value, E> {
        // serde_json's parser never hands over a non-finite number.
        Ok(Number::from_f64(v).map_or(Value::Null, Value::Number))
    }

    fn visit_str<E>(self, v: &str) -> core::result::Result<Value, E> {
        Ok(Value::String(v.to_owned()))
    }

    fn visit_string<E>(self, v: String) -> core::result::Result<Value, E> {
        Ok(Value::String(v))
    }

    fn visit_unit<E>(self) -> core::result::Result<Value, E> {
        Ok(Value::Null)
    }

    fn visit_none<E>(self) -> core::result::Result<Value, E> {
        Ok(Value::Null)
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> core::result::Result<Value, A::Error> {
        let depth = self.nested().map_err(|()| self.too_deep())?;
        let mut out = Vec::new();
        loop {
            let mut path = self.path.clone();
            let _ = write!(path, "[{}]", out.len());
            let node = Node {
                path,
                depth,
                problem: self.problem,
            };
            match seq.next_element_seed(node)? {
                Some(v) => out.push(v),
                None => return Ok(Value::Array(out)),
            }
        }
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> core::result::Result<Value, A::Error> {
        let depth = self.nested().map_err(|()| self.too_deep())?;
        let mut out = Map::new();
        while let Some(key) = map.next_key::<String>()? {
            let field = path(&self.path, &echo(&key));
            if out.contains_key(&key) {
                let reason = String::from(
                    "this key is given twice in one block; a later value would silently replace the first, so keep one",
                );
                return Err(self.fail(field, reason));
            }
            let node = Node {
                path: field,
                depth,
                problem: self.problem,
            };
            let value = map.next_value_seed(node)?;
            out.insert(key, value);
        }
        Ok(Value::Object(out))
    }
}

/// The error for a JSON syntax problem: the line and column, the line as
/// typed, and what was expected there.
pub(crate) fn json_error(text: &str, e: &serde_json::Error) -> Error {
    let line = e.line();
    let message = alloc::string::ToString::to_string(e);
    let expected = if e.is_eof() {
        "the rest of the document: it ends too early (a closing } or ] or a quote is missing)"
    } else if message.contains("trailing comma") {
        "no comma after the last entry of an object or list"
    } else if message.contains("key must be a string") {
        "a key in double quotes, such as \"rc\""
    } else if message.contains("expected `,` or `}`") || message.contains("expected `,` or `]`") {
        "a comma between entries; a value with a prefix or unit is text and needs double quotes, such as \"4k7\""
    } else if message.contains("expected `:`") {
        "a colon between a key and its value, such as \"rc\": \"4k7\""
    } else if message.contains("invalid number") || message.contains("number out of range") {
        "a JSON number such as 4700 or 4.7e3; write prefixed values as text in double quotes, such as \"4k7\""
    } else if message.contains("expected value") || message.contains("expected ident") {
        "a value: a number such as 4700, text in double quotes such as \"4k7\", true, false, null, an object { } or a list [ ]"
    } else if message.contains("trailing characters") {
        "the end of the document after its closing }: one design per file"
    } else if message.contains("control character") || message.contains("invalid escape") {
        "text without raw line breaks or tabs inside the quotes; write them as \\n and \\t"
    } else if message.contains("unicode code point") || message.contains("lone leading surrogate") {
        "a valid \\u escape of four hexadecimal digits, with surrogates in pairs"
    } else {
        "valid JSON: keys and text in double quotes, a comma between entries and none after the last"
    };
    // The text around the error as typed (the last non-empty line when the
    // text ends early), at most 20 characters before the column and 30 after.
    let (shown, column) = match text.lines().nth(line.saturating_sub(1)) {
        Some(l) if !l.trim().is_empty() => (l, e.column()),
        _ => {
            let l = text
                .lines()
                .rev()
                .find(|l| !l.trim().is_empty())
                .unwrap_or("");
            (l, l.len())
        }
    };
    let chars: Vec<(usize, char)> = shown.char_indices().collect();
    let at = chars
        .iter()
        .position(|&(i, _)| i + 1 >= column)
        .unwrap_or(chars.len());
    let start = at.saturating_sub(20);
    let end = (at + 30).min(chars.len());
    let mut excerpt = String::new();
    if chars[..start].iter().any(|(_, c)| !c.is_whitespace()) {
        excerpt.push('…');
    }
    excerpt.extend(chars[start..end].iter().map(|&(_, c)| c));
    let trimmed_start = excerpt.trim_start().len();
    let mut excerpt = excerpt.split_off(excerpt.len() - trimmed_start);
    if end < chars.len() {
        excerpt.push('…');
    }
    let mut field = String::new();
    let _ = write!(field, "line {}, column {}", line, e.column());
    Error::new(
        field,
        ErrorKind::Parse {
            text: excerpt,
            expected,
        },
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::string::ToString;

    fn refused(text: &str) -> Error {
        parse(text, "empty").expect_err("refused")
    }

    #[test]
    fn a_duplicate_key_is_refused_with_its_path_and_place() {
        let e = refused("{\n  \"requirements\": { \"min_voltage_gain_db\": 26,\n    \"min_voltage_gain_db\": null } }");
        assert_eq!(e.field(), "requirements.min_voltage_gain_db");
        let m = e.to_string();
        assert!(m.contains("given twice"), "{m}");
        assert!(m.contains("line 3"), "{m}");
        let e = refused(r#"{"format": "a", "format": "b"}"#);
        assert_eq!(e.field(), "format");
    }

    #[test]
    fn the_same_key_in_two_blocks_is_fine() {
        let v = parse(r#"{"a": {"x": 1}, "b": {"x": 2}, "x": 3}"#, "empty").unwrap();
        assert_eq!(v["b"]["x"], 2);
    }

    #[test]
    fn nesting_is_capped_with_a_message() {
        // MAX_DEPTH levels are read; one more is refused, however deep the
        // rest goes (8 KB of brackets here).
        let ok = "[".repeat(MAX_DEPTH) + &"]".repeat(MAX_DEPTH);
        assert!(parse(&ok, "empty").is_ok());
        let deep = "[".repeat(MAX_DEPTH + 1) + &"]".repeat(MAX_DEPTH + 1);
        let e = refused(&deep);
        assert!(matches!(e.kind(), ErrorKind::Document { .. }), "{e}");
        let hostile = String::from("{\"notes\": ") + &"[".repeat(8192);
        let e = refused(&hostile);
        assert!(e.to_string().contains("deeper than 16 levels"), "{e}");
        assert!(e.field().starts_with("notes["), "{}", e.field());
    }

    #[test]
    fn syntax_errors_name_the_place() {
        let e = refused("{\"a\": 1,}");
        assert_eq!(e.field(), "line 1, column 9");
        let e = refused("{\"a\": 1} {}");
        assert!(e.to_string().contains("one design per file"), "{e}");
        let e = refused("   ");
        assert_eq!(e.field(), "format");
    }

    #[test]
    fn long_keys_are_echoed_short() {
        let long = "k".repeat(100_000);
        let text = ["{\"", &long, "\": 1, \"", &long, "\": 2}"].concat();
        let e = refused(&text);
        assert!(e.to_string().len() < 300, "{}", e.to_string().len());
        assert!(e.field().ends_with('…'));
    }
}
