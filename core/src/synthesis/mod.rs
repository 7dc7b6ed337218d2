//! Design to a requirement: from a specification to a stage of standard parts.
//!
//! A [`Spec`] gives what is fixed (stage, transistor, supply, source and
//! load), what must be met (the [`Requirements`]) and how to decide the rest
//! (the design intents: [`Bias`], saturation reserve, divider stiffness,
//! emitter share of the supply, part series, pinned parts). [`synthesize`]
//! returns the ideal continuous design, the same design in standard values,
//! both analysed by [`crate::analyze`], and what changed between them.
//!
//! # The procedure
//! Everything below is in the NPN frame (a PNP stage is its mirror image:
//! the same numbers, with `r1` and `r2` trading places in the divider).
//! VCE(min) = VCE(sat) + `saturation_reserve`.
//!
//! 1. **The quiescent point** sits at the centre of the AC load line, where
//!    the output clips at both ends at once (Malvino & Bates, *Electronic
//!    Principles*, ch. 12; the rule is VCEQ − VCE(min) = ICQ·rac):
//!
//!    ```text
//!    common emitter / base: rac = RC∥RL, Re = unbypassed emitter resistance (0 for common base)
//!      VCEQ − VCE(min) = ICQ·(rac + Re)     VCEQ = VCC − ICQ·RC − VE
//!      ⇒ ICQ = (VCC − VCE(min) − VE)/(RC + rac + Re)
//!    common collector: rac = RE∥RL
//!      VCEQ − VCE(min) = IEQ·(rac + RC)     VCEQ = VCC − α·IEQ·RC − IEQ·RE
//!      ⇒ IEQ = (VCC − VCE(min))/(RE + rac + (1 + α)·RC)
//!    ```
//!
//!    The symmetric swing there is ICQ·rac (IEQ·rac for the follower). One
//!    resistor, RC (RE for the follower), is still free: every choice
//!    gives a centred point, and a smaller one gives more swing, more gain
//!    headroom and a lower output impedance for more current. With `bias`
//!    `"max-swing"` it is the value nearest to RL (the starting rule: one
//!    third of the available voltage as peak swing) that meets every
//!    requirement, the transistor's ratings and the resistors' power (half
//!    their rating, as the ratings check allows) with a 5 % margin, found by
//!    a scan over six decades (four points a decade) and a bisection of the
//!    boundary, so the stage draws no more current than the requirements
//!    need. When no value leaves that margin, the scan is repeated without
//!    it, and a window narrower than the grid (two requirements pulling
//!    opposite ways) is searched by a golden section of the total shortfall.
//!    With a given `ic` or `vce` it is the value that
//!    centres that point; when no value can (a `vce` above the middle of the
//!    load line), the point is kept off-centre and the scan chooses RC.
//! 2. **The emitter**: VE = `emitter_fraction`·VCC (0.1, the common rule
//!    that keeps VBE's −2 mV/K drift small against VE), or more when the
//!    unbypassed part needs more. In a common-emitter stage the gain sets
//!    the unbypassed part (Sedra & Smith, ch. 7):
//!
//!    ```text
//!    |Av| = β0·(rac∥ro)/(rbb' + rπ + (β0 + 1)·Re)  ⇒  Re = (β0·(rac∥ro)/|Av| − rbb' − rπ)/(β0 + 1)
//!    ```
//!
//!    then corrected on the nodal midband gain by secant steps. The target
//!    is the middle of the gain window in dB, or 1 dB inside a one-sided
//!    limit; with no gain requirement the whole emitter resistance is bypassed.
//! 3. **The divider**: Thevenin resistance RTH = k·hFE(min)·RE with
//!    k = `stiffness` (0.1, common practice: the base current then moves VB
//!    by at most about a tenth of VE), unless `min_input_impedance` needs
//!    more (RB = r1∥r2 = RTH is in parallel with the base); then
//!    RTH = Zin·Zb/(Zb − Zin) with Zb taken from the nodal solution. VTH
//!    follows from the device model at the target current, so the ideal
//!    design hits ICQ exactly: VTH = VE + VBE(IC) + IB·(RTH + rbb'),
//!    R_up = RTH·VCC/VTH, R_down = RTH·VCC/(VCC − VTH).
//! 4. **The capacitors** by the short-circuit time-constant method (Gray &
//!    Meyer, *Analysis and Design of Analog Integrated Circuits*; Sedra &
//!    Smith, ch. 9): with the others shorted, capacitor i sees Rᵢ and
//!    ω_L ≈ Σ 1/(Rᵢ·Cᵢ). **Sharing rule**: the corner is shared in
//!    proportion to 1/√Rᵢ, which gives the smallest total capacitance
//!    (minimise ΣCᵢ subject to Σ 1/(RᵢCᵢ) = ω_L with a Lagrange multiplier:
//!    Cᵢ ∝ 1/√Rᵢ; computed here, no published source), so the capacitor on
//!    the lowest-resistance node (the emitter bypass, or the emitter input of
//!    a common-base stage) takes the largest share. Pinned capacitors take
//!    their own share first. The values are then scaled together until the
//!    exact nodal corner is 80 % of `max_f_low` (20 Hz, [`DEFAULT_F_LOW`],
//!    without that requirement).
//! 5. **Standard values**: capacitors go to the next value up of their
//!    series (so that corners only move down). Each free resistor takes one
//!    of the two standard values around its continuous value, every
//!    combination is solved (at most 2⁵ = 32), and the one kept meets the
//!    requirements and moves IC, VCE and the gain least. When none meets
//!    them, wider moves are tried (one or two parts one more standard step,
//!    the move that most reduces the total shortfall first), and the
//!    capacitors are moved up a step when only the lower corner fails,
//!    before the design is given up with an error that names the
//!    requirement and the shortfall. The result is checked by
//!    [`crate::analyze`] itself.
//!
//! `max_thd` is not designed for: the search works on the load-line swing
//! (`min_swing`, with its saturation reserve), and a THD at every step
//! would cost a steady state each. The standard-value design's checks
//! include it ([`crate::Requirements::check`]), so a design that meets
//! the load line but not the THD says so.
//!
//! Pinned parts replace the rule that would have chosen them: a pinned `rc`
//! (`re` for the follower) replaces the scan; a pinned `re` of a
//! common-emitter stage replaces the gain rule; a pinned `re_bypassed` (or
//! the `re` of a common-base stage) replaces the emitter-voltage rule; one
//! pinned divider resistor replaces the stiffness rule; both replace it and
//! the emitter-voltage rule, and if the emitter resistance is pinned too,
//! the parts alone fix the collector current.
//!
//! A specification that cannot be met is an [`ErrorKind::Inconsistent`]
//! error naming the requirement, the best value reached and the shortfall.

use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

mod bias;
mod capacitors;
mod search;
mod shortfall;
mod standard_values;

use bias::*;
use shortfall::*;
use standard_values::*;

use crate::analysis::{analyze, Analysis};
use crate::constants::Temperature;
use crate::corner::{corner_level, find_corner, ln_gain, Start};
use crate::decibel::db20;
use crate::error::{non_negative, positive, within, Error, Result};
use crate::eseries::ESeries;
use crate::figures::Quantity;
use crate::format::format_si;
use crate::hybrid_pi::SmallSignal;
use crate::operating_point::{OperatingPoint, Region};
use crate::parallel::parallel;
use crate::ratings::{Check, Dissipation, RESISTOR_DERATING};
use crate::requirements::{Bound, Requirements};
use crate::response::Response;
use crate::response::Side;
use crate::stage::{
    Parts, Stage, StageKind, DEFAULT_RESISTOR_RATING, MAX_CAPACITANCE, MAX_RESISTANCE, MAX_SUPPLY,
};
use crate::swing::Swing;
use crate::tolerance::Tolerances;
use crate::transistor::{Device, Polarity, TransistorData};

#[cfg(doc)]
use crate::error::ErrorKind;

/// Default volts kept between the lowest VCE of a full swing and VCE(sat)
/// (common practice: half a volt to a volt keeps the stage out of the
/// saturation knee and leaves room for tolerances).
pub const DEFAULT_SATURATION_RESERVE: f64 = 0.5;
/// Default divider stiffness k in RTH ≤ k·hFE(min)·RE (common practice).
pub const DEFAULT_STIFFNESS: f64 = 0.1;
/// Default emitter voltage as a share of the supply (common practice: VE ≈ VCC/10).
pub const DEFAULT_EMITTER_FRACTION: f64 = 0.1;
/// Lower corner the capacitors are sized for without a `max_f_low`
/// requirement, Hz (the low end of the audio band, common practice).
pub const DEFAULT_F_LOW: f64 = 20.0;
/// The capacitors are sized for this share of `max_f_low`.
const CORNER_MARGIN: f64 = 0.8;
/// Relative margin inside each requirement while choosing the bias.
const DESIGN_MARGIN: f64 = 0.05;
/// Gain target inside a one-sided gain limit, dB.
const GAIN_MARGIN_DB: f64 = 1.0;
/// Most margin on a gain check while choosing the bias, dB.
const GAIN_CHECK_MARGIN_DB: f64 = 0.2;
/// Scan of the free resistor: points per decade.
const SCAN_PER_DECADE: i32 = 4;
/// Scan of the free resistor: decades either side of RL.
const SCAN_DECADES: i32 = 3;

/// How the quiescent point is chosen.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum Bias {
    /// At the centre of the AC load line, the current set by the
    /// requirements (design file: `"max-swing"`).
    MaxSwing,
    /// This collector current, A, centred on the load line when it can be
    /// (design file: `{"ic": 0.002}`).
    Ic(f64),
    /// This |VCE|, V, centred on the load line when it can be
    /// (design file: `{"vce": 5}`).
    Vce(f64),
}

/// The series the parts are chosen from, and their tolerances.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Series {
    /// Resistor series (usually E12, E24 or E96).
    pub resistors: ESeries,
    /// Capacitor series (usually E6 or E12).
    pub capacitors: ESeries,
    /// Resistor tolerance as a fraction; `None`: the series' usual one.
    pub resistor_tolerance: Option<f64>,
    /// Capacitor tolerance as a fraction; `None`: the series' usual one.
    pub capacitor_tolerance: Option<f64>,
}

impl Default for Series {
    fn default() -> Self {
        Series {
            resistors: ESeries::E24,
            capacitors: ESeries::E12,
            resistor_tolerance: None,
            capacitor_tolerance: None,
        }
    }
}

/// Parts fixed by the user (design file: `"parts": {"re": 200}`); the rest
/// is solved around them. Ohms and farads.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "serde", serde(default, deny_unknown_fields))]
pub struct PinnedParts {
    /// Supply to base.
    pub r1: Option<f64>,
    /// Base to ground.
    pub r2: Option<f64>,
    /// Collector resistor (a follower may have one).
    pub rc: Option<f64>,
    /// Unbypassed emitter resistance (0 allowed in a common-emitter stage).
    pub re: Option<f64>,
    /// Bypassed emitter resistance (common emitter).
    pub re_bypassed: Option<f64>,
    /// Input coupling capacitor.
    pub c_in: Option<f64>,
    /// Output coupling capacitor.
    pub c_out: Option<f64>,
    /// Emitter bypass capacitor (common emitter).
    pub c_emitter: Option<f64>,
    /// Base bypass capacitor (common base).
    pub c_base: Option<f64>,
}

/// A design specification (design file `"format": "stagewright-spec/1"`).
#[derive(Debug, Clone, PartialEq)]
pub struct Spec {
    /// The configuration (`stage`).
    pub stage: StageKind,
    /// The transistor, from its data or a preset; its `polarity` is the stage's.
    pub transistor: TransistorData,
    /// Supply voltage, V.
    pub supply: f64,
    /// Ambient temperature the design is made at.
    pub ambient: Temperature,
    /// Source resistance, Ω.
    pub rs: f64,
    /// Load resistance, Ω.
    pub rl: f64,
    /// What the design must meet.
    pub requirements: Requirements,
    /// How the quiescent point is chosen.
    pub bias: Bias,
    /// Volts kept above VCE(sat) at the lowest point of a full swing.
    pub saturation_reserve: f64,
    /// k in RTH ≤ k·hFE(min)·RE.
    pub stiffness: f64,
    /// Emitter voltage as a share of the supply (common emitter and common base).
    pub emitter_fraction: f64,
    /// Series and tolerances of the parts.
    pub series: Series,
    /// Parts fixed by the user.
    pub parts: PinnedParts,
    /// Power rating of every resistor, W.
    pub resistor_rating: f64,
}

impl Spec {
    /// A specification with every design intent at its default:
    /// `"max-swing"`, 0.5 V reserve, k = 0.1, VE = VCC/10, E24 resistors,
    /// E12 capacitors, 25 °C, no requirement and no pinned part.
    pub fn new(
        stage: StageKind,
        transistor: TransistorData,
        supply: f64,
        rs: f64,
        rl: f64,
    ) -> Spec {
        Spec {
            stage,
            transistor,
            supply,
            ambient: Temperature::from_celsius(25.0),
            rs,
            rl,
            requirements: Requirements::default(),
            bias: Bias::MaxSwing,
            saturation_reserve: DEFAULT_SATURATION_RESERVE,
            stiffness: DEFAULT_STIFFNESS,
            emitter_fraction: DEFAULT_EMITTER_FRACTION,
            series: Series::default(),
            parts: PinnedParts::default(),
            resistor_rating: DEFAULT_RESISTOR_RATING,
        }
    }

    /// The tolerances of a stage built to this specification: the series'
    /// resistor and capacitor tolerances, the rest at their defaults.
    pub fn tolerances(&self) -> Tolerances {
        Tolerances {
            resistor_tolerance: self
                .series
                .resistor_tolerance
                .unwrap_or(self.series.resistors.tolerance()),
            capacitor_tolerance: self
                .series
                .capacitor_tolerance
                .unwrap_or(self.series.capacitors.tolerance()),
            ..Tolerances::default()
        }
    }

    /// Checks every field; the error names the field as the design file spells it.
    pub fn validate(&self) -> Result<()> {
        within("supply", self.supply, 0.0, MAX_SUPPLY, "V")?;
        positive("supply", self.supply, "V")?;
        within("ambient", self.ambient.celsius(), -60.0, 200.0, "°C")?;
        self.transistor
            .validate()
            .map_err(|e| e.within("transistor"))?;
        if self.ambient.kelvin() >= self.transistor.tj_max.kelvin() {
            return Err(Error::inconsistent(
                "ambient",
                format!(
                    "the ambient ({} °C) must be below the transistor's tj_max ({} °C)",
                    self.ambient.celsius(),
                    self.transistor.tj_max.celsius()
                ),
            ));
        }
        non_negative("rs", self.rs, "Ω")?;
        within("rs", self.rs, 0.0, MAX_RESISTANCE, "Ω")?;
        positive("rl", self.rl, "Ω")?;
        within("rl", self.rl, 0.0, MAX_RESISTANCE, "Ω")?;
        within(
            "saturation_reserve",
            self.saturation_reserve,
            0.0,
            0.5 * self.supply,
            "V",
        )?;
        within("stiffness", self.stiffness, 0.001, 10.0, "")?;
        within("emitter_fraction", self.emitter_fraction, 0.001, 0.5, "")?;
        positive("resistor_rating", self.resistor_rating, "W")?;
        within("resistor_rating", self.resistor_rating, 0.0, 1000.0, "W")?;
        if let Some(t) = self.series.resistor_tolerance {
            within("series.resistor_tolerance", t, 0.0, 0.5, "")?;
        }
        if let Some(t) = self.series.capacitor_tolerance {
            within("series.capacitor_tolerance", t, 0.0, 0.9, "")?;
        }
        match self.bias {
            Bias::MaxSwing => {}
            Bias::Ic(i) => {
                positive("bias.ic", i, "A")?;
                within("bias.ic", i, 0.0, self.transistor.ic_max, "A")?;
            }
            Bias::Vce(v) => {
                positive("bias.vce", v, "V")?;
                let vmin = self.transistor.vce_sat;
                if v <= vmin || v >= self.supply {
                    return Err(Error::out_of_range(
                        "bias.vce",
                        v,
                        "V",
                        format!(
                            "between VCE(sat) ({}) and the supply ({})",
                            format_si(vmin, "V"),
                            format_si(self.supply, "V")
                        ),
                    ));
                }
            }
        }
        self.validate_parts()?;
        self.validate_requirements()
    }

    fn validate_parts(&self) -> Result<()> {
        let p = &self.parts;
        let kind = self.stage;
        let not_here = |field: &str, reason: &'static str| {
            Err(Error::new(
                field,
                crate::error::ErrorKind::NotApplicable {
                    stage: kind.name(),
                    reason,
                },
            ))
        };
        match kind {
            StageKind::CommonEmitter => {
                if p.c_base.is_some() {
                    return not_here("parts.c_base", "only a common-base stage bypasses its base");
                }
            }
            StageKind::CommonCollector => {
                if p.re_bypassed.is_some() {
                    return not_here(
                        "parts.re_bypassed",
                        "a follower's emitter resistor carries the output and is not bypassed",
                    );
                }
                if p.c_emitter.is_some() {
                    return not_here("parts.c_emitter", "a follower's emitter is its output");
                }
                if p.c_base.is_some() {
                    return not_here("parts.c_base", "only a common-base stage bypasses its base");
                }
            }
            StageKind::CommonBase => {
                if p.re_bypassed.is_some() {
                    return not_here(
                        "parts.re_bypassed",
                        "the emitter is the input of a common-base stage",
                    );
                }
                if p.c_emitter.is_some() {
                    return not_here(
                        "parts.c_emitter",
                        "the emitter is the input of a common-base stage",
                    );
                }
            }
        }
        for (name, v) in [
            ("parts.r1", p.r1),
            ("parts.r2", p.r2),
            ("parts.re_bypassed", p.re_bypassed),
        ] {
            if let Some(r) = v {
                positive(name, r, "Ω")?;
                within(name, r, 0.0, MAX_RESISTANCE, "Ω")?;
            }
        }
        if let Some(r) = p.rc {
            if kind == StageKind::CommonCollector {
                non_negative("parts.rc", r, "Ω")?;
            } else {
                positive("parts.rc", r, "Ω")?;
            }
            within("parts.rc", r, 0.0, MAX_RESISTANCE, "Ω")?;
        }
        if let Some(r) = p.re {
            if kind == StageKind::CommonEmitter {
                non_negative("parts.re", r, "Ω")?;
            } else {
                positive("parts.re", r, "Ω")?;
            }
            within("parts.re", r, 0.0, MAX_RESISTANCE, "Ω")?;
        }
        for (name, v) in [
            ("parts.c_in", p.c_in),
            ("parts.c_out", p.c_out),
            ("parts.c_emitter", p.c_emitter),
            ("parts.c_base", p.c_base),
        ] {
            if let Some(c) = v {
                positive(name, c, "F")?;
                within(name, c, 0.0, MAX_CAPACITANCE, "F")?;
            }
        }
        Ok(())
    }

    fn validate_requirements(&self) -> Result<()> {
        let r = &self.requirements;
        let field = |f: &str| format!("requirements.{f}");
        if let Some(v) = r.min_voltage_gain_db {
            within(&field("min_voltage_gain_db"), v, -200.0, 200.0, "dB")?;
        }
        if let Some(v) = r.max_voltage_gain_db {
            within(&field("max_voltage_gain_db"), v, -200.0, 200.0, "dB")?;
            if let Some(lo) = r.min_voltage_gain_db {
                if v < lo {
                    return Err(Error::out_of_range(
                        field("max_voltage_gain_db"),
                        v,
                        "dB",
                        format!("at least min_voltage_gain_db ({lo} dB)"),
                    ));
                }
            }
        }
        for (name, v, unit) in [
            ("min_input_impedance", r.min_input_impedance, "Ω"),
            ("max_output_impedance", r.max_output_impedance, "Ω"),
            ("min_swing", r.min_swing, "V"),
            ("max_f_low", r.max_f_low, "Hz"),
            ("min_f_high", r.min_f_high, "Hz"),
            ("max_supply_current", r.max_supply_current, "A"),
        ] {
            if let Some(v) = v {
                positive(&field(name), v, unit)?;
            }
        }
        if let Some(v) = r.max_junction_temperature {
            within(
                &field("max_junction_temperature"),
                v,
                self.ambient.celsius(),
                1000.0,
                "°C",
            )?;
        }
        Ok(())
    }
}

/// The ideal continuous solution.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Target {
    /// Collector current, A.
    pub ic: f64,
    /// |VCE|, V.
    pub vce: f64,
    /// Symmetric peak swing at the load the point was designed for, V.
    pub swing: f64,
    /// Emitter voltage from its rail, V.
    pub ve: f64,
    /// Thevenin resistance of the divider, Ω.
    pub rth: f64,
    /// Voltage gain the unbypassed emitter resistance was set for, dB
    /// (common emitter with a gain requirement).
    pub voltage_gain_db: Option<f64>,
    /// The lower corner the capacitors were sized for, Hz.
    pub f_low: f64,
    /// True when the quiescent point is at the centre of the AC load line.
    pub centred: bool,
}

/// How one part was chosen.
#[derive(Debug, Clone, PartialEq)]
pub struct PartChoice {
    /// The design-file name: `r1`, `c_in`, ...
    pub part: &'static str,
    /// The continuous value, Ω or F.
    pub ideal: f64,
    /// The value chosen, Ω or F.
    pub chosen: f64,
    /// True when the user pinned it.
    pub pinned: bool,
    /// The series it was taken from (`None` when pinned).
    pub series: Option<ESeries>,
    /// `chosen/ideal − 1`.
    pub change: f64,
}

/// One result before and after snapping to standard values.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Difference {
    /// The result: `ic`, `vce`, `swing`, `voltage_gain_db`, `input_impedance`,
    /// `output_impedance`, `f_low`, `f_high`, `supply_current`, `junction_temperature`.
    pub quantity: &'static str,
    /// Unit symbol.
    pub unit: &'static str,
    /// In the ideal continuous design.
    pub ideal: Option<f64>,
    /// In the standard-value design.
    pub snapped: Option<f64>,
    /// `snapped − ideal`, in the unit.
    pub difference: Option<f64>,
}

/// A finished design.
#[derive(Debug, Clone)]
pub struct Synthesis {
    /// The ideal continuous solution.
    pub target: Target,
    /// The stage with the continuous part values.
    pub ideal: Stage,
    /// [`crate::analyze`] of `ideal`.
    pub ideal_analysis: Analysis,
    /// The stage with standard values (pinned parts as given).
    pub stage: Stage,
    /// [`crate::analyze`] of `stage`.
    pub analysis: Analysis,
    /// Each part: continuous value, chosen value, series.
    pub parts: Vec<PartChoice>,
    /// Each result before and after snapping.
    pub differences: Vec<Difference>,
    /// The requirements checked on `analysis` (all pass).
    pub checks: Vec<Check>,
    /// Decisions worth knowing, as sentences.
    pub notes: Vec<String>,
}

/// Designs a stage to `spec` (see the module docs for the procedure).
///
/// # Errors
/// A field outside its range names the field. A specification that cannot
/// be met is [`ErrorKind::Inconsistent`], about the requirement (for example
/// `requirements.min_swing`), with the best value reached and the shortfall.
pub fn synthesize(spec: &Spec) -> Result<Synthesis> {
    spec.validate()?;
    let ctx = Ctx::new(spec)?;
    let mut notes = Vec::new();
    let (r, rule) = ctx.choose(&mut notes)?;
    let (point, stage0, m0) = ctx.design_at(r, rule).ok_or_else(|| {
        Error::inconsistent(
            "bias",
            "no working bias point exists for this supply, load and the pinned parts",
        )
    })?;
    // The continuous design must meet every requirement that does not
    // depend on the capacitors (those are sized next).
    let gaps = ctx.gaps(&stage0, &m0, 0.0);
    if let Some(msg) = explain(&gaps, None) {
        return Err(msg);
    }
    let (caps, f_target) = ctx.size_caps(&point, &stage0, &m0, &mut notes)?;
    let ideal = ctx.stage_of(&point, &caps);
    let ideal_analysis = analyze(&ideal)?;
    let (stage, analysis) = ctx.snap(&ideal, &mut notes)?;
    let checks = spec.requirements.check(&stage, &analysis);
    let parts = part_choices(spec, &ideal, &stage);
    let differences = differences(&ideal_analysis, &analysis);
    let gain_db = if spec.stage == StageKind::CommonEmitter && spec.parts.re.is_none() {
        ctx.gain.map(db20)
    } else {
        None
    };
    Ok(Synthesis {
        target: Target {
            ic: point.ic,
            vce: point.vce,
            swing: point.swing,
            ve: point.ve,
            rth: point.rth,
            voltage_gain_db: gain_db,
            f_low: f_target,
            centred: rule == Rule::Centre,
        },
        ideal,
        ideal_analysis,
        stage,
        analysis,
        parts,
        differences,
        checks,
        notes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::error::ErrorKind;
    use crate::presets::preset;
    use alloc::string::ToString;

    fn rel(a: f64, b: f64) -> f64 {
        libm::fabs(a - b) / libm::fabs(b)
    }

    fn spec(kind: StageKind, device: &str, supply: f64, rl: f64) -> Spec {
        Spec::new(kind, preset(device).unwrap(), supply, 600.0, rl)
    }

    #[test]
    fn every_design_of_a_grid_meets_its_requirements() {
        // The grid: each stage, both polarities, three supplies, three loads
        // and two swings (15 % and 25 % of the supply, the second near what
        // a class-A stage with VE = VCC/10 gives at RC = RL). Every design,
        // analysed again by the ordinary analysis, must pass every
        // requirement it was designed for: the checks' own limits are the
        // tolerance (Requirements::check compares value and limit exactly).
        let mut designs = 0;
        for kind in StageKind::ALL {
            for device in ["general-purpose-npn", "general-purpose-pnp"] {
                for supply in [9.0, 12.0, 24.0] {
                    for rl in [2.2e3, 10e3, 47e3] {
                        for share in [0.15, 0.25] {
                            let mut s = spec(kind, device, supply, rl);
                            let r = &mut s.requirements;
                            r.min_swing = Some(share * supply);
                            r.max_f_low = Some(50.0);
                            r.max_junction_temperature = Some(100.0);
                            match kind {
                                StageKind::CommonEmitter => {
                                    r.min_voltage_gain_db = Some(20.0);
                                    r.max_voltage_gain_db = Some(26.0);
                                }
                                StageKind::CommonCollector => {
                                    r.min_voltage_gain_db = Some(-1.0);
                                    r.min_input_impedance = Some(10e3);
                                }
                                StageKind::CommonBase => {
                                    r.min_voltage_gain_db = Some(20.0);
                                }
                            }
                            let d = synthesize(&s).unwrap_or_else(|e| {
                                panic!("{kind:?} {device} {supply} V, RL {rl}, {share}: {e}")
                            });
                            let a = analyze(&d.stage).unwrap();
                            for c in s.requirements.check(&d.stage, &a) {
                                assert!(
                                    c.pass,
                                    "{kind:?} {device} {supply} V RL {rl}: {}",
                                    c.message
                                );
                            }
                            assert_eq!(a.operating_point.region, Region::Active);
                            designs += 1;
                        }
                    }
                }
            }
        }
        assert_eq!(designs, 108);
    }

    #[test]
    fn centred_point_on_the_published_ac_load_line() {
        // Malvino & Bates, Electronic Principles, 7th ed., Ex. 12-1 to 12-4:
        // VCC = 30 V, RC = 120 Ω, RE = 20 Ω (bypassed), RL = 180 Ω, so
        // rac = 72 Ω. The book's divider puts Q at ICQ ≈ 147 mA, VCEQ ≈ 9 V:
        // ic(sat) = ICQ + VCEQ/rac ≈ 273 mA, vce(cut) = VCEQ + ICQ·rac ≈ 19.7 V,
        // and the output clips first on the saturation side (9 V < 10.6 V),
        // so the largest peak-to-peak output is 18 V.
        let (icq, vceq, rac) = (0.147, 9.0, 72.0);
        assert!(rel(icq + vceq / rac, 0.273) < 0.01);
        assert!(rel(vceq + icq * rac, 19.7) < 0.01);
        assert!(rel(2.0 * f64::min(vceq, icq * rac), 18.0) < 1e-9);
        // The centring rule (VCE(sat) taken as 0, as the book does) moves Q
        // to VCEQ = ICQ·rac on the DC load line VCC = VCEQ + ICQ·(RC + RE):
        // ICQ = 30/(72 + 140) = 141.5 mA, VCEQ = 10.19 V, 20.4 V peak to peak,
        // more than the book's 18 V. The designed stage (RC and RE pinned to
        // the book's values, a device with VCE(sat) = 0 and ratings large
        // enough) must land there; α ≈ 0.99 moves it by about 0.1 %, so 1 %.
        let mut t = preset("medium-power-npn").unwrap();
        t.vce_sat = 0.0;
        t.ptot_max = 20.0;
        t.rth_ja = 5.0;
        let mut s = Spec::new(StageKind::CommonEmitter, t, 30.0, 50.0, 180.0);
        s.saturation_reserve = 0.0;
        // RC carries about 2.4 W here: resistors rated for it (the ratings
        // check allows half the rating).
        s.resistor_rating = 10.0;
        s.parts.rc = Some(120.0);
        s.parts.re = Some(0.0);
        s.parts.re_bypassed = Some(20.0);
        s.series.resistors = ESeries::E96;
        let d = synthesize(&s).unwrap();
        let icq = 30.0 / (72.0 + 140.0);
        assert!(rel(d.target.ic, icq) < 0.01, "ICQ {}", d.target.ic);
        assert!(
            rel(d.target.vce, icq * 72.0) < 0.01,
            "VCEQ {}",
            d.target.vce
        );
        assert!(
            rel(2.0 * d.target.swing, 20.4) < 0.01,
            "swing {}",
            d.target.swing
        );
        assert!(d.target.centred);
        // The ideal stage, solved by the full model, is centred too: its two
        // clipping limits agree to within 1 % (the model's VCE(sat) is 0 and
        // its VBE is not the book's 0.7 V, but the divider is computed from
        // the model, so the point lands where it was designed).
        let sw = &d.ideal_analysis.swing;
        assert!(
            rel(sw.positive, sw.negative) < 0.01,
            "{} vs {}",
            sw.positive,
            sw.negative
        );
    }

    #[test]
    fn a_swing_beyond_the_supply_is_explained() {
        // 8 V peak from 12 V: a class-A stage gives at most
        // (12 − 0.2 − 0.5)/2 = 5.65 V (the general-purpose preset's VCE(sat)
        // and the default reserve): an Inconsistent error that names the
        // requirement and the 2.35 V shortfall.
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.requirements.min_swing = Some(8.0);
        let e = synthesize(&s).unwrap_err();
        assert_eq!(e.field(), "requirements.min_swing");
        assert!(matches!(e.kind(), ErrorKind::Inconsistent { .. }));
        let text = e.to_string();
        assert!(
            text.contains("5.65 V") && text.contains("short by 2.35 V"),
            "{text}"
        );
    }

    #[test]
    fn an_input_impedance_out_of_reach_is_explained() {
        // 10 MΩ at the input of a common-emitter stage with 20 dB of gain
        // and 1 V of swing: the base itself (β·(re + Re)) stays far below it
        // at any current that gives the swing. The error names the
        // requirement and how far the best design falls short.
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.requirements.min_input_impedance = Some(10e6);
        s.requirements.min_voltage_gain_db = Some(20.0);
        s.requirements.min_swing = Some(1.0);
        let e = synthesize(&s).unwrap_err();
        assert_eq!(e.field(), "requirements.min_input_impedance");
        assert!(matches!(e.kind(), ErrorKind::Inconsistent { .. }));
        assert!(e.to_string().contains("short by"), "{e}");
        // A follower cannot have gain: named at once.
        let mut f = spec(
            StageKind::CommonCollector,
            "general-purpose-npn",
            12.0,
            10e3,
        );
        f.requirements.min_voltage_gain_db = Some(3.0);
        let e = synthesize(&f).unwrap_err();
        assert_eq!(e.field(), "requirements.min_voltage_gain_db");
    }

    #[test]
    fn the_gain_sets_the_unbypassed_emitter_resistance() {
        // A 20 to 26 dB window: the target is its middle, 23 dB, reached on
        // the nodal gain by the secant correction (to 10⁻⁷ neper, far inside
        // 0.01 dB); the closed form Re ≈ rac/|Av| − re' (Sedra & Smith, ch. 7)
        // agrees within 15 % (it neglects rbb'/β and ro).
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.requirements.min_voltage_gain_db = Some(20.0);
        s.requirements.max_voltage_gain_db = Some(26.0);
        let d = synthesize(&s).unwrap();
        let a = &d.ideal_analysis;
        let gain_db = db20(libm::fabs(a.midband.voltage_gain));
        assert!(libm::fabs(gain_db - 23.0) < 0.01, "{gain_db} dB");
        let rac = parallel(d.ideal.parts.rc, 10e3);
        let re_e = crate::constants::thermal_voltage(s.ambient) / a.operating_point.ic;
        let estimate = rac / libm::pow(10.0, 23.0 / 20.0) - re_e;
        assert!(
            rel(d.ideal.parts.re, estimate) < 0.15,
            "{} vs {estimate}",
            d.ideal.parts.re
        );
        assert_eq!(d.target.voltage_gain_db.map(libm::round), Some(23.0));
    }

    #[test]
    fn the_capacitors_share_the_lower_corner() {
        // Sized until the exact corner is 80 % of max_f_low (to 0.2 %), then
        // snapped up: the continuous design sits at 40 Hz, the standard one
        // at or below it. The bypass capacitor sees the smallest resistance
        // and gets the largest share, hence the largest value (module docs).
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.requirements.max_f_low = Some(50.0);
        s.requirements.min_voltage_gain_db = Some(20.0);
        let d = synthesize(&s).unwrap();
        let f = d.ideal_analysis.bandwidth.f_low.unwrap();
        assert!(rel(f, 40.0) < 0.005, "{f}");
        assert!(d.analysis.bandwidth.f_low.unwrap() <= 50.0);
        let p = &d.ideal.parts;
        let ce = p.c_emitter.unwrap();
        assert!(ce > p.c_in.unwrap() && ce > p.c_out.unwrap());
        // Each capacitor went to the next standard value up (E12).
        for c in d.parts.iter().filter(|c| c.part.starts_with("c_")) {
            assert!(c.chosen >= c.ideal, "{}", c.part);
            assert!(c.change < 0.22, "{} moved {}", c.part, c.change);
        }
    }

    #[test]
    fn a_given_current_is_centred() {
        // bias {"ic": 1 mA}: the collector resistance is chosen to centre
        // that current (VCEQ − VCE(min) = ICQ·(rac + Re)). The divider is
        // computed from the same device model the analysis solves, so the
        // ideal stage carries 1 mA to 10⁻³ (the reverse-junction terms that
        // the design neglects are far smaller).
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.bias = Bias::Ic(1e-3);
        let d = synthesize(&s).unwrap();
        let op = &d.ideal_analysis.operating_point;
        assert!(rel(op.ic, 1e-3) < 1e-3, "{}", op.ic);
        let rac = parallel(d.ideal.parts.rc, 10e3);
        let vmin = s.transistor.vce_sat + s.saturation_reserve;
        let line = op.ic * (rac + d.ideal.parts.re);
        assert!(rel(libm::fabs(op.vce) - vmin, line) < 1e-3);
        // bias {"vce": 3 V}: centred as well.
        s.bias = Bias::Vce(3.0);
        let d = synthesize(&s).unwrap();
        let op = &d.ideal_analysis.operating_point;
        assert!(libm::fabs(libm::fabs(op.vce) - 3.0) < 3e-3, "{}", op.vce);
        assert!(d.target.centred);
        // A VCE above the middle of the load line cannot be centred: it is
        // kept, and a note says so.
        s.bias = Bias::Vce(9.0);
        let d = synthesize(&s).unwrap();
        assert!(libm::fabs(libm::fabs(d.ideal_analysis.operating_point.vce) - 9.0) < 0.01);
        assert!(!d.target.centred);
        assert!(d.notes.iter().any(|n| n.contains("off-centre")));
    }

    #[test]
    fn pinned_parts_are_kept_and_the_rest_is_solved_around_them() {
        // Pinned values come back exactly (no tolerance): RC = 4.7 kΩ and
        // Re = 200 Ω stay, and the requirements are still met.
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.parts.rc = Some(4.7e3);
        s.parts.re = Some(200.0);
        s.requirements.min_voltage_gain_db = Some(20.0);
        s.requirements.min_swing = Some(2.0);
        let d = synthesize(&s).unwrap();
        assert_eq!(d.stage.parts.rc, 4.7e3);
        assert_eq!(d.stage.parts.re, 200.0);
        assert!(d.checks.iter().all(|c| c.pass));
        assert!(d
            .parts
            .iter()
            .any(|p| p.part == "re" && p.pinned && p.series.is_none()));
        // Divider and emitter all pinned (the crate example's values): they
        // set IC by themselves, about 1.35 mA by the crate's own analysis of
        // that stage; RC is then chosen to centre it.
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.parts.r1 = Some(47e3);
        s.parts.r2 = Some(10e3);
        s.parts.re = Some(220.0);
        s.parts.re_bypassed = Some(820.0);
        let d = synthesize(&s).unwrap();
        assert!(rel(d.ideal_analysis.operating_point.ic, 1.35e-3) < 0.01);
        assert_eq!(d.stage.parts.r1, Some(47e3));
        assert_eq!(d.stage.parts.re_bypassed, 820.0);
        // Centred with the reserve: VCEQ − VCE(sat) − 0.5 V = ICQ·(rac + Re).
        let op = &d.ideal_analysis.operating_point;
        let vmin = s.transistor.vce_sat + s.saturation_reserve;
        let line = op.ic * (parallel(d.ideal.parts.rc, 10e3) + 220.0);
        assert!(rel(libm::fabs(op.vce) - vmin, line) < 0.01);
    }

    #[test]
    fn snapped_design_reports_its_differences() {
        // Every result appears before and after snapping; E24 resistors are
        // within ±5 % of their continuous values (half the 10 % step plus
        // rounding), and the differences are after − before (exact).
        let mut s = spec(
            StageKind::CommonCollector,
            "general-purpose-npn",
            12.0,
            10e3,
        );
        s.requirements.min_swing = Some(2.0);
        let d = synthesize(&s).unwrap();
        assert_eq!(d.differences.len(), 10);
        for x in &d.differences {
            if let (Some(a), Some(b), Some(c)) = (x.ideal, x.snapped, x.difference) {
                assert_eq!(c, b - a, "{}", x.quantity);
            }
        }
        for p in d.parts.iter().filter(|p| p.part.starts_with('r')) {
            assert!(libm::fabs(p.change) < 0.055, "{} {}", p.part, p.change);
            assert_eq!(p.series, Some(ESeries::E24));
            assert_eq!(ESeries::E24.nearest(p.chosen), Some(p.chosen));
        }
    }

    #[test]
    fn specification_errors_name_the_field() {
        // Style rule: the field, the value and what is allowed.
        let base = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        let field = |f: &dyn Fn(&mut Spec)| {
            let mut s = base.clone();
            f(&mut s);
            synthesize(&s).unwrap_err().field().to_string()
        };
        assert_eq!(field(&|s| s.rl = -1.0), "rl");
        assert_eq!(field(&|s| s.bias = Bias::Ic(5.0)), "bias.ic");
        assert_eq!(field(&|s| s.bias = Bias::Vce(20.0)), "bias.vce");
        assert_eq!(field(&|s| s.parts.c_base = Some(1e-6)), "parts.c_base");
        assert_eq!(field(&|s| s.stiffness = 0.0), "stiffness");
        assert_eq!(field(&|s| s.supply = 50.0), "supply");
        assert_eq!(
            field(&|s| {
                s.requirements.min_voltage_gain_db = Some(30.0);
                s.requirements.max_voltage_gain_db = Some(20.0);
            }),
            "requirements.max_voltage_gain_db"
        );
        let e = {
            let mut s = base.clone();
            s.rl = -1.0;
            synthesize(&s).unwrap_err().to_string()
        };
        assert!(e.contains("rl") && e.contains("-1"), "{e}");
    }

    #[test]
    fn the_resistor_power_rating_is_respected() {
        // A follower into 600 Ω with r1 pinned high: the scan wants a low RE
        // and a large current. The ratings check allows each resistor half
        // its rating (0.125 W of the default 0.25 W); the design must stay
        // inside it as it stays inside the transistor's ratings (this one
        // once came out with 148 mW in RE).
        let mut s = spec(
            StageKind::CommonCollector,
            "general-purpose-npn",
            15.0,
            600.0,
        );
        s.rs = 2200.0;
        let r = &mut s.requirements;
        r.min_voltage_gain_db = Some(-1.0);
        r.min_input_impedance = Some(20e3);
        r.max_output_impedance = Some(50.0);
        r.min_swing = Some(2.0);
        r.max_f_low = Some(20.0);
        s.parts.r1 = Some(47e3);
        s.series.capacitors = ESeries::E6;
        let d = synthesize(&s).expect("the specification can be met within the ratings");
        let a = analyze(&d.stage).unwrap();
        for c in &a.ratings {
            assert!(c.pass, "every rating passes: {}", c.message);
        }
        // And a rating that no design can meet is named, with its shortfall.
        s.resistor_rating = 0.01;
        let e = synthesize(&s)
            .expect_err("5 mW per resistor cannot bias this follower")
            .to_string();
        assert!(
            e.contains("the resistor power (half of resistor_rating): ")
                && e.contains("against 5 mW (short by"),
            "the resistor power is named with its limit and shortfall: {e}"
        );
    }

    #[test]
    fn the_tolerances_follow_the_series() {
        // E96 resistors are ±1 % and E6 capacitors ±20 % (IEC 60063), unless
        // the specification says otherwise.
        let mut s = spec(StageKind::CommonEmitter, "general-purpose-npn", 12.0, 10e3);
        s.series.resistors = ESeries::E96;
        s.series.capacitors = ESeries::E6;
        let t = s.tolerances();
        assert!(libm::fabs(t.resistor_tolerance - 0.01) < 1e-15);
        assert!(libm::fabs(t.capacitor_tolerance - 0.20) < 1e-15);
        s.series.capacitor_tolerance = Some(0.1);
        assert!(libm::fabs(s.tolerances().capacitor_tolerance - 0.1) < 1e-15);
    }
}
