//! Requirements a design must meet, checked against an analysis.
//!
//! Each requirement is optional. Voltage gain means the terminal gain
//! V(load)/V(input terminal), in dB of its magnitude; swing is the symmetric
//! peak at the load; the corners are those of the gain from the source;
//! THD is that of the periodic steady state at the load with the stage
//! driven to the output peak `thd_swing` (or `min_swing`) at
//! `thd_frequency` (1 kHz), a share held and shown in percent.
//!
//! [`REQUIREMENTS`] is the one table of them: the key, the result it reads
//! (a [`Quantity`], whose figure names it), the bound, the unit and what the
//! file may hold. The checks here, the tolerance analysis' worst case and
//! yields, the synthesis' shortfalls and the file reader all go through it.

use alloc::vec::Vec;

use crate::analysis::Analysis;
use crate::decibel::db20;
use crate::error::Result;
use crate::figures::Quantity;
use crate::format::format_si;
use crate::large_signal::{LargeSignal, DEFAULT_FREQUENCY};
use crate::ratings::Check;
use crate::response::{Bandwidth, Edge, Side, SEARCH_FROM, SEARCH_TO};
use crate::stage::Stage;

/// The requirements block of a design, SI units (temperatures in °C).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Requirements {
    /// Smallest |voltage gain| in dB.
    pub min_voltage_gain_db: Option<f64>,
    /// Largest |voltage gain| in dB.
    pub max_voltage_gain_db: Option<f64>,
    /// Smallest midband input impedance, Ω.
    pub min_input_impedance: Option<f64>,
    /// Largest midband output impedance, Ω.
    pub max_output_impedance: Option<f64>,
    /// Smallest symmetric peak swing at the load, V.
    pub min_swing: Option<f64>,
    /// Highest acceptable lower corner, Hz.
    pub max_f_low: Option<f64>,
    /// Lowest acceptable upper corner, Hz.
    pub min_f_high: Option<f64>,
    /// Largest supply current, A.
    pub max_supply_current: Option<f64>,
    /// Largest junction temperature, °C.
    pub max_junction_temperature: Option<f64>,
    /// Largest total harmonic distortion at the load, a share (0.01 is
    /// 1 %), with the stage driven to the output peak `thd_swing` at
    /// `thd_frequency` ([`Requirements::thd_condition`]).
    pub max_thd: Option<f64>,
    /// The output peak at the load at which `max_thd` holds, V; `min_swing`
    /// when not given. A condition of `max_thd`, not a bound.
    pub thd_swing: Option<f64>,
    /// The frequency at which `max_thd` holds, Hz; 1 kHz when not given. A
    /// condition of `max_thd`, not a bound.
    pub thd_frequency: Option<f64>,
}

/// The output peak and frequency at which `max_thd` is judged
/// ([`Requirements::thd_condition`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ThdCondition {
    /// The output peak at the load, V.
    pub swing: f64,
    /// The frequency, Hz.
    pub frequency: f64,
}

/// A key of the requirements block that sets where a requirement is
/// judged rather than bounding a result (`thd_swing`, `thd_frequency`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Condition {
    /// The key in the `requirements` block.
    pub key: &'static str,
    /// What it is, complete enough to stand alone.
    pub label: &'static str,
    /// The unit of its value.
    pub unit: &'static str,
    /// The requirement it belongs to.
    pub of: &'static str,
}

/// The conditions of the requirements block, in the file's order (after
/// the [`REQUIREMENTS`]). Each must be positive.
pub const CONDITIONS: [Condition; 2] = [
    Condition {
        key: "thd_swing",
        label: "output peak at which the THD is judged",
        unit: "V",
        of: "max_thd",
    },
    Condition {
        key: "thd_frequency",
        label: "frequency at which the THD is judged",
        unit: "Hz",
        of: "max_thd",
    },
];

/// Which way a requirement bounds its result.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Bound {
    /// The result must be at least the limit (`min_…`).
    AtLeast,
    /// The result must be at most the limit (`max_…`).
    AtMost,
}

/// What a requirement's value in a file may be.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Rule {
    /// Any finite number.
    Finite,
    /// A finite number above 0.
    Positive,
    /// A finite number of 0 or more.
    NonNegative,
    /// A share above 0 and below 1: a number is the fraction (`0.01`), text
    /// ending in `%` is in percent (`"1 %"`).
    Share,
}

/// One requirement: its key in the file and what it bounds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Requirement {
    /// The key in the `requirements` block: `min_voltage_gain_db`.
    pub key: &'static str,
    /// The result it reads (its figure names it: "voltage gain").
    pub quantity: Quantity,
    /// At least or at most.
    pub bound: Bound,
    /// The unit of the limit: the result's, dB for the voltage gain, `%`
    /// for the THD (held as a share, shown in percent).
    pub unit: &'static str,
    /// What the file may hold.
    pub(crate) rule: Rule,
}

impl Requirement {
    /// The name of what it bounds: "voltage gain".
    pub fn label(&self) -> &'static str {
        self.quantity.figure().label
    }

    /// The corner it bounds, for the two corner requirements.
    pub(crate) fn side(&self) -> Option<Side> {
        match self.quantity {
            Quantity::FLow => Some(Side::Lower),
            Quantity::FHigh => Some(Side::Upper),
            _ => None,
        }
    }

    /// A value of its result in the requirement's unit (the voltage gain,
    /// a ratio, in dB).
    pub(crate) fn reading(&self, value: f64) -> f64 {
        if self.unit == "dB" {
            db20(libm::fabs(value))
        } else {
            value
        }
    }

    /// Whether `value` (in the requirement's unit) meets `limit`: a value
    /// that is not finite never does.
    pub(crate) fn met(&self, value: f64, limit: f64) -> bool {
        value.is_finite()
            && match self.bound {
                Bound::AtLeast => value >= limit,
                Bound::AtMost => value <= limit,
            }
    }

    /// The check of `value` against `limit`, the result named `what`; a
    /// share (unit `%`) is compared and shown in percent.
    pub(crate) fn check(&self, what: &str, value: f64, limit: f64) -> Check {
        let (value, limit) = if self.unit == "%" {
            (100.0 * value, 100.0 * limit)
        } else {
            (value, limit)
        };
        match self.bound {
            Bound::AtLeast => Check::at_least(self.key, what, value, limit, self.unit),
            Bound::AtMost => Check::at_most(self.key, what, value, limit, self.unit),
        }
    }
}

const fn req(
    key: &'static str,
    quantity: Quantity,
    bound: Bound,
    unit: &'static str,
    rule: Rule,
) -> Requirement {
    Requirement {
        key,
        quantity,
        bound,
        unit,
        rule,
    }
}

/// Every requirement, in the order of the file format (and of the checks).
pub const REQUIREMENTS: [Requirement; 10] = [
    req(
        "min_voltage_gain_db",
        Quantity::VoltageGain,
        Bound::AtLeast,
        "dB",
        Rule::Finite,
    ),
    req(
        "max_voltage_gain_db",
        Quantity::VoltageGain,
        Bound::AtMost,
        "dB",
        Rule::Finite,
    ),
    req(
        "min_input_impedance",
        Quantity::InputImpedance,
        Bound::AtLeast,
        "Ω",
        Rule::Positive,
    ),
    req(
        "max_output_impedance",
        Quantity::OutputImpedance,
        Bound::AtMost,
        "Ω",
        Rule::Positive,
    ),
    req(
        "min_swing",
        Quantity::Swing,
        Bound::AtLeast,
        "V",
        Rule::NonNegative,
    ),
    req(
        "max_f_low",
        Quantity::FLow,
        Bound::AtMost,
        "Hz",
        Rule::Positive,
    ),
    req(
        "min_f_high",
        Quantity::FHigh,
        Bound::AtLeast,
        "Hz",
        Rule::Positive,
    ),
    req(
        "max_supply_current",
        Quantity::SupplyCurrent,
        Bound::AtMost,
        "A",
        Rule::Positive,
    ),
    req(
        "max_junction_temperature",
        Quantity::JunctionTemperature,
        Bound::AtMost,
        "°C",
        Rule::Finite,
    ),
    req("max_thd", Quantity::Thd, Bound::AtMost, "%", Rule::Share),
];

/// The value of the result `q` in an analysis (the voltage gain as a
/// magnitude, |VCE|; a corner that was not found is NaN; the THD, which
/// the small-signal analysis does not hold, NaN).
pub(crate) fn result_of(a: &Analysis, q: Quantity) -> f64 {
    match q {
        Quantity::Ic => a.operating_point.ic,
        Quantity::Vce => libm::fabs(a.operating_point.vce),
        Quantity::VoltageGain => libm::fabs(a.midband.voltage_gain),
        Quantity::InputImpedance => a.midband.input_impedance,
        Quantity::OutputImpedance => a.midband.output_impedance,
        Quantity::Swing => a.swing.symmetric,
        Quantity::FLow => a.bandwidth.f_low.unwrap_or(f64::NAN),
        Quantity::FHigh => a.bandwidth.f_high.unwrap_or(f64::NAN),
        Quantity::JunctionTemperature => a.dissipation.junction_temperature.celsius(),
        Quantity::SupplyCurrent => a.dissipation.supply_current,
        Quantity::Thd => f64::NAN,
    }
}

impl Requirements {
    /// True when no requirement is set.
    pub fn is_empty(&self) -> bool {
        *self == Requirements::default()
    }

    /// The limit of the requirement `key` (or the value of the condition
    /// `key`), if it is set.
    pub fn get(&self, key: &str) -> Option<f64> {
        *self.slot(key)?
    }

    /// Sets the limit of the requirement `key` (or the value of the
    /// condition `key`); false for an unknown key.
    pub fn set(&mut self, key: &str, limit: Option<f64>) -> bool {
        match self.slot_mut(key) {
            Some(s) => {
                *s = limit;
                true
            }
            None => false,
        }
    }

    fn slot(&self, key: &str) -> Option<&Option<f64>> {
        Some(match key {
            "min_voltage_gain_db" => &self.min_voltage_gain_db,
            "max_voltage_gain_db" => &self.max_voltage_gain_db,
            "min_input_impedance" => &self.min_input_impedance,
            "max_output_impedance" => &self.max_output_impedance,
            "min_swing" => &self.min_swing,
            "max_f_low" => &self.max_f_low,
            "min_f_high" => &self.min_f_high,
            "max_supply_current" => &self.max_supply_current,
            "max_junction_temperature" => &self.max_junction_temperature,
            "max_thd" => &self.max_thd,
            "thd_swing" => &self.thd_swing,
            "thd_frequency" => &self.thd_frequency,
            _ => return None,
        })
    }

    fn slot_mut(&mut self, key: &str) -> Option<&mut Option<f64>> {
        Some(match key {
            "min_voltage_gain_db" => &mut self.min_voltage_gain_db,
            "max_voltage_gain_db" => &mut self.max_voltage_gain_db,
            "min_input_impedance" => &mut self.min_input_impedance,
            "max_output_impedance" => &mut self.max_output_impedance,
            "min_swing" => &mut self.min_swing,
            "max_f_low" => &mut self.max_f_low,
            "min_f_high" => &mut self.min_f_high,
            "max_supply_current" => &mut self.max_supply_current,
            "max_junction_temperature" => &mut self.max_junction_temperature,
            "max_thd" => &mut self.max_thd,
            "thd_swing" => &mut self.thd_swing,
            "thd_frequency" => &mut self.thd_frequency,
            _ => return None,
        })
    }

    /// Each requirement that is set, with its limit, in the table's order.
    pub fn limits(&self) -> impl Iterator<Item = (&'static Requirement, f64)> + '_ {
        REQUIREMENTS
            .iter()
            .filter_map(|r| self.get(r.key).map(|l| (r, l)))
    }

    /// Where `max_thd` is judged, when it is set: at `thd_swing` (or
    /// `min_swing`) and `thd_frequency` (or [`DEFAULT_FREQUENCY`], 1 kHz).
    /// `None` without `max_thd`, or without an output peak to judge it at
    /// (the file reader refuses that case).
    pub fn thd_condition(&self) -> Option<ThdCondition> {
        self.max_thd?;
        Some(ThdCondition {
            swing: self.thd_swing.or(self.min_swing)?,
            frequency: self.thd_frequency.unwrap_or(DEFAULT_FREQUENCY),
        })
    }

    /// Checks each requirement that is set, in the order of the table, on
    /// `stage` and its analysis `a`. `max_thd` costs a periodic steady
    /// state search ([`thd_check`], a few milliseconds); the others read
    /// the analysis.
    pub fn check(&self, stage: &Stage, a: &Analysis) -> Vec<Check> {
        let mut out = self.check_small_signal(a);
        if let (Some(limit), Some(c)) = (self.max_thd, self.thd_condition()) {
            out.push(thd_check(stage, c, limit));
        }
        out
    }

    /// The checks of every requirement that is set but `max_thd`: those
    /// the small-signal analysis answers.
    pub(crate) fn check_small_signal(&self, a: &Analysis) -> Vec<Check> {
        let b = &a.bandwidth;
        self.limits()
            .filter(|(r, _)| r.quantity != Quantity::Thd)
            .map(|(r, limit)| match r.side() {
                Some(Side::Lower) => {
                    corner_check(Side::Lower, r.label(), b.low_edge, b.f_low, limit, b)
                }
                Some(Side::Upper) => {
                    corner_check(Side::Upper, r.label(), b.high_edge, b.f_high, limit, b)
                }
                None => r.check(r.label(), r.reading(result_of(a, r.quantity)), limit),
            })
            .collect()
    }
}

/// What the THD check names the result: "THD at 2 V peak, 1 kHz".
pub(crate) fn thd_label(c: ThdCondition) -> alloc::string::String {
    alloc::format!(
        "THD at {} peak, {}",
        format_si(c.swing, "V"),
        format_si(c.frequency, "Hz")
    )
}

/// The check of `max_thd` (`limit`, a share) on `stage` driven to the
/// output peak of `c`: the THD of the periodic steady state there
/// ([`LargeSignal::at_output`]), shown in percent. A stage that cannot
/// deliver the peak, or whose steady state is not found, fails with the
/// reason.
pub fn thd_check(stage: &Stage, c: ThdCondition, limit: f64) -> Check {
    let what = thd_label(c);
    let found = LargeSignal::new(stage).and_then(|l| l.at_output(c.swing, c.frequency));
    thd_check_of(&what, found.map(|w| w.thd), limit)
}

/// The check of `max_thd` from a THD found (or the error of its search).
pub(crate) fn thd_check_of(what: &str, thd: Result<f64>, limit: f64) -> Check {
    let req = REQUIREMENTS
        .iter()
        .find(|r| r.quantity == Quantity::Thd)
        .expect("the table has max_thd");
    match thd {
        Ok(v) => req.check(what, v, limit),
        // Not found: 0 as the value, like a corner not found; the message
        // and `pass` say what happened.
        Err(e) => Check {
            id: req.key.into(),
            pass: false,
            value: 0.0,
            limit: 100.0 * limit,
            unit: "%",
            message: alloc::format!(
                "{what}: not found ({e}); the required at most {} is not shown",
                format_si(100.0 * limit, "%")
            ),
        },
    }
}

/// Whether a corner requirement is met, from how the corner search ended:
///
/// - a corner found is compared with the limit;
/// - no lower corner ([`Edge::None`]: the gain holds to DC) meets any
///   `max_f_low`;
/// - a corner beyond the search range is known only to lie beyond it: the
///   requirement is met when that bound already meets it (a lower corner
///   below 1 mHz meets a `max_f_low` of 1 mHz or more), and fails when it
///   cannot be told;
/// - no passband, or no search, fails: the band the figures describe is not
///   there, or was not looked for.
pub(crate) fn corner_met(side: Side, edge: Edge, f: Option<f64>, limit: f64) -> bool {
    match (edge, f) {
        (Edge::Corner, Some(f)) => match side {
            Side::Lower => f <= limit,
            Side::Upper => f >= limit,
        },
        (Edge::None, _) => side == Side::Lower,
        (Edge::BeyondSearch, _) => match side {
            Side::Lower => SEARCH_FROM <= limit,
            Side::Upper => SEARCH_TO >= limit,
        },
        _ => false,
    }
}

/// The check of a corner requirement (`max_f_low` for [`Side::Lower`],
/// `min_f_high` for [`Side::Upper`]) with the rules of [`corner_met`]; the
/// message says what was found. `what` names the corner ("lower corner",
/// "worst-case lower corner"); `band` gives the peak when there is no
/// passband.
pub(crate) fn corner_check(
    side: Side,
    what: &str,
    edge: Edge,
    f: Option<f64>,
    limit: f64,
    band: &Bandwidth,
) -> Check {
    let (id, bound) = match side {
        Side::Lower => ("max_f_low", "at most"),
        Side::Upper => ("min_f_high", "at least"),
    };
    if let (Edge::Corner, Some(f)) = (edge, f) {
        return match side {
            Side::Lower => Check::at_most(id, what, f, limit, "Hz"),
            Side::Upper => Check::at_least(id, what, f, limit, "Hz"),
        };
    }
    let pass = corner_met(side, edge, f, limit);
    let hz = |x: f64| format_si(x, "Hz");
    let end = match side {
        Side::Lower => SEARCH_FROM,
        Side::Upper => SEARCH_TO,
    };
    let (value, message) = match edge {
        Edge::None => (
            0.0,
            alloc::format!("{what}: none, the gain holds to DC (required {bound} {})", hz(limit)),
        ),
        Edge::BeyondSearch => {
            let place = match side {
                Side::Lower => "below",
                Side::Upper => "above",
            };
            let verdict = if pass {
                "which meets"
            } else {
                "so it cannot be shown to meet"
            };
            (
                end,
                alloc::format!(
                    "{what}: {place} {}, where the search ends, {verdict} the required {bound} {}",
                    hz(end),
                    hz(limit)
                ),
            )
        }
        Edge::NotSearched => (
            0.0,
            alloc::format!("{what}: not searched, so the required {bound} {} is not shown", hz(limit)),
        ),
        Edge::Corner | Edge::NoPassband => (
            band.peak_frequency,
            alloc::format!(
                "{what}: none, the response never comes within 3 dB of the midband gain (its peak, {} below midband, is at {}); the stage has no passband, so the required {bound} {} is not met",
                format_si(-crate::decibel::db20(band.peak_ratio), "dB"),
                hz(band.peak_frequency),
                hz(limit)
            ),
        ),
    };
    Check {
        id: id.into(),
        pass,
        value,
        limit,
        unit: "Hz",
        message,
    }
}
