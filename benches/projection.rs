//! Throughput of the deterministic projection: one catchment over 100 years, and
//! 1,000 catchments over 50 years. Reported as catchment-years per second.
//!
//! Run: `cargo bench --bench projection`. Results are recorded in the README.

use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use rayon::prelude::*;
use std::hint::black_box;
use yieldshift::model::kernel::{project_lean, LeanYears};
use yieldshift::model::{
    project_catchment, Catchment, ClassAreas, ClimateYear, ClosureCurve, Contaminant, CoverCurves, InvasionParams, ModelParams,
};

fn params() -> ModelParams {
    ModelParams {
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
        contaminants: vec![Contaminant {
            name: "nitrate_n".into(),
            open_export_kg_per_ha_yr: 2.5,
            forest_export_kg_per_ha_yr: 1.5,
            guideline_mg_per_l: Some(1.0),
            cq: yieldshift::model::dilution::ConcentrationDischarge::PURE_DILUTION,
        }],
        min_runoff_mm: 1.0,
        concentration_ceiling: yieldshift::model::dilution::ConcentrationCeiling::DEFAULT,
    }
}

fn catchment(i: usize) -> Catchment {
    let k = (i % 17) as f64;
    Catchment {
        id: format!("c{i}"),
        name: format!("c{i}"),
        area_ha: 1000.0 + 100.0 * k,
        rain_mm: 800.0 + 60.0 * k,
        pet_mm: 850.0,
        pet_forest_mm: None,
        vulnerable_ha: 800.0,
        stand_ages_ha: None,
        infested: ClassAreas { scattered_ha: 40.0 + k, medium_ha: 10.0, dense_ha: 5.0 },
        forest_ha: 50.0,
        flows_to: None,
        point_kg_per_yr: vec![100.0],
        curves: None,
    }
}

fn bench(c: &mut Criterion) {
    let p = params();
    let mut g = c.benchmark_group("projection");
    let one = catchment(3);
    let climate100 = vec![one.mean_climate(); 101];
    g.throughput(Throughput::Elements(101));
    g.bench_function("1 catchment x 100 years", |b| b.iter(|| black_box(project_catchment(&one, &climate100, &p, 2027))));
    let many: Vec<Catchment> = (0..1000).map(catchment).collect();
    let climates: Vec<Vec<ClimateYear>> = many.iter().map(|c| vec![c.mean_climate(); 51]).collect();
    g.throughput(Throughput::Elements(1000 * 51));
    g.sample_size(20);
    g.bench_function("1000 catchments x 50 years", |b| {
        b.iter(|| {
            for (c, cl) in many.iter().zip(&climates) {
                black_box(project_catchment(c, cl, &p, 2027));
            }
        })
    });
    // The ensemble kernel: members × catchments of the lean no-control projection,
    // parallel over catchments (rayon, all cores), each member with its own spread rate.
    let members = 40;
    g.throughput(Throughput::Elements((1000 * 51 * members) as u64));
    g.sample_size(10);
    g.bench_function("ensemble kernel 1000 catchments x 50 years x 40 members", |b| {
        b.iter(|| {
            many.par_iter().zip(&climates).for_each_init(
                || (p.clone(), LeanYears::default()),
                |(pm, out), (c, cl)| {
                    for m in 0..members {
                        pm.invasion.spread_rate_per_yr = 0.04 + 0.04 * (m as f64 + 0.5) / members as f64;
                        project_lean(c, cl, pm, out);
                        black_box(out.yield_mm[50]);
                    }
                },
            )
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
