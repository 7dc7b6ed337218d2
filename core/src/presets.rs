//! Generic device presets, named by class of device.
//!
//! Each preset is a plausible round-number device of its class, not a copy of
//! any one part. Every figure is marked with its origin: "(class typical, from
//! memory)" means the value is the order of magnitude found across datasheets
//! of that class as remembered, rounded; users should enter their own
//! device's datasheet values for a real design.

use crate::constants::Temperature;
use crate::error::Result;
use crate::transistor::{
    unknown_preset, Polarity, TransistorData, DEFAULT_BETA_REVERSE, DEFAULT_XTB,
};

/// A named preset.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Preset {
    /// Name used in design files, e.g. `general-purpose-npn`.
    pub name: &'static str,
    /// A short description for menus.
    pub label: &'static str,
}

/// Every preset, in menu order.
pub const PRESETS: [Preset; 5] = [
    Preset {
        name: "general-purpose-npn",
        label: "general-purpose small-signal NPN",
    },
    Preset {
        name: "general-purpose-pnp",
        label: "general-purpose small-signal PNP",
    },
    Preset {
        name: "low-noise-npn",
        label: "high-gain low-noise small-signal NPN",
    },
    Preset {
        name: "medium-power-npn",
        label: "medium-power NPN (free air, no heat sink)",
    },
    Preset {
        name: "rf-npn",
        label: "small-signal RF NPN",
    },
];

const ALLOWED: &str =
    "general-purpose-npn, general-purpose-pnp, low-noise-npn, medium-power-npn or rf-npn";

/// The datasheet values of a preset, by name.
pub fn preset(name: &str) -> Result<TransistorData> {
    let celsius = Temperature::from_celsius;
    let d = match name.trim() {
        // A small-signal device in a leaded plastic package, middle gain group.
        "general-purpose-npn" => general_purpose_npn(),
        // The complement of the device above.
        "general-purpose-pnp" => TransistorData {
            polarity: Polarity::Pnp,
            hfe: 200.0,                // (class typical, from memory)
            hfe_min: 110.0,            // (class typical, from memory)
            hfe_max: 400.0,            // (class typical, from memory)
            vbe: 0.65,                 // magnitude, at 2 mA (class typical, from memory)
            vbe_at_ic: 2e-3,           //
            early_voltage: Some(60.0), // PNP devices have lower VA (class typical, from memory)
            ft: 200e6,                 // (class typical, from memory)
            cob: 5e-12,                // at |VCB| = 10 V (class typical, from memory)
            cob_vcb: Some(10.0),       //
            rbb: 100.0,                // (class typical, from memory)
            vce_sat: 0.25,             // (class typical, from memory)
            vceo_max: 40.0,            // (class typical, from memory)
            ic_max: 0.2,               // (class typical, from memory)
            ptot_max: 0.625,           // (class typical, from memory)
            rth_ja: 200.0,             // (class typical, from memory)
            tj_max: celsius(150.0),    // (class typical, from memory)
            xtb: DEFAULT_XTB,
            beta_reverse: DEFAULT_BETA_REVERSE,
        },
        // A high-gain group selected for low noise: higher hFE, lower VCEO.
        "low-noise-npn" => TransistorData {
            polarity: Polarity::Npn,
            hfe: 450.0,                // (class typical, from memory)
            hfe_min: 250.0,            // (class typical, from memory)
            hfe_max: 800.0,            // (class typical, from memory)
            vbe: 0.62,                 // at 2 mA (class typical, from memory)
            vbe_at_ic: 2e-3,           //
            early_voltage: Some(80.0), // (class typical, from memory)
            ft: 200e6,                 // (class typical, from memory)
            cob: 3e-12,                // at VCB = 10 V (class typical, from memory)
            cob_vcb: Some(10.0),       //
            rbb: 50.0,                 // low-noise parts have low rbb' (class typical, from memory)
            vce_sat: 0.2,              // (class typical, from memory)
            vceo_max: 30.0,            // (class typical, from memory)
            ic_max: 0.1,               // (class typical, from memory)
            ptot_max: 0.5,             // (class typical, from memory)
            rth_ja: 250.0,             // (class typical, from memory)
            tj_max: celsius(150.0),    // (class typical, from memory)
            xtb: DEFAULT_XTB,
            beta_reverse: DEFAULT_BETA_REVERSE,
        },
        // A driver-class device in a small power package without a heat sink.
        "medium-power-npn" => TransistorData {
            polarity: Polarity::Npn,
            hfe: 100.0,                 // (class typical, from memory)
            hfe_min: 40.0,              // (class typical, from memory)
            hfe_max: 250.0,             // (class typical, from memory)
            vbe: 0.75,                  // at 150 mA (class typical, from memory)
            vbe_at_ic: 0.15,            //
            early_voltage: Some(100.0), // (class typical, from memory)
            ft: 50e6,                   // (class typical, from memory)
            cob: 15e-12,                // at VCB = 10 V (class typical, from memory)
            cob_vcb: Some(10.0),        //
            rbb: 20.0,                  // (class typical, from memory)
            vce_sat: 0.3,               // at 500 mA (class typical, from memory)
            vceo_max: 60.0,             // (class typical, from memory)
            ic_max: 1.5,                // (class typical, from memory)
            ptot_max: 1.25,             // free air, 25 °C (class typical, from memory)
            rth_ja: 100.0,              // (class typical, from memory)
            tj_max: celsius(150.0),     // (class typical, from memory)
            xtb: DEFAULT_XTB,
            beta_reverse: DEFAULT_BETA_REVERSE,
        },
        // A small-geometry device for VHF/UHF amplifiers.
        "rf-npn" => TransistorData {
            polarity: Polarity::Npn,
            hfe: 80.0,                 // (class typical, from memory)
            hfe_min: 40.0,             // (class typical, from memory)
            hfe_max: 150.0,            // (class typical, from memory)
            vbe: 0.8,                  // at 10 mA (class typical, from memory)
            vbe_at_ic: 10e-3,          //
            early_voltage: Some(40.0), // (class typical, from memory)
            ft: 5e9,                   // (class typical, from memory)
            cob: 0.5e-12,              // at VCB = 10 V (class typical, from memory)
            cob_vcb: Some(10.0),       //
            rbb: 20.0,                 // (class typical, from memory)
            vce_sat: 0.3,              // (class typical, from memory)
            vceo_max: 12.0,            // (class typical, from memory)
            ic_max: 0.05,              // (class typical, from memory)
            ptot_max: 0.3,             // (class typical, from memory)
            rth_ja: 400.0,             // (class typical, from memory)
            tj_max: celsius(150.0),    // (class typical, from memory)
            xtb: DEFAULT_XTB,
            beta_reverse: DEFAULT_BETA_REVERSE,
        },
        other => return Err(unknown_preset(other, ALLOWED)),
    };
    Ok(d)
}

/// The `general-purpose-npn` preset (a small-signal device in a leaded
/// plastic package, middle gain group); also the device of
/// [`crate::Stage::example`].
pub(crate) fn general_purpose_npn() -> TransistorData {
    let celsius = Temperature::from_celsius;
    TransistorData {
        polarity: Polarity::Npn,
        hfe: 200.0,                 // middle gain group (class typical, from memory)
        hfe_min: 110.0,             // gain-group lower limit (class typical, from memory)
        hfe_max: 400.0,             // gain-group upper limit (class typical, from memory)
        vbe: 0.65,                  // at 2 mA, 25 °C (class typical, from memory)
        vbe_at_ic: 2e-3,            //
        early_voltage: Some(100.0), // (class typical, from memory)
        ft: 250e6,                  // (class typical, from memory)
        cob: 4e-12,                 // at VCB = 10 V (class typical, from memory)
        cob_vcb: Some(10.0),        //
        rbb: 100.0,                 // (class typical, from memory)
        vce_sat: 0.2,               // at 10:1 forced gain (class typical, from memory)
        vceo_max: 40.0,             // (class typical, from memory)
        ic_max: 0.2,                // (class typical, from memory)
        ptot_max: 0.625,            // free air, 25 °C (class typical, from memory)
        rth_ja: 200.0,              // (class typical, from memory)
        tj_max: celsius(150.0),     // (class typical, from memory)
        xtb: DEFAULT_XTB,
        beta_reverse: DEFAULT_BETA_REVERSE,
    }
}
