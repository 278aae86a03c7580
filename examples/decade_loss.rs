//! Library use: project one invented catchment and print its water-yield loss by decade.
//!
//! Run: `cargo run --example decade_loss`

use yieldshift::model::{project_catchment, Catchment, ClassAreas, ClosureCurve, CoverCurves, InvasionParams, ModelParams};

fn main() {
    let params = ModelParams {
        curves: CoverCurves::ZHANG_DEFAULT,
        forest_pet_factor: 1.15,
        interception: yieldshift::model::interception::CanopyInterception::DEFAULT,
        invasion: InvasionParams {
            spread_rate_per_yr: 0.06,
            seed_bearing_age_yr: 8,
            seed_rain_ha_per_yr: 1.0,
            medium_age_yr: 10,
            dense_age_yr: 20,
            initial_dense_span_yr: 10,
            closure: ClosureCurve::Logistic { half_closure_age_yr: 12.0, steepness_per_yr: 0.35, max_fraction: 1.0 },
        },
        contaminants: vec![],
        min_runoff_mm: 1.0,
        concentration_ceiling: yieldshift::model::dilution::ConcentrationCeiling::DEFAULT,
    };
    // An invented tussock catchment.
    let c = Catchment {
        id: "example".into(),
        name: "Example Stream".into(),
        area_ha: 3000.0,
        rain_mm: 1300.0,
        pet_mm: 850.0,
        pet_forest_mm: None,
        vulnerable_ha: 2600.0,
        stand_ages_ha: None,
        infested: ClassAreas { scattered_ha: 300.0, medium_ha: 120.0, dense_ha: 60.0 },
        forest_ha: 0.0,
        flows_to: None,
        point_kg_per_yr: vec![],
        curves: None,
    };
    let years = project_catchment(&c, &vec![c.mean_climate(); 61], &params, 2027);
    println!("{:>6} {:>10} {:>10} {:>9} {:>9}", "year", "yield_mm", "base_mm", "change_%", "canopy");
    for y in years.iter().step_by(10) {
        println!(
            "{:>6} {:>10.1} {:>10.1} {:>9.1} {:>9.3}",
            y.year,
            y.yield_mm,
            y.baseline_yield_mm,
            y.yield_change_pct().unwrap_or(0.0),
            y.canopy_fraction
        );
    }
    println!("Screening estimate only; not a substitute for a site hydrological assessment.");
}
