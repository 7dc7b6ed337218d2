//! `stagewright design SPEC.json [--json] [-o design.json]`: a
//! specification (`stagewright-spec/1`) to a design of standard parts.
//!
//! The core does the work ([`SpecFile::from_json`] and
//! [`SpecFile::design_result`], which the page calls too); this module
//! prints it.

use stagewright::{format_si, Report, SpecFile, Synthesis};

use super::{out, read_text, report_problem, shown_name, Problem, FAIL, INVALID, PASS};

/// Runs the command: 0 when the standard-value design passes every check,
/// 1 when the specification cannot be met (or a rating of the design
/// fails), 2 when the file is invalid or the output cannot be written.
pub(crate) fn run(file: &str, json: bool, output: Option<&str>) -> u8 {
    if json && output == Some("-") {
        eprintln!(
            "error: --json and -o - both print to standard output; give -o a file name, or take \"design\" from the JSON"
        );
        return INVALID;
    }
    if output.is_some_and(|o| o != "-" && o == file) {
        eprintln!(
            "error: -o {file} would overwrite the specification with the design; give the design file another name"
        );
        return INVALID;
    }
    let spec = match read_text(file).and_then(|t| SpecFile::from_json(&t).map_err(Problem::Design))
    {
        Ok(s) => s,
        Err(p) => return report_problem(file, &p),
    };
    let (result, synthesis) = match spec.design_result() {
        Ok(r) => r,
        Err(e) => {
            // The file is valid (the reader ran every check of the
            // specification): what is left is a design that cannot be met.
            eprintln!("error: {}: {e}", shown_name(file));
            return FAIL;
        }
    };
    let design = spec.design(&synthesis);
    let code = if result.pass { PASS } else { FAIL };
    match output {
        Some("-") => {
            out(&design.to_json());
            return code;
        }
        Some(path) => {
            if let Err(e) = std::fs::write(path, design.to_json()) {
                eprintln!("error: {path}: cannot write the design file: {e}");
                return INVALID;
            }
        }
        None => {}
    }
    if json {
        out(&format!(
            "{}\n",
            serde_json::to_string_pretty(&result).unwrap_or_default()
        ));
    } else {
        out(&text(file, &spec, &synthesis, &result.report, output));
    }
    code
}

/// `label` padded to `width` characters (not bytes: labels hold `Ω`, `|`).
fn pad(label: &str, width: usize) -> String {
    let n = label.chars().count();
    format!("{label}{}", " ".repeat(width.saturating_sub(n)))
}

/// A value right-aligned in `width` characters.
fn right(value: &str, width: usize) -> String {
    let n = value.chars().count();
    format!("{}{value}", " ".repeat(width.saturating_sub(n)))
}

/// A row of the target table.
fn target_row(o: &mut String, label: &str, symbol: &str, value: &str, note: &str) {
    let line = format!(
        "  {}{}{}  {note}",
        pad(label, 28),
        pad(symbol, 8),
        right(value, 10)
    );
    o.push_str(line.trim_end());
    o.push('\n');
}

/// A difference for the table: signed, in the unit (kelvin for a
/// temperature difference).
fn signed(value: f64, unit: &str) -> String {
    let unit = if unit == "°C" { "K" } else { unit };
    let s = format_si(value, unit);
    if value > 0.0 {
        format!("+{s}")
    } else {
        s
    }
}

/// The readable result.
fn text(
    file: &str,
    spec: &SpecFile,
    s: &Synthesis,
    report: &Report,
    output: Option<&str>,
) -> String {
    let sp = &spec.spec;
    let mut o = format!("{}\n", shown_name(file));
    if !spec.title.is_empty() {
        o.push_str(&format!("{}\n", spec.title));
    }
    let device = match &spec.preset {
        Some(p) => format!("{} ({p})", sp.transistor.polarity.name().to_uppercase()),
        None => format!(
            "{} (datasheet values)",
            sp.transistor.polarity.name().to_uppercase()
        ),
    };
    o.push_str(&format!(
        "{} stage, {device}, supply {}, ambient {}, source {}, load {}\n",
        sp.stage.name(),
        format_si(sp.supply, "V"),
        format_si(sp.ambient.celsius(), "°C"),
        format_si(sp.rs, "Ω"),
        format_si(sp.rl, "Ω"),
    ));

    let t = &s.target;
    o.push_str("\nTarget (the ideal continuous design)\n");
    target_row(&mut o, "collector current", "IC", &format_si(t.ic, "A"), "");
    target_row(
        &mut o,
        "collector–emitter voltage",
        "|VCE|",
        &format_si(t.vce, "V"),
        if t.centred {
            "centred on the AC load line"
        } else {
            "off the centre of the AC load line"
        },
    );
    target_row(
        &mut o,
        "symmetric swing (peak)",
        "",
        &format_si(t.swing, "V"),
        "",
    );
    target_row(
        &mut o,
        "emitter voltage",
        "VE",
        &format_si(t.ve, "V"),
        "from its rail",
    );
    if t.rth > 0.0 {
        target_row(
            &mut o,
            "divider resistance",
            "RTH",
            &format_si(t.rth, "Ω"),
            "r1 ∥ r2",
        );
    }
    if let Some(g) = t.voltage_gain_db {
        target_row(
            &mut o,
            "voltage gain",
            "Av",
            &format_si(g, "dB"),
            "sets the unbypassed re",
        );
    }
    target_row(
        &mut o,
        "lower corner sized for",
        "f_low",
        &format_si(t.f_low, "Hz"),
        "",
    );

    let rtol = sp
        .series
        .resistor_tolerance
        .unwrap_or(sp.series.resistors.tolerance());
    let ctol = sp
        .series
        .capacitor_tolerance
        .unwrap_or(sp.series.capacitors.tolerance());
    o.push_str(&format!(
        "\nParts (resistors {} ±{}, capacitors {} ±{})\n",
        sp.series.resistors.name(),
        format_si(100.0 * rtol, "%"),
        sp.series.capacitors.name(),
        format_si(100.0 * ctol, "%"),
    ));
    o.push_str(&format!(
        "  {}{}{}{}\n",
        pad("part", 12),
        right("ideal", 10),
        right("chosen", 10),
        right("change", 10)
    ));
    for p in &s.parts {
        let unit = if p.part.starts_with("c_") { "F" } else { "Ω" };
        let how = match p.series {
            Some(series) => series.name().to_string(),
            None => "pinned".to_string(),
        };
        let change = if p.pinned {
            String::new()
        } else {
            format!("{:+.2} %", 100.0 * p.change)
        };
        o.push_str(&format!(
            "  {}{}{}{}  {how}\n",
            pad(p.part, 12),
            right(&format_si(p.ideal, unit), 10),
            right(&format_si(p.chosen, unit), 10),
            right(&change, 10),
        ));
    }

    o.push_str("\nIdeal and standard-value design\n");
    o.push_str(&format!(
        "  {}{}{}{}\n",
        pad("result", 22),
        right("ideal", 12),
        right("standard", 12),
        right("difference", 13)
    ));
    let dash = "—".to_string();
    for d in &s.differences {
        let shown = |v: Option<f64>| v.map_or(dash.clone(), |v| format_si(v, d.unit));
        o.push_str(&format!(
            "  {}{}{}{}\n",
            pad(d.quantity, 22),
            right(&shown(d.ideal), 12),
            right(&shown(d.snapped), 12),
            right(
                &d.difference.map_or(dash.clone(), |v| signed(v, d.unit)),
                13
            ),
        ));
    }

    if !s.notes.is_empty() {
        o.push_str("\nNotes\n");
        for n in &s.notes {
            o.push_str(&format!("  - {n}\n"));
        }
    }

    let checks = report.checks();
    let failing = report.failing_checks().count();
    o.push_str(&format!(
        "\nChecks of the standard-value design ({} pass, {failing} FAIL)\n",
        checks.len() - failing
    ));
    let width = checks.iter().map(|c| c.id.len()).max().unwrap_or(0);
    for c in checks {
        o.push_str(&format!(
            "  {}  {:<width$}  {}\n",
            if c.pass { "pass" } else { "FAIL" },
            c.id,
            c.message
        ));
    }
    let cautions: Vec<(&str, &str)> = report.cautions().collect();
    if cautions.is_empty() {
        o.push_str("\nCautions (none)\n");
    } else {
        o.push_str("\nCautions\n");
        for (id, message) in cautions {
            o.push_str(&format!("  {id}: {message}\n"));
        }
    }
    match output {
        Some(path) => o.push_str(&format!(
            "\nWrote the design file {path}; `stagewright analyze {path}` gives its full report.\n"
        )),
        None => o.push_str(
            "\n-o FILE writes the design file; `stagewright analyze FILE` gives its full report.\n",
        ),
    }
    o
}
