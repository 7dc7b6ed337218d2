//! The frequency response as a table: [`SweepTable`], written as CSV, as
//! JSON (format [`SWEEP_FORMAT`]) or as aligned text.

use alloc::string::String;
use alloc::vec::Vec;
use core::fmt::Write as _;

use serde::Serialize;

use super::text::line;
use crate::analysis::Analysis;
use crate::complex::magnitude;
use crate::error::Result;
use crate::format::format_si;

/// The format name and version of a sweep table: `stagewright-sweep/1`.
pub const SWEEP_FORMAT: &str = "stagewright-sweep/1";

/// One frequency of a sweep. Gains are of the full network (every
/// capacitor at its value), in dB of their magnitude.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SweepRow {
    /// Frequency, Hz.
    pub frequency: f64,
    /// |V(load)/V(input terminal)| in dB.
    pub voltage_gain_db: f64,
    /// Phase of V(load)/V(input terminal), degrees in (−180, 180].
    pub phase_deg: f64,
    /// |V(load)/EMF| in dB.
    pub voltage_gain_from_source_db: f64,
    /// |I(load)/I(input)| in dB.
    pub current_gain_db: f64,
    /// |voltage gain · current gain| in dB (10·log10).
    pub power_gain_db: f64,
    /// |Zin| at the input terminal, Ω.
    pub input_impedance: f64,
    /// |Zout| seen by the load, Ω.
    pub output_impedance: f64,
}

/// The frequency response at log-spaced frequencies.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepTable {
    /// The rows, in rising frequency.
    pub rows: Vec<SweepRow>,
}

impl SweepTable {
    /// The columns, in order, as `(name, unit)`; the names are the keys of
    /// [`SweepRow`] and the CSV header.
    pub const COLUMNS: [(&'static str, &'static str); 8] = [
        ("frequency", "Hz"),
        ("voltage_gain_db", "dB"),
        ("phase_deg", "°"),
        ("voltage_gain_from_source_db", "dB"),
        ("current_gain_db", "dB"),
        ("power_gain_db", "dB"),
        ("input_impedance", "Ω"),
        ("output_impedance", "Ω"),
    ];

    /// The response of `analysis` at `points` log-spaced frequencies from
    /// `from` to `to` Hz.
    ///
    /// # Errors
    /// [`crate::log_frequencies`]'s errors, naming `from`, `to` or `points`.
    pub fn new(analysis: &Analysis, from: f64, to: f64, points: usize) -> Result<SweepTable> {
        let rows = analysis
            .response()
            .sweep(from, to, points)?
            .iter()
            .map(|p| SweepRow {
                frequency: p.frequency,
                voltage_gain_db: p.voltage_gain_db(),
                phase_deg: p.phase_deg(),
                voltage_gain_from_source_db: p.voltage_gain_from_source_db(),
                current_gain_db: p.current_gain_db(),
                power_gain_db: p.power_gain_db(),
                input_impedance: magnitude(p.input_impedance),
                output_impedance: magnitude(p.output_impedance),
            })
            .collect();
        Ok(SweepTable { rows })
    }

    fn values(r: &SweepRow) -> [f64; 8] {
        [
            r.frequency,
            r.voltage_gain_db,
            r.phase_deg,
            r.voltage_gain_from_source_db,
            r.current_gain_db,
            r.power_gain_db,
            r.input_impedance,
            r.output_impedance,
        ]
    }

    /// The table as CSV: a header of column names, then one line per
    /// frequency, numbers in SI base units (dB and degrees where named),
    /// written exactly (shortest round-trip form).
    pub fn to_csv(&self) -> String {
        let mut o = String::new();
        let names: Vec<&str> = Self::COLUMNS.iter().map(|(n, _)| *n).collect();
        line(&mut o, &names.join(","));
        for r in &self.rows {
            for (i, v) in Self::values(r).iter().enumerate() {
                if i > 0 {
                    o.push(',');
                }
                let a = libm::fabs(*v);
                if *v == 0.0 || (1e-3..1e7).contains(&a) {
                    let _ = write!(o, "{v}");
                } else {
                    let _ = write!(o, "{v:e}");
                }
            }
            o.push('\n');
        }
        o
    }

    /// The table as pretty-printed JSON: `format`, `columns` (name and
    /// unit) and `rows` (one object per frequency), ending with a newline.
    pub fn to_json_string(&self) -> String {
        #[derive(Serialize)]
        struct Column {
            name: &'static str,
            unit: &'static str,
        }
        #[derive(Serialize)]
        struct Doc<'a> {
            format: &'static str,
            columns: Vec<Column>,
            rows: &'a [SweepRow],
        }
        let doc = Doc {
            format: SWEEP_FORMAT,
            columns: Self::COLUMNS
                .iter()
                .map(|&(name, unit)| Column { name, unit })
                .collect(),
            rows: &self.rows,
        };
        let mut out = serde_json::to_string_pretty(&doc).unwrap_or_default();
        out.push('\n');
        out
    }

    /// The table as aligned text in engineering notation.
    pub fn to_text(&self) -> String {
        const HEAD: [&str; 8] = [
            "frequency",
            "Av",
            "phase",
            "Av,source",
            "Ai",
            "Ap",
            "|Zin|",
            "|Zout|",
        ];
        const WIDTH: usize = 11;
        let mut o = String::new();
        for (i, h) in HEAD.iter().enumerate() {
            let _ = write!(o, "{}{h:>WIDTH$}", if i > 0 { " " } else { "" });
        }
        o.push('\n');
        for r in &self.rows {
            let cells = [
                format_si(r.frequency, "Hz"),
                format_si(r.voltage_gain_db, "dB"),
                format_si(r.phase_deg, "°"),
                format_si(r.voltage_gain_from_source_db, "dB"),
                format_si(r.current_gain_db, "dB"),
                format_si(r.power_gain_db, "dB"),
                format_si(r.input_impedance, "Ω"),
                format_si(r.output_impedance, "Ω"),
            ];
            for (i, c) in cells.iter().enumerate() {
                let _ = write!(o, "{}{c:>WIDTH$}", if i > 0 { " " } else { "" });
            }
            o.push('\n');
        }
        o
    }
}
