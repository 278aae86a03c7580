//! Shared chart frame: numeric axes with tick labels sized to their text, the
//! shared text sizes, and a light grid. Every figure builds its plot through
//! [`build`] so that fonts, margins and tick formatting agree across figures.

use super::{err, number_label, tick_decimals, AXIS_TITLE_PX, FONT, GRID, GRID_BOLD, MARGIN_PX, MAX_TICKS, TICK_PX};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::ops::Range;

/// The coordinate system of every numeric chart.
pub type Cart = Cartesian2d<RangedCoordf64, RangedCoordf64>;

/// Ranges and descriptions of a chart's two numeric axes.
#[derive(Debug, Clone)]
pub struct Axes {
    /// Horizontal range.
    pub x: Range<f64>,
    /// Vertical range.
    pub y: Range<f64>,
    /// Decimals of x tick labels (`None`: from the tick step).
    pub x_decimals: Option<usize>,
    /// Decimals of y tick labels (`None`: from the tick step).
    pub y_decimals: Option<usize>,
    /// Horizontal axis description with unit.
    pub x_desc: String,
    /// Vertical axis description with unit.
    pub y_desc: String,
    /// Whether x tick labels are drawn (false for category axes drawn by the caller).
    pub x_ticks: bool,
    /// Whether y tick labels are drawn.
    pub y_ticks: bool,
    /// Extra width reserved left of the plot, px (category labels).
    pub extra_left_px: u32,
    /// Thousands separators on x tick labels (false for years).
    pub x_grouping: bool,
}

impl Axes {
    /// Numeric axes over the given ranges with tick decimals chosen from the step.
    pub fn new(x: Range<f64>, y: Range<f64>, x_desc: impl Into<String>, y_desc: impl Into<String>) -> Axes {
        Axes {
            x,
            y,
            x_decimals: None,
            y_decimals: None,
            x_desc: x_desc.into(),
            y_desc: y_desc.into(),
            x_ticks: true,
            y_ticks: true,
            extra_left_px: 0,
            x_grouping: true,
        }
    }

    /// Decimals of the x tick labels.
    pub fn x_tick_decimals(&self) -> usize {
        self.x_decimals.unwrap_or_else(|| tick_decimals(self.x.start, self.x.end, MAX_TICKS))
    }

    /// Decimals of the y tick labels.
    pub fn y_tick_decimals(&self) -> usize {
        self.y_decimals.unwrap_or_else(|| tick_decimals(self.y.start, self.y.end, MAX_TICKS))
    }
}

/// Text style of tick labels.
pub fn tick_style() -> TextStyle<'static> {
    (FONT, TICK_PX).into_font().into()
}

/// Width of `text` in `style` on `area`, px (an estimate from the font's metrics).
pub fn text_width<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, text: &str, style: &TextStyle) -> u32 {
    area.estimate_text_size(text, style).map(|s| s.0).unwrap_or((text.chars().count() as u32) * style.font.get_size() as u32 / 2)
}

/// Builds the chart on `area`: margins, label areas sized to the tick labels.
pub fn build<'a, DB: DrawingBackend>(area: &'a DrawingArea<DB, Shift>, axes: &Axes) -> Result<ChartContext<'a, DB, Cart>, String> {
    let style = tick_style();
    let yd = axes.y_tick_decimals();
    let widest = [axes.y.start, axes.y.end, 0.5 * (axes.y.start + axes.y.end)]
        .iter()
        .map(|&v| text_width(area, &number_label(v, yd), &style))
        .max()
        .unwrap_or(0);
    let y_area = if axes.y_ticks { widest + 24 } else { 0 } + AXIS_TITLE_PX + 40 + axes.extra_left_px;
    let x_area = TICK_PX + AXIS_TITLE_PX + 34;
    ChartBuilder::on(area)
        .margin(MARGIN_PX)
        .margin_right(MARGIN_PX + 30)
        .x_label_area_size(x_area)
        .y_label_area_size(y_area)
        .build_cartesian_2d(axes.x.clone(), axes.y.clone())
        .map_err(err)
}

/// Draws the grid, axes, tick labels and axis descriptions.
pub fn draw_mesh<DB: DrawingBackend>(chart: &mut ChartContext<'_, DB, Cart>, axes: &Axes) -> Result<(), String> {
    let xd = axes.x_tick_decimals();
    let yd = axes.y_tick_decimals();
    let grouped = axes.x_grouping;
    let xf = move |v: &f64| if grouped { number_label(*v, xd) } else { super::plain_label(*v, xd) };
    let yf = move |v: &f64| number_label(*v, yd);
    let mut mesh = chart.configure_mesh();
    mesh.x_desc(axes.x_desc.as_str())
        .y_desc(axes.y_desc.as_str())
        .x_labels(if axes.x_ticks { MAX_TICKS } else { 0 })
        .y_labels(if axes.y_ticks { MAX_TICKS } else { 0 })
        .x_label_formatter(&xf)
        .y_label_formatter(&yf)
        .label_style(tick_style())
        .axis_desc_style((FONT, AXIS_TITLE_PX))
        .bold_line_style(GRID_BOLD.stroke_width(1))
        .light_line_style(GRID.stroke_width(1))
        .axis_style(BLACK.stroke_width(2))
        .max_light_lines(4);
    mesh.draw().map_err(err)
}

/// The range `lo..hi` padded for plotting; from zero when asked and all values are positive.
pub fn padded(lo: f64, hi: f64, from_zero: bool) -> Range<f64> {
    if !(lo.is_finite() && hi.is_finite()) {
        return 0.0..1.0;
    }
    let lo = if from_zero { lo.min(0.0) } else { lo };
    let span = (hi - lo).abs().max(hi.abs() * 0.05).max(1e-6);
    let start = if from_zero && lo >= 0.0 { 0.0 } else { lo - 0.05 * span };
    start..hi + 0.08 * span
}

/// Smallest and largest of `values` (ignoring non-finite ones).
pub fn extent(values: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    let (lo, hi) = values.filter(|v| v.is_finite()).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
    lo.is_finite().then_some((lo, hi))
}

/// Range of the x values of a time series: exactly first to last year.
pub fn year_range(points: impl Iterator<Item = f64>) -> Range<f64> {
    match extent(points) {
        Some((lo, hi)) if hi > lo => lo..hi,
        Some((lo, _)) => lo - 1.0..lo + 1.0,
        None => 0.0..1.0,
    }
}

/// Draws `title` centred at the top of `root` and returns the area below it.
pub fn titled<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, title: &str) -> Result<DrawingArea<DB, Shift>, String> {
    let top = root.margin(24, 0, 0, 0);
    top.titled(title, (FONT, super::TITLE_PX)).map_err(err)
}
