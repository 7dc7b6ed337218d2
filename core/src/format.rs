//! Printing values the way an engineer writes them.
//!
//! Values are shown in engineering notation: a number between 1 and 999
//! followed by an SI prefix whose exponent is a multiple of three and the
//! unit symbol, as in `4.7 kΩ`, `22 nF` or `-12.5 mA`. The prefixes and the
//! space between number and unit follow the SI Brochure, 9th edition (2019),
//! sections 3 and 5.4.3; micro is written with U+00B5 `µ`.
//!
//! Rounding is done once, on the decimal digits, so a carry moves the value
//! into the next prefix: 0.99996 V to three digits is `1 V`, not `1000 mV`.

use alloc::format;
use alloc::string::{String, ToString};

/// SI prefixes used for engineering notation, from femto to tera
/// (SI Brochure, 9th edition 2019, table 7), as (power of ten, symbol).
const PREFIXES: [(i32, &str); 10] = [
    (-15, "f"),
    (-12, "p"),
    (-9, "n"),
    (-6, "\u{b5}"),
    (-3, "m"),
    (0, ""),
    (3, "k"),
    (6, "M"),
    (9, "G"),
    (12, "T"),
];

/// Decimal exponents for which a value without a prefix is written out in
/// full (`0.0001` to `999999999`); outside this range it is written as
/// `1.5e-6`.
const PLAIN_EXPONENTS: core::ops::RangeInclusive<i32> = -4..=8;

/// Formats `value` in `unit` with three significant digits.
///
/// This is [`format_value`] with `digits = 3`: `4.7 kΩ`, `22 nF`,
/// `1.25 MHz`, `0 V`, `-12.5 mA`, `25 °C`, `-3.01 dB`, and for an empty
/// unit a plain number such as `-43.8`.
pub fn format_si(value: f64, unit: &str) -> String {
    format_value(value, unit, 3)
}

/// Formats `value` in `unit` with `digits` significant digits (clamped to
/// `1..=15`), trailing zeros removed.
///
/// * Units that take SI prefixes (Ω, F, H, Hz, V, A, W, s, K, …) are written
///   in engineering notation with the prefixes f, p, n, µ, m, k, M, G and T
///   of the SI Brochure (9th edition, 2019). A value whose rounded exponent
///   falls outside femto..tera is written in scientific notation, as in
///   `1.5e15 Hz`.
/// * Units that do not take prefixes, namely the empty unit (a plain ratio),
///   `%`, `‰`, `ppm`, anything starting with `dB` or `°`, `deg`, `K/W`,
///   `V/V` and `A/A`, are written as a plain number: `25 °C`, `-3.01 dB`,
///   `12.5 %`, `0.987`. The degree sign of a plane angle is written
///   without a space (`45°`), as the SI Brochure does; every other unit is
///   separated by a space.
/// * Non-finite values give `∞ Ω` (with the unit) for +∞, `-∞ Ω` for -∞
///   and an em dash `—` for NaN.
/// * Zero, including -0, is written as `0` with the bare unit: `0 V`.
pub fn format_value(value: f64, unit: &str, digits: usize) -> String {
    let digits = digits.clamp(1, 15);
    if value.is_nan() {
        return "\u{2014}".to_string();
    }
    if value.is_infinite() {
        let number = if value > 0.0 { "\u{221e}" } else { "-\u{221e}" };
        return attach_unit(number, "", unit);
    }
    if value == 0.0 {
        return attach_unit("0", "", unit);
    }

    let sign = if value < 0.0 { "-" } else { "" };
    let (mantissa, exponent) = round_to_digits(value.abs(), digits);

    if takes_prefix(unit) {
        let engineering = exponent.div_euclid(3) * 3;
        if let Some(&(_, prefix)) = PREFIXES.iter().find(|(p, _)| *p == engineering) {
            let number = place_point(&mantissa, exponent - engineering + 1);
            attach_unit(&[sign, &number].concat(), prefix, unit)
        } else {
            attach_unit(&[sign, &scientific(&mantissa, exponent)].concat(), "", unit)
        }
    } else {
        let number = if PLAIN_EXPONENTS.contains(&exponent) {
            place_point(&mantissa, exponent + 1)
        } else {
            scientific(&mantissa, exponent)
        };
        attach_unit(&[sign, &number].concat(), "", unit)
    }
}

/// Writes `value` in `unit` with exactly the digits needed to read it back
/// as the same `f64` (the shortest decimal that rounds to it), in the
/// engineering notation of [`format_value`]: `4.7 kΩ`, `2.2 µF`,
/// `32.1807 kΩ`, `0.25 W`, `25 °C`.
///
/// This is how a design is written to a file: engineers read `4.7 µF`
/// where `0.0000047` hides the value, and the value parser
/// ([`crate::parse_value`]) folds the prefix into the decimal exponent, so
/// the text reads back bit for bit. Non-finite values are written as
/// [`format_value`] writes them (a design never holds one).
pub fn format_exact(value: f64, unit: &str) -> String {
    if !value.is_finite() || value == 0.0 {
        return format_value(value, unit, 3);
    }
    let sign = if value < 0.0 { "-" } else { "" };
    // The shortest round-trip digits: `{:e}` gives them as d.ddde±x.
    let text = format!("{:e}", value.abs());
    let (mantissa, exponent) = text.split_once('e').unwrap_or((&text, "0"));
    let digits: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    let exponent: i32 = exponent.parse().unwrap_or(0);
    if takes_prefix(unit) {
        let engineering = exponent.div_euclid(3) * 3;
        if let Some(&(_, prefix)) = PREFIXES.iter().find(|(p, _)| *p == engineering) {
            let number = place_point(&digits, exponent - engineering + 1);
            return attach_unit(&[sign, &number].concat(), prefix, unit);
        }
        return attach_unit(&[sign, &scientific(&digits, exponent)].concat(), "", unit);
    }
    let number = if PLAIN_EXPONENTS.contains(&exponent) {
        place_point(&digits, exponent + 1)
    } else {
        scientific(&digits, exponent)
    };
    attach_unit(&[sign, &number].concat(), "", unit)
}

/// Whether `unit` is written with SI prefixes.
///
/// Relative units (ratios, percent, decibels) and the degree units do not
/// take prefixes: the SI Brochure does not use prefixes with °C or with
/// the degree of angle, and a gain in dB or % is not scaled by powers of
/// 1000. Thermal resistance in K/W is conventionally written unscaled too.
pub(crate) fn takes_prefix(unit: &str) -> bool {
    !(unit.is_empty()
        || unit.starts_with("dB")
        || unit.starts_with('\u{b0}')
        || matches!(
            unit,
            "%" | "\u{2030}" | "ppm" | "deg" | "K/W" | "V/V" | "A/A"
        ))
}

/// Joins number, prefix and unit with the spacing of the SI Brochure
/// (section 5.4.3): a space before the unit, except for the plane-angle
/// degree, minute and second signs, which follow the number directly.
fn attach_unit(number: &str, prefix: &str, unit: &str) -> String {
    if unit.is_empty() && prefix.is_empty() {
        number.to_string()
    } else if prefix.is_empty() && matches!(unit, "\u{b0}" | "\u{2032}" | "\u{2033}") {
        [number, unit].concat()
    } else {
        [number, " ", prefix, unit].concat()
    }
}

/// Rounds a positive finite `x` to `digits` significant digits.
///
/// Returns the digits (ASCII, exactly `digits` of them, the first non-zero)
/// and the decimal exponent of the first digit, so that
/// `x ≈ 0.d1d2d3… × 10^(exponent + 1)`. The rounding is done by the
/// standard library's exact decimal conversion, so a carry (9.9996 → 10.0)
/// is already reflected in the exponent.
fn round_to_digits(x: f64, digits: usize) -> (String, i32) {
    let text = format!("{:.*e}", digits - 1, x);
    let (mantissa, exponent) = text.split_once('e').unwrap_or((&text, "0"));
    let digits_only: String = mantissa.chars().filter(char::is_ascii_digit).collect();
    (digits_only, exponent.parse().unwrap_or(0))
}

/// Writes the digit string with `int_len` digits before the decimal point
/// (padding with zeros on either side as needed) and trims trailing
/// zeros of the fraction.
fn place_point(digits: &str, int_len: i32) -> String {
    let mut out = String::with_capacity(digits.len() + 8);
    if int_len <= 0 {
        out.push_str("0.");
        for _ in 0..(-int_len) {
            out.push('0');
        }
        out.push_str(digits);
    } else {
        let int_len = int_len as usize;
        if int_len >= digits.len() {
            out.push_str(digits);
            for _ in digits.len()..int_len {
                out.push('0');
            }
        } else {
            out.push_str(&digits[..int_len]);
            out.push('.');
            out.push_str(&digits[int_len..]);
        }
    }
    trim_fraction(out)
}

/// Scientific notation with the digits of the mantissa: `1.5e15`, `2e-18`.
fn scientific(digits: &str, exponent: i32) -> String {
    format!("{}e{}", place_point(digits, 1), exponent)
}

/// Removes trailing zeros after a decimal point, and the point if nothing
/// is left after it.
fn trim_fraction(mut s: String) -> String {
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Asserts that a formatted value reads back as the value within
    /// `rel`, the rounding allowed by the number of digits shown.
    fn reads_back(text: &str, value: f64, rel: f64) {
        let number = text.split(' ').next().unwrap_or("");
        let (num, scale) = match text.split(' ').nth(1).and_then(|u| u.chars().next()) {
            Some('f') => (number, 1e-15),
            Some('p') => (number, 1e-12),
            Some('n') => (number, 1e-9),
            Some('\u{b5}') => (number, 1e-6),
            Some('m') => (number, 1e-3),
            Some('k') => (number, 1e3),
            Some('M') => (number, 1e6),
            Some('G') => (number, 1e9),
            Some('T') => (number, 1e12),
            _ => (number, 1.0),
        };
        let back: f64 = num.parse::<f64>().unwrap() * scale;
        assert!(
            (back - value).abs() <= rel * value.abs(),
            "{text} reads back as {back}, expected {value} within {rel}"
        );
    }

    #[test]
    fn engineering_notation_with_three_digits() {
        // Exact text expected; the tolerance is the 3-significant-digit
        // rounding itself, checked again by reading the text back within
        // half a unit in the third digit (5e-3 relative). Prefix symbols
        // and spacing from the SI Brochure 9th ed. (table 7, section 5.4.3).
        let cases: [(f64, &str, &str); 12] = [
            (4700.0, "\u{3a9}", "4.7 k\u{3a9}"),
            (22e-9, "F", "22 nF"),
            (1.25e6, "Hz", "1.25 MHz"),
            (-12.5e-3, "A", "-12.5 mA"),
            (100.0, "\u{3a9}", "100 \u{3a9}"),
            (1e6, "\u{3a9}", "1 M\u{3a9}"),
            (330e-12, "F", "330 pF"),
            (4990.0, "\u{3a9}", "4.99 k\u{3a9}"),
            (999e-3, "V", "999 mV"),
            (10e-6, "F", "10 \u{b5}F"),
            (2.2e-15, "F", "2.2 fF"),
            (47e12, "Hz", "47 THz"),
        ];
        for (value, unit, want) in cases {
            let got = format_si(value, unit);
            assert_eq!(got, want);
            reads_back(&got, value, 5e-3);
        }
    }

    #[test]
    fn rounding_carry_moves_to_next_prefix() {
        // 0.99996 rounds to 1.00 at 3 significant digits; the carry must
        // change the prefix (SI Brochure 9th ed.: one prefix, value in
        // 1..1000). Exact text, tolerance 0: the carry is the property.
        assert_eq!(format_si(999.96e-3, "V"), "1 V");
        assert_eq!(format_si(999_960.0, "\u{3a9}"), "1 M\u{3a9}");
        assert_eq!(format_si(9.9996e-7, "A"), "1 \u{b5}A");
        assert_eq!(format_si(-999.7, "W"), "-1 kW");
        // 999.4 stays below the carry: half a unit in the 3rd digit.
        assert_eq!(format_si(999.4, "W"), "999 W");
    }

    #[test]
    fn zero_and_beyond_the_prefix_table() {
        // The prefix table of the SI Brochure 9th ed. is used from f
        // (1e-15) to T (1e12) here; beyond that, scientific notation with
        // 3 significant digits (tolerance: the rounding of the 3rd digit).
        assert_eq!(format_si(0.0, "V"), "0 V");
        assert_eq!(format_si(-0.0, "V"), "0 V");
        assert_eq!(format_si(1.5e15, "Hz"), "1.5e15 Hz");
        assert_eq!(format_si(2.346e-18, "F"), "2.35e-18 F");
        // 999.96 T carries into 1e15 and so leaves the table.
        assert_eq!(format_si(999.96e12, "Hz"), "1e15 Hz");
        assert_eq!(format_si(1e-15, "F"), "1 fF");
        reads_back(&format_si(999.4e12, "Hz"), 999.4e12, 5e-3);
    }

    #[test]
    fn units_without_prefixes() {
        // The SI Brochure 9th ed. writes °C and relative quantities without
        // prefixes, with a space before °C and % (section 5.4.3) and no
        // space before the angle degree. 3 significant digits, exact text.
        assert_eq!(format_si(25.0, "\u{b0}C"), "25 \u{b0}C");
        assert_eq!(format_si(-3.0103, "dB"), "-3.01 dB");
        assert_eq!(format_si(12.5, "%"), "12.5 %");
        assert_eq!(format_si(-43.8123, ""), "-43.8");
        assert_eq!(format_si(0.98712, ""), "0.987");
        assert_eq!(format_si(45.0, "\u{b0}"), "45\u{b0}");
        assert_eq!(format_si(123_456.0, ""), "123000");
        assert_eq!(format_si(0.000_123_4, ""), "0.000123");
        assert_eq!(format_si(1.234e-5, ""), "1.23e-5");
        assert_eq!(format_si(2.5e9, ""), "2.5e9");
        assert_eq!(format_si(1500.0, "K/W"), "1500 K/W");
        // Kelvin is an SI unit and does take prefixes.
        assert_eq!(format_si(0.025, "K"), "25 mK");
    }

    #[test]
    fn non_finite_values() {
        // Display convention of this crate (no standard applies): infinity
        // sign with the unit, em dash for NaN. Exact text, tolerance 0.
        assert_eq!(format_si(f64::INFINITY, "\u{3a9}"), "\u{221e} \u{3a9}");
        assert_eq!(format_si(f64::NEG_INFINITY, ""), "-\u{221e}");
        assert_eq!(format_si(f64::NEG_INFINITY, "V"), "-\u{221e} V");
        assert_eq!(format_si(f64::NAN, "V"), "\u{2014}");
    }

    #[test]
    fn chosen_number_of_digits() {
        // Significant digits are clamped to 1..=15; each result must read
        // back within half a unit in its last digit (0.5 * 10^(1-digits)
        // relative, the definition of rounding to that many digits).
        assert_eq!(format_value(4_712.345, "\u{3a9}", 5), "4.7123 k\u{3a9}");
        assert_eq!(format_value(4_712.345, "\u{3a9}", 1), "5 k\u{3a9}");
        assert_eq!(format_value(4_712.345, "\u{3a9}", 0), "5 k\u{3a9}");
        assert_eq!(format_value(1.0 / 3.0, "V", 15), "333.333333333333 mV");
        assert_eq!(format_value(1.0 / 3.0, "V", 99), "333.333333333333 mV");
        assert_eq!(format_value(16_000.0, "Hz", 1), "20 kHz");
        assert_eq!(format_value(-0.5, "", 4), "-0.5");
        for digits in 1..=15 {
            let value = 12_345.678_9e-6;
            let text = format_value(value, "A", digits);
            reads_back(
                &text,
                value,
                0.5 * libm::pow(10.0, 1.0 - digits as f64) + 1e-15,
            );
        }
    }

    #[test]
    fn every_magnitude_reads_back() {
        // Sweep 1e-15..1e12 in irregular steps; every text must read back
        // within 5e-3 (3 significant digits) and use exactly one prefix
        // from the SI Brochure 9th ed. table.
        let mut value = 1.0e-15_f64;
        while value < 1e12 {
            let text = format_si(value, "F");
            assert!(!text.contains('e'), "{text}");
            reads_back(&text, value, 5e-3);
            value *= 1.37;
        }
    }

    #[test]
    fn exact_values_read_back_bit_for_bit() {
        for (value, unit, want) in [
            (4.7e3, "Ω", "4.7 kΩ"),
            (2.2e-6, "F", "2.2 µF"),
            (4.7e-6, "F", "4.7 µF"),
            (120e3, "Ω", "120 kΩ"),
            (32180.7, "Ω", "32.1807 kΩ"),
            (0.25, "W", "250 mW"),
            (1e6, "Ω", "1 MΩ"),
            (25.0, "°C", "25 °C"),
            (0.1 + 0.2, "V", "300.00000000000004 mV"),
        ] {
            let text = format_exact(value, unit);
            assert_eq!(text, want);
            let back = crate::value::parse_value_field("x", &text, unit).expect("reads back");
            assert_eq!(back.to_bits(), value.to_bits(), "{text}");
        }
        // Every E96 value at every decade reads back exactly.
        for &m in crate::eseries::ESeries::E96.values() {
            for e in -15..=12 {
                let v = m * libm::pow(10.0, e as f64);
                let back =
                    crate::value::parse_value_field("x", &format_exact(v, "Ω"), "Ω").unwrap();
                assert_eq!(back.to_bits(), v.to_bits(), "{v}");
            }
        }
    }
}
