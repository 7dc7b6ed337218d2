//! The readable report: [`Report::to_text`], sections with aligned
//! columns, values in engineering notation with their units, the checks
//! with pass or FAIL, and the cautions.

use alloc::borrow::ToOwned;
use alloc::string::String;
use core::fmt::Write as _;

use super::{DesignSection, Report};
use crate::decibel::db20;
use crate::format::format_si;
use crate::ratings::DEFERRAL;
use crate::response::{SEARCH_FROM, SEARCH_TO};

impl Report {
    /// The report as readable text: sections with aligned columns, values
    /// in engineering notation with their units, the checks with pass or
    /// FAIL, and the cautions.
    pub fn to_text(&self) -> String {
        let mut o = String::new();
        let d = &self.design;
        let device = match &d.preset {
            Some(p) => [d.polarity_upper(), " (", p, ")"].concat(),
            None => [d.polarity_upper(), " (datasheet values)"].concat(),
        };
        if !d.title.is_empty() {
            line(&mut o, &d.title);
        }
        let _ = writeln!(
            o,
            "{} stage, {}, supply {}, ambient {}",
            d.stage,
            device,
            format_si(d.supply, "V"),
            format_si(d.ambient, "°C")
        );

        let op = &self.operating_point;
        head(&mut o, "Operating point", &["region: ", op.region].concat());
        row(
            &mut o,
            "collector current",
            "IC",
            &format_si(op.ic, "A"),
            "",
        );
        row(&mut o, "base current", "IB", &format_si(op.ib, "A"), "");
        row(&mut o, "emitter current", "IE", &format_si(op.ie, "A"), "");
        row(
            &mut o,
            "collector–emitter voltage",
            "VCE",
            &format_si(op.vce, "V"),
            "",
        );
        row(
            &mut o,
            "base–emitter voltage",
            "VBE",
            &format_si(op.vbe, "V"),
            "",
        );
        row(&mut o, "base", "VB", &format_si(op.vb, "V"), "to ground");
        row(&mut o, "emitter", "VE", &format_si(op.ve, "V"), "to ground");
        row(
            &mut o,
            "collector",
            "VC",
            &format_si(op.vc, "V"),
            "to ground",
        );

        let ss = &self.small_signal;
        head(&mut o, "Small signal", "");
        row(&mut o, "transconductance", "gm", &format_si(ss.gm, "S"), "");
        row(
            &mut o,
            "input resistance",
            "rπ",
            &format_si(ss.r_pi, "Ω"),
            "",
        );
        row(
            &mut o,
            "output resistance",
            "ro",
            &format_si(ss.r_o, "Ω"),
            "",
        );
        row(
            &mut o,
            "base–emitter capacitance",
            "Cπ",
            &format_si(ss.c_pi, "F"),
            "",
        );
        row(
            &mut o,
            "base–collector capacitance",
            "Cμ",
            &format_si(ss.c_mu, "F"),
            "",
        );
        row(&mut o, "current gain", "β0", &format_si(ss.beta0, ""), "");

        let m = &self.midband;
        head(&mut o, "Midband", "");
        row(
            &mut o,
            "voltage gain",
            "Av",
            &format_si(m.voltage_gain, ""),
            &["(", &format_si(m.voltage_gain_db, "dB"), ")"].concat(),
        );
        row(
            &mut o,
            "voltage gain from source",
            "Avs",
            &format_si(m.voltage_gain_from_source, ""),
            &[
                "(",
                &format_si(db20(libm::fabs(m.voltage_gain_from_source)), "dB"),
                ")",
            ]
            .concat(),
        );
        row(
            &mut o,
            "current gain",
            "Ai",
            &format_si(m.current_gain, ""),
            "",
        );
        row(
            &mut o,
            "power gain",
            "Ap",
            &format_si(m.power_gain_db, "dB"),
            "",
        );
        row(
            &mut o,
            "input impedance",
            "Zin",
            &format_si(m.input_impedance, "Ω"),
            "",
        );
        row(
            &mut o,
            "output impedance",
            "Zout",
            &format_si(m.output_impedance, "Ω"),
            "",
        );

        let b = &self.bandwidth;
        head(&mut o, "Bandwidth", "−3 dB of the gain from the source");
        let freq = |f: Option<f64>| f.map_or_else(|| "none".to_owned(), |f| format_si(f, "Hz"));
        let (low, low_note) = match b.low_edge {
            "none" => ("none".to_owned(), "the gain holds to DC"),
            "beyond-search" => (
                ["below ", &format_si(SEARCH_FROM, "Hz")].concat(),
                "beyond the search range",
            ),
            "no-passband" => ("none".to_owned(), "no passband: see the cautions"),
            _ => (freq(b.f_low), ""),
        };
        row(&mut o, "lower corner", "f_low", &low, low_note);
        let (high, high_note) = match b.high_edge {
            "beyond-search" => (
                ["above ", &format_si(SEARCH_TO, "Hz")].concat(),
                "beyond the search range",
            ),
            "no-passband" => ("none".to_owned(), "no passband: see the cautions"),
            _ => (freq(b.f_high), ""),
        };
        row(&mut o, "upper corner", "f_high", &high, high_note);
        if b.low_edge == "no-passband" {
            row(
                &mut o,
                "largest response",
                "",
                &format_si(b.peak_db, "dB"),
                &["re midband, at ", &format_si(b.peak_frequency, "Hz")].concat(),
            );
        }
        row(
            &mut o,
            "unity current gain",
            "",
            &freq(b.f_unity_current_gain),
            "",
        );
        row(
            &mut o,
            "unity power gain",
            "",
            &freq(b.f_unity_power_gain),
            "",
        );

        let sw = &self.swing;
        head(&mut o, "Swing", "peak at the load");
        row(&mut o, "positive", "", &format_si(sw.positive, "V"), "");
        row(&mut o, "negative", "", &format_si(sw.negative, "V"), "");
        row(&mut o, "symmetric", "", &format_si(sw.symmetric, "V"), "");
        let mut centred = String::new();
        let _ = write!(
            centred,
            "at IC {}, |VCE| {}",
            format_si(sw.centred_ic, "A"),
            format_si(sw.centred_vce, "V")
        );
        row(
            &mut o,
            "centred Q would give",
            "",
            &format_si(sw.centred_swing, "V"),
            &centred,
        );

        let di = &self.dissipation;
        head(&mut o, "Dissipation", "quiescent");
        let mut avail = String::from("of ");
        avail.push_str(&format_si(di.ptot_available, "W"));
        avail.push_str(" available");
        row(
            &mut o,
            "transistor",
            "",
            &format_si(di.transistor, "W"),
            &avail,
        );
        row(
            &mut o,
            "junction temperature",
            "Tj",
            &format_si(di.junction_temperature, "°C"),
            "",
        );
        row(
            &mut o,
            "supply current",
            "",
            &format_si(di.supply_current, "A"),
            "",
        );
        for (name, w) in &di.resistors.0 {
            row(&mut o, name, "", &format_si(*w, "W"), "");
        }
        if let Some(st) = &self.stability {
            let pct = |x: f64| {
                let mut t = String::new();
                let _ = write!(t, "{:.1} %", 100.0 * x);
                t
            };
            head(&mut o, "Bias stability", "change of IC");
            row(
                &mut o,
                "across the hFE range",
                "",
                &pct(st.across_hfe),
                "hfe_min to hfe_max",
            );
            row(
                &mut o,
                "for a 25 K warmer ambient",
                "",
                &pct(st.over_temperature),
                "",
            );
        }

        let failing = self.checks.iter().filter(|c| !c.pass).count();
        let mut summary = String::new();
        let _ = write!(
            summary,
            "{} pass, {} FAIL",
            self.checks.len() - failing,
            failing
        );
        head(&mut o, "Checks", &summary);
        let id_width = self
            .checks
            .iter()
            .map(|c| c.id.chars().count())
            .max()
            .unwrap_or(0);
        for c in &self.checks {
            let _ = writeln!(
                o,
                "  {:<4}  {:<w$}  {}",
                if c.pass { "pass" } else { "FAIL" },
                c.id,
                c.message,
                w = id_width
            );
        }

        if self.cautions.is_empty() {
            head(&mut o, "Cautions", "none");
        } else {
            head(&mut o, "Cautions", "");
            for c in &self.cautions {
                let message = c.message.replace(DEFERRAL, "");
                let _ = writeln!(o, "  ! {}: {}", c.id, message.trim_end());
            }
        }
        let _ = writeln!(o, "\n{DEFERRAL}");
        o
    }
}

impl DesignSection {
    fn polarity_upper(&self) -> &'static str {
        if self.polarity == "pnp" {
            "PNP"
        } else {
            "NPN"
        }
    }
}

/// Width of the description column of the readable report.
const LABEL: usize = 27;
/// Width of the symbol column.
const SYMBOL: usize = 7;
/// Width of the value column.
const VALUE: usize = 11;

pub(crate) fn line(o: &mut String, text: &str) {
    o.push_str(text);
    o.push('\n');
}

fn head(o: &mut String, title: &str, note: &str) {
    o.push('\n');
    if note.is_empty() {
        line(o, title);
    } else {
        let _ = writeln!(o, "{title} ({note})");
    }
}

fn row(o: &mut String, label: &str, symbol: &str, value: &str, note: &str) {
    let _ = write!(o, "  {label:<LABEL$} {symbol:<SYMBOL$} {value:>VALUE$}");
    if !note.is_empty() {
        let _ = write!(o, "  {note}");
    }
    o.push('\n');
}
