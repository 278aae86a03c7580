//! Year-by-year projection of one catchment: cover → evapotranspiration → yield → dilution.
//!
//! # Formula
//! For each year `t` (0 = start year, the current cover):
//! 1. Cover: cohorts age and spread ([`super::cover`]).
//! 2. Canopy fraction `f_t = clamp((F + Σ_a A_a·closure(a)) / A, 0, 1)` ([`super::closure`]).
//! 3. `ET_t = f_t·ET_forest(P_t, E0f_t) + (1 − f_t)·ET_grass(P_t, E0_t)` ([`super::budyko`]).
//! 4. Yield `Q_t = max(0, P_t − ET_t)` (mm), volume `V_t = 10·Q_t·A` (m³).
//! 5. Baseline: the same climate with the starting cover `f_0` held fixed;
//!    change `100·(Q_t − Q_base,t)/Q_base,t` %. Uninvaded: `f = F/A`.
//! 6. Loads and concentrations ([`super::dilution`]): the diffuse load follows
//!    `L_d(Q_t) = L̄_d·(Q_t/Q̄)^(1 + b)` with `Q̄` the yield of the long-term mean
//!    climate with the starting cover `f_0`; point loads are fixed; concentrations
//!    above the ceiling (default 10× the concentration at `Q̄`) are flagged.
//!
//! # Symbols
//! * `A` — catchment area, ha, > 0; `F` — existing non-spreading forest, ha, 0–`A`.
//! * `A_a` — infested area of age `a` (years), ha, ≥ 0; `closure(a)` — 0–1.
//! * `P_t`, `E0_t` — the year's rainfall and grass PET, mm/yr, ≥ 0; `E0f_t` — forest
//!   PET, mm/yr ([`super::catchment::Catchment::forest_pet_mm`]).
//! * `f_t` — ET-equivalent canopy fraction, 0–1; `Q_t`, `ET_t` — mm/yr.
//!
//! # Assumptions
//! * A mean-annual curve applied year by year ignores storage carry-over between
//!   years; annual values are indicative, long-term changes are the result.
//! * The baseline holds the starting cover, so the change measures the effect of
//!   spread (and control) from the start year on; the uninvaded comparison measures
//!   the total effect of the invader, including what is already there.
//! * Cover acts on evapotranspiration only through the canopy fraction; the year's
//!   results use the cover at the start of the year.
//!
//! # References
//! Zhang, L., Dawes, W. R., & Walker, G. R. (2001). Response of mean annual
//! evapotranspiration to vegetation changes at catchment scale. *Water Resources
//! Research*, 37(3), 701–708. doi:10.1029/2000WR900325 (cover mixing, step 3).
//! The sources of the other steps are given in the files they link to.

use super::catchment::{Catchment, ClimateYear, ModelParams};
use super::cover::{ClassAreas, Cohorts};
use super::dilution::{self, Runoff, ScreenedFlag};
use super::interception::mixed_et_mm;

/// Results of one catchment in one year.
#[derive(Debug, Clone, PartialEq)]
pub struct YearResult {
    /// Calendar year.
    pub year: i32,
    /// Precipitation, mm/yr.
    pub rain_mm: f64,
    /// Potential evapotranspiration (grass), mm/yr.
    pub pet_mm: f64,
    /// Actual evapotranspiration, mm/yr.
    pub et_mm: f64,
    /// Water yield, mm/yr.
    pub yield_mm: f64,
    /// Water yield volume, m³/yr.
    pub yield_m3: f64,
    /// Yield with the starting cover held fixed, mm/yr.
    pub baseline_yield_mm: f64,
    /// Yield with no invader at all (existing forest only), mm/yr.
    pub uninvaded_yield_mm: f64,
    /// ET-equivalent canopy fraction, 0–1.
    pub canopy_fraction: f64,
    /// Infested area by density class, ha.
    pub classes: ClassAreas,
    /// New infestation established this year, ha.
    pub new_infestation_ha: f64,
    /// Load of each contaminant (scenario order), kg/yr.
    pub loads_kg_per_yr: Vec<f64>,
    /// Long-term mean runoff volume `V̄ = 10·Q̄·A` the ceiling refers to, m³/yr.
    pub mean_volume_m3: f64,
    /// Long-term mean load of each contaminant with the year's cover, `L̄_d + L_point`, kg/yr.
    pub mean_loads_kg_per_yr: Vec<f64>,
    /// Concentration of each contaminant, mg/L, or why it is not stated.
    pub concentrations: Vec<Result<f64, ScreenedFlag>>,
    /// Load of each contaminant with no invader (cover `F/A`, uninvaded yield), kg/yr.
    pub uninvaded_loads_kg_per_yr: Vec<f64>,
    /// Concentration of each contaminant with no invader, mg/L, or why it is not stated.
    pub uninvaded_concentrations: Vec<Result<f64, ScreenedFlag>>,
}

impl YearResult {
    /// Yield change against the baseline, %. `None` when the baseline yield is zero.
    pub fn yield_change_pct(&self) -> Option<f64> {
        percent_change(self.yield_mm, self.baseline_yield_mm)
    }

    /// Yield change against the uninvaded catchment, % (the total impact so far).
    pub fn change_vs_uninvaded_pct(&self) -> Option<f64> {
        percent_change(self.yield_mm, self.uninvaded_yield_mm)
    }
}

/// `100·(value − reference)/reference`, `None` when the reference is not positive.
#[inline]
pub fn percent_change(value: f64, reference: f64) -> Option<f64> {
    (reference > 0.0).then(|| 100.0 * (value - reference) / reference)
}

/// Catchment evapotranspiration and yield for canopy fraction `f`, mm/yr.
#[inline]
pub fn et_and_yield_mm(c: &Catchment, p: &ModelParams, climate: ClimateYear, canopy_fraction: f64) -> (f64, f64) {
    let pet_forest = c.forest_pet_mm(climate.pet_mm, p.forest_pet_factor);
    let et = mixed_et_mm(c.curves(p), &p.interception, climate.rain_mm, pet_forest, climate.pet_mm, canopy_fraction);
    (et, (climate.rain_mm - et).max(0.0))
}

/// Canopy fraction from existing forest plus the stand's closed-canopy area.
#[inline]
pub fn canopy_fraction(c: &Catchment, cohorts: &Cohorts, closure_by_age: &[f64]) -> f64 {
    ((c.forest_ha + cohorts.canopy_ha(closure_by_age)) / c.area_ha).clamp(0.0, 1.0)
}

/// Canopy fraction of the catchment's starting cover (year 0).
pub fn starting_canopy_fraction(c: &Catchment, p: &ModelParams) -> f64 {
    let cohorts = c.starting_cohorts(&p.invasion);
    let closure = p.invasion.closure.table_by_whole_year(cohorts.oldest_age_yr());
    canopy_fraction(c, &cohorts, &closure)
}

/// Long-term mean runoff `Q̄` at which the export coefficients hold, mm/yr: the
/// yield of the catchment's long-term mean climate with the starting cover
/// (canopy fraction `f_baseline`), the flow the concentration–discharge law of
/// [`super::dilution`] is scaled to.
#[inline]
pub fn long_term_mean_yield_mm(c: &Catchment, p: &ModelParams, f_baseline: f64) -> f64 {
    et_and_yield_mm(c, p, c.mean_climate(), f_baseline).1
}

/// Projects one catchment over `climate.len()` years starting at `start_year`.
///
/// `climate[t]` is the climate of year `start_year + t`.
pub fn project_catchment(c: &Catchment, climate: &[ClimateYear], p: &ModelParams, start_year: i32) -> Vec<YearResult> {
    let mut cohorts = c.starting_cohorts(&p.invasion);
    let closure = p.invasion.closure.table_by_whole_year(cohorts.oldest_age_yr() + climate.len());
    let f0 = canopy_fraction(c, &cohorts, &closure);
    let f_uninvaded = c.uninvaded_canopy_fraction();
    let mut out = Vec::with_capacity(climate.len());
    let mut new_ha = 0.0;
    for (t, &cl) in climate.iter().enumerate() {
        let f = canopy_fraction(c, &cohorts, &closure);
        out.push(year_result(c, p, start_year + t as i32, cl, f, f0, f_uninvaded, cohorts.class_areas(&p.invasion), new_ha));
        new_ha = cohorts.step(&p.invasion, c.vulnerable_ha);
    }
    out
}

/// Assembles one year's results from its canopy fraction.
#[allow(clippy::too_many_arguments)]
pub fn year_result(
    c: &Catchment,
    p: &ModelParams,
    year: i32,
    cl: ClimateYear,
    f: f64,
    f_baseline: f64,
    f_uninvaded: f64,
    classes: ClassAreas,
    new_infestation_ha: f64,
) -> YearResult {
    let (et_mm, yield_mm) = et_and_yield_mm(c, p, cl, f);
    let (_, baseline_yield_mm) = et_and_yield_mm(c, p, cl, f_baseline);
    let (_, uninvaded_yield_mm) = et_and_yield_mm(c, p, cl, f_uninvaded);
    let yield_m3 = dilution::volume_m3(yield_mm, c.area_ha);
    let runoff = Runoff { yield_mm, mean_yield_mm: long_term_mean_yield_mm(c, p, f_baseline), area_ha: c.area_ha };
    let mut loads = Vec::with_capacity(p.contaminants.len());
    let mut concentrations = Vec::with_capacity(p.contaminants.len());
    let mut mean_loads = Vec::with_capacity(p.contaminants.len());
    let mut uninvaded_loads = Vec::with_capacity(p.contaminants.len());
    let mut uninvaded_concentrations = Vec::with_capacity(p.contaminants.len());
    // The uninvaded catchment's loads follow the same law about the same long-term mean flow.
    let uninvaded_runoff = Runoff { yield_mm: uninvaded_yield_mm, ..runoff };
    for (k, m) in p.contaminants.iter().enumerate() {
        let diffuse = dilution::load_kg_per_yr(c.area_ha, f, m.open_export_kg_per_ha_yr, m.forest_export_kg_per_ha_yr, 0.0);
        let point = c.point_kg_per_yr.get(k).copied().unwrap_or(0.0);
        loads.push(dilution::load_at_flow_kg_per_yr(diffuse, point, m.cq, runoff));
        mean_loads.push(diffuse + point);
        concentrations.push(dilution::concentration_at_flow_mg_per_l(
            diffuse,
            point,
            m.cq,
            runoff,
            p.min_runoff_mm,
            &p.concentration_ceiling,
        ));
        let diffuse_u = dilution::load_kg_per_yr(c.area_ha, f_uninvaded, m.open_export_kg_per_ha_yr, m.forest_export_kg_per_ha_yr, 0.0);
        uninvaded_loads.push(dilution::load_at_flow_kg_per_yr(diffuse_u, point, m.cq, uninvaded_runoff));
        uninvaded_concentrations.push(dilution::concentration_at_flow_mg_per_l(
            diffuse_u,
            point,
            m.cq,
            uninvaded_runoff,
            p.min_runoff_mm,
            &p.concentration_ceiling,
        ));
    }
    YearResult {
        year,
        rain_mm: cl.rain_mm,
        pet_mm: cl.pet_mm,
        et_mm,
        yield_mm,
        yield_m3,
        baseline_yield_mm,
        uninvaded_yield_mm,
        canopy_fraction: f,
        classes,
        new_infestation_ha,
        loads_kg_per_yr: loads,
        mean_volume_m3: dilution::volume_m3(runoff.mean_yield_mm, c.area_ha),
        mean_loads_kg_per_yr: mean_loads,
        concentrations,
        uninvaded_loads_kg_per_yr: uninvaded_loads,
        uninvaded_concentrations,
    }
}
