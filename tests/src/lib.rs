//! Shared helpers for the cross-check tests in `tests/tests/`.
//!
//! Each test file checks the core against one kind of outside source; this
//! library holds what they share:
//!
//! - the named tolerance helper ([`assert_close`], [`check`], [`Allowed`])
//!   in the manner of an allowed-error table: every tolerance carries the
//!   reason it is that size, and the reason is printed on failure;
//! - [`book_transistor`], the device the textbook cases use: the
//!   general-purpose NPN preset reduced to what the books assume
//!   (VBE = 0.7 V at the book's current, one β, no Early effect, no rbb');
//! - [`bisect`], used to set a bias resistor so that a stage sits exactly at
//!   the operating point a book states.

#![forbid(unsafe_code)]
#![deny(missing_docs)]

use stagewright::{preset, Polarity, TransistorData};

/// Relative difference |a − b| / max(|a|, |b|), 0 when both are 0.
pub fn rel_diff(a: f64, b: f64) -> f64 {
    let scale = a.abs().max(b.abs());
    if scale == 0.0 {
        0.0
    } else {
        (a - b).abs() / scale
    }
}

/// Asserts that `got` is within relative tolerance `rel` of `want`, naming
/// the quantity and the source of the expected value in the failure message.
#[track_caller]
pub fn assert_close(what: &str, got: f64, want: f64, rel: f64, source: &str) {
    let d = rel_diff(got, want);
    assert!(
        d <= rel,
        "{what}: got {got:.6e}, expected {want:.6e} (relative difference {d:.3e} > {rel:.1e}); source: {source}"
    );
}

/// One row of an allowed-error table: a relative tolerance and why it is
/// that size.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Allowed {
    /// Largest relative difference |got − want| / max(|got|, |want|).
    pub rel: f64,
    /// Why the tolerance is that size (the rounding of the source, the
    /// model difference, the numerical method).
    pub why: &'static str,
}

/// Asserts `got` against `want` with the allowed error `allowed`; the
/// failure message names the quantity, the source and the reason for the
/// tolerance.
#[track_caller]
pub fn check(source: &str, what: &str, got: f64, want: f64, allowed: Allowed) {
    let d = rel_diff(got, want);
    // Shown with `cargo test -- --nocapture`: the agreement found.
    println!(
        "{source} | {what}: got {got:.6e}, expected {want:.6e}, relative {d:.2e} (allowed {:.1e})",
        allowed.rel
    );
    assert!(
        got.is_finite() && d <= allowed.rel,
        "{what}: got {got:.6e}, expected {want:.6e} (relative difference {d:.3e} > {:.1e}, allowed because: {}); source: {source}",
        allowed.rel,
        allowed.why
    );
}

/// Asserts that `got` lies in `[lo, hi]`, naming the source of the band and why.
#[track_caller]
pub fn check_between(source: &str, what: &str, got: f64, lo: f64, hi: f64, why: &str) {
    println!("{source} | {what}: got {got:.6e}, band [{lo:.6e}, {hi:.6e}]");
    assert!(
        got.is_finite() && got >= lo && got <= hi,
        "{what}: got {got:.6e}, expected within [{lo:.6e}, {hi:.6e}] ({why}); source: {source}"
    );
}

/// The device the textbook cases use: the general-purpose NPN preset with
/// hFE = `beta` (and hfe_min = hfe_max = `beta`, one device, no spread), no
/// Early effect, rbb' = 0 and VBE = 0.7 V at collector current `ic` amperes,
/// the value the books assume.
pub fn book_transistor(beta: f64, ic: f64) -> TransistorData {
    let mut t = preset("general-purpose-npn").expect("the general-purpose-npn preset exists");
    t.polarity = Polarity::Npn;
    t.hfe = beta;
    t.hfe_min = beta;
    t.hfe_max = beta;
    t.early_voltage = None;
    t.vbe = 0.7;
    t.vbe_at_ic = ic;
    t.rbb = 0.0;
    t
}

/// Finds `x` in `[lo, hi]` where the monotonic `f(x)` crosses `target`, by
/// bisection on a logarithmic scale (`lo`, `hi` > 0), to a relative width of
/// 1e-12. `f` may be increasing or decreasing.
pub fn bisect(mut lo: f64, mut hi: f64, target: f64, f: impl Fn(f64) -> f64) -> f64 {
    let rising = f(hi) > f(lo);
    for _ in 0..200 {
        let mid = (lo * hi).sqrt();
        let above = f(mid) > target;
        if above == rising {
            hi = mid;
        } else {
            lo = mid;
        }
        if hi / lo - 1.0 < 1e-12 {
            break;
        }
    }
    (lo * hi).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rel_diff_is_symmetric_and_scaled() {
        // Definition of the helper; exact binary fractions, so the
        // comparison is to 1e-15 (one rounding).
        assert!((rel_diff(1.0, 0.5) - 0.5).abs() < 1e-15);
        assert!((rel_diff(0.5, 1.0) - 0.5).abs() < 1e-15);
        assert_eq!(rel_diff(0.0, 0.0), 0.0);
    }

    #[test]
    fn bisect_finds_a_square_root() {
        // x² = 2 has the root √2 (common knowledge); bisection stops at a
        // relative width of 1e-12, so 1e-11 is allowed.
        let x = bisect(1.0, 2.0, 2.0, |x| x * x);
        assert_close("sqrt 2", x, std::f64::consts::SQRT_2, 1e-11, "x² = 2");
        let y = bisect(0.1, 10.0, 0.5, |x| 1.0 / x);
        assert_close("1/x = 0.5", y, 2.0, 1e-11, "1/x = 0.5 at x = 2");
    }
}
