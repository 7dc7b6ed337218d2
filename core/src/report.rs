//! The report of an analysed design, `stagewright-report/1`, and the
//! frequency-response table of a sweep, `stagewright-sweep/1`.
//!
//! A [`Report`] is built from a [`Design`] and its [`Analysis`]. It is
//! written as one JSON document ([`Report::to_json_string`]) for machines,
//! or as a readable text ([`Report::to_text`]) for people. The keys are
//! stable: a key is never renamed or given another unit within version 1;
//! new keys may be added.
//!
//! # Units
//! Every number is in SI base units, unscaled: volts, amperes, ohms,
//! siemens, farads, hertz, watts, and plain ratios. The exceptions are
//! named in their key: gains ending in `_db` are in decibels, and
//! temperatures are in degrees Celsius as in the design file. A quantity
//! that does not exist (no lower corner when every coupling capacitor is
//! ideal) is `null`. Quantities are defined as in the crate documentation:
//! the input terminal is the source side of `c_in`, after `rs`; voltage
//! gain is V(load)/V(input terminal); swing is the peak at the load.
//!
//! # Keys
//! | key | unit | meaning |
//! |---|---|---|
//! | `format` | | `"stagewright-report/1"` |
//! | `pass` | | `true` when every check passes |
//! | `design.title` | | the design's title (`""` when none) |
//! | `design.stage` | | `common-emitter`, `common-collector` or `common-base` |
//! | `design.polarity` | | `npn` or `pnp` |
//! | `design.preset` | | the transistor preset, or `null` |
//! | `design.supply` | V | supply voltage |
//! | `design.ambient` | °C | ambient temperature |
//! | `operating_point.ic` | A | collector current (positive in normal operation, both polarities) |
//! | `operating_point.ib` | A | base current |
//! | `operating_point.ie` | A | emitter current |
//! | `operating_point.vce` | V | collector–emitter voltage (negative for PNP) |
//! | `operating_point.vbe` | V | base–emitter voltage at the terminals (negative for PNP) |
//! | `operating_point.vb` | V | base node voltage to ground |
//! | `operating_point.ve` | V | emitter node voltage to ground |
//! | `operating_point.vc` | V | collector node voltage to ground |
//! | `operating_point.region` | | `active`, `saturation` or `cutoff` |
//! | `small_signal.gm` | S | transconductance |
//! | `small_signal.r_pi` | Ω | base–emitter input resistance rπ |
//! | `small_signal.r_o` | Ω | output resistance (10¹⁵ Ω with no Early effect) |
//! | `small_signal.c_pi` | F | base–emitter capacitance Cπ |
//! | `small_signal.c_mu` | F | base–collector capacitance Cμ |
//! | `small_signal.rbb` | Ω | base spreading resistance |
//! | `small_signal.beta0` | | small-signal current gain gm·rπ |
//! | `midband.voltage_gain` | | V(load)/V(input terminal), signed (negative: inverting) |
//! | `midband.voltage_gain_db` | dB | its magnitude in dB |
//! | `midband.voltage_gain_from_source` | | V(load)/EMF, signed |
//! | `midband.current_gain` | | I(load)/I(into the input terminal), signed |
//! | `midband.power_gain_db` | dB | \|voltage gain · current gain\| in dB |
//! | `midband.input_impedance` | Ω | at the input terminal, load connected |
//! | `midband.output_impedance` | Ω | seen by the load, EMF zeroed, `rs` kept |
//! | `bandwidth.f_low` | Hz | lower −3 dB corner of the gain from the source, or `null` |
//! | `bandwidth.f_high` | Hz | upper −3 dB corner, or `null` |
//! | `bandwidth.f_unity_current_gain` | Hz | where \|current gain\| falls to 1, or `null` |
//! | `bandwidth.f_unity_power_gain` | Hz | where \|power gain\| falls to 1, or `null` |
//! | `bandwidth.low_edge` | | how the lower-corner search ended: `corner`, `none` (the gain holds to DC), `beyond-search` (below 1 mHz), `no-passband` |
//! | `bandwidth.high_edge` | | the same for the upper corner (`beyond-search`: above 1 THz) |
//! | `bandwidth.peak_db` | dB | the largest \|V(load)/EMF\| over 1 mHz to 1 THz relative to its midband value (about 0; below −3 dB when there is no passband) |
//! | `bandwidth.peak_frequency` | Hz | where that largest response is |
//! | `swing.positive` | V | largest positive peak at the load before clipping |
//! | `swing.negative` | V | largest negative peak, as a magnitude |
//! | `swing.symmetric` | V | the smaller of the two |
//! | `swing.ac_load` | Ω | AC load at the output terminal of the transistor |
//! | `swing.ic_peak` | A | collector current at the saturation end of the AC load line |
//! | `swing.centred_ic` | A | collector current that would centre the quiescent point |
//! | `swing.centred_vce` | V | \|VCE\| of the centred quiescent point |
//! | `swing.centred_swing` | V | symmetric peak swing at the centred point |
//! | `dissipation.transistor` | W | quiescent transistor dissipation |
//! | `dissipation.junction_temperature` | °C | junction temperature at the ambient |
//! | `dissipation.supply_current` | A | quiescent current from the supply |
//! | `dissipation.ptot_available` | W | Ptot derated to the ambient |
//! | `dissipation.resistors` | W | an object: each resistor present (`r1`, `r2`, `rc`, `re`, `re_bypassed`) and its dissipation |
//! | `stability.across_hfe` | | largest relative change of IC between `hfe_min` and `hfe_max` |
//! | `stability.over_temperature` | | relative change of IC for the ambient 25 K warmer |
//! | `checks` | | a list, ratings first, then requirements |
//! | `checks[].id` | | `vceo`, `ic_max`, `ptot`, `tj_max`, `resistor_power.<name>`, or the requirement's key |
//! | `checks[].kind` | | `rating` or `requirement` |
//! | `checks[].pass` | | `true` when the value is within the limit |
//! | `checks[].value` | `unit` | the value found |
//! | `checks[].limit` | `unit` | the limit |
//! | `checks[].unit` | | the unit symbol of value and limit |
//! | `checks[].message` | | a sentence |
//! | `cautions` | | a list of things a reviewer should see |
//! | `cautions[].id` | | a stable identifier such as `bias-unstable-hfe` |
//! | `cautions[].message` | | a sentence |
//!
//! # Sweep
//! A [`SweepTable`] holds the response at log-spaced frequencies; its
//! columns are listed in [`SweepTable::COLUMNS`]. It is written as CSV
//! ([`SweepTable::to_csv`]), as JSON ([`SweepTable::to_json_string`]:
//! `format` `"stagewright-sweep/1"`, `columns` `[{name, unit}]`, `rows`
//! `[{column: value}]`) or as an aligned text table ([`SweepTable::to_text`]).

use alloc::borrow::ToOwned;
use alloc::string::String;
use alloc::vec::Vec;
use core::fmt::Write as _;

use serde::ser::SerializeMap;
use serde::{Serialize, Serializer};

use crate::analysis::Analysis;
use crate::design_file::Design;
use crate::document::file_celsius;
use crate::error::Result;
use crate::format::format_si;
use crate::nodal::db20;
use crate::ratings::{Check, DEFERRAL};
use crate::response::{SEARCH_FROM, SEARCH_TO};

/// The format name and version of the report: `stagewright-report/1`.
pub const REPORT_FORMAT: &str = "stagewright-report/1";

/// The format name and version of a sweep table: `stagewright-sweep/1`.
pub const SWEEP_FORMAT: &str = "stagewright-sweep/1";

/// The report of one design: every number of the analysis and every check.
///
/// Build it with [`Report::new`]; read it with [`Report::passed`],
/// [`Report::checks`] and [`Report::cautions`]; write it with
/// [`Report::to_json_string`] or [`Report::to_text`].
#[derive(Debug, Clone, Serialize)]
pub struct Report {
    format: &'static str,
    pass: bool,
    design: DesignSection,
    operating_point: OperatingPointSection,
    small_signal: SmallSignalSection,
    midband: MidbandSection,
    bandwidth: BandwidthSection,
    swing: SwingSection,
    dissipation: DissipationSection,
    #[serde(skip_serializing_if = "Option::is_none")]
    stability: Option<StabilitySection>,
    checks: Vec<CheckEntry>,
    cautions: Vec<CautionEntry>,
    #[serde(skip)]
    core_checks: Vec<Check>,
}

#[derive(Debug, Clone, Serialize)]
struct DesignSection {
    title: String,
    stage: &'static str,
    polarity: &'static str,
    preset: Option<String>,
    supply: f64,
    ambient: f64,
}

#[derive(Debug, Clone, Serialize)]
struct OperatingPointSection {
    ic: f64,
    ib: f64,
    ie: f64,
    vce: f64,
    vbe: f64,
    vb: f64,
    ve: f64,
    vc: f64,
    region: &'static str,
}

#[derive(Debug, Clone, Serialize)]
struct SmallSignalSection {
    gm: f64,
    r_pi: f64,
    r_o: f64,
    c_pi: f64,
    c_mu: f64,
    rbb: f64,
    beta0: f64,
}

#[derive(Debug, Clone, Serialize)]
struct MidbandSection {
    voltage_gain: f64,
    voltage_gain_db: f64,
    voltage_gain_from_source: f64,
    current_gain: f64,
    power_gain_db: f64,
    input_impedance: f64,
    output_impedance: f64,
}

#[derive(Debug, Clone, Serialize)]
struct BandwidthSection {
    f_low: Option<f64>,
    f_high: Option<f64>,
    f_unity_current_gain: Option<f64>,
    f_unity_power_gain: Option<f64>,
    low_edge: &'static str,
    high_edge: &'static str,
    peak_db: f64,
    peak_frequency: f64,
}

#[derive(Debug, Clone, Serialize)]
struct SwingSection {
    positive: f64,
    negative: f64,
    symmetric: f64,
    ac_load: f64,
    ic_peak: f64,
    centred_ic: f64,
    centred_vce: f64,
    centred_swing: f64,
}

#[derive(Debug, Clone, Serialize)]
struct DissipationSection {
    transistor: f64,
    junction_temperature: f64,
    supply_current: f64,
    ptot_available: f64,
    resistors: Resistors,
}

/// Resistor dissipations, written as a JSON object in the order of the parts.
#[derive(Debug, Clone)]
struct Resistors(Vec<(&'static str, f64)>);

impl Serialize for Resistors {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        let mut map = s.serialize_map(Some(self.0.len()))?;
        for (name, watts) in &self.0 {
            map.serialize_entry(name, watts)?;
        }
        map.end()
    }
}

#[derive(Debug, Clone, Serialize)]
struct StabilitySection {
    across_hfe: f64,
    over_temperature: f64,
}

#[derive(Debug, Clone, Serialize)]
struct CheckEntry {
    id: String,
    kind: &'static str,
    pass: bool,
    value: f64,
    limit: f64,
    unit: &'static str,
    message: String,
}

#[derive(Debug, Clone, Serialize)]
struct CautionEntry {
    id: String,
    message: String,
}

impl Report {
    /// The report of `design` analysed as `analysis` (which should come from
    /// [`Design::analyze`]). The checks are the ratings checks of the
    /// analysis followed by the design's requirements.
    pub fn new(design: &Design, analysis: &Analysis) -> Report {
        let s = &design.stage;
        let a = analysis;
        let op = &a.operating_point;
        let ss = &a.small_signal;
        let m = &a.midband;
        let core_checks = design.checks(a);
        let ratings = a.ratings.len();
        let checks: Vec<CheckEntry> = core_checks
            .iter()
            .enumerate()
            .map(|(i, c)| CheckEntry {
                id: c.id.clone(),
                kind: if i < ratings { "rating" } else { "requirement" },
                pass: c.pass,
                value: c.value,
                limit: c.limit,
                unit: c.unit,
                message: c.message.clone(),
            })
            .collect();
        Report {
            format: REPORT_FORMAT,
            pass: checks.iter().all(|c| c.pass),
            design: DesignSection {
                title: design.title.clone(),
                stage: s.kind.name(),
                polarity: s.transistor.polarity.name(),
                preset: design.preset.clone(),
                supply: s.supply,
                ambient: file_celsius(s.ambient),
            },
            operating_point: OperatingPointSection {
                ic: op.ic,
                ib: op.ib,
                ie: op.ie,
                vce: op.vce,
                vbe: op.vbe,
                vb: op.vb,
                ve: op.ve,
                vc: op.vc,
                region: op.region.name(),
            },
            small_signal: SmallSignalSection {
                gm: ss.gm,
                r_pi: ss.r_pi,
                r_o: ss.r_o,
                c_pi: ss.c_pi,
                c_mu: ss.c_mu,
                rbb: ss.rbb,
                beta0: ss.beta0,
            },
            midband: MidbandSection {
                voltage_gain: m.voltage_gain,
                voltage_gain_db: db20(libm::fabs(m.voltage_gain)),
                voltage_gain_from_source: m.voltage_gain_from_source,
                current_gain: m.current_gain,
                power_gain_db: m.power_gain_db,
                input_impedance: m.input_impedance,
                output_impedance: m.output_impedance,
            },
            bandwidth: BandwidthSection {
                f_low: a.bandwidth.f_low,
                f_high: a.bandwidth.f_high,
                f_unity_current_gain: a.bandwidth.f_unity_current_gain,
                f_unity_power_gain: a.bandwidth.f_unity_power_gain,
                low_edge: a.bandwidth.low_edge.name(),
                high_edge: a.bandwidth.high_edge.name(),
                peak_db: db20(a.bandwidth.peak_ratio),
                peak_frequency: a.bandwidth.peak_frequency,
            },
            swing: SwingSection {
                positive: a.swing.positive,
                negative: a.swing.negative,
                symmetric: a.swing.symmetric,
                ac_load: a.swing.ac_load,
                ic_peak: a.swing.ic_peak,
                centred_ic: a.swing.centred_ic,
                centred_vce: a.swing.centred_vce,
                centred_swing: a.swing.centred_swing,
            },
            dissipation: DissipationSection {
                transistor: a.dissipation.transistor,
                junction_temperature: a.dissipation.junction_temperature.celsius(),
                supply_current: a.dissipation.supply_current,
                ptot_available: a.dissipation.ptot_available,
                resistors: Resistors(a.dissipation.resistors.clone()),
            },
            stability: a.stability.map(|st| StabilitySection {
                across_hfe: st.across_hfe,
                over_temperature: st.over_temperature,
            }),
            checks,
            cautions: a
                .cautions
                .iter()
                .map(|c| CautionEntry {
                    id: c.id.clone(),
                    message: c.message.clone(),
                })
                .collect(),
            core_checks,
        }
    }

    /// True when every check (ratings and requirements) passes.
    pub fn passed(&self) -> bool {
        self.pass
    }

    /// Every check, ratings first, then requirements.
    pub fn checks(&self) -> &[Check] {
        &self.core_checks
    }

    /// The checks that fail.
    pub fn failing_checks(&self) -> impl Iterator<Item = &Check> {
        self.core_checks.iter().filter(|c| !c.pass)
    }

    /// The caution sentences, as `(id, message)`.
    pub fn cautions(&self) -> impl Iterator<Item = (&str, &str)> {
        self.cautions
            .iter()
            .map(|c| (c.id.as_str(), c.message.as_str()))
    }

    /// The report as pretty-printed JSON (two-space indent), ending with a newline.
    pub fn to_json_string(&self) -> String {
        let mut out = serde_json::to_string_pretty(self).unwrap_or_default();
        out.push('\n');
        out
    }

    /// The report as readable text: sections with aligned columns, values
    /// in engineering notation with their units, the checks with pass or
    /// FAIL, and the cautions.
    pub fn to_text(&self) -> String {
        let mut o = String::new();
        let d = &self.design;
        let device = match &d.preset {
            Some(p) => [d.polarity_upper(), " (", p, ")"].concat(),
            None => [d.polarity_upper(), " (datasheet values)"].concat(),
        };
        if !d.title.is_empty() {
            line(&mut o, &d.title);
        }
        let _ = writeln!(
            o,
            "{} stage, {}, supply {}, ambient {}",
            d.stage,
            device,
            format_si(d.supply, "V"),
            format_si(d.ambient, "°C")
        );

        let op = &self.operating_point;
        head(&mut o, "Operating point", &["region: ", op.region].concat());
        row(
            &mut o,
            "collector current",
            "IC",
            &format_si(op.ic, "A"),
            "",
        );
        row(&mut o, "base current", "IB", &format_si(op.ib, "A"), "");
        row(&mut o, "emitter current", "IE", &format_si(op.ie, "A"), "");
        row(
            &mut o,
            "collector–emitter voltage",
            "VCE",
            &format_si(op.vce, "V"),
            "",
        );
        row(
            &mut o,
            "base–emitter voltage",
            "VBE",
            &format_si(op.vbe, "V"),
            "",
        );
        row(&mut o, "base", "VB", &format_si(op.vb, "V"), "to ground");
        row(&mut o, "emitter", "VE", &format_si(op.ve, "V"), "to ground");
        row(
            &mut o,
            "collector",
            "VC",
            &format_si(op.vc, "V"),
            "to ground",
        );

        let ss = &self.small_signal;
        head(&mut o, "Small signal", "");
        row(&mut o, "transconductance", "gm", &format_si(ss.gm, "S"), "");
        row(
            &mut o,
            "input resistance",
            "rπ",
            &format_si(ss.r_pi, "Ω"),
            "",
        );
        row(
            &mut o,
            "output resistance",
            "ro",
            &format_si(ss.r_o, "Ω"),
            "",
        );
        row(
            &mut o,
            "base–emitter capacitance",
            "Cπ",
            &format_si(ss.c_pi, "F"),
            "",
        );
        row(
            &mut o,
            "base–collector capacitance",
            "Cμ",
            &format_si(ss.c_mu, "F"),
            "",
        );
        row(&mut o, "current gain", "β0", &format_si(ss.beta0, ""), "");

        let m = &self.midband;
        head(&mut o, "Midband", "");
        row(
            &mut o,
            "voltage gain",
            "Av",
            &format_si(m.voltage_gain, ""),
            &["(", &format_si(m.voltage_gain_db, "dB"), ")"].concat(),
        );
        row(
            &mut o,
            "voltage gain from source",
            "Avs",
            &format_si(m.voltage_gain_from_source, ""),
            &[
                "(",
                &format_si(db20(libm::fabs(m.voltage_gain_from_source)), "dB"),
                ")",
            ]
            .concat(),
        );
        row(
            &mut o,
            "current gain",
            "Ai",
            &format_si(m.current_gain, ""),
            "",
        );
        row(
            &mut o,
            "power gain",
            "Ap",
            &format_si(m.power_gain_db, "dB"),
            "",
        );
        row(
            &mut o,
            "input impedance",
            "Zin",
            &format_si(m.input_impedance, "Ω"),
            "",
        );
        row(
            &mut o,
            "output impedance",
            "Zout",
            &format_si(m.output_impedance, "Ω"),
            "",
        );

        let b = &self.bandwidth;
        head(&mut o, "Bandwidth", "−3 dB of the gain from the source");
        let freq = |f: Option<f64>| f.map_or_else(|| "none".to_owned(), |f| format_si(f, "Hz"));
        let (low, low_note) = match b.low_edge {
            "none" => ("none".to_owned(), "the gain holds to DC"),
            "beyond-search" => (
                ["below ", &format_si(SEARCH_FROM, "Hz")].concat(),
                "beyond the search range",
            ),
            "no-passband" => ("none".to_owned(), "no passband: see the cautions"),
            _ => (freq(b.f_low), ""),
        };
        row(&mut o, "lower corner", "f_low", &low, low_note);
        let (high, high_note) = match b.high_edge {
            "beyond-search" => (
                ["above ", &format_si(SEARCH_TO, "Hz")].concat(),
                "beyond the search range",
            ),
            "no-passband" => ("none".to_owned(), "no passband: see the cautions"),
            _ => (freq(b.f_high), ""),
        };
        row(&mut o, "upper corner", "f_high", &high, high_note);
        if b.low_edge == "no-passband" {
            row(
                &mut o,
                "largest response",
                "",
                &format_si(b.peak_db, "dB"),
                &["re midband, at ", &format_si(b.peak_frequency, "Hz")].concat(),
            );
        }
        row(
            &mut o,
            "unity current gain",
            "",
            &freq(b.f_unity_current_gain),
            "",
        );
        row(
            &mut o,
            "unity power gain",
            "",
            &freq(b.f_unity_power_gain),
            "",
        );

        let sw = &self.swing;
        head(&mut o, "Swing", "peak at the load");
        row(&mut o, "positive", "", &format_si(sw.positive, "V"), "");
        row(&mut o, "negative", "", &format_si(sw.negative, "V"), "");
        row(&mut o, "symmetric", "", &format_si(sw.symmetric, "V"), "");
        let mut centred = String::new();
        let _ = write!(
            centred,
            "at IC {}, |VCE| {}",
            format_si(sw.centred_ic, "A"),
            format_si(sw.centred_vce, "V")
        );
        row(
            &mut o,
            "centred Q would give",
            "",
            &format_si(sw.centred_swing, "V"),
            &centred,
        );

        let di = &self.dissipation;
        head(&mut o, "Dissipation", "quiescent");
        let mut avail = String::from("of ");
        avail.push_str(&format_si(di.ptot_available, "W"));
        avail.push_str(" available");
        row(
            &mut o,
            "transistor",
            "",
            &format_si(di.transistor, "W"),
            &avail,
        );
        row(
            &mut o,
            "junction temperature",
            "Tj",
            &format_si(di.junction_temperature, "°C"),
            "",
        );
        row(
            &mut o,
            "supply current",
            "",
            &format_si(di.supply_current, "A"),
            "",
        );
        for (name, w) in &di.resistors.0 {
            row(&mut o, name, "", &format_si(*w, "W"), "");
        }
        if let Some(st) = &self.stability {
            let pct = |x: f64| {
                let mut t = String::new();
                let _ = write!(t, "{:.1} %", 100.0 * x);
                t
            };
            head(&mut o, "Bias stability", "change of IC");
            row(
                &mut o,
                "across the hFE range",
                "",
                &pct(st.across_hfe),
                "hfe_min to hfe_max",
            );
            row(
                &mut o,
                "for a 25 K warmer ambient",
                "",
                &pct(st.over_temperature),
                "",
            );
        }

        let failing = self.checks.iter().filter(|c| !c.pass).count();
        let mut summary = String::new();
        let _ = write!(
            summary,
            "{} pass, {} FAIL",
            self.checks.len() - failing,
            failing
        );
        head(&mut o, "Checks", &summary);
        let id_width = self
            .checks
            .iter()
            .map(|c| c.id.chars().count())
            .max()
            .unwrap_or(0);
        for c in &self.checks {
            let _ = writeln!(
                o,
                "  {:<4}  {:<w$}  {}",
                if c.pass { "pass" } else { "FAIL" },
                c.id,
                c.message,
                w = id_width
            );
        }

        if self.cautions.is_empty() {
            head(&mut o, "Cautions", "none");
        } else {
            head(&mut o, "Cautions", "");
            for c in &self.cautions {
                let message = c.message.replace(DEFERRAL, "");
                let _ = writeln!(o, "  ! {}: {}", c.id, message.trim_end());
            }
        }
        let _ = writeln!(o, "\n{DEFERRAL}");
        o
    }
}

impl DesignSection {
    fn polarity_upper(&self) -> &'static str {
        if self.polarity == "pnp" {
            "PNP"
        } else {
            "NPN"
        }
    }
}

/// Width of the description column of the readable report.
const LABEL: usize = 27;
/// Width of the symbol column.
const SYMBOL: usize = 7;
/// Width of the value column.
const VALUE: usize = 11;

fn line(o: &mut String, text: &str) {
    o.push_str(text);
    o.push('\n');
}

fn head(o: &mut String, title: &str, note: &str) {
    o.push('\n');
    if note.is_empty() {
        line(o, title);
    } else {
        let _ = writeln!(o, "{title} ({note})");
    }
}

fn row(o: &mut String, label: &str, symbol: &str, value: &str, note: &str) {
    let _ = write!(o, "  {label:<LABEL$} {symbol:<SYMBOL$} {value:>VALUE$}");
    if !note.is_empty() {
        let _ = write!(o, "  {note}");
    }
    o.push('\n');
}

/// One frequency of a sweep. Gains are of the full network (every
/// capacitor at its value), in dB of their magnitude.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SweepRow {
    /// Frequency, Hz.
    pub frequency: f64,
    /// |V(load)/V(input terminal)| in dB.
    pub voltage_gain_db: f64,
    /// Phase of V(load)/V(input terminal), degrees in (−180, 180].
    pub phase_deg: f64,
    /// |V(load)/EMF| in dB.
    pub voltage_gain_from_source_db: f64,
    /// |I(load)/I(input)| in dB.
    pub current_gain_db: f64,
    /// |voltage gain · current gain| in dB (10·log10).
    pub power_gain_db: f64,
    /// |Zin| at the input terminal, Ω.
    pub input_impedance: f64,
    /// |Zout| seen by the load, Ω.
    pub output_impedance: f64,
}

/// The frequency response at log-spaced frequencies.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepTable {
    /// The rows, in rising frequency.
    pub rows: Vec<SweepRow>,
}

impl SweepTable {
    /// The columns, in order, as `(name, unit)`; the names are the keys of
    /// [`SweepRow`] and the CSV header.
    pub const COLUMNS: [(&'static str, &'static str); 8] = [
        ("frequency", "Hz"),
        ("voltage_gain_db", "dB"),
        ("phase_deg", "°"),
        ("voltage_gain_from_source_db", "dB"),
        ("current_gain_db", "dB"),
        ("power_gain_db", "dB"),
        ("input_impedance", "Ω"),
        ("output_impedance", "Ω"),
    ];

    /// The response of `analysis` at `points` log-spaced frequencies from
    /// `from` to `to` Hz.
    ///
    /// # Errors
    /// [`crate::log_frequencies`]'s errors, naming `from`, `to` or `points`.
    pub fn new(analysis: &Analysis, from: f64, to: f64, points: usize) -> Result<SweepTable> {
        let rows = analysis
            .response()
            .sweep(from, to, points)?
            .iter()
            .map(|p| SweepRow {
                frequency: p.frequency,
                voltage_gain_db: p.voltage_gain_db(),
                phase_deg: p.phase_deg(),
                voltage_gain_from_source_db: p.voltage_gain_from_source_db(),
                current_gain_db: p.current_gain_db(),
                power_gain_db: p.power_gain_db(),
                input_impedance: p.input_impedance.norm(),
                output_impedance: p.output_impedance.norm(),
            })
            .collect();
        Ok(SweepTable { rows })
    }

    fn values(r: &SweepRow) -> [f64; 8] {
        [
            r.frequency,
            r.voltage_gain_db,
            r.phase_deg,
            r.voltage_gain_from_source_db,
            r.current_gain_db,
            r.power_gain_db,
            r.input_impedance,
            r.output_impedance,
        ]
    }

    /// The table as CSV: a header of column names, then one line per
    /// frequency, numbers in SI base units (dB and degrees where named),
    /// written exactly (shortest round-trip form).
    pub fn to_csv(&self) -> String {
        let mut o = String::new();
        let names: Vec<&str> = Self::COLUMNS.iter().map(|(n, _)| *n).collect();
        line(&mut o, &names.join(","));
        for r in &self.rows {
            for (i, v) in Self::values(r).iter().enumerate() {
                if i > 0 {
                    o.push(',');
                }
                let a = libm::fabs(*v);
                if *v == 0.0 || (1e-3..1e7).contains(&a) {
                    let _ = write!(o, "{v}");
                } else {
                    let _ = write!(o, "{v:e}");
                }
            }
            o.push('\n');
        }
        o
    }

    /// The table as pretty-printed JSON: `format`, `columns` (name and
    /// unit) and `rows` (one object per frequency), ending with a newline.
    pub fn to_json_string(&self) -> String {
        #[derive(Serialize)]
        struct Column {
            name: &'static str,
            unit: &'static str,
        }
        #[derive(Serialize)]
        struct Doc<'a> {
            format: &'static str,
            columns: Vec<Column>,
            rows: &'a [SweepRow],
        }
        let doc = Doc {
            format: SWEEP_FORMAT,
            columns: Self::COLUMNS
                .iter()
                .map(|&(name, unit)| Column { name, unit })
                .collect(),
            rows: &self.rows,
        };
        let mut out = serde_json::to_string_pretty(&doc).unwrap_or_default();
        out.push('\n');
        out
    }

    /// The table as aligned text in engineering notation.
    pub fn to_text(&self) -> String {
        const HEAD: [&str; 8] = [
            "frequency",
            "Av",
            "phase",
            "Av,source",
            "Ai",
            "Ap",
            "|Zin|",
            "|Zout|",
        ];
        const WIDTH: usize = 11;
        let mut o = String::new();
        for (i, h) in HEAD.iter().enumerate() {
            let _ = write!(o, "{}{h:>WIDTH$}", if i > 0 { " " } else { "" });
        }
        o.push('\n');
        for r in &self.rows {
            let cells = [
                format_si(r.frequency, "Hz"),
                format_si(r.voltage_gain_db, "dB"),
                format_si(r.phase_deg, "°"),
                format_si(r.voltage_gain_from_source_db, "dB"),
                format_si(r.current_gain_db, "dB"),
                format_si(r.power_gain_db, "dB"),
                format_si(r.input_impedance, "Ω"),
                format_si(r.output_impedance, "Ω"),
            ];
            for (i, c) in cells.iter().enumerate() {
                let _ = write!(o, "{}{c:>WIDTH$}", if i > 0 { " " } else { "" });
            }
            o.push('\n');
        }
        o
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::Value;

    const DESIGN: &str = r#"{
        "format": "stagewright/1",
        "title": "report test",
        "stage": "common-emitter",
        "supply": 12,
        "transistor": { "preset": "general-purpose-npn" },
        "parts": { "r1": "47k", "r2": "10k", "rc": "4k7", "re": 220, "re_bypassed": 820,
                   "rs": 600, "rl": "10k", "c_in": "1u", "c_out": "1u", "c_emitter": "47u" },
        "requirements": { "min_voltage_gain_db": 20, "max_f_low": 1 }
    }"#;

    fn report() -> (Design, Analysis, Report) {
        let d = Design::from_json(DESIGN).expect("the test design is valid");
        let a = d.analyze().expect("the test design solves");
        let r = Report::new(&d, &a);
        (d, a, r)
    }

    #[test]
    fn json_report_carries_the_core_numbers() {
        let (_, a, r) = report();
        let v: Value = serde_json::from_str(&r.to_json_string()).expect("the report is JSON");
        assert_eq!(v["format"], REPORT_FORMAT, "the format is named");
        assert_eq!(
            v["operating_point"]["ic"].as_f64(),
            Some(a.operating_point.ic),
            "numbers are written exactly, in SI base units"
        );
        assert_eq!(
            v["midband"]["voltage_gain"].as_f64(),
            Some(a.midband.voltage_gain),
            "the signed gain is the core's"
        );
        assert_eq!(
            v["dissipation"]["resistors"]
                .as_object()
                .map(|m| m.keys().cloned().collect::<Vec<_>>()),
            Some(
                ["r1", "r2", "rc", "re", "re_bypassed"]
                    .map(String::from)
                    .to_vec()
            ),
            "resistors are keyed by name in the order of the parts"
        );
    }

    #[test]
    fn checks_are_ratings_then_requirements() {
        let (_, a, r) = report();
        let n = a.ratings.len();
        assert_eq!(r.checks().len(), n + 2, "two requirements are set");
        assert_eq!(
            r.checks()[n].id,
            "min_voltage_gain_db",
            "requirements follow the ratings"
        );
        let v: Value = serde_json::from_str(&r.to_json_string()).unwrap();
        assert_eq!(
            v["checks"][0]["kind"], "rating",
            "the first check is a rating"
        );
        assert_eq!(
            v["checks"][n]["kind"], "requirement",
            "then the requirements"
        );
        // A 1 Hz lower corner with 1 µF coupling into about 10 kΩ cannot be met.
        assert!(!r.passed(), "max_f_low of 1 Hz fails, so the report fails");
        assert_eq!(
            r.failing_checks()
                .map(|c| c.id.as_str())
                .collect::<Vec<_>>(),
            ["max_f_low"],
            "only the lower-corner requirement fails"
        );
    }

    #[test]
    fn readable_report_marks_failures_and_ends_with_the_deferral() {
        let (_, _, r) = report();
        let text = r.to_text();
        assert!(
            text.contains("FAIL  max_f_low"),
            "a failing check is marked: {text}"
        );
        assert!(
            text.contains("pass  vceo"),
            "a passing check is marked: {text}"
        );
        assert!(
            text.trim_end().ends_with(DEFERRAL),
            "the deferral closes the report"
        );
        assert_eq!(
            text.matches(DEFERRAL).count(),
            1,
            "the deferral is said once, not after every caution"
        );
    }

    #[test]
    fn sweep_table_has_one_row_per_point_in_every_format() {
        let (_, a, _) = report();
        let t = SweepTable::new(&a, 10.0, 1e9, 9).expect("a valid sweep range");
        assert_eq!(t.rows.len(), 9, "one row per point");
        assert_eq!(
            t.rows[8].frequency, 1e9,
            "the last point is the end of the range"
        );
        let csv = t.to_csv();
        assert_eq!(csv.lines().count(), 10, "a header and nine rows");
        assert!(
            csv.starts_with("frequency,voltage_gain_db,"),
            "the header names columns"
        );
        let v: Value = serde_json::from_str(&t.to_json_string()).unwrap();
        assert_eq!(v["format"], SWEEP_FORMAT, "the sweep format is named");
        assert_eq!(
            v["rows"].as_array().map(Vec::len),
            Some(9),
            "nine rows in JSON"
        );
        assert_eq!(
            t.to_text().lines().count(),
            10,
            "a header and nine rows of text"
        );
        assert!(
            SweepTable::new(&a, 10.0, 1.0, 9).is_err(),
            "a falling range is refused"
        );
    }
}
