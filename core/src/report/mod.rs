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
//! | `cautions[].safety` | | `true` for a caution about harm (shock, heat, a rating exceeded); a reader shows the deferral to local codes and licensed practice once when one is |
//! | `large_signal` | | written by `analyze` (not by `design` or `check`; left out with `--small-signal-only`): the steady state under a 1 kHz sine, from the circuit engine; an `error` object instead when the stage cannot be solved in the time domain |
//! | `large_signal.frequency` | Hz | the sine's frequency: `thd_frequency`, else 1 kHz |
//! | `large_signal.max_thd` | | the THD limit of the swing, a share: `max_thd`, else 0.01 |
//! | `large_signal.load_line` | V | the load-line limits `positive` and `negative` (magnitudes), as `swing` |
//! | `large_signal.limited_swing` | V | the largest output peak at the load (the fundamental) with THD at or under the limit; `null` when THD stays under it up to 150 % of the load-line limit, or as far as the stage can be driven |
//! | `large_signal.limited_swing_emf` | V | the EMF peak that gives it |
//! | `large_signal.limited_by` | | a sentence saying what limits it: a half clipping by saturation or cutoff, the curvature of the exponential law, or (with `limited_swing` `null`) how far the curve went |
//! | `large_signal.at_required_swing` | | with a `thd_swing` (else `min_swing`) requirement: THD at that output peak, `swing`, `thd`, `emf_peak` and `clipping` (or an `error` when the stage cannot deliver it); else `null` |
//! | `large_signal.drive_limited` | | `true` when the curve ended at an EMF of ten times the supply, short of 150 % of the load-line limit |
//! | `large_signal.clipping` | | there: each clipped `half`, its `mechanism` and the `share` of the period |
//! | `large_signal.terminal_shift` | V | there: the mean shift of the output terminal (collector, or a follower's emitter) from its quiescent voltage |
//! | `large_signal.ic_shift` | A | there: the mean shift of the collector current from ICQ |
//! | `large_signal.harmonics` | V | there: harmonics 1 to 10 of the load voltage, `order`, `amplitude` (peak) and `phase_deg` (of a sine) |
//! | `large_signal.thd_curve` | | THD against output peak: 16 points from 1 % to 150 % of the load-line limit (fewer when `drive_limited`), each `emf_peak`, `output_peak`, `thd`, `terminal_shift`, `ic_shift` |
//!
//! # Sweep
//! A [`SweepTable`] holds the response at log-spaced frequencies; its
//! columns are listed in [`SweepTable::COLUMNS`]. It is written as CSV
//! ([`SweepTable::to_csv`]), as JSON ([`SweepTable::to_json_string`]:
//! `format` `"stagewright-sweep/1"`, `columns` `[{name, unit}]`, `rows`
//! `[{column: value}]`) or as an aligned text table ([`SweepTable::to_text`]).

use alloc::string::String;
use alloc::vec::Vec;

use serde::ser::SerializeMap;
use serde::{Serialize, Serializer};

mod design_result;
mod sweep;
mod text;
mod tolerance;

pub use design_result::{DesignResult, PartEntry};
pub use sweep::{SweepRow, SweepTable, SWEEP_FORMAT};
pub use tolerance::{Entries, TOLERANCE_FORMAT};

use crate::analysis::Analysis;
use crate::decibel::db20;
use crate::design::Design;
use crate::document::file_celsius;
use crate::ratings::Check;

/// The format name and version of the report: `stagewright-report/1`.
pub const REPORT_FORMAT: &str = "stagewright-report/1";

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
    safety: bool,
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
                    safety: c.safety,
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
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ratings::DEFERRAL;
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
