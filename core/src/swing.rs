//! Large-signal output limits from the DC and AC load lines.
//!
//! At signal frequencies the collector (or, in a follower, the emitter) sees
//! the AC load `rac`, so the operating point moves along the AC load line
//! through the quiescent point. The output clips when the collector current
//! reaches zero (cutoff) or VCE reaches VCE(sat) (saturation)
//! (Malvino & Bates, *Electronic Principles*, ch. 12; Horowitz & Hill,
//! *The Art of Electronics*, §2.04 for the follower). In the NPN frame:
//!
//! ```text
//! common emitter / base: rac = RC∥RL, Re = unbypassed emitter resistance (0 for common base)
//!   to cutoff    (collector rises):  ICQ·rac
//!   to saturation (collector falls): (VCEQ − VCE(sat))·rac/(rac + Re)
//! common collector: rac = RE∥RL
//!   to saturation (emitter rises):  (VCEQ − VCE(sat))/(1 + RC/rac)
//!   to cutoff     (emitter falls):  IEQ·rac
//! ```
//!
//! For a PNP stage the directions swap. The symmetric limit is the smaller of
//! the two. The *centred* quiescent point puts Q in the middle of the AC load
//! line, where both limits are equal (VCEQ − VCE(sat) = ICQ·(rac + Re) for the
//! common emitter), solved together with the DC load line
//! VCE = VCC − IC·RC − IE·RE. The emitter's own small signal swing in a
//! common-base stage is neglected (it is the small input signal).

use crate::operating_point::{OperatingPoint, Region};
use crate::parallel::parallel;
use crate::stage::{Stage, StageKind};
use crate::transistor::Polarity;

/// Output limits, volts (peak, at the load, magnitudes) and the centred point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Swing {
    /// Largest positive-going peak at the load before clipping, V.
    pub positive: f64,
    /// Largest negative-going peak at the load before clipping, V (magnitude).
    pub negative: f64,
    /// The smaller of the two: the largest undistorted symmetric peak, V.
    pub symmetric: f64,
    /// AC load resistance at the output terminal of the transistor, Ω.
    pub ac_load: f64,
    /// Slope resistance of the AC load line in the (VCE, IC) plane, Ω.
    pub ac_line_resistance: f64,
    /// Slope resistance of the DC load line in the (VCE, IC) plane, Ω.
    pub dc_line_resistance: f64,
    /// Collector current at the saturation end of the AC load line, A.
    pub ic_peak: f64,
    /// Collector current of the centred quiescent point, A.
    pub centred_ic: f64,
    /// |VCE| of the centred quiescent point, V.
    pub centred_vce: f64,
    /// Symmetric peak swing at the centred point, V.
    pub centred_swing: f64,
}

impl Swing {
    /// The limits of `stage` at `op`.
    pub fn at(stage: &Stage, op: &OperatingPoint) -> Swing {
        let p = &stage.parts;
        let vsat = stage.transistor.vce_sat;
        let vce = libm::fabs(op.vce);
        let (ic, ie) = (op.ic, op.ie);
        let alpha = if ie > 0.0 { ic / ie } else { 1.0 };
        let re_total = stage.re_total();
        let headroom = libm::fmax(vce - vsat, 0.0);
        let active = op.region == Region::Active;
        let vcc = stage.supply;
        let (to_cutoff, to_sat, rising_is_cutoff, rac, line_r, centred) = match stage.kind {
            StageKind::CommonEmitter | StageKind::CommonBase => {
                let re_u = if stage.kind == StageKind::CommonEmitter {
                    p.re
                } else {
                    0.0
                };
                let rac = parallel(p.rc, p.rl);
                let line = rac + re_u;
                // formula: IC* = (VCC − VCE(sat))/(RC + RE/α + rac + Re)
                let ic_c = libm::fmax(vcc - vsat, 0.0) / (p.rc + re_total / alpha + line);
                let centred = (ic_c, vsat + ic_c * line, ic_c * rac);
                (ic * rac, headroom * rac / line, true, rac, line, centred)
            }
            StageKind::CommonCollector => {
                let rac = parallel(p.re, p.rl);
                // formula: IE* = (VCC − VCE(sat))/(2α·RC + RE + rac)
                let ie_c = libm::fmax(vcc - vsat, 0.0) / (2.0 * alpha * p.rc + p.re + rac);
                let vce_c = vcc - alpha * ie_c * p.rc - ie_c * p.re;
                let centred = (alpha * ie_c, vce_c, ie_c * rac);
                (
                    ie * rac,
                    headroom / (1.0 + p.rc / rac),
                    false,
                    rac,
                    p.rc + rac,
                    centred,
                )
            }
        };
        let (to_cutoff, to_sat) = if active {
            (to_cutoff, to_sat)
        } else {
            (0.0, 0.0)
        };
        // NPN frame: for the collector output, rising = toward cutoff; for the follower, rising = toward saturation.
        let (up, down) = if rising_is_cutoff {
            (to_cutoff, to_sat)
        } else {
            (to_sat, to_cutoff)
        };
        let (positive, negative) = match stage.transistor.polarity {
            Polarity::Npn => (up, down),
            Polarity::Pnp => (down, up),
        };
        Swing {
            positive,
            negative,
            symmetric: libm::fmin(positive, negative),
            ac_load: rac,
            ac_line_resistance: line_r,
            dc_line_resistance: p.rc + re_total / alpha,
            ic_peak: ic + headroom / line_r,
            centred_ic: centred.0,
            centred_vce: centred.1,
            centred_swing: centred.2,
        }
    }
}
