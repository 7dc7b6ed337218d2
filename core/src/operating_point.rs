//! The DC operating point: a Newton solve of the full nonlinear stage.
//!
//! # Equations
//! In the NPN (or mirrored PNP) frame, with the base divider replaced by its
//! Thevenin equivalent (VTH, RTH), rbb' in series with the base, RE the whole
//! DC emitter resistance and RC the collector resistor, the unknowns are the
//! two junction voltages vBE and vBC, and the two loop equations are
//!
//! ```text
//! f1 = VTH − iB·(RTH + rbb') − vBE − iE·RE = 0      (base loop)
//! f2 = VCC − iC·RC − (vBE − vBC) − iE·RE = 0         (collector loop)
//! ```
//!
//! with iC, iB from the Ebers–Moll model ([`crate::Device`]) and iE = iC + iB.
//! Both junctions are free, so cutoff, the active region and saturation come
//! out of the solution rather than being assumed. Newton steps on each
//! junction voltage are limited logarithmically above the junction's critical
//! voltage (the classic junction limiter of circuit simulators, Nagel 1975);
//! if plain Newton fails, the supply is ramped up in steps (source stepping).
//! The Jacobian never vanishes: ∂f1/∂vBE ≤ −1 and ∂f2/∂vBC ≥ 1 − (small terms).

use crate::error::{Error, ErrorKind, Result};
use crate::stage::Stage;
use crate::transistor::{Currents, Device, Polarity};

/// Where the transistor works.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Region {
    /// Base–emitter forward, base–collector reverse biased: an amplifier.
    Active,
    /// Both junctions forward biased: the collector current is set by the
    /// circuit, not by the base current.
    Saturation,
    /// The transistor is off: collector current below 10⁻⁷ of IC max.
    Cutoff,
}

impl Region {
    /// `"active"`, `"saturation"` or `"cutoff"`.
    pub fn name(self) -> &'static str {
        match self {
            Region::Active => "active",
            Region::Saturation => "saturation",
            Region::Cutoff => "cutoff",
        }
    }
}

/// The solved DC state of a stage. Voltages are node voltages to ground in
/// volts (real polarity: a PNP stage has vce < 0, vbe < 0); currents are in
/// amperes, positive in the direction of normal operation for the polarity
/// (into the collector and base of an NPN, out of them for a PNP).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OperatingPoint {
    /// Region of operation.
    pub region: Region,
    /// Collector current, A.
    pub ic: f64,
    /// Base current, A.
    pub ib: f64,
    /// Emitter current, A.
    pub ie: f64,
    /// V(collector) − V(emitter), V.
    pub vce: f64,
    /// V(base terminal) − V(emitter), V.
    pub vbe: f64,
    /// Base terminal voltage to ground, V.
    pub vb: f64,
    /// Emitter voltage to ground, V.
    pub ve: f64,
    /// Collector voltage to ground, V.
    pub vc: f64,
    /// Intrinsic junction voltage vB'E in the NPN frame, V.
    pub vbe_junction: f64,
    /// Intrinsic junction voltage vB'C in the NPN frame, V.
    pub vbc_junction: f64,
    /// The device model at the stage's temperature.
    pub device: Device,
    /// Newton iterations used.
    pub iterations: u32,
}

/// Largest number of Newton iterations per attempt.
const MAX_ITERATIONS: u32 = 200;

/// Step below which the solve is converged, V (far below any meaningful bias change).
const STEP_TOLERANCE: f64 = 1e-11;

/// The classic junction voltage limiter: above `vcrit`, a step larger than
/// 2·VT is compressed logarithmically.
pub(crate) fn limit_junction(v_new: f64, v_old: f64, vt: f64, vcrit: f64) -> (f64, bool) {
    if v_new > vcrit && libm::fabs(v_new - v_old) > 2.0 * vt {
        if v_old > 0.0 {
            let arg = 1.0 + (v_new - v_old) / vt;
            if arg > 0.0 {
                (v_old + vt * libm::log(arg), true)
            } else {
                (vcrit, true)
            }
        } else {
            (vt * libm::log(v_new / vt), true)
        }
    } else {
        (v_new, false)
    }
}

/// The DC network in the NPN frame.
#[derive(Debug, Clone, Copy)]
struct DcNetwork {
    vcc: f64,
    vth: f64,
    r_base: f64,
    rc: f64,
    re: f64,
}

impl DcNetwork {
    fn residual(&self, vbe: f64, vbc: f64, c: &Currents, scale: f64) -> (f64, f64) {
        let ie = c.ic + c.ib;
        let f1 = self.vth * scale - c.ib * self.r_base - vbe - ie * self.re;
        let f2 = self.vcc * scale - c.ic * self.rc - (vbe - vbc) - ie * self.re;
        (f1, f2)
    }

    /// Newton from (vbe, vbc) at supply fraction `scale`; returns the
    /// solution and iterations, or `None`.
    fn newton(
        &self,
        dev: &Device,
        mut vbe: f64,
        mut vbc: f64,
        scale: f64,
    ) -> Option<(f64, f64, u32)> {
        let vcrit = dev.v_critical();
        for it in 1..=MAX_ITERATIONS {
            let c = dev.currents(vbe, vbc);
            let (f1, f2) = self.residual(vbe, vbc, &c, scale);
            let die_dvbe = c.dic_dvbe + c.dib_dvbe;
            let die_dvbc = c.dic_dvbc + c.dib_dvbc;
            let j11 = -c.dib_dvbe * self.r_base - 1.0 - die_dvbe * self.re;
            let j12 = -c.dib_dvbc * self.r_base - die_dvbc * self.re;
            let j21 = -c.dic_dvbe * self.rc - 1.0 - die_dvbe * self.re;
            let j22 = -c.dic_dvbc * self.rc + 1.0 - die_dvbc * self.re;
            let det = j11 * j22 - j12 * j21;
            if !det.is_finite() || det == 0.0 {
                return None;
            }
            // formula: Δ = −J⁻¹·f (Cramer's rule for the 2×2 system)
            let d_vbe = -(f1 * j22 - f2 * j12) / det;
            let d_vbc = -(j11 * f2 - j21 * f1) / det;
            if !(d_vbe.is_finite() && d_vbc.is_finite()) {
                return None;
            }
            let (n_vbe, lim1) = limit_junction(vbe + d_vbe, vbe, dev.vt, vcrit);
            let (n_vbc, lim2) = limit_junction(vbc + d_vbc, vbc, dev.vt, vcrit);
            let step = libm::fmax(libm::fabs(n_vbe - vbe), libm::fabs(n_vbc - vbc));
            vbe = n_vbe;
            vbc = n_vbc;
            if !lim1 && !lim2 && step < STEP_TOLERANCE * (1.0 + libm::fabs(vbe) + libm::fabs(vbc)) {
                return Some((vbe, vbc, it));
            }
        }
        None
    }
}

impl OperatingPoint {
    /// Solves the operating point of `stage` with the given device model.
    ///
    /// The stage must have passed [`Stage::validate`]; `device` is usually
    /// `stage.transistor.device(stage.ambient, hfe, 0.0)`.
    pub fn solve(stage: &Stage, device: &Device) -> Result<OperatingPoint> {
        let (vth, rth) = stage.base_thevenin();
        let net = DcNetwork {
            vcc: stage.supply,
            vth,
            r_base: rth + stage.transistor.rbb,
            rc: stage.parts.rc,
            re: stage.re_total(),
        };
        let vcrit = device.v_critical();
        let start_vbe = libm::fmin(vcrit, 0.6);
        let mut solved = net.newton(device, start_vbe, start_vbe - 0.5 * net.vcc, 1.0);
        if solved.is_none() {
            // Source stepping: ramp the supply, each solution seeding the next.
            let (mut vbe, mut vbc) = (0.0, 0.0);
            let mut total = 0;
            let mut ok = true;
            for k in 1..=20 {
                let scale = k as f64 / 20.0;
                match net.newton(device, vbe, vbc, scale) {
                    Some((a, b, n)) => {
                        vbe = a;
                        vbc = b;
                        total += n;
                    }
                    None => {
                        ok = false;
                        break;
                    }
                }
            }
            if ok {
                solved = Some((vbe, vbc, total));
            }
        }
        let Some((vbe, vbc, iterations)) = solved else {
            let c = device.currents(start_vbe, 0.0);
            let (f1, f2) = net.residual(start_vbe, 0.0, &c, 1.0);
            return Err(Error::new(
                "operating point",
                ErrorKind::NoConvergence {
                    iterations: MAX_ITERATIONS,
                    residual: libm::fmax(libm::fabs(f1), libm::fabs(f2)),
                },
            ));
        };
        let c = device.currents(vbe, vbc);
        let ie = c.ic + c.ib;
        // Node voltages in the NPN frame.
        let ve_m = ie * net.re;
        let vbi_m = ve_m + vbe;
        let vb_m = vbi_m + c.ib * stage.transistor.rbb;
        let vc_m = vbi_m - vbc;
        let values = [c.ic, c.ib, ie, ve_m, vb_m, vc_m];
        if values.iter().any(|v| !v.is_finite()) {
            return Err(Error::new(
                "operating point",
                ErrorKind::NoConvergence {
                    iterations,
                    residual: f64::NAN,
                },
            ));
        }
        let q = 1.0 + (vbe - vbc) * device.inv_va;
        let region = if c.ic < 1e-7 * stage.transistor.ic_max {
            Region::Cutoff
        } else if vbc > 0.0 && c.ic < 0.9 * device.beta_f * q * c.ib {
            Region::Saturation
        } else {
            Region::Active
        };
        // Back to real node voltages: a PNP stage is the mirror image about the supply.
        let (vb, ve, vc, s) = match stage.transistor.polarity {
            Polarity::Npn => (vb_m, ve_m, vc_m, 1.0),
            Polarity::Pnp => (net.vcc - vb_m, net.vcc - ve_m, net.vcc - vc_m, -1.0),
        };
        Ok(OperatingPoint {
            region,
            ic: c.ic,
            ib: c.ib,
            ie,
            vce: s * (vc_m - ve_m),
            vbe: s * (vb_m - ve_m),
            vb,
            ve,
            vc,
            vbe_junction: vbe,
            vbc_junction: vbc,
            device: *device,
            iterations,
        })
    }

    /// Largest Kirchhoff current-law error at the base, collector and
    /// emitter nodes, in amperes, recomputed from the node voltages and the
    /// part values (a check on the solve).
    pub fn kcl_residual(&self, stage: &Stage) -> f64 {
        let s = stage.transistor.polarity.sign();
        let vcc = stage.supply;
        // Work in the NPN frame: distance from the rail the transistor pulls toward.
        let m = |v: f64| if s > 0.0 { v } else { vcc - v };
        let (vb, ve, vc) = (m(self.vb), m(self.ve), m(self.vc));
        let (up, down) = match stage.transistor.polarity {
            Polarity::Npn => (stage.parts.r1, stage.parts.r2),
            Polarity::Pnp => (stage.parts.r2, stage.parts.r1),
        };
        let i_up = up.map_or(0.0, |r| (vcc - vb) / r);
        let i_down = down.map_or(0.0, |r| vb / r);
        let base = libm::fabs(i_up - i_down - self.ib);
        let collector = if stage.parts.rc > 0.0 {
            libm::fabs((vcc - vc) / stage.parts.rc - self.ic)
        } else {
            libm::fabs(vcc - vc) * 1e-3
        };
        let re = stage.re_total();
        let emitter = if re > 0.0 {
            libm::fabs(ve / re - self.ie)
        } else {
            libm::fabs(ve) * 1e-3
        };
        libm::fmax(base, libm::fmax(collector, emitter))
    }
}
