//! The three stages and their parts.
//!
//! Every stage shares one DC network: `r1` from the supply to the base, `r2`
//! from the base to ground, `rc` from the supply to the collector and the
//! emitter resistance to ground. A PNP stage is the mirror image: the
//! emitter resistance and `rc` swap rails (emitter resistance to the supply,
//! `rc` to ground) while `r1` stays "supply to base" and `r2` "base to ground".
//!
//! | stage | input | output | AC ground |
//! |---|---|---|---|
//! | common emitter | base, through `c_in` | collector, through `c_out` | `re_bypassed` through `c_emitter` |
//! | common collector | base, through `c_in` | emitter, through `c_out` | collector (rails) |
//! | common base | emitter, through `c_in` | collector, through `c_out` | base, through `c_base` |
//!
//! A capacitor given as `None` is ideal: a short at every signal frequency
//! and an open at DC, so it makes no corner.

use crate::constants::Temperature;
use crate::error::{non_negative, positive, within, Error, ErrorKind, Result};
use crate::format::format_si;
use crate::transistor::TransistorData;

/// Which terminal is common to input and output.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum StageKind {
    /// Input at the base, output at the collector: voltage gain, inverting.
    CommonEmitter,
    /// Input at the base, output at the emitter: the follower, a buffer.
    CommonCollector,
    /// Input at the emitter, output at the collector: low input impedance, wide band.
    CommonBase,
}

impl StageKind {
    /// The name used in design files: `common-emitter`, ...
    pub fn name(self) -> &'static str {
        match self {
            StageKind::CommonEmitter => "common-emitter",
            StageKind::CommonCollector => "common-collector",
            StageKind::CommonBase => "common-base",
        }
    }

    /// Reads a design-file stage name.
    pub fn parse(text: &str) -> Result<StageKind> {
        match text.trim() {
            "common-emitter" => Ok(StageKind::CommonEmitter),
            "common-collector" => Ok(StageKind::CommonCollector),
            "common-base" => Ok(StageKind::CommonBase),
            other => Err(Error::new(
                "stage",
                ErrorKind::Unsupported {
                    value: other.into(),
                    allowed: "common-emitter, common-collector or common-base".into(),
                },
            )),
        }
    }

    /// Every stage kind, in the order of the form's menu.
    pub const ALL: [StageKind; 3] = [
        StageKind::CommonEmitter,
        StageKind::CommonCollector,
        StageKind::CommonBase,
    ];
}

impl StageKind {
    /// The stage in words: "common collector (emitter follower)".
    pub fn label(self) -> &'static str {
        match self {
            StageKind::CommonEmitter => "common emitter",
            StageKind::CommonCollector => "common collector (emitter follower)",
            StageKind::CommonBase => "common base",
        }
    }

    /// The parts the stage uses (the `parts` keys; the rest are not
    /// fitted): the common emitter's bypassed emitter resistor and its
    /// capacitor, the common base's base decoupling capacitor.
    pub fn parts(self) -> &'static [&'static str] {
        match self {
            StageKind::CommonEmitter => &[
                "r1",
                "r2",
                "rc",
                "re",
                "re_bypassed",
                "c_emitter",
                "rs",
                "rl",
                "c_in",
                "c_out",
            ],
            StageKind::CommonCollector => &["r1", "r2", "rc", "re", "rs", "rl", "c_in", "c_out"],
            StageKind::CommonBase => &[
                "r1", "r2", "rc", "re", "rs", "rl", "c_in", "c_out", "c_base",
            ],
        }
    }
}

/// Resistor power rating used when none is given, in watts (a common 0.25 W part).
pub const DEFAULT_RESISTOR_RATING: f64 = 0.25;

/// The parts of a stage, in ohms and farads. Names follow the design file.
#[derive(Debug, Clone, PartialEq)]
pub struct Parts {
    /// Supply to base; `None` leaves it out.
    pub r1: Option<f64>,
    /// Base to ground; `None` leaves it out.
    pub r2: Option<f64>,
    /// Collector resistor (0 = collector tied to the rail; common collector only).
    pub rc: f64,
    /// Unbypassed emitter resistance.
    pub re: f64,
    /// Bypassed emitter resistance, in series below `re` (common emitter only).
    pub re_bypassed: f64,
    /// Source resistance of the signal source.
    pub rs: f64,
    /// Load resistance.
    pub rl: f64,
    /// Input coupling capacitor; `None` = ideal.
    pub c_in: Option<f64>,
    /// Output coupling capacitor; `None` = ideal.
    pub c_out: Option<f64>,
    /// Emitter bypass capacitor across `re_bypassed`; `None` = ideal.
    pub c_emitter: Option<f64>,
    /// Base bypass capacitor (common base only); `None` = ideal.
    pub c_base: Option<f64>,
    /// Power rating of every resistor, W.
    pub resistor_rating: f64,
}

impl Default for Parts {
    fn default() -> Self {
        Parts {
            r1: None,
            r2: None,
            rc: 0.0,
            re: 0.0,
            re_bypassed: 0.0,
            rs: 0.0,
            rl: 1e6,
            c_in: None,
            c_out: None,
            c_emitter: None,
            c_base: None,
            resistor_rating: DEFAULT_RESISTOR_RATING,
        }
    }
}

/// A complete stage: topology, supply, temperature, parts and transistor.
#[derive(Debug, Clone, PartialEq)]
pub struct Stage {
    /// The configuration.
    pub kind: StageKind,
    /// Supply voltage, V (positive; a PNP stage also runs from a positive supply).
    pub supply: f64,
    /// Ambient temperature.
    pub ambient: Temperature,
    /// The passive parts.
    pub parts: Parts,
    /// The transistor.
    pub transistor: TransistorData,
}

/// Largest supply accepted, V.
pub const MAX_SUPPLY: f64 = 1000.0;
/// Smallest supply accepted, V (below it no silicon junction turns on).
pub const MIN_SUPPLY: f64 = 0.1;
/// Largest resistance accepted, Ω (an open part is left out instead).
pub const MAX_RESISTANCE: f64 = 1e12;
/// Smallest resistance accepted other than 0 Ω (a short), Ω: below a
/// milliohm a part is a wire, and its conductance (10³ S and more) beside
/// the stage's microsiemens would only add rounding to the solve.
pub const MIN_RESISTANCE: f64 = 1e-3;
/// Largest capacitance accepted, F.
pub const MAX_CAPACITANCE: f64 = 10.0;
/// Smallest capacitance accepted, F (a femtofarad is less than the stray
/// capacitance of any real part; an ideal capacitor is left out instead).
pub const MIN_CAPACITANCE: f64 = 1e-15;
/// Range of a resistor's power rating, W.
pub const RESISTOR_RATING_RANGE: (f64, f64) = (1e-3, 1000.0);

/// The values a part or a condition usually takes, by design-file key:
/// (key, lowest, highest, unit, what it is). A value outside is allowed
/// (the bounds of [`Stage::validate`] decide that) but worth a second look:
/// `1m` typed for a resistor is 1 mΩ, `2.2` for a capacitor is 2.2 F.
/// Common practice for discrete one-transistor stages.
pub const USUAL_RANGES: &[(&str, f64, f64, &str, &str)] = &[
    ("r1", 10.0, 100e6, "Ω", "a bias resistor"),
    ("r2", 10.0, 100e6, "Ω", "a bias resistor"),
    ("rc", 1.0, 10e6, "Ω", "a collector resistor"),
    ("re", 0.1, 1e6, "Ω", "an emitter resistor"),
    ("re_bypassed", 0.1, 1e6, "Ω", "an emitter resistor"),
    ("rs", 0.1, 10e6, "Ω", "a source resistance"),
    ("rl", 1.0, 100e6, "Ω", "a load resistance"),
    ("c_in", 1e-12, 0.1, "F", "a coupling capacitor"),
    ("c_out", 1e-12, 0.1, "F", "a coupling capacitor"),
    ("c_emitter", 1e-12, 0.1, "F", "a bypass capacitor"),
    ("c_base", 1e-12, 0.1, "F", "a bypass capacitor"),
    ("resistor_rating", 0.01, 100.0, "W", "a resistor rating"),
    ("supply", 1.0, 400.0, "V", "a supply"),
    ("ambient", -55.0, 125.0, "°C", "an ambient temperature"),
];

/// A warning when `value` of the part or condition `key` (a design-file
/// key: `rc`, `c_in`, `supply`) lies outside its [`USUAL_RANGES`], else
/// `None`: "1 mΩ is unusual for a collector resistor (usually 1 Ω to
/// 10 MΩ)". A key without a usual range, and a zero, get none.
pub fn unusual(key: &str, value: f64) -> Option<alloc::string::String> {
    let &(_, lo, hi, unit, what) = USUAL_RANGES.iter().find(|r| r.0 == key)?;
    if value == 0.0 || !value.is_finite() || (lo..=hi).contains(&value) {
        return None;
    }
    Some(alloc::format!(
        "{} is unusual for {what} (usually {} to {})",
        format_si(value, unit),
        format_si(lo, unit),
        format_si(hi, unit)
    ))
}

fn not_applicable(field: &str, stage: StageKind, reason: &'static str) -> Error {
    Error::new(
        field,
        ErrorKind::NotApplicable {
            stage: stage.name(),
            reason,
        },
    )
}

/// A resistance of 0 Ω (a short, where the stage allows one) or from
/// [`MIN_RESISTANCE`] to [`MAX_RESISTANCE`].
pub(crate) fn resistor(field: &str, value: f64) -> Result<()> {
    non_negative(field, value, "Ω")?;
    if value == 0.0 || (MIN_RESISTANCE..=MAX_RESISTANCE).contains(&value) {
        Ok(())
    } else {
        Err(Error::out_of_range(
            field,
            value,
            "Ω",
            alloc::format!(
                "0 Ω (a short) or between {} and {}",
                format_si(MIN_RESISTANCE, "Ω"),
                format_si(MAX_RESISTANCE, "Ω")
            ),
        ))
    }
}

/// A resistance that must be there: from [`MIN_RESISTANCE`] to [`MAX_RESISTANCE`].
fn resistor_present(field: &str, value: f64) -> Result<()> {
    positive(field, value, "Ω")?;
    within(field, value, MIN_RESISTANCE, MAX_RESISTANCE, "Ω").map(|_| ())
}

fn capacitor(field: &str, value: Option<f64>) -> Result<()> {
    if let Some(c) = value {
        positive(field, c, "F")?;
        within(field, c, MIN_CAPACITANCE, MAX_CAPACITANCE, "F")?;
    }
    Ok(())
}

impl Parts {
    /// The parts of the crate documentation's example, a 12 V
    /// common-emitter gain stage: 47 kΩ / 10 kΩ divider, 4.7 kΩ collector
    /// resistor, 220 Ω unbypassed and 820 Ω bypassed emitter resistance,
    /// a 600 Ω source, a 10 kΩ load, 1 µF couplings and a 47 µF bypass.
    pub fn example() -> Parts {
        Parts {
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
        }
    }
}

impl Stage {
    /// The crate documentation's example stage, for examples, benchmarks
    /// and tests: [`Parts::example`] on a 12 V supply at 25 °C with the
    /// `general-purpose-npn` preset.
    pub fn example() -> Stage {
        Stage {
            kind: StageKind::CommonEmitter,
            supply: 12.0,
            ambient: Temperature::from_celsius(25.0),
            parts: Parts::example(),
            transistor: crate::presets::general_purpose_npn(),
        }
    }

    /// Checks every value and every combination; the error names the
    /// field as the design file spells it.
    pub fn validate(&self) -> Result<()> {
        let kind = self.kind;
        let p = &self.parts;
        positive("supply", self.supply, "V")?;
        within("supply", self.supply, MIN_SUPPLY, MAX_SUPPLY, "V")?;
        within("ambient", self.ambient.celsius(), -60.0, 200.0, "°C")?;
        self.transistor
            .validate()
            .map_err(|e| e.within("transistor"))?;
        if self.ambient.kelvin() >= self.transistor.tj_max.kelvin() {
            return Err(Error::inconsistent(
                "ambient",
                alloc::format!(
                    "the ambient ({} °C) must be below the transistor's tj_max ({} °C)",
                    self.ambient.celsius(),
                    self.transistor.tj_max.celsius()
                ),
            ));
        }
        for (name, v) in [("r1", p.r1), ("r2", p.r2)] {
            if let Some(r) = v {
                resistor_present(name, r)?;
            }
        }
        if p.r1.is_none() && p.r2.is_none() {
            return Err(Error::missing(
                "r1",
                "the base needs a bias path; give r1 (supply to base) and usually r2 (base to ground)",
            ));
        }
        resistor("rc", p.rc)?;
        resistor("re", p.re)?;
        resistor("re_bypassed", p.re_bypassed)?;
        resistor("rs", p.rs)?;
        resistor_present("rl", p.rl)?;
        capacitor("c_in", p.c_in)?;
        capacitor("c_out", p.c_out)?;
        capacitor("c_emitter", p.c_emitter)?;
        capacitor("c_base", p.c_base)?;
        positive("resistor_rating", p.resistor_rating, "W")?;
        let (lo, hi) = RESISTOR_RATING_RANGE;
        within("resistor_rating", p.resistor_rating, lo, hi, "W")?;
        match kind {
            StageKind::CommonEmitter => {
                if p.rc <= 0.0 {
                    return Err(Error::out_of_range(
                        "rc",
                        p.rc,
                        "Ω",
                        "greater than 0 Ω in a common-emitter stage (the output is taken across it)",
                    ));
                }
                if p.c_base.is_some() {
                    return Err(not_applicable(
                        "c_base",
                        kind,
                        "only a common-base stage bypasses its base; remove c_base",
                    ));
                }
                if p.c_emitter.is_some() && p.re_bypassed <= 0.0 {
                    return Err(not_applicable(
                        "c_emitter",
                        kind,
                        "c_emitter bypasses re_bypassed, which is 0; give re_bypassed or remove c_emitter",
                    ));
                }
            }
            StageKind::CommonCollector => {
                if p.re <= 0.0 {
                    return Err(Error::out_of_range(
                        "re",
                        p.re,
                        "Ω",
                        "greater than 0 Ω in a common-collector stage (the output is taken across it)",
                    ));
                }
                if p.re_bypassed > 0.0 {
                    return Err(not_applicable(
                        "re_bypassed",
                        kind,
                        "a follower's emitter resistor carries the output and is not bypassed; put all of it in re",
                    ));
                }
                if p.c_emitter.is_some() {
                    return Err(not_applicable(
                        "c_emitter",
                        kind,
                        "a follower's emitter is its output and is not bypassed; remove c_emitter",
                    ));
                }
                if p.c_base.is_some() {
                    return Err(not_applicable(
                        "c_base",
                        kind,
                        "only a common-base stage bypasses its base; remove c_base",
                    ));
                }
            }
            StageKind::CommonBase => {
                if p.rc <= 0.0 {
                    return Err(Error::out_of_range(
                        "rc",
                        p.rc,
                        "Ω",
                        "greater than 0 Ω in a common-base stage (the output is taken across it)",
                    ));
                }
                if p.re <= 0.0 {
                    return Err(Error::out_of_range(
                        "re",
                        p.re,
                        "Ω",
                        "greater than 0 Ω in a common-base stage (it returns the bias current while the input drives the emitter)",
                    ));
                }
                if p.re_bypassed > 0.0 {
                    return Err(not_applicable(
                        "re_bypassed",
                        kind,
                        "the emitter is the input of a common-base stage and is not bypassed; put all of it in re",
                    ));
                }
                if p.c_emitter.is_some() {
                    return Err(not_applicable(
                        "c_emitter",
                        kind,
                        "the emitter is the input of a common-base stage; remove c_emitter",
                    ));
                }
            }
        }
        Ok(())
    }

    /// Total DC emitter resistance (unbypassed plus bypassed), Ω.
    pub fn re_total(&self) -> f64 {
        self.parts.re + self.parts.re_bypassed
    }

    /// Thevenin equivalent of the base divider, in the mirrored (NPN-like)
    /// frame where the transistor is turned on by the resistor toward the
    /// upper rail: `(VTH, RTH)` in volts and ohms.
    ///
    /// For an NPN stage that resistor is `r1`; for a PNP stage it is `r2`.
    pub(crate) fn base_thevenin(&self) -> (f64, f64) {
        let (up, down) = match self.transistor.polarity {
            crate::transistor::Polarity::Npn => (self.parts.r1, self.parts.r2),
            crate::transistor::Polarity::Pnp => (self.parts.r2, self.parts.r1),
        };
        let g_up = up.map_or(0.0, |r| 1.0 / r);
        let g_down = down.map_or(0.0, |r| 1.0 / r);
        let g = g_up + g_down;
        // formula: VTH = VCC·G_up/(G_up + G_down), RTH = 1/(G_up + G_down)
        (self.supply * g_up / g, 1.0 / g)
    }

    /// Parallel resistance of the bias resistors seen by the signal at the base, Ω
    /// (both rails are AC ground).
    pub fn bias_resistance(&self) -> f64 {
        let g = self.parts.r1.map_or(0.0, |r| 1.0 / r) + self.parts.r2.map_or(0.0, |r| 1.0 / r);
        1.0 / g
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_far_from_usual_are_flagged() {
        // The two slips the page must catch (a resistor typed 1m, a
        // capacitor typed 2.2), and values inside their range pass.
        let m = unusual("rc", 1e-3).expect("1 mΩ collector resistor");
        assert!(
            m.starts_with("1 mΩ is unusual for a collector resistor"),
            "{m}"
        );
        assert!(unusual("c_in", 2.2).expect("2.2 F").contains("2.2 F"));
        assert_eq!(unusual("rc", 4.7e3), None);
        assert_eq!(unusual("c_in", 1e-6), None);
        assert_eq!(unusual("rs", 0.0), None, "a short is no slip");
        assert_eq!(unusual("hfe", 1e9), None, "no usual range for hfe here");
        for (key, lo, hi, _, _) in USUAL_RANGES {
            assert!(lo < hi, "{key}");
        }
    }
}
