//! One call that analyses a stage: DC, small signal, midband, band limits,
//! swing, dissipation, ratings and cautions.

use alloc::vec::Vec;

use crate::error::Result;
use crate::hybrid_pi::SmallSignal;
use crate::midband::Midband;
use crate::operating_point::OperatingPoint;
use crate::ratings::{
    cautions, passband_caution, rating_checks, BiasStability, Caution, Check, Dissipation,
};
use crate::response::{Bandwidth, Response};
use crate::stage::Stage;
use crate::swing::Swing;

/// What [`analyze_with`] computes beyond the operating point, midband, swing and ratings.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Options {
    /// Search the corners and unity-gain frequencies (about a hundred nodal solves).
    pub bandwidth: bool,
    /// Re-solve the bias at hfe_min, hfe_max and +25 K for the stability caution.
    pub stability: bool,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            bandwidth: true,
            stability: true,
        }
    }
}

/// Everything known about a stage at its quiescent point.
#[derive(Debug, Clone)]
pub struct Analysis {
    /// The DC operating point.
    pub operating_point: OperatingPoint,
    /// The hybrid-π parameters there.
    pub small_signal: SmallSignal,
    /// Midband gains and impedances (nodal).
    pub midband: Midband,
    /// Corners and unity-gain frequencies (all `None` when not requested).
    pub bandwidth: Bandwidth,
    /// Output limits.
    pub swing: Swing,
    /// Quiescent dissipation.
    pub dissipation: Dissipation,
    /// Ratings checks (always run).
    pub ratings: Vec<Check>,
    /// Cautions for the reviewer.
    pub cautions: Vec<Caution>,
    /// Bias movement across hFE and temperature (when requested).
    pub stability: Option<BiasStability>,
    response: Response,
}

impl Analysis {
    /// The frequency response, for sweeps.
    pub fn response(&self) -> &Response {
        &self.response
    }
}

/// Analyses `stage` with every option on. The stage is validated first.
pub fn analyze(stage: &Stage) -> Result<Analysis> {
    analyze_with(stage, &Options::default())
}

/// Analyses `stage` with the given options. The stage is validated first.
pub fn analyze_with(stage: &Stage, options: &Options) -> Result<Analysis> {
    stage.validate()?;
    let t = &stage.transistor;
    let device = t.device(stage.ambient, t.hfe, 0.0);
    let op = OperatingPoint::solve(stage, &device)?;
    let ss = SmallSignal::at(stage, &op);
    let response = Response::new(stage, &ss)?;
    let midband = Midband::from_point(response.midband());
    let bandwidth = if options.bandwidth {
        response.bandwidth()?
    } else {
        Bandwidth::default()
    };
    let swing = Swing::at(stage, &op);
    let dissipation = Dissipation::at(stage, &op);
    let ratings = rating_checks(stage, &swing, &dissipation);
    let stability = if options.stability {
        Some(bias_stability(stage, op.ic)?)
    } else {
        None
    };
    let mut cautions = cautions(stage, &op, &ratings, &dissipation, stability.as_ref());
    cautions.extend(passband_caution(&bandwidth));
    Ok(Analysis {
        operating_point: op,
        small_signal: ss,
        midband,
        bandwidth,
        swing,
        dissipation,
        ratings,
        cautions,
        stability,
        response,
    })
}

/// IC movement across the hFE range and over a 25 K rise in ambient.
fn bias_stability(stage: &Stage, ic: f64) -> Result<BiasStability> {
    let t = &stage.transistor;
    let rel = |x: f64| {
        if ic > 0.0 {
            libm::fabs(x - ic) / ic
        } else {
            0.0
        }
    };
    let lo = OperatingPoint::solve(stage, &t.device(stage.ambient, t.hfe_min, 0.0))?;
    let hi = OperatingPoint::solve(stage, &t.device(stage.ambient, t.hfe_max, 0.0))?;
    let warm = OperatingPoint::solve(stage, &t.device(stage.ambient.plus(25.0), t.hfe, 0.0))?;
    Ok(BiasStability {
        across_hfe: libm::fmax(rel(lo.ic), rel(hi.ic)),
        over_temperature: rel(warm.ic),
    })
}
