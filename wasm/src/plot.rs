//! Plots drawn with plotters on a canvas the page hands over.
//!
//! Both entry points take the canvas element itself (it usually lives in a
//! shadow root, where a look-up by id cannot find it) and a plain JavaScript
//! object describing what to draw. Data arrays may be `Array`s or
//! `Float64Array`s; `null`, `NaN` and infinities break a line rather than
//! drawing it to the edge. Colours are CSS colours in `#rrggbb` or
//! `rgb[a](r, g, b[, a])` form, so the page can pass the resolved values of
//! its CSS custom properties.
//!
//! The canvas backing store is sized to the canvas's CSS box times
//! `devicePixelRatio` on every draw, so plots stay sharp on high-DPI screens
//! and follow resizes. Nothing here computes circuit quantities; the numbers
//! arrive ready to plot.

use std::fmt::Display;

use plotters::coord::ranged1d::{DefaultFormatting, KeyPointHint};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters_canvas::CanvasBackend;
use serde::Deserialize;
use wasm_bindgen::prelude::*;
use web_sys::HtmlCanvasElement;

use crate::js::field_error;
use crate::ticks::{eng_label, linear_ticks, log_ticks, padded_range};

/// Colours and type for one plot.
#[derive(Deserialize)]
#[serde(default)]
struct Theme {
    /// Fill behind everything.
    background: String,
    /// Axes, tick labels, legend text.
    foreground: String,
    /// Grid lines.
    grid: String,
    /// CSS font family list.
    font_family: String,
    /// Tick label size in CSS pixels.
    font_size: f64,
}

impl Default for Theme {
    fn default() -> Self {
        Theme {
            background: "#ffffff".into(),
            foreground: "#202020".into(),
            grid: "#d8d8d8".into(),
            font_family: "sans-serif".into(),
            font_size: 12.0,
        }
    }
}

/// One named line of a frequency plot, sampled at the plot's frequencies.
#[derive(Deserialize, Default)]
#[serde(default)]
struct Series {
    name: String,
    values: Vec<Option<f64>>,
    color: String,
    dashed: bool,
}

/// A labelled vertical line (a corner frequency, say).
#[derive(Deserialize, Default)]
#[serde(default)]
struct XMarker {
    x: f64,
    label: String,
    color: String,
}

/// What `plot_frequency` draws.
#[derive(Deserialize, Default)]
#[serde(default)]
struct FrequencySpec {
    /// Frequencies in Hz, ascending, all > 0.
    freq: Vec<f64>,
    /// Lines of the upper (or only) panel.
    series: Vec<Series>,
    /// Unit of the upper panel's values: `"dB"`, `"Ω"`, …
    y_unit: String,
    /// Logarithmic upper y axis (for impedances); values must be > 0.
    y_log: bool,
    /// Phase in degrees, drawn in a second panel below.
    phase: Option<Series>,
    /// Vertical markers drawn on every panel.
    x_markers: Vec<XMarker>,
    /// Text shown in place of a plot when there is nothing to draw.
    empty_text: String,
    theme: Theme,
}

/// One curve of an x/y plot.
#[derive(Deserialize)]
#[serde(default)]
struct Curve {
    /// Legend text; empty keeps the curve out of the legend.
    name: String,
    x: Vec<f64>,
    y: Vec<f64>,
    color: String,
    /// Line width in CSS pixels.
    width: f64,
    dashed: bool,
}

impl Default for Curve {
    fn default() -> Self {
        Curve {
            name: String::new(),
            x: Vec::new(),
            y: Vec::new(),
            color: String::new(),
            width: 1.5,
            dashed: false,
        }
    }
}

/// A labelled point.
#[derive(Deserialize, Default)]
#[serde(default)]
struct Marker {
    x: f64,
    y: f64,
    label: String,
    color: String,
    /// `"dot"` (default), `"ring"` or `"cross"`.
    shape: String,
}

/// What `plot_xy` draws.
#[derive(Deserialize, Default)]
#[serde(default)]
struct XySpec {
    curves: Vec<Curve>,
    markers: Vec<Marker>,
    /// Axis names shown at the axes (`"VCE"`, `"IC"`).
    x_name: String,
    y_name: String,
    /// Units for the tick labels (`"V"`, `"A"`).
    x_unit: String,
    y_unit: String,
    /// Fixed axis ranges `[min, max]`; otherwise from the data, from zero
    /// when the data are all positive.
    x_range: Option<[f64; 2]>,
    y_range: Option<[f64; 2]>,
    empty_text: String,
    theme: Theme,
}

/// The only backend used: a canvas.
type DB = CanvasBackend;
type Area = DrawingArea<DB, Shift>;
/// A series with its drawable runs of points.
type Runs<'a> = (&'a Series, Vec<Vec<(f64, f64)>>);
/// A chart with our own axes on both sides.
type Chart<'a> = ChartContext<'a, DB, Cartesian2d<Axis, Axis>>;

/// An axis with tick positions chosen here (see `ticks`), linear or
/// logarithmic. Labelled ticks are the "bold" key points, the minor grid
/// the "light" ones.
#[derive(Clone)]
struct Axis {
    lo: f64,
    hi: f64,
    log: bool,
    bold: Vec<f64>,
    light: Vec<f64>,
}

impl Axis {
    fn linear(lo: f64, hi: f64, bold: Vec<f64>) -> Self {
        Axis {
            lo,
            hi,
            log: false,
            bold,
            light: Vec::new(),
        }
    }

    fn log(lo: f64, hi: f64, (bold, light): (Vec<f64>, Vec<f64>)) -> Self {
        Axis {
            lo,
            hi,
            log: true,
            bold,
            light,
        }
    }

    /// Where `v` falls between the ends, 0 at `lo` and 1 at `hi`.
    fn fraction(&self, v: f64) -> f64 {
        let t = if self.log {
            (v.ln() - self.lo.ln()) / (self.hi.ln() - self.lo.ln())
        } else {
            (v - self.lo) / (self.hi - self.lo)
        };
        // Far-off points are pinned so a line leaving the frame stays a line.
        if t.is_nan() {
            0.0
        } else {
            t.clamp(-10.0, 10.0)
        }
    }
}

impl Ranged for Axis {
    type FormatOption = DefaultFormatting;
    type ValueType = f64;

    fn map(&self, value: &f64, limit: (i32, i32)) -> i32 {
        let span = f64::from(limit.1 - limit.0);
        limit.0 + (span * self.fraction(*value)).round() as i32
    }

    fn key_points<H: KeyPointHint>(&self, hint: H) -> Vec<f64> {
        if hint.weight().allow_light_points() {
            self.light.clone()
        } else {
            self.bold.clone()
        }
    }

    fn range(&self) -> std::ops::Range<f64> {
        self.lo..self.hi
    }
}

/// Turns any drawing error into a message.
fn msg<E: Display>(e: E) -> String {
    e.to_string()
}

/// Sizes a canvas's backing store to its CSS box × `devicePixelRatio`
/// (which also clears it). Returns the pixel ratio, or `None` when the
/// canvas is not laid out (hidden), in which case nothing is drawn.
fn fit(canvas: &HtmlCanvasElement) -> Option<f64> {
    let dpr = web_sys::window()
        .map(|w| w.device_pixel_ratio())
        .filter(|r| r.is_finite() && *r > 0.0)
        .unwrap_or(1.0);
    let (cw, ch) = (canvas.client_width(), canvas.client_height());
    if cw <= 0 || ch <= 0 {
        return None;
    }
    canvas.set_width((f64::from(cw) * dpr).round() as u32);
    canvas.set_height((f64::from(ch) * dpr).round() as u32);
    Some(dpr)
}

fn backend(canvas: &HtmlCanvasElement) -> Result<CanvasBackend, JsValue> {
    CanvasBackend::with_canvas_object(canvas.clone())
        .ok_or_else(|| field_error("plot", "this canvas has no 2D context"))
}

/// Draws gain (or impedance) against frequency on a logarithmic frequency
/// axis, with an optional phase panel below.
///
/// JS: `plot_frequency(canvas: HTMLCanvasElement, spec: {freq, series:
/// [{name, values, color, dashed?}], y_unit, y_log?, phase?: {name, values,
/// color}, x_markers?: [{x, label, color}], empty_text?, theme: {background,
/// foreground, grid, font_family, font_size}}): boolean` — false when the
/// canvas is hidden and nothing was drawn; throws `{field: "plot", message}`.
#[wasm_bindgen]
pub fn plot_frequency(canvas: &HtmlCanvasElement, spec: JsValue) -> Result<bool, JsValue> {
    let spec: FrequencySpec =
        serde_wasm_bindgen::from_value(spec).map_err(|e| field_error("plot", &msg(e)))?;
    let Some(dpr) = fit(canvas) else {
        return Ok(false);
    };
    let root = backend(canvas)?.into_drawing_area();
    draw_frequency(&root, &spec, dpr).map_err(|e| field_error("plot", &e))?;
    root.present().map_err(|e| field_error("plot", &msg(e)))?;
    Ok(true)
}

/// Draws curves on linear axes with labelled point markers: load lines over
/// output characteristics, with the quiescent point and swing limits.
///
/// JS: `plot_xy(canvas: HTMLCanvasElement, spec: {curves: [{name, x, y,
/// color, width?, dashed?}], markers?: [{x, y, label, color, shape?}],
/// x_name, y_name, x_unit, y_unit, x_range?, y_range?, empty_text?, theme}):
/// boolean` — false when the canvas is hidden; throws `{field: "plot",
/// message}`.
#[wasm_bindgen]
pub fn plot_xy(canvas: &HtmlCanvasElement, spec: JsValue) -> Result<bool, JsValue> {
    let spec: XySpec =
        serde_wasm_bindgen::from_value(spec).map_err(|e| field_error("plot", &msg(e)))?;
    let Some(dpr) = fit(canvas) else {
        return Ok(false);
    };
    let root = backend(canvas)?.into_drawing_area();
    draw_xy(&root, &spec, dpr).map_err(|e| field_error("plot", &e))?;
    root.present().map_err(|e| field_error("plot", &msg(e)))?;
    Ok(true)
}

/// Parses `#rgb`, `#rrggbb`, `#rrggbbaa` and `rgb[a](r, g, b[, a])`.
/// Anything else falls back to `fallback`.
fn color(text: &str, fallback: RGBAColor) -> RGBAColor {
    let t = text.trim();
    if let Some(hex) = t.strip_prefix('#') {
        let digit = |i: usize, n: usize| u8::from_str_radix(hex.get(i..i + n)?, 16).ok();
        return match hex.len() {
            3 => (|| {
                Some(RGBAColor(
                    digit(0, 1)? * 17,
                    digit(1, 1)? * 17,
                    digit(2, 1)? * 17,
                    1.0,
                ))
            })(),
            6 => (|| Some(RGBAColor(digit(0, 2)?, digit(2, 2)?, digit(4, 2)?, 1.0)))(),
            8 => (|| {
                Some(RGBAColor(
                    digit(0, 2)?,
                    digit(2, 2)?,
                    digit(4, 2)?,
                    f64::from(digit(6, 2)?) / 255.0,
                ))
            })(),
            _ => None,
        }
        .unwrap_or(fallback);
    }
    let inner = t
        .strip_prefix("rgba(")
        .or_else(|| t.strip_prefix("rgb("))
        .and_then(|s| s.strip_suffix(')'));
    if let Some(inner) = inner {
        let parts: Vec<f64> = inner
            .split([',', ' ', '/'])
            .filter(|s| !s.is_empty())
            .filter_map(|s| s.trim().parse().ok())
            .collect();
        if parts.len() >= 3 {
            let c = |v: f64| v.round().clamp(0.0, 255.0) as u8;
            let a = parts.get(3).copied().unwrap_or(1.0).clamp(0.0, 1.0);
            return RGBAColor(c(parts[0]), c(parts[1]), c(parts[2]), a);
        }
    }
    fallback
}

/// Resolved colours and sizes, in backing-store pixels.
struct Look {
    bg: RGBAColor,
    fg: RGBAColor,
    grid: RGBAColor,
    family: String,
    /// Tick label size in backing-store pixels.
    font: f64,
    dpr: f64,
}

impl Look {
    fn new(theme: &Theme, dpr: f64) -> Self {
        let bg = color(&theme.background, RGBAColor(255, 255, 255, 1.0));
        let fg = color(&theme.foreground, RGBAColor(32, 32, 32, 1.0));
        let grid = color(&theme.grid, RGBAColor(216, 216, 216, 1.0));
        let size = if theme.font_size.is_finite() && theme.font_size > 4.0 {
            theme.font_size
        } else {
            12.0
        };
        let family = if theme.font_family.trim().is_empty() {
            "sans-serif".to_string()
        } else {
            theme.font_family.clone()
        };
        Look {
            bg,
            fg,
            grid,
            family,
            font: size * dpr,
            dpr,
        }
    }

    /// `n` CSS pixels in backing-store pixels.
    fn px(&self, n: f64) -> i32 {
        (n * self.dpr).round() as i32
    }

    fn text(&self) -> TextStyle<'_> {
        (self.family.as_str(), self.font)
            .into_font()
            .color(&self.fg)
    }

    fn small_text(&self) -> TextStyle<'_> {
        (self.family.as_str(), self.font * 0.92)
            .into_font()
            .color(&self.fg)
    }

    /// A rough width of `chars` characters of tick text, for reserving room.
    fn text_width(&self, chars: usize) -> i32 {
        (self.font * 0.62 * chars as f64).ceil() as i32
    }

    fn line(&self, c: RGBAColor, css_width: f64) -> ShapeStyle {
        ShapeStyle {
            color: c,
            filled: false,
            stroke_width: (css_width * self.dpr).round().max(1.0) as u32,
        }
    }
}

/// Splits paired samples into runs of drawable points; a `None`, a
/// non-finite value or (on a log axis) a value ≤ 0 ends a run.
fn runs(xs: &[f64], ys: impl Iterator<Item = Option<f64>>, y_log: bool) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut cur = Vec::new();
    for (x, y) in xs.iter().zip(ys) {
        let ok = matches!(y, Some(v) if v.is_finite() && (!y_log || v > 0.0))
            && x.is_finite()
            && *x > 0.0;
        if ok {
            cur.push((*x, y.unwrap_or_default()));
        } else if !cur.is_empty() {
            out.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// Writes `text` in the middle of an empty plot.
fn draw_empty(root: &Area, look: &Look, text: &str) -> Result<(), String> {
    let (w, h) = root.dim_in_pixel();
    let style = look.text().pos(plotters::style::text_anchor::Pos::new(
        plotters::style::text_anchor::HPos::Center,
        plotters::style::text_anchor::VPos::Center,
    ));
    root.draw_text(text, &style, (w as i32 / 2, h as i32 / 2))
        .map_err(msg)
}

fn draw_frequency(root: &Area, spec: &FrequencySpec, dpr: f64) -> Result<(), String> {
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
        .map(|s| (s, runs(&spec.freq, s.values.iter().copied(), spec.y_log)))
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
        .map(|p| (p, runs(&spec.freq, p.values.iter().copied(), false)))
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
    let y_target = (top_h / 38.0).floor().clamp(2.0, 8.0) as usize;
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
        let lo_d = 10f64.powf(lo.log10().floor());
        let hi_d = 10f64.powf(hi.log10().ceil());
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
    let mut chart = builder
        .build_cartesian_2d(x_axis.clone(), y_axis)
        .map_err(msg)?;
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
        let mut chart = ChartBuilder::on(&area)
            .margin_top(look.px(6.0))
            .margin_right(right)
            .margin_left(look.px(4.0))
            .margin_bottom(look.px(2.0))
            .y_label_area_size(y_area)
            .x_label_area_size(x_area)
            .build_cartesian_2d(x_axis, Axis::linear(plo, phi, ticks))
            .map_err(msg)?;
        mesh(&mut chart, &look, "°", true)?;
        lines(&mut chart, &look, &[(p, prs)], (plo, phi), &spec.x_markers)?;
    }
    Ok(())
}

/// Grid, axes and tick labels for a chart with a log frequency axis.
fn mesh(chart: &mut Chart<'_>, look: &Look, y_unit: &str, x_labels: bool) -> Result<(), String> {
    let x_fmt = |v: &f64| {
        if x_labels {
            eng_label(*v, "Hz")
        } else {
            String::new()
        }
    };
    let y_fmt = |v: &f64| eng_label(*v, y_unit);
    chart
        .configure_mesh()
        .bold_line_style(look.line(look.grid, 1.0))
        .light_line_style(look.line(look.grid.mix(0.45), 1.0))
        .axis_style(look.line(look.fg.mix(0.75), 1.0))
        .set_all_tick_mark_size(look.px(3.0))
        .label_style(look.text())
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .draw()
        .map_err(msg)
}

/// Draws the series (with legend) and the vertical markers.
fn lines(
    chart: &mut Chart<'_>,
    look: &Look,
    series: &[Runs<'_>],
    y_span: (f64, f64),
    markers: &[XMarker],
) -> Result<(), String> {
    let x_range = chart.x_range();
    for m in markers {
        if !(m.x.is_finite() && m.x >= x_range.start && m.x <= x_range.end) {
            continue;
        }
        let c = color(&m.color, look.fg.mix(0.6));
        let style = look.line(c, 1.0);
        chart
            .draw_series(DashedLineSeries::new(
                [(m.x, y_span.0), (m.x, y_span.1)],
                look.px(4.0),
                look.px(3.0),
                style,
            ))
            .map_err(msg)?;
        if !m.label.is_empty() {
            let text = look.small_text().color(&c);
            let at = (m.x, y_span.1);
            chart
                .draw_series(std::iter::once(
                    EmptyElement::at(at)
                        + Text::new(m.label.clone(), (look.px(3.0), look.px(2.0)), text),
                ))
                .map_err(msg)?;
        }
    }

    let mut any_named = false;
    for (s, rs) in series {
        let c = color(&s.color, look.fg);
        let style = look.line(c, 2.0);
        let mut first = true;
        for run in rs {
            let ann = if s.dashed {
                chart
                    .draw_series(DashedLineSeries::new(
                        run.iter().copied(),
                        look.px(6.0),
                        look.px(4.0),
                        style,
                    ))
                    .map_err(msg)?
            } else {
                chart
                    .draw_series(LineSeries::new(run.iter().copied(), style))
                    .map_err(msg)?
            };
            if first && !s.name.is_empty() {
                any_named = true;
                let w = look.px(18.0);
                ann.label(s.name.clone())
                    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + w, y)], style));
            }
            first = false;
        }
    }
    if any_named {
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::UpperRight)
            .background_style(look.bg.mix(0.88))
            .border_style(look.line(look.grid, 1.0))
            .label_font(look.small_text())
            .margin(look.px(6.0))
            .legend_area_size(look.px(24.0))
            .draw()
            .map_err(msg)?;
    }
    Ok(())
}

fn draw_xy(root: &Area, spec: &XySpec, dpr: f64) -> Result<(), String> {
    let look = Look::new(&spec.theme, dpr);
    root.fill(&look.bg).map_err(msg)?;

    let finite = |a: f64, b: f64| a.is_finite() && b.is_finite();
    let mut pts = spec
        .curves
        .iter()
        .flat_map(|c| c.x.iter().copied().zip(c.y.iter().copied()))
        .chain(spec.markers.iter().map(|m| (m.x, m.y)))
        .filter(|(x, y)| finite(*x, *y))
        .peekable();
    if pts.peek().is_none() {
        let text = if spec.empty_text.is_empty() {
            "no data"
        } else {
            spec.empty_text.as_str()
        };
        return draw_empty(root, &look, text);
    }
    let (mut x0, mut x1, mut y0, mut y1) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for (x, y) in pts {
        x0 = x0.min(x);
        x1 = x1.max(x);
        y0 = y0.min(y);
        y1 = y1.max(y);
    }
    // Output characteristics start at the origin: keep it on the plot.
    let (x0, x1) = match spec.x_range {
        Some([a, b]) if finite(a, b) && b > a => (a, b),
        _ => fit_axis(x0.min(0.0), x1),
    };
    let (y0, y1) = match spec.y_range {
        Some([a, b]) if finite(a, b) && b > a => (a, b),
        _ => fit_axis(y0.min(0.0), y1),
    };

    let (w, h) = root.dim_in_pixel();
    let x_ticks = linear_ticks(
        x0,
        x1,
        ((f64::from(w) / dpr) / 70.0).clamp(2.0, 10.0) as usize,
    );
    let y_ticks = linear_ticks(
        y0,
        y1,
        ((f64::from(h) / dpr) / 40.0).clamp(2.0, 8.0) as usize,
    );
    let mut chart = ChartBuilder::on(root)
        .margin_top(look.px(10.0))
        .margin_right(look.text_width(6) / 2 + look.px(8.0))
        .margin_left(look.px(4.0))
        .margin_bottom(look.px(2.0))
        .y_label_area_size(look.text_width(7) + look.px(8.0) + (look.font * 1.4) as i32)
        .x_label_area_size((look.font * 3.2).ceil() as i32)
        .build_cartesian_2d(Axis::linear(x0, x1, x_ticks), Axis::linear(y0, y1, y_ticks))
        .map_err(msg)?;

    let x_fmt = |v: &f64| eng_label(*v, &spec.x_unit);
    let y_fmt = |v: &f64| eng_label(*v, &spec.y_unit);
    chart
        .configure_mesh()
        .bold_line_style(look.line(look.grid, 1.0))
        .light_line_style(look.line(look.grid.mix(0.0), 1.0))
        .axis_style(look.line(look.fg.mix(0.75), 1.0))
        .set_all_tick_mark_size(look.px(3.0))
        .label_style(look.text())
        .axis_desc_style(look.text())
        .x_desc(spec.x_name.as_str())
        .y_desc(spec.y_name.as_str())
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .draw()
        .map_err(msg)?;

    let mut any_named = false;
    for c in &spec.curves {
        let col = color(&c.color, look.fg);
        let style = look.line(col, if c.width > 0.0 { c.width } else { 1.5 });
        let mut segs: Vec<Vec<(f64, f64)>> = vec![Vec::new()];
        for (x, y) in c.x.iter().copied().zip(c.y.iter().copied()) {
            if finite(x, y) {
                if let Some(s) = segs.last_mut() {
                    s.push((x, y));
                }
            } else if segs.last().is_some_and(|s| !s.is_empty()) {
                segs.push(Vec::new());
            }
        }
        let mut first = true;
        for seg in segs.into_iter().filter(|s| !s.is_empty()) {
            let ann = if c.dashed {
                chart
                    .draw_series(DashedLineSeries::new(
                        seg,
                        look.px(6.0),
                        look.px(4.0),
                        style,
                    ))
                    .map_err(msg)?
            } else {
                chart
                    .draw_series(LineSeries::new(seg, style))
                    .map_err(msg)?
            };
            if first && !c.name.is_empty() {
                any_named = true;
                let w = look.px(18.0);
                ann.label(c.name.clone())
                    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + w, y)], style));
            }
            first = false;
        }
    }

    let r = look.px(4.0);
    for m in &spec.markers {
        if !finite(m.x, m.y) {
            continue;
        }
        let col = color(&m.color, look.fg);
        let at = (m.x, m.y);
        let label = look.small_text().color(&col);
        let shape: DynElement<'_, DB, (f64, f64)> = match m.shape.as_str() {
            "ring" => {
                (EmptyElement::at(at) + Circle::new((0, 0), r, look.line(col, 2.0))).into_dyn()
            }
            "cross" => {
                (EmptyElement::at(at) + Cross::new((0, 0), r, look.line(col, 2.0))).into_dyn()
            }
            _ => (EmptyElement::at(at) + Circle::new((0, 0), r, col.filled())).into_dyn(),
        };
        chart.draw_series(std::iter::once(shape)).map_err(msg)?;
        if !m.label.is_empty() {
            chart
                .draw_series(std::iter::once(
                    EmptyElement::at(at)
                        + Text::new(
                            m.label.clone(),
                            (r + look.px(3.0), -r - look.font as i32),
                            label,
                        ),
                ))
                .map_err(msg)?;
        }
    }

    if any_named {
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::UpperRight)
            .background_style(look.bg.mix(0.88))
            .border_style(look.line(look.grid, 1.0))
            .label_font(look.small_text())
            .margin(look.px(6.0))
            .legend_area_size(look.px(24.0))
            .draw()
            .map_err(msg)?;
    }
    Ok(())
}

/// A data range opened to round tick steps, never of zero width.
fn fit_axis(lo: f64, hi: f64) -> (f64, f64) {
    let span = hi - lo;
    let min_span = if span > 0.0 {
        span * 1e-3
    } else {
        lo.abs().max(1e-12)
    };
    let (a, b) = padded_range(lo, hi + span * 0.04, min_span);
    // padded_range may push a zero start below zero; keep zero where it was.
    (if lo >= 0.0 { a.max(0.0) } else { a }, b)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn colours_parse_in_css_forms() {
        let fb = RGBAColor(1, 2, 3, 1.0);
        let c = color("#0a7f78", fb);
        assert_eq!((c.0, c.1, c.2), (10, 127, 120));
        let c = color("#fff", fb);
        assert_eq!((c.0, c.1, c.2), (255, 255, 255));
        let c = color("rgba(10, 20, 30, 0.5)", fb);
        assert_eq!((c.0, c.1, c.2), (10, 20, 30));
        assert!((c.3 - 0.5).abs() < 1e-9);
        let c = color("oklch(0.5 0.1 200)", fb);
        assert_eq!((c.0, c.1, c.2), (1, 2, 3));
    }

    #[test]
    fn runs_break_at_gaps() {
        let xs = [1.0, 2.0, 3.0, 4.0, 5.0];
        let ys = [Some(1.0), None, Some(2.0), Some(f64::NAN), Some(3.0)];
        let r = runs(&xs, ys.iter().copied(), false);
        assert_eq!(r.len(), 3);
        let r = runs(
            &xs,
            [Some(1.0), Some(-1.0), Some(1.0), Some(1.0), Some(1.0)]
                .iter()
                .copied(),
            true,
        );
        assert_eq!(r.len(), 2);
    }
}
