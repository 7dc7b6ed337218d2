//! How far a candidate is from each requirement and rating (the
//! shortfalls), and the error that explains a specification that cannot
//! be met.

use super::*;

impl Ctx<'_> {
    /// Every set requirement and the ratings, on `stage` as measured, each
    /// limit tightened by `margin` (0 for the real check).
    pub(super) fn gaps(&self, stage: &Stage, m: &Measured, margin: f64) -> Vec<Gap> {
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
                // The THD needs a steady state at every step of the search;
                // synthesis designs for the load-line swing and checks
                // max_thd on the standard-value design it returns.
                Quantity::Thd => continue,
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

    /// The error for a scan that found no design: the requirements that fail
    /// at the best compromise, with the best value each reaches on its own.
    pub(super) fn infeasible(&self, scores: &[(f64, Vec<Gap>)]) -> Error {
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
}

/// Where the best value of one check was found: the gap there and the
/// other checks that fail at that point.
pub(super) type Alone<'a> = &'a dyn Fn(&str) -> Option<(Gap, Vec<&'static str>)>;

/// The error for failing gaps, or `None` when every gap is met. With
/// `alone`, each failing requirement also says the best it reaches anywhere
/// and what stands in the way there.
pub(super) fn explain(gaps: &[Gap], alone: Option<Alone<'_>>) -> Option<Error> {
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
