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

pub(crate) fn check_design_format(format: &str) -> Result<()> {
    if DESIGN_FORMATS.contains(&format.trim()) {
        Ok(())
    } else {
        let mut allowed = String::from(DESIGN_FORMAT);
        if SPEC_FORMATS.contains(&format.trim()) {
            allowed.push_str(
                " (this is a specification: `stagewright design FILE` turns it into a design file)",
            );
        } else {
            allowed.push_str(
                " (the only version this build reads; a newer file needs a newer stagewright)",
            );
        }
        Err(Error::new(
            "format",
            ErrorKind::Unsupported {
                value: format.to_owned(),
                allowed,
            },
        ))
    }
}

pub(crate) fn check_spec_format(format: &str) -> Result<()> {
    if SPEC_FORMATS.contains(&format.trim()) {
        return Ok(());
    }
    let mut allowed = String::from(SPEC_FORMAT);
    if DESIGN_FORMATS.contains(&format.trim()) {
        allowed.push_str(
            " (this is a design file: `stagewright analyze FILE` or `stagewright check FILE` reads it)",
        );
    } else {
        allowed.push_str(
            " (the only version this build reads; a newer file needs a newer stagewright)",
        );
    }
    Err(Error::new(
        "format",
        ErrorKind::Unsupported {
            value: format.to_owned(),
            allowed,
        },
    ))
}
