//! The transistor's stored charges, for the transient: the depletion
//! charge of each junction and the forward diffusion charge.
//!
//! # Depletion charge
//! The junction capacitance C(v) = Cj0/(1 − v/Vj)^m (v the forward
//! junction voltage), integrated to a charge. Above FC·Vj (forward bias;
//! FC = [`FORWARD_COEFFICIENT`]) the capacitance continues as the straight
//! line tangent there, so that the charge stays finite however far the
//! junction is driven (the forward-bias coefficient of the Gummel–Poon
//! charge model: Gummel & Poon, Bell Syst. Tech. J. 49, 1970; Getreu,
//! *Modeling the Bipolar Transistor*, Tektronix 1976, §4):
//!
//! ```text
//! v < FC·Vj:  q = Cj0·Vj/(1 − m)·(1 − (1 − v/Vj)^(1−m))
//!             C = Cj0·(1 − v/Vj)^(−m)
//! v ≥ FC·Vj:  C = Cj0/(1 − FC)^(1+m)·(1 − FC·(1 + m) + m·v/Vj)
//!             q = q(FC·Vj) + ∫ C dv   (a quadratic in v)
//! ```
//!
//! # Diffusion charge
//! qF = τF·iF with iF = IS·(e^(vBE/VT) − 1), the forward transport
//! current without the Early factor (Getreu §4), so that Cdiff = τF·∂iF/∂vBE.
//! The reverse diffusion charge is left out: it only slows the recovery
//! from saturation, which the datasheet data do not describe.
//!
//! # From the datasheet data (the mapping)
//! The small-signal analysis takes Cμ = Cob (graded with VCB when Cob's
//! test voltage is given) and Cπ = gm/(2π·fT) − Cμ at the bias point; the
//! charges are chosen so that their capacitances at the quiescent point
//! equal those two exactly:
//! - the collector–base junction: Cj0 = Cob·(1 + VCB,test/V0)^m with
//!   V0 = [`CJC_BUILT_IN`] and m = [`CJC_GRADING`] when Cob's test voltage
//!   is given, else a constant Cob (m = 0);
//! - the base–emitter junction: the data hold no Cib, so its depletion
//!   capacitance is folded into the transit time, as the small-signal
//!   model does (Cje = 0);
//! - τF = Cπ/(∂iF/∂vBE) at the quiescent vBE, from 1/(2π·fT) ≈ τF +
//!   (Cje + Cjc)/gm (Getreu; Gray & Meyer, *Analysis and Design of Analog
//!   Integrated Circuits*, ch. 1).

use crate::hybrid_pi::SmallSignal;
use crate::operating_point::OperatingPoint;
use crate::transistor::{Device, TransistorData, CJC_BUILT_IN, CJC_GRADING};

/// The forward-bias coefficient FC: the depletion capacitance is
/// continued linearly above FC·Vj (0.5, the customary value; Getreu §4).
pub const FORWARD_COEFFICIENT: f64 = 0.5;

/// One junction's depletion capacitance law.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Depletion {
    /// Zero-bias capacitance Cj0, F.
    pub cj0: f64,
    /// Built-in potential Vj, V (> 0).
    pub vj: f64,
    /// Grading exponent m (0 ≤ m < 1; 0 is a constant capacitance).
    pub m: f64,
}

impl Depletion {
    /// No capacitance.
    pub const NONE: Depletion = Depletion {
        cj0: 0.0,
        vj: 1.0,
        m: 0.0,
    };

    /// The charge and the capacitance at forward junction voltage `v`.
    pub fn at(&self, v: f64) -> (f64, f64) {
        let (cj0, vj, m) = (self.cj0, self.vj, self.m);
        if cj0 == 0.0 {
            return (0.0, 0.0);
        }
        let knee = FORWARD_COEFFICIENT * vj;
        if v < knee {
            let x = 1.0 - v / vj;
            // formula: q = Cj0·Vj/(1 − m)·(1 − (1 − v/Vj)^(1−m)); C = Cj0·(1 − v/Vj)^(−m)
            let p = libm::pow(x, -m);
            (cj0 * vj / (1.0 - m) * (1.0 - x * p), cj0 * p)
        } else {
            let fc = FORWARD_COEFFICIENT;
            let f1 = vj / (1.0 - m) * (1.0 - libm::pow(1.0 - fc, 1.0 - m));
            let f2 = libm::pow(1.0 - fc, 1.0 + m);
            let f3 = 1.0 - fc * (1.0 + m);
            // formula: C = Cj0/F2·(F3 + m·v/Vj); q = Cj0·[F1 + (F3·(v − FC·Vj) + m/(2Vj)·(v² − (FC·Vj)²))/F2]
            let c = cj0 / f2 * (f3 + m * v / vj);
            let q = cj0 * (f1 + (f3 * (v - knee) + m / (2.0 * vj) * (v * v - knee * knee)) / f2);
            (q, c)
        }
    }
}

/// The collector–base depletion law of a transistor's data: Cob at its
/// test voltage, graded as [`TransistorData::c_mu`] grades it.
pub fn collector_junction(t: &TransistorData) -> Depletion {
    match t.cob_vcb {
        None => Depletion {
            cj0: t.cob,
            vj: CJC_BUILT_IN,
            m: 0.0,
        },
        // formula: Cj0 = Cob·(1 + VCB,test/V0)^m
        Some(v_ref) => Depletion {
            cj0: t.cob * libm::pow(1.0 + v_ref / CJC_BUILT_IN, CJC_GRADING),
            vj: CJC_BUILT_IN,
            m: CJC_GRADING,
        },
    }
}

/// A transistor's charges, in its NPN frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Charges {
    /// Forward transit time τF, s.
    pub tau_f: f64,
    /// The base–emitter depletion law.
    pub emitter: Depletion,
    /// The base–collector depletion law.
    pub collector: Depletion,
}

impl Charges {
    /// No stored charge (a DC netlist).
    pub const NONE: Charges = Charges {
        tau_f: 0.0,
        emitter: Depletion::NONE,
        collector: Depletion::NONE,
    };

    /// The charges whose capacitances at the quiescent point `op` equal
    /// the small-signal model's Cπ and Cμ there (the mapping of the module
    /// docs).
    pub fn at_bias(t: &TransistorData, op: &OperatingPoint, ss: &SmallSignal) -> Charges {
        let d = &op.device;
        // formula: ∂iF/∂vBE = IS·e^(vBE/VT)/VT
        let g_f = d.is * libm::exp(op.vbe_junction / d.vt) / d.vt;
        let tau_f = if g_f > 0.0 && g_f.is_finite() {
            ss.c_pi / g_f
        } else {
            0.0
        };
        Charges {
            tau_f,
            emitter: Depletion::NONE,
            collector: collector_junction(t),
        }
    }

    /// Whether any charge is stored.
    pub fn any(&self) -> bool {
        self.tau_f > 0.0 || self.emitter.cj0 > 0.0 || self.collector.cj0 > 0.0
    }

    /// The base–emitter charge (depletion plus diffusion) and its
    /// capacitance at forward voltage `vbe` of `device`.
    pub fn base_emitter(&self, device: &Device, vbe: f64) -> (f64, f64) {
        let (qj, cj) = self.emitter.at(vbe);
        if self.tau_f == 0.0 {
            return (qj, cj);
        }
        let (e, de) = crate::transistor::limexp(vbe / device.vt);
        // formula: qF = τF·IS·(e^(vBE/VT) − 1)
        (
            qj + self.tau_f * device.is * (e - 1.0),
            cj + self.tau_f * device.is * de / device.vt,
        )
    }

    /// The base–collector charge and its capacitance at forward voltage `vbc`.
    pub fn base_collector(&self, vbc: f64) -> (f64, f64) {
        self.collector.at(vbc)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_charge_is_the_integral_of_the_capacitance() {
        // dq/dv = C everywhere, either side of the forward knee (central
        // differences of 1 µV: truncation ~ C''·h², rounding ~ ε·q/h; the
        // bound 1e-6 relative covers both), and both are continuous at the
        // knee (FC·Vj).
        let law = Depletion {
            cj0: 4e-12,
            vj: 0.75,
            m: 1.0 / 3.0,
        };
        for k in 0..=40 {
            let v = -20.0 + 0.525 * k as f64;
            let h = 1e-6;
            let (q_hi, _) = law.at(v + h);
            let (q_lo, _) = law.at(v - h);
            let (_, c) = law.at(v);
            let dq = (q_hi - q_lo) / (2.0 * h);
            assert!((dq - c).abs() <= 1e-6 * c, "{v} V: {dq} vs {c}");
        }
        let knee = FORWARD_COEFFICIENT * law.vj;
        let below = law.at(knee - 1e-12);
        let above = law.at(knee + 1e-12);
        assert!((below.0 - above.0).abs() <= 1e-22 && (below.1 - above.1).abs() <= 1e-22);
        // At zero bias, C = Cj0 and q = 0 (the law's definition).
        assert_eq!(law.at(0.0), (0.0, 4e-12));
        // A constant capacitance (m = 0) stores C·v at every voltage.
        let flat = Depletion {
            cj0: 2e-12,
            vj: 0.75,
            m: 0.0,
        };
        for v in [-5.0, 0.1, 0.6, 2.0] {
            let (q, c) = flat.at(v);
            assert!((q - 2e-12 * v).abs() <= 1e-26 && (c - 2e-12).abs() <= 1e-26);
        }
    }

    #[test]
    fn the_bias_point_capacitances_are_the_small_signal_model_s() {
        // The mapping's promise: at the quiescent point of the example
        // stage, dqBE/dvBE = Cπ and dqBC/dvBC = Cμ of the hybrid-π model
        // (to 1e-12: one exponential and one power each side).
        use crate::analysis::analyze;
        use crate::stage::Stage;
        let mut s = Stage::example();
        for cob_vcb in [None, Some(10.0)] {
            s.transistor.cob_vcb = cob_vcb;
            let a = analyze(&s).expect("the example analyses");
            let op = &a.operating_point;
            let ch = Charges::at_bias(&s.transistor, op, &a.small_signal);
            let (_, c_be) = ch.base_emitter(&op.device, op.vbe_junction);
            let (_, c_bc) = ch.base_collector(op.vbc_junction);
            let ss = &a.small_signal;
            assert!(
                (c_be - ss.c_pi).abs() <= 1e-12 * ss.c_pi,
                "{c_be} vs {}",
                ss.c_pi
            );
            assert!(
                (c_bc - ss.c_mu).abs() <= 1e-12 * ss.c_mu,
                "{c_bc} vs {}",
                ss.c_mu
            );
            // And independently of how either is computed: the charges'
            // total capacitance is gm/(2π·fT), the definition of fT
            // (Gray & Meyer ch. 1), to 1e-6 (finite differences of 1 µV).
            let h = 1e-6;
            let dq = |f: &dyn Fn(f64) -> f64, v: f64| (f(v + h) - f(v - h)) / (2.0 * h);
            let be = |v: f64| ch.base_emitter(&op.device, v).0;
            let bc = |v: f64| ch.base_collector(v).0;
            let total = dq(&be, op.vbe_junction) + dq(&bc, op.vbc_junction);
            let want = ss.gm / (2.0 * core::f64::consts::PI * s.transistor.ft);
            assert!((total - want).abs() <= 1e-6 * want, "{total} vs {want}");
        }
    }
}
