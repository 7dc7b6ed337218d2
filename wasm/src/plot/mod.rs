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
use ticks::{eng_label, linear_ticks, log_ticks, padded_range};

mod axis;
mod frequency;
mod style;
mod ticks;
mod xy;

use axis::*;
pub use frequency::plot_frequency;
use frequency::*;
use style::*;
pub use xy::plot_xy;

/// Where a panel of a drawn plot sits on the canvas and what its axes
/// span, so that the page can read the value under the pointer: the
/// plotting area in device pixels, and each axis's ends and kind.
struct Panel {
    left: i32,
    top: i32,
    width: i32,
    height: i32,
    x: (f64, f64, bool),
    y: (f64, f64, bool),
}

impl Panel {
    /// The panel of `chart`, whose axes are `x` and `y`.
    fn of(chart: &Chart<'_>, x: &Axis, y: &Axis) -> Panel {
        let (xs, ys) = chart.plotting_area().get_pixel_range();
        Panel {
            left: xs.start,
            top: ys.start,
            width: xs.end - xs.start,
            height: ys.end - ys.start,
            x: (x.lo, x.hi, x.log),
            y: (y.lo, y.hi, y.log),
        }
    }
}

/// What a plot function returns to the page: `false` when nothing was
/// drawn (a hidden canvas), else `{panels: [{left, top, width, height,
/// x: [lo, hi], x_log, y: [lo, hi], y_log}]}` in device pixels.
fn frame(panels: &[Panel]) -> JsValue {
    let list = js_sys::Array::new();
    for p in panels {
        let o = crate::js::Builder::new();
        o.set("left", p.left);
        o.set("top", p.top);
        o.set("width", p.width);
        o.set("height", p.height);
        let pair = |a: f64, b: f64| {
            let v = js_sys::Array::new();
            v.push(&JsValue::from_f64(a));
            v.push(&JsValue::from_f64(b));
            v
        };
        o.set("x", pair(p.x.0, p.x.1));
        o.set("x_log", p.x.2);
        o.set("y", pair(p.y.0, p.y.1));
        o.set("y_log", p.y.2);
        list.push(&o.into());
    }
    let o = crate::js::Builder::new();
    o.set("panels", list);
    o.into()
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
    pub(super) name: &'a str,
    pub(super) style: ShapeStyle,
    pub(super) dashed: bool,
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
