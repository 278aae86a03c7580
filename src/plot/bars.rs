//! Horizontal bar charts: one bar per category (catchment, parameter), with an
//! optional range whisker and an optional second value drawn as a marker.
//! Categories are drawn top to bottom in the order given; each bar carries its
//! value as a label at its end.

use super::axes::{self, Axes};
use super::legend::Corner;
use super::legend::{self, draw_marker, Entry, Occupied, PxRect, Shape};
use super::series::split_for_legend;
use super::{err, number_label, palette, Figure, FONT, LINE_PX, NOTE_PX, TICK_PX};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// One bar.
#[derive(Debug, Clone, PartialEq)]
pub struct Bar {
    /// Category label, drawn left of the plot.
    pub label: String,
    /// Length of the bar (from zero).
    pub value: f64,
    /// A range drawn as a whisker across the bar end, `(low, high)`.
    pub range: Option<(f64, f64)>,
    /// A second value drawn as a diamond marker on the bar's row.
    pub marker: Option<f64>,
    /// Fill colour.
    pub colour: RGBColor,
}

/// A horizontal bar chart.
#[derive(Debug, Clone)]
pub struct HBarChart {
    /// Title at the top.
    pub title: String,
    /// Value-axis description with unit.
    pub x_label: String,
    /// Bars, top to bottom.
    pub bars: Vec<Bar>,
    /// Decimals of the value labels at the bar ends.
    pub value_decimals: usize,
    /// Fixed value-axis range (otherwise from the data, always including zero).
    pub x_range: Option<(f64, f64)>,
    /// Legend entries (empty: no legend).
    pub legend: Vec<Entry>,
}

fn label_style() -> TextStyle<'static> {
    TextStyle::from((FONT, TICK_PX).into_font())
}

fn value_style(h: HPos) -> TextStyle<'static> {
    TextStyle::from((FONT, NOTE_PX).into_font()).pos(Pos::new(h, VPos::Center)).color(&palette::RANGE)
}

impl HBarChart {
    fn x_axis(&self) -> (f64, f64) {
        if let Some(r) = self.x_range {
            return r;
        }
        let vals = self.bars.iter().flat_map(|b| {
            let mut v = vec![b.value, 0.0];
            if let Some((lo, hi)) = b.range {
                v.extend([lo, hi]);
            }
            v.extend(b.marker);
            v
        });
        let (lo, hi) = axes::extent(vals).unwrap_or((0.0, 1.0));
        let span = (hi - lo).max(1e-9);
        // Room for value labels beyond the bar ends.
        let lo = if lo < 0.0 { lo - 0.16 * span } else { lo };
        let hi = if hi > 0.0 { hi + 0.16 * span } else { hi + 0.02 * span };
        (lo, hi)
    }

    /// Far end of the bar's drawing (value, whisker or marker), in the direction of the value.
    fn reach(b: &Bar) -> f64 {
        let mut ends = vec![b.value];
        if let Some((lo, hi)) = b.range {
            ends.extend([lo, hi]);
        }
        ends.extend(b.marker);
        if b.value < 0.0 {
            ends.into_iter().fold(f64::INFINITY, f64::min)
        } else {
            ends.into_iter().fold(f64::NEG_INFINITY, f64::max)
        }
    }
}

impl Figure for HBarChart {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let body = axes::titled(root, &self.title)?;
        let n = self.bars.len().max(1);
        let (x0, x1) = self.x_axis();
        let widest = self.bars.iter().map(|b| axes::text_width(&body, &b.label, &label_style())).max().unwrap_or(0);
        let mut ax = Axes::new(x0..x1, -0.5..n as f64 - 0.5, self.x_label.clone(), String::new());
        ax.y_ticks = false;
        ax.extra_left_px = widest + 10;
        let row_y = |i: usize| (n - 1 - i) as f64;
        let half = 0.32;
        let (placement, area, strip) = {
            let probe = axes::build(&body, &ax)?;
            let mut data = Occupied::default();
            for (i, b) in self.bars.iter().enumerate() {
                let y = row_y(i);
                data.rect(probe.backend_coord(&(0.0, y - half)), probe.backend_coord(&(b.value, y + half)));
                if let Some((lo, hi)) = b.range {
                    data.rect(probe.backend_coord(&(lo, y - half)), probe.backend_coord(&(hi, y + half)));
                }
                if let Some(m) = b.marker {
                    data.point(probe.backend_coord(&(m, y)), 18);
                }
                // The value label.
                let end = probe.backend_coord(&(Self::reach(b), y));
                let w = 7 * NOTE_PX as i32 / 2;
                let (a, c) = if b.value < 0.0 { ((end.0 - w, end.1 - 25), end) } else { (end, (end.0 + w, end.1 + 25)) };
                data.rect(a, c);
            }
            split_for_legend(&body, &self.legend, PxRect::of(probe.plotting_area()), Corner::LowerRight, &data)
        };
        let mut chart = axes::build(&area, &ax)?;
        axes::draw_mesh(&mut chart, &ax)?;
        // Zero line.
        chart.draw_series(LineSeries::new([(0.0, -0.5), (0.0, n as f64 - 0.5)], BLACK.stroke_width(3))).map_err(err)?;
        let screen = area.use_screen_coord();
        let plot_left = PxRect::of(chart.plotting_area()).x0;
        for (i, b) in self.bars.iter().enumerate() {
            let y = row_y(i);
            chart.draw_series(std::iter::once(Rectangle::new([(0.0, y - half), (b.value, y + half)], b.colour.filled()))).map_err(err)?;
            if let Some((lo, hi)) = b.range {
                let st = palette::RANGE.stroke_width(LINE_PX.min(5));
                chart.draw_series(LineSeries::new([(lo, y), (hi, y)], st)).map_err(err)?;
                for v in [lo, hi] {
                    chart.draw_series(LineSeries::new([(v, y - half * 0.6), (v, y + half * 0.6)], st)).map_err(err)?;
                }
            }
            if let Some(m) = b.marker {
                draw_marker(&area, chart.backend_coord(&(m, y)), 16, Shape::Diamond, palette::RANGE, false)?;
            }
            let end = chart.backend_coord(&(Self::reach(b), y));
            let text = number_label(b.value, self.value_decimals);
            let gap = if b.marker.is_some() { 30 } else { 14 };
            if b.value < 0.0 {
                screen.draw(&Text::new(text, (end.0 - gap, end.1), value_style(HPos::Right))).map_err(err)?;
            } else {
                screen.draw(&Text::new(text, (end.0 + gap, end.1), value_style(HPos::Left))).map_err(err)?;
            }
            let c = chart.backend_coord(&(x0, y));
            screen
                .draw(&Text::new(b.label.clone(), (plot_left - 18, c.1), label_style().pos(Pos::new(HPos::Right, VPos::Center))))
                .map_err(err)?;
        }
        legend::draw(&area, strip.as_ref(), &self.legend, placement)
    }
}

/// Bar charts side by side in one figure.
pub type BarPanels = super::series::Panels<HBarChart>;
