//! Requirements a design must meet, checked against an analysis.
//!
//! Each requirement is optional. Voltage gain means the terminal gain
//! V(load)/V(input terminal), in dB of its magnitude; swing is the symmetric
//! peak at the load; the corners are those of the gain from the source.

use alloc::vec::Vec;

use crate::analysis::Analysis;
use crate::nodal::db20;
use crate::ratings::Check;
use crate::response::SEARCH_TO;

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
        if let Some(l) = self.max_f_low {
            // No lower corner (ideal coupling) counts as 0 Hz.
            let v = a.bandwidth.f_low.unwrap_or(0.0);
            out.push(Check::at_most("max_f_low", "lower corner", v, l, "Hz"));
        }
        if let Some(l) = self.min_f_high {
            // No upper corner inside the search range counts as its top.
            let v = a.bandwidth.f_high.unwrap_or(SEARCH_TO);
            out.push(Check::at_least("min_f_high", "upper corner", v, l, "Hz"));
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
