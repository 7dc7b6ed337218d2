//! Values as typed, as understood, and as the nearest standard part.

use stagewright::ESeries;
use wasm_bindgen::prelude::*;

use crate::js::{self, core_error, Builder};

/// Reads `text` as a value of `field` in `unit` (core notation: `4k7`, `10u`,
/// `100 nF`, `2.2e3`).
///
/// JS: `parse_value(field: string, text: string, unit: string): number`;
/// throws `{field, message}` when the text cannot be read.
#[wasm_bindgen]
pub fn parse_value(field: JsValue, text: JsValue, unit: JsValue) -> Result<f64, JsValue> {
    let field = js::text(&field, "field")?;
    let value = js::text(&text, &field)?;
    let unit = js::text(&unit, "unit")?;
    stagewright::parse_value_field(&field, &value, &unit).map_err(|e| core_error(&e))
}

/// Formats `value` (SI base units) with an SI prefix: `4.7 kΩ`.
///
/// JS: `format_si(value: number, unit: string): string`.
#[wasm_bindgen]
pub fn format_si(value: f64, unit: JsValue) -> String {
    stagewright::format_si(value, &unit.as_string().unwrap_or_default())
}

/// Looks `value` up in the standard series named `series` (`"E24"`).
///
/// JS: `series_lookup(series: string, value: number):
/// {nearest, below, above, error, tolerance} | null` (null when the value has
/// no standard neighbour, e.g. zero); throws `{field: "series", message}` for
/// an unknown series name.
#[wasm_bindgen]
pub fn series_lookup(series: JsValue, value: f64) -> Result<JsValue, JsValue> {
    let series = js::text(&series, "series")?;
    let s = ESeries::parse(&series).map_err(|e| core_error(&e.within("series")))?;
    match s.lookup(value) {
        Some(l) => {
            let o = Builder::new();
            o.set("nearest", l.nearest);
            o.set("below", l.below);
            o.set("above", l.above);
            o.set("error", l.error);
            o.set("tolerance", s.tolerance());
            Ok(o.into())
        }
        None => Ok(JsValue::NULL),
    }
}

/// Formats `value` with exactly the digits that read back to the same
/// number (`stagewright::format_exact`): `4.7 kΩ`, `3.3 µF`.
///
/// JS: `format_exact(value: number, unit: string): string`.
#[wasm_bindgen]
pub fn format_exact(value: f64, unit: JsValue) -> String {
    stagewright::format_exact(value, &unit.as_string().unwrap_or_default())
}
