//! The design file, format `stagewright/1`: a stage and its requirements as
//! one JSON document, shared by the command line and the web page.
//!
//! # Reading: raw input, then a validated design
//! A file is read in two steps, as typed and then checked:
//!
//! 1. [`DesignDocument::from_json`] reads the JSON text into a
//!    [`DesignDocument`]: every key is looked up against the format (an
//!    unknown key is an [`ErrorKind::UnknownKey`] error that names the
//!    nearest known key, so a typo never drops a requirement silently), and
//!    every value is kept *as typed*, a number or a string ([`Typed`]).
//! 2. `Design::try_from(document)` (the one conversion, [`TryFrom`]) reads
//!    each value in its unit with [`parse_value_field`], fills in the
//!    preset and the defaults, and validates the whole stage
//!    ([`Stage::validate`]). Everything after it works on checked SI values.
//!
//! [`Design::from_json`] does both. Every error names the key as a dotted
//! path (`transistor.hfe_min`, `parts.rc`, `requirements.min_swing`), the
//! value and what is allowed.
//!
//! # The format, version 1
//! A JSON object. Values are numbers in SI base units (temperatures in
//! degrees Celsius) or strings in the notation of [`parse_value_field`]:
//! `"4k7"`, `"10u"`, `"100 nF"`, `"1.2 MHz"`, `"25 °C"`. `null` is the same
//! as leaving the key out.
//!
//! | key | unit | meaning |
//! |---|---|---|
//! | `format` | | `"stagewright/1"`, required |
//! | `title`, `notes` | | free text |
//! | `stage` | | `"common-emitter"`, `"common-collector"` or `"common-base"`, required |
//! | `supply` | V | supply voltage (positive for both polarities), required |
//! | `ambient` | °C | ambient temperature, default 25 |
//! | `transistor` | | the device, an object (below), required |
//! | `parts` | | the passive parts, an object (below), required |
//! | `requirements` | | what the design must meet, an object (below), optional |
//! | `tolerances` | | the spread of the parts and conditions for the tolerance analysis, an object (below), optional |
//!
//! `transistor`: `preset` names a generic device ([`PRESETS`]); every other
//! key given beside it overrides the preset's value. Without a preset every
//! key is required except `early_voltage` (left out: no Early effect),
//! `cob_vcb` (left out: Cμ = `cob` at every voltage) and `rbb` (left out: 0).
//!
//! | key | unit | meaning |
//! |---|---|---|
//! | `preset` | | a preset name such as `general-purpose-npn` |
//! | `polarity` | | `"npn"` or `"pnp"` |
//! | `hfe`, `hfe_min`, `hfe_max` | | typical, lowest and highest DC current gain |
//! | `vbe` | V | base–emitter voltage magnitude at `vbe_at_ic`, 25 °C |
//! | `vbe_at_ic` | A | the collector current at which `vbe` is stated |
//! | `early_voltage` | V | Early voltage VA |
//! | `ft` | Hz | transition frequency |
//! | `cob` | F | output capacitance (collector–base) |
//! | `cob_vcb` | V | collector–base voltage at which `cob` is stated |
//! | `rbb` | Ω | base spreading resistance |
//! | `vce_sat` | V | collector–emitter saturation voltage magnitude |
//! | `vceo_max` | V | collector–emitter breakdown voltage, base open |
//! | `ic_max` | A | largest continuous collector current |
//! | `ptot_max` | W | total dissipation rating at 25 °C ambient |
//! | `rth_ja` | K/W | thermal resistance junction to ambient |
//! | `tj_max` | °C | largest junction temperature |
//!
//! `parts` (Ω, F and W; see [`Parts`] and the table of [`Stage`]):
//!
//! | key | unit | meaning |
//! |---|---|---|
//! | `r1` | Ω | supply to base |
//! | `r2` | Ω | base to ground |
//! | `rc` | Ω | collector resistor; required in common-emitter and common-base stages, default 0 (collector on the rail) in a follower |
//! | `re` | Ω | unbypassed emitter resistance; required in common-collector and common-base stages, default 0 |
//! | `re_bypassed` | Ω | emitter resistance below `re`, bypassed by `c_emitter` (common emitter only), default 0 |
//! | `rs` | Ω | source resistance, default 0 |
//! | `rl` | Ω | load resistance, default 1 MΩ |
//! | `c_in`, `c_out` | F | input and output coupling capacitors |
//! | `c_emitter` | F | emitter bypass capacitor (common emitter only) |
//! | `c_base` | F | base bypass capacitor (common base only) |
//! | `resistor_rating` | W | power rating of every resistor, default 0.25 |
//!
//! A capacitor that is left out is *ideal*: a short at every signal
//! frequency, so it makes no corner (and a stage with every capacitor left
//! out has no lower corner). A part that makes no sense for the stage, such
//! as `c_base` in a common-emitter stage, is an error.
//!
//! `requirements` (every key optional; see [`Requirements`]):
//!
//! | key | unit | meaning |
//! |---|---|---|
//! | `min_voltage_gain_db`, `max_voltage_gain_db` | dB | bounds on the midband voltage gain magnitude, V(load)/V(input terminal) |
//! | `min_input_impedance` | Ω | smallest midband input impedance |
//! | `max_output_impedance` | Ω | largest midband output impedance |
//! | `min_swing` | V | smallest symmetric peak swing at the load |
//! | `max_f_low` | Hz | highest acceptable lower −3 dB corner (of the gain from the source) |
//! | `min_f_high` | Hz | lowest acceptable upper −3 dB corner |
//! | `max_supply_current` | A | largest quiescent supply current |
//! | `max_junction_temperature` | °C | largest quiescent junction temperature |
//! | `max_thd` | share | largest THD at the load (`0.01` or `"1 %"`), of the periodic steady state with the stage driven to `thd_swing` |
//! | `thd_swing` | V | the output peak at the load at which `max_thd` holds (default: `min_swing`; one of the two is needed) |
//! | `thd_frequency` | Hz | the frequency at which `max_thd` holds (default 1 kHz) |
//!
//! The ratings checks of the core (VCEO, IC max, Ptot, Tj max, resistor
//! power) always run, whatever the requirements say.
//!
//! `tolerances` (every key optional, each left out takes its value from
//! [`Tolerances::default`]; see [`Tolerances`]): what the tolerance analysis
//! (`stagewright check --worst-case`, `--monte-carlo`) varies. A share is a
//! number as a fraction (`0.01`) or text in percent (`"1 %"`, `"1%"`).
//!
//! | key | unit | meaning |
//! |---|---|---|
//! | `resistor_tolerance` | share | every resistor, ± (0 to 50 %), default 5 % |
//! | `capacitor_tolerance` | share | every coupling and bypass capacitor, ± (0 to 90 %), default 20 % |
//! | `supply_tolerance` | share | the supply, ± (0 to 50 %), default 5 % |
//! | `vbe_spread` | V | VBE either side of the datasheet value (0 to 0.3 V), default 0.05 |
//! | `ambient_min`, `ambient_max` | °C | the ambient range, default 0 to 50 |
//!
//! hFE always runs over the transistor's own `hfe_min` to `hfe_max`. The
//! block is checked against the stage ([`Tolerances::validate`]): the
//! highest ambient must be below `tj_max`, for example.
//!
//! # Writing
//! [`Design::to_document`] and [`Design::to_json`] write a design back as a
//! version 1 document: every value with a unit that takes SI prefixes as
//! text in engineering notation with exactly the digits that read back to
//! the same number (`"4.7 kΩ"`, `"3.3 µF"`, `"250 MHz"`: [`Typed::exact`]),
//! ratios, decibels, temperatures and shares as plain numbers; the preset
//! kept with only the values that differ from it, defaults left out (a
//! `tolerances` block, when the design has one, is written in full).

use alloc::borrow::ToOwned;
use alloc::string::String;

use serde::{Deserialize, Deserializer, Serialize};
use serde_json::Value;

use crate::constants::Temperature;
use crate::design::Design;
use crate::document::{
    self, block, check_design_format, file_celsius, free_text, leaf, object, optional, parse_error,
    path, required, requirements_from, share, stage_kind, text_at, transistor_document,
    transistor_from, typed_at, RequirementsDocument, Schema, TransistorDocument, Typed,
    DEFAULT_AMBIENT_CELSIUS, DESIGN_FORMAT, EXPECTED_TEXT, MAX_NOTES, MAX_TITLE,
};
use crate::error::{Error, Result};
#[cfg(doc)]
use crate::presets::PRESETS;
use crate::requirements::Requirements;
use crate::stage::{Parts, Stage, StageKind, DEFAULT_RESISTOR_RATING};
use crate::tolerance::Tolerances;
#[cfg(doc)]
use crate::transistor::TransistorData;
#[cfg(doc)]
use crate::value::parse_value_field;

/// The top-level keys of version 1.
const TOP_KEYS: &[&str] = &[
    "format",
    "title",
    "notes",
    "stage",
    "supply",
    "ambient",
    "transistor",
    "parts",
    "requirements",
    "tolerances",
];

block! {
    /// The `parts` block as typed.
    PartsDocument in "parts" {
        text: [],
        values: [
            /// Supply to base, Ω.
            r1,
            /// Base to ground, Ω.
            r2,
            /// Collector resistor, Ω.
            rc,
            /// Unbypassed emitter resistance, Ω.
            re,
            /// Bypassed emitter resistance, Ω.
            re_bypassed,
            /// Source resistance, Ω.
            rs,
            /// Load resistance, Ω.
            rl,
            /// Input coupling capacitor, F.
            c_in,
            /// Output coupling capacitor, F.
            c_out,
            /// Emitter bypass capacitor, F.
            c_emitter,
            /// Base bypass capacitor, F.
            c_base,
            /// Power rating of every resistor, W.
            resistor_rating,
        ],
    }
}

block! {
    /// The `tolerances` block as typed.
    TolerancesDocument in "tolerances" {
        text: [],
        values: [
            /// Resistor tolerance, a share (fraction or `"1 %"`).
            resistor_tolerance,
            /// Capacitor tolerance, a share.
            capacitor_tolerance,
            /// Supply tolerance, a share.
            supply_tolerance,
            /// VBE spread either side of the datasheet value, V.
            vbe_spread,
            /// Lowest ambient, °C.
            ambient_min,
            /// Highest ambient, °C.
            ambient_max,
        ],
    }
}

/// The keys of the design file, version 1.
pub(crate) const DESIGN_SCHEMA: Schema = Schema {
    keys: &[
        TOP_KEYS,
        TransistorDocument::KEYS,
        PartsDocument::KEYS,
        RequirementsDocument::KEYS,
        TolerancesDocument::KEYS,
    ],
    aliases: ALIASES,
};

/// A design file as typed: keys checked, values not yet read.
///
/// Build it with [`DesignDocument::from_json`] (or deserialize it with
/// serde, which runs the same reader), turn it into a [`Design`] with
/// `Design::try_from`, and write it with [`DesignDocument::to_json`].
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct DesignDocument {
    /// The format and version, `stagewright/1`.
    pub format: String,
    /// A title.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub title: Option<String>,
    /// Free notes.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub notes: Option<String>,
    /// The stage name, `common-emitter`, `common-collector` or `common-base`.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub stage: Option<String>,
    /// Supply voltage, V.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub supply: Option<Typed>,
    /// Ambient temperature, °C.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ambient: Option<Typed>,
    /// The transistor block.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub transistor: Option<TransistorDocument>,
    /// The parts block.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub parts: Option<PartsDocument>,
    /// The requirements block.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub requirements: Option<RequirementsDocument>,
    /// The tolerances block.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub tolerances: Option<TolerancesDocument>,
}

impl DesignDocument {
    /// Reads the JSON text of a design file.
    ///
    /// # Errors
    /// A JSON syntax error names the line and column and quotes the line;
    /// a wrong `format` says which versions are understood; an unknown key
    /// names the nearest known key; a value of the wrong JSON type names
    /// its key.
    pub fn from_json(text: &str) -> Result<DesignDocument> {
        let value = document::parse(
            text,
            "the file is empty; a design file is a JSON object that starts with { \"format\": \"stagewright/1\", ...",
        )?;
        DesignDocument::from_value(&value)
    }

    /// Reads an already parsed JSON value; see [`DesignDocument::from_json`].
    pub fn from_value(value: &Value) -> Result<DesignDocument> {
        let map = object(value, "")?;
        // The version first: a file of another version may use other keys.
        let format = match map.get("format") {
            None | Some(Value::Null) => {
                return Err(Error::missing(
                    "format",
                    "start the file with \"format\": \"stagewright/1\"",
                ))
            }
            Some(Value::String(s)) => s.clone(),
            Some(other) => return Err(parse_error("format", other, EXPECTED_TEXT)),
        };
        check_design_format(&format)?;
        DESIGN_SCHEMA.check_keys(map, "")?;
        let block = |key: &str| map.get(key).filter(|v| !v.is_null());
        let schema = &DESIGN_SCHEMA;
        Ok(DesignDocument {
            format,
            title: free_text(map, "title", MAX_TITLE)?,
            notes: free_text(map, "notes", MAX_NOTES)?,
            stage: text_at(map, "", "stage")?,
            supply: typed_at(map, "", "supply")?,
            ambient: typed_at(map, "", "ambient")?,
            transistor: block("transistor")
                .map(|v| TransistorDocument::read(v, schema))
                .transpose()?,
            parts: block("parts")
                .map(|v| PartsDocument::read(v, schema))
                .transpose()?,
            requirements: block("requirements")
                .map(|v| RequirementsDocument::read(v, schema))
                .transpose()?,
            tolerances: block("tolerances")
                .map(|v| TolerancesDocument::read(v, schema))
                .transpose()?,
        })
    }

    /// The document as pretty-printed JSON (two-space indent, keys in the
    /// order of the format), ending with a newline.
    pub fn to_json(&self) -> String {
        let mut out = serde_json::to_string_pretty(self).unwrap_or_default();
        out.push('\n');
        out
    }
}

impl<'de> Deserialize<'de> for DesignDocument {
    /// Deserializes through [`DesignDocument::from_value`], so unknown keys
    /// are rejected the same way.
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> core::result::Result<Self, D::Error> {
        let value = Value::deserialize(deserializer)?;
        DesignDocument::from_value(&value).map_err(serde::de::Error::custom)
    }
}

impl Design {
    /// Reads and validates the JSON text of a design file: the same as
    /// [`DesignDocument::from_json`] followed by `Design::try_from`.
    ///
    /// # Errors
    /// The first problem found, naming the key as a dotted path.
    pub fn from_json(text: &str) -> Result<Design> {
        Design::try_from(DesignDocument::from_json(text)?)
    }

    /// The design as a version 1 document: numbers in SI base units, the
    /// preset kept with only the values that differ from it.
    ///
    /// The temperature exponent and reverse gain of the device
    /// ([`TransistorData::xtb`], [`TransistorData::beta_reverse`]) are not
    /// part of version 1; a file always gives them their defaults.
    pub fn to_document(&self) -> DesignDocument {
        let s = &self.stage;
        let p = &s.parts;
        let num = |x: f64| Some(Typed::Number(x));
        // Parts in the notation engineers read, exact: "4.7 kΩ", "2.2 µF".
        let ohms = |x: f64| Some(Typed::exact(x, "Ω"));
        let ohms_if = |x: Option<f64>| x.map(|x| Typed::exact(x, "Ω"));
        let ohms_nonzero = |x: f64| if x != 0.0 { ohms(x) } else { None };
        let farads = |x: Option<f64>| x.map(|x| Typed::exact(x, "F"));
        let ambient = file_celsius(s.ambient);
        let parts = PartsDocument {
            r1: ohms_if(p.r1),
            r2: ohms_if(p.r2),
            rc: ohms_nonzero(p.rc),
            re: ohms_nonzero(p.re),
            re_bypassed: ohms_nonzero(p.re_bypassed),
            rs: ohms_nonzero(p.rs),
            rl: ohms(p.rl),
            c_in: farads(p.c_in),
            c_out: farads(p.c_out),
            c_emitter: farads(p.c_emitter),
            c_base: farads(p.c_base),
            resistor_rating: if p.resistor_rating != DEFAULT_RESISTOR_RATING {
                Some(Typed::exact(p.resistor_rating, "W"))
            } else {
                None
            },
        };
        let r = &self.requirements;
        // Each requirement in its unit ("10 kΩ", "30 Hz"; dB and °C as numbers).
        let mut requirements = RequirementsDocument::default();
        for (req, limit) in r.limits() {
            requirements.set(req.key, Some(Typed::exact(limit, req.unit)));
        }
        for c in &crate::requirements::CONDITIONS {
            if let Some(v) = r.get(c.key) {
                requirements.set(c.key, Some(Typed::exact(v, c.unit)));
            }
        }
        let text = |t: &str| {
            if t.is_empty() {
                None
            } else {
                Some(t.to_owned())
            }
        };
        DesignDocument {
            format: DESIGN_FORMAT.to_owned(),
            title: text(&self.title),
            notes: text(&self.notes),
            stage: Some(s.kind.name().to_owned()),
            supply: Some(Typed::exact(s.supply, "V")),
            ambient: if ambient != DEFAULT_AMBIENT_CELSIUS {
                num(ambient)
            } else {
                None
            },
            transistor: Some(transistor_document(&s.transistor, self.preset.as_deref())),
            parts: Some(parts),
            requirements: if r.is_empty() {
                None
            } else {
                Some(requirements)
            },
            tolerances: self.tolerances.map(|t| TolerancesDocument {
                resistor_tolerance: num(t.resistor_tolerance),
                capacitor_tolerance: num(t.capacitor_tolerance),
                supply_tolerance: num(t.supply_tolerance),
                vbe_spread: Some(Typed::exact(t.vbe_spread, "V")),
                ambient_min: num(file_celsius(t.ambient_min)),
                ambient_max: num(file_celsius(t.ambient_max)),
            }),
        }
    }

    /// The design as the pretty-printed JSON of [`Design::to_document`].
    pub fn to_json(&self) -> String {
        self.to_document().to_json()
    }
}

impl DesignDocument {
    /// Sets the field at `path` (a dotted path: `supply`, `parts.rc`,
    /// `transistor.preset`, `requirements.min_swing`,
    /// `tolerances.vbe_spread`, `title`) to `text` as typed, or removes it
    /// with `None`: one edit, for a page that keeps a document open. A
    /// value is kept as a number when the text is a plain decimal number
    /// (`12`, `2.2e3`), else as the text typed (`4k7`, `"5 %"`), which
    /// [`Design::try_from`] reads in the field's unit; text fields keep the
    /// text as it is. A block left empty is removed.
    ///
    /// # Errors
    /// [`ErrorKind::UnknownKey`](crate::ErrorKind::UnknownKey) naming `path` (with the nearest key) for
    /// a path the design file does not have.
    pub fn set(&mut self, path: &str, text: Option<&str>) -> Result<()> {
        let typed = text.map(typed_of);
        let words = text.map(String::from);
        let ok = match path.split_once('.') {
            None => match path {
                "title" => set_to(&mut self.title, words),
                "notes" => set_to(&mut self.notes, words),
                "stage" => set_to(&mut self.stage, words.map(|w| String::from(w.trim()))),
                "supply" => set_to(&mut self.supply, typed),
                "ambient" => set_to(&mut self.ambient, typed),
                _ => false,
            },
            Some(("transistor", key)) => edit(&mut self.transistor, |b| {
                let words = words.map(|w| String::from(w.trim()));
                match key {
                    "preset" => set_to(&mut b.preset, words),
                    "polarity" => set_to(&mut b.polarity, words),
                    _ => b.set(key, typed),
                }
            }),
            Some(("parts", key)) => edit(&mut self.parts, |b| b.set(key, typed)),
            Some(("requirements", key)) => edit(&mut self.requirements, |b| b.set(key, typed)),
            Some(("tolerances", key)) => edit(&mut self.tolerances, |b| b.set(key, typed)),
            _ => false,
        };
        if ok {
            Ok(())
        } else {
            Err(DESIGN_SCHEMA.unknown(path))
        }
    }
}

/// Edits the block in `slot` (made if missing) with `f`, then drops the
/// block again if it is left empty; returns what `f` returns.
fn edit<B: Default + PartialEq>(slot: &mut Option<B>, f: impl FnOnce(&mut B) -> bool) -> bool {
    let ok = f(slot.get_or_insert_with(B::default));
    if slot.as_ref().is_some_and(|b| *b == B::default()) {
        *slot = None;
    }
    ok
}

/// Sets `slot`; always true (the key exists).
fn set_to<T>(slot: &mut Option<T>, value: Option<T>) -> bool {
    *slot = value;
    true
}

/// A value as typed: a plain decimal number as a number, else the text.
fn typed_of(text: &str) -> Typed {
    let t = text.trim();
    let plain = t.starts_with(|c: char| c.is_ascii_digit() || matches!(c, '.' | '-' | '+'))
        && t.chars()
            .all(|c| c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E'));
    match t.parse::<f64>() {
        Ok(v) if plain && v.is_finite() => Typed::Number(v),
        _ => Typed::Text(String::from(text)),
    }
}

impl TryFrom<DesignDocument> for Design {
    type Error = Error;

    /// Reads every value in its unit, applies the preset and the defaults,
    /// and validates the stage.
    fn try_from(doc: DesignDocument) -> Result<Design> {
        check_design_format(&doc.format)?;
        let kind = stage_kind(doc.stage.as_deref())?;
        let supply = required(
            &doc.supply,
            "supply",
            "V",
            "give the supply voltage in volts, e.g. \"supply\": 12",
        )?;
        let ambient = optional(&doc.ambient, "ambient", "°C")?.unwrap_or(DEFAULT_AMBIENT_CELSIUS);
        let t = doc.transistor.as_ref().ok_or_else(|| {
            Error::missing(
                "transistor",
                "give a transistor block, e.g. \"transistor\": { \"preset\": \"general-purpose-npn\" }",
            )
        })?;
        let transistor = transistor_from(t)?;
        let p = doc.parts.as_ref().ok_or_else(|| {
            Error::missing(
                "parts",
                "give a parts block with the bias resistors, rc or re, and the load",
            )
        })?;
        let parts = parts_from(kind, p)?;
        let requirements = match &doc.requirements {
            Some(r) => requirements_from(r)?,
            None => Requirements::default(),
        };
        let stage = Stage {
            kind,
            supply,
            ambient: Temperature::from_celsius(ambient),
            parts,
            transistor,
        };
        stage.validate().map_err(locate_part)?;
        let tolerances = doc
            .tolerances
            .as_ref()
            .map(|t| tolerances_from(t, &stage))
            .transpose()?;
        Ok(Design {
            title: doc.title.unwrap_or_default(),
            notes: doc.notes.unwrap_or_default(),
            preset: t.preset.as_ref().map(|s| s.trim().to_owned()),
            stage,
            requirements,
            tolerances,
        })
    }
}

// ---------------------------------------------------------------------------
// Reading the raw JSON.

/// Other names people write for a key, anywhere in the file.
const ALIASES: &[(&str, &str)] = &[
    ("vcc", "supply"),
    ("vdd", "supply"),
    ("vee", "supply"),
    ("supply_voltage", "supply"),
    ("temperature", "ambient"),
    ("ambient_temperature", "ambient"),
    ("ta", "ambient"),
    ("version", "format"),
    ("name", "title"),
    ("description", "notes"),
    ("comment", "notes"),
    ("comments", "notes"),
    ("type", "stage"),
    ("topology", "stage"),
    ("configuration", "stage"),
    ("device", "transistor"),
    ("bjt", "transistor"),
    ("components", "parts"),
    ("spec", "requirements"),
    ("specs", "requirements"),
    ("beta", "transistor.hfe"),
    ("load", "parts.rl"),
    ("rload", "parts.rl"),
    ("r_load", "parts.rl"),
    ("rsource", "parts.rs"),
    ("r_source", "parts.rs"),
];

// ---------------------------------------------------------------------------
// From typed values to a validated design.

fn parts_from(kind: StageKind, p: &PartsDocument) -> Result<Parts> {
    let get =
        |v: &Option<Typed>, name: &str, unit: &'static str| optional(v, &path("parts", name), unit);
    let needs_rc = matches!(kind, StageKind::CommonEmitter | StageKind::CommonBase);
    let needs_re = matches!(kind, StageKind::CommonCollector | StageKind::CommonBase);
    if needs_rc && p.rc.is_none() {
        return Err(Error::missing(
            "parts.rc",
            "a common-emitter or common-base stage takes its output across the collector resistor rc",
        ));
    }
    if needs_re && p.re.is_none() {
        return Err(Error::missing(
            "parts.re",
            "a common-collector or common-base stage returns its emitter current through re",
        ));
    }
    let d = Parts::default();
    Ok(Parts {
        r1: get(&p.r1, "r1", "Ω")?,
        r2: get(&p.r2, "r2", "Ω")?,
        rc: get(&p.rc, "rc", "Ω")?.unwrap_or(d.rc),
        re: get(&p.re, "re", "Ω")?.unwrap_or(d.re),
        re_bypassed: get(&p.re_bypassed, "re_bypassed", "Ω")?.unwrap_or(d.re_bypassed),
        rs: get(&p.rs, "rs", "Ω")?.unwrap_or(d.rs),
        rl: get(&p.rl, "rl", "Ω")?.unwrap_or(d.rl),
        c_in: get(&p.c_in, "c_in", "F")?,
        c_out: get(&p.c_out, "c_out", "F")?,
        c_emitter: get(&p.c_emitter, "c_emitter", "F")?,
        c_base: get(&p.c_base, "c_base", "F")?,
        resistor_rating: get(&p.resistor_rating, "resistor_rating", "W")?
            .unwrap_or(d.resistor_rating),
    })
}

/// The `tolerances` block read and checked against `stage`: each key left
/// out takes the value of [`Tolerances::default`].
fn tolerances_from(t: &TolerancesDocument, stage: &Stage) -> Result<Tolerances> {
    let field = |name: &str| path("tolerances", name);
    let d = Tolerances::default();
    let share_or = |v: &Option<Typed>, name: &str, max: f64, default: f64| -> Result<f64> {
        v.as_ref()
            .map_or(Ok(default), |v| share(v, &field(name), max))
    };
    let celsius_or = |v: &Option<Typed>, name: &str, default: Temperature| -> Result<Temperature> {
        Ok(optional(v, &field(name), "°C")?.map_or(default, Temperature::from_celsius))
    };
    let out = Tolerances {
        resistor_tolerance: share_or(
            &t.resistor_tolerance,
            "resistor_tolerance",
            0.5,
            d.resistor_tolerance,
        )?,
        capacitor_tolerance: share_or(
            &t.capacitor_tolerance,
            "capacitor_tolerance",
            0.9,
            d.capacitor_tolerance,
        )?,
        supply_tolerance: share_or(
            &t.supply_tolerance,
            "supply_tolerance",
            0.5,
            d.supply_tolerance,
        )?,
        vbe_spread: optional(&t.vbe_spread, &field("vbe_spread"), "V")?.unwrap_or(d.vbe_spread),
        ambient_min: celsius_or(&t.ambient_min, "ambient_min", d.ambient_min)?,
        ambient_max: celsius_or(&t.ambient_max, "ambient_max", d.ambient_max)?,
    };
    out.validate(stage).map_err(|e| e.within("tolerances"))?;
    Ok(out)
}

/// Puts `parts.` in front of the part names that [`Stage::validate`] reports bare.
fn locate_part(e: Error) -> Error {
    let bare = e.field();
    if PartsDocument::KEYS.iter().any(|p| leaf(p) == bare) {
        e.within("parts")
    } else {
        e
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::error::ErrorKind;
    use crate::presets::preset;
    use alloc::string::ToString;

    #[test]
    fn one_edit_at_a_time_reads_as_the_whole_file_would() {
        // Edits applied to an open document give the design that the file
        // written with them gives, value for value.
        let text = r#"{"format": "stagewright/1", "stage": "common-emitter", "supply": 12,
            "transistor": {"preset": "general-purpose-npn"},
            "parts": {"r1": "47k", "r2": "10k", "rc": "3k9", "re": "220", "re_bypassed": "680",
                      "c_emitter": "100u", "rs": "600", "rl": "10k", "c_in": "1u", "c_out": "4u7"}}"#;
        let mut doc = DesignDocument::from_json(text).expect("reads");
        doc.set("parts.rc", Some("4k7")).expect("a part");
        doc.set("supply", Some("15")).expect("the supply");
        doc.set("requirements.min_swing", Some("2 V"))
            .expect("a requirement");
        doc.set("tolerances.resistor_tolerance", Some("1 %"))
            .expect("a share");
        doc.set("transistor.hfe", Some("250"))
            .expect("a device value");
        doc.set("title", Some("  Edited  ")).expect("text as typed");
        let edited = Design::try_from(doc.clone()).expect("valid");
        let whole = Design::from_json(
            &text.replace("\"3k9\"", "\"4k7\"").replace("\"supply\": 12", "\"supply\": 15").replace(
                "\"preset\": \"general-purpose-npn\"}",
                "\"preset\": \"general-purpose-npn\", \"hfe\": 250}, \"title\": \"  Edited  \", \"requirements\": {\"min_swing\": \"2 V\"}, \"tolerances\": {\"resistor_tolerance\": \"1 %\"}",
            ),
        )
        .expect("the same file, written whole");
        assert_eq!(edited, whole);
        assert_eq!(
            doc.supply,
            Some(Typed::Number(15.0)),
            "a plain number is kept as a number"
        );
        // Removing the only requirement removes the block.
        doc.set("requirements.min_swing", None).expect("removed");
        assert!(doc.requirements.is_none());
        // A path the file does not have: the reader's message, with the
        // nearest key.
        let e = doc.set("parts.rcc", Some("1k")).expect_err("unknown");
        assert!(
            matches!(
                e.kind(),
                ErrorKind::UnknownKey {
                    suggestion: Some("parts.rc")
                }
            ),
            "{e}"
        );
        assert!(doc.set("nonsense", Some("1")).is_err());
    }

    /// A small valid design used by several tests: a common-emitter stage
    /// from a preset, with one value typed as text.
    const GOOD: &str = r#"{
        "format": "stagewright/1",
        "title": "test stage",
        "stage": "common-emitter",
        "supply": 12,
        "transistor": { "preset": "general-purpose-npn" },
        "parts": { "r1": "47k", "r2": "10k", "rc": "4k7", "re": 220, "re_bypassed": 820,
                   "rs": 600, "rl": "10k", "c_in": "1u", "c_out": "1u", "c_emitter": "47u" },
        "requirements": { "min_voltage_gain_db": 20, "min_swing": "1 V" }
    }"#;

    fn err(text: &str) -> Error {
        match Design::from_json(text) {
            Ok(d) => panic!("expected an error, got a design titled {:?}", d.title),
            Err(e) => e,
        }
    }

    fn with(old: &str, new: &str) -> String {
        assert!(GOOD.contains(old), "the test text must contain {old}");
        GOOD.replacen(old, new, 1)
    }

    #[test]
    fn the_thd_requirement_reads_as_a_share_with_its_conditions() {
        // "1 %" and 0.01 are the same limit; the conditions read in their
        // units; written back, the file reads the same (exact).
        let read = |req: &str| {
            Design::from_json(&with(
                r#""min_swing": "1 V""#,
                &[r#""min_swing": "1 V", "#, req].concat(),
            ))
        };
        let d = read(r#""max_thd": "1 %", "thd_swing": "2.5", "thd_frequency": "10k""#).unwrap();
        let r = d.requirements;
        assert_eq!(r.max_thd, Some(0.01));
        let c = r.thd_condition().unwrap();
        assert_eq!((c.swing, c.frequency), (2.5, 10e3));
        assert_eq!(
            read(r#""max_thd": 0.01"#).unwrap().requirements.max_thd,
            Some(0.01)
        );
        let again = Design::from_json(&d.to_json()).unwrap();
        assert_eq!(again.requirements, d.requirements);
        // Without thd_swing, min_swing (1 V) and 1 kHz.
        let c = read(r#""max_thd": 0.02"#)
            .unwrap()
            .requirements
            .thd_condition()
            .unwrap();
        assert_eq!((c.swing, c.frequency), (1.0, 1e3));
        // 5 meant as 5 %: refused with the fix; 0 and 100 % refused.
        for bad in [
            r#""max_thd": 5"#,
            r#""max_thd": 0"#,
            r#""max_thd": "100 %""#,
        ] {
            let e = read(bad).unwrap_err();
            assert_eq!(e.field(), "requirements.max_thd", "{bad}");
            assert!(e.to_string().contains("\"1 %\""), "{bad}: {e}");
        }
        // A condition without its requirement, and a negative peak.
        let e = read(r#""thd_swing": "2 V""#).unwrap_err();
        assert_eq!(e.field(), "requirements.thd_swing");
        assert!(e.to_string().contains("give max_thd too"), "{e}");
        let e = read(r#""max_thd": 0.01, "thd_swing": "-2 V""#).unwrap_err();
        assert_eq!(e.field(), "requirements.thd_swing");
    }

    #[test]
    fn max_thd_needs_an_output_peak() {
        let e = err(&with(r#""min_swing": "1 V""#, r#""max_thd": "1 %""#));
        assert_eq!(e.field(), "requirements.thd_swing");
        assert!(e.to_string().contains("give thd_swing"), "{e}");
    }

    #[test]
    fn reads_a_design_from_a_preset_with_typed_values() {
        let d = Design::from_json(GOOD).expect("the sample design is valid");
        assert_eq!(d.stage.kind, StageKind::CommonEmitter, "stage name read");
        assert_eq!(d.stage.parts.rc, 4700.0, "\"4k7\" is exactly 4700 Ω");
        assert_eq!(d.stage.parts.c_emitter, Some(47e-6), "\"47u\" is 47 µF");
        assert_eq!(
            d.stage.transistor,
            preset("general-purpose-npn").unwrap(),
            "no override: the preset's values are used unchanged"
        );
        assert_eq!(d.requirements.min_swing, Some(1.0), "\"1 V\" reads as 1 V");
        assert_eq!(
            d.stage.ambient.celsius(),
            DEFAULT_AMBIENT_CELSIUS,
            "ambient defaults to 25 °C"
        );
    }

    #[test]
    fn keys_beside_a_preset_override_it() {
        let d = Design::from_json(&with(
            r#""preset": "general-purpose-npn""#,
            r#""preset": "general-purpose-npn", "hfe_min": 150, "ft": "300 MHz""#,
        ))
        .expect("overrides within the preset's ranges are valid");
        assert_eq!(d.stage.transistor.hfe_min, 150.0, "hfe_min overridden");
        assert_eq!(
            d.stage.transistor.ft, 300e6,
            "ft overridden from text with unit"
        );
        assert_eq!(
            d.stage.transistor.hfe, 200.0,
            "other values stay the preset's"
        );
    }

    #[test]
    fn an_unknown_key_names_the_nearest_known_key() {
        let e = err(&with("\"min_swing\"", "\"min_swng\""));
        assert_eq!(
            e.field(),
            "requirements.min_swng",
            "the field is the dotted path"
        );
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("requirements.min_swing")
            },
            "one letter missing: the nearest key is suggested"
        );
        let e = err(&with("\"supply\": 12", "\"supply\": 12, \"hfe\": 100"));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("transistor.hfe")
            },
            "a key put at the wrong level points to where it belongs"
        );
        let e = err(&with("\"min_swing\"", "\"min_gain_db\""));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("requirements.min_voltage_gain_db")
            },
            "every word of the key in one known key: that key is suggested"
        );
        let e = err(&with("\"supply\": 12", "\"supply\": 12, \"zzzzzz\": 1"));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey { suggestion: None },
            "nothing close: no suggestion rather than a misleading one"
        );
    }

    #[test]
    fn values_are_read_in_their_unit_and_errors_name_the_path() {
        let e = err(&with(r#""rc": "4k7""#, r#""rc": "4k7k""#));
        assert_eq!(e.field(), "parts.rc", "a bad value string names its key");
        assert!(
            matches!(e.kind(), ErrorKind::Parse { text, .. } if text == "4k7k"),
            "the text is quoted as typed: {e}"
        );
        let e = err(&with(r#""rc": "4k7""#, r#""rc": -1000"#));
        assert_eq!(
            e.field(),
            "parts.rc",
            "the core's bare part name gets its block"
        );
        assert!(e.to_string().contains("-1 kΩ"), "the value is shown: {e}");
        let e = err(&with(r#""rc": "4k7""#, r#""rc": true"#));
        assert_eq!(
            e.field(),
            "parts.rc",
            "a JSON value of the wrong type names its key"
        );
    }

    #[test]
    fn format_version_is_checked_first() {
        let e = err(&with("stagewright/1", "stagewright/2"));
        assert_eq!(e.field(), "format", "the version error names format");
        assert!(
            e.to_string().contains("stagewright/1"),
            "the message says which versions are understood: {e}"
        );
        let e = err(&with(r#""format": "stagewright/1","#, ""));
        assert!(
            matches!(e.kind(), ErrorKind::Missing { .. }),
            "a file without a format is refused"
        );
    }

    #[test]
    fn json_syntax_errors_give_line_column_and_the_line() {
        let e = err(&with(r#""rc": "4k7""#, r#""rc": 4k7"#));
        assert!(
            e.field().starts_with("line 7, column"),
            "the position is given: {e}"
        );
        assert!(
            e.to_string().contains("\"4k7\""),
            "the fix, quoting, is suggested: {e}"
        );
    }

    #[test]
    fn an_empty_file_says_what_a_design_file_starts_with() {
        let e = err("  \n");
        assert_eq!(e.field(), "format", "the first key a file needs is named");
        assert!(
            e.to_string().contains("empty"),
            "the message says the file is empty: {e}"
        );
    }

    #[test]
    fn stage_specific_parts_are_required_or_refused() {
        let e = err(&with(r#""rc": "4k7","#, ""));
        assert_eq!(e.field(), "parts.rc", "a common-emitter stage needs rc");
        assert!(
            matches!(e.kind(), ErrorKind::Missing { .. }),
            "rc missing, not zero: {e}"
        );
        let e = err(&with(
            r#""c_emitter": "47u""#,
            r#""c_emitter": "47u", "c_base": "1u""#,
        ));
        assert_eq!(
            e.field(),
            "parts.c_base",
            "c_base has no place in a common-emitter stage"
        );
        let e = err(&with("\"common-emitter\"", "\"emitter-follower\""));
        assert!(
            e.to_string()
                .contains("common-collector (the emitter follower)"),
            "the usual name of the follower leads to its stage name: {e}"
        );
    }

    #[test]
    fn a_transistor_without_preset_needs_every_datasheet_value() {
        let e = err(&with(
            r#""preset": "general-purpose-npn""#,
            r#""polarity": "npn", "hfe": 100"#,
        ));
        assert_eq!(
            e.field(),
            "transistor.hfe_min",
            "the first missing value is named"
        );
    }

    #[test]
    fn writing_and_reading_back_gives_the_same_design() {
        let d = Design::from_json(&with(
            r#""preset": "general-purpose-npn""#,
            r#""preset": "general-purpose-npn", "hfe_min": 150"#,
        ))
        .unwrap();
        let text = d.to_json();
        assert!(
            text.contains("\"hfe_min\": 150.0"),
            "only the override is written: {text}"
        );
        assert!(
            !text.contains("\"hfe\""),
            "values equal to the preset's are left out: {text}"
        );
        let back = Design::from_json(&text).expect("a written design reads back");
        assert_eq!(back, d, "writing then reading is lossless");
        assert_eq!(back.to_json(), text, "and writing is stable");
    }

    #[test]
    fn a_device_without_preset_and_a_decimal_ambient_write_back_cleanly() {
        let text = with(
            r#"{ "preset": "general-purpose-npn" }"#,
            r#"{ "polarity": "pnp", "hfe": 150, "hfe_min": 100, "hfe_max": 300, "vbe": 0.66,
                 "vbe_at_ic": "1m", "ft": "150M", "cob": "6p", "vce_sat": 0.3, "vceo_max": 45,
                 "ic_max": 0.1, "ptot_max": 0.5, "rth_ja": 250, "tj_max": 150 }"#,
        )
        .replace("\"supply\": 12,", "\"supply\": 12, \"ambient\": 0.1,");
        let d = Design::from_json(&text).expect("a complete datasheet device is valid");
        assert_eq!(
            d.stage.transistor.early_voltage, None,
            "no early_voltage: no Early effect"
        );
        assert_eq!(d.stage.transistor.rbb, 0.0, "no rbb: 0 Ω");
        let written = d.to_json();
        assert!(
            written.contains("\"ambient\": 0.1,"),
            "0.1 °C is written as typed: {written}"
        );
        assert!(
            !written.contains("preset"),
            "no preset is invented: {written}"
        );
        let back = Design::from_json(&written).expect("the written file reads back");
        assert_eq!(
            back.stage.transistor, d.stage.transistor,
            "the device survives the round trip"
        );
        assert_eq!(back.to_json(), written, "writing is stable");
    }

    #[test]
    fn serde_deserialization_runs_the_same_checks() {
        let v: core::result::Result<DesignDocument, _> =
            serde_json::from_str(&with("\"min_swing\"", "\"min_swng\""));
        let message = v
            .expect_err("an unknown key is refused through serde too")
            .to_string();
        assert!(
            message.contains("min_swing"),
            "the suggestion survives: {message}"
        );
    }

    #[test]
    fn no_single_character_deletion_or_digit_change_panics() {
        // Every way of deleting one character, and of turning one character
        // into a 9, must give an error or an analysable design, never a panic.
        let cuts = GOOD.char_indices().map(|(i, c)| (i, c.len_utf8()));
        let mut analysed = 0;
        for (i, len) in cuts {
            for replacement in ["", "9"] {
                let text = [&GOOD[..i], replacement, &GOOD[i + len..]].concat();
                if let Ok(d) = Design::from_json(&text) {
                    let _ = d.analyze();
                    analysed += 1;
                }
            }
        }
        assert!(
            analysed > 10,
            "some mutations stay valid and are analysed: {analysed}"
        );
    }

    #[test]
    fn a_tolerances_block_is_read_checked_and_written_in_full() {
        let text = with(
            r#""requirements""#,
            r#""tolerances": { "resistor_tolerance": "1 %", "capacitor_tolerance": 0.1,
                              "vbe_spread": "30m", "ambient_min": -20 },
               "requirements""#,
        );
        let d = Design::from_json(&text).expect("a tolerances block is valid");
        let t = d.tolerances.expect("the block is kept");
        assert_eq!(t.resistor_tolerance, 0.01, "\"1 %\" is the fraction 0.01");
        assert_eq!(
            t.capacitor_tolerance, 0.1,
            "a number is the fraction itself"
        );
        assert_eq!(t.vbe_spread, 0.03, "\"30m\" is 30 mV");
        assert_eq!(t.ambient_min.celsius(), -20.0, "the lowest ambient in °C");
        assert_eq!(
            t.supply_tolerance,
            Tolerances::default().supply_tolerance,
            "a key left out takes the default"
        );
        let written = d.to_json();
        assert!(
            written.contains("\"supply_tolerance\": 0.05"),
            "the block is written in full: {written}"
        );
        let back = Design::from_json(&written).expect("the written file reads back");
        assert_eq!(back, d, "writing then reading is lossless");
        assert_eq!(
            Design::from_json(GOOD).unwrap().tolerances,
            None,
            "a file without the block has none"
        );
    }

    #[test]
    fn tolerance_errors_name_the_key_and_the_fix() {
        let block = |b: &str| {
            with(
                r#""requirements""#,
                &[r#""tolerances": "#, b, r#", "requirements""#].concat(),
            )
        };
        let e = err(&block(r#"{ "resistor_tolerance": 5 }"#));
        assert_eq!(
            e.field(),
            "tolerances.resistor_tolerance",
            "the key is named"
        );
        assert!(
            e.to_string().contains("\"1 %\""),
            "5 meant as 5 % is refused with the fix: {e}"
        );
        let e = err(&block(r#"{ "ambient_max": 200 }"#));
        assert_eq!(
            e.field(),
            "tolerances.ambient_max",
            "the stage's own limits (tj_max) are checked"
        );
        let e = err(&block(r#"{ "ambient_min": 60 }"#));
        assert!(
            e.to_string().contains("ambient_max"),
            "a range upside down names the other end: {e}"
        );
        let e = err(&block(r#"{ "resistor_tolerence": 0.01 }"#));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("tolerances.resistor_tolerance")
            },
            "unknown keys are caught in the new block too"
        );
        let e = err(&with("stagewright/1", "stagewright-spec/1"));
        assert!(
            e.to_string().contains("stagewright design"),
            "a specification given as a design points to the design command: {e}"
        );
    }
}
