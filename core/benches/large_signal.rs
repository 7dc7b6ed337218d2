//! Benchmarks of the large-signal analysis (issue 10's speed table), on
//! the crate docs' example common-emitter stage (every capacitor finite,
//! 256 samples per period, 1 kHz):
//!
//! - `steady_state_one_amplitude`: one periodic steady state (shooting
//!   from the DC state) at 0.15 V EMF, where THD is about 1 %;
//! - `steady_state_clipping`: the same at 0.6 V, clipping both halves;
//! - `thd_curve_16`: the THD curve, 16 amplitudes from 1 % to 150 % of
//!   the load-line limit;
//! - `limited_swing`: the curve and the search for the 1 % THD swing;
//! - `thd_at_output`: THD at a required output peak (2 V), the EMF found
//!   for it: what one check of a THD requirement costs, at each vertex of
//!   a worst case or each Monte Carlo sample;
//! - `worst_case_with_thd`: the worst case of the stage over the default
//!   tolerance box with `max_thd` at 2 V (the vertex search of the
//!   tolerance module's docs);
//! - `monte_carlo_thd_100`: 100 Monte Carlo trials with `max_thd` at 2 V
//!   (each trial's THD seeded from the nominal steady state).
//!
//! Run: `cargo bench -p stagewright --bench large_signal -- --warm-up-time 1 --measurement-time 5`

use std::hint::black_box;

use criterion::{criterion_group, criterion_main, Criterion};
use stagewright::{
    worst_case_with, LargeSignal, MonteCarlo, Requirements, Stage, Tolerances, SAMPLES,
};

fn benches(c: &mut Criterion) {
    let stage = Stage::example();
    let ls = LargeSignal::new(&stage).expect("prepares");
    let mut g = c.benchmark_group("large_signal");
    g.sample_size(20);
    g.bench_function("steady_state_one_amplitude", |b| {
        b.iter(|| {
            let w = ls.waveform(black_box(0.15), 1e3, SAMPLES).expect("solves");
            black_box(w.thd)
        })
    });
    g.bench_function("steady_state_clipping", |b| {
        b.iter(|| {
            let w = ls.waveform(black_box(0.6), 1e3, SAMPLES).expect("solves");
            black_box(w.thd)
        })
    });
    g.bench_function("thd_curve_16", |b| {
        b.iter(|| black_box(ls.curve(black_box(1e3)).expect("solves").len()))
    });
    g.bench_function("limited_swing", |b| {
        b.iter(|| {
            let l = ls.limited_swing(black_box(0.01), 1e3).expect("solves");
            black_box(l.output_peak)
        })
    });
    g.bench_function("thd_at_output", |b| {
        b.iter(|| {
            let w = ls.at_output(black_box(2.0), 1e3).expect("reaches it");
            black_box(w.thd)
        })
    });
    let requirements = Requirements {
        max_thd: Some(0.05),
        thd_swing: Some(2.0),
        ..Requirements::default()
    };
    let tol = Tolerances::default();
    g.bench_function("worst_case_with_thd", |b| {
        b.iter(|| {
            let w = worst_case_with(black_box(&stage), &tol, &requirements).expect("solves");
            black_box(w.thd.map(|t| t.solved))
        })
    });
    let mc = MonteCarlo::new(&stage, &tol, &requirements, 100, 1).expect("prepares");
    g.bench_function("monte_carlo_thd_100", |b| {
        b.iter(|| {
            let mut run = mc.clone();
            run.run();
            black_box(run.summary().yield_fraction)
        })
    });
    g.finish();
}

criterion_group!(large_signal, benches);
criterion_main!(large_signal);
