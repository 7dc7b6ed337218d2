//! What the file formats share: JSON text into a checked tree, values as
//! typed, the keys of each format with the nearest-key suggestion, the
//! format identifiers, and the blocks that two formats have in common.
//!
//! # Reading a file, in layers
//! 1. [`json`]: the text becomes a `serde_json::Value`, refusing what JSON
//!    leaves open and most readers accept silently: a key given twice in
//!    one object (the last would win, so `"min_voltage_gain_db": 26` then
//!    `"min_voltage_gain_db": null` would drop a requirement) and nesting
//!    deeper than [`MAX_DEPTH`] levels (a design file needs two). The page
//!    hands the engine the text itself, never an object the browser parsed,
//!    so the command line and the page read the same document and give the
//!    same messages.
//! 2. [`schema`]: every key of every block is looked up in the format's
//!    [`Schema`]; an unknown key is an error that names the nearest known
//!    one (the same name in another block, an alias, edit distance, or a
//!    key holding every word), so a typo never drops a requirement.
//! 3. [`typed`]: every value is kept *as typed* ([`Typed`]: a number in SI
//!    base units, or text such as `"4k7"`), and read in its unit only when
//!    the format builds its validated value.
//! 4. [`formats`] names each document's format and version, and [`blocks`]
//!    holds the `transistor` and `requirements` blocks, which the design
//!    file and the specification file read with the same code.
//!
//! The formats themselves (`design_file`, `spec_file`) sit on top of this
//! module and never import each other.

mod blocks;
mod formats;
mod json;
mod schema;
mod typed;

pub(crate) use blocks::{requirements_from, stage_kind, transistor_document, transistor_from};
pub use blocks::{RequirementsDocument, TransistorDocument, DEFAULT_AMBIENT_CELSIUS};
pub(crate) use formats::{check_design_format, check_spec_format};
pub use formats::{DESIGN_FORMAT, DESIGN_FORMATS, DESIGN_RESULT_FORMAT, SPEC_FORMAT, SPEC_FORMATS};
pub(crate) use json::{parse, path};
pub use json::{utf8_text, MAX_DEPTH};
pub(crate) use schema::{block, leaf, Schema};
pub(crate) use typed::{
    file_celsius, free_text, object, optional, parse_error, required, share, text_at, typed_at,
    EXPECTED_TEXT,
};
pub use typed::{Typed, MAX_NOTES, MAX_TITLE};
