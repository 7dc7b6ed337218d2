//! The hybrid-π small-signal model at an operating point.
//!
//! The conductances are the exact partial derivatives of the Ebers–Moll
//! currents at the solved bias, taken with vB'E and vCE as the controlling
//! voltages. In the forward-active region they reduce to the textbook
//! values (Sedra & Smith, *Microelectronic Circuits*, ch. 6):
//!
//! ```text
//! gm = IC/VT      rπ = β0/gm      ro = (VA + VCE)/IC
//! Cπ + Cμ = gm/(2π·fT)            (a constant forward transit time)
//! ```
//!
//! Cμ is the datasheet Cob, optionally graded with VCB. Cπ is the remainder
//! of gm/(2π·fT) and never below zero. This neglects the base–emitter depletion
//! capacitance, so fT does not fall at very low currents in this model.

use crate::operating_point::OperatingPoint;
use crate::stage::Stage;

/// Small-signal parameters, SI units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SmallSignal {
    /// Transconductance ∂iC/∂vB'E, S.
    pub gm: f64,
    /// Input resistance 1/(∂iB/∂vB'E), Ω.
    pub r_pi: f64,
    /// Output resistance 1/(∂iC/∂vCE), Ω (capped at 10¹⁵ Ω when VA is infinite).
    pub r_o: f64,
    /// Reverse transconductance ∂iB/∂vCE, S (negligible in the active region).
    pub g_r: f64,
    /// Base–emitter capacitance, F.
    pub c_pi: f64,
    /// Base–collector capacitance, F.
    pub c_mu: f64,
    /// Base spreading resistance rbb', Ω.
    pub rbb: f64,
    /// Small-signal current gain β0 = gm·rπ.
    pub beta0: f64,
}

/// Largest resistance reported for an infinite output resistance, Ω.
pub const OPEN_RESISTANCE: f64 = 1e15;

impl SmallSignal {
    /// The hybrid-π model of `stage` at `op`.
    pub fn at(stage: &Stage, op: &OperatingPoint) -> SmallSignal {
        let c = op.device.currents(op.vbe_junction, op.vbc_junction);
        // With vCE as the second variable: vBC = vBE − vCE.
        // formula: ∂/∂vBE|vCE = ∂/∂vBE + ∂/∂vBC ; ∂/∂vCE|vBE = −∂/∂vBC
        let gm = c.dic_dvbe + c.dic_dvbc;
        let go = -c.dic_dvbc;
        let gpi = c.dib_dvbe + c.dib_dvbc;
        let g_r = -c.dib_dvbc;
        let r_pi = if gpi > 1.0 / OPEN_RESISTANCE {
            1.0 / gpi
        } else {
            OPEN_RESISTANCE
        };
        let r_o = if go > 1.0 / OPEN_RESISTANCE {
            1.0 / go
        } else {
            OPEN_RESISTANCE
        };
        // |VCB| in the NPN frame is −vB'C.
        let c_mu = stage.transistor.c_mu(-op.vbc_junction);
        // formula: Cπ = gm/(2π fT) − Cμ
        let c_total = gm / (2.0 * core::f64::consts::PI * stage.transistor.ft);
        let c_pi = libm::fmax(c_total - c_mu, 0.0);
        SmallSignal {
            gm,
            r_pi,
            r_o,
            g_r,
            c_pi,
            c_mu,
            rbb: stage.transistor.rbb,
            beta0: gm * r_pi,
        }
    }

    /// Output conductance 1/ro, S (0 when ro is open).
    pub fn g_o(&self) -> f64 {
        if self.r_o >= OPEN_RESISTANCE {
            0.0
        } else {
            1.0 / self.r_o
        }
    }

    /// Input conductance 1/rπ, S.
    pub fn g_pi(&self) -> f64 {
        if self.r_pi >= OPEN_RESISTANCE {
            0.0
        } else {
            1.0 / self.r_pi
        }
    }
}
