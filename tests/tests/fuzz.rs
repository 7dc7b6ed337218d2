//! A seeded mutation harness over the readers: the design file, the
//! specification file and the value parser, with the properties the
//! command line and the page rely on.
//!
//! (cargo-fuzz needs a nightly toolchain, which these machines do not
//! have; a seeded harness on the stable one runs everywhere, in CI too,
//! and replays exactly.)
//!
//! Inputs: every file in `examples/`, `examples/specs/` and
//! `examples/broken/`, mutated at random: bytes flipped, inserted, deleted
//! or repeated; a value replaced by a hostile one (numbers at and beyond
//! the limits of a double, 0, −0, tiny and huge parts, text that is almost
//! a value, `true`, `null`, objects, lists, deep nesting, a megabyte of
//! text, names of JavaScript properties); a key renamed, emptied or given
//! twice. Properties, for every input:
//!
//! - reading never panics; it gives a design (or specification) or an
//!   error whose message is non-empty, at most [`MAX_MESSAGE`] characters,
//!   and names its field when it has one;
//! - a design that reads analyses to a report or to such an error, and the
//!   report's JSON has a number at every key that promises one (`null`
//!   only where the README allows it: `design.preset` and the corners and
//!   unity-gain frequencies that a stage may not have);
//! - a specification that reads designs to a result or to such an error;
//! - `parse_value` never panics, and any value it returns is finite.
//!
//! Case counts: [`DESIGN_CASES`] designs, [`SPEC_CASES`] specifications and
//! [`VALUE_CASES`] value strings, times `STAGEWRIGHT_CASES` (default 1),
//! from the seed `STAGEWRIGHT_SEED` (default [`DEFAULT_SEED`]), which is
//! printed; `scripts/explore.sh` runs many seeds and more cases.

use rand_core::Rng;
use rand_pcg::Pcg64;
use serde_json::Value;
use stagewright::{parse_value, synthesize, Design, Report, SpecFile};

/// The seed of CI runs.
const DEFAULT_SEED: u64 = 20_261_202;
/// Mutated design files per run.
const DESIGN_CASES: u64 = 4000;
/// Mutated specification files per run.
const SPEC_CASES: u64 = 300;
/// Random value strings per run.
const VALUE_CASES: u64 = 20_000;
/// Longest message allowed: a message quotes at most 40 characters of
/// what was typed (`MAX_ECHO`) and a field path of at most 160; the
/// longest structured message, synthesis' "cannot be met" with the
/// requirements in conflict, runs to about 700 characters.
const MAX_MESSAGE: usize = 1000;

/// The run's seed and case multiplier, printed.
fn run_settings(what: &str) -> (u64, u64) {
    let seed = std::env::var("STAGEWRIGHT_SEED")
        .ok()
        .and_then(|s| s.trim().parse().ok())
        .unwrap_or(DEFAULT_SEED);
    let scale = std::env::var("STAGEWRIGHT_CASES")
        .ok()
        .and_then(|s| s.trim().parse::<u64>().ok())
        .unwrap_or(1)
        .max(1);
    eprintln!("fuzz {what}: seed {seed}, cases ×{scale} (replay with STAGEWRIGHT_SEED={seed})");
    (seed, scale)
}

/// The files of `dir` (relative to the repository) ending in `suffix`.
fn corpus(dir: &str, suffix: &str) -> Vec<String> {
    let root = concat!(env!("CARGO_MANIFEST_DIR"), "/..");
    let mut out: Vec<String> = std::fs::read_dir(format!("{root}/{dir}"))
        .unwrap_or_else(|e| panic!("{dir}: {e}"))
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().ends_with(suffix))
        .map(|e| String::from_utf8_lossy(&std::fs::read(e.path()).expect("readable")).into_owned())
        .collect();
    out.sort();
    assert!(!out.is_empty(), "{dir} holds examples");
    out
}

/// Hostile replacement values, as JSON text.
fn hostile(rng: &mut Pcg64) -> String {
    const FIXED: &[&str] = &[
        "0",
        "-0",
        "-1",
        "1e-300",
        "1e-30",
        "1e-12",
        "1e-15",
        "5e-324",
        "1e308",
        "1.7976931348623157e308",
        "1e400",
        "-1e400",
        "123456789012345678901234567890",
        "true",
        "false",
        "null",
        "{}",
        "[]",
        "[1, 2]",
        "{\"a\": 1}",
        "\"\"",
        "\" \"",
        "\"nan\"",
        "\"inf\"",
        "\"-inf\"",
        "\"1e999\"",
        "\"4k7k\"",
        "\"4k7\"",
        "\"10 nF\"",
        "\"1.2 MHz\"",
        "\"25 °C\"",
        "\"1%\"",
        "\"-5 %\"",
        "\"0x10\"",
        "\"constructor\"",
        "\"__proto__\"",
        "\"toString\"",
        "\"hasOwnProperty\"",
        "\"common-emitter\"",
        "\" common-base\"",
        "\"npn\"",
        "\"pnp\"",
        "\"general-purpose-npn\"",
        "\"stagewright/1\"",
        "\" stagewright/1\"",
        "\"stagewright/2\"",
        "\"stagewright-spec/1\"",
        "\"\\u0000\"",
        "\"<img src=x onerror=alert(1)>\"",
        "\"</script>\"",
    ];
    match rng.next_u32() % 16 {
        0 => "[".repeat(1 + (rng.next_u32() % 3000) as usize),
        1 => {
            let n = 1 + (rng.next_u32() % 40) as usize;
            "[".repeat(n) + &"]".repeat(n)
        }
        4 => format!(
            "\"{}\"",
            "w".repeat(1 + (rng.next_u32() % 200_000) as usize)
        ),
        2 | 3 => format!("{:e}", f64::from_bits(rng.next_u64()))
            .replace("NaN", "1")
            .replace("inf", "1e999"),
        _ => FIXED[(rng.next_u32() as usize) % FIXED.len()].to_owned(),
    }
}

/// Byte offsets of the starts and ends of the JSON values after colons
/// (a rough scan: enough to replace a value with another).
fn value_spans(text: &str) -> Vec<(usize, usize)> {
    let b = text.as_bytes();
    let mut out = Vec::new();
    let mut i = 0;
    while i < b.len() {
        if b[i] == b':' {
            let mut s = i + 1;
            while s < b.len() && b[s] == b' ' {
                s += 1;
            }
            let mut e = s;
            if e < b.len() && b[e] == b'"' {
                e += 1;
                while e < b.len() && b[e] != b'"' {
                    e += 1 + usize::from(b[e] == b'\\');
                }
                e = (e + 1).min(b.len());
            } else {
                while e < b.len() && !matches!(b[e], b',' | b'}' | b'\n' | b'{' | b'[') {
                    e += 1;
                }
            }
            out.push((s, e));
        }
        i += 1;
    }
    out
}

/// Byte offsets of the keys (their quotes included).
fn key_spans(text: &str) -> Vec<(usize, usize)> {
    let b = text.as_bytes();
    let mut out = Vec::new();
    for (i, _) in text.match_indices("\":") {
        if let Some(start) = text[..i].rfind('"') {
            if b[..start]
                .iter()
                .rev()
                .find(|c| !c.is_ascii_whitespace())
                .is_some_and(|c| matches!(c, b'{' | b','))
            {
                out.push((start, i + 1));
            }
        }
    }
    out
}

/// One random mutation of `text`.
fn mutate(rng: &mut Pcg64, text: &str) -> String {
    let mut out = text.to_owned();
    // One mutation three times in four, else two or three.
    let count = if !rng.next_u32().is_multiple_of(4) {
        1
    } else {
        2 + rng.next_u32() % 2
    };
    for _ in 0..count {
        let pick = |rng: &mut Pcg64, n: usize| (rng.next_u64() % n.max(1) as u64) as usize;
        match rng.next_u32() % 12 {
            0..=5 => {
                let spans = value_spans(&out);
                if let Some(&(s, e)) = spans.get(pick(rng, spans.len())) {
                    out.replace_range(s..e, &hostile(rng));
                }
            }
            6 => {
                let spans = key_spans(&out);
                if let Some(&(s, e)) = spans.get(pick(rng, spans.len())) {
                    match rng.next_u32() % 4 {
                        0 => out.replace_range(s..e, "\"\""),
                        1 => out.replace_range(
                            s..e,
                            &format!("\"{}\"", "k".repeat(pick(rng, 100_000) + 1)),
                        ),
                        2 => out.replace_range(s..e, "\"__proto__\""),
                        // The key given twice: its entry repeated.
                        _ => {
                            let end = out[e..].find([',', '}']).map_or(out.len(), |k| e + k);
                            let entry = out[s..end].to_owned();
                            out.insert_str(s, &format!("{entry}, "));
                        }
                    }
                }
            }
            7 => {
                // A byte flipped, inserted or deleted (kept as valid UTF-8).
                let mut bytes = out.into_bytes();
                let at = pick(rng, bytes.len());
                match rng.next_u32() % 3 {
                    0 if at < bytes.len() => bytes[at] ^= 1 << (rng.next_u32() % 7),
                    1 => bytes.insert(at.min(bytes.len()), b"{}[],:\"0-e.\\ "[pick(rng, 13)]),
                    _ if at < bytes.len() => {
                        bytes.remove(at);
                    }
                    _ => {}
                }
                out = String::from_utf8_lossy(&bytes).into_owned();
            }
            8 => {
                // A range repeated.
                let a = pick(rng, out.len());
                let b = (a + pick(rng, 64)).min(out.len());
                if out.is_char_boundary(a) && out.is_char_boundary(b) {
                    let piece = out[a..b].to_owned();
                    out.insert_str(b, &piece);
                }
            }
            9 => {
                // Cut short.
                let mut at = pick(rng, out.len());
                while !out.is_char_boundary(at) {
                    at -= 1;
                }
                out.truncate(at);
            }
            _ => {
                // Wrapped in a list or nested inside itself.
                out = if rng.next_u32().is_multiple_of(2) {
                    format!("[{out}]")
                } else {
                    format!("{{\"notes\": {out}}}")
                };
            }
        }
    }
    out
}

/// Checks an error message: non-empty, bounded, naming its field.
#[track_caller]
fn check_error(input: &str, e: &stagewright::Error) {
    let m = e.to_string();
    assert!(!m.is_empty(), "empty message for {}", shorten(input));
    assert!(
        m.chars().count() <= MAX_MESSAGE,
        "a message of {} characters for {}: {}…",
        m.chars().count(),
        shorten(input),
        m.chars().take(200).collect::<String>()
    );
    if !e.field().is_empty() {
        assert!(m.contains(e.field()), "{m} does not name {}", e.field());
    }
}

fn shorten(text: &str) -> String {
    text.chars().take(300).collect()
}

/// Keys of the report that may be `null` (README, "The report").
const NULLABLE: &[&str] = &[
    "design.preset",
    "bandwidth.f_low",
    "bandwidth.f_high",
    "bandwidth.f_unity_current_gain",
    "bandwidth.f_unity_power_gain",
];

/// Every `null` of `v` (a serialised non-finite number becomes `null`) is
/// at a key that may be null.
fn check_no_null(v: &Value, path: &str, input: &str) {
    match v {
        Value::Null => assert!(
            NULLABLE.contains(&path),
            "report key {path} is null (not a number) for {}",
            shorten(input)
        ),
        Value::Object(m) => {
            for (k, x) in m {
                let p = if path.is_empty() {
                    k.clone()
                } else {
                    format!("{path}.{k}")
                };
                check_no_null(x, &p, input);
            }
        }
        Value::Array(a) => {
            for x in a {
                check_no_null(x, path, input);
            }
        }
        _ => {}
    }
}

#[test]
fn design_reader_and_analysis_hold_on_mutated_files() {
    let (seed, scale) = run_settings("designs");
    let mut rng = Pcg64::new(seed as u128, 0xa02b_dbf7_bb3c_0a7a_c28f_a16a_64ab_f96d);
    // The valid examples four times in five, the broken ones otherwise.
    let good = corpus("examples", ".json");
    let broken = corpus("examples/broken", ".json");
    let (mut read, mut analysed) = (0u64, 0u64);
    for i in 0..DESIGN_CASES * scale {
        let base = if i % 5 == 4 {
            &broken[(i as usize / 5) % broken.len()]
        } else {
            &good[(i as usize) % good.len()]
        };
        let input = mutate(&mut rng, base);
        match Design::from_json(&input) {
            Err(e) => check_error(&input, &e),
            Ok(design) => {
                read += 1;
                match design.analyze() {
                    Err(e) => check_error(&input, &e),
                    Ok(a) => {
                        analysed += 1;
                        let report = Report::new(&design, &a);
                        let v: Value = serde_json::from_str(&report.to_json_string())
                            .expect("the report is JSON");
                        check_no_null(&v, "", &input);
                        let _ = report.to_text();
                    }
                }
            }
        }
    }
    eprintln!(
        "fuzz designs: {} cases, {read} read, {analysed} analysed",
        DESIGN_CASES * scale
    );
    // Most mutations break the file; some must still read, or the harness
    // would test the error path alone.
    assert!(read > 0 && analysed > 0, "read {read}, analysed {analysed}");
}

#[test]
fn spec_reader_and_synthesis_hold_on_mutated_files() {
    let (seed, scale) = run_settings("specifications");
    let mut rng = Pcg64::new(
        seed as u128 ^ 0x5bec,
        0x0a7a_c28f_a16a_64ab_f96d_a02b_dbf7_bb3d,
    );
    let seeds = corpus("examples/specs", ".spec.json");
    let mut designed = 0u64;
    for i in 0..SPEC_CASES * scale {
        let input = mutate(&mut rng, &seeds[(i as usize) % seeds.len()]);
        match SpecFile::from_json(&input) {
            Err(e) => check_error(&input, &e),
            Ok(spec) => match synthesize(&spec.spec) {
                Err(e) => check_error(&input, &e),
                Ok(_) => designed += 1,
            },
        }
    }
    eprintln!(
        "fuzz specifications: {} cases, {designed} designed",
        SPEC_CASES * scale
    );
    assert!(designed > 0);
}

#[test]
fn value_parser_holds_on_random_text() {
    let (seed, scale) = run_settings("values");
    let mut rng = Pcg64::new(
        seed as u128 ^ 0x7a1e,
        0xf96d_a02b_dbf7_bb3c_0a7a_c28f_a16a_64ab,
    );
    const PIECES: &[&str] = &[
        "0", "1", "4", "7", ".", "e", "E", "-", "+", "k", "K", "M", "m", "u", "µ", "μ", "n", "p",
        "f", "R", "G", "T", " ", "Ω", "ohm", "F", "Hz", "V", "A", "W", "%", "°C", "999", "e308",
        "e-324", "\u{0}", "∞", "nan", "inf", ",", "_",
    ];
    for _ in 0..VALUE_CASES * scale {
        let n = 1 + rng.next_u32() % 8;
        let text: String = (0..n)
            .map(|_| PIECES[(rng.next_u32() as usize) % PIECES.len()])
            .collect();
        if let Ok(v) = parse_value(&text) {
            assert!(v.is_finite(), "{text:?} gave {v}");
        }
    }
}
