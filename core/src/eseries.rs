//! Preferred number series for resistors and capacitors (IEC 60063:2015).
//!
//! Each series E*n* has *n* values per decade, spaced roughly evenly on a
//! logarithmic scale. The tables below are typed out from IEC 60063:2015
//! rather than computed, because the older series keep their historical
//! values: E24 has 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2 where
//! rounding 10^(i/24) would give 2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6 and 8.3,
//! and E192 has 9.20 where the formula gives 9.19. E48 and E96 agree with
//! 10^(i/n) rounded to three significant digits.
//!
//! A standard value is returned as the `f64` nearest to its decimal value,
//! as if it had been typed as a literal: 4.7 kΩ is exactly `4700.0` and
//! 4.7 nF is exactly `4.7e-9`.

use alloc::string::String;
use core::fmt;
use core::str::FromStr;

use crate::error::{Error, ErrorKind, Result};

/// Relative tolerance within which a value counts as equal to a standard
/// value in [`ESeries::next_up`] and [`ESeries::next_down`].
const SAME_VALUE_REL: f64 = 1e-9;

/// E3 (IEC 60063:2015).
const E3_VALUES: [f64; 3] = [1.0, 2.2, 4.7];

/// E6 (IEC 60063:2015).
const E6_VALUES: [f64; 6] = [1.0, 1.5, 2.2, 3.3, 4.7, 6.8];

/// E12 (IEC 60063:2015).
const E12_VALUES: [f64; 12] = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];

/// E24 (IEC 60063:2015), with its historical values 2.7 to 4.7 and 8.2.
const E24_VALUES: [f64; 24] = [
    1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, //
    3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1,
];

/// E48 (IEC 60063:2015).
const E48_VALUES: [f64; 48] = [
    1.00, 1.05, 1.10, 1.15, 1.21, 1.27, 1.33, 1.40, 1.47, 1.54, 1.62, 1.69, //
    1.78, 1.87, 1.96, 2.05, 2.15, 2.26, 2.37, 2.49, 2.61, 2.74, 2.87, 3.01, //
    3.16, 3.32, 3.48, 3.65, 3.83, 4.02, 4.22, 4.42, 4.64, 4.87, 5.11, 5.36, //
    5.62, 5.90, 6.19, 6.49, 6.81, 7.15, 7.50, 7.87, 8.25, 8.66, 9.09, 9.53,
];

/// E96 (IEC 60063:2015).
const E96_VALUES: [f64; 96] = [
    1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30, //
    1.33, 1.37, 1.40, 1.43, 1.47, 1.50, 1.54, 1.58, 1.62, 1.65, 1.69, 1.74, //
    1.78, 1.82, 1.87, 1.91, 1.96, 2.00, 2.05, 2.10, 2.15, 2.21, 2.26, 2.32, //
    2.37, 2.43, 2.49, 2.55, 2.61, 2.67, 2.74, 2.80, 2.87, 2.94, 3.01, 3.09, //
    3.16, 3.24, 3.32, 3.40, 3.48, 3.57, 3.65, 3.74, 3.83, 3.92, 4.02, 4.12, //
    4.22, 4.32, 4.42, 4.53, 4.64, 4.75, 4.87, 4.99, 5.11, 5.23, 5.36, 5.49, //
    5.62, 5.76, 5.90, 6.04, 6.19, 6.34, 6.49, 6.65, 6.81, 6.98, 7.15, 7.32, //
    7.50, 7.68, 7.87, 8.06, 8.25, 8.45, 8.66, 8.87, 9.09, 9.31, 9.53, 9.76,
];

/// E192 (IEC 60063:2015), with its historical 9.20.
const E192_VALUES: [f64; 192] = [
    1.00, 1.01, 1.02, 1.04, 1.05, 1.06, 1.07, 1.09, 1.10, 1.11, 1.13, 1.14, //
    1.15, 1.17, 1.18, 1.20, 1.21, 1.23, 1.24, 1.26, 1.27, 1.29, 1.30, 1.32, //
    1.33, 1.35, 1.37, 1.38, 1.40, 1.42, 1.43, 1.45, 1.47, 1.49, 1.50, 1.52, //
    1.54, 1.56, 1.58, 1.60, 1.62, 1.64, 1.65, 1.67, 1.69, 1.72, 1.74, 1.76, //
    1.78, 1.80, 1.82, 1.84, 1.87, 1.89, 1.91, 1.93, 1.96, 1.98, 2.00, 2.03, //
    2.05, 2.08, 2.10, 2.13, 2.15, 2.18, 2.21, 2.23, 2.26, 2.29, 2.32, 2.34, //
    2.37, 2.40, 2.43, 2.46, 2.49, 2.52, 2.55, 2.58, 2.61, 2.64, 2.67, 2.71, //
    2.74, 2.77, 2.80, 2.84, 2.87, 2.91, 2.94, 2.98, 3.01, 3.05, 3.09, 3.12, //
    3.16, 3.20, 3.24, 3.28, 3.32, 3.36, 3.40, 3.44, 3.48, 3.52, 3.57, 3.61, //
    3.65, 3.70, 3.74, 3.79, 3.83, 3.88, 3.92, 3.97, 4.02, 4.07, 4.12, 4.17, //
    4.22, 4.27, 4.32, 4.37, 4.42, 4.48, 4.53, 4.59, 4.64, 4.70, 4.75, 4.81, //
    4.87, 4.93, 4.99, 5.05, 5.11, 5.17, 5.23, 5.30, 5.36, 5.42, 5.49, 5.56, //
    5.62, 5.69, 5.76, 5.83, 5.90, 5.97, 6.04, 6.12, 6.19, 6.26, 6.34, 6.42, //
    6.49, 6.57, 6.65, 6.73, 6.81, 6.90, 6.98, 7.06, 7.15, 7.23, 7.32, 7.41, //
    7.50, 7.59, 7.68, 7.77, 7.87, 7.96, 8.06, 8.16, 8.25, 8.35, 8.45, 8.56, //
    8.66, 8.76, 8.87, 8.98, 9.09, 9.20, 9.31, 9.42, 9.53, 9.65, 9.76, 9.88,
];

/// Exact powers of ten: every one of these is representable in an `f64`.
const EXACT_POWERS_OF_TEN: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// A preferred number series of IEC 60063:2015.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ESeries {
    /// 3 values per decade; wide tolerance parts.
    E3,
    /// 6 values per decade; ±20 % parts.
    E6,
    /// 12 values per decade; ±10 % parts.
    E12,
    /// 24 values per decade; ±5 % parts.
    E24,
    /// 48 values per decade; ±2 % parts.
    E48,
    /// 96 values per decade; ±1 % parts.
    E96,
    /// 192 values per decade; ±0.5 % and tighter parts.
    E192,
}

/// A value placed within a series: the nearest standard value and the
/// standard values on either side.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeriesLookup {
    /// The standard value nearest in ratio (logarithmic distance).
    pub nearest: f64,
    /// The largest standard value not above the value (within 1e-9 relative).
    pub below: f64,
    /// The smallest standard value not below the value (within 1e-9 relative).
    pub above: f64,
    /// Relative error of choosing `nearest`: `(nearest - value) / value`.
    pub error: f64,
}

impl ESeries {
    /// Every series, from the coarsest to the finest.
    pub const ALL: [ESeries; 7] = [
        ESeries::E3,
        ESeries::E6,
        ESeries::E12,
        ESeries::E24,
        ESeries::E48,
        ESeries::E96,
        ESeries::E192,
    ];

    /// The mantissas of the series in the decade [1, 10), ascending, as
    /// listed in IEC 60063:2015 (for E24: 1.0, 1.1, 1.2, 1.3, 1.5, …, 9.1).
    pub fn values(self) -> &'static [f64] {
        match self {
            ESeries::E3 => &E3_VALUES,
            ESeries::E6 => &E6_VALUES,
            ESeries::E12 => &E12_VALUES,
            ESeries::E24 => &E24_VALUES,
            ESeries::E48 => &E48_VALUES,
            ESeries::E96 => &E96_VALUES,
            ESeries::E192 => &E192_VALUES,
        }
    }

    /// The part tolerance usually associated with the series, as a fraction:
    /// E6 0.20, E12 0.10, E24 0.05, E48 0.02, E96 0.01 and E192 0.005 as in
    /// IEC 60063:2015; E3 is given 0.40 following common practice, the
    /// standard only saying that it is for tolerances wider than 20 %.
    pub fn tolerance(self) -> f64 {
        match self {
            ESeries::E3 => 0.40,
            ESeries::E6 => 0.20,
            ESeries::E12 => 0.10,
            ESeries::E24 => 0.05,
            ESeries::E48 => 0.02,
            ESeries::E96 => 0.01,
            ESeries::E192 => 0.005,
        }
    }

    /// The name of the series: `"E24"`.
    pub fn name(self) -> &'static str {
        match self {
            ESeries::E3 => "E3",
            ESeries::E6 => "E6",
            ESeries::E12 => "E12",
            ESeries::E24 => "E24",
            ESeries::E48 => "E48",
            ESeries::E96 => "E96",
            ESeries::E192 => "E192",
        }
    }

    /// Reads a series name, ignoring case and surrounding spaces: `E24`,
    /// `e96`.
    ///
    /// # Errors
    ///
    /// [`ErrorKind::Unsupported`] about the field `series` for any other
    /// text.
    pub fn parse(text: &str) -> Result<ESeries> {
        let word = text.trim();
        ESeries::ALL
            .into_iter()
            .find(|s| s.name().eq_ignore_ascii_case(word))
            .ok_or_else(|| {
                Error::new(
                    "series",
                    ErrorKind::Unsupported {
                        value: String::from(text),
                        allowed: String::from("E3, E6, E12, E24, E48, E96 or E192"),
                    },
                )
            })
    }

    /// The standard value nearest to `value` in ratio, that is with the
    /// smallest |log(standard / value)|; it may lie in the next decade
    /// (9.6 kΩ gives 10 kΩ in E24). A value exactly between two standard
    /// values in ratio gets the lower one.
    ///
    /// `None` for zero, negative or non-finite values.
    pub fn nearest(self, value: f64) -> Option<f64> {
        let mut best: Option<(f64, f64)> = None;
        self.for_each_candidate(value, |candidate| {
            let ratio = if candidate > value {
                candidate / value
            } else {
                value / candidate
            };
            if best.is_none_or(|(_, r)| ratio < r) {
                best = Some((candidate, ratio));
            }
        });
        best.map(|(candidate, _)| candidate)
    }

    /// The smallest standard value that is not below `value`; a standard
    /// value within 1e-9 relative of `value` counts as equal to it, so both
    /// 4699.9999999 and 4700.0000001 give 4700 in E24.
    ///
    /// `None` for zero, negative or non-finite values, or when the answer
    /// would overflow an `f64`.
    pub fn next_up(self, value: f64) -> Option<f64> {
        let floor = value - SAME_VALUE_REL * value;
        let mut best: Option<f64> = None;
        self.for_each_candidate(value, |candidate| {
            if candidate >= floor && best.is_none_or(|b| candidate < b) {
                best = Some(candidate);
            }
        });
        best
    }

    /// The largest standard value that is not above `value`, with the same
    /// 1e-9 relative allowance as [`ESeries::next_up`].
    ///
    /// `None` for zero, negative or non-finite values.
    pub fn next_down(self, value: f64) -> Option<f64> {
        let ceiling = value + SAME_VALUE_REL * value;
        let mut best: Option<f64> = None;
        self.for_each_candidate(value, |candidate| {
            if candidate <= ceiling && best.is_none_or(|b| candidate > b) {
                best = Some(candidate);
            }
        });
        best
    }

    /// The nearest, next lower and next higher standard values around
    /// `value`, and the relative error of the nearest one. For a value on
    /// the series all three are that value.
    ///
    /// `None` for zero, negative or non-finite values.
    pub fn lookup(self, value: f64) -> Option<SeriesLookup> {
        let nearest = self.nearest(value)?;
        Some(SeriesLookup {
            nearest,
            below: self.next_down(value)?,
            above: self.next_up(value)?,
            error: (nearest - value) / value,
        })
    }

    /// Calls `f` with every standard value of the decade holding `value`
    /// and of the decades on either side (in ascending order), skipping
    /// values that do not fit in an `f64`. Does nothing for values that are
    /// not positive and finite.
    fn for_each_candidate(self, value: f64, mut f: impl FnMut(f64)) {
        if !(value.is_finite() && value > 0.0) {
            return;
        }
        let decade = decade_of(value);
        for d in decade - 1..=decade + 1 {
            for &mantissa in self.values() {
                // Every mantissa has three significant digits: work with
                // the integer number of hundredths so that the scaling is
                // a single correctly rounded operation.
                let hundredths = libm::round(mantissa * 100.0);
                let candidate = scale(hundredths, d - 2);
                if candidate.is_finite() && candidate > 0.0 {
                    f(candidate);
                }
            }
        }
    }
}

/// The decade of a positive finite value: the `d` with 10^d <= value < 10^(d+1).
fn decade_of(value: f64) -> i32 {
    // log10 can be off by one ulp at powers of ten; settle it by comparing
    // with the powers themselves.
    let mut d = libm::floor(libm::log10(value)) as i32;
    if scale(1.0, d) > value {
        d -= 1;
    } else if scale(1.0, d + 1) <= value {
        d += 1;
    }
    d
}

/// `n × 10^exponent` for an integer-valued `n`, correctly rounded when
/// |exponent| <= 22 (the powers of ten that are exact in an `f64`).
fn scale(n: f64, exponent: i32) -> f64 {
    let power = |k: u32| {
        EXACT_POWERS_OF_TEN
            .get(k as usize)
            .copied()
            .unwrap_or_else(|| libm::pow(10.0, f64::from(k)))
    };
    if exponent >= 0 {
        n * power(exponent.unsigned_abs())
    } else {
        n / power(exponent.unsigned_abs())
    }
}

impl fmt::Display for ESeries {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for ESeries {
    type Err = Error;

    fn from_str(text: &str) -> Result<ESeries> {
        ESeries::parse(text)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::format;
    use std::string::ToString;

    /// Mantissa as an integer number of hundredths; table values carry at
    /// most three significant digits, so rounding `m * 100` is exact.
    fn hundredths(m: f64) -> i64 {
        libm::round(m * 100.0) as i64
    }

    /// The value the formula 10^(i/n) gives, in hundredths (three
    /// significant digits), or tenths for the two-digit series.
    fn formula_hundredths(i: usize, n: usize) -> i64 {
        let exact = libm::pow(10.0, i as f64 / n as f64);
        if n <= 24 {
            libm::round(exact * 10.0) as i64 * 10
        } else {
            libm::round(exact * 100.0) as i64
        }
    }

    #[test]
    fn table_sizes() {
        // IEC 60063:2015: series E-n has n values per decade. Integer
        // counts, tolerance 0.
        for (series, n) in ESeries::ALL.into_iter().zip([3, 6, 12, 24, 48, 96, 192]) {
            assert_eq!(series.values().len(), n, "{series}");
        }
    }

    #[test]
    fn tables_increase_within_one_decade() {
        // IEC 60063:2015 tables list one decade [1, 10) in ascending
        // order. Compared in integer hundredths (tolerance 0 on typed
        // three-digit values; rounding m * 100 cannot be off by 0.5).
        for series in ESeries::ALL {
            let v = series.values();
            assert_eq!(hundredths(v[0]), 100, "{series}");
            assert!(hundredths(v[v.len() - 1]) < 1000, "{series}");
            for pair in v.windows(2) {
                assert!(
                    hundredths(pair[0]) < hundredths(pair[1]),
                    "{series}: {pair:?}"
                );
            }
            for &m in v {
                // Three significant digits at most: m*100 is an integer
                // to within float noise (1e-9).
                assert!((m * 100.0 - libm::round(m * 100.0)).abs() < 1e-9);
            }
        }
    }

    #[test]
    fn each_series_nests_in_the_next() {
        // IEC 60063:2015: E(n) is every other value of E(2n), for E3 to E24
        // and for E48 to E192. Integer hundredths, tolerance 0.
        let pairs = [
            (ESeries::E3, ESeries::E6),
            (ESeries::E6, ESeries::E12),
            (ESeries::E12, ESeries::E24),
            (ESeries::E48, ESeries::E96),
            (ESeries::E96, ESeries::E192),
        ];
        for (coarse, fine) in pairs {
            for (i, &m) in coarse.values().iter().enumerate() {
                assert_eq!(
                    hundredths(m),
                    hundredths(fine.values()[2 * i]),
                    "{coarse} in {fine}"
                );
            }
        }
    }

    #[test]
    fn historical_values_differ_from_the_formula() {
        // IEC 60063:2015 keeps older values in E24 and E192 that rounding
        // 10^(i/n) would not give. Integer tenths/hundredths, tolerance 0.
        let e24: std::vec::Vec<i64> = E24_VALUES.iter().map(|&m| hundredths(m)).collect();
        for want in [270, 300, 330, 360, 390, 430, 470, 820] {
            assert!(e24.contains(&want), "E24 lacks {want}");
        }
        let differs: std::vec::Vec<usize> = (0..24)
            .filter(|&i| e24[i] != formula_hundredths(i, 24))
            .collect();
        assert_eq!(differs, [10, 11, 12, 13, 14, 15, 16, 22]);
        // E192: 9.20 at index 185, where the formula gives 9.19.
        assert_eq!(hundredths(E192_VALUES[185]), 920);
        assert_eq!(formula_hundredths(185, 192), 919);
        // E3, E6 and E12 are subsets of E24 (checked above), so they share
        // the historical 3.3, 4.7 and 8.2.
        assert!(E12_VALUES.contains(&8.2) && E6_VALUES.contains(&4.7));
    }

    #[test]
    fn e48_e96_e192_follow_the_formula() {
        // IEC 60063:2015: E48 and E96 are 10^(i/n) rounded to three
        // significant digits, E192 too except 9.20 (index 185). Integer
        // hundredths, tolerance 0.
        for series in [ESeries::E48, ESeries::E96, ESeries::E192] {
            let n = series.values().len();
            for (i, &m) in series.values().iter().enumerate() {
                if series == ESeries::E192 && i == 185 {
                    continue;
                }
                assert_eq!(hundredths(m), formula_hundredths(i, n), "{series}[{i}]");
            }
        }
    }

    #[test]
    fn nearest_and_neighbours_across_decades() {
        // Expected values read from the IEC 60063:2015 E24 / E12 tables;
        // results are built to be the f64 nearest to the decimal standard
        // value, so exact equality (tolerance 0) is required.
        let e24 = ESeries::E24;
        assert_eq!(e24.nearest(4650.0), Some(4700.0));
        assert_eq!(e24.nearest(9600.0), Some(10_000.0));
        assert_eq!(e24.nearest(1040.0), Some(1000.0));
        assert_eq!(e24.nearest(0.96), Some(1.0));
        assert_eq!(e24.next_down(1000.0), Some(1000.0));
        assert_eq!(e24.next_up(1001.0), Some(1100.0));
        assert_eq!(e24.next_up(9200.0), Some(10_000.0));
        assert_eq!(e24.next_down(999.0), Some(910.0));
        assert_eq!(e24.next_down(9_999.0), Some(9_100.0));
        assert_eq!(ESeries::E12.nearest(3.0e-9), Some(3.3e-9));
        assert_eq!(ESeries::E96.nearest(4_990.0), Some(4_990.0));
        assert_eq!(ESeries::E192.nearest(9.2e3), Some(9.2e3));
        // Ratio, not difference: 1.5 and 2.2 around 1.8; sqrt(1.5 * 2.2)
        // = 1.817, so 1.81 goes down and 1.82 goes up.
        assert_eq!(ESeries::E6.nearest(1.81), Some(1.5));
        assert_eq!(ESeries::E6.nearest(1.82), Some(2.2));
    }

    #[test]
    fn the_equality_allowance_is_one_part_in_1e9() {
        // Values within 1e-9 relative count as equal (the documented
        // allowance); 4700 from the E24 table (IEC 60063:2015).
        let e24 = ESeries::E24;
        assert_eq!(e24.next_up(4_700.000_000_1), Some(4_700.0));
        assert_eq!(e24.next_up(4_699.999_999_9), Some(4_700.0));
        assert_eq!(e24.next_down(4_699.999_999_9), Some(4_700.0));
        assert_eq!(e24.next_down(4_700.000_000_1), Some(4_700.0));
        // 1e-6 relative is well beyond the allowance.
        assert_eq!(e24.next_up(4_700.01), Some(5_100.0));
        assert_eq!(e24.next_down(4_699.99), Some(4_300.0));
    }

    #[test]
    fn every_standard_value_is_exact_from_1e_minus_15_to_1e15() {
        // Each table value m × 10^k must come back as exactly the f64 the
        // decimal literal "{m}e{k}" parses to (tolerance 0: the result is
        // documented as the nearest f64 to the IEC 60063:2015 value).
        for series in ESeries::ALL {
            for k in -15..=14 {
                for &m in series.values() {
                    let want: f64 = format!("{m}e{k}").parse().unwrap();
                    assert_eq!(series.nearest(want), Some(want), "{series} {m}e{k}");
                    assert_eq!(series.next_up(want), Some(want));
                    assert_eq!(series.next_down(want), Some(want));
                }
            }
        }
        // The limits themselves.
        assert_eq!(ESeries::E24.nearest(1e-15), Some(1e-15));
        assert_eq!(ESeries::E24.nearest(1e15), Some(1e15));
        assert_eq!(ESeries::E24.next_up(9.5e14), Some(1e15));
    }

    #[test]
    fn lookup_reports_neighbours_and_error() {
        // E24 neighbours of 5 kΩ are 4.7 k and 5.1 k (IEC 60063:2015);
        // error = (5100 - 5000) / 5000 = 0.02, to 1e-12 relative (one
        // subtraction and one division of exact values).
        let found = ESeries::E24.lookup(5_000.0).unwrap();
        assert_eq!(found.below, 4_700.0);
        assert_eq!(found.above, 5_100.0);
        assert_eq!(found.nearest, 5_100.0);
        assert!((found.error - 0.02).abs() < 1e-12 * 0.02);
        // On the series: all three equal, error 0 (within 1e-15).
        let on = ESeries::E12.lookup(0.22e-6).unwrap();
        assert_eq!(
            (on.below, on.nearest, on.above),
            (0.22e-6, 0.22e-6, 0.22e-6)
        );
        assert!(on.error.abs() < 1e-15);
    }

    #[test]
    fn invalid_inputs_give_none() {
        // Defined behaviour, no tolerance: no standard value exists for
        // non-positive or non-finite inputs.
        for series in ESeries::ALL {
            for v in [
                0.0,
                -0.0,
                -4_700.0,
                f64::NAN,
                f64::INFINITY,
                f64::NEG_INFINITY,
            ] {
                assert_eq!(series.nearest(v), None);
                assert_eq!(series.next_up(v), None);
                assert_eq!(series.next_down(v), None);
                assert_eq!(series.lookup(v), None);
            }
        }
        // No representable value above the largest f64.
        assert_eq!(ESeries::E24.next_up(f64::MAX), None);
    }

    #[test]
    fn names_parse_and_tolerances() {
        // Names as written in IEC 60063:2015; tolerances from the standard
        // (E3 by common practice), compared to 1e-12 absolute since they
        // are typed constants.
        for series in ESeries::ALL {
            assert_eq!(ESeries::parse(series.name()).unwrap(), series);
            assert_eq!(
                ESeries::parse(&series.name().to_lowercase()).unwrap(),
                series
            );
            assert_eq!(series.to_string().parse::<ESeries>().unwrap(), series);
        }
        assert_eq!(ESeries::parse(" e96 ").unwrap(), ESeries::E96);
        let err = ESeries::parse("E25").unwrap_err();
        assert_eq!(err.field(), "series");
        match err.kind() {
            ErrorKind::Unsupported { value, allowed } => {
                assert_eq!(value, "E25");
                assert_eq!(allowed, "E3, E6, E12, E24, E48, E96 or E192");
            }
            other => panic!("wrong kind {other:?}"),
        }
        let tolerances = [0.40, 0.20, 0.10, 0.05, 0.02, 0.01, 0.005];
        for (series, want) in ESeries::ALL.into_iter().zip(tolerances) {
            assert!((series.tolerance() - want).abs() < 1e-12, "{series}");
        }
    }
}
