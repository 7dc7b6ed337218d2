//! Physical constants and temperature.
//!
//! Values are the exact defining constants of the SI Brochure, 9th edition
//! (BIPM, 2019), section 2.2.

/// Elementary charge e, in coulombs (exact, SI Brochure 9th ed.).
pub const ELEMENTARY_CHARGE: f64 = 1.602_176_634e-19;

/// Boltzmann constant k, in joules per kelvin (exact, SI Brochure 9th ed.).
pub const BOLTZMANN: f64 = 1.380_649e-23;

/// 0 °C in kelvin (exact by the definition of the Celsius scale).
pub const ZERO_CELSIUS: f64 = 273.15;

/// The temperature at which datasheet values are stated, 25 °C, in kelvin.
pub const DATASHEET_TEMPERATURE: f64 = ZERO_CELSIUS + 25.0;

/// An absolute (thermodynamic) temperature.
///
/// Kept apart from plain `f64` so that a temperature *difference* (kelvin)
/// is never mistaken for a temperature on the Celsius scale.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Temperature {
    kelvin: f64,
}

impl Temperature {
    /// A temperature given in kelvin.
    pub const fn from_kelvin(kelvin: f64) -> Self {
        Temperature { kelvin }
    }

    /// A temperature given in degrees Celsius.
    pub fn from_celsius(celsius: f64) -> Self {
        Temperature {
            kelvin: celsius + ZERO_CELSIUS,
        }
    }

    /// The temperature in kelvin.
    pub const fn kelvin(self) -> f64 {
        self.kelvin
    }

    /// The temperature in degrees Celsius.
    pub fn celsius(self) -> f64 {
        self.kelvin - ZERO_CELSIUS
    }

    /// This temperature raised by a difference of `kelvin` K.
    pub fn plus(self, kelvin: f64) -> Self {
        Temperature {
            kelvin: self.kelvin + kelvin,
        }
    }
}

/// Thermal voltage VT = k·T / e, in volts, at the absolute temperature `t`.
///
/// 25.693 mV at 25 °C, 25.852 mV at 300 K.
pub fn thermal_voltage(t: Temperature) -> f64 {
    // formula: VT = kT/q
    BOLTZMANN * t.kelvin() / ELEMENTARY_CHARGE
}
