//! Midband results, from the nodal solve and from the textbook closed forms.
//!
//! Midband means coupling and bypass capacitors shorted and device
//! capacitances open. The reported figures come from the nodal solve of the
//! midband network ([`Midband::from_point`]), which keeps every element
//! (ro, rbb', the bias resistors). The closed forms ([`Midband::closed_form`])
//! are the textbook expressions with ro taken as infinite (Sedra & Smith,
//! *Microelectronic Circuits*, ch. 7; Jaeger & Blalock, ch. 13-14), with
//! β0 = gm·rπ, rx = rbb', RB = r1 ∥ r2, Re = unbypassed emitter resistance:
//!
//! ```text
//! common emitter:   Zb = rx + rπ + (β0+1)·Re        Av = −β0·(RC∥RL)/Zb
//!                   Zin = RB∥Zb                     Zout = RC
//! common collector: Zb = rx + rπ + (β0+1)·(RE∥RL)   Av = (β0+1)·(RE∥RL)/Zb
//!                   Zin = RB∥Zb                     Zout = RE ∥ (rx + rπ + Rs∥RB)/(β0+1)
//! common base:      Ze = (rx + rπ)/(β0+1)           Av = β0·(RC∥RL)/(rx + rπ)
//!                   Zin = RE∥Ze                     Zout = RC
//! every stage:      Av,s = Av·Zin/(Zin + Rs)        Ai = Av·Zin/RL     Gp = Av·Ai
//! ```
//!
//! With ro infinite the two agree to rounding; with a finite Early voltage
//! they differ by terms of the order of (RC∥RL)/ro.

use crate::decibel::db10;
use crate::hybrid_pi::SmallSignal;
use crate::nodal::FrequencyPoint;
use crate::parallel::parallel;
use crate::stage::{Stage, StageKind};

/// Midband gains and impedances (real numbers: the midband network is resistive).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Midband {
    /// V(load)/V(input terminal), signed (negative: inverting).
    pub voltage_gain: f64,
    /// V(load)/EMF, signed.
    pub voltage_gain_from_source: f64,
    /// I(load)/I(into the input terminal), signed.
    pub current_gain: f64,
    /// |Av·Ai| in dB.
    pub power_gain_db: f64,
    /// Input impedance at the input terminal with the load connected, Ω.
    pub input_impedance: f64,
    /// Output impedance seen by the load with the EMF zeroed and rs kept, Ω.
    pub output_impedance: f64,
}

impl Midband {
    /// The midband figures from a nodal solution of the midband network.
    pub fn from_point(p: &FrequencyPoint) -> Midband {
        Midband {
            voltage_gain: p.voltage_gain.re,
            voltage_gain_from_source: p.voltage_gain_from_source.re,
            current_gain: p.current_gain.re,
            power_gain_db: p.power_gain_db(),
            input_impedance: p.input_impedance.re,
            output_impedance: p.output_impedance.re,
        }
    }

    /// The textbook closed forms (ro infinite), from the hybrid-π parameters.
    pub fn closed_form(stage: &Stage, ss: &SmallSignal) -> Midband {
        let p = &stage.parts;
        let rx = ss.rbb;
        let beta = ss.beta0;
        let rb = stage.bias_resistance();
        let (av, zin, zout) = match stage.kind {
            StageKind::CommonEmitter => {
                let zb = rx + ss.r_pi + (beta + 1.0) * p.re;
                (-beta * parallel(p.rc, p.rl) / zb, parallel(rb, zb), p.rc)
            }
            StageKind::CommonCollector => {
                let rl_e = parallel(p.re, p.rl);
                let zb = rx + ss.r_pi + (beta + 1.0) * rl_e;
                let rsb = if p.rs > 0.0 { parallel(p.rs, rb) } else { 0.0 };
                let z_emitter = (rx + ss.r_pi + rsb) / (beta + 1.0);
                (
                    (beta + 1.0) * rl_e / zb,
                    parallel(rb, zb),
                    parallel(p.re, z_emitter),
                )
            }
            StageKind::CommonBase => {
                let ze = (rx + ss.r_pi) / (beta + 1.0);
                (
                    beta * parallel(p.rc, p.rl) / (rx + ss.r_pi),
                    parallel(p.re, ze),
                    p.rc,
                )
            }
        };
        let avs = av * zin / (zin + p.rs);
        let ai = av * zin / p.rl;
        Midband {
            voltage_gain: av,
            voltage_gain_from_source: avs,
            current_gain: ai,
            power_gain_db: db10(libm::fabs(av * ai)),
            input_impedance: zin,
            output_impedance: zout,
        }
    }
}
