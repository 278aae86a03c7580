//! Time-series figures of one catchment or the basin: yield, concentration (with
//! optional uncertainty bands), cover classes.

use super::axes::{self, Axes};
use super::legend::{self, Corner, Entry, Occupied, Placement, PxRect, Shape, Swatch};
use super::{err, palette, Figure, LINE_PX, REF_LINE_PX};
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

/// A shaded range between a lower and an upper value (e.g. the 5–95 % range of an ensemble).
#[derive(Debug, Clone)]
pub struct Band {
    /// Legend label.
    pub label: String,
    /// `(x, lower, upper)` points in x order.
    pub points: Vec<(f64, f64, f64)>,
    /// Colour.
    pub colour: RGBColor,
    /// Opacity of the fill, 0–1.
    pub opacity: f64,
}

/// Largest number of points of a line that [`LineChart`] marks point by point:
/// a line through a few points (a cost of delay at 0, 5, 10 and 20 years) shows
/// where its values are, a yearly series stays a plain line.
pub const MARKED_MAX_POINTS: usize = 12;

/// Marker radius of a marked line, px.
const MARKER_PX: i32 = 15;

/// Whether [`LineChart`] draws a marker at each point of `line`.
pub fn is_marked(line: &Line) -> bool {
    let n = line.points.iter().filter(|p| p.1.is_some_and(f64::is_finite)).count();
    (1..=MARKED_MAX_POINTS).contains(&n)
}

/// A line chart over years with optional horizontal thresholds and bands. A line
/// of at most [`MARKED_MAX_POINTS`] points carries a marker at each point (a
/// different shape per line, shown in the legend).
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
    /// Shaded ranges drawn under the lines (empty unless an ensemble gave ranges).
    pub bands: Vec<Band>,
    /// Horizontal reference lines `(label, value, colour)`.
    pub thresholds: Vec<(String, f64, RGBColor)>,
    /// Start the y axis at zero.
    pub y_from_zero: bool,
    /// Preferred legend corner (used only where the data leave it free).
    pub legend_at: Corner,
}

impl LineChart {
    /// A chart over calendar years with the legend preferably at the lower left.
    pub fn over_years(title: String, y_label: String, lines: Vec<Line>) -> LineChart {
        LineChart {
            title,
            x_label: "Year".into(),
            x_decimals: 0,
            y_label,
            lines,
            bands: Vec::new(),
            thresholds: Vec::new(),
            y_from_zero: true,
            legend_at: Corner::LowerLeft,
        }
    }

    fn entries(&self) -> Vec<Entry> {
        let mut v = Vec::new();
        for (i, l) in self.lines.iter().enumerate() {
            if l.points.iter().any(|p| p.1.is_some()) {
                let swatch = if is_marked(l) && !l.dashed {
                    Swatch::LineMarker { colour: l.colour, shape: Shape::nth(i) }
                } else {
                    Swatch::Line { colour: l.colour, dashed: l.dashed, width: LINE_PX }
                };
                v.push(Entry { label: l.label.clone(), swatch });
            }
        }
        for b in &self.bands {
            v.push(Entry { label: b.label.clone(), swatch: Swatch::Fill { colour: b.colour, opacity: b.opacity } });
        }
        for (label, _, colour) in &self.thresholds {
            v.push(Entry { label: label.clone(), swatch: Swatch::Line { colour: *colour, dashed: true, width: REF_LINE_PX } });
        }
        v
    }

    fn axes(&self) -> Axes {
        let x = axes::year_range(
            self.lines
                .iter()
                .flat_map(|l| l.points.iter().map(|p| p.0))
                .chain(self.bands.iter().flat_map(|b| b.points.iter().map(|p| p.0))),
        );
        let vals = self
            .lines
            .iter()
            .flat_map(|l| l.points.iter().filter_map(|p| p.1))
            .chain(self.thresholds.iter().map(|t| t.1))
            .chain(self.bands.iter().flat_map(|b| b.points.iter().flat_map(|p| [p.1, p.2])));
        let y = match axes::extent(vals) {
            Some((lo, hi)) => axes::padded(lo, hi, self.y_from_zero),
            None => 0.0..1.0,
        };
        let mut a = Axes::new(x, y, self.x_label.clone(), self.y_label.clone());
        a.x_decimals = Some(self.x_decimals);
        // x is a year, a delay or a cost in millions: never thousands-grouped.
        a.x_grouping = false;
        a
    }

    fn occupied<DB: DrawingBackend>(&self, chart: &ChartContext<'_, DB, axes::Cart>, x: &std::ops::Range<f64>) -> Occupied {
        let mut o = Occupied::default();
        for l in &self.lines {
            for seg in segments(&l.points) {
                o.line(seg.iter().map(|p| chart.backend_coord(p)));
            }
        }
        for b in &self.bands {
            o.region(b.points.iter().map(|&(px, lo, hi)| {
                let a = chart.backend_coord(&(px, lo));
                let c = chart.backend_coord(&(px, hi));
                (a.0, a.1, c.1)
            }));
        }
        for (_, v, _) in &self.thresholds {
            o.line([chart.backend_coord(&(x.start, *v)), chart.backend_coord(&(x.end, *v))]);
        }
        o
    }
}

/// Figures side by side in one figure (line charts, bar charts, …).
#[derive(Debug, Clone)]
pub struct Panels<F = LineChart>(pub Vec<F>);

impl<F: Figure> Figure for Panels<F> {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let areas = root.split_evenly((1, self.0.len().max(1)));
        for (chart, area) in self.0.iter().zip(areas.iter()) {
            chart.draw(area)?;
        }
        Ok(())
    }
}

/// Chooses the legend placement for a chart drawn by `probe`, then returns the
/// area the final chart goes on and the strip below it (if the legend needs one).
pub(crate) fn split_for_legend<DB: DrawingBackend>(
    body: &DrawingArea<DB, Shift>,
    entries: &[Entry],
    plot: PxRect,
    preferred: Corner,
    data: &Occupied,
) -> (Placement, DrawingArea<DB, Shift>, Option<DrawingArea<DB, Shift>>) {
    let placement = legend::place(body, entries, plot, preferred, data);
    match placement {
        Placement::Strip(h) => {
            let (_, bh) = body.dim_in_pixel();
            let (top, bottom) = body.split_vertically(bh.saturating_sub(h));
            (placement, top, Some(bottom))
        }
        _ => (placement, body.clone(), None),
    }
}

impl Figure for LineChart {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let body = axes::titled(root, &self.title)?;
        let ax = self.axes();
        let entries = self.entries();
        let (placement, area, strip) = {
            let probe = axes::build(&body, &ax)?;
            let data = self.occupied(&probe, &ax.x);
            split_for_legend(&body, &entries, PxRect::of(probe.plotting_area()), self.legend_at, &data)
        };
        let mut chart = axes::build(&area, &ax)?;
        axes::draw_mesh(&mut chart, &ax)?;
        for b in &self.bands {
            let mut poly: Vec<(f64, f64)> = b.points.iter().map(|p| (p.0, p.2)).collect();
            poly.extend(b.points.iter().rev().map(|p| (p.0, p.1)));
            if poly.len() >= 3 {
                chart.draw_series(std::iter::once(Polygon::new(poly, b.colour.mix(b.opacity).filled()))).map_err(err)?;
            }
        }
        for (_, v, colour) in &self.thresholds {
            let style = ShapeStyle { color: colour.to_rgba(), filled: false, stroke_width: REF_LINE_PX };
            chart.draw_series(DashedLineSeries::new([(ax.x.start, *v), (ax.x.end, *v)], 22, 12, style)).map_err(err)?;
        }
        for (i, line) in self.lines.iter().enumerate() {
            let style = ShapeStyle { color: line.colour.to_rgba(), filled: false, stroke_width: LINE_PX };
            for seg in segments(&line.points) {
                if line.dashed {
                    chart.draw_series(DashedLineSeries::new(seg.clone(), 22, 12, style)).map_err(err)?;
                } else {
                    chart.draw_series(LineSeries::new(seg.clone(), style)).map_err(err)?;
                }
                if is_marked(line) {
                    for p in &seg {
                        legend::draw_marker(&area, chart.backend_coord(p), MARKER_PX, Shape::nth(i), line.colour, true)?;
                    }
                }
            }
        }
        legend::draw(&area, strip.as_ref(), &entries, placement)
    }
}

/// Splits a series at missing or non-finite values into drawable runs.
pub(crate) fn segments(points: &[(f64, Option<f64>)]) -> Vec<Vec<(f64, f64)>> {
    let mut out = vec![];
    let mut cur = vec![];
    for &(x, y) in points {
        match y {
            Some(y) if y.is_finite() => cur.push((x, y)),
            _ if !cur.is_empty() => out.push(std::mem::take(&mut cur)),
            _ => {}
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
        let body = axes::titled(root, &self.title)?;
        let x = axes::year_range(self.years.iter().copied());
        let top = self.classes.iter().map(|c| c[0] + c[1] + c[2]).fold(self.vulnerable_ha, f64::max).max(1e-6) * 1.08;
        let mut ax = Axes::new(x.clone(), 0.0..top, "Year", "Infested area (ha)");
        ax.x_decimals = Some(0);
        ax.x_grouping = false;
        type Layer = (&'static str, RGBColor, fn(&[f64; 3]) -> f64);
        let layers: [Layer; 3] = [
            ("Scattered", palette::SCATTERED, |c| c[0] + c[1] + c[2]),
            ("Medium", palette::MEDIUM, |c| c[1] + c[2]),
            ("Dense", palette::DENSE, |c| c[2]),
        ];
        let mut entries: Vec<Entry> =
            layers.iter().map(|(l, c, _)| Entry { label: (*l).into(), swatch: Swatch::Fill { colour: *c, opacity: 0.95 } }).collect();
        entries.push(Entry {
            label: "Vulnerable area".into(),
            swatch: Swatch::Line { colour: palette::BASELINE, dashed: true, width: REF_LINE_PX },
        });
        let (placement, area, strip) = {
            let probe = axes::build(&body, &ax)?;
            let mut data = Occupied::default();
            data.region(self.years.iter().zip(&self.classes).map(|(&yr, c)| {
                let a = probe.backend_coord(&(yr, 0.0));
                let b = probe.backend_coord(&(yr, c[0] + c[1] + c[2]));
                (a.0, b.1, a.1)
            }));
            data.line([probe.backend_coord(&(x.start, self.vulnerable_ha)), probe.backend_coord(&(x.end, self.vulnerable_ha))]);
            split_for_legend(&body, &entries, PxRect::of(probe.plotting_area()), Corner::UpperLeft, &data)
        };
        let mut chart = axes::build(&area, &ax)?;
        axes::draw_mesh(&mut chart, &ax)?;
        for (_, colour, f) in layers {
            let pts: Vec<(f64, f64)> = self.years.iter().zip(&self.classes).map(|(&x, c)| (x, f(c))).collect();
            chart.draw_series(AreaSeries::new(pts, 0.0, colour.mix(0.95)).border_style(colour.stroke_width(2))).map_err(err)?;
        }
        let style = ShapeStyle { color: palette::BASELINE.to_rgba(), filled: false, stroke_width: REF_LINE_PX };
        chart
            .draw_series(DashedLineSeries::new([(x.start, self.vulnerable_ha), (x.end, self.vulnerable_ha)], 22, 12, style))
            .map_err(err)?;
        legend::draw(&area, strip.as_ref(), &entries, placement)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn svg_of(chart: &LineChart) -> String {
        crate::plot::register_font();
        let mut svg = String::new();
        {
            let root = SVGBackend::with_string(&mut svg, crate::plot::SIZE).into_drawing_area();
            chart.draw(&root).unwrap();
            root.present().unwrap();
        }
        svg
    }

    fn line(points: Vec<(f64, Option<f64>)>) -> Line {
        Line { label: "Nominal".into(), points, colour: palette::series(0), dashed: false }
    }

    /// Regression (issue 14): a cost-of-delay chart has 3–4 points per line and
    /// showed none of them; each point now has a marker, a yearly series none.
    #[test]
    fn lines_of_a_few_points_are_marked_point_by_point() {
        let delays = vec![(0.0, Some(1.4)), (5.0, Some(2.3)), (10.0, Some(3.1)), (20.0, Some(5.1))];
        let mut chart = LineChart::over_years("cost of delay".into(), "Total control cost (million $)".into(), vec![line(delays)]);
        chart.x_label = "Delay of the start (years)".into();
        let svg = svg_of(&chart);
        // Four point markers in the plot and one in the legend sample (filled circles).
        assert_eq!(svg.matches("<circle").count(), 5, "{}", svg.len());
        assert!(is_marked(&chart.lines[0]));

        let yearly: Vec<(f64, Option<f64>)> = (0..61).map(|i| (2027.0 + i as f64, Some(100.0 - i as f64))).collect();
        let chart = LineChart::over_years("yield".into(), "Yield (mm)".into(), vec![line(yearly)]);
        assert!(!is_marked(&chart.lines[0]));
        assert_eq!(svg_of(&chart).matches("<circle").count(), 0);
        // Undefined values do not count as points.
        let gappy = line(vec![(0.0, Some(1.0)), (1.0, None), (2.0, Some(f64::NAN)), (3.0, Some(2.0))]);
        assert!(is_marked(&gappy));
        assert!(!is_marked(&line(vec![(0.0, None)])));
    }
}
