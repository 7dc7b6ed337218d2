//! # Stagewright: stage equations for one-transistor amplifier stages
//!
//! This crate turns a discrete bipolar stage (common emitter, common
//! collector, common base; NPN or PNP; voltage-divider bias) into numbers an
//! engineer can sign off: the DC operating point, the small-signal model,
//! midband gains and impedances, the frequency response and its corners,
//! the output swing limits, the dissipation against every rating, and
//! cautions. It is `no_std` (with `alloc`) so the same code runs natively,
//! in CI and in the browser.
//!
//! ## The model and its limits
//! - **Device**: Ebers–Moll transport equations with the Early effect, both
//!   junctions free (so saturation and cutoff are solved, not assumed); IS
//!   and βF follow temperature by the Gummel–Poon laws (EG = 1.11 eV,
//!   XTI = 3, XTB). IS comes from the datasheet VBE at a stated current.
//!   Not modelled: high-injection β fall-off (the knee current), base-width
//!   modulation beyond first order, leakage, breakdown, self-heating feedback
//!   into the bias, and the fall of fT at low current. See [`TransistorData`].
//! - **DC**: a damped Newton solve of the two loop equations ([`OperatingPoint`]).
//! - **Small signal**: hybrid-π from the exact derivatives of the model at the
//!   bias point; Cπ from fT, Cμ from Cob ([`SmallSignal`]).
//! - **AC**: complex nodal analysis of the whole network ([`AcNetwork`]);
//!   the closed-form textbook results are kept beside it as a check ([`Midband`]).
//! - **Large signal**: piecewise-linear DC and AC load lines ([`Swing`]).
//! - **Ratings**: quiescent dissipation, linear Ptot derating ([`Dissipation`]).
//!
//! ## Units
//! SI base units everywhere inside: volts, amperes, ohms, farads, hertz,
//! watts, kelvin per watt. Temperatures are [`Temperature`] values (absolute);
//! a temperature *difference* is a plain `f64` in kelvin. Prefixes appear only
//! at the edges: [`parse_value`] reads `4k7`, [`format_si`] writes `4.7 kΩ`.
//!
//! ## Definitions used throughout
//! - **Input terminal**: the source side of the input coupling capacitor, after Rs.
//! - **Voltage gain**: V(load) / V(input terminal).
//! - **Voltage gain from source**: V(load) / EMF.
//! - **Current gain**: I(load) / I(into the input terminal).
//! - **Power gain**: the product of voltage and current gain, in dB (10·log10).
//! - **Input impedance**: seen at the input terminal with the load connected.
//! - **Output impedance**: seen by the load, with the EMF zeroed and Rs kept.
//! - **Midband**: coupling and bypass capacitors shorted, device capacitances open.
//! - **Lower and upper corner**: where |V(load)/EMF| is 3 dB below midband.
//! - **Swing**: peak volts at the load before clipping, as magnitudes.
//! - **Polarity**: a PNP stage is the mirror image of the NPN stage on a
//!   positive supply: its emitter resistance and collector resistor swap rails.
//!   Its VCE and VBE are reported negative; currents are reported positive in
//!   the direction of normal operation.
//!
//! ## Use
//! ```
//! use stagewright::{analyze, preset, Parts, Stage, StageKind, Temperature};
//! let stage = Stage {
//!     kind: StageKind::CommonEmitter,
//!     supply: 12.0,
//!     ambient: Temperature::from_celsius(25.0),
//!     parts: Parts {
//!         r1: Some(47e3), r2: Some(10e3), rc: 4.7e3, re: 220.0, re_bypassed: 820.0,
//!         rs: 600.0, rl: 10e3, c_in: Some(1e-6), c_out: Some(1e-6), c_emitter: Some(47e-6),
//!         ..Parts::default()
//!     },
//!     transistor: preset("general-purpose-npn").unwrap(),
//! };
//! let a = analyze(&stage).unwrap();
//! assert!(a.midband.voltage_gain < -10.0);
//! ```

#![no_std]
#![forbid(unsafe_code)]
#![deny(missing_docs)]

extern crate alloc;
#[cfg(any(test, feature = "std"))]
extern crate std;

mod analysis;
mod circuit;
mod complex;
mod constants;
mod corner;
mod decibel;
#[cfg(feature = "serde")]
mod design;
#[cfg(feature = "serde")]
mod design_file;
#[cfg(feature = "serde")]
mod document;
mod error;
mod eseries;
#[cfg(feature = "serde")]
mod fields;
mod figures;
mod format;
mod hybrid_pi;
mod large_signal;
mod load_line;
mod midband;
mod nodal;
mod operating_point;
mod parallel;
mod presets;
mod random;
mod ratings;
#[cfg(feature = "serde")]
mod report;
mod requirements;
mod response;
#[cfg(feature = "serde")]
mod spec_file;
mod stage;
mod swing;
mod synthesis;
mod tolerance;
mod transistor;
mod value;

pub use analysis::{analyze, analyze_with, Analysis, Options};
pub use circuit::{
    ac_netlist, collector_junction, dc_netlist, periodic_steady_state, periodic_steady_state_from,
    solve_ac, solve_dc, stage_netlist, transient, AcNodes, AcSolution, Charges, DcSolution,
    Depletion, Element, Netlist, Node, Periodic, SignalNodes, StageNodes, TransientOptions,
    TransientRun, FORWARD_COEFFICIENT, GROUND, MAX_UNKNOWNS,
};
pub use constants::{
    thermal_voltage, Temperature, BOLTZMANN, DATASHEET_TEMPERATURE, ELEMENTARY_CHARGE, ZERO_CELSIUS,
};
pub use decibel::{db10, db20};
#[cfg(feature = "serde")]
pub use design::Design;
#[cfg(feature = "serde")]
pub use design_file::{DesignDocument, PartsDocument, TolerancesDocument};
#[cfg(feature = "serde")]
pub use document::{
    utf8_text, RequirementsDocument, TransistorDocument, Typed, DEFAULT_AMBIENT_CELSIUS,
    DESIGN_FORMAT, DESIGN_FORMATS, DESIGN_RESULT_FORMAT, MAX_DEPTH, MAX_NOTES, MAX_TITLE,
    SPEC_FORMAT, SPEC_FORMATS,
};
pub use error::{Error, ErrorKind, Result, MAX_ECHO};
pub use eseries::{ESeries, SeriesLookup};
#[cfg(feature = "serde")]
pub use fields::{field, Family, Field, FieldKind, Group, SpecField, FIELDS, SPEC_FIELDS};
pub use figures::{Figure, Quantity, FIGURES};
pub use format::{format_exact, format_si, format_value};
pub use hybrid_pi::{SmallSignal, OPEN_RESISTANCE};
pub use large_signal::{
    harmonics, thd, Clip, Half, Harmonic, LargeSignal, LimitedSwing, Mechanism, ThdPoint, Waveform,
    CURVE_POINTS, CURVE_SPAN, DEFAULT_FREQUENCY, DEFAULT_MAX_THD, HARMONICS, SAMPLES,
};
pub use load_line::{load_lines, Characteristic, LoadLines};
pub use midband::Midband;
pub use nodal::{AcNetwork, Band, FrequencyPoint};
pub use operating_point::{OperatingPoint, Region};
pub use presets::{preset, Preset, PRESETS};
pub use ratings::{
    BiasStability, Caution, Check, Dissipation, Rating, BIAS_STABILITY_LIMIT, DEFERRAL,
    ES1_DC_LIMIT, HOT_SURFACE_CELSIUS, RATINGS, RATING_MARGIN, RESISTOR_DERATING,
};
#[cfg(feature = "serde")]
pub use report::{
    DesignResult, Entries, PartEntry, Report, SweepRow, SweepTable, REPORT_FORMAT, SWEEP_FORMAT,
    TOLERANCE_FORMAT,
};
pub use requirements::{
    thd_check, Bound, Condition, Requirement, Requirements, ThdCondition, CONDITIONS, REQUIREMENTS,
};
pub use response::{log_frequencies, Bandwidth, Edge, Response, SEARCH_FROM, SEARCH_TO};
#[cfg(feature = "serde")]
pub use spec_file::{
    BiasDocument, BiasPointDocument, PinnedPartsDocument, SeriesDocument, SpecDocument, SpecFile,
};
pub use stage::unusual;
pub use stage::{
    Parts, Stage, StageKind, DEFAULT_RESISTOR_RATING, MAX_CAPACITANCE, MAX_RESISTANCE, MAX_SUPPLY,
    MIN_CAPACITANCE, MIN_RESISTANCE, MIN_SUPPLY, USUAL_RANGES,
};
pub use swing::Swing;
pub use synthesis::{
    synthesize, Bias, Difference, PartChoice, PinnedParts, Series, Spec, Synthesis, Target,
    DEFAULT_EMITTER_FRACTION, DEFAULT_F_LOW, DEFAULT_SATURATION_RESERVE, DEFAULT_STIFFNESS,
};
pub use tolerance::{
    sensitivity, tolerance_analysis, worst_case, worst_case_with, worst_checks, Corner,
    Distribution, Extreme, Histogram, Level, MonteCarlo, MonteCarloSummary, Parameter,
    RequirementYield, Sensitivity, Setting, ThdSearch, ToleranceDocument, Tolerances, WorstCase,
    WorstCheck, DEFAULT_TRIALS, MAX_TRIALS,
};
pub use transistor::{
    Currents, Device, Polarity, TransistorData, CJC_BUILT_IN, CJC_GRADING, DEFAULT_BETA_REVERSE,
    DEFAULT_XTB, SILICON_EG, SILICON_XTI, TEST_VCE,
};
pub use value::{parse_value, parse_value_field};
