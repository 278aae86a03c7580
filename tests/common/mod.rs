//! Shared test helpers: tolerances in one place and a small model fixture.
#![allow(dead_code)]

use yieldshift::model::{Catchment, ClassAreas, ClosureCurve, Contaminant, CoverCurves, InvasionParams, ModelParams};

/// Tolerance for values printed to 1 decimal place in a published table (mm).
pub const TABLE_1DP: f64 = 0.05 + 1e-9;
/// Tolerance for exact identities evaluated in floating point.
pub const EXACT: f64 = 1e-12;

/// Default model parameters used across tests (Zhang defaults, logistic closure).
pub fn params() -> ModelParams {
    ModelParams {
        curves: CoverCurves::ZHANG_DEFAULT,
        forest_pet_factor: 1.0,
        interception: yieldshift::model::interception::CanopyInterception::DEFAULT,
        invasion: InvasionParams {
            spread_rate_per_yr: 0.06,
            seed_bearing_age_yr: 8,
            seed_rain_ha_per_yr: 0.0,
            medium_age_yr: 10,
            dense_age_yr: 20,
            initial_dense_span_yr: 10,
            closure: ClosureCurve::Logistic { half_closure_age_yr: 8.0, steepness_per_yr: 0.5, max_fraction: 1.0 },
        },
        contaminants: vec![Contaminant {
            name: "nitrate_n".into(),
            open_export_kg_per_ha_yr: 10.0,
            forest_export_kg_per_ha_yr: 10.0,
            guideline_mg_per_l: Some(5.0),
            cq: yieldshift::model::dilution::ConcentrationDischarge::PURE_DILUTION,
        }],
        min_runoff_mm: 1.0,
        concentration_ceiling: yieldshift::model::dilution::ConcentrationCeiling::DEFAULT,
    }
}

/// A tussock catchment with no forest and the given infestation.
pub fn tussock(area_ha: f64, rain_mm: f64, pet_mm: f64, vulnerable_ha: f64, infested: ClassAreas) -> Catchment {
    Catchment {
        id: "t".into(),
        name: "Test".into(),
        area_ha,
        rain_mm,
        pet_mm,
        pet_forest_mm: None,
        vulnerable_ha,
        infested,
        stand_ages_ha: None,
        forest_ha: 0.0,
        flows_to: None,
        point_kg_per_yr: vec![0.0],
        curves: None,
    }
}

/// The `yieldshift` binary, for tests that run it on temporary folders.
pub fn bin() -> std::process::Command {
    std::process::Command::new(env!("CARGO_BIN_EXE_yieldshift"))
}

/// The header row of a CSV file written by yieldshift.
pub fn csv_header(path: &std::path::Path) -> Vec<String> {
    let mut r = csv::Reader::from_path(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    r.headers().unwrap_or_else(|e| panic!("{}: {e}", path.display())).iter().map(str::to_string).collect()
}
