//! The DC and AC load lines drawn over the transistor's output characteristics.
//!
//! The characteristics are the model's own: for a family of base currents,
//! IC against VCE from [`crate::Device::ic_at_ib`] (Ebers–Moll with the Early
//! effect, at the stage's temperature), so saturation bends and the Early
//! slope are those the analysis uses. All values are magnitudes (a PNP
//! stage's VCE is plotted positive), in volts and amperes.
//!
//! ```text
//! DC load line:  VCE = VCC − IC·Rdc,  Rdc = RC + RE/α
//! AC load line:  through Q with slope −1/rline (rline from [`crate::Swing`])
//! ```

use alloc::vec::Vec;

use crate::analysis::Analysis;
use crate::stage::Stage;

/// One output characteristic: IC against VCE at a constant base current.
#[derive(Debug, Clone, PartialEq)]
pub struct Characteristic {
    /// The base current, A.
    pub ib: f64,
    /// Collector–emitter voltages, V.
    pub vce: Vec<f64>,
    /// Collector currents, A (same length as `vce`).
    pub ic: Vec<f64>,
}

/// Everything the load-line plot shows, magnitudes in V and A.
#[derive(Debug, Clone, PartialEq)]
pub struct LoadLines {
    /// The family of output characteristics; the middle one passes through Q.
    pub characteristics: Vec<Characteristic>,
    /// The DC load line's ends: (VCE, IC) at IC = VCC/Rdc and at VCE = VCC.
    pub dc_line: [(f64, f64); 2],
    /// The AC load line's ends: (VCE, IC) at VCE = 0 and at IC = 0.
    pub ac_line: [(f64, f64); 2],
    /// The quiescent point (|VCE|, IC).
    pub quiescent: (f64, f64),
    /// The swing limits on the AC line: saturation end (VCE = VCE(sat)) and cutoff end (IC = 0).
    pub limits: [(f64, f64); 2],
}

/// Load lines and `curves` characteristics of `points` points each for
/// `stage` as analysed in `a`. Base currents are spread evenly from
/// IBQ/k to 2·IBQ (k = curves/2), so that the quiescent curve is among them.
pub fn load_lines(stage: &Stage, a: &Analysis, curves: usize, points: usize) -> LoadLines {
    let op = &a.operating_point;
    let sw = &a.swing;
    let vcc = stage.supply;
    let (vq, iq) = (libm::fabs(op.vce), op.ic);
    let r_dc = sw.dc_line_resistance;
    let r_ac = sw.ac_line_resistance;
    let vsat = stage.transistor.vce_sat;
    let ac_cut = vq + iq * r_ac;
    let ac_top = iq + vq / r_ac;
    let dc_top = if r_dc > 0.0 { vcc / r_dc } else { ac_top };
    let v_max = libm::fmax(vcc, ac_cut) * 1.05;
    let curves = curves.clamp(1, 20);
    let points = points.clamp(2, 2000);
    let half = (curves as f64 / 2.0).max(1.0);
    let mut characteristics = Vec::with_capacity(curves);
    if op.ib > 0.0 {
        for k in 1..=curves {
            let ib = op.ib * k as f64 / half;
            let mut vce = Vec::with_capacity(points);
            let mut ic = Vec::with_capacity(points);
            for j in 0..points {
                // Quadratic spacing resolves the saturation knee near VCE = 0.
                let x = j as f64 / (points - 1) as f64;
                let v = v_max * x * x;
                if let Some(i) = op.device.ic_at_ib(ib, v) {
                    vce.push(v);
                    ic.push(i.max(0.0));
                }
            }
            characteristics.push(Characteristic { ib, vce, ic });
        }
    }
    LoadLines {
        characteristics,
        dc_line: [(0.0, dc_top), (vcc, 0.0)],
        ac_line: [(0.0, ac_top), (ac_cut, 0.0)],
        quiescent: (vq, iq),
        limits: [(vsat, iq + (vq - vsat).max(0.0) / r_ac), (ac_cut, 0.0)],
    }
}
