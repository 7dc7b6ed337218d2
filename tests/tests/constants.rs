//! Physical constants and the thermal voltage against the SI Brochure.
//!
//! Source: SI Brochure, 9th edition (BIPM, 2019), section 2.2: the
//! elementary charge and the Boltzmann constant are exact by definition.
//! The thermal voltages 25.693 mV at 25 °C and 25.852 mV at 300 K are
//! docs/references.md "(computed)" figures: the test recomputes kT/q from
//! the defining constants typed here, independently of the core's copies.

use stagewright::{
    thermal_voltage, Temperature, BOLTZMANN, DATASHEET_TEMPERATURE, ELEMENTARY_CHARGE, ZERO_CELSIUS,
};
use stagewright_crosschecks::{check, Allowed};

const SI: &str = "SI Brochure, 9th edition (2019), section 2.2";

/// The defining constants, typed here from the SI Brochure.
const E_SI: f64 = 1.602_176_634e-19; // C, exact
const K_SI: f64 = 1.380_649e-23; // J/K, exact

/// Allowed errors, per quantity, and why.
mod allowed {
    use super::Allowed;

    /// A defining constant of the SI, typed as the same decimal.
    pub const EXACT: Allowed = Allowed {
        rel: 0.0,
        why: "the SI fixes these values exactly; the same decimal literal converts to the same f64",
    };
    /// kT/q recomputed from the typed constants.
    pub const RECOMPUTED: Allowed = Allowed {
        rel: 1e-15,
        why: "one multiplication and one division of exact-decimal f64 values: at most two \
              roundings of 2^-53 each",
    };
    /// A value published to five significant digits (25.693 mV, 25.852 mV).
    pub const FIVE_DIGITS: Allowed = Allowed {
        rel: 2e-5,
        why: "the published figure is rounded to 0.001 mV: ±0.0005 mV of 25.7 mV is 1.9e-5",
    };
}

#[test]
fn si_defining_constants_are_exact() {
    let rows = [
        ("elementary charge e (C)", ELEMENTARY_CHARGE, E_SI),
        ("Boltzmann constant k (J/K)", BOLTZMANN, K_SI),
        // 0 °C = 273.15 K by the definition of the Celsius scale (SI Brochure 2.3.1).
        ("0 °C in kelvin", ZERO_CELSIUS, 273.15),
        // Datasheet values are stated at 25 °C (common practice).
        ("datasheet temperature (K)", DATASHEET_TEMPERATURE, 298.15),
    ];
    for (what, got, want) in rows {
        check(SI, what, got, want, allowed::EXACT);
    }
}

#[test]
fn celsius_and_kelvin_convert_by_273_15() {
    // SI Brochure 9th ed., 2.3.1: t/°C = T/K − 273.15. Exact decimals,
    // but 25 + 273.15 rounds once: 1e-15.
    let rows = [
        (
            "25 °C in kelvin",
            Temperature::from_celsius(25.0).kelvin(),
            298.15,
        ),
        (
            "300 K in °C",
            Temperature::from_kelvin(300.0).celsius(),
            26.85,
        ),
        (
            "-40 °C in kelvin",
            Temperature::from_celsius(-40.0).kelvin(),
            233.15,
        ),
        (
            "25 °C raised by 10 K, in °C",
            Temperature::from_celsius(25.0).plus(10.0).celsius(),
            35.0,
        ),
    ];
    for (what, got, want) in rows {
        check(SI, what, got, want, allowed::RECOMPUTED);
    }
}

#[test]
fn thermal_voltage_is_kt_over_q() {
    // Table: (temperature, published VT in volts). Each row checks the
    // core's VT against kT/q recomputed here and against the published
    // five-digit figure.
    let rows = [
        (Temperature::from_celsius(25.0), 25.693e-3),
        (Temperature::from_kelvin(300.0), 25.852e-3),
    ];
    for (t, published) in rows {
        let recomputed = K_SI * t.kelvin() / E_SI;
        check(
            SI,
            &format!("VT = kT/q at {} K, recomputed", t.kelvin()),
            thermal_voltage(t),
            recomputed,
            allowed::RECOMPUTED,
        );
        check(
            "docs/references.md (computed from the SI constants)",
            &format!("VT at {} K, published", t.kelvin()),
            thermal_voltage(t),
            published,
            allowed::FIVE_DIGITS,
        );
    }
}
