//! The main job, end to end: a validated [`Scenario`] in, the output folder out
//! (`yearly.csv`, `summary.csv`, `nodes.csv`, `budget.csv`, `delay.csv`,
//! `run_info.json`, `figures/`).
//!
//! The `no-control` reference is projected catchment by catchment and streamed
//! to disk; each control programme is projected for the whole basin at once
//! ([`crate::model::basin`]) because a shared budget couples the catchments.
//! Results are staged in a temporary folder and moved into place only when
//! everything succeeded ([`crate::io::outdir`]).

use crate::error::{Error, Result};
use crate::io::outdir::Staging;
use crate::io::output::{self, ControlCells, CsvOut};
use crate::io::scenario::Scenario;
use crate::model::basin::project_basin;
use crate::model::control::{ControlYear, Strategy};
use crate::model::cover::ClassAreas;
use crate::model::dilution;
use crate::model::economics::ProgrammeTotals;
use crate::model::summary::{node_totals, summarise, CatchmentSummary};
use crate::model::{project_catchment, Catchment, YearResult};
use crate::plot::series::{Corner, CoverChart, Line, LineChart, Panels};
use crate::plot::{palette, save_figure, Formats};
use std::path::{Path, PathBuf};

/// Name of the reference strategy (no control).
pub const NO_CONTROL: &str = "no-control";

/// Id used for basin-wide rows in `summary.csv`.
pub const BASIN_ID: &str = "basin";

/// When to draw per-catchment figures.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FigureChoice {
    /// For every catchment when there are at most [`AUTO_FIGURE_LIMIT`] catchments.
    Auto,
    /// For every catchment.
    All,
    /// No figures.
    None,
}

/// Largest basin for which `FigureChoice::Auto` draws per-catchment figures.
pub const AUTO_FIGURE_LIMIT: usize = 60;

/// Options of a run.
#[derive(Debug, Clone)]
pub struct RunOptions {
    /// Output folder.
    pub out: PathBuf,
    /// Replace a non-empty folder that is not a yieldshift output.
    pub force: bool,
    /// Figures to draw.
    pub figures: FigureChoice,
    /// Figure formats.
    pub formats: Formats,
    /// Worker threads for ensembles (`None`: one per core).
    pub threads: Option<usize>,
    /// Show a progress bar on stderr (when it is a terminal).
    pub progress: bool,
}

/// What a run produced.
#[derive(Debug, Clone)]
pub struct RunOutcome {
    /// The output folder.
    pub out: PathBuf,
    /// Catchments projected.
    pub catchments: usize,
    /// Years per catchment.
    pub years: usize,
    /// Strategies projected, `no-control` first.
    pub strategies: Vec<String>,
    /// Figures drawn.
    pub figures: usize,
    /// Ensemble members run (0 without an ensemble).
    pub members: usize,
}

/// Basin-wide sums of one strategy, year by year.
struct BasinSeries {
    years: Vec<YearResult>,
    cost: Vec<f64>,
    water_saved_m3: Vec<f64>,
    vulnerable_ha: f64,
}

impl BasinSeries {
    fn new(s: &Scenario) -> BasinSeries {
        let k = s.params.contaminants.len();
        let years = s
            .years()
            .map(|y| YearResult {
                year: y,
                rain_mm: 0.0,
                pet_mm: 0.0,
                et_mm: 0.0,
                yield_mm: 0.0,
                yield_m3: 0.0,
                baseline_yield_mm: 0.0,
                uninvaded_yield_mm: 0.0,
                canopy_fraction: 0.0,
                classes: ClassAreas::default(),
                new_infestation_ha: 0.0,
                loads_kg_per_yr: vec![0.0; k],
                concentrations: vec![Ok(0.0); k],
            })
            .collect();
        let n = s.horizon_years + 1;
        BasinSeries { years, cost: vec![0.0; n], water_saved_m3: vec![0.0; n], vulnerable_ha: 0.0 }
    }

    /// Adds one catchment (area-weighted depths; summed volumes, loads and areas).
    fn add(&mut self, c: &Catchment, ys: &[YearResult], cells: &[ControlCells]) {
        self.vulnerable_ha += c.vulnerable_ha;
        for (t, (b, y)) in self.years.iter_mut().zip(ys).enumerate() {
            let a = c.area_ha;
            b.rain_mm += y.rain_mm * a;
            b.pet_mm += y.pet_mm * a;
            b.et_mm += y.et_mm * a;
            b.yield_mm += y.yield_mm * a;
            b.yield_m3 += y.yield_m3;
            b.baseline_yield_mm += y.baseline_yield_mm * a;
            b.uninvaded_yield_mm += y.uninvaded_yield_mm * a;
            b.canopy_fraction += y.canopy_fraction * a;
            b.classes.scattered_ha += y.classes.scattered_ha;
            b.classes.medium_ha += y.classes.medium_ha;
            b.classes.dense_ha += y.classes.dense_ha;
            b.new_infestation_ha += y.new_infestation_ha;
            for (l, v) in b.loads_kg_per_yr.iter_mut().zip(&y.loads_kg_per_yr) {
                *l += v;
            }
            if let Some(cell) = cells.get(t) {
                self.cost[t] += cell.control.cost();
                self.water_saved_m3[t] += cell.water_saved_m3;
            }
        }
    }

    /// Turns sums into basin means and concentrations; returns the pooled "catchment".
    fn finish(&mut self, s: &Scenario) -> Catchment {
        let area: f64 = s.catchments.iter().map(|c| c.area_ha).sum();
        for b in &mut self.years {
            for v in [&mut b.rain_mm, &mut b.pet_mm, &mut b.et_mm, &mut b.yield_mm, &mut b.baseline_yield_mm, &mut b.uninvaded_yield_mm, &mut b.canopy_fraction] {
                *v /= area;
            }
            b.concentrations =
                b.loads_kg_per_yr.iter().map(|&l| dilution::concentration_mg_per_l(l, b.yield_m3, area, s.params.min_runoff_mm)).collect();
        }
        Catchment {
            id: BASIN_ID.into(),
            name: format!("{} (all catchments)", s.title),
            area_ha: area,
            rain_mm: 0.0,
            pet_mm: 0.0,
            pet_forest_mm: None,
            vulnerable_ha: self.vulnerable_ha,
            infested: ClassAreas::default(),
            forest_ha: 0.0,
            flows_to: None,
            point_kg_per_yr: vec![],
            curves: None,
        }
    }
}

/// Writes one catchment's rows of one strategy; returns its summary and programme totals.
fn write_catchment_rows(
    yearly: &mut CsvOut,
    s: &Scenario,
    c: &Catchment,
    strategy: &str,
    years: &[YearResult],
    control: Option<&[ControlYear]>,
    reference_m3: Option<&[f64]>,
) -> Result<(CatchmentSummary, ProgrammeTotals, Vec<ControlCells>)> {
    let contaminants = &s.params.contaminants;
    let mut cells = Vec::with_capacity(years.len());
    let (mut cum_cost, mut cum_saved) = (0.0, 0.0);
    for (t, y) in years.iter().enumerate() {
        let ctl = control.map(|c| c[t]).unwrap_or_default();
        let saved = reference_m3.map(|r| y.yield_m3 - r[t]).unwrap_or(0.0);
        cum_cost += ctl.cost();
        cum_saved += saved;
        let cell = ControlCells { control: ctl, water_saved_m3: saved, cumulative_cost: cum_cost, cumulative_water_saved_m3: cum_saved };
        let f = output::yearly_fields(c, strategy, y, &cell, contaminants);
        yearly.row(f.iter().map(String::as_str))?;
        cells.push(cell);
    }
    let cost: Vec<f64> = cells.iter().map(|c| c.control.cost()).collect();
    let saved: Vec<f64> = cells.iter().map(|c| c.water_saved_m3).collect();
    let totals = ProgrammeTotals::from_years(s.economics.discount_rate, &cost, &saved);
    Ok((summarise(c, years, contaminants), totals, cells))
}

struct StrategyOutcome {
    name: String,
    summaries: Vec<(CatchmentSummary, ProgrammeTotals)>,
    basin: BasinSeries,
    basin_catchment: Catchment,
    basin_summary: CatchmentSummary,
    basin_totals: ProgrammeTotals,
}

/// Runs the projection and writes every output.
pub fn run(scenario: &Scenario, opts: &RunOptions) -> Result<RunOutcome> {
    let staging = Staging::new(&opts.out, opts.force)?;
    let dir = staging.dir().to_path_buf();
    let s = scenario;
    let contaminants = &s.params.contaminants;
    let draw = match opts.figures {
        FigureChoice::All => true,
        FigureChoice::None => false,
        FigureChoice::Auto => s.catchments.len() <= AUTO_FIGURE_LIMIT,
    };
    let figdir = dir.join("figures");
    std::fs::create_dir_all(&figdir).map_err(|e| Error::io("creating figures/", e))?;
    let in_network: Vec<bool> = {
        let mut v: Vec<bool> = (0..s.catchments.len()).map(|i| s.network.downstream(i).is_some()).collect();
        for n in s.network.receiving_nodes() {
            v[n] = true;
        }
        v
    };
    let climates: Vec<_> = if s.strategies.is_empty() { Vec::new() } else { (0..s.catchments.len()).map(|i| s.climate_series(i)).collect() };

    let mut yearly = CsvOut::create(&dir.join("yearly.csv"), &output::yearly_header(contaminants))?;
    let mut nodes = CsvOut::create(&dir.join("nodes.csv"), &output::nodes_header(contaminants))?;
    let mut n_figures = 0;

    // The no-control reference, streamed catchment by catchment.
    let mut outcomes: Vec<StrategyOutcome> = Vec::new();
    {
        let mut basin = BasinSeries::new(s);
        let mut summaries = Vec::with_capacity(s.catchments.len());
        let mut kept: Vec<Option<Vec<YearResult>>> = Vec::with_capacity(s.catchments.len());
        let mut reference: Vec<Vec<f64>> = Vec::new();
        for (i, c) in s.catchments.iter().enumerate() {
            let years = project_catchment(c, &s.climate_series(i), &s.params, s.start_year);
            let (sum, totals, cells) = write_catchment_rows(&mut yearly, s, c, NO_CONTROL, &years, None, None)?;
            basin.add(c, &years, &cells);
            summaries.push((sum, totals));
            if draw {
                n_figures += catchment_figures(&figdir, s, i, &years, opts.formats)?;
            }
            if !s.strategies.is_empty() {
                reference.push(years.iter().map(|y| y.yield_m3).collect());
            }
            kept.push(in_network[i].then_some(years));
        }
        write_nodes(&mut nodes, s, NO_CONTROL, kept)?;
        outcomes.push(finish_outcome(s, NO_CONTROL, summaries, basin));

        for st in &s.strategies {
            let run = project_basin(&s.catchments, &climates, std::slice::from_ref(&s.params), s.start_year, Some(st));
            let mut basin = BasinSeries::new(s);
            let mut summaries = Vec::with_capacity(s.catchments.len());
            for (i, c) in s.catchments.iter().enumerate() {
                let (sum, totals, cells) =
                    write_catchment_rows(&mut yearly, s, c, &st.name, &run.years[i], Some(&run.control[i]), Some(&reference[i]))?;
                basin.add(c, &run.years[i], &cells);
                summaries.push((sum, totals));
            }
            let kept = run.years.into_iter().enumerate().map(|(i, y)| in_network[i].then_some(y)).collect();
            write_nodes(&mut nodes, s, &st.name, kept)?;
            write_budget(&dir, s, st, &run.budget)?;
            outcomes.push(finish_outcome(s, &st.name, summaries, basin));
        }
        let delays = delay_rows(s, &climates, &reference, &outcomes[0].basin);
        write_delay(&dir, &delays)?;
        if !s.strategies.is_empty() {
            n_figures += strategy_figures(&figdir, s, &outcomes, &delays, opts.formats)?;
        }
    }
    yearly.finish()?;
    nodes.finish()?;
    if !dir.join("budget.csv").exists() {
        CsvOut::create(&dir.join("budget.csv"), &output::budget_header())?.finish()?;
    }

    let mut summary = CsvOut::create(&dir.join("summary.csv"), &output::summary_header(contaminants))?;
    for o in &outcomes {
        for (c, (sm, tot)) in s.catchments.iter().zip(&o.summaries) {
            summary.row(output::summary_fields(c, &o.name, sm, tot, s.economics.water_value_per_m3).iter().map(String::as_str))?;
        }
        summary.row(
            output::summary_fields(&o.basin_catchment, &o.name, &o.basin_summary, &o.basin_totals, s.economics.water_value_per_m3)
                .iter()
                .map(String::as_str),
        )?;
    }
    summary.finish()?;
    if draw || !s.strategies.is_empty() {
        n_figures += basin_cover_figure(&figdir, s, &outcomes[0], opts.formats)?;
    }
    let mut members = 0;
    if let Some(cfg) = &s.ensemble {
        let eopts = crate::ensemble::EnsembleOptions { progress: opts.progress, figures: draw, formats: opts.formats };
        let pool = crate::ensemble::pool(opts.threads)?;
        let e = pool.install(|| crate::ensemble::run_ensemble(s, cfg, &dir, &eopts))?;
        n_figures += e.figures;
        members = e.members;
    }
    copy_inputs(&dir, s)?;
    output::write_run_info(&dir, &run_info(s))?;
    let out = staging.commit()?;
    Ok(RunOutcome {
        out,
        catchments: s.catchments.len(),
        years: s.horizon_years + 1,
        strategies: outcomes.iter().map(|o| o.name.clone()).collect(),
        figures: n_figures,
        members,
    })
}

fn finish_outcome(s: &Scenario, name: &str, summaries: Vec<(CatchmentSummary, ProgrammeTotals)>, mut basin: BasinSeries) -> StrategyOutcome {
    let basin_catchment = basin.finish(s);
    let basin_summary = summarise(&basin_catchment, &basin.years, &s.params.contaminants);
    let basin_totals = ProgrammeTotals::from_years(s.economics.discount_rate, &basin.cost, &basin.water_saved_m3);
    StrategyOutcome { name: name.to_string(), summaries, basin, basin_catchment, basin_summary, basin_totals }
}

fn write_nodes(nodes: &mut CsvOut, s: &Scenario, strategy: &str, kept: Vec<Option<Vec<YearResult>>>) -> Result<()> {
    let contaminants = &s.params.contaminants;
    if s.network.receiving_nodes().is_empty() {
        return Ok(());
    }
    let n_years = s.horizon_years + 1;
    // Catchments outside any network contribute nothing to node sums.
    let projections: Vec<Vec<YearResult>> =
        kept.into_iter().map(|p| p.unwrap_or_else(|| zero_years(s.start_year, n_years, contaminants.len()))).collect();
    let counts = s.network.upstream_counts();
    for (n, rows) in node_totals(&s.network, &s.catchments, &projections, contaminants.len(), s.params.min_runoff_mm) {
        for y in &rows {
            let f = output::node_fields(&s.catchments[n].id, strategy, counts[n], y, contaminants);
            nodes.row(f.iter().map(String::as_str))?;
        }
    }
    Ok(())
}

fn write_budget(dir: &Path, s: &Scenario, st: &Strategy, rows: &[crate::model::control::BudgetYear]) -> Result<()> {
    let path = dir.join("budget.csv");
    let exists = path.exists();
    let mut text = String::new();
    if !exists {
        text.push_str(&output::budget_header().join(","));
        text.push('\n');
    }
    for b in rows {
        let pool = b.pool.map_or(BASIN_ID, |i| s.catchments[i].id.as_str());
        text.push_str(&output::budget_fields(&st.name, pool, b).join(","));
        text.push('\n');
    }
    use std::io::Write;
    let mut f = std::fs::OpenOptions::new()
        .create(true)
        .append(true)
        .open(&path)
        .map_err(|e| Error::io(format!("writing {}", path.display()), e))?;
    f.write_all(text.as_bytes()).map_err(|e| Error::io(format!("writing {}", path.display()), e))
}

/// One row of the cost-of-delay table.
struct DelayRow {
    strategy: String,
    delay_yr: u32,
    start_year: i32,
    totals: ProgrammeTotals,
    water_lost_m3: f64,
    final_infested_ha: f64,
}

fn delay_rows(s: &Scenario, climates: &[Vec<crate::model::ClimateYear>], reference: &[Vec<f64>], _nc: &BasinSeries) -> Vec<DelayRow> {
    let mut rows = Vec::new();
    for st in &s.strategies {
        for &d in &st.delays_yr {
            let variant = st.delayed(d);
            let run = project_basin(&s.catchments, climates, std::slice::from_ref(&s.params), s.start_year, Some(&variant));
            let n_years = s.horizon_years + 1;
            let mut cost = vec![0.0; n_years];
            let mut saved = vec![0.0; n_years];
            let mut lost = 0.0;
            for (i, c) in s.catchments.iter().enumerate() {
                for t in 0..n_years {
                    let y = &run.years[i][t];
                    cost[t] += run.control[i][t].cost();
                    saved[t] += y.yield_m3 - reference[i][t];
                    lost += dilution::volume_m3(y.baseline_yield_mm - y.yield_mm, c.area_ha);
                }
            }
            let final_infested_ha = run.years.iter().map(|ys| ys.last().map_or(0.0, |y| y.classes.total_ha())).sum();
            rows.push(DelayRow {
                strategy: st.name.clone(),
                delay_yr: d,
                start_year: variant.start_year,
                totals: ProgrammeTotals::from_years(s.economics.discount_rate, &cost, &saved),
                water_lost_m3: lost,
                final_infested_ha,
            });
        }
    }
    rows
}

fn write_delay(dir: &Path, rows: &[DelayRow]) -> Result<()> {
    let mut out = CsvOut::create(&dir.join("delay.csv"), &output::delay_header())?;
    for r in rows {
        let f = [
            r.strategy.clone(),
            r.delay_yr.to_string(),
            r.start_year.to_string(),
            output::num(r.totals.cost, 2),
            output::num(r.totals.cost_pv, 2),
            output::num(r.totals.water_saved_m3, 1),
            output::num(r.water_lost_m3, 1),
            output::num(r.final_infested_ha, 3),
        ];
        out.row(f.iter().map(String::as_str))?;
    }
    out.finish()
}

fn zero_years(start_year: i32, n: usize, k: usize) -> Vec<YearResult> {
    (0..n)
        .map(|t| YearResult {
            year: start_year + t as i32,
            rain_mm: 0.0,
            pet_mm: 0.0,
            et_mm: 0.0,
            yield_mm: 0.0,
            yield_m3: 0.0,
            baseline_yield_mm: 0.0,
            uninvaded_yield_mm: 0.0,
            canopy_fraction: 0.0,
            classes: Default::default(),
            new_infestation_ha: 0.0,
            loads_kg_per_yr: vec![0.0; k],
            concentrations: vec![Ok(0.0); k],
        })
        .collect()
}

fn run_info(s: &Scenario) -> serde_json::Value {
    use crate::model::budyko::CoverCurves;
    let mut strategies = vec![NO_CONTROL.to_string()];
    strategies.extend(s.strategies.iter().map(|st| st.name.clone()));
    let hydrology = match s.params.curves {
        CoverCurves::Zhang { w_forest, w_grass } => serde_json::json!({"method": "zhang", "w_forest": w_forest, "w_grass": w_grass, "forest_pet_factor": s.params.forest_pet_factor}),
        CoverCurves::Fu { omega_forest, omega_grass } => serde_json::json!({"method": "fu", "omega_forest": omega_forest, "omega_grass": omega_grass, "forest_pet_factor": s.params.forest_pet_factor}),
    };
    let inv = &s.params.invasion;
    serde_json::json!({
        "tool": "yieldshift",
        "version": env!("CARGO_PKG_VERSION"),
        "title": s.title,
        "scenario": s.path.display().to_string(),
        "catchment_table": s.catchments_path.display().to_string(),
        "climate_table": s.climate_path.as_ref().map(|p| p.display().to_string()),
        "inputs_copied_to": "inputs/",
        "start_year": s.start_year,
        "horizon_years": s.horizon_years,
        "catchments": s.catchments.len(),
        "hydrology_method": s.params.curves.method_name(),
        "hydrology": hydrology,
        "invasion": {
            "spread_rate_per_yr": inv.spread_rate_per_yr,
            "seed_bearing_age_yr": inv.seed_bearing_age_yr,
            "seed_rain_ha_per_yr": inv.seed_rain_ha_per_yr,
            "medium_age_yr": inv.medium_age_yr,
            "dense_age_yr": inv.dense_age_yr,
        },
        "strategies": strategies,
        "discount_rate": s.economics.discount_rate,
        "water_value_per_m3": s.economics.water_value_per_m3,
        "contaminants": s.params.contaminants.iter().map(|c| serde_json::json!({
            "name": c.name,
            "open_export_kg_per_ha_yr": c.open_export_kg_per_ha_yr,
            "forest_export_kg_per_ha_yr": c.forest_export_kg_per_ha_yr,
            "guideline_mg_per_l": c.guideline_mg_per_l,
        })).collect::<Vec<_>>(),
        "cautions": output::CAUTIONS,
    })
}

/// Copies the scenario and every table it names into `dir/inputs/`, so a run
/// folder documents itself (and the report can show the inputs).
fn copy_inputs(dir: &Path, s: &Scenario) -> Result<()> {
    let inputs = dir.join("inputs");
    std::fs::create_dir_all(&inputs).map_err(|e| Error::io("creating inputs/", e))?;
    let mut files: Vec<&Path> = vec![&s.path, &s.catchments_path];
    if let Some(c) = &s.climate_path {
        files.push(c);
    }
    for f in files {
        let name = f.file_name().map(|n| n.to_os_string()).unwrap_or_default();
        std::fs::copy(f, inputs.join(&name)).map_err(|e| Error::io(format!("copying {} into inputs/", f.display()), e))?;
    }
    Ok(())
}

/// Safe file-name stem for a catchment or strategy name.
pub fn file_stem(id: &str) -> String {
    id.chars().map(|c| if c.is_ascii_alphanumeric() || c == '-' || c == '_' { c } else { '_' }).collect()
}

fn catchment_figures(dir: &Path, s: &Scenario, i: usize, years: &[YearResult], formats: Formats) -> Result<usize> {
    let c = &s.catchments[i];
    let stem = file_stem(&c.id);
    let xs: Vec<f64> = years.iter().map(|y| y.year as f64).collect();
    let pts = |f: &dyn Fn(&YearResult) -> Option<f64>| xs.iter().zip(years).map(|(&x, y)| (x, f(y))).collect::<Vec<_>>();
    let yield_chart = LineChart::over_years(
        format!("{} — water yield", c.name),
        "Water yield (mm/yr)".into(),
        vec![
            Line { label: "Projected".into(), points: pts(&|y| Some(y.yield_mm)), colour: palette::YIELD, dashed: false },
            Line { label: "Baseline (current cover held)".into(), points: pts(&|y| Some(y.baseline_yield_mm)), colour: palette::BASELINE, dashed: true },
            Line { label: "No invasion".into(), points: pts(&|y| Some(y.uninvaded_yield_mm)), colour: palette::UNINVADED, dashed: true },
        ],
    );
    save_figure(&yield_chart, &dir.join(format!("{stem}_yield")), formats)?;
    let mut n = 1;
    for (k, m) in s.params.contaminants.iter().enumerate() {
        let mut chart = LineChart::over_years(
            format!("{} — {} concentration", c.name, m.name),
            format!("{} (mg/L)", m.name),
            vec![Line { label: "Projected".into(), points: pts(&|y| y.concentrations[k].ok()), colour: palette::series(k + 1), dashed: false }],
        );
        chart.thresholds = m.guideline_mg_per_l.map(|g| vec![(format!("Guideline {g} mg/L"), g, palette::GUIDELINE)]).unwrap_or_default();
        save_figure(&chart, &dir.join(format!("{stem}_{}", m.name)), formats)?;
        n += 1;
    }
    let cover = CoverChart {
        title: format!("{} — infestation by density class", c.name),
        years: xs.clone(),
        classes: years.iter().map(|y| [y.classes.scattered_ha, y.classes.medium_ha, y.classes.dense_ha]).collect(),
        vulnerable_ha: c.vulnerable_ha,
    };
    save_figure(&cover, &dir.join(format!("{stem}_cover")), formats)?;
    Ok(n + 1)
}

fn cover_chart(title: String, b: &BasinSeries) -> CoverChart {
    CoverChart {
        title,
        years: b.years.iter().map(|y| y.year as f64).collect(),
        classes: b.years.iter().map(|y| [y.classes.scattered_ha, y.classes.medium_ha, y.classes.dense_ha]).collect(),
        vulnerable_ha: b.vulnerable_ha,
    }
}

fn basin_cover_figure(dir: &Path, s: &Scenario, nc: &StrategyOutcome, formats: Formats) -> Result<usize> {
    let chart = cover_chart(format!("{} — infestation, {}", s.title, NO_CONTROL), &nc.basin);
    save_figure(&chart, &dir.join(format!("basin_{NO_CONTROL}_cover")), formats)?;
    Ok(1)
}

fn strategy_figures(dir: &Path, s: &Scenario, outcomes: &[StrategyOutcome], delays: &[DelayRow], formats: Formats) -> Result<usize> {
    let mut n = 0;
    // Cumulative cost vs cumulative water saved, basin totals, one line per strategy.
    let lines: Vec<Line> = outcomes
        .iter()
        .skip(1)
        .enumerate()
        .map(|(k, o)| {
            let (mut cc, mut cw) = (0.0, 0.0);
            let points = o
                .basin
                .cost
                .iter()
                .zip(&o.basin.water_saved_m3)
                .map(|(c, w)| {
                    cc += c;
                    cw += w;
                    (cc / 1e6, Some(cw / 1e6))
                })
                .collect();
            Line { label: o.name.clone(), points, colour: palette::series(k), dashed: false }
        })
        .collect();
    let mut chart = LineChart::over_years(
        format!("{} — what control buys", s.title),
        "Cumulative water saved (million m³)".into(),
        lines,
    );
    chart.x_label = "Cumulative control cost (million $)".into();
    chart.x_decimals = 1;
    chart.legend_at = Corner::LowerRight;
    save_figure(&chart, &dir.join("strategies_cost_vs_water"), formats)?;
    n += 1;
    for o in outcomes.iter().skip(1) {
        let chart = cover_chart(format!("{} — infestation under {}", s.title, o.name), &o.basin);
        save_figure(&chart, &dir.join(format!("basin_{}_cover", file_stem(&o.name))), formats)?;
        n += 1;
    }
    for st in &s.strategies {
        let rows: Vec<&DelayRow> = delays.iter().filter(|r| r.strategy == st.name).collect();
        if rows.is_empty() {
            continue;
        }
        let line = |label: &str, f: &dyn Fn(&DelayRow) -> f64, k: usize| Line {
            label: label.into(),
            points: rows.iter().map(|r| (r.delay_yr as f64, Some(f(r)))).collect(),
            colour: palette::series(k),
            dashed: false,
        };
        let mut cost = LineChart::over_years(
            format!("{}: cost of delay", st.name),
            "Total control cost (million $)".into(),
            vec![line("Nominal", &|r| r.totals.cost / 1e6, 0), line("Present value", &|r| r.totals.cost_pv / 1e6, 1)],
        );
        cost.x_label = "Delay of the start (years)".into();
        cost.legend_at = Corner::UpperLeft;
        let mut water = LineChart::over_years(
            format!("{}: water lost with delay", st.name),
            "Water lost vs baseline over the horizon (million m³)".into(),
            vec![line("Water lost (negative: more water than today)", &|r| r.water_lost_m3 / 1e6, 2)],
        );
        water.x_label = "Delay of the start (years)".into();
        water.legend_at = Corner::UpperLeft;
        water.y_from_zero = false;
        save_figure(&Panels(vec![cost, water]), &dir.join(format!("delay_{}", file_stem(&st.name))), formats)?;
        n += 1;
    }
    Ok(n)
}
