//! Conversions between Rust values and JavaScript values.

use serde::Serialize;
use wasm_bindgen::JsValue;

/// An error as the page sees it: the field it is about (as the design file
/// spells it, e.g. `parts.rc`) and a message ready to show.
#[derive(Serialize)]
struct FieldError<'a> {
    field: &'a str,
    message: &'a str,
}

/// Serializes `value` as plain JSON-like JavaScript data: objects rather than
/// `Map`s, `null` rather than `undefined` for `None`.
pub(crate) fn to_js<T: Serialize + ?Sized>(value: &T) -> Result<JsValue, JsValue> {
    value
        .serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .map_err(|e| field_error("", &e.to_string()))
}

/// A JavaScript object `{field, message}`.
pub(crate) fn field_error(field: &str, message: &str) -> JsValue {
    to_js_infallible(&FieldError { field, message })
}

/// The JavaScript form of a core error.
pub(crate) fn core_error(err: &stagewright::Error) -> JsValue {
    field_error(err.field(), &err.to_string())
}

fn to_js_infallible<T: Serialize>(value: &T) -> JsValue {
    value
        .serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .unwrap_or(JsValue::NULL)
}
