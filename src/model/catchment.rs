//! Validated model inputs: catchments, contaminants, climate and model parameters.
//!
//! These are plain data. Reading them from files (and checking units and ranges)
//! is the job of [`crate::input`]; the model trusts what it is given here.
//!
//! # Formula
//! Two small relations are defined here:
//! * Forest PET in a year with grass PET `E0_t`: `E0f_t = E0_t · E0f̄ / E0̄` when the
//!   catchment gives its own long-term forest PET `E0f̄` (its ratio is kept every
//!   year), else `E0f_t = k_f · E0_t`.
//! * Canopy fraction with no invader at all: `f_u = clamp(F / A, 0, 1)`.
//!
//! # Symbols
//! Ranges are those the input readers accept (`crate::input`).
//! * `A` — catchment area, ha, > 0 (up to 10⁹).
//! * `P̄` — long-term mean rainfall, mm/yr, 1–20 000.
//! * `E0̄`, `E0f̄` — long-term mean PET over grass/tussock and (optional) over
//!   forest, mm/yr, 1–5 000.
//! * `k_f` — forest PET factor, dimensionless, 0.5–2.
//! * `F` — existing non-spreading forest, ha, 0–`A`; the vulnerable area is at most
//!   the open area `A − F`, and the infested area by density class lies within it.
//! * Export coefficients `e_open`, `e_forest`, kg/ha/yr, 0–10⁴; point loads, kg/yr,
//!   0–10¹²; guideline, mg/L, 0–10⁶.
//! * Minimum runoff for a concentration, mm/yr, 0–1 000.
//! * `ClimateYear` — one year's rainfall and grass PET, mm/yr.
//!
//! # Assumptions
//! * A catchment's forest and grass PET keep the same ratio in every year.
//! * Curve parameters fitted for a catchment replace the scenario's for that
//!   catchment only.
//!
//! # References
//! Common practice, no published source: scaling forest PET from grass PET by a
//! fixed factor.

use super::budyko::CoverCurves;
use super::cover::{ClassAreas, Cohorts, InvasionParams};
use super::dilution::{ConcentrationCeiling, ConcentrationDischarge};
use super::interception::CanopyInterception;

/// One catchment, with its starting cover.
#[derive(Debug, Clone, PartialEq)]
pub struct Catchment {
    /// Identifier, unique in the basin.
    pub id: String,
    /// Human-readable name.
    pub name: String,
    /// Catchment area, ha (> 0).
    pub area_ha: f64,
    /// Long-term mean precipitation, mm/yr (> 0).
    pub rain_mm: f64,
    /// Long-term mean potential evapotranspiration over grass/tussock, mm/yr (> 0).
    pub pet_mm: f64,
    /// Long-term mean potential evapotranspiration over forest, mm/yr, if known.
    /// When absent, the scenario's forest PET factor × `pet_mm` is used.
    pub pet_forest_mm: Option<f64>,
    /// Area that can carry the invader, including what is infested now, ha.
    pub vulnerable_ha: f64,
    /// Currently infested area by density class, ha. With `stand_ages_ha` this is
    /// the class split of those cohorts (for reporting); the cohorts are what is projected.
    pub infested: ClassAreas,
    /// Starting infestation by stand age, when known (a planting or a dated invasion):
    /// `stand_ages_ha[a]` is the area established `a` years before the start, ha.
    /// `None`: the cohorts are placed evenly over the ages of each density class
    /// ([`Cohorts::from_classes`]).
    pub stand_ages_ha: Option<Vec<f64>>,
    /// Area under forest that does not spread (native forest, plantations), ha.
    pub forest_ha: f64,
    /// Identifier of the catchment this one drains into, if any.
    pub flows_to: Option<String>,
    /// Point-source load of each contaminant (scenario order), kg/yr.
    pub point_kg_per_yr: Vec<f64>,
    /// Curve parameters fitted for this catchment, overriding the scenario's.
    pub curves: Option<CoverCurves>,
}

/// A contaminant whose concentration is tracked.
#[derive(Debug, Clone, PartialEq)]
pub struct Contaminant {
    /// Name used in column headings (e.g. `nitrate_n`).
    pub name: String,
    /// Export coefficient of open (grass/tussock) land, kg/ha/yr.
    pub open_export_kg_per_ha_yr: f64,
    /// Export coefficient of conifer canopy (and existing forest), kg/ha/yr.
    pub forest_export_kg_per_ha_yr: f64,
    /// Guideline concentration, mg/L, if any.
    pub guideline_mg_per_l: Option<f64>,
    /// Concentration–discharge behaviour of the diffuse load (point loads are always
    /// diluted); [`ConcentrationDischarge::PURE_DILUTION`] keeps the load fixed.
    pub cq: ConcentrationDischarge,
}

/// One year's climate for a catchment.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ClimateYear {
    /// Precipitation, mm/yr.
    pub rain_mm: f64,
    /// Potential evapotranspiration over grass, mm/yr.
    pub pet_mm: f64,
}

/// Model parameters shared by every catchment of a scenario.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelParams {
    /// Water-balance curves per cover.
    pub curves: CoverCurves,
    /// Forest PET as a multiple of grass PET where a catchment gives no forest PET.
    pub forest_pet_factor: f64,
    /// Rainfall interception by a closed conifer canopy, added to the forest curve
    /// ([`super::interception`]).
    pub interception: CanopyInterception,
    /// Spread, density and closure.
    pub invasion: InvasionParams,
    /// Contaminants tracked.
    pub contaminants: Vec<Contaminant>,
    /// Runoff depth below which no concentration is computed, mm/yr.
    pub min_runoff_mm: f64,
    /// Concentrations above this ceiling are flagged, not stated.
    pub concentration_ceiling: ConcentrationCeiling,
}

/// A plain open catchment for unit tests of the readers (1,000 ha, 1,200 mm rain,
/// 800 mm PET, no forest, no network, no point loads).
#[cfg(test)]
pub(crate) fn test_catchment(id: &str, vulnerable_ha: f64, infested: ClassAreas) -> Catchment {
    Catchment {
        id: id.into(),
        name: id.into(),
        area_ha: 1000.0,
        rain_mm: 1200.0,
        pet_mm: 800.0,
        pet_forest_mm: None,
        vulnerable_ha,
        infested,
        stand_ages_ha: None,
        forest_ha: 0.0,
        flows_to: None,
        point_kg_per_yr: vec![],
        curves: None,
    }
}

impl Catchment {
    /// The starting cohorts: from the dated stands when given, otherwise from the
    /// areas by density class.
    pub fn starting_cohorts(&self, invasion: &InvasionParams) -> Cohorts {
        match &self.stand_ages_ha {
            Some(by_age) => Cohorts::from_ages(by_age),
            None => Cohorts::from_classes(invasion, self.infested),
        }
    }

    /// The water-balance curves that apply to this catchment.
    #[inline]
    pub fn curves<'a>(&'a self, params: &'a ModelParams) -> &'a CoverCurves {
        self.curves.as_ref().unwrap_or(&params.curves)
    }

    /// Long-term mean climate of the catchment.
    pub fn mean_climate(&self) -> ClimateYear {
        ClimateYear { rain_mm: self.rain_mm, pet_mm: self.pet_mm }
    }

    /// Forest PET in a year with grass PET `pet_mm`, mm/yr.
    #[inline]
    pub fn forest_pet_mm(&self, pet_mm: f64, forest_pet_factor: f64) -> f64 {
        match self.pet_forest_mm {
            Some(pf) if self.pet_mm > 0.0 => pet_mm * pf / self.pet_mm,
            _ => pet_mm * forest_pet_factor,
        }
    }

    /// Starting ET-equivalent canopy fraction is computed by the projection; this is
    /// the fraction with no invader at all: existing forest over catchment area.
    pub fn uninvaded_canopy_fraction(&self) -> f64 {
        (self.forest_ha / self.area_ha).clamp(0.0, 1.0)
    }
}
