//! Ensemble band figures: the median with 25–75 % and 5–95 % bands over years.

use super::{err, Figure, FONT};
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
}

impl Figure for BandChart<'_> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        let s = self.s;
        root.fill(&WHITE).map_err(err)?;
        let finite = s.quantiles.iter().flatten().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
        let (lo, hi) = if lo.is_finite() { (lo.min(0.0), hi.max(lo + 1e-6) * 1.08) } else { (0.0, 1.0) };
        let x0 = s.years.first().copied().unwrap_or(0.0);
        let x1 = s.years.last().copied().unwrap_or(1.0).max(x0 + 1.0);
        let mut chart = ChartBuilder::on(root)
            .caption(&s.title, (FONT, 40))
            .margin(30)
            .x_label_area_size(80)
            .y_label_area_size(120)
            .build_cartesian_2d(x0..x1, lo..hi)
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc("Year")
            .y_desc(&s.y_label)
            .x_label_formatter(&|x| format!("{x:.0}"))
            .label_style((FONT, 26))
            .axis_desc_style((FONT, 30))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(err)?;
        let band = |a: usize, b: usize| -> Vec<(f64, f64)> {
            let mut pts: Vec<(f64, f64)> = s.years.iter().zip(&s.quantiles).filter(|(_, q)| q[a].is_finite()).map(|(&x, q)| (x, q[a])).collect();
            pts.extend(s.years.iter().zip(&s.quantiles).rev().filter(|(_, q)| q[b].is_finite()).map(|(&x, q)| (x, q[b])));
            pts
        };
        let c = s.colour;
        chart
            .draw_series(std::iter::once(Polygon::new(band(0, 4), c.mix(0.18).filled())))
            .map_err(err)?
            .label("5–95 % of members")
            .legend(move |(x, y)| Rectangle::new([(x, y - 10), (x + 44, y + 10)], c.mix(0.18).filled()));
        chart
            .draw_series(std::iter::once(Polygon::new(band(1, 3), c.mix(0.40).filled())))
            .map_err(err)?
            .label("25–75 %")
            .legend(move |(x, y)| Rectangle::new([(x, y - 10), (x + 44, y + 10)], c.mix(0.40).filled()));
        let style = ShapeStyle { color: c.to_rgba(), filled: false, stroke_width: 4 };
        chart
            .draw_series(LineSeries::new(s.years.iter().zip(&s.quantiles).filter(|(_, q)| q[2].is_finite()).map(|(&x, q)| (x, q[2])), style))
            .map_err(err)?
            .label("Median")
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 44, y)], style));
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::LowerLeft)
            .label_font((FONT, 26))
            .legend_area_size(60)
            .background_style(WHITE.mix(0.85))
            .border_style(RGBColor(160, 160, 160))
            .draw()
            .map_err(err)?;
        Ok(())
    }
}
