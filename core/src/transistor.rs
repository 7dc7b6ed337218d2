//! The bipolar transistor: datasheet data, and the Ebers–Moll model built from it.
//!
//! # Model
//! Transport form of the Ebers–Moll equations with the Early effect
//! (Jaeger & Blalock, *Microelectronic Circuit Design*, ch. 5), written for
//! an NPN device; a PNP device uses the same equations on mirrored voltages:
//!
//! ```text
//! iT = IS·(e^(vBE/VT) − e^(vBC/VT))·(1 + vCE/VA)
//! iC = iT − (IS/βR)·(e^(vBC/VT) − 1)
//! iB = (IS/βF)·(e^(vBE/VT) − 1) + (IS/βR)·(e^(vBC/VT) − 1)
//! ```
//!
//! Temperature (Gummel–Poon temperature model as given by Getreu,
//! *Modeling the Bipolar Transistor*, 1976):
//!
//! ```text
//! IS(T) = IS(T0)·(T/T0)^XTI·exp[(q·EG/k)·(1/T0 − 1/T)]
//! βF(T) = βF(T0)·(T/T0)^XTB
//! ```
//!
//! with EG = 1.11 eV and XTI = 3 for silicon. At a constant collector
//! current this gives dVBE/dT = (VBE − EG − 3·VT)/T ≈ −2 mV/K near room
//! temperature, the usual rule of thumb (Sedra & Smith).
//!
//! IS is not a datasheet value: it follows from the stated VBE at a stated
//! collector current (and the datasheet's test VCE of [`TEST_VCE`]).

use crate::constants::{thermal_voltage, Temperature, DATASHEET_TEMPERATURE};
use crate::error::{within, Error, ErrorKind, Result};

/// Collector–emitter voltage at which datasheet hFE and VBE are taken to be
/// stated, in volts. 5 V is the usual small-signal test condition (common
/// practice); with the Early effect, βF and IS are referred back from it.
pub const TEST_VCE: f64 = 5.0;

/// Band-gap energy of silicon used in the IS temperature law, in eV (Getreu).
pub const SILICON_EG: f64 = 1.11;

/// Saturation-current temperature exponent XTI for a silicon junction (Getreu).
pub const SILICON_XTI: f64 = 3.0;

/// Temperature exponent XTB of βF. About 1.5 for silicon small-signal
/// devices (from memory: hFE rises roughly 0.5 %/K near room temperature).
pub const DEFAULT_XTB: f64 = 1.5;

/// Reverse current gain βR. Datasheets do not state it; 1 is a typical
/// order of magnitude for a planar device (from memory). It only shapes the
/// saturation region.
pub const DEFAULT_BETA_REVERSE: f64 = 1.0;

/// Junction built-in potential V0 and grading exponent m for grading Cob
/// with the collector–base voltage, C = Cj0/(1 + VR/V0)^m
/// (Sedra & Smith, problem 3.25 values; common practice for a graded junction).
pub const CJC_BUILT_IN: f64 = 0.75;
/// Grading exponent of the collector–base junction capacitance.
pub const CJC_GRADING: f64 = 1.0 / 3.0;

/// NPN or PNP.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Polarity {
    /// Electrons carry the collector current; the collector sits above the emitter.
    Npn,
    /// Holes carry the collector current; the collector sits below the emitter.
    Pnp,
}

impl Polarity {
    /// `"npn"` or `"pnp"`.
    pub fn name(self) -> &'static str {
        match self {
            Polarity::Npn => "npn",
            Polarity::Pnp => "pnp",
        }
    }

    /// Reads `"npn"` or `"pnp"` (any case).
    pub fn parse(text: &str) -> Result<Polarity> {
        let t = text.trim();
        if t.eq_ignore_ascii_case("npn") {
            Ok(Polarity::Npn)
        } else if t.eq_ignore_ascii_case("pnp") {
            Ok(Polarity::Pnp)
        } else {
            Err(Error::new(
                "polarity",
                ErrorKind::Unsupported {
                    value: t.into(),
                    allowed: "npn or pnp".into(),
                },
            ))
        }
    }

    /// +1 for NPN, −1 for PNP: the sign that maps the mirrored (NPN-like)
    /// solution back onto the real terminal voltages.
    pub fn sign(self) -> f64 {
        match self {
            Polarity::Npn => 1.0,
            Polarity::Pnp => -1.0,
        }
    }
}

/// Datasheet-level description of a transistor. All values SI, magnitudes
/// (a PNP device's VBE of −0.65 V is given as 0.65).
#[derive(Debug, Clone, PartialEq)]
pub struct TransistorData {
    /// NPN or PNP.
    pub polarity: Polarity,
    /// Typical DC current gain hFE (IC/IB) at [`TEST_VCE`].
    pub hfe: f64,
    /// Minimum hFE of the gain group, for worst-case checks.
    pub hfe_min: f64,
    /// Maximum hFE of the gain group.
    pub hfe_max: f64,
    /// Base–emitter voltage magnitude in volts at collector current `vbe_at_ic`, 25 °C.
    pub vbe: f64,
    /// Collector current in amperes at which `vbe` is stated.
    pub vbe_at_ic: f64,
    /// Early voltage VA in volts; `None` for no Early effect (infinite ro).
    pub early_voltage: Option<f64>,
    /// Transition frequency fT in hertz.
    pub ft: f64,
    /// Output capacitance Cob (collector–base, emitter open) in farads, used as Cμ.
    pub cob: f64,
    /// The collector–base voltage at which `cob` is stated; when given, Cμ is
    /// graded with the operating VCB as Cj0/(1+VCB/V0)^m.
    pub cob_vcb: Option<f64>,
    /// Base spreading resistance rbb' in ohms.
    pub rbb: f64,
    /// Collector–emitter saturation voltage magnitude in volts, used for swing limits.
    pub vce_sat: f64,
    /// Collector–emitter breakdown voltage with the base open, VCEO, in volts.
    pub vceo_max: f64,
    /// Largest continuous collector current in amperes.
    pub ic_max: f64,
    /// Total power dissipation rating at 25 °C ambient, in watts.
    pub ptot_max: f64,
    /// Thermal resistance junction to ambient, in kelvin per watt.
    pub rth_ja: f64,
    /// Largest junction temperature.
    pub tj_max: Temperature,
    /// Temperature exponent of βF (XTB).
    pub xtb: f64,
    /// Reverse current gain βR.
    pub beta_reverse: f64,
}

impl TransistorData {
    /// Checks every field; the error names the field as the design file
    /// spells it (`hfe_min`, `vbe_at_ic`, ...).
    pub fn validate(&self) -> Result<()> {
        within("hfe", self.hfe, 1.0, 100_000.0, "")?;
        within("hfe_min", self.hfe_min, 1.0, 100_000.0, "")?;
        within("hfe_max", self.hfe_max, 1.0, 100_000.0, "")?;
        if self.hfe_min > self.hfe {
            return Err(Error::out_of_range(
                "hfe_min",
                self.hfe_min,
                "",
                alloc::format!("at most hfe ({})", self.hfe),
            ));
        }
        if self.hfe_max < self.hfe {
            return Err(Error::out_of_range(
                "hfe_max",
                self.hfe_max,
                "",
                alloc::format!("at least hfe ({})", self.hfe),
            ));
        }
        within("vbe", self.vbe, 0.1, 1.5, "V")?;
        within("vbe_at_ic", self.vbe_at_ic, 1e-9, 1000.0, "A")?;
        if let Some(va) = self.early_voltage {
            within("early_voltage", va, 1.0, 10_000.0, "V")?;
        }
        within("ft", self.ft, 1e3, 1e12, "Hz")?;
        if self.cob != 0.0 {
            within("cob", self.cob, 1e-15, 1e-6, "F")?;
        }
        if let Some(v) = self.cob_vcb {
            within("cob_vcb", v, 0.0, 10_000.0, "V")?;
        }
        within("rbb", self.rbb, 0.0, 10_000.0, "Ω")?;
        crate::stage::resistor("rbb", self.rbb)?;
        within("vce_sat", self.vce_sat, 0.0, 10.0, "V")?;
        within("vceo_max", self.vceo_max, 1.0, 10_000.0, "V")?;
        within("ic_max", self.ic_max, 1e-6, 1000.0, "A")?;
        within("ptot_max", self.ptot_max, 1e-3, 10_000.0, "W")?;
        within("rth_ja", self.rth_ja, 0.01, 10_000.0, "K/W")?;
        within("tj_max", self.tj_max.celsius(), 25.0, 300.0, "°C")?;
        within("xtb", self.xtb, -5.0, 5.0, "")?;
        within("beta_reverse", self.beta_reverse, 0.01, 1000.0, "")?;
        Ok(())
    }

    /// The Ebers–Moll device at absolute temperature `t`, with the forward
    /// current gain `hfe` (the typical value, or a corner of the spread),
    /// and VBE shifted by `vbe_shift` volts at the stated current (for a
    /// worst-case VBE spread; 0 for the nominal device).
    pub fn device(&self, t: Temperature, hfe: f64, vbe_shift: f64) -> Device {
        let t0 = DATASHEET_TEMPERATURE;
        let vt0 = thermal_voltage(Temperature::from_kelvin(t0));
        let vt = thermal_voltage(t);
        let inv_va = self.early_voltage.map_or(0.0, |va| 1.0 / va);
        let early_at_test = 1.0 + TEST_VCE * inv_va;
        // formula: IC = IS·e^(VBE/VT)·(1 + VCE/VA) at the test point, solved for IS
        let is0 = self.vbe_at_ic / (libm::exp((self.vbe + vbe_shift) / vt0) * early_at_test);
        let ratio = t.kelvin() / t0;
        // formula: IS(T) = IS(T0)·(T/T0)^XTI·exp[(q·EG/k)(1/T0 − 1/T)] = ... (EG/VT0)(1 − T0/T)
        let is = is0
            * libm::pow(ratio, SILICON_XTI)
            * libm::exp(SILICON_EG / vt0 * (1.0 - t0 / t.kelvin()));
        // formula: βF(T) = βF(T0)·(T/T0)^XTB, with βF referred back from the test VCE
        let beta_f = hfe / early_at_test * libm::pow(ratio, self.xtb);
        Device {
            is,
            beta_f,
            beta_r: self.beta_reverse,
            inv_va,
            vt,
        }
    }

    /// Cμ at a collector–base reverse voltage `vcb` (volts, magnitude).
    ///
    /// Without `cob_vcb`, Cμ = Cob. With it, the junction law
    /// C = Cj0/(1 + VR/V0)^m is scaled so that C(cob_vcb) = Cob
    /// (V0 = [`CJC_BUILT_IN`], m = [`CJC_GRADING`]); forward of half the
    /// built-in potential it continues linearly, as
    /// [`crate::circuit::Depletion`] describes.
    pub fn c_mu(&self, vcb: f64) -> f64 {
        // The junction law of the transient's charge model, so that the
        // two agree at every bias (forward of FC·V0 it continues linearly).
        crate::circuit::collector_junction(self).at(-vcb).1
    }

    /// Ptot derated linearly above 25 °C to zero at Tj max, in watts, at
    /// ambient `ta`. Below 25 °C the 25 °C rating applies.
    pub fn ptot_at(&self, ta: Temperature) -> f64 {
        let t25 = DATASHEET_TEMPERATURE;
        if ta.kelvin() <= t25 {
            self.ptot_max
        } else if ta.kelvin() >= self.tj_max.kelvin() {
            0.0
        } else {
            // formula: P(Ta) = Ptot·(Tjmax − Ta)/(Tjmax − 25 °C)
            self.ptot_max * (self.tj_max.kelvin() - ta.kelvin()) / (self.tj_max.kelvin() - t25)
        }
    }
}

/// An Ebers–Moll transistor at one temperature, in NPN sign convention.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Device {
    /// Transport saturation current IS in amperes.
    pub is: f64,
    /// Forward current gain βF (before the Early factor).
    pub beta_f: f64,
    /// Reverse current gain βR.
    pub beta_r: f64,
    /// 1/VA in 1/V (0 for no Early effect).
    pub inv_va: f64,
    /// Thermal voltage in volts.
    pub vt: f64,
}

/// Terminal currents and their partial derivatives at one bias.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Currents {
    /// Collector current (into the collector), A.
    pub ic: f64,
    /// Base current (into the base), A.
    pub ib: f64,
    /// ∂iC/∂vBE at constant vBC, S.
    pub dic_dvbe: f64,
    /// ∂iC/∂vBC at constant vBE, S.
    pub dic_dvbc: f64,
    /// ∂iB/∂vBE at constant vBC, S.
    pub dib_dvbe: f64,
    /// ∂iB/∂vBC at constant vBE, S.
    pub dib_dvbc: f64,
}

/// Exponent above which `e^x` is continued linearly, to keep Newton
/// iterates finite (the continuation has the same value and slope there).
const EXP_LIMIT: f64 = 80.0;

/// e^x and its derivative, continued linearly above [`EXP_LIMIT`].
pub(crate) fn limexp(x: f64) -> (f64, f64) {
    if x < EXP_LIMIT {
        let e = libm::exp(x);
        (e, e)
    } else {
        let e = libm::exp(EXP_LIMIT);
        (e * (1.0 + x - EXP_LIMIT), e)
    }
}

impl Device {
    /// Collector and base currents, and their derivatives, at junction
    /// voltages `vbe` and `vbc` (NPN convention, volts).
    pub fn currents(&self, vbe: f64, vbc: f64) -> Currents {
        let vt = self.vt;
        let (ebe, debe) = limexp(vbe / vt);
        let (ebc, debc) = limexp(vbc / vt);
        // Early factor q = 1 + vCE/VA, never below a small floor far outside normal operation.
        let q_raw = 1.0 + (vbe - vbc) * self.inv_va;
        let (q, dq) = if q_raw > 0.05 {
            (q_raw, self.inv_va)
        } else {
            (0.05, 0.0)
        };
        let is = self.is;
        // formula: iT = IS(e^(vBE/VT) − e^(vBC/VT))(1 + vCE/VA)
        let core_t = is * (ebe - ebc);
        let it = core_t * q;
        let dit_dvbe = is * debe / vt * q + core_t * dq;
        let dit_dvbc = -is * debc / vt * q - core_t * dq;
        let ibr = is / self.beta_r * (ebc - 1.0);
        let dibr = is / self.beta_r * debc / vt;
        let ibf = is / self.beta_f * (ebe - 1.0);
        let dibf = is / self.beta_f * debe / vt;
        Currents {
            ic: it - ibr,
            ib: ibf + ibr,
            dic_dvbe: dit_dvbe,
            dic_dvbc: dit_dvbc - dibr,
            dib_dvbe: dibf,
            dib_dvbc: dibr,
        }
    }

    /// The critical voltage of a junction, VT·ln(VT/(√2·IS)), above which
    /// Newton steps are limited logarithmically (the classic junction limiter).
    pub fn v_critical(&self) -> f64 {
        self.vt * libm::log(self.vt / (core::f64::consts::SQRT_2 * self.is))
    }

    /// VBE (volts) that gives collector current `ic` (A) at `vce` volts in
    /// the forward-active region, neglecting the reverse terms.
    pub fn vbe_for_ic(&self, ic: f64, vce: f64) -> f64 {
        let q = (1.0 + vce * self.inv_va).max(0.05);
        self.vt * libm::log(ic / (self.is * q) + 1.0)
    }

    /// Collector current at base current `ib` and collector–emitter voltage
    /// `vce` (NPN convention): the output characteristic. Solves iB(vBE, vBE − vCE) = ib
    /// for vBE by a limited Newton iteration. Returns `None` when it does not converge.
    pub fn ic_at_ib(&self, ib: f64, vce: f64) -> Option<f64> {
        if !(ib.is_finite() && vce.is_finite()) || ib < 0.0 {
            return None;
        }
        let mut vbe = self.vbe_for_ic((ib * self.beta_f).max(1e-15), vce.max(0.0));
        for _ in 0..100 {
            let c = self.currents(vbe, vbe - vce);
            let f = c.ib - ib;
            let df = c.dib_dvbe + c.dib_dvbc;
            if df <= 0.0 || !df.is_finite() {
                return None;
            }
            let mut step = -f / df;
            let lim = 4.0 * self.vt;
            if step > lim {
                step = lim;
            } else if step < -lim * 10.0 {
                step = -lim * 10.0;
            }
            vbe += step;
            if libm::fabs(step) < 1e-12 {
                let c = self.currents(vbe, vbe - vce);
                return Some(c.ic);
            }
        }
        None
    }
}

/// Errors from the polarity or preset name, given here so that the design
/// file reader can reuse the wording.
pub(crate) fn unknown_preset(name: &str, allowed: &str) -> Error {
    Error::new(
        "transistor.preset",
        ErrorKind::Unsupported {
            value: name.into(),
            allowed: allowed.into(),
        },
    )
}
