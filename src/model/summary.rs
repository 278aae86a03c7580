//! Summaries of a projection: change at fixed horizons, first guideline exceedance,
//! and downstream sums at receiving nodes.
//!
//! # Formula
//! For one catchment's projection, years `t = 0..n−1`:
//! * Headline changes are **means over a window** of `W = 10` years
//!   ([`HEADLINE_WINDOW_YR`]) ending at the year reported (`t−W+1..=t`, fewer years when
//!   `t < W−1`), so that one wet or dry year does not set them:
//!   `ΔQ̄_t = 100·(Σ Q − Σ Q_base) / Σ Q_base` % over the window ([`window_change_pct`]),
//!   the change of the window means. Reported at `t ∈ {10, 20, 50}`
//!   ([`REPORT_OFFSETS_YR`]) and at the last year; against the uninvaded catchment the
//!   same with `Q_u`. The ensemble computes each member's value with the same function.
//! * Water lost at the horizon: `W̄ = 10·(Q̄_base − Q̄)·A`, m³/yr, the mean over the same
//!   window (positive = less water).
//! * Guideline status of contaminant `j` ([`exceedance`]): *above at the start* when
//!   `C_j,0 > G_j`; otherwise *first exceeded* in the first year with `C_j,t > G_j`.
//!   Separately, *exceeded because of the invasion* in every year with `C_j,t > G_j`
//!   while the uninvaded catchment (no invader at all, same climate) has `C_u,j,t ≤ G_j`.
//!
//! At a receiving node `m` with upstream set `U(m)` (itself included,
//! [`super::network::Network::accumulate`]):
//! * `A_m = Σ_{i∈U(m)} A_i` (ha), `V_m = Σ V_i`, `V_base,m = Σ 10·Q_base,i·A_i` and
//!   `V_u,m = Σ 10·Q_u,i·A_i` (m³/yr), `L_m = Σ L_i`, `L_u,m = Σ L_u,i` (kg/yr);
//! * flow-weighted concentration `C_m = 1000·L_m / V_m` mg/L (and `C_u,m` from the
//!   uninvaded sums), not stated when the depth `V_m / (10·A_m)` is below the minimum
//!   runoff, nor above the ceiling, whose mean is `1000·Σ L̄_i / Σ V̄_i` (the long-term
//!   mean loads and volumes of the upstream catchments;
//!   [`super::dilution::screened_concentration_mg_per_l`]);
//! * the node's headline numbers are those of a catchment computed from these sums
//!   ([`summarise_node`]): what arrives at the node, not the node catchment's own runoff.
//!
//! # Symbols
//! * `Q_t`, `Q_base,t`, `Q_u,t` — yield, baseline yield (starting cover held) and
//!   uninvaded yield, mm/yr, ≥ 0.
//! * `A` — catchment area, ha, > 0; `V` — runoff volume, m³/yr, ≥ 0; `L` — load, kg/yr, ≥ 0.
//! * `C` — concentration, mg/L, ≥ 0; `G` — guideline, mg/L (optional).
//! * `W` — window, years.
//!
//! # Assumptions
//! * A change against a zero reference is not stated (`None`), not infinite.
//! * Years whose concentration could not be stated (low runoff, above the ceiling)
//!   never count as an exceedance; they are counted separately. A year whose uninvaded
//!   concentration is not stated is not counted as exceeded because of the invasion.
//! * Node sums are annual and conservative: no in-stream loss, abstraction or travel
//!   time (as in [`super::network`]); flows are fully mixed at the node.
//! * A 10-year window is long enough to average out most year-to-year rainfall and
//!   short enough to follow the decade-scale closure of the canopy. *Common practice,
//!   no published source*: decadal means for reporting land-use effects on yield.
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

/// Length of the window over which headline changes are averaged, years.
pub const HEADLINE_WINDOW_YR: usize = 10;

/// Change of the window mean of `values` against that of `reference`, %:
/// `100·(Σ values − Σ reference)/Σ reference` over the [`HEADLINE_WINDOW_YR`] years
/// ending at index `end` (from index 0 when `end` is earlier). `None` when `end` is
/// past the series or the reference sum is not positive.
pub fn window_change_pct(values: &[f64], reference: &[f64], end: usize) -> Option<f64> {
    if end >= values.len() || end >= reference.len() {
        return None;
    }
    let from = (end + 1).saturating_sub(HEADLINE_WINDOW_YR);
    let v: f64 = values[from..=end].iter().sum();
    let r: f64 = reference[from..=end].iter().sum();
    percent_change(v, r)
}

/// Mean of `values` over the [`HEADLINE_WINDOW_YR`] years ending at index `end`.
pub fn window_mean(values: &[f64], end: usize) -> Option<f64> {
    if end >= values.len() {
        return None;
    }
    let from = (end + 1).saturating_sub(HEADLINE_WINDOW_YR);
    Some(values[from..=end].iter().sum::<f64>() / (end + 1 - from) as f64)
}

/// Where a contaminant stands against its guideline over a projection.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GuidelineStatus {
    /// No guideline given.
    NoGuideline,
    /// Above the guideline in the first year already.
    AboveAtStart,
    /// Not above in the first year; first above in this year.
    Exceeded(i32),
    /// Never above the guideline.
    NotExceeded,
}

impl GuidelineStatus {
    /// The word written in `summary.csv` (empty without a guideline).
    pub fn word(self) -> &'static str {
        match self {
            GuidelineStatus::NoGuideline => "",
            GuidelineStatus::AboveAtStart => "above-at-start",
            GuidelineStatus::Exceeded(_) => "exceeded",
            GuidelineStatus::NotExceeded => "not-exceeded",
        }
    }
}

/// A contaminant's guideline exceedance, with the part due to the invasion.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Exceedance {
    /// Above at the start, first exceeded later, or never.
    pub status: GuidelineStatus,
    /// First year above the guideline while the uninvaded catchment is at or below it.
    pub invasion_first_year: Option<i32>,
    /// Years above the guideline while the uninvaded catchment is at or below it.
    pub invasion_years: usize,
}

impl Exceedance {
    /// First year above the guideline, when it was not above at the start.
    pub fn first_exceeded_year(&self) -> Option<i32> {
        match self.status {
            GuidelineStatus::Exceeded(y) => Some(y),
            _ => None,
        }
    }
}

/// Classifies a series of `(year, concentration, uninvaded concentration)` against a guideline.
pub fn exceedance(
    series: impl Iterator<Item = (i32, Result<f64, ScreenedFlag>, Result<f64, ScreenedFlag>)>,
    guideline_mg_per_l: Option<f64>,
) -> Exceedance {
    let Some(g) = guideline_mg_per_l else {
        return Exceedance { status: GuidelineStatus::NoGuideline, invasion_first_year: None, invasion_years: 0 };
    };
    let mut status = GuidelineStatus::NotExceeded;
    let (mut invasion_first_year, mut invasion_years) = (None, 0);
    for (t, (year, c, cu)) in series.enumerate() {
        let above = matches!(c, Ok(v) if v > g);
        if t == 0 && above {
            status = GuidelineStatus::AboveAtStart;
        } else if above && status == GuidelineStatus::NotExceeded {
            status = GuidelineStatus::Exceeded(year);
        }
        if above && matches!(cu, Ok(u) if u <= g) {
            invasion_years += 1;
            invasion_first_year.get_or_insert(year);
        }
    }
    Exceedance { status, invasion_first_year, invasion_years }
}

/// Headline numbers of one catchment's projection (or of what arrives at a node).
#[derive(Debug, Clone, PartialEq)]
pub struct CatchmentSummary {
    /// Window-mean yield change vs baseline ending at each of [`REPORT_OFFSETS_YR`], % (`None` past the horizon).
    pub change_at_offsets_pct: Vec<Option<f64>>,
    /// Window-mean yield change vs baseline ending in the last year, %.
    pub change_at_horizon_pct: Option<f64>,
    /// Window-mean yield change vs the uninvaded catchment ending in the last year, %.
    pub change_vs_uninvaded_at_horizon_pct: Option<f64>,
    /// Water lost against the baseline, mean over the window ending in the last year, m³/yr (positive = less water).
    pub water_lost_at_horizon_m3: f64,
    /// Canopy fraction in the first year.
    pub canopy_fraction_start: f64,
    /// Canopy fraction in the last year.
    pub canopy_fraction_end: f64,
    /// Guideline exceedance of each contaminant (scenario order).
    pub exceedance: Vec<Exceedance>,
    /// Years in which a concentration was not stated for too little runoff, per contaminant.
    pub low_runoff_years: Vec<usize>,
    /// Years in which a concentration was not stated for being above the ceiling, per contaminant.
    pub above_ceiling_years: Vec<usize>,
}

/// The series a summary is computed from (depths for a catchment, volumes at a node).
struct Series<'a> {
    years: Vec<i32>,
    flow: Vec<f64>,
    baseline: Vec<f64>,
    uninvaded: Vec<f64>,
    /// Converts a window mean of `baseline − flow` to m³/yr.
    to_m3: &'a dyn Fn(f64) -> f64,
    canopy_start: f64,
    canopy_end: f64,
    concentrations: Vec<&'a [Result<f64, ScreenedFlag>]>,
    uninvaded_concentrations: Vec<&'a [Result<f64, ScreenedFlag>]>,
}

fn summarise_series(s: &Series, contaminants: &[Contaminant]) -> CatchmentSummary {
    let n = s.flow.len();
    let last = n.checked_sub(1);
    let change = |end: usize| window_change_pct(&s.flow, &s.baseline, end);
    let lost: Vec<f64> = s.baseline.iter().zip(&s.flow).map(|(b, q)| b - q).collect();
    let count = |k: usize, flag: ScreenedFlag| s.concentrations.iter().filter(|c| c[k] == Err(flag)).count();
    CatchmentSummary {
        change_at_offsets_pct: REPORT_OFFSETS_YR.iter().map(|&o| change(o)).collect(),
        change_at_horizon_pct: last.and_then(change),
        change_vs_uninvaded_at_horizon_pct: last.and_then(|e| window_change_pct(&s.flow, &s.uninvaded, e)),
        water_lost_at_horizon_m3: last.and_then(|e| window_mean(&lost, e)).map_or(0.0, s.to_m3),
        canopy_fraction_start: s.canopy_start,
        canopy_fraction_end: s.canopy_end,
        exceedance: contaminants
            .iter()
            .enumerate()
            .map(|(k, m)| {
                exceedance((0..n).map(|t| (s.years[t], s.concentrations[t][k], s.uninvaded_concentrations[t][k])), m.guideline_mg_per_l)
            })
            .collect(),
        low_runoff_years: (0..contaminants.len()).map(|k| count(k, ScreenedFlag::LowRunoff)).collect(),
        above_ceiling_years: (0..contaminants.len()).map(|k| count(k, ScreenedFlag::AboveCeiling)).collect(),
    }
}

/// Summarises one catchment's projection.
pub fn summarise(c: &Catchment, years: &[YearResult], contaminants: &[Contaminant]) -> CatchmentSummary {
    let to_m3 = |mm: f64| dilution::volume_m3(mm, c.area_ha);
    summarise_series(
        &Series {
            years: years.iter().map(|y| y.year).collect(),
            flow: years.iter().map(|y| y.yield_mm).collect(),
            baseline: years.iter().map(|y| y.baseline_yield_mm).collect(),
            uninvaded: years.iter().map(|y| y.uninvaded_yield_mm).collect(),
            to_m3: &to_m3,
            canopy_start: years.first().map_or(0.0, |y| y.canopy_fraction),
            canopy_end: years.last().map_or(0.0, |y| y.canopy_fraction),
            concentrations: years.iter().map(|y| y.concentrations.as_slice()).collect(),
            uninvaded_concentrations: years.iter().map(|y| y.uninvaded_concentrations.as_slice()).collect(),
        },
        contaminants,
    )
}

/// Summarises what arrives at a receiving node (volumes and flow-weighted
/// concentrations from [`node_totals`]), computed as for a catchment.
pub fn summarise_node(rows: &[NodeYear], contaminants: &[Contaminant]) -> CatchmentSummary {
    let to_m3 = |m3: f64| m3;
    summarise_series(
        &Series {
            years: rows.iter().map(|y| y.year).collect(),
            flow: rows.iter().map(|y| y.yield_m3).collect(),
            baseline: rows.iter().map(|y| y.baseline_yield_m3).collect(),
            uninvaded: rows.iter().map(|y| y.uninvaded_yield_m3).collect(),
            to_m3: &to_m3,
            canopy_start: rows.first().map_or(0.0, |y| y.canopy_fraction),
            canopy_end: rows.last().map_or(0.0, |y| y.canopy_fraction),
            concentrations: rows.iter().map(|y| y.concentrations.as_slice()).collect(),
            uninvaded_concentrations: rows.iter().map(|y| y.uninvaded_concentrations.as_slice()).collect(),
        },
        contaminants,
    )
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
    /// Volume reaching the node with no invader upstream, m³/yr.
    pub uninvaded_yield_m3: f64,
    /// Area-weighted canopy fraction of the upstream catchments, 0–1.
    pub canopy_fraction: f64,
    /// Load of each contaminant reaching the node, kg/yr.
    pub loads_kg_per_yr: Vec<f64>,
    /// Flow-weighted concentration at the node, mg/L.
    pub concentrations: Vec<Result<f64, ScreenedFlag>>,
    /// Flow-weighted concentration with no invader upstream, mg/L.
    pub uninvaded_concentrations: Vec<Result<f64, ScreenedFlag>>,
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
        let volume_of = |f: &dyn Fn(&YearResult) -> f64| {
            network
                .accumulate(&projections.iter().zip(catchments).map(|(p, c)| dilution::volume_m3(f(&p[t]), c.area_ha)).collect::<Vec<_>>())
        };
        let base = volume_of(&|y| y.baseline_yield_mm);
        let uninvaded = volume_of(&|y| y.uninvaded_yield_mm);
        let canopy_ha =
            network.accumulate(&projections.iter().zip(catchments).map(|(p, c)| p[t].canopy_fraction * c.area_ha).collect::<Vec<_>>());
        let loads: Vec<Vec<f64>> = (0..n_contaminants)
            .map(|k| network.accumulate(&projections.iter().map(|p| p[t].loads_kg_per_yr[k]).collect::<Vec<_>>()))
            .collect();
        let uninvaded_loads: Vec<Vec<f64>> = (0..n_contaminants)
            .map(|k| {
                network.accumulate(
                    &projections.iter().map(|p| p[t].uninvaded_loads_kg_per_yr.get(k).copied().unwrap_or(0.0)).collect::<Vec<_>>(),
                )
            })
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
            let screen = |load: f64, volume: f64, k: usize| {
                dilution::screened_concentration_mg_per_l(load, volume, area[*n], min_runoff_mm, mean_loads[k][*n], mean_vol[*n], ceiling)
            };
            let concentrations = (0..n_contaminants).map(|k| screen(node_loads[k], vol[*n], k)).collect();
            let uninvaded_concentrations = (0..n_contaminants).map(|k| screen(uninvaded_loads[k][*n], uninvaded[*n], k)).collect();
            rows.push(NodeYear {
                year: projections[0][t].year,
                area_ha: area[*n],
                yield_m3: vol[*n],
                baseline_yield_m3: base[*n],
                uninvaded_yield_m3: uninvaded[*n],
                canopy_fraction: if area[*n] > 0.0 { canopy_ha[*n] / area[*n] } else { 0.0 },
                loads_kg_per_yr: node_loads,
                concentrations,
                uninvaded_concentrations,
            });
        }
    }
    out
}
