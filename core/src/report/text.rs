//! The readable report: [`Report::to_text`], sections with aligned
//! columns, values in engineering notation with their units, the checks
//! with pass or FAIL, and the cautions.

use alloc::borrow::ToOwned;
use alloc::string::String;
use core::fmt::Write as _;

use super::{DesignSection, Report};
use crate::decibel::db20;
use crate::figures::*;
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
        figure_row(&mut o, &OP_IC, &format_si(op.ic, OP_IC.unit), "");
        figure_row(&mut o, &OP_IB, &format_si(op.ib, OP_IB.unit), "");
        figure_row(&mut o, &OP_IE, &format_si(op.ie, OP_IE.unit), "");
        figure_row(&mut o, &OP_VCE, &format_si(op.vce, OP_VCE.unit), "");
        figure_row(&mut o, &OP_VBE, &format_si(op.vbe, OP_VBE.unit), "");
        figure_row(&mut o, &OP_VB, &format_si(op.vb, OP_VB.unit), "to ground");
        figure_row(&mut o, &OP_VE, &format_si(op.ve, OP_VE.unit), "to ground");
        figure_row(&mut o, &OP_VC, &format_si(op.vc, OP_VC.unit), "to ground");

        let ss = &self.small_signal;
        head(&mut o, "Small signal", "");
        figure_row(&mut o, &SS_GM, &format_si(ss.gm, SS_GM.unit), "");
        figure_row(&mut o, &SS_R_PI, &format_si(ss.r_pi, SS_R_PI.unit), "");
        // An open ro (no Early effect in the data) is infinite, not 10¹⁵ Ω.
        let r_o = if ss.r_o >= crate::hybrid_pi::OPEN_RESISTANCE {
            "∞ (no Early effect)".to_owned()
        } else {
            format_si(ss.r_o, SS_R_O.unit)
        };
        figure_row(&mut o, &SS_R_O, &r_o, "");
        figure_row(&mut o, &SS_C_PI, &format_si(ss.c_pi, SS_C_PI.unit), "");
        figure_row(&mut o, &SS_C_MU, &format_si(ss.c_mu, SS_C_MU.unit), "");
        figure_row(&mut o, &SS_BETA0, &format_si(ss.beta0, SS_BETA0.unit), "");

        let m = &self.midband;
        head(&mut o, "Midband", "");
        figure_row(
            &mut o,
            &MID_VOLTAGE_GAIN,
            &format_si(m.voltage_gain, MID_VOLTAGE_GAIN.unit),
            &["(", &format_si(m.voltage_gain_db, "dB"), ")"].concat(),
        );
        figure_row(
            &mut o,
            &MID_VOLTAGE_GAIN_FROM_SOURCE,
            &format_si(
                m.voltage_gain_from_source,
                MID_VOLTAGE_GAIN_FROM_SOURCE.unit,
            ),
            &[
                "(",
                &format_si(db20(libm::fabs(m.voltage_gain_from_source)), "dB"),
                ")",
            ]
            .concat(),
        );
        figure_row(
            &mut o,
            &MID_CURRENT_GAIN,
            &format_si(m.current_gain, MID_CURRENT_GAIN.unit),
            "",
        );
        figure_row(
            &mut o,
            &MID_POWER_GAIN_DB,
            &format_si(m.power_gain_db, MID_POWER_GAIN_DB.unit),
            "",
        );
        figure_row(
            &mut o,
            &MID_INPUT_IMPEDANCE,
            &format_si(m.input_impedance, MID_INPUT_IMPEDANCE.unit),
            "",
        );
        figure_row(
            &mut o,
            &MID_OUTPUT_IMPEDANCE,
            &format_si(m.output_impedance, MID_OUTPUT_IMPEDANCE.unit),
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
        figure_row(&mut o, &BW_F_LOW, &low, low_note);
        let (high, high_note) = match b.high_edge {
            "beyond-search" => (
                ["above ", &format_si(SEARCH_TO, "Hz")].concat(),
                "beyond the search range",
            ),
            "no-passband" => ("none".to_owned(), "no passband: see the cautions"),
            _ => (freq(b.f_high), ""),
        };
        figure_row(&mut o, &BW_F_HIGH, &high, high_note);
        if b.low_edge == "no-passband" {
            row(
                &mut o,
                "largest response",
                "",
                &format_si(b.peak_db, "dB"),
                &["re midband, at ", &format_si(b.peak_frequency, "Hz")].concat(),
            );
        }
        figure_row(
            &mut o,
            &BW_F_UNITY_CURRENT_GAIN,
            &freq(b.f_unity_current_gain),
            "",
        );
        figure_row(
            &mut o,
            &BW_F_UNITY_POWER_GAIN,
            &freq(b.f_unity_power_gain),
            "",
        );

        let sw = &self.swing;
        head(&mut o, "Swing", "peak at the load");
        figure_row(
            &mut o,
            &SWING_POSITIVE,
            &format_si(sw.positive, SWING_POSITIVE.unit),
            "",
        );
        figure_row(
            &mut o,
            &SWING_NEGATIVE,
            &format_si(sw.negative, SWING_NEGATIVE.unit),
            "",
        );
        figure_row(
            &mut o,
            &SWING_SYMMETRIC,
            &format_si(sw.symmetric, SWING_SYMMETRIC.unit),
            "",
        );
        let mut centred = String::new();
        let _ = write!(
            centred,
            "at IC {}, |VCE| {}",
            format_si(sw.centred_ic, "A"),
            format_si(sw.centred_vce, "V")
        );
        figure_row(
            &mut o,
            &SWING_CENTRED_SWING,
            &format_si(sw.centred_swing, SWING_CENTRED_SWING.unit),
            &centred,
        );

        let di = &self.dissipation;
        head(&mut o, "Dissipation", "quiescent");
        let mut avail = String::from("of ");
        avail.push_str(&format_si(di.ptot_available, "W"));
        avail.push_str(" available");
        figure_row(
            &mut o,
            &DISS_TRANSISTOR,
            &format_si(di.transistor, DISS_TRANSISTOR.unit),
            &avail,
        );
        figure_row(
            &mut o,
            &DISS_JUNCTION_TEMPERATURE,
            &format_si(di.junction_temperature, DISS_JUNCTION_TEMPERATURE.unit),
            "",
        );
        figure_row(
            &mut o,
            &DISS_SUPPLY_CURRENT,
            &format_si(di.supply_current, DISS_SUPPLY_CURRENT.unit),
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
                let _ = writeln!(o, "  ! {}: {}", c.id, c.message);
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

/// A row of a figure of the table ([`crate::figures`]): its row label and
/// its symbol as plain text.
fn figure_row(o: &mut String, fig: &Figure, value: &str, note: &str) {
    let symbol = [fig.symbol.0, fig.symbol.1].concat();
    row(o, fig.row_label(), &symbol, value, note);
}

fn row(o: &mut String, label: &str, symbol: &str, value: &str, note: &str) {
    let _ = write!(o, "  {label:<LABEL$} {symbol:<SYMBOL$} {value:>VALUE$}");
    if !note.is_empty() {
        let _ = write!(o, "  {note}");
    }
    o.push('\n');
}
