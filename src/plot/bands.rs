//! Ensemble band figures: the median with 25–75 % and 5–95 % bands over years.
//!
//! Drawn through [`LineChart`] with bands, so text sizes, ticks and legend
//! placement (never over data) are those of every other figure.

use super::series::{Band, Corner, Line, LineChart};
use super::Figure;
use plotters::coord::Shift;
use plotters::prelude::*;

/// Quantiles (p5, p25, p50, p75, p95) of one variable per year.
#[derive(Debug, Clone)]
pub struct BandSeries {
    /// Title.
    pub title: String,
    /// Y-axis description with unit.
    pub y_label: String,
    /// Years.
    pub years: Vec<f64>,
    /// `[p5, p25, p50, p75, p95]` per year.
    pub quantiles: Vec<[f64; 5]>,
    /// Colour of the median and bands.
    pub colour: RGBColor,
}

/// A band chart drawn from a [`BandSeries`].
#[derive(Debug, Clone)]
pub struct BandChart<'a> {
    s: &'a BandSeries,
}

impl<'a> BandChart<'a> {
    /// Wraps a series.
    pub fn from_series(s: &'a BandSeries) -> BandChart<'a> {
        BandChart { s }
    }

    /// The chart as a line chart with two bands.
    pub fn line_chart(&self) -> LineChart {
        let s = self.s;
        let rows = || s.years.iter().zip(&s.quantiles);
        let band = |a: usize, b: usize| -> Vec<(f64, f64, f64)> {
            rows().filter(|(_, q)| q[a].is_finite() && q[b].is_finite()).map(|(&x, q)| (x, q[a], q[b])).collect()
        };
        let median = Line {
            label: "Median".into(),
            points: rows().map(|(&x, q)| (x, q[2].is_finite().then_some(q[2]))).collect(),
            colour: s.colour,
            dashed: false,
        };
        let mut chart = LineChart::over_years(s.title.clone(), s.y_label.clone(), vec![median]);
        chart.bands = vec![
            Band { label: "5–95 % of members".into(), points: band(0, 4), colour: s.colour, opacity: 0.18 },
            Band { label: "25–75 %".into(), points: band(1, 3), colour: s.colour, opacity: 0.40 },
        ];
        chart.legend_at = Corner::LowerLeft;
        chart
    }
}

impl Figure for BandChart<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        self.line_chart().draw(root)
    }
}
