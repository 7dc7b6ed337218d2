//! Sensitivities: the percent change of each result per percent change of
//! each parameter, by central differences, and the corner predictions the
//! Monte Carlo trials start from.

use super::*;

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
    pub(super) fn sensitivity(&self) -> Result<(Vec<Sensitivity>, Prediction)> {
        let mut out = Vec::new();
        let mut pred = Prediction {
            thd_valid: self.sample.get(Quantity::Thd).is_finite(),
            ..Prediction::default()
        };
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
            if self.thd.is_some()
                && !(a.get(Quantity::Thd).is_finite() && b.get(Quantity::Thd).is_finite())
            {
                // A ±1 % step that loses the THD: no prediction from it, so
                // every trial is solved in full.
                pred.thd_valid = false;
            }
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
                if q == Quantity::Thd {
                    // formula: first and second derivative of ln THD on the
                    // three points, for the trials' screening prediction
                    let (hp, hm) = (
                        libm::log(up[i] / self.nominal[i]),
                        libm::log(self.nominal[i] / down[i]),
                    );
                    let (lp, l0, lm) = (libm::log(r1), libm::log(r0), libm::log(r2));
                    pred.thd[i] = (lp - lm) / dlnp;
                    pred.thd2[i] = 2.0 * ((lp - l0) / hp - (l0 - lm) / hm) / (hp + hm);
                }
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
/// with respect to ln p, for the lower [0] and upper [1] corner; and those
/// of ln THD (`thd`, `thd2`), valid when the THD is followed and every
/// step found it.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub(super) struct Prediction {
    pub(super) root: [[f64; PARAMETERS]; 2],
    pub(super) root2: [[f64; PARAMETERS]; 2],
    pub(super) slope: [[f64; PARAMETERS]; 2],
    pub(super) slope2: [[f64; PARAMETERS]; 2],
    pub(super) thd: [f64; PARAMETERS],
    pub(super) thd2: [f64; PARAMETERS],
    pub(super) thd_valid: bool,
}

impl Prediction {
    /// The predicted THD of a trial whose parameters are ln(p/p₀) =
    /// `ln_ratio` from the nominal THD `thd0`: ln THD ≈ ln THD₀ +
    /// Σ (aᵢ·rᵢ + ½·bᵢ·rᵢ²). NaN when there is no valid prediction.
    pub(super) fn thd_at(&self, thd0: f64, ln_ratio: &[f64; PARAMETERS]) -> f64 {
        if !self.thd_valid {
            return f64::NAN;
        }
        let mut d = 0.0;
        for ((a, b), r) in self.thd.iter().zip(&self.thd2).zip(ln_ratio) {
            d += a * r + 0.5 * b * r * r;
        }
        thd0 * libm::exp(d)
    }
}

/// The sensitivity table of `stage`, largest magnitude first (see the module docs).
pub fn sensitivity(stage: &Stage) -> Result<Vec<Sensitivity>> {
    Ok(Model::new(stage, None, None)?.sensitivity()?.0)
}
