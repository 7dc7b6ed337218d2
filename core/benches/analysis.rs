//! Benchmarks of the analysis engine.
//!
//! Three measurements of one common-emitter stage (the crate docs' example
//! stage: 12 V, 47 k / 10 k divider, 4.7 k collector, 220 Ω + 820 Ω emitter,
//! every capacitor finite, so the sweep has real corners to resolve):
//!
//! - `analyze_and_sweep`: what a page does on every edit, `analyze` (DC solve,
//!   small signal, midband, corner search, stability re-solves, ratings) and
//!   then a 200-point sweep from 10 Hz to 1 GHz for the plot;
//! - `analyze`: the analysis alone;
//! - `sweep_200`: the 200-point sweep alone, on an analysis made once;
//! - `dc_stage_solve` and `dc_circuit_engine`: the operating point alone,
//!   by the stage-specific solve and by the general circuit engine (the
//!   stage's DC netlist built and solved), to keep the engine's cost in
//!   view as the analyses move onto it.
//!
//! Run: `cargo bench -p stagewright --bench analysis -- --warm-up-time 1 --measurement-time 3`

use std::hint::black_box;

use criterion::{criterion_group, criterion_main, Criterion};
use stagewright::{analyze, dc_netlist, solve_dc, OperatingPoint, Stage};

fn benches(c: &mut Criterion) {
    let stage = Stage::example();
    c.bench_function("analyze_and_sweep", |b| {
        b.iter(|| {
            let a = analyze(black_box(&stage)).expect("the example stage analyses");
            let sweep = a
                .response()
                .sweep(10.0, 1e9, 200)
                .expect("a valid sweep range");
            black_box((a.midband.voltage_gain, sweep.len()))
        })
    });
    c.bench_function("analyze", |b| {
        b.iter(|| {
            let a = analyze(black_box(&stage)).expect("the example stage analyses");
            black_box(a.midband.voltage_gain)
        })
    });
    let analysis = analyze(&stage).expect("the example stage analyses");
    c.bench_function("sweep_200", |b| {
        b.iter(|| {
            let sweep = analysis
                .response()
                .sweep(black_box(10.0), black_box(1e9), 200)
                .expect("a valid sweep range");
            black_box(sweep.len())
        })
    });
    let device = stage
        .transistor
        .device(stage.ambient, stage.transistor.hfe, 0.0);
    c.bench_function("dc_stage_solve", |b| {
        b.iter(|| {
            let op = OperatingPoint::solve(black_box(&stage), &device).expect("solves");
            black_box(op.ic)
        })
    });
    c.bench_function("dc_circuit_engine", |b| {
        b.iter(|| {
            let (net, nodes) = dc_netlist(black_box(&stage), &device);
            let dc = solve_dc(&net).expect("solves");
            black_box(dc.voltages[nodes.collector.0])
        })
    });
}

criterion_group!(analysis, benches);
criterion_main!(analysis);
