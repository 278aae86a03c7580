//! Reading a run folder: `run_info.json`, the CSV tables, the copied inputs and the
//! list of figures. Nothing is recomputed; every value the report shows is read
//! here. A hand-edited or damaged file gives [`Error::Invalid`] naming the file,
//! the row (spreadsheet numbering, header = row 1) and the column — never a panic.

mod csv_table;
mod labels;
mod rows;

pub use crate::schema::run_info::{ContaminantInfo, RunInfo};
pub use csv_table::CsvTable;
pub use rows::*;

use crate::error::{Error, Problem, Result};
use crate::schema::columns::{ensemble, sensitivity, summary, yearly};
use crate::schema::{
    BASIN_ID, ENSEMBLE_FILE, FIGURES_DIR, INPUTS_DIR, NO_CONTROL, RUN_INFO_FILE, SENSITIVITY_FILE, SUMMARY_FILE, YEARLY_FILE,
};
use csv_table::MAX_PROBLEMS;
use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// Most catchments given a detailed section in the report (the largest losses at the horizon).
pub const MAX_DETAILED: usize = 30;
/// Most catchments drawn in Budyko space (the largest changes at the horizon).
pub const BUDYKO_MAX: usize = 8;

/// The scenario file copied into `inputs/`.
#[derive(Debug, Clone)]
pub struct ScenarioDoc {
    /// Path relative to the run folder.
    pub name: String,
    /// Parsed TOML.
    pub table: toml::Table,
}

/// Everything the report reads from a run folder.
#[derive(Debug, Clone)]
pub struct RunData {
    /// The folder.
    pub dir: PathBuf,
    /// `run_info.json`.
    pub info: RunInfo,
    /// Years after the start with a `yield_change_<o>y_pct` column, ascending.
    pub offsets: Vec<i32>,
    /// `summary.csv` rows of catchments (`local`) and the basin, in file order.
    pub summary: Vec<SummaryRow>,
    /// `summary.csv` rows of what arrives at each receiving node (`arriving`), in file order.
    pub arriving: Vec<SummaryRow>,
    /// Catchments (id, name, area) in summary order, without the basin.
    pub catchments: Vec<(String, String, f64)>,
    /// Name of the basin row, if any.
    pub basin_name: Option<String>,
    /// `yearly.csv` by (catchment, strategy).
    pub yearly: BTreeMap<(String, String), Vec<YearRow>>,
    /// `nodes.csv` by (node, strategy).
    pub nodes: BTreeMap<(String, String), Vec<NodeYear>>,
    /// `delay.csv` rows.
    pub delay: Vec<DelayRow>,
    /// `budget.csv` totals by (strategy, pool).
    pub budget: BTreeMap<(String, String), BudgetTotals>,
    /// `ensemble.csv`, when present.
    pub ensemble: Option<Ensemble>,
    /// `economics.csv` (programme economics over ensemble members), when present.
    pub economics: Option<rows::Economics>,
    /// `sensitivity.csv`, when present.
    pub sensitivity: Option<Vec<SensitivityRow>>,
    /// Readable parameter names of `sensitivity.csv` by key path (its `label` column).
    pub param_labels: BTreeMap<String, String>,
    /// The scenario copied into `inputs/`.
    pub scenario: Option<ScenarioDoc>,
    /// The catchment table copied into `inputs/`.
    pub catchment_input: Option<CsvTable>,
    /// The climate table copied into `inputs/`.
    pub climate_input: Option<CsvTable>,
    /// File names present in `figures/`.
    pub figures: BTreeSet<String>,
    /// Catchments given a detailed section (all, or the largest losses up to the limit read with).
    pub detailed: BTreeSet<String>,
    /// Catchments drawn in Budyko space (all, or the [`BUDYKO_MAX`] largest changes).
    pub budyko: BTreeSet<String>,
    /// Years flagged low-runoff in `yearly.csv` without control, per catchment.
    pub low_runoff_years: BTreeMap<String, usize>,
    /// Index of `summary` by (catchment, strategy).
    pub summary_index: std::collections::HashMap<(String, String), usize>,
}

impl RunData {
    /// The catchments given a detailed subsection, in table order: all of them, or
    /// those with the largest yield loss at the horizon up to the limit ([`read_run_with`]).
    pub fn detailed_catchments(&self) -> Vec<&(String, String, f64)> {
        self.catchments.iter().filter(|c| self.detailed.contains(&c.0)).collect()
    }

    /// Summary row of a catchment (or `basin`) and strategy.
    pub fn summary_row(&self, catchment: &str, strategy: &str) -> Option<&SummaryRow> {
        self.summary_index.get(&(catchment.to_string(), strategy.to_string())).map(|&i| &self.summary[i])
    }

    /// Years of a catchment and strategy.
    pub fn years(&self, catchment: &str, strategy: &str) -> &[YearRow] {
        self.yearly.get(&(catchment.to_string(), strategy.to_string())).map(Vec::as_slice).unwrap_or(&[])
    }

    /// True when `figures/<file>` exists.
    pub fn has_figure(&self, file: &str) -> bool {
        self.figures.contains(file)
    }

    /// A ranked parameter as a reader names it (its key path when the folder has no label).
    pub fn param_label<'a>(&'a self, path: &'a str) -> &'a str {
        self.param_labels.get(path).map_or(path, String::as_str)
    }

    /// Strategies other than `no-control`.
    pub fn programmes(&self) -> impl Iterator<Item = &String> {
        self.info.strategies.iter().filter(|s| s.as_str() != NO_CONTROL)
    }
}

fn file_name(p: &str) -> Option<String> {
    Path::new(p).file_name().map(|n| n.to_string_lossy().into_owned())
}

/// Reads the run folder `dir`, detailing at most [`MAX_DETAILED`] catchments.
pub fn read_run(dir: &Path) -> Result<RunData> {
    read_run_with(dir, MAX_DETAILED)
}

/// Reads the run folder `dir`; the `detail_limit` catchments with the largest
/// yield loss at the horizon are given their own pages (and range figures).
pub fn read_run_with(dir: &Path, detail_limit: usize) -> Result<RunData> {
    if !dir.is_dir() {
        return Err(Error::invalid(Problem::in_file(dir, "is not a folder; give the output folder of `yieldshift run`")));
    }
    let missing: Vec<Problem> = [RUN_INFO_FILE, SUMMARY_FILE, YEARLY_FILE]
        .iter()
        .filter(|f| !dir.join(f).is_file())
        .map(|f| Problem::in_file(&dir.join(f), "is missing; the report needs it (is this the output folder of `yieldshift run`?)"))
        .collect();
    if !missing.is_empty() {
        return Err(Error::Invalid(missing));
    }
    let info = RunInfo::read(dir)?;
    let names: Vec<String> = info.contaminants.iter().map(|c| c.name.clone()).collect();

    let mut problems = Vec::new();
    let summary_t = CsvTable::read(dir, SUMMARY_FILE)?.ok_or_else(|| gone(dir, SUMMARY_FILE))?;
    let (offsets, all_rows) = read_summary(&summary_t, &names, &mut problems);
    fail_on(&mut problems)?;
    let (arriving, summary): (Vec<SummaryRow>, Vec<SummaryRow>) =
        all_rows.into_iter().partition(|r| r.scope == crate::schema::columns::scope::ARRIVING);
    let index = SummaryIndex::build(&dir.join(SUMMARY_FILE), &info, &summary, &mut problems);
    fail_on(&mut problems)?;

    // Which catchments the report details and draws: all in small basins.
    let horizon = |id: &str| {
        index.rows.get(&(id.to_string(), NO_CONTROL.to_string())).and_then(|&k| summary[k].get(summary::YIELD_CHANGE_HORIZON_PCT))
    };
    let largest = |n: usize, key: &dyn Fn(&str) -> f64| -> BTreeSet<String> {
        let mut ids: Vec<&String> = index.catchments.iter().map(|c| &c.0).collect();
        ids.sort_by(|a, b| key(a).total_cmp(&key(b)).then_with(|| a.cmp(b)));
        ids.into_iter().take(n).cloned().collect()
    };
    let detailed = largest(detail_limit, &|id| horizon(id).unwrap_or(0.0));
    let budyko = largest(BUDYKO_MAX, &|id| -horizon(id).map_or(0.0, f64::abs));

    let keep: BTreeSet<&String> = detailed.iter().chain(budyko.iter()).collect();
    let (yearly, low_runoff_years) = read_yearly_kept(dir, &info, &names, &index.catchments, &keep, &mut problems)?;
    let nodes = CsvTable::read(dir, crate::schema::NODES_FILE)?.map(|t| read_nodes(&t, &names, &mut problems)).unwrap_or_default();
    let delay = CsvTable::read(dir, crate::schema::DELAY_FILE)?.map(|t| read_delay(&t, &mut problems)).unwrap_or_default();
    let budget = CsvTable::read(dir, crate::schema::BUDGET_FILE)?.map(|t| read_budget(&t, &mut problems)).unwrap_or_default();
    let ensemble = read_ensemble_kept(dir, &info, &offsets, &detailed, &mut problems)?;
    let sensitivity_t = CsvTable::read_filtered(dir, SENSITIVITY_FILE, |h, rec| {
        let ci = h.iter().position(|x| x == sensitivity::CATCHMENT).unwrap_or(usize::MAX);
        rec.get(ci).map(str::trim).is_some_and(|c| c == BASIN_ID || detailed.contains(c))
    })?;
    let sensitivity = sensitivity_t.map(|t| read_sensitivity(&t, &mut problems));
    let economics = CsvTable::read(dir, crate::schema::columns::economics::FILE)?.map(|t| rows::read_economics(&t, &mut problems));
    fail_on(&mut problems)?;

    let (scenario, catchment_input, climate_input) = read_inputs(dir, &info)?;
    let figures = match std::fs::read_dir(dir.join(FIGURES_DIR)) {
        Ok(rd) => rd.filter_map(|e| e.ok()).map(|e| e.file_name().to_string_lossy().into_owned()).collect(),
        Err(_) => BTreeSet::new(),
    };
    Ok(RunData {
        dir: dir.to_path_buf(),
        info,
        offsets,
        summary,
        arriving,
        catchments: index.catchments,
        basin_name: index.basin_name,
        yearly,
        nodes,
        delay,
        budget,
        ensemble,
        economics,
        sensitivity,
        param_labels: labels::read_param_labels(dir)?,
        scenario,
        catchment_input,
        climate_input,
        figures,
        detailed,
        budyko,
        low_runoff_years,
        summary_index: index.rows,
    })
}

fn gone(dir: &Path, f: &str) -> Error {
    Error::invalid(Problem::in_file(&dir.join(f), "disappeared while the report was reading the folder"))
}

/// `Err` with the problems found so far (at most [`MAX_PROBLEMS`]), if any.
fn fail_on(problems: &mut Vec<Problem>) -> Result<()> {
    problems.truncate(MAX_PROBLEMS);
    if problems.is_empty() {
        Ok(())
    } else {
        Err(Error::Invalid(std::mem::take(problems)))
    }
}

/// The catchments of `summary.csv`, checked against `run_info.json`.
struct SummaryIndex {
    /// (id, name, area) in summary order, without the basin.
    catchments: Vec<(String, String, f64)>,
    basin_name: Option<String>,
    /// First row of each (catchment, strategy).
    rows: std::collections::HashMap<(String, String), usize>,
}

impl SummaryIndex {
    fn build(path: &Path, info: &RunInfo, summary: &[SummaryRow], problems: &mut Vec<Problem>) -> SummaryIndex {
        let mut catchments: Vec<(String, String, f64)> = Vec::new();
        let mut seen = std::collections::HashSet::new();
        let mut rows = std::collections::HashMap::new();
        let mut basin_name = None;
        for (k, r) in summary.iter().enumerate() {
            rows.entry((r.catchment.clone(), r.strategy.clone())).or_insert(k);
            if r.catchment == BASIN_ID {
                basin_name.get_or_insert_with(|| r.name.clone());
            } else if seen.insert(r.catchment.clone()) {
                catchments.push((r.catchment.clone(), r.name.clone(), r.area_ha));
            }
            if !info.strategies.contains(&r.strategy) && problems.len() < MAX_PROBLEMS {
                problems.push(
                    Problem::in_file(path, format!("strategy '{}' is not among run_info.json's strategies", r.strategy))
                        .column(summary::STRATEGY),
                );
            }
        }
        if catchments.is_empty() {
            problems.push(Problem::in_file(path, "has no catchment rows"));
        }
        for (id, _, _) in &catchments {
            for st in &info.strategies {
                if !rows.contains_key(&(id.clone(), st.clone())) && problems.len() < MAX_PROBLEMS {
                    problems.push(Problem::in_file(path, format!("has no row for catchment '{id}' under strategy '{st}'")));
                }
            }
        }
        SummaryIndex { catchments, basin_name, rows }
    }
}

/// `yearly.csv`, streamed: rows kept only for the catchments in `keep`, without
/// control; every (catchment, strategy) checked present; low-runoff years counted.
type YearlyKept = (BTreeMap<(String, String), Vec<YearRow>>, BTreeMap<String, usize>);

fn read_yearly_kept(
    dir: &Path,
    info: &RunInfo,
    names: &[String],
    catchments: &[(String, String, f64)],
    keep: &BTreeSet<&String>,
    problems: &mut Vec<Problem>,
) -> Result<YearlyKept> {
    let mut year_keys: std::collections::HashSet<(String, String)> = std::collections::HashSet::new();
    let mut low_runoff_years: BTreeMap<String, usize> = BTreeMap::new();
    let mut cols: Option<(usize, usize, Option<usize>)> = None;
    let yearly_t = CsvTable::read_filtered(dir, YEARLY_FILE, |h, rec| {
        let (ci, si, fi) = *cols.get_or_insert_with(|| {
            let find = |n: &str| h.iter().position(|x| x == n).unwrap_or(usize::MAX);
            (find(yearly::CATCHMENT), find(yearly::STRATEGY), h.iter().position(|x| x == yearly::FLAGS))
        });
        let (Some(c), Some(st)) = (rec.get(ci), rec.get(si)) else { return true };
        let (c, st) = (c.trim(), st.trim());
        if !year_keys.contains(&(c.to_string(), st.to_string())) {
            year_keys.insert((c.to_string(), st.to_string()));
        }
        if st != NO_CONTROL {
            return false;
        }
        if fi.and_then(|f| rec.get(f)).is_some_and(|f| f.contains(crate::schema::columns::flags::LOW_RUNOFF)) {
            *low_runoff_years.entry(c.to_string()).or_insert(0) += 1;
        }
        keep.iter().any(|k| k.as_str() == c)
    })?
    .ok_or_else(|| gone(dir, YEARLY_FILE))?;
    let yearly = read_yearly(&yearly_t, names, problems);
    for (id, _, _) in catchments {
        for st in &info.strategies {
            if !year_keys.contains(&(id.clone(), st.clone())) && problems.len() < MAX_PROBLEMS {
                problems.push(Problem::in_file(&dir.join(YEARLY_FILE), format!("has no rows for catchment '{id}' under strategy '{st}'")));
            }
        }
    }
    Ok((yearly, low_runoff_years))
}

/// `ensemble.csv`, streamed: full series for the basin and the detailed
/// catchments, and the yield change at the reported years for every catchment.
fn read_ensemble_kept(
    dir: &Path,
    info: &RunInfo,
    offsets: &[i32],
    detailed: &BTreeSet<String>,
    problems: &mut Vec<Problem>,
) -> Result<Option<Ensemble>> {
    let report_years: BTreeSet<String> =
        offsets.iter().map(|o| (info.start_year + o).to_string()).chain(std::iter::once(info.end_year().to_string())).collect();
    let mut members_seen = 0.0f64;
    let mut ecols: Option<[usize; 6]> = None;
    let ensemble_t = CsvTable::read_filtered(dir, ENSEMBLE_FILE, |h, rec| {
        let [ci, _si, yi, vi, mi, sc] = *ecols.get_or_insert_with(|| {
            let find = |n: &str| h.iter().position(|x| x == n).unwrap_or(usize::MAX);
            [
                find(ensemble::CATCHMENT),
                find(ensemble::STRATEGY),
                find(ensemble::YEAR),
                find(ensemble::VARIABLE),
                find(ensemble::MEMBERS),
                find(ensemble::SCOPE),
            ]
        });
        let get = |i: usize| rec.get(i).map(str::trim).unwrap_or("");
        if let Ok(m) = get(mi).parse::<f64>() {
            members_seen = members_seen.max(m);
        }
        let c = get(ci);
        c == BASIN_ID
            || get(sc) == crate::schema::columns::scope::ARRIVING
            || detailed.contains(c)
            || (get(vi) == ensemble::YIELD_CHANGE_10YR_MEAN_PCT && report_years.contains(get(yi)))
    })?;
    Ok(ensemble_t.map(|t| {
        let mut e = read_ensemble(&t, problems);
        e.members = e.members.max(members_seen);
        e
    }))
}

/// The inputs copied by the run (optional: older runs did not copy them).
fn read_inputs(dir: &Path, info: &RunInfo) -> Result<(Option<ScenarioDoc>, Option<CsvTable>, Option<CsvTable>)> {
    let copied = |n: String| format!("{INPUTS_DIR}/{n}");
    let scenario = match file_name(&info.scenario).map(copied) {
        Some(rel) if dir.join(&rel).is_file() => {
            let p = dir.join(&rel);
            let text = std::fs::read_to_string(&p).map_err(|e| Error::io(format!("reading {}", p.display()), e))?;
            let table = text
                .strip_prefix('\u{feff}')
                .unwrap_or(&text)
                .parse::<toml::Table>()
                .map_err(|e| Error::invalid(Problem::in_file(&p, format!("is not valid TOML: {}", e.message()))))?;
            Some(ScenarioDoc { name: rel, table })
        }
        _ => None,
    };
    let catchment_input = match file_name(&info.catchment_table) {
        Some(n) => CsvTable::read_input(dir, &copied(n))?,
        None => None,
    };
    let climate_input = match info.climate_table.as_deref().and_then(file_name) {
        Some(n) => CsvTable::read_input(dir, &copied(n))?,
        None => None,
    };
    Ok((scenario, catchment_input, climate_input))
}
