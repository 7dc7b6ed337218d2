//! `stagewright`: design, analyse, check and sweep one-transistor
//! amplifier stages, and look up standard part values.
//!
//! Exit status: 0 when every check passes, 1 when a requirement or rating
//! fails (or a specification cannot be met), 2 when a file is invalid or
//! the command line is wrong.

// The commands beyond the first ones live in `stagewright/` beside this
// file (not directly in `src/bin/`, where cargo would take them for binaries).
mod design;
mod junit;
mod large;
mod tolerance;

use std::io::{self, Read, Write};
use std::process::ExitCode;

use clap::{Parser, Subcommand};
use serde_json::json;
use stagewright::{format_si, parse_value, Design, ESeries, Error, Report, SweepTable, PRESETS};

const ABOUT: &str = "Design, analyse and check discrete one-transistor amplifier stages.";

const LONG_ABOUT: &str = "\
Design, analyse and check discrete one-transistor amplifier stages
(common emitter, common collector, common base; NPN or PNP).

A design file is a JSON document: the stage, its supply, its transistor
(a preset and/or datasheet values), its parts and the requirements it must
meet. Values are numbers in SI base units or strings such as \"4k7\",
\"100 nF\" or \"1.2 MHz\". The ratings of the transistor and resistors are
always checked; the requirements are checked when given.

A specification (format stagewright-spec/1) states the stage, supply,
source, load, requirements and design intents; `design` turns it into a
design file of standard parts.";

const AFTER_LONG_HELP: &str = "\
A minimal design file:

  {
    \"format\": \"stagewright/1\",
    \"title\": \"gain stage\",
    \"stage\": \"common-emitter\",
    \"supply\": 12,
    \"transistor\": { \"preset\": \"general-purpose-npn\" },
    \"parts\": { \"r1\": \"47k\", \"r2\": \"10k\", \"rc\": \"4k7\", \"re\": \"1k\",
               \"rl\": \"10k\", \"c_in\": \"1u\", \"c_out\": \"1u\" },
    \"requirements\": { \"min_voltage_gain_db\": 8, \"max_f_low\": 100 }
  }

Examples:
  stagewright design spec.json -o design.json   design to a specification
  stagewright analyze design.json               readable report
  stagewright analyze design.json --json        the report as JSON
  stagewright check designs/*.json              for CI: one line per file
  stagewright check --worst-case --monte-carlo 2000 designs/*.json
                                                and with a tolerance analysis
  stagewright sweep design.json --from 10 --to 1G --points 200 --csv
  stagewright waveform design.json --out-peak 1,2,3 --frequency 1k
  stagewright values 4k7 --series E24
  stagewright presets

Exit status: 0 every check passes, 1 a requirement or rating fails (or a
specification cannot be met, or the tolerance analysis misses a
requirement), 2 a file is invalid (or the command line is wrong).

Every key of the design file, the specification and the report is
described in the README.";

#[derive(Parser)]
#[command(
    name = "stagewright",
    version,
    about = ABOUT,
    long_about = LONG_ABOUT,
    after_long_help = AFTER_LONG_HELP,
    propagate_version = true
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Design a stage to a specification, in standard part values.
    ///
    /// Reads a specification (format stagewright-spec/1), finds the ideal
    /// continuous design, snaps every free part to its series (trying the
    /// neighbouring values when snapping breaks a requirement) and analyses
    /// the result. Prints the target, each part's ideal and chosen value,
    /// the results before and after snapping, and the checks. Exit status
    /// 0 when the design passes every check, 1 when the specification
    /// cannot be met (the message names the requirement and the
    /// shortfall), 2 when the file is invalid.
    Design {
        /// The specification file; `-` reads standard input.
        file: String,
        /// Print one JSON document (stagewright-design/1): target, parts,
        /// differences, notes, the design file and its report.
        #[arg(long)]
        json: bool,
        /// Write the design file (stagewright/1) here; `-o -` prints only
        /// the design file.
        #[arg(short = 'o', long = "output", value_name = "DESIGN.json")]
        output: Option<String>,
    },
    /// Analyse one design file and print its report.
    ///
    /// The readable report shows the operating point, small-signal model,
    /// midband gains and impedances, corners, swing, dissipation, every
    /// check with pass or FAIL, and the cautions. Exit status 0 when every
    /// check passes, 1 when one fails, 2 when the file is invalid.
    Analyze {
        /// The design file; `-` reads standard input.
        file: String,
        /// Print the report as one JSON document (stagewright-report/1).
        #[arg(long)]
        json: bool,
        /// Leave out the large-signal section (the steady-state solves of
        /// the distortion-limited swing, some tens of milliseconds).
        #[arg(long)]
        small_signal_only: bool,
    },
    /// Print the steady-state waveforms of a design under a sine drive.
    ///
    /// For each drive: the output peak at the load (the fundamental), THD
    /// over harmonics 2 to 10, harmonics 1 to 10 with their level and
    /// phase, the mean shift of the output terminal and of the collector
    /// current, and what clips. --csv gives one row per sample of every
    /// waveform (time, load, input, base, emitter, collector voltages and
    /// the collector current); --json all of it (stagewright-waveform/1).
    Waveform {
        /// The design file; `-` reads standard input.
        file: String,
        /// EMF peaks of the source, comma-separated, e.g. "0.1,0.2,0.5".
        #[arg(long, conflicts_with = "out_peak", allow_hyphen_values = true)]
        emf: Option<String>,
        /// Output peaks at the load, comma-separated (the EMF is found).
        #[arg(long, allow_hyphen_values = true)]
        out_peak: Option<String>,
        /// The sine's frequency.
        #[arg(long, default_value = "1k", allow_hyphen_values = true)]
        frequency: String,
        /// Print CSV (SI base units).
        #[arg(long, conflicts_with = "json")]
        csv: bool,
        /// Print JSON (stagewright-waveform/1).
        #[arg(long)]
        json: bool,
    },
    /// Check design files, for CI.
    ///
    /// Prints one line per file (pass, FAIL or invalid), then each failing
    /// check and each error with its file and field. Exit status 0 when
    /// every file passes, 1 when a requirement or rating fails, 2 when a
    /// file is invalid.
    ///
    /// With --worst-case and/or --monte-carlo N, each file also gets a
    /// tolerance analysis (the corner table, the sensitivity table, the
    /// yields and percentiles) and fails when a requirement fails at some
    /// vertex or the yield is below --min-yield. The tolerances are the
    /// design file's `tolerances` block, else the defaults, each replaced
    /// by its option when given.
    Check {
        /// The design files; `-` reads standard input.
        #[arg(required = true)]
        files: Vec<String>,
        /// Print the result as one JSON document (stagewright-check/1).
        #[arg(long)]
        json: bool,
        /// Also write the result as a JUnit XML report to FILE (one test
        /// case per check), for a CI server's test report.
        #[arg(long, value_name = "FILE")]
        junit: Option<String>,
        #[command(flatten)]
        tolerance: tolerance::ToleranceArgs,
    },
    /// Print the frequency response of a design as a table.
    ///
    /// Columns: frequency, voltage gain and its phase, gain from the
    /// source, current gain, power gain, |Zin| and |Zout|. Frequencies are
    /// spaced evenly on a log scale, both ends included.
    Sweep {
        /// The design file; `-` reads standard input.
        file: String,
        /// Lowest frequency, e.g. 10, 1k, "20 Hz".
        #[arg(long, default_value = "10", allow_hyphen_values = true)]
        from: String,
        /// Highest frequency, e.g. 100k, 1G.
        #[arg(long, default_value = "1G", allow_hyphen_values = true)]
        to: String,
        /// Number of frequencies (2 to 100000).
        #[arg(long, default_value_t = 200)]
        points: usize,
        /// Print CSV (numbers in SI base units, gains in dB).
        #[arg(long, conflicts_with = "json")]
        csv: bool,
        /// Print JSON (stagewright-sweep/1).
        #[arg(long)]
        json: bool,
    },
    /// Find the nearest standard values (IEC 60063 E series) to a value.
    ///
    /// Prints the nearest value, the standard values just below and above,
    /// the error of the nearest one and the tolerance of the series. Without
    /// --series every series is shown.
    Values {
        /// The value, e.g. 4k7, 5.1k, "100 nF", 33u.
        #[arg(allow_hyphen_values = true)]
        value: String,
        /// One series: E3, E6, E12, E24, E48, E96 or E192.
        #[arg(long)]
        series: Option<String>,
    },
    /// List the transistor presets a design file can name.
    Presets,
}

/// Exit status: every check passes.
pub(crate) const PASS: u8 = 0;
/// Exit status: a requirement or rating fails.
const FAIL: u8 = 1;
/// Exit status: a file is invalid, or the command line is wrong.
pub(crate) const INVALID: u8 = 2;

fn main() -> ExitCode {
    let cli = Cli::parse();
    let code = match cli.command {
        Command::Design { file, json, output } => design::run(&file, json, output.as_deref()),
        Command::Analyze {
            file,
            json,
            small_signal_only,
        } => analyze(&file, json, !small_signal_only),
        Command::Waveform {
            file,
            emf,
            out_peak,
            frequency,
            csv,
            json,
        } => {
            let drive = match (emf, out_peak) {
                (Some(t), _) => large::list("emf", &t, "V").map(large::Drive::Emf),
                (None, Some(t)) => large::list("out-peak", &t, "V").map(large::Drive::Peak),
                (None, None) => large::list("out-peak", "1", "V").map(large::Drive::Peak),
            };
            match drive {
                Ok(d) => large::run(&file, d, &frequency, csv, json),
                Err(e) => {
                    eprintln!("error: --{e}");
                    INVALID
                }
            }
        }
        Command::Check {
            files,
            json,
            junit,
            tolerance,
        } => match tolerance.plan() {
            Ok(plan) => check(&files, json, junit.as_deref(), plan.as_ref()),
            Err(message) => {
                eprintln!("error: {message}");
                INVALID
            }
        },
        Command::Sweep {
            file,
            from,
            to,
            points,
            csv,
            json,
        } => sweep(&file, &from, &to, points, csv, json),
        Command::Values { value, series } => values(&value, series.as_deref()),
        Command::Presets => presets(),
    };
    ExitCode::from(code)
}

/// Writes to standard output; a closed pipe (`| head`) is not an error.
pub(crate) fn out(text: &str) {
    let _ = io::stdout().write_all(text.as_bytes());
}

/// How a file is named in messages.
pub(crate) fn shown_name(file: &str) -> &str {
    if file == "-" {
        "standard input"
    } else {
        file
    }
}

/// Why a design could not be used.
pub(crate) enum Problem {
    /// The file could not be read at all.
    Io(String),
    /// The design is invalid or cannot be solved.
    Design(Error),
}

impl Problem {
    fn field(&self) -> &str {
        match self {
            Problem::Io(_) => "",
            Problem::Design(e) => e.field(),
        }
    }

    fn message(&self) -> String {
        match self {
            Problem::Io(m) => m.clone(),
            Problem::Design(e) => e.to_string(),
        }
    }
}

fn read_text(file: &str) -> Result<String, Problem> {
    let bytes = if file == "-" {
        let mut bytes = Vec::new();
        io::stdin()
            .read_to_end(&mut bytes)
            .map_err(|e| Problem::Io(format!("cannot read standard input: {e}")))?;
        bytes
    } else {
        std::fs::read(file).map_err(|e| {
            let hint = match e.kind() {
                io::ErrorKind::NotFound => "; check the path (use - for standard input)",
                io::ErrorKind::PermissionDenied => "; check the file's permissions",
                _ => "",
            };
            Problem::Io(format!("cannot read the file: {e}{hint}"))
        })?
    };
    match stagewright::utf8_text(&bytes) {
        Ok(_) => Ok(String::from_utf8(bytes).unwrap_or_default()),
        Err(e) => Err(Problem::Design(e)),
    }
}

/// Reads, validates and analyses one design file.
pub(crate) fn load(file: &str) -> Result<(Design, stagewright::Analysis), Problem> {
    let text = read_text(file)?;
    let design = Design::from_json(&text).map_err(Problem::Design)?;
    let analysis = design.analyze().map_err(Problem::Design)?;
    Ok((design, analysis))
}

pub(crate) fn report_problem(file: &str, p: &Problem) -> u8 {
    eprintln!("error: {}: {}", shown_name(file), p.message());
    INVALID
}

fn analyze(file: &str, json: bool, large_signal: bool) -> u8 {
    let (design, analysis) = match load(file) {
        Ok(x) => x,
        Err(p) => return report_problem(file, &p),
    };
    let report = Report::new(&design, &analysis);
    // The large-signal section: when the stage cannot be solved in the
    // time domain, the section says why and the rest of the report stands.
    let section = large_signal.then(|| large::Section::new(&design));
    if json {
        match section {
            None => out(&report.to_json_string()),
            Some(section) => {
                let mut doc = serde_json::to_value(&report).unwrap_or(serde_json::Value::Null);
                if let Some(m) = doc.as_object_mut() {
                    let value = match &section {
                        Ok(s) => s.to_json(),
                        Err(e) => {
                            json!({ "error": { "field": e.field(), "message": e.to_string() } })
                        }
                    };
                    m.insert("large_signal".into(), value);
                }
                out(&format!(
                    "{}\n",
                    serde_json::to_string_pretty(&doc).unwrap_or_default()
                ));
            }
        }
    } else {
        out(&format!("{}\n", shown_name(file)));
        out(&report.to_text());
        match section {
            Some(Ok(s)) => out(&s.to_text()),
            Some(Err(e)) => out(&format!("\nLarge signal: not available ({e})\n")),
            None => {}
        }
    }
    if report.passed() {
        PASS
    } else {
        FAIL
    }
}

/// One file of `check`: its report and, when asked, its tolerance analysis.
struct Checked {
    report: Report,
    tolerance: Option<tolerance::Outcome>,
}

impl Checked {
    fn passed(&self) -> bool {
        self.report.passed() && self.tolerance.as_ref().is_none_or(|t| t.passed())
    }
}

fn check(files: &[String], json: bool, junit: Option<&str>, plan: Option<&tolerance::Plan>) -> u8 {
    let results: Vec<(&str, Result<Checked, Problem>)> = files
        .iter()
        .map(|f| {
            let r = load(f).and_then(|(d, a)| {
                let tolerance = plan
                    .map(|p| tolerance::analyse(&d, p).map_err(Problem::Design))
                    .transpose()?;
                Ok(Checked {
                    report: Report::new(&d, &a),
                    tolerance,
                })
            });
            (f.as_str(), r)
        })
        .collect();
    let invalid = results.iter().filter(|(_, r)| r.is_err()).count();
    let failed = results
        .iter()
        .filter(|(_, r)| matches!(r, Ok(c) if !c.passed()))
        .count();
    let passed = results.len() - invalid - failed;
    let code = if invalid > 0 {
        INVALID
    } else if failed > 0 {
        FAIL
    } else {
        PASS
    };
    if let Some(path) = junit {
        let suites: Vec<(String, junit::Suite)> = results
            .iter()
            .map(|(f, r)| {
                let suite = match r {
                    Ok(c) => {
                        let mut cases: Vec<junit::Case> = c
                            .report
                            .checks()
                            .iter()
                            .map(|k| junit::Case {
                                id: k.id.clone(),
                                pass: k.pass,
                                message: k.message.clone(),
                            })
                            .collect();
                        if let Some(t) = &c.tolerance {
                            cases.extend(t.cases());
                        }
                        junit::Suite::Checked(cases)
                    }
                    Err(p) => junit::Suite::Invalid(p.message()),
                };
                (shown_name(f).to_string(), suite)
            })
            .collect();
        if let Err(e) = std::fs::write(path, junit::report(&suites)) {
            eprintln!("error: --junit {path}: cannot write the report: {e}");
            return INVALID;
        }
    }
    if json {
        let entries: Vec<serde_json::Value> = results
            .iter()
            .map(|(f, r)| match r {
                Ok(c) => {
                    let rep = &c.report;
                    let mut failing: Vec<serde_json::Value> = rep
                        .failing_checks()
                        .map(|c| {
                            json!({
                                "id": c.id, "value": c.value, "limit": c.limit,
                                "unit": c.unit, "message": c.message,
                            })
                        })
                        .collect();
                    if let Some(t) = &c.tolerance {
                        failing.extend(t.failing().into_iter().map(
                            |(id, value, limit, unit, message)| {
                                json!({
                                    "id": id, "value": value, "limit": limit,
                                    "unit": unit, "message": message,
                                })
                            },
                        ));
                    }
                    let mut entry = json!({
                        "file": f,
                        "status": if c.passed() { "pass" } else { "fail" },
                        "checks": rep.checks().len(),
                        "failing": failing,
                        "error": null,
                        "report": serde_json::to_value(rep).unwrap_or(serde_json::Value::Null),
                    });
                    if let (Some(t), Some(m)) = (&c.tolerance, entry.as_object_mut()) {
                        m.extend(t.json_entries());
                    }
                    entry
                }
                Err(p) => json!({
                    "file": f,
                    "status": "invalid",
                    "checks": 0,
                    "failing": [],
                    "error": { "field": p.field(), "message": p.message() },
                    "report": null,
                }),
            })
            .collect();
        let doc = json!({
            "format": "stagewright-check/1",
            "pass": code == PASS,
            "files": entries,
            "counts": { "pass": passed, "fail": failed, "invalid": invalid },
        });
        out(&format!(
            "{}\n",
            serde_json::to_string_pretty(&doc).unwrap_or_default()
        ));
        return code;
    }
    let width = files
        .iter()
        .map(|f| shown_name(f).chars().count())
        .max()
        .unwrap_or(0);
    let mut o = String::new();
    for (f, r) in &results {
        let (status, mut what) = match r {
            Ok(c) => {
                let rep = &c.report;
                let nominal = if rep.passed() {
                    format!("{} checks", rep.checks().len())
                } else {
                    format!(
                        "{} of {} checks fail",
                        rep.failing_checks().count(),
                        rep.checks().len()
                    )
                };
                (if c.passed() { "pass" } else { "FAIL" }, nominal)
            }
            Err(_) => ("invalid", "see below".to_string()),
        };
        if let Ok(Checked {
            tolerance: Some(t), ..
        }) = r
        {
            what.push_str(", ");
            what.push_str(&t.status());
        }
        o.push_str(&format!("{status:<7}  {:<width$}  {what}\n", shown_name(f)));
    }
    for (f, r) in &results {
        match r {
            Ok(c) if !c.passed() => {
                o.push_str(&format!("\n{}:\n", shown_name(f)));
                for c in c.report.failing_checks() {
                    o.push_str(&format!("  FAIL  {}: {}\n", c.id, c.message));
                }
                if let Some(t) = &c.tolerance {
                    for (id, _, _, _, message) in t.failing() {
                        o.push_str(&format!("  FAIL  {id}: {message}\n"));
                    }
                }
            }
            Err(p) => {
                o.push_str(&format!("\n{}:\n  error: {}\n", shown_name(f), p.message()));
            }
            Ok(_) => {}
        }
    }
    for (f, r) in &results {
        if let Ok(Checked {
            tolerance: Some(t), ..
        }) = r
        {
            o.push_str(&t.to_text(shown_name(f)));
        }
    }
    o.push_str(&format!(
        "\nchecked {} file{}: {passed} pass, {failed} fail, {invalid} invalid\n",
        results.len(),
        if results.len() == 1 { "" } else { "s" }
    ));
    out(&o);
    code
}

fn sweep(file: &str, from: &str, to: &str, points: usize, csv: bool, json: bool) -> u8 {
    let bad_option = |e: Error| {
        eprintln!("error: --{e}");
        INVALID
    };
    let from_hz = match stagewright::parse_value_field("from", from, "Hz") {
        Ok(v) => v,
        Err(e) => return bad_option(e),
    };
    let to_hz = match stagewright::parse_value_field("to", to, "Hz") {
        Ok(v) => v,
        Err(e) => return bad_option(e),
    };
    let (_, analysis) = match load(file) {
        Ok(x) => x,
        Err(p) => return report_problem(file, &p),
    };
    let table = match SweepTable::new(&analysis, from_hz, to_hz, points) {
        Ok(t) => t,
        Err(e) => return bad_option(e),
    };
    if csv {
        out(&table.to_csv());
    } else if json {
        out(&table.to_json_string());
    } else {
        out(&format!(
            "{}: frequency response, {} points from {} to {} (gains in dB of their magnitude)\n",
            shown_name(file),
            points,
            format_si(from_hz, "Hz"),
            format_si(to_hz, "Hz")
        ));
        out(&table.to_text());
    }
    PASS
}

/// The unit symbol the value was typed with, if any (for display only).
fn typed_unit(text: &str) -> &'static str {
    let t = text.trim();
    let lower = t.to_ascii_lowercase();
    if t.ends_with('Ω')
        || t.ends_with('\u{2126}')
        || lower.ends_with("ohm")
        || lower.ends_with("ohms")
    {
        "Ω"
    } else if t.ends_with("Hz") {
        "Hz"
    } else if t.ends_with('F') {
        "F"
    } else if t.ends_with('H') {
        "H"
    } else if t.ends_with('V') {
        "V"
    } else if t.ends_with('A') {
        "A"
    } else if t.ends_with('W') {
        "W"
    } else {
        ""
    }
}

/// A value in engineering notation, with the unit if one is known
/// (`4.7 kΩ`), else with the prefix alone (`4.7 k`).
fn engineering(value: f64, unit: &str) -> String {
    if unit.is_empty() {
        // Format with a placeholder unit that takes prefixes, then drop it.
        let s = format_si(value, "F");
        s.strip_suffix('F').unwrap_or(&s).trim_end().to_string()
    } else {
        format_si(value, unit)
    }
}

fn values(text: &str, series: Option<&str>) -> u8 {
    let value = match parse_value(text) {
        Ok(v) => v,
        Err(e) => {
            eprintln!("error: {e}");
            return INVALID;
        }
    };
    if !(value.is_finite() && value > 0.0) {
        eprintln!(
            "error: value must be greater than 0 to have standard values, got {}",
            text.trim()
        );
        return INVALID;
    }
    let list: Vec<ESeries> = match series {
        Some(name) => match ESeries::parse(name) {
            Ok(s) => vec![s],
            Err(e) => {
                eprintln!("error: --{e}");
                return INVALID;
            }
        },
        None => ESeries::ALL.to_vec(),
    };
    let unit = typed_unit(text);
    let mut o = format!(
        "{}: nearest standard values (IEC 60063)\n",
        engineering(value, unit)
    );
    o.push_str(&format!(
        "  {:<6} {:>9}  {:>10} {:>8}  {:>10} {:>10}\n",
        "series", "tolerance", "nearest", "error", "below", "above"
    ));
    for s in list {
        let Some(l) = s.lookup(value) else {
            eprintln!("error: value {} has no standard value", text.trim());
            return INVALID;
        };
        o.push_str(&format!(
            "  {:<6} {:>9}  {:>10} {:>8}  {:>10} {:>10}\n",
            s.name(),
            format!("±{} %", format_si(100.0 * s.tolerance(), "")),
            engineering(l.nearest, unit),
            format!("{:+.2} %", 100.0 * l.error),
            engineering(l.below, unit),
            engineering(l.above, unit),
        ));
    }
    out(&o);
    PASS
}

fn presets() -> u8 {
    let width = PRESETS.iter().map(|p| p.name.len()).max().unwrap_or(0);
    let mut o = String::from(
        "Transistor presets (generic devices named by class; enter your own datasheet values for a real design):\n",
    );
    for p in PRESETS {
        o.push_str(&format!("  {:<width$}  {}\n", p.name, p.label));
    }
    o.push_str(
        "\nUse one as \"transistor\": { \"preset\": \"NAME\" } and override any value beside it.\n",
    );
    out(&o);
    PASS
}
