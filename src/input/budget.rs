//! Budget tables (CSV) for control programmes whose budget varies by year.
//!
//! Columns: `year`, `budget_per_yr` ($), and `catchment` when the programme's
//! `budget_scope = "catchment"`. Years of the projection missing from the table
//! have no budget (0). Each (catchment, year) may appear once.

use crate::error::Problem;
use crate::input::table::{read_table, suggestion};
use crate::model::catchment::Catchment;
use crate::model::control::Effort;
use std::path::Path;

/// Reads a budget table into per-year amounts over `n_years` from `start_year`.
pub fn read_budget_table(
    path: &Path,
    catchments: &[Catchment],
    start_year: i32,
    n_years: usize,
    per_catchment: bool,
) -> Result<Effort, Vec<Problem>> {
    let table = read_table(path)?;
    let required: &[&str] = if per_catchment { &["catchment", "year", "budget_per_yr"] } else { &["year", "budget_per_yr"] };
    let known: &[&str] = if per_catchment { &["catchment", "year", "budget_per_yr"] } else { &["year", "budget_per_yr"] };
    let mut problems = table.check_columns(required, known, |_| false);
    if !problems.is_empty() {
        if !per_catchment && table.col("catchment").is_some() {
            problems.push(
                Problem::in_file(path, "has a catchment column: set budget_scope = \"catchment\" in the strategy")
                    .row(1)
                    .column("catchment"),
            );
        }
        return Err(problems);
    }
    let ids: Vec<&str> = catchments.iter().map(|c| c.id.as_str()).collect();
    let n_pools = if per_catchment { catchments.len() } else { 1 };
    let mut amounts = vec![vec![0.0; n_years]; n_pools];
    let mut seen = vec![vec![false; n_years]; n_pools];
    for (line, rec) in &table.rows {
        let line = *line;
        let mut p = Vec::new();
        let pool = if per_catchment {
            let id = table.text(rec, "catchment");
            match ids.iter().position(|&x| x == id) {
                Some(i) => Some(i),
                None => {
                    p.push(
                        Problem::in_file(path, format!("'{id}' is not a catchment of the scenario{}", suggestion(id, &ids)))
                            .row(line)
                            .column("catchment"),
                    );
                    None
                }
            }
        } else {
            Some(0)
        };
        let year = table.required_in(line, rec, "year", 1800.0, 2800.0, "", &mut p);
        let amount = table.required_in(line, rec, "budget_per_yr", 0.0, 1e12, "$/yr", &mut p);
        if let (Some(pool), Some(y), Some(a)) = (pool, year, amount) {
            if y.fract() != 0.0 {
                p.push(Problem::in_file(path, format!("year {y} must be a whole number")).row(line).column("year"));
            } else {
                let t = y as i64 - start_year as i64;
                if t >= 0 && (t as usize) < n_years {
                    let t = t as usize;
                    if seen[pool][t] {
                        p.push(Problem::in_file(path, format!("year {y} appears twice")).row(line).column("year"));
                    }
                    seen[pool][t] = true;
                    amounts[pool][t] = a;
                }
            }
        }
        problems.extend(p);
    }
    if !problems.is_empty() {
        return Err(problems);
    }
    Ok(if per_catchment { Effort::CatchmentBudget(amounts) } else { Effort::BasinBudget(amounts.remove(0)) })
}
