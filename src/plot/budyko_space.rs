//! Catchments in Budyko space: each catchment's trajectory of evaporative ratio
//! `ET/P` against aridity index `E0/P` over the projection, drawn over the
//! forest and grass curves of the method the run used, with the energy limit
//! (`ET = E0`) and the water limit (`ET = P`). Hollow markers show where each
//! catchment starts, filled markers where it ends.
//!
//! # Formula
//! Grass curve: `ET/P = F_grass(φ)`; forest curve: `ET/P = F_forest(k·φ)`, where
//! `φ = E0/P` uses the grass/tussock PET and `k` is the run's forest PET factor
//! (forest evaporative demand `E0_forest = k·E0`). `F` is Zhang et al. (2001) or
//! Fu (1981) with the run's parameters ([`crate::model::budyko`]).

use super::axes::{self, Axes};
use super::legend::Corner;
use super::legend::{self, draw_marker, Entry, Occupied, PxRect, Shape, Swatch};
use super::series::split_for_legend;
use super::{err, palette, Figure, LINE_PX, REF_LINE_PX};
use crate::model::budyko::{CoverCurves, Fu1981, WaterBalance, Zhang2001};
use plotters::coord::Shift;
use plotters::prelude::*;

/// One catchment's path through Budyko space.
#[derive(Debug, Clone, PartialEq)]
pub struct Trajectory {
    /// Legend label (catchment name).
    pub label: String,
    /// `(E0/P, ET/P)` points in time order.
    pub points: Vec<(f64, f64)>,
}

/// The Budyko-space diagram.
#[derive(Debug, Clone)]
pub struct BudykoSpace {
    /// Title at the top.
    pub title: String,
    /// The curve family and parameters of the run.
    pub curves: CoverCurves,
    /// Forest PET factor `k` (forest E0 = k × grass E0).
    pub forest_pet_factor: f64,
    /// Trajectories, one per catchment.
    pub trajectories: Vec<Trajectory>,
    /// Legend text for the start markers (e.g. "Start: mean of 2027–2036").
    pub start_label: String,
    /// Legend text for the end markers.
    pub end_label: String,
}

/// Colour of trajectory `i`, shared with its legend entry.
fn colour(i: usize) -> RGBColor {
    palette::series(i)
}

impl BudykoSpace {
    /// Evaporative ratio of grass at aridity `phi`.
    pub fn grass(&self, phi: f64) -> f64 {
        match self.curves {
            CoverCurves::Zhang { w_grass, .. } => Zhang2001 { w: w_grass }.evaporative_ratio(phi),
            CoverCurves::Fu { omega_grass, .. } => Fu1981 { omega: omega_grass }.evaporative_ratio(phi),
        }
    }

    /// Evaporative ratio of forest at grass aridity `phi` (forest demand `k·phi`).
    pub fn forest(&self, phi: f64) -> f64 {
        let p = self.forest_pet_factor * phi;
        match self.curves {
            CoverCurves::Zhang { w_forest, .. } => Zhang2001 { w: w_forest }.evaporative_ratio(p),
            CoverCurves::Fu { omega_forest, .. } => Fu1981 { omega: omega_forest }.evaporative_ratio(p),
        }
    }

    fn curve_labels(&self) -> (String, String) {
        let k = if (self.forest_pet_factor - 1.0).abs() > 1e-12 {
            format!(", forest E0 = {} × E0", super::number_label(self.forest_pet_factor, 2))
        } else {
            String::new()
        };
        match self.curves {
            CoverCurves::Zhang { w_forest, w_grass } => (
                format!("Forest: Zhang et al. (2001), w = {}{k}", trim(w_forest)),
                format!("Grass/tussock: Zhang et al. (2001), w = {}", trim(w_grass)),
            ),
            CoverCurves::Fu { omega_forest, omega_grass } => (
                format!("Forest: Fu (1981), ω = {}{k}", trim(omega_forest)),
                format!("Grass/tussock: Fu (1981), ω = {}", trim(omega_grass)),
            ),
        }
    }

    fn ranges(&self) -> (std::ops::Range<f64>, std::ops::Range<f64>) {
        let pts = self.trajectories.iter().flat_map(|t| t.points.iter().copied());
        let (xs, ys): (Vec<f64>, Vec<f64>) = pts.filter(|p| p.0.is_finite() && p.1.is_finite()).unzip();
        let (xlo, xhi) = axes::extent(xs.into_iter()).unwrap_or((0.3, 1.5));
        let span = (xhi - xlo).max(0.25);
        let x0 = (xlo - 0.2 * span).max(0.0);
        let x1 = xhi + 0.2 * span;
        let curve_ys = [self.grass(x0), self.grass(x1), self.forest(x0), self.forest(x1)];
        let (ylo, yhi) = axes::extent(ys.into_iter().chain(curve_ys)).unwrap_or((0.0, 1.0));
        let yspan = (yhi - ylo).max(0.1);
        ((x0..x1), ((ylo - 0.08 * yspan).max(0.0)..(yhi + 0.1 * yspan).min(1.05)))
    }
}

fn trim(v: f64) -> String {
    let s = format!("{v:.3}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    s.to_string()
}

const SAMPLES: usize = 240;

impl Figure for BudykoSpace {
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let body = axes::titled(root, &self.title)?;
        let (xr, yr) = self.ranges();
        let ax = Axes::new(xr.clone(), yr.clone(), "Aridity index E0/P (grass/tussock PET ÷ rainfall, –)", "Evaporative ratio ET/P (–)");
        let xs: Vec<f64> = (0..=SAMPLES).map(|i| xr.start + (xr.end - xr.start) * i as f64 / SAMPLES as f64).collect();
        let forest: Vec<(f64, f64)> = xs.iter().map(|&x| (x, self.forest(x))).collect();
        let grass: Vec<(f64, f64)> = xs.iter().map(|&x| (x, self.grass(x))).collect();
        // Limits: ET = E0 (y = x) up to y = 1, then ET = P (y = 1), clipped to the plot.
        let clip = |pts: Vec<(f64, f64)>| -> Vec<(f64, f64)> { pts.into_iter().filter(|p| p.1 >= yr.start && p.1 <= yr.end).collect() };
        let energy = clip(xs.iter().map(|&x| (x, x)).filter(|p| p.1 <= 1.0).collect());
        let water = clip(xs.iter().filter(|&&x| x >= 1.0).map(|&x| (x, 1.0)).collect());
        let (forest_label, grass_label) = self.curve_labels();
        let mut entries = vec![
            Entry { label: forest_label, swatch: Swatch::Line { colour: palette::DENSE, dashed: false, width: LINE_PX + 2 } },
            Entry { label: grass_label, swatch: Swatch::Line { colour: palette::DENSE, dashed: true, width: LINE_PX } },
            Entry {
                label: "Limits: ET = E0 (energy), ET = P (water)".into(),
                swatch: Swatch::Line { colour: palette::BASELINE, dashed: true, width: REF_LINE_PX },
            },
        ];
        for (i, t) in self.trajectories.iter().enumerate() {
            entries.push(Entry { label: t.label.clone(), swatch: Swatch::LineMarker { colour: colour(i), shape: Shape::nth(i) } });
        }
        entries.push(Entry {
            label: self.start_label.clone(),
            swatch: Swatch::Marker { colour: palette::BASELINE, shape: Shape::Circle, filled: false },
        });
        entries.push(Entry {
            label: self.end_label.clone(),
            swatch: Swatch::Marker { colour: palette::BASELINE, shape: Shape::Circle, filled: true },
        });

        let (placement, area, strip) = {
            let probe = axes::build(&body, &ax)?;
            let mut data = Occupied::default();
            for line in [&forest, &grass, &energy, &water] {
                data.line(line.iter().map(|p| probe.backend_coord(p)));
            }
            for t in &self.trajectories {
                data.line(t.points.iter().map(|p| probe.backend_coord(p)));
                for p in [t.points.first(), t.points.last()].into_iter().flatten() {
                    data.point(probe.backend_coord(p), 22);
                }
            }
            split_for_legend(&body, &entries, PxRect::of(probe.plotting_area()), Corner::LowerRight, &data)
        };
        let mut chart = axes::build(&area, &ax)?;
        axes::draw_mesh(&mut chart, &ax)?;
        let limit = ShapeStyle { color: palette::BASELINE.to_rgba(), filled: false, stroke_width: REF_LINE_PX };
        for l in [&energy, &water] {
            if l.len() >= 2 {
                chart.draw_series(DashedLineSeries::new(l.clone(), 14, 12, limit)).map_err(err)?;
            }
        }
        chart.draw_series(LineSeries::new(forest, palette::DENSE.stroke_width(LINE_PX + 2))).map_err(err)?;
        let g = ShapeStyle { color: palette::DENSE.to_rgba(), filled: false, stroke_width: LINE_PX };
        chart.draw_series(DashedLineSeries::new(grass, 26, 14, g)).map_err(err)?;
        // Segments one by one with round joints: a thick polyline that turns back on
        // itself (the climate record moves points sideways) would draw miter spikes.
        for (i, t) in self.trajectories.iter().enumerate() {
            for w in t.points.windows(2) {
                chart.draw_series(LineSeries::new([w[0], w[1]], colour(i).stroke_width(LINE_PX))).map_err(err)?;
            }
            for p in t.points.iter().skip(1).take(t.points.len().saturating_sub(2)) {
                chart.draw_series(std::iter::once(Circle::new(*p, 9, colour(i).filled()))).map_err(err)?;
            }
        }
        for (i, t) in self.trajectories.iter().enumerate() {
            if let (Some(a), Some(b)) = (t.points.first(), t.points.last()) {
                draw_marker(&area, chart.backend_coord(a), 20, Shape::nth(i), colour(i), false)?;
                draw_marker(&area, chart.backend_coord(b), 20, Shape::nth(i), colour(i), true)?;
            }
        }
        legend::draw(&area, strip.as_ref(), &entries, placement)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn forest_curve_lies_above_grass_and_within_limits() {
        let b = BudykoSpace {
            title: String::new(),
            curves: CoverCurves::ZHANG_DEFAULT,
            forest_pet_factor: 1.15,
            trajectories: vec![],
            start_label: String::new(),
            end_label: String::new(),
        };
        for phi in [0.2, 0.5, 1.0, 2.0] {
            assert!(b.forest(phi) > b.grass(phi));
            assert!(b.grass(phi) <= phi.min(1.0));
            assert!(b.forest(phi) <= (1.15 * phi).min(1.0) + 1e-12);
        }
        // Zhang et al. (2001): at E0/P = 1 the grass ratio is (1 + w)/(2 + w) = 0.6 for w = 0.5.
        approx::assert_abs_diff_eq!(b.grass(1.0), 0.6, epsilon = 1e-12);
    }
}
