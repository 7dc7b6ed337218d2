//! Conversions between Rust values and JavaScript values.

use wasm_bindgen::{JsCast, JsValue};

/// A JavaScript object `{field, message}`: the field an error is about (as
/// the design file spells it, e.g. `parts.rc`) and a message ready to show.
pub(crate) fn field_error(field: &str, message: &str) -> JsValue {
    let o = Builder::new();
    o.set("field", field);
    o.set("message", message);
    o.into()
}

/// The text of a string argument, or an error naming `field` when the
/// caller handed over something else (a number, `true`, an object): every
/// export takes its text arguments this way, so that no value a page or a
/// shared link can produce reaches the engine as anything but a string.
pub(crate) fn text(value: &JsValue, field: &str) -> Result<String, JsValue> {
    value.as_string().ok_or_else(|| {
        let got = if value.is_undefined() || value.is_null() {
            "nothing"
        } else if value.as_bool().is_some() {
            "true or false"
        } else if value.as_f64().is_some() {
            "a number"
        } else {
            "an object"
        };
        field_error(
            field,
            &[field, " must be text (a string), got ", got].concat(),
        )
    })
}

/// The JavaScript form of a core error.
pub(crate) fn core_error(err: &stagewright::Error) -> JsValue {
    field_error(err.field(), &err.to_string())
}

/// A plain JavaScript object built key by key (cheaper than serializing a
/// struct when the values are already JavaScript values or typed arrays).
pub(crate) struct Builder(js_sys::Object);

impl Builder {
    pub(crate) fn new() -> Self {
        Builder(js_sys::Object::new())
    }

    /// Sets `key` to `value`; a failure (impossible on a fresh plain
    /// object) is ignored.
    pub(crate) fn set(&self, key: &str, value: impl Into<JsValue>) {
        let _ = js_sys::Reflect::set(&self.0, &JsValue::from_str(key), &value.into());
    }
}

impl From<Builder> for JsValue {
    fn from(b: Builder) -> JsValue {
        b.0.into()
    }
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

    /// Numbers from a `Float64Array` (NaN is a gap in a line); anything
    /// else reads as no numbers.
    pub(crate) fn numbers(&self, key: &str) -> Vec<f64> {
        self.get(key)
            .dyn_ref::<js_sys::Float64Array>()
            .map(js_sys::Float64Array::to_vec)
            .unwrap_or_default()
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
