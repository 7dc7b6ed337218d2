//! The specification file, format `stagewright-spec/1`: what a stage must
//! meet and how its parts are to be chosen, as one JSON document.
//! `stagewright design` turns it into a design file (`stagewright/1`).
//!
//! # Reading: raw input, then a validated specification
//! The same two steps as the design file ([`crate::Design`]):
//!
//! 1. [`SpecDocument::from_json`] reads the JSON text into a
//!    [`SpecDocument`]: every key is looked up against the format (an
//!    unknown key is an [`ErrorKind::UnknownKey`] error that names the
//!    nearest known key) and every value is kept as typed ([`Typed`]).
//! 2. `SpecFile::try_from(document)` (the one conversion, [`TryFrom`])
//!    reads each value in its unit, fills in the preset and the defaults
//!    and validates the whole [`Spec`] ([`Spec::validate`]).
//!
//! [`SpecFile::from_json`] does both. Every error names the key as a
//! dotted path (`bias.ic`, `series.resistors`, `requirements.min_swing`),
//! the value and what is allowed. The `transistor` and `requirements`
//! blocks are those of the design file, read by the same code.
//!
//! # The format, version 1
//! A JSON object. Values are numbers in SI base units (temperatures in
//! degrees Celsius) or strings such as `"4k7"`, `"2 mA"`, `"20 Hz"`; a
//! *share* is a number as a fraction (`0.01`) or text in percent (`"1 %"`).
//! `null` is the same as leaving the key out.
//!
//! | key | unit | meaning |
//! |---|---|---|
//! | `format` | | `"stagewright-spec/1"`, required |
//! | `title`, `notes` | | free text, carried into the design file |
//! | `stage` | | `"common-emitter"`, `"common-collector"` or `"common-base"`, required |
//! | `supply` | V | supply voltage (positive for both polarities), required |
//! | `ambient` | °C | ambient temperature the design is made at, default 25 |
//! | `transistor` | | the device, as in the design file (a `preset` and/or datasheet values; its `polarity` is the stage's), required |
//! | `rs` | Ω | source resistance, default 0 |
//! | `rl` | Ω | load resistance, required (the design is made for its load) |
//! | `resistor_rating` | W | power rating of every resistor, default 0.25 |
//! | `requirements` | | what the design must meet: the design file's block, every key optional |
//! | `bias` | | how the quiescent point is chosen (below), default `"max-swing"` |
//! | `saturation_reserve` | V | volts kept above VCE(sat) at the lowest point of a full swing, default 0.5 |
//! | `stiffness` | | k in RTH = k·hFE(min)·RE for the divider, default 0.1 |
//! | `emitter_fraction` | share | emitter voltage as a share of the supply (common emitter and common base), default 0.1 |
//! | `series` | | the standard values the parts are taken from (below) |
//! | `parts` | | parts fixed by the user (below) |
//!
//! `bias`: `"max-swing"` puts the quiescent point at the centre of the AC
//! load line, at the current the requirements need; `{ "ic": "2m" }`
//! (amperes) or `{ "vce": 5 }` (volts, magnitude) asks for that point,
//! centred on the load line when it can be.
//!
//! The divider's Thevenin resistance is `stiffness`·hFE(min)·RE, unless
//! `requirements.min_input_impedance` needs more: that requirement is the
//! way to ask for an input impedance. In a common-emitter stage the gain
//! requirement sets the unbypassed emitter resistance (the middle of the
//! gain window in dB, or 1 dB inside a one-sided limit; without a gain
//! requirement the whole emitter resistance is bypassed).
//!
//! The lower corner sizes the capacitors: the exact corner is put at 80 %
//! of `requirements.max_f_low` (20 Hz without it), shared between the
//! capacitors in proportion to 1/√R of the resistance each one sees, which
//! gives the smallest total capacitance (so the capacitor on the lowest
//! resistance, the emitter bypass, takes the largest share). The procedure
//! is described in full in [`synthesize`].
//!
//! `series` (every key optional):
//!
//! | key | unit | meaning |
//! |---|---|---|
//! | `resistors` | | `"E12"`, `"E24"` (default) or `"E96"` (any of E3 to E192 is read) |
//! | `capacitors` | | `"E6"` or `"E12"` (default) (any of E3 to E192 is read) |
//! | `resistor_tolerance` | share | default the series' own: E12 10 %, E24 5 %, E96 1 % |
//! | `capacitor_tolerance` | share | default the series' own: E6 20 %, E12 10 % |
//!
//! `parts` pins a part to a value that the design keeps as given (Ω or F):
//! `r1`, `r2`, `rc`, `re`, `re_bypassed`, `c_in`, `c_out`, `c_emitter`,
//! `c_base`. The rest is solved around it ([`PinnedParts`]).
//!
//! # The design file it gives
//! [`SpecFile::design`] makes the [`Design`] of a finished [`Synthesis`]:
//! the title, notes, stage, preset and requirements of the specification,
//! the standard-value parts, and a `tolerances` block holding the part
//! tolerances of the series ([`Spec::tolerances`]), so that the tolerance
//! analysis of the design file uses the parts it was designed with.

use alloc::borrow::ToOwned;
use alloc::string::String;

use serde::{Deserialize, Deserializer, Serialize};
use serde_json::Value;

use crate::constants::Temperature;
use crate::design::Design;
use crate::document::{
    block, check_spec_format, free_text, object, optional, parse_error, required,
    requirements_from, share, stage_kind, text_at, transistor_from, typed_at, RequirementsDocument,
    Schema, TransistorDocument, Typed, DEFAULT_AMBIENT_CELSIUS, EXPECTED_TEXT, MAX_NOTES,
    MAX_TITLE,
};
use crate::error::{Error, ErrorKind, Result};
use crate::eseries::ESeries;
use crate::requirements::Requirements;
use crate::stage::DEFAULT_RESISTOR_RATING;
use crate::synthesis::{
    Bias, PinnedParts, Series, Spec, Synthesis, DEFAULT_EMITTER_FRACTION,
    DEFAULT_SATURATION_RESERVE, DEFAULT_STIFFNESS,
};

/// The top-level keys of version 1.
const TOP_KEYS: &[&str] = &[
    "format",
    "title",
    "notes",
    "stage",
    "supply",
    "ambient",
    "transistor",
    "rs",
    "rl",
    "resistor_rating",
    "requirements",
    "bias",
    "saturation_reserve",
    "stiffness",
    "emitter_fraction",
    "series",
    "parts",
];

block! {
    /// The `series` block as typed.
    SeriesDocument in "series" {
        text: [
            /// Resistor series name, `"E24"`.
            resistors,
            /// Capacitor series name, `"E12"`.
            capacitors,
        ],
        values: [
            /// Resistor tolerance, a share.
            resistor_tolerance,
            /// Capacitor tolerance, a share.
            capacitor_tolerance,
        ],
    }
}

block! {
    /// The `parts` block of a specification as typed: the pinned parts.
    PinnedPartsDocument in "parts" {
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
            /// Input coupling capacitor, F.
            c_in,
            /// Output coupling capacitor, F.
            c_out,
            /// Emitter bypass capacitor, F.
            c_emitter,
            /// Base bypass capacitor, F.
            c_base,
        ],
    }
}

block! {
    /// The object form of `bias` as typed: one of `ic` or `vce`.
    BiasPointDocument in "bias" {
        text: [],
        values: [
            /// Collector current, A.
            ic,
            /// |VCE|, V.
            vce,
        ],
    }
}

/// The `bias` key as typed: a rule by name, or a given point.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(untagged)]
pub enum BiasDocument {
    /// A rule by name: `"max-swing"`.
    Rule(String),
    /// A given point: `{ "ic": "2m" }` or `{ "vce": 5 }`.
    Point(BiasPointDocument),
}

/// What `bias` accepts.
const BIAS_ALLOWED: &str =
    "\"max-swing\", or an object with one key: { \"ic\": \"2m\" } (amperes) or { \"vce\": 5 } (volts)";

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
    ("beta", "transistor.hfe"),
    ("load", "rl"),
    ("rload", "rl"),
    ("r_load", "rl"),
    ("source", "rs"),
    ("rsource", "rs"),
    ("r_source", "rs"),
    ("spec", "requirements"),
    ("specs", "requirements"),
    ("targets", "requirements"),
    ("pinned", "parts"),
    ("pins", "parts"),
    ("fixed", "parts"),
    ("components", "parts"),
    ("eseries", "series"),
    ("e_series", "series"),
    ("k", "stiffness"),
    ("divider_stiffness", "stiffness"),
    ("reserve", "saturation_reserve"),
    ("headroom", "saturation_reserve"),
    ("q_point", "bias"),
    ("quiescent_point", "bias"),
    ("operating_point", "bias"),
];

/// The keys of the specification file, version 1.
pub(crate) const SPEC_SCHEMA: Schema = Schema {
    keys: &[
        TOP_KEYS,
        TransistorDocument::KEYS,
        RequirementsDocument::KEYS,
        SeriesDocument::KEYS,
        PinnedPartsDocument::KEYS,
        BiasPointDocument::KEYS,
    ],
    aliases: ALIASES,
};

/// A specification file as typed: keys checked, values not yet read.
///
/// Build it with [`SpecDocument::from_json`] (or deserialize it with serde,
/// which runs the same reader) and turn it into a [`SpecFile`] with
/// `SpecFile::try_from`.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct SpecDocument {
    /// The format and version, `stagewright-spec/1`.
    pub format: String,
    /// A title.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub title: Option<String>,
    /// Free notes.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub notes: Option<String>,
    /// The stage name.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub stage: Option<String>,
    /// Supply voltage, V.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub supply: Option<Typed>,
    /// Ambient temperature, °C.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ambient: Option<Typed>,
    /// The transistor block (the design file's).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub transistor: Option<TransistorDocument>,
    /// Source resistance, Ω.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rs: Option<Typed>,
    /// Load resistance, Ω.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rl: Option<Typed>,
    /// Power rating of every resistor, W.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub resistor_rating: Option<Typed>,
    /// The requirements block (the design file's).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub requirements: Option<RequirementsDocument>,
    /// How the quiescent point is chosen.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub bias: Option<BiasDocument>,
    /// Volts kept above VCE(sat), V.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub saturation_reserve: Option<Typed>,
    /// Divider stiffness k.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub stiffness: Option<Typed>,
    /// Emitter voltage as a share of the supply.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub emitter_fraction: Option<Typed>,
    /// The series block.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub series: Option<SeriesDocument>,
    /// The pinned parts.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub parts: Option<PinnedPartsDocument>,
}

impl SpecDocument {
    /// Reads the JSON text of a specification file.
    ///
    /// # Errors
    /// A JSON syntax error names the line and column and quotes the line;
    /// a wrong `format` says which versions are understood (and points a
    /// design file to `stagewright analyze`); an unknown key names the
    /// nearest known key; a value of the wrong JSON type names its key.
    pub fn from_json(text: &str) -> Result<SpecDocument> {
        let value = crate::document::parse(
            text,
            "the file is empty; a specification is a JSON object that starts with { \"format\": \"stagewright-spec/1\", ...",
        )?;
        SpecDocument::from_value(&value)
    }

    /// Reads an already parsed JSON value; see [`SpecDocument::from_json`].
    pub fn from_value(value: &Value) -> Result<SpecDocument> {
        let map = object(value, "")?;
        let format = match map.get("format") {
            None | Some(Value::Null) => {
                return Err(Error::missing(
                    "format",
                    "start the file with \"format\": \"stagewright-spec/1\"",
                ))
            }
            Some(Value::String(s)) => s.clone(),
            Some(other) => return Err(parse_error("format", other, EXPECTED_TEXT)),
        };
        check_spec_format(&format)?;
        let schema = &SPEC_SCHEMA;
        schema.check_keys(map, "")?;
        let block = |key: &str| map.get(key).filter(|v| !v.is_null());
        let bias = match block("bias") {
            None => None,
            Some(Value::String(s)) => Some(BiasDocument::Rule(s.clone())),
            Some(v @ Value::Object(_)) => {
                Some(BiasDocument::Point(BiasPointDocument::read(v, schema)?))
            }
            Some(other) => return Err(parse_error("bias", other, BIAS_ALLOWED)),
        };
        Ok(SpecDocument {
            format,
            title: free_text(map, "title", MAX_TITLE)?,
            notes: free_text(map, "notes", MAX_NOTES)?,
            stage: text_at(map, "", "stage")?,
            supply: typed_at(map, "", "supply")?,
            ambient: typed_at(map, "", "ambient")?,
            transistor: block("transistor")
                .map(|v| TransistorDocument::read(v, schema))
                .transpose()?,
            rs: typed_at(map, "", "rs")?,
            rl: typed_at(map, "", "rl")?,
            resistor_rating: typed_at(map, "", "resistor_rating")?,
            requirements: block("requirements")
                .map(|v| RequirementsDocument::read(v, schema))
                .transpose()?,
            bias,
            saturation_reserve: typed_at(map, "", "saturation_reserve")?,
            stiffness: typed_at(map, "", "stiffness")?,
            emitter_fraction: typed_at(map, "", "emitter_fraction")?,
            series: block("series")
                .map(|v| SeriesDocument::read(v, schema))
                .transpose()?,
            parts: block("parts")
                .map(|v| PinnedPartsDocument::read(v, schema))
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

impl<'de> Deserialize<'de> for SpecDocument {
    /// Deserializes through [`SpecDocument::from_value`], so unknown keys
    /// are rejected the same way.
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> core::result::Result<Self, D::Error> {
        let value = Value::deserialize(deserializer)?;
        SpecDocument::from_value(&value).map_err(serde::de::Error::custom)
    }
}

/// A validated specification file: the [`Spec`] and what the design file
/// made from it carries besides (title, notes, the preset's name).
#[derive(Debug, Clone, PartialEq)]
pub struct SpecFile {
    /// The title (empty when none).
    pub title: String,
    /// Free notes (empty when none).
    pub notes: String,
    /// The preset the transistor started from, when one was named.
    pub preset: Option<String>,
    /// The specification, checked by [`Spec::validate`].
    pub spec: Spec,
}

impl SpecFile {
    /// Reads and validates the JSON text of a specification file: the same
    /// as [`SpecDocument::from_json`] followed by `SpecFile::try_from`.
    ///
    /// # Errors
    /// The first problem found, naming the key as a dotted path.
    pub fn from_json(text: &str) -> Result<SpecFile> {
        SpecFile::try_from(SpecDocument::from_json(text)?)
    }

    /// The design file of a finished design: this file's title, notes,
    /// preset and requirements, the standard-value stage of `synthesis`,
    /// and the part tolerances of the series ([`Spec::tolerances`]) as its
    /// `tolerances` block.
    pub fn design(&self, synthesis: &Synthesis) -> Design {
        Design {
            title: self.title.clone(),
            notes: self.notes.clone(),
            preset: self.preset.clone(),
            stage: synthesis.stage.clone(),
            requirements: self.spec.requirements,
            tolerances: Some(self.spec.tolerances()),
        }
    }
}

impl TryFrom<SpecDocument> for SpecFile {
    type Error = Error;

    /// Reads every value in its unit, applies the preset and the defaults,
    /// and validates the specification.
    fn try_from(doc: SpecDocument) -> Result<SpecFile> {
        check_spec_format(&doc.format)?;
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
        let rs = optional(&doc.rs, "rs", "Ω")?.unwrap_or(0.0);
        let rl = required(
            &doc.rl,
            "rl",
            "Ω",
            "the design is made for its load; give the load resistance, e.g. \"rl\": \"10k\" (\"1M\" for a high-impedance input)",
        )?;
        let mut spec = Spec::new(kind, transistor, supply, rs, rl);
        spec.ambient = Temperature::from_celsius(ambient);
        spec.resistor_rating = optional(&doc.resistor_rating, "resistor_rating", "W")?
            .unwrap_or(DEFAULT_RESISTOR_RATING);
        spec.requirements = match &doc.requirements {
            Some(r) => requirements_from(r)?,
            None => Requirements::default(),
        };
        spec.bias = bias_from(doc.bias.as_ref())?;
        spec.saturation_reserve = optional(&doc.saturation_reserve, "saturation_reserve", "V")?
            .unwrap_or(DEFAULT_SATURATION_RESERVE);
        spec.stiffness = optional(&doc.stiffness, "stiffness", "")?.unwrap_or(DEFAULT_STIFFNESS);
        spec.emitter_fraction = doc
            .emitter_fraction
            .as_ref()
            .map(|v| share(v, "emitter_fraction", 0.5))
            .transpose()?
            .unwrap_or(DEFAULT_EMITTER_FRACTION);
        if let Some(s) = &doc.series {
            spec.series = series_from(s)?;
        }
        if let Some(p) = &doc.parts {
            spec.parts = pinned_from(p)?;
        }
        spec.validate()?;
        Ok(SpecFile {
            title: doc.title.unwrap_or_default(),
            notes: doc.notes.unwrap_or_default(),
            preset: t.preset.as_ref().map(|s| s.trim().to_owned()),
            spec,
        })
    }
}

fn bias_from(b: Option<&BiasDocument>) -> Result<Bias> {
    let unsupported = |value: &str| {
        Error::new(
            "bias",
            ErrorKind::Unsupported {
                value: value.to_owned(),
                allowed: String::from(BIAS_ALLOWED),
            },
        )
    };
    match b {
        None => Ok(Bias::MaxSwing),
        Some(BiasDocument::Rule(name)) => {
            let word = name.trim().to_ascii_lowercase().replace(['_', ' '], "-");
            if word == "max-swing" {
                Ok(Bias::MaxSwing)
            } else {
                Err(unsupported(name))
            }
        }
        Some(BiasDocument::Point(p)) => match (&p.ic, &p.vce) {
            (Some(ic), None) => Ok(Bias::Ic(ic.value("bias.ic", "A")?)),
            (None, Some(vce)) => Ok(Bias::Vce(vce.value("bias.vce", "V")?)),
            (Some(_), Some(_)) => Err(Error::inconsistent(
                "bias",
                "give one of bias.ic or bias.vce, not both: the other follows from the load line",
            )),
            (None, None) => Err(Error::missing(
                "bias",
                "an object bias needs one key, { \"ic\": \"2m\" } or { \"vce\": 5 }; or write \"bias\": \"max-swing\"",
            )),
        },
    }
}

fn series_from(s: &SeriesDocument) -> Result<Series> {
    let series = |name: &Option<String>, field: &str, default: ESeries| -> Result<ESeries> {
        match name {
            None => Ok(default),
            Some(n) => ESeries::parse(n).map_err(|_| {
                Error::new(
                    field,
                    ErrorKind::Unsupported {
                        value: n.trim().to_owned(),
                        allowed: String::from("E3, E6, E12, E24, E48, E96 or E192"),
                    },
                )
            }),
        }
    };
    let d = Series::default();
    Ok(Series {
        resistors: series(&s.resistors, "series.resistors", d.resistors)?,
        capacitors: series(&s.capacitors, "series.capacitors", d.capacitors)?,
        resistor_tolerance: s
            .resistor_tolerance
            .as_ref()
            .map(|v| share(v, "series.resistor_tolerance", 0.5))
            .transpose()?,
        capacitor_tolerance: s
            .capacitor_tolerance
            .as_ref()
            .map(|v| share(v, "series.capacitor_tolerance", 0.9))
            .transpose()?,
    })
}

fn pinned_from(p: &PinnedPartsDocument) -> Result<PinnedParts> {
    let get = |v: &Option<Typed>, name: &str, unit: &'static str| {
        optional(v, &["parts.", name].concat(), unit)
    };
    Ok(PinnedParts {
        r1: get(&p.r1, "r1", "Ω")?,
        r2: get(&p.r2, "r2", "Ω")?,
        rc: get(&p.rc, "rc", "Ω")?,
        re: get(&p.re, "re", "Ω")?,
        re_bypassed: get(&p.re_bypassed, "re_bypassed", "Ω")?,
        c_in: get(&p.c_in, "c_in", "F")?,
        c_out: get(&p.c_out, "c_out", "F")?,
        c_emitter: get(&p.c_emitter, "c_emitter", "F")?,
        c_base: get(&p.c_base, "c_base", "F")?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::presets::preset;
    use crate::stage::StageKind;
    use crate::synthesis::synthesize;
    use alloc::string::ToString;

    /// A small valid specification: a common-emitter gain stage from a
    /// preset, with values typed as text and one pinned part.
    const GOOD: &str = r#"{
        "format": "stagewright-spec/1",
        "title": "test gain stage",
        "stage": "common-emitter",
        "supply": 12,
        "transistor": { "preset": "general-purpose-npn" },
        "rs": 600,
        "rl": "10k",
        "requirements": { "min_voltage_gain_db": 20, "max_voltage_gain_db": 26, "min_swing": "2 V",
                          "max_f_low": "50 Hz" },
        "bias": "max-swing",
        "series": { "resistors": "E96", "capacitors": "E6", "capacitor_tolerance": "10 %" },
        "parts": { "c_out": "10u" }
    }"#;

    fn err(text: &str) -> Error {
        match SpecFile::from_json(text) {
            Ok(s) => panic!(
                "expected an error, got a specification titled {:?}",
                s.title
            ),
            Err(e) => e,
        }
    }

    fn with(old: &str, new: &str) -> String {
        assert!(GOOD.contains(old), "the test text must contain {old}");
        GOOD.replacen(old, new, 1)
    }

    #[test]
    fn reads_a_specification_with_typed_values_and_defaults() {
        let f = SpecFile::from_json(GOOD).expect("the sample specification is valid");
        let s = &f.spec;
        assert_eq!(s.stage, StageKind::CommonEmitter, "stage name read");
        assert_eq!(s.rl, 10e3, "\"10k\" is exactly 10 kΩ");
        assert_eq!(s.requirements.min_swing, Some(2.0), "\"2 V\" is 2 V");
        assert_eq!(s.requirements.max_f_low, Some(50.0), "\"50 Hz\" is 50 Hz");
        assert_eq!(s.bias, Bias::MaxSwing, "\"max-swing\" is read");
        assert_eq!(s.series.resistors, ESeries::E96, "resistor series read");
        assert_eq!(s.series.capacitors, ESeries::E6, "capacitor series read");
        assert_eq!(
            s.series.capacitor_tolerance,
            Some(0.1),
            "\"10 %\" is the fraction 0.1"
        );
        assert_eq!(
            s.parts.c_out,
            Some(10e-6),
            "the pinned part is read in farads"
        );
        assert_eq!(
            s.stiffness, DEFAULT_STIFFNESS,
            "the divider stiffness defaults to k = 0.1"
        );
        assert_eq!(
            s.transistor,
            preset("general-purpose-npn").unwrap(),
            "the preset is used unchanged"
        );
        assert_eq!(
            f.preset.as_deref(),
            Some("general-purpose-npn"),
            "preset kept"
        );
    }

    #[test]
    fn bias_is_a_rule_or_one_given_point() {
        let f = SpecFile::from_json(&with(r#""max-swing""#, r#"{ "ic": "1.5m" }"#))
            .expect("a given current is valid");
        assert_eq!(f.spec.bias, Bias::Ic(1.5e-3), "\"1.5m\" is 1.5 mA");
        let f = SpecFile::from_json(&with(r#""max-swing""#, r#"{ "vce": "5 V" }"#))
            .expect("a given VCE is valid");
        assert_eq!(f.spec.bias, Bias::Vce(5.0), "\"5 V\" is 5 V");
        let e = err(&with(r#""max-swing""#, r#"{ "ic": 0.001, "vce": 5 }"#));
        assert_eq!(e.field(), "bias", "both points given: the bias is named");
        let e = err(&with(r#""max-swing""#, r#""biggest""#));
        assert!(
            e.to_string().contains("\"max-swing\""),
            "an unknown rule lists what is allowed: {e}"
        );
        let e = err(&with(r#""max-swing""#, r#"{ "ib": 0.001 }"#));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("bias.ic")
            },
            "a near miss inside bias is suggested"
        );
        let e = err(&with(r#""max-swing""#, r#"{ "ic": "1 A" }"#));
        assert_eq!(
            e.field(),
            "bias.ic",
            "a current above the transistor's rating is refused by the core's check"
        );
    }

    #[test]
    fn an_unknown_key_names_the_nearest_key_of_this_format() {
        let e = err(&with("\"min_swing\"", "\"min_swng\""));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("requirements.min_swing")
            },
            "the requirements block is the design file's, with its suggestions"
        );
        let e = err(&with(
            r#""parts": { "c_out""#,
            r#""parts": { "rl": "10k", "c_out""#,
        ));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("rl")
            },
            "the load is not a part to pin: it belongs at the top level"
        );
        let e = err(&with("\"supply\": 12", "\"supply\": 12, \"stifness\": 0.2"));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("stiffness")
            },
            "a typo of a design intent is caught"
        );
        let e = err(&with(
            "\"supply\": 12",
            "\"supply\": 12, \"polarity\": \"npn\"",
        ));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("transistor.polarity")
            },
            "polarity belongs to the transistor block, as in the design file"
        );
        let e = err(&with(r#""resistors": "E96""#, r#""resistor": "E96""#));
        assert_eq!(
            e.kind(),
            &ErrorKind::UnknownKey {
                suggestion: Some("series.resistors")
            },
            "one letter missing in the series block"
        );
    }

    #[test]
    fn shares_series_and_formats_are_checked_with_their_field() {
        let e = err(&with(
            r#""capacitor_tolerance": "10 %""#,
            r#""capacitor_tolerance": 10"#,
        ));
        assert_eq!(
            e.field(),
            "series.capacitor_tolerance",
            "the share is named"
        );
        assert!(
            e.to_string().contains("\"1 %\""),
            "10 meant as 10 % is refused with the fix: {e}"
        );
        let e = err(&with(
            r#""capacitor_tolerance": "10 %""#,
            r#""capacitor_tolerance": "ten %""#,
        ));
        assert!(
            matches!(e.kind(), ErrorKind::Parse { text, .. } if text == "ten %"),
            "the text is quoted as typed: {e}"
        );
        let e = err(&with(r#""E96""#, r#""E100""#));
        assert_eq!(e.field(), "series.resistors", "the series is named");
        assert!(e.to_string().contains("E96"), "the series are listed: {e}");
        let e = err(&with("stagewright-spec/1", "stagewright/1"));
        assert_eq!(e.field(), "format", "a design file is not a specification");
        assert!(
            e.to_string().contains("stagewright analyze"),
            "and is pointed to the command that reads it: {e}"
        );
        let e = err(&with(r#""rl": "10k","#, ""));
        assert_eq!(e.field(), "rl", "the load is required");
        assert!(
            matches!(e.kind(), ErrorKind::Missing { .. }),
            "a missing load is reported as missing: {e}"
        );
        let e = err(&with(r#""c_out": "10u""#, r#""c_base": "10u""#));
        assert_eq!(
            e.field(),
            "parts.c_base",
            "a part the stage does not have is refused by the core's check"
        );
    }

    #[test]
    fn the_design_file_of_a_synthesis_carries_the_series_tolerances() {
        let f = SpecFile::from_json(GOOD).expect("valid");
        let s = synthesize(&f.spec).expect("the sample specification can be met");
        let d = f.design(&s);
        assert_eq!(d.title, "test gain stage", "the title is carried over");
        let t = d
            .tolerances
            .expect("a designed file has a tolerances block");
        assert_eq!(t.resistor_tolerance, 0.01, "E96 resistors are ±1 %");
        assert_eq!(t.capacitor_tolerance, 0.1, "the capacitor tolerance given");
        assert_eq!(d.stage.parts.c_out, Some(10e-6), "the pinned part is kept");
        let back = Design::from_json(&d.to_json()).expect("the design file reads back");
        assert_eq!(back, d, "writing then reading the design is lossless");
        let a = back.analyze().expect("the design solves");
        assert!(
            back.checks(&a).iter().all(|c| c.pass),
            "the written design meets its requirements and ratings"
        );
    }

    #[test]
    fn serde_deserialization_runs_the_same_checks() {
        let v: core::result::Result<SpecDocument, _> =
            serde_json::from_str(&with("\"min_swing\"", "\"min_swng\""));
        let message = v
            .expect_err("an unknown key is refused through serde too")
            .to_string();
        assert!(
            message.contains("min_swing"),
            "the suggestion survives: {message}"
        );
        let doc = SpecDocument::from_json(GOOD).expect("valid");
        let again =
            SpecDocument::from_json(&doc.to_json()).expect("the written document reads back");
        assert_eq!(again, doc, "the document as typed survives writing");
    }

    #[test]
    fn no_single_character_deletion_or_digit_change_panics() {
        // Every way of deleting one character, and of turning one character
        // into a 9, must give an error or a valid specification, never a
        // panic. (Synthesis is not run here: it takes milliseconds each.)
        let mut valid = 0;
        for (i, c) in GOOD.char_indices() {
            for replacement in ["", "9"] {
                let text = [&GOOD[..i], replacement, &GOOD[i + c.len_utf8()..]].concat();
                if SpecFile::from_json(&text).is_ok() {
                    valid += 1;
                }
            }
        }
        assert!(valid > 10, "some mutations stay valid: {valid}");
    }
}
