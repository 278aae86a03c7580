//! Sensitivity of ensemble results to the uncertain parameters: each parameter
//! ranked by its Spearman rank correlation with a result, with its standardised
//! regression coefficient (formulas in [`crate::model::stats`]), and the rows of
//! `sensitivity.csv`. Used for catchments ([`super::ensemble`]) and the basin
//! ([`super::basin_totals`]).

use crate::error::Result;
use crate::model::stats::{spearman, src};
use crate::output::tables::CsvOut;
use crate::schema::numbers::opt_num;

/// One sensitivity ranking: `(parameter label, ρ, SRC)` sorted by |ρ| descending.
pub type Ranking = Vec<(String, Option<f64>, Option<f64>)>;

/// Ranks parameters by |Spearman ρ| with `y` (members with a non-finite `y` left out).
pub fn rank(labels: &[String], xs: &[Vec<f64>], y: &[f64]) -> Ranking {
    let ok: Vec<usize> = (0..y.len()).filter(|&m| y[m].is_finite()).collect();
    let yv: Vec<f64> = ok.iter().map(|&m| y[m]).collect();
    let xv: Vec<Vec<f64>> = xs.iter().map(|x| ok.iter().map(|&m| x[m]).collect()).collect();
    let srcs = src(&xv, &yv);
    let mut r: Ranking =
        labels.iter().enumerate().map(|(j, l)| (l.clone(), spearman(&xv[j], &yv), srcs.as_ref().and_then(|s| s[j]))).collect();
    r.sort_by(|a, b| b.1.map_or(0.0, f64::abs).total_cmp(&a.1.map_or(0.0, f64::abs)).then(a.0.cmp(&b.0)));
    r
}

/// Writes the `sensitivity.csv` rows of one ranking.
pub fn write_sensitivity_rows<W: std::io::Write>(
    out: &mut CsvOut<W>,
    id: &str,
    strategy: &str,
    at: &str,
    year: i32,
    r: &Ranking,
) -> Result<()> {
    for (k, (label, rho, srcv)) in r.iter().enumerate() {
        out.row([
            id.to_string(),
            strategy.to_string(),
            at.to_string(),
            year.to_string(),
            label.clone(),
            opt_num(*rho, 4),
            opt_num(*srcv, 4),
            (k + 1).to_string(),
        ])?;
    }
    Ok(())
}
