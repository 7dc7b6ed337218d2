//! The blocks that the design file and the specification file share: the
//! `transistor` block (a preset and datasheet values) and the
//! `requirements` block, with their readers and the transistor block's
//! writer, so that both formats read them with the same code.

use alloc::borrow::ToOwned;
use alloc::string::String;
use core::fmt::Write as _;

use super::json::path;
use super::schema::block;
use super::typed::{file_celsius, optional, share, Typed};
use crate::constants::Temperature;
use crate::error::{non_negative, positive, Error, ErrorKind, Result};
use crate::presets::preset;
use crate::requirements::{Requirements, Rule, CONDITIONS, REQUIREMENTS};
use crate::stage::StageKind;
use crate::transistor::{Polarity, TransistorData, DEFAULT_BETA_REVERSE, DEFAULT_XTB};

/// Ambient temperature when a file gives none, °C (both formats).
pub const DEFAULT_AMBIENT_CELSIUS: f64 = 25.0;

block! {
    /// The `transistor` block as typed.
    TransistorDocument in "transistor" {
        text: [
            /// A preset name; the other keys override its values.
            preset,
            /// `"npn"` or `"pnp"`.
            polarity,
        ],
        values: [
            /// Typical DC current gain.
            hfe,
            /// Lowest DC current gain of the gain group.
            hfe_min,
            /// Highest DC current gain of the gain group.
            hfe_max,
            /// Base–emitter voltage magnitude at `vbe_at_ic`, V.
            vbe,
            /// Collector current at which `vbe` is stated, A.
            vbe_at_ic,
            /// Early voltage, V.
            early_voltage,
            /// Transition frequency, Hz.
            ft,
            /// Output capacitance, F.
            cob,
            /// Collector–base voltage at which `cob` is stated, V.
            cob_vcb,
            /// Base spreading resistance, Ω.
            rbb,
            /// Saturation voltage magnitude, V.
            vce_sat,
            /// Breakdown voltage VCEO, V.
            vceo_max,
            /// Largest continuous collector current, A.
            ic_max,
            /// Dissipation rating at 25 °C, W.
            ptot_max,
            /// Thermal resistance junction to ambient, K/W.
            rth_ja,
            /// Largest junction temperature, °C.
            tj_max,
        ],
    }
}

block! {
    /// The `requirements` block as typed.
    RequirementsDocument in "requirements" {
        text: [],
        values: [
            /// Smallest |voltage gain|, dB.
            min_voltage_gain_db,
            /// Largest |voltage gain|, dB.
            max_voltage_gain_db,
            /// Smallest input impedance, Ω.
            min_input_impedance,
            /// Largest output impedance, Ω.
            max_output_impedance,
            /// Smallest symmetric peak swing at the load, V.
            min_swing,
            /// Highest lower corner, Hz.
            max_f_low,
            /// Lowest upper corner, Hz.
            min_f_high,
            /// Largest supply current, A.
            max_supply_current,
            /// Largest junction temperature, °C.
            max_junction_temperature,
            /// Largest THD at the load, a share (`0.01` or `"1 %"`).
            max_thd,
            /// The output peak at which `max_thd` holds, V.
            thd_swing,
            /// The frequency at which `max_thd` holds, Hz.
            thd_frequency,
        ],
    }
}

pub(crate) fn stage_kind(name: Option<&str>) -> Result<StageKind> {
    let name = name.ok_or_else(|| {
        Error::missing(
            "stage",
            "give \"stage\": \"common-emitter\", \"common-collector\" or \"common-base\"",
        )
    })?;
    StageKind::parse(name).map_err(|_| {
        Error::new(
            "stage",
            ErrorKind::Unsupported {
                value: name.trim().to_owned(),
                allowed: "common-emitter, common-collector (the emitter follower) or common-base"
                    .to_owned(),
            },
        )
    })
}

/// Why a transistor key is needed when there is no preset.
const NO_PRESET: &str =
    "with no transistor.preset every datasheet value must be given; name a preset (such as general-purpose-npn) or give the value";

pub(crate) fn transistor_from(t: &TransistorDocument) -> Result<TransistorData> {
    let base = match &t.preset {
        Some(name) => Some(preset(name)?),
        None => None,
    };
    let polarity = match &t.polarity {
        Some(p) => Polarity::parse(p).map_err(|e| e.within("transistor"))?,
        None => match &base {
            Some(b) => b.polarity,
            None => return Err(Error::missing("transistor.polarity", NO_PRESET)),
        },
    };
    // A key's value: given, else the preset's, else required.
    let pick = |v: &Option<Typed>,
                name: &str,
                unit: &'static str,
                from_base: fn(&TransistorData) -> f64|
     -> Result<f64> {
        let field = path("transistor", name);
        match (v, &base) {
            (Some(v), _) => v.value(&field, unit),
            (None, Some(b)) => Ok(from_base(b)),
            (None, None) => Err(Error::missing(field, NO_PRESET)),
        }
    };
    // An optional key: given, else the preset's, else none.
    let maybe = |v: &Option<Typed>,
                 name: &str,
                 unit: &'static str,
                 from_base: fn(&TransistorData) -> Option<f64>|
     -> Result<Option<f64>> {
        match v {
            Some(v) => v.value(&path("transistor", name), unit).map(Some),
            None => Ok(base.as_ref().and_then(from_base)),
        }
    };
    Ok(TransistorData {
        polarity,
        hfe: pick(&t.hfe, "hfe", "", |b| b.hfe)?,
        hfe_min: pick(&t.hfe_min, "hfe_min", "", |b| b.hfe_min)?,
        hfe_max: pick(&t.hfe_max, "hfe_max", "", |b| b.hfe_max)?,
        vbe: pick(&t.vbe, "vbe", "V", |b| b.vbe)?,
        vbe_at_ic: pick(&t.vbe_at_ic, "vbe_at_ic", "A", |b| b.vbe_at_ic)?,
        early_voltage: maybe(&t.early_voltage, "early_voltage", "V", |b| b.early_voltage)?,
        ft: pick(&t.ft, "ft", "Hz", |b| b.ft)?,
        cob: pick(&t.cob, "cob", "F", |b| b.cob)?,
        cob_vcb: maybe(&t.cob_vcb, "cob_vcb", "V", |b| b.cob_vcb)?,
        rbb: match &t.rbb {
            Some(v) => v.value("transistor.rbb", "Ω")?,
            None => base.as_ref().map_or(0.0, |b| b.rbb),
        },
        vce_sat: pick(&t.vce_sat, "vce_sat", "V", |b| b.vce_sat)?,
        vceo_max: pick(&t.vceo_max, "vceo_max", "V", |b| b.vceo_max)?,
        ic_max: pick(&t.ic_max, "ic_max", "A", |b| b.ic_max)?,
        ptot_max: pick(&t.ptot_max, "ptot_max", "W", |b| b.ptot_max)?,
        rth_ja: pick(&t.rth_ja, "rth_ja", "K/W", |b| b.rth_ja)?,
        tj_max: Temperature::from_celsius(pick(&t.tj_max, "tj_max", "°C", |b| {
            b.tj_max.celsius()
        })?),
        xtb: base.as_ref().map_or(DEFAULT_XTB, |b| b.xtb),
        beta_reverse: base
            .as_ref()
            .map_or(DEFAULT_BETA_REVERSE, |b| b.beta_reverse),
    })
}

pub(crate) fn requirements_from(r: &RequirementsDocument) -> Result<Requirements> {
    let field = |name: &str| path("requirements", name);
    let mut out = Requirements::default();
    for req in &REQUIREMENTS {
        let name = field(req.key);
        let typed = r.value(req.key).cloned();
        let value = if req.rule == Rule::Share {
            typed
                .map(|t| {
                    let x = share(&t, &name, 1.0)?;
                    if x > 0.0 && x < 1.0 {
                        Ok(x)
                    } else {
                        Err(Error::out_of_range(
                            &name,
                            x,
                            "",
                            "a share above 0 and below 1 (0 to 100 %), such as 0.01 or \"1 %\"",
                        ))
                    }
                })
                .transpose()?
        } else {
            optional(&typed, &name, req.unit)?
                .map(|x| match req.rule {
                    Rule::Finite | Rule::Share => Ok(x),
                    Rule::Positive => positive(&name, x, req.unit),
                    Rule::NonNegative => non_negative(&name, x, req.unit),
                })
                .transpose()?
        };
        out.set(req.key, value);
    }
    for c in &CONDITIONS {
        let name = field(c.key);
        let value = optional(&r.value(c.key).cloned(), &name, c.unit)?
            .map(|x| positive(&name, x, c.unit))
            .transpose()?;
        if value.is_some() && out.get(c.of).is_none() {
            let mut reason = String::new();
            let _ = write!(
                reason,
                "{} is the {} of {}; give {} too, or remove {}",
                c.key, c.label, c.of, c.of, c.key
            );
            return Err(Error::inconsistent(name, reason));
        }
        out.set(c.key, value);
    }
    if out.max_thd.is_some() && out.thd_condition().is_none() {
        return Err(Error::missing(
            field("thd_swing"),
            "max_thd is judged at an output peak: give thd_swing (the peak at the load, such as \"2 V\"), or min_swing",
        ));
    }
    if let (Some(lo), Some(hi)) = (out.min_voltage_gain_db, out.max_voltage_gain_db) {
        if lo > hi {
            let mut reason = String::new();
            let _ = write!(
                reason,
                "min_voltage_gain_db ({lo} dB) is above max_voltage_gain_db ({hi} dB); no gain can meet both"
            );
            return Err(Error::inconsistent(field("min_voltage_gain_db"), reason));
        }
    }
    Ok(out)
}

/// The transistor block of a design: the preset and the values that differ
/// from it, or every value when there is no preset (or when the preset
/// cannot express the device).
pub(crate) fn transistor_document(
    t: &TransistorData,
    preset_name: Option<&str>,
) -> TransistorDocument {
    let base = preset_name.and_then(|n| preset(n).ok().map(|b| (n, b)));
    // A preset whose Early voltage or Cob voltage was removed cannot be
    // written as overrides: write the device in full instead.
    let base = base.filter(|(_, b)| {
        (b.early_voltage.is_none() || t.early_voltage.is_some())
            && (b.cob_vcb.is_none() || t.cob_vcb.is_some())
    });
    // A value that differs from the preset's, in its unit ("250 MHz").
    let differs = |x: f64, unit: &str, f: fn(&TransistorData) -> f64| match &base {
        Some((_, b)) if f(b) == x => None,
        _ => Some(Typed::exact(x, unit)),
    };
    let differs_opt =
        |x: Option<f64>, unit: &str, f: fn(&TransistorData) -> Option<f64>| match (&base, x) {
            (_, None) => None,
            (Some((_, b)), Some(v)) if f(b) == Some(v) => None,
            (_, Some(v)) => Some(Typed::exact(v, unit)),
        };
    TransistorDocument {
        preset: base.as_ref().map(|(n, _)| (*n).to_owned()),
        polarity: match &base {
            Some((_, b)) if b.polarity == t.polarity => None,
            _ => Some(t.polarity.name().to_owned()),
        },
        hfe: differs(t.hfe, "", |b| b.hfe),
        hfe_min: differs(t.hfe_min, "", |b| b.hfe_min),
        hfe_max: differs(t.hfe_max, "", |b| b.hfe_max),
        vbe: differs(t.vbe, "V", |b| b.vbe),
        vbe_at_ic: differs(t.vbe_at_ic, "A", |b| b.vbe_at_ic),
        early_voltage: differs_opt(t.early_voltage, "V", |b| b.early_voltage),
        ft: differs(t.ft, "Hz", |b| b.ft),
        cob: differs(t.cob, "F", |b| b.cob),
        cob_vcb: differs_opt(t.cob_vcb, "V", |b| b.cob_vcb),
        rbb: match &base {
            Some((_, b)) if b.rbb == t.rbb => None,
            None if t.rbb == 0.0 => None,
            _ => Some(Typed::exact(t.rbb, "Ω")),
        },
        vce_sat: differs(t.vce_sat, "V", |b| b.vce_sat),
        vceo_max: differs(t.vceo_max, "V", |b| b.vceo_max),
        ic_max: differs(t.ic_max, "A", |b| b.ic_max),
        ptot_max: differs(t.ptot_max, "W", |b| b.ptot_max),
        rth_ja: differs(t.rth_ja, "K/W", |b| b.rth_ja),
        tj_max: differs(file_celsius(t.tj_max), "°C", |b| file_celsius(b.tj_max)),
    }
}
