//! Requirements a design must meet, checked against an analysis.
//!
//! Each requirement is optional. Voltage gain means the terminal gain
//! V(load)/V(input terminal), in dB of its magnitude; swing is the symmetric
//! peak at the load; the corners are those of the gain from the source.

use alloc::vec::Vec;

use crate::analysis::Analysis;
use crate::decibel::db20;
use crate::format::format_si;
use crate::ratings::Check;
use crate::response::{Bandwidth, Edge, Side, SEARCH_FROM, SEARCH_TO};

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
}

impl Requirements {
    /// True when no requirement is set.
    pub fn is_empty(&self) -> bool {
        *self == Requirements::default()
    }

    /// Checks each requirement that is set, in the order of the fields.
    pub fn check(&self, a: &Analysis) -> Vec<Check> {
        let mut out = Vec::new();
        let gain_db = db20(libm::fabs(a.midband.voltage_gain));
        if let Some(l) = self.min_voltage_gain_db {
            out.push(Check::at_least(
                "min_voltage_gain_db",
                "voltage gain",
                gain_db,
                l,
                "dB",
            ));
        }
        if let Some(l) = self.max_voltage_gain_db {
            out.push(Check::at_most(
                "max_voltage_gain_db",
                "voltage gain",
                gain_db,
                l,
                "dB",
            ));
        }
        if let Some(l) = self.min_input_impedance {
            out.push(Check::at_least(
                "min_input_impedance",
                "input impedance",
                a.midband.input_impedance,
                l,
                "Ω",
            ));
        }
        if let Some(l) = self.max_output_impedance {
            out.push(Check::at_most(
                "max_output_impedance",
                "output impedance",
                a.midband.output_impedance,
                l,
                "Ω",
            ));
        }
        if let Some(l) = self.min_swing {
            out.push(Check::at_least(
                "min_swing",
                "symmetric output swing (peak)",
                a.swing.symmetric,
                l,
                "V",
            ));
        }
        let b = &a.bandwidth;
        if let Some(l) = self.max_f_low {
            out.push(corner_check(
                Side::Lower,
                "lower corner",
                b.low_edge,
                b.f_low,
                l,
                b,
            ));
        }
        if let Some(l) = self.min_f_high {
            out.push(corner_check(
                Side::Upper,
                "upper corner",
                b.high_edge,
                b.f_high,
                l,
                b,
            ));
        }
        if let Some(l) = self.max_supply_current {
            out.push(Check::at_most(
                "max_supply_current",
                "supply current",
                a.dissipation.supply_current,
                l,
                "A",
            ));
        }
        if let Some(l) = self.max_junction_temperature {
            out.push(Check::at_most(
                "max_junction_temperature",
                "junction temperature",
                a.dissipation.junction_temperature.celsius(),
                l,
                "°C",
            ));
        }
        out
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
