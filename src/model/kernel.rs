//! A lean no-control projection for ensembles: the same equations as
//! [`super::projection::project_catchment`] (and tested to give the same numbers,
//! `tests/ensemble.rs`), computing only what ensemble statistics need, into
//! reusable buffers, with two curve evaluations per year (ET of a mixed cover is
//! linear in the canopy fraction, so the baseline needs no extra evaluation).
//!
//! # Formula
//! The equations are those documented in [`super::projection`], [`super::cover`],
//! [`super::closure`] and [`super::dilution`], evaluated inline here for speed. For
//! year `t`:
//! * `f_t = clamp((F + Σ_a A_a·closure(a)) / A, 0, 1)`; `f_0` is the start year's.
//! * `ET_t = f_t·ET_forest(P_t, E0f_t) + (1 − f_t)·ET_grass(P_t, E0_t)` and the
//!   baseline `ET⁰_t` with `f_0`; `Q_t = max(0, P_t − ET_t)` (Zhang et al. 2001 mixing).
//! * Load of contaminant `j`: `L_t = L̄_d,t·(Q_t/Q̄)^(1 + b_j) + L_point`, kg/yr, with
//!   `L̄_d,t = A·[f_t·e_forest + (1 − f_t)·e_open]` and `Q̄` the yield of the mean
//!   climate with `f_0` ([`super::dilution::load_at_flow_kg_per_yr`],
//!   [`super::projection::long_term_mean_yield_mm`]).
//! * New infestation `ΔI_t` by [`super::cover::new_infestation_ha`]; the infested
//!   area `I` and seed-bearing area `S` are running sums:
//!   `I ← I + ΔI_t`, `S ← S + (area of the cohort that has just reached a_seed)`.
//! * Concentration `C = 1000·L / (10·Q·A)` mg/L, not stated when `Q < Q_min` or above
//!   the ceiling ([`super::dilution::concentration_at_flow_mg_per_l`], called here).
//!
//! # Symbols
//! * `A` — catchment area, ha, > 0; `F` — existing forest, ha, 0–`A`; `A_a` — infested
//!   area of age `a`, ha, ≥ 0.
//! * `P_t`, `E0_t`, `E0f_t` — rainfall, grass PET and forest PET, mm/yr, ≥ 0.
//! * `e_open`, `e_forest` — export coefficients, kg/ha/yr, ≥ 0; `L_point` — point
//!   load, kg/yr, ≥ 0.
//! * `Q_min` — minimum runoff for a concentration, mm/yr, ≥ 0; `a_seed` — seed-bearing
//!   age, years.
//!
//! # Assumptions
//! No control: the cover only ages and spreads. Closure is read at whole years of
//! age. Everything else as in [`super::projection`].
//!
//! # References
//! Zhang, L., Dawes, W. R., & Walker, G. R. (2001). Response of mean annual
//! evapotranspiration to vegetation changes at catchment scale. *Water Resources
//! Research*, 37(3), 701–708. doi:10.1029/2000WR900325 (the cover mixing; the other
//! equations' sources are given in the files named above).

use super::budyko::CoverCurves;
use super::catchment::{Catchment, ClimateYear, ModelParams};
use super::cover::new_infestation_ha;
use super::dilution::{self, Runoff};
use super::projection::long_term_mean_yield_mm;

/// Per-year outputs of one catchment, reused between members.
#[derive(Debug, Clone, Default)]
pub struct LeanYears {
    /// Water yield, mm/yr.
    pub yield_mm: Vec<f64>,
    /// Baseline yield (starting cover held), mm/yr.
    pub baseline_yield_mm: Vec<f64>,
    /// Loads, kg/yr, `k` per year (year-major).
    pub loads_kg_per_yr: Vec<f64>,
    /// Concentrations, mg/L, `k` per year (year-major); `None` where not stated
    /// (low runoff or above the ceiling).
    pub concentrations_mg_per_l: Vec<Option<f64>>,
    /// Canopy fraction per year.
    pub canopy_fraction: Vec<f64>,
    /// Long-term mean load with the year's cover, `L̄_d,t + L_point`, kg/yr, `k` per year
    /// (the reference of the concentration ceiling at a receiving node).
    pub mean_loads_kg_per_yr: Vec<f64>,
    /// Long-term mean yield `Q̄` the loads are scaled to, mm/yr.
    pub mean_yield_mm: f64,
    closure: Vec<f64>,
}

impl LeanYears {
    /// Yield change vs baseline in year `t`, % (`None` for a zero baseline).
    #[inline]
    pub fn change_pct(&self, t: usize) -> Option<f64> {
        let b = self.baseline_yield_mm[t];
        (b > 0.0).then(|| 100.0 * (self.yield_mm[t] - b) / b)
    }
}

#[inline]
fn et_pair(curves: &CoverCurves, c: &Catchment, p: &ModelParams, cl: ClimateYear) -> (f64, f64) {
    let pet_forest = c.forest_pet_mm(cl.pet_mm, p.forest_pet_factor);
    (p.interception.forest_et_mm(curves, cl.rain_mm, pet_forest), curves.grass_et_mm(cl.rain_mm, cl.pet_mm))
}

/// Projects one catchment with no control, filling `out`.
///
/// Per year the canopy sum is one contiguous dot product of the cohort areas with
/// the closure table read backwards, and the infested and seed-bearing areas are
/// kept as running sums.
pub fn project_lean(c: &Catchment, climate: &[ClimateYear], p: &ModelParams, out: &mut LeanYears) {
    let n = climate.len();
    let k = p.contaminants.len();
    let curves = c.curves(p);
    let inv = &p.invasion;
    let mut cohorts = c.starting_cohorts(inv);
    let max_age = cohorts.oldest_age_yr() + n;
    // closure read backwards: rev[j] = closure(max_age − j)
    out.closure.clear();
    out.closure.extend((0..=max_age).rev().map(|a| inv.closure.fraction_at(a as f64)));
    out.yield_mm.clear();
    out.baseline_yield_mm.clear();
    out.loads_kg_per_yr.clear();
    out.concentrations_mg_per_l.clear();
    out.canopy_fraction.clear();
    out.mean_loads_kg_per_yr.clear();
    let sb = inv.seed_bearing_age_yr as usize;
    let canopy = |areas: &[f64], rev: &[f64]| -> f64 {
        let off = max_age + 1 - areas.len();
        areas.iter().zip(&rev[off..]).map(|(a, c)| a * c).sum::<f64>()
    };
    let mut infested = cohorts.infested_ha();
    let mut seed = cohorts.area_at_least_age(sb);
    let f0 = ((c.forest_ha + canopy(cohorts.areas_oldest_first(), &out.closure)) / c.area_ha).clamp(0.0, 1.0);
    let mean_yield_mm = long_term_mean_yield_mm(c, p, f0);
    out.mean_yield_mm = mean_yield_mm;
    for &cl in climate {
        let f = ((c.forest_ha + canopy(cohorts.areas_oldest_first(), &out.closure)) / c.area_ha).clamp(0.0, 1.0);
        let (et_f, et_g) = et_pair(curves, c, p, cl);
        let et = f * et_f + (1.0 - f) * et_g;
        let et0 = f0 * et_f + (1.0 - f0) * et_g;
        let yield_mm = (cl.rain_mm - et).max(0.0);
        let runoff = Runoff { yield_mm, mean_yield_mm, area_ha: c.area_ha };
        out.yield_mm.push(yield_mm);
        out.baseline_yield_mm.push((cl.rain_mm - et0).max(0.0));
        out.canopy_fraction.push(f);
        for (j, m) in p.contaminants.iter().enumerate() {
            let point = c.point_kg_per_yr.get(j).copied().unwrap_or(0.0);
            let diffuse = dilution::load_kg_per_yr(c.area_ha, f, m.open_export_kg_per_ha_yr, m.forest_export_kg_per_ha_yr, 0.0);
            out.loads_kg_per_yr.push(dilution::load_at_flow_kg_per_yr(diffuse, point, m.cq, runoff));
            out.mean_loads_kg_per_yr.push(diffuse + point);
            out.concentrations_mg_per_l.push(
                dilution::concentration_at_flow_mg_per_l(diffuse, point, m.cq, runoff, p.min_runoff_mm, &p.concentration_ceiling).ok(),
            );
        }
        let new = new_infestation_ha(inv.spread_rate_per_yr, seed, inv.seed_rain_ha_per_yr, infested, c.vulnerable_ha);
        cohorts.push_new(new);
        infested += new;
        // The cohort that has just reached the seed-bearing age joins the seed source.
        seed += if sb == 0 { new } else { cohorts.area_at_age(sb) };
    }
    debug_assert_eq!(out.loads_kg_per_yr.len(), n * k);
    debug_assert_eq!(out.concentrations_mg_per_l.len(), n * k);
}
