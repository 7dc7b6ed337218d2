//! Ratios in decibels: 20·log10 of an amplitude ratio (voltage, current),
//! 10·log10 of a power ratio (IEC 60027-3 level conventions), floored so that
//! a zero response is a large negative number and never −∞ (which JSON
//! cannot carry).

/// Lowest level reported in dB (a ratio of 10⁻¹⁵).
const DB_FLOOR: f64 = -300.0;

/// 20·log10(x), floored at −300 dB so that a zero never becomes −∞.
pub fn db20(x: f64) -> f64 {
    if x > 1e-15 {
        20.0 * libm::log10(x)
    } else {
        DB_FLOOR
    }
}

/// 10·log10(x), floored at −300 dB.
pub fn db10(x: f64) -> f64 {
    if x > 1e-30 {
        10.0 * libm::log10(x)
    } else {
        DB_FLOOR
    }
}
