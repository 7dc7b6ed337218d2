//! The search for the free resistor: a scan of scores, bisection and
//! polishing, and the choice of the collector current.

use super::*;

impl Ctx<'_> {
    /// The total shortfall of the design at `r` (∞ when there is no design).
    pub(super) fn score_at(&self, r: f64, rule: Rule, margin: f64) -> (f64, Vec<Gap>) {
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
    pub(super) fn scan(&self, rule: Rule) -> Result<f64> {
        match self.scan_with(rule, DESIGN_MARGIN) {
            Ok(r) => Ok(r),
            Err(_) => self.scan_with(rule, 0.0),
        }
    }

    pub(super) fn scan_with(&self, rule: Rule, margin: f64) -> Result<f64> {
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

    /// The root of `f(r) = 0` for a decreasing `f` (`None` where there is
    /// no design): a scan of 8 decades around RL for a sign change between
    /// two designs, then bisection in ln r. `None` without a bracket.
    pub(super) fn bisect(&self, f: &dyn Fn(f64) -> Option<f64>) -> Option<f64> {
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
    pub(super) fn polish(&self, r: f64, rule: Rule, g: &dyn Fn(&Point) -> f64) -> f64 {
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
    pub(super) fn ic_from_pins(&self) -> Result<Option<f64>> {
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
    pub(super) fn choose(&self, notes: &mut Vec<String>) -> Result<(f64, Rule)> {
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
}
