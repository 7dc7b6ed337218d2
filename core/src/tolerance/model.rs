//! The tolerance box and the model that evaluates a stage anywhere in it:
//! the parameters and their levels, the tolerances, and one solve of the
//! operating point, the midband results and the corners at a point.

use super::*;

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

    pub(super) fn index(self) -> usize {
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
pub(super) const DEFAULT_RESISTOR_TOLERANCE: f64 = 0.05;
/// Default capacitor tolerance: ±20 %, the E6 tolerance of IEC 60063 and a
/// usual electrolytic tolerance (common practice).
pub(super) const DEFAULT_CAPACITOR_TOLERANCE: f64 = 0.20;
/// Default supply tolerance: ±5 % (common practice for a regulated rail).
pub(super) const DEFAULT_SUPPLY_TOLERANCE: f64 = 0.05;
/// Default VBE spread, V: small-signal datasheets bound VBE(on) within about
/// ±50 mV of its typical value (from memory).
pub(super) const DEFAULT_VBE_SPREAD: f64 = 0.05;
/// Default ambient range, °C: 0 to 50 °C, indoor equipment (common practice).
pub(super) const DEFAULT_AMBIENT_RANGE: (f64, f64) = (0.0, 50.0);

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
pub(super) struct Model {
    pub(super) stage: Stage,
    pub(super) present: [bool; PARAMETERS],
    pub(super) nominal: [f64; PARAMETERS],
    pub(super) low: [f64; PARAMETERS],
    pub(super) high: [f64; PARAMETERS],
    /// Nominal starts of the corner searches.
    pub(super) lower: Option<Start>,
    pub(super) upper: Option<Start>,
    /// How the nominal stage's corner searches ended, lower and upper.
    pub(super) edges: [Edge; 2],
    /// The nominal results.
    pub(super) sample: Sample,
    /// Where the THD is followed (the `max_thd` requirement's condition),
    /// when it is.
    pub(super) thd: Option<ThdCondition>,
    /// The nominal stage's steady state at that condition, which seeds
    /// every other point's (`None` when not followed or not found).
    pub(super) thd_seed: Option<Waveform>,
    /// Why the nominal stage's THD was not found, when it was not.
    pub(super) thd_nominal_error: Option<alloc::string::String>,
    /// The `max_thd` limit the screening of trials measures against (1
    /// when the THD is not followed).
    pub(super) thd_limit: f64,
}

/// The DC solution of one point, ready for the small-signal work.
pub(super) struct Solved {
    pub(super) stage: Stage,
    pub(super) op: OperatingPoint,
    pub(super) ss: SmallSignal,
}

impl Model {
    /// The model of `stage` with the ranges of `tol` (`None`: nominal only),
    /// following the THD at `thd` when given.
    pub(super) fn new(
        stage: &Stage,
        tol: Option<&Tolerances>,
        thd: Option<ThdCondition>,
    ) -> Result<Model> {
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
            thd,
            thd_seed: None,
            thd_nominal_error: None,
            thd_limit: 1.0,
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
        // The nominal THD, from no seed: the same search as the check's
        // (`Requirements::check`), so the two agree exactly.
        if let Some(c) = thd {
            match LargeSignal::at_bias(&solved.stage, solved.op, &solved.ss)
                .and_then(|l| l.at_output(c.swing, c.frequency))
            {
                Ok(w) => {
                    sample.values[Quantity::Thd.index()] = w.thd;
                    model.thd_seed = Some(w);
                }
                Err(e) => model.thd_nominal_error = Some(alloc::format!("{e}")),
            }
        }
        model.sample = sample;
        Ok(model)
    }

    /// The THD at the followed condition of the solved point `solved`,
    /// seeded from the nominal steady state: NaN when the THD is not
    /// followed; the search's error when the stage does not deliver the
    /// output peak or its steady state is not found.
    pub(super) fn thd_of(&self, solved: &Solved) -> Result<f64> {
        let Some(c) = self.thd else {
            return Ok(f64::NAN);
        };
        let l = LargeSignal::at_bias(&solved.stage, solved.op, &solved.ss)?;
        Ok(
            l.at_output_from(c.swing, c.frequency, self.thd_seed.as_ref())?
                .thd,
        )
    }

    /// The parameters that vary (present and with a range).
    pub(super) fn varying(&self) -> impl Iterator<Item = Parameter> + '_ {
        Parameter::ALL
            .into_iter()
            .filter(|k| self.present[k.index()] && self.high[k.index()] > self.low[k.index()])
    }

    /// The stage and device at the point `x` (absolute parameter values).
    pub(super) fn stage_at(&self, x: &[f64; PARAMETERS]) -> (Stage, Device) {
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
    pub(super) fn draw(
        &self,
        u: &[f64; DRAWS_PER_TRIAL as usize],
    ) -> ([f64; PARAMETERS], [f64; PARAMETERS]) {
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
    pub(super) fn solve(&self, x: &[f64; PARAMETERS]) -> Result<Solved> {
        let (stage, device) = self.stage_at(x);
        let op = OperatingPoint::solve(&stage, &device)?;
        let ss = SmallSignal::at(&stage, &op);
        Ok(Solved { stage, op, ss })
    }

    /// Every result at `x`; the corners start from `lower` and `upper`.
    #[cfg(test)]
    pub(super) fn evaluate(
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
    pub(super) fn evaluate_shaped(
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
        s.values[Quantity::Thd.index()] = self.thd_of(&solved).unwrap_or(f64::NAN);
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
    /// accepted after one solve when the step is small; the THD (when
    /// followed) predicted as `thd_predicted` when the screening of the
    /// module docs allows it, else solved. The flag says it was solved.
    pub(super) fn evaluate_quick(
        &self,
        x: &[f64; PARAMETERS],
        lower: Option<Start>,
        upper: Option<Start>,
        thd_predicted: f64,
    ) -> Result<(Sample, bool)> {
        let solved = self.solve(x)?;
        let resp = Response::new(&solved.stage, &solved.ss)?;
        let mut s = midband_sample(&solved, &resp);
        corners_into(&resp, lower, upper, FAST, true, &mut s)?;
        let Some(c) = self.thd else {
            return Ok((s, false));
        };
        let limit = self.thd_limit;
        let screened = thd_predicted.is_finite()
            && thd_predicted < SCREEN_SHARE * limit
            && s.get(Quantity::Swing) >= SCREEN_HEADROOM * c.swing
            && s.active;
        if screened {
            s.values[Quantity::Thd.index()] = thd_predicted;
            return Ok((s, false));
        }
        // A THD not found (the peak not delivered) is NaN: the trial fails
        // max_thd and is left out of the THD's percentiles.
        s.values[Quantity::Thd.index()] = self.thd_of(&solved).unwrap_or(f64::NAN);
        Ok((s, true))
    }
}

/// The DC and midband results of a solved point (corners NaN).
pub(super) fn midband_sample(solved: &Solved, resp: &Response) -> Sample {
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
pub(super) fn corners_into(
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
