//! Frequency response: sweeps, the −3 dB corners and the unity-gain frequencies.
//!
//! Corners are found on the exact nodal response ([`crate::AcNetwork`]), not
//! from time-constant estimates: a coarse logarithmic scan from 1 mHz to
//! 1 THz (two points a decade) brackets each crossing, then the Illinois
//! variant of regula falsi on (ln f, ln|H|) refines it until ln|H| is within
//! 10⁻¹¹ of the level or the bracket is narrower than 10⁻¹⁰ in ln f. Near a
//! corner |d ln|H| / d ln f| is at least about 0.3 (0.5 for one pole), so the
//! frequency is found to a relative error below 10⁻¹⁰.
//!
//! - Lower and upper corner: where |V(load)/EMF| is 3 dB (a factor 1/√2)
//!   below its midband value, searching down and up from the frequency of
//!   largest gain. A corner that is not found says why ([`Edge`]):
//!   - [`Edge::None`]: the gain never falls 3 dB below the band: the
//!     response at DC (every coupling and bypass capacitor open) is still
//!     within 3 dB, as in a stage whose capacitors are all ideal;
//!   - [`Edge::BeyondSearch`]: the response is still within 3 dB where the
//!     search ends (1 mHz or 1 THz), so the corner lies beyond it: only that
//!     bound is known;
//!   - [`Edge::NoPassband`]: the response never comes within 3 dB of the
//!     midband gain at all (a coupling capacitor far too small for the
//!     band, say), so the midband figures describe a band that does not
//!     exist. The largest response found is reported
//!     ([`Bandwidth::peak_ratio`], [`Bandwidth::peak_frequency`]), refined
//!     between the scan points by golden-section search.
//! - Unity current gain and unity power gain: the lowest frequency above
//!   the peak of |Ai| (resp. |Av·Ai|) where it falls to 1. `None` when it
//!   never exceeds 1.

use alloc::vec::Vec;

use crate::complex::magnitude;
use crate::corner::{illinois, ln_safe};
use crate::error::{within, Result};
use crate::hybrid_pi::SmallSignal;
use crate::nodal::{AcNetwork, Band, FrequencyPoint};
use crate::stage::Stage;

/// Lowest frequency of the corner search, Hz.
pub const SEARCH_FROM: f64 = 1e-3;
/// Highest frequency of the corner search, Hz.
pub const SEARCH_TO: f64 = 1e12;
/// Grid points per decade of the corner search.
/// The networks hold only resistors, capacitors and the controlled sources
/// of one transistor, so their magnitude responses have no peaks or notches
/// narrower than a decade: two points a decade bracket every crossing.
const SEARCH_PER_DECADE: usize = 2;

/// Most points in one sweep.
pub const MAX_SWEEP_POINTS: usize = 100_000;

/// Which −3 dB crossing: the lower corner (which `max_f_low` bounds from
/// above) or the upper (which `min_f_high` bounds from below).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Side {
    /// Below the band.
    Lower,
    /// Above the band.
    Upper,
}

/// How the search for one corner ended.
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Edge {
    /// The search was not run ([`crate::Options::bandwidth`] off).
    #[default]
    NotSearched,
    /// The corner was found.
    Corner,
    /// No corner: the gain never falls 3 dB on this side (lower side only:
    /// the response at DC is within 3 dB of midband).
    None,
    /// The response is still within 3 dB where the search range ends
    /// ([`SEARCH_FROM`] below, [`SEARCH_TO`] above): the corner lies beyond.
    BeyondSearch,
    /// The response never comes within 3 dB of the midband gain.
    NoPassband,
}

impl Edge {
    /// `"not-searched"`, `"corner"`, `"none"`, `"beyond-search"` or `"no-passband"`.
    pub fn name(self) -> &'static str {
        match self {
            Edge::NotSearched => "not-searched",
            Edge::Corner => "corner",
            Edge::None => "none",
            Edge::BeyondSearch => "beyond-search",
            Edge::NoPassband => "no-passband",
        }
    }
}

/// The band limits of a stage, Hz.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Bandwidth {
    /// Lower −3 dB frequency of the gain from the source.
    pub f_low: Option<f64>,
    /// Upper −3 dB frequency of the gain from the source.
    pub f_high: Option<f64>,
    /// Frequency above midband where |current gain| falls to 1.
    pub f_unity_current_gain: Option<f64>,
    /// Frequency above midband where |power gain| falls to 1.
    pub f_unity_power_gain: Option<f64>,
    /// How the search for the lower corner ended.
    pub low_edge: Edge,
    /// How the search for the upper corner ended.
    pub high_edge: Edge,
    /// The largest |V(load)/EMF| of the corner search divided by its
    /// midband value: the largest of the scan (two points a decade, so
    /// close to 1 for a stage with a band), refined between scan points
    /// when the scan stays below 1/√2 (then it tells how far the stage is
    /// from having a passband). 0 when not searched.
    pub peak_ratio: f64,
    /// Where that largest response is, Hz (0 when not searched).
    pub peak_frequency: f64,
}

impl Bandwidth {
    /// True when the response comes within 3 dB of the midband gain
    /// somewhere (false also when the band was not searched).
    pub fn has_passband(&self) -> bool {
        !matches!(self.low_edge, Edge::NoPassband | Edge::NotSearched)
    }
}

/// The small-signal response of a stage at one operating point.
#[derive(Debug, Clone)]
pub struct Response {
    full: AcNetwork,
    midband: FrequencyPoint,
}

/// `points` frequencies spaced evenly on a log scale from `from` to `to` Hz
/// (inclusive). Errors name `from`, `to` or `points`.
pub fn log_frequencies(from: f64, to: f64, points: usize) -> Result<Vec<f64>> {
    within("from", from, 1e-6, 1e13, "Hz")?;
    within("to", to, 1e-6, 1e13, "Hz")?;
    if to <= from {
        return Err(crate::Error::out_of_range(
            "to",
            to,
            "Hz",
            alloc::format!("above from ({})", crate::format_si(from, "Hz")),
        ));
    }
    within("points", points as f64, 2.0, MAX_SWEEP_POINTS as f64, "")?;
    let (l0, l1) = (libm::log10(from), libm::log10(to));
    let step = (l1 - l0) / (points - 1) as f64;
    // formula: f_k = from·r^k with r = 10^step; a fresh power every 32
    // points keeps the rounding of the running product below 10⁻¹⁴.
    let ratio = libm::pow(10.0, step);
    let mut out = Vec::with_capacity(points);
    let mut f = from;
    for k in 0..points {
        if k + 1 == points {
            f = to;
        } else if k % 32 == 0 {
            f = libm::pow(10.0, l0 + step * k as f64);
        }
        out.push(f);
        f *= ratio;
    }
    Ok(out)
}

/// Which quantity a crossing search follows.
#[derive(Clone, Copy)]
enum Track {
    GainFromSource,
    CurrentGain,
    PowerGain,
}

fn tracked(p: &FrequencyPoint, t: Track) -> f64 {
    match t {
        Track::GainFromSource => magnitude(p.voltage_gain_from_source),
        Track::CurrentGain => magnitude(p.current_gain),
        Track::PowerGain => magnitude(p.voltage_gain * p.current_gain),
    }
}

impl Response {
    /// Assembles the full and midband networks of `stage` at `ss`.
    pub fn new(stage: &Stage, ss: &SmallSignal) -> Result<Response> {
        let full = AcNetwork::new(stage, ss, Band::Full)?;
        let midband = AcNetwork::new(stage, ss, Band::Midband)?.solve(0.0)?;
        Ok(Response { full, midband })
    }

    /// The midband response (frequency field 0): coupling and bypass
    /// capacitors shorted, device capacitances open.
    pub fn midband(&self) -> &FrequencyPoint {
        &self.midband
    }

    /// The response at `frequency` Hz.
    pub fn at(&self, frequency: f64) -> Result<FrequencyPoint> {
        self.full.solve(frequency)
    }

    /// The response at `points` log-spaced frequencies from `from` to `to` Hz.
    pub fn sweep(&self, from: f64, to: f64, points: usize) -> Result<Vec<FrequencyPoint>> {
        log_frequencies(from, to, points)?
            .into_iter()
            .map(|f| self.full.solve(f))
            .collect()
    }

    /// Finds where ln|H| − `level` changes sign between grid frequencies
    /// `fa` (value `ga`) and `fb` (value `gb`), by Illinois regula falsi on
    /// ln f ([`crate::corner::illinois`]): until ln|H| is within 10⁻¹¹ of
    /// the level or the bracket is narrower than 10⁻¹⁰ in ln f, 60 steps at
    /// most.
    fn refine(&self, t: Track, level: f64, fa: f64, ga: f64, fb: f64, gb: f64) -> Result<f64> {
        let h = |x: f64| -> Result<f64> {
            Ok(ln_safe(tracked(&self.full.solve(libm::exp(x))?, t)) - level)
        };
        let x = illinois(&h, libm::log(fa), ga, libm::log(fb), gb, 1e-11, 1e-10, 60)?;
        Ok(libm::exp(x))
    }

    /// The corners and unity-gain frequencies.
    pub fn bandwidth(&self) -> Result<Bandwidth> {
        let decades = libm::log10(SEARCH_TO / SEARCH_FROM);
        let n = (decades as usize) * SEARCH_PER_DECADE + 1;
        let mut grid: Vec<FrequencyPoint> = Vec::with_capacity(n);
        for k in 0..n {
            let f = SEARCH_FROM * libm::pow(10.0, k as f64 / SEARCH_PER_DECADE as f64);
            grid.push(self.full.solve(f)?);
        }
        let mut out = Bandwidth::default();
        // Corners of the gain from the source, relative to midband.
        let mid = magnitude(self.midband.voltage_gain_from_source);
        let t = Track::GainFromSource;
        if mid > 1e-30 {
            let level = ln_safe(mid / core::f64::consts::SQRT_2);
            let g: Vec<f64> = grid
                .iter()
                .map(|p| ln_safe(tracked(p, t)) - level)
                .collect();
            let k = argmax(&g);
            // The peak between the scan points, when the scan alone does
            // not reach the level (a narrow band can fall between them).
            let (f_peak, g_peak) = if g[k] > 0.0 {
                (grid[k].frequency, g[k])
            } else {
                self.peak_between(t, level, &grid, k)?
            };
            out.peak_ratio = libm::exp(g_peak) / core::f64::consts::SQRT_2;
            out.peak_frequency = f_peak;
            if g_peak <= 0.0 {
                out.low_edge = Edge::NoPassband;
                out.high_edge = Edge::NoPassband;
            } else {
                // The last scan point below the peak frequency, and the first above.
                let below = (0..n).rev().find(|&i| grid[i].frequency < f_peak);
                let above = (0..n).find(|&i| grid[i].frequency > f_peak);
                match below.and_then(|b| (0..=b).rev().find(|&i| g[i] <= 0.0)) {
                    Some(i) => {
                        let (fb, gb) = if i < below.unwrap_or(0) {
                            (grid[i + 1].frequency, g[i + 1])
                        } else {
                            (f_peak, g_peak)
                        };
                        out.f_low = Some(self.refine(t, level, grid[i].frequency, g[i], fb, gb)?);
                        out.low_edge = Edge::Corner;
                    }
                    None => {
                        // Within 3 dB down to the end of the search: is the
                        // gain still there at DC (capacitors open)?
                        let dc = ln_safe(tracked(&self.full.solve(0.0)?, t)) - level;
                        out.low_edge = if dc > 0.0 {
                            Edge::None
                        } else {
                            Edge::BeyondSearch
                        };
                    }
                }
                match above.and_then(|a| (a..n).find(|&i| g[i] <= 0.0)) {
                    Some(i) => {
                        let (fa, ga) = if i > above.unwrap_or(n) {
                            (grid[i - 1].frequency, g[i - 1])
                        } else {
                            (f_peak, g_peak)
                        };
                        out.f_high =
                            Some(self.refine(t, level, fa, ga, grid[i].frequency, g[i])?);
                        out.high_edge = Edge::Corner;
                    }
                    None => out.high_edge = Edge::BeyondSearch,
                }
            }
        } else {
            // No gain at all at midband: nothing to be 3 dB below.
            out.low_edge = Edge::NoPassband;
            out.high_edge = Edge::NoPassband;
        }
        for t in [Track::CurrentGain, Track::PowerGain] {
            let g: Vec<f64> = grid.iter().map(|p| ln_safe(tracked(p, t))).collect();
            let peak = argmax(&g);
            if g[peak] > 0.0 {
                if let Some(k) = (peak + 1..n).find(|&k| g[k] <= 0.0) {
                    let f = self.refine(
                        t,
                        0.0,
                        grid[k - 1].frequency,
                        g[k - 1],
                        grid[k].frequency,
                        g[k],
                    )?;
                    match t {
                        Track::CurrentGain => out.f_unity_current_gain = Some(f),
                        _ => out.f_unity_power_gain = Some(f),
                    }
                }
            }
        }
        Ok(out)
    }
}

impl Response {
    /// The largest ln|H| − `level` near the scan point `k` (the scan's
    /// largest): golden-section search on ln f between its neighbours, 60
    /// steps (the bracket shrinks to 10⁻¹² of its width). Returns the
    /// frequency and the value there.
    fn peak_between(
        &self,
        t: Track,
        level: f64,
        grid: &[FrequencyPoint],
        k: usize,
    ) -> Result<(f64, f64)> {
        let value = |x: f64| -> Result<f64> {
            Ok(ln_safe(tracked(&self.full.solve(libm::exp(x))?, t)) - level)
        };
        let lo = libm::log(grid[k.saturating_sub(1)].frequency);
        let hi = libm::log(grid[(k + 1).min(grid.len() - 1)].frequency);
        let best = ln_safe(tracked(&grid[k], t)) - level;
        // formula: golden section, r = (√5 − 1)/2
        let r = 0.5 * (libm::sqrt(5.0) - 1.0);
        let (mut a, mut b) = (lo, hi);
        let mut c = b - r * (b - a);
        let mut d = a + r * (b - a);
        let (mut fc, mut fd) = (value(c)?, value(d)?);
        for _ in 0..60 {
            if fc > fd {
                b = d;
                d = c;
                fd = fc;
                c = b - r * (b - a);
                fc = value(c)?;
            } else {
                a = c;
                c = d;
                fc = fd;
                d = a + r * (b - a);
                fd = value(d)?;
            }
        }
        let (x, v) = if fc > fd { (c, fc) } else { (d, fd) };
        if v > best {
            Ok((libm::exp(x), v))
        } else {
            Ok((grid[k].frequency, best))
        }
    }
}

fn argmax(v: &[f64]) -> usize {
    let mut best = 0;
    for (i, &x) in v.iter().enumerate() {
        if x > v[best] {
            best = i;
        }
    }
    best
}
