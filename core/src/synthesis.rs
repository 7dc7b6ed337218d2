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
    let checks = spec.requirements.check(&analysis);
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

/// How the collector current follows from the free resistor.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Rule {
    /// At the centre of the AC load line.
    Centre,
    /// This collector current.
    Ic(f64),
    /// This |VCE|.
    Vce(f64),
}

/// What sets the emitter voltage.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Law {
    /// `emitter_fraction`·VCC, or IE·Re when the unbypassed part needs more.
    Fraction,
    /// IE times this total resistance.
    Resistance(f64),
    /// The pinned divider: VTH − IB·(RTH + rbb') − VBE.
    Divider,
}

/// A continuous design point (NPN frame).
#[derive(Debug, Clone, Copy, PartialEq)]
struct Point {
    rc: f64,
    re: f64,
    re_bypassed: f64,
    ic: f64,
    ie: f64,
    vce: f64,
    ve: f64,
    rth: f64,
    /// VTH that the target current needs with this RTH (equals the divider's
    /// own VTH unless both divider resistors are pinned).
    vth_needed: f64,
    vth: f64,
    up: f64,
    down: f64,
    swing: f64,
}

/// Capacitor values (`None` = ideal).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
struct Caps {
    c_in: Option<f64>,
    c_out: Option<f64>,
    c_emitter: Option<f64>,
    c_base: Option<f64>,
}

/// A quick evaluation: what the checks need, without the report strings.
struct Measured {
    ic: f64,
    vce: f64,
    gain_db: f64,
    zin: f64,
    zout: f64,
    swing: f64,
    supply_current: f64,
    tj: f64,
    power: f64,
    /// The largest resistor dissipation, W.
    resistor_power: f64,
    ic_peak: f64,
    active: bool,
    ss: SmallSignal,
    resp: Response,
}

/// One requirement or rating as checked on a candidate.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Gap {
    id: &'static str,
    value: f64,
    limit: f64,
    unit: &'static str,
    /// 0 when met; otherwise a relative measure of the miss (a log ratio).
    short: f64,
}

struct Ctx<'a> {
    spec: &'a Spec,
    dev: Device,
    vcc: f64,
    vmin: f64,
    rbb: f64,
    /// |Av| target of a common-emitter stage (sets Re).
    gain: Option<f64>,
    /// Input impedance the divider must allow (with margin), CE and CC.
    zin: Option<f64>,
    /// Pinned divider resistors toward the upper and lower rail (NPN frame).
    up: Option<f64>,
    down: Option<f64>,
    /// Pinned free resistor: rc (CE, CB) or re (CC).
    r_pin: Option<f64>,
}

impl<'a> Ctx<'a> {
    fn new(spec: &'a Spec) -> Result<Ctx<'a>> {
        let t = &spec.transistor;
        let vcc = spec.supply;
        if vcc > t.vceo_max {
            return Err(Error::inconsistent(
                "supply",
                format!(
                    "the supply ({}) is above the transistor's vceo_max ({}): at cutoff the whole supply stands across it",
                    format_si(vcc, "V"),
                    format_si(t.vceo_max, "V")
                ),
            ));
        }
        let vmin = t.vce_sat + spec.saturation_reserve;
        if vcc <= vmin + 0.5 {
            return Err(Error::inconsistent(
                "supply",
                format!(
                    "the supply ({}) leaves no room above VCE(sat) + saturation_reserve ({})",
                    format_si(vcc, "V"),
                    format_si(vmin, "V")
                ),
            ));
        }
        let r = &spec.requirements;
        if let Some(s) = r.min_swing {
            // formula: a class-A stage swings at most (VCC − VCE(min))/2 peak
            let most = 0.5 * (vcc - vmin);
            if s > most {
                return Err(Error::inconsistent(
                    "requirements.min_swing",
                    format!(
                        "{} peak is more than the supply allows: a class-A stage on {} swings at most \
                         (VCC − VCE(sat) − saturation_reserve)/2 = ({} − {} − {})/2 = {} peak, even with no \
                         emitter resistance and unlimited current; short by {} ({:.0} %)",
                        format_si(s, "V"),
                        format_si(vcc, "V"),
                        format_si(vcc, "V"),
                        format_si(t.vce_sat, "V"),
                        format_si(spec.saturation_reserve, "V"),
                        format_si(most, "V"),
                        format_si(s - most, "V"),
                        100.0 * (s - most) / s
                    ),
                ));
            }
        }
        if spec.stage == StageKind::CommonCollector {
            if let Some(g) = r.min_voltage_gain_db {
                if g >= 0.0 {
                    return Err(Error::inconsistent(
                        "requirements.min_voltage_gain_db",
                        format!(
                            "a follower's voltage gain is below 1 (0 dB); {g} dB cannot be reached, short by at least {g} dB"
                        ),
                    ));
                }
            }
        }
        let p = &spec.parts;
        let gain = if spec.stage == StageKind::CommonEmitter && p.re.is_none() {
            let db = match (r.min_voltage_gain_db, r.max_voltage_gain_db) {
                (Some(a), Some(b)) => Some(0.5 * (a + b)),
                (Some(a), None) => Some(a + GAIN_MARGIN_DB),
                (None, Some(b)) => Some(b - GAIN_MARGIN_DB),
                (None, None) => None,
            };
            db.map(|d| libm::pow(10.0, d / 20.0))
        } else {
            None
        };
        let zin = match spec.stage {
            StageKind::CommonBase => None,
            _ => r.min_input_impedance.map(|z| z * (1.0 + DESIGN_MARGIN)),
        };
        let (up, down) = match t.polarity {
            Polarity::Npn => (p.r1, p.r2),
            Polarity::Pnp => (p.r2, p.r1),
        };
        let r_pin = match spec.stage {
            StageKind::CommonCollector => p.re,
            _ => p.rc,
        };
        Ok(Ctx {
            spec,
            dev: t.device(spec.ambient, t.hfe, 0.0),
            vcc,
            vmin,
            rbb: t.rbb,
            gain,
            zin,
            up,
            down,
            r_pin,
        })
    }

    fn kind(&self) -> StageKind {
        self.spec.stage
    }

    /// The pinned divider's (VTH, RTH), when both resistors are pinned.
    fn divider(&self) -> Option<(f64, f64)> {
        match (self.up, self.down) {
            (Some(u), Some(d)) => Some((self.vcc * d / (u + d), parallel(u, d))),
            _ => None,
        }
    }

    /// The emitter law and, for a common-emitter stage, whether the
    /// unbypassed part follows from the pinned divider and `re_bypassed`.
    fn law(&self) -> (Law, bool) {
        let p = &self.spec.parts;
        let both = self.divider().is_some();
        match self.kind() {
            StageKind::CommonEmitter => match (both, p.re_bypassed) {
                (true, Some(_)) => (Law::Divider, p.re.is_none()),
                (true, None) => (Law::Divider, false),
                (false, Some(b)) => (Law::Resistance(b), false),
                (false, None) => (Law::Fraction, false),
            },
            StageKind::CommonBase => match (both, p.re) {
                (_, Some(r)) => (Law::Resistance(r), false),
                (true, None) => (Law::Divider, false),
                (false, None) => (Law::Fraction, false),
            },
            StageKind::CommonCollector => (Law::Fraction, false),
        }
    }

    /// The continuous design with the free resistor `r` (rc, or re of a
    /// follower). `re_set` fixes the unbypassed Re of a common-emitter
    /// stage, `rth_set` the divider's Thevenin resistance.
    fn point(
        &self,
        r: f64,
        rule: Rule,
        re_set: Option<f64>,
        rth_set: Option<f64>,
    ) -> Option<Point> {
        if !(r.is_finite() && r > 0.0) {
            return None;
        }
        let s = self.spec;
        let kind = self.kind();
        let vcc = self.vcc;
        let rl = s.rl;
        let f_ve = s.emitter_fraction * vcc;
        let follower = kind == StageKind::CommonCollector;
        let rc = if follower {
            s.parts.rc.unwrap_or(0.0)
        } else {
            r
        };
        let rac = if follower {
            parallel(r, rl)
        } else {
            parallel(rc, rl)
        };
        let (law, re_from_divider) = self.law();
        let reb_pin = s.parts.re_bypassed;
        let divider = self.divider();
        let mut ic = match rule {
            Rule::Ic(i) => i,
            _ if follower => (vcc - self.vmin) / (r + rac + 2.0 * rc),
            _ => (vcc - self.vmin - f_ve).max(0.1 * vcc) / (rc + rac),
        };
        let mut vce = 0.5 * vcc;
        let mut re_u = 0.0;
        let mut state = None;
        for _ in 0..200 {
            if !(ic.is_finite() && ic > 0.0) {
                return None;
            }
            // The device at the current estimate (kept in its active region).
            let vce_dev = vce.max(s.transistor.vce_sat.max(0.05));
            let vbe = self.dev.vbe_for_ic(ic, vce_dev);
            let c = self.dev.currents(vbe, vbe - vce_dev);
            let ib = c.ib;
            let alpha = ic / (ic + ib);
            let gm = c.dic_dvbe + c.dic_dvbc;
            let gpi = c.dib_dvbe + c.dib_dvbc;
            let go = -c.dic_dvbc;
            if !(gm > 0.0 && gpi > 0.0) {
                return None;
            }
            let beta0 = gm / gpi;
            let rpi = 1.0 / gpi;
            let rac_o = if go > 0.0 {
                parallel(rac, 1.0 / go)
            } else {
                rac
            };
            let ve_div = divider.map(|(vth, rth)| vth - ib * (rth + self.rbb) - vbe);
            // The unbypassed emitter resistance (common emitter).
            if kind == StageKind::CommonEmitter {
                re_u = if let Some(v) = s.parts.re {
                    v
                } else if re_from_divider {
                    // formula: Re = VE/IE − Re(bypassed), from the pinned divider
                    ve_div? / (ic / alpha) - reb_pin.unwrap_or(0.0)
                } else if let Some(v) = re_set {
                    v
                } else if let Some(a) = self.gain {
                    // formula: Re = (β0·(rac∥ro)/|Av| − rbb' − rπ)/(β0 + 1)
                    ((beta0 * rac_o / a - self.rbb - rpi) / (beta0 + 1.0)).max(0.0)
                } else {
                    0.0
                };
                if re_u < 0.0 {
                    return None;
                }
            }
            // The emitter voltage as a function of IE.
            let total = match law {
                Law::Resistance(b) if kind == StageKind::CommonEmitter => Some(re_u + b),
                Law::Resistance(b) => Some(b),
                _ => None,
            };
            let ve_fixed = match law {
                Law::Divider => Some(ve_div?),
                Law::Fraction if kind == StageKind::CommonBase => Some(f_ve),
                _ => None,
            };
            let line = if kind == StageKind::CommonEmitter {
                rc + rac + re_u
            } else {
                rc + rac
            };
            let new_ic = if follower {
                // formula: IE = (VCC − VCE(min))/(RE + rac + (1 + α)·RC), centred
                let ie = match rule {
                    Rule::Centre => (vcc - self.vmin) / (r + rac + (1.0 + alpha) * rc),
                    Rule::Ic(i) => i / alpha,
                    Rule::Vce(v) => (vcc - v) / (r + alpha * rc),
                };
                alpha * ie
            } else {
                // Headroom for the collector: VCC − VE − VCE, shared by RC and the line.
                match (rule, total, ve_fixed) {
                    (Rule::Ic(i), _, _) => i,
                    // formula: ICQ = (VCC − VCE(min))/(RC + rac + Re + RE/α), VE = IE·RE
                    (Rule::Centre, Some(t), _) => (vcc - self.vmin) / (line + t / alpha),
                    (Rule::Centre, None, Some(v0)) => (vcc - self.vmin - v0) / line,
                    (Rule::Centre, None, None) => {
                        let a = (vcc - self.vmin - f_ve) / line;
                        if a / alpha * re_u > f_ve {
                            (vcc - self.vmin) / (line + re_u / alpha)
                        } else {
                            a
                        }
                    }
                    (Rule::Vce(v), Some(t), _) => (vcc - v) / (rc + t / alpha),
                    (Rule::Vce(v), None, Some(v0)) => (vcc - v0 - v) / rc,
                    (Rule::Vce(v), None, None) => {
                        let a = (vcc - f_ve - v) / rc;
                        if a / alpha * re_u > f_ve {
                            (vcc - v) / (rc + re_u / alpha)
                        } else {
                            a
                        }
                    }
                }
            };
            if !(new_ic.is_finite() && new_ic > 0.0) {
                return None;
            }
            let ie = new_ic / alpha;
            let ve = if follower {
                ie * r
            } else if let Some(t) = total {
                ie * t
            } else if let Some(v0) = ve_fixed {
                v0
            } else {
                f_ve.max(ie * re_u)
            };
            let new_vce = vcc - new_ic * rc - ve;
            let done = libm::fabs(new_ic - ic) <= 1e-13 * ic && libm::fabs(new_vce - vce) <= 1e-10;
            ic = new_ic;
            vce = new_vce;
            state = Some((vbe, ib, ie, ve));
            if done {
                break;
            }
        }
        let (vbe, ib, ie, ve) = state?;
        if !(ve >= 0.0 && vce > s.transistor.vce_sat && ie > 0.0) {
            return None;
        }
        // The emitter resistors.
        let (re, re_bypassed, re_total) = match kind {
            StageKind::CommonEmitter => {
                let total = ve / ie;
                let b = total - re_u;
                if b < -1e-9 * total {
                    return None;
                }
                (re_u, b.max(0.0), total)
            }
            StageKind::CommonBase => (ve / ie, 0.0, ve / ie),
            StageKind::CommonCollector => (r, 0.0, r),
        };
        if re_total <= 0.0 && kind != StageKind::CommonEmitter {
            return None;
        }
        // The divider, from the base terminal voltage the current needs.
        let vbt = ve + vbe + ib * self.rbb;
        let stiff = self.spec.stiffness * self.spec.transistor.hfe_min * re_total;
        let (rth, vth, up, down, vth_needed) = match (self.up, self.down) {
            (None, None) => {
                let rth = rth_set.unwrap_or(stiff).max(1.0);
                // formula: VTH = VE + VBE + IB·(RTH + rbb'); R_up = RTH·VCC/VTH; R_down = RTH·VCC/(VCC − VTH)
                let vth = vbt + ib * rth;
                if !(vth > 0.0 && vth < vcc * (1.0 - 1e-9)) {
                    return None;
                }
                (rth, vth, rth * vcc / vth, rth * vcc / (vcc - vth), vth)
            }
            (Some(u), None) => {
                // formula: R_down = VB·R_up/(VCC − VB − IB·R_up)
                let den = vcc - vbt - ib * u;
                if den <= 0.0 {
                    return None;
                }
                let d = vbt * u / den;
                let vth = vcc * d / (u + d);
                (parallel(u, d), vth, u, d, vth)
            }
            (None, Some(d)) => {
                // formula: R_up = (VCC − VB)/(IB + VB/R_down)
                let u = (vcc - vbt) / (ib + vbt / d);
                if !(u > 0.0 && u.is_finite()) {
                    return None;
                }
                let vth = vcc * d / (u + d);
                (parallel(u, d), vth, u, d, vth)
            }
            (Some(u), Some(d)) => {
                let (vth, rth) = (vcc * d / (u + d), parallel(u, d));
                (rth, vth, u, d, vbt + ib * rth)
            }
        };
        let swing = if follower { ie * rac } else { ic * rac };
        Some(Point {
            rc,
            re,
            re_bypassed,
            ic,
            ie,
            vce,
            ve,
            rth,
            vth_needed,
            vth,
            up,
            down,
            swing,
        })
    }

    /// The stage of `p` with `caps`; pinned parts keep exactly their values.
    fn stage_of(&self, p: &Point, caps: &Caps) -> Stage {
        let s = self.spec;
        let pin = &s.parts;
        let (r1, r2) = match s.transistor.polarity {
            Polarity::Npn => (p.up, p.down),
            Polarity::Pnp => (p.down, p.up),
        };
        let (r1, r2) = (pin.r1.unwrap_or(r1), pin.r2.unwrap_or(r2));
        let rc = pin.rc.unwrap_or(p.rc);
        let re = pin.re.unwrap_or(p.re);
        let re_bypassed = pin.re_bypassed.unwrap_or(p.re_bypassed);
        let kind = self.kind();
        Stage {
            kind,
            supply: s.supply,
            ambient: s.ambient,
            parts: Parts {
                r1: Some(r1),
                r2: Some(r2),
                rc,
                re,
                re_bypassed,
                rs: s.rs,
                rl: s.rl,
                c_in: caps.c_in,
                c_out: caps.c_out,
                c_emitter: if re_bypassed > 0.0 {
                    caps.c_emitter
                } else {
                    None
                },
                c_base: if kind == StageKind::CommonBase {
                    caps.c_base
                } else {
                    None
                },
                resistor_rating: s.resistor_rating,
            },
            transistor: s.transistor.clone(),
        }
    }

    /// DC, midband, swing and dissipation of `stage`, as `analyze` finds them.
    fn measure(&self, stage: &Stage) -> Option<Measured> {
        let t = &stage.transistor;
        let device = t.device(stage.ambient, t.hfe, 0.0);
        let op = OperatingPoint::solve(stage, &device).ok()?;
        let ss = SmallSignal::at(stage, &op);
        let resp = Response::new(stage, &ss).ok()?;
        let swing = Swing::at(stage, &op);
        let d = Dissipation::at(stage, &op);
        let mid = resp.midband();
        Some(Measured {
            ic: op.ic,
            vce: libm::fabs(op.vce),
            gain_db: db20(libm::fabs(mid.voltage_gain.re)),
            zin: mid.input_impedance.re,
            zout: mid.output_impedance.re,
            swing: swing.symmetric,
            supply_current: d.supply_current,
            tj: d.junction_temperature.celsius(),
            power: d.transistor,
            resistor_power: d.resistors.iter().fold(0.0, |a, &(_, w)| a.max(w)),
            ic_peak: swing.ic_peak,
            active: op.region == Region::Active,
            ss,
            resp,
        })
    }

    /// Every set requirement and the ratings, on `stage` as measured, each
    /// limit tightened by `margin` (0 for the real check).
    fn gaps(&self, stage: &Stage, m: &Measured, margin: f64) -> Vec<Gap> {
        let r = &self.spec.requirements;
        let t = &self.spec.transistor;
        let ta = self.spec.ambient.celsius();
        let mut out = Vec::with_capacity(14);
        let ln_short = |need_over: f64| if need_over > 0.0 { need_over } else { 0.0 };
        let log_ratio = |a: f64, b: f64| {
            if a > 0.0 && b > 0.0 {
                libm::log(a / b)
            } else {
                10.0
            }
        };
        let window = match (r.min_voltage_gain_db, r.max_voltage_gain_db) {
            (Some(a), Some(b)) => b - a,
            _ => f64::INFINITY,
        };
        // The margin the gain is checked with, dB (not the transconductance).
        let gain_margin_db = if margin > 0.0 {
            GAIN_CHECK_MARGIN_DB.min(0.25 * window)
        } else {
            0.0
        };
        // dB to nepers: a relative measure like the log ratios.
        let np = 1.0 / (20.0 * core::f64::consts::LOG10_E);
        let level = corner_level(&m.resp);
        let has_caps = {
            let p = &stage.parts;
            p.c_in.is_some() || p.c_out.is_some() || p.c_emitter.is_some() || p.c_base.is_some()
        };
        let rise = |l: f64| (l - ta).max(1.0);
        // Each requirement of the table, its shortfall measured on the scale
        // that suits it: nepers for the gain, the −3 dB level at the limit
        // for a corner, the share of the rise over ambient for a
        // temperature, the log ratio for the rest.
        for (req, l) in r.limits() {
            let at_least = req.bound == Bound::AtLeast;
            let (value, short) = match req.quantity {
                Quantity::VoltageGain => {
                    let v = m.gain_db;
                    let over = if at_least {
                        l + gain_margin_db - v
                    } else {
                        v - l + gain_margin_db
                    };
                    (v, ln_short(over * np))
                }
                Quantity::FLow | Quantity::FHigh => {
                    // |H(f)| at the limit at least the −3 dB level ⇔ the
                    // corner is beyond it.
                    let at = if req.quantity == Quantity::FLow {
                        if !has_caps {
                            continue;
                        }
                        l * (1.0 - margin)
                    } else {
                        l * (1.0 + margin)
                    };
                    let y = ln_gain(&m.resp, at).unwrap_or(f64::NEG_INFINITY) - level;
                    (f64::NAN, ln_short(-y))
                }
                Quantity::JunctionTemperature => {
                    let lim = l - margin * rise(l);
                    (m.tj, ln_short((m.tj - lim) / rise(l)))
                }
                q => {
                    let v = match q {
                        Quantity::InputImpedance => m.zin,
                        Quantity::OutputImpedance => m.zout,
                        Quantity::Swing => m.swing,
                        _ => m.supply_current,
                    };
                    let over = if at_least {
                        log_ratio(l * (1.0 + margin), v)
                    } else {
                        log_ratio(v, l * (1.0 - margin))
                    };
                    (v, ln_short(over))
                }
            };
            out.push(Gap {
                id: req.key,
                value,
                limit: l,
                unit: req.unit,
                short,
            });
        }
        out.push(Gap {
            id: "ic_max",
            value: m.ic_peak,
            limit: t.ic_max,
            unit: "A",
            short: ln_short(log_ratio(m.ic_peak, t.ic_max * (1.0 - margin))),
        });
        let ptot = t.ptot_at(self.spec.ambient);
        out.push(Gap {
            id: "ptot",
            value: m.power,
            limit: ptot,
            unit: "W",
            short: ln_short(log_ratio(m.power, ptot * (1.0 - margin))),
        });
        // The ratings check allows each resistor half its rating.
        let resistor_limit = RESISTOR_DERATING * self.spec.resistor_rating;
        out.push(Gap {
            id: "resistor_power",
            value: m.resistor_power,
            limit: resistor_limit,
            unit: "W",
            short: ln_short(log_ratio(m.resistor_power, resistor_limit * (1.0 - margin))),
        });
        let tj_max = t.tj_max.celsius();
        out.push(Gap {
            id: "tj_max",
            value: m.tj,
            limit: tj_max,
            unit: "°C",
            short: ln_short((m.tj - (tj_max - margin * rise(tj_max))) / rise(tj_max)),
        });
        out.push(Gap {
            id: "region",
            value: if m.active { 1.0 } else { 0.0 },
            limit: 1.0,
            unit: "",
            short: if m.active { 0.0 } else { 1.0 },
        });
        out
    }

    /// The continuous design at `r`, with the unbypassed Re corrected on the
    /// nodal gain and the divider opened up for the input impedance.
    fn design_at(&self, r: f64, rule: Rule) -> Option<(Point, Stage, Measured)> {
        let ideal = Caps::default();
        let mut p = self.point(r, rule, None, None)?;
        let mut st = self.stage_of(&p, &ideal);
        let mut m = self.measure(&st)?;
        let mut re_set = None;
        let (_, re_from_divider) = self.law();
        let gain_rule = self.kind() == StageKind::CommonEmitter
            && self.spec.parts.re.is_none()
            && !re_from_divider;
        if let (Some(a), true) = (self.gain, gain_rule) {
            // Secant on ln|Av| against Re; the first step from |Av| ∝ 1/(Re + re' + rbb'/β).
            let target = db20(a);
            let np = 1.0 / (20.0 * core::f64::consts::LOG10_E);
            let mut re0 = p.re;
            let mut y0 = (m.gain_db - target) * np;
            if libm::fabs(y0) > 1e-7 && !(re0 <= 0.0 && y0 < 0.0) {
                let c = 1.0 / m.ss.gm + self.rbb / (m.ss.beta0 + 1.0);
                let mut re1 = ((re0 + c) * libm::exp(y0) - c).max(0.0);
                for _ in 0..8 {
                    let p1 = self.point(r, rule, Some(re1), None)?;
                    let st1 = self.stage_of(&p1, &ideal);
                    let m1 = self.measure(&st1)?;
                    let y1 = (m1.gain_db - target) * np;
                    p = p1;
                    st = st1;
                    m = m1;
                    re_set = Some(re1);
                    if libm::fabs(y1) < 1e-7 || (re1 <= 0.0 && y1 < 0.0) {
                        break;
                    }
                    let d = y1 - y0;
                    if d == 0.0 {
                        break;
                    }
                    let re2 = (re1 - y1 * (re1 - re0) / d).max(0.0);
                    re0 = re1;
                    y0 = y1;
                    re1 = re2;
                }
            }
        }
        if let (Some(z), true) = (self.zin, self.up.is_none() && self.down.is_none()) {
            if m.zin < z && m.zin < p.rth {
                // formula: Zb = 1/(1/Zin − 1/RB); RB = 1/(1/Zin,target − 1/Zb)
                let zb = 1.0 / (1.0 / m.zin - 1.0 / p.rth);
                if zb.is_finite() && zb > z * (1.0 + 1e-9) {
                    let rth = 1.0 / (1.0 / z - 1.0 / zb);
                    if rth > p.rth {
                        let p1 = self.point(r, rule, re_set, Some(rth))?;
                        let st1 = self.stage_of(&p1, &ideal);
                        let m1 = self.measure(&st1)?;
                        p = p1;
                        st = st1;
                        m = m1;
                    }
                }
            }
        }
        Some((p, st, m))
    }

    /// The total shortfall of the design at `r` (∞ when there is no design).
    fn score_at(&self, r: f64, rule: Rule, margin: f64) -> (f64, Vec<Gap>) {
        match self.design_at(r, rule) {
            Some((_, st, m)) => {
                let gaps = self.gaps(&st, &m, margin);
                (gaps.iter().map(|g| g.short).sum(), gaps)
            }
            None => (f64::INFINITY, Vec::new()),
        }
    }

    /// Scans the free resistor over six decades around RL and returns the
    /// value nearest to RL that meets everything with the design margin, or
    /// failing that, without it.
    fn scan(&self, rule: Rule) -> Result<f64> {
        match self.scan_with(rule, DESIGN_MARGIN) {
            Ok(r) => Ok(r),
            Err(_) => self.scan_with(rule, 0.0),
        }
    }

    fn scan_with(&self, rule: Rule, margin: f64) -> Result<f64> {
        let rl = self.spec.rl;
        let n = 2 * SCAN_DECADES * SCAN_PER_DECADE + 1;
        let middle = SCAN_DECADES * SCAN_PER_DECADE;
        let at = |k: i32| rl * libm::pow(10.0, f64::from(k - middle) / f64::from(SCAN_PER_DECADE));
        let mut scores = Vec::with_capacity(n as usize);
        for k in 0..n {
            scores.push(self.score_at(at(k), rule, margin));
        }
        let feasible = |k: i32| scores[k as usize].0 == 0.0;
        // The feasible grid point nearest the middle (the larger on a tie).
        let best = (0..n)
            .filter(|&k| feasible(k))
            .min_by_key(|&k| ((k - middle).abs(), -k));
        let Some(k) = best else {
            // Two requirements pulling opposite ways can leave a window
            // narrower than the grid: minimise the total shortfall around the
            // best grid point (golden section in ln r).
            let kb = (0..n)
                .min_by(|&a, &b| scores[a as usize].0.total_cmp(&scores[b as usize].0))
                .unwrap_or(middle);
            if scores[kb as usize].0.is_finite() {
                let f = |x: f64| self.score_at(libm::exp(x), rule, margin).0;
                let (mut a, mut b) = (
                    libm::log(at((kb - 1).max(0))),
                    libm::log(at((kb + 1).min(n - 1))),
                );
                let g = 0.5 * (libm::sqrt(5.0) - 1.0);
                let (mut c, mut d) = (b - g * (b - a), a + g * (b - a));
                let (mut fc, mut fd) = (f(c), f(d));
                for _ in 0..40 {
                    if fc == 0.0 {
                        return Ok(libm::exp(c));
                    }
                    if fd == 0.0 {
                        return Ok(libm::exp(d));
                    }
                    if fc < fd {
                        b = d;
                        d = c;
                        fd = fc;
                        c = b - g * (b - a);
                        fc = f(c);
                    } else {
                        a = c;
                        c = d;
                        fc = fd;
                        d = a + g * (b - a);
                        fd = f(d);
                    }
                }
            }
            return Err(self.infeasible(&scores));
        };
        if k == middle {
            return Ok(at(k));
        }
        // Bisect the boundary between k and its neighbour toward the middle.
        let toward = if k < middle { k + 1 } else { k - 1 };
        let (mut good, mut bad) = (libm::log(at(k)), libm::log(at(toward)));
        for _ in 0..12 {
            let mid = 0.5 * (good + bad);
            if self.score_at(libm::exp(mid), rule, margin).0 == 0.0 {
                good = mid;
            } else {
                bad = mid;
            }
        }
        Ok(libm::exp(good))
    }

    /// The error for a scan that found no design: the requirements that fail
    /// at the best compromise, with the best value each reaches on its own.
    fn infeasible(&self, scores: &[(f64, Vec<Gap>)]) -> Error {
        let best = scores
            .iter()
            .filter(|s| s.0.is_finite())
            .min_by(|a, b| a.0.total_cmp(&b.0));
        let Some((_, gaps)) = best else {
            return Error::inconsistent(
                "bias",
                "no bias point works with this supply and load: the transistor saturates or \
                 the divider cannot be built at every collector resistance tried",
            );
        };
        // The best each failing check reaches anywhere on the scan, and what
        // fails at that point.
        let alone = |id: &str| -> Option<(Gap, Vec<&'static str>)> {
            let (gaps, g) = scores
                .iter()
                .filter_map(|s| s.1.iter().find(|g| g.id == id).map(|g| (&s.1, *g)))
                .min_by(|a, b| a.1.short.total_cmp(&b.1.short))?;
            let others = gaps
                .iter()
                .filter(|o| o.short > 0.0 && o.id != id)
                .map(|o| o.id)
                .collect();
            Some((g, others))
        };
        explain(gaps, Some(&alone)).unwrap_or_else(|| {
            Error::inconsistent("bias", "no bias point meets the requirements with margin")
        })
    }

    /// The root of `f(r) = 0` for a decreasing `f` (`None` where there is
    /// no design): a scan of 8 decades around RL for a sign change between
    /// two designs, then bisection in ln r. `None` without a bracket.
    fn bisect(&self, f: &dyn Fn(f64) -> Option<f64>) -> Option<f64> {
        let rl = self.spec.rl;
        let n = 33;
        let at = |k: i32| libm::log(rl) + libm::log(10.0) * (f64::from(k) / 4.0 - 4.0);
        let mut prev: Option<(f64, f64)> = None;
        let mut bracket = None;
        for k in 0..n {
            let x = at(k);
            let Some(y) = f(libm::exp(x)) else {
                prev = None;
                continue;
            };
            if let Some((px, py)) = prev {
                if py > 0.0 && y <= 0.0 {
                    bracket = Some((px, x));
                    break;
                }
            }
            prev = Some((x, y));
        }
        let (mut a, mut b) = bracket?;
        for _ in 0..60 {
            let m = 0.5 * (a + b);
            match f(libm::exp(m)) {
                Some(v) if v > 0.0 => a = m,
                Some(_) => b = m,
                None => break,
            }
            if b - a < 1e-12 {
                break;
            }
        }
        Some(libm::exp(0.5 * (a + b)))
    }

    /// Polishes `r` so that `g(design) = 0` by secant steps on the full
    /// design (whose Re correction moves the point a little).
    fn polish(&self, r: f64, rule: Rule, g: &dyn Fn(&Point) -> f64) -> f64 {
        let eval = |r: f64| self.design_at(r, rule).map(|(p, _, _)| g(&p));
        let (mut x0, mut x1) = (libm::log(r), libm::log(r) + 1e-3);
        let (Some(mut y0), Some(mut y1)) = (eval(r), eval(libm::exp(x1))) else {
            return r;
        };
        for _ in 0..6 {
            if libm::fabs(y1) < 1e-10 || y1 == y0 {
                break;
            }
            let x2 = x1 - y1 * (x1 - x0) / (y1 - y0);
            let Some(y2) = eval(libm::exp(x2)) else {
                break;
            };
            x0 = x1;
            y0 = y1;
            x1 = x2;
            y1 = y2;
        }
        libm::exp(x1)
    }

    /// The collector current that pinned divider and emitter resistors set
    /// by themselves, when they do.
    fn ic_from_pins(&self) -> Result<Option<f64>> {
        let p = &self.spec.parts;
        let (Some(u), Some(d)) = (self.up, self.down) else {
            return Ok(None);
        };
        let (re, reb) = match self.kind() {
            StageKind::CommonEmitter => match (p.re, p.re_bypassed) {
                (Some(a), Some(b)) => (a, b),
                _ => return Ok(None),
            },
            StageKind::CommonBase | StageKind::CommonCollector => match p.re {
                Some(a) => (a, 0.0),
                None => return Ok(None),
            },
        };
        let (r1, r2) = match self.spec.transistor.polarity {
            Polarity::Npn => (u, d),
            Polarity::Pnp => (d, u),
        };
        // In the active region the collector resistor barely moves IC; a
        // small one keeps the provisional stage out of saturation.
        let stage = Stage {
            kind: self.kind(),
            supply: self.vcc,
            ambient: self.spec.ambient,
            parts: Parts {
                r1: Some(r1),
                r2: Some(r2),
                rc: if self.kind() == StageKind::CommonCollector {
                    0.0
                } else {
                    1.0
                },
                re,
                re_bypassed: reb,
                rs: self.spec.rs,
                rl: self.spec.rl,
                ..Parts::default()
            },
            transistor: self.spec.transistor.clone(),
        };
        let op = OperatingPoint::solve(&stage, &self.dev)?;
        if op.region != Region::Active {
            return Err(Error::inconsistent(
                "parts",
                format!(
                    "the pinned divider and emitter resistors leave the transistor {} even with the collector tied to the supply",
                    op.region.name()
                ),
            ));
        }
        Ok(Some(op.ic))
    }

    /// The free resistor and the rule that sets the current.
    fn choose(&self, notes: &mut Vec<String>) -> Result<(f64, Rule)> {
        let s = self.spec;
        let intent_ignored = |notes: &mut Vec<String>, why: &str| {
            if s.bias != Bias::MaxSwing {
                notes.push(format!("the bias intent is not used: {why}"));
            }
        };
        if let Some(ic) = self.ic_from_pins()? {
            intent_ignored(notes, "the pinned parts set the collector current");
            notes.push(format!(
                "the pinned divider and emitter resistors set IC = {}",
                format_si(ic, "A")
            ));
            return match self.r_pin {
                Some(r) => Ok((r, Rule::Ic(ic))),
                None => {
                    let f = |r: f64| {
                        self.point(r, Rule::Centre, None, None)
                            .map(|p| p.ic / ic - 1.0)
                    };
                    match self.bisect(&f) {
                        Some(r) => Ok((r, Rule::Centre)),
                        None => Ok((s.rl, Rule::Ic(ic))),
                    }
                }
            };
        }
        if self.kind() == StageKind::CommonCollector && self.divider().is_some() {
            intent_ignored(notes, "the pinned divider sets the emitter voltage");
            let f = |r: f64| {
                self.point(r, Rule::Centre, None, None)
                    .map(|p| p.vth - p.vth_needed)
            };
            return match self.bisect(&f) {
                Some(r) => Ok((r, Rule::Centre)),
                None => {
                    // The divider voltage a centred follower needs, over the emitter resistors tried.
                    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
                    for k in 0..=32 {
                        let r = s.rl * libm::pow(10.0, f64::from(k) / 4.0 - 4.0);
                        if let Some(p) = self.point(r, Rule::Centre, None, None) {
                            lo = lo.min(p.vth_needed);
                            hi = hi.max(p.vth_needed);
                        }
                    }
                    let (vth, _) = self.divider().unwrap_or((0.0, 0.0));
                    let need = if hi < self.vcc {
                        format!("between {} and {}", format_si(lo, "V"), format_si(hi, "V"))
                    } else {
                        format!("at least {}", format_si(lo, "V"))
                    };
                    Err(Error::inconsistent(
                        "parts.r1",
                        format!(
                            "the pinned r1 and r2 give a divider voltage of {} from the rail the emitter returns to, \
                             but a follower centred on its AC load line needs {need}; pin one of them only, or pin re as well",
                            format_si(vth, "V"),
                        ),
                    ))
                }
            };
        }
        match (s.bias, self.r_pin) {
            (Bias::MaxSwing, Some(r)) => Ok((r, Rule::Centre)),
            (Bias::MaxSwing, None) => Ok((self.scan(Rule::Centre)?, Rule::Centre)),
            (Bias::Ic(i), Some(r)) => Ok((r, Rule::Ic(i))),
            (Bias::Vce(v), Some(r)) => Ok((r, Rule::Vce(v))),
            (Bias::Ic(i), None) => {
                let f = |r: f64| {
                    self.point(r, Rule::Centre, None, None)
                        .map(|p| p.ic / i - 1.0)
                };
                match self.bisect(&f) {
                    Some(r) => Ok((
                        self.polish(r, Rule::Centre, &|p: &Point| p.ic / i - 1.0),
                        Rule::Centre,
                    )),
                    None => {
                        notes.push(format!(
                            "no collector resistance centres the quiescent point at IC = {}; it is kept off-centre",
                            format_si(i, "A")
                        ));
                        Ok((s.rl, Rule::Ic(i)))
                    }
                }
            }
            (Bias::Vce(v), None) => {
                let f = |r: f64| self.point(r, Rule::Centre, None, None).map(|p| p.vce - v);
                match self.bisect(&f) {
                    Some(r) => Ok((
                        self.polish(r, Rule::Centre, &|p: &Point| p.vce - v),
                        Rule::Centre,
                    )),
                    None => {
                        notes.push(format!(
                            "a VCE of {} cannot be at the centre of the AC load line (it is above its middle); \
                             the quiescent point is kept off-centre and the collector resistance chosen by the requirements",
                            format_si(v, "V")
                        ));
                        Ok((self.scan(Rule::Vce(v))?, Rule::Vce(v)))
                    }
                }
            }
        }
    }

    /// Sizes the coupling and bypass capacitors (see the module docs) and
    /// returns them with the corner they were sized for.
    fn size_caps(
        &self,
        p: &Point,
        stage: &Stage,
        m: &Measured,
        notes: &mut Vec<String>,
    ) -> Result<(Caps, f64)> {
        let s = self.spec;
        let f_t = s
            .requirements
            .max_f_low
            .map_or(DEFAULT_F_LOW, |f| f * CORNER_MARGIN);
        if s.requirements.max_f_low.is_none() {
            notes.push(format!(
                "no max_f_low: the capacitors are sized for a lower corner of {}",
                format_si(f_t, "Hz")
            ));
        }
        let ss = &m.ss;
        let (rx, rpi, b1) = (ss.rbb, ss.r_pi, ss.beta0 + 1.0);
        let rb = stage.bias_resistance();
        let (rs, rl) = (s.rs, s.rl);
        let pin = &s.parts;
        // (which, Rᵢ seen with the other capacitors shorted, pinned value)
        let mut list: Vec<(u8, f64, Option<f64>)> = Vec::with_capacity(3);
        // formula: short-circuit resistances (Sedra & Smith, ch. 9)
        match self.kind() {
            StageKind::CommonEmitter => {
                list.push((0, rs + parallel(rb, rx + rpi + b1 * p.re), pin.c_in));
                list.push((1, p.rc + rl, pin.c_out));
                if p.re_bypassed > 0.0 {
                    let r = parallel(p.re_bypassed, p.re + (rx + rpi + parallel(rs, rb)) / b1);
                    list.push((2, r, pin.c_emitter));
                }
            }
            StageKind::CommonCollector => {
                list.push((
                    0,
                    rs + parallel(rb, rx + rpi + b1 * parallel(p.re, rl)),
                    pin.c_in,
                ));
                list.push((
                    1,
                    rl + parallel(p.re, (rx + rpi + parallel(rs, rb)) / b1),
                    pin.c_out,
                ));
            }
            StageKind::CommonBase => {
                list.push((0, rs + parallel(p.re, (rx + rpi) / b1), pin.c_in));
                list.push((1, p.rc + rl, pin.c_out));
                list.push((
                    3,
                    parallel(rb, rx + rpi + b1 * parallel(p.re, rs)),
                    pin.c_base,
                ));
            }
        }
        let w = 2.0 * core::f64::consts::PI * f_t;
        let taken: f64 = list
            .iter()
            .filter_map(|(_, r, c)| c.map(|c| 1.0 / (r * c)))
            .sum();
        let mut budget = w - taken;
        if budget < 0.1 * w {
            notes.push("the pinned capacitors alone take most of the lower-corner budget".into());
            budget = 0.1 * w;
        }
        // formula: Cᵢ = Σⱼ Rⱼ^(−1/2) / (ω·Rᵢ^(1/2)), shares ∝ 1/√Rᵢ
        let norm: f64 = list
            .iter()
            .filter(|(_, _, c)| c.is_none())
            .map(|(_, r, _)| 1.0 / libm::sqrt(*r))
            .sum();
        let mut caps = Caps::default();
        for &(which, r, pinned) in &list {
            let c = pinned.unwrap_or_else(|| norm / (budget * libm::sqrt(r)));
            match which {
                0 => caps.c_in = Some(c),
                1 => caps.c_out = Some(c),
                2 => caps.c_emitter = Some(c),
                _ => caps.c_base = Some(c),
            }
        }
        if norm == 0.0 {
            return Ok((caps, f_t));
        }
        // Scale the free capacitors together until the exact corner is f_t.
        let free = |c: &mut Caps, k: f64| {
            for &(which, _, pinned) in &list {
                if pinned.is_some() {
                    continue;
                }
                let slot = match which {
                    0 => &mut c.c_in,
                    1 => &mut c.c_out,
                    2 => &mut c.c_emitter,
                    _ => &mut c.c_base,
                };
                *slot = slot.map(|v| (v * k).min(MAX_CAPACITANCE));
            }
        };
        for _ in 0..8 {
            let st = self.stage_of(p, &caps);
            let resp = Response::new(&st, ss)?;
            let level = corner_level(&resp);
            // A first-order high-pass at its −3 dB point: slope ½, curvature −½.
            let start = Start {
                x: libm::log(f_t),
                slope: 0.5,
                curvature: -0.5,
            };
            let Some(f) = find_corner(&resp, level, Side::Lower, start, 1e-9, false)? else {
                break;
            };
            let ratio = f / f_t;
            if libm::fabs(ratio - 1.0) < 0.002 {
                break;
            }
            free(&mut caps, ratio);
        }
        Ok((caps, f_t))
    }

    /// The standard-value stage. Each free resistor takes one of the two
    /// standard values around its continuous value, and every combination
    /// is tried (at most 2⁵ = 32); the capacitors go to the next value up.
    /// The combination kept meets the requirements and, among those, moves
    /// IC, VCE and the gain least from the continuous design. When none
    /// meets them, neighbouring values are tried one part at a time, and the
    /// capacitors are moved up a step when only the lower corner fails.
    fn snap(&self, ideal: &Stage, notes: &mut Vec<String>) -> Result<(Stage, Analysis)> {
        let s = self.spec;
        let rs = s.series.resistors;
        let cs = s.series.capacitors;
        let pin = &s.parts;
        let target = self.measure(ideal).ok_or_else(|| {
            Error::inconsistent("bias", "the continuous design has no operating point")
        })?;
        let get = |st: &Stage, k: usize| -> f64 {
            let p = &st.parts;
            match k {
                0 => p.r1.unwrap_or(0.0),
                1 => p.r2.unwrap_or(0.0),
                2 => p.rc,
                3 => p.re,
                _ => p.re_bypassed,
            }
        };
        let set = |st: &mut Stage, k: usize, v: f64| {
            let p = &mut st.parts;
            match k {
                0 => p.r1 = Some(v),
                1 => p.r2 = Some(v),
                2 => p.rc = v,
                3 => p.re = v,
                _ => p.re_bypassed = v,
            }
        };
        let pinned = [pin.r1, pin.r2, pin.rc, pin.re, pin.re_bypassed];
        let free: Vec<usize> = (0..5)
            .filter(|&k| pinned[k].is_none() && get(ideal, k) > 0.0)
            .collect();
        // The standard values either side of each free resistor.
        let choices: Vec<(usize, [f64; 2], usize)> = free
            .iter()
            .filter_map(|&k| {
                let l = rs.lookup(get(ideal, k))?;
                Some(if l.below == l.above {
                    (k, [l.below, l.below], 1)
                } else {
                    (k, [l.below, l.above], 2)
                })
            })
            .collect();
        let cap_pins = [pin.c_in, pin.c_out, pin.c_emitter, pin.c_base];
        let set_caps = |st: &mut Stage, steps: u32| {
            let base = &ideal.parts;
            let p = &mut st.parts;
            for (slot, from, pinned) in [
                (&mut p.c_in, base.c_in, cap_pins[0]),
                (&mut p.c_out, base.c_out, cap_pins[1]),
                (&mut p.c_emitter, base.c_emitter, cap_pins[2]),
                (&mut p.c_base, base.c_base, cap_pins[3]),
            ] {
                *slot = match (from, pinned) {
                    (Some(c), None) => {
                        let mut v = cs.next_up(c).unwrap_or(c);
                        for _ in 0..steps {
                            v = cs.next_up(v * 1.001).unwrap_or(v);
                        }
                        Some(v.min(MAX_CAPACITANCE))
                    }
                    (c, _) => c,
                };
            }
        };
        let np = 1.0 / (20.0 * core::f64::consts::LOG10_E);
        // (total shortfall, shortfall weighted first and then the movement of the targets)
        let objective = |st: &Stage| -> Option<(f64, f64)> {
            let m = self.measure(st)?;
            let short: f64 = self.gaps(st, &m, 0.0).iter().map(|g| g.short).sum();
            let moved = libm::fabs(libm::log(m.ic / target.ic))
                + libm::fabs(m.vce - target.vce) / target.vce
                + libm::fabs(m.gain_db - target.gain_db) * np;
            Some((short, 1e3 * short + moved))
        };
        let mut last_checks = Vec::new();
        for cap_steps in 0..4u32 {
            let mut st = ideal.clone();
            set_caps(&mut st, cap_steps);
            let combos: usize = choices.iter().map(|c| c.2).product();
            let mut best: Option<(Stage, (f64, f64))> = None;
            for code in 0..combos {
                let mut cand = st.clone();
                let mut rest = code;
                for &(k, values, n) in &choices {
                    set(&mut cand, k, values[rest % n]);
                    rest /= n;
                }
                if let Some(sc) = objective(&cand) {
                    if best.as_ref().is_none_or(|b| sc.1 < b.1 .1) {
                        best = Some((cand, sc));
                    }
                }
            }
            let Some((mut st, mut current)) = best else {
                break;
            };
            // Wider moves while a requirement fails: one standard step of one
            // part, or of two parts together (a divider moved as a pair keeps
            // its voltage), the best move first.
            let step_of = |v: f64, dir: usize| {
                if dir == 0 {
                    rs.next_up(v * 1.001)
                } else {
                    rs.next_down(v * 0.999)
                }
            };
            for _ in 0..24 {
                if current.0 == 0.0 {
                    break;
                }
                let mut step: Option<(Stage, (f64, f64))> = None;
                let mut consider = |cand: Stage| {
                    if let Some(sc) = objective(&cand) {
                        if step.as_ref().is_none_or(|b| sc.1 < b.1 .1) {
                            step = Some((cand, sc));
                        }
                    }
                };
                for (i, &k) in free.iter().enumerate() {
                    for dir in 0..2 {
                        let Some(nv) = step_of(get(&st, k), dir) else {
                            continue;
                        };
                        let mut cand = st.clone();
                        set(&mut cand, k, nv);
                        for &j in &free[i + 1..] {
                            for dir2 in 0..2 {
                                let Some(nw) = step_of(get(&st, j), dir2) else {
                                    continue;
                                };
                                let mut pair = cand.clone();
                                set(&mut pair, j, nw);
                                consider(pair);
                            }
                        }
                        consider(cand);
                    }
                }
                match step {
                    Some((cand, sc)) if sc.1 < current.1 => {
                        st = cand;
                        current = sc;
                    }
                    _ => break,
                }
            }
            // The real check: the ordinary analysis.
            let analysis = analyze(&st)?;
            let checks = s.requirements.check(&analysis);
            if checks.iter().all(|c| c.pass) && analysis.operating_point.region == Region::Active {
                if cap_steps > 0 {
                    notes.push(format!(
                        "the capacitors were moved {cap_steps} standard step(s) up to meet max_f_low"
                    ));
                }
                return Ok((st, analysis));
            }
            let only_corner = checks
                .iter()
                .filter(|c| !c.pass)
                .all(|c| c.id == "max_f_low");
            last_checks = checks;
            if !only_corner {
                break;
            }
        }
        let failed: Vec<&Check> = last_checks.iter().filter(|c| !c.pass).collect();
        let Some(first) = failed.first() else {
            return Err(Error::inconsistent(
                "bias",
                "the standard-value design does not work in the active region",
            ));
        };
        let mut reason = format!(
            "with {} resistors and {} capacitors, after trying the neighbouring standard values, ",
            rs.name(),
            cs.name()
        );
        for (i, c) in failed.iter().enumerate() {
            if i > 0 {
                reason.push_str("; ");
            }
            reason.push_str(&format!(
                "{}: {} (short by {})",
                c.id,
                c.message,
                format_si(libm::fabs(c.value - c.limit), c.unit)
            ));
        }
        reason.push_str(
            "; the continuous design meets it: choose a finer series or relax the requirement",
        );
        Err(Error::inconsistent(
            format!("requirements.{}", first.id),
            reason,
        ))
    }
}

/// Where the best value of one check was found: the gap there and the
/// other checks that fail at that point.
type Alone<'a> = &'a dyn Fn(&str) -> Option<(Gap, Vec<&'static str>)>;

/// The error for failing gaps, or `None` when every gap is met. With
/// `alone`, each failing requirement also says the best it reaches anywhere
/// and what stands in the way there.
fn explain(gaps: &[Gap], alone: Option<Alone<'_>>) -> Option<Error> {
    let failing: Vec<&Gap> = gaps.iter().filter(|g| g.short > 0.0).collect();
    let first = failing.first()?;
    let name = |id: &str| -> String {
        match id {
            "ic_max" | "ptot" | "tj_max" => format!("the transistor's {id} rating"),
            "resistor_power" => String::from("the resistor power (half of resistor_rating)"),
            "region" => String::from("the active region"),
            _ => String::from(id),
        }
    };
    let value_of = |g: &Gap| -> String {
        if g.value.is_nan() {
            String::from("more than 3 dB down")
        } else {
            format_si(g.value, g.unit)
        }
    };
    let describe = |g: &Gap| -> String {
        if g.id == "region" {
            return String::from("the transistor is not in its active region");
        }
        if g.value.is_nan() {
            // A corner checked by one nodal solve: say where it stands.
            return format!(
                "{}: the response is more than 3 dB down at {}",
                g.id,
                format_si(g.limit, g.unit)
            );
        }
        let lower_is_better = g.id.starts_with("max_")
            || matches!(g.id, "ic_max" | "ptot" | "tj_max" | "resistor_power");
        let miss = if lower_is_better {
            g.value - g.limit
        } else {
            g.limit - g.value
        };
        if miss <= 0.0 {
            return format!(
                "{}: {} against {} is inside the limit but not by the 5 % design margin",
                name(g.id),
                format_si(g.value, g.unit),
                format_si(g.limit, g.unit)
            );
        }
        let pct = if g.limit != 0.0 {
            100.0 * miss / libm::fabs(g.limit)
        } else {
            0.0
        };
        format!(
            "{}: {} against {} (short by {}, {:.1} %)",
            name(g.id),
            format_si(g.value, g.unit),
            format_si(g.limit, g.unit),
            format_si(miss, g.unit),
            pct
        )
    };
    let mut reason = String::from("cannot be met: ");
    for (i, g) in failing.iter().enumerate() {
        if i > 0 {
            reason.push_str("; ");
        }
        reason.push_str(&describe(g));
        let Some(f) = alone else { continue };
        let Some((b, others)) = f(g.id) else { continue };
        if b.short > 0.0 {
            reason.push_str(&format!(
                " — no bias point reaches it (the best is {})",
                value_of(&b)
            ));
        } else if !others.is_empty() {
            let list: Vec<String> = others.iter().map(|o| name(o)).collect();
            reason.push_str(&format!(
                " — it is met only where these fail: {}",
                list.join(", ")
            ));
        }
    }
    let field = match first.id {
        "ic_max" | "ptot" | "tj_max" => format!("transistor.{}", first.id),
        "resistor_power" => String::from("resistor_rating"),
        "region" => String::from("bias"),
        id => format!("requirements.{id}"),
    };
    Some(Error::inconsistent(field, reason))
}

fn part_choices(spec: &Spec, ideal: &Stage, stage: &Stage) -> Vec<PartChoice> {
    let (a, b) = (&ideal.parts, &stage.parts);
    let pin = &spec.parts;
    let rs = spec.series.resistors;
    let cs = spec.series.capacitors;
    // (part, continuous value, chosen value, pinned, series)
    type Row = (&'static str, Option<f64>, Option<f64>, bool, ESeries);
    let rows: [Row; 9] = [
        ("r1", a.r1, b.r1, pin.r1.is_some(), rs),
        ("r2", a.r2, b.r2, pin.r2.is_some(), rs),
        ("rc", Some(a.rc), Some(b.rc), pin.rc.is_some(), rs),
        ("re", Some(a.re), Some(b.re), pin.re.is_some(), rs),
        (
            "re_bypassed",
            Some(a.re_bypassed),
            Some(b.re_bypassed),
            pin.re_bypassed.is_some(),
            rs,
        ),
        ("c_in", a.c_in, b.c_in, pin.c_in.is_some(), cs),
        ("c_out", a.c_out, b.c_out, pin.c_out.is_some(), cs),
        (
            "c_emitter",
            a.c_emitter,
            b.c_emitter,
            pin.c_emitter.is_some(),
            cs,
        ),
        ("c_base", a.c_base, b.c_base, pin.c_base.is_some(), cs),
    ];
    rows.iter()
        .filter_map(|&(part, i, c, pinned, series)| {
            let (i, c) = (i?, c?);
            if i <= 0.0 && c <= 0.0 {
                return None;
            }
            Some(PartChoice {
                part,
                ideal: i,
                chosen: c,
                pinned,
                series: if pinned { None } else { Some(series) },
                change: if i > 0.0 { c / i - 1.0 } else { 0.0 },
            })
        })
        .collect()
}

fn differences(ideal: &Analysis, snapped: &Analysis) -> Vec<Difference> {
    let row =
        |quantity: &'static str, unit: &'static str, a: Option<f64>, b: Option<f64>| Difference {
            quantity,
            unit,
            ideal: a,
            snapped: b,
            difference: match (a, b) {
                (Some(a), Some(b)) => Some(b - a),
                _ => None,
            },
        };
    let pick = |a: &Analysis| {
        [
            Some(a.operating_point.ic),
            Some(libm::fabs(a.operating_point.vce)),
            Some(a.swing.symmetric),
            Some(db20(libm::fabs(a.midband.voltage_gain))),
            Some(a.midband.input_impedance),
            Some(a.midband.output_impedance),
            a.bandwidth.f_low,
            a.bandwidth.f_high,
            Some(a.dissipation.supply_current),
            Some(a.dissipation.junction_temperature.celsius()),
        ]
    };
    let names: [(&'static str, &'static str); 10] = [
        ("ic", "A"),
        ("vce", "V"),
        ("swing", "V"),
        ("voltage_gain_db", "dB"),
        ("input_impedance", "Ω"),
        ("output_impedance", "Ω"),
        ("f_low", "Hz"),
        ("f_high", "Hz"),
        ("supply_current", "A"),
        ("junction_temperature", "°C"),
    ];
    let (a, b) = (pick(ideal), pick(snapped));
    names
        .iter()
        .zip(a.iter().zip(b.iter()))
        .map(|(&(q, u), (&x, &y))| row(q, u, x, y))
        .collect()
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
                            for c in s.requirements.check(&a) {
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
