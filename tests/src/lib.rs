//! Shared helpers for the cross-check tests in `tests/tests/`.
//!
//! Each test file checks the core against one kind of outside source; this
//! library holds the tolerance helper and the stage builders they share.

#![forbid(unsafe_code)]
#![deny(missing_docs)]

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
