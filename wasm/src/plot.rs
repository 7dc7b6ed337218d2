//! Plots drawn with plotters on a canvas the page hands over.
//!
//! Both entry points take the canvas element itself (it usually lives in a
//! shadow root, where a look-up by id cannot find it) and a plain JavaScript
//! object describing what to draw, read key by key (missing keys take
//! defaults). Data arrays may be `Array`s or `Float64Array`s; `null`, `NaN`
//! and infinities break a line rather than drawing it to the edge. Colours are CSS colours in `#rrggbb` or
//! `#rrggbbaa` form, so the page can pass the resolved values of
//! its CSS custom properties.
//!
//! The canvas backing store is sized to the canvas's CSS box times
//! `devicePixelRatio` on every draw, so plots stay sharp on high-DPI screens
//! and follow resizes. Nothing here computes circuit quantities; the numbers
//! arrive ready to plot.

use plotters::coord::ranged1d::{DefaultFormatting, KeyPointHint};
use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use plotters_canvas::CanvasBackend;
use wasm_bindgen::prelude::*;
use web_sys::HtmlCanvasElement;

use crate::js::{field_error, Obj};
use crate::ticks::{eng_label, linear_ticks, log_ticks, padded_range};

/// Colours and type for one plot.
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
#[derive(Default)]
struct Series {
    name: String,
    /// One value per frequency; NaN is a gap.
    values: Vec<f64>,
    color: String,
    dashed: bool,
}

/// A labelled vertical line (a corner frequency, say).
#[derive(Default)]
struct XMarker {
    x: f64,
    label: String,
    color: String,
}

/// What `plot_frequency` draws.
#[derive(Default)]
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
#[derive(Default)]
struct Marker {
    x: f64,
    y: f64,
    label: String,
    color: String,
    /// `"dot"` (default), `"ring"`, `"cross"` or `"none"` (label only).
    shape: String,
}

/// What `plot_xy` draws.
#[derive(Default)]
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

impl Theme {
    fn read(o: Option<Obj>) -> Self {
        let d = Theme::default();
        let Some(o) = o else { return d };
        let or = |s: String, fb: String| if s.is_empty() { fb } else { s };
        Theme {
            background: or(o.str("background"), d.background),
            foreground: or(o.str("foreground"), d.foreground),
            grid: or(o.str("grid"), d.grid),
            font_family: or(o.str("font_family"), d.font_family),
            font_size: o.num("font_size").unwrap_or(d.font_size),
        }
    }
}

impl Series {
    fn read(o: &Obj) -> Self {
        Series {
            name: o.str("name"),
            values: o.numbers("values"),
            color: o.str("color"),
            dashed: o.flag("dashed"),
        }
    }
}

impl FrequencySpec {
    fn read(o: &Obj) -> Self {
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

impl XySpec {
    fn read(o: &Obj) -> Self {
        let range = |key: &str| {
            let r = o.numbers(key);
            (r.len() == 2).then(|| [r[0], r[1]])
        };
        XySpec {
            curves: o
                .list("curves")
                .iter()
                .map(|c| Curve {
                    name: c.str("name"),
                    x: c.numbers("x"),
                    y: c.numbers("y"),
                    color: c.str("color"),
                    width: c.num("width").unwrap_or(1.5),
                    dashed: c.flag("dashed"),
                })
                .collect(),
            markers: o
                .list("markers")
                .iter()
                .map(|m| Marker {
                    x: m.num("x").unwrap_or(f64::NAN),
                    y: m.num("y").unwrap_or(f64::NAN),
                    label: m.str("label"),
                    color: m.str("color"),
                    shape: m.str("shape"),
                })
                .collect(),
            x_name: o.str("x_name"),
            y_name: o.str("y_name"),
            x_unit: o.str("x_unit"),
            y_unit: o.str("y_unit"),
            x_range: range("x_range"),
            y_range: range("y_range"),
            empty_text: o.str("empty_text"),
            theme: Theme::read(o.obj("theme")),
        }
    }
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
            (libm::log(v) - libm::log(self.lo)) / (libm::log(self.hi) - libm::log(self.lo))
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

/// Turns a drawing error into a message. The canvas's own error (a
/// JavaScript value) is not spelled out: formatting it would bring the
/// glue's value printer into the page for a message nobody reads.
fn msg<E>(_: E) -> String {
    String::from("the canvas refused a drawing operation")
}

/// Sizes a canvas's backing store (which also clears it) to
/// `spec.pixel_size` (device pixels, as the page's ResizeObserver or its
/// CSS size × `devicePixelRatio` gives them) with `spec.pixel_ratio`.
/// Returns the pixel ratio, or `None` when the canvas has no size (hidden),
/// in which case nothing is drawn.
fn fit(canvas: &HtmlCanvasElement, spec: &Obj) -> Option<f64> {
    let size = spec.numbers("pixel_size");
    let ratio = spec
        .num("pixel_ratio")
        .filter(|r| r.is_finite() && *r > 0.0)
        .unwrap_or(1.0);
    match size.as_slice() {
        [w, h] if *w >= 1.0 && *h >= 1.0 => {
            canvas.set_width(w.round() as u32);
            canvas.set_height(h.round() as u32);
            Some(ratio)
        }
        _ => None,
    }
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
/// foreground, grid, font_family, font_size}, pixel_size: [w, h],
/// pixel_ratio}): boolean` — false when the
/// canvas is hidden and nothing was drawn; throws `{field: "plot", message}`.
#[wasm_bindgen]
pub fn plot_frequency(canvas: &HtmlCanvasElement, spec: JsValue) -> Result<bool, JsValue> {
    let obj = Obj::new(spec);
    let spec = FrequencySpec::read(&obj);
    let Some(dpr) = fit(canvas, &obj) else {
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
/// x_name, y_name, x_unit, y_unit, x_range?, y_range?, empty_text?, theme,
/// pixel_size: [w, h], pixel_ratio}):
/// boolean` — false when the canvas is hidden; throws `{field: "plot",
/// message}`.
#[wasm_bindgen]
pub fn plot_xy(canvas: &HtmlCanvasElement, spec: JsValue) -> Result<bool, JsValue> {
    let obj = Obj::new(spec);
    let spec = XySpec::read(&obj);
    let Some(dpr) = fit(canvas, &obj) else {
        return Ok(false);
    };
    let root = backend(canvas)?.into_drawing_area();
    draw_xy(&root, &spec, dpr).map_err(|e| field_error("plot", &e))?;
    root.present().map_err(|e| field_error("plot", &msg(e)))?;
    Ok(true)
}

/// Parses `#rrggbb` and `#rrggbbaa` (the page resolves its CSS custom
/// properties to these forms); anything else is `fallback`.
/// Anything else falls back to `fallback`.
fn color(text: &str, fallback: RGBAColor) -> RGBAColor {
    let t = text.trim();
    if let Some(hex) = t.strip_prefix('#') {
        let byte = |i: usize| {
            hex.get(i..i + 2)
                .and_then(|d| u8::from_str_radix(d, 16).ok())
        };
        return match (hex.len(), byte(0), byte(2), byte(4)) {
            (6, Some(r), Some(g), Some(b)) => RGBAColor(r, g, b, 1.0),
            (8, Some(r), Some(g), Some(b)) => {
                RGBAColor(r, g, b, byte(6).map_or(1.0, |a| f64::from(a) / 255.0))
            }
            _ => fallback,
        };
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
        (FontFamily::Name(&self.family), self.font)
            .into_font()
            .color(&self.fg)
    }

    fn small_text(&self) -> TextStyle<'_> {
        (FontFamily::Name(&self.family), self.font * 0.92)
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
fn runs(xs: &[f64], ys: &[f64], y_log: bool) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut cur = Vec::new();
    for (&x, &y) in xs.iter().zip(ys) {
        let ok = y.is_finite() && (!y_log || y > 0.0) && x.is_finite() && x > 0.0;
        if ok {
            cur.push((x, y));
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
    let style = look.text().pos(Pos::new(HPos::Center, VPos::Center));
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
        polyline(
            chart,
            vec![(m.x, y_span.0), (m.x, y_span.1)],
            style,
            Some((look.px(4.0), look.px(3.0))),
        )?;
        if !m.label.is_empty() {
            let text = look.small_text().color(&c);
            let area = chart.plotting_area().strip_coord_spec();
            let (bx, by) = area.get_base_pixel();
            let (x, y) = chart.backend_coord(&(m.x, y_span.1));
            let at = (x - bx + look.px(3.0), y - by + look.px(2.0));
            area.draw(&Text::new(m.label.as_str(), at, text))
                .map_err(msg)?;
        }
    }

    let mut entries = Vec::new();
    for (s, rs) in series {
        let c = color(&s.color, look.fg);
        let style = look.line(c, 2.0);
        let dash = s.dashed.then(|| (look.px(6.0), look.px(4.0)));
        for run in rs {
            polyline(chart, run.clone(), style, dash)?;
        }
        if !s.name.is_empty() {
            entries.push(Entry {
                name: &s.name,
                style,
                dashed: s.dashed,
            });
        }
    }
    if !entries.is_empty() {
        let mut avoid = to_px(chart, series.iter().flat_map(|(_, rs)| rs.iter().cloned()));
        for m in markers.iter().filter(|m| m.x.is_finite()) {
            // The dashed line and its label at the top.
            let (x, top) = chart.backend_coord(&(m.x, y_span.1));
            let (_, bottom) = chart.backend_coord(&(m.x, y_span.0));
            avoid.push(vec![(x, top), (x, bottom)]);
            let label_w = look.text_width(m.label.chars().count()) + look.px(3.0);
            avoid.push(vec![
                (x, top + look.px(8.0)),
                (x + label_w, top + look.px(8.0)),
            ]);
        }
        legend(chart, look, &entries, &avoid)?;
    }
    Ok(())
}

/// Draws a polyline in data coordinates, solid or with `dash` (dash and
/// gap in backing-store pixels). Every line goes through here, so plotters'
/// line code is instantiated once.
fn polyline(
    chart: &mut Chart<'_>,
    points: Vec<(f64, f64)>,
    style: ShapeStyle,
    dash: Option<(i32, i32)>,
) -> Result<(), String> {
    match dash {
        Some((size, gap)) => chart
            .draw_series(DashedLineSeries::new(points, size, gap, style))
            .map_err(msg)?,
        None => chart
            .draw_series(LineSeries::new(points, style))
            .map_err(msg)?,
    };
    Ok(())
}

/// Maps polylines in data coordinates to backing-store pixels.
fn to_px(
    chart: &Chart<'_>,
    lines: impl IntoIterator<Item = Vec<(f64, f64)>>,
) -> Vec<Vec<(i32, i32)>> {
    lines
        .into_iter()
        .map(|l| l.iter().map(|p| chart.backend_coord(p)).collect())
        .collect()
}

/// One line of a legend.
struct Entry<'a> {
    name: &'a str,
    style: ShapeStyle,
    dashed: bool,
}

/// Draws the legend in the corner (or edge middle) of the plot that the
/// drawing crosses least. `avoid` holds the drawn polylines, points and
/// label extents in backing-store pixels.
///
/// The legend is drawn here rather than by plotters, whose legend measures
/// each label through the DOM (a forced layout per label, and a `style`
/// attribute that a strict host CSP refuses); its width is estimated from
/// the number of characters instead.
fn legend(
    chart: &mut Chart<'_>,
    look: &Look,
    entries: &[Entry<'_>],
    avoid: &[Vec<(i32, i32)>],
) -> Result<(), String> {
    let (xr, yr) = chart.plotting_area().get_pixel_range();
    let chars = entries
        .iter()
        .map(|e| e.name.chars().count())
        .max()
        .unwrap_or(0);
    let pad = look.px(6.0);
    let swatch = look.px(18.0);
    let line_h = (look.font * 1.3).round() as i32;
    let w = pad + swatch + look.px(6.0) + look.text_width(chars) * 92 / 100 + pad;
    let h = entries.len() as i32 * line_h + pad;
    let m = look.px(6.0);
    let (left, right, top, bottom) = (xr.start + m, xr.end - m, yr.start + m, yr.end - m);
    let mid = (xr.start + xr.end) / 2;
    // Candidate places, in order of preference.
    let spots = [
        (right - w, top),
        (left, top),
        (right - w, bottom - h),
        (left, bottom - h),
        (mid - w / 2, top),
        (mid - w / 2, bottom - h),
    ];
    // Sample every polyline about every 3 px and count samples per spot.
    let mut hits = [0usize; 6];
    let step = f64::from(look.px(3.0).max(1));
    for px in avoid {
        let mut count = |x: f64, y: f64| {
            for (k, (sx, sy)) in spots.iter().enumerate() {
                if x >= f64::from(*sx)
                    && x <= f64::from(sx + w)
                    && y >= f64::from(*sy)
                    && y <= f64::from(sy + h)
                {
                    hits[k] += 1;
                }
            }
        };
        if px.len() == 1 {
            count(f64::from(px[0].0), f64::from(px[0].1));
        }
        for pair in px.windows(2) {
            let (a, b) = (pair[0], pair[1]);
            let (dx, dy) = (f64::from(b.0 - a.0), f64::from(b.1 - a.1));
            let n = ((libm::hypot(dx, dy) / step).ceil() as usize).clamp(1, 2000);
            for i in 0..=n {
                let t = i as f64 / n as f64;
                count(f64::from(a.0) + dx * t, f64::from(a.1) + dy * t);
            }
        }
    }
    let best = (0..spots.len()).min_by_key(|&k| hits[k]).unwrap_or(0);

    // Draw in pixels relative to the plotting area.
    let area = chart.plotting_area().strip_coord_spec();
    let (bx, by) = area.get_base_pixel();
    let (x0, y0) = (spots[best].0 - bx, spots[best].1 - by);
    area.draw(&Rectangle::new(
        [(x0, y0), (x0 + w, y0 + h)],
        look.bg.mix(0.88).filled(),
    ))
    .map_err(msg)?;
    area.draw(&Rectangle::new(
        [(x0, y0), (x0 + w, y0 + h)],
        look.line(look.grid, 1.0),
    ))
    .map_err(msg)?;
    let text = look.small_text().pos(Pos::new(HPos::Left, VPos::Center));
    for (i, e) in entries.iter().enumerate() {
        let y = y0 + pad / 2 + line_h * i as i32 + line_h / 2;
        let (sx0, sx1) = (x0 + pad, x0 + pad + swatch);
        if e.dashed {
            area.draw(&DashedPathElement::new(
                [(sx0, y), (sx1, y)],
                look.px(4.0),
                look.px(3.0),
                e.style,
            ))
            .map_err(msg)?;
        } else {
            area.draw(&PathElement::new(vec![(sx0, y), (sx1, y)], e.style))
                .map_err(msg)?;
        }
        area.draw(&Text::new(e.name, (sx1 + look.px(6.0), y), text.clone()))
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
        // Headroom above the data for the legend.
        _ if spec.curves.iter().any(|c| !c.name.is_empty()) => {
            fit_axis(y0.min(0.0), y1 + (y1 - y0.min(0.0)) * 0.25)
        }
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
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .draw()
        .map_err(msg)?;

    // Axis names: x below its tick labels, y turned up beside them.
    let (xr, yr) = chart.plotting_area().get_pixel_range();
    if !spec.x_name.is_empty() {
        let style = look.text().pos(Pos::new(HPos::Center, VPos::Bottom));
        let at = ((xr.start + xr.end) / 2, h as i32 - look.px(2.0));
        root.draw(&Text::new(spec.x_name.as_str(), at, style))
            .map_err(msg)?;
    }
    if !spec.y_name.is_empty() {
        let style = look
            .text()
            .transform(FontTransform::Rotate270)
            .pos(Pos::new(HPos::Center, VPos::Top));
        let at = (look.px(2.0), (yr.start + yr.end) / 2);
        root.draw(&Text::new(spec.y_name.as_str(), at, style))
            .map_err(msg)?;
    }

    let mut entries = Vec::new();
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
        let dash = c.dashed.then(|| (look.px(6.0), look.px(4.0)));
        for seg in segs.into_iter().filter(|s| !s.is_empty()) {
            polyline(&mut chart, seg, style, dash)?;
        }
        if !c.name.is_empty() {
            entries.push(Entry {
                name: &c.name,
                style,
                dashed: c.dashed,
            });
        }
    }

    let r = look.px(4.0);
    // Markers are drawn in pixels on the plotting area, like the legend, so
    // that plotters' drawing code is instantiated once for each shape.
    let area = chart.plotting_area().strip_coord_spec();
    let (bx, by) = area.get_base_pixel();
    for m in &spec.markers {
        if !finite(m.x, m.y) {
            continue;
        }
        let col = color(&m.color, look.fg);
        let (x, y) = chart.backend_coord(&(m.x, m.y));
        let at = (x - bx, y - by);
        let stroke = look.line(col, 2.0);
        match m.shape.as_str() {
            "ring" => area.draw(&Circle::new(at, r, stroke)),
            "cross" => area.draw(&Cross::new(at, r, stroke)),
            "none" => Ok(()),
            _ => area.draw(&Circle::new(at, r, col.filled())),
        }
        .map_err(msg)?;
        if !m.label.is_empty() {
            let label = look.small_text().color(&col);
            let pos = (at.0 + r + look.px(3.0), at.1 - r - look.font as i32);
            area.draw(&Text::new(m.label.as_str(), pos, label))
                .map_err(msg)?;
        }
    }

    if !entries.is_empty() {
        let mut avoid = to_px(
            &chart,
            spec.curves.iter().map(|c| {
                c.x.iter()
                    .copied()
                    .zip(c.y.iter().copied())
                    .filter(|(x, y)| finite(*x, *y))
                    .collect()
            }),
        );
        for m in spec.markers.iter().filter(|m| finite(m.x, m.y)) {
            // The marker and its label, up and to the right of it.
            let (x, y) = chart.backend_coord(&(m.x, m.y));
            let label_y = y - r - look.font as i32 / 2;
            let label_w = look.text_width(m.label.chars().count());
            avoid.push(vec![(x, y)]);
            avoid.push(vec![
                (x + r, label_y),
                (x + r + look.px(3.0) + label_w, label_y),
            ]);
        }
        legend(&mut chart, &look, &entries, &avoid)?;
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
        let c = color("#ffffff80", fb);
        assert_eq!((c.0, c.1, c.2), (255, 255, 255));
        assert!((c.3 - 128.0 / 255.0).abs() < 1e-9);
        let c = color("oklch(0.5 0.1 200)", fb);
        assert_eq!((c.0, c.1, c.2), (1, 2, 3));
    }

    #[test]
    fn runs_break_at_gaps() {
        let xs = [1.0, 2.0, 3.0, 4.0, 5.0];
        let r = runs(&xs, &[1.0, f64::NAN, 2.0, f64::INFINITY, 3.0], false);
        assert_eq!(r.len(), 3);
        let r = runs(&xs, &[1.0, -1.0, 1.0, 1.0, 1.0], true);
        assert_eq!(r.len(), 2);
    }
}
