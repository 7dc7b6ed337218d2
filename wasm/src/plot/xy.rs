//! The x–y plots: the load lines over the output characteristics, and
//! the tolerance view's histograms.

use super::*;

/// One curve of an x/y plot.
pub(super) struct Curve {
    /// Legend text; empty keeps the curve out of the legend.
    pub(super) name: String,
    pub(super) x: Vec<f64>,
    pub(super) y: Vec<f64>,
    pub(super) color: String,
    /// Line width in CSS pixels.
    pub(super) width: f64,
    pub(super) dashed: bool,
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
pub(super) struct Marker {
    pub(super) x: f64,
    pub(super) y: f64,
    pub(super) label: String,
    pub(super) color: String,
    /// `"dot"` (default), `"ring"`, `"cross"` or `"none"` (label only).
    pub(super) shape: String,
}

/// What `plot_xy` draws.
#[derive(Default)]
pub(super) struct XySpec {
    pub(super) curves: Vec<Curve>,
    pub(super) markers: Vec<Marker>,
    /// Axis names shown at the axes (`"VCE"`, `"IC"`).
    pub(super) x_name: String,
    pub(super) y_name: String,
    /// Units for the tick labels (`"V"`, `"A"`).
    pub(super) x_unit: String,
    pub(super) y_unit: String,
    /// Fixed axis ranges `[min, max]`; otherwise from the data, from zero
    /// when the data are all positive.
    pub(super) x_range: Option<[f64; 2]>,
    pub(super) y_range: Option<[f64; 2]>,
    pub(super) empty_text: String,
    pub(super) theme: Theme,
}

impl XySpec {
    pub(super) fn read(o: &Obj) -> Self {
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

pub(super) fn draw_xy(
    root: &Area,
    spec: &XySpec,
    dpr: f64,
    panels: &mut Vec<Panel>,
) -> Result<(), String> {
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
        .build_cartesian_2d(
            Axis::linear(x0, x1, x_ticks.clone()),
            Axis::linear(y0, y1, y_ticks.clone()),
        )
        .map_err(msg)?;
    panels.push(Panel::of(
        &chart,
        &Axis::linear(x0, x1, x_ticks),
        &Axis::linear(y0, y1, y_ticks),
    ));

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
    // The curves' own labels (markers without a shape: the base currents
    // of the output characteristics) kept at least a line apart, where
    // curves close together would print them over each other.
    let line = look.font.ceil() as i32 + look.px(1.0);
    let (_, area_h) = area.dim_in_pixel();
    let mut label_ys: Vec<(usize, i32)> = spec
        .markers
        .iter()
        .enumerate()
        .filter(|(_, m)| m.shape == "none" && !m.label.is_empty() && finite(m.x, m.y))
        .map(|(i, m)| {
            let (_, y) = chart.backend_coord(&(m.x, m.y));
            (i, y - by - r - look.font as i32)
        })
        .collect();
    label_ys.sort_by_key(|&(_, y)| y);
    let mut ys: Vec<i32> = label_ys.iter().map(|&(_, y)| y).collect();
    spread(&mut ys, line, 0, area_h as i32 - line);
    let moved: Vec<(usize, i32)> = label_ys.iter().map(|&(i, _)| i).zip(ys).collect();
    for (k, m) in spec.markers.iter().enumerate() {
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
            let y = moved
                .iter()
                .find(|&&(i, _)| i == k)
                .map_or(at.1 - r - look.font as i32, |&(_, y)| y);
            let pos = (at.0 + r + look.px(3.0), y);
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

/// Moves sorted label positions `ys` (pixels, top to bottom) apart until
/// each is at least `gap` below the one above, keeping them within
/// `lo..=hi` where there is room: pushed down from the top first, then up
/// from the bottom. Labels already far enough apart do not move.
pub(super) fn spread(ys: &mut [i32], gap: i32, lo: i32, hi: i32) {
    for i in 0..ys.len() {
        let floor = if i == 0 { lo } else { ys[i - 1] + gap };
        if ys[i] < floor {
            ys[i] = floor;
        }
    }
    for i in (0..ys.len()).rev() {
        let ceiling = if i + 1 == ys.len() {
            hi
        } else {
            ys[i + 1] - gap
        };
        if ys[i] > ceiling {
            ys[i] = ceiling;
        }
    }
}

/// A data range opened to round tick steps, never of zero width.
pub(super) fn fit_axis(lo: f64, hi: f64) -> (f64, f64) {
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

/// Draws curves on linear axes with labelled point markers: load lines over
/// output characteristics, with the quiescent point and swing limits.
///
/// JS: `plot_xy(canvas: HTMLCanvasElement, spec: {curves: [{name, x, y,
/// color, width?, dashed?}], markers?: [{x, y, label, color, shape?}],
/// x_name, y_name, x_unit, y_unit, x_range?, y_range?, empty_text?, theme,
/// pixel_size: [w, h], pixel_ratio}):
/// false | {panels}` — false when the canvas is hidden, else where the
/// plotting area sits and what its axes span; throws `{field: "plot",
/// message}`.
#[wasm_bindgen]
pub fn plot_xy(canvas: &HtmlCanvasElement, spec: JsValue) -> Result<JsValue, JsValue> {
    let obj = Obj::new(spec);
    let spec = XySpec::read(&obj);
    let Some(dpr) = fit(canvas, &obj) else {
        return Ok(JsValue::FALSE);
    };
    let root = backend(canvas)?.into_drawing_area();
    let mut panels = Vec::new();
    draw_xy(&root, &spec, dpr, &mut panels).map_err(|e| field_error("plot", &e))?;
    root.present().map_err(|e| field_error("plot", &msg(e)))?;
    Ok(frame(&panels))
}

#[cfg(test)]
mod tests {
    use super::spread;

    #[test]
    fn labels_close_together_move_a_line_apart() {
        // Three labels 4 px apart with a 12 px line: pushed down to 12 px
        // steps; the first, at the top of its room, stays.
        let mut ys = [100, 104, 108];
        spread(&mut ys, 12, 0, 500);
        assert_eq!(ys, [100, 112, 124]);
        // Labels already apart do not move.
        let mut ys = [10, 40, 90];
        spread(&mut ys, 12, 0, 500);
        assert_eq!(ys, [10, 40, 90]);
        // At the bottom of the area they are pushed up instead.
        let mut ys = [490, 495, 499];
        spread(&mut ys, 12, 0, 500);
        assert_eq!(ys, [476, 488, 500]);
        // Above the top: brought down to it.
        let mut ys = [-5, 0];
        spread(&mut ys, 12, 0, 500);
        assert_eq!(ys, [0, 12]);
    }
}
