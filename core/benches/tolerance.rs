//! Benchmarks of the tolerance analysis and of synthesis.
//!
//! The stage is the crate docs' example (12 V, 47 k / 10 k divider, 4.7 k
//! collector, 220 Ω + 820 Ω emitter, every capacitor finite, so each trial
//! has both corners to find), with the default tolerances: five resistors,
//! three capacitors, hFE, VBE, ambient and supply all vary.
//!
//! - `monte_carlo_10k`: 10 000 trials, each a DC solve, the midband network
//!   and both corners (quality bar: 30 ms, median, natively);
//! - `monte_carlo_chunks_10x1k`: the same trials run as ten chunks of 1000,
//!   as the page runs them;
//! - `monte_carlo_summary`: percentiles, histograms and yield of 10 000 trials;
//! - `worst_case`: the 512 vertices, each with both capacitor settings;
//! - `sensitivity`: the central differences of every parameter;
//! - `synthesize_*`: a design from a specification (quality bar: 5 ms).
//!
//! Run: `cargo bench -p stagewright --bench tolerance -- --warm-up-time 1 --measurement-time 3`

use std::hint::black_box;
use std::time::Duration;

use criterion::{criterion_group, criterion_main, Criterion};
use stagewright::{
    preset, sensitivity, synthesize, worst_case, MonteCarlo, Requirements, Spec, Stage, StageKind,
    Tolerances,
};

fn requirements() -> Requirements {
    Requirements {
        min_voltage_gain_db: Some(20.0),
        min_swing: Some(2.0),
        max_f_low: Some(50.0),
        ..Requirements::default()
    }
}

fn monte_carlo(c: &mut Criterion) {
    let stage = Stage::example();
    let tol = Tolerances::default();
    let req = requirements();
    let mut mc = MonteCarlo::new(&stage, &tol, &req, 10_000, 1).expect("the stage analyses");
    let mut group = c.benchmark_group("tolerance");
    group.sample_size(20);
    group.bench_function("monte_carlo_10k", |b| {
        b.iter(|| {
            black_box(mc.run_chunk(0, 10_000));
        })
    });
    group.bench_function("monte_carlo_chunks_10x1k", |b| {
        b.iter(|| {
            for k in 0..10 {
                black_box(mc.run_chunk(k * 1000, 1000));
            }
        })
    });
    group.bench_function("monte_carlo_summary", |b| {
        b.iter(|| black_box(mc.summary()))
    });
    group.bench_function("worst_case", |b| {
        b.iter(|| black_box(worst_case(black_box(&stage), &tol).expect("solves")))
    });
    group.bench_function("sensitivity", |b| {
        b.iter(|| black_box(sensitivity(black_box(&stage)).expect("solves")))
    });
    group.finish();
}

fn synthesis(c: &mut Criterion) {
    let transistor = preset("general-purpose-npn").expect("the preset exists");
    let mut ce = Spec::new(
        StageKind::CommonEmitter,
        transistor.clone(),
        12.0,
        600.0,
        10e3,
    );
    ce.requirements = Requirements {
        min_voltage_gain_db: Some(20.0),
        max_voltage_gain_db: Some(26.0),
        min_swing: Some(2.0),
        max_f_low: Some(50.0),
        min_input_impedance: Some(10e3),
        ..Requirements::default()
    };
    let mut cc = Spec::new(StageKind::CommonCollector, transistor, 12.0, 600.0, 1e3);
    cc.requirements = Requirements {
        min_swing: Some(3.0),
        max_output_impedance: Some(50.0),
        max_f_low: Some(20.0),
        ..Requirements::default()
    };
    let mut group = c.benchmark_group("synthesis");
    group.measurement_time(Duration::from_secs(3));
    group.bench_function("synthesize_common_emitter", |b| {
        b.iter(|| black_box(synthesize(black_box(&ce)).expect("designs")))
    });
    group.bench_function("synthesize_follower", |b| {
        b.iter(|| black_box(synthesize(black_box(&cc)).expect("designs")))
    });
    group.finish();
}

criterion_group!(benches, monte_carlo, synthesis);
criterion_main!(benches);
