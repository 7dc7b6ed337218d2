//! The frequency plots: gains and phase, or impedances, against a
//! logarithmic frequency axis.

use super::*;

/// One named line of a frequency plot, sampled at the plot's frequencies.
#[derive(Default)]
pub(super) struct Series {
    pub(super) name: String,
    /// One value per frequency; NaN is a gap.
    pub(super) values: Vec<f64>,
    pub(super) color: String,
    pub(super) dashed: bool,
}

/// A labelled vertical line (a corner frequency, say).
#[derive(Default)]
pub(super) struct XMarker {
    pub(super) x: f64,
    pub(super) label: String,
    pub(super) color: String,
}

/// What `plot_frequency` draws.
#[derive(Default)]
pub(super) struct FrequencySpec {
    /// Frequencies in Hz, ascending, all > 0.
    pub(super) freq: Vec<f64>,
    /// Lines of the upper (or only) panel.
    pub(super) series: Vec<Series>,
    /// Unit of the upper panel's values: `"dB"`, `"Ω"`, …
    pub(super) y_unit: String,
    /// Logarithmic upper y axis (for impedances); values must be > 0.
    pub(super) y_log: bool,
    /// Phase in degrees, drawn in a second panel below.
    pub(super) phase: Option<Series>,
    /// Vertical markers drawn on every panel.
    pub(super) x_markers: Vec<XMarker>,
    /// Text shown in place of a plot when there is nothing to draw.
    pub(super) empty_text: String,
    pub(super) theme: Theme,
}

impl Series {
    pub(super) fn read(o: &Obj) -> Self {
        Series {
            name: o.str("name"),
            values: o.numbers("values"),
            color: o.str("color"),
            dashed: o.flag("dashed"),
        }
    }
}

impl FrequencySpec {
    pub(super) fn read(o: &Obj) -> Self {
        FrequencySpec {
            freq: o.numbers("freq"),
            series: o.list("series").iter().map(Series::read).collect(),
            y_unit: o.str("y_unit"),
            y_log: o.flag("y_log"),
            phase: o.obj("phase").map(|p| Series::read(&p)),
            x_markers: o
                .list("x_markers")
                .iter()
                .map(|m| XMarker {
                    x: m.num("x").unwrap_or(f64::NAN),
                    label: m.str("label"),
                    color: m.str("color"),
                })
                .collect(),
            empty_text: o.str("empty_text"),
            theme: Theme::read(o.obj("theme")),
        }
    }
}

pub(super) fn draw_frequency(
    root: &Area,
    spec: &FrequencySpec,
    dpr: f64,
    panels: &mut Vec<Panel>,
) -> Result<(), String> {
    let look = Look::new(&spec.theme, dpr);
    root.fill(&look.bg).map_err(msg)?;

    let freq_lo = spec
        .freq
        .iter()
        .copied()
        .filter(|f| f.is_finite() && *f > 0.0)
        .fold(f64::INFINITY, f64::min);
    let freq_hi = spec
        .freq
        .iter()
        .copied()
        .filter(|f| f.is_finite() && *f > 0.0)
        .fold(0.0, f64::max);
    let upper: Vec<Runs<'_>> = spec
        .series
        .iter()
        .map(|s| (s, runs(&spec.freq, &s.values, spec.y_log)))
        .collect();
    let has_upper = upper.iter().any(|(_, r)| !r.is_empty());
    if freq_hi <= freq_lo || !has_upper {
        let text = if spec.empty_text.is_empty() {
            "no data"
        } else {
            spec.empty_text.as_str()
        };
        return draw_empty(root, &look, text);
    }

    let phase = spec
        .phase
        .as_ref()
        .map(|p| (p, runs(&spec.freq, &p.values, false)))
        .filter(|(_, r)| !r.is_empty());

    let (_, height) = root.dim_in_pixel();
    let (top, bottom) = match phase {
        Some(_) => {
            let (a, b) = root.split_vertically((f64::from(height) * 0.6).round() as i32);
            (a, Some(b))
        }
        None => (root.clone(), None),
    };

    // Room on the right for half of the last frequency label ("100 MHz").
    let right = look.text_width(7) / 2 + look.px(8.0);
    let x_area = (look.font * 1.9).ceil() as i32;
    let max_labels = ((f64::from(root.dim_in_pixel().0) / look.dpr) / 70.0)
        .floor()
        .max(2.0) as usize;

    // Upper panel: gains in dB (linear axis) or impedances (log axis).
    let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
    for (_, rs) in &upper {
        for &(_, y) in rs.iter().flatten() {
            lo = lo.min(y);
            hi = hi.max(y);
        }
    }
    let top_h = f64::from(top.dim_in_pixel().1) / look.dpr;
    let y_target = (top_h / 30.0).floor().clamp(3.0, 9.0) as usize;
    // Room for the longest tick label, "−100 dB" or "100 kΩ".
    let y_area = look.text_width(7) + look.px(8.0);
    let upper_x_area = if bottom.is_some() {
        look.px(4.0)
    } else {
        x_area
    };
    let unit = spec.y_unit.as_str();

    let mut builder = ChartBuilder::on(&top);
    builder
        .margin_top(look.px(8.0))
        .margin_right(right)
        .margin_left(look.px(4.0))
        .margin_bottom(look.px(2.0))
        .y_label_area_size(y_area)
        .x_label_area_size(upper_x_area);
    let show_x_labels = bottom.is_none();
    let x_axis = Axis::log(freq_lo, freq_hi, log_ticks(freq_lo, freq_hi, max_labels));
    let y_axis = if spec.y_log {
        let lo_d = libm::pow(10.0, libm::log10(lo).floor());
        let hi_d = libm::pow(10.0, libm::log10(hi).ceil());
        let hi_d = if hi_d / lo_d < 10.0 {
            lo_d * 10.0
        } else {
            hi_d
        };
        Axis::log(lo_d, hi_d, log_ticks(lo_d, hi_d, y_target))
    } else {
        let (lo_p, hi_p) = padded_range(lo, hi, 10.0);
        Axis::linear(lo_p, hi_p, linear_ticks(lo_p, hi_p, y_target))
    };
    let y_span = (y_axis.lo, y_axis.hi);
    let y_frame = y_axis.clone();
    let mut chart = builder
        .build_cartesian_2d(x_axis.clone(), y_axis)
        .map_err(msg)?;
    panels.push(Panel::of(&chart, &x_axis, &y_frame));
    mesh(&mut chart, &look, unit, show_x_labels)?;
    lines(&mut chart, &look, &upper, y_span, &spec.x_markers)?;

    // Lower panel: phase in degrees, ticks every 45° or 90°.
    if let (Some(area), Some((p, prs))) = (bottom, phase) {
        let (mut plo, mut phi) = (f64::INFINITY, f64::NEG_INFINITY);
        for &(_, y) in prs.iter().flatten() {
            plo = plo.min(y);
            phi = phi.max(y);
        }
        let step = if phi - plo > 180.0 { 90.0 } else { 45.0 };
        let (plo, phi) = ((plo / step).floor() * step, (phi / step).ceil() * step);
        let (plo, phi) = if phi - plo < step {
            (plo, plo + step)
        } else {
            (plo, phi)
        };
        let ticks: Vec<f64> = (0..)
            .map(|k| plo + f64::from(k) * step)
            .take_while(|v| *v <= phi + 1e-9)
            .collect();
        let p_axis = Axis::linear(plo, phi, ticks);
        let p_frame = p_axis.clone();
        let x_frame = x_axis.clone();
        let mut chart = ChartBuilder::on(&area)
            .margin_top(look.px(6.0))
            .margin_right(right)
            .margin_left(look.px(4.0))
            .margin_bottom(look.px(2.0))
            .y_label_area_size(y_area)
            .x_label_area_size(x_area)
            .build_cartesian_2d(x_axis, p_axis)
            .map_err(msg)?;
        panels.push(Panel::of(&chart, &x_frame, &p_frame));
        mesh(&mut chart, &look, "°", true)?;
        lines(&mut chart, &look, &[(p, prs)], (plo, phi), &spec.x_markers)?;
    }
    Ok(())
}

/// Draws gain (or impedance) against frequency on a logarithmic frequency
/// axis, with an optional phase panel below.
///
/// JS: `plot_frequency(canvas: HTMLCanvasElement, spec: {freq, series:
/// [{name, values, color, dashed?}], y_unit, y_log?, phase?: {name, values,
/// color}, x_markers?: [{x, label, color}], empty_text?, theme: {background,
/// foreground, grid, font_family, font_size}, pixel_size: [w, h],
/// pixel_ratio}): false | {panels}` — false when the canvas is hidden and
/// nothing was drawn, else where each panel sits and what its axes span
/// (the page's cursor readout); throws `{field: "plot", message}`.
#[wasm_bindgen]
pub fn plot_frequency(canvas: &HtmlCanvasElement, spec: JsValue) -> Result<JsValue, JsValue> {
    let obj = Obj::new(spec);
    let spec = FrequencySpec::read(&obj);
    let Some(dpr) = fit(canvas, &obj) else {
        return Ok(JsValue::FALSE);
    };
    let root = backend(canvas)?.into_drawing_area();
    let mut panels = Vec::new();
    draw_frequency(&root, &spec, dpr, &mut panels).map_err(|e| field_error("plot", &e))?;
    root.present().map_err(|e| field_error("plot", &msg(e)))?;
    Ok(frame(&panels))
}
