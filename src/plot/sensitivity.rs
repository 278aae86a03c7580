//! Which uncertain parameters drive a result: one bar per parameter with its
//! Spearman rank correlation to the output across ensemble members, ordered by
//! rank, and its standardised regression coefficient as a marker. One panel per
//! time of evaluation (e.g. year 20 and the horizon).

use super::bars::{Bar, BarPanels, HBarChart};
use super::legend::{Entry, Shape, Swatch};
use super::palette;

/// One parameter's influence on an output.
#[derive(Debug, Clone, PartialEq)]
pub struct Influence {
    /// Parameter name (scenario key path).
    pub parameter: String,
    /// Spearman rank correlation with the output, −1 to 1.
    pub spearman_rho: f64,
    /// Standardised regression coefficient, if computed.
    pub src: Option<f64>,
    /// Rank of importance (1 = most influential).
    pub rank: u32,
}

/// One panel: the influences at one time of evaluation.
#[derive(Debug, Clone, PartialEq)]
pub struct InfluencePanel {
    /// Panel title (e.g. "Yield change at year 20 (2047)").
    pub title: String,
    /// Influences, any order (drawn by rank).
    pub influences: Vec<Influence>,
}

/// Largest number of parameters drawn per panel (the highest ranked).
pub const MAX_PARAMETERS: usize = 15;

/// The figure: panels side by side, bars from −1 to 1, coloured by sign. For
/// long parameter names prefer one [`influence_chart`] per time of evaluation.
pub fn influence_panels(panels: &[InfluencePanel]) -> BarPanels {
    super::series::Panels(panels.iter().map(influence_chart).collect())
}

/// One panel as a figure of its own: bars from −1 to 1, coloured by sign, the
/// highest-ranked parameter at the top.
pub fn influence_chart(p: &InfluencePanel) -> HBarChart {
    let mut inf: Vec<&Influence> = p.influences.iter().collect();
    inf.sort_by(|a, b| a.rank.cmp(&b.rank).then_with(|| b.spearman_rho.abs().total_cmp(&a.spearman_rho.abs())));
    inf.truncate(MAX_PARAMETERS);
    let bars = inf
        .iter()
        .map(|i| Bar {
            label: i.parameter.clone(),
            value: i.spearman_rho,
            range: None,
            marker: i.src,
            colour: if i.spearman_rho >= 0.0 { palette::POSITIVE } else { palette::NEGATIVE },
        })
        .collect();
    let mut legend = vec![
        Entry { label: "Raises the output (ρ > 0)".into(), swatch: Swatch::Fill { colour: palette::POSITIVE, opacity: 1.0 } },
        Entry { label: "Lowers the output (ρ < 0)".into(), swatch: Swatch::Fill { colour: palette::NEGATIVE, opacity: 1.0 } },
    ];
    if inf.iter().any(|i| i.src.is_some()) {
        legend.push(Entry {
            label: "Standardised regression coefficient".into(),
            swatch: Swatch::Marker { colour: palette::RANGE, shape: Shape::Diamond, filled: false },
        });
    }
    HBarChart {
        title: p.title.clone(),
        x_label: "Spearman rank correlation ρ (–)".into(),
        bars,
        value_decimals: 2,
        x_range: Some((-1.25, 1.25)),
        legend,
    }
}
