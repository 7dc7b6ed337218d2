//! Two resistances in parallel, the one combination every stage equation
//! uses.

/// a∥b = ab/(a + b), Ω. A side of 0 Ω is a short (the result is 0), an
/// infinite side is an open (the result is the other side).
pub(crate) fn parallel(a: f64, b: f64) -> f64 {
    if a <= 0.0 || b <= 0.0 {
        0.0
    } else if a.is_infinite() {
        b
    } else if b.is_infinite() {
        a
    } else {
        // formula: a∥b = ab/(a + b)
        a * b / (a + b)
    }
}

#[cfg(test)]
mod tests {
    use super::parallel;

    #[test]
    fn shorts_opens_and_equal_halves() {
        // Exact cases (common practice): equal resistors halve, a short
        // wins, an open leaves the other side; 1e-15 relative for rounding.
        assert!((parallel(10e3, 10e3) - 5e3).abs() <= 5e3 * 1e-15);
        assert!((parallel(1e3, 2e3) - 2e3 / 3.0).abs() <= 1e3 * 1e-15);
        assert_eq!(parallel(0.0, 1e3), 0.0);
        assert_eq!(parallel(1e3, 0.0), 0.0);
        assert_eq!(parallel(f64::INFINITY, 470.0), 470.0);
        assert_eq!(parallel(470.0, f64::INFINITY), 470.0);
    }
}
