//! Tidy CSV outputs: `yearly.csv`, `summary.csv`, `nodes.csv` and `run_info.json`.
//!
//! Numbers are written with fixed decimals so that outputs are byte-stable;
//! undefined values (a change against a zero baseline, a concentration in a
//! year with too little runoff) are left empty and explained in `flags`.
//! No cell is ever NaN or infinite.

use crate::error::{Error, Result};
use crate::model::control::{BudgetYear, ControlYear};
use crate::model::dilution::ConcentrationFlag;
use crate::model::economics::ProgrammeTotals;
use crate::model::summary::{CatchmentSummary, NodeYear, REPORT_OFFSETS_YR};
use crate::model::{Catchment, Contaminant, YearResult};
use crate::schema::numbers::{num, opt_num};
use std::fmt::Write as _;
use std::io::Write;
use std::path::Path;

/// Appends one CSV line (with its newline) to `out`; fields containing a comma,
/// quote or line break are quoted. Every CSV this crate writes goes through here.
pub fn push_csv_line<'a>(out: &mut String, fields: impl IntoIterator<Item = &'a str>) {
    for (i, f) in fields.into_iter().enumerate() {
        if i > 0 {
            out.push(',');
        }
        if f.bytes().any(|b| matches!(b, b',' | b'"' | b'\n' | b'\r')) {
            let _ = write!(out, "\"{}\"", f.replace('"', "\"\""));
        } else {
            out.push_str(f);
        }
    }
    out.push('\n');
}

/// A buffered CSV writer that reports the file on failure.
pub struct CsvOut {
    w: std::io::BufWriter<std::fs::File>,
    path: std::path::PathBuf,
    line: String,
}

impl CsvOut {
    /// Creates the file and writes the header.
    pub fn create(path: &Path, header: &[String]) -> Result<CsvOut> {
        let f = std::fs::File::create(path).map_err(|e| Error::io(format!("creating {}", path.display()), e))?;
        let mut out = CsvOut { w: std::io::BufWriter::with_capacity(1 << 16, f), path: path.to_path_buf(), line: String::new() };
        out.row(header.iter().map(String::as_str))?;
        Ok(out)
    }

    /// Writes one row; fields containing a comma, quote or line break are quoted.
    pub fn row<'a>(&mut self, fields: impl IntoIterator<Item = &'a str>) -> Result<()> {
        self.line.clear();
        push_csv_line(&mut self.line, fields);
        self.w.write_all(self.line.as_bytes()).map_err(|e| Error::io(format!("writing {}", self.path.display()), e))
    }

    /// Writes pre-formatted CSV text (whole lines).
    pub fn raw(&mut self, text: &str) -> Result<()> {
        self.w.write_all(text.as_bytes()).map_err(|e| Error::io(format!("writing {}", self.path.display()), e))
    }

    /// Flushes the file.
    pub fn finish(mut self) -> Result<()> {
        self.w.flush().map_err(|e| Error::io(format!("writing {}", self.path.display()), e))
    }
}

/// Header of `yearly.csv`.
pub fn yearly_header(contaminants: &[Contaminant]) -> Vec<String> {
    let mut h: Vec<String> = [
        "catchment",
        "strategy",
        "year",
        "rain_mm",
        "pet_mm",
        "et_mm",
        "yield_mm",
        "yield_m3",
        "baseline_yield_mm",
        "uninvaded_yield_mm",
        "yield_change_pct",
        "change_vs_uninvaded_pct",
        "canopy_fraction",
        "scattered_ha",
        "medium_ha",
        "dense_ha",
        "infested_ha",
        "new_infestation_ha",
        "control_cost",
        "treated_ha",
        "cleared_ha",
        "regrowth_ha",
        "water_saved_m3",
        "cumulative_cost",
        "cumulative_water_saved_m3",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    for c in contaminants {
        h.push(format!("{}_load_kg_per_yr", c.name));
        h.push(format!("{}_mg_per_l", c.name));
    }
    h.push("flags".into());
    h
}

/// Flags for a year's concentrations (`low-runoff:<name>` per contaminant not stated).
fn concentration_flags(concs: &[std::result::Result<f64, ConcentrationFlag>], contaminants: &[Contaminant]) -> String {
    concs.iter().zip(contaminants).filter(|(c, _)| c.is_err()).map(|(_, m)| format!("low-runoff:{}", m.name)).collect::<Vec<_>>().join(";")
}

/// Control columns of one `yearly.csv` row.
#[derive(Debug, Clone, Copy, Default)]
pub struct ControlCells {
    /// The year's control outcome.
    pub control: ControlYear,
    /// Water saved vs no-control in the same catchment and year, m³.
    pub water_saved_m3: f64,
    /// Cost so far, $.
    pub cumulative_cost: f64,
    /// Water saved so far, m³.
    pub cumulative_water_saved_m3: f64,
}

/// Fields of one `yearly.csv` row.
pub fn yearly_fields(c: &Catchment, strategy: &str, y: &YearResult, ctl: &ControlCells, contaminants: &[Contaminant]) -> Vec<String> {
    let mut f = vec![
        c.id.clone(),
        strategy.to_string(),
        y.year.to_string(),
        num(y.rain_mm, 1),
        num(y.pet_mm, 1),
        num(y.et_mm, 3),
        num(y.yield_mm, 3),
        num(y.yield_m3, 1),
        num(y.baseline_yield_mm, 3),
        num(y.uninvaded_yield_mm, 3),
        opt_num(y.yield_change_pct(), 4),
        opt_num(y.change_vs_uninvaded_pct(), 4),
        num(y.canopy_fraction, 6),
        num(y.classes.scattered_ha, 3),
        num(y.classes.medium_ha, 3),
        num(y.classes.dense_ha, 3),
        num(y.classes.total_ha(), 3),
        num(y.new_infestation_ha, 3),
        num(ctl.control.cost(), 2),
        num(ctl.control.treated_ha, 3),
        num(ctl.control.cleared_ha, 3),
        num(ctl.control.regrowth_ha, 3),
        num(ctl.water_saved_m3, 1),
        num(ctl.cumulative_cost, 2),
        num(ctl.cumulative_water_saved_m3, 1),
    ];
    for (k, _) in contaminants.iter().enumerate() {
        f.push(num(y.loads_kg_per_yr[k], 3));
        f.push(y.concentrations[k].map(|v| num(v, 5)).unwrap_or_default());
    }
    let mut flags = concentration_flags(&y.concentrations, contaminants);
    if y.baseline_yield_mm <= 0.0 {
        if !flags.is_empty() {
            flags.push(';');
        }
        flags.push_str("zero-baseline-yield");
    }
    f.push(flags);
    f
}

/// Header of `summary.csv`.
pub fn summary_header(contaminants: &[Contaminant]) -> Vec<String> {
    let mut h: Vec<String> = vec!["catchment".into(), "name".into(), "strategy".into(), "area_ha".into()];
    for o in REPORT_OFFSETS_YR {
        h.push(format!("yield_change_{o}y_pct"));
    }
    for s in [
        "yield_change_horizon_pct",
        "change_vs_uninvaded_horizon_pct",
        "water_lost_horizon_m3_per_yr",
        "canopy_fraction_start",
        "canopy_fraction_end",
    ] {
        h.push(s.into());
    }
    for c in contaminants {
        h.push(format!("{}_first_exceedance_year", c.name));
    }
    for s in [
        "total_cost",
        "total_cost_pv",
        "water_saved_m3",
        "water_saved_pv_m3",
        "cost_per_m3",
        "levelised_cost_per_m3",
        "npv",
        "benefit_cost_ratio",
    ] {
        h.push(s.into());
    }
    h
}

/// Fields of one `summary.csv` row; `water_value_per_m3` enables NPV and BCR.
pub fn summary_fields(
    c: &Catchment,
    strategy: &str,
    s: &CatchmentSummary,
    totals: &ProgrammeTotals,
    water_value_per_m3: Option<f64>,
) -> Vec<String> {
    let mut f = vec![c.id.clone(), c.name.clone(), strategy.to_string(), num(c.area_ha, 3)];
    for v in &s.change_at_offsets_pct {
        f.push(opt_num(*v, 4));
    }
    f.push(opt_num(s.change_at_horizon_pct, 4));
    f.push(opt_num(s.change_vs_uninvaded_at_horizon_pct, 4));
    f.push(num(s.water_lost_at_horizon_m3, 1));
    f.push(num(s.canopy_fraction_start, 6));
    f.push(num(s.canopy_fraction_end, 6));
    for y in &s.first_exceedance_year {
        f.push(y.map(|y| y.to_string()).unwrap_or_default());
    }
    f.push(num(totals.cost, 2));
    f.push(num(totals.cost_pv, 2));
    f.push(num(totals.water_saved_m3, 1));
    f.push(num(totals.water_saved_pv_m3, 1));
    f.push(opt_num(totals.cost_per_m3(), 6));
    f.push(opt_num(totals.levelised_cost_per_m3(), 6));
    f.push(opt_num(water_value_per_m3.map(|v| totals.npv(v)), 2));
    f.push(opt_num(water_value_per_m3.and_then(|v| totals.bcr(v)), 4));
    f
}

/// Header of `budget.csv`.
pub fn budget_header() -> Vec<String> {
    ["strategy", "pool", "year", "available", "spent", "unspent", "carried_over"].iter().map(|s| s.to_string()).collect()
}

/// Fields of one `budget.csv` row (`pool` is `basin` or a catchment id).
pub fn budget_fields(strategy: &str, pool: &str, b: &BudgetYear) -> Vec<String> {
    vec![
        strategy.to_string(),
        pool.to_string(),
        b.year.to_string(),
        if b.available.is_finite() { num(b.available, 2) } else { "unlimited".into() },
        num(b.spent, 2),
        if b.available.is_finite() { num(b.unspent(), 2) } else { String::new() },
        num(b.carried, 2),
    ]
}

/// Columns of `delay.csv` (written here, read by the report).
pub const DELAY_COLUMNS: [&str; 8] = [
    "strategy",
    "delay_yr",
    "start_year",
    "total_cost",
    "total_cost_pv",
    "water_saved_m3",
    "water_lost_vs_baseline_m3",
    "final_infested_ha",
];

/// Header of `delay.csv`.
pub fn delay_header() -> Vec<String> {
    DELAY_COLUMNS.iter().map(|s| s.to_string()).collect()
}

/// Header of `nodes.csv`.
pub fn nodes_header(contaminants: &[Contaminant]) -> Vec<String> {
    let mut h: Vec<String> =
        ["node", "strategy", "year", "upstream_catchments", "area_ha", "yield_m3", "baseline_yield_m3", "yield_change_pct"]
            .iter()
            .map(|s| s.to_string())
            .collect();
    for c in contaminants {
        h.push(format!("{}_load_kg_per_yr", c.name));
        h.push(format!("{}_mg_per_l", c.name));
    }
    h.push("flags".into());
    h
}

/// Fields of one `nodes.csv` row.
pub fn node_fields(node_id: &str, strategy: &str, upstream: usize, y: &NodeYear, contaminants: &[Contaminant]) -> Vec<String> {
    let mut f = vec![
        node_id.to_string(),
        strategy.to_string(),
        y.year.to_string(),
        upstream.to_string(),
        num(y.area_ha, 3),
        num(y.yield_m3, 1),
        num(y.baseline_yield_m3, 1),
        opt_num(y.yield_change_pct(), 4),
    ];
    for k in 0..contaminants.len() {
        f.push(num(y.loads_kg_per_yr[k], 3));
        f.push(y.concentrations[k].map(|v| num(v, 5)).unwrap_or_default());
    }
    f.push(concentration_flags(&y.concentrations, contaminants));
    f
}

/// Writes `run_info.json`: what was run, with which method, and the cautions.
pub fn write_run_info(dir: &Path, info: &serde_json::Value) -> Result<()> {
    let path = dir.join(crate::schema::RUN_INFO_FILE);
    let text = serde_json::to_string_pretty(info).map_err(|e| Error::Other(e.to_string()))?;
    std::fs::write(&path, text + "\n").map_err(|e| Error::io(format!("writing {}", path.display()), e))
}
