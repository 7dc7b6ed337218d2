//! The device model against its published equations: Ebers–Moll with the
//! Early effect, the Gummel–Poon temperature laws, the VBE temperature rule
//! of thumb, the hybrid-π relations, the junction-capacitance law and the
//! linear power derating.
//!
//! Every published equation is typed again here and evaluated on the same
//! inputs; the core's results must match. Sources are named per test.

use stagewright::{
    analyze, preset, thermal_voltage, Device, Parts, Polarity, Region, Stage, StageKind,
    Temperature, TransistorData, CJC_BUILT_IN, CJC_GRADING, DATASHEET_TEMPERATURE, SILICON_EG,
    SILICON_XTI, TEST_VCE,
};
use stagewright_crosschecks::{check, check_between, Allowed};

/// Allowed errors, per quantity, and why.
mod allowed {
    use super::Allowed;

    /// A published formula typed again here, evaluated on the same inputs.
    pub const SAME_FORMULA: Allowed = Allowed {
        rel: 1e-12,
        why: "the same closed formula evaluated twice in double precision: a handful of \
              roundings, each 1.1e-16, amplified at most by the exponentials' argument (≤ 40)",
    };
    /// A derivative from the model's exact expressions against a central
    /// difference of the currents.
    pub const CENTRAL_DIFFERENCE: Allowed = Allowed {
        rel: 1e-6,
        why: "central difference with a step of 1e-6 V (4e-5 VT): truncation (h/VT)²/6 ≈ 3e-10, \
              rounding 1e-16·I/(h·dI/dV) ≈ 1e-11 of the slope; 1e-6 leaves margin",
    };
    /// dVBE/dT from a central difference in temperature against the formula.
    pub const TEMPCO_FORMULA: Allowed = Allowed {
        rel: 1e-6,
        why: "the formula (VBE − EG − 3VT)/T is the exact derivative of the model's VBE(T) at \
              constant IC (the +1 in ln(IC/IS + 1) is below 1e-12); a central difference with \
              h = 0.01 K has truncation error (h/T)² ≈ 1e-9 and rounding 1e-16·VBE/(h·2 mV/K) \
              ≈ 3e-12",
    };
    /// The hybrid-π relations of the textbook (active region).
    pub const HYBRID_PI: Allowed = Allowed {
        rel: 1e-8,
        why: "the textbook relations drop the model's leakage terms: the reverse current IS/βR \
              of the base–collector junction (about 1e-14 A) beside IB of microamperes is below \
              5e-9, and the transport term e^(vBC/VT) is below 1e-30 in the active region",
    };
    /// The output characteristic IC = βF·IB·(1 + VCE/VA) at small currents.
    pub const OUTPUT_CHARACTERISTIC: Allowed = Allowed {
        rel: 1e-6,
        why: "the published form drops the reverse leakage IS/βR = 5e-15 A of the test device, \
              which beside the smallest base current here (67 nA) is 7.5e-8; Newton stops at a \
              step of 1e-12 V (4e-11 of IC)",
    };
    /// Sedra & Smith problem 3.25: 0.30 pF (two digits).
    pub const TWO_DIGITS: Allowed = Allowed {
        rel: 0.02,
        why: "the published 0.30 pF is rounded to two digits (±0.005 pF, 1.7 %)",
    };
    /// Sedra & Smith problem 3.25: 0.165 pF (three digits).
    pub const THREE_DIGITS: Allowed = Allowed {
        rel: 0.005,
        why: "the published 0.165 pF is rounded to three digits (±0.0005 pF, 0.3 %)",
    };
}

const JAEGER: &str = "Jaeger & Blalock, Microelectronic Circuit Design, Ebers–Moll transport model";
const GETREU: &str = "Getreu, Modeling the Bipolar Transistor (1976): Gummel–Poon temperature laws";
const SEDRA: &str = "Sedra & Smith, Microelectronic Circuits: hybrid-π relations";

/// A device with round parameters typed here, independent of any preset.
fn test_device(inv_va: f64) -> Device {
    Device {
        is: 1e-14,
        beta_f: 150.0,
        beta_r: 2.0,
        inv_va,
        vt: 0.025,
    }
}

#[test]
fn ebers_moll_transport_equations() {
    // Published (Jaeger & Blalock; docs/references.md):
    //   iT = IS(e^(vBE/VT) − e^(vBC/VT))(1 + vCE/VA)
    //   iC = iT − (IS/βR)(e^(vBC/VT) − 1)
    //   iB = (IS/βF)(e^(vBE/VT) − 1) + (IS/βR)(e^(vBC/VT) − 1)
    // Table of (vBE, vBC): forward active, saturation, cutoff, reverse active.
    let bias = [
        (0.65, -5.0),
        (0.70, 0.60),
        (0.20, -10.0),
        (-2.0, 0.62),
        (0.60, 0.0),
    ];
    for inv_va in [0.0, 1.0 / 75.0] {
        let d = test_device(inv_va);
        for (vbe, vbc) in bias {
            let (ebe, ebc) = ((vbe / d.vt).exp(), (vbc / d.vt).exp());
            let it = d.is * (ebe - ebc) * (1.0 + (vbe - vbc) * inv_va);
            let ic = it - d.is / d.beta_r * (ebc - 1.0);
            let ib = d.is / d.beta_f * (ebe - 1.0) + d.is / d.beta_r * (ebc - 1.0);
            let c = d.currents(vbe, vbc);
            let label = format!("vBE {vbe} V, vBC {vbc} V, 1/VA {inv_va}");
            check(
                JAEGER,
                &format!("iC at {label}"),
                c.ic,
                ic,
                allowed::SAME_FORMULA,
            );
            check(
                JAEGER,
                &format!("iB at {label}"),
                c.ib,
                ib,
                allowed::SAME_FORMULA,
            );
        }
    }
}

#[test]
fn ebers_moll_derivatives_match_central_differences() {
    // The Newton solve and the hybrid-π use the model's exact partial
    // derivatives; each is checked against a central difference of the
    // currents (calculus, no outside figure).
    let d = test_device(1.0 / 75.0);
    let h = 1e-6;
    for (vbe, vbc) in [(0.65, -5.0), (0.70, 0.60), (0.62, 0.55)] {
        let c = d.currents(vbe, vbc);
        let dvbe = |f: fn(&stagewright::Currents) -> f64| {
            (f(&d.currents(vbe + h, vbc)) - f(&d.currents(vbe - h, vbc))) / (2.0 * h)
        };
        let dvbc = |f: fn(&stagewright::Currents) -> f64| {
            (f(&d.currents(vbe, vbc + h)) - f(&d.currents(vbe, vbc - h))) / (2.0 * h)
        };
        let rows = [
            ("∂iC/∂vBE", c.dic_dvbe, dvbe(|c| c.ic)),
            ("∂iC/∂vBC", c.dic_dvbc, dvbc(|c| c.ic)),
            ("∂iB/∂vBE", c.dib_dvbe, dvbe(|c| c.ib)),
            ("∂iB/∂vBC", c.dib_dvbc, dvbc(|c| c.ib)),
        ];
        // A derivative far below the transconductance (the reverse
        // junction's, 1e-100 S at vBC = −5 V) is compared against that
        // scale: the central difference cannot resolve it and it does not
        // matter to any solve.
        let scale = 1e-9 * c.dic_dvbe.abs();
        for (what, got, want) in rows {
            let d = (got - want).abs() / got.abs().max(want.abs()).max(scale);
            println!("central difference | {what} at vBE {vbe} V, vBC {vbc} V: {got:.6e} vs {want:.6e}, relative {d:.2e}");
            assert!(
                d <= allowed::CENTRAL_DIFFERENCE.rel,
                "{what} at vBE {vbe} V, vBC {vbc} V: model {got:e}, central difference {want:e} \
                 ({d:.3e} > {:e}: {}); source: calculus",
                allowed::CENTRAL_DIFFERENCE.rel,
                allowed::CENTRAL_DIFFERENCE.why
            );
        }
    }
}

#[test]
fn early_effect_and_output_characteristic() {
    // Published (Jaeger & Blalock): IC = IS·e^(VBE/VT)·(1 + VCE/VA) in the
    // forward-active region, so at a fixed base current
    // IC = βF·IB·(1 + VCE/VA). vbe_for_ic inverts the first, ic_at_ib
    // solves the second.
    let va = 75.0;
    let d = test_device(1.0 / va);
    for (ic, vce) in [(1e-3, 5.0), (10e-6, 1.0), (50e-3, 20.0)] {
        let vbe = d.vbe_for_ic(ic, vce);
        let want_vbe = d.vt * (ic / (d.is * (1.0 + vce / va)) + 1.0).ln();
        check(
            JAEGER,
            &format!("VBE for IC = {ic} A at VCE = {vce} V"),
            vbe,
            want_vbe,
            allowed::SAME_FORMULA,
        );
        let ib = ic / d.beta_f;
        let got = d
            .ic_at_ib(ib, vce)
            .expect("the output characteristic solves");
        check(
            JAEGER,
            &format!("IC at IB = {ib:.3e} A, VCE = {vce} V"),
            got,
            d.beta_f * ib * (1.0 + vce / va),
            allowed::OUTPUT_CHARACTERISTIC,
        );
    }
}

#[test]
fn saturation_current_is_referred_from_the_datasheet_vbe() {
    // Module docs of the core's transistor model: IS follows from the
    // stated VBE at the stated current and the datasheet test VCE of 5 V
    // (common practice for small-signal datasheets); the model must give
    // that VBE back at 25 °C. Same formula inverted: 1e-12.
    for name in ["general-purpose-npn", "general-purpose-pnp", "rf-npn"] {
        let t = preset(name).expect("preset");
        let d = t.device(Temperature::from_kelvin(DATASHEET_TEMPERATURE), t.hfe, 0.0);
        check(
            "common practice: datasheet VBE at the stated IC and VCE = 5 V",
            &format!("{name}: VBE at vbe_at_ic"),
            d.vbe_for_ic(t.vbe_at_ic, TEST_VCE),
            t.vbe,
            allowed::SAME_FORMULA,
        );
    }
    check(
        "common practice: small-signal test condition",
        "TEST_VCE (V)",
        TEST_VCE,
        5.0,
        Allowed {
            rel: 0.0,
            why: "a typed constant",
        },
    );
}

#[test]
fn gummel_poon_temperature_laws() {
    // IS(T) = IS(T0)·(T/T0)^XTI·exp[(q·EG/k)(1/T0 − 1/T)],
    // βF(T) = βF(T0)·(T/T0)^XTB, EG = 1.11 eV and XTI = 3 for silicon.
    check(
        GETREU,
        "EG (eV)",
        SILICON_EG,
        1.11,
        Allowed {
            rel: 0.0,
            why: "a typed constant",
        },
    );
    check(
        GETREU,
        "XTI",
        SILICON_XTI,
        3.0,
        Allowed {
            rel: 0.0,
            why: "a typed constant",
        },
    );
    let t = preset("general-purpose-npn").expect("preset");
    let t0 = DATASHEET_TEMPERATURE;
    let d0 = t.device(Temperature::from_kelvin(t0), t.hfe, 0.0);
    // q/k typed here from the SI Brochure's defining constants.
    let q_over_k = 1.602_176_634e-19 / 1.380_649e-23;
    for celsius in [-40.0, 0.0, 50.0, 125.0] {
        let temp = Temperature::from_celsius(celsius);
        let d = t.device(temp, t.hfe, 0.0);
        let ratio = temp.kelvin() / t0;
        let is_law = ratio.powf(3.0) * (q_over_k * 1.11 * (1.0 / t0 - 1.0 / temp.kelvin())).exp();
        check(
            GETREU,
            &format!("IS(T)/IS(T0) at {celsius} °C"),
            d.is / d0.is,
            is_law,
            allowed::SAME_FORMULA,
        );
        check(
            GETREU,
            &format!("βF(T)/βF(T0) at {celsius} °C"),
            d.beta_f / d0.beta_f,
            ratio.powf(t.xtb),
            allowed::SAME_FORMULA,
        );
        check(
            "SI: VT = kT/q",
            &format!("VT of the device at {celsius} °C"),
            d.vt,
            thermal_voltage(temp),
            allowed::SAME_FORMULA,
        );
    }
}

#[test]
fn vbe_falls_about_2_mv_per_kelvin() {
    // Rule of thumb (Sedra & Smith; docs/references.md): at a fixed
    // collector current VBE falls about 2 mV/K near room temperature. The
    // formula of the model, dVBE/dT = (VBE − EG − 3·VT)/T, is computed here
    // and compared with a central difference of the core's VBE(T).
    let t = preset("general-purpose-npn").expect("preset");
    let h = 0.01;
    for (ic, celsius) in [
        (10e-6, 25.0),
        (100e-6, 25.0),
        (1e-3, 25.0),
        (10e-3, 25.0),
        (1e-3, 0.0),
        (1e-3, 50.0),
    ] {
        let temp = Temperature::from_celsius(celsius);
        let vbe_at = |tk: f64| {
            t.device(Temperature::from_kelvin(tk), t.hfe, 0.0)
                .vbe_for_ic(ic, TEST_VCE)
        };
        let tk = temp.kelvin();
        let slope = (vbe_at(tk + h) - vbe_at(tk - h)) / (2.0 * h);
        let formula = (vbe_at(tk) - SILICON_EG - 3.0 * thermal_voltage(temp)) / tk;
        let label = format!("dVBE/dT at IC = {ic} A, {celsius} °C");
        check(
            "Sedra & Smith: dVBE/dT = (VBE − EG − 3VT)/T",
            &label,
            slope,
            formula,
            allowed::TEMPCO_FORMULA,
        );
        // "About 2 mV/K": the rule is one significant digit; the band
        // −2.5 … −1.5 mV/K is the rounding of "2" (common practice), and
        // holds from 10 µA to 10 mA in this device.
        check_between(
            "Sedra & Smith rule of thumb: VBE falls about 2 mV/K",
            &label,
            slope,
            -2.5e-3,
            -1.5e-3,
            "one-digit rule: −2 mV/K rounded, −2.5 to −1.5 mV/K",
        );
    }
}

/// An active common-emitter stage with the preset's Early effect.
fn active_stage(device: &str) -> Stage {
    let mut parts = Parts {
        r1: Some(47e3),
        r2: Some(10e3),
        rc: 4.7e3,
        re: 220.0,
        re_bypassed: 820.0,
        rs: 600.0,
        rl: 10e3,
        ..Parts::default()
    };
    let transistor = preset(device).expect("preset");
    if transistor.polarity == Polarity::Pnp {
        // The mirror image keeps r1 from the supply to the base.
        std::mem::swap(&mut parts.r1, &mut parts.r2);
    }
    Stage {
        kind: StageKind::CommonEmitter,
        supply: 12.0,
        ambient: Temperature::from_celsius(25.0),
        parts,
        transistor,
    }
}

#[test]
fn hybrid_pi_relations() {
    // Sedra & Smith: gm = IC/VT, rπ = β/gm with β = IC/IB, ro = (VA + VCE)/IC,
    // fT = gm/(2π(Cπ + Cμ)), fβ = fT/β0.
    for device in ["general-purpose-npn", "general-purpose-pnp", "rf-npn"] {
        let s = active_stage(device);
        let a = analyze(&s).expect("the stage analyses");
        let op = &a.operating_point;
        assert_eq!(op.region, Region::Active, "{device}");
        let ss = &a.small_signal;
        let vt = thermal_voltage(s.ambient);
        let va = s.transistor.early_voltage.expect("presets have VA");
        let vce = op.vce.abs();
        let ft = ss.gm / (2.0 * std::f64::consts::PI * (ss.c_pi + ss.c_mu));
        let rows = [
            ("gm = IC/VT", ss.gm, op.ic / vt),
            ("rπ = (IC/IB)/gm", ss.r_pi, op.ic / op.ib / ss.gm),
            ("ro = (VA + VCE)/IC", ss.r_o, (va + vce) / op.ic),
            ("fT = gm/(2π(Cπ + Cμ))", ft, s.transistor.ft),
            ("β0 = gm·rπ", ss.beta0, ss.gm * ss.r_pi),
            ("rbb'", ss.rbb, s.transistor.rbb),
        ];
        for (what, got, want) in rows {
            check(
                SEDRA,
                &format!("{device}: {what}"),
                got,
                want,
                allowed::HYBRID_PI,
            );
        }
    }
}

#[test]
fn junction_capacitance_law() {
    // Sedra & Smith problem 3.25 (docs/references.md, computed):
    // Cj0 = 0.4 pF, V0 = 0.75 V, m = 1/3 gives 0.30 pF at 1 V and 0.165 pF
    // at 10 V. The core grades Cob from its stated VCB; stating Cob = Cj0
    // at 0 V makes the core's law C = Cj0/(1 + VR/V0)^m.
    const SOURCE: &str = "Sedra & Smith, Microelectronic Circuits, problem 3.25";
    check(
        SOURCE,
        "V0 (V)",
        CJC_BUILT_IN,
        0.75,
        Allowed {
            rel: 0.0,
            why: "a typed constant",
        },
    );
    check(
        SOURCE,
        "m",
        CJC_GRADING,
        1.0 / 3.0,
        Allowed {
            rel: 0.0,
            why: "a typed constant",
        },
    );
    let mut t: TransistorData = preset("general-purpose-npn").expect("preset");
    t.cob = 0.4e-12;
    t.cob_vcb = Some(0.0);
    for (vr, published, tol) in [
        (1.0, 0.30e-12, allowed::TWO_DIGITS),
        (10.0, 0.165e-12, allowed::THREE_DIGITS),
    ] {
        let formula = 0.4e-12 / (1.0 + vr / 0.75_f64).powf(1.0 / 3.0);
        check(
            SOURCE,
            &format!("Cj at {vr} V, formula"),
            t.c_mu(vr),
            formula,
            allowed::SAME_FORMULA,
        );
        check(
            SOURCE,
            &format!("Cj at {vr} V, published"),
            t.c_mu(vr),
            published,
            tol,
        );
    }
    // Without a stated VCB, Cμ is Cob at every voltage (core docs).
    t.cob_vcb = None;
    check(
        "core docs: no grading without cob_vcb",
        "Cμ at 7 V",
        t.c_mu(7.0),
        0.4e-12,
        allowed::SAME_FORMULA,
    );
}

#[test]
fn ptot_derates_linearly_to_tj_max() {
    // Datasheet practice (common practice): Ptot holds up to 25 °C ambient
    // and falls linearly to 0 at Tj max: P(Ta) = Ptot·(Tjmax − Ta)/(Tjmax − 25 °C).
    let t = preset("general-purpose-npn").expect("preset");
    let tj = t.tj_max.celsius();
    for (celsius, want) in [
        (-40.0, t.ptot_max),
        (25.0, t.ptot_max),
        (87.5, t.ptot_max * (tj - 87.5) / (tj - 25.0)),
        (125.0, t.ptot_max * (tj - 125.0) / (tj - 25.0)),
    ] {
        check(
            "common practice: linear derating of Ptot above 25 °C",
            &format!("Ptot at {celsius} °C"),
            t.ptot_at(Temperature::from_celsius(celsius)),
            want,
            allowed::SAME_FORMULA,
        );
    }
    assert_eq!(t.ptot_at(Temperature::from_celsius(tj + 1.0)), 0.0);
}
