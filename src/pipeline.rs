//! The main job, end to end: a validated [`Scenario`] in, the output folder out
//! (`yearly.csv`, `summary.csv`, `nodes.csv`, `run_info.json`, `figures/`).
//!
//! Results are staged in a temporary folder and moved into place only when
//! everything succeeded ([`crate::io::outdir`]).

use crate::error::{Error, Result};
use crate::io::outdir::Staging;
use crate::io::output::{self, CsvOut};
use crate::io::scenario::Scenario;
use crate::model::summary::{node_totals, summarise, CatchmentSummary};
use crate::model::{project_catchment, YearResult};
use crate::plot::series::{CoverChart, Line, LineChart};
use crate::plot::{palette, save_figure, Formats};
use std::path::{Path, PathBuf};

/// Name of the reference strategy (no control).
pub const NO_CONTROL: &str = "no-control";

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
    /// Figures drawn.
    pub figures: usize,
    /// Per-catchment summaries (table order).
    pub summaries: Vec<CatchmentSummary>,
}

/// Runs the projection and writes every output.
pub fn run(scenario: &Scenario, opts: &RunOptions) -> Result<RunOutcome> {
    let staging = Staging::new(&opts.out, opts.force)?;
    let dir = staging.dir().to_path_buf();
    let contaminants = &scenario.params.contaminants;
    let draw = match opts.figures {
        FigureChoice::All => true,
        FigureChoice::None => false,
        FigureChoice::Auto => scenario.catchments.len() <= AUTO_FIGURE_LIMIT,
    };
    let in_network: Vec<bool> = {
        let mut v: Vec<bool> = (0..scenario.catchments.len()).map(|i| scenario.network.downstream(i).is_some()).collect();
        for n in scenario.network.receiving_nodes() {
            v[n] = true;
        }
        v
    };

    let mut yearly = CsvOut::create(&dir.join("yearly.csv"), &output::yearly_header(contaminants))?;
    let mut summaries = Vec::with_capacity(scenario.catchments.len());
    let mut kept: Vec<Option<Vec<YearResult>>> = Vec::with_capacity(scenario.catchments.len());
    let mut n_figures = 0;
    if draw {
        std::fs::create_dir_all(dir.join("figures")).map_err(|e| Error::io("creating figures/", e))?;
    }
    for (i, c) in scenario.catchments.iter().enumerate() {
        let climate = scenario.climate_series(i);
        let years = project_catchment(c, &climate, &scenario.params, scenario.start_year);
        for y in &years {
            let f = output::yearly_fields(c, NO_CONTROL, y, contaminants);
            yearly.row(f.iter().map(String::as_str))?;
        }
        summaries.push(summarise(c, &years, contaminants));
        if draw {
            n_figures += catchment_figures(&dir.join("figures"), scenario, i, &years, opts.formats)?;
        }
        kept.push(in_network[i].then_some(years));
    }
    yearly.finish()?;

    let mut summary = CsvOut::create(&dir.join("summary.csv"), &output::summary_header(contaminants))?;
    for (c, s) in scenario.catchments.iter().zip(&summaries) {
        summary.row(output::summary_fields(c, NO_CONTROL, s).iter().map(String::as_str))?;
    }
    summary.finish()?;

    write_nodes(&dir, scenario, kept)?;
    output::write_run_info(&dir, &run_info(scenario))?;
    let out = staging.commit()?;
    Ok(RunOutcome {
        out,
        catchments: scenario.catchments.len(),
        years: scenario.horizon_years + 1,
        figures: n_figures,
        summaries,
    })
}

fn write_nodes(dir: &Path, scenario: &Scenario, kept: Vec<Option<Vec<YearResult>>>) -> Result<()> {
    let contaminants = &scenario.params.contaminants;
    let mut nodes = CsvOut::create(&dir.join("nodes.csv"), &output::nodes_header(contaminants))?;
    if !scenario.network.receiving_nodes().is_empty() {
        // Catchments outside any network contribute nothing to node sums; give them empty rows of zeros.
        let n_years = scenario.horizon_years + 1;
        let projections: Vec<Vec<YearResult>> = kept
            .into_iter()
            .map(|p| p.unwrap_or_else(|| zero_years(scenario.start_year, n_years, contaminants.len())))
            .collect();
        let counts = scenario.network.upstream_counts();
        for (n, rows) in node_totals(&scenario.network, &scenario.catchments, &projections, contaminants.len(), scenario.params.min_runoff_mm) {
            for y in &rows {
                let f = output::node_fields(&scenario.catchments[n].id, NO_CONTROL, counts[n], y, contaminants);
                nodes.row(f.iter().map(String::as_str))?;
            }
        }
    }
    nodes.finish()
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
    serde_json::json!({
        "tool": "yieldshift",
        "version": env!("CARGO_PKG_VERSION"),
        "title": s.title,
        "scenario": s.path.display().to_string(),
        "catchment_table": s.catchments_path.display().to_string(),
        "climate_table": s.climate_path.as_ref().map(|p| p.display().to_string()),
        "start_year": s.start_year,
        "horizon_years": s.horizon_years,
        "catchments": s.catchments.len(),
        "hydrology_method": s.params.curves.method_name(),
        "strategies": [NO_CONTROL],
        "contaminants": s.params.contaminants.iter().map(|c| c.name.clone()).collect::<Vec<_>>(),
        "cautions": output::CAUTIONS,
    })
}

/// Safe file-name stem for a catchment id.
pub fn file_stem(id: &str) -> String {
    id.chars().map(|c| if c.is_ascii_alphanumeric() || c == '-' || c == '_' { c } else { '_' }).collect()
}

fn catchment_figures(dir: &Path, s: &Scenario, i: usize, years: &[YearResult], formats: Formats) -> Result<usize> {
    let c = &s.catchments[i];
    let stem = file_stem(&c.id);
    let xs: Vec<f64> = years.iter().map(|y| y.year as f64).collect();
    let pts = |f: &dyn Fn(&YearResult) -> Option<f64>| xs.iter().zip(years).map(|(&x, y)| (x, f(y))).collect::<Vec<_>>();
    let yield_chart = LineChart {
        title: format!("{} — water yield", c.name),
        y_label: "Water yield (mm/yr)".into(),
        lines: vec![
            Line { label: "Projected".into(), points: pts(&|y| Some(y.yield_mm)), colour: palette::YIELD, dashed: false },
            Line { label: "Baseline (current cover held)".into(), points: pts(&|y| Some(y.baseline_yield_mm)), colour: palette::BASELINE, dashed: true },
            Line { label: "No invasion".into(), points: pts(&|y| Some(y.uninvaded_yield_mm)), colour: palette::UNINVADED, dashed: true },
        ],
        thresholds: vec![],
        y_from_zero: true,
    };
    save_figure(&yield_chart, &dir.join(format!("{stem}_yield")), formats)?;
    let mut n = 1;
    for (k, m) in s.params.contaminants.iter().enumerate() {
        let chart = LineChart {
            title: format!("{} — {} concentration", c.name, m.name),
            y_label: format!("{} (mg/L)", m.name),
            lines: vec![Line { label: "Projected".into(), points: pts(&|y| y.concentrations[k].ok()), colour: palette::series(k + 1), dashed: false }],
            thresholds: m.guideline_mg_per_l.map(|g| vec![(format!("Guideline {g} mg/L"), g, palette::GUIDELINE)]).unwrap_or_default(),
            y_from_zero: true,
        };
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
