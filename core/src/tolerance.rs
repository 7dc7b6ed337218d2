//! Tolerance analysis: worst case, sensitivity and Monte Carlo.
//!
//! A built stage differs from its drawing: every resistor and capacitor is
//! somewhere inside its tolerance, the transistor's hFE anywhere in its gain
//! group, its VBE a few tens of millivolts off the datasheet figure, the
//! ambient anywhere in the equipment's range and the supply off its nominal
//! value. This module says what that does to the results.
//!
//! # Parameters and results
//! The parameters ([`Parameter`]) are the resistors `r1`, `r2`, `rc`, `re`,
//! `re_bypassed` and the capacitors `c_in`, `c_out`, `c_emitter`, `c_base`
//! that the stage has (not `rs` and `rl`: they belong to the source and the
//! load), the transistor's `hfe` and `vbe`, the `ambient` and the `supply`.
//! Their ranges come from [`Tolerances`]; hFE runs from the transistor's
//! `hfe_min` to `hfe_max`.
//!
//! The results ([`Quantity`]) are those of the ordinary analysis, taken the
//! same way: `ic`; `vce` (magnitude); `voltage_gain`, the magnitude of the
//! midband terminal gain in V/V; the midband `input_impedance` and
//! `output_impedance`; `swing`, the symmetric peak at the load; the corners
//! `f_low` and `f_high` of the gain from the source; the
//! `junction_temperature` in °C; and the `supply_current`. Every evaluation
//! is a full solve: the Ebers–Moll DC operating point, the hybrid-π model
//! there, the nodal midband network and the nodal response for the corners.
//!
//! # Worst case: vertices, not a random search
//! Each result is taken to move monotonically with each parameter over its
//! small range (true of every result here except the symmetric swing, see
//! below), so its extremes lie on vertices of the parameter box.
//!
//! - The capacitors move only the corners, and each one monotonically: a
//!   larger coupling or bypass capacitor moves its pole down, lowering
//!   `f_low` and, by the little it still takes from the band edge, raising
//!   `f_high`. So the corners need only two capacitor settings, all at their
//!   minimum and all at their maximum.
//! - Every vertex of the other parameters (at most 2⁹ = 512: five resistors,
//!   hFE, VBE, ambient, supply) is solved in full, each with both capacitor
//!   settings.
//!
//! Each extreme is reported with the corner that produces it ([`Corner`]).
//! The nominal point is included, so a result that peaks inside the box is
//! never reported narrower than its nominal value.
//!
//! The monotonic reading holds while the transistor stays in its active
//! region over the whole box. When some vertices saturate or cut off
//! (counted in [`WorstCase::inactive_vertices`]) the results bend at the
//! region boundary, and points inside the box can go beyond the vertex
//! extremes (the upper corner of a stage that saturates at some corners is
//! an example): the stage itself is then the problem the report shows.
//!
//! The symmetric swing is the smaller of the positive and the negative
//! limit. Each of those is monotonic, but their minimum peaks where they
//! cross, which for a centred design is inside the box. Its lowest value is
//! the lowest over the vertices (exact: the minimum of two monotonic
//! functions is smallest at a vertex). Its highest is the highest found at
//! the vertices and the nominal point: like every entry of the table it is
//! the value at the point the table names, which re-analysing that point
//! gives again. A point inside the box, near where the two limits cross,
//! can swing a little more; the swing requirement is a lower bound, so the
//! lowest value is the one a check uses.
//!
//! # Sensitivity
//! The percent change of each result per percent change of each parameter,
//! S = (∂R/R)/(∂p/p), by central differences at ±1 % of the nominal value
//! (temperatures in kelvin, VBE as the datasheet figure in volts, so 1 % of
//! 0.65 V is 6.5 mV; a junction temperature result is also taken in kelvin).
//! Entries smaller than 10⁻⁶ %/% are dropped; the table is sorted by
//! magnitude, largest first.
//!
//! # Monte Carlo
//! Each trial draws every parameter independently:
//!
//! | parameter | distribution |
//! |---|---|
//! | resistors, capacitors | uniform within ± their tolerance |
//! | hFE | log-uniform from `hfe_min` to `hfe_max` |
//! | VBE | uniform within ± `vbe_spread` of the datasheet value |
//! | ambient | uniform from `ambient_min` to `ambient_max` |
//! | supply | uniform within ± `supply_tolerance` |
//!
//! Uniform is the cautious reading of a tolerance band (common practice:
//! a part's distribution inside its band is not stated, and sorted parts can
//! be missing their middle). hFE is log-uniform because a gain group is a
//! ratio (110 to 400 is ×3.6) whose typical value sits near the geometric
//! middle: a linear draw would put three quarters of the devices above
//! typical.
//!
//! The generator is PCG-64 ([`crate::random`] explains why): trial `i` takes
//! draws `16·i … 16·i + 15` of the seed's stream, one fixed slot for each
//! possible parameter whether the stage has it or not, so a run cut into
//! chunks ([`MonteCarlo::run_chunk`]), in any order, gives exactly the same
//! trials, and the same seed gives the same numbers natively and in the
//! browser (integer generator, exact conversion, `libm` for every
//! transcendental function, no `hypot` from the platform).
//!
//! A trial's corners are not searched from scratch (that costs about a
//! hundred nodal solves of the ordinary analysis). With g(x) = ln|H| − level
//! and x = ln f:
//!
//! 1. the nominal corner is moved by a prediction from the derivatives that
//!    the sensitivity analysis measured anyway, with each parameter's own
//!    second-order term: x ≈ x₀ + Σ (aᵢ·rᵢ + ½·bᵢ·rᵢ²), rᵢ = ln(pᵢ/pᵢ₀);
//!    the slope g′ there is predicted the same way, the curvature g″ is the
//!    nominal one;
//! 2. one nodal solve gives g at the predicted point, and the root of
//!    g + g′·d + ½·g″·d² = 0 nearest it is taken: when |d| < 3·10⁻³ the
//!    corner is accepted (its error is the slope's prediction error times
//!    d, about 10⁻⁵ relative at most, checked in the tests);
//! 3. otherwise secant steps follow until a step is below 10⁻³ (the error of
//!    the last secant point is then below about 10⁻⁵ too); if they wander, a
//!    bracketing search and the Illinois method take over.
//!
//! So most trials cost one nodal solve per corner. The worst case and the
//! sensitivities converge every corner to 10⁻¹⁰ in ln f.
//!
//! Percentiles interpolate linearly between order statistics (the
//! definition that R and NumPy use by default, Hyndman & Fan type 7, from
//! memory). A trial whose operating point does not converge counts as
//! failing every requirement and is left out of the percentiles.

use alloc::vec;
use alloc::vec::Vec;

use crate::constants::Temperature;
use crate::corner::{corner_level, find_corner, shape_at, Start, PRECISE};
use crate::error::{within, Error, Result};
use crate::figures::Quantity;
use crate::hybrid_pi::SmallSignal;
use crate::operating_point::{OperatingPoint, Region};
use crate::random::Stream;
use crate::ratings::{Check, Dissipation};
use crate::requirements::{corner_check, corner_met, Bound, Requirements, REQUIREMENTS};
use crate::response::{Edge, Response, Side};
use crate::stage::{Stage, MAX_SUPPLY};
use crate::swing::Swing;
use crate::transistor::Device;

/// Number of [`Quantity`] values.
const QUANTITIES: usize = 10;
/// Number of [`Parameter`] values.
const PARAMETERS: usize = 13;
/// Draws of the generator reserved for each Monte Carlo trial.
const DRAWS_PER_TRIAL: u32 = 16;
/// Monte Carlo trials when none are given.
pub const DEFAULT_TRIALS: usize = 10_000;
/// Most Monte Carlo trials in one run: a million, about 84 MB of kept
/// results (percentiles need every value) and a few seconds natively. More
/// trials would not tell a designer more: the yield's standard error at a
/// million trials is below 0.05 percentage points.
pub const MAX_TRIALS: usize = 1_000_000;
/// Bins of each Monte Carlo histogram.
const HISTOGRAM_BINS: usize = 20;
/// Relative step of the sensitivity central differences (±1 %).
const SENSITIVITY_STEP: f64 = 0.01;
/// Smallest sensitivity kept in the table, %/%.
const SENSITIVITY_FLOOR: f64 = 1e-6;
/// Convergence of a corner in ln f for a Monte Carlo trial that needs more
/// than one solve: the last secant step is below this, so the error of the
/// point it reaches is of the order of this times the first step, ~10⁻⁵.
const FAST: f64 = 1e-3;

/// A parameter that the tolerance analysis varies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "snake_case"))]
pub enum Parameter {
    /// Supply-to-base resistor.
    R1,
    /// Base-to-ground resistor.
    R2,
    /// Collector resistor.
    Rc,
    /// Unbypassed emitter resistance.
    Re,
    /// Bypassed emitter resistance.
    ReBypassed,
    /// Input coupling capacitor.
    CIn,
    /// Output coupling capacitor.
    COut,
    /// Emitter bypass capacitor.
    CEmitter,
    /// Base bypass capacitor.
    CBase,
    /// DC current gain.
    Hfe,
    /// Base–emitter voltage at the datasheet current.
    Vbe,
    /// Ambient temperature.
    Ambient,
    /// Supply voltage.
    Supply,
}

impl Parameter {
    /// Every parameter, in report order.
    pub const ALL: [Parameter; PARAMETERS] = [
        Parameter::R1,
        Parameter::R2,
        Parameter::Rc,
        Parameter::Re,
        Parameter::ReBypassed,
        Parameter::CIn,
        Parameter::COut,
        Parameter::CEmitter,
        Parameter::CBase,
        Parameter::Hfe,
        Parameter::Vbe,
        Parameter::Ambient,
        Parameter::Supply,
    ];

    /// The design-file name: `r1`, `c_in`, `hfe`, `ambient`, ...
    pub fn name(self) -> &'static str {
        match self {
            Parameter::R1 => "r1",
            Parameter::R2 => "r2",
            Parameter::Rc => "rc",
            Parameter::Re => "re",
            Parameter::ReBypassed => "re_bypassed",
            Parameter::CIn => "c_in",
            Parameter::COut => "c_out",
            Parameter::CEmitter => "c_emitter",
            Parameter::CBase => "c_base",
            Parameter::Hfe => "hfe",
            Parameter::Vbe => "vbe",
            Parameter::Ambient => "ambient",
            Parameter::Supply => "supply",
        }
    }

    /// True for the coupling and bypass capacitors.
    pub fn is_capacitor(self) -> bool {
        matches!(
            self,
            Parameter::CIn | Parameter::COut | Parameter::CEmitter | Parameter::CBase
        )
    }

    fn index(self) -> usize {
        self as usize
    }
}

/// Where a parameter sits in a corner.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum Level {
    /// At the low end of its range.
    Min,
    /// At its nominal value.
    Nominal,
    /// At the high end of its range.
    Max,
}

impl Level {
    /// `"min"`, `"nominal"` or `"max"`.
    pub fn name(self) -> &'static str {
        match self {
            Level::Min => "min",
            Level::Nominal => "nominal",
            Level::Max => "max",
        }
    }
}

/// One parameter's place in a corner.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Setting {
    /// The parameter.
    pub parameter: Parameter,
    /// Its level.
    pub level: Level,
}

/// A point of the parameter box: the level of every parameter that varies.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Corner {
    /// The levels, in the order of [`Parameter::ALL`].
    pub settings: Vec<Setting>,
}

impl Corner {
    /// The level of `p`, or `None` when it does not vary.
    pub fn level(&self, p: Parameter) -> Option<Level> {
        self.settings
            .iter()
            .find(|s| s.parameter == p)
            .map(|s| s.level)
    }
}

/// The spread of everything that is not exact.
///
/// The hFE range is the transistor's own (`hfe_min` to `hfe_max`).
/// [`Tolerances::default`]: resistors ±5 % (E24, IEC 60063), capacitors
/// ±20 % (E6, and a usual electrolytic tolerance), supply ±5 % (a regulated
/// rail, common practice), VBE ±50 mV (small-signal datasheets bound VBE(on)
/// about that far from typical, from memory), ambient 0 to 50 °C (indoor
/// equipment, common practice).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tolerances {
    /// Resistor tolerance, a fraction (0.05 = ±5 %).
    pub resistor_tolerance: f64,
    /// Capacitor tolerance, a fraction (0.2 = ±20 %).
    pub capacitor_tolerance: f64,
    /// Supply tolerance, a fraction.
    pub supply_tolerance: f64,
    /// VBE spread at the datasheet current, volts either side of the typical value.
    pub vbe_spread: f64,
    /// Lowest ambient.
    pub ambient_min: Temperature,
    /// Highest ambient.
    pub ambient_max: Temperature,
}

/// Default resistor tolerance: ±5 %, the E24 tolerance of IEC 60063.
const DEFAULT_RESISTOR_TOLERANCE: f64 = 0.05;
/// Default capacitor tolerance: ±20 %, the E6 tolerance of IEC 60063 and a
/// usual electrolytic tolerance (common practice).
const DEFAULT_CAPACITOR_TOLERANCE: f64 = 0.20;
/// Default supply tolerance: ±5 % (common practice for a regulated rail).
const DEFAULT_SUPPLY_TOLERANCE: f64 = 0.05;
/// Default VBE spread, V: small-signal datasheets bound VBE(on) within about
/// ±50 mV of its typical value (from memory).
const DEFAULT_VBE_SPREAD: f64 = 0.05;
/// Default ambient range, °C: 0 to 50 °C, indoor equipment (common practice).
const DEFAULT_AMBIENT_RANGE: (f64, f64) = (0.0, 50.0);

impl Default for Tolerances {
    fn default() -> Self {
        Tolerances {
            resistor_tolerance: DEFAULT_RESISTOR_TOLERANCE,
            capacitor_tolerance: DEFAULT_CAPACITOR_TOLERANCE,
            supply_tolerance: DEFAULT_SUPPLY_TOLERANCE,
            vbe_spread: DEFAULT_VBE_SPREAD,
            ambient_min: Temperature::from_celsius(DEFAULT_AMBIENT_RANGE.0),
            ambient_max: Temperature::from_celsius(DEFAULT_AMBIENT_RANGE.1),
        }
    }
}

impl Tolerances {
    /// Checks every field against `stage`; the error names the field.
    pub fn validate(&self, stage: &Stage) -> Result<()> {
        within("resistor_tolerance", self.resistor_tolerance, 0.0, 0.5, "")?;
        within(
            "capacitor_tolerance",
            self.capacitor_tolerance,
            0.0,
            0.9,
            "",
        )?;
        within("supply_tolerance", self.supply_tolerance, 0.0, 0.5, "")?;
        within("vbe_spread", self.vbe_spread, 0.0, 0.3, "V")?;
        let (lo, hi) = (self.ambient_min.celsius(), self.ambient_max.celsius());
        within("ambient_min", lo, -60.0, 200.0, "°C")?;
        within("ambient_max", hi, -60.0, 200.0, "°C")?;
        if lo > hi {
            return Err(Error::out_of_range(
                "ambient_min",
                lo,
                "°C",
                alloc::format!("at most ambient_max ({hi} °C)"),
            ));
        }
        let tj_max = stage.transistor.tj_max.celsius();
        if hi >= tj_max {
            return Err(Error::out_of_range(
                "ambient_max",
                hi,
                "°C",
                alloc::format!("below the transistor's tj_max ({tj_max} °C)"),
            ));
        }
        let top = stage.supply * (1.0 + self.supply_tolerance);
        if top > MAX_SUPPLY {
            return Err(Error::out_of_range(
                "supply_tolerance",
                self.supply_tolerance,
                "",
                alloc::format!(
                    "small enough that the supply stays at most {MAX_SUPPLY} V (it reaches {top} V)"
                ),
            ));
        }
        let vbe_low = stage.transistor.vbe - self.vbe_spread;
        if vbe_low < 0.1 {
            return Err(Error::out_of_range(
                "vbe_spread",
                self.vbe_spread,
                "V",
                "small enough that vbe − vbe_spread stays at least 0.1 V",
            ));
        }
        Ok(())
    }
}

/// The results of one evaluation, indexed by [`Quantity`]; a corner that
/// does not exist is NaN.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Sample {
    pub(crate) values: [f64; QUANTITIES],
    pub(crate) active: bool,
}

impl Sample {
    pub(crate) fn get(&self, q: Quantity) -> f64 {
        self.values[q.index()]
    }
}

/// The stage and the box of its parameters.
#[derive(Debug, Clone)]
struct Model {
    stage: Stage,
    present: [bool; PARAMETERS],
    nominal: [f64; PARAMETERS],
    low: [f64; PARAMETERS],
    high: [f64; PARAMETERS],
    /// Nominal starts of the corner searches.
    lower: Option<Start>,
    upper: Option<Start>,
    /// How the nominal stage's corner searches ended, lower and upper.
    edges: [Edge; 2],
    /// The nominal results.
    sample: Sample,
}

/// The DC solution of one point, ready for the small-signal work.
struct Solved {
    stage: Stage,
    op: OperatingPoint,
    ss: SmallSignal,
}

impl Model {
    /// The model of `stage` with the ranges of `tol` (`None`: nominal only).
    fn new(stage: &Stage, tol: Option<&Tolerances>) -> Result<Model> {
        stage.validate()?;
        if let Some(t) = tol {
            t.validate(stage)?;
        }
        let p = &stage.parts;
        let t = &stage.transistor;
        let mut present = [false; PARAMETERS];
        let mut nominal = [0.0; PARAMETERS];
        let resistors = [
            (Parameter::R1, p.r1.unwrap_or(0.0)),
            (Parameter::R2, p.r2.unwrap_or(0.0)),
            (Parameter::Rc, p.rc),
            (Parameter::Re, p.re),
            (Parameter::ReBypassed, p.re_bypassed),
        ];
        for (k, v) in resistors {
            present[k.index()] = v > 0.0;
            nominal[k.index()] = v;
        }
        let capacitors = [
            (Parameter::CIn, p.c_in),
            (Parameter::COut, p.c_out),
            (Parameter::CEmitter, p.c_emitter),
            (Parameter::CBase, p.c_base),
        ];
        for (k, v) in capacitors {
            present[k.index()] = v.is_some();
            nominal[k.index()] = v.unwrap_or(0.0);
        }
        for (k, v) in [
            (Parameter::Hfe, t.hfe),
            (Parameter::Vbe, t.vbe),
            (Parameter::Ambient, stage.ambient.kelvin()),
            (Parameter::Supply, stage.supply),
        ] {
            present[k.index()] = true;
            nominal[k.index()] = v;
        }
        let mut low = nominal;
        let mut high = nominal;
        if let Some(tol) = tol {
            for k in Parameter::ALL {
                let i = k.index();
                let v = nominal[i];
                let (l, h) = match k {
                    Parameter::Hfe => (t.hfe_min, t.hfe_max),
                    Parameter::Vbe => (v - tol.vbe_spread, v + tol.vbe_spread),
                    Parameter::Ambient => (tol.ambient_min.kelvin(), tol.ambient_max.kelvin()),
                    Parameter::Supply => (
                        v * (1.0 - tol.supply_tolerance),
                        v * (1.0 + tol.supply_tolerance),
                    ),
                    c if c.is_capacitor() => (
                        v * (1.0 - tol.capacitor_tolerance),
                        v * (1.0 + tol.capacitor_tolerance),
                    ),
                    _ => (
                        v * (1.0 - tol.resistor_tolerance),
                        v * (1.0 + tol.resistor_tolerance),
                    ),
                };
                low[i] = l;
                high[i] = h;
            }
        }
        let mut model = Model {
            stage: stage.clone(),
            present,
            nominal,
            low,
            high,
            lower: None,
            upper: None,
            edges: [Edge::NotSearched; 2],
            sample: Sample {
                values: [f64::NAN; QUANTITIES],
                active: false,
            },
        };
        // The nominal corners: found by the full search of the ordinary
        // analysis, then settled again by this module's own search from that
        // value rounded to 10⁻⁶ in ln f. The ordinary search measures |H|
        // with the complex type's `norm`, whose last bit can depend on the
        // platform's hypot; the rounding and the second search (|H| from
        // |H|², libm only) make every later number the same on every target.
        // The slope and curvature there seed every later corner search.
        let solved = model.solve(&nominal)?;
        let resp = Response::new(&solved.stage, &solved.ss)?;
        let bw = resp.bandwidth()?;
        model.edges = [bw.low_edge, bw.high_edge];
        let level = corner_level(&resp);
        let mut sample = midband_sample(&solved, &resp);
        for (f, side, slot, q) in [
            (bw.f_low, Side::Lower, &mut model.lower, Quantity::FLow),
            (bw.f_high, Side::Upper, &mut model.upper, Quantity::FHigh),
        ] {
            let Some(f) = f else { continue };
            let x = libm::round(libm::log(f) * 1e6) / 1e6;
            let (slope, curvature) = shape_at(&resp, libm::exp(x))?;
            let rough = Start {
                x,
                slope,
                curvature,
            };
            let Some(f) = find_corner(&resp, level, side, rough, PRECISE, false)? else {
                continue;
            };
            let (slope, curvature) = shape_at(&resp, f)?;
            *slot = Some(Start {
                x: libm::log(f),
                slope,
                curvature,
            });
            sample.values[q.index()] = f;
        }
        model.sample = sample;
        Ok(model)
    }

    /// The parameters that vary (present and with a range).
    fn varying(&self) -> impl Iterator<Item = Parameter> + '_ {
        Parameter::ALL
            .into_iter()
            .filter(|k| self.present[k.index()] && self.high[k.index()] > self.low[k.index()])
    }

    /// The stage and device at the point `x` (absolute parameter values).
    fn stage_at(&self, x: &[f64; PARAMETERS]) -> (Stage, Device) {
        let mut s = self.stage.clone();
        let on = |k: Parameter| self.present[k.index()];
        let v = |k: Parameter| x[k.index()];
        if on(Parameter::R1) {
            s.parts.r1 = Some(v(Parameter::R1));
        }
        if on(Parameter::R2) {
            s.parts.r2 = Some(v(Parameter::R2));
        }
        if on(Parameter::Rc) {
            s.parts.rc = v(Parameter::Rc);
        }
        if on(Parameter::Re) {
            s.parts.re = v(Parameter::Re);
        }
        if on(Parameter::ReBypassed) {
            s.parts.re_bypassed = v(Parameter::ReBypassed);
        }
        if on(Parameter::CIn) {
            s.parts.c_in = Some(v(Parameter::CIn));
        }
        if on(Parameter::COut) {
            s.parts.c_out = Some(v(Parameter::COut));
        }
        if on(Parameter::CEmitter) {
            s.parts.c_emitter = Some(v(Parameter::CEmitter));
        }
        if on(Parameter::CBase) {
            s.parts.c_base = Some(v(Parameter::CBase));
        }
        s.supply = v(Parameter::Supply);
        s.ambient = Temperature::from_kelvin(v(Parameter::Ambient));
        let t = &s.transistor;
        let device = t.device(s.ambient, v(Parameter::Hfe), v(Parameter::Vbe) - t.vbe);
        (s, device)
    }

    /// The point of a trial from its uniform draws (slot i for parameter i;
    /// see the module docs for the distributions), and ln(x/x₀) of each
    /// parameter.
    fn draw(&self, u: &[f64; DRAWS_PER_TRIAL as usize]) -> ([f64; PARAMETERS], [f64; PARAMETERS]) {
        let mut x = self.nominal;
        let mut ln_ratio = [0.0; PARAMETERS];
        for p in Parameter::ALL {
            let i = p.index();
            if !self.present[i] || self.high[i] <= self.low[i] {
                continue;
            }
            let (lo, hi) = (self.low[i], self.high[i]);
            x[i] = if p == Parameter::Hfe {
                // formula: log-uniform, x = lo·(hi/lo)^u
                lo * libm::exp(u[i] * libm::log(hi / lo))
            } else {
                // formula: uniform, x = lo + u·(hi − lo)
                lo + u[i] * (hi - lo)
            };
            ln_ratio[i] = libm::log(x[i] / self.nominal[i]);
        }
        (x, ln_ratio)
    }

    /// The operating point and hybrid-π model at `x`.
    fn solve(&self, x: &[f64; PARAMETERS]) -> Result<Solved> {
        let (stage, device) = self.stage_at(x);
        let op = OperatingPoint::solve(&stage, &device)?;
        let ss = SmallSignal::at(&stage, &op);
        Ok(Solved { stage, op, ss })
    }

    /// Every result at `x`; the corners start from `lower` and `upper`.
    #[cfg(test)]
    fn evaluate(
        &self,
        x: &[f64; PARAMETERS],
        lower: Option<Start>,
        upper: Option<Start>,
        tol: f64,
    ) -> Result<Sample> {
        Ok(self.evaluate_shaped(x, lower, upper, tol, false)?.0)
    }

    /// [`Model::evaluate`], also returning the slope of ln|H| at each corner
    /// found when `shape` is set (two more nodal solves per corner).
    fn evaluate_shaped(
        &self,
        x: &[f64; PARAMETERS],
        lower: Option<Start>,
        upper: Option<Start>,
        tol: f64,
        shape: bool,
    ) -> Result<(Sample, [f64; 2])> {
        let solved = self.solve(x)?;
        let resp = Response::new(&solved.stage, &solved.ss)?;
        let mut s = midband_sample(&solved, &resp);
        corners_into(&resp, lower, upper, tol, false, &mut s)?;
        let mut slopes = [f64::NAN; 2];
        if shape {
            for (k, q) in [Quantity::FLow, Quantity::FHigh].into_iter().enumerate() {
                let f = s.get(q);
                if f.is_finite() {
                    slopes[k] = shape_at(&resp, f)?.0;
                }
            }
        }
        Ok((s, slopes))
    }

    /// A Monte Carlo trial's results: the corners from the predicted starts,
    /// accepted after one solve when the step is small.
    fn evaluate_quick(
        &self,
        x: &[f64; PARAMETERS],
        lower: Option<Start>,
        upper: Option<Start>,
    ) -> Result<Sample> {
        let solved = self.solve(x)?;
        let resp = Response::new(&solved.stage, &solved.ss)?;
        let mut s = midband_sample(&solved, &resp);
        corners_into(&resp, lower, upper, FAST, true, &mut s)?;
        Ok(s)
    }
}

/// The DC and midband results of a solved point (corners NaN).
fn midband_sample(solved: &Solved, resp: &Response) -> Sample {
    let op = &solved.op;
    let mid = resp.midband();
    let swing = Swing::at(&solved.stage, op);
    let d = Dissipation::at(&solved.stage, op);
    let mut values = [f64::NAN; QUANTITIES];
    values[Quantity::Ic.index()] = op.ic;
    values[Quantity::Vce.index()] = libm::fabs(op.vce);
    values[Quantity::VoltageGain.index()] = libm::fabs(mid.voltage_gain.re);
    values[Quantity::InputImpedance.index()] = mid.input_impedance.re;
    values[Quantity::OutputImpedance.index()] = mid.output_impedance.re;
    values[Quantity::Swing.index()] = swing.symmetric;
    values[Quantity::JunctionTemperature.index()] = d.junction_temperature.celsius();
    values[Quantity::SupplyCurrent.index()] = d.supply_current;
    Sample {
        values,
        active: op.region == Region::Active,
    }
}

/// Finds the corners of `resp` into `s`.
fn corners_into(
    resp: &Response,
    lower: Option<Start>,
    upper: Option<Start>,
    tol: f64,
    quick: bool,
    s: &mut Sample,
) -> Result<()> {
    let level = corner_level(resp);
    if let Some(st) = lower {
        s.values[Quantity::FLow.index()] =
            find_corner(resp, level, Side::Lower, st, tol, quick)?.unwrap_or(f64::NAN);
    }
    if let Some(st) = upper {
        s.values[Quantity::FHigh.index()] =
            find_corner(resp, level, Side::Upper, st, tol, quick)?.unwrap_or(f64::NAN);
    }
    Ok(())
}

/// The extremes of one result over the parameter box.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Extreme {
    /// The result.
    pub quantity: Quantity,
    /// Its nominal value.
    pub nominal: f64,
    /// Its lowest value.
    pub min: f64,
    /// Its highest value.
    pub max: f64,
    /// The corner that gives `min`.
    pub min_corner: Corner,
    /// The corner that gives `max`.
    pub max_corner: Corner,
}

/// The worst-case analysis: the extremes of every result that exists.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct WorstCase {
    /// One entry per result, in the order of [`Quantity::ALL`]; a corner the
    /// nominal stage does not have is left out.
    pub extremes: Vec<Extreme>,
    /// Vertices solved (each with both capacitor settings when there are capacitors).
    pub vertices: usize,
    /// Vertices where the transistor is saturated or cut off. When there are
    /// any, the results are no longer monotonic over the box and the
    /// extremes are the vertex extremes only: points inside can fall outside
    /// them (module docs).
    pub inactive_vertices: usize,
    /// How the lower-corner search ended over the box: that of the nominal
    /// stage, or [`Edge::NoPassband`] when some vertex has no lower corner
    /// where the nominal stage has one (its response no longer crosses the
    /// −3 dB level there).
    pub low_edge: Edge,
    /// The same for the upper corner.
    pub high_edge: Edge,
}

impl WorstCase {
    /// The extremes of `q`, if the stage has that result.
    pub fn get(&self, q: Quantity) -> Option<&Extreme> {
        self.extremes.iter().find(|e| e.quantity == q)
    }
}

/// Running extremes of one value with the corner codes that give them.
#[derive(Clone, Copy)]
struct Track {
    min: f64,
    max: f64,
    min_at: (u32, i8),
    max_at: (u32, i8),
}

impl Track {
    fn new(v: f64) -> Track {
        // The nominal point, coded as vertex u32::MAX.
        Track {
            min: v,
            max: v,
            min_at: (u32::MAX, 0),
            max_at: (u32::MAX, 0),
        }
    }
    fn add(&mut self, v: f64, at: (u32, i8)) {
        if !v.is_finite() {
            return;
        }
        if !self.min.is_finite() || v < self.min {
            self.min = v;
            self.min_at = at;
        }
        if !self.max.is_finite() || v > self.max {
            self.max = v;
            self.max_at = at;
        }
    }
}

impl Model {
    /// The corner of vertex `mask` over the varying non-capacitor
    /// parameters `axes`, with the capacitors at `caps` (−1 min, 0 nominal, 1 max).
    fn corner(&self, axes: &[Parameter], at: (u32, i8)) -> Corner {
        let (mask, caps) = at;
        let settings = self
            .varying()
            .map(|p| {
                let level = if mask == u32::MAX {
                    Level::Nominal
                } else if p.is_capacitor() {
                    match caps {
                        -1 => Level::Min,
                        1 => Level::Max,
                        _ => Level::Nominal,
                    }
                } else {
                    match axes.iter().position(|a| *a == p) {
                        Some(bit) if mask & (1 << bit) != 0 => Level::Max,
                        Some(_) => Level::Min,
                        None => Level::Nominal,
                    }
                };
                Setting {
                    parameter: p,
                    level,
                }
            })
            .collect();
        Corner { settings }
    }

    fn worst_case(&self) -> Result<WorstCase> {
        let axes: Vec<Parameter> = self.varying().filter(|p| !p.is_capacitor()).collect();
        let caps: Vec<Parameter> = self.varying().filter(|p| p.is_capacitor()).collect();
        let n = 1u32 << axes.len();
        let nominal = &self.sample;
        let mut tracks: Vec<Track> = nominal.values.iter().map(|&v| Track::new(v)).collect();
        let cap_settings: &[i8] = if caps.is_empty() { &[0] } else { &[-1, 1] };
        let mut inactive_vertices = 0;
        let mut edges = self.edges;
        for mask in 0..n {
            let mut x = self.nominal;
            for (bit, p) in axes.iter().enumerate() {
                let i = p.index();
                x[i] = if mask & (1 << bit) != 0 {
                    self.high[i]
                } else {
                    self.low[i]
                };
            }
            let solved = self
                .solve(&x)
                .map_err(|e| at_corner(e, &self.corner(&axes, (mask, 0))))?;
            let mut first = true;
            for &c in cap_settings {
                for p in &caps {
                    let i = p.index();
                    x[i] = if c < 0 { self.low[i] } else { self.high[i] };
                }
                let (stage, _) = self.stage_at(&x);
                let resp = Response::new(&stage, &solved.ss)?;
                let at = (mask, c);
                if first {
                    // The capacitors do not move the DC and midband results.
                    let at_mid = (mask, 0);
                    let s = midband_sample(&solved, &resp);
                    if !s.active {
                        inactive_vertices += 1;
                    }
                    for q in Quantity::ALL {
                        if !matches!(q, Quantity::FLow | Quantity::FHigh) {
                            tracks[q.index()].add(s.get(q), at_mid);
                        }
                    }
                    first = false;
                }
                let mut s = *nominal;
                corners_into(&resp, self.lower, self.upper, PRECISE, false, &mut s)?;
                for (k, q) in [Quantity::FLow, Quantity::FHigh].into_iter().enumerate() {
                    tracks[q.index()].add(s.get(q), at);
                    if self.edges[k] == Edge::Corner && !s.get(q).is_finite() {
                        edges[k] = Edge::NoPassband;
                    }
                }
            }
        }
        let extremes = Quantity::ALL
            .into_iter()
            .filter(|q| nominal.get(*q).is_finite())
            .map(|q| {
                let t = &tracks[q.index()];
                Extreme {
                    quantity: q,
                    nominal: nominal.get(q),
                    min: t.min,
                    max: t.max,
                    min_corner: self.corner(&axes, t.min_at),
                    max_corner: self.corner(&axes, t.max_at),
                }
            })
            .collect();
        Ok(WorstCase {
            extremes,
            vertices: n as usize,
            inactive_vertices,
            low_edge: edges[0],
            high_edge: edges[1],
        })
    }
}

fn at_corner(e: Error, corner: &Corner) -> Error {
    let mut what = alloc::string::String::from("worst case at the corner");
    for s in &corner.settings {
        what.push(' ');
        what.push_str(s.parameter.name());
        what.push('=');
        what.push_str(s.level.name());
    }
    Error::inconsistent("tolerances", alloc::format!("{what}: {e}"))
}

/// The worst case of `stage` over the box of `tolerances`: every vertex of
/// the resistors, hFE, VBE, ambient and supply, each with the capacitors all
/// at their minimum and all at their maximum (see the module docs).
pub fn worst_case(stage: &Stage, tolerances: &Tolerances) -> Result<WorstCase> {
    Model::new(stage, Some(tolerances))?.worst_case()
}

/// One entry of the sensitivity table.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Sensitivity {
    /// The result.
    pub quantity: Quantity,
    /// The parameter.
    pub parameter: Parameter,
    /// Percent change of the result per percent change of the parameter.
    pub percent_per_percent: f64,
}

impl Model {
    /// Central differences at ±1 % of every present parameter; also returns
    /// the prediction of the corners for the Monte Carlo trials.
    fn sensitivity(&self) -> Result<(Vec<Sensitivity>, Prediction)> {
        let mut out = Vec::new();
        let mut pred = Prediction::default();
        let base = self.sample;
        for p in Parameter::ALL {
            let i = p.index();
            if !self.present[i] {
                continue;
            }
            let mut up = self.nominal;
            let mut down = self.nominal;
            up[i] *= 1.0 + SENSITIVITY_STEP;
            down[i] *= 1.0 - SENSITIVITY_STEP;
            let (a, sa) = self.evaluate_shaped(&up, self.lower, self.upper, PRECISE, true)?;
            let (b, sb) = self.evaluate_shaped(&down, self.lower, self.upper, PRECISE, true)?;
            // formula: d/d ln p ≈ (v₊ − v₋)/(ln p₊ − ln p₋)
            let dlnp = libm::log(up[i]) - libm::log(down[i]);
            for k in 0..2 {
                let s0 = [self.lower, self.upper][k].map_or(f64::NAN, |s| s.slope);
                if sa[k].is_finite() && sb[k].is_finite() && s0.is_finite() {
                    pred.slope[k][i] = (sa[k] - sb[k]) / dlnp;
                    let (hp, hm) = (
                        libm::log(up[i] / self.nominal[i]),
                        libm::log(self.nominal[i] / down[i]),
                    );
                    pred.slope2[k][i] = 2.0 * ((sa[k] - s0) / hp - (s0 - sb[k]) / hm) / (hp + hm);
                }
            }
            for q in Quantity::ALL {
                // Temperatures as absolute values, so that a percentage means something.
                let shift = if q == Quantity::JunctionTemperature {
                    crate::constants::ZERO_CELSIUS
                } else {
                    0.0
                };
                let (r0, r1, r2) = (base.get(q) + shift, a.get(q) + shift, b.get(q) + shift);
                if !(r0.is_finite() && r1.is_finite() && r2.is_finite()) || r0 == 0.0 {
                    continue;
                }
                // formula: S = ((R₊ − R₋)/R₀)/(2δ), δ = 0.01
                let s = (r1 - r2) / r0 / (2.0 * SENSITIVITY_STEP);
                let k = match q {
                    Quantity::FLow => 0,
                    Quantity::FHigh => 1,
                    _ => 2,
                };
                if k < 2 {
                    // formula: first and second derivative of ln f on the
                    // three points ln p₋ < ln p₀ < ln p₊
                    let (hp, hm) = (
                        libm::log(up[i] / self.nominal[i]),
                        libm::log(self.nominal[i] / down[i]),
                    );
                    let (lp, l0, lm) = (libm::log(r1), libm::log(r0), libm::log(r2));
                    pred.root[k][i] = (lp - lm) / dlnp;
                    pred.root2[k][i] = 2.0 * ((lp - l0) / hp - (l0 - lm) / hm) / (hp + hm);
                }
                if libm::fabs(s) >= SENSITIVITY_FLOOR {
                    out.push(Sensitivity {
                        quantity: q,
                        parameter: p,
                        percent_per_percent: s,
                    });
                }
            }
        }
        // Largest magnitude first, ties in table order: a stable insertion
        // sort (at most a few dozen entries; the standard library's sorts
        // would add kilobytes to the page's wasm).
        for i in 1..out.len() {
            let mut j = i;
            while j > 0
                && libm::fabs(out[j].percent_per_percent)
                    > libm::fabs(out[j - 1].percent_per_percent)
            {
                out.swap(j, j - 1);
                j -= 1;
            }
        }
        Ok((out, pred))
    }
}

/// First-order prediction of a trial's corners from the nominal ones: the
/// derivatives of ln f (`root`) and of the slope of ln|H| there (`slope`)
/// with respect to ln p, for the lower [0] and upper [1] corner.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
struct Prediction {
    root: [[f64; PARAMETERS]; 2],
    root2: [[f64; PARAMETERS]; 2],
    slope: [[f64; PARAMETERS]; 2],
    slope2: [[f64; PARAMETERS]; 2],
}

/// The sensitivity table of `stage`, largest magnitude first (see the module docs).
pub fn sensitivity(stage: &Stage) -> Result<Vec<Sensitivity>> {
    Ok(Model::new(stage, None)?.sensitivity()?.0)
}

/// Which requirements `s` fails, as bits in the order of [`REQUIREMENTS`],
/// with the meaning of [`Requirements::check`]: the corners by
/// [`corner_met`], with `edges` the way the nominal stage's corner searches
/// ended (a corner that the nominal stage has and `s` lacks fails).
pub(crate) fn failed_requirements(r: &Requirements, s: &Sample, edges: [Edge; 2]) -> u32 {
    let mut bits = 0;
    for (k, req) in REQUIREMENTS.iter().enumerate() {
        let Some(limit) = r.get(req.key) else {
            continue;
        };
        let value = s.get(req.quantity);
        let pass = match req.side() {
            Some(side) => {
                let edge = if side == Side::Lower {
                    edges[0]
                } else {
                    edges[1]
                };
                corner_met(side, edge, Some(value).filter(|f| f.is_finite()), limit)
            }
            None => req.met(req.reading(value), limit),
        };
        if !pass {
            bits |= 1 << k;
        }
    }
    bits
}

/// Bit of a trial's state: the trial has run.
const DONE: u32 = 1 << 31;
/// Bit of a trial's state: its operating point was not found.
const NO_SOLUTION: u32 = 1 << 30;
/// Bit of a trial's state: it solved, but not in the active region.
const NOT_ACTIVE: u32 = 1 << 29;
/// Bits of a trial's state that hold the failed requirements.
const FAILED_MASK: u32 = (1 << REQUIREMENTS.len()) - 1;

/// A Monte Carlo run, filled trial by trial (in one call or in chunks).
#[derive(Debug, Clone)]
pub struct MonteCarlo {
    model: Model,
    requirements: Requirements,
    seed: u64,
    trials: usize,
    /// The prediction of the trial corners.
    prediction: Prediction,
    sensitivity: Vec<Sensitivity>,
    values: Vec<[f64; QUANTITIES]>,
    state: Vec<u32>,
    completed: usize,
}

/// The yield of one requirement.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct RequirementYield {
    /// The requirement, as the design file names it (`min_swing`).
    pub requirement: &'static str,
    /// Share of the completed trials that meet it, 0 to 1.
    #[cfg_attr(feature = "serde", serde(rename = "yield"))]
    pub yield_fraction: f64,
}

/// Counts of values in equal bins from `from` to `to`.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Histogram {
    /// Lower edge of the first bin.
    pub from: f64,
    /// Upper edge of the last bin.
    pub to: f64,
    /// Count in each bin; a value equal to `to` counts in the last bin.
    pub counts: Vec<u32>,
}

/// The distribution of one result over the trials.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Distribution {
    /// The result.
    pub quantity: Quantity,
    /// 1st percentile.
    pub p1: f64,
    /// Median.
    pub p50: f64,
    /// 99th percentile.
    pub p99: f64,
    /// Smallest value.
    pub min: f64,
    /// Largest value.
    pub max: f64,
    /// Mean.
    pub mean: f64,
    /// The histogram over [min, max] in 20 equal bins.
    pub histogram: Histogram,
}

/// What a Monte Carlo run found (over the trials completed so far).
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct MonteCarloSummary {
    /// Trials asked for.
    pub trials: usize,
    /// Trials run so far.
    pub completed: usize,
    /// The seed.
    pub seed: u64,
    /// Share of the completed trials that meet every requirement, 0 to 1.
    #[cfg_attr(feature = "serde", serde(rename = "yield"))]
    pub yield_fraction: f64,
    /// Trials whose operating point was not found (they fail every requirement).
    pub no_solution: usize,
    /// Trials that solved but whose transistor is saturated or cut off.
    pub not_active: usize,
    /// The yield of each requirement that is set.
    pub requirements: Vec<RequirementYield>,
    /// One entry per result that the stage has, in the order of [`Quantity::ALL`].
    pub distributions: Vec<Distribution>,
}

impl MonteCarloSummary {
    /// The distribution of `q`, if the stage has that result.
    pub fn get(&self, q: Quantity) -> Option<&Distribution> {
        self.distributions.iter().find(|d| d.quantity == q)
    }
}

impl MonteCarlo {
    /// Prepares `trials` trials of `stage` over `tolerances`, judged against
    /// `requirements`, with the generator seeded by `seed`. This solves the
    /// nominal stage, its corners and its sensitivities (a few hundred
    /// microseconds); the trials run in [`MonteCarlo::run`] or
    /// [`MonteCarlo::run_chunk`].
    pub fn new(
        stage: &Stage,
        tolerances: &Tolerances,
        requirements: &Requirements,
        trials: usize,
        seed: u64,
    ) -> Result<MonteCarlo> {
        within("trials", trials as f64, 1.0, MAX_TRIALS as f64, "")?;
        let model = Model::new(stage, Some(tolerances))?;
        let (sensitivity, prediction) = model.sensitivity()?;
        Ok(MonteCarlo {
            model,
            requirements: *requirements,
            seed,
            trials,
            prediction,
            sensitivity,
            values: vec![[f64::NAN; QUANTITIES]; trials],
            state: vec![0; trials],
            completed: 0,
        })
    }

    /// Trials asked for.
    pub fn trials(&self) -> usize {
        self.trials
    }

    /// The seed.
    pub fn seed(&self) -> u64 {
        self.seed
    }

    /// Trials run so far.
    pub fn completed(&self) -> usize {
        self.completed
    }

    /// True when every trial has run.
    pub fn is_complete(&self) -> bool {
        self.completed == self.trials
    }

    /// The sensitivity table of the nominal stage (computed by [`MonteCarlo::new`]).
    pub fn sensitivity(&self) -> &[Sensitivity] {
        &self.sensitivity
    }

    /// Runs every trial that has not run.
    pub fn run(&mut self) {
        self.run_chunk(0, self.trials);
    }

    /// Runs trials `start … start + count − 1` (clipped to the trials asked
    /// for; trials already run are run again and give the same numbers) and
    /// returns how many ran. Trial `i` depends only on the seed and `i`, so
    /// the results do not depend on how the run is cut into chunks.
    pub fn run_chunk(&mut self, start: usize, count: usize) -> usize {
        let end = start.saturating_add(count).min(self.trials);
        if start >= end {
            return 0;
        }
        let mut stream = Stream::at(self.seed, start as u128 * u128::from(DRAWS_PER_TRIAL));
        for i in start..end {
            let mut u = [0.0; DRAWS_PER_TRIAL as usize];
            for v in u.iter_mut() {
                *v = stream.uniform();
            }
            let (values, state) = self.trial(&u);
            if self.state[i] & DONE == 0 {
                self.completed += 1;
            }
            self.values[i] = values;
            self.state[i] = state | DONE;
        }
        end - start
    }

    /// One trial from its uniform draws.
    fn trial(&self, u: &[f64; DRAWS_PER_TRIAL as usize]) -> ([f64; QUANTITIES], u32) {
        let m = &self.model;
        let (x, ln_ratio) = m.draw(u);
        // First-order prediction of the corners and of the slopes there.
        let p = &self.prediction;
        let predict = |start: Option<Start>, k: usize| {
            start.map(|s| {
                let (mut dx, mut ds) = (0.0, 0.0);
                for ((((a, a2), b), b2), r) in p.root[k]
                    .iter()
                    .zip(&p.root2[k])
                    .zip(&p.slope[k])
                    .zip(&p.slope2[k])
                    .zip(&ln_ratio)
                {
                    dx += a * r + 0.5 * a2 * r * r;
                    ds += b * r + 0.5 * b2 * r * r;
                }
                Start {
                    x: s.x + dx,
                    slope: s.slope + ds,
                    curvature: s.curvature,
                }
            })
        };
        let lower = predict(m.lower, 0);
        let upper = predict(m.upper, 1);
        match m.evaluate_quick(&x, lower, upper) {
            Ok(s) => {
                let mut state = failed_requirements(&self.requirements, &s, m.edges);
                if !s.active {
                    state |= NOT_ACTIVE;
                }
                (s.values, state)
            }
            Err(_) => ([f64::NAN; QUANTITIES], NO_SOLUTION | FAILED_MASK),
        }
    }

    /// The values of `q` in trial order (NaN for a trial not run, not
    /// solved, or without that corner).
    pub fn samples(&self, q: Quantity) -> impl Iterator<Item = f64> + '_ {
        self.values.iter().map(move |v| v[q.index()])
    }

    /// True when trial `i` has run and meets every requirement.
    pub fn passed(&self, i: usize) -> bool {
        self.state
            .get(i)
            .is_some_and(|s| s & DONE != 0 && s & FAILED_MASK == 0)
    }

    /// Yield, percentiles and histograms over the trials completed so far.
    pub fn summary(&self) -> MonteCarloSummary {
        let done = self.completed;
        let mut passed = 0usize;
        let mut no_solution = 0usize;
        let mut not_active = 0usize;
        let mut req_fail = [0usize; REQUIREMENTS.len()];
        for &s in &self.state {
            if s & DONE == 0 {
                continue;
            }
            if s & FAILED_MASK == 0 {
                passed += 1;
            }
            if s & NO_SOLUTION != 0 {
                no_solution += 1;
            } else if s & NOT_ACTIVE != 0 {
                not_active += 1;
            }
            for (k, f) in req_fail.iter_mut().enumerate() {
                if s & (1 << k) != 0 {
                    *f += 1;
                }
            }
        }
        let share = |n: usize| {
            if done > 0 {
                n as f64 / done as f64
            } else {
                0.0
            }
        };
        let r = &self.requirements;
        let requirements = REQUIREMENTS
            .iter()
            .zip(req_fail)
            .filter(|(req, _)| r.get(req.key).is_some())
            .map(|(req, failed)| RequirementYield {
                requirement: req.key,
                yield_fraction: share(done - failed),
            })
            .collect();
        let mut scratch: Vec<f64> = Vec::with_capacity(done);
        let mut distributions = Vec::new();
        for q in Quantity::ALL {
            if !self.model.sample.get(q).is_finite() {
                continue;
            }
            scratch.clear();
            for (v, s) in self.values.iter().zip(&self.state) {
                let x = v[q.index()];
                if s & DONE != 0 && x.is_finite() {
                    scratch.push(x);
                }
            }
            if let Some(d) = distribution(q, &mut scratch) {
                distributions.push(d);
            }
        }
        MonteCarloSummary {
            trials: self.trials,
            completed: done,
            seed: self.seed,
            yield_fraction: share(passed),
            no_solution,
            not_active,
            requirements,
            distributions,
        }
    }
}

/// The percentile `p` (0 to 1) of the ascending `sorted` by linear
/// interpolation between order statistics.
fn percentile(sorted: &[f64], p: f64) -> f64 {
    let n = sorted.len();
    // formula: h = (n − 1)·p, value = x₍⌊h⌋₎ + (h − ⌊h⌋)·(x₍⌊h⌋+1₎ − x₍⌊h⌋₎)
    let h = (n - 1) as f64 * p;
    let k = libm::floor(h) as usize;
    let lo = sorted[k];
    let frac = h - k as f64;
    if frac == 0.0 || k + 1 >= n {
        return lo;
    }
    lo + frac * (sorted[k + 1] - lo)
}

/// Sorts `v` ascending (by `f64::total_cmp`) in place. The standard
/// library's unstable sort: the designer page has room for its code, and it
/// is several times faster than a hand-written heapsort on 10 000 samples.
fn sort_ascending(v: &mut [f64]) {
    v.sort_unstable_by(f64::total_cmp);
}

fn distribution(q: Quantity, v: &mut [f64]) -> Option<Distribution> {
    if v.is_empty() {
        return None;
    }
    let n = v.len();
    let mut min = f64::INFINITY;
    let mut max = f64::NEG_INFINITY;
    let mut sum = 0.0;
    for &x in v.iter() {
        min = min.min(x);
        max = max.max(x);
        sum += x;
    }
    let mut counts = vec![0u32; HISTOGRAM_BINS];
    let width = max - min;
    for &x in v.iter() {
        let k = if width > 0.0 {
            ((x - min) / width * HISTOGRAM_BINS as f64) as usize
        } else {
            0
        };
        counts[k.min(HISTOGRAM_BINS - 1)] += 1;
    }
    sort_ascending(v);
    Some(Distribution {
        quantity: q,
        p1: percentile(v, 0.01),
        p50: percentile(v, 0.50),
        p99: percentile(v, 0.99),
        min,
        max,
        mean: sum / n as f64,
        histogram: Histogram {
            from: min,
            to: max,
            counts,
        },
    })
}

/// One requirement judged at the vertex of the tolerance box where it is
/// worst (see [`worst_checks`]).
#[derive(Debug, Clone, PartialEq)]
pub struct WorstCheck {
    /// The check, with `id` the requirement's key (`min_swing`) and the
    /// worst value as its value.
    pub check: Check,
    /// The vertex of the worst value (`None` when the stage has no such
    /// corner frequency, which counts as in the nominal check).
    pub corner: Option<Corner>,
}

/// Each requirement that is set, judged at the vertex where it is worst:
/// the lowest value over the box for a lower bound (`min_…`), the highest
/// for an upper bound (`max_…`). The meaning is that of the nominal check:
/// a corner found at every vertex is judged at its worst; a corner the
/// stage has but some vertex lacks fails ([`WorstCase::low_edge`]); no
/// corner at all (the gain holds to DC) or one beyond the search range is
/// judged as the nominal check judges it; the gain is compared in dB. The
/// command line's `check --worst-case` and the page both judge with this.
pub fn worst_checks(requirements: &Requirements, worst: &WorstCase) -> Vec<WorstCheck> {
    let mut out = Vec::new();
    for (req, limit) in requirements.limits() {
        let what = ["worst-case ", req.label()].concat();
        let at_least = req.bound == Bound::AtLeast;
        // A corner that is not found at every vertex: the rules of the
        // nominal check (`corner_met`), with what the box showed.
        if let Some(side) = req.side() {
            let edge = if side == Side::Lower {
                worst.low_edge
            } else {
                worst.high_edge
            };
            if edge == Edge::NoPassband {
                let bound = if at_least { "at least" } else { "at most" };
                let check = Check {
                    id: req.key.into(),
                    pass: false,
                    value: 0.0,
                    limit,
                    unit: "Hz",
                    message: alloc::format!(
                        "{what}: none at some vertex of the tolerance box, where the response does not come within 3 dB of its midband gain; the required {bound} {} is not met",
                        crate::format::format_si(limit, "Hz")
                    ),
                };
                out.push(WorstCheck {
                    check,
                    corner: None,
                });
                continue;
            }
            if edge != Edge::Corner {
                let check = corner_check(side, &what, edge, None, limit, &Default::default());
                out.push(WorstCheck {
                    check,
                    corner: None,
                });
                continue;
            }
        }
        let (value, corner) = match worst.get(req.quantity) {
            Some(e) if at_least => (e.min, Some(e.min_corner.clone())),
            Some(e) => (e.max, Some(e.max_corner.clone())),
            None => (f64::NAN, None),
        };
        let check = req.check(&what, req.reading(value), limit);
        out.push(WorstCheck { check, corner });
    }
    out
}

/// Worst case, sensitivity and Monte Carlo together.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct ToleranceReport {
    /// The extremes over the parameter box.
    pub worst_case: WorstCase,
    /// The sensitivity table, largest first.
    pub sensitivity: Vec<Sensitivity>,
    /// The Monte Carlo summary.
    pub monte_carlo: MonteCarloSummary,
}

/// The whole tolerance analysis of `stage`: worst case, sensitivity, and
/// `trials` Monte Carlo trials from `seed`, judged against `requirements`.
pub fn tolerance_analysis(
    stage: &Stage,
    tolerances: &Tolerances,
    requirements: &Requirements,
    trials: usize,
    seed: u64,
) -> Result<ToleranceReport> {
    let mut mc = MonteCarlo::new(stage, tolerances, requirements, trials, seed)?;
    let worst_case = mc.model.worst_case()?;
    mc.run();
    Ok(ToleranceReport {
        worst_case,
        sensitivity: mc.sensitivity.clone(),
        monte_carlo: mc.summary(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::decibel::db20;
    use crate::presets::preset;
    use crate::stage::{Parts, StageKind};
    use alloc::vec::Vec;

    /// Relative difference |a − b|/|b|.
    fn rel(a: f64, b: f64) -> f64 {
        libm::fabs(a - b) / libm::fabs(b)
    }

    /// The crate documentation's common-emitter stage: 12 V, 47 k / 10 k,
    /// 4.7 k collector, 220 Ω + 820 Ω emitter, every capacitor finite.
    fn ce_stage() -> Stage {
        Stage {
            kind: StageKind::CommonEmitter,
            supply: 12.0,
            ambient: Temperature::from_celsius(25.0),
            parts: Parts {
                r1: Some(47e3),
                r2: Some(10e3),
                rc: 4.7e3,
                re: 220.0,
                re_bypassed: 820.0,
                rs: 600.0,
                rl: 10e3,
                c_in: Some(1e-6),
                c_out: Some(1e-6),
                c_emitter: Some(47e-6),
                ..Parts::default()
            },
            transistor: preset("general-purpose-npn").unwrap(),
        }
    }

    /// The value of `q` from an ordinary analysis.
    fn quantity_of(a: &crate::analysis::Analysis, q: Quantity) -> f64 {
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
        }
    }

    /// The stage at the vertex `corner` of `model`'s box, as an ordinary
    /// stage: parts, supply and ambient set, and the transistor's typical
    /// hFE and VBE replaced by the vertex's.
    fn stage_at_corner(model: &Model, corner: &Corner) -> Stage {
        let mut x = model.nominal;
        for st in &corner.settings {
            let i = st.parameter.index();
            x[i] = match st.level {
                Level::Min => model.low[i],
                Level::Max => model.high[i],
                Level::Nominal => model.nominal[i],
            };
        }
        let (mut stage, _) = model.stage_at(&x);
        let t = &mut stage.transistor;
        t.hfe = x[Parameter::Hfe.index()];
        t.vbe = x[Parameter::Vbe.index()];
        stage
    }

    #[test]
    fn every_worst_case_entry_is_the_value_at_the_vertex_it_names() {
        // Re-analysing the vertex that the table names for each minimum and
        // maximum gives that value again (the swing maximum once carried
        // the positive peak instead). Allowed: 1e-8 relative, the two
        // routes' own convergence (Newton steps of 1e-11 V are 4e-10 of IC
        // through VT, a little more through the small-signal quantities;
        // corners searched to 1e-10 in ln f on each side).
        let tol = Tolerances::default();
        for stage in [ce_stage(), cc_stage()] {
            let model = Model::new(&stage, Some(&tol)).unwrap();
            let wc = model.worst_case().unwrap();
            assert!(!wc.extremes.is_empty());
            for e in &wc.extremes {
                for (value, corner) in [(e.min, &e.min_corner), (e.max, &e.max_corner)] {
                    let again = crate::analysis::analyze(&stage_at_corner(&model, corner))
                        .expect("the vertex analyses");
                    let got = quantity_of(&again, e.quantity);
                    assert!(
                        rel(got, value) <= 1e-8,
                        "{} at {corner:?}: table {value}, analysis {got}",
                        e.quantity.name()
                    );
                }
            }
        }
    }

    /// A PNP follower with its emitter near mid-supply.
    fn cc_stage() -> Stage {
        Stage {
            kind: StageKind::CommonCollector,
            supply: 15.0,
            ambient: Temperature::from_celsius(25.0),
            parts: Parts {
                r1: Some(56e3),
                r2: Some(68e3),
                rc: 0.0,
                re: 3.3e3,
                rs: 1e3,
                rl: 4.7e3,
                c_in: Some(470e-9),
                c_out: Some(10e-6),
                ..Parts::default()
            },
            transistor: preset("general-purpose-pnp").unwrap(),
        }
    }

    #[test]
    fn monte_carlo_samples_lie_inside_the_worst_case_bounds() {
        // Property over seeds and two stages: every trial's value of every
        // result lies within the worst-case extremes. The extremes are
        // vertex values; a trial's corner is within about 10⁻⁵ of the exact
        // crossing (module docs; bounded by 5·10⁻⁵ in the test below), so
        // corners get that slack, and the DC and midband results, solved
        // to 10⁻¹¹ V by the same code as the vertices, 10⁻⁹.
        for stage in [ce_stage(), cc_stage()] {
            let tol = Tolerances::default();
            let wc = worst_case(&stage, &tol).unwrap();
            for seed in [1u64, 2, 3, 42, 2024] {
                let mut mc =
                    MonteCarlo::new(&stage, &tol, &Requirements::default(), 150, seed).unwrap();
                mc.run();
                for e in &wc.extremes {
                    let slack = match e.quantity {
                        Quantity::FLow | Quantity::FHigh => 5e-5,
                        _ => 1e-9,
                    };
                    let span = libm::fabs(e.max).max(libm::fabs(e.min));
                    for v in mc.samples(e.quantity) {
                        assert!(
                            v >= e.min - slack * span && v <= e.max + slack * span,
                            "{:?} seed {seed}: {} {v} outside [{}, {}]",
                            stage.kind,
                            e.quantity.name(),
                            e.min,
                            e.max
                        );
                    }
                }
            }
        }
    }

    #[test]
    fn worst_checks_take_the_extreme_on_the_requirements_side() {
        // A lower bound is judged at the box's minimum, an upper bound at
        // its maximum, each with the vertex that gives it; the gain in dB;
        // unset requirements are left out.
        let stage = ce_stage();
        let wc = worst_case(&stage, &Tolerances::default()).unwrap();
        let swing = wc.get(Quantity::Swing).unwrap();
        let current = wc.get(Quantity::SupplyCurrent).unwrap();
        let gain = wc.get(Quantity::VoltageGain).unwrap();
        let req = Requirements {
            min_swing: Some(swing.min * 1.001),
            max_supply_current: Some(current.max * 1.001),
            min_voltage_gain_db: Some(db20(gain.min) - 0.1),
            ..Requirements::default()
        };
        let checks = worst_checks(&req, &wc);
        let ids: Vec<&str> = checks.iter().map(|c| c.check.id.as_str()).collect();
        assert_eq!(
            ids,
            ["min_voltage_gain_db", "min_swing", "max_supply_current"]
        );
        assert!(checks[0].check.pass);
        assert_eq!(checks[0].check.value, db20(gain.min));
        assert_eq!(checks[0].check.unit, "dB");
        assert!(!checks[1].check.pass, "the worst swing is below the limit");
        assert_eq!(checks[1].check.value, swing.min);
        assert_eq!(checks[1].corner.as_ref(), Some(&swing.min_corner));
        assert!(checks[2].check.pass);
        assert_eq!(checks[2].check.value, current.max);
        assert_eq!(checks[2].corner.as_ref(), Some(&current.max_corner));
    }

    #[test]
    fn the_same_seed_gives_the_same_numbers() {
        // Bit-identical results for one seed (exact equality, no tolerance:
        // the generator and every step after it are deterministic); another
        // seed gives other numbers.
        let stage = ce_stage();
        let tol = Tolerances::default();
        let req = Requirements::default();
        let run = |seed| {
            let mut mc = MonteCarlo::new(&stage, &tol, &req, 200, seed).unwrap();
            mc.run();
            mc
        };
        let (a, b, c) = (run(9), run(9), run(10));
        for q in Quantity::ALL {
            let (va, vb, vc): (Vec<u64>, Vec<u64>, Vec<u64>) = (
                a.samples(q).map(f64::to_bits).collect(),
                b.samples(q).map(f64::to_bits).collect(),
                c.samples(q).map(f64::to_bits).collect(),
            );
            assert_eq!(va, vb, "{}", q.name());
            if q != Quantity::FLow || a.model.lower.is_some() {
                assert_ne!(va, vc, "{}", q.name());
            }
        }
        assert_eq!(a.summary(), b.summary());
    }

    #[test]
    fn chunking_does_not_change_the_results() {
        // Trial i depends only on the seed and i (module docs): chunks of
        // odd sizes run out of order give bit-identical samples and summary.
        let stage = cc_stage();
        let tol = Tolerances::default();
        let req = Requirements {
            min_swing: Some(3.0),
            ..Requirements::default()
        };
        let mut whole = MonteCarlo::new(&stage, &tol, &req, 100, 77).unwrap();
        whole.run();
        let mut parts = MonteCarlo::new(&stage, &tol, &req, 100, 77).unwrap();
        assert_eq!(parts.run_chunk(60, 1000), 40);
        assert_eq!(parts.run_chunk(13, 47), 47);
        assert!(!parts.is_complete());
        assert_eq!(parts.run_chunk(0, 13), 13);
        assert_eq!(parts.run_chunk(100, 5), 0);
        assert!(parts.is_complete());
        for q in Quantity::ALL {
            let a: Vec<u64> = whole.samples(q).map(f64::to_bits).collect();
            let b: Vec<u64> = parts.samples(q).map(f64::to_bits).collect();
            assert_eq!(a, b, "{}", q.name());
        }
        assert_eq!(whole.summary(), parts.summary());
    }

    #[test]
    fn fast_trial_corners_match_the_precise_search() {
        // The Monte Carlo corner (predicted start, one second-order step,
        // more only when that step is large) against the search converged to
        // 10⁻¹⁰ in ln f, trial by trial, on two stages: the module docs
        // promise about 10⁻⁵ relative; 5·10⁻⁵ is the bound checked.
        for (stage, seed) in [(ce_stage(), 5u64), (cc_stage(), 6)] {
            let n = 300;
            let tol = Tolerances::default();
            let mut mc = MonteCarlo::new(&stage, &tol, &Requirements::default(), n, seed).unwrap();
            mc.run();
            let mut stream = Stream::at(seed, 0);
            let mut worst: f64 = 0.0;
            for i in 0..n {
                let mut u = [0.0; DRAWS_PER_TRIAL as usize];
                for v in u.iter_mut() {
                    *v = stream.uniform();
                }
                let m = &mc.model;
                let x = m.draw(&u).0;
                let precise = m.evaluate(&x, m.lower, m.upper, PRECISE).unwrap();
                let fast = mc.values[i];
                for q in [Quantity::FLow, Quantity::FHigh] {
                    let (a, b) = (fast[q.index()], precise.get(q));
                    worst = worst.max(rel(a, b));
                    assert!(rel(a, b) < 5e-5, "trial {i} {}: {a} vs {b}", q.name());
                }
                // Everything else is the same computation: equal to the last bit.
                assert_eq!(fast[Quantity::Ic.index()], precise.get(Quantity::Ic));
            }
            std::println!(
                "{:?}: largest relative corner error over {n} trials: {worst:.2e}",
                stage.kind
            );
        }
    }

    #[test]
    fn emitter_resistance_sets_the_collector_current() {
        // With a stiff divider IC ≈ (VB − VBE)/RE (common practice; Sedra &
        // Smith's bias design), so a percent more total emitter resistance
        // gives about a percent less current: the two emitter sensitivities
        // add up to about −1. The divider's loading and the VBE shift with
        // current take a little off; 0.1 covers them.
        let table = sensitivity(&ce_stage()).unwrap();
        let s = |q: Quantity, p: Parameter| {
            table
                .iter()
                .find(|e| e.quantity == q && e.parameter == p)
                .map_or(0.0, |e| e.percent_per_percent)
        };
        let total = s(Quantity::Ic, Parameter::Re) + s(Quantity::Ic, Parameter::ReBypassed);
        assert!(libm::fabs(total + 1.0) < 0.1, "S = {total}");
        // The output impedance of a common-emitter stage is about RC
        // (Sedra & Smith, ch. 7): its sensitivity to rc is about +1 (ro
        // takes a few percent off).
        let z = s(Quantity::OutputImpedance, Parameter::Rc);
        assert!(libm::fabs(z - 1.0) < 0.05, "S = {z}");
        // The table is sorted by magnitude, largest first (exact ordering).
        for w in table.windows(2) {
            assert!(libm::fabs(w[0].percent_per_percent) >= libm::fabs(w[1].percent_per_percent));
        }
    }

    #[test]
    fn worst_case_corners_point_the_right_way() {
        // Directions every bias text gives (common practice): more hFE, less
        // VBE, a lower r1 (NPN: supply to base), a higher r2, less emitter
        // resistance, more supply and a warmer ambient (VBE falls 2 mV/K)
        // all raise IC. Exact levels, no tolerance.
        let stage = ce_stage();
        let wc = worst_case(&stage, &Tolerances::default()).unwrap();
        let ic = wc.get(Quantity::Ic).unwrap();
        let at = |p| ic.max_corner.level(p).unwrap();
        assert_eq!(at(Parameter::Hfe), Level::Max);
        assert_eq!(at(Parameter::Vbe), Level::Min);
        assert_eq!(at(Parameter::R1), Level::Min);
        assert_eq!(at(Parameter::R2), Level::Max);
        assert_eq!(at(Parameter::Re), Level::Min);
        assert_eq!(at(Parameter::ReBypassed), Level::Min);
        assert_eq!(at(Parameter::Supply), Level::Max);
        assert_eq!(at(Parameter::Ambient), Level::Max);
        // And the lowest IC at the opposite corner.
        let lo = |p| ic.min_corner.level(p).unwrap();
        assert_eq!(lo(Parameter::Hfe), Level::Min);
        assert_eq!(lo(Parameter::Supply), Level::Min);
        // The capacitors only matter to the corners: the smallest capacitors
        // give the highest lower corner.
        let fl = wc.get(Quantity::FLow).unwrap();
        assert_eq!(fl.max_corner.level(Parameter::CEmitter), Some(Level::Min));
        assert_eq!(
            ic.max_corner.level(Parameter::CEmitter),
            Some(Level::Nominal)
        );
        // 2⁹ vertices: five resistors, hFE, VBE, ambient, supply; the example
        // stage stays active at every one of them.
        assert_eq!(wc.vertices, 512);
        assert_eq!(wc.inactive_vertices, 0);
        // The nominal lies inside every range (exact comparison).
        for e in &wc.extremes {
            assert!(
                e.min <= e.nominal && e.nominal <= e.max,
                "{}",
                e.quantity.name()
            );
        }
    }

    #[test]
    fn worst_case_ic_spread_of_a_stiff_divider_is_modest() {
        // The example stage's divider is stiff (RTH = 8.2 kΩ against
        // 0.1·hfe_min·RE = 11.4 kΩ), so the hFE range alone (110 to 400)
        // moves IC by only a few percent: below 10 %, the bias-stability
        // limit of this crate (common practice). Checked with every other
        // tolerance set to zero.
        let stage = ce_stage();
        let t = Temperature::from_celsius(25.0);
        let tol = Tolerances {
            resistor_tolerance: 0.0,
            capacitor_tolerance: 0.0,
            supply_tolerance: 0.0,
            vbe_spread: 0.0,
            ambient_min: t,
            ambient_max: t,
        };
        let wc = worst_case(&stage, &tol).unwrap();
        assert_eq!(wc.vertices, 2);
        let ic = wc.get(Quantity::Ic).unwrap();
        assert!(rel(ic.max, ic.min) < 0.10, "{} to {}", ic.min, ic.max);
        assert!(ic.max > ic.min);
    }

    #[test]
    fn vertices_outside_the_active_region_are_counted() {
        // With a 7.5 kΩ collector resistor the example stage sits about half
        // a volt above saturation (by hand: 12 V − 1.35 mA·7.5 kΩ − 1.4 V of
        // VE ≈ 0.5 V), so its high-current corners saturate: some vertices
        // leave the active region and the worst case says so (module docs).
        // Counts, no tolerance.
        let mut stage = ce_stage();
        stage.parts.rc = 7.5e3;
        let wc = worst_case(&stage, &Tolerances::default()).unwrap();
        assert!(wc.inactive_vertices > 0 && wc.inactive_vertices < wc.vertices);
    }

    #[test]
    fn yield_counts_the_trials_that_meet_every_requirement() {
        // No requirement: every solved trial passes (yield exactly 1). An
        // impossible one (1 MV of swing): none does (exactly 0). A lower
        // corner limit between the worst-case extremes: some pass, some fail.
        let stage = ce_stage();
        let tol = Tolerances::default();
        let run = |req: Requirements| {
            let mut mc = MonteCarlo::new(&stage, &tol, &req, 300, 3).unwrap();
            mc.run();
            mc.summary()
        };
        assert_eq!(run(Requirements::default()).yield_fraction, 1.0);
        let none = run(Requirements {
            min_swing: Some(1e6),
            ..Requirements::default()
        });
        assert_eq!(none.yield_fraction, 0.0);
        assert_eq!(none.requirements.len(), 1);
        let wc = worst_case(&stage, &tol).unwrap();
        let fl = wc.get(Quantity::FLow).unwrap();
        let some = run(Requirements {
            max_f_low: Some(fl.nominal),
            ..Requirements::default()
        });
        assert!(
            some.yield_fraction > 0.2 && some.yield_fraction < 0.8,
            "{}",
            some.yield_fraction
        );
        assert_eq!(some.completed, 300);
    }

    #[test]
    fn percentiles_interpolate_between_order_statistics() {
        // 1, 2, …, 101: the type-7 percentile at p is 1 + 100·p exactly
        // (Hyndman & Fan's definition 7, from memory), whatever the order
        // before the sort.
        let mut v: Vec<f64> = (1..=101).rev().map(f64::from).collect();
        sort_ascending(&mut v);
        assert_eq!(v, (1..=101).map(f64::from).collect::<Vec<_>>());
        assert_eq!(percentile(&v, 0.01), 2.0);
        assert_eq!(percentile(&v, 0.5), 51.0);
        assert_eq!(percentile(&v, 0.99), 100.0);
        // Between two values: 0, 10 at p = 0.25 gives 2.5.
        let mut w = [10.0, 0.0];
        sort_ascending(&mut w);
        assert!(libm::fabs(percentile(&w, 0.25) - 2.5) < 1e-12);
        v.reverse();
        let d = distribution(Quantity::Ic, &mut v).unwrap();
        assert_eq!(d.histogram.counts.iter().sum::<u32>(), 101);
        assert_eq!((d.min, d.max), (1.0, 101.0));
        assert!(libm::fabs(d.mean - 51.0) < 1e-12);
    }

    #[test]
    fn log_uniform_hfe_has_its_median_at_the_geometric_middle() {
        // The hFE draw is log-uniform (module docs), so its median is
        // √(hfe_min·hfe_max) = √(110·400) ≈ 209.8. Over 2000 trials the
        // sample median of U(0, 1) has a standard error of about 0.011, which
        // maps to about 1.5 % in hFE here; 4 % is well outside that.
        let stage = ce_stage();
        let tol = Tolerances::default();
        let mc = MonteCarlo::new(&stage, &tol, &Requirements::default(), 1, 1).unwrap();
        let m = &mc.model;
        let k = Parameter::Hfe.index();
        let mut s = Stream::at(11, 0);
        let mut draws: Vec<f64> = (0..2000)
            .map(|_| {
                let mut u = [0.5; DRAWS_PER_TRIAL as usize];
                u[k] = s.uniform();
                m.draw(&u).0[k]
            })
            .collect();
        sort_ascending(&mut draws);
        let median = percentile(&draws, 0.5);
        assert!(rel(median, libm::sqrt(110.0 * 400.0)) < 0.04, "{median}");
    }

    #[test]
    fn tolerance_errors_name_the_field() {
        // Messages name the field, the value and what is allowed (style rule).
        let stage = ce_stage();
        let bad = |t: Tolerances| t.validate(&stage).unwrap_err();
        let e = bad(Tolerances {
            resistor_tolerance: -0.1,
            ..Tolerances::default()
        });
        assert_eq!(e.field(), "resistor_tolerance");
        let e = bad(Tolerances {
            ambient_min: Temperature::from_celsius(60.0),
            ambient_max: Temperature::from_celsius(20.0),
            ..Tolerances::default()
        });
        assert_eq!(e.field(), "ambient_min");
        let e = bad(Tolerances {
            ambient_max: Temperature::from_celsius(160.0),
            ..Tolerances::default()
        });
        assert_eq!(e.field(), "ambient_max");
        assert!(alloc::string::ToString::to_string(&e).contains("tj_max"));
        let e = MonteCarlo::new(
            &stage,
            &Tolerances::default(),
            &Requirements::default(),
            0,
            1,
        )
        .unwrap_err();
        assert_eq!(e.field(), "trials");
    }

    #[test]
    fn a_stage_without_capacitors_has_no_corner_results() {
        // Ideal coupling: no lower corner to report, so f_low is left out of
        // the worst case and of the Monte Carlo distributions (exact).
        let mut stage = ce_stage();
        stage.parts.c_in = None;
        stage.parts.c_out = None;
        stage.parts.c_emitter = None;
        let tol = Tolerances::default();
        let wc = worst_case(&stage, &tol).unwrap();
        assert!(wc.get(Quantity::FLow).is_none());
        assert!(wc.get(Quantity::FHigh).is_some());
        let mut mc = MonteCarlo::new(&stage, &tol, &Requirements::default(), 20, 1).unwrap();
        mc.run();
        let s = mc.summary();
        assert!(s.get(Quantity::FLow).is_none());
        assert!(s.get(Quantity::Ic).is_some());
    }
}
