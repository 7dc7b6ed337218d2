//! The axes: a linear or logarithmic range with its ticks, and the mesh
//! with its labels in the core's engineering notation.

use super::*;

/// The only backend used: a canvas.
pub(super) type DB = CanvasBackend;
pub(super) type Area = DrawingArea<DB, Shift>;
/// A series with its drawable runs of points.
pub(super) type Runs<'a> = (&'a Series, Vec<Vec<(f64, f64)>>);
/// A chart with our own axes on both sides.
pub(super) type Chart<'a> = ChartContext<'a, DB, Cartesian2d<Axis, Axis>>;

/// An axis with tick positions chosen here (see `ticks`), linear or
/// logarithmic. Labelled ticks are the "bold" key points, the minor grid
/// the "light" ones.
#[derive(Clone)]
pub(super) struct Axis {
    pub(super) lo: f64,
    pub(super) hi: f64,
    pub(super) log: bool,
    pub(super) bold: Vec<f64>,
    pub(super) light: Vec<f64>,
}

impl Axis {
    pub(super) fn linear(lo: f64, hi: f64, bold: Vec<f64>) -> Self {
        Axis {
            lo,
            hi,
            log: false,
            bold,
            light: Vec::new(),
        }
    }

    pub(super) fn log(lo: f64, hi: f64, (bold, light): (Vec<f64>, Vec<f64>)) -> Self {
        Axis {
            lo,
            hi,
            log: true,
            bold,
            light,
        }
    }

    /// Where `v` falls between the ends, 0 at `lo` and 1 at `hi`.
    pub(super) fn fraction(&self, v: f64) -> f64 {
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

/// Grid, axes and tick labels for a chart with a log frequency axis.
pub(super) fn mesh(
    chart: &mut Chart<'_>,
    look: &Look,
    y_unit: &str,
    x_labels: bool,
) -> Result<(), String> {
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
