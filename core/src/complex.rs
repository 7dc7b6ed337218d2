//! Magnitude and phase of a complex number through `libm`.
//!
//! num-complex computes `norm` and `arg` with the platform's `hypot` and
//! `atan2` when its `std` feature is on (some other crate of a build can
//! turn it on) and with `libm` otherwise, and the two differ in the last
//! bit. Every magnitude and phase of the core goes through here instead,
//! so a figure is the same natively, in CI and in the browser, however the
//! crate is built.

use num_complex::Complex64;

/// |z| = √(re² + im²), by `libm::hypot` (no overflow or underflow in the squares).
pub(crate) fn magnitude(z: Complex64) -> f64 {
    libm::hypot(z.re, z.im)
}

/// arg z in radians, (−π, π], by `libm::atan2`.
pub(crate) fn phase(z: Complex64) -> f64 {
    libm::atan2(z.im, z.re)
}
