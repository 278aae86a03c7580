//! Every column list of the CSV tables a run writes, defined once for the
//! writers (`output::tables`, `run::*`), the readers (the report, the GeoJSON and
//! maps, `merge`) and the tests.
//!
//! One module per file. Fixed columns are named constants
//! (`columns::summary::YIELD_CHANGE_HORIZON_PCT`); columns that depend on the
//! scenario are functions of it (`columns::yearly::columns(&["nitrate_n"])`,
//! `columns::summary::yield_change_at(20)`). The values that some columns hold
//! (ensemble variables, sensitivity points, flags) are named here too.
//!
//! The weather and PET tables (`input::weather`) keep their own columns.

/// Catchment id (or [`BASIN_ID`](super::BASIN_ID) for whole-basin rows).
pub const CATCHMENT: &str = "catchment";
/// Strategy name (`no-control` first).
pub const STRATEGY: &str = "strategy";
/// Calendar year.
pub const YEAR: &str = "year";
/// What a row of `summary.csv` or `ensemble.csv` describes ([`scope`]).
pub const SCOPE: &str = "scope";

/// Values of the [`SCOPE`] column.
pub mod scope {
    /// A catchment's own runoff, loads and concentrations (what leaves it from its own area).
    pub const LOCAL: &str = "local";
    /// What arrives at a receiving node: the sums over every catchment draining to it
    /// (itself included), flow-weighted concentrations (as `nodes.csv`).
    pub const ARRIVING: &str = "arriving";
    /// The whole basin (all catchments summed); the id is `basin`.
    pub const BASIN: &str = "basin";
    /// Order of the scopes in a file (for `merge`).
    pub const ORDER: [&str; 3] = [LOCAL, ARRIVING, BASIN];
}
/// Semicolon-separated flags of a row ([`flags`]).
pub const FLAGS: &str = "flags";

/// `{name}_load_kg_per_yr`: a contaminant's load, kg/yr.
pub fn load_kg_per_yr(contaminant: &str) -> String {
    format!("{contaminant}_load_kg_per_yr")
}

/// `{name}_mg_per_l`: a contaminant's flow-weighted concentration, mg/L (also an
/// ensemble variable).
pub fn mg_per_l(contaminant: &str) -> String {
    format!("{contaminant}_mg_per_l")
}

/// The header as owned strings (for writers that add scenario columns).
pub fn owned(columns: &[&str]) -> Vec<String> {
    columns.iter().map(|c| c.to_string()).collect()
}

/// Load and concentration columns of each contaminant, then `flags`.
fn contaminant_tail<S: AsRef<str>>(mut h: Vec<String>, contaminants: &[S]) -> Vec<String> {
    for c in contaminants {
        h.push(load_kg_per_yr(c.as_ref()));
        h.push(mg_per_l(c.as_ref()));
    }
    h.push(FLAGS.into());
    h
}

/// Values of the `flags` column of `yearly.csv` and `nodes.csv`.
pub mod flags {
    /// Prefix of `low-runoff:<contaminant>`: too little runoff to state a concentration.
    pub const LOW_RUNOFF: &str = "low-runoff";
    /// The baseline yield is zero: changes against it are undefined.
    pub const ZERO_BASELINE_YIELD: &str = "zero-baseline-yield";
    /// Separator between flags.
    pub const SEPARATOR: char = ';';

    /// Prefix of `above-ceiling:<contaminant>`: the computed concentration is above the
    /// stated ceiling (`model::dilution::ConcentrationCeiling`), so it is not stated.
    pub const ABOVE_CEILING: &str = "above-ceiling";

    /// `low-runoff:<contaminant>`.
    pub fn low_runoff(contaminant: &str) -> String {
        format!("{LOW_RUNOFF}:{contaminant}")
    }

    /// `above-ceiling:<contaminant>`.
    pub fn above_ceiling(contaminant: &str) -> String {
        format!("{ABOVE_CEILING}:{contaminant}")
    }

    /// The flag of a concentration that is not stated.
    pub fn concentration(flag: crate::model::dilution::ScreenedFlag, contaminant: &str) -> String {
        match flag {
            crate::model::dilution::ScreenedFlag::LowRunoff => low_runoff(contaminant),
            crate::model::dilution::ScreenedFlag::AboveCeiling => above_ceiling(contaminant),
        }
    }
}

/// `yearly.csv`: one row per catchment, strategy and year.
pub mod yearly {
    pub use super::{CATCHMENT, FLAGS, STRATEGY, YEAR};
    /// Rainfall, mm.
    pub const RAIN_MM: &str = "rain_mm";
    /// Grass PET, mm.
    pub const PET_MM: &str = "pet_mm";
    /// Evapotranspiration, mm.
    pub const ET_MM: &str = "et_mm";
    /// Water yield, mm.
    pub const YIELD_MM: &str = "yield_mm";
    /// Water yield, m³.
    pub const YIELD_M3: &str = "yield_m3";
    /// Yield with today's cover held, mm.
    pub const BASELINE_YIELD_MM: &str = "baseline_yield_mm";
    /// Yield with no invader, mm.
    pub const UNINVADED_YIELD_MM: &str = "uninvaded_yield_mm";
    /// Change against the baseline, %.
    pub const YIELD_CHANGE_PCT: &str = "yield_change_pct";
    /// Change against no invasion, %.
    pub const CHANGE_VS_UNINVADED_PCT: &str = "change_vs_uninvaded_pct";
    /// ET-equivalent closed-forest fraction.
    pub const CANOPY_FRACTION: &str = "canopy_fraction";
    /// Scattered infestation, ha.
    pub const SCATTERED_HA: &str = "scattered_ha";
    /// Medium-density infestation, ha.
    pub const MEDIUM_HA: &str = "medium_ha";
    /// Dense infestation, ha.
    pub const DENSE_HA: &str = "dense_ha";
    /// All infested area, ha.
    pub const INFESTED_HA: &str = "infested_ha";
    /// Area newly infested in the year, ha.
    pub const NEW_INFESTATION_HA: &str = "new_infestation_ha";
    /// Control cost of the year, $.
    pub const CONTROL_COST: &str = "control_cost";
    /// Area treated, ha.
    pub const TREATED_HA: &str = "treated_ha";
    /// Area cleared, ha.
    pub const CLEARED_HA: &str = "cleared_ha";
    /// Area regrown, ha.
    pub const REGROWTH_HA: &str = "regrowth_ha";
    /// Water saved against no control, m³.
    pub const WATER_SAVED_M3: &str = "water_saved_m3";
    /// Cost so far, $.
    pub const CUMULATIVE_COST: &str = "cumulative_cost";
    /// Water saved so far, m³.
    pub const CUMULATIVE_WATER_SAVED_M3: &str = "cumulative_water_saved_m3";

    /// The columns before the per-contaminant ones, in file order.
    pub const FIXED: [&str; 25] = [
        CATCHMENT,
        STRATEGY,
        YEAR,
        RAIN_MM,
        PET_MM,
        ET_MM,
        YIELD_MM,
        YIELD_M3,
        BASELINE_YIELD_MM,
        UNINVADED_YIELD_MM,
        YIELD_CHANGE_PCT,
        CHANGE_VS_UNINVADED_PCT,
        CANOPY_FRACTION,
        SCATTERED_HA,
        MEDIUM_HA,
        DENSE_HA,
        INFESTED_HA,
        NEW_INFESTATION_HA,
        CONTROL_COST,
        TREATED_HA,
        CLEARED_HA,
        REGROWTH_HA,
        WATER_SAVED_M3,
        CUMULATIVE_COST,
        CUMULATIVE_WATER_SAVED_M3,
    ];

    /// The header for these contaminants: [`FIXED`], load and concentration of each, `flags`.
    pub fn columns<S: AsRef<str>>(contaminants: &[S]) -> Vec<String> {
        super::contaminant_tail(super::owned(&FIXED), contaminants)
    }
}

/// `nodes.csv`: receiving nodes of the drainage network, per strategy and year.
pub mod nodes {
    pub use super::{FLAGS, STRATEGY, YEAR};
    /// The node's catchment id.
    pub const NODE: &str = "node";
    /// Catchments upstream of the node, itself included.
    pub const UPSTREAM_CATCHMENTS: &str = "upstream_catchments";
    /// Area drained, ha.
    pub const AREA_HA: &str = "area_ha";
    /// Yield through the node, m³.
    pub const YIELD_M3: &str = "yield_m3";
    /// Baseline yield through the node, m³.
    pub const BASELINE_YIELD_M3: &str = "baseline_yield_m3";
    /// Change against the baseline, %.
    pub const YIELD_CHANGE_PCT: &str = "yield_change_pct";

    /// The columns before the per-contaminant ones.
    pub const FIXED: [&str; 8] = [NODE, STRATEGY, YEAR, UPSTREAM_CATCHMENTS, AREA_HA, YIELD_M3, BASELINE_YIELD_M3, YIELD_CHANGE_PCT];

    /// The header for these contaminants.
    pub fn columns<S: AsRef<str>>(contaminants: &[S]) -> Vec<String> {
        super::contaminant_tail(super::owned(&FIXED), contaminants)
    }
}

/// `summary.csv`: one row per catchment (and the basin) and strategy.
pub mod summary {
    pub use super::{CATCHMENT, STRATEGY};
    /// Display name.
    pub const NAME: &str = "name";
    /// Area, ha.
    pub const AREA_HA: &str = "area_ha";
    /// Yield change against the baseline, 10-year mean ending in the last year, %.
    pub const YIELD_CHANGE_HORIZON_PCT: &str = "yield_change_horizon_pct";
    /// Change against no invasion, 10-year mean ending in the last year, %.
    pub const CHANGE_VS_UNINVADED_HORIZON_PCT: &str = "change_vs_uninvaded_horizon_pct";
    /// Water lost against the baseline, 10-year mean ending in the last year, m³/yr.
    pub const WATER_LOST_HORIZON_M3_PER_YR: &str = "water_lost_horizon_m3_per_yr";
    /// Canopy fraction in the first year.
    pub const CANOPY_FRACTION_START: &str = "canopy_fraction_start";
    /// Canopy fraction in the last year.
    pub const CANOPY_FRACTION_END: &str = "canopy_fraction_end";
    /// Nominal cost, $.
    pub const TOTAL_COST: &str = "total_cost";
    /// Present value of the cost, $.
    pub const TOTAL_COST_PV: &str = "total_cost_pv";
    /// Water saved, m³.
    pub const WATER_SAVED_M3: &str = "water_saved_m3";
    /// Discounted water saved, m³.
    pub const WATER_SAVED_PV_M3: &str = "water_saved_pv_m3";
    /// Nominal cost per m³ saved, $/m³.
    pub const COST_PER_M3: &str = "cost_per_m3";
    /// Levelised cost, $/m³.
    pub const LEVELISED_COST_PER_M3: &str = "levelised_cost_per_m3";
    /// Net present value, $.
    pub const NPV: &str = "npv";
    /// Benefit-cost ratio.
    pub const BENEFIT_COST_RATIO: &str = "benefit_cost_ratio";

    pub use super::SCOPE;
    /// The leading columns (`area_ha` of an `arriving` row is the area drained).
    pub const ID: [&str; 5] = [CATCHMENT, SCOPE, NAME, STRATEGY, AREA_HA];
    /// The horizon columns (after the per-offset ones).
    pub const HORIZON: [&str; 5] = [
        YIELD_CHANGE_HORIZON_PCT,
        CHANGE_VS_UNINVADED_HORIZON_PCT,
        WATER_LOST_HORIZON_M3_PER_YR,
        CANOPY_FRACTION_START,
        CANOPY_FRACTION_END,
    ];
    /// The programme economics (after the per-contaminant ones).
    pub const ECONOMICS: [&str; 8] =
        [TOTAL_COST, TOTAL_COST_PV, WATER_SAVED_M3, WATER_SAVED_PV_M3, COST_PER_M3, LEVELISED_COST_PER_M3, NPV, BENEFIT_COST_RATIO];

    /// `yield_change_{offset}y_pct`: change against the baseline of the 10-year mean ending `offset` years after the start, %.
    pub fn yield_change_at(offset: usize) -> String {
        format!("yield_change_{offset}y_pct")
    }

    /// The offset of a [`yield_change_at`] column (`None` for any other column).
    pub fn offset_of(column: &str) -> Option<usize> {
        column.strip_prefix("yield_change_")?.strip_suffix("y_pct")?.parse().ok()
    }

    /// `{name}_first_exceedance_year`: first year above the guideline, when it was
    /// not above in the first year (empty when above at the start or never above).
    pub fn first_exceedance_year(contaminant: &str) -> String {
        format!("{contaminant}_first_exceedance_year")
    }

    /// `{name}_guideline_status`: `above-at-start`, `exceeded`, `not-exceeded`
    /// (empty without a guideline; `model::summary::GuidelineStatus`).
    pub fn guideline_status(contaminant: &str) -> String {
        format!("{contaminant}_guideline_status")
    }

    /// `{name}_invasion_exceedance_first_year`: first year above the guideline while the
    /// uninvaded catchment (no invader, same climate) is at or below it.
    pub fn invasion_exceedance_first_year(contaminant: &str) -> String {
        format!("{contaminant}_invasion_exceedance_first_year")
    }

    /// `{name}_invasion_exceedance_years`: years above the guideline while the uninvaded
    /// catchment is at or below it.
    pub fn invasion_exceedance_years(contaminant: &str) -> String {
        format!("{contaminant}_invasion_exceedance_years")
    }

    /// The exceedance columns of one contaminant, in file order.
    pub fn exceedance_columns(contaminant: &str) -> [String; 4] {
        [
            guideline_status(contaminant),
            first_exceedance_year(contaminant),
            invasion_exceedance_first_year(contaminant),
            invasion_exceedance_years(contaminant),
        ]
    }

    /// True for a [`first_exceedance_year`] column.
    pub fn is_first_exceedance_year(column: &str) -> bool {
        column.ends_with("_first_exceedance_year")
    }

    /// The header: [`ID`], a change at each offset, [`HORIZON`], the
    /// [`exceedance_columns`] of each contaminant, [`ECONOMICS`].
    ///
    /// The changes and the water lost are 10-year means ending in the year named
    /// (`model::summary::HEADLINE_WINDOW_YR`): `yield_change_20y_pct` is the change of
    /// the mean yield over years 11–20 after the start against the baseline's mean.
    pub fn columns<S: AsRef<str>>(offsets: &[usize], contaminants: &[S]) -> Vec<String> {
        let mut h = super::owned(&ID);
        h.extend(offsets.iter().map(|&o| yield_change_at(o)));
        h.extend(super::owned(&HORIZON));
        h.extend(contaminants.iter().flat_map(|c| exceedance_columns(c.as_ref())));
        h.extend(super::owned(&ECONOMICS));
        h
    }
}

/// `budget.csv`: budget of each strategy, pool and year.
pub mod budget {
    pub use super::{STRATEGY, YEAR};
    /// `basin` or a catchment id.
    pub const POOL: &str = "pool";
    /// Budget available, $ ([`UNLIMITED`] when there is no dollar limit, as for a
    /// fixed-area programme).
    pub const AVAILABLE: &str = "available";
    /// Spent, $.
    pub const SPENT: &str = "spent";
    /// Unspent, $ (empty when unlimited).
    pub const UNSPENT: &str = "unspent";
    /// Unspent budget carried into the next year, $ (0 without `carry_over`).
    pub const CARRIED_OVER: &str = "carried_over";
    /// Area to treat, ha, of a fixed-area programme (empty for a budget programme).
    pub const AVAILABLE_HA: &str = "available_ha";
    /// Area treated from the pool, ha.
    pub const TREATED_HA: &str = "treated_ha";
    /// Area left untreated, ha, of a fixed-area programme (empty for a budget programme).
    pub const UNSPENT_HA: &str = "unspent_ha";
    /// The value of [`AVAILABLE`] without a limit.
    pub const UNLIMITED: &str = "unlimited";
    /// The header.
    pub const COLUMNS: [&str; 10] = [STRATEGY, POOL, YEAR, AVAILABLE, SPENT, UNSPENT, CARRIED_OVER, AVAILABLE_HA, TREATED_HA, UNSPENT_HA];
}

/// `delay.csv`: what a later start of each programme costs.
pub mod delay {
    pub use super::STRATEGY;
    /// Delay of the start, years.
    pub const DELAY_YR: &str = "delay_yr";
    /// Start year after the delay.
    pub const START_YEAR: &str = "start_year";
    /// Nominal cost, $.
    pub const TOTAL_COST: &str = "total_cost";
    /// Present value of the cost, $.
    pub const TOTAL_COST_PV: &str = "total_cost_pv";
    /// Water saved, m³.
    pub const WATER_SAVED_M3: &str = "water_saved_m3";
    /// Water lost against the baseline over the horizon, m³.
    pub const WATER_LOST_VS_BASELINE_M3: &str = "water_lost_vs_baseline_m3";
    /// Infested area at the horizon, ha.
    pub const FINAL_INFESTED_HA: &str = "final_infested_ha";
    /// The header.
    pub const COLUMNS: [&str; 8] =
        [STRATEGY, DELAY_YR, START_YEAR, TOTAL_COST, TOTAL_COST_PV, WATER_SAVED_M3, WATER_LOST_VS_BASELINE_M3, FINAL_INFESTED_HA];
}

/// `ensemble.csv`: percentiles of each variable per catchment, strategy and year.
pub mod ensemble {
    pub use super::{CATCHMENT, SCOPE, STRATEGY, YEAR};
    /// The variable ([`variables`]).
    pub const VARIABLE: &str = "variable";
    /// 5th percentile.
    pub const P5: &str = "p5";
    /// 25th percentile.
    pub const P25: &str = "p25";
    /// Median.
    pub const P50: &str = "p50";
    /// 75th percentile.
    pub const P75: &str = "p75";
    /// 95th percentile.
    pub const P95: &str = "p95";
    /// Mean.
    pub const MEAN: &str = "mean";
    /// Members with a defined value.
    pub const MEMBERS: &str = "members";
    /// Share of members above the guideline (concentrations only).
    pub const PROB_ABOVE_GUIDELINE: &str = "prob_above_guideline";
    /// The header.
    pub const COLUMNS: [&str; 13] =
        [CATCHMENT, SCOPE, STRATEGY, YEAR, VARIABLE, P5, P25, P50, P75, P95, MEAN, MEMBERS, PROB_ABOVE_GUIDELINE];
    /// The percentile columns, in order.
    pub const PERCENTILES: [&str; 5] = [P5, P25, P50, P75, P95];

    /// Variable: yield, mm.
    pub const YIELD_MM: &str = "yield_mm";
    /// Variable: yield change against the baseline, %.
    pub const YIELD_CHANGE_PCT: &str = "yield_change_pct";
    /// Variable: yield change of the 10-year mean ending in the year against the
    /// baseline's, % (`model::summary::window_change_pct`; the headline numbers).
    pub const YIELD_CHANGE_10YR_MEAN_PCT: &str = "yield_change_10yr_mean_pct";
    /// Variable: control cost, $.
    pub const CONTROL_COST: &str = "control_cost";

    /// The variables for these contaminants, in file order: yield, change, 10-year-mean
    /// change, each concentration, control cost (`basin` rows have no concentrations).
    pub fn variables<S: AsRef<str>>(contaminants: &[S]) -> Vec<String> {
        let mut v = super::owned(&[YIELD_MM, YIELD_CHANGE_PCT, YIELD_CHANGE_10YR_MEAN_PCT]);
        v.extend(contaminants.iter().map(|c| super::mg_per_l(c.as_ref())));
        v.push(CONTROL_COST.into());
        v
    }
}

/// `economics.csv` (with an ensemble and at least one control strategy): the
/// programme economics of every member reduced to percentiles, per catchment
/// (`local`), receiving node (`arriving`) and the basin, for each strategy.
pub mod economics {
    pub use super::ensemble::{MEAN, MEMBERS, P25, P5, P50, P75, P95, VARIABLE};
    pub use super::{CATCHMENT, SCOPE, STRATEGY};
    /// File name.
    pub const FILE: &str = "economics.csv";
    /// Share of members whose value is above zero (`npv` only: the probability that the programme pays).
    pub const PROB_ABOVE_ZERO: &str = "prob_above_zero";
    /// The header.
    pub const COLUMNS: [&str; 12] = [CATCHMENT, SCOPE, STRATEGY, VARIABLE, P5, P25, P50, P75, P95, MEAN, MEMBERS, PROB_ABOVE_ZERO];
    /// The variables, in file order, with the decimals written (`npv` and
    /// `benefit_cost_ratio` only when the scenario gives a value of water). Their
    /// meanings are the `summary.csv` columns of the same names, per member.
    pub const VARIABLES: [(&str, usize); 7] = [
        (super::summary::TOTAL_COST, 2),
        (super::summary::TOTAL_COST_PV, 2),
        (super::summary::WATER_SAVED_M3, 1),
        (super::summary::WATER_SAVED_PV_M3, 1),
        (super::summary::LEVELISED_COST_PER_M3, 6),
        (super::summary::NPV, 2),
        (super::summary::BENEFIT_COST_RATIO, 4),
    ];
}

/// `members.csv` (on request): every member's values.
pub mod members {
    pub use super::{CATCHMENT, STRATEGY, YEAR};
    /// Member index, from 0.
    pub const MEMBER: &str = "member";
    /// Water saved against the member's no-control run, m³.
    pub const WATER_SAVED_M3: &str = "water_saved_m3";

    /// The header: ids, then each [`super::ensemble::variables`], then water saved.
    pub fn columns<S: AsRef<str>>(contaminants: &[S]) -> Vec<String> {
        let mut h = super::owned(&[CATCHMENT, STRATEGY, MEMBER, YEAR]);
        h.extend(super::ensemble::variables(contaminants));
        h.push(WATER_SAVED_M3.into());
        h
    }
}

/// `sensitivity.csv`: parameters ranked by their influence on the yield change.
pub mod sensitivity {
    pub use super::{CATCHMENT, STRATEGY, YEAR};
    /// When evaluated ([`AT_YEAR_20`], [`AT_HORIZON`]).
    pub const AT: &str = "at";
    /// Parameter (scenario key path, e.g. `strategy[2].efficacy`).
    pub const PARAMETER: &str = "parameter";
    /// The parameter as a reader names it (e.g. `efficacy of strategy 'best-value'`).
    pub const LABEL: &str = "label";
    /// Spearman rank correlation.
    pub const SPEARMAN_RHO: &str = "spearman_rho";
    /// Standardised regression coefficient: the coefficient of the parameter in a
    /// least-squares regression of the result on all ranked parameters, each
    /// variable scaled by its standard deviation across members.
    pub const SRC: &str = "src";
    /// Rank, 1 = most influential.
    pub const RANK: &str = "rank";
    /// Optional column of some files: the output variable ranked against.
    pub const VARIABLE: &str = "variable";
    /// The header.
    pub const COLUMNS: [&str; 9] = [CATCHMENT, STRATEGY, AT, YEAR, PARAMETER, LABEL, SPEARMAN_RHO, SRC, RANK];
    /// [`AT`] value: 20 years after the start.
    pub const AT_YEAR_20: &str = "year-20";
    /// [`AT`] value: the last year.
    pub const AT_HORIZON: &str = "horizon";
}

/// `fit.csv`: one row per fitted catchment.
pub mod fit {
    /// The header.
    pub const COLUMNS: [&str; 36] = [
        super::CATCHMENT,
        "name",
        "method",
        "parameter",
        "value_scenario",
        "value_mean_fit",
        "value_series_fit",
        "interval_level",
        "interval_low",
        "interval_high",
        "bootstrap_samples",
        "bootstrap_at_bound",
        "nse",
        "kge",
        "kge_r",
        "kge_alpha",
        "kge_beta",
        "pbias_pct",
        "rmse_mm",
        "nse_scenario",
        "kge_scenario",
        "pbias_scenario_pct",
        "rmse_scenario_mm",
        "mean_observed_mm",
        "mean_simulated_mm",
        "mean_rain_mm",
        "canopy_fraction",
        "moving_average_yr",
        "series_windows",
        "first_year",
        "last_year",
        "years_used",
        "years_left_out",
        "years_mean_pet",
        "series_fit_at_bound",
        "notes",
    ];
}

/// `fit_years.csv`: each record year of each fitted catchment.
pub mod fit_years {
    /// The header.
    pub const COLUMNS: [&str; 10] = [
        super::CATCHMENT,
        super::YEAR,
        "rain_mm",
        "pet_mm",
        "observed_yield_mm",
        "simulated_yield_mm",
        "scenario_yield_mm",
        "residual_mm",
        "evaporative_ratio_observed",
        "aridity_index",
    ];
}

/// `left_out.csv`: observations the fit left out, and why.
pub mod left_out {
    /// The header.
    pub const COLUMNS: [&str; 4] = [super::CATCHMENT, super::YEAR, "row", "reason"];
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scenario_columns_follow_the_contaminants() {
        let y = yearly::columns(&["nitrate_n"]);
        assert_eq!(y.len(), yearly::FIXED.len() + 3);
        assert_eq!(&y[25..], ["nitrate_n_load_kg_per_yr", "nitrate_n_mg_per_l", "flags"]);
        let s = summary::columns(&[10, 20], &["total_p"]);
        assert_eq!(s[1], "scope");
        assert_eq!(s[5], "yield_change_10y_pct");
        assert_eq!(s[12], "total_p_guideline_status");
        assert_eq!(s[13], "total_p_first_exceedance_year");
        assert_eq!(s[15], "total_p_invasion_exceedance_years");
        assert_eq!(s.len(), 5 + 2 + 5 + 4 + 8);
        assert_eq!(summary::offset_of(&s[6]), Some(20));
        assert_eq!(summary::offset_of(summary::YIELD_CHANGE_HORIZON_PCT), None);
        assert_eq!(
            members::columns(&["a"]),
            [
                "catchment",
                "strategy",
                "member",
                "year",
                "yield_mm",
                "yield_change_pct",
                "yield_change_10yr_mean_pct",
                "a_mg_per_l",
                "control_cost",
                "water_saved_m3"
            ]
        );
        assert_eq!(flags::low_runoff("a"), "low-runoff:a");
        assert_eq!(flags::above_ceiling("a"), "above-ceiling:a");
        use crate::model::dilution::ScreenedFlag;
        for f in [ScreenedFlag::LowRunoff, ScreenedFlag::AboveCeiling] {
            assert_eq!(flags::concentration(f, "no3"), format!("{}:no3", f.name()));
        }
    }

    #[test]
    fn no_table_repeats_a_column() {
        let tables: Vec<Vec<String>> = vec![
            yearly::columns(&["a", "b"]),
            nodes::columns(&["a"]),
            summary::columns(&[10, 20, 50], &["a"]),
            owned(&budget::COLUMNS),
            owned(&delay::COLUMNS),
            owned(&ensemble::COLUMNS),
            owned(&sensitivity::COLUMNS),
            owned(&fit::COLUMNS),
            owned(&fit_years::COLUMNS),
            owned(&left_out::COLUMNS),
        ];
        for t in tables {
            let mut seen = std::collections::HashSet::new();
            for c in &t {
                assert!(seen.insert(c), "{c} twice in {t:?}");
            }
        }
    }
}

// Mean-annual fit and regional distribution (`yieldshift fit --mean-annual`).

/// `fit_mean_annual.csv`: one row per catchment fitted from its long-term means.
pub mod fit_mean_annual {
    /// File name.
    pub const FILE: &str = "fit_mean_annual.csv";
    /// The header.
    pub const COLUMNS: [&str; 15] = [
        super::CATCHMENT,
        "name",
        "row",
        "method",
        "parameter",
        "value_fit",
        "rain_mm",
        "pet_mm",
        "flow_mm",
        "simulated_flow_mm",
        "evaporative_ratio_observed",
        "aridity_index",
        "forest_fraction",
        "snow_fraction",
        "canopy_fraction_used",
    ];
}

/// `catchments_left_out.csv`: catchments of the mean-annual table that were not fitted, with the reason.
pub mod catchments_left_out {
    /// File name.
    pub const FILE: &str = "catchments_left_out.csv";
    /// The header.
    pub const COLUMNS: [&str; 11] = [
        super::CATCHMENT,
        "name",
        "row",
        "reason_code",
        "reason",
        "rain_mm",
        "pet_mm",
        "flow_mm",
        "evaporative_ratio_observed",
        "aridity_index",
        "snow_fraction",
    ];
}

/// `regional.csv`: the distribution of the fitted parameter, one statistic a row.
pub mod regional {
    /// File name.
    pub const FILE: &str = "regional.csv";
    /// The scenario snippet written beside it.
    pub const TOML_FILE: &str = "regional.toml";
    /// The header.
    pub const COLUMNS: [&str; 2] = ["statistic", "value"];
    /// Statistic names, in the order written (quantiles follow `q05` … `q95`).
    pub const STATISTICS: [&str; 23] = [
        "method",
        "parameter",
        "subset",
        "catchments_in_table",
        "catchments_fitted",
        "catchments_left_out",
        "n",
        "mean",
        "sd",
        "min",
        "q05",
        "q25",
        "q50",
        "q75",
        "q95",
        "max",
        "distribution",
        "distribution_toml",
        "misfit_truncated_normal",
        "misfit_lognormal",
        "misfit_pert",
        "q05_distribution",
        "q95_distribution",
    ];
}
