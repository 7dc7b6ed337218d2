//! The tolerance analysis of a design as one document: [`ToleranceDocument`]
//! (format [`TOLERANCE_FORMAT`]), the one shape of its results. The command
//! line's `check --json` writes its keys into each file's entry, and the
//! page's engine hands the same document to the page.
//!
//! | key | meaning |
//! |---|---|
//! | `format` | `"stagewright-tolerance/1"` (left out of a `check --json` entry, whose document has its own) |
//! | `tolerances` | the spread analysed: `resistor_tolerance`, `capacitor_tolerance`, `supply_tolerance` (shares), `vbe_spread` (V), `ambient_min`, `ambient_max` (°C), `hfe_min`, `hfe_max` |
//! | `corners` | each result: `nominal`, `min`, `max`, `unit`, and `corner.min`, `corner.max`, the vertex of each as `{"r1": "max", "hfe": "min", …}`; `null` without a worst case. With `max_thd`, `thd` is among them, a share (its `max` `null` when some vertex does not deliver the peak) |
//! | `worst_case` | `pass`, `vertices`, `inactive_vertices`, with `max_thd` `thd_search` (`solved`: the vertices whose steady state the search solved, `of`: all of them), and `checks`: each requirement at its worst vertex (`id`, `pass`, `value`, `limit`, `unit`, `message`, `corner`; `max_thd` in `%`); `null` without a worst case |
//! | `sensitivity` | `[{quantity, parameter, percent_per_percent}]`, largest first |
//! | `monte_carlo` | `trials`, `completed`, `seed`, `yield`, `min_yield`, `pass`, `no_solution`, `not_active`, with `max_thd` `thd_solved` (trials whose THD was solved, the others' predicted), `requirements` (the yield of each), `percentiles` (`p1`, `p50`, `p99`, `unit` of each result); `null` without a Monte Carlo run |

use alloc::vec::Vec;

use serde::ser::{SerializeMap, SerializeStruct};
use serde::{Serialize, Serializer};

use crate::tolerance::{Corner, MonteCarloSummary, ToleranceDocument, WorstCase, WorstCheck};

/// The format name and version of a tolerance document.
pub const TOLERANCE_FORMAT: &str = "stagewright-tolerance/1";

impl ToleranceDocument {
    /// The document's keys without its `format` (a `check --json` entry).
    pub fn entries(&self) -> Entries<'_> {
        Entries(self)
    }
}

/// [`ToleranceDocument`] without its `format` key: what `check --json`
/// adds to a file's entry.
pub struct Entries<'a>(&'a ToleranceDocument);

impl Serialize for ToleranceDocument {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        write(self, Some(TOLERANCE_FORMAT), s)
    }
}

impl Serialize for Entries<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        write(self.0, None, s)
    }
}

fn write<S: Serializer>(
    d: &ToleranceDocument,
    format: Option<&'static str>,
    s: S,
) -> core::result::Result<S::Ok, S::Error> {
    let mut m = s.serialize_map(None)?;
    if let Some(f) = format {
        m.serialize_entry("format", f)?;
    }
    m.serialize_entry("tolerances", &Spread(d))?;
    match &d.worst_case {
        Some((w, checks)) => {
            m.serialize_entry("corners", &Extremes(w))?;
            m.serialize_entry(
                "worst_case",
                &Worst {
                    pass: d.worst_case_passed(),
                    worst: w,
                    checks,
                },
            )?;
        }
        None => {
            m.serialize_entry("corners", &())?;
            m.serialize_entry("worst_case", &())?;
        }
    }
    m.serialize_entry("sensitivity", &d.sensitivity)?;
    match &d.monte_carlo {
        Some((summary, least)) => m.serialize_entry(
            "monte_carlo",
            &Trials {
                summary,
                least: *least,
                pass: d.yield_passed(),
            },
        )?,
        None => m.serialize_entry("monte_carlo", &())?,
    }
    m.end()
}

/// A vertex as `{"r1": "max", "r2": "min", …}`.
struct Vertex<'a>(&'a Corner);

impl Serialize for Vertex<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(Some(self.0.settings.len()))?;
        for st in &self.0.settings {
            m.serialize_entry(st.parameter.name(), st.level.name())?;
        }
        m.end()
    }
}

struct Spread<'a>(&'a ToleranceDocument);

impl Serialize for Spread<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        let t = &self.0.tolerances;
        let mut m = s.serialize_struct("Tolerances", 8)?;
        m.serialize_field("resistor_tolerance", &t.resistor_tolerance)?;
        m.serialize_field("capacitor_tolerance", &t.capacitor_tolerance)?;
        m.serialize_field("supply_tolerance", &t.supply_tolerance)?;
        m.serialize_field("vbe_spread", &t.vbe_spread)?;
        m.serialize_field("ambient_min", &t.ambient_min.celsius())?;
        m.serialize_field("ambient_max", &t.ambient_max.celsius())?;
        m.serialize_field("hfe_min", &self.0.hfe.0)?;
        m.serialize_field("hfe_max", &self.0.hfe.1)?;
        m.end()
    }
}

struct Extremes<'a>(&'a WorstCase);

impl Serialize for Extremes<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        #[derive(Serialize)]
        struct Corners<'a> {
            min: Vertex<'a>,
            max: Vertex<'a>,
        }
        #[derive(Serialize)]
        struct Row<'a> {
            nominal: f64,
            min: f64,
            max: f64,
            unit: &'static str,
            corner: Corners<'a>,
        }
        let mut m = s.serialize_map(Some(self.0.extremes.len()))?;
        for e in &self.0.extremes {
            m.serialize_entry(
                e.quantity.name(),
                &Row {
                    nominal: e.nominal,
                    min: e.min,
                    max: e.max,
                    unit: e.quantity.unit(),
                    corner: Corners {
                        min: Vertex(&e.min_corner),
                        max: Vertex(&e.max_corner),
                    },
                },
            )?;
        }
        m.end()
    }
}

struct Worst<'a> {
    pass: bool,
    worst: &'a WorstCase,
    checks: &'a [WorstCheck],
}

impl Serialize for Worst<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        #[derive(Serialize)]
        struct Row<'a> {
            id: &'a str,
            pass: bool,
            value: f64,
            limit: f64,
            unit: &'static str,
            message: &'a str,
            corner: Option<Vertex<'a>>,
        }
        let rows: Vec<Row<'_>> = self
            .checks
            .iter()
            .map(|w| Row {
                id: &w.check.id,
                pass: w.check.pass,
                value: w.check.value,
                limit: w.check.limit,
                unit: w.check.unit,
                message: &w.check.message,
                corner: w.corner.as_ref().map(Vertex),
            })
            .collect();
        let mut m = s.serialize_struct("WorstCase", 4)?;
        m.serialize_field("pass", &self.pass)?;
        m.serialize_field("vertices", &self.worst.vertices)?;
        m.serialize_field("inactive_vertices", &self.worst.inactive_vertices)?;
        if let Some(t) = &self.worst.thd {
            #[derive(Serialize)]
            struct Search {
                solved: usize,
                of: usize,
            }
            m.serialize_field(
                "thd_search",
                &Search {
                    solved: t.solved,
                    of: t.of,
                },
            )?;
        }
        m.serialize_field("checks", &rows)?;
        m.end()
    }
}

struct Trials<'a> {
    summary: &'a MonteCarloSummary,
    least: f64,
    pass: bool,
}

impl Serialize for Trials<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        struct Yields<'a>(&'a MonteCarloSummary);
        impl Serialize for Yields<'_> {
            fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
                let mut m = s.serialize_map(Some(self.0.requirements.len()))?;
                for r in &self.0.requirements {
                    m.serialize_entry(r.requirement, &r.yield_fraction)?;
                }
                m.end()
            }
        }
        struct Percentiles<'a>(&'a MonteCarloSummary);
        impl Serialize for Percentiles<'_> {
            fn serialize<S: Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
                #[derive(Serialize)]
                struct Row {
                    p1: f64,
                    p50: f64,
                    p99: f64,
                    unit: &'static str,
                }
                let mut m = s.serialize_map(Some(self.0.distributions.len()))?;
                for d in &self.0.distributions {
                    m.serialize_entry(
                        d.quantity.name(),
                        &Row {
                            p1: d.p1,
                            p50: d.p50,
                            p99: d.p99,
                            unit: d.quantity.unit(),
                        },
                    )?;
                }
                m.end()
            }
        }
        let t = self.summary;
        let mut m = s.serialize_struct("MonteCarlo", 10)?;
        m.serialize_field("trials", &t.trials)?;
        m.serialize_field("completed", &t.completed)?;
        m.serialize_field("seed", &t.seed)?;
        m.serialize_field("yield", &t.yield_fraction)?;
        m.serialize_field("min_yield", &self.least)?;
        m.serialize_field("pass", &self.pass)?;
        m.serialize_field("no_solution", &t.no_solution)?;
        m.serialize_field("not_active", &t.not_active)?;
        if let Some(n) = t.thd_solved {
            m.serialize_field("thd_solved", &n)?;
        }
        m.serialize_field("requirements", &Yields(t))?;
        m.serialize_field("percentiles", &Percentiles(t))?;
        m.end()
    }
}
