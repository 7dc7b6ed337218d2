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

use stagewright::{load_lines, Analysis, Design, Report, SweepTable, PRESETS};
use wasm_bindgen::prelude::*;

use crate::js::{core_error, field_error, text, Builder};

/// Characteristics drawn under the load lines. Even, so that the
/// quiescent base current is one of them (see `stagewright::load_lines`).
const CURVES: usize = 6;
/// Points along each characteristic.
const CURVE_POINTS: usize = 48;
/// Points a decade of the page's sweep when the caller gives none.
const DEFAULT_PER_DECADE: f64 = 20.0;

/// Reads and analyses a design file.
fn solve(design_json: &JsValue) -> Result<(Design, Analysis), JsValue> {
    let design = read_design(design_json)?;
    let analysis = design.analyze().map_err(|e| core_error(&e))?;
    Ok((design, analysis))
}

/// Reads and validates a design file (no analysis) with the core's own
/// reader, `Design::from_json`: the JSON text itself, never an object the
/// browser parsed, so every message (a syntax error, a key given twice,
/// nesting too deep, a value out of range) is the command line's.
pub(crate) fn read_design(design_json: &JsValue) -> Result<Design, JsValue> {
    let text = text(design_json, "design")?;
    Design::from_json(&text).map_err(|e| core_error(&e))
}

/// Reads and validates a design file without analysing it, with the
/// command line's reader.
///
/// JS: `read_design(designJson: string) -> undefined`; throws `{field,
/// message}` with the command line's message.
#[wasm_bindgen(js_name = read_design)]
pub fn read_design_text(design_json: JsValue) -> Result<(), JsValue> {
    read_design(&design_json).map(|_| ())
}

/// The text of a file's bytes, which must be UTF-8 (`stagewright::utf8_text`,
/// the command line's check).
///
/// JS: `utf8_text(bytes: Uint8Array) -> string`; throws `{field, message}`.
#[wasm_bindgen]
pub fn utf8_text(bytes: &[u8]) -> Result<String, JsValue> {
    stagewright::utf8_text(bytes)
        .map(String::from)
        .map_err(|e| core_error(&e))
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
pub fn compute(design_json: JsValue, points_per_decade: f64) -> Result<JsValue, JsValue> {
    let design = read_design(&design_json)?;
    compute_design(&design, points_per_decade)
}

/// [`compute`] of a design already read (also `Session::compute`).
pub(crate) fn compute_design(design: &Design, points_per_decade: f64) -> Result<JsValue, JsValue> {
    let analysis = design.analyze().map_err(|e| core_error(&e))?;
    let out = Builder::new();
    out.set("report", report(design, &analysis)?);
    out.set("sweep", sweep(&analysis, points_per_decade)?);
    out.set("curves", curves(design, &analysis));
    Ok(out.into())
}

/// The report of a design file: the same document as
/// `stagewright analyze FILE --json` (format `stagewright-report/1`).
///
/// JS: `analyze(designJson: string) -> object`; throws `{field, message}`.
#[wasm_bindgen]
pub fn analyze(design_json: JsValue) -> Result<JsValue, JsValue> {
    let (design, analysis) = solve(&design_json)?;
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
pub fn preset_data(name: JsValue) -> Result<JsValue, JsValue> {
    let name = text(&name, "transistor.preset")?;
    let t = stagewright::preset(&name).map_err(|e| core_error(&e))?;
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

/// The core's tables that the page lays its results out from, so that it
/// keeps no copy of a label, a symbol or a unit:
///
/// * `figures`: every figure of the report (`stagewright::FIGURES`), as
///   `{key, label, symbol: [letter, subscript], unit}`, `key` the dotted
///   path in the report (`operating_point.ic`);
/// * `requirements`: `{key, label, unit, bound}` (`"at least"` or
///   `"at most"`), in the order of the file's block;
/// * `ratings`: `{id, label, what, unit}`, the transistor's rating checks;
/// * `open_resistance`: the resistance that stands for an open circuit
///   (`stagewright::OPEN_RESISTANCE`: ro with no Early effect);
/// * `quantities`: `{key, label, unit}`, the results the tolerance
///   analysis follows (`stagewright::Quantity`).
///
/// JS: `tables() -> {figures, requirements, ratings, open_resistance,
/// quantities}`.
#[wasm_bindgen]
pub fn tables() -> JsValue {
    let figures = js_sys::Array::new();
    for f in stagewright::FIGURES {
        let o = Builder::new();
        o.set("key", f.key);
        o.set("label", f.label);
        let symbol = js_sys::Array::new();
        symbol.push(&JsValue::from_str(f.symbol.0));
        symbol.push(&JsValue::from_str(f.symbol.1));
        o.set("symbol", symbol);
        o.set("unit", f.unit);
        figures.push(&o.into());
    }
    let requirements = js_sys::Array::new();
    for r in stagewright::REQUIREMENTS {
        let o = Builder::new();
        o.set("key", r.key);
        o.set("label", r.label());
        o.set("unit", r.unit);
        o.set(
            "bound",
            match r.bound {
                stagewright::Bound::AtLeast => "at least",
                stagewright::Bound::AtMost => "at most",
            },
        );
        requirements.push(&o.into());
    }
    let ratings = js_sys::Array::new();
    for r in stagewright::RATINGS {
        let o = Builder::new();
        o.set("id", r.id);
        o.set("label", r.label);
        o.set("what", r.what);
        o.set("unit", r.unit);
        ratings.push(&o.into());
    }
    let o = Builder::new();
    o.set("figures", figures);
    o.set("requirements", requirements);
    o.set("ratings", ratings);
    o.set("open_resistance", stagewright::OPEN_RESISTANCE);
    let quantities = js_sys::Array::new();
    for q in stagewright::Quantity::ALL {
        let e = Builder::new();
        e.set("key", q.name());
        e.set("label", q.figure().label);
        e.set("unit", q.unit());
        quantities.push(&e.into());
    }
    o.set("quantities", quantities);
    o.into()
}

/// A warning when `value` (SI units) lies far outside the usual range of
/// the part or condition `key` (`rc`, `c_in`, `supply`), else null:
/// "1 mΩ is unusual for a collector resistor (usually 1 Ω to 10 MΩ)"
/// (`stagewright::unusual`).
///
/// JS: `unusual(key: string, value: number) -> string | null`.
#[wasm_bindgen]
pub fn unusual(key: JsValue, value: f64) -> Option<String> {
    stagewright::unusual(&key.as_string()?, value)
}

/// The value a field takes when the file leaves it out, as the form shows
/// it: the ambient and the tolerance box's defaults, from the core.
fn default_text(key: &str) -> Option<String> {
    let t = stagewright::Tolerances::default();
    let share = |x: f64| {
        let mut s = stagewright::format_exact(x * 100.0, "");
        s.push_str(" %");
        s
    };
    Some(match key {
        "ambient" => stagewright::format_exact(stagewright::DEFAULT_AMBIENT_CELSIUS, ""),
        "tolerances.resistor_tolerance" => share(t.resistor_tolerance),
        "tolerances.capacitor_tolerance" => share(t.capacitor_tolerance),
        "tolerances.supply_tolerance" => share(t.supply_tolerance),
        "tolerances.vbe_spread" => stagewright::format_exact(t.vbe_spread, "V"),
        "tolerances.ambient_min" => stagewright::format_exact(t.ambient_min.celsius(), ""),
        "tolerances.ambient_max" => stagewright::format_exact(t.ambient_max.celsius(), ""),
        _ => return None,
    })
}

/// The menu of a choice field, `[[value, words]]`: the stages, the
/// polarities (with "from the class"), the E-series; null for the preset,
/// whose menu comes from `presets()`.
fn choices(key: &str) -> JsValue {
    use stagewright::{Polarity, StageKind};
    let options = js_sys::Array::new();
    let push = |a: &str, b: &str| {
        let p = js_sys::Array::new();
        p.push(&JsValue::from_str(a));
        p.push(&JsValue::from_str(b));
        options.push(&p);
    };
    match key {
        "stage" => {
            for s in StageKind::ALL {
                push(s.name(), s.label());
            }
        }
        "transistor.polarity" => {
            push("", "from the class");
            // (Written out: `to_uppercase` would bring in Unicode's case
            // tables, several KB of the page.)
            for (p, words) in [(Polarity::Npn, "NPN"), (Polarity::Pnp, "PNP")] {
                push(p.name(), words);
            }
        }
        "series.resistors" | "series.capacitors" => {
            for e in stagewright::ESeries::ALL {
                push(e.name(), e.name());
            }
        }
        _ => return JsValue::NULL,
    }
    options.into()
}

/// The design form's schema, from the core's tables: the groups of
/// fields (`stagewright::FIELDS`, the requirements from
/// `stagewright::REQUIREMENTS`), the stages with their words and the parts
/// each uses, so that the page keeps no list of fields of its own.
///
/// JS: `fields() -> {format, stages: [[name, label]], stage_parts: {name:
/// [part]}, spec: [field of the specification form, with its default],
/// groups: [{id, legend, fields: [{path, key, unit, desc, kind,
/// maxlength?, series?, options?, default?}]}]}`; `kind` is "value", "text",
/// "textarea" or "select"; `series` "R" or "C" for a standard part;
/// `options` [[value, words]] for a choice (null for the preset, whose
/// menu comes from `presets()`).
#[wasm_bindgen]
pub fn fields() -> JsValue {
    use stagewright::{Family, FieldKind, Group, StageKind};
    let pair = |a: &str, b: &str| {
        let p = js_sys::Array::new();
        p.push(&JsValue::from_str(a));
        p.push(&JsValue::from_str(b));
        p
    };
    let stages = js_sys::Array::new();
    let stage_parts = Builder::new();
    for s in StageKind::ALL {
        stages.push(&pair(s.name(), s.label()));
        let parts = js_sys::Array::new();
        for p in s.parts() {
            parts.push(&JsValue::from_str(p));
        }
        stage_parts.set(s.name(), parts);
    }
    let one = |key: &str, desc: &str, unit: &str, kind: &str| {
        let o = Builder::new();
        let path = js_sys::Array::new();
        for k in key.split('.') {
            path.push(&JsValue::from_str(k));
        }
        o.set("path", path);
        o.set("key", key.rsplit('.').next().unwrap_or(key));
        o.set("unit", unit);
        o.set("desc", desc);
        o.set("kind", kind);
        o
    };
    let groups = js_sys::Array::new();
    let add_group = |id: &str, legend: &str, list: js_sys::Array| {
        let g = Builder::new();
        g.set("id", id);
        g.set("legend", legend);
        g.set("fields", list);
        groups.push(&g.into());
    };
    for group in [
        Group::Stage,
        Group::Transistor,
        Group::Parts,
        Group::Tolerances,
    ] {
        let list = js_sys::Array::new();
        for f in stagewright::FIELDS.iter().filter(|f| f.group == group) {
            let kind = match f.kind {
                FieldKind::Value => "value",
                FieldKind::Text(_) => "text",
                FieldKind::Notes(_) => "textarea",
                FieldKind::Choice => "select",
            };
            let o = one(f.key, f.label, f.unit, kind);
            if let FieldKind::Text(n) | FieldKind::Notes(n) = f.kind {
                o.set("maxlength", n as f64);
            }
            if let Some(d) = default_text(f.key) {
                o.set("default", d);
            }
            match f.family {
                Some(Family::Resistor) => o.set("series", "R"),
                Some(Family::Capacitor) => o.set("series", "C"),
                None => {}
            }
            if f.kind == FieldKind::Choice {
                o.set("options", choices(f.key));
            }
            list.push(&o.into());
        }
        add_group(group.id(), group.legend(), list);
        // The requirements block sits between the parts and the tolerances.
        if group == Group::Parts {
            let list = js_sys::Array::new();
            for r in stagewright::REQUIREMENTS {
                let bound = match r.bound {
                    stagewright::Bound::AtLeast => "at least",
                    stagewright::Bound::AtMost => "at most",
                };
                let desc = [r.label(), " ", bound].concat();
                let key = ["requirements.", r.key].concat();
                list.push(&one(&key, &desc, r.unit, "value").into());
            }
            for c in stagewright::CONDITIONS {
                let key = ["requirements.", c.key].concat();
                list.push(&one(&key, c.label, c.unit, "value").into());
            }
            add_group("requirements", "Requirements", list);
        }
    }
    // The specification form's fields (`stagewright::SPEC_FIELDS`).
    let spec = js_sys::Array::new();
    for f in stagewright::SPEC_FIELDS {
        let kind = match f.kind {
            FieldKind::Value => "value",
            FieldKind::Text(_) | FieldKind::Notes(_) => "text",
            FieldKind::Choice => "select",
        };
        let o = one(f.key, f.label, f.unit, kind);
        o.set("default", f.default);
        if f.kind == FieldKind::Choice {
            o.set("options", choices(f.key));
        }
        spec.push(&o.into());
    }
    let o = Builder::new();
    o.set("format", stagewright::DESIGN_FORMAT);
    o.set("spec", spec);
    o.set("stages", stages);
    o.set("stage_parts", stage_parts);
    o.set("groups", groups);
    o.into()
}
