//! Reading values the way an engineer types them.
//!
//! Three notations are understood, all with an optional trailing unit
//! symbol:
//!
//! * a plain decimal number: `47`, `-1.5`, `1e-6`, `2.2E3`;
//! * a number followed by an SI prefix (SI Brochure, 9th edition 2019,
//!   table 7), with or without a space: `10u`, `2.2 n`, `100 nF`,
//!   `1.2 MHz`. The case rules of the SI apply: `M` is mega and `m` is
//!   milli. In addition `u` stands for micro (as well as `µ` U+00B5 and
//!   `μ` U+03BC), `K` is accepted for kilo, and `meg`, `Meg` and `MEG`
//!   mean mega, as circuit simulators write it;
//! * the RKM code of IEC 60062, where the prefix letter (or `R` for no
//!   prefix) takes the place of the decimal point: `4k7` = 4700,
//!   `R47` = 0.47, `4R7` = 4.7, `2M2` = 2.2e6, `4n7` = 4.7e-9, `1µ0` = 1e-6.
//!
//! The number is converted to `f64` once, from its decimal digits with the
//! prefix folded into the exponent, so `4k7` and `4.7e3` give exactly the
//! same `f64`, and `2.2n` is exactly the literal `2.2e-9`.
//!
//! Nothing here panics: any `&str` either gives a finite value or a
//! [`ErrorKind::Parse`] error that says what was expected.

use alloc::format;
use alloc::string::String;

use crate::error::{Error, ErrorKind, Result};

/// What is expected when no unit (or an unknown unit) is given.
const EXPECTED_ANY: &str =
    "a number with an optional SI prefix or an RKM code, such as 4k7, 10u, 2.2n, 100 nF or 1e-6";

/// What is expected when the number itself is too large or too small.
const EXPECTED_FINITE: &str =
    "a finite number between about 1e-308 and 1e308 in magnitude, or 0 (with an optional SI prefix)";

/// A unit spelling that may end the text: the symbol and whether it is
/// compared without regard to ASCII case (only the word `ohm` is).
type Spelling = (&'static str, bool);

/// Spellings of the ohm: the letter omega U+03A9 (the symbol of the SI
/// Brochure), the ohm sign U+2126 and the words `ohm` / `ohms`.
const OHM: &[Spelling] = &[
    ("\u{3a9}", false),
    ("\u{2126}", false),
    ("ohms", true),
    ("ohm", true),
];

/// The unit symbols accepted by [`parse_value`], longest match first where
/// one spelling ends another (`ohms` before `s`).
///
/// The volt, ampere, watt and hertz are read in any case (`12v`, `2ma`,
/// `250mw`, `1khz`): no SI prefix or other unit is spelled with those
/// letters, so the case cannot change the meaning. F, H and s keep their
/// case: `f` is femto, `h` is not the henry and `S` is the siemens.
const COMMON_UNITS: &[&[Spelling]] = &[
    OHM,
    &[("Hz", true)],
    &[("F", false)],
    &[("H", false)],
    &[("V", true)],
    &[("A", true)],
    &[("W", true)],
    &[("s", false)],
];

/// Spellings of the degree Celsius for a temperature: `°C`, the sign
/// U+2103, `degC`, and a bare `C` in either case (`25C`; no prefix is
/// written C, and a temperature takes no prefix).
const CELSIUS: &[Spelling] = &[
    ("\u{b0}C", false),
    ("\u{2103}", false),
    ("degc", true),
    ("c", true),
];

/// Reads a value with an optional SI prefix, RKM code and unit symbol.
///
/// Same as [`parse_value_field`] with the field name `value` and any of
/// the unit symbols Ω (or `ohm`), F, H, Hz, V, A, W and s accepted at the
/// end: `4k7`, `4.7 kΩ`, `100nF`, `1.2 MHz`, `-1.5`, `1e-6`.
///
/// # Errors
///
/// [`ErrorKind::Parse`] for anything that is not such a value: empty text,
/// `1.2.3`, `4k7k`, `1x`, `nan`, `inf`, or a number that does not fit in
/// an `f64` such as `1e999`.
pub fn parse_value(text: &str) -> Result<f64> {
    parse_value_field("value", text, "")
}

/// Reads the value of `field`, which is measured in `unit`.
///
/// The text may end with the unit symbol, with or without a space:
/// `100 nF` and `100n` both give 1e-7 for `unit = "F"`; `4.7kΩ`, `4k7 ohm`
/// and `4k7` all give 4700 for `unit = "Ω"`. For the ohm, the symbol
/// Ω (U+03A9, as in the SI Brochure 9th edition), the ohm sign U+2126 and
/// the word `ohm`/`ohms` in any case are accepted. An empty `unit` accepts
/// any of the common symbols, as [`parse_value`] does. Any other unit
/// string (for example `K` for a temperature) is matched exactly.
///
/// Before the unit, the value is a plain number, a number with an SI prefix
/// (f, p, n, u/µ/μ, m, k/K, M/meg, G, T) or an IEC 60062 RKM code (`4k7`,
/// `R47`, `2M2`); see the module documentation.
///
/// # Errors
///
/// [`ErrorKind::Parse`], naming `field`, the text as typed and what would
/// have been accepted, when the text is not such a value or carries a
/// different unit (`10 V` for a capacitance).
pub fn parse_value_field(field: &str, text: &str, unit: &str) -> Result<f64> {
    let fail = |expected: &'static str| {
        Error::new(
            field,
            ErrorKind::Parse {
                text: String::from(text),
                expected,
            },
        )
    };
    let body = strip_unit(text.trim(), unit).trim();
    match parse_number(body) {
        Parsed::Value(value) => Ok(value),
        Parsed::OutOfRange => Err(fail(EXPECTED_FINITE)),
        Parsed::Invalid => Err(fail(expected_for(unit))),
    }
}

/// The outcome of reading the number part.
enum Parsed {
    /// A finite value.
    Value(f64),
    /// Well formed, but overflows to infinity or underflows to zero.
    OutOfRange,
    /// Not a value in any accepted notation.
    Invalid,
}

/// What to tell the user when the text for a quantity in `unit` is not
/// understood; examples in the units they are likely to be typing.
fn expected_for(unit: &str) -> &'static str {
    match unit {
        "\u{3a9}" | "\u{2126}" | "ohm" => {
            "a resistance with an optional SI prefix or an RKM code, such as 4k7, 470R, 4.7 k\u{3a9}, 1M or 100 ohm"
        }
        "F" => "a capacitance with an optional SI prefix or an RKM code, such as 100n, 4n7, 2.2 \u{b5}F or 100 nF",
        "H" => "an inductance with an optional SI prefix or an RKM code, such as 10u, 4m7, 4.7 mH or 1 H",
        "Hz" => "a frequency with an optional SI prefix, such as 20, 10k, 1.2 MHz or 100 Hz",
        "V" => "a voltage with an optional SI prefix or an RKM code, such as 12, 500m, 500 mV or 1.5 V",
        "A" => "a current with an optional SI prefix or an RKM code, such as 1m, 2.5 mA or 100 \u{b5}A",
        "W" => "a power with an optional SI prefix or an RKM code, such as 250m, 0.5 W or 1 W",
        "s" => "a time with an optional SI prefix or an RKM code, such as 10u, 1 ms or 2.5 s",
        _ => EXPECTED_ANY,
    }
}

/// The spellings accepted for `unit`, if it is one of the known units.
fn spellings_for(unit: &str) -> Option<&'static [Spelling]> {
    match unit {
        "\u{3a9}" | "\u{2126}" | "ohm" => Some(OHM),
        "\u{b0}C" => Some(CELSIUS),
        _ => COMMON_UNITS
            .iter()
            .copied()
            .find(|list| list.first().is_some_and(|(s, _)| *s == unit)),
    }
}

/// Removes one trailing unit symbol for `unit` (any common unit when
/// `unit` is empty). Text without a unit is returned unchanged.
fn strip_unit<'a>(text: &'a str, unit: &str) -> &'a str {
    if unit.is_empty() {
        COMMON_UNITS
            .iter()
            .find_map(|list| strip_spelling(text, list))
            .unwrap_or(text)
    } else if let Some(list) = spellings_for(unit) {
        strip_spelling(text, list).unwrap_or(text)
    } else {
        text.strip_suffix(unit).unwrap_or(text)
    }
}

/// Removes the first of `spellings` that ends `text`.
fn strip_spelling<'a>(text: &'a str, spellings: &[Spelling]) -> Option<&'a str> {
    spellings.iter().find_map(|&(symbol, any_case)| {
        if any_case {
            let cut = text.len().checked_sub(symbol.len())?;
            let tail = text.get(cut..)?;
            if tail.eq_ignore_ascii_case(symbol) {
                text.get(..cut)
            } else {
                None
            }
        } else {
            text.strip_suffix(symbol)
        }
    })
}

/// The power of ten of an SI prefix written after a number (SI Brochure
/// 9th ed., table 7, with `u`, `K` and `meg` as common typing forms).
fn prefix_exponent(prefix: &str) -> Option<i32> {
    Some(match prefix {
        "" => 0,
        "f" => -15,
        "p" => -12,
        "n" => -9,
        "u" | "\u{b5}" | "\u{3bc}" => -6,
        "m" => -3,
        "k" | "K" => 3,
        "M" | "meg" | "Meg" | "MEG" => 6,
        "G" => 9,
        "T" => 12,
        _ => return None,
    })
}

/// The power of ten of an RKM code letter (IEC 60062): `R` marks the
/// decimal point of a value without prefix, the prefix letters mark it
/// and scale the value.
fn rkm_exponent(letter: char) -> Option<i32> {
    match letter {
        'R' => Some(0),
        _ => {
            let mut buf = [0u8; 4];
            match prefix_exponent(letter.encode_utf8(&mut buf)) {
                Some(0) | None => None,
                found => found,
            }
        }
    }
}

/// Reads the text left after the unit symbol has been removed.
fn parse_number(body: &str) -> Parsed {
    if body.is_empty() {
        return Parsed::Invalid;
    }
    let (sign, unsigned) = match body.as_bytes()[0] {
        b'-' => ("-", &body[1..]),
        b'+' => ("", &body[1..]),
        _ => ("", body),
    };
    match read_rkm(unsigned).or_else(|| read_prefixed(unsigned)) {
        Some(decimal) => decimal.to_f64(sign),
        None => Parsed::Invalid,
    }
}

/// A decimal number split into its parts: digits before and after the
/// point and a power of ten.
struct Decimal<'a> {
    integer: &'a str,
    fraction: &'a str,
    exponent: i64,
}

impl Decimal<'_> {
    /// Converts to `f64` by one correctly rounded decimal conversion.
    fn to_f64(&self, sign: &str) -> Parsed {
        // The leading and trailing zeros keep both sides of the point
        // non-empty, which the standard parser requires; they do not change
        // the value.
        let text = format!(
            "{sign}0{}.{}0e{}",
            self.integer, self.fraction, self.exponent
        );
        match text.parse::<f64>() {
            Ok(value) if value.is_finite() => {
                let all_zero = self
                    .integer
                    .bytes()
                    .chain(self.fraction.bytes())
                    .all(|b| b == b'0');
                if value == 0.0 && !all_zero {
                    Parsed::OutOfRange
                } else {
                    Parsed::Value(value)
                }
            }
            Ok(_) => Parsed::OutOfRange,
            Err(_) => Parsed::Invalid,
        }
    }
}

/// Reads an IEC 60062 RKM code without sign: digits, one code letter
/// (`R` or a prefix letter) in place of the decimal point, digits. At least
/// one digit is required; `47k` (no digits after the letter) is read here
/// too, with the same result as the prefixed form.
fn read_rkm(text: &str) -> Option<Decimal<'_>> {
    let (at, letter) = text.char_indices().find(|(_, c)| !c.is_ascii_digit())?;
    let exponent = rkm_exponent(letter)?;
    let integer = &text[..at];
    let fraction = &text[at + letter.len_utf8()..];
    if !fraction.bytes().all(|b| b.is_ascii_digit()) || (integer.is_empty() && fraction.is_empty())
    {
        return None;
    }
    Some(Decimal {
        integer,
        fraction,
        exponent: i64::from(exponent),
    })
}

/// Reads a decimal number without sign, an optional exponent, optional
/// spaces and an optional SI prefix: `2.2`, `1e-6`, `4.7 k`, `1.5meg`.
fn read_prefixed(text: &str) -> Option<Decimal<'_>> {
    let bytes = text.as_bytes();
    let digits_from = |start: usize| {
        bytes[start..]
            .iter()
            .position(|b| !b.is_ascii_digit())
            .map_or(bytes.len(), |n| start + n)
    };

    let int_end = digits_from(0);
    let (fraction, mut pos) = if bytes.get(int_end) == Some(&b'.') {
        let end = digits_from(int_end + 1);
        (&text[int_end + 1..end], end)
    } else {
        ("", int_end)
    };
    let integer = &text[..int_end];
    if integer.is_empty() && fraction.is_empty() {
        return None;
    }

    let mut exponent: i64 = 0;
    if matches!(bytes.get(pos), Some(b'e' | b'E')) {
        let mut start = pos + 1;
        let negative = match bytes.get(start) {
            Some(b'-') => {
                start += 1;
                true
            }
            Some(b'+') => {
                start += 1;
                false
            }
            _ => false,
        };
        let end = digits_from(start);
        if end == start {
            return None;
        }
        // Saturate: anything past a few hundred already over- or
        // underflows, and the cap keeps the sum with the prefix exact.
        let magnitude = text[start..end].bytes().fold(0i64, |acc, b| {
            (acc * 10 + i64::from(b - b'0')).min(1_000_000)
        });
        exponent = if negative { -magnitude } else { magnitude };
        pos = end;
    }

    let prefix = prefix_exponent(text[pos..].trim_start())?;
    Some(Decimal {
        integer,
        fraction,
        exponent: exponent + i64::from(prefix),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::string::ToString;
    use std::vec::Vec;

    /// Relative tolerance for values that go through one decimal to binary
    /// conversion: a few units in the last place of an f64 (2^-52 ≈ 2.2e-16).
    const ULP_REL: f64 = 1e-15;

    fn close(got: f64, want: f64) -> bool {
        (got - want).abs() <= ULP_REL * want.abs()
    }

    fn ok(text: &str) -> f64 {
        match parse_value(text) {
            Ok(v) => v,
            Err(e) => panic!("{text:?} should parse: {e}"),
        }
    }

    #[test]
    fn plain_numbers() {
        // Plain decimal notation; expected values are the same decimals
        // as f64 literals, so they agree to 1e-15 relative (one rounding).
        for (text, want) in [
            ("47", 47.0),
            ("-1.5", -1.5),
            ("+3", 3.0),
            ("1e-6", 1e-6),
            ("2.2E3", 2.2e3),
            (".5", 0.5),
            ("5.", 5.0),
            ("  12  ", 12.0),
            ("0", 0.0),
            ("-0.000", 0.0),
        ] {
            assert!(close(ok(text), want), "{text}");
        }
        // 1e-400 underflows an f64: rejected, not silently read as 0.
        assert!(parse_value("1e-400").is_err());
    }

    #[test]
    fn si_prefixes_follow_si_case_rules() {
        // SI Brochure 9th ed., table 7: p n µ m k M G T f; `M` mega and
        // `m` milli; u, K and meg as typed forms. Tolerance 1e-15 relative
        // (one decimal-to-binary rounding on each side).
        for (text, want) in [
            ("10u", 10e-6),
            ("10 \u{b5}", 10e-6),
            ("10\u{3bc}", 10e-6),
            ("2.2n", 2.2e-9),
            ("330p", 330e-12),
            ("1.5m", 1.5e-3),
            ("1.5M", 1.5e6),
            ("1.5meg", 1.5e6),
            ("1.5MEG", 1.5e6),
            ("1.5 Meg", 1.5e6),
            ("4.7k", 4.7e3),
            ("4.7K", 4.7e3),
            ("3G", 3e9),
            ("2T", 2e12),
            ("7f", 7e-15),
            ("1e3k", 1e6),
            ("-12.5 m", -12.5e-3),
        ] {
            assert!(close(ok(text), want), "{text}");
        }
    }

    #[test]
    fn rkm_codes() {
        // IEC 60062 RKM code: the letter stands for the decimal point.
        // Tolerance 1e-15 relative; in fact the parser and the literal go
        // through the same decimal conversion and agree exactly.
        for (text, want) in [
            ("4k7", 4700.0),
            ("4K7", 4700.0),
            ("R47", 0.47),
            ("4R7", 4.7),
            ("470R", 470.0),
            ("0R", 0.0),
            ("47K3", 47_300.0),
            ("2M2", 2.2e6),
            ("4n7", 4.7e-9),
            ("1\u{b5}0", 1e-6),
            ("1u0", 1e-6),
            ("6p8", 6.8e-12),
            ("-4k7", -4700.0),
        ] {
            let got = ok(text);
            assert!(close(got, want), "{text}: {got} vs {want}");
        }
        // Only R and the prefix letters are code letters; a unit letter in
        // the middle is not (3V3 is not an IEC 60062 RKM code).
        assert!(parse_value("3V3").is_err());
        // Exactness claimed in the module docs: same f64 as the literal.
        assert_eq!(ok("4k7").to_bits(), 4.7e3_f64.to_bits());
        assert_eq!(ok("4n7").to_bits(), 4.7e-9_f64.to_bits());
    }

    #[test]
    fn units_are_accepted_and_stripped() {
        // Unit symbols of the SI Brochure 9th ed. (Ω, F, H, Hz, V, A, W, s)
        // and `ohm`; tolerance 1e-15 relative (one rounding).
        let cases: [(&str, &str, f64); 14] = [
            ("100 nF", "F", 100e-9),
            ("100n", "F", 100e-9),
            ("4.7k\u{3a9}", "\u{3a9}", 4700.0),
            ("4k7 ohm", "\u{3a9}", 4700.0),
            ("4k7 Ohms", "\u{3a9}", 4700.0),
            ("4k7\u{2126}", "\u{3a9}", 4700.0),
            ("470R", "\u{3a9}", 470.0),
            ("10 V", "V", 10.0),
            ("1.2 MHz", "Hz", 1.2e6),
            ("1.2 mHz", "Hz", 1.2e-3),
            ("10 mH", "H", 10e-3),
            ("2.5 mA", "A", 2.5e-3),
            ("300 K", "K", 300.0),
            ("1 ms", "s", 1e-3),
        ];
        for (text, unit, want) in cases {
            match parse_value_field("x", text, unit) {
                Ok(v) => assert!(close(v, want), "{text} in {unit}: {v}"),
                Err(e) => panic!("{text} in {unit}: {e}"),
            }
        }
        // parse_value takes any common unit.
        for (text, want) in [
            ("4.7 k\u{3a9}", 4700.0),
            ("100nF", 100e-9),
            ("1.2 MHz", 1.2e6),
            ("10 V", 10.0),
            ("5 mA", 5e-3),
            ("2 W", 2.0),
            ("10 ms", 10e-3),
            ("1 MEGohm", 1e6),
        ] {
            assert!(close(ok(text), want), "{text}");
        }
    }

    #[test]
    fn rejects_with_a_helpful_message() {
        // No tolerance applies: each text must give a Parse error naming
        // the field and the text, with a message listing accepted forms
        // (IEC 60062 RKM code and SI prefixes, as the message says).
        for text in [
            "",
            "   ",
            "1.2.3",
            "1..2",
            "4k7k",
            "1x",
            "k",
            "abc",
            "nan",
            "NaN",
            "inf",
            "-inf",
            "infinity",
            "1e999",
            "-1e999",
            "1e",
            "e5",
            "4 k7",
            "4k 7",
            "R",
            "-",
            ".",
            "1,5",
            "\u{3a9}",
            "1 kk",
            "1e3.5",
            "--1",
            "4.7.k",
            "1e99999999999999999999",
        ] {
            let err = parse_value(text).expect_err(text);
            assert_eq!(err.field(), "value");
            match err.kind() {
                ErrorKind::Parse { text: t, expected } => {
                    assert_eq!(t, text);
                    assert!(expected.contains("such as") || expected.contains("finite"));
                }
                other => panic!("{text}: wrong kind {other:?}"),
            }
        }
        let err = parse_value("1x").unwrap_err();
        assert_eq!(
            err.to_string(),
            "value: cannot read \"1x\" as a value; expected a number with an optional SI prefix \
             or an RKM code, such as 4k7, 10u, 2.2n, 100 nF or 1e-6"
        );
    }

    #[test]
    fn unit_must_match_the_field() {
        // A unit that is not the field's unit is an error, and the message
        // speaks of the quantity (no numeric tolerance involved).
        for (text, unit) in [
            ("10 V", "F"),
            ("1 k\u{3a9}", "F"),
            ("100 nF", "\u{3a9}"),
            ("1 MHz", "s"),
            ("1 ms", "Hz"),
            ("5 A", "V"),
        ] {
            let err = parse_value_field("c1", text, unit).expect_err(text);
            assert_eq!(err.field(), "c1");
            assert!(matches!(err.kind(), ErrorKind::Parse { .. }), "{text}");
        }
        let err = parse_value_field("c1", "10 V", "F").unwrap_err();
        assert!(err.to_string().contains("capacitance"), "{err}");
    }

    #[test]
    fn never_panics_and_only_returns_finite_values() {
        // Robustness, not a numeric check: every input either fails or
        // gives a finite f64 (tolerance: none needed, the property is
        // finiteness). Exhaustive over short strings of awkward symbols.
        let alphabet = [
            "0",
            "7",
            ".",
            "e",
            "E",
            "-",
            "+",
            " ",
            "k",
            "K",
            "R",
            "M",
            "m",
            "g",
            "\u{b5}",
            "\u{3bc}",
            "\u{3a9}",
            "\u{2126}",
            "F",
            "H",
            "z",
            "s",
            "x",
            "\u{e9}",
            "\u{0}",
            "\u{1f600}",
            "\u{a0}",
            "\u{202f}",
        ];
        let mut inputs: Vec<String> = Vec::new();
        for a in alphabet {
            for b in alphabet {
                for c in alphabet {
                    inputs.push([a, b, c].concat());
                }
            }
        }
        inputs.push("1".repeat(10_000));
        inputs.push(["0.", &"0".repeat(5_000), "1"].concat());
        inputs.push(["1e-", &"9".repeat(5_000)].concat());
        inputs.push("\u{3a9}".repeat(1_000));
        inputs.push("4k7".repeat(1_000));
        inputs.push("1e308k".to_string());
        inputs.push("1.8e308".to_string());
        inputs.push("\u{feff}1".to_string());
        for text in &inputs {
            for unit in ["", "\u{3a9}", "F", "Hz", "K", "\u{1f600}"] {
                if let Ok(v) = parse_value_field("f", text, unit) {
                    assert!(v.is_finite(), "{text:?} gave {v}");
                }
            }
        }
        // Overflow is reported, never turned into infinity.
        assert!(parse_value("1e308k").is_err());
        assert!(parse_value(&"1".repeat(10_000)).is_err());
    }

    #[test]
    fn unambiguous_unit_symbols_read_in_either_case() {
        // (text, unit, value): V, A, W and Hz in any case; °C also as C.
        for (text, unit, want) in [
            ("12v", "V", 12.0),
            ("12 V", "V", 12.0),
            ("650mv", "V", 0.65),
            ("2ma", "A", 2e-3),
            ("250mW", "W", 0.25),
            ("1khz", "Hz", 1e3),
            ("1 KHZ", "Hz", 1e3),
            ("25C", "\u{b0}C", 25.0),
            ("25 c", "\u{b0}C", 25.0),
            ("-40 \u{b0}C", "\u{b0}C", -40.0),
            ("85 degC", "\u{b0}C", 85.0),
            ("2.2f", "F", 2.2e-15),
        ] {
            let got = parse_value_field("x", text, unit).unwrap_or_else(|e| panic!("{text}: {e}"));
            assert!(
                (got - want).abs() <= want.abs() * 1e-15,
                "{text}: {got} vs {want}"
            );
        }
        // Case still matters where it changes the meaning: 1 mF is not 1 MF.
        assert_eq!(parse_value_field("c", "1mF", "F").unwrap(), 1e-3);
        assert!(
            parse_value_field("c", "1mf", "F").is_err(),
            "f after m is no farad"
        );
    }
}
