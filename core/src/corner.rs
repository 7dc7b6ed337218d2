//! The −3 dB crossings of a response: every search for a corner frequency
//! goes through this module.
//!
//! - [`illinois`]: the Illinois variant of regula falsi on a bracket (Dowell
//!   & Jarratt, BIT 1971: the endpoint that stays twice in a row has its
//!   value halved, which restores superlinear convergence where plain regula
//!   falsi stalls at one end). The ordinary analysis refines its grid
//!   brackets with it (`response`), and [`find_corner`] falls back to it.
//! - [`find_corner`]: the crossing near a predicted start, from its slope
//!   and curvature (a second-order step, then secant steps, then a
//!   bracketing search): the tolerance analysis' trials and the synthesis'
//!   corner sizing use it, one or two nodal solves a corner where the start
//!   is good.
//! - [`ln_gain`], [`corner_level`], [`shape_at`]: ln|V(load)/EMF| and its
//!   −3 dB level from |H|² (libm only, no platform `hypot`, so that the
//!   numbers are the same on every target), and the local shape.
//!
//! Everything works on x = ln f, where a one-pole corner has slope ±1 and
//! the response is smooth.

use crate::error::Result;
use crate::response::{Response, Side, SEARCH_FROM, SEARCH_TO};

/// Convergence of a corner in ln f for the worst case, the sensitivities
/// and [`find_corner`]'s Illinois stage.
pub(crate) const PRECISE: f64 = 1e-10;

/// ln x, with x floored at 10⁻³⁰⁰ so that a zero response gives a large
/// negative number rather than −∞.
pub(crate) fn ln_safe(x: f64) -> f64 {
    libm::log(x.max(1e-300))
}

/// The root of `h` on the bracket (`a`, `ya`) … (`b`, `yb`), where `ya` and
/// `yb` have opposite signs, by the Illinois method: stops when |h| is 0 or
/// below `y_tol`, or the bracket is narrower than `x_tol`; after
/// `iterations` steps, the middle of what is left.
#[allow(clippy::too_many_arguments)]
pub(crate) fn illinois(
    h: &dyn Fn(f64) -> Result<f64>,
    mut a: f64,
    mut ya: f64,
    mut b: f64,
    mut yb: f64,
    y_tol: f64,
    x_tol: f64,
    iterations: usize,
) -> Result<f64> {
    let mut side = 0i8;
    for _ in 0..iterations {
        // formula: x = b − h(b)·(b − a)/(h(b) − h(a)), kept inside the bracket
        let x = if yb != ya {
            b - yb * (b - a) / (yb - ya)
        } else {
            0.5 * (a + b)
        };
        let x = if x > a.min(b) && x < a.max(b) {
            x
        } else {
            0.5 * (a + b)
        };
        let y = h(x)?;
        if y == 0.0 || libm::fabs(y) < y_tol || libm::fabs(b - a) < x_tol {
            return Ok(x);
        }
        if (y > 0.0) == (yb > 0.0) {
            b = x;
            yb = y;
            if side == 1 {
                ya *= 0.5;
            }
            side = 1;
        } else {
            a = x;
            ya = y;
            if side == -1 {
                yb *= 0.5;
            }
            side = -1;
        }
    }
    Ok(0.5 * (a + b))
}

/// Where a corner search starts: ln f, and the slope d ln|H| / d ln f and
/// the curvature d² ln|H| / d(ln f)² expected there.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Start {
    pub(crate) x: f64,
    pub(crate) slope: f64,
    pub(crate) curvature: f64,
}

/// ln|V(load)/EMF| at `f` hertz (from |H|², without the platform's hypot,
/// so that the number is the same on every target).
pub(crate) fn ln_gain(resp: &Response, f: f64) -> Result<f64> {
    let h = resp.at(f)?.voltage_gain_from_source;
    Ok(0.5 * ln_safe(h.re * h.re + h.im * h.im))
}

/// ln of the −3 dB level of `resp`: ln|H(midband)| − ½·ln 2.
pub(crate) fn corner_level(resp: &Response) -> f64 {
    let h = resp.midband().voltage_gain_from_source;
    0.5 * ln_safe(h.re * h.re + h.im * h.im) - 0.5 * core::f64::consts::LN_2
}

/// The slope d ln|H| / d ln f and the curvature d² ln|H| / d(ln f)² at `f`
/// by central differences (step 10⁻³ in ln f).
pub(crate) fn shape_at(resp: &Response, f: f64) -> Result<(f64, f64)> {
    let h = 1e-3;
    let x = libm::log(f);
    let up = ln_gain(resp, libm::exp(x + h))?;
    let mid = ln_gain(resp, f)?;
    let down = ln_gain(resp, libm::exp(x - h))?;
    // formula: g′ ≈ (g₊ − g₋)/2h, g″ ≈ (g₊ − 2g₀ + g₋)/h²
    Ok(((up - down) / (2.0 * h), (up - 2.0 * mid + down) / (h * h)))
}

/// A corner of a Monte Carlo trial is accepted after a single nodal solve
/// when the second-order step from the predicted start is below this (in
/// ln f): the step's error is then the slope's prediction error (under 1 %)
/// times the step, plus a third-order term: about 10⁻⁵.
const ONE_SOLVE_STEP: f64 = 3e-3;

/// Finds the −3 dB crossing on `side` near `start`: a second-order step
/// with the start's slope and curvature (accepted at once when `quick` and
/// it is below [`ONE_SOLVE_STEP`]), then secant steps until a step is below
/// `tol` (in ln f); when that wanders, a bracketing search and the Illinois
/// method. `None` when the response does not cross the level inside the
/// search range.
pub(crate) fn find_corner(
    resp: &Response,
    level: f64,
    side: Side,
    start: Start,
    tol: f64,
    quick: bool,
) -> Result<Option<f64>> {
    // h(x) rises through 0 at the corner whichever side it is.
    let sign = match side {
        Side::Lower => 1.0,
        Side::Upper => -1.0,
    };
    let h = |x: f64| -> Result<f64> { Ok(sign * (ln_gain(resp, libm::exp(x))? - level)) };
    let (lo, hi) = (libm::log(SEARCH_FROM), libm::log(SEARCH_TO));
    let reach = libm::log(1000.0);
    let slope = sign * start.slope;
    let curvature = if start.curvature.is_finite() {
        sign * start.curvature
    } else {
        0.0
    };
    if start.x.is_finite() && slope.is_finite() && slope > 1e-3 {
        let (mut x0, mut y0) = (start.x, h(start.x)?);
        if y0 == 0.0 {
            return Ok(Some(libm::exp(x0)));
        }
        // formula: the root of h₀ + h′·d + ½h″·d² = 0 nearest 0,
        // d = −2h₀/(h′ + √(h′² − 2h″·h₀)) (a Newton step when h″ = 0)
        let disc = slope * slope - 2.0 * curvature * y0;
        let d = if disc > 0.0 {
            -2.0 * y0 / (slope + libm::sqrt(disc))
        } else {
            -y0 / slope
        };
        if quick && libm::fabs(d) < ONE_SOLVE_STEP {
            return Ok(Some(libm::exp(x0 + d)));
        }
        let step = d.clamp(-libm::log(4.0), libm::log(4.0));
        let mut x1 = x0 + step;
        let mut y1 = h(x1)?;
        for _ in 0..12 {
            if y1 == 0.0 {
                return Ok(Some(libm::exp(x1)));
            }
            let d = y1 - y0;
            if d == 0.0 || !d.is_finite() {
                break;
            }
            // formula: secant x₂ = x₁ − h₁·(x₁ − x₀)/(h₁ − h₀)
            let x2 = x1 - y1 * (x1 - x0) / d;
            if !x2.is_finite() || libm::fabs(x2 - start.x) > reach || x2 < lo || x2 > hi {
                break;
            }
            if libm::fabs(x2 - x1) < tol {
                return Ok(Some(libm::exp(x2)));
            }
            x0 = x1;
            y0 = y1;
            x1 = x2;
            y1 = h(x2)?;
        }
    }
    // Bracket from the start by octaves, then Illinois.
    let x_start = if start.x.is_finite() {
        start.x.clamp(lo, hi)
    } else {
        0.5 * (lo + hi)
    };
    let y_start = h(x_start)?;
    let (mut a, mut ya, mut b, mut yb) = (x_start, y_start, x_start, y_start);
    let octave = core::f64::consts::LN_2;
    if y_start > 0.0 {
        // The crossing is below: walk down until h ≤ 0.
        loop {
            let x = a - octave;
            if x < lo {
                return Ok(None);
            }
            let y = h(x)?;
            if y <= 0.0 {
                a = x;
                ya = y;
                break;
            }
            b = x;
            yb = y;
            a = x;
        }
    } else {
        loop {
            let x = b + octave;
            if x > hi {
                return Ok(None);
            }
            let y = h(x)?;
            if y > 0.0 {
                b = x;
                yb = y;
                break;
            }
            a = x;
            ya = y;
            b = x;
        }
    }
    Ok(Some(libm::exp(illinois(
        &h, a, ya, b, yb, 0.0, PRECISE, 100,
    )?)))
}
