//! A design held in the engine between keystrokes: the page sends the one
//! field that changed, not the whole design.
//!
//! Glue only: the field's unit and kind come from the core's tables
//! (`stagewright::field`, `stagewright::REQUIREMENTS`), its value from
//! `parse_value_field`, its echo from `format_si`, its standard neighbour
//! from `ESeries::lookup` and its warning from `unusual`; the held
//! document is the core's own `DesignDocument`, edited with its `set`, and
//! `compute` reads it as the command line's reader does
//! (`Design::try_from`, so every message is the command line's) and
//! analyses it as [`crate::compute`] does.

use stagewright::{DesignDocument, ESeries, FieldKind};
use wasm_bindgen::prelude::*;

use crate::analysis::compute_design;
use crate::js::{core_error, text, Builder};

/// A design being edited.
///
/// JS: `const s = new Session(designJson)` (throws `{field, message}` with
/// the command line's message when the text is refused); then
/// `s.set(path, text, series)` for each edit, `s.compute(pointsPerDecade)`
/// for the results; `s.free()` when done. (The page keeps its own copy of
/// the design for export, so the session writes none back.)
#[wasm_bindgen]
pub struct Session {
    doc: DesignDocument,
}

/// A field's path and what the tables say of it: the name that messages
/// use (`rc`), its unit, and whether its value is read with that unit.
struct Slot {
    name: &'static str,
    unit: &'static str,
    value: bool,
}

fn slot(path: &str) -> Option<Slot> {
    if let Some(f) = stagewright::field(path) {
        return Some(Slot {
            name: f.name(),
            unit: f.unit,
            // A share ("5 %" or 0.05) is checked by the reader at compute.
            value: f.kind == FieldKind::Value && f.unit != "%",
        });
    }
    let key = path.strip_prefix("requirements.")?;
    if let Some(c) = stagewright::CONDITIONS.iter().find(|c| c.key == key) {
        return Some(Slot {
            name: c.key,
            unit: c.unit,
            value: true,
        });
    }
    let r = stagewright::REQUIREMENTS.iter().find(|r| r.key == key)?;
    Some(Slot {
        name: r.key,
        unit: r.unit,
        // A share ("1 %" or 0.01) is checked by the reader at compute.
        value: r.unit != "%",
    })
}

#[wasm_bindgen]
impl Session {
    /// Reads a design file with the command line's reader and holds it.
    #[wasm_bindgen(constructor)]
    pub fn new(design_json: JsValue) -> Result<Session, JsValue> {
        let t = text(&design_json, "design")?;
        let doc = DesignDocument::from_json(&t).map_err(|e| core_error(&e))?;
        // Every value read now, so that a refused file is refused here.
        stagewright::Design::try_from(doc.clone()).map_err(|e| core_error(&e))?;
        Ok(Session { doc })
    }

    /// One edit: `path` is the field's dotted path (`parts.rc`, `supply`,
    /// `requirements.min_swing`), `text` as typed (empty removes the key),
    /// `series` the standard series offered for a part (`"E24"`).
    ///
    /// JS: `set(path, text, series) -> {ok, empty?, value?, echo?,
    /// nearest?: {series, value, echo, error}, unusual?, error?: {field,
    /// message}}`. A value that cannot be read is not kept (`ok` false, the
    /// core's message in `error`); the design keeps its last good value.
    pub fn set(&mut self, path: JsValue, text_typed: JsValue, series: JsValue) -> JsValue {
        let out = Builder::new();
        let fail = |field: &str, message: &str| {
            let e = Builder::new();
            e.set("field", field);
            e.set("message", message);
            out.set("ok", false);
            out.set("error", e);
        };
        let (Some(path), Some(typed)) = (path.as_string(), text_typed.as_string()) else {
            fail("", "set needs a field's path and its text");
            return out.into();
        };
        let Some(slot) = slot(&path) else {
            fail(&path, &["there is no field ", &path].concat());
            return out.into();
        };
        let trimmed = typed.trim();
        if trimmed.is_empty() {
            if let Err(e) = self.doc.set(&path, None) {
                let err: JsValue = core_error(&e);
                out.set("ok", false);
                out.set("error", err);
                return out.into();
            }
            out.set("ok", true);
            out.set("empty", true);
            return out.into();
        }
        if slot.value {
            let v = match stagewright::parse_value_field(slot.name, &typed, slot.unit) {
                Ok(v) => v,
                Err(e) => {
                    let err: JsValue = core_error(&e);
                    out.set("ok", false);
                    out.set("error", err);
                    return out.into();
                }
            };
            out.set("value", v);
            out.set("echo", stagewright::format_si(v, slot.unit));
            if let Some(w) = stagewright::unusual(slot.name, v) {
                out.set("unusual", w);
            }
            let family = stagewright::field(&path).and_then(|f| f.family);
            if let (Some(_), Some(name)) = (family, series.as_string()) {
                if let Ok(s) = ESeries::parse(&name) {
                    if let Some(l) = s.lookup(v) {
                        let n = Builder::new();
                        n.set("series", name.as_str());
                        n.set("value", l.nearest);
                        n.set("echo", stagewright::format_si(l.nearest, slot.unit));
                        n.set("error", l.error);
                        out.set("nearest", n);
                    }
                }
            }
        }
        // Titles and notes keep their spaces; the rest is trimmed. The
        // reader checks text and choices at compute.
        let keep = match stagewright::field(&path).map(|f| f.kind) {
            Some(FieldKind::Text(_) | FieldKind::Notes(_)) => typed.as_str(),
            _ => trimmed,
        };
        if let Err(e) = self.doc.set(&path, Some(keep)) {
            let err: JsValue = core_error(&e);
            out.set("ok", false);
            out.set("error", err);
            return out.into();
        }
        out.set("ok", true);
        out.into()
    }

    /// Analyses the design as held: `{report, sweep, curves}` as
    /// `compute(designJson, pointsPerDecade)` gives them; throws `{field,
    /// message}` with the command line's message when the design as held
    /// is refused.
    pub fn compute(&self, points_per_decade: f64) -> Result<JsValue, JsValue> {
        let design = stagewright::Design::try_from(self.doc.clone()).map_err(|e| core_error(&e))?;
        compute_design(&design, points_per_decade)
    }
}
