//! The rows of the run's tables as the report uses them, and their readers. Every
//! column is named through [`crate::schema::columns`].

use super::csv_table::{CsvTable, MAX_PROBLEMS};
use crate::error::Problem;
use crate::schema::columns::{self, budget, delay, ensemble, flags, nodes, sensitivity, summary, yearly};
use std::collections::{BTreeMap, BTreeSet};

/// One row of `summary.csv`.
#[derive(Debug, Clone)]
pub struct SummaryRow {
    /// Catchment id (or `basin`).
    pub catchment: String,
    /// `local`, `arriving` (what reaches a receiving node) or `basin`.
    pub scope: String,
    /// Display name.
    pub name: String,
    /// Strategy.
    pub strategy: String,
    /// Area, ha.
    pub area_ha: f64,
    /// Yield change at each of [`super::RunData::offsets`], %.
    pub at_offsets: Vec<Option<f64>>,
    /// Numeric columns by name (empty cells absent).
    pub values: BTreeMap<String, f64>,
    /// First exceedance year per contaminant (run_info order), when not above at the start.
    pub first_exceedance: Vec<Option<i32>>,
    /// Guideline status word per contaminant (`above-at-start`, `exceeded`,
    /// `not-exceeded`; empty without a guideline or in older runs).
    pub status: Vec<String>,
    /// First year exceeded because of the invasion, per contaminant.
    pub invasion_first: Vec<Option<i32>>,
    /// Years exceeded because of the invasion, per contaminant.
    pub invasion_years: Vec<Option<i32>>,
}

impl SummaryRow {
    /// A numeric column (None when the cell is empty).
    pub fn get(&self, col: &str) -> Option<f64> {
        self.values.get(col).copied()
    }
}

/// One year of `yearly.csv` for one catchment and strategy.
#[derive(Debug, Clone, PartialEq)]
pub struct YearRow {
    /// Year.
    pub year: i32,
    /// Rainfall, mm.
    pub rain_mm: f64,
    /// PET (grass), mm.
    pub pet_mm: f64,
    /// Evapotranspiration, mm.
    pub et_mm: f64,
    /// Yield, mm.
    pub yield_mm: f64,
    /// Baseline yield, mm.
    pub baseline_yield_mm: f64,
    /// No-invasion yield, mm.
    pub uninvaded_yield_mm: f64,
    /// Canopy fraction.
    pub canopy_fraction: f64,
    /// Scattered, medium, dense area, ha.
    pub classes: [f64; 3],
    /// Control cost, $.
    pub control_cost: f64,
    /// Water saved vs no-control, m³.
    pub water_saved_m3: f64,
    /// Concentration per contaminant (run_info order), mg/L.
    pub conc: Vec<Option<f64>>,
    /// True when any concentration of the year was flagged as low runoff.
    pub low_runoff: bool,
}

/// Percentiles of one ensemble variable in one year.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quantiles {
    /// 5th percentile.
    pub p5: f64,
    /// 25th percentile.
    pub p25: f64,
    /// Median.
    pub p50: f64,
    /// 75th percentile.
    pub p75: f64,
    /// 95th percentile.
    pub p95: f64,
    /// Mean.
    pub mean: f64,
    /// Members contributing.
    pub members: f64,
    /// Share of members above the guideline (concentrations only), 0–1.
    pub prob_above_guideline: Option<f64>,
}

/// `ensemble.csv`, keyed by (catchment, strategy, variable, year); the rows of
/// what arrives at receiving nodes are kept apart, in `arriving`.
#[derive(Debug, Clone, Default)]
pub struct Ensemble {
    /// Percentiles of `local` and `basin` rows.
    pub rows: BTreeMap<(String, String, String, i32), Quantiles>,
    /// Percentiles of `arriving` rows (by node id).
    pub arriving: BTreeMap<(String, String, String, i32), Quantiles>,
    /// Largest member count seen.
    pub members: f64,
}

type EnsembleKey = (String, String, String, i32);

fn key(catchment: &str, strategy: &str, variable: &str, year: i32) -> EnsembleKey {
    (catchment.to_string(), strategy.to_string(), variable.to_string(), year)
}

fn series_of(rows: &BTreeMap<EnsembleKey, Quantiles>, catchment: &str, strategy: &str, variable: &str) -> Vec<(i32, Quantiles)> {
    rows.range(key(catchment, strategy, variable, i32::MIN)..=key(catchment, strategy, variable, i32::MAX))
        .map(|(k, q)| (k.3, *q))
        .collect()
}

impl Ensemble {
    /// Percentiles of `variable` for a catchment (its own, `local`) or the basin, strategy and year.
    pub fn get(&self, catchment: &str, strategy: &str, variable: &str, year: i32) -> Option<&Quantiles> {
        self.rows.get(&key(catchment, strategy, variable, year))
    }

    /// Percentiles of `variable` for what arrives at node `node`.
    pub fn get_arriving(&self, node: &str, strategy: &str, variable: &str, year: i32) -> Option<&Quantiles> {
        self.arriving.get(&key(node, strategy, variable, year))
    }

    /// Percentiles of `variable` in a row of scope `in_scope` (`arriving` rows are
    /// kept apart; `local` and `basin` rows share `get`).
    pub fn get_in(&self, in_scope: &str, catchment: &str, strategy: &str, variable: &str, year: i32) -> Option<&Quantiles> {
        if in_scope == columns::scope::ARRIVING {
            self.get_arriving(catchment, strategy, variable, year)
        } else {
            self.get(catchment, strategy, variable, year)
        }
    }

    /// The series of `variable` over years (`local` or `basin`).
    pub fn series(&self, catchment: &str, strategy: &str, variable: &str) -> Vec<(i32, Quantiles)> {
        series_of(&self.rows, catchment, strategy, variable)
    }

    /// The series of `variable` over years at node `node`.
    pub fn series_arriving(&self, node: &str, strategy: &str, variable: &str) -> Vec<(i32, Quantiles)> {
        series_of(&self.arriving, node, strategy, variable)
    }

    /// Catchments (and `basin`) present.
    pub fn catchments(&self) -> BTreeSet<&str> {
        self.rows.keys().map(|k| k.0.as_str()).collect()
    }
}

/// One row of `sensitivity.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct SensitivityRow {
    /// Catchment id or `basin`.
    pub catchment: String,
    /// Strategy.
    pub strategy: String,
    /// When evaluated (`year-20`, `horizon`).
    pub at: String,
    /// Year evaluated.
    pub year: i32,
    /// Output variable, when the file names one.
    pub variable: Option<String>,
    /// Parameter (scenario key path).
    pub parameter: String,
    /// Spearman rank correlation (`None` when undefined, e.g. a constant result).
    pub spearman_rho: Option<f64>,
    /// Standardised regression coefficient.
    pub src: Option<f64>,
    /// Rank (1 = most influential).
    pub rank: u32,
}

/// One row of `delay.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct DelayRow {
    /// Strategy.
    pub strategy: String,
    /// Delay, years.
    pub delay_yr: i32,
    /// Start year after the delay.
    pub start_year: i32,
    /// Nominal cost, $.
    pub total_cost: f64,
    /// PV cost, $.
    pub total_cost_pv: f64,
    /// Water saved, m³.
    pub water_saved_m3: f64,
    /// Water lost vs baseline, m³.
    pub water_lost_vs_baseline_m3: f64,
    /// Infested area at the horizon, ha.
    pub final_infested_ha: f64,
}

/// Totals of `budget.csv` for one strategy and pool.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct BudgetTotals {
    /// Sum of available budget, $ (`None` when unlimited).
    pub available: Option<f64>,
    /// Spent, $.
    pub spent: f64,
    /// Unspent, $.
    pub unspent: f64,
    /// Sum of the area to treat, ha, of a fixed-area programme (`None` for a budget
    /// programme, or a folder written before `budget.csv` had hectare columns).
    pub available_ha: Option<f64>,
    /// Area treated, ha (0 in a folder written before `budget.csv` had it).
    pub treated_ha: f64,
    /// Years.
    pub years: usize,
}

/// One row of `nodes.csv`.
#[derive(Debug, Clone, PartialEq)]
pub struct NodeYear {
    /// Year.
    pub year: i32,
    /// Upstream catchments (including the node).
    pub upstream: i32,
    /// Yield change vs baseline, %.
    pub change_pct: Option<f64>,
    /// Volume arriving, m³ (0 in runs that did not write it).
    pub yield_m3: f64,
    /// Baseline volume arriving, m³ (0 in runs that did not write it).
    pub baseline_yield_m3: f64,
    /// Concentrations per contaminant, mg/L.
    pub conc: Vec<Option<f64>>,
}

pub(super) fn read_summary(t: &CsvTable, contaminants: &[String], problems: &mut Vec<Problem>) -> (Vec<i32>, Vec<SummaryRow>) {
    // `scope` is optional: older runs had local and basin rows only.
    let id_cols: Vec<&str> = summary::ID.iter().copied().filter(|c| *c != summary::SCOPE).collect();
    let id = t.require(&id_cols, problems);
    let scope_col = t.col(summary::SCOPE);
    let optional = |f: fn(&str) -> String| -> Vec<Option<usize>> { contaminants.iter().map(|c| t.col(&f(c))).collect() };
    let status_cols = optional(summary::guideline_status);
    let invasion_first_cols = optional(summary::invasion_exceedance_first_year);
    let invasion_years_cols = optional(summary::invasion_exceedance_years);
    let mut offsets: Vec<(i32, usize)> =
        t.headers.iter().enumerate().filter_map(|(i, h)| summary::offset_of(h).map(|o| (o as i32, i))).collect();
    offsets.sort();
    let named: Vec<&str> = summary::HORIZON.iter().chain(&summary::ECONOMICS).copied().collect();
    let cols = t.require(&named, problems);
    let exceed: Vec<usize> = contaminants.iter().map(|c| t.require(&[summary::first_exceedance_year(c).as_str()], problems)[0]).collect();
    if !problems.is_empty() {
        return (vec![], vec![]);
    }
    let mut rows = Vec::with_capacity(t.rows.len());
    for r in 0..t.rows.len() {
        let mut values = BTreeMap::new();
        for (name, &c) in named.iter().zip(&cols) {
            if let Some(v) = t.num(r, c, problems) {
                values.insert(name.to_string(), v);
            }
        }
        let catchment = t.text(r, id[0]).to_string();
        let scope = match scope_col {
            Some(c) => t.text(r, c).to_string(),
            None if catchment == crate::schema::BASIN_ID => columns::scope::BASIN.to_string(),
            None => columns::scope::LOCAL.to_string(),
        };
        if !columns::scope::ORDER.contains(&scope.as_str()) {
            problems.push(
                Problem::in_file(&t.path, format!("'{scope}' is not a scope; expected one of {}", columns::scope::ORDER.join(", ")))
                    .row(t.lines[r])
                    .column(summary::SCOPE),
            );
        }
        let ints = |cols: &[Option<usize>], p: &mut Vec<Problem>| cols.iter().map(|c| c.and_then(|c| t.int(r, c, p))).collect();
        rows.push(SummaryRow {
            catchment,
            scope,
            name: t.text(r, id[1]).to_string(),
            strategy: t.text(r, id[2]).to_string(),
            area_ha: t.req_num(r, id[3], problems),
            at_offsets: offsets.iter().map(|&(_, c)| t.num(r, c, problems)).collect(),
            values,
            first_exceedance: exceed.iter().map(|&c| t.int(r, c, problems)).collect(),
            status: status_cols.iter().map(|c| c.map(|c| t.text(r, c).to_string()).unwrap_or_default()).collect(),
            invasion_first: ints(&invasion_first_cols, problems),
            invasion_years: ints(&invasion_years_cols, problems),
        });
    }
    (offsets.into_iter().map(|o| o.0).collect(), rows)
}

pub(super) fn read_yearly(t: &CsvTable, contaminants: &[String], problems: &mut Vec<Problem>) -> BTreeMap<(String, String), Vec<YearRow>> {
    use yearly::*;
    let c = t.require(
        &[
            CATCHMENT,
            STRATEGY,
            YEAR,
            RAIN_MM,
            PET_MM,
            ET_MM,
            YIELD_MM,
            BASELINE_YIELD_MM,
            UNINVADED_YIELD_MM,
            CANOPY_FRACTION,
            SCATTERED_HA,
            MEDIUM_HA,
            DENSE_HA,
            CONTROL_COST,
            WATER_SAVED_M3,
        ],
        problems,
    );
    let conc: Vec<usize> = contaminants.iter().map(|n| t.require(&[columns::mg_per_l(n).as_str()], problems)[0]).collect();
    let flag_col = t.col(FLAGS);
    let mut out: BTreeMap<(String, String), Vec<YearRow>> = BTreeMap::new();
    if !problems.is_empty() {
        return out;
    }
    for r in 0..t.rows.len() {
        let Some(year) = t.int(r, c[2], problems) else {
            if t.text(r, c[2]).is_empty() {
                problems.push(Problem::in_file(&t.path, "is empty; a year is required").row(t.lines[r]).column(YEAR));
            }
            continue;
        };
        let n = |k: usize, p: &mut Vec<Problem>| t.req_num(r, c[k], p);
        let row = YearRow {
            year,
            rain_mm: n(3, problems),
            pet_mm: n(4, problems),
            et_mm: n(5, problems),
            yield_mm: n(6, problems),
            baseline_yield_mm: n(7, problems),
            uninvaded_yield_mm: n(8, problems),
            canopy_fraction: n(9, problems),
            classes: [n(10, problems), n(11, problems), n(12, problems)],
            control_cost: n(13, problems),
            water_saved_m3: n(14, problems),
            conc: conc.iter().map(|&k| t.num(r, k, problems)).collect(),
            low_runoff: flag_col.is_some_and(|f| t.text(r, f).contains(flags::LOW_RUNOFF)),
        };
        out.entry((t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string())).or_default().push(row);
        if problems.len() >= MAX_PROBLEMS {
            break;
        }
    }
    for ((id, st), rows) in &out {
        if rows.windows(2).any(|w| w[1].year != w[0].year + 1) {
            problems.push(Problem::in_file(&t.path, format!("years of catchment '{id}' under '{st}' are not consecutive")));
        }
    }
    out
}

pub(super) fn read_nodes(t: &CsvTable, contaminants: &[String], problems: &mut Vec<Problem>) -> BTreeMap<(String, String), Vec<NodeYear>> {
    let c = t.require(&[nodes::NODE, nodes::STRATEGY, nodes::YEAR, nodes::UPSTREAM_CATCHMENTS, nodes::YIELD_CHANGE_PCT], problems);
    let conc: Vec<usize> = contaminants.iter().map(|n| t.require(&[columns::mg_per_l(n).as_str()], problems)[0]).collect();
    let (vol, base) = (t.col(nodes::YIELD_M3), t.col(nodes::BASELINE_YIELD_M3));
    let mut out: BTreeMap<(String, String), Vec<NodeYear>> = BTreeMap::new();
    if !problems.is_empty() {
        return out;
    }
    for r in 0..t.rows.len() {
        let (Some(year), Some(up)) = (t.int(r, c[2], problems), t.int(r, c[3], problems)) else { continue };
        out.entry((t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string())).or_default().push(NodeYear {
            year,
            upstream: up,
            change_pct: t.num(r, c[4], problems),
            yield_m3: vol.and_then(|k| t.num(r, k, problems)).unwrap_or(0.0),
            baseline_yield_m3: base.and_then(|k| t.num(r, k, problems)).unwrap_or(0.0),
            conc: conc.iter().map(|&k| t.num(r, k, problems)).collect(),
        });
    }
    out
}

pub(super) fn read_delay(t: &CsvTable, problems: &mut Vec<Problem>) -> Vec<DelayRow> {
    let c = t.require(&delay::COLUMNS, problems);
    if !problems.is_empty() {
        return vec![];
    }
    (0..t.rows.len())
        .filter_map(|r| {
            Some(DelayRow {
                strategy: t.text(r, c[0]).to_string(),
                delay_yr: t.int(r, c[1], problems)?,
                start_year: t.int(r, c[2], problems)?,
                total_cost: t.req_num(r, c[3], problems),
                total_cost_pv: t.req_num(r, c[4], problems),
                water_saved_m3: t.req_num(r, c[5], problems),
                water_lost_vs_baseline_m3: t.req_num(r, c[6], problems),
                final_infested_ha: t.req_num(r, c[7], problems),
            })
        })
        .collect()
}

pub(super) fn read_budget(t: &CsvTable, problems: &mut Vec<Problem>) -> BTreeMap<(String, String), BudgetTotals> {
    let c = t.require(&[budget::STRATEGY, budget::POOL, budget::YEAR, budget::AVAILABLE, budget::SPENT, budget::UNSPENT], problems);
    let (available_ha, treated_ha) = (t.col(budget::AVAILABLE_HA), t.col(budget::TREATED_HA));
    let mut out: BTreeMap<(String, String), BudgetTotals> = BTreeMap::new();
    if !problems.is_empty() {
        return out;
    }
    for r in 0..t.rows.len() {
        let e = out
            .entry((t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string()))
            .or_insert_with(|| BudgetTotals { available: Some(0.0), ..Default::default() });
        e.years += 1;
        if t.text(r, c[3]) == budget::UNLIMITED {
            e.available = None;
        } else if let (Some(a), Some(v)) = (e.available.as_mut(), t.num(r, c[3], problems)) {
            *a += v;
        }
        e.spent += t.num(r, c[4], problems).unwrap_or(0.0);
        e.unspent += t.num(r, c[5], problems).unwrap_or(0.0);
        // Hectare columns: optional, so folders written before they existed still read.
        if let Some(c_ha) = available_ha {
            if let Some(v) = t.num(r, c_ha, problems) {
                *e.available_ha.get_or_insert(0.0) += v;
            }
        }
        if let Some(c_ha) = treated_ha {
            e.treated_ha += t.num(r, c_ha, problems).unwrap_or(0.0);
        }
    }
    out
}

pub(super) fn read_ensemble(t: &CsvTable, problems: &mut Vec<Problem>) -> Ensemble {
    use ensemble::*;
    let c = t.require(&[CATCHMENT, STRATEGY, YEAR, VARIABLE, P5, P25, P50, P75, P95, MEAN, MEMBERS], problems);
    let prob = t.col(PROB_ABOVE_GUIDELINE);
    let scope = t.col(SCOPE);
    let mut e = Ensemble::default();
    if !problems.is_empty() {
        return e;
    }
    for r in 0..t.rows.len() {
        let Some(year) = t.int(r, c[2], problems) else { continue };
        let n = |k: usize, p: &mut Vec<Problem>| t.num(r, c[k], p);
        let (Some(p5), Some(p25), Some(p50), Some(p75), Some(p95)) =
            (n(4, problems), n(5, problems), n(6, problems), n(7, problems), n(8, problems))
        else {
            // Undefined percentiles (e.g. too little runoff in every member) are left out.
            continue;
        };
        if !(p5 <= p25 && p25 <= p50 && p50 <= p75 && p75 <= p95) {
            problems.push(Problem::in_file(&t.path, "percentiles must satisfy p5 ≤ p25 ≤ p50 ≤ p75 ≤ p95").row(t.lines[r]).column(P5));
            continue;
        }
        let q = Quantiles {
            p5,
            p25,
            p50,
            p75,
            p95,
            mean: n(9, problems).unwrap_or(f64::NAN),
            members: n(10, problems).unwrap_or(0.0),
            prob_above_guideline: prob.and_then(|k| t.num(r, k, problems)),
        };
        e.members = e.members.max(q.members);
        let k = key(t.text(r, c[0]), t.text(r, c[1]), t.text(r, c[3]), year);
        if scope.is_some_and(|s| t.text(r, s) == columns::scope::ARRIVING) {
            e.arriving.insert(k, q);
        } else {
            e.rows.insert(k, q);
        }
    }
    e
}

pub(super) fn read_sensitivity(t: &CsvTable, problems: &mut Vec<Problem>) -> Vec<SensitivityRow> {
    use sensitivity::*;
    let c = t.require(&[CATCHMENT, STRATEGY, AT, YEAR, PARAMETER, SPEARMAN_RHO, RANK], problems);
    let src = t.col(SRC);
    let variable = t.col(VARIABLE);
    if !problems.is_empty() {
        return vec![];
    }
    (0..t.rows.len())
        .filter_map(|r| {
            let rho = t.num(r, c[5], problems);
            if let Some(v) = rho.filter(|v| !(-1.0 - 1e-9..=1.0 + 1e-9).contains(v)) {
                problems.push(Problem::in_file(&t.path, format!("{v} is outside −1…1")).row(t.lines[r]).column(SPEARMAN_RHO));
                return None;
            }
            let rank = t.int(r, c[6], problems)?;
            Some(SensitivityRow {
                catchment: t.text(r, c[0]).to_string(),
                strategy: t.text(r, c[1]).to_string(),
                at: t.text(r, c[2]).to_string(),
                year: t.int(r, c[3], problems)?,
                variable: variable.map(|v| t.text(r, v).to_string()).filter(|s| !s.is_empty()),
                parameter: t.text(r, c[4]).to_string(),
                spearman_rho: rho,
                src: src.and_then(|k| t.num(r, k, problems)),
                rank: rank.max(0) as u32,
            })
        })
        .collect()
}

/// Percentiles of one programme-economics variable over members (`economics.csv`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EconomicsRange {
    /// 5th percentile.
    pub p5: f64,
    /// Median.
    pub p50: f64,
    /// 95th percentile.
    pub p95: f64,
    /// Members with a value.
    pub members: f64,
    /// Share of members above zero (`npv` only).
    pub prob_above_zero: Option<f64>,
}

/// `economics.csv` keyed by (catchment, scope, strategy, variable).
pub type Economics = BTreeMap<(String, String, String, String), EconomicsRange>;

pub(super) fn read_economics(t: &CsvTable, problems: &mut Vec<Problem>) -> Economics {
    use columns::economics::*;
    let c = t.require(&[CATCHMENT, SCOPE, STRATEGY, VARIABLE, P5, P50, P95, MEMBERS], problems);
    let prob = t.col(PROB_ABOVE_ZERO);
    let mut out = Economics::new();
    if !problems.is_empty() {
        return out;
    }
    for r in 0..t.rows.len() {
        let n = |k: usize, p: &mut Vec<Problem>| t.num(r, c[k], p);
        let (Some(p5), Some(p50), Some(p95)) = (n(4, problems), n(5, problems), n(6, problems)) else { continue };
        if !(p5 <= p50 && p50 <= p95) {
            problems.push(Problem::in_file(&t.path, "percentiles must satisfy p5 ≤ p50 ≤ p95").row(t.lines[r]).column(P5));
            continue;
        }
        let key = (t.text(r, c[0]).to_string(), t.text(r, c[1]).to_string(), t.text(r, c[2]).to_string(), t.text(r, c[3]).to_string());
        out.insert(
            key,
            EconomicsRange {
                p5,
                p50,
                p95,
                members: n(7, problems).unwrap_or(0.0),
                prob_above_zero: prob.and_then(|k| t.num(r, k, problems)),
            },
        );
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn budget_totals_keep_hectares_apart_and_read_older_folders() {
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(
            dir.path().join("budget.csv"),
            "strategy,pool,year,available,spent,unspent,carried_over,available_ha,treated_ha,unspent_ha\n\
             area,basin,2027,unlimited,450.00,,0.00,30.00,30.00,0.00\n\
             area,basin,2028,unlimited,300.00,,0.00,30.00,24.50,5.50\n\
             money,basin,2027,1000.00,400.00,600.00,0.00,,8.00,\n",
        )
        .unwrap();
        let t = CsvTable::read(dir.path(), "budget.csv").unwrap().unwrap();
        let mut problems = Vec::new();
        let b = read_budget(&t, &mut problems);
        assert!(problems.is_empty(), "{problems:?}");
        let area = &b[&("area".to_string(), "basin".to_string())];
        assert_eq!((area.available, area.spent, area.unspent, area.available_ha, area.treated_ha), (None, 750.0, 0.0, Some(60.0), 54.5));
        let money = &b[&("money".to_string(), "basin".to_string())];
        assert_eq!((money.available, money.unspent, money.available_ha, money.treated_ha), (Some(1000.0), 600.0, None, 8.0));
        // A folder written before the hectare columns existed still reads.
        std::fs::write(dir.path().join("budget.csv"), "strategy,pool,year,available,spent,unspent,carried_over\nm,basin,2027,10,4,6,0\n")
            .unwrap();
        let t = CsvTable::read(dir.path(), "budget.csv").unwrap().unwrap();
        let b = read_budget(&t, &mut problems);
        assert!(problems.is_empty(), "{problems:?}");
        assert_eq!(b[&("m".to_string(), "basin".to_string())].available_ha, None);
    }
}
