//! Summaries of a projection: change at fixed horizons, first guideline exceedance,
//! and downstream sums at receiving nodes.
//!
//! # Formula
//! For one catchment's projection, years `t = 0..n−1`:
//! * Yield change at offset `t ∈ {10, 20, 50}` ([`REPORT_OFFSETS_YR`]) and at the
//!   last year: `100·(Q_t − Q_base,t) / Q_base,t` %, and against the uninvaded
//!   catchment `100·(Q_t − Q_u,t) / Q_u,t` % ([`super::projection::percent_change`]).
//! * Water lost in the last year: `W = 10·(Q_base − Q)·A`, m³/yr (positive = less water).
//! * First exceedance of contaminant `j`: the first year with a stated concentration
//!   `C_j,t > G_j`.
//!
//! At a receiving node `m` with upstream set `U(m)` (itself included,
//! [`super::network::Network::accumulate`]):
//! * `A_m = Σ_{i∈U(m)} A_i` (ha), `V_m = Σ V_i` and `V_base,m = Σ 10·Q_base,i·A_i`
//!   (m³/yr), `L_m = Σ L_i` (kg/yr);
//! * flow-weighted concentration `C_m = 1000·L_m / V_m` mg/L, not stated when the
//!   depth `V_m / (10·A_m)` is below the minimum runoff, nor above the ceiling, whose
//!   mean is `1000·Σ L̄_i / Σ V̄_i` (the long-term mean loads and volumes of the
//!   upstream catchments; [`super::dilution::screened_concentration_mg_per_l`]).
//!
//! # Symbols
//! * `Q_t`, `Q_base,t`, `Q_u,t` — yield, baseline yield (starting cover held) and
//!   uninvaded yield, mm/yr, ≥ 0.
//! * `A` — catchment area, ha, > 0; `V` — runoff volume, m³/yr, ≥ 0; `L` — load, kg/yr, ≥ 0.
//! * `C` — concentration, mg/L, ≥ 0; `G` — guideline, mg/L (optional).
//!
//! # Assumptions
//! * A change against a zero reference is not stated (`None`), not infinite.
//! * Years whose concentration could not be stated (low runoff) never count as an
//!   exceedance; they are counted separately.
//! * Node sums are annual and conservative: no in-stream loss, abstraction or travel
//!   time (as in [`super::network`]); flows are fully mixed at the node.
//!
//! # References
//! Common practice, no published source: these summaries are sums and ratios of
//! the projection's own results; the dilution relation is referenced in
//! [`super::dilution`].

use super::catchment::{Catchment, Contaminant};
use super::dilution::{self, ConcentrationCeiling, ScreenedFlag};
use super::network::Network;
use super::projection::{percent_change, YearResult};

/// Years after the start at which yield change is reported.
pub const REPORT_OFFSETS_YR: [usize; 3] = [10, 20, 50];

/// Headline numbers of one catchment's projection.
#[derive(Debug, Clone, PartialEq)]
pub struct CatchmentSummary {
    /// Yield change vs baseline at each of [`REPORT_OFFSETS_YR`], % (`None` past the horizon).
    pub change_at_offsets_pct: Vec<Option<f64>>,
    /// Yield change vs baseline in the last year, %.
    pub change_at_horizon_pct: Option<f64>,
    /// Yield change vs the uninvaded catchment in the last year, %.
    pub change_vs_uninvaded_at_horizon_pct: Option<f64>,
    /// Water lost against the baseline in the last year, m³/yr (positive = less water).
    pub water_lost_at_horizon_m3: f64,
    /// Canopy fraction in the first and last year.
    pub canopy_fraction_start: f64,
    /// Canopy fraction in the last year.
    pub canopy_fraction_end: f64,
    /// First year each contaminant's guideline is exceeded (scenario order).
    pub first_exceedance_year: Vec<Option<i32>>,
    /// Years in which a concentration could not be stated (low runoff), per contaminant.
    pub low_runoff_years: Vec<usize>,
}

/// Summarises one catchment's projection.
pub fn summarise(c: &Catchment, years: &[YearResult], contaminants: &[Contaminant]) -> CatchmentSummary {
    let change_at = |off: usize| years.get(off).and_then(YearResult::yield_change_pct);
    let last = years.last();
    CatchmentSummary {
        change_at_offsets_pct: REPORT_OFFSETS_YR.iter().map(|&o| change_at(o)).collect(),
        change_at_horizon_pct: last.and_then(YearResult::yield_change_pct),
        change_vs_uninvaded_at_horizon_pct: last.and_then(YearResult::change_vs_uninvaded_pct),
        water_lost_at_horizon_m3: last.map(|y| dilution::volume_m3(y.baseline_yield_mm - y.yield_mm, c.area_ha)).unwrap_or(0.0),
        canopy_fraction_start: years.first().map(|y| y.canopy_fraction).unwrap_or(0.0),
        canopy_fraction_end: last.map(|y| y.canopy_fraction).unwrap_or(0.0),
        first_exceedance_year: contaminants
            .iter()
            .enumerate()
            .map(|(k, m)| first_exceedance(years.iter().map(|y| (y.year, y.concentrations[k])), m.guideline_mg_per_l))
            .collect(),
        low_runoff_years: (0..contaminants.len()).map(|k| years.iter().filter(|y| y.concentrations[k].is_err()).count()).collect(),
    }
}

/// First year whose concentration is above the guideline.
pub fn first_exceedance(series: impl Iterator<Item = (i32, Result<f64, ScreenedFlag>)>, guideline_mg_per_l: Option<f64>) -> Option<i32> {
    let g = guideline_mg_per_l?;
    series.filter_map(|(y, c)| c.ok().map(|c| (y, c))).find(|&(_, c)| c > g).map(|(y, _)| y)
}

/// Downstream totals at a receiving node in one year.
#[derive(Debug, Clone, PartialEq)]
pub struct NodeYear {
    /// Calendar year.
    pub year: i32,
    /// Area draining to the node (itself included), ha.
    pub area_ha: f64,
    /// Water yield volume reaching the node, m³/yr.
    pub yield_m3: f64,
    /// Baseline volume reaching the node, m³/yr.
    pub baseline_yield_m3: f64,
    /// Load of each contaminant reaching the node, kg/yr.
    pub loads_kg_per_yr: Vec<f64>,
    /// Flow-weighted concentration at the node, mg/L.
    pub concentrations: Vec<Result<f64, ScreenedFlag>>,
}

impl NodeYear {
    /// Volume change vs baseline at the node, %.
    pub fn yield_change_pct(&self) -> Option<f64> {
        percent_change(self.yield_m3, self.baseline_yield_m3)
    }
}

/// Sums volumes and loads downstream for every receiving node and year.
///
/// `projections[i]` is catchment `i`'s projection; all have the same years.
/// Returns `(node index, years)` for each node that receives flow from another.
pub fn node_totals(
    network: &Network,
    catchments: &[Catchment],
    projections: &[Vec<YearResult>],
    n_contaminants: usize,
    min_runoff_mm: f64,
    ceiling: &ConcentrationCeiling,
) -> Vec<(usize, Vec<NodeYear>)> {
    let nodes = network.receiving_nodes();
    if nodes.is_empty() || projections.is_empty() {
        return Vec::new();
    }
    let n_years = projections[0].len();
    let area = network.accumulate(&catchments.iter().map(|c| c.area_ha).collect::<Vec<_>>());
    let mut out: Vec<(usize, Vec<NodeYear>)> = nodes.iter().map(|&n| (n, Vec::with_capacity(n_years))).collect();
    for t in 0..n_years {
        let vol = network.accumulate(&projections.iter().map(|p| p[t].yield_m3).collect::<Vec<_>>());
        let base = network.accumulate(
            &projections.iter().zip(catchments).map(|(p, c)| dilution::volume_m3(p[t].baseline_yield_mm, c.area_ha)).collect::<Vec<_>>(),
        );
        let loads: Vec<Vec<f64>> = (0..n_contaminants)
            .map(|k| network.accumulate(&projections.iter().map(|p| p[t].loads_kg_per_yr[k]).collect::<Vec<_>>()))
            .collect();
        let mean_vol = network.accumulate(&projections.iter().map(|p| p[t].mean_volume_m3).collect::<Vec<_>>());
        let mean_loads: Vec<Vec<f64>> = (0..n_contaminants)
            .map(|k| {
                network
                    .accumulate(&projections.iter().map(|p| p[t].mean_loads_kg_per_yr.get(k).copied().unwrap_or(0.0)).collect::<Vec<_>>())
            })
            .collect();
        for (n, rows) in out.iter_mut() {
            let node_loads: Vec<f64> = loads.iter().map(|l| l[*n]).collect();
            let concentrations = (0..n_contaminants)
                .map(|k| {
                    dilution::screened_concentration_mg_per_l(
                        node_loads[k],
                        vol[*n],
                        area[*n],
                        min_runoff_mm,
                        mean_loads[k][*n],
                        mean_vol[*n],
                        ceiling,
                    )
                })
                .collect();
            rows.push(NodeYear {
                year: projections[0][t].year,
                area_ha: area[*n],
                yield_m3: vol[*n],
                baseline_yield_m3: base[*n],
                loads_kg_per_yr: node_loads,
                concentrations,
            });
        }
    }
    out
}
