//! Conversions between Rust values and JavaScript values.

use serde::Serialize;
use wasm_bindgen::{JsCast, JsValue};

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

/// Read access to a plain JavaScript object handed over by the page.
///
/// Missing keys and values of the wrong type read as empty or default, so
/// a partial description draws what it can instead of failing.
pub(crate) struct Obj(JsValue);

impl Obj {
    pub(crate) fn new(value: JsValue) -> Self {
        Obj(value)
    }

    fn get(&self, key: &str) -> JsValue {
        if !self.0.is_object() {
            return JsValue::UNDEFINED;
        }
        js_sys::Reflect::get(&self.0, &JsValue::from_str(key)).unwrap_or(JsValue::UNDEFINED)
    }

    /// A string, or empty.
    pub(crate) fn str(&self, key: &str) -> String {
        self.get(key).as_string().unwrap_or_default()
    }

    /// A number, or `None`.
    pub(crate) fn num(&self, key: &str) -> Option<f64> {
        self.get(key).as_f64()
    }

    /// A truthy value.
    pub(crate) fn flag(&self, key: &str) -> bool {
        self.get(key).is_truthy()
    }

    /// Numbers from an `Array` or a `Float64Array`; `null` and anything
    /// that is not a number become NaN (a gap in a line).
    pub(crate) fn numbers(&self, key: &str) -> Vec<f64> {
        let v = self.get(key);
        if let Some(a) = v.dyn_ref::<js_sys::Float64Array>() {
            return a.to_vec();
        }
        if js_sys::Array::is_array(&v) {
            return js_sys::Array::from(&v)
                .iter()
                .map(|x| x.as_f64().unwrap_or(f64::NAN))
                .collect();
        }
        Vec::new()
    }

    /// The objects of an array.
    pub(crate) fn list(&self, key: &str) -> Vec<Obj> {
        let v = self.get(key);
        if js_sys::Array::is_array(&v) {
            js_sys::Array::from(&v).iter().map(Obj).collect()
        } else {
            Vec::new()
        }
    }

    /// A nested object, if there is one.
    pub(crate) fn obj(&self, key: &str) -> Option<Obj> {
        let v = self.get(key);
        v.is_object().then_some(Obj(v))
    }
}
