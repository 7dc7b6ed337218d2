//! The analysis, as the page asks for it: the report, the frequency sweep
//! and the load-line curves of a design file.
//!
//! Glue only: every number comes from the core (`Design::from_json`,
//! `Design::analyze`, `Report::new`, `SweepTable::new`, `load_lines`); this
//! module picks what to ask for and hands the answers to JavaScript.
//!
//! The page recomputes on every keystroke, so [`compute`] analyses the
//! design once and returns all three answers (the report, the sweep and the
//! load lines); [`analyze`] gives the report alone, for scripts. (Separate
//! `frequency_sweep` and `output_curves` exports would each analyse the
//! design again and cost bytes the page's size budget does not have; their
//! results are `compute(…).sweep` and `compute(…).curves`.)

use serde_json::Value;
use stagewright::{load_lines, Analysis, Design, DesignDocument, Report, SweepTable, PRESETS};
use wasm_bindgen::prelude::*;
use wasm_bindgen::JsCast;

use crate::js::{core_error, field_error, Builder};

/// Characteristics drawn under the load lines. Even, so that the
/// quiescent base current is one of them (see `stagewright::load_lines`).
const CURVES: usize = 6;
/// Points along each characteristic.
const CURVE_POINTS: usize = 48;
/// Points a decade of the page's sweep when the caller gives none.
const DEFAULT_PER_DECADE: f64 = 20.0;

/// Reads and analyses a design file.
///
/// The JSON text is parsed by the browser (`JSON.parse`) and the result
/// goes through the core's reader, `DesignDocument::from_value` and
/// `Design::try_from`: the very path of `Design::from_json` after its JSON
/// parse, so every message about a key or a value is the command line's.
/// Only a JSON syntax error reads differently (the browser's wording).
/// Leaving serde_json's parser out of the module saves about 25 KB.
fn solve(design_json: &str) -> Result<(Design, Analysis), JsValue> {
    let design = read_design(design_json)?;
    let analysis = design.analyze().map_err(|e| core_error(&e))?;
    Ok((design, analysis))
}

/// Reads and validates a design file (no analysis).
pub(crate) fn read_design(design_json: &str) -> Result<Design, JsValue> {
    let value = read_json(design_json)?;
    DesignDocument::from_value(&value)
        .and_then(Design::try_from)
        .map_err(|e| core_error(&e))
}

/// JSON text as a `serde_json::Value`, parsed by the browser.
pub(crate) fn read_json(text: &str) -> Result<Value, JsValue> {
    let parsed = js_sys::JSON::parse(text).map_err(|e| {
        let why = e
            .dyn_ref::<js_sys::Error>()
            .map(|e| String::from(e.message()))
            .unwrap_or_default();
        field_error("", &["the design is not valid JSON: ", &why].concat())
    })?;
    Ok(json_value(&parsed))
}

/// A value made by `JSON.parse` as a `serde_json::Value`. Whole numbers
/// become integers, as serde_json reads `12`; the others stay `f64`, the
/// same correctly rounded value serde_json reads from the text.
fn json_value(v: &JsValue) -> Value {
    if let Some(s) = v.as_string() {
        Value::String(s)
    } else if let Some(x) = v.as_f64() {
        const EXACT: f64 = 9_007_199_254_740_992.0; // 2^53
        if x.fract() == 0.0 && x.abs() <= EXACT && !(x == 0.0 && x.is_sign_negative()) {
            Value::from(x as i64)
        } else {
            serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number)
        }
    } else if let Some(b) = v.as_bool() {
        Value::Bool(b)
    } else if js_sys::Array::is_array(v) {
        Value::Array(
            js_sys::Array::from(v)
                .iter()
                .map(|x| json_value(&x))
                .collect(),
        )
    } else if let Some(o) = v.dyn_ref::<js_sys::Object>() {
        let mut map = serde_json::Map::new();
        for entry in js_sys::Object::entries(o).iter() {
            let pair = js_sys::Array::from(&entry);
            map.insert(
                pair.get(0).as_string().unwrap_or_default(),
                json_value(&pair.get(1)),
            );
        }
        Value::Object(map)
    } else {
        Value::Null
    }
}

/// The report as a plain object: the JSON document of
/// `stagewright analyze FILE --json` (the same serializer, without the
/// indentation), parsed by the browser.
fn report(design: &Design, analysis: &Analysis) -> Result<JsValue, JsValue> {
    to_js(&Report::new(design, analysis))
}

/// A serializable core value as a plain object: its JSON text (the
/// serializer of the command line's `--json`, without indentation), parsed
/// by the browser. Numbers keep every bit (shortest round-trip text).
pub(crate) fn to_js<T: serde::Serialize>(value: &T) -> Result<JsValue, JsValue> {
    let text = serde_json::to_string(value)
        .map_err(|_| field_error("", "the result could not be written"))?;
    js_sys::JSON::parse(&text).map_err(|_| field_error("", "the result could not be read"))
}

/// The plot's frequency window, whole decades: from at least half a decade
/// below the lower corner (1 Hz when there is none) to at least a decade
/// above the upper corner (1 GHz when there is none), four decades at
/// least, within 1 mHz to 1 THz. A choice of view, not a circuit quantity.
fn window(analysis: &Analysis) -> (f64, f64) {
    let b = &analysis.bandwidth;
    let lo = b
        .f_low
        .map_or(0.0, |f| (libm::log10(f) - 0.5).floor())
        .clamp(-3.0, 8.0);
    let hi = b
        .f_high
        .map_or(9.0, |f| (libm::log10(f) + 1.0).ceil())
        .clamp(lo + 4.0, 12.0);
    (libm::pow(10.0, lo), libm::pow(10.0, hi))
}

/// The frequency response in columns of `Float64Array`s.
fn sweep(analysis: &Analysis, per_decade: f64) -> Result<JsValue, JsValue> {
    let per_decade = if per_decade.is_finite() {
        per_decade.clamp(1.0, 200.0)
    } else {
        DEFAULT_PER_DECADE
    };
    let (from, to) = window(analysis);
    let points = (libm::log10(to / from) * per_decade).round() as usize + 1;
    let table = SweepTable::new(analysis, from, to, points).map_err(|e| core_error(&e))?;
    let column = |f: fn(&stagewright::SweepRow) -> f64| {
        let v: Vec<f64> = table.rows.iter().map(f).collect();
        js_sys::Float64Array::from(v.as_slice())
    };
    let out = Builder::new();
    out.set("freq", column(|r| r.frequency));
    out.set("voltage_gain_db", column(|r| r.voltage_gain_db));
    out.set(
        "voltage_gain_from_source_db",
        column(|r| r.voltage_gain_from_source_db),
    );
    out.set("current_gain_db", column(|r| r.current_gain_db));
    out.set("power_gain_db", column(|r| r.power_gain_db));
    out.set("phase_deg", column(|r| r.phase_deg));
    out.set("input_impedance", column(|r| r.input_impedance));
    out.set("output_impedance", column(|r| r.output_impedance));
    Ok(out.into())
}

/// A point `{label, vce, ic}`.
fn point(label: &str, (vce, ic): (f64, f64)) -> JsValue {
    let p = Builder::new();
    if !label.is_empty() {
        p.set("label", label);
    }
    p.set("vce", vce);
    p.set("ic", ic);
    p.into()
}

/// A line `{vce: [], ic: []}` through the given points.
fn line(points: &[(f64, f64)]) -> JsValue {
    let l = Builder::new();
    let (vce, ic): (Vec<f64>, Vec<f64>) = points.iter().copied().unzip();
    l.set("vce", js_sys::Float64Array::from(vce.as_slice()));
    l.set("ic", js_sys::Float64Array::from(ic.as_slice()));
    l.into()
}

/// The load lines over the output characteristics, magnitudes in V and A.
fn curves(design: &Design, analysis: &Analysis) -> JsValue {
    let ll = load_lines(&design.stage, analysis, CURVES, CURVE_POINTS);
    let chars = js_sys::Array::new();
    for c in &ll.characteristics {
        let o = Builder::new();
        let mut label = String::from("IB ");
        label.push_str(&stagewright::format_si(c.ib, "A"));
        o.set("label", label.as_str());
        o.set("ib", c.ib);
        o.set("vce", js_sys::Float64Array::from(c.vce.as_slice()));
        o.set("ic", js_sys::Float64Array::from(c.ic.as_slice()));
        chars.push(&o.into());
    }
    let limits = js_sys::Array::new();
    limits.push(&point("saturation", ll.limits[0]));
    limits.push(&point("cutoff", ll.limits[1]));
    let out = Builder::new();
    out.set("characteristics", chars);
    out.set("dc_load_line", line(&ll.dc_line));
    out.set("ac_load_line", line(&ll.ac_line));
    out.set("quiescent", point("", ll.quiescent));
    out.set("swing_limits", limits);
    out.into()
}

/// Analyses a design file (format `stagewright/1`, JSON text) once and
/// returns everything the page shows.
///
/// JS: `compute(designJson: string, pointsPerDecade: number) -> {report,
/// sweep, curves}`; throws `{field, message}` with the core's message.
/// - `report`: as [`analyze`].
/// - `sweep`: the frequency response at `pointsPerDecade` log-spaced
///   points a decade, over whole decades from half a decade or more below
///   the lower corner to a decade or more above the upper one: `{freq,
///   voltage_gain_db, voltage_gain_from_source_db, current_gain_db,
///   power_gain_db, phase_deg, input_impedance, output_impedance}`, each a
///   `Float64Array` with one entry per frequency (Hz, dB, degrees, Ω).
/// - `curves`: the DC and AC load lines over the transistor's output
///   characteristics (from the model, at the stage's temperature),
///   magnitudes in V and A: `{characteristics: [{label, ib, vce, ic}],
///   dc_load_line: {vce, ic}, ac_load_line: {vce, ic}, quiescent: {vce,
///   ic}, swing_limits: [{label, vce, ic}]}` (`vce` and `ic` of lines are
///   `Float64Array`s).
#[wasm_bindgen]
pub fn compute(design_json: &str, points_per_decade: f64) -> Result<JsValue, JsValue> {
    let (design, analysis) = solve(design_json)?;
    let out = Builder::new();
    out.set("report", report(&design, &analysis)?);
    out.set("sweep", sweep(&analysis, points_per_decade)?);
    out.set("curves", curves(&design, &analysis));
    Ok(out.into())
}

/// The report of a design file: the same document as
/// `stagewright analyze FILE --json` (format `stagewright-report/1`).
///
/// JS: `analyze(designJson: string) -> object`; throws `{field, message}`.
#[wasm_bindgen]
pub fn analyze(design_json: &str) -> Result<JsValue, JsValue> {
    let (design, analysis) = solve(design_json)?;
    report(&design, &analysis)
}

/// The transistor presets in menu order.
///
/// JS: `presets() -> [{name, label}]`.
#[wasm_bindgen]
pub fn presets() -> JsValue {
    let list = js_sys::Array::new();
    for p in PRESETS.iter() {
        let o = Builder::new();
        o.set("name", p.name);
        o.set("label", p.label);
        list.push(&o.into());
    }
    list.into()
}

/// The datasheet values of a preset, keyed as in the design file's
/// `transistor` block (SI base units, `tj_max` in °C; `early_voltage` and
/// `cob_vcb` left out when the preset has none).
///
/// JS: `preset_data(name: string) -> {polarity, hfe, …}`; throws
/// `{field: "transistor.preset", message}` for an unknown name.
#[wasm_bindgen]
pub fn preset_data(name: &str) -> Result<JsValue, JsValue> {
    let t = stagewright::preset(name).map_err(|e| core_error(&e))?;
    let o = Builder::new();
    o.set("polarity", t.polarity.name());
    let values = [
        ("hfe", Some(t.hfe)),
        ("hfe_min", Some(t.hfe_min)),
        ("hfe_max", Some(t.hfe_max)),
        ("vbe", Some(t.vbe)),
        ("vbe_at_ic", Some(t.vbe_at_ic)),
        ("early_voltage", t.early_voltage),
        ("ft", Some(t.ft)),
        ("cob", Some(t.cob)),
        ("cob_vcb", t.cob_vcb),
        ("rbb", Some(t.rbb)),
        ("vce_sat", Some(t.vce_sat)),
        ("vceo_max", Some(t.vceo_max)),
        ("ic_max", Some(t.ic_max)),
        ("ptot_max", Some(t.ptot_max)),
        ("rth_ja", Some(t.rth_ja)),
        ("tj_max", Some(t.tj_max.celsius())),
    ];
    for (key, v) in values {
        if let Some(v) = v {
            o.set(key, v);
        }
    }
    Ok(o.into())
}
