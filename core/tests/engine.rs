//! Integration tests of the engine's public API, as a user of the crate
//! sees it: build a [`Stage`], call [`analyze`], read the results.
//!
//! Index (one section per concern, in this order):
//!
//! - **Errors name the field**: `errors_*`. A bad value in any part gives an
//!   [`Error`] whose field and message name that part, with the value and
//!   what is allowed; nested transistor fields are prefixed `transistor.`.
//! - **Topology rules**: `topology_*`. A common-emitter stage without a
//!   collector resistor, a follower with a bypassed emitter, a bypass
//!   capacitor with nothing to bypass: rejected, naming the part.
//! - **Polarity mirror**: `mirror_*`. A PNP stage built as the mirror image
//!   of an NPN stage has equal |VCE|, mirrored node voltages and equal
//!   gains, for each stage kind.
//! - **Regions**: `region_*`. A divider that saturates the transistor
//!   reports saturation, a base with no path to the turn-on rail reports
//!   cutoff, each with its caution and no swing.
//! - **Options and limits**: `options_*`, `limits_*`. What `analyze_with`
//!   leaves out; ideal capacitors give no lower corner; the open ro; the
//!   supply limit; sweeps and their errors.
//! - **Networks**: `network_*`. The midband network's solve is the
//!   midband the analysis reports.
//! - **Presets, names and requirements**: `presets_*`, `names_*`,
//!   `requirements_*`.
//!
//! Tolerances: values that the engine computes twice by the same route
//! are compared to 1e-12 relative (rounding); the mirror to 1e-12 (the same
//! equations in the mirrored frame); anything else says why beside it.

use stagewright::{
    analyze, analyze_with, preset, AcNetwork, Band, Design, Edge, Error, ErrorKind, Midband,
    MonteCarlo, Options, Polarity, Region, Requirements, Stage, StageKind, Temperature, Tolerances,
    DEFAULT_TRIALS, MAX_DEPTH, MAX_ECHO, MAX_NOTES, MAX_SUPPLY, MAX_TITLE, MAX_TRIALS,
    MIN_RESISTANCE, OPEN_RESISTANCE, PRESETS, SEARCH_FROM, SEARCH_TO,
};
use stagewright::{
    utf8_text, Bound, Report, Requirement, RequirementsDocument, CONDITIONS, FIGURES, RATINGS,
    REQUIREMENTS,
};

/// |a − b| / max(|a|, |b|), 0 when both are 0.
fn rel(a: f64, b: f64) -> f64 {
    let m = a.abs().max(b.abs());
    if m == 0.0 {
        0.0
    } else {
        (a - b).abs() / m
    }
}

/// Asserts `got` within relative `tol` of `want`; `why` says why that tolerance.
#[track_caller]
fn close(what: &str, got: f64, want: f64, tol: f64, why: &str) {
    assert!(
        got.is_finite() && rel(got, want) <= tol,
        "{what}: got {got:e}, expected {want:e} (relative {:.3e} > {tol:e}: {why})",
        rel(got, want)
    );
}

/// Same route twice: rounding only.
const SAME: f64 = 1e-12;

/// The crate docs' example stage: a 12 V common-emitter gain stage.
fn example() -> Stage {
    Stage::example()
}

/// The error `analyze` gives for `s`.
#[track_caller]
fn error_of(s: &Stage) -> Error {
    match analyze(s) {
        Ok(_) => panic!("expected an error for {s:?}"),
        Err(e) => e,
    }
}

// ---------------------------------------------------------------------------
// Errors name the field
// ---------------------------------------------------------------------------

#[test]
fn errors_negative_load_names_rl() {
    let mut s = example();
    s.parts.rl = -1.0;
    let e = error_of(&s);
    assert_eq!(e.field(), "rl");
    assert!(matches!(e.kind(), ErrorKind::OutOfRange { value, .. } if *value == -1.0));
    let msg = e.to_string();
    // The message names the field, the value and the rule (lower case).
    assert!(msg.starts_with("rl must be"), "{msg}");
    assert!(msg.contains("greater than 0"), "{msg}");
    assert!(msg.contains("-1"), "{msg}");
}

#[test]
fn errors_each_bad_part_is_named() {
    // (mutation, field the error must name). Every one a value a user could type.
    type Mutation = fn(&mut Stage);
    let cases: [(Mutation, &str); 12] = [
        (|s| s.parts.rc = -4.7e3, "rc"),
        (|s| s.parts.re = f64::NAN, "re"),
        (|s| s.parts.re_bypassed = -1.0, "re_bypassed"),
        (|s| s.parts.rs = f64::INFINITY, "rs"),
        (|s| s.parts.r1 = Some(0.0), "r1"),
        (|s| s.parts.r2 = Some(-10e3), "r2"),
        (|s| s.parts.c_in = Some(0.0), "c_in"),
        (|s| s.parts.c_out = Some(-1e-6), "c_out"),
        (|s| s.supply = 0.0, "supply"),
        (|s| s.supply = MAX_SUPPLY * 1.001, "supply"),
        (|s| s.parts.resistor_rating = 0.0, "resistor_rating"),
        (|s| s.ambient = Temperature::from_celsius(-100.0), "ambient"),
    ];
    for (mutate, field) in cases {
        let mut s = example();
        mutate(&mut s);
        let e = error_of(&s);
        assert_eq!(e.field(), field, "{e}");
        assert!(e.to_string().contains(field), "{e}");
    }
}

#[test]
fn errors_transistor_fields_are_prefixed() {
    let mut s = example();
    s.transistor.hfe_min = 300.0; // above hfe = 200
    let e = error_of(&s);
    assert_eq!(e.field(), "transistor.hfe_min");
    assert!(e.to_string().contains("at most hfe"), "{e}");
    let mut s = example();
    s.transistor.vbe = 3.0;
    assert_eq!(error_of(&s).field(), "transistor.vbe");
    let mut s = example();
    s.transistor.early_voltage = Some(0.0);
    assert_eq!(error_of(&s).field(), "transistor.early_voltage");
}

#[test]
fn errors_missing_bias_path_and_hot_ambient() {
    let mut s = example();
    s.parts.r1 = None;
    s.parts.r2 = None;
    let e = error_of(&s);
    assert_eq!(e.field(), "r1");
    assert!(matches!(e.kind(), ErrorKind::Missing { .. }));
    // The ambient must be below the transistor's Tj max.
    let mut s = example();
    s.ambient = Temperature::from_celsius(160.0);
    let e = error_of(&s);
    assert_eq!(e.field(), "ambient");
    assert!(matches!(e.kind(), ErrorKind::Inconsistent { .. }));
}

#[test]
fn errors_convert_to_strings_and_nest() {
    let e = Error::out_of_range("hfe", -1.0, "", "between 1 and 100000");
    let nested = e.clone().within("transistor");
    assert_eq!(nested.field(), "transistor.hfe");
    let text: String = nested.into();
    assert!(
        text.starts_with("transistor.hfe must be between 1 and 100000"),
        "{text}"
    );
}

// ---------------------------------------------------------------------------
// Topology rules
// ---------------------------------------------------------------------------

#[test]
fn topology_common_emitter_needs_rc() {
    let mut s = example();
    s.parts.rc = 0.0;
    let e = error_of(&s);
    assert_eq!(e.field(), "rc");
    let msg = e.to_string();
    assert!(msg.contains("common-emitter"), "{msg}");
    // A common-base stage needs it too; a follower does not.
    let mut cb = example();
    cb.kind = StageKind::CommonBase;
    cb.parts.re_bypassed = 0.0;
    cb.parts.c_emitter = None;
    cb.parts.rc = 0.0;
    assert_eq!(error_of(&cb).field(), "rc");
    let mut cc = example();
    cc.kind = StageKind::CommonCollector;
    cc.parts.re = 1e3;
    cc.parts.re_bypassed = 0.0;
    cc.parts.c_emitter = None;
    cc.parts.rc = 0.0;
    assert!(analyze(&cc).is_ok());
}

#[test]
fn topology_parts_that_do_not_belong() {
    // A follower's emitter carries the output: no bypassed part.
    let mut cc = example();
    cc.kind = StageKind::CommonCollector;
    let e = error_of(&cc);
    assert_eq!(e.field(), "re_bypassed");
    assert!(matches!(e.kind(), ErrorKind::NotApplicable { .. }));
    // A bypass capacitor with nothing to bypass.
    let mut ce = example();
    ce.parts.re_bypassed = 0.0;
    assert_eq!(error_of(&ce).field(), "c_emitter");
    // Only a common-base stage has c_base.
    let mut ce = example();
    ce.parts.c_base = Some(1e-6);
    assert_eq!(error_of(&ce).field(), "c_base");
    // A follower needs its emitter resistor.
    let mut cc = example();
    cc.kind = StageKind::CommonCollector;
    cc.parts.re = 0.0;
    cc.parts.re_bypassed = 0.0;
    cc.parts.c_emitter = None;
    assert_eq!(error_of(&cc).field(), "re");
}

// ---------------------------------------------------------------------------
// Polarity mirror
// ---------------------------------------------------------------------------

/// The stage of `kind` for `polarity`, the PNP one the mirror image of the
/// NPN one: same device data with the polarity flipped, r1 and r2 swapped
/// (r1 stays "supply to base"; the turn-on resistor of a PNP is r2).
fn mirror_pair(kind: StageKind) -> (Stage, Stage) {
    let mut npn = example();
    npn.kind = kind;
    match kind {
        StageKind::CommonEmitter => {}
        StageKind::CommonCollector => {
            npn.parts.rc = 470.0;
            npn.parts.re = 2.2e3;
            npn.parts.re_bypassed = 0.0;
            npn.parts.c_emitter = None;
            npn.parts.r1 = Some(22e3);
            npn.parts.r2 = Some(33e3);
        }
        StageKind::CommonBase => {
            npn.parts.re = 1.5e3;
            npn.parts.re_bypassed = 0.0;
            npn.parts.c_emitter = None;
            npn.parts.c_base = Some(10e-6);
        }
    }
    let mut pnp = npn.clone();
    pnp.transistor.polarity = Polarity::Pnp;
    std::mem::swap(&mut pnp.parts.r1, &mut pnp.parts.r2);
    (npn, pnp)
}

#[test]
fn mirror_pnp_has_equal_magnitudes_and_gains() {
    for kind in StageKind::ALL {
        let (npn, pnp) = mirror_pair(kind);
        let a = analyze(&npn).expect("npn");
        let b = analyze(&pnp).expect("pnp");
        let (oa, ob) = (&a.operating_point, &b.operating_point);
        let k = kind.name();
        assert_eq!(oa.region, Region::Active, "{k}");
        assert_eq!(ob.region, Region::Active, "{k}");
        // Reported signs: a PNP's VCE and VBE are negative, currents positive.
        assert!(oa.vce > 0.0 && ob.vce < 0.0, "{k}");
        assert!(oa.vbe > 0.0 && ob.vbe < 0.0, "{k}");
        assert!(ob.ic > 0.0 && ob.ib > 0.0, "{k}");
        let why = "the same equations solved in the mirrored frame: rounding";
        close(&format!("{k}: |VCE|"), ob.vce.abs(), oa.vce, SAME, why);
        close(&format!("{k}: IC"), ob.ic, oa.ic, SAME, why);
        // Node voltages mirror about the supply: V(pnp) = VCC − V(npn).
        // Compared absolutely against the supply (1e-12 of 12 V).
        for (what, x, y) in [
            ("VB", ob.vb, oa.vb),
            ("VE", ob.ve, oa.ve),
            ("VC", ob.vc, oa.vc),
        ] {
            assert!(
                (x - (12.0 - y)).abs() <= 1e-12 * 12.0,
                "{k}: {what} {x} vs 12 − {y}"
            );
        }
        let (ma, mb) = (&a.midband, &b.midband);
        for (what, x, y) in [
            ("voltage gain", ma.voltage_gain, mb.voltage_gain),
            (
                "voltage gain from source",
                ma.voltage_gain_from_source,
                mb.voltage_gain_from_source,
            ),
            ("current gain", ma.current_gain, mb.current_gain),
            ("input impedance", ma.input_impedance, mb.input_impedance),
            ("output impedance", ma.output_impedance, mb.output_impedance),
        ] {
            close(&format!("{k}: {what}"), y, x, SAME, why);
        }
        // The swing limits swap direction with the polarity.
        close(
            &format!("{k}: positive swing of PNP = negative of NPN"),
            b.swing.positive,
            a.swing.negative,
            SAME,
            why,
        );
        close(
            &format!("{k}: corners"),
            b.bandwidth.f_low.expect("finite capacitors"),
            a.bandwidth.f_low.expect("finite capacitors"),
            1e-9,
            "the corner search refines to 1e-9 relative on each side",
        );
    }
}

// ---------------------------------------------------------------------------
// Regions
// ---------------------------------------------------------------------------

#[test]
fn region_saturating_divider_reports_saturation() {
    // 4.7 k / 10 k from 12 V puts 8.2 V on the base: far more than 4.7 kΩ
    // of collector load can take, so both junctions are forward biased.
    let mut s = example();
    s.parts.r1 = Some(4.7e3);
    let a = analyze(&s).expect("a saturated stage still analyses");
    let op = &a.operating_point;
    assert_eq!(op.region, Region::Saturation);
    assert!(op.vbc_junction > 0.0, "base–collector forward biased");
    // VCE(sat) of a few hundred millivolts at most (common practice for a
    // small-signal device driven hard): the band 0 to 0.3 V.
    assert!(op.vce > 0.0 && op.vce < 0.3, "VCE {}", op.vce);
    assert!(a.cautions.iter().any(|c| c.id == "region-saturation"));
    assert_eq!(a.swing.symmetric, 0.0, "no swing outside the active region");
}

#[test]
fn region_base_without_turn_on_path_reports_cutoff() {
    // NPN with r2 only: the base is pulled to ground, nothing turns it on.
    let mut s = example();
    s.parts.r1 = None;
    let a = analyze(&s).expect("a cut-off stage still analyses");
    let op = &a.operating_point;
    assert_eq!(op.region, Region::Cutoff);
    // Cutoff: IC below 1e-7 of IC max (the core's definition).
    assert!(op.ic < 1e-7 * s.transistor.ic_max, "IC {}", op.ic);
    // The collector sits at the supply to within IC·RC (below 1e-4 V).
    assert!((op.vc - 12.0).abs() < 1e-4, "VC {}", op.vc);
    assert!(a.cautions.iter().any(|c| c.id == "region-cutoff"));
    assert_eq!(a.swing.symmetric, 0.0);
    // The PNP mirror: r1 only pulls its base to the supply, so it is off too.
    let (_, mut pnp) = mirror_pair(StageKind::CommonEmitter);
    pnp.parts.r2 = None;
    assert_eq!(
        analyze(&pnp).expect("pnp").operating_point.region,
        Region::Cutoff
    );
}

// ---------------------------------------------------------------------------
// Options and limits
// ---------------------------------------------------------------------------

#[test]
fn options_leave_out_bandwidth_and_stability() {
    let s = example();
    let quick = analyze_with(
        &s,
        &Options {
            bandwidth: false,
            stability: false,
        },
    )
    .expect("analyses");
    assert_eq!(quick.bandwidth.f_low, None);
    assert_eq!(quick.bandwidth.f_high, None);
    assert!(quick.stability.is_none());
    let full = analyze(&s).expect("analyses");
    assert!(full.stability.is_some());
    assert!(full.bandwidth.f_low.is_some() && full.bandwidth.f_high.is_some());
    // The options change nothing else.
    close(
        "midband gain with and without options",
        quick.midband.voltage_gain,
        full.midband.voltage_gain,
        0.0,
        "the same solve",
    );
    assert!(Options::default().bandwidth && Options::default().stability);
}

#[test]
fn limits_ideal_capacitors_give_no_lower_corner() {
    let mut s = example();
    s.parts.c_in = None;
    s.parts.c_out = None;
    s.parts.c_emitter = None;
    let a = analyze(&s).expect("analyses");
    assert_eq!(a.bandwidth.f_low, None, "no corner above {SEARCH_FROM} Hz");
    // Not a corner below the search range: the gain holds to DC.
    assert_eq!(a.bandwidth.low_edge, Edge::None);
    assert_eq!(a.bandwidth.high_edge, Edge::Corner);
    let met = Requirements {
        max_f_low: Some(1.0),
        ..Requirements::default()
    }
    .check(&s, &a);
    assert!(met[0].pass, "{}", met[0].message);
    let f_high = a
        .bandwidth
        .f_high
        .expect("the device capacitances give one");
    assert!(f_high > SEARCH_FROM && f_high < SEARCH_TO);
    // The search range the docs state: 1 mHz to 1 THz.
    close("SEARCH_FROM", SEARCH_FROM, 1e-3, 0.0, "a typed constant");
    close("SEARCH_TO", SEARCH_TO, 1e12, 0.0, "a typed constant");
}

#[test]
fn limits_a_coupling_capacitor_far_too_small_leaves_no_passband() {
    // 10 fF into the base: its corner (about 1/(2π·10 fF·Zin)) lands far
    // above the device's upper corner, so the response never comes within
    // 3 dB of the midband gain. Both corner requirements fail, a caution
    // says so, and the report's figures name the peak.
    let mut s = example();
    s.parts.c_in = Some(10e-15);
    let a = analyze(&s).expect("analyses");
    let b = &a.bandwidth;
    assert_eq!(
        (b.low_edge, b.high_edge),
        (Edge::NoPassband, Edge::NoPassband)
    );
    assert!(!b.has_passband());
    assert!(
        b.peak_ratio < std::f64::consts::FRAC_1_SQRT_2,
        "peak {}",
        b.peak_ratio
    );
    // The peak found is the largest response: no point of a dense sweep
    // (40 a decade over the search range) is above it; 1e-9 relative for
    // the golden-section search's last step.
    let mid = a.midband.voltage_gain_from_source.abs();
    for p in a
        .response()
        .sweep(SEARCH_FROM, SEARCH_TO, 601)
        .expect("sweep")
    {
        let r = p.voltage_gain_from_source.norm() / mid;
        assert!(
            r <= b.peak_ratio * (1.0 + 1e-9),
            "{r} at {} Hz",
            p.frequency
        );
    }
    let checks = Requirements {
        max_f_low: Some(1e12),
        min_f_high: Some(1e-3),
        ..Requirements::default()
    }
    .check(&s, &a);
    assert!(checks.iter().all(|c| !c.pass), "{checks:?}");
    assert!(checks.iter().all(|c| c.value.is_finite()));
    assert!(
        checks[0].message.contains("no passband"),
        "{}",
        checks[0].message
    );
    assert!(a.cautions.iter().any(|c| c.id == "no-passband"));
}

#[test]
fn limits_part_and_device_bounds_name_the_field() {
    // Values a user can type that are no part: each refused, naming it.
    type Mutation = fn(&mut Stage);
    let cases: [(Mutation, &str); 9] = [
        (|s| s.parts.rc = 1e-30, "rc"),
        (|s| s.parts.rs = 1e-12, "rs"),
        (|s| s.parts.r1 = Some(1e13), "r1"),
        (|s| s.parts.c_in = Some(1e-18), "c_in"),
        (|s| s.transistor.rbb = 1e-300, "transistor.rbb"),
        (|s| s.transistor.cob = 1e-300, "transistor.cob"),
        (|s| s.transistor.ic_max = 1e300, "transistor.ic_max"),
        (|s| s.transistor.rth_ja = 1e-9, "transistor.rth_ja"),
        (|s| s.supply = 1e-6, "supply"),
    ];
    for (mutate, field) in cases {
        let mut s = example();
        mutate(&mut s);
        let e = error_of(&s);
        assert_eq!(e.field(), field, "{e}");
        assert!(e.to_string().contains(" and "), "names the range: {e}");
    }
    // 0 Ω is a short where the stage allows one, and the smallest part is fine.
    let mut s = example();
    s.parts.rs = 0.0;
    assert!(analyze(&s).is_ok());
    s.parts.rs = MIN_RESISTANCE;
    let a = analyze(&s).expect("1 mΩ of source resistance");
    assert!(a.midband.input_impedance.is_finite());
}

#[test]
fn limits_documents_and_monte_carlo() {
    let design = |extra: &str| {
        [
            r#"{"format": "stagewright/1", "stage": "common-collector", "supply": 12,
            "transistor": {"preset": "general-purpose-npn"},
            "parts": {"r1": "47k", "r2": "47k", "re": "2k2"}"#,
            extra,
            "}",
        ]
        .concat()
    };
    assert!(Design::from_json(&design("")).is_ok());
    let long = |n: usize| "x".repeat(n);
    assert!(Design::from_json(&design(&format!(r#", "title": "{}""#, long(MAX_TITLE)))).is_ok());
    let e = Design::from_json(&design(&format!(r#", "title": "{}""#, long(MAX_TITLE + 1))))
        .unwrap_err();
    assert_eq!(e.field(), "title");
    let e = Design::from_json(&design(&format!(r#", "notes": "{}""#, long(MAX_NOTES + 1))))
        .unwrap_err();
    assert_eq!(e.field(), "notes");
    // Nesting: MAX_DEPTH levels are read (and refused as a value), one more is refused as too deep.
    let nest = |n: usize| "[".repeat(n) + &"]".repeat(n);
    let e =
        Design::from_json(&design(&format!(r#", "notes": {}"#, nest(MAX_DEPTH - 1)))).unwrap_err();
    assert!(matches!(e.kind(), ErrorKind::Parse { .. }), "{e}");
    let e = Design::from_json(&design(&format!(r#", "notes": {}"#, nest(MAX_DEPTH)))).unwrap_err();
    assert!(matches!(e.kind(), ErrorKind::Document { .. }), "{e}");
    // Echoed text is cut to MAX_ECHO characters and an ellipsis.
    let e = Design::from_json(&design(&format!(r#", "{}": 1"#, long(100_000)))).unwrap_err();
    assert_eq!(e.field().chars().count(), MAX_ECHO + 1, "{}", e.field());
    // A file's bytes must be UTF-8: the first bad byte is named.
    assert_eq!(utf8_text("25 °C".as_bytes()), Ok("25 °C"));
    let e = utf8_text(b"{\"title\": \"25 \xb0C\"}").unwrap_err();
    assert_eq!(e.field(), "file");
    assert!(e.to_string().contains("byte 0xB0 at offset 14"), "{e}");
    // Monte Carlo: at most MAX_TRIALS, refused above with the field named.
    let s = example();
    let t = Tolerances::default();
    let r = Requirements::default();
    let e = MonteCarlo::new(&s, &t, &r, MAX_TRIALS + 1, 1).unwrap_err();
    assert_eq!(e.field(), "trials");
    // The limit itself is accepted (about 84 MB of results, allocated once).
    let mc = MonteCarlo::new(&s, &t, &r, MAX_TRIALS, 1).expect("MAX_TRIALS is allowed");
    assert_eq!(mc.trials(), MAX_TRIALS);
    assert_eq!(
        MAX_TRIALS,
        100 * DEFAULT_TRIALS,
        "the README's limit: a million"
    );
}

#[test]
fn limits_no_early_effect_means_an_open_ro() {
    let mut s = example();
    s.transistor.early_voltage = None;
    let a = analyze(&s).expect("analyses");
    assert_eq!(a.small_signal.r_o, OPEN_RESISTANCE);
    assert_eq!(a.small_signal.g_o(), 0.0);
    // With ro open the common-emitter output impedance is RC (Midband
    // docs); the nodal value agrees to rounding.
    close(
        "Zout = RC",
        a.midband.output_impedance,
        4.7e3,
        1e-9,
        "rounding of the nodal solve",
    );
}

#[test]
fn limits_sweeps_and_their_errors() {
    let a = analyze(&example()).expect("analyses");
    let sweep = a.response().sweep(10.0, 1e9, 200).expect("valid range");
    assert_eq!(sweep.len(), 200);
    close(
        "first frequency",
        sweep[0].frequency,
        10.0,
        SAME,
        "rounding of 10^1",
    );
    assert_eq!(sweep[199].frequency, 1e9);
    // The point at the midband frequency equals Response::at there.
    let at = a.response().at(sweep[100].frequency).expect("solves");
    close(
        "sweep point vs at()",
        sweep[100].voltage_gain.norm(),
        at.voltage_gain.norm(),
        0.0,
        "the same solve",
    );
    let e = a
        .response()
        .sweep(1e3, 10.0, 50)
        .expect_err("to below from");
    assert_eq!(e.field(), "to");
    let e = a.response().sweep(10.0, 1e3, 1).expect_err("one point");
    assert_eq!(e.field(), "points");
}

// ---------------------------------------------------------------------------
// Networks
// ---------------------------------------------------------------------------

#[test]
fn network_midband_solve_is_the_reported_midband() {
    let s = example();
    let a = analyze(&s).expect("analyses");
    let net = AcNetwork::new(&s, &a.small_signal, Band::Midband).expect("assembles");
    // Midband merges the shorted capacitors: fewer unknowns than the full band.
    let full = AcNetwork::new(&s, &a.small_signal, Band::Full).expect("assembles");
    assert!(net.unknowns() < full.unknowns());
    let m = Midband::from_point(&net.solve(0.0).expect("solves"));
    for (what, x, y) in [
        ("voltage gain", m.voltage_gain, a.midband.voltage_gain),
        (
            "input impedance",
            m.input_impedance,
            a.midband.input_impedance,
        ),
        (
            "output impedance",
            m.output_impedance,
            a.midband.output_impedance,
        ),
    ] {
        close(what, x, y, 0.0, "the same network, the same solve");
    }
    // And the response's own midband point.
    close(
        "Response::midband",
        a.response().midband().voltage_gain.re,
        a.midband.voltage_gain,
        0.0,
        "the same solve",
    );
}

// ---------------------------------------------------------------------------
// Presets, names and requirements
// ---------------------------------------------------------------------------

#[test]
fn presets_all_resolve_and_validate() {
    for p in PRESETS {
        let t = preset(p.name).unwrap_or_else(|e| panic!("{}: {e}", p.name));
        t.validate().unwrap_or_else(|e| panic!("{}: {e}", p.name));
        assert!(!p.label.is_empty());
    }
    let e = preset("no-such-device").expect_err("unknown");
    assert_eq!(e.field(), "transistor.preset");
    assert!(e.to_string().contains("general-purpose-npn"), "{e}");
}

/// The example stage as a design with the general-purpose preset, and
/// its analysis.
fn example_design() -> (Design, stagewright::Analysis) {
    let d = Design {
        title: String::new(),
        notes: String::new(),
        preset: Some("general-purpose-npn".into()),
        stage: example(),
        requirements: Requirements::default(),
        tolerances: None,
    };
    let a = d.analyze().expect("analyses");
    (d, a)
}

#[test]
fn names_every_figure_is_a_number_of_the_report() {
    // The one table of figures names keys of the report's JSON: each is a
    // number there (for the example stage), and no two figures share a key.
    let (d, a) = example_design();
    let v: serde_json::Value =
        serde_json::from_str(&Report::new(&d, &a).to_json_string()).expect("JSON");
    for f in FIGURES {
        let (section, key) = f.key.split_once('.').expect("a dotted path");
        assert!(
            v[section][key].is_number(),
            "{} is a number of the report",
            f.key
        );
        assert!(!f.label.is_empty() && !f.row_label().is_empty());
    }
    assert!(FIGURES.len() >= 30);
}

#[test]
fn ratings_table_names_every_rating_check() {
    // The one table of ratings names the report's rating checks: the same
    // ids in the same order, each check in the table's unit, the resistor
    // checks after them.
    let (_, a) = example_design();
    let ids: Vec<&str> = a.ratings.iter().map(|c| c.id.as_str()).collect();
    let table: Vec<&str> = RATINGS.iter().map(|r| r.id).collect();
    assert_eq!(&ids[..RATINGS.len()], &table[..]);
    for (c, r) in a.ratings.iter().zip(RATINGS) {
        assert_eq!(c.unit, r.unit, "{}", r.id);
        assert!(c.message.starts_with(r.what), "{}: {}", r.id, c.message);
        assert!(r.label.ends_with("rating"), "{}", r.label);
    }
    assert!(ids[RATINGS.len()..]
        .iter()
        .all(|id| id.starts_with("resistor_power.")));
}

#[test]
fn requirements_table_is_the_file_format() {
    // The one table of requirements and then the conditions: the same
    // keys, in the same order, as the design file's requirements block;
    // each bound is named by its prefix; a file setting every key reads
    // back the table's limits (a share, written in percent, as its
    // fraction).
    let keys: Vec<&str> = REQUIREMENTS
        .iter()
        .map(|r| r.key)
        .chain(CONDITIONS.iter().map(|c| c.key))
        .collect();
    let block: Vec<&str> = RequirementsDocument::KEYS
        .iter()
        .map(|k| k.trim_start_matches("requirements."))
        .collect();
    assert_eq!(keys, block);
    let mut text = String::from(
        r#"{"format": "stagewright/1", "stage": "common-collector", "supply": 12,
        "transistor": {"preset": "general-purpose-npn"},
        "parts": {"r1": "47k", "r2": "47k", "re": "2k2"}, "requirements": {"#,
    );
    for (i, r) in REQUIREMENTS.iter().enumerate() {
        let prefix = if r.bound == Bound::AtLeast {
            "min_"
        } else {
            "max_"
        };
        assert!(r.key.starts_with(prefix), "{}", r.key);
        assert!(!r.label().is_empty());
        if i > 0 {
            text.push(',');
        }
        // Limits that pass each rule: 1, 2, 3, … in the requirement's unit.
        if r.unit == "%" {
            text.push_str(&format!(r#""{}": "{} %""#, r.key, i + 1));
        } else {
            text.push_str(&format!(r#""{}": {}"#, r.key, i + 1));
        }
    }
    text.push_str("}}");
    let share = |r: &Requirement, x: f64| if r.unit == "%" { x / 100.0 } else { x };
    // min_voltage_gain_db 1 dB, max 2 dB: consistent; every other positive.
    let d = Design::from_json(&text).expect("a file with every requirement reads");
    let limits: Vec<(&str, f64)> = d.requirements.limits().map(|(r, l)| (r.key, l)).collect();
    assert_eq!(limits.len(), REQUIREMENTS.len());
    for (i, (key, l)) in limits.iter().enumerate() {
        assert_eq!(*key, REQUIREMENTS[i].key);
        assert_eq!(*l, share(&REQUIREMENTS[i], (i + 1) as f64));
        assert_eq!(d.requirements.get(key), Some(*l));
    }
    assert_eq!(d.requirements.get("no_such_key"), None);
}

#[test]
fn names_parse_back() {
    for kind in StageKind::ALL {
        assert_eq!(StageKind::parse(kind.name()).expect("parses"), kind);
    }
    assert_eq!(
        StageKind::parse("common-drain").expect_err("no").field(),
        "stage"
    );
    assert_eq!(Polarity::parse("PNP").expect("any case"), Polarity::Pnp);
    assert_eq!(Polarity::parse("nmos").expect_err("no").field(), "polarity");
    for r in [Region::Active, Region::Saturation, Region::Cutoff] {
        assert!(!r.name().is_empty());
    }
}

#[test]
fn requirements_pass_and_fail() {
    let a = analyze(&example()).expect("analyses");
    assert!(Requirements::default().is_empty());
    assert!(Requirements::default().check(&example(), &a).is_empty());
    // The example's gain is about 12 (21.6 dB): 20 dB passes, 30 dB fails.
    let r = Requirements {
        min_voltage_gain_db: Some(20.0),
        max_voltage_gain_db: Some(30.0),
        max_f_low: Some(1.0),
        ..Requirements::default()
    };
    let checks = r.check(&example(), &a);
    assert_eq!(checks.len(), 3);
    let by_id = |id: &str| checks.iter().find(|c| c.id == id).expect(id);
    assert!(by_id("min_voltage_gain_db").pass);
    assert!(by_id("max_voltage_gain_db").pass);
    // The lower corner is tens of hertz, above 1 Hz.
    assert!(!by_id("max_f_low").pass);
    close(
        "checked gain in dB",
        by_id("min_voltage_gain_db").value,
        20.0 * a.midband.voltage_gain.abs().log10(),
        1e-12,
        "20·log10 twice (libm and std): one rounding each",
    );
}

// ---------------------------------------------------------------------------
// Load lines
// ---------------------------------------------------------------------------

/// The characteristic drawn for the quiescent base current passes through
/// the quiescent point, and the DC load line passes through it too.
#[test]
fn load_line_quiescent_curve_passes_through_q() {
    let s = example();
    let a = analyze(&s).unwrap();
    let ll = stagewright::load_lines(&s, &a, 6, 400);
    let op = &a.operating_point;
    // With 6 curves the base currents are IBQ·k/3, k = 1..6: the third is IBQ.
    let q_curve = &ll.characteristics[2];
    close(
        "quiescent curve IB",
        q_curve.ib,
        op.ib,
        1e-12,
        "IBQ·3/3, rounding only",
    );
    // The model re-solved at (IBQ, VCEQ) must give ICQ: the same equations
    // by another route (a 1-D Newton on IB instead of the stage solve), so
    // agreement to the Newton tolerance (1e-9 relative).
    let ic = op.device.ic_at_ib(op.ib, op.vce.abs()).unwrap();
    close(
        "IC on the quiescent curve at VCEQ",
        ic,
        op.ic,
        1e-9,
        "two solves of one model",
    );
    // formula: VCE = VCC − IC·Rdc at Q (α-corrected RE): the DC line passes
    // through Q to rounding.
    let (v0, i0) = ll.dc_line[0];
    let (v1, _) = ll.dc_line[1];
    let on_line = i0 * (1.0 - op.vce.abs() / v1);
    close(
        "DC load line at VCEQ",
        on_line,
        op.ic,
        1e-9,
        "straight line through Q",
    );
    assert_eq!(v0, 0.0, "the DC line starts at VCE = 0");
    assert!(ll
        .characteristics
        .iter()
        .all(|c| c.vce.len() == c.ic.len() && !c.vce.is_empty()));
}
