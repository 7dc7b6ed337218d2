//! The keys of a format: the `block!` macro that defines a block of keys
//! with its reader, and the [`Schema`] that checks keys and suggests the
//! nearest known one for a key it does not know.

use alloc::string::String;
use alloc::vec::Vec;

use serde_json::{Map, Value};

use super::json::{echo, path};
use crate::error::{Error, ErrorKind, Result};

/// Defines a block of a document: a struct of optional text and typed
/// values, its keys as dotted paths, and its reader (which checks the keys
/// against a [`Schema`]). The specification file uses it too.
macro_rules! block {
    (
        $(#[$meta:meta])*
        $name:ident in $prefix:literal {
            text: [$($(#[$tm:meta])* $t:ident),* $(,)?],
            values: [$($(#[$vm:meta])* $v:ident),* $(,)?] $(,)?
        }
    ) => {
        $(#[$meta])*
        #[derive(Debug, Clone, PartialEq, Default, ::serde::Serialize)]
        pub struct $name {
            $(
                $(#[$tm])*
                #[serde(skip_serializing_if = "Option::is_none")]
                pub $t: Option<::alloc::string::String>,
            )*
            $(
                $(#[$vm])*
                #[serde(skip_serializing_if = "Option::is_none")]
                pub $v: Option<$crate::document::Typed>,
            )*
        }

        impl $name {
            /// Every key of this block, as a dotted path from the top of the file.
            pub const KEYS: &'static [&'static str] = &[
                $(concat!($prefix, ".", stringify!($t)),)*
                $(concat!($prefix, ".", stringify!($v)),)*
            ];

            /// The value of the key `key` of this block, as typed.
            #[allow(dead_code)]
            pub(crate) fn value(&self, key: &str) -> Option<&$crate::document::Typed> {
                match key {
                    $(stringify!($v) => self.$v.as_ref(),)*
                    _ => None,
                }
            }

            /// Sets the value of the key `key` of this block; false for a
            /// key the block does not have.
            #[allow(dead_code)]
            pub(crate) fn set(&mut self, key: &str, value: Option<$crate::document::Typed>) -> bool {
                match key {
                    $(stringify!($v) => {
                        self.$v = value;
                        true
                    })*
                    _ => false,
                }
            }

            pub(crate) fn read(
                value: &::serde_json::Value,
                schema: &$crate::document::Schema,
            ) -> $crate::error::Result<Self> {
                let map = $crate::document::object(value, $prefix)?;
                schema.check_keys(map, $prefix)?;
                Ok($name {
                    $($t: $crate::document::text_at(map, $prefix, stringify!($t))?,)*
                    $($v: $crate::document::typed_at(map, $prefix, stringify!($v))?,)*
                })
            }
        }
    };
}
pub(crate) use block;

/// The parent of a dotted path: `parts` for `parts.rc`, `` for `supply`.
pub(crate) fn parent(path: &str) -> &str {
    path.rsplit_once('.').map_or("", |(p, _)| p)
}

/// The last name of a dotted path: `rc` for `parts.rc`.
pub(crate) fn leaf(path: &str) -> &str {
    path.rsplit_once('.').map_or(path, |(_, k)| k)
}

/// The keys of one JSON format, for unknown-key detection and suggestions.
pub(crate) struct Schema {
    /// Every key as a dotted path, in groups (the top level, then each block).
    pub(crate) keys: &'static [&'static [&'static str]],
    /// Other names people write for a key, anywhere in the file.
    pub(crate) aliases: &'static [(&'static str, &'static str)],
}

impl Schema {
    /// Every known key of the format, as dotted paths.
    fn all(&self) -> impl Iterator<Item = &'static str> + '_ {
        self.keys.iter().flat_map(|g| g.iter()).copied()
    }

    /// Rejects an empty key of `map`, else the first key in sorted order
    /// that the block `prefix` does not know (sorted, so that the key
    /// reported does not depend on how the JSON map keeps its keys: the
    /// command line keeps the file's order, the page's engine sorts them).
    pub(crate) fn check_keys(&self, map: &Map<String, Value>, prefix: &str) -> Result<()> {
        if map.keys().any(|k| k.trim().is_empty()) {
            let mut reason = String::from("a key is empty (\"\")");
            reason.push_str(if prefix.is_empty() {
                " at the top level of the file"
            } else {
                " in this block"
            });
            reason.push_str("; every key is a name such as \"supply\" or \"rc\"");
            let field = if prefix.is_empty() { "file" } else { prefix };
            return Err(Error::new(field, ErrorKind::Document { reason }));
        }
        let unknown = map
            .keys()
            .filter(|key| {
                !self
                    .all()
                    .any(|p| parent(p) == prefix && leaf(p) == key.as_str())
            })
            .min();
        match unknown {
            Some(key) => Err(Error::new(
                path(prefix, &echo(key)),
                ErrorKind::UnknownKey {
                    suggestion: self.suggest(prefix, key),
                },
            )),
            None => Ok(()),
        }
    }

    /// The nearest known key for an unknown `key` in the block `prefix`:
    /// the same name in another block, a known alias, the closest name by
    /// edit distance, or a name that holds every word of the key.
    /// The error for a dotted path the format does not have, with the
    /// nearest known key.
    pub(crate) fn unknown(&self, path: &str) -> Error {
        let (prefix, key) = path.rsplit_once('.').unwrap_or(("", path));
        Error::new(
            echo(path),
            ErrorKind::UnknownKey {
                suggestion: self.suggest(prefix, key),
            },
        )
    }

    fn suggest(&self, prefix: &str, key: &str) -> Option<&'static str> {
        // No known key is longer than about 30 characters; a key of more
        // than 64 is not a typo of one, and comparing it would cost time
        // and memory in proportion to its length.
        if key.len() > 64 {
            return None;
        }
        let lower = key.trim().to_ascii_lowercase().replace(['-', ' '], "_");
        let here = || self.all().filter(move |p| parent(p) == prefix);
        // Another spelling of a key of this block (case, dashes).
        if let Some(p) = here().find(|p| leaf(p) == lower) {
            return Some(p);
        }
        // A key of another block, put at the wrong level.
        if let Some(p) = self.all().find(|p| leaf(p) == lower) {
            return Some(p);
        }
        if let Some(&(_, p)) = self.aliases.iter().find(|(a, _)| *a == lower) {
            return Some(p);
        }
        let limit = match lower.chars().count() {
            0..=3 => 1,
            4..=8 => 2,
            _ => 3,
        };
        let closest = |keys: &mut dyn Iterator<Item = &'static str>| {
            let mut best: Option<(usize, &'static str)> = None;
            for p in keys {
                let d = edit_distance(&lower, leaf(p));
                if d <= limit && best.is_none_or(|(b, _)| d < b) {
                    best = Some((d, p));
                }
            }
            best.map(|(_, p)| p)
        };
        if let Some(p) = closest(&mut here()) {
            return Some(p);
        }
        // Every word of the key in one name of this block: `min_gain_db`.
        let words: Vec<&str> = lower.split('_').filter(|w| !w.is_empty()).collect();
        if words.len() >= 2 {
            if let Some(p) = here().find(|p| {
                let names: Vec<&str> = leaf(p).split('_').collect();
                words.iter().all(|w| names.contains(w))
            }) {
                return Some(p);
            }
        }
        closest(&mut self.all())
    }
}

/// Edit distance with adjacent transpositions (optimal string alignment), by characters.
fn edit_distance(a: &str, b: &str) -> usize {
    let a: Vec<char> = a.chars().collect();
    let b: Vec<char> = b.chars().collect();
    let w = b.len() + 1;
    let mut d: Vec<usize> = Vec::with_capacity((a.len() + 1) * w);
    for i in 0..=a.len() {
        for j in 0..=b.len() {
            d.push(if i == 0 {
                j
            } else if j == 0 {
                i
            } else {
                0
            });
        }
    }
    for i in 1..=a.len() {
        for j in 1..=b.len() {
            let cost = usize::from(a[i - 1] != b[j - 1]);
            let mut v = (d[(i - 1) * w + j] + 1)
                .min(d[i * w + j - 1] + 1)
                .min(d[(i - 1) * w + j - 1] + cost);
            if i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1] {
                v = v.min(d[(i - 2) * w + j - 2] + 1);
            }
            d[i * w + j] = v;
        }
    }
    d[a.len() * w + b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edit_distance_counts_transpositions_once() {
        assert_eq!(edit_distance("rcc", "rc"), 1, "one insertion");
        assert_eq!(edit_distance("hfe_mni", "hfe_min"), 1, "one transposition");
        assert_eq!(edit_distance("", "abc"), 3, "three insertions");
    }
}
