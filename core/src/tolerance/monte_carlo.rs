//! The seeded Monte Carlo run, trial by trial or in chunks, its yields and
//! its summary.

use super::*;

/// Which requirements `s` fails, as bits in the order of [`REQUIREMENTS`],
/// with the meaning of [`Requirements::check`]: the corners by
/// [`corner_met`], with `edges` the way the nominal stage's corner searches
/// ended (a corner that the nominal stage has and `s` lacks fails).
pub(crate) fn failed_requirements(r: &Requirements, s: &Sample, edges: [Edge; 2]) -> u32 {
    let mut bits = 0;
    for (k, req) in REQUIREMENTS.iter().enumerate() {
        let Some(limit) = r.get(req.key) else {
            continue;
        };
        let value = s.get(req.quantity);
        let pass = match req.side() {
            Some(side) => {
                let edge = if side == Side::Lower {
                    edges[0]
                } else {
                    edges[1]
                };
                corner_met(side, edge, Some(value).filter(|f| f.is_finite()), limit)
            }
            None => req.met(req.reading(value), limit),
        };
        if !pass {
            bits |= 1 << k;
        }
    }
    bits
}

/// Bit of a trial's state: the trial has run.
pub(super) const DONE: u32 = 1 << 31;
/// Bit of a trial's state: its operating point was not found.
pub(super) const NO_SOLUTION: u32 = 1 << 30;
/// Bit of a trial's state: it solved, but not in the active region.
pub(super) const NOT_ACTIVE: u32 = 1 << 29;
/// Bit of a trial's state: its THD was solved, not predicted.
pub(super) const THD_SOLVED: u32 = 1 << 28;
/// Bits of a trial's state that hold the failed requirements.
pub(super) const FAILED_MASK: u32 = (1 << REQUIREMENTS.len()) - 1;

/// A Monte Carlo run, filled trial by trial (in one call or in chunks).
#[derive(Debug, Clone)]
pub struct MonteCarlo {
    pub(super) model: Model,
    pub(super) requirements: Requirements,
    pub(super) seed: u64,
    pub(super) trials: usize,
    /// The prediction of the trial corners.
    pub(super) prediction: Prediction,
    pub(super) sensitivity: Vec<Sensitivity>,
    pub(super) values: Vec<[f64; QUANTITIES]>,
    pub(super) state: Vec<u32>,
    pub(super) completed: usize,
}

/// The yield of one requirement.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct RequirementYield {
    /// The requirement, as the design file names it (`min_swing`).
    pub requirement: &'static str,
    /// Share of the completed trials that meet it, 0 to 1.
    #[cfg_attr(feature = "serde", serde(rename = "yield"))]
    pub yield_fraction: f64,
}

/// Counts of values in equal bins from `from` to `to`.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Histogram {
    /// Lower edge of the first bin.
    pub from: f64,
    /// Upper edge of the last bin.
    pub to: f64,
    /// Count in each bin; a value equal to `to` counts in the last bin.
    pub counts: Vec<u32>,
}

/// The distribution of one result over the trials.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Distribution {
    /// The result.
    pub quantity: Quantity,
    /// 1st percentile.
    pub p1: f64,
    /// Median.
    pub p50: f64,
    /// 99th percentile.
    pub p99: f64,
    /// Smallest value.
    pub min: f64,
    /// Largest value.
    pub max: f64,
    /// Mean.
    pub mean: f64,
    /// The histogram over [min, max] in 20 equal bins.
    pub histogram: Histogram,
}

/// What a Monte Carlo run found (over the trials completed so far).
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct MonteCarloSummary {
    /// Trials asked for.
    pub trials: usize,
    /// Trials run so far.
    pub completed: usize,
    /// The seed.
    pub seed: u64,
    /// Share of the completed trials that meet every requirement, 0 to 1.
    #[cfg_attr(feature = "serde", serde(rename = "yield"))]
    pub yield_fraction: f64,
    /// Trials whose operating point was not found (they fail every requirement).
    pub no_solution: usize,
    /// Trials that solved but whose transistor is saturated or cut off.
    pub not_active: usize,
    /// With `max_thd`: the trials whose THD was solved (the others' was
    /// predicted, module docs); `None` without it.
    #[cfg_attr(feature = "serde", serde(skip_serializing_if = "Option::is_none"))]
    pub thd_solved: Option<usize>,
    /// The yield of each requirement that is set.
    pub requirements: Vec<RequirementYield>,
    /// One entry per result that the stage has, in the order of [`Quantity::ALL`].
    pub distributions: Vec<Distribution>,
}

impl MonteCarloSummary {
    /// The distribution of `q`, if the stage has that result.
    pub fn get(&self, q: Quantity) -> Option<&Distribution> {
        self.distributions.iter().find(|d| d.quantity == q)
    }
}

impl MonteCarlo {
    /// Prepares `trials` trials of `stage` over `tolerances`, judged against
    /// `requirements`, with the generator seeded by `seed`. This solves the
    /// nominal stage, its corners and its sensitivities (a few hundred
    /// microseconds); the trials run in [`MonteCarlo::run`] or
    /// [`MonteCarlo::run_chunk`].
    pub fn new(
        stage: &Stage,
        tolerances: &Tolerances,
        requirements: &Requirements,
        trials: usize,
        seed: u64,
    ) -> Result<MonteCarlo> {
        within("trials", trials as f64, 1.0, MAX_TRIALS as f64, "")?;
        let mut model = Model::new(stage, Some(tolerances), requirements.thd_condition())?;
        if let Some(l) = requirements.max_thd {
            model.thd_limit = l;
        }
        let (sensitivity, prediction) = model.sensitivity()?;
        Ok(MonteCarlo {
            model,
            requirements: *requirements,
            seed,
            trials,
            prediction,
            sensitivity,
            values: vec![[f64::NAN; QUANTITIES]; trials],
            state: vec![0; trials],
            completed: 0,
        })
    }

    /// Trials asked for.
    pub fn trials(&self) -> usize {
        self.trials
    }

    /// The seed.
    pub fn seed(&self) -> u64 {
        self.seed
    }

    /// Trials run so far.
    pub fn completed(&self) -> usize {
        self.completed
    }

    /// True when every trial has run.
    pub fn is_complete(&self) -> bool {
        self.completed == self.trials
    }

    /// The sensitivity table of the nominal stage (computed by [`MonteCarlo::new`]).
    pub fn sensitivity(&self) -> &[Sensitivity] {
        &self.sensitivity
    }

    /// Runs every trial that has not run.
    pub fn run(&mut self) {
        self.run_chunk(0, self.trials);
    }

    /// Runs trials `start … start + count − 1` (clipped to the trials asked
    /// for; trials already run are run again and give the same numbers) and
    /// returns how many ran. Trial `i` depends only on the seed and `i`, so
    /// the results do not depend on how the run is cut into chunks.
    pub fn run_chunk(&mut self, start: usize, count: usize) -> usize {
        let end = start.saturating_add(count).min(self.trials);
        if start >= end {
            return 0;
        }
        let mut stream = Stream::at(self.seed, start as u128 * u128::from(DRAWS_PER_TRIAL));
        for i in start..end {
            let mut u = [0.0; DRAWS_PER_TRIAL as usize];
            for v in u.iter_mut() {
                *v = stream.uniform();
            }
            let (values, state) = self.trial(&u);
            if self.state[i] & DONE == 0 {
                self.completed += 1;
            }
            self.values[i] = values;
            self.state[i] = state | DONE;
        }
        end - start
    }

    /// One trial from its uniform draws.
    pub(super) fn trial(&self, u: &[f64; DRAWS_PER_TRIAL as usize]) -> ([f64; QUANTITIES], u32) {
        let m = &self.model;
        let (x, ln_ratio) = m.draw(u);
        // First-order prediction of the corners and of the slopes there.
        let p = &self.prediction;
        let predict = |start: Option<Start>, k: usize| {
            start.map(|s| {
                let (mut dx, mut ds) = (0.0, 0.0);
                for ((((a, a2), b), b2), r) in p.root[k]
                    .iter()
                    .zip(&p.root2[k])
                    .zip(&p.slope[k])
                    .zip(&p.slope2[k])
                    .zip(&ln_ratio)
                {
                    dx += a * r + 0.5 * a2 * r * r;
                    ds += b * r + 0.5 * b2 * r * r;
                }
                Start {
                    x: s.x + dx,
                    slope: s.slope + ds,
                    curvature: s.curvature,
                }
            })
        };
        let lower = predict(m.lower, 0);
        let upper = predict(m.upper, 1);
        let thd = p.thd_at(m.sample.get(Quantity::Thd), &ln_ratio);
        match m.evaluate_quick(&x, lower, upper, thd) {
            Ok((s, thd_solved)) => {
                let mut state = failed_requirements(&self.requirements, &s, m.edges);
                if !s.active {
                    state |= NOT_ACTIVE;
                }
                if thd_solved {
                    state |= THD_SOLVED;
                }
                (s.values, state)
            }
            Err(_) => ([f64::NAN; QUANTITIES], NO_SOLUTION | FAILED_MASK),
        }
    }

    /// The values of `q` in trial order (NaN for a trial not run, not
    /// solved, or without that corner).
    pub fn samples(&self, q: Quantity) -> impl Iterator<Item = f64> + '_ {
        self.values.iter().map(move |v| v[q.index()])
    }

    /// True when trial `i` has run and meets every requirement.
    pub fn passed(&self, i: usize) -> bool {
        self.state
            .get(i)
            .is_some_and(|s| s & DONE != 0 && s & FAILED_MASK == 0)
    }

    /// Yield, percentiles and histograms over the trials completed so far.
    pub fn summary(&self) -> MonteCarloSummary {
        let done = self.completed;
        let mut passed = 0usize;
        let mut no_solution = 0usize;
        let mut not_active = 0usize;
        let mut req_fail = [0usize; REQUIREMENTS.len()];
        let mut thd_solved = 0usize;
        for &s in &self.state {
            if s & DONE == 0 {
                continue;
            }
            if s & THD_SOLVED != 0 {
                thd_solved += 1;
            }
            if s & FAILED_MASK == 0 {
                passed += 1;
            }
            if s & NO_SOLUTION != 0 {
                no_solution += 1;
            } else if s & NOT_ACTIVE != 0 {
                not_active += 1;
            }
            for (k, f) in req_fail.iter_mut().enumerate() {
                if s & (1 << k) != 0 {
                    *f += 1;
                }
            }
        }
        let share = |n: usize| {
            if done > 0 {
                n as f64 / done as f64
            } else {
                0.0
            }
        };
        let r = &self.requirements;
        let requirements = REQUIREMENTS
            .iter()
            .zip(req_fail)
            .filter(|(req, _)| r.get(req.key).is_some())
            .map(|(req, failed)| RequirementYield {
                requirement: req.key,
                yield_fraction: share(done - failed),
            })
            .collect();
        let mut scratch: Vec<f64> = Vec::with_capacity(done);
        let mut distributions = Vec::new();
        for q in Quantity::ALL {
            if !self.model.sample.get(q).is_finite() {
                continue;
            }
            scratch.clear();
            for (v, s) in self.values.iter().zip(&self.state) {
                let x = v[q.index()];
                if s & DONE != 0 && x.is_finite() {
                    scratch.push(x);
                }
            }
            if let Some(d) = distribution(q, &mut scratch) {
                distributions.push(d);
            }
        }
        MonteCarloSummary {
            trials: self.trials,
            completed: done,
            seed: self.seed,
            yield_fraction: share(passed),
            no_solution,
            not_active,
            thd_solved: self.model.thd.map(|_| thd_solved),
            requirements,
            distributions,
        }
    }
}
