//! Dissipation, ratings margins and cautions.
//!
//! Quiescent (no-signal) dissipation. For a class-A stage with a resistive
//! load the transistor dissipates most with no signal, so the quiescent
//! figure is the one to check against its ratings.
//!
//! ```text
//! P(transistor) = |VCE|·IC + |VBE|·IB
//! Tj = Ta + P·RθJA
//! Ptot(Ta) = Ptot(25 °C)·(Tj,max − Ta)/(Tj,max − 25 °C)   for Ta > 25 °C (linear derating)
//! P(resistor) = V²/R = I²·R, checked against 50 % of its rating (common practice)
//! ```
//!
//! VCEO is checked against the supply: at cutoff (power-up, or the negative
//! peak of an overdriven stage) the whole supply can stand across the
//! transistor. IC max is checked against the collector current at the
//! saturation end of the AC load line (the largest current of a full swing).

use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

use crate::constants::Temperature;
use crate::format::format_si;
use crate::operating_point::{OperatingPoint, Region};
use crate::stage::{Stage, StageKind};
use crate::swing::Swing;
use crate::transistor::Polarity;

/// Share of a resistor's rating it may use at the working ambient (common practice).
pub const RESISTOR_DERATING: f64 = 0.5;
/// Margin below a rating that earns a caution (within 20 %).
pub const RATING_MARGIN: f64 = 0.8;
/// Junction temperature above which the package is hot to the touch, °C
/// (common practice: metal and plastic above about 60–70 °C can burn).
pub const HOT_SURFACE_CELSIUS: f64 = 70.0;
/// DC voltage limit of the extra-low-voltage class ES1 (IEC 62368-1), V.
pub const ES1_DC_LIMIT: f64 = 60.0;
/// Relative change of IC across the hFE range or over +25 K beyond which the
/// bias counts as not stabilised (common practice: ±10 %).
pub const BIAS_STABILITY_LIMIT: f64 = 0.10;

/// The sentence that defers to local codes and licensed practice, written
/// once under the cautions when one of them is a safety caution
/// ([`Caution::safety`]).
pub const DEFERRAL: &str =
    "These figures are design aids, not a safety assessment: follow local codes and licensed practice.";

/// One pass/fail check of a rating or requirement.
#[derive(Debug, Clone, PartialEq)]
pub struct Check {
    /// Stable identifier, e.g. `vceo`, `min_voltage_gain_db`, `resistor_power.rc`.
    pub id: String,
    /// True when the value is inside the limit.
    pub pass: bool,
    /// The value found, SI units.
    pub value: f64,
    /// The limit, SI units.
    pub limit: f64,
    /// The unit symbol of value and limit.
    pub unit: &'static str,
    /// A plain sentence.
    pub message: String,
}

impl Check {
    /// A check that `value <= limit`.
    pub fn at_most(
        id: impl Into<String>,
        what: &str,
        value: f64,
        limit: f64,
        unit: &'static str,
    ) -> Check {
        let pass = value.is_finite() && value <= limit;
        let message = if pass {
            format!(
                "{what} {} is within {}",
                format_si(value, unit),
                format_si(limit, unit)
            )
        } else {
            format!(
                "{what} {} exceeds {}",
                format_si(value, unit),
                format_si(limit, unit)
            )
        };
        Check {
            id: id.into(),
            pass,
            value,
            limit,
            unit,
            message,
        }
    }

    /// A check that `value >= limit`.
    pub fn at_least(
        id: impl Into<String>,
        what: &str,
        value: f64,
        limit: f64,
        unit: &'static str,
    ) -> Check {
        let pass = value.is_finite() && value >= limit;
        let message = if pass {
            format!(
                "{what} {} meets at least {}",
                format_si(value, unit),
                format_si(limit, unit)
            )
        } else {
            format!(
                "{what} {} is below the required {}",
                format_si(value, unit),
                format_si(limit, unit)
            )
        };
        Check {
            id: id.into(),
            pass,
            value,
            limit,
            unit,
            message,
        }
    }
}

/// A caution: something a reviewer should see, with a plain sentence.
#[derive(Debug, Clone, PartialEq)]
pub struct Caution {
    /// Stable identifier, e.g. `hazardous-voltage`.
    pub id: String,
    /// The sentence shown to the user.
    pub message: String,
    /// True for a caution about harm (shock, heat, a rating exceeded):
    /// a renderer writes [`DEFERRAL`] once under the cautions when one of
    /// them is.
    pub safety: bool,
}

/// Where the power goes at the quiescent point.
#[derive(Debug, Clone, PartialEq)]
pub struct Dissipation {
    /// Transistor dissipation, W.
    pub transistor: f64,
    /// Junction temperature at the ambient.
    pub junction_temperature: Temperature,
    /// Current drawn from the supply, A.
    pub supply_current: f64,
    /// Power in each resistor, W, by design-file name (only those present).
    pub resistors: Vec<(&'static str, f64)>,
    /// The derated Ptot at the ambient, W.
    pub ptot_available: f64,
}

impl Dissipation {
    /// The quiescent dissipation of `stage` at `op`.
    pub fn at(stage: &Stage, op: &OperatingPoint) -> Dissipation {
        let p = &stage.parts;
        let vcc = stage.supply;
        let transistor = libm::fabs(op.vce) * op.ic + libm::fabs(op.vbe) * op.ib;
        let tj = stage.ambient.plus(transistor * stage.transistor.rth_ja);
        // Distances from each rail, whatever the polarity.
        let vb = op.vb;
        let mut resistors = Vec::with_capacity(6);
        if let Some(r) = p.r1 {
            resistors.push(("r1", (vcc - vb) * (vcc - vb) / r));
        }
        if let Some(r) = p.r2 {
            resistors.push(("r2", vb * vb / r));
        }
        if p.rc > 0.0 {
            resistors.push(("rc", op.ic * op.ic * p.rc));
        }
        if p.re > 0.0 {
            resistors.push(("re", op.ie * op.ie * p.re));
        }
        if p.re_bypassed > 0.0 {
            resistors.push(("re_bypassed", op.ie * op.ie * p.re_bypassed));
        }
        let i_r1 = p.r1.map_or(0.0, |r| (vcc - vb) / r);
        // formula: I(supply) = I(r1) + IC (NPN: through rc) or + IE (PNP: through the emitter resistance)
        let supply_current = match stage.transistor.polarity {
            Polarity::Npn => i_r1 + op.ic,
            Polarity::Pnp => i_r1 + op.ie,
        };
        Dissipation {
            transistor,
            junction_temperature: tj,
            supply_current,
            resistors,
            ptot_available: stage.transistor.ptot_at(stage.ambient),
        }
    }
}

/// One rating of the transistor that every analysis checks: the check's
/// id, the rating's name, what is held against it, and the unit.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Rating {
    /// The check's id in the report: `vceo`.
    pub id: &'static str,
    /// The rating's name: "VCEO rating".
    pub label: &'static str,
    /// What is held against it: "supply across the transistor at cutoff".
    pub what: &'static str,
    /// The unit of value and limit.
    pub unit: &'static str,
}

/// The transistor's ratings, in the order of the checks. Each resistor's
/// power is checked too, as `resistor_power.NAME` against half its
/// rating ([`RESISTOR_DERATING`]).
pub const RATINGS: &[Rating] = &[
    Rating {
        id: "vceo",
        label: "VCEO rating",
        what: "supply across the transistor at cutoff",
        unit: "V",
    },
    Rating {
        id: "ic_max",
        label: "collector current rating",
        what: "peak collector current at full swing",
        unit: "A",
    },
    Rating {
        id: "ptot",
        label: "dissipation rating",
        what: "transistor dissipation",
        unit: "W",
    },
    Rating {
        id: "tj_max",
        label: "junction temperature rating",
        what: "junction temperature",
        unit: "°C",
    },
];

/// The ratings checks: VCEO, IC max, Ptot (derated), Tj max and each resistor's power.
pub fn rating_checks(stage: &Stage, swing: &Swing, d: &Dissipation) -> Vec<Check> {
    let t = &stage.transistor;
    let mut out = Vec::with_capacity(RATINGS.len() + d.resistors.len());
    let values = [
        (stage.supply, t.vceo_max),
        (swing.ic_peak.max(0.0), t.ic_max),
        (d.transistor, d.ptot_available),
        (d.junction_temperature.celsius(), t.tj_max.celsius()),
    ];
    for (r, (value, limit)) in RATINGS.iter().zip(values) {
        out.push(Check::at_most(r.id, r.what, value, limit, r.unit));
    }
    for &(name, w) in &d.resistors {
        let what = format!("{name} dissipation");
        out.push(Check::at_most(
            format!("resistor_power.{name}"),
            &what,
            w,
            RESISTOR_DERATING * stage.parts.resistor_rating,
            "W",
        ));
    }
    out
}

/// Relative IC change across the hFE range and over a 25 K rise, for the
/// bias-stability caution: `(across_hfe, over_temperature)`, each the largest
/// |ΔIC/IC|. Computed by the caller from extra DC solves.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct BiasStability {
    /// Largest |ΔIC|/IC between hfe_min, hfe and hfe_max.
    pub across_hfe: f64,
    /// |ΔIC|/IC for the ambient raised by 25 K.
    pub over_temperature: f64,
}

/// The caution for a stage whose response never comes within 3 dB of its
/// midband gain ([`crate::Edge::NoPassband`]), if that is the case.
pub(crate) fn passband_caution(b: &crate::response::Bandwidth) -> Option<Caution> {
    (b.low_edge == crate::response::Edge::NoPassband).then(|| Caution {
        safety: false,
        id: "no-passband".into(),
        message: format!(
            "The response never comes within 3 dB of the midband gain: its peak is {} below it, at {}. \
             The midband gains and impedances describe a band this stage does not have; a coupling or bypass \
             capacitor is far too small for the frequencies the stage must pass.",
            format_si(-crate::decibel::db20(b.peak_ratio), "dB"),
            format_si(b.peak_frequency, "Hz")
        ),
    })
}

/// The cautions for a solved stage.
pub fn cautions(
    stage: &Stage,
    op: &OperatingPoint,
    checks: &[Check],
    d: &Dissipation,
    stability: Option<&BiasStability>,
) -> Vec<Caution> {
    let mut out = Vec::new();
    let mut push = |id: String, message: String, safety: bool| {
        out.push(Caution {
            id,
            message,
            safety,
        })
    };
    if stage.supply > ES1_DC_LIMIT {
        push(
            "hazardous-voltage".into(),
            format!(
                "The supply of {} is above the {} V DC limit of the extra-low-voltage class ES1 (IEC 62368-1): \
                 it can give an electric shock. Insulation, spacing, enclosure and the supply itself need a qualified review.",
                format_si(stage.supply, "V"),
                ES1_DC_LIMIT
            ), true);
    }
    match op.region {
        Region::Active => {}
        Region::Saturation => push(
            "region-saturation".into(),
            "The transistor is saturated at the quiescent point: it does not amplify. Lower the base drive or the collector resistance.".into(), false),
        Region::Cutoff => push(
            "region-cutoff".into(),
            "The transistor is cut off at the quiescent point: it does not amplify. Check the base divider and the polarity.".into(), false),
    }
    for c in checks {
        if !c.id.starts_with("resistor_power.")
            && !matches!(c.id.as_str(), "vceo" | "ic_max" | "ptot" | "tj_max")
        {
            continue;
        }
        if !c.pass {
            push(
                format!("rating-exceeded.{}", c.id),
                format!(
                    "Rating exceeded: {}. The part can fail or overheat.",
                    c.message
                ),
                true,
            );
        } else if c.limit > 0.0 && c.value > RATING_MARGIN * c.limit {
            push(
                format!("rating-margin.{}", c.id),
                format!(
                    "Less than 20 % margin: {} ({:.0} % of the limit). Allow for tolerance, temperature and transients.",
                    c.message,
                    100.0 * c.value / c.limit
                ), false);
        }
    }
    let tj = d.junction_temperature.celsius();
    if tj > HOT_SURFACE_CELSIUS {
        push(
            "hot-transistor".into(),
            format!(
                "The transistor runs at about {tj:.0} °C junction temperature ({} dissipated): its package is hot enough to burn \
                 and to age nearby parts. Keep it clear of touch and of heat-sensitive parts.",
                format_si(d.transistor, "W")
            ), true);
    }
    for &(name, w) in &d.resistors {
        if w > RESISTOR_DERATING * stage.parts.resistor_rating {
            push(
                format!("hot-resistor.{name}"),
                format!(
                    "{name} dissipates {}, more than half of its {} rating: it runs hot. Use a larger rating or spread the power.",
                    format_si(w, "W"),
                    format_si(stage.parts.resistor_rating, "W")
                ), true);
        }
    }
    if let Some(s) = stability {
        if op.region == Region::Active && s.across_hfe > BIAS_STABILITY_LIMIT {
            push(
                "bias-unstable-hfe".into(),
                format!(
                    "The collector current moves by {:.0} % across the transistor's hFE range: the bias is not stabilised. \
                     Make the divider stiffer (RTH ≤ 0.1·hfe_min·RE) or add emitter resistance.",
                    100.0 * s.across_hfe
                ), false);
        }
        if op.region == Region::Active && s.over_temperature > BIAS_STABILITY_LIMIT {
            push(
                "bias-unstable-temperature".into(),
                format!(
                    "The collector current moves by {:.0} % for a 25 K rise in ambient: the bias is not stabilised against temperature. \
                     Give the emitter resistor a larger DC drop (VBE falls about 2 mV/K).",
                    100.0 * s.over_temperature
                ), false);
        }
    }
    if stage.kind == StageKind::CommonEmitter
        && stage.re_total() == 0.0
        && op.region == Region::Active
    {
        push(
            "no-emitter-resistance".into(),
            "The emitter is grounded: the bias depends directly on VBE and hFE. Add emitter resistance.".into(), false);
    }
    out
}
