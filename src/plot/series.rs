//! Time-series figures of one catchment: yield, concentration, cover classes.

use super::{err, palette, Figure, FONT};
use plotters::coord::Shift;
use plotters::prelude::*;

/// A named line on a time-series figure.
#[derive(Debug, Clone)]
pub struct Line {
    /// Legend label.
    pub label: String,
    /// `(year, value)` points; gaps (undefined values) split the line.
    pub points: Vec<(f64, Option<f64>)>,
    /// Colour.
    pub colour: RGBColor,
    /// Dashed when true.
    pub dashed: bool,
}

/// A corner of the plot area for the legend.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Corner {
    /// Upper left.
    UpperLeft,
    /// Upper right.
    UpperRight,
    /// Lower left.
    LowerLeft,
    /// Lower right.
    LowerRight,
}

impl Corner {
    fn position(self) -> SeriesLabelPosition {
        match self {
            Corner::UpperLeft => SeriesLabelPosition::UpperLeft,
            Corner::UpperRight => SeriesLabelPosition::UpperRight,
            Corner::LowerLeft => SeriesLabelPosition::LowerLeft,
            Corner::LowerRight => SeriesLabelPosition::LowerRight,
        }
    }
}

/// A line chart over years with an optional horizontal threshold.
#[derive(Debug, Clone)]
pub struct LineChart {
    /// Title at the top.
    pub title: String,
    /// X-axis description with unit.
    pub x_label: String,
    /// Decimals of x tick labels (0 for years).
    pub x_decimals: usize,
    /// Y-axis description with unit.
    pub y_label: String,
    /// Lines to draw.
    pub lines: Vec<Line>,
    /// Horizontal reference lines `(label, value, colour)`.
    pub thresholds: Vec<(String, f64, RGBColor)>,
    /// Start the y axis at zero.
    pub y_from_zero: bool,
    /// Where the legend goes (choose a corner the data leave free).
    pub legend_at: Corner,
}

impl LineChart {
    /// A chart over calendar years with the legend at the lower left.
    pub fn over_years(title: String, y_label: String, lines: Vec<Line>) -> LineChart {
        LineChart {
            title,
            x_label: "Year".into(),
            x_decimals: 0,
            y_label,
            lines,
            thresholds: Vec::new(),
            y_from_zero: true,
            legend_at: Corner::LowerLeft,
        }
    }
}

/// Charts side by side in one figure.
#[derive(Debug, Clone)]
pub struct Panels(pub Vec<LineChart>);

impl Figure for Panels {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let areas = root.split_evenly((1, self.0.len().max(1)));
        for (chart, area) in self.0.iter().zip(areas.iter()) {
            chart.draw(area)?;
        }
        Ok(())
    }
}

fn year_range(points: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = points.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| (a.min(x), b.max(x)));
    if lo.is_finite() && hi > lo {
        (lo, hi)
    } else if lo.is_finite() {
        (lo - 1.0, lo + 1.0)
    } else {
        (0.0, 1.0)
    }
}

fn padded(lo: f64, hi: f64, from_zero: bool) -> (f64, f64) {
    let lo = if from_zero { lo.min(0.0) } else { lo };
    let span = (hi - lo).abs().max(hi.abs() * 0.05).max(1e-6);
    (if from_zero && lo >= 0.0 { 0.0 } else { lo - 0.05 * span }, hi + 0.08 * span)
}

impl Figure for LineChart {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let (x0, x1) = year_range(self.lines.iter().flat_map(|l| l.points.iter().map(|p| p.0)));
        let vals = self.lines.iter().flat_map(|l| l.points.iter().filter_map(|p| p.1)).chain(self.thresholds.iter().map(|t| t.1));
        let (lo, hi) = vals.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
        let (y0, y1) = if lo.is_finite() { padded(lo, hi, self.y_from_zero) } else { (0.0, 1.0) };
        let mut chart = ChartBuilder::on(root)
            .caption(&self.title, (FONT, 40))
            .margin(30)
            .x_label_area_size(80)
            .y_label_area_size(120)
            .build_cartesian_2d(x0..x1, y0..y1)
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc(&self.x_label)
            .y_desc(&self.y_label)
            .x_label_formatter(&|x| format!("{x:.*}", self.x_decimals))
            .label_style((FONT, 26))
            .axis_desc_style((FONT, 30))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(err)?;
        for (label, v, colour) in &self.thresholds {
            let style = ShapeStyle { color: colour.to_rgba(), filled: false, stroke_width: 3 };
            chart
                .draw_series(DashedLineSeries::new([(x0, *v), (x1, *v)], 14, 8, style))
                .map_err(err)?
                .label(label.as_str())
                .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 44, y)], style));
        }
        for line in &self.lines {
            let style = ShapeStyle { color: line.colour.to_rgba(), filled: false, stroke_width: 4 };
            let mut first = true;
            for seg in segments(&line.points) {
                let anno = if line.dashed {
                    chart.draw_series(DashedLineSeries::new(seg, 12, 8, style)).map_err(err)?
                } else {
                    chart.draw_series(LineSeries::new(seg, style)).map_err(err)?
                };
                if first {
                    anno.label(line.label.as_str()).legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 44, y)], style));
                    first = false;
                }
            }
        }
        chart
            .configure_series_labels()
            .position(self.legend_at.position())
            .label_font((FONT, 26))
            .legend_area_size(60)
            .background_style(WHITE.mix(0.85))
            .border_style(RGBColor(160, 160, 160))
            .draw()
            .map_err(err)?;
        Ok(())
    }
}

fn segments(points: &[(f64, Option<f64>)]) -> Vec<Vec<(f64, f64)>> {
    let mut out = vec![];
    let mut cur = vec![];
    for &(x, y) in points {
        match y {
            Some(y) => cur.push((x, y)),
            None if !cur.is_empty() => out.push(std::mem::take(&mut cur)),
            None => {}
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// Stacked areas of infestation by density class over years.
#[derive(Debug, Clone)]
pub struct CoverChart {
    /// Title at the top.
    pub title: String,
    /// Years.
    pub years: Vec<f64>,
    /// Scattered, medium, dense areas (ha) per year.
    pub classes: Vec<[f64; 3]>,
    /// Vulnerable area (ha), drawn as the ceiling.
    pub vulnerable_ha: f64,
}

impl Figure for CoverChart {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let (x0, x1) = year_range(self.years.iter().copied());
        let top = self.classes.iter().map(|c| c[0] + c[1] + c[2]).fold(self.vulnerable_ha, f64::max).max(1e-6) * 1.08;
        let mut chart = ChartBuilder::on(root)
            .caption(&self.title, (FONT, 40))
            .margin(30)
            .x_label_area_size(80)
            .y_label_area_size(140)
            .build_cartesian_2d(x0..x1, 0.0..top)
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc("Year")
            .y_desc("Infested area (ha)")
            .x_label_formatter(&|x| format!("{x:.0}"))
            .label_style((FONT, 26))
            .axis_desc_style((FONT, 30))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(err)?;
        let layers: [(&str, RGBColor, fn(&[f64; 3]) -> f64); 3] = [
            ("Scattered", palette::SCATTERED, |c| c[0] + c[1] + c[2]),
            ("Medium", palette::MEDIUM, |c| c[1] + c[2]),
            ("Dense", palette::DENSE, |c| c[2]),
        ];
        for (label, colour, f) in layers {
            let pts: Vec<(f64, f64)> = self.years.iter().zip(&self.classes).map(|(&x, c)| (x, f(c))).collect();
            chart
                .draw_series(AreaSeries::new(pts, 0.0, colour.mix(0.95)).border_style(colour.stroke_width(2)))
                .map_err(err)?
                .label(label)
                .legend(move |(x, y)| Rectangle::new([(x, y - 10), (x + 44, y + 10)], colour.filled()));
        }
        let style = ShapeStyle { color: palette::BASELINE.to_rgba(), filled: false, stroke_width: 3 };
        chart
            .draw_series(DashedLineSeries::new([(x0, self.vulnerable_ha), (x1, self.vulnerable_ha)], 14, 8, style))
            .map_err(err)?
            .label("Vulnerable area")
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 44, y)], style));
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::UpperLeft)
            .label_font((FONT, 26))
            .legend_area_size(60)
            .background_style(WHITE.mix(0.85))
            .border_style(RGBColor(160, 160, 160))
            .draw()
            .map_err(err)?;
        Ok(())
    }
}
