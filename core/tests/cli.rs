//! Integration tests of the `stagewright` binary: they run the real
//! executable on the example designs and on the broken files.
//!
//! Index:
//! - `every_example_passes_its_checks`: `check examples/*.json` exits 0.
//! - `json_report_has_the_documented_keys_and_the_core_numbers`: the JSON
//!   report against `Design::analyze` of the same file.
//! - `broken_examples_give_their_expected_messages`: each file in
//!   `examples/broken/` exits 2 with the message in its `.expected` file.
//! - `check_exit_codes_*`: 0 pass, 1 fail, 2 invalid, for one file and mixed.
//! - `standard_input_*`: `-` reads the design from standard input.
//! - `sweep_*`, `values_*`, `presets_*`, `help_*`: the other commands.
//! - `readme_and_module_docs_document_every_report_key`: documentation coverage.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

use serde_json::Value;
use stagewright::{Design, REPORT_FORMAT};

/// The binary under test.
const BIN: &str = env!("CARGO_BIN_EXE_stagewright");

/// The workspace root (the core crate's parent).
fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .parent()
        .expect("the core crate sits inside the workspace")
        .to_path_buf()
}

/// Runs the binary in the workspace root with `args` and `stdin`.
fn run(args: &[&str], stdin: &str) -> Output {
    let mut child = Command::new(BIN)
        .args(args)
        .current_dir(root())
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the stagewright binary starts");
    child
        .stdin
        .take()
        .expect("stdin is piped")
        .write_all(stdin.as_bytes())
        .expect("stdin accepts the text");
    child.wait_with_output().expect("the binary finishes")
}

fn stdout(o: &Output) -> String {
    String::from_utf8(o.stdout.clone()).expect("stdout is UTF-8")
}

fn stderr(o: &Output) -> String {
    String::from_utf8(o.stderr.clone()).expect("stderr is UTF-8")
}

/// The files of `dir` (relative to the root) ending in `ext`, sorted, as
/// paths relative to the root.
fn files(dir: &str, ext: &str) -> Vec<String> {
    let mut out: Vec<String> = std::fs::read_dir(root().join(dir))
        .expect("the folder exists")
        .map(|e| {
            e.expect("a readable entry")
                .file_name()
                .into_string()
                .expect("a UTF-8 name")
        })
        .filter(|n| n.ends_with(ext))
        .map(|n| format!("{dir}/{n}"))
        .collect();
    out.sort();
    out
}

fn read(path: &str) -> String {
    std::fs::read_to_string(root().join(path)).expect("the file is readable")
}

/// Relative closeness; the JSON report writes each f64 in its shortest
/// round-trip form, so the numbers should match to the last bit, and 1e-12
/// only allows for a different summation order in a future refactor.
fn close(a: f64, b: f64) -> bool {
    a == b || (a - b).abs() <= 1e-12 * a.abs().max(b.abs())
}

#[test]
fn every_example_passes_its_checks() {
    let examples = files("examples", ".json");
    assert!(
        examples.len() >= 3,
        "at least three example designs are shipped"
    );
    let mut args = vec!["check"];
    args.extend(examples.iter().map(String::as_str));
    let o = run(&args, "");
    let text = stdout(&o);
    assert_eq!(
        o.status.code(),
        Some(0),
        "every example meets its requirements:\n{text}"
    );
    for e in &examples {
        assert!(
            text.lines()
                .any(|l| l.starts_with("pass") && l.contains(e.as_str())),
            "one pass line names {e}:\n{text}"
        );
    }
}

#[test]
fn json_report_has_the_documented_keys_and_the_core_numbers() {
    for file in files("examples", ".json") {
        let o = run(&["analyze", &file, "--json"], "");
        assert_eq!(o.status.code(), Some(0), "{file} passes: {}", stderr(&o));
        let v: Value = serde_json::from_str(&stdout(&o)).expect("the report is one JSON document");
        let design = Design::from_json(&read(&file)).expect("the example is valid");
        let a = design.analyze().expect("the example solves");
        assert_eq!(
            v["format"], REPORT_FORMAT,
            "{file}: the report names its format"
        );
        let op = &a.operating_point;
        let pairs = [
            ("operating_point", "ic", op.ic),
            ("operating_point", "ib", op.ib),
            ("operating_point", "ie", op.ie),
            ("operating_point", "vce", op.vce),
            ("operating_point", "vbe", op.vbe),
            ("operating_point", "vb", op.vb),
            ("operating_point", "ve", op.ve),
            ("operating_point", "vc", op.vc),
            ("small_signal", "gm", a.small_signal.gm),
            ("small_signal", "r_pi", a.small_signal.r_pi),
            ("small_signal", "r_o", a.small_signal.r_o),
            ("small_signal", "c_pi", a.small_signal.c_pi),
            ("small_signal", "c_mu", a.small_signal.c_mu),
            ("midband", "voltage_gain", a.midband.voltage_gain),
            (
                "midband",
                "voltage_gain_from_source",
                a.midband.voltage_gain_from_source,
            ),
            ("midband", "current_gain", a.midband.current_gain),
            ("midband", "power_gain_db", a.midband.power_gain_db),
            ("midband", "input_impedance", a.midband.input_impedance),
            ("midband", "output_impedance", a.midband.output_impedance),
            ("swing", "positive", a.swing.positive),
            ("swing", "negative", a.swing.negative),
            ("swing", "symmetric", a.swing.symmetric),
            ("dissipation", "transistor", a.dissipation.transistor),
            (
                "dissipation",
                "junction_temperature",
                a.dissipation.junction_temperature.celsius(),
            ),
            (
                "dissipation",
                "supply_current",
                a.dissipation.supply_current,
            ),
        ];
        for (section, key, want) in pairs {
            let got = v[section][key]
                .as_f64()
                .unwrap_or_else(|| panic!("{file}: {section}.{key} is a number"));
            assert!(
                close(got, want),
                "{file}: {section}.{key} is {got}, the core says {want}"
            );
        }
        assert_eq!(
            v["operating_point"]["region"],
            op.region.name(),
            "{file}: the region is named as the core names it"
        );
        for (key, want) in [
            ("f_low", a.bandwidth.f_low),
            ("f_high", a.bandwidth.f_high),
            ("f_unity_current_gain", a.bandwidth.f_unity_current_gain),
            ("f_unity_power_gain", a.bandwidth.f_unity_power_gain),
        ] {
            let got = &v["bandwidth"][key];
            match want {
                Some(w) => assert!(
                    got.as_f64().is_some_and(|g| close(g, w)),
                    "{file}: bandwidth.{key} is {got}, the core says {w}"
                ),
                None => assert!(
                    got.is_null(),
                    "{file}: bandwidth.{key} is null when there is none"
                ),
            }
        }
        for (name, watts) in &a.dissipation.resistors {
            let got = v["dissipation"]["resistors"][*name].as_f64();
            assert!(
                got.is_some_and(|g| close(g, *watts)),
                "{file}: dissipation.resistors.{name} is the core's {watts} W"
            );
        }
        let checks = v["checks"].as_array().expect("checks is a list");
        let want = design.checks(&a);
        assert_eq!(
            checks.len(),
            want.len(),
            "{file}: ratings then requirements, all present"
        );
        for (c, w) in checks.iter().zip(&want) {
            assert_eq!(
                c["id"],
                w.id.as_str(),
                "{file}: checks keep the core's order"
            );
            for key in ["id", "pass", "value", "limit", "unit", "message"] {
                assert!(!c[key].is_null(), "{file}: check {} has {key}", w.id);
            }
        }
        let cautions = v["cautions"].as_array().expect("cautions is a list");
        assert_eq!(
            cautions.len(),
            a.cautions.len(),
            "{file}: every caution is reported"
        );
    }
}

#[test]
fn broken_examples_give_their_expected_messages() {
    let broken = files("examples/broken", ".json");
    let expected = files("examples/broken", ".expected");
    assert!(
        broken.len() >= 6,
        "the broken examples cover at least six mistakes"
    );
    assert_eq!(
        broken
            .iter()
            .map(|f| f.trim_end_matches(".json"))
            .collect::<Vec<_>>(),
        expected
            .iter()
            .map(|f| f.trim_end_matches(".expected"))
            .collect::<Vec<_>>(),
        "every broken file has an .expected message file, and no message file is orphaned"
    );
    for file in &broken {
        let want = read(&file.replace(".json", ".expected"));
        let want = want.trim_end();
        let o = run(&["analyze", file], "");
        assert_eq!(
            o.status.code(),
            Some(2),
            "{file}: an invalid file exits with 2"
        );
        assert_eq!(
            stderr(&o).trim_end(),
            format!("error: {file}: {want}"),
            "{file}: the error names the file and gives the expected message"
        );
        assert!(
            stdout(&o).is_empty(),
            "{file}: nothing is printed as a report"
        );
        let o = run(&["check", file], "");
        assert_eq!(o.status.code(), Some(2), "{file}: check also exits with 2");
        assert!(
            stdout(&o).contains(want),
            "{file}: check prints the same message:\n{}",
            stdout(&o)
        );
    }
}

/// An example design with its requirements tightened past what it meets.
fn failing_design() -> String {
    let text = read("examples/transducer-gain-stage.json");
    assert!(
        text.contains("\"min_swing\": 1,"),
        "the example sets min_swing to 1 V"
    );
    text.replace("\"min_swing\": 1,", "\"min_swing\": 20,")
}

#[test]
fn check_exit_codes_pass_fail_and_invalid() {
    let o = run(&["check", "examples/transducer-gain-stage.json"], "");
    assert_eq!(o.status.code(), Some(0), "a passing file exits with 0");
    let o = run(&["check", "-"], &failing_design());
    let text = stdout(&o);
    assert_eq!(
        o.status.code(),
        Some(1),
        "a failing requirement exits with 1:\n{text}"
    );
    assert!(
        text.lines()
            .any(|l| l.starts_with("FAIL") && l.contains("standard input")),
        "the file line says FAIL:\n{text}"
    );
    assert!(
        text.contains("FAIL  min_swing: "),
        "the failing check is listed with its id:\n{text}"
    );
    let o = run(
        &[
            "check",
            "examples/transducer-gain-stage.json",
            "examples/broken/typo-key.json",
            "-",
        ],
        &failing_design(),
    );
    let text = stdout(&o);
    assert_eq!(
        o.status.code(),
        Some(2),
        "an invalid file wins over a failing one:\n{text}"
    );
    assert!(
        text.contains("checked 3 files: 1 pass, 1 fail, 1 invalid"),
        "the summary counts each outcome:\n{text}"
    );
    let o = run(&["check", "no/such/file.json"], "");
    assert_eq!(o.status.code(), Some(2), "a missing file is invalid");
    assert!(
        stdout(&o).contains("cannot read the file"),
        "and says so:\n{}",
        stdout(&o)
    );
}

#[test]
fn check_json_lists_each_file_with_status() {
    let o = run(
        &[
            "check",
            "--json",
            "examples/pnp-gain-stage.json",
            "examples/broken/wrong-version.json",
        ],
        "",
    );
    assert_eq!(o.status.code(), Some(2), "one invalid file: exit 2");
    let v: Value = serde_json::from_str(&stdout(&o)).expect("check --json prints JSON");
    assert_eq!(v["files"][0]["status"], "pass", "the PNP example passes");
    assert_eq!(
        v["files"][0]["report"]["format"], REPORT_FORMAT,
        "a valid file carries its full report"
    );
    assert_eq!(
        v["files"][1]["status"], "invalid",
        "the wrong version is invalid"
    );
    assert_eq!(
        v["files"][1]["error"]["field"], "format",
        "the error names its field"
    );
    assert_eq!(v["pass"], false, "the whole run does not pass");
}

#[test]
fn standard_input_gives_the_same_report_as_the_file() {
    let file = "examples/sensor-cable-buffer.json";
    let from_file = run(&["analyze", file, "--json"], "");
    let from_stdin = run(&["analyze", "-", "--json"], &read(file));
    assert_eq!(
        from_stdin.status.code(),
        Some(0),
        "standard input is read: {}",
        stderr(&from_stdin)
    );
    assert_eq!(
        stdout(&from_stdin),
        stdout(&from_file),
        "the same design gives the same report"
    );
    let o = run(&["analyze", "-"], "{ not json");
    assert_eq!(o.status.code(), Some(2), "bad standard input is invalid");
    assert!(
        stderr(&o).starts_with("error: standard input: line 1, column 3"),
        "the error names standard input and the position: {}",
        stderr(&o)
    );
}

#[test]
fn analyze_prints_a_readable_report_with_sections() {
    let o = run(&["analyze", "examples/photodetector-common-base.json"], "");
    let text = stdout(&o);
    assert_eq!(o.status.code(), Some(0), "the example passes");
    for section in [
        "Operating point",
        "Small signal",
        "Midband",
        "Bandwidth",
        "Swing",
        "Dissipation",
        "Checks",
        "Cautions",
    ] {
        assert!(
            text.lines().any(|l| l.starts_with(section)),
            "the report has a {section} section:\n{text}"
        );
    }
    assert!(
        text.contains(" MHz"),
        "frequencies are in engineering notation:\n{text}"
    );
    assert!(
        text.contains("design aids"),
        "the deferral sentence is shown"
    );
    let o = run(&["analyze", "-"], &failing_design());
    assert_eq!(
        o.status.code(),
        Some(1),
        "analyze also exits 1 when a check fails"
    );
    assert!(
        stdout(&o).contains("FAIL  min_swing"),
        "the failing check is marked"
    );
}

#[test]
fn sweep_prints_csv_json_and_text() {
    let file = "examples/transducer-gain-stage.json";
    let o = run(
        &[
            "sweep", file, "--from", "10", "--to", "1M", "--points", "51", "--csv",
        ],
        "",
    );
    assert_eq!(o.status.code(), Some(0), "the sweep runs: {}", stderr(&o));
    let csv = stdout(&o);
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(lines.len(), 52, "a header and 51 rows");
    assert!(
        lines[0].starts_with("frequency,voltage_gain_db"),
        "the header names the columns"
    );
    assert!(lines[1].starts_with("10,"), "the first frequency is --from");
    assert!(
        lines[51].starts_with("1000000,"),
        "the last frequency is --to"
    );
    let mid: Vec<f64> = lines[26]
        .split(',')
        .map(|x| x.parse().expect("every cell is a number"))
        .collect();
    assert_eq!(mid.len(), 8, "eight columns");
    assert!(
        (mid[1] - 29.0).abs() < 1.0,
        "at 1 kHz, in the midband, the gain is about the example's 29 dB: {}",
        mid[1]
    );
    let o = run(&["sweep", file, "--points", "5", "--json"], "");
    let v: Value = serde_json::from_str(&stdout(&o)).expect("--json prints JSON");
    assert_eq!(v["rows"].as_array().map(Vec::len), Some(5), "five rows");
    assert_eq!(
        v["rows"][4]["frequency"], 1e9,
        "the default range ends at 1 GHz"
    );
    let o = run(&["sweep", file, "--points", "5"], "");
    assert_eq!(
        stdout(&o).lines().count(),
        7,
        "a title, a header and five rows of text"
    );
    let o = run(&["sweep", file, "--from", "ten"], "");
    assert_eq!(o.status.code(), Some(2), "a bad frequency is refused");
    assert!(
        stderr(&o).contains("--from: cannot read \"ten\""),
        "the option is named: {}",
        stderr(&o)
    );
}

#[test]
fn values_gives_nearest_standard_values_and_tolerance() {
    let o = run(&["values", "4k7", "--series", "E24"], "");
    let text = stdout(&o);
    assert_eq!(o.status.code(), Some(0), "a valid look-up");
    let row = text
        .lines()
        .find(|l| l.trim_start().starts_with("E24"))
        .expect("an E24 row");
    assert!(row.contains("±5 %"), "E24 parts are ±5 %: {row}");
    assert!(row.contains("4.7 k"), "4k7 is itself an E24 value: {row}");
    let o = run(&["values", "5k", "--series", "E24"], "");
    let row = stdout(&o);
    assert!(row.contains("5.1 k"), "5 k rounds to 5.1 k in E24: {row}");
    assert!(
        row.contains("+2.00 %"),
        "and the error of the nearest is +2 %: {row}"
    );
    let o = run(&["values", "100nF"], "");
    assert_eq!(
        stdout(&o)
            .lines()
            .filter(|l| l.trim_start().starts_with('E'))
            .count(),
        7,
        "without --series every series is shown"
    );
    assert!(stdout(&o).contains("100 nF"), "the typed unit is kept");
    let o = run(&["values", "-1k"], "");
    assert_eq!(
        o.status.code(),
        Some(2),
        "a negative value has no standard value"
    );
    let o = run(&["values", "1k", "--series", "E25"], "");
    assert!(
        stderr(&o).contains("E3, E6, E12, E24, E48, E96 or E192"),
        "the series are listed"
    );
}

#[test]
fn presets_and_help_teach_the_tool() {
    let o = run(&["presets"], "");
    assert!(
        stdout(&o).contains("general-purpose-npn"),
        "presets are listed by name"
    );
    let o = run(&["--help"], "");
    let text = stdout(&o);
    for word in [
        "analyze",
        "check",
        "sweep",
        "values",
        "Exit status",
        "\"format\": \"stagewright/1\"",
    ] {
        assert!(text.contains(word), "--help mentions {word}:\n{text}");
    }
    let example = text
        .split_once("A minimal design file:")
        .and_then(|(_, rest)| rest.split_once("Examples:"))
        .map(|(json, _)| json)
        .expect("--help shows a design file before the examples");
    let o = run(&["check", "-"], example);
    assert_eq!(
        o.status.code(),
        Some(0),
        "the design file shown in --help is valid and meets its requirements:\n{}",
        stdout(&o)
    );
    let o = run(&["frobnicate"], "");
    assert_eq!(
        o.status.code(),
        Some(2),
        "an unknown command is a usage error"
    );
}

#[test]
fn readme_and_module_docs_document_every_report_key() {
    let o = run(
        &["analyze", "examples/transducer-gain-stage.json", "--json"],
        "",
    );
    let v: Value = serde_json::from_str(&stdout(&o)).expect("a JSON report");
    let mut keys = Vec::new();
    let obj = v.as_object().expect("the report is an object");
    for (k, sub) in obj {
        match sub {
            Value::Object(m) if k != "design" || !m.is_empty() => {
                for kk in m.keys() {
                    if k == "dissipation" && kk == "resistors" {
                        keys.push("dissipation.resistors".to_string());
                    } else {
                        keys.push(format!("{k}.{kk}"));
                    }
                }
            }
            Value::Array(a) => {
                keys.push(k.clone());
                if let Some(Value::Object(m)) = a.first() {
                    keys.extend(m.keys().map(|kk| format!("{k}[].{kk}")));
                }
            }
            _ => keys.push(k.clone()),
        }
    }
    let readme = read("README.md");
    let docs = read("core/src/report.rs");
    for key in &keys {
        let cell = format!("`{key}`");
        assert!(docs.contains(&cell), "the report module documents {key}");
        assert!(readme.contains(&cell), "the README documents {key}");
    }
    for file in files("examples", ".json") {
        assert!(readme.contains(&file), "the README analyses {file}");
    }
}
