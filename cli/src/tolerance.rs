//! The tolerance analysis of `stagewright check`: `--worst-case` and
//! `--monte-carlo N --seed S`, with the tolerance options.
//!
//! The core computes everything ([`worst_case`], [`sensitivity`],
//! [`MonteCarlo`]); this module chooses the tolerances (the design file's
//! `tolerances` block, else [`Tolerances::default`], each value replaced by
//! its command-line option when given), judges the yield against
//! `--min-yield` (the requirements at their worst vertex are judged by the
//! core's [`worst_checks`], as on the page), and prints.

use clap::Args;
use serde_json::{Map, Value};
use stagewright::{
    db20, format_si, parse_value_field, sensitivity, worst_case_with, worst_checks, Corner, Design,
    Error, ErrorKind, Level, MonteCarlo, Quantity, Temperature, ToleranceDocument, Tolerances,
};

/// Sensitivity entries shown in the readable output (all are in `--json`).
const SENSITIVITY_SHOWN: usize = 15;

/// Default Monte Carlo seed.
const DEFAULT_SEED: u64 = 1;

fn share_help(what: &str, default: f64) -> String {
    format!(
        "{what} tolerance, ± a fraction (0.01) or a percentage (1%) [default: the design file's tolerances block, else {} %]",
        format_si(100.0 * default, "")
    )
}

fn resistor_help() -> String {
    share_help("Resistor", Tolerances::default().resistor_tolerance)
}

fn capacitor_help() -> String {
    share_help("Capacitor", Tolerances::default().capacitor_tolerance)
}

fn supply_help() -> String {
    share_help("Supply", Tolerances::default().supply_tolerance)
}

fn vbe_help() -> String {
    format!(
        "VBE spread either side of the datasheet value, volts (0.05, 50m, \"50 mV\") [default: the design file's tolerances block, else {}]",
        format_si(Tolerances::default().vbe_spread, "V")
    )
}

fn ambient_min_help() -> String {
    format!(
        "Lowest ambient, °C [default: the design file's tolerances block, else {}]",
        format_si(Tolerances::default().ambient_min.celsius(), "°C")
    )
}

fn ambient_max_help() -> String {
    format!(
        "Highest ambient, °C [default: the design file's tolerances block, else {}]",
        format_si(Tolerances::default().ambient_max.celsius(), "°C")
    )
}

/// The tolerance options of `check`.
#[derive(Args, Debug, Clone, Default)]
pub(crate) struct ToleranceArgs {
    /// Also solve every vertex of the tolerance box; a requirement that
    /// fails at any vertex fails the file (exit 1).
    #[arg(long)]
    pub(crate) worst_case: bool,
    /// Also run N Monte Carlo trials; a yield below --min-yield fails the
    /// file (exit 1).
    #[arg(long, value_name = "N")]
    pub(crate) monte_carlo: Option<usize>,
    /// Seed of the Monte Carlo generator; the same seed gives the same
    /// trials [default: 1].
    #[arg(long, value_name = "S", requires = "monte_carlo")]
    pub(crate) seed: Option<u64>,
    /// Least Monte Carlo yield that passes, percent (99, 99.5%) [default: 100].
    #[arg(long, value_name = "P", requires = "monte_carlo")]
    pub(crate) min_yield: Option<String>,
    #[arg(long, value_name = "SHARE", help = resistor_help())]
    pub(crate) resistor_tolerance: Option<String>,
    #[arg(long, value_name = "SHARE", help = capacitor_help())]
    pub(crate) capacitor_tolerance: Option<String>,
    #[arg(long, value_name = "SHARE", help = supply_help())]
    pub(crate) supply_tolerance: Option<String>,
    #[arg(long, value_name = "VOLTS", help = vbe_help())]
    pub(crate) vbe_spread: Option<String>,
    #[arg(long, value_name = "CELSIUS", allow_hyphen_values = true, help = ambient_min_help())]
    pub(crate) ambient_min: Option<String>,
    #[arg(long, value_name = "CELSIUS", allow_hyphen_values = true, help = ambient_max_help())]
    pub(crate) ambient_max: Option<String>,
}

/// Values given on the command line, each replacing the file's.
#[derive(Debug, Clone, Copy, Default)]
struct Overrides {
    resistor_tolerance: Option<f64>,
    capacitor_tolerance: Option<f64>,
    supply_tolerance: Option<f64>,
    vbe_spread: Option<f64>,
    ambient_min: Option<f64>,
    ambient_max: Option<f64>,
}

/// What to run on each file.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Plan {
    worst_case: bool,
    /// Trials and seed.
    monte_carlo: Option<(usize, u64)>,
    /// Least yield that passes, a fraction.
    min_yield: f64,
    overrides: Overrides,
}

/// A share from the command line: `0.01`, `1%`, `1 %`.
fn share_option(option: &str, text: &str) -> Result<f64, String> {
    let (body, scale) = match text.trim().strip_suffix('%') {
        Some(b) => (b, 0.01),
        None => (text, 1.0),
    };
    parse_value_field(option, body, "")
        .map(|v| v * scale)
        .map_err(|_| {
            format!("{option}: cannot read \"{text}\"; expected a fraction such as 0.01 or a percentage such as 1%")
        })
}

impl ToleranceArgs {
    /// The plan, `None` when no tolerance analysis is asked for.
    ///
    /// # Errors
    /// A message naming the option, for a value that cannot be read or a
    /// tolerance option given without `--worst-case` or `--monte-carlo`.
    pub(crate) fn plan(&self) -> Result<Option<Plan>, String> {
        let given: Vec<&str> = [
            ("--resistor-tolerance", self.resistor_tolerance.is_some()),
            ("--capacitor-tolerance", self.capacitor_tolerance.is_some()),
            ("--supply-tolerance", self.supply_tolerance.is_some()),
            ("--vbe-spread", self.vbe_spread.is_some()),
            ("--ambient-min", self.ambient_min.is_some()),
            ("--ambient-max", self.ambient_max.is_some()),
        ]
        .iter()
        .filter(|(_, on)| *on)
        .map(|(name, _)| *name)
        .collect();
        if !self.worst_case && self.monte_carlo.is_none() {
            return match given.first() {
                Some(name) => Err(format!(
                    "{name} sets a tolerance for the tolerance analysis; add --worst-case or --monte-carlo N"
                )),
                None => Ok(None),
            };
        }
        let share = |option: &str, v: &Option<String>| {
            v.as_deref().map(|t| share_option(option, t)).transpose()
        };
        let value = |option: &str, v: &Option<String>, unit: &str| {
            v.as_deref()
                .map(|t| parse_value_field(option, t, unit).map_err(|e| e.to_string()))
                .transpose()
        };
        let overrides = Overrides {
            resistor_tolerance: share("--resistor-tolerance", &self.resistor_tolerance)?,
            capacitor_tolerance: share("--capacitor-tolerance", &self.capacitor_tolerance)?,
            supply_tolerance: share("--supply-tolerance", &self.supply_tolerance)?,
            vbe_spread: value("--vbe-spread", &self.vbe_spread, "V")?,
            ambient_min: value("--ambient-min", &self.ambient_min, "°C")?,
            ambient_max: value("--ambient-max", &self.ambient_max, "°C")?,
        };
        let min_yield = match &self.min_yield {
            None => 1.0,
            Some(t) => {
                let body = t.trim().strip_suffix('%').unwrap_or(t);
                match parse_value_field("--min-yield", body, "") {
                    Ok(p) if (0.0..=100.0).contains(&p) => p / 100.0,
                    _ => {
                        return Err(format!(
                            "--min-yield must be a percentage from 0 to 100, such as 99 or 99.5%, got \"{t}\""
                        ))
                    }
                }
            }
        };
        Ok(Some(Plan {
            worst_case: self.worst_case,
            monte_carlo: self
                .monte_carlo
                .map(|n| (n, self.seed.unwrap_or(DEFAULT_SEED))),
            min_yield,
            overrides,
        }))
    }
}

/// The tolerance analysis of one file: the core's document of it.
pub(crate) struct Outcome(ToleranceDocument);

/// The tolerances for `design`: its block (or the defaults) with the
/// command-line values in place. An error names the option when the value
/// came from the command line, else the key of the block.
fn tolerances(design: &Design, o: &Overrides) -> Result<Tolerances, Error> {
    let mut t = design.tolerances.unwrap_or_default();
    let set = |slot: &mut f64, v: Option<f64>| {
        if let Some(v) = v {
            *slot = v;
        }
    };
    set(&mut t.resistor_tolerance, o.resistor_tolerance);
    set(&mut t.capacitor_tolerance, o.capacitor_tolerance);
    set(&mut t.supply_tolerance, o.supply_tolerance);
    set(&mut t.vbe_spread, o.vbe_spread);
    if let Some(c) = o.ambient_min {
        t.ambient_min = Temperature::from_celsius(c);
    }
    if let Some(c) = o.ambient_max {
        t.ambient_max = Temperature::from_celsius(c);
    }
    t.validate(&design.stage).map_err(|e| {
        let from_option = match e.field() {
            "resistor_tolerance" => o.resistor_tolerance.is_some(),
            "capacitor_tolerance" => o.capacitor_tolerance.is_some(),
            "supply_tolerance" => o.supply_tolerance.is_some(),
            "vbe_spread" => o.vbe_spread.is_some(),
            "ambient_min" => o.ambient_min.is_some(),
            "ambient_max" => o.ambient_max.is_some(),
            _ => false,
        };
        if from_option {
            let option = format!("--{}", e.field().replace('_', "-"));
            let kind = match e.kind() {
                ErrorKind::OutOfRange {
                    value,
                    unit,
                    allowed,
                } if e.field().ends_with("_tolerance") => ErrorKind::OutOfRange {
                    value: *value,
                    unit,
                    allowed: format!("{allowed} as a fraction (write 5% for five percent)"),
                },
                other => other.clone(),
            };
            Error::new(option, kind)
        } else {
            e.within("tolerances")
        }
    })?;
    Ok(t)
}

/// Runs the plan on one valid design.
///
/// # Errors
/// A tolerance that does not suit the stage (naming the option or the
/// key), or a stage the tolerance analysis cannot solve.
pub(crate) fn analyse(design: &Design, plan: &Plan) -> Result<Outcome, Error> {
    let t = tolerances(design, &plan.overrides)?;
    let stage = &design.stage;
    let worst = if plan.worst_case {
        let w = worst_case_with(stage, &t, &design.requirements)?;
        let checks = worst_checks(&design.requirements, &w);
        Some((w, checks))
    } else {
        None
    };
    let (sensitivity, monte_carlo) = match plan.monte_carlo {
        Some((trials, seed)) => {
            let mut mc =
                MonteCarlo::new(stage, &t, &design.requirements, trials, seed).map_err(|e| {
                    if e.field() == "trials" {
                        Error::new("--monte-carlo", e.kind().clone())
                    } else {
                        e
                    }
                })?;
            mc.run();
            (mc.sensitivity().to_vec(), Some(mc.summary()))
        }
        None => (sensitivity(stage)?, None),
    };
    Ok(Outcome(ToleranceDocument {
        tolerances: t,
        hfe: (stage.transistor.hfe_min, stage.transistor.hfe_max),
        worst_case: worst,
        sensitivity,
        monte_carlo: monte_carlo.map(|m| (m, plan.min_yield)),
    }))
}

/// A yield as a percentage that never rounds a failing run up to 100 %.
/// A result's value in its unit; the THD (a share) in percent, and
/// "unbounded" where some vertex does not deliver its output peak.
fn value_of(q: Quantity, v: f64) -> String {
    match q {
        Quantity::Thd if v == f64::INFINITY => "unbounded".to_string(),
        Quantity::Thd => format_si(100.0 * v, "%"),
        _ => format_si(v, q.unit()),
    }
}

fn percent(y: f64) -> String {
    if y >= 1.0 {
        "100 %".to_string()
    } else {
        format!("{:.2} %", (y * 1e4).floor() / 100.0)
    }
}

/// A corner as `+r1 -r2 +hfe` (at max, at min; parameters at nominal left out).
fn corner_text(c: &Corner) -> String {
    let parts: Vec<String> = c
        .settings
        .iter()
        .filter(|s| s.level != Level::Nominal)
        .map(|s| {
            let sign = if s.level == Level::Max { '+' } else { '-' };
            format!("{sign}{}", s.parameter.name())
        })
        .collect();
    if parts.is_empty() {
        "nominal".to_string()
    } else {
        parts.join(" ")
    }
}

impl Outcome {
    fn worst_passed(&self) -> bool {
        self.0.worst_case_passed()
    }

    fn yield_passed(&self) -> bool {
        self.0.yield_passed()
    }

    /// The least yield accepted (1 when there is no Monte Carlo run).
    fn min_yield(&self) -> f64 {
        self.0.monte_carlo.as_ref().map_or(1.0, |(_, least)| *least)
    }

    /// True when every requirement holds at every vertex and the yield is
    /// at least the least accepted.
    pub(crate) fn passed(&self) -> bool {
        self.worst_passed() && self.yield_passed()
    }

    /// What fails, as `check --json` lists it: (id, value, limit, unit, message).
    pub(crate) fn failing(&self) -> Vec<(String, f64, f64, &'static str, String)> {
        let mut out = Vec::new();
        if let Some((_, checks)) = &self.0.worst_case {
            for w in checks.iter().filter(|w| !w.check.pass) {
                let at = w
                    .corner
                    .as_ref()
                    .map_or(String::new(), |c| format!(" at {}", corner_text(c)));
                out.push((
                    format!("worst_case.{}", w.check.id),
                    w.check.value,
                    w.check.limit,
                    w.check.unit,
                    format!("{}{at}", w.check.message),
                ));
            }
        }
        if let Some((m, _)) = &self.0.monte_carlo {
            if !self.yield_passed() {
                out.push((
                    "monte_carlo.yield".to_string(),
                    100.0 * m.yield_fraction,
                    100.0 * self.min_yield(),
                    "%",
                    format!(
                        "Monte Carlo yield {} of {} trials is below the required {}",
                        percent(m.yield_fraction),
                        m.completed,
                        percent(self.min_yield())
                    ),
                ));
            }
        }
        out
    }

    /// Every check of the tolerance analysis as a JUnit test case: each
    /// requirement at its worst vertex (`worst_case.<id>`), and the yield
    /// (`monte_carlo.yield`).
    pub(crate) fn cases(&self) -> Vec<crate::junit::Case> {
        let mut out = Vec::new();
        if let Some((_, checks)) = &self.0.worst_case {
            for w in checks {
                let at = w
                    .corner
                    .as_ref()
                    .map_or(String::new(), |c| format!(" at {}", corner_text(c)));
                out.push(crate::junit::Case {
                    id: format!("worst_case.{}", w.check.id),
                    pass: w.check.pass,
                    message: format!("{}{at}", w.check.message),
                });
            }
        }
        if let Some((m, _)) = &self.0.monte_carlo {
            out.push(crate::junit::Case {
                id: "monte_carlo.yield".to_string(),
                pass: self.yield_passed(),
                message: format!(
                    "Monte Carlo yield {} of {} trials, at least {} required",
                    percent(m.yield_fraction),
                    m.completed,
                    percent(self.min_yield())
                ),
            });
        }
        out
    }

    /// The summary for the file's status line.
    pub(crate) fn status(&self) -> String {
        let mut parts = Vec::new();
        if let Some((w, checks)) = &self.0.worst_case {
            let failed = checks.iter().filter(|c| !c.check.pass).count();
            parts.push(if failed == 0 {
                format!("worst case holds at {} vertices", w.vertices)
            } else {
                format!("worst case: {failed} of {} requirements fail", checks.len())
            });
        }
        if let Some((m, _)) = &self.0.monte_carlo {
            parts.push(format!(
                "yield {} of {} trials",
                percent(m.yield_fraction),
                m.completed
            ));
        }
        parts.join(", ")
    }

    /// The keys this analysis adds to the file's entry of `check --json`:
    /// the core's tolerance document without its format.
    pub(crate) fn json_entries(&self) -> Map<String, Value> {
        match serde_json::to_value(self.0.entries()) {
            Ok(Value::Object(m)) => m,
            _ => Map::new(),
        }
    }

    /// The readable tolerance analysis of one file.
    pub(crate) fn to_text(&self, name: &str) -> String {
        let t = &self.0.tolerances;
        let mut o = format!("\n{name}: tolerance analysis\n");
        o.push_str(&format!(
            "  resistors ±{}, capacitors ±{}, supply ±{}, VBE ±{}, ambient {} to {}, hFE {} to {}\n",
            format_si(100.0 * t.resistor_tolerance, "%"),
            format_si(100.0 * t.capacitor_tolerance, "%"),
            format_si(100.0 * t.supply_tolerance, "%"),
            format_si(t.vbe_spread, "V"),
            format_si(t.ambient_min.celsius(), "°C"),
            format_si(t.ambient_max.celsius(), "°C"),
            format_si(self.0.hfe.0, ""),
            format_si(self.0.hfe.1, ""),
        ));
        let row = |o: &mut String, cells: [&str; 4]| {
            o.push_str(&format!(
                "    {:<22}{:>12}{:>12}{:>12}\n",
                cells[0], cells[1], cells[2], cells[3]
            ));
        };
        if let Some((w, checks)) = &self.0.worst_case {
            let active = if w.inactive_vertices == 0 {
                "the transistor active at every one".to_string()
            } else {
                format!(
                    "the transistor saturated or cut off at {} of them: the extremes are those of the vertices only",
                    w.inactive_vertices
                )
            };
            o.push_str(&format!(
                "\n  Worst case ({} vertices, {active})\n",
                w.vertices
            ));
            row(&mut o, ["result", "nominal", "min", "max"]);
            for e in &w.extremes {
                let q = e.quantity;
                row(
                    &mut o,
                    [
                        q.name(),
                        &value_of(q, e.nominal),
                        &value_of(q, e.min),
                        &value_of(q, e.max),
                    ],
                );
                if e.quantity == Quantity::VoltageGain {
                    row(
                        &mut o,
                        [
                            "voltage_gain (dB)",
                            &format_si(db20(e.nominal), "dB"),
                            &format_si(db20(e.min), "dB"),
                            &format_si(db20(e.max), "dB"),
                        ],
                    );
                }
            }
            if let Some(t) = &w.thd {
                o.push_str(&format!(
                    "    thd: searched, a steady state at {} of the {} vertices (the extremes of gain, bias and swing, then single flips while the THD grows or falls)\n",
                    t.solved, t.of
                ));
            }
            if checks.is_empty() {
                o.push_str("\n  Requirements at their worst vertex: none set\n");
            } else {
                o.push_str(
                    "\n  Requirements at their worst vertex (+ at max, - at min, others nominal)\n",
                );
                let width = checks.iter().map(|c| c.check.id.len()).max().unwrap_or(0);
                for c in checks {
                    let at = c.corner.as_ref().map_or(String::new(), |k| {
                        format!("\n          at {}", corner_text(k))
                    });
                    o.push_str(&format!(
                        "    {}  {:<width$}  {}{at}\n",
                        if c.check.pass { "pass" } else { "FAIL" },
                        c.check.id,
                        c.check.message
                    ));
                }
            }
        }
        let shown = self.0.sensitivity.len().min(SENSITIVITY_SHOWN);
        o.push_str(&format!(
            "\n  Sensitivity (% change of the result per % change of the parameter, largest first; {shown} of {})\n",
            self.0.sensitivity.len()
        ));
        o.push_str(&format!(
            "    {:<22}{:<14}{:>8}\n",
            "result", "parameter", "%/%"
        ));
        for s in self.0.sensitivity.iter().take(SENSITIVITY_SHOWN) {
            o.push_str(&format!(
                "    {:<22}{:<14}{:>+8.3}\n",
                s.quantity.name(),
                s.parameter.name(),
                s.percent_per_percent
            ));
        }
        if let Some((m, _)) = &self.0.monte_carlo {
            o.push_str(&format!(
                "\n  Monte Carlo ({} trials, seed {}): yield {}, at least {} required: {}\n",
                m.completed,
                m.seed,
                percent(m.yield_fraction),
                percent(self.min_yield()),
                if self.yield_passed() { "pass" } else { "FAIL" }
            ));
            if m.no_solution > 0 || m.not_active > 0 {
                o.push_str(&format!(
                    "    {} trials without an operating point, {} saturated or cut off\n",
                    m.no_solution, m.not_active
                ));
            }
            if !m.requirements.is_empty() {
                let list: Vec<String> = m
                    .requirements
                    .iter()
                    .map(|r| format!("{} {}", r.requirement, percent(r.yield_fraction)))
                    .collect();
                o.push_str(&format!("    each requirement: {}\n", list.join(", ")));
            }
            if let Some(n) = m.thd_solved {
                o.push_str(&format!(
                    "    thd: a steady state solved in {n} of {} trials; the others, predicted under half of max_thd with twice the swing in load-line headroom, carry the prediction\n",
                    m.completed
                ));
            }
            row(&mut o, ["result", "p1", "p50", "p99"]);
            for d in &m.distributions {
                let q = d.quantity;
                row(
                    &mut o,
                    [
                        q.name(),
                        &value_of(q, d.p1),
                        &value_of(q, d.p50),
                        &value_of(q, d.p99),
                    ],
                );
            }
        }
        o
    }
}
