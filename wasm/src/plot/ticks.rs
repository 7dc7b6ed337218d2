//! Axis ticks: where they go and how they read.
//!
//! Tick labels are the core's engineering notation (`stagewright::format_si`:
//! SI prefixes, three significant digits: `10 Hz`, `1 kHz`, `2.5 mA`,
//! `100 MHz`), never `100000.0`.

/// A short tick label: `value` in `unit` as the core writes every value
/// (`stagewright::format_si`: three significant digits, SI prefixes, `10 Hz`,
/// `1 kHz`, `2.5 mA`), with a typographic minus sign. A non-finite value
/// gives no label; one within 10⁻¹⁸ of zero (rounding noise of the tick
/// arithmetic) reads 0.
pub(crate) fn eng_label(value: f64, unit: &str) -> String {
    if !value.is_finite() {
        return String::new();
    }
    let value = if value.abs() < 1e-18 { 0.0 } else { value };
    stagewright::format_si(value, unit).replace('-', "\u{2212}")
}

/// Tick positions on a logarithmic axis from `lo` to `hi` (both > 0).
///
/// Returns the labelled ticks (whole decades, thinned to at most
/// `max_labels`; 1-2-5 steps when the range is under two decades) and the
/// light grid lines (2…9 × each decade).
pub(crate) fn log_ticks(lo: f64, hi: f64, max_labels: usize) -> (Vec<f64>, Vec<f64>) {
    let eps = 1e-9;
    let inside = |v: f64| v >= lo * (1.0 - eps) && v <= hi * (1.0 + eps);
    let d0 = libm::log10(lo).floor() as i32;
    let d1 = libm::log10(hi).ceil() as i32;
    let decades: Vec<f64> = (d0..=d1)
        .map(|d| 10f64.powi(d))
        .filter(|v| inside(*v))
        .collect();
    let mut light = Vec::new();
    for d in d0..=d1 {
        for m in 2..=9 {
            let v = f64::from(m) * 10f64.powi(d);
            if inside(v) {
                light.push(v);
            }
        }
    }
    let bold = if decades.len() >= 2 {
        let step = decades.len().div_ceil(max_labels.max(2));
        decades.into_iter().step_by(step.max(1)).collect()
    } else {
        let mut v = Vec::new();
        for d in d0..=d1 {
            for m in [1.0, 2.0, 5.0] {
                let x = m * 10f64.powi(d);
                if inside(x) {
                    v.push(x);
                }
            }
        }
        v
    };
    (bold, light)
}

/// "Nice" tick positions on a linear axis covering `lo..hi`, about
/// `target` of them, in steps of 1, 2 or 5 × 10ⁿ.
pub(crate) fn linear_ticks(lo: f64, hi: f64, target: usize) -> Vec<f64> {
    let span = hi - lo;
    if span.is_nan() || span <= 0.0 || span.is_infinite() {
        return vec![lo];
    }
    let step = nice_step(span / target.max(2) as f64);
    let first = (lo / step).ceil() as i64;
    let last = (hi / step).floor() as i64;
    (first..=last).map(|k| k as f64 * step).collect()
}

/// The smallest 1-2-5 step not below `raw`.
pub(crate) fn nice_step(raw: f64) -> f64 {
    let mag = 10f64.powi(libm::log10(raw).floor() as i32);
    let f = raw / mag;
    let m = if f <= 1.0 {
        1.0
    } else if f <= 2.0 {
        2.0
    } else if f <= 5.0 {
        5.0
    } else {
        10.0
    };
    m * mag
}

/// A range that covers `lo..hi` with a little room, widened to whole
/// `step`s so ticks fall on the frame. A zero-width range is opened up.
pub(crate) fn padded_range(lo: f64, hi: f64, min_span: f64) -> (f64, f64) {
    let (mut lo, mut hi) = (lo, hi);
    if hi - lo < min_span {
        let mid = 0.5 * (lo + hi);
        lo = mid - 0.5 * min_span;
        hi = mid + 0.5 * min_span;
    }
    let step = nice_step((hi - lo) / 5.0);
    ((lo / step).floor() * step, (hi / step).ceil() * step)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_read_like_an_engineer_writes() {
        assert_eq!(eng_label(10.0, "Hz"), "10 Hz");
        assert_eq!(eng_label(1000.0, "Hz"), "1 kHz");
        assert_eq!(eng_label(100e6, "Hz"), "100 MHz");
        assert_eq!(eng_label(0.0025, "A"), "2.5 mA");
        assert_eq!(eng_label(999.96, "Hz"), "1 kHz");
        assert_eq!(eng_label(-20.0, "dB"), "\u{2212}20 dB");
        assert_eq!(eng_label(0.0, "V"), "0 V");
        assert_eq!(eng_label(4700.0, "Ω"), "4.7 kΩ");
        assert_eq!(eng_label(-90.0, "°"), "\u{2212}90°");
    }

    #[test]
    fn log_ticks_are_decades() {
        let (bold, light) = log_ticks(10.0, 1e8, 10);
        assert_eq!(bold.len(), 8);
        assert!((bold[0] - 10.0).abs() < 1e-9);
        assert!(light.contains(&20.0));
        let (bold, _) = log_ticks(10.0, 1e8, 4);
        assert!(bold.len() <= 4);
        let (bold, _) = log_ticks(30.0, 250.0, 8);
        assert_eq!(bold, vec![50.0, 100.0, 200.0]);
    }

    #[test]
    fn linear_ticks_are_round() {
        assert_eq!(
            linear_ticks(0.0, 10.0, 5),
            vec![0.0, 2.0, 4.0, 6.0, 8.0, 10.0]
        );
        assert_eq!(padded_range(0.3, 9.2, 1.0), (0.0, 10.0));
    }
}
