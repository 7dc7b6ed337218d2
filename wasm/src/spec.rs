//! The "from requirements" view: a specification file designed by the
//! core, as `stagewright design SPEC --json` prints it.
//!
//! Glue only: the core reads the specification (`SpecFile::from_json`,
//! the command line's reader) and designs it (`SpecFile::design_result`, the
//! function behind the command); this module hands the result over.

use stagewright::SpecFile;
use wasm_bindgen::prelude::*;

use crate::analysis::to_js;
use crate::js::{core_error, text};

/// Designs a specification file (format `stagewright-spec/1`, JSON text).
///
/// JS: `design_from_spec(specJson: string) -> {format, pass, target, parts,
/// differences, notes, design, report}`, the document of `stagewright
/// design SPEC --json` (`design` is the design file of the standard-value
/// design, `report` its report); throws `{field, message}` with the core's
/// message, for an invalid file or a specification that cannot be met
/// (then `field` names the requirement, such as `requirements.min_swing`).
#[wasm_bindgen]
pub fn design_from_spec(spec_json: JsValue) -> Result<JsValue, JsValue> {
    let spec =
        SpecFile::from_json(&text(&spec_json, "specification")?).map_err(|e| core_error(&e))?;
    let (result, _) = spec.design_result().map_err(|e| core_error(&e))?;
    to_js(&result)
}
