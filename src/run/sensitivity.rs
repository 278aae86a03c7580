//! Sensitivity of ensemble results to the uncertain parameters: each parameter
//! ranked by its Spearman rank correlation with a result, with its standardised
//! regression coefficient (formulas in [`crate::model::stats`]), and the rows of
//! `sensitivity.csv`, leaving out the parameters that cannot move the result
//! ([`crate::model::params::ParamId::can_move`]) and naming each for readers
//! ([`readable_label`]). Used for catchments ([`super::ensemble`]) and the basin
//! ([`super::basin_totals`]).

use crate::error::Result;
use crate::input::scenario::Scenario;
use crate::input::toml_reader::UncertainKey;
use crate::model::params::{Outcome, ParamId};
use crate::model::stats::{spearman, src};
use crate::output::tables::CsvOut;
use crate::schema::numbers::opt_num;
use serde::{Deserialize, Serialize};

/// An uncertain parameter as the rankings see it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RankedParam {
    /// Scenario key path (`strategy[2].efficacy`), the `parameter` column.
    pub path: String,
    /// What a reader calls it (`efficacy of strategy 'best-value'`), the `label` column.
    pub label: String,
    /// Whether it can move the yield without control ([`ParamId::can_move`]).
    pub moves_yield: bool,
    /// The catchments it applies to (a `[[calibration]]` entry), `None` for all.
    pub catchments: Option<Vec<String>>,
}

impl RankedParam {
    /// The parameter of an uncertain scenario key.
    pub fn of(s: &Scenario, u: &UncertainKey) -> RankedParam {
        let id = u.target.id();
        let catchments = (id.spec().section == "calibration").then(|| {
            let entry = u.target.table_path();
            s.calibration_links.iter().filter(|(_, e)| *e == entry).map(|(c, _)| c.clone()).collect()
        });
        RankedParam {
            path: u.param.path.clone(),
            label: readable_label(s, u),
            moves_yield: id.can_move(Outcome::NoControlYield),
            catchments,
        }
    }

    /// True when the parameter can move the yield without control of `catchment`
    /// (or, for `None`, of the basin).
    pub fn ranks_for(&self, catchment: Option<&str>) -> bool {
        self.moves_yield
            && match (&self.catchments, catchment) {
                (Some(cs), Some(c)) => cs.iter().any(|x| x == c),
                (Some(cs), None) => !cs.is_empty(),
                (None, _) => true,
            }
    }
}

/// Every uncertain parameter of the scenario, in scenario order.
pub fn ranked_params(s: &Scenario) -> Vec<RankedParam> {
    s.uncertain.iter().map(|u| RankedParam::of(s, u)).collect()
}

/// A parameter's name for readers: plain keys as `key (section)`; keys of an array
/// of tables by what the entry is: `efficacy of strategy 'best-value'`,
/// `cost_per_ha of treatment 'aerial' (dense)`, `open_export_kg_per_ha_yr of
/// contaminant 'nitrate_n'`, `w_forest in calibration of catchment 'skelvane'`.
pub fn readable_label(s: &Scenario, u: &UncertainKey) -> String {
    let spec = u.target.id().spec();
    let key = spec.key;
    let Some(n) = u.target.entry() else {
        return if spec.section.is_empty() { key.to_string() } else { format!("{key} ({})", spec.section) };
    };
    let quoted = |name: &str| format!("'{name}'");
    match u.target.id() {
        ParamId::OpenExport | ParamId::ForestExport | ParamId::Guideline | ParamId::CqExponent => match s.params.contaminants.get(n) {
            Some(c) => format!("{key} of contaminant {}", quoted(&c.name)),
            None => u.param.path.clone(),
        },
        ParamId::TreatmentCost => match s.treatments.get(n) {
            Some(t) => format!("{key} of treatment {} ({})", quoted(&t.name), t.class.name()),
            None => u.param.path.clone(),
        },
        ParamId::CalibrationWForest | ParamId::CalibrationWGrass | ParamId::CalibrationOmegaForest | ParamId::CalibrationOmegaGrass => {
            let entry = u.target.table_path();
            let ids: Vec<String> = s.calibration_links.iter().filter(|(_, e)| *e == entry).map(|(c, _)| quoted(c)).collect();
            match ids.len() {
                0 => format!("{key} in calibration entry {}", n + 1),
                1 => format!("{key} in calibration of catchment {}", ids[0]),
                _ => format!("{key} in calibration of catchments {}", ids.join(", ")),
            }
        }
        _ if spec.section == "strategy" => match s.strategies.get(n) {
            Some(st) => format!("{key} of strategy {}", quoted(&st.name)),
            None => u.param.path.clone(),
        },
        _ => u.param.path.clone(),
    }
}

/// One parameter of a ranking.
#[derive(Debug, Clone, PartialEq)]
pub struct Ranked {
    /// Key path.
    pub path: String,
    /// Readable label.
    pub label: String,
    /// Spearman ρ with the result.
    pub rho: Option<f64>,
    /// Standardised regression coefficient.
    pub src: Option<f64>,
}

/// One sensitivity ranking as figures draw it: `(label, ρ, SRC)` sorted by |ρ| descending.
pub type Ranking = Vec<(String, Option<f64>, Option<f64>)>;

/// The ranking for a figure (readable labels).
pub fn for_figure(r: &[Ranked]) -> Ranking {
    r.iter().map(|x| (x.label.clone(), x.rho, x.src)).collect()
}

/// Ranks the parameters that can move the yield without control of `catchment`
/// (`None`: the basin; [`RankedParam::ranks_for`]) by |Spearman ρ| with `y`
/// (members with a non-finite `y` left out). `xs[j]` are the draws of `params[j]`.
pub fn rank(params: &[RankedParam], xs: &[Vec<f64>], y: &[f64], catchment: Option<&str>) -> Vec<Ranked> {
    let keep: Vec<usize> = (0..params.len().min(xs.len())).filter(|&j| params[j].ranks_for(catchment)).collect();
    let ok: Vec<usize> = (0..y.len()).filter(|&m| y[m].is_finite()).collect();
    let yv: Vec<f64> = ok.iter().map(|&m| y[m]).collect();
    let xv: Vec<Vec<f64>> = keep.iter().map(|&j| ok.iter().map(|&m| xs[j][m]).collect()).collect();
    let srcs = src(&xv, &yv);
    let mut r: Vec<Ranked> = keep
        .iter()
        .enumerate()
        .map(|(k, &j)| Ranked {
            path: params[j].path.clone(),
            label: params[j].label.clone(),
            rho: spearman(&xv[k], &yv),
            src: srcs.as_ref().and_then(|s| s[k]),
        })
        .collect();
    r.sort_by(|a, b| b.rho.map_or(0.0, f64::abs).total_cmp(&a.rho.map_or(0.0, f64::abs)).then(a.path.cmp(&b.path)));
    r
}

/// Writes the `sensitivity.csv` rows of one ranking.
pub fn write_sensitivity_rows<W: std::io::Write>(
    out: &mut CsvOut<W>,
    id: &str,
    strategy: &str,
    at: &str,
    year: i32,
    r: &[Ranked],
) -> Result<()> {
    for (k, x) in r.iter().enumerate() {
        out.row([
            id.to_string(),
            strategy.to_string(),
            at.to_string(),
            year.to_string(),
            x.path.clone(),
            x.label.clone(),
            opt_num(x.rho, 4),
            opt_num(x.src, 4),
            (k + 1).to_string(),
        ])?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn p(path: &str, moves: bool, catchments: Option<Vec<&str>>) -> RankedParam {
        RankedParam {
            path: path.into(),
            label: format!("label of {path}"),
            moves_yield: moves,
            catchments: catchments.map(|v| v.into_iter().map(String::from).collect()),
        }
    }

    #[test]
    fn parameters_are_named_by_what_their_entry_is() {
        let demo = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-data");
        let dir = tempfile::tempdir().unwrap();
        for f in ["catchments.csv", "catchments.geojson", "climate.csv"] {
            std::fs::copy(demo.join(f), dir.path().join(f)).unwrap();
        }
        let text = std::fs::read_to_string(demo.join("scenario.toml"))
            .unwrap()
            .replacen("efficacy = 0.95", "efficacy = { dist = \"uniform\", min = 0.85, max = 0.99 }", 2)
            .replacen("cost_per_ha = 45", "cost_per_ha = { dist = \"uniform\", min = 35, max = 60 }", 1)
            .replacen("open_export_kg_per_ha_yr = 0.30", "open_export_kg_per_ha_yr = { dist = \"uniform\", min = 0.2, max = 0.4 }", 1);
        std::fs::write(dir.path().join("scenario.toml"), text).unwrap();
        let s = crate::input::scenario::load_scenario(&dir.path().join("scenario.toml")).unwrap();
        let ps = ranked_params(&s);
        let by_path = |p: &str| ps.iter().find(|x| x.path == p).unwrap_or_else(|| panic!("{p}: {ps:?}"));
        assert_eq!(by_path("strategy[2].efficacy").label, "efficacy of strategy 'best-value'");
        assert_eq!(by_path("treatment[1].cost_per_ha").label, "cost_per_ha of treatment 'ground' (scattered)");
        assert_eq!(by_path("contaminant[2].open_export_kg_per_ha_yr").label, "open_export_kg_per_ha_yr of contaminant 'total_p'");
        assert_eq!(by_path("invasion.spread_rate_per_yr").label, "spread_rate_per_yr (invasion)");
        for p in ["strategy[1].efficacy", "strategy[2].efficacy", "treatment[1].cost_per_ha", "contaminant[2].open_export_kg_per_ha_yr"] {
            assert!(!by_path(p).ranks_for(None) && !by_path(p).ranks_for(Some("skelvane")), "{p} cannot move the yield without control");
        }
        assert!(by_path("hydrology.w_forest").ranks_for(Some("skelvane")));
    }

    #[test]
    fn a_ranking_leaves_out_what_cannot_move_the_result() {
        let params = vec![
            p("invasion.spread_rate_per_yr", true, None),
            p("strategy[2].efficacy", false, None),
            p("calibration[1].w_forest", true, Some(vec!["a"])),
        ];
        // y follows the first parameter; the second is perfectly correlated too, but cannot matter.
        let x0: Vec<f64> = (0..20).map(|m| m as f64).collect();
        let x2: Vec<f64> = (0..20).map(|m| ((m * 7) % 20) as f64).collect();
        let y: Vec<f64> = x0.iter().map(|v| -2.0 * v).collect();
        let xs = vec![x0.clone(), x0.clone(), x2];
        let for_b = rank(&params, &xs, &y, Some("b"));
        assert_eq!(for_b.iter().map(|r| r.path.as_str()).collect::<Vec<_>>(), ["invasion.spread_rate_per_yr"]);
        let for_a = rank(&params, &xs, &y, Some("a"));
        assert_eq!(for_a.len(), 2);
        assert_eq!(for_a[0].path, "invasion.spread_rate_per_yr");
        assert!((for_a[0].rho.unwrap() + 1.0).abs() < 1e-12);
        assert_eq!(for_a[0].label, "label of invasion.spread_rate_per_yr");
        let basin = rank(&params, &xs, &y, None);
        assert_eq!(basin.len(), 2, "a calibration entry moves the basin through its catchment");
        assert!(!basin.iter().any(|r| r.path.starts_with("strategy")));
    }
}
