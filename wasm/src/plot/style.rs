//! Colours, type and line styles of a plot, from the page's CSS values.

use super::*;

/// Colours and type for one plot.
pub(super) struct Theme {
    /// Fill behind everything.
    pub(super) background: String,
    /// Axes, tick labels, legend text.
    pub(super) foreground: String,
    /// Grid lines.
    pub(super) grid: String,
    /// CSS font family list.
    pub(super) font_family: String,
    /// Tick label size in CSS pixels.
    pub(super) font_size: f64,
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

impl Theme {
    pub(super) fn read(o: Option<Obj>) -> Self {
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

/// Parses `#rrggbb` and `#rrggbbaa` (the page resolves its CSS custom
/// properties to these forms); anything else is `fallback`.
/// Anything else falls back to `fallback`.
pub(super) fn color(text: &str, fallback: RGBAColor) -> RGBAColor {
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
pub(super) struct Look {
    pub(super) bg: RGBAColor,
    pub(super) fg: RGBAColor,
    pub(super) grid: RGBAColor,
    pub(super) family: String,
    /// Tick label size in backing-store pixels.
    pub(super) font: f64,
    pub(super) dpr: f64,
}

impl Look {
    pub(super) fn new(theme: &Theme, dpr: f64) -> Self {
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
    pub(super) fn px(&self, n: f64) -> i32 {
        (n * self.dpr).round() as i32
    }

    pub(super) fn text(&self) -> TextStyle<'_> {
        (FontFamily::Name(&self.family), self.font)
            .into_font()
            .color(&self.fg)
    }

    pub(super) fn small_text(&self) -> TextStyle<'_> {
        (FontFamily::Name(&self.family), self.font * 0.92)
            .into_font()
            .color(&self.fg)
    }

    /// A rough width of `chars` characters of tick text, for reserving room.
    pub(super) fn text_width(&self, chars: usize) -> i32 {
        (self.font * 0.62 * chars as f64).ceil() as i32
    }

    pub(super) fn line(&self, c: RGBAColor, css_width: f64) -> ShapeStyle {
        ShapeStyle {
            color: c,
            filled: false,
            stroke_width: (css_width * self.dpr).round().max(1.0) as u32,
        }
    }
}
