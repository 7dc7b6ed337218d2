//! Independent numerics: the full small-signal network of each stage,
//! built here by modified nodal analysis and solved with nalgebra's complex
//! LU, against the core's [`Response::at`]; and the textbook closed forms
//! ([`Midband::closed_form`]) against the core's nodal midband.
//!
//! Source: docs/references.md, "Independent numerics": a general complex
//! linear solve of the full nodal matrix is an independent check of every
//! closed-form midband formula and of the frequency sweep.
//!
//! The network here is written from the stage table of the core's `stage`
//! module documentation, not from its `nodal` module: every ideal capacitor
//! and zero-ohm resistor is a 0 V voltage source with its own branch current
//! (the core merges such nodes instead), the EMF is a voltage source whose
//! branch current is the input current (the core takes the EMF node's row of
//! Y), and the output impedance is found with the load removed and 1 A
//! pushed into the output node (the core solves with the load in place and
//! takes it back out, Zout = 1/(1/Zt − 1/RL)). Only the hybrid-π values
//! (gm, rπ, ro via `g_o()`, gr, Cπ, Cμ, rbb') are taken from the core's
//! [`SmallSignal`].

use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;
use stagewright::{
    analyze, log_frequencies, preset, Analysis, Edge, FrequencyPoint, Midband, Parts, Polarity,
    Region, SmallSignal, Stage, StageKind, Temperature, SEARCH_FROM, SEARCH_TO,
};
use stagewright_crosschecks::{check, rel_diff, Allowed};

const SOURCE: &str =
    "docs/references.md, independent numerics (nalgebra complex LU of the full nodal matrix)";

/// Allowed errors, per quantity, and why.
mod allowed {
    use super::Allowed;

    /// Sweep quantities (Av, Av from source, Ai, Zin, Zout) at one
    /// frequency, where `spread` is the admittance spread ω·Cmax·Rmax of the
    /// nodal matrix there (see [`super::spread`]).
    ///
    /// Both sides are LU solves with partial pivoting of the same network
    /// in double precision, so where the matrix is well scaled they agree to
    /// rounding, and 1e-9 is allowed. Above a few megahertz the coupling and
    /// bypass capacitors (microfarads) have admittances up to 10⁶ S beside
    /// conductances of 10⁻⁵ S, and complex elimination loses about
    /// ε·spread of relative accuracy in both solvers: a 60-digit solve of
    /// this test's own matrix (mpmath, follower with 100 µF at 6.25 GHz)
    /// showed both double-precision answers off the exact one by a few
    /// 1e-8. So the allowance grows to ε·spread there (the differences
    /// found were below 5 % of it). A wrong stamp shows at the percent level
    /// or more, far above either allowance (at most about 1e-4 at 10 GHz).
    pub fn sweep(spread: f64) -> Allowed {
        Allowed {
            rel: (f64::EPSILON * spread).max(1e-9),
            why:
                "1e-9 where the nodal matrix is well scaled (two LU solves of one network agree to \
                  rounding); ε·(ωCmax·Rmax) where microfarad capacitors at high frequency make the \
                  complex elimination lose digits in both solvers",
        }
    }

    /// Midband closed forms against the nodal midband with no Early effect.
    pub const CLOSED_FORM_NO_EARLY: Allowed = Allowed {
        rel: 1e-9,
        why: "with ro infinite (and the reverse terms e^(vBC/VT) below 1e-80) the textbook closed \
              forms are exact for the midband network: the two differ only by rounding",
    };
}

/// Relative size of the Early-effect terms the closed forms leave out: the
/// AC resistance the device's ro sits beside, over ro. The closed forms may
/// differ from the nodal midband by about this much (Midband docs: "terms
/// of the order of (RC∥RL)/ro"; RC itself for the output impedance).
fn early_term(stage: &Stage, ss: &SmallSignal) -> f64 {
    let p = &stage.parts;
    let par = |a: f64, b: f64| a * b / (a + b);
    let r = match stage.kind {
        // Zout = RC∥ro (ro boosted by emitter feedback in the CB stage)
        // and Av ∝ RC∥RL∥ro: RC is the larger of the two resistances.
        StageKind::CommonEmitter | StageKind::CommonBase => p.rc,
        // ro runs from the emitter (load RE∥RL) to the collector (RC to AC ground).
        StageKind::CommonCollector => p.rc + par(p.re, p.rl),
    };
    r * ss.g_o()
}

// ---------------------------------------------------------------------------
// The stages
// ---------------------------------------------------------------------------

/// One stage of the comparison, with a name for messages.
struct Case {
    name: &'static str,
    stage: Stage,
}

/// The stage of `kind` with `parts` on a 12 V supply at 25 °C. For a PNP
/// device the divider is mirrored (r1 and r2 swapped), since a PNP stage
/// keeps r1 from the supply to the base while its transistor is turned on
/// from the lower rail: the mirror image of the NPN stage, same bias.
fn stage(kind: StageKind, device: &str, mut parts: Parts) -> Stage {
    let transistor = preset(device).expect("preset exists");
    if transistor.polarity == Polarity::Pnp {
        std::mem::swap(&mut parts.r1, &mut parts.r2);
    }
    Stage {
        kind,
        supply: 12.0,
        ambient: Temperature::from_celsius(25.0),
        parts,
        transistor,
    }
}

/// Common emitter with the emitter resistance split into an unbypassed and a
/// bypassed part, every capacitor finite (the crate docs' example stage).
fn ce_parts() -> Parts {
    Parts::example()
}

/// Common collector with a collector resistor (so Cμ and ro see a
/// collector node that is not AC ground).
fn cc_parts() -> Parts {
    Parts {
        r1: Some(22e3),
        r2: Some(33e3),
        rc: 470.0,
        re: 2.2e3,
        rs: 1e3,
        rl: 1e3,
        c_in: Some(10e-6),
        c_out: Some(100e-6),
        ..Parts::default()
    }
}

/// Common base with a finite base bypass capacitor.
fn cb_parts() -> Parts {
    Parts {
        r1: Some(47e3),
        r2: Some(10e3),
        rc: 4.7e3,
        re: 1.5e3,
        rs: 50.0,
        rl: 10e3,
        c_in: Some(10e-6),
        c_out: Some(1e-6),
        c_base: Some(10e-6),
        ..Parts::default()
    }
}

fn cases() -> Vec<Case> {
    let mut out = vec![
        Case {
            name: "common emitter, NPN, bypass split",
            stage: stage(StageKind::CommonEmitter, "general-purpose-npn", ce_parts()),
        },
        Case {
            name: "common emitter, PNP, bypass split",
            stage: stage(StageKind::CommonEmitter, "general-purpose-pnp", ce_parts()),
        },
        Case {
            name: "common collector, NPN, collector resistor",
            stage: stage(
                StageKind::CommonCollector,
                "general-purpose-npn",
                cc_parts(),
            ),
        },
        Case {
            name: "common collector, PNP, collector resistor",
            stage: stage(
                StageKind::CommonCollector,
                "general-purpose-pnp",
                cc_parts(),
            ),
        },
        Case {
            name: "common base, NPN",
            stage: stage(StageKind::CommonBase, "general-purpose-npn", cb_parts()),
        },
        Case {
            name: "common base, PNP",
            stage: stage(StageKind::CommonBase, "general-purpose-pnp", cb_parts()),
        },
    ];
    // Shorts everywhere: rs = 0, rbb' = 0, the whole emitter resistance
    // bypassed, ideal input capacitor; and a follower with its collector on
    // the rail.
    let mut shorted = stage(
        StageKind::CommonEmitter,
        "general-purpose-npn",
        Parts {
            rs: 0.0,
            re: 0.0,
            c_in: None,
            ..ce_parts()
        },
    );
    shorted.transistor.rbb = 0.0;
    out.push(Case {
        name: "common emitter, NPN, rs = 0, rbb' = 0, re = 0, ideal c_in",
        stage: shorted,
    });
    out.push(Case {
        name: "common collector, NPN, collector on the rail",
        stage: stage(
            StageKind::CommonCollector,
            "general-purpose-npn",
            Parts {
                rc: 0.0,
                ..cc_parts()
            },
        ),
    });
    out
}

// ---------------------------------------------------------------------------
// Modified nodal analysis, written for this test
// ---------------------------------------------------------------------------

const GND: usize = 0;
const SRC: usize = 1;
const IN: usize = 2;
const BASE: usize = 3;
const BASE_INT: usize = 4;
const EMIT: usize = 5;
const EMIT_LOW: usize = 6;
const COLL: usize = 7;
const OUT: usize = 8;
/// Node voltages 1..=8 are unknowns 0..=7.
const NODE_UNKNOWNS: usize = 8;

/// An element of the small-signal network.
enum Element {
    /// Admittance y between two nodes.
    Admittance(usize, usize, Complex64),
    /// Ideal voltage source v(p) − v(n) = value, with a branch current unknown.
    Source(usize, usize, Complex64),
    /// Current `g·(v(cp) − v(cn))` leaving node `from` and entering node `to`.
    Controlled {
        from: usize,
        to: usize,
        cp: usize,
        cn: usize,
        g: f64,
    },
}

/// A resistor of `r` ohms, 0 Ω being a short (a 0 V source).
fn resistor(a: usize, b: usize, r: f64) -> Element {
    if r > 0.0 {
        Element::Admittance(a, b, Complex64::new(1.0 / r, 0.0))
    } else {
        Element::Source(a, b, Complex64::new(0.0, 0.0))
    }
}

/// A capacitor at angular frequency `w`; `None` (ideal) is a short.
fn capacitor(a: usize, b: usize, c: Option<f64>, w: f64) -> Element {
    match c {
        Some(c) => Element::Admittance(a, b, Complex64::new(0.0, w * c)),
        None => Element::Source(a, b, Complex64::new(0.0, 0.0)),
    }
}

/// The network of `stage` at `frequency`, EMF `emf` volts, with or without
/// the load. Follows the stage table of the core's `stage` module: both
/// rails are AC ground, so r1 and r2 both go from the base to ground, and a
/// PNP stage has the same small-signal network as the NPN one.
fn network(stage: &Stage, ss: &SmallSignal, frequency: f64, emf: f64, load: bool) -> Vec<Element> {
    let p = &stage.parts;
    let w = 2.0 * std::f64::consts::PI * frequency;
    let mut el = vec![
        Element::Source(SRC, GND, Complex64::new(emf, 0.0)),
        resistor(SRC, IN, p.rs),
        resistor(BASE, BASE_INT, ss.rbb),
    ];
    if let Some(r) = p.r1 {
        el.push(resistor(BASE, GND, r));
    }
    if let Some(r) = p.r2 {
        el.push(resistor(BASE, GND, r));
    }
    if load {
        el.push(resistor(OUT, GND, p.rl));
    }
    match stage.kind {
        StageKind::CommonEmitter => {
            el.push(capacitor(IN, BASE, p.c_in, w));
            el.push(resistor(COLL, GND, p.rc));
            el.push(capacitor(COLL, OUT, p.c_out, w));
            el.push(resistor(EMIT, EMIT_LOW, p.re));
            if p.re_bypassed > 0.0 {
                el.push(resistor(EMIT_LOW, GND, p.re_bypassed));
                el.push(capacitor(EMIT_LOW, GND, p.c_emitter, w));
            } else {
                el.push(resistor(EMIT_LOW, GND, 0.0));
            }
        }
        StageKind::CommonCollector => {
            el.push(capacitor(IN, BASE, p.c_in, w));
            el.push(resistor(COLL, GND, p.rc));
            el.push(resistor(EMIT, GND, p.re));
            el.push(capacitor(EMIT, OUT, p.c_out, w));
        }
        StageKind::CommonBase => {
            el.push(capacitor(IN, EMIT, p.c_in, w));
            el.push(resistor(EMIT, GND, p.re));
            el.push(capacitor(BASE, GND, p.c_base, w));
            el.push(resistor(COLL, GND, p.rc));
            el.push(capacitor(COLL, OUT, p.c_out, w));
        }
    }
    // The hybrid-π core (Sedra & Smith): rπ and Cπ from B' to E, Cμ from B'
    // to C, ro from C to E, gm·vB'E from C to E, and the reverse term
    // gr·vCE from B' to E.
    el.push(Element::Admittance(
        BASE_INT,
        EMIT,
        Complex64::new(1.0 / ss.r_pi, w * ss.c_pi),
    ));
    el.push(Element::Admittance(
        BASE_INT,
        COLL,
        Complex64::new(0.0, w * ss.c_mu),
    ));
    el.push(Element::Admittance(
        COLL,
        EMIT,
        Complex64::new(ss.g_o(), 0.0),
    ));
    el.push(Element::Controlled {
        from: COLL,
        to: EMIT,
        cp: BASE_INT,
        cn: EMIT,
        g: ss.gm,
    });
    el.push(Element::Controlled {
        from: BASE_INT,
        to: EMIT,
        cp: COLL,
        cn: EMIT,
        g: ss.g_r,
    });
    el
}

/// Solves the network with `inject` amperes pushed into node `at`; returns
/// the node voltages (index = node number, ground 0) and the branch current
/// of the first source (the EMF), flowing from its + node through it.
fn solve(elements: &[Element], inject: Option<(usize, f64)>) -> (Vec<Complex64>, Complex64) {
    let sources = elements
        .iter()
        .filter(|e| matches!(e, Element::Source(..)))
        .count();
    let n = NODE_UNKNOWNS + sources;
    let zero = Complex64::new(0.0, 0.0);
    let mut a = DMatrix::from_element(n, n, zero);
    let mut b = DVector::from_element(n, zero);
    // Row/column of a node; ground has none.
    let idx = |node: usize| if node == GND { None } else { Some(node - 1) };
    let mut touched = [false; NODE_UNKNOWNS + 1];
    let mut k = NODE_UNKNOWNS;
    for e in elements {
        match *e {
            Element::Admittance(p, q, y) => {
                touched[p] = true;
                touched[q] = true;
                if let Some(i) = idx(p) {
                    a[(i, i)] += y;
                }
                if let Some(j) = idx(q) {
                    a[(j, j)] += y;
                }
                if let (Some(i), Some(j)) = (idx(p), idx(q)) {
                    a[(i, j)] -= y;
                    a[(j, i)] -= y;
                }
            }
            Element::Source(p, q, v) => {
                touched[p] = true;
                touched[q] = true;
                // KCL rows: the branch current leaves p and enters q.
                if let Some(i) = idx(p) {
                    a[(i, k)] += Complex64::new(1.0, 0.0);
                    a[(k, i)] += Complex64::new(1.0, 0.0);
                }
                if let Some(j) = idx(q) {
                    a[(j, k)] -= Complex64::new(1.0, 0.0);
                    a[(k, j)] -= Complex64::new(1.0, 0.0);
                }
                b[k] = v;
                k += 1;
            }
            Element::Controlled {
                from,
                to,
                cp,
                cn,
                g,
            } => {
                for (row, sign) in [(from, 1.0), (to, -1.0)] {
                    if let Some(r) = idx(row) {
                        if let Some(c) = idx(cp) {
                            a[(r, c)] += Complex64::new(sign * g, 0.0);
                        }
                        if let Some(c) = idx(cn) {
                            a[(r, c)] -= Complex64::new(sign * g, 0.0);
                        }
                    }
                }
            }
        }
    }
    // A node no element touches (the emitter's lower node of a follower)
    // is pinned at 0 V so that the matrix stays regular.
    for node in 1..=NODE_UNKNOWNS {
        if !touched[node] {
            a[(node - 1, node - 1)] = Complex64::new(1.0, 0.0);
        }
    }
    if let Some((at, amps)) = inject {
        b[at - 1] += Complex64::new(amps, 0.0);
    }
    let x = a
        .lu()
        .solve(&b)
        .expect("the nodal matrix of a valid stage is regular");
    let mut v = vec![zero; NODE_UNKNOWNS + 1];
    for node in 1..=NODE_UNKNOWNS {
        v[node] = x[node - 1];
    }
    (v, x[NODE_UNKNOWNS])
}

/// The five quantities of the crate definitions, from the test's own solve.
struct Reference {
    voltage_gain: Complex64,
    voltage_gain_from_source: Complex64,
    current_gain: Complex64,
    input_impedance: Complex64,
    output_impedance: Complex64,
}

fn reference(stage: &Stage, ss: &SmallSignal, frequency: f64) -> Reference {
    // 1 V of EMF with the load in place.
    let (v, i_branch) = solve(&network(stage, ss, frequency, 1.0, true), None);
    // The EMF delivers the current that flows out of its + node into rs,
    // which is minus its branch current (defined from + through the source).
    let i_in = -i_branch;
    let v_in = v[IN];
    let v_out = v[OUT];
    let i_load = v_out / stage.parts.rl;
    // EMF zeroed (rs kept), load removed, 1 A pushed into the output node.
    let (vz, _) = solve(&network(stage, ss, frequency, 0.0, false), Some((OUT, 1.0)));
    Reference {
        voltage_gain: v_out / v_in,
        voltage_gain_from_source: v_out,
        current_gain: i_load / i_in,
        input_impedance: v_in / i_in,
        output_impedance: vz[OUT],
    }
}

/// The spread of admittances in the nodal matrix at `f`: the largest
/// capacitor's admittance ω·C over the smallest resistor's conductance
/// 1/R. A complex LU of a matrix whose entries are G + jωC loses about this
/// factor times the machine epsilon in the small (resistive) parts, since
/// products of complex numbers subtract terms of size (ωC)² from terms of
/// size G².
fn spread(stage: &Stage, ss: &SmallSignal, f: f64) -> f64 {
    let p = &stage.parts;
    let w = 2.0 * std::f64::consts::PI * f;
    let cmax = [
        p.c_in,
        p.c_out,
        p.c_emitter,
        p.c_base,
        Some(ss.c_pi),
        Some(ss.c_mu),
    ]
    .into_iter()
    .flatten()
    .fold(0.0f64, f64::max);
    let rmax = [
        p.r1.unwrap_or(0.0),
        p.r2.unwrap_or(0.0),
        p.rc,
        p.re,
        p.re_bypassed,
        p.rs,
        p.rl,
        ss.rbb,
        ss.r_pi,
    ]
    .into_iter()
    .fold(0.0f64, f64::max);
    w * cmax * rmax
}

/// |a − b| / max(|a|, |b|) for complex values.
fn complex_rel(a: Complex64, b: Complex64) -> f64 {
    let scale = a.norm().max(b.norm());
    if scale == 0.0 {
        0.0
    } else {
        (a - b).norm() / scale
    }
}

#[track_caller]
fn check_complex(case: &str, what: &str, f: f64, got: Complex64, want: Complex64, a: Allowed) {
    let d = complex_rel(got, want);
    assert!(
        got.re.is_finite() && got.im.is_finite() && d <= a.rel,
        "{case}, {what} at {f:.4e} Hz: core {got}, reference {want} (relative {d:.3e} > {:.1e}, allowed because: {}); source: {SOURCE}",
        a.rel,
        a.why
    );
}

/// The analysis of a case, which must be biased in the active region (a
/// saturated or cut-off stage would compare hybrid-π values that no
/// amplifier uses).
fn analysis_of(case: &Case) -> Analysis {
    let a = analyze(&case.stage).unwrap_or_else(|e| panic!("{}: {e}", case.name));
    assert_eq!(
        a.operating_point.region,
        Region::Active,
        "{}: the comparison stages are amplifiers",
        case.name
    );
    a
}

#[test]
fn sweep_matches_independent_nodal_solve() {
    let freqs = log_frequencies(1.0, 1e10, 50).expect("valid sweep range");
    assert_eq!(freqs.len(), 50);
    for case in cases() {
        let a = analysis_of(&case);
        let ss = a.small_signal;
        let response = a.response();
        let mut worst: f64 = 0.0;
        for &f in &freqs {
            let got: FrequencyPoint = response.at(f).expect("the core solves every frequency");
            let want = reference(&case.stage, &ss, f);
            let allowed = allowed::sweep(spread(&case.stage, &ss, f));
            let rows = [
                ("voltage gain", got.voltage_gain, want.voltage_gain),
                (
                    "voltage gain from source",
                    got.voltage_gain_from_source,
                    want.voltage_gain_from_source,
                ),
                ("current gain", got.current_gain, want.current_gain),
                ("input impedance", got.input_impedance, want.input_impedance),
                (
                    "output impedance",
                    got.output_impedance,
                    want.output_impedance,
                ),
            ];
            for (what, g, w) in rows {
                worst = worst.max(complex_rel(g, w));
                check_complex(case.name, what, f, g, w, allowed);
            }
        }
        println!("{}: largest relative difference {worst:.2e}", case.name);
    }
}

#[test]
fn sweep_reference_sees_the_band() {
    // A sanity check that the comparison above is not between two flat
    // answers: the reference's own gain from the source must rise from
    // 1 Hz to midband and fall again by 10 GHz for the CE stage (coupling
    // capacitors of 1 µF with kilohm resistances put the lower corner near
    // 100 Hz; Cπ and Cμ put the upper one near a megahertz; common practice).
    // Tolerance: a factor of 10 below the midband magnitude at each end.
    let case = &cases()[0];
    let a = analysis_of(case);
    let mid = a.midband.voltage_gain_from_source.abs();
    let low = reference(&case.stage, &a.small_signal, 1.0)
        .voltage_gain_from_source
        .norm();
    let high = reference(&case.stage, &a.small_signal, 1e10)
        .voltage_gain_from_source
        .norm();
    assert!(low < 0.1 * mid, "1 Hz: {low} vs midband {mid}");
    assert!(high < 0.1 * mid, "10 GHz: {high} vs midband {mid}");
    // And the midband magnitude itself agrees with the reference at the
    // geometric centre of the band to 1 % (the corners are decades away,
    // so the capacitors cost less than 1 % there).
    let (fl, fh) = (
        a.bandwidth
            .f_low
            .expect("finite capacitors give a lower corner"),
        a.bandwidth.f_high.expect("Cπ and Cμ give an upper corner"),
    );
    let centre = (fl * fh).sqrt();
    let r = reference(&case.stage, &a.small_signal, centre)
        .voltage_gain_from_source
        .norm();
    assert!(rel_diff(r, mid) < 0.01, "{r} vs {mid} at {centre} Hz");
}

/// The midband quantities of `m` as (name, value) rows.
fn midband_rows(m: &Midband) -> [(&'static str, f64); 5] {
    [
        ("voltage gain", m.voltage_gain),
        ("voltage gain from source", m.voltage_gain_from_source),
        ("current gain", m.current_gain),
        ("input impedance", m.input_impedance),
        ("output impedance", m.output_impedance),
    ]
}

#[test]
fn closed_form_matches_nodal_midband_without_early_effect() {
    for mut case in cases() {
        case.stage.transistor.early_voltage = None;
        let a = analysis_of(&case);
        assert_eq!(a.small_signal.g_o(), 0.0, "{}: ro must be open", case.name);
        let closed = Midband::closed_form(&case.stage, &a.small_signal);
        let src = "Midband docs: Sedra & Smith ch. 7 closed forms, exact when ro is infinite";
        for ((what, got), (_, want)) in midband_rows(&a.midband)
            .into_iter()
            .zip(midband_rows(&closed))
        {
            check(
                src,
                &format!("{}: {what}", case.name),
                got,
                want,
                allowed::CLOSED_FORM_NO_EARLY,
            );
        }
        check(
            src,
            &format!("{}: power gain (dB)", case.name),
            a.midband.power_gain_db,
            closed.power_gain_db,
            allowed::CLOSED_FORM_NO_EARLY,
        );
    }
}

#[test]
fn closed_form_differs_from_nodal_midband_by_early_terms_only() {
    for case in cases() {
        let a = analysis_of(&case);
        let ss = a.small_signal;
        assert!(ss.g_o() > 0.0, "{}: the preset has a finite VA", case.name);
        let eps = early_term(&case.stage, &ss);
        // Tolerance: 2·(R/ro), R the AC resistance beside ro. The closed
        // forms drop ro; to first order that changes each quantity by R/ro
        // times a factor of order one (the Midband docs: "of the order of
        // (RC∥RL)/ro"); 2 allows for the factors β/(β + 1) and 1/(1 + gm·Re)
        // of the feedback stages. The test also checks that the difference
        // is not zero, so the Early effect is really in the nodal figures.
        let allowed = Allowed {
            rel: 2.0 * eps,
            why: "closed forms leave out ro: error of order (R beside ro)/ro",
        };
        let closed = Midband::closed_form(&case.stage, &ss);
        let src = "Midband docs (Sedra & Smith ch. 7), Early terms of order (RC∥RL)/ro";
        let mut largest: f64 = 0.0;
        for ((what, got), (_, want)) in midband_rows(&a.midband)
            .into_iter()
            .zip(midband_rows(&closed))
        {
            largest = largest.max(rel_diff(got, want));
            check(src, &format!("{}: {what}", case.name), got, want, allowed);
        }
        println!(
            "{}: R/ro = {eps:.3e}, largest relative difference {largest:.3e}",
            case.name
        );
        assert!(
            largest > 1e-6 * eps,
            "{}: the nodal midband should feel ro (difference {largest:.3e}, R/ro {eps:.3e})",
            case.name
        );
    }
}

#[test]
fn no_passband_agrees_with_independent_nodal_solve() {
    // A band that does not exist: each comparison stage with a 10 fF input
    // coupling capacitor (far too small: its corner lands near or above
    // the device's upper corner), and each stage as it is. The core's
    // verdict (`Edge::NoPassband` or not) must be the reference's: whether
    // the independent network's |V(load)/EMF| comes within 3 dB of the
    // midband value anywhere on a dense scan. Its peak must agree too.
    // Without a passband the core refines the peak between its scan
    // points, so the reference's largest scan value may not exceed it by
    // more than the two solvers' agreement there (`allowed::sweep`). In
    // every case the reference may fall short of the core's peak by at most
    // its scan's discretisation (80 points a decade, Δln f = 0.029: a smooth
    // maximum is missed by at most |d²ln|H|/d(ln f)²|·Δ²/8, below 2e-4 for
    // these one-transistor networks, whose curvature is at most about 1).
    let freqs = log_frequencies(SEARCH_FROM, SEARCH_TO, 1201).expect("valid range");
    let mut seen_without = 0;
    for case in cases() {
        for tiny in [false, true] {
            let mut stage = case.stage.clone();
            if tiny {
                stage.parts.c_in = Some(10e-15);
            }
            let a = analyze(&stage).unwrap_or_else(|e| panic!("{}: {e}", case.name));
            let mid = a.midband.voltage_gain_from_source.abs();
            let peak = freqs
                .iter()
                .map(|&f| {
                    reference(&stage, &a.small_signal, f)
                        .voltage_gain_from_source
                        .norm()
                })
                .fold(0.0, f64::max)
                / mid;
            let b = &a.bandwidth;
            let without = peak < std::f64::consts::FRAC_1_SQRT_2;
            assert_eq!(
                b.low_edge == Edge::NoPassband,
                without,
                "{} (10 fF: {tiny}): reference peak {peak}, core {:?} peak {}",
                case.name,
                b.low_edge,
                b.peak_ratio
            );
            // Where the band exists, the core reports the largest value of
            // its coarse corner scan (2 a decade), a lower bound of the peak.
            assert!(
                b.peak_ratio <= peak * (1.0 + 2e-4),
                "{}: {} ≫ {peak}",
                case.name,
                b.peak_ratio
            );
            if without {
                // The two solvers agree to the sweep allowance at the peak.
                let agree = allowed::sweep(spread(&stage, &a.small_signal, b.peak_frequency)).rel;
                assert!(
                    peak <= b.peak_ratio * (1.0 + agree),
                    "{}: {peak} > {}",
                    case.name,
                    b.peak_ratio
                );
                seen_without += 1;
                assert_eq!(b.high_edge, Edge::NoPassband);
                assert_eq!((b.f_low, b.f_high), (None, None));
            } else {
                assert!(b.peak_ratio >= std::f64::consts::FRAC_1_SQRT_2);
                assert_eq!(
                    (b.low_edge, b.high_edge),
                    (Edge::Corner, Edge::Corner),
                    "{}",
                    case.name
                );
            }
        }
    }
    assert!(
        seen_without > 0,
        "the 10 fF stages include one without a passband"
    );
}
