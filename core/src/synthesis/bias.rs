//! The bias point of a candidate: the free resistor's law, the stage it
//! makes (divider, collector and emitter resistors) and what it measures.

use super::*;

/// How the collector current follows from the free resistor.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Rule {
    /// At the centre of the AC load line.
    Centre,
    /// This collector current.
    Ic(f64),
    /// This |VCE|.
    Vce(f64),
}

/// What sets the emitter voltage.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Law {
    /// `emitter_fraction`·VCC, or IE·Re when the unbypassed part needs more.
    Fraction,
    /// IE times this total resistance.
    Resistance(f64),
    /// The pinned divider: VTH − IB·(RTH + rbb') − VBE.
    Divider,
}

/// A continuous design point (NPN frame).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Point {
    pub(super) rc: f64,
    pub(super) re: f64,
    pub(super) re_bypassed: f64,
    pub(super) ic: f64,
    pub(super) ie: f64,
    pub(super) vce: f64,
    pub(super) ve: f64,
    pub(super) rth: f64,
    /// VTH that the target current needs with this RTH (equals the divider's
    /// own VTH unless both divider resistors are pinned).
    pub(super) vth_needed: f64,
    pub(super) vth: f64,
    pub(super) up: f64,
    pub(super) down: f64,
    pub(super) swing: f64,
}

/// Capacitor values (`None` = ideal).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub(super) struct Caps {
    pub(super) c_in: Option<f64>,
    pub(super) c_out: Option<f64>,
    pub(super) c_emitter: Option<f64>,
    pub(super) c_base: Option<f64>,
}

/// A quick evaluation: what the checks need, without the report strings.
pub(super) struct Measured {
    pub(super) ic: f64,
    pub(super) vce: f64,
    pub(super) gain_db: f64,
    pub(super) zin: f64,
    pub(super) zout: f64,
    pub(super) swing: f64,
    pub(super) supply_current: f64,
    pub(super) tj: f64,
    pub(super) power: f64,
    /// The largest resistor dissipation, W.
    pub(super) resistor_power: f64,
    pub(super) ic_peak: f64,
    pub(super) active: bool,
    pub(super) ss: SmallSignal,
    pub(super) resp: Response,
}

/// One requirement or rating as checked on a candidate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Gap {
    pub(super) id: &'static str,
    pub(super) value: f64,
    pub(super) limit: f64,
    pub(super) unit: &'static str,
    /// 0 when met; otherwise a relative measure of the miss (a log ratio).
    pub(super) short: f64,
}

pub(super) struct Ctx<'a> {
    pub(super) spec: &'a Spec,
    pub(super) dev: Device,
    pub(super) vcc: f64,
    pub(super) vmin: f64,
    pub(super) rbb: f64,
    /// |Av| target of a common-emitter stage (sets Re).
    pub(super) gain: Option<f64>,
    /// Input impedance the divider must allow (with margin), CE and CC.
    pub(super) zin: Option<f64>,
    /// Pinned divider resistors toward the upper and lower rail (NPN frame).
    pub(super) up: Option<f64>,
    pub(super) down: Option<f64>,
    /// Pinned free resistor: rc (CE, CB) or re (CC).
    pub(super) r_pin: Option<f64>,
}

impl<'a> Ctx<'a> {
    pub(super) fn new(spec: &'a Spec) -> Result<Ctx<'a>> {
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

    pub(super) fn kind(&self) -> StageKind {
        self.spec.stage
    }

    /// The pinned divider's (VTH, RTH), when both resistors are pinned.
    pub(super) fn divider(&self) -> Option<(f64, f64)> {
        match (self.up, self.down) {
            (Some(u), Some(d)) => Some((self.vcc * d / (u + d), parallel(u, d))),
            _ => None,
        }
    }

    /// The emitter law and, for a common-emitter stage, whether the
    /// unbypassed part follows from the pinned divider and `re_bypassed`.
    pub(super) fn law(&self) -> (Law, bool) {
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
    pub(super) fn point(
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
    pub(super) fn stage_of(&self, p: &Point, caps: &Caps) -> Stage {
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
    pub(super) fn measure(&self, stage: &Stage) -> Option<Measured> {
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

    /// The continuous design at `r`, with the unbypassed Re corrected on the
    /// nodal gain and the divider opened up for the input impedance.
    pub(super) fn design_at(&self, r: f64, rule: Rule) -> Option<(Point, Stage, Measured)> {
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
}
