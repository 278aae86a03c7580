//! Uncertainty ensembles: every member draws the uncertain parameters and (optionally)
//! a climate sequence, is projected like the deterministic run, and the members are
//! reduced to percentile bands (`ensemble.csv`), guideline-exceedance probabilities
//! and a sensitivity ranking of the parameters (`sensitivity.csv`).
//!
//! Reproducibility: every draw depends only on the seed, the parameter (and
//! catchment id, for per-catchment draws) and the member index
//! ([`crate::model::uncertainty`]); catchments are processed in parallel but
//! results are written in table order, so outputs are byte-identical whatever the
//! number of threads.
//!
//! Memory: the `no-control` ensemble is computed catchment by catchment (each
//! worker holds one catchment's members × years); a control strategy couples the
//! catchments through its budget and is computed member by member for the whole
//! basin, holding that strategy's basin members × years.

use crate::error::{Error, Result};
use crate::input::scenario::{ClimateVariability, EnsembleConfig, Scenario};
use crate::model::basin::project_basin;
use crate::model::catchment::{ClimateYear, ModelParams};
use crate::model::climate_gen::{block_bootstrap, lognormal_ar1_multipliers};
use crate::model::closure::ClosureCurve;
use crate::model::control::Strategy;
use crate::model::dilution;
use crate::model::interception::CanopyInterception;
use crate::model::kernel::{project_lean, LeanYears};
use crate::model::params::{ParamId, ParamRef};
use crate::model::summary::window_change_pct;
use crate::model::uncertainty::{stable_hash, stream, uniforms, UncertainParam};
use crate::model::CoverCurves;
use crate::output::tables::{CsvOut, CsvRows};
use crate::plot::tornado::Tornado;
use crate::plot::{save_figure, Formats};
use crate::run::bands::{self, BandLayout, MemberValues, Vars};
use crate::run::basin_totals::{EnsembleBasinSums, Sum};
use crate::run::sensitivity::{for_figure, rank, ranked_params, write_sensitivity_rows, RankedParam, Ranking};
use crate::schema::columns;
use crate::schema::columns::scope;
use crate::schema::numbers::{num, opt_num};
use crate::schema::{file_stem, NO_CONTROL};
use rayon::prelude::*;
use std::path::Path;

/// Percentiles reported in `ensemble.csv`.
pub use crate::run::bands::PERCENTILES;

/// Options of an ensemble run.
#[derive(Debug, Clone, Copy)]
pub struct EnsembleOptions {
    /// Show a progress bar on stderr.
    pub progress: bool,
    /// Draw figures.
    pub figures: bool,
    /// Figure formats.
    pub formats: Formats,
}

/// What the ensemble produced.
#[derive(Debug, Clone)]
pub struct EnsembleOutcome {
    /// Members run.
    pub members: usize,
    /// Uncertain parameters.
    pub parameters: usize,
    /// Figures drawn.
    pub figures: usize,
    /// Basin sums for the basin-level sensitivity (when any parameter is uncertain).
    pub sensitivity: Option<crate::run::basin_totals::SensitivitySums>,
    /// Member sums of the whole basin, one per strategy (`no-control` first).
    pub basin: Vec<EnsembleBasinSums>,
}

/// Parameters, scales and strategies of one member for one catchment.
#[derive(Debug, Clone)]
pub struct MemberSetup {
    /// Model parameters.
    pub params: ModelParams,
    /// Control strategies (costs, efficacy…).
    pub strategies: Vec<Strategy>,
    /// Rainfall multiplier.
    pub rain_scale: f64,
    /// PET multiplier.
    pub pet_scale: f64,
}

/// Sets the parameter `target` to the drawn value `v` in a member's setup.
///
/// Every parameter that may vary is set here, except the curve parameters of a
/// `[[calibration]]` entry, which [`member_catchment`] sets on the calibrated
/// catchment. A curve parameter of the method not in use changes nothing.
pub fn apply_param(s: &Scenario, target: ParamRef, v: f64, m: &mut MemberSetup) {
    let p = &mut m.params;
    let entry = target.entry();
    match target.id() {
        ParamId::WForest | ParamId::WGrass | ParamId::OmegaForest | ParamId::OmegaGrass => {
            if let Some(x) = curve_value(&mut p.curves, target.id()) {
                *x = v;
            }
        }
        ParamId::ForestPetFactor => p.forest_pet_factor = v,
        // Both within the table's ranges, which are the constructor's: `new` cannot fail here.
        ParamId::InterceptionFraction => {
            if let Ok(i) = CanopyInterception::new(v, p.interception.demand_share()) {
                p.interception = i;
            }
        }
        ParamId::InterceptionDemandShare => {
            if let Ok(i) = CanopyInterception::new(p.interception.fraction_of_rain(), v) {
                p.interception = i;
            }
        }
        ParamId::SpreadRate => p.invasion.spread_rate_per_yr = v,
        ParamId::SeedBearingAge => p.invasion.seed_bearing_age_yr = v.round().max(0.0) as u32,
        ParamId::SeedRain => p.invasion.seed_rain_ha_per_yr = v,
        ParamId::HalfClosureAge => {
            if let ClosureCurve::Logistic { half_closure_age_yr, .. } = &mut p.invasion.closure {
                *half_closure_age_yr = v;
            }
        }
        ParamId::ClosureSteepness => {
            if let ClosureCurve::Logistic { steepness_per_yr, .. } = &mut p.invasion.closure {
                *steepness_per_yr = v;
            }
        }
        ParamId::ClosureMaxFraction => {
            if let ClosureCurve::Logistic { max_fraction, .. } = &mut p.invasion.closure {
                *max_fraction = v;
            }
        }
        ParamId::RainScale => m.rain_scale = v,
        ParamId::PetScale => m.pet_scale = v,
        ParamId::OpenExport => {
            if let Some(c) = entry.and_then(|i| p.contaminants.get_mut(i)) {
                c.open_export_kg_per_ha_yr = v;
            }
        }
        ParamId::ForestExport => {
            if let Some(c) = entry.and_then(|i| p.contaminants.get_mut(i)) {
                c.forest_export_kg_per_ha_yr = v;
            }
        }
        ParamId::TreatmentCost => {
            if let Some(t) = entry.and_then(|i| s.treatments.get(i)) {
                let class = t.class as usize;
                for st in &mut m.strategies {
                    if st.method_names[class] == t.name {
                        st.cost_per_ha[class] = v;
                    }
                }
            }
        }
        ParamId::Efficacy => {
            if let Some(st) = entry.and_then(|i| m.strategies.get_mut(i)) {
                st.efficacy = v;
            }
        }
        ParamId::RegrowthFraction => {
            if let Some(st) = entry.and_then(|i| m.strategies.get_mut(i)) {
                st.regrowth_fraction = v;
            }
        }
        ParamId::FollowUpCost => {
            if let Some(st) = entry.and_then(|i| m.strategies.get_mut(i)) {
                st.follow_up_cost_per_ha = v;
            }
        }
        // Set on the calibrated catchment by `member_catchment`.
        ParamId::CalibrationWForest | ParamId::CalibrationWGrass | ParamId::CalibrationOmegaForest | ParamId::CalibrationOmegaGrass => {}
        // Keys that cannot vary: `ParamRef::resolve` gives no target for them.
        ParamId::StartYear
        | ParamId::HorizonYears
        | ParamId::LatitudeDeg
        | ParamId::ElevationM
        | ParamId::WindHeightM
        | ParamId::AreaTolerance
        | ParamId::MediumAge
        | ParamId::DenseAge
        | ParamId::InitialDenseSpan
        | ParamId::ClosureAges
        | ParamId::ClosureFractions
        | ParamId::MinRunoff
        | ParamId::ArealGrowth
        | ParamId::Guideline
        | ParamId::CqExponent
        | ParamId::DiscountRate
        | ParamId::WaterValue
        | ParamId::StrategyStartYear
        | ParamId::StrategyEndYear
        | ParamId::BudgetPerYr
        | ParamId::AreaPerYr
        | ParamId::RegrowthYears
        | ParamId::Delays
        | ParamId::Members
        | ParamId::Seed
        | ParamId::BlockYears
        | ParamId::RainCv
        | ParamId::RainLag1
        | ParamId::PetCv => {}
    }
}

/// The value in `curves` that the curve parameter `id` sets (in `[hydrology]` or
/// a `[[calibration]]` entry); `None` when `curves` uses the other method.
fn curve_value(curves: &mut CoverCurves, id: ParamId) -> Option<&mut f64> {
    match (curves, id) {
        (CoverCurves::Zhang { w_forest, .. }, ParamId::WForest | ParamId::CalibrationWForest) => Some(w_forest),
        (CoverCurves::Zhang { w_grass, .. }, ParamId::WGrass | ParamId::CalibrationWGrass) => Some(w_grass),
        (CoverCurves::Fu { omega_forest, .. }, ParamId::OmegaForest | ParamId::CalibrationOmegaForest) => Some(omega_forest),
        (CoverCurves::Fu { omega_grass, .. }, ParamId::OmegaGrass | ParamId::CalibrationOmegaGrass) => Some(omega_grass),
        _ => None,
    }
}

/// The catchment as member `m` sees it: calibrated curve parameters given as
/// distributions in `[[calibration]]` take that member's draw.
fn member_catchment(s: &Scenario, i: usize, draws: &[Vec<f64>], m: usize) -> Option<crate::model::Catchment> {
    let c = &s.catchments[i];
    let entry = &s.calibration_links.iter().find(|(id, _)| *id == c.id)?.1;
    let mut out: Option<crate::model::Catchment> = None;
    for (u, d) in s.uncertain.iter().zip(draws) {
        if u.target.table_path() != *entry {
            continue;
        }
        let cm = out.get_or_insert_with(|| c.clone());
        if let Some(x) = cm.curves.as_mut().and_then(|curves| curve_value(curves, u.target.id())) {
            *x = d[m];
        }
    }
    out
}

/// Drawn values `[parameter][member]` for one catchment (shared parameters take the
/// basin draw, per-catchment ones this catchment's own).
fn draws_for(s: &Scenario, cfg: &EnsembleConfig, shared: &[Option<Vec<f64>>], catchment_id: &str) -> Vec<Vec<f64>> {
    s.uncertain
        .iter()
        .zip(shared)
        .map(|(u, sh)| match sh {
            Some(v) => v.clone(),
            None => draw_values(&u.param, cfg, Some(catchment_id)),
        })
        .collect()
}

fn draw_values(u: &UncertainParam, cfg: &EnsembleConfig, catchment_id: Option<&str>) -> Vec<f64> {
    uniforms(cfg.sampling, cfg.seed, u.dimension(catchment_id), cfg.members).into_iter().map(|x| u.dist.quantile(x)).collect()
}

/// Member climate sequences, shared by all catchments.
enum MemberClimate {
    Fixed,
    Years(Vec<Vec<i32>>),
    Multipliers(Vec<Vec<f64>>, Vec<Vec<f64>>),
}

fn member_climates(s: &Scenario, cfg: &EnsembleConfig) -> MemberClimate {
    let n = s.horizon_years + 1;
    match cfg.climate {
        ClimateVariability::None => MemberClimate::Fixed,
        ClimateVariability::Bootstrap { block_years } => {
            let cov = s.climate.as_ref().map(|t| t.coverage()).unwrap_or_default();
            let first = cov.iter().map(|c| c.1).min().unwrap_or(s.start_year);
            let last = cov.iter().map(|c| c.2).max().unwrap_or(s.start_year);
            let len = (last - first + 1).max(1) as usize;
            MemberClimate::Years(
                (0..cfg.members)
                    .map(|m| {
                        let mut rng = stream(cfg.seed, stable_hash("climate:bootstrap"), m as u64);
                        block_bootstrap(len, n, block_years, &mut rng).into_iter().map(|i| first + i as i32).collect()
                    })
                    .collect(),
            )
        }
        ClimateVariability::Stochastic { rain_cv, rain_lag1, pet_cv } => {
            let rain = (0..cfg.members)
                .map(|m| lognormal_ar1_multipliers(n, rain_cv, rain_lag1, &mut stream(cfg.seed, stable_hash("climate:rain"), m as u64)))
                .collect();
            let pet = (0..cfg.members)
                .map(|m| lognormal_ar1_multipliers(n, pet_cv, 0.0, &mut stream(cfg.seed, stable_hash("climate:pet"), m as u64)))
                .collect();
            MemberClimate::Multipliers(rain, pet)
        }
    }
}

fn member_series(s: &Scenario, mc: &MemberClimate, i: usize, m: usize, rain_scale: f64, pet_scale: f64) -> Vec<ClimateYear> {
    let c = &s.catchments[i];
    match mc {
        MemberClimate::Fixed => s.climate_series_scaled(i, rain_scale, pet_scale),
        MemberClimate::Years(ys) => {
            let table = s.climate.as_ref();
            ys[m]
                .iter()
                .map(|&y| {
                    let cl = table
                        .map_or(c.mean_climate(), |t| t.year_for(&c.id, y, c.mean_climate(), crate::input::climate::BeyondRecord::Cycle));
                    ClimateYear { rain_mm: cl.rain_mm * rain_scale, pet_mm: cl.pet_mm * pet_scale }
                })
                .collect()
        }
        MemberClimate::Multipliers(r, p) => r[m]
            .iter()
            .zip(&p[m])
            .map(|(a, b)| ClimateYear { rain_mm: c.rain_mm * a * rain_scale, pet_mm: c.pet_mm * b * pet_scale })
            .collect(),
    }
}

fn setup_for(s: &Scenario, draws: &[Vec<f64>], m: usize) -> MemberSetup {
    let mut setup =
        MemberSetup { params: s.params.clone(), strategies: s.strategies.clone(), rain_scale: s.rain_scale, pet_scale: s.pet_scale };
    for (u, d) in s.uncertain.iter().zip(draws) {
        apply_param(s, u.target, d[m], &mut setup);
    }
    setup
}

/// Names of the ensemble variables for a scenario, in column order.
pub fn variable_names(s: &Scenario) -> Vec<String> {
    columns::ensemble::variables(&contaminant_names(s))
}

fn contaminant_names(s: &Scenario) -> Vec<&str> {
    s.params.contaminants.iter().map(|c| c.name.as_str()).collect()
}

fn band_layout(s: &Scenario) -> BandLayout {
    BandLayout::new(s.start_year, &s.params.contaminants.iter().map(|c| (c.name.clone(), c.guideline_mg_per_l)).collect::<Vec<_>>())
}

/// Header of `ensemble.csv`.
pub fn ensemble_header() -> Vec<String> {
    columns::owned(&columns::ensemble::COLUMNS)
}

/// Header of `sensitivity.csv`.
pub fn sensitivity_header() -> Vec<String> {
    columns::owned(&columns::sensitivity::COLUMNS)
}

/// Offsets (years after the start) at which sensitivity is ranked: year 20 (if within the horizon) and the horizon.
fn sensitivity_points(s: &Scenario) -> Vec<(&'static str, usize)> {
    let mut v = Vec::new();
    if s.horizon_years >= 20 {
        v.push((columns::sensitivity::AT_YEAR_20, 20));
    }
    v.push((columns::sensitivity::AT_HORIZON, s.horizon_years));
    v
}

/// Quantities a catchment passes downstream in one member's year, in this order:
/// volume, baseline volume, control cost, long-term mean volume, then the load and
/// the long-term mean load of each contaminant (m³/yr, $, kg/yr).
const FLOW_V: usize = 0;
const FLOW_VB: usize = 1;
const FLOW_COST: usize = 2;
const FLOW_VBAR: usize = 3;

/// Number of flow quantities for `k` contaminants.
fn flow_len(k: usize) -> usize {
    4 + 2 * k
}

/// The flow quantities of one year (see [`FLOW_V`]).
fn flow_values(out: &mut Vec<f64>, volume_m3: f64, baseline_m3: f64, cost: f64, mean_volume_m3: f64, loads: &[f64], mean_loads: &[f64]) {
    out.extend([volume_m3, baseline_m3, cost, mean_volume_m3]);
    out.extend_from_slice(loads);
    out.extend_from_slice(mean_loads);
}

/// Member sums of what arrives at each receiving node, `[member][node][year][quantity]`.
///
/// Sums run over the catchments in table order, so a shard (which holds whole
/// networks, [`crate::run::shard`]) adds the same numbers in the same order as a
/// single run. Memory: members × nodes × years × (4 + 2k) values.
struct NodeSums {
    /// Catchment index of each receiving node.
    nodes: Vec<usize>,
    /// For each catchment, the positions in `nodes` it drains to (itself included).
    targets: Vec<Vec<usize>>,
    /// Area drained by each node, ha.
    area_ha: Vec<f64>,
    years: usize,
    q: usize,
    data: Vec<f64>,
}

impl NodeSums {
    fn new(s: &Scenario, members: usize) -> NodeSums {
        let nodes = s.network.receiving_nodes();
        let n = s.catchments.len();
        let mut position = vec![None; n];
        for (p, &c) in nodes.iter().enumerate() {
            position[c] = Some(p);
        }
        let targets = (0..n)
            .map(|i| {
                let mut v = Vec::new();
                let mut at = Some(i);
                while let Some(x) = at {
                    v.extend(position[x]);
                    at = s.network.downstream(x);
                }
                v
            })
            .collect();
        let drained = s.network.accumulate(&s.catchments.iter().map(|c| c.area_ha).collect::<Vec<_>>());
        let years = s.horizon_years + 1;
        let q = flow_len(s.params.contaminants.len());
        NodeSums {
            area_ha: nodes.iter().map(|&c| drained[c]).collect(),
            data: vec![0.0; members * nodes.len() * years * q],
            nodes,
            targets,
            years,
            q,
        }
    }

    /// Values of one member.
    fn stride(&self) -> usize {
        self.nodes.len() * self.years * self.q
    }

    fn drains(&self, i: usize) -> bool {
        !self.targets[i].is_empty()
    }

    /// Adds catchment `i`'s flow quantities of year `t` into one member's buffer.
    fn add_into(&self, buf: &mut [f64], i: usize, t: usize, vals: &[f64]) {
        for &p in &self.targets[i] {
            let off = (p * self.years + t) * self.q;
            for (a, b) in buf[off..off + self.q].iter_mut().zip(vals) {
                *a += b;
            }
        }
    }

    /// Adds catchment `i`'s flows of every member (`flows[(m·years + t)·q + j]`).
    fn add_catchment(&mut self, i: usize, flows: &[f64], members: usize) {
        let (stride, q, years) = (self.stride(), self.q, self.years);
        let mut data = std::mem::take(&mut self.data);
        for m in 0..members {
            for t in 0..years {
                let off = (m * years + t) * q;
                self.add_into(&mut data[m * stride..(m + 1) * stride], i, t, &flows[off..off + q]);
            }
        }
        self.data = data;
    }

    /// Writes the `arriving` rows of every node for one strategy, then clears the sums.
    fn write_and_clear<W: std::io::Write>(&mut self, out: &mut CsvOut<W>, s: &Scenario, layout: &BandLayout, strategy: &str) -> Result<()> {
        let vars = layout.vars;
        let members = if self.stride() == 0 { 0 } else { self.data.len() / self.stride() };
        let k = vars.k;
        for (p, &c) in self.nodes.iter().enumerate() {
            let a = self.area_ha[p];
            let mut mv = MemberValues::zeros(vars.len(), self.years, members);
            for m in 0..members {
                let at = |t: usize, j: usize| self.data[m * self.stride() + (p * self.years + t) * self.q + j];
                let flow: Vec<f64> = (0..self.years).map(|t| at(t, FLOW_V)).collect();
                let base: Vec<f64> = (0..self.years).map(|t| at(t, FLOW_VB)).collect();
                mv.set_yield(m, &flow, &base, |v| v / (10.0 * a));
                for t in 0..self.years {
                    for j in 0..k {
                        mv.vars[vars.concentration(j)][t][m] = dilution::screened_concentration_mg_per_l(
                            at(t, 4 + j),
                            at(t, FLOW_V),
                            a,
                            s.params.min_runoff_mm,
                            at(t, 4 + k + j),
                            at(t, FLOW_VBAR),
                            &s.params.concentration_ceiling,
                        )
                        .unwrap_or(f64::NAN);
                    }
                    mv.vars[vars.cost()][t][m] = at(t, FLOW_COST);
                }
            }
            bands::write_rows(out, layout, &s.catchments[c].id, scope::ARRIVING, strategy, &mv, &vars.all())?;
        }
        self.data.iter_mut().for_each(|x| *x = 0.0);
        Ok(())
    }
}

struct CatchmentResult {
    ensemble: CsvRows,
    sensitivity: CsvRows,
    members: CsvRows,
    /// Per member: (yield volume, baseline volume) at each sensitivity point, m³.
    basin_volumes: Vec<Vec<(f64, f64)>>,
    /// Draws `[param][member]` (for basin-level sensitivity).
    draws: Vec<Vec<f64>>,
    ranking: Option<Ranking>,
    /// No-control yield volume per member per year, m³ (kept only when strategies exist).
    reference_m3: Vec<Vec<f64>>,
    /// Flow quantities `[(member·years + year)·q + j]` (see [`FLOW_V`]).
    flows: Vec<f64>,
}

/// Runs the ensemble and writes `ensemble.csv`, `sensitivity.csv` (when any parameter
/// is uncertain), `members.csv` (when asked) and band and tornado figures into `dir`.
///
/// `ensemble.csv` holds, per strategy, the `local` rows of every catchment and then the
/// `arriving` rows of every receiving node; the `basin` rows are added from the exact
/// sums returned in [`EnsembleOutcome::basin`] when the run is finished
/// ([`crate::run::basin_totals::Partials::append_ensemble`]), so shards merge byte for byte.
// Over 100 lines on purpose: the ensemble's two phases (no-control per catchment in parallel, then each strategy over the basin) share their draws and writers; split, they would pass a dozen locals around.
pub fn run_ensemble(
    s: &Scenario,
    cfg: &EnsembleConfig,
    dir: &Path,
    opts: &EnsembleOptions,
    meta: &crate::run::basin_totals::BasinMeta,
) -> Result<EnsembleOutcome> {
    let m_count = cfg.members;
    let layout = band_layout(s);
    let vars = layout.vars;
    let k = s.params.contaminants.len();
    let n_years = s.horizon_years + 1;
    let q = flow_len(k);
    let labels: Vec<RankedParam> = ranked_params(s);
    let shared: Vec<Option<Vec<f64>>> =
        s.uncertain.iter().map(|u| (!u.param.per_catchment).then(|| draw_values(&u.param, cfg, None))).collect();
    let climates = member_climates(s, cfg);
    let points = sensitivity_points(s);
    let keep_reference = !s.strategies.is_empty();
    let bar = progress_bar(opts.progress, (s.catchments.len() + s.strategies.len() * m_count) as u64);

    let mut ens = CsvOut::create(&dir.join("ensemble.csv"), &ensemble_header())?;
    let mut sens = if labels.is_empty() { None } else { Some(CsvOut::create(&dir.join("sensitivity.csv"), &sensitivity_header())?) };
    let mut members_out = if cfg.write_members { Some(members_file(dir, s)?) } else { None };
    let mut n_figures = 0;
    let figdir = dir.join("figures");
    let mut node_sums = NodeSums::new(s, m_count);
    let mut econ_out = if s.strategies.is_empty() {
        None
    } else {
        Some(CsvOut::create(&dir.join(columns::economics::FILE), &columns::owned(&columns::economics::COLUMNS))?)
    };
    let mut basin_members = vec![EnsembleBasinSums::new(NO_CONTROL, m_count, n_years)];

    // no-control, catchment by catchment, in parallel chunks written in order.
    let mut basin = crate::run::basin_totals::SensitivitySums::new(
        labels.clone(),
        points.iter().map(|(at, off)| (at.to_string(), s.start_year + *off as i32)).collect(),
        m_count,
    );
    let mut reference: Vec<Vec<Vec<f64>>> = Vec::new();
    let chunk = 64;
    for start in (0..s.catchments.len()).step_by(chunk) {
        let end = (start + chunk).min(s.catchments.len());
        let results: Vec<CatchmentResult> = (start..end)
            .into_par_iter()
            .map(|i| {
                let r = no_control_catchment(s, cfg, i, &shared, &climates, &layout, &labels, &points, keep_reference);
                bar.inc(1);
                r
            })
            .collect::<Result<_>>()?;
        for (off, r) in results.into_iter().enumerate() {
            let i = start + off;
            ens.write_rows(&r.ensemble)?;
            if let Some(sn) = sens.as_mut() {
                sn.write_rows(&r.sensitivity)?;
            }
            if let Some(mo) = members_out.as_mut() {
                mo.write_rows(&r.members)?;
            }
            let a = s.catchments[i].area_ha;
            basin.area_ha.add(a);
            basin_members[0].add_area(a);
            for m in 0..m_count {
                for (pt, v) in r.basin_volumes[m].iter().enumerate() {
                    basin.volumes[m][pt].0.add(v.0);
                    basin.volumes[m][pt].1.add(v.1);
                }
                for (j, d) in r.draws.iter().enumerate() {
                    basin.weighted_draws[j][m].add(d[m] * a);
                }
                for t in 0..n_years {
                    let f = &r.flows[(m * n_years + t) * q..];
                    basin_members[0].add(m, t, f[FLOW_V], f[FLOW_VB], f[FLOW_COST]);
                }
            }
            if node_sums.drains(i) {
                node_sums.add_catchment(i, &r.flows, m_count);
            }
            if opts.figures {
                if let Some(rk) = &r.ranking {
                    n_figures += tornado(
                        &figdir,
                        meta.start_year + meta.horizon_years as i32,
                        &s.catchments[i].name,
                        &file_stem(&s.catchments[i].id),
                        rk,
                        opts.formats,
                    )?;
                }
            }
            if keep_reference {
                reference.push(r.reference_m3);
            }
        }
    }
    node_sums.write_and_clear(&mut ens, s, &layout, NO_CONTROL)?;
    // Control strategies: member by member over the whole basin.
    for (si, st) in s.strategies.iter().enumerate() {
        let per_member: Vec<MemberRun> = (0..m_count)
            .into_par_iter()
            .map(|m| {
                let draws: Vec<Vec<Vec<f64>>> = s.catchments.iter().map(|c| draws_for_member(s, cfg, &shared, &c.id, m)).collect();
                let setups: Vec<MemberSetup> = draws.iter().map(|d| setup_for_single(s, d)).collect();
                let params: Vec<ModelParams> = setups.iter().map(|x| x.params.clone()).collect();
                let climates_m: Vec<Vec<ClimateYear>> =
                    (0..s.catchments.len()).map(|i| member_series(s, &climates, i, m, setups[i].rain_scale, setups[i].pet_scale)).collect();
                // The programme's costs come from the basin-shared draws (first catchment's setup).
                let strategy = &setups.first().map(|x| x.strategies[si].clone()).unwrap_or_else(|| st.clone());
                let catchments_m: Vec<crate::model::Catchment> = (0..s.catchments.len())
                    .map(|i| member_catchment(s, i, &draws[i], 0).unwrap_or_else(|| s.catchments[i].clone()))
                    .collect();
                let run = project_basin(&catchments_m, &climates_m, &params, s.start_year, Some(strategy));
                bar.inc(1);
                let mut node_buf = vec![0.0; node_sums.stride()];
                let mut basin_m = vec![[Sum::default(); 3]; n_years];
                let mut flow = Vec::with_capacity(q);
                // values[catchment][var][year]
                let vals: Vec<Vec<Vec<f64>>> = run
                    .years
                    .iter()
                    .zip(&run.control)
                    .enumerate()
                    .map(|(i, (ys, cs))| {
                        let mut v = vec![vec![f64::NAN; n_years]; vars.len()];
                        let q_mm: Vec<f64> = ys.iter().map(|y| y.yield_mm).collect();
                        let base_mm: Vec<f64> = ys.iter().map(|y| y.baseline_yield_mm).collect();
                        for (t, (y, c)) in ys.iter().zip(cs).enumerate() {
                            v[Vars::YIELD][t] = y.yield_mm;
                            v[Vars::CHANGE][t] = y.yield_change_pct().unwrap_or(f64::NAN);
                            v[Vars::MEAN_CHANGE][t] = window_change_pct(&q_mm, &base_mm, t).unwrap_or(f64::NAN);
                            for j in 0..k {
                                v[vars.concentration(j)][t] = y.concentrations[j].unwrap_or(f64::NAN);
                            }
                            v[vars.cost()][t] = c.cost();
                            let a = catchments_m[i].area_ha;
                            let base_m3 = dilution::volume_m3(y.baseline_yield_mm, a);
                            basin_m[t][0].add(y.yield_m3);
                            basin_m[t][1].add(base_m3);
                            basin_m[t][2].add(c.cost());
                            if node_sums.drains(i) {
                                flow.clear();
                                flow_values(
                                    &mut flow,
                                    y.yield_m3,
                                    base_m3,
                                    c.cost(),
                                    y.mean_volume_m3,
                                    &y.loads_kg_per_yr,
                                    &y.mean_loads_kg_per_yr,
                                );
                                node_sums.add_into(&mut node_buf, i, t, &flow);
                            }
                        }
                        v
                    })
                    .collect();
                let volumes: Vec<Vec<f64>> = run.years.iter().map(|ys| ys.iter().map(|y| y.yield_m3).collect()).collect();
                (vals, volumes, node_buf, basin_m)
            })
            .collect();
        let mut basin_st = EnsembleBasinSums::new(&st.name, m_count, n_years);
        for c in &s.catchments {
            basin_st.add_area(c.area_ha);
        }
        for (m, run) in per_member.iter().enumerate() {
            basin_st.add_member(m, &run.3);
            let stride = node_sums.stride();
            node_sums.data[m * stride..(m + 1) * stride].copy_from_slice(&run.2);
        }
        basin_members.push(basin_st);
        if let Some(eco) = econ_out.as_mut() {
            programme_economics(eco, s, &st.name, &per_member, &reference, &node_sums, vars)?;
        }
        for (i, c) in s.catchments.iter().enumerate() {
            let mut mv = MemberValues::zeros(vars.len(), n_years, m_count);
            for (m, (vals, ..)) in per_member.iter().enumerate() {
                for (vi, series) in vals[i].iter().enumerate() {
                    for (t, x) in series.iter().enumerate() {
                        mv.vars[vi][t][m] = *x;
                    }
                }
            }
            bands::write_rows(&mut ens, &layout, &c.id, scope::LOCAL, &st.name, &mv, &vars.all())?;
            if let Some(mo) = members_out.as_mut() {
                for m in 0..m_count {
                    for (t, year) in s.years().enumerate() {
                        let saved = per_member[m].1[i][t] - reference[i][m][t];
                        member_row(mo, &c.id, &st.name, m, year, &mv, t, m, Some(saved))?;
                    }
                }
            }
        }
        node_sums.write_and_clear(&mut ens, s, &layout, &st.name)?;
    }
    ens.finish()?;
    if let Some(eco) = econ_out {
        eco.finish()?;
    }
    if let Some(sn) = sens {
        sn.finish()?;
    }
    if let Some(mo) = members_out {
        mo.finish()?;
    }
    bar.finish_and_clear();
    let sensitivity = (!labels.is_empty()).then_some(basin);
    Ok(EnsembleOutcome { members: m_count, parameters: labels.len(), figures: n_figures, sensitivity, basin: basin_members })
}

/// Per member of one strategy: values `[catchment][variable][year]`, yield volumes
/// `[catchment][year]` (m³), node sums and basin sums.
type MemberRun = (Vec<Vec<Vec<f64>>>, Vec<Vec<f64>>, Vec<f64>, Vec<[Sum; 3]>);

/// Writes the `economics.csv` rows of one strategy: every catchment's own programme
/// totals per member (`local`), then what the programme buys at each receiving node
/// (`arriving`: cost and water saved summed over the catchments upstream). Water
/// saved is the member's strategy run minus the same member's no-control run.
fn programme_economics<W: std::io::Write>(
    out: &mut CsvOut<W>,
    s: &Scenario,
    strategy: &str,
    per_member: &[MemberRun],
    reference: &[Vec<Vec<f64>>],
    nodes: &NodeSums,
    vars: Vars,
) -> Result<()> {
    use crate::model::economics::ProgrammeTotals;
    let (rate, value) = (s.economics.discount_rate, s.economics.water_value_per_m3);
    let n_years = s.horizon_years + 1;
    let m_count = per_member.len();
    // [member][node][year]: cost and water saved arriving.
    let mut node_cost = vec![vec![vec![0.0; n_years]; nodes.nodes.len()]; m_count];
    let mut node_saved = node_cost.clone();
    for (i, c) in s.catchments.iter().enumerate() {
        let mut members = Vec::with_capacity(m_count);
        for (m, run) in per_member.iter().enumerate() {
            let cost = &run.0[i][vars.cost()];
            let saved: Vec<f64> = (0..n_years).map(|t| run.1[i][t] - reference[i][m][t]).collect();
            for &p in &nodes.targets[i] {
                for t in 0..n_years {
                    node_cost[m][p][t] += cost[t];
                    node_saved[m][p][t] += saved[t];
                }
            }
            members.push(bands::economics_values(&ProgrammeTotals::from_years(rate, cost, &saved), value));
        }
        bands::write_economics_rows(out, &c.id, scope::LOCAL, strategy, &members)?;
    }
    for (p, &c) in nodes.nodes.iter().enumerate() {
        let members: Vec<_> = (0..m_count)
            .map(|m| bands::economics_values(&ProgrammeTotals::from_years(rate, &node_cost[m][p], &node_saved[m][p]), value))
            .collect();
        bands::write_economics_rows(out, &s.catchments[c].id, scope::ARRIVING, strategy, &members)?;
    }
    Ok(())
}

fn draws_for_member(s: &Scenario, cfg: &EnsembleConfig, shared: &[Option<Vec<f64>>], id: &str, m: usize) -> Vec<Vec<f64>> {
    s.uncertain
        .iter()
        .zip(shared)
        .map(|(u, sh)| match sh {
            Some(v) => vec![v[m]],
            None => {
                let all = draw_values(&u.param, cfg, Some(id));
                vec![all[m]]
            }
        })
        .collect()
}

fn setup_for_single(s: &Scenario, draws: &[Vec<f64>]) -> MemberSetup {
    setup_for(s, draws, 0)
}

#[allow(clippy::too_many_arguments)]
fn no_control_catchment(
    s: &Scenario,
    cfg: &EnsembleConfig,
    i: usize,
    shared: &[Option<Vec<f64>>],
    climates: &MemberClimate,
    layout: &BandLayout,
    labels: &[RankedParam],
    points: &[(&'static str, usize)],
    keep_reference: bool,
) -> Result<CatchmentResult> {
    let c = &s.catchments[i];
    let m_count = cfg.members;
    let n_years = s.horizon_years + 1;
    let k = s.params.contaminants.len();
    let vars = layout.vars;
    let draws = draws_for(s, cfg, shared, &c.id);
    let mut mv = MemberValues::zeros(vars.len(), n_years, m_count);
    let mut lean = LeanYears::default();
    let mut basin_volumes = Vec::with_capacity(m_count);
    let mut reference_m3 = Vec::new();
    let mut flows = Vec::with_capacity(m_count * n_years * flow_len(k));
    let mut members = CsvOut::in_memory(if cfg.write_members { members_header(s).len() } else { 0 });
    let mut setup = setup_for(s, &draws, 0);
    for m in 0..m_count {
        // Every uncertain parameter is re-applied, so one setup serves all members.
        for (u, d) in s.uncertain.iter().zip(&draws) {
            apply_param(s, u.target, d[m], &mut setup);
        }
        let climate = member_series(s, climates, i, m, setup.rain_scale, setup.pet_scale);
        let calibrated = member_catchment(s, i, &draws, m);
        project_lean(calibrated.as_ref().unwrap_or(c), &climate, &setup.params, &mut lean);
        mv.set_yield(m, &lean.yield_mm, &lean.baseline_yield_mm, |q| q);
        let mean_volume_m3 = dilution::volume_m3(lean.mean_yield_mm, c.area_ha);
        for t in 0..n_years {
            for j in 0..k {
                mv.vars[vars.concentration(j)][t][m] = lean.concentrations_mg_per_l[t * k + j].unwrap_or(f64::NAN);
            }
            mv.vars[vars.cost()][t][m] = 0.0;
            flow_values(
                &mut flows,
                dilution::volume_m3(lean.yield_mm[t], c.area_ha),
                dilution::volume_m3(lean.baseline_yield_mm[t], c.area_ha),
                0.0,
                mean_volume_m3,
                &lean.loads_kg_per_yr[t * k..(t + 1) * k],
                &lean.mean_loads_kg_per_yr[t * k..(t + 1) * k],
            );
        }
        basin_volumes.push(
            points
                .iter()
                .map(|&(_, off)| (lean.yield_mm[off] * c.area_ha * 10.0, lean.baseline_yield_mm[off] * c.area_ha * 10.0))
                .collect(),
        );
        if keep_reference {
            reference_m3.push(lean.yield_mm.iter().map(|q| q * c.area_ha * 10.0).collect());
        }
        if cfg.write_members {
            for (t, year) in s.years().enumerate() {
                member_row(&mut members, &c.id, NO_CONTROL, m, year, &mv, t, m, Some(0.0))?;
            }
        }
    }
    let mut ensemble = CsvOut::in_memory(ensemble_header().len());
    bands::write_rows(&mut ensemble, layout, &c.id, scope::LOCAL, NO_CONTROL, &mv, &vars.all())?;
    let mut sensitivity = CsvOut::in_memory(sensitivity_header().len());
    let mut ranking = None;
    if !labels.is_empty() {
        for (at, off) in points {
            let r = rank(labels, &draws, &mv.vars[1][*off], Some(&c.id));
            write_sensitivity_rows(&mut sensitivity, &c.id, NO_CONTROL, at, s.start_year + *off as i32, &r)?;
            if *at == columns::sensitivity::AT_HORIZON {
                ranking = Some(for_figure(&r));
            }
        }
    }
    Ok(CatchmentResult {
        ensemble: ensemble.into_rows()?,
        sensitivity: sensitivity.into_rows()?,
        members: members.into_rows()?,
        basin_volumes,
        draws: if labels.is_empty() { Vec::new() } else { draws },
        ranking,
        reference_m3,
        flows,
    })
}

/// Header of `members.csv`.
fn members_header(s: &Scenario) -> Vec<String> {
    columns::members::columns(&contaminant_names(s))
}

fn members_file(dir: &Path, s: &Scenario) -> Result<CsvOut> {
    CsvOut::create(&dir.join("members.csv"), &members_header(s))
}

#[allow(clippy::too_many_arguments)]
fn member_row<W: std::io::Write>(
    out: &mut CsvOut<W>,
    id: &str,
    strategy: &str,
    m: usize,
    year: i32,
    mv: &MemberValues,
    t: usize,
    col: usize,
    saved: Option<f64>,
) -> Result<()> {
    let mut f = vec![id.to_string(), strategy.to_string(), m.to_string(), year.to_string()];
    for (vi, var) in mv.vars.iter().enumerate() {
        let x = var[t][col];
        f.push(if x.is_finite() { num(x, if vi == mv.vars.len() - 1 { 2 } else { 5 }) } else { String::new() });
    }
    f.push(opt_num(saved, 1));
    out.row(&f)
}

/// Draws a tornado figure of a ranking; returns 1 when drawn.
pub fn tornado(dir: &Path, horizon_year: i32, name: &str, stem: &str, r: &Ranking, formats: Formats) -> Result<usize> {
    let bars: Vec<(String, f64)> = r.iter().filter_map(|(l, rho, _)| rho.map(|v| (l.clone(), v))).collect();
    if bars.is_empty() {
        return Ok(0);
    }
    let t = Tornado {
        title: format!("{name} — what drives yield change by {horizon_year}"),
        x_label: "Spearman ρ with yield change at the horizon (right: higher parameter, less loss)".into(),
        bars,
    };
    save_figure(&t, &dir.join(format!("{stem}_sensitivity")), formats)?;
    Ok(1)
}

fn progress_bar(show: bool, len: u64) -> indicatif::ProgressBar {
    use std::io::IsTerminal;
    if show && std::io::stderr().is_terminal() {
        let pb = indicatif::ProgressBar::new(len);
        pb.set_style(
            indicatif::ProgressStyle::with_template("ensemble {bar:40} {pos}/{len} ({eta} left)")
                .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        pb
    } else {
        indicatif::ProgressBar::hidden()
    }
}

/// Error for a thread pool that cannot be built.
pub fn pool(threads: Option<usize>) -> Result<rayon::ThreadPool> {
    let mut b = rayon::ThreadPoolBuilder::new();
    if let Some(n) = threads {
        b = b.num_threads(n);
    }
    b.build().map_err(|e| Error::Other(format!("cannot start worker threads: {e}")))
}
