//! The large-signal output: the `waveform` command and the large-signal
//! section of `analyze`.

use serde_json::{json, Value};
use stagewright::{
    format_si, parse_value_field, Design, Error, LargeSignal, LimitedSwing, Waveform,
    DEFAULT_FREQUENCY, DEFAULT_MAX_THD, SAMPLES,
};

use crate::{load, out, report_problem, shown_name, INVALID, PASS};

/// How the drive of `waveform` is given.
pub enum Drive {
    /// EMF peaks, V.
    Emf(Vec<f64>),
    /// Output peaks at the load, V (the EMF is solved for).
    Peak(Vec<f64>),
}

/// Reads a comma-separated list of values of `unit` for option `field`.
pub fn list(field: &str, text: &str, unit: &str) -> Result<Vec<f64>, Error> {
    let values: Result<Vec<f64>, Error> = text
        .split(',')
        .map(|t| parse_value_field(field, t.trim(), unit))
        .collect();
    let values = values?;
    if values.is_empty() || values.len() > 64 {
        return Err(Error::out_of_range(
            field,
            values.len() as f64,
            "",
            "1 to 64 comma-separated values",
        ));
    }
    Ok(values)
}

fn harmonics_json(w: &Waveform) -> Value {
    Value::Array(
        w.harmonics
            .iter()
            .map(|h| json!({ "order": h.order, "amplitude": h.amplitude, "phase_deg": h.phase }))
            .collect(),
    )
}

fn clipping_json(w: &Waveform) -> Value {
    Value::Array(
        w.clipping
            .iter()
            .map(|c| json!({ "half": c.half.name(), "mechanism": c.mechanism.name(), "share": c.share }))
            .collect(),
    )
}

fn clipping_text(w: &Waveform) -> String {
    if w.clipping.is_empty() {
        return String::from("none");
    }
    w.clipping
        .iter()
        .map(|c| {
            format!(
                "{} half, {} ({:.0} % of the period)",
                c.half.name(),
                c.mechanism.name(),
                100.0 * c.share
            )
        })
        .collect::<Vec<_>>()
        .join("; ")
}

/// `stagewright waveform`.
pub fn run(file: &str, drive: Drive, frequency: &str, csv: bool, json_out: bool) -> u8 {
    let bad_option = |e: Error| {
        eprintln!("error: --{e}");
        INVALID
    };
    let f = match parse_value_field("frequency", frequency, "Hz") {
        Ok(v) => v,
        Err(e) => return bad_option(e),
    };
    let (design, _) = match load(file) {
        Ok(x) => x,
        Err(p) => return report_problem(file, &p),
    };
    let ls = match LargeSignal::new(&design.stage) {
        Ok(l) => l,
        Err(e) => return report_problem(file, &crate::Problem::Design(e)),
    };
    let mut waves: Vec<Waveform> = Vec::new();
    let items: Vec<f64> = match &drive {
        Drive::Emf(v) | Drive::Peak(v) => v.clone(),
    };
    for a in items {
        let w = match &drive {
            Drive::Emf(_) => ls.waveform_from(a, f, SAMPLES, waves.last()),
            Drive::Peak(_) => ls.at_output(a, f),
        };
        match w {
            Ok(w) => waves.push(w),
            Err(e) => {
                eprintln!("error: {}: {e}", shown_name(file));
                return INVALID;
            }
        }
    }
    if csv {
        let mut o = String::from(
            "emf_peak_v,output_peak_v,thd,time_s,load_v,input_v,base_v,emitter_v,collector_v,collector_current_a\n",
        );
        for w in &waves {
            for k in 0..w.time.len() {
                o.push_str(&format!(
                    "{:e},{:e},{:e},{:e},{:e},{:e},{:e},{:e},{:e},{:e}\n",
                    w.emf,
                    w.output_peak,
                    w.thd,
                    w.time[k],
                    w.load[k],
                    w.input[k],
                    w.base[k],
                    w.emitter[k],
                    w.collector[k],
                    w.collector_current[k]
                ));
            }
        }
        out(&o);
    } else if json_out {
        let doc = json!({
            "format": "stagewright-waveform/1",
            "file": file,
            "frequency": f,
            "samples_per_period": SAMPLES,
            "load_line": { "positive": ls.swing().positive, "negative": ls.swing().negative },
            "waveforms": waves.iter().map(|w| json!({
                "emf_peak": w.emf,
                "output_peak": w.output_peak,
                "thd": w.thd,
                "terminal_shift": w.terminal_shift,
                "ic_shift": w.ic_shift,
                "clipping": clipping_json(w),
                "harmonics": harmonics_json(w),
                "time": w.time,
                "load": w.load,
                "input": w.input,
                "base": w.base,
                "emitter": w.emitter,
                "collector": w.collector,
                "collector_current": w.collector_current,
            })).collect::<Vec<_>>(),
        });
        out(&format!(
            "{}\n",
            serde_json::to_string_pretty(&doc).unwrap_or_default()
        ));
    } else {
        let mut o = format!(
            "{}: steady state at {}, {} samples per period (load-line limits +{} / -{})\n",
            shown_name(file),
            format_si(f, "Hz"),
            SAMPLES,
            format_si(ls.swing().positive, "V"),
            format_si(ls.swing().negative, "V"),
        );
        for w in &waves {
            o.push_str(&format!(
                "\nEMF {} peak: output {} peak at the load, THD {:.4} %\n",
                format_si(w.emf, "V"),
                format_si(w.output_peak, "V"),
                100.0 * w.thd
            ));
            o.push_str(&format!(
                "  output terminal mean shift {}, collector current mean shift {}\n",
                format_si(w.terminal_shift, "V"),
                format_si(w.ic_shift, "A")
            ));
            o.push_str(&format!("  clipping: {}\n", clipping_text(w)));
            o.push_str("  harmonic  amplitude        dBc   phase\n");
            let fund = w.harmonics[0].amplitude;
            for h in &w.harmonics {
                // Below −180 dBc a harmonic is the solve's rounding, not a figure.
                if fund > 0.0 && h.amplitude > 1e-9 * fund {
                    o.push_str(&format!(
                        "  {:>8}  {:>11}  {:9.1}  {:6.1}°\n",
                        h.order,
                        format_si(h.amplitude, "V"),
                        20.0 * (h.amplitude / fund).log10(),
                        h.phase
                    ));
                } else {
                    o.push_str(&format!(
                        "  {:>8}  {:>11}  {:>9}  {:>7}\n",
                        h.order, "-", "< -180", "-"
                    ));
                }
            }
        }
        out(&o);
    }
    PASS
}

/// The large-signal section of `analyze`: the distortion-limited swing at
/// the design's THD limit and frequency (`max_thd`, `thd_frequency`; 1 %
/// and 1 kHz without them), beside the load-line limits, and the THD at
/// the required swing (`thd_swing`, else `min_swing`).
pub struct Section {
    limit: LimitedSwing,
    positive: f64,
    negative: f64,
    /// The design's required swing (`thd_swing`, else `min_swing`) and the
    /// steady state there, or why there is none.
    at_required: Option<(f64, Result<Waveform, Error>)>,
}

impl Section {
    /// Solves it for `design`; an error when the stage has no swing to
    /// speak of (not biased in the active region) or does not solve.
    pub fn new(design: &Design) -> Result<Section, Error> {
        let ls = LargeSignal::new(&design.stage)?;
        // The design's THD requirement where it has one: its limit,
        // frequency and output peak (thd_swing, else min_swing).
        let r = &design.requirements;
        let max_thd = r.max_thd.unwrap_or(DEFAULT_MAX_THD);
        let frequency = r.thd_frequency.unwrap_or(DEFAULT_FREQUENCY);
        let limit = ls.limited_swing(max_thd, frequency)?;
        let at_required = r
            .thd_swing
            .or(r.min_swing)
            .filter(|v| *v > 0.0)
            .map(|v| (v, ls.at_output(v, frequency)));
        Ok(Section {
            limit,
            positive: ls.swing().positive,
            negative: ls.swing().negative,
            at_required,
        })
    }

    fn mechanism_text(&self) -> String {
        match (self.limit.output_peak, self.limit.mechanism()) {
            (None, _) if self.limit.drive_limited => format!(
                "THD stays under the limit as far as the stage can be driven (an EMF of ten times the supply gives {} peak)",
                format_si(self.limit.waveform.output_peak, "V")
            ),
            (None, _) => {
                String::from("THD stays under the limit up to 150 % of the load-line limit")
            }
            (Some(_), None) => String::from(
                "the curvature of the transistor's exponential law (nothing clips yet)",
            ),
            (Some(_), Some(c)) => format!(
                "the {} half begins to clip by {}",
                c.half.name(),
                c.mechanism.name()
            ),
        }
    }

    /// The text section.
    pub fn to_text(&self) -> String {
        let l = &self.limit;
        let mut o = format!(
            "\nLarge signal (steady state at {}, THD over harmonics 2 to 10)\n",
            format_si(l.frequency, "Hz")
        );
        o.push_str(&format!(
            "  load-line limits           +{} / -{}\n",
            format_si(self.positive, "V"),
            format_si(self.negative, "V")
        ));
        let at = format!("swing at {} THD", format_si(100.0 * l.max_thd, "%"));
        match l.output_peak {
            Some(p) => o.push_str(&format!(
                "  {at:<26}{} peak at the load (EMF {})\n",
                format_si(p, "V"),
                format_si(l.waveform.emf, "V")
            )),
            None => o.push_str(&format!(
                "  {at:<26}over {} peak\n",
                format_si(l.waveform.output_peak, "V")
            )),
        }
        o.push_str(&format!(
            "  limited by                 {}\n",
            self.mechanism_text()
        ));
        o.push_str(&format!(
            "  there: output terminal mean shift {}, collector current mean shift {}\n",
            format_si(l.waveform.terminal_shift, "V"),
            format_si(l.waveform.ic_shift, "A")
        ));
        match &self.at_required {
            Some((v, Ok(w))) => o.push_str(&format!(
                "  THD at the required swing  {:.3} % at {} peak (clipping: {})\n",
                100.0 * w.thd,
                format_si(*v, "V"),
                clipping_text(w)
            )),
            Some((v, Err(e))) => o.push_str(&format!(
                "  THD at the required swing  not found at {} peak ({e})\n",
                format_si(*v, "V")
            )),
            None => {}
        }
        o
    }

    /// The JSON section.
    pub fn to_json(&self) -> Value {
        let l = &self.limit;
        json!({
            "frequency": l.frequency,
            "max_thd": l.max_thd,
            "load_line": { "positive": self.positive, "negative": self.negative },
            "limited_swing": l.output_peak,
            "limited_swing_emf": l.waveform.emf,
            "limited_by": self.mechanism_text(),
            "at_required_swing": match &self.at_required {
                Some((v, Ok(w))) => json!({
                    "swing": v, "thd": w.thd, "emf_peak": w.emf, "clipping": clipping_json(w),
                }),
                Some((v, Err(e))) => json!({
                    "swing": v, "error": { "field": e.field(), "message": e.to_string() },
                }),
                None => Value::Null,
            },
            "drive_limited": l.drive_limited,
            "clipping": clipping_json(&l.waveform),
            "terminal_shift": l.waveform.terminal_shift,
            "ic_shift": l.waveform.ic_shift,
            "harmonics": harmonics_json(&l.waveform),
            "thd_curve": l.curve.iter().map(|p| json!({
                "emf_peak": p.emf, "output_peak": p.output_peak, "thd": p.thd,
                "terminal_shift": p.terminal_shift, "ic_shift": p.ic_shift,
            })).collect::<Vec<_>>(),
        })
    }
}
