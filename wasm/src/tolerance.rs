//! The tolerance view: worst case, sensitivity and a Monte Carlo run that
//! the page drives in chunks so that it stays responsive.
//!
//! Glue only: the core computes everything (`worst_case`, `worst_checks`,
//! `sensitivity`, `MonteCarlo`); this module keeps the run between calls
//! and hands the answers to JavaScript. The tolerances are the design
//! file's `tolerances` block or the core's defaults, as for `stagewright
//! check --worst-case --monte-carlo N --seed S` without tolerance options.

use stagewright::{worst_case_with, worst_checks, MonteCarlo, ToleranceDocument};
use wasm_bindgen::prelude::*;

use crate::analysis::{read_design, to_js};
use crate::js::{core_error, field_error, text};

/// The tolerance analysis of one design: the worst case and the
/// requirements judged at their worst vertex at once, the Monte Carlo
/// trials chunk by chunk.
///
/// JS: `const t = new Tolerance(designJson, trials, seed)` (the seed as
/// decimal text, an unsigned 64-bit integer); throws `{field, message}`.
/// Then `t.report()`, `t.run_chunk(start, count)` and `t.summary()`.
#[wasm_bindgen]
pub struct Tolerance {
    run: MonteCarlo,
    report: JsValue,
}

#[wasm_bindgen]
impl Tolerance {
    /// Reads the design, solves the vertices of its tolerance box and
    /// prepares `trials` Monte Carlo trials from `seed`.
    #[wasm_bindgen(constructor)]
    pub fn new(design_json: JsValue, trials: f64, seed: JsValue) -> Result<Tolerance, JsValue> {
        let design = read_design(&design_json)?;
        let seed: u64 = text(&seed, "seed")?.trim().parse().map_err(|_| {
            field_error(
                "seed",
                "the seed must be a whole number from 0 to 18446744073709551615",
            )
        })?;
        let t = design.tolerances.unwrap_or_default();
        t.validate(&design.stage)
            .map_err(|e| core_error(&e.within("tolerances")))?;
        let trials = if trials.is_finite() && trials >= 0.0 {
            trials as usize
        } else {
            0
        };
        let run = MonteCarlo::new(&design.stage, &t, &design.requirements, trials, seed)
            .map_err(|e| core_error(&e))?;
        let worst =
            worst_case_with(&design.stage, &t, &design.requirements).map_err(|e| core_error(&e))?;
        let checks = worst_checks(&design.requirements, &worst);
        // The document `check --json` writes (its Monte Carlo part comes
        // from `summary`, with the histograms the page draws).
        let document = ToleranceDocument {
            tolerances: t,
            hfe: (
                design.stage.transistor.hfe_min,
                design.stage.transistor.hfe_max,
            ),
            worst_case: Some((worst, checks)),
            sensitivity: run.sensitivity().to_vec(),
            monte_carlo: None,
        };
        let report = to_js(&document)?;
        Ok(Tolerance { run, report })
    }

    /// The tolerance document (`stagewright-tolerance/1`, the shape of
    /// `check --json`): `{format, tolerances, corners: {result: {nominal,
    /// min, max, unit, corner: {min, max}}}, worst_case: {pass, vertices,
    /// inactive_vertices, checks: [{id, pass, value, limit, unit, message,
    /// corner}]}, sensitivity: [{quantity, parameter, percent_per_percent}],
    /// monte_carlo: null}`, each vertex as `{"r1": "max", …}`.
    pub fn report(&self) -> JsValue {
        self.report.clone()
    }

    /// Runs trials `start … start + count − 1` and returns how many ran;
    /// the numbers do not depend on the chunks.
    pub fn run_chunk(&mut self, start: usize, count: usize) -> usize {
        self.run.run_chunk(start, count)
    }

    /// The Monte Carlo summary over the trials run so far, as the core
    /// serializes it: `{trials, completed, seed, yield, no_solution,
    /// not_active, requirements: [{requirement, yield}], distributions:
    /// [{quantity, p1, p50, p99, min, max, mean, histogram: {from, to,
    /// counts}}]}`.
    pub fn summary(&self) -> Result<JsValue, JsValue> {
        to_js(&self.run.summary())
    }
}
