//! Figures of a calibration (`yieldshift fit`): observed against simulated annual
//! yield, and the record in Budyko space over the fitted and scenario curves.
//!
//! Both figures keep their legend in a panel to the right of the plot, so it can
//! never cover data.

use super::{err, palette, Figure, FONT};
use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Width of the legend panel, pixels.
/// Legend panel width at the shared figure size.
const LEGEND_W: u32 = 480 * super::SIZE.0 / 1600;

/// Scales a length laid out for a 1600-px-wide figure to [`super::SIZE`].
const fn k(px: u32) -> u32 {
    px * super::SIZE.0 / 1600
}

/// [`k`] for signed pixel offsets.
const fn ki(px: i32) -> i32 {
    px * super::SIZE.0 as i32 / 1600
}

/// How a series is drawn and shown in the legend.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mark {
    /// A solid line.
    Line,
    /// A dashed line.
    Dashed,
    /// Filled circles (with a thin joining line when the series is a time series).
    Points,
    /// One large ringed point.
    BigPoint,
}

/// A named series on a fit figure.
#[derive(Debug, Clone)]
pub struct FitSeries {
    /// Legend label.
    pub label: String,
    /// Points `(x, y)`; `None` in `y` breaks a line (a year left out).
    pub points: Vec<(f64, Option<f64>)>,
    /// Colour.
    pub colour: RGBColor,
    /// Drawing style.
    pub mark: Mark,
}

/// Observed and simulated annual yield over the record years.
#[derive(Debug, Clone)]
pub struct YieldFitChart {
    /// Title at the top.
    pub title: String,
    /// Series (observed first, then simulations).
    pub series: Vec<FitSeries>,
    /// Lines of text under the legend (statistics, sign conventions).
    pub notes: Vec<String>,
}

/// The record in Budyko space: evaporative ratio `ET/P` against aridity index `E0/P`.
///
/// The physical limits (energy `ET = E0`, water `ET = P`) are drawn as thin grey
/// dashed lines; say so in `notes`.
#[derive(Debug, Clone)]
pub struct BudykoChart {
    /// Title at the top.
    pub title: String,
    /// Series: curves, observed years and the record mean.
    pub series: Vec<FitSeries>,
    /// Lines of text under the legend.
    pub notes: Vec<String>,
}

fn range_of(values: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    let (lo, hi) = values.filter(|v| v.is_finite()).fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
    lo.is_finite().then_some((lo, hi))
}

/// Draws the series on a chart (shared by both figures).
fn draw_series<DB: DrawingBackend>(
    chart: &mut ChartContext<'_, DB, Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>>,
    series: &[FitSeries],
    join_points: bool,
) -> Result<(), String> {
    for s in series {
        let line = ShapeStyle { color: s.colour.to_rgba(), filled: false, stroke_width: k(4) };
        match s.mark {
            Mark::Line => {
                for run in super::series::segments(&s.points) {
                    chart.draw_series(LineSeries::new(run, line)).map_err(err)?;
                }
            }
            Mark::Dashed => {
                for run in super::series::segments(&s.points) {
                    chart.draw_series(DashedLineSeries::new(run, 14, 9, line)).map_err(err)?;
                }
            }
            Mark::Points => {
                if join_points {
                    let thin = ShapeStyle { color: s.colour.mix(0.6), filled: false, stroke_width: 1 };
                    for run in super::series::segments(&s.points) {
                        chart.draw_series(LineSeries::new(run, thin)).map_err(err)?;
                    }
                }
                let pts: Vec<(f64, f64)> = super::series::segments(&s.points).into_iter().flatten().collect();
                chart.draw_series(pts.into_iter().map(|p| Circle::new(p, k(8), s.colour.filled()))).map_err(err)?;
            }
            Mark::BigPoint => {
                let pts: Vec<(f64, f64)> = super::series::segments(&s.points).into_iter().flatten().collect();
                chart.draw_series(pts.iter().map(|&p| Circle::new(p, k(15), WHITE.filled()))).map_err(err)?;
                chart
                    .draw_series(
                        pts.iter()
                            .map(|&p| Circle::new(p, k(15), ShapeStyle { color: s.colour.to_rgba(), filled: false, stroke_width: k(5) })),
                    )
                    .map_err(err)?;
            }
        }
    }
    Ok(())
}

/// Draws the legend and notes in the right-hand panel.
fn draw_legend<DB: DrawingBackend>(panel: &DrawingArea<DB, Shift>, series: &[FitSeries], notes: &[String]) -> Result<(), String> {
    let label_style = TextStyle::from((FONT, super::LEGEND_PX).into_font()).pos(Pos::new(HPos::Left, VPos::Center));
    let note_style = TextStyle::from((FONT, super::NOTE_PX).into_font()).color(&RGBColor(70, 70, 70));
    let x0 = ki(16);
    let mut y = ki(70);
    for s in series {
        let line = ShapeStyle { color: s.colour.to_rgba(), filled: false, stroke_width: k(4) };
        match s.mark {
            Mark::Line => panel.draw(&PathElement::new(vec![(x0, y), (x0 + ki(56), y)], line)).map_err(err)?,
            Mark::Dashed => panel.draw(&DashedPathElement::new(vec![(x0, y), (x0 + ki(56), y)], 12, 7, line)).map_err(err)?,
            Mark::Points => panel.draw(&Circle::new((x0 + ki(28), y), k(8), s.colour.filled())).map_err(err)?,
            Mark::BigPoint => panel
                .draw(&Circle::new((x0 + ki(28), y), k(14), ShapeStyle { color: s.colour.to_rgba(), filled: false, stroke_width: k(5) }))
                .map_err(err)?,
        }
        panel.draw(&Text::new(s.label.clone(), (x0 + ki(72), y), label_style.clone())).map_err(err)?;
        y += ki(50);
    }
    y += ki(20);
    for n in notes {
        panel.draw(&Text::new(n.clone(), (x0, y), note_style.clone())).map_err(err)?;
        y += ki(48);
    }
    Ok(())
}

impl Figure for YieldFitChart {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let body = root.titled(&self.title, (FONT, super::TITLE_PX)).map_err(err)?;
        let (w, _) = body.dim_in_pixel();
        let (plot, panel) = body.split_horizontally(w.saturating_sub(LEGEND_W));
        let (x0, x1) = range_of(self.series.iter().flat_map(|s| s.points.iter().map(|p| p.0))).unwrap_or((0.0, 1.0));
        let (x0, x1) = if x1 > x0 { (x0 - 0.5, x1 + 0.5) } else { (x0 - 1.0, x0 + 1.0) };
        let (_, hi) = range_of(self.series.iter().flat_map(|s| s.points.iter().filter_map(|p| p.1))).unwrap_or((0.0, 1.0));
        let y1 = if hi > 0.0 { hi * 1.08 } else { 1.0 };
        let mut chart = ChartBuilder::on(&plot)
            .margin(k(20))
            .x_label_area_size(k(80))
            .y_label_area_size(k(120))
            .build_cartesian_2d(x0..x1, 0.0..y1)
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc("Year")
            .y_desc("Annual water yield (mm/yr)")
            .x_label_formatter(&|x| format!("{x:.0}"))
            .y_label_formatter(&|y| format!("{y:.0}"))
            .label_style((FONT, super::TICK_PX))
            .axis_desc_style((FONT, super::AXIS_TITLE_PX))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(err)?;
        draw_series(&mut chart, &self.series, true)?;
        draw_legend(&panel, &self.series, &self.notes)
    }
}

impl Figure for BudykoChart {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let body = root.titled(&self.title, (FONT, super::TITLE_PX)).map_err(err)?;
        let (w, _) = body.dim_in_pixel();
        let (plot, panel) = body.split_horizontally(w.saturating_sub(LEGEND_W));
        let (_, xmax) = range_of(self.series.iter().flat_map(|s| s.points.iter().map(|p| p.0))).unwrap_or((0.0, 1.0));
        let x1 = (xmax * 1.05).max(0.1);
        let (ylo, yhi) = range_of(self.series.iter().flat_map(|s| s.points.iter().filter_map(|p| p.1))).unwrap_or((0.0, 1.0));
        let y0 = ylo.min(0.0) - if ylo < 0.0 { 0.05 } else { 0.0 };
        let y1 = yhi.max(1.0) + 0.08;
        let mut chart = ChartBuilder::on(&plot)
            .margin(k(20))
            .x_label_area_size(k(80))
            .y_label_area_size(k(120))
            .build_cartesian_2d(0.0..x1, y0..y1)
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc("Aridity index E0/P (grass PET / rainfall, –)")
            .y_desc("Evaporative ratio ET/P (–)")
            .x_label_formatter(&|x| format!("{x:.1}"))
            .y_label_formatter(&|y| format!("{y:.1}"))
            .label_style((FONT, super::TICK_PX))
            .axis_desc_style((FONT, super::AXIS_TITLE_PX))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(err)?;
        // Physical limits: energy (ET = E0) and water (ET = P).
        let limit = ShapeStyle { color: palette::BASELINE.mix(0.7), filled: false, stroke_width: k(2) };
        let corner = x1.min(1.0);
        chart.draw_series(DashedLineSeries::new([(0.0, 0.0), (corner, corner)], 8, 8, limit)).map_err(err)?;
        chart.draw_series(DashedLineSeries::new([(corner, 1.0), (x1, 1.0)], 8, 8, limit)).map_err(err)?;
        draw_series(&mut chart, &self.series, false)?;
        draw_legend(&panel, &self.series, &self.notes)
    }
}
