//! Tornado-style sensitivity bars: one horizontal bar per parameter, longest first.

use super::{err, palette, Figure, FONT};
use plotters::coord::Shift;
use plotters::prelude::*;

/// Sensitivity bars.
#[derive(Debug, Clone)]
pub struct Tornado {
    /// Title.
    pub title: String,
    /// X-axis description (the measure, e.g. Spearman ρ).
    pub x_label: String,
    /// `(parameter, value in −1..1)`, drawn top to bottom in the given order.
    pub bars: Vec<(String, f64)>,
}

impl Figure for Tornado {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let n = self.bars.len().max(1);
        let longest = self.bars.iter().map(|b| b.0.chars().count()).max().unwrap_or(10) as u32;
        let labels: Vec<String> = self.bars.iter().map(|b| b.0.clone()).collect();
        let mut chart = ChartBuilder::on(root)
            .caption(&self.title, (FONT, 36))
            .margin(30)
            .x_label_area_size(80)
            .y_label_area_size((longest * 14 + 40).min(700))
            .build_cartesian_2d(-1.0f64..1.0f64, (0..n as i32 - 1).into_segmented())
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc(&self.x_label)
            .y_labels(n)
            .y_label_formatter(&|y| match y {
                SegmentValue::CenterOf(i) | SegmentValue::Exact(i) => {
                    let k = n as i32 - 1 - *i;
                    labels.get(k as usize).cloned().unwrap_or_default()
                }
                SegmentValue::Last => String::new(),
            })
            .disable_y_mesh()
            .label_style((FONT, 24))
            .axis_desc_style((FONT, 28))
            .light_line_style(RGBColor(235, 235, 235))
            .draw()
            .map_err(err)?;
        for (k, (_, v)) in self.bars.iter().enumerate() {
            let row = n as i32 - 1 - k as i32;
            let colour = if *v >= 0.0 { palette::UNINVADED } else { palette::MEDIUM };
            let mut bar = Rectangle::new([(0.0, SegmentValue::Exact(row)), (*v, SegmentValue::Exact(row + 1))], colour.filled());
            bar.set_margin(12, 12, 0, 0);
            chart.draw_series(std::iter::once(bar)).map_err(err)?;
        }
        Ok(())
    }
}
