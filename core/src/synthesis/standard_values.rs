//! The continuous design snapped to standard values, and what that
//! changes.

use super::*;

impl Ctx<'_> {
    /// The standard-value stage. Each free resistor takes one of the two
    /// standard values around its continuous value, and every combination
    /// is tried (at most 2⁵ = 32); the capacitors go to the next value up.
    /// The combination kept meets the requirements and, among those, moves
    /// IC, VCE and the gain least from the continuous design. When none
    /// meets them, neighbouring values are tried one part at a time, and the
    /// capacitors are moved up a step when only the lower corner fails.
    pub(super) fn snap(&self, ideal: &Stage, notes: &mut Vec<String>) -> Result<(Stage, Analysis)> {
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
            let checks = s.requirements.check_small_signal(&analysis);
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

pub(super) fn part_choices(spec: &Spec, ideal: &Stage, stage: &Stage) -> Vec<PartChoice> {
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

pub(super) fn differences(ideal: &Analysis, snapped: &Analysis) -> Vec<Difference> {
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
