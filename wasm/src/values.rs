//! Values as typed, as understood, and as the nearest standard part.

use serde::Serialize;
use stagewright::ESeries;
use wasm_bindgen::prelude::*;

use crate::js::{core_error, to_js};

/// Reads `text` as a value of `field` in `unit` (core notation: `4k7`, `10u`,
/// `100 nF`, `2.2e3`).
///
/// JS: `parse_value(field: string, text: string, unit: string): number`;
/// throws `{field, message}` when the text cannot be read.
#[wasm_bindgen]
pub fn parse_value(field: &str, text: &str, unit: &str) -> Result<f64, JsValue> {
    stagewright::parse_value_field(field, text, unit).map_err(|e| core_error(&e))
}

/// Formats `value` (SI base units) with an SI prefix: `4.7 kΩ`.
///
/// JS: `format_si(value: number, unit: string): string`.
#[wasm_bindgen]
pub fn format_si(value: f64, unit: &str) -> String {
    stagewright::format_si(value, unit)
}

/// The nearest values of a standard series around a value.
#[derive(Serialize)]
struct Lookup {
    nearest: f64,
    below: f64,
    above: f64,
    error: f64,
    tolerance: f64,
}

/// Looks `value` up in the standard series named `series` (`"E24"`).
///
/// JS: `series_lookup(series: string, value: number):
/// {nearest, below, above, error, tolerance} | null` (null when the value has
/// no standard neighbour, e.g. zero); throws `{field: "series", message}` for
/// an unknown series name.
#[wasm_bindgen]
pub fn series_lookup(series: &str, value: f64) -> Result<JsValue, JsValue> {
    let s = ESeries::parse(series).map_err(|e| core_error(&e.within("series")))?;
    match s.lookup(value) {
        Some(l) => to_js(&Lookup {
            nearest: l.nearest,
            below: l.below,
            above: l.above,
            error: l.error,
            tolerance: s.tolerance(),
        }),
        None => Ok(JsValue::NULL),
    }
}

/// The version of this build (`0.1.0`).
///
/// JS: `version(): string`.
#[wasm_bindgen]
pub fn version() -> String {
    env!("CARGO_PKG_VERSION").into()
}
