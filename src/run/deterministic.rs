//! The main job, end to end: a validated [`Scenario`] in, the output folder out
//! (`yearly.csv`, `summary.csv`, `nodes.csv`, `budget.csv`, `delay.csv`,
//! `run_info.json`, `figures/`).
//!
//! The `no-control` reference is projected catchment by catchment and streamed
//! to disk; each control programme is projected for the whole basin at once
//! ([`crate::model::basin`]) because a shared budget couples the catchments.
//! Results are staged in a temporary folder and moved into place only when
//! everything succeeded ([`crate::output::outdir`]).

use crate::error::{Error, Result};
use crate::input::scenario::Scenario;
use crate::model::basin::project_basin;
use crate::model::control::ControlYear;
use crate::model::dilution;
use crate::model::economics::ProgrammeTotals;
use crate::model::summary::{node_totals, summarise, summarise_node, CatchmentSummary};
use crate::model::{project_catchment, Catchment, YearResult};
use crate::output::outdir::Staging;
use crate::output::tables::{self, ControlCells, CsvOut, SummaryWho};
use crate::plot::series::{CoverChart, Line, LineChart};
use crate::plot::{palette, save_figure, Formats};
use crate::run::basin_totals::{BasinMeta, DelaySums, Partials, StrategySums};
use crate::schema::run_info::RunInfo;
use crate::schema::{columns, file_stem};
use std::path::{Path, PathBuf};

use crate::schema::{BASIN_ID, NO_CONTROL};

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
    /// Run only the `k`-th of `n` slices of the catchments (1-based), for `merge`.
    pub shard: Option<(usize, usize)>,
}

impl RunOptions {
    /// Defaults: figures `Auto` in PNG and SVG, all cores, no progress bar, no shard.
    pub fn new(out: impl Into<PathBuf>) -> RunOptions {
        RunOptions {
            out: out.into(),
            force: false,
            figures: FigureChoice::Auto,
            formats: Formats::default(),
            threads: None,
            progress: false,
            shard: None,
        }
    }
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
        let f = tables::yearly_fields(c, strategy, y, &cell, contaminants);
        yearly.row(f.iter().map(String::as_str))?;
        cells.push(cell);
    }
    let cost: Vec<f64> = cells.iter().map(|c| c.control.cost()).collect();
    let saved: Vec<f64> = cells.iter().map(|c| c.water_saved_m3).collect();
    let totals = ProgrammeTotals::from_years(s.economics.discount_rate, &cost, &saved);
    Ok((summarise(c, years, contaminants), totals, cells))
}

/// Runs the projection and writes every output.
// Over 100 lines on purpose: the run's steps in order (stage, project, write, ensemble, finish, commit); each step is a call, and the order is the point.
pub fn run(scenario: &Scenario, opts: &RunOptions) -> Result<RunOutcome> {
    let staging = Staging::new(&opts.out, opts.force)?;
    let dir = staging.dir().to_path_buf();
    let full = scenario;
    let sub;
    let s = match opts.shard {
        Some((k, n)) => {
            sub = crate::run::shard::shard_scenario(full, k, n)?;
            &sub
        }
        None => full,
    };
    let contaminants = &s.params.contaminants;
    let n_years = s.horizon_years + 1;
    let k = contaminants.len();
    let draw = match opts.figures {
        FigureChoice::All => true,
        FigureChoice::None => false,
        FigureChoice::Auto => full.catchments.len() <= AUTO_FIGURE_LIMIT,
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
    let climates: Vec<_> =
        if s.strategies.is_empty() { Vec::new() } else { (0..s.catchments.len()).map(|i| s.climate_series(i)).collect() };
    let mut partials = Partials {
        meta: basin_meta(full, draw || !full.strategies.is_empty()),
        strategies: Vec::new(),
        delays: Vec::new(),
        sensitivity: None,
        ensemble: Vec::new(),
    };

    let mut yearly = CsvOut::create(&dir.join("yearly.csv"), &tables::yearly_header(contaminants))?;
    let mut nodes = CsvOut::create(&dir.join("nodes.csv"), &tables::nodes_header(contaminants))?;
    let mut budget = CsvOut::create(&dir.join("budget.csv"), &tables::budget_header())?;
    let mut n_figures = 0;
    // summary.csv rows of each catchment, per strategy (basin rows are added at the end).
    let mut summary_rows: Vec<Vec<Vec<String>>> = Vec::new();

    // The no-control reference, streamed catchment by catchment.
    let mut sums = StrategySums::new(NO_CONTROL, n_years, k);
    let mut rows = Vec::with_capacity(s.catchments.len());
    let mut kept: Vec<Option<Vec<YearResult>>> = Vec::with_capacity(s.catchments.len());
    let mut reference: Vec<Vec<f64>> = Vec::new();
    let mut kept_cells: Vec<Option<Vec<ControlCells>>> = Vec::with_capacity(s.catchments.len());
    for (i, c) in s.catchments.iter().enumerate() {
        let years = project_catchment(c, &s.climate_series(i), &s.params, s.start_year);
        let (sum, totals, cells) = write_catchment_rows(&mut yearly, s, c, NO_CONTROL, &years, None, None)?;
        sums.add(c, &years, &cells);
        rows.push(tables::summary_fields(SummaryWho::local(c), NO_CONTROL, &sum, &totals, s.economics.water_value_per_m3));
        kept_cells.push(in_network[i].then_some(cells));
        if draw {
            n_figures += catchment_figures(&figdir, s, i, &years, opts.formats)?;
        }
        if !s.strategies.is_empty() {
            reference.push(years.iter().map(|y| y.yield_m3).collect());
        }
        kept.push(in_network[i].then_some(years));
    }
    rows.extend(write_nodes(&mut nodes, s, NO_CONTROL, kept, kept_cells)?);
    partials.strategies.push(sums);
    summary_rows.push(rows);

    for st in &s.strategies {
        let run = project_basin(&s.catchments, &climates, std::slice::from_ref(&s.params), s.start_year, Some(st));
        let mut sums = StrategySums::new(&st.name, n_years, k);
        let mut rows = Vec::with_capacity(s.catchments.len());
        let mut kept_cells = Vec::with_capacity(s.catchments.len());
        for (i, c) in s.catchments.iter().enumerate() {
            let (sum, totals, cells) =
                write_catchment_rows(&mut yearly, s, c, &st.name, &run.years[i], Some(&run.control[i]), Some(&reference[i]))?;
            sums.add(c, &run.years[i], &cells);
            rows.push(tables::summary_fields(SummaryWho::local(c), &st.name, &sum, &totals, s.economics.water_value_per_m3));
            kept_cells.push(in_network[i].then_some(cells));
        }
        for b in &run.budget {
            let pool = b.pool.map_or(BASIN_ID, |i| s.catchments[i].id.as_str());
            budget.row(tables::budget_fields(&st.name, pool, b).iter().map(String::as_str))?;
        }
        let kept = run.years.into_iter().enumerate().map(|(i, y)| in_network[i].then_some(y)).collect();
        rows.extend(write_nodes(&mut nodes, s, &st.name, kept, kept_cells)?);
        partials.strategies.push(sums);
        summary_rows.push(rows);
    }
    partials.delays = delay_sums(s, &climates, &reference);
    yearly.finish()?;
    nodes.finish()?;
    budget.finish()?;

    let mut members = 0;
    if let Some(cfg) = &s.ensemble {
        let eopts = crate::run::ensemble::EnsembleOptions { progress: opts.progress, figures: draw, formats: opts.formats };
        let pool = crate::run::ensemble::pool(opts.threads)?;
        let e = pool.install(|| crate::run::ensemble::run_ensemble(s, cfg, &dir, &eopts, &partials.meta))?;
        n_figures += e.figures;
        members = e.members;
        partials.sensitivity = e.sensitivity;
        partials.ensemble = e.basin;
    }
    copy_inputs(&dir, full)?;
    tables::write_run_info(&dir, &run_info(full))?;
    match opts.shard {
        Some((k, n)) => {
            // A shard writes its catchments' rows and its partial basin sums; `merge` finishes.
            let mut summary = CsvOut::create(&dir.join("summary.csv"), &tables::summary_header(contaminants))?;
            for rows in &summary_rows {
                for r in rows {
                    summary.row(r.iter().map(String::as_str))?;
                }
            }
            summary.finish()?;
            crate::run::shard::write_shard_info(&dir, full, s, k, n, &partials, opts.figures != FigureChoice::None)?;
        }
        None => {
            n_figures += crate::run::finish::finish_basin(&dir, &partials, &summary_rows, opts.formats)?;
            if let Some(g) = &full.gis {
                n_figures += crate::run::finish::gis_outputs(&dir, &g.boundaries, opts.figures != FigureChoice::None, opts.formats)?;
            }
            let report = crate::report::ReportOptions { figures: opts.figures != FigureChoice::None, formats: opts.formats };
            n_figures += crate::report::write_report_with(&dir, &report)?.drawn;
        }
    }
    let out = staging.commit()?;
    Ok(RunOutcome {
        out,
        catchments: s.catchments.len(),
        years: s.horizon_years + 1,
        strategies: partials.meta.strategies.clone(),
        figures: n_figures,
        members,
    })
}

fn basin_meta(s: &Scenario, figures: bool) -> BasinMeta {
    let mut strategies = vec![NO_CONTROL.to_string()];
    strategies.extend(s.strategies.iter().map(|st| st.name.clone()));
    BasinMeta {
        title: s.title.clone(),
        start_year: s.start_year,
        horizon_years: s.horizon_years,
        min_runoff_mm: s.params.min_runoff_mm,
        discount_rate: s.economics.discount_rate,
        water_value_per_m3: s.economics.water_value_per_m3,
        contaminants: s.params.contaminants.iter().map(|c| (c.name.clone(), c.guideline_mg_per_l)).collect(),
        strategies,
        figures,
    }
}

/// Writes the `nodes.csv` rows of one strategy and returns the `arriving` rows of
/// `summary.csv` (what reaches each receiving node, with the programme's cost and
/// water saved summed over the catchments upstream of it).
fn write_nodes(
    nodes: &mut CsvOut,
    s: &Scenario,
    strategy: &str,
    kept: Vec<Option<Vec<YearResult>>>,
    kept_cells: Vec<Option<Vec<ControlCells>>>,
) -> Result<Vec<Vec<String>>> {
    let contaminants = &s.params.contaminants;
    if s.network.receiving_nodes().is_empty() {
        return Ok(Vec::new());
    }
    let n_years = s.horizon_years + 1;
    // Catchments outside any network contribute nothing to node sums.
    let projections: Vec<Vec<YearResult>> =
        kept.into_iter().map(|p| p.unwrap_or_else(|| zero_years(s.start_year, n_years, contaminants.len()))).collect();
    let counts = s.network.upstream_counts();
    // Cost and water saved of each year summed downstream (zero outside the networks).
    let per_year = |f: &dyn Fn(&ControlCells) -> f64| -> Vec<Vec<f64>> {
        (0..n_years)
            .map(|t| s.network.accumulate(&kept_cells.iter().map(|c| c.as_ref().map_or(0.0, |c| f(&c[t]))).collect::<Vec<_>>()))
            .collect()
    };
    let cost = per_year(&|c| c.control.cost());
    let saved = per_year(&|c| c.water_saved_m3);
    let mut summary = Vec::new();
    for (n, rows) in
        node_totals(&s.network, &s.catchments, &projections, contaminants.len(), s.params.min_runoff_mm, &s.params.concentration_ceiling)
    {
        for y in &rows {
            let f = tables::node_fields(&s.catchments[n].id, strategy, counts[n], y, contaminants);
            nodes.row(f.iter().map(String::as_str))?;
        }
        let c = &s.catchments[n];
        let who = SummaryWho {
            id: &c.id,
            scope: columns::scope::ARRIVING,
            name: &c.name,
            area_ha: rows.first().map_or(c.area_ha, |y| y.area_ha),
        };
        let totals = ProgrammeTotals::from_years(
            s.economics.discount_rate,
            &cost.iter().map(|v| v[n]).collect::<Vec<_>>(),
            &saved.iter().map(|v| v[n]).collect::<Vec<_>>(),
        );
        summary.push(tables::summary_fields(who, strategy, &summarise_node(&rows, contaminants), &totals, s.economics.water_value_per_m3));
    }
    Ok(summary)
}

fn delay_sums(s: &Scenario, climates: &[Vec<crate::model::ClimateYear>], reference: &[Vec<f64>]) -> Vec<DelaySums> {
    let mut rows = Vec::new();
    let n_years = s.horizon_years + 1;
    for st in &s.strategies {
        for &d in &st.delays_yr {
            let variant = st.delayed(d);
            let run = project_basin(&s.catchments, climates, std::slice::from_ref(&s.params), s.start_year, Some(&variant));
            let mut row = DelaySums {
                strategy: st.name.clone(),
                delay_yr: d,
                start_year: variant.start_year,
                cost: vec![Default::default(); n_years],
                saved: vec![Default::default(); n_years],
                lost: Default::default(),
                final_infested_ha: Default::default(),
            };
            for (i, c) in s.catchments.iter().enumerate() {
                for (t, y) in run.years[i].iter().enumerate().take(n_years) {
                    row.cost[t].add(run.control[i][t].cost());
                    row.saved[t].add(y.yield_m3 - reference[i][t]);
                    row.lost.add(dilution::volume_m3(y.baseline_yield_mm - y.yield_mm, c.area_ha));
                }
                row.final_infested_ha.add(run.years[i].last().map_or(0.0, |y| y.classes.total_ha()));
            }
            rows.push(row);
        }
    }
    rows
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
            mean_volume_m3: 0.0,
            mean_loads_kg_per_yr: vec![0.0; k],
            concentrations: vec![Ok(0.0); k],
            uninvaded_loads_kg_per_yr: vec![0.0; k],
            uninvaded_concentrations: vec![Ok(0.0); k],
        })
        .collect()
}

fn run_info(s: &Scenario) -> RunInfo {
    use crate::input::scenario::ClimateVariability;
    use crate::schema::run_info as ri;
    let mut strategies = vec![NO_CONTROL.to_string()];
    strategies.extend(s.strategies.iter().map(|st| st.name.clone()));
    RunInfo {
        canopy_closure: Some((&s.params.invasion.closure).into()),
        catchment_table: s.catchments_path.display().to_string(),
        catchments: s.catchments.len(),
        cautions: crate::schema::CAUTIONS.into(),
        climate_table: s.climate_path.as_ref().map(|p| p.display().to_string()),
        contaminants: s.params.contaminants.iter().map(Into::into).collect(),
        discount_rate: s.economics.discount_rate,
        ensemble: s.ensemble.as_ref().map(|e| ri::EnsembleInfo {
            climate: match e.climate {
                ClimateVariability::None => ri::EnsembleClimate::None,
                ClimateVariability::Bootstrap { .. } => ri::EnsembleClimate::Bootstrap,
                ClimateVariability::Stochastic { .. } => ri::EnsembleClimate::Stochastic,
            },
            members: e.members,
            sampling: e.sampling.into(),
            seed: e.seed,
        }),
        gis: s.gis.as_ref().map(|g| ri::GisInfo {
            area_from_geometry: g.area_from_geometry,
            area_tolerance: g.area_tolerance,
            boundaries: g.boundaries.path().file_name().map(|n| n.to_string_lossy().into_owned()),
            id_property: g.boundaries.id_property().to_string(),
        }),
        horizon_years: s.horizon_years,
        hydrology: ri::Hydrology {
            forest_pet_factor: s.params.forest_pet_factor,
            interception_demand_share: Some(s.params.interception.demand_share()),
            interception_fraction: Some(s.params.interception.fraction_of_rain()),
            curves: s.params.curves.into(),
        },
        hydrology_method: s.params.curves.method_name().into(),
        inputs_copied_to: ri::INPUTS_COPIED_TO.into(),
        invasion: (&s.params.invasion).into(),
        min_runoff_mm: Some(s.params.min_runoff_mm),
        pet_from_weather: s.pet_source.as_ref().map(|(p, m)| ri::PetFromWeather {
            method: m.clone(),
            weather_table: p.display().to_string(),
            partial: s
                .pet_fallback
                .iter()
                .map(|(c, w, l)| ri::PetPartial { catchment: c.clone(), weather_years: *w, long_term_years: *l })
                .collect(),
        }),
        scenario: s.path.display().to_string(),
        stand_table: s.stands_path.as_ref().map(|p| p.display().to_string()),
        start_year: s.start_year,
        strategies,
        title: s.title.clone(),
        tool: ri::TOOL.into(),
        version: env!("CARGO_PKG_VERSION").into(),
        water_value_per_m3: s.economics.water_value_per_m3,
    }
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
    if let Some(st) = &s.stands_path {
        files.push(st);
    }
    if let Some((w, _)) = &s.pet_source {
        files.push(w);
    }
    if let Some(g) = &s.gis {
        files.push(g.boundaries.path());
    }
    for f in files {
        let name = f.file_name().map(|n| n.to_os_string()).unwrap_or_default();
        std::fs::copy(f, inputs.join(&name)).map_err(|e| Error::io(format!("copying {} into inputs/", f.display()), e))?;
    }
    Ok(())
}

fn catchment_figures(dir: &Path, s: &Scenario, i: usize, years: &[YearResult], formats: Formats) -> Result<usize> {
    let c = &s.catchments[i];
    let stem = file_stem(&c.id);
    let xs: Vec<f64> = years.iter().map(|y| y.year as f64).collect();
    let pts = |f: &dyn Fn(&YearResult) -> Option<f64>| xs.iter().zip(years).map(|(&x, y)| (x, f(y))).collect::<Vec<_>>();
    // The trend the headline numbers use: the mean over the 10 years ending in each year.
    let flow: Vec<f64> = years.iter().map(|y| y.yield_mm).collect();
    let yield_chart = LineChart::over_years(
        format!("{} — water yield", c.name),
        "Water yield (mm/yr)".into(),
        vec![
            Line { label: "Projected".into(), points: pts(&|y| Some(y.yield_mm)), colour: palette::YIELD, dashed: false },
            Line {
                label: "Baseline (current cover held)".into(),
                points: pts(&|y| Some(y.baseline_yield_mm)),
                colour: palette::BASELINE,
                dashed: true,
            },
            Line { label: "No invasion".into(), points: pts(&|y| Some(y.uninvaded_yield_mm)), colour: palette::UNINVADED, dashed: true },
            Line {
                label: "Projected, 10-year mean".into(),
                points: xs.iter().enumerate().map(|(t, &x)| (x, crate::model::summary::window_mean(&flow, t))).collect(),
                colour: palette::RANGE,
                dashed: false,
            },
        ],
    );
    save_figure(&yield_chart, &dir.join(format!("{stem}_yield")), formats)?;
    let mut n = 1;
    for (k, m) in s.params.contaminants.iter().enumerate() {
        let mut chart = LineChart::over_years(
            format!("{} — {} concentration", c.name, m.name),
            format!("{} (mg/L)", m.name),
            vec![Line {
                label: "Projected".into(),
                points: pts(&|y| y.concentrations[k].ok()),
                colour: palette::series(k + 1),
                dashed: false,
            }],
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
