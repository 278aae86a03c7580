//! Tornado-style sensitivity bars: one horizontal bar per parameter, longest first.
//!
//! Drawn through [`HBarChart`], so text sizes and colours are those of every
//! other figure: bars raising the result in [`palette::POSITIVE`], lowering it in
//! [`palette::NEGATIVE`], each labelled with its value.

use super::bars::{Bar, HBarChart};
use super::legend::{Entry, Swatch};
use super::{palette, Figure};
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

impl Tornado {
    /// The chart as a horizontal bar chart from −1 to 1.
    pub fn bar_chart(&self) -> HBarChart {
        HBarChart {
            title: self.title.clone(),
            x_label: self.x_label.clone(),
            bars: self
                .bars
                .iter()
                .map(|(label, v)| Bar {
                    label: label.clone(),
                    value: *v,
                    range: None,
                    marker: None,
                    colour: if *v >= 0.0 { palette::POSITIVE } else { palette::NEGATIVE },
                })
                .collect(),
            value_decimals: 2,
            x_range: Some((-1.25, 1.25)),
            legend: vec![
                Entry { label: "ρ > 0".into(), swatch: Swatch::Fill { colour: palette::POSITIVE, opacity: 1.0 } },
                Entry { label: "ρ < 0".into(), swatch: Swatch::Fill { colour: palette::NEGATIVE, opacity: 1.0 } },
            ],
        }
    }
}

impl Figure for Tornado {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        self.bar_chart().draw(root)
    }
}
