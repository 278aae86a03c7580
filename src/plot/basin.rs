//! The basin at a glance: one panel comparing every catchment — the yield change
//! at a fixed time after the start, sorted from the largest loss, with the basin
//! (all catchments pooled) as its own bar and, when an ensemble gave them, the
//! 5–95 % ranges as whiskers.

use super::bars::{Bar, HBarChart};
use super::legend::{Entry, Swatch};
use super::palette;

/// One catchment's (or the basin's) change.
#[derive(Debug, Clone, PartialEq)]
pub struct CatchmentChange {
    /// Name shown beside the bar.
    pub name: String,
    /// Yield change against the baseline, %.
    pub change_pct: f64,
    /// Range of the change across ensemble members, % (e.g. 5th to 95th percentile).
    pub range_pct: Option<(f64, f64)>,
    /// True for the pooled basin row.
    pub is_basin: bool,
}

/// Largest number of catchments drawn; beyond it the largest losses are kept.
pub const MAX_BARS: usize = 30;

/// The comparison chart: catchments sorted from the largest loss (most negative
/// change) to the smallest, the basin bar last. Returns the chart and how many
/// catchments were left out (more than [`MAX_BARS`]).
pub fn catchment_comparison(title: String, x_label: String, range_label: Option<String>, rows: &[CatchmentChange]) -> (HBarChart, usize) {
    let mut cs: Vec<&CatchmentChange> = rows.iter().filter(|r| !r.is_basin && r.change_pct.is_finite()).collect();
    cs.sort_by(|a, b| a.change_pct.total_cmp(&b.change_pct).then_with(|| a.name.cmp(&b.name)));
    let left_out = cs.len().saturating_sub(MAX_BARS);
    cs.truncate(MAX_BARS);
    let mut bars: Vec<Bar> = cs
        .iter()
        .map(|r| Bar { label: r.name.clone(), value: r.change_pct, range: r.range_pct, marker: None, colour: palette::YIELD })
        .collect();
    bars.extend(rows.iter().filter(|r| r.is_basin && r.change_pct.is_finite()).map(|r| Bar {
        label: r.name.clone(),
        value: r.change_pct,
        range: r.range_pct,
        marker: None,
        colour: palette::BASIN,
    }));
    let mut legend = vec![Entry { label: "Catchment".into(), swatch: Swatch::Fill { colour: palette::YIELD, opacity: 1.0 } }];
    if rows.iter().any(|r| r.is_basin) {
        legend.push(Entry { label: "Basin (all catchments pooled)".into(), swatch: Swatch::Fill { colour: palette::BASIN, opacity: 1.0 } });
    }
    if let Some(l) = range_label {
        if rows.iter().any(|r| r.range_pct.is_some()) {
            legend.push(Entry { label: l, swatch: Swatch::Line { colour: palette::RANGE, dashed: false, width: 5 } });
        }
    }
    (HBarChart { title, x_label, bars, value_decimals: 1, x_range: None, legend }, left_out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sorted_from_largest_loss_with_basin_last() {
        let row = |n: &str, v: f64, b: bool| CatchmentChange { name: n.into(), change_pct: v, range_pct: None, is_basin: b };
        let rows = [row("a", -2.0, false), row("basin", -5.0, true), row("b", -9.0, false), row("c", 1.0, false)];
        let (chart, left_out) = catchment_comparison("t".into(), "x".into(), None, &rows);
        let names: Vec<&str> = chart.bars.iter().map(|b| b.label.as_str()).collect();
        assert_eq!(names, ["b", "a", "c", "basin"]);
        assert_eq!(left_out, 0);
    }
}
