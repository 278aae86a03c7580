//! Ensemble members reduced to percentile bands: the rows of `ensemble.csv`, for a
//! catchment's own results (`local`), what arrives at a receiving node (`arriving`)
//! and the whole basin (`basin`), written by one function so that every scope is
//! computed and formatted alike.
//!
//! The variables of a member, per year, are those of
//! [`crate::schema::columns::ensemble::variables`]; [`Vars`] gives their positions.
//! The 10-year-mean change of a member is computed with the same function as the
//! central run's headline numbers ([`crate::model::summary::window_change_pct`]).

use crate::error::Result;
use crate::model::stats::{mean, percentile_sorted};
use crate::model::summary::window_change_pct;
use crate::output::tables::CsvOut;
use crate::schema::columns;
use crate::schema::numbers::{num, opt_num};

/// Percentiles reported in `ensemble.csv`.
pub const PERCENTILES: [f64; 5] = [0.05, 0.25, 0.50, 0.75, 0.95];

/// Positions of the ensemble variables for `k` contaminants.
#[derive(Debug, Clone, Copy)]
pub struct Vars {
    /// Number of contaminants.
    pub k: usize,
}

impl Vars {
    /// Water yield, mm/yr (over the area drained, for `arriving` and `basin`).
    pub const YIELD: usize = 0;
    /// Yield change against the baseline in the year, %.
    pub const CHANGE: usize = 1;
    /// Yield change of the 10-year mean ending in the year, %.
    pub const MEAN_CHANGE: usize = 2;
    /// Concentration of contaminant `j`, mg/L.
    pub fn concentration(self, j: usize) -> usize {
        3 + j
    }
    /// Control cost of the year, $.
    pub fn cost(self) -> usize {
        3 + self.k
    }
    /// Number of variables.
    pub fn len(self) -> usize {
        4 + self.k
    }
    /// Never empty (yield is always there).
    pub fn is_empty(self) -> bool {
        false
    }
    /// Every variable except the concentrations (the basin has no single outlet).
    pub fn without_concentrations(self) -> Vec<usize> {
        vec![Self::YIELD, Self::CHANGE, Self::MEAN_CHANGE, self.cost()]
    }
    /// Every variable.
    pub fn all(self) -> Vec<usize> {
        (0..self.len()).collect()
    }
    /// Decimals written for variable `v` (cents for the cost).
    pub fn decimals(self, v: usize) -> usize {
        if v == self.cost() {
            2
        } else {
            5
        }
    }
}

/// Per-member values of one id, scope and strategy: `[variable][year][member]`;
/// `NaN` where a member's value is undefined (not stated).
#[derive(Debug, Clone)]
pub struct MemberValues {
    /// `[variable][year][member]`.
    pub vars: Vec<Vec<Vec<f64>>>,
}

impl MemberValues {
    /// All zero for `vars` variables, `years` years and `members` members.
    pub fn zeros(vars: usize, years: usize, members: usize) -> MemberValues {
        MemberValues { vars: vec![vec![vec![0.0; members]; years]; vars] }
    }

    /// Sets member `m`'s yield, change and 10-year-mean change from its flow and
    /// baseline series (depths or volumes: the changes are ratios), with `to_mm`
    /// converting a flow to mm/yr.
    pub fn set_yield(&mut self, m: usize, flow: &[f64], baseline: &[f64], to_mm: impl Fn(f64) -> f64) {
        for t in 0..flow.len() {
            self.vars[Vars::YIELD][t][m] = to_mm(flow[t]);
            self.vars[Vars::CHANGE][t][m] = crate::model::projection::percent_change(flow[t], baseline[t]).unwrap_or(f64::NAN);
            self.vars[Vars::MEAN_CHANGE][t][m] = window_change_pct(flow, baseline, t).unwrap_or(f64::NAN);
        }
    }
}

/// What the rows of one scenario need besides the member values.
#[derive(Debug, Clone)]
pub struct BandLayout {
    /// First projected year.
    pub start_year: i32,
    /// Variable names, in [`Vars`] order.
    pub names: Vec<String>,
    /// Guideline of each variable (concentrations only), mg/L.
    pub guidelines: Vec<Option<f64>>,
    /// Variable positions.
    pub vars: Vars,
}

impl BandLayout {
    /// The layout for these contaminants `(name, guideline)`.
    pub fn new(start_year: i32, contaminants: &[(String, Option<f64>)]) -> BandLayout {
        let vars = Vars { k: contaminants.len() };
        let names = columns::ensemble::variables(&contaminants.iter().map(|c| c.0.as_str()).collect::<Vec<_>>());
        let mut guidelines = vec![None; vars.len()];
        for (j, c) in contaminants.iter().enumerate() {
            guidelines[vars.concentration(j)] = c.1;
        }
        BandLayout { start_year, names, guidelines, vars }
    }
}

/// Writes the `ensemble.csv` rows of one id, scope and strategy: for each year, each
/// variable in `which` (in that order), the percentiles, mean, members with a value and,
/// for a concentration with a guideline, the share of members above it.
pub fn write_rows<W: std::io::Write>(
    out: &mut CsvOut<W>,
    layout: &BandLayout,
    id: &str,
    scope: &str,
    strategy: &str,
    mv: &MemberValues,
    which: &[usize],
) -> Result<()> {
    let n_years = mv.vars.first().map_or(0, Vec::len);
    let mut vals: Vec<f64> = Vec::new();
    for t in 0..n_years {
        let year = layout.start_year + t as i32;
        for &vi in which {
            vals.clear();
            vals.extend(mv.vars[vi][t].iter().copied().filter(|v| v.is_finite()));
            vals.sort_by(f64::total_cmp);
            let prob = layout.guidelines[vi]
                .filter(|_| !vals.is_empty())
                .map(|g| vals.iter().filter(|&&v| v > g).count() as f64 / vals.len() as f64);
            let dec = layout.vars.decimals(vi);
            let mut fields = vec![id.to_string(), scope.to_string(), strategy.to_string(), year.to_string(), layout.names[vi].clone()];
            for p in PERCENTILES {
                fields.push(if vals.is_empty() { String::new() } else { num(percentile_sorted(&vals, p), dec) });
            }
            fields.push(if vals.is_empty() { String::new() } else { num(mean(&vals), dec) });
            fields.push(vals.len().to_string());
            fields.push(opt_num(prob, 4));
            out.row(&fields)?;
        }
    }
    Ok(())
}

/// One member's programme totals as the `economics.csv` variables (`None`: undefined
/// for that member, e.g. no water saved; NPV and BCR only with a value of water).
pub fn economics_values(t: &crate::model::economics::ProgrammeTotals, water_value_per_m3: Option<f64>) -> [Option<f64>; 7] {
    [
        Some(t.cost),
        Some(t.cost_pv),
        Some(t.water_saved_m3),
        Some(t.water_saved_pv_m3),
        t.levelised_cost_per_m3(),
        water_value_per_m3.map(|v| t.npv(v)),
        water_value_per_m3.and_then(|v| t.bcr(v)),
    ]
}

/// Writes the `economics.csv` rows of one id, scope and strategy from each member's
/// totals: percentiles, mean and members with a value of every variable, and for
/// `npv` the share of members above zero. Variables no member defines are left out
/// (NPV and BCR without a value of water).
pub fn write_economics_rows<W: std::io::Write>(
    out: &mut CsvOut<W>,
    id: &str,
    scope: &str,
    strategy: &str,
    members: &[[Option<f64>; 7]],
) -> Result<()> {
    let mut vals: Vec<f64> = Vec::with_capacity(members.len());
    for (j, (name, dec)) in columns::economics::VARIABLES.iter().enumerate() {
        // NPV and BCR exist only with a value of water: then no member has them.
        let needs_water_value = *name == columns::summary::NPV || *name == columns::summary::BENEFIT_COST_RATIO;
        if needs_water_value && members.iter().all(|m| m[j].is_none()) {
            continue;
        }
        vals.clear();
        vals.extend(members.iter().filter_map(|m| m[j]).filter(|v| v.is_finite()));
        vals.sort_by(f64::total_cmp);
        let mut fields = vec![id.to_string(), scope.to_string(), strategy.to_string(), name.to_string()];
        for p in PERCENTILES {
            fields.push(if vals.is_empty() { String::new() } else { num(percentile_sorted(&vals, p), *dec) });
        }
        fields.push(if vals.is_empty() { String::new() } else { num(mean(&vals), *dec) });
        fields.push(vals.len().to_string());
        let above = (*name == columns::summary::NPV && !vals.is_empty())
            .then(|| vals.iter().filter(|&&v| v > 0.0).count() as f64 / vals.len() as f64);
        fields.push(opt_num(above, 4));
        out.row(&fields)?;
    }
    Ok(())
}
