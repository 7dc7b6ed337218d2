//! Values as typed in a file, and the readers of keys and values that
//! every block of every format uses.

use alloc::borrow::ToOwned;
use alloc::string::{String, ToString};
use core::fmt::Write as _;

use serde::Serialize;
use serde_json::{Map, Value};

use super::json::{echo, path};
use crate::constants::Temperature;
use crate::error::{Error, ErrorKind, Result};
use crate::value::parse_value_field;

/// A value as typed in a design file: a number in SI base units, or text
/// in the notation of [`parse_value_field`] (`"4k7"`, `"100 nF"`).
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(untagged)]
pub enum Typed {
    /// A JSON number, already in SI base units.
    Number(f64),
    /// A JSON string, read with its unit when the design is built.
    Text(String),
}

impl Typed {
    /// The value of `field` in `unit`: the number itself, or the text read
    /// by [`parse_value_field`].
    ///
    /// # Errors
    /// [`ErrorKind::Parse`] naming `field` for text that is not a value, and
    /// [`ErrorKind::OutOfRange`] for a number that is not finite.
    pub fn value(&self, field: &str, unit: &'static str) -> Result<f64> {
        match self {
            Typed::Number(x) if x.is_finite() => Ok(*x),
            Typed::Number(x) => Err(Error::out_of_range(field, *x, unit, "a finite number")),
            Typed::Text(text) => parse_value_field(field, text, unit),
        }
    }
}

impl Typed {
    /// A value as a file writes it: text in engineering notation that
    /// reads back to the same `f64` (`"4.7 kΩ"`, `"2.2 µF"`,
    /// [`crate::format_exact`]) for a unit that takes SI prefixes, a plain
    /// number for the rest (ratios, dB, °C, K/W, shares).
    pub fn exact(value: f64, unit: &str) -> Typed {
        if crate::format::takes_prefix(unit) && value.is_finite() {
            Typed::Text(crate::format::format_exact(value, unit))
        } else {
            Typed::Number(value)
        }
    }
}

impl From<f64> for Typed {
    fn from(x: f64) -> Typed {
        Typed::Number(x)
    }
}

impl From<&str> for Typed {
    fn from(text: &str) -> Typed {
        Typed::Text(text.to_owned())
    }
}

/// What a value that is neither a number nor a string is told.
pub(crate) const EXPECTED_VALUE: &str =
    "a number in SI base units such as 4700, or a string such as \"4k7\" or \"100 nF\"";
/// What a text key that holds something else is told.
pub(crate) const EXPECTED_TEXT: &str = "text in double quotes";
/// What a block that is not an object is told.
pub(crate) const EXPECTED_OBJECT: &str = "an object of keys and values in braces, { ... }";

/// A short rendering of a JSON value for an error message.
pub(crate) fn shown(value: &Value) -> String {
    match value {
        Value::String(s) => echo(&["\"", s, "\""].concat()),
        other => echo(&other.to_string()),
    }
}

pub(crate) fn parse_error(field: &str, value: &Value, expected: &'static str) -> Error {
    Error::new(
        field,
        ErrorKind::Parse {
            text: shown(value),
            expected,
        },
    )
}

/// The map of a JSON object, or an error naming `prefix`.
pub(crate) fn object<'a>(value: &'a Value, prefix: &str) -> Result<&'a Map<String, Value>> {
    value
        .as_object()
        .ok_or_else(|| parse_error(prefix, value, EXPECTED_OBJECT))
}

/// The text of `key` in `map`, if given.
pub(crate) fn text_at(map: &Map<String, Value>, prefix: &str, key: &str) -> Result<Option<String>> {
    match map.get(key) {
        None | Some(Value::Null) => Ok(None),
        Some(Value::String(s)) => Ok(Some(s.clone())),
        Some(other) => Err(parse_error(&path(prefix, key), other, EXPECTED_TEXT)),
    }
}

/// Longest title, in characters.
pub const MAX_TITLE: usize = 200;
/// Longest notes, in characters (about ten pages of text).
pub const MAX_NOTES: usize = 20_000;

/// The free text of the top-level `key` (title, notes), at most `max`
/// characters: a page lays it out on every edit, and a megabyte of text
/// would stall it.
pub(crate) fn free_text(map: &Map<String, Value>, key: &str, max: usize) -> Result<Option<String>> {
    let text = text_at(map, "", key)?;
    if let Some(t) = &text {
        let n = t.chars().count();
        if n > max {
            let mut reason = String::new();
            let _ = write!(
                reason,
                "{n} characters is too long; at most {max} are kept in a design file (put longer documents beside it and link them)"
            );
            return Err(Error::new(key, ErrorKind::Document { reason }));
        }
    }
    Ok(text)
}

/// The typed value of `key` in `map`, if given.
pub(crate) fn typed_at(map: &Map<String, Value>, prefix: &str, key: &str) -> Result<Option<Typed>> {
    match map.get(key) {
        None | Some(Value::Null) => Ok(None),
        Some(Value::String(s)) => Ok(Some(Typed::Text(s.clone()))),
        Some(Value::Number(n)) => match n.as_f64() {
            Some(x) => Ok(Some(Typed::Number(x))),
            None => Err(parse_error(
                &path(prefix, key),
                &Value::Number(n.clone()),
                EXPECTED_VALUE,
            )),
        },
        Some(other) => Err(parse_error(&path(prefix, key), other, EXPECTED_VALUE)),
    }
}

pub(crate) fn optional(
    value: &Option<Typed>,
    field: &str,
    unit: &'static str,
) -> Result<Option<f64>> {
    value.as_ref().map(|v| v.value(field, unit)).transpose()
}

pub(crate) fn required(
    value: &Option<Typed>,
    field: &str,
    unit: &'static str,
    purpose: &'static str,
) -> Result<f64> {
    match value {
        Some(v) => v.value(field, unit),
        None => Err(Error::missing(field, purpose)),
    }
}

/// What a share (a tolerance) is told when it cannot be read.
const EXPECTED_SHARE: &str = "a fraction such as 0.01, or a percentage as text such as \"1 %\"";

/// A share such as a tolerance, from 0 to `max`: a number is the fraction
/// itself (`0.01`), text ending in `%` is in percent (`"1 %"`), other text
/// is read as a plain value (`"0.01"`).
///
/// # Errors
/// [`ErrorKind::Parse`] for text that is not a share, and
/// [`ErrorKind::OutOfRange`] outside 0 to `max` (so `5` meant as 5 % is
/// refused with the fix).
pub(crate) fn share(value: &Typed, field: &str, max: f64) -> Result<f64> {
    let x = match value {
        Typed::Text(text) => match text.trim().strip_suffix('%') {
            Some(body) => parse_value_field(field, body, "")
                .map(|p| p / 100.0)
                .map_err(|_| {
                    Error::new(
                        field,
                        ErrorKind::Parse {
                            text: text.clone(),
                            expected: EXPECTED_SHARE,
                        },
                    )
                })?,
            None => parse_value_field(field, text, "").map_err(|_| {
                Error::new(
                    field,
                    ErrorKind::Parse {
                        text: text.clone(),
                        expected: EXPECTED_SHARE,
                    },
                )
            })?,
        },
        Typed::Number(x) => *x,
    };
    if x.is_finite() && (0.0..=max).contains(&x) {
        Ok(x)
    } else {
        let mut allowed = String::new();
        let _ = write!(
            allowed,
            "a fraction from 0 to {max} (0 to {} %), such as 0.01 or \"1 %\"",
            max * 100.0
        );
        Err(Error::out_of_range(field, x, "", allowed))
    }
}

/// A temperature in °C as a file writes it: rounded to 1 nK so that the
/// kelvin round trip (0.1 °C is 273.25 K is 0.10000000000002274 °C) does
/// not show.
pub(crate) fn file_celsius(t: Temperature) -> f64 {
    libm::round(t.celsius() * 1e9) / 1e9
}
