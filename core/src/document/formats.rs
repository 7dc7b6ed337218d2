//! The format identifiers of every document this build reads and writes,
//! and the check of a file's `format` key, which points a file of one
//! format given to the reader of another to the right command.

use alloc::borrow::ToOwned;
use alloc::string::String;

use crate::error::{Error, ErrorKind, Result};

/// The format name and version this build writes: `stagewright/1`.
pub const DESIGN_FORMAT: &str = "stagewright/1";

/// Every format version this build reads.
pub const DESIGN_FORMATS: &[&str] = &[DESIGN_FORMAT];

/// The format of a finished design from a specification (the document of
/// `stagewright design SPEC --json` and of the page's "from requirements"
/// view): `stagewright-design/1`.
pub const DESIGN_RESULT_FORMAT: &str = "stagewright-design/1";

/// The format name and version of a specification: `stagewright-spec/1`.
pub const SPEC_FORMAT: &str = "stagewright-spec/1";

/// Every specification format version this build reads.
pub const SPEC_FORMATS: &[&str] = &[SPEC_FORMAT];

/// The design file's `format`: one of [`DESIGN_FORMATS`]; a specification's
/// format is pointed to the command that reads it.
pub(crate) fn check_design_format(format: &str) -> Result<()> {
    check_format(
        format,
        DESIGN_FORMATS,
        SPEC_FORMATS,
        " (this is a specification: `stagewright design FILE` turns it into a design file)",
    )
}

/// The specification's `format`: one of [`SPEC_FORMATS`]; a design file's
/// format is pointed to the commands that read it.
pub(crate) fn check_spec_format(format: &str) -> Result<()> {
    check_format(
        format,
        SPEC_FORMATS,
        DESIGN_FORMATS,
        " (this is a design file: `stagewright analyze FILE` or `stagewright check FILE` reads it)",
    )
}

/// `format` (trimmed) is one of `reads`; else an error that names the
/// version this build writes (the first of `reads`) and either `other_hint`,
/// for a format of the other kind (`other`), or the note that a newer file
/// needs a newer build.
fn check_format(format: &str, reads: &[&str], other: &[&str], other_hint: &str) -> Result<()> {
    let f = format.trim();
    if reads.contains(&f) {
        return Ok(());
    }
    let mut allowed = String::from(reads.first().copied().unwrap_or_default());
    allowed.push_str(if other.contains(&f) {
        other_hint
    } else {
        " (the only version this build reads; a newer file needs a newer stagewright)"
    });
    Err(Error::new(
        "format",
        ErrorKind::Unsupported {
            value: format.to_owned(),
            allowed,
        },
    ))
}
