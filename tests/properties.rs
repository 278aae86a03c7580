//! Property tests of the model core (proptest): bounds that must hold for every
//! curve and every valid input, the direction of each response, conservation of
//! area through spread, and concentrations that are either finite or flagged.
//!
//! The inputs are drawn from the ranges the input readers accept (`docs/inputs.md`,
//! `docs/scenario.md`), with the edges (zero rain, extreme aridity) included.

mod common;

use common::EXACT;
use proptest::prelude::*;
use yieldshift::model::budyko::{mixed_et_mm, Budyko1974, CoverCurves, Fu1981, WaterBalance, Zhang2001};
use yieldshift::model::cover::{new_infestation_ha, Cohorts};
use yieldshift::model::dilution::{
    concentration_mg_per_l, load_kg_per_yr, volume_m3, ConcentrationCeiling, ConcentrationDischarge, ConcentrationFlag, ScreenedFlag,
    M3_PER_MM_HA,
};
use yieldshift::model::interception::CanopyInterception;
use yieldshift::model::projection::long_term_mean_yield_mm;
use yieldshift::model::{project_catchment, Catchment, ClassAreas, ClimateYear, ClosureCurve, Contaminant, InvasionParams, ModelParams};

/// Every curve of `model::budyko`, each with a parameter in its documented range
/// (Zhang's w 0.01–20, Fu's ω 1.01–20; docs/scenario.md).
#[derive(Debug, Clone, Copy)]
enum Curve {
    Zhang(Zhang2001),
    Fu(Fu1981),
    Budyko(Budyko1974),
}

impl Curve {
    fn wb(&self) -> &dyn WaterBalance {
        match self {
            Curve::Zhang(c) => c,
            Curve::Fu(c) => c,
            Curve::Budyko(c) => c,
        }
    }
}

fn curve() -> impl Strategy<Value = Curve> {
    prop_oneof![
        (0.01f64..=20.0).prop_map(|w| Curve::Zhang(Zhang2001 { w })),
        (1.01f64..=20.0).prop_map(|omega| Curve::Fu(Fu1981 { omega })),
        Just(Curve::Budyko(Budyko1974)),
    ]
}

/// A water depth, mm/yr: mostly ordinary, sometimes zero, tiny or enormous.
fn depth_mm() -> impl Strategy<Value = f64> {
    prop_oneof![
        8 => 0.0f64..30_000.0,
        1 => Just(0.0),
        1 => prop_oneof![Just(1e-300), Just(1e-9), Just(1e9), Just(1e300)],
    ]
}

/// Aridity index over many orders of magnitude, with 0 and +∞.
fn aridity() -> impl Strategy<Value = f64> {
    prop_oneof![
        8 => (-12.0f64..12.0).prop_map(|e| 10f64.powf(e)),
        1 => Just(0.0),
        1 => Just(f64::INFINITY),
    ]
}

/// Curves for forest and grass with the forest parameter at least the grass one
/// (the premise of "more canopy, less water": forest evaporates more).
fn ordered_cover_curves() -> impl Strategy<Value = CoverCurves> {
    prop_oneof![
        (0.01f64..=20.0, 0.0f64..=1.0).prop_map(|(w_grass, t)| CoverCurves::Zhang { w_forest: w_grass + t * (20.0 - w_grass), w_grass }),
        (1.01f64..=20.0, 0.0f64..=1.0)
            .prop_map(|(omega_grass, t)| CoverCurves::Fu { omega_forest: omega_grass + t * (20.0 - omega_grass), omega_grass }),
    ]
}

/// Any curves in the documented ranges, forest and grass independent.
fn any_cover_curves() -> impl Strategy<Value = CoverCurves> {
    prop_oneof![
        (0.01f64..=20.0, 0.01f64..=20.0).prop_map(|(w_forest, w_grass)| CoverCurves::Zhang { w_forest, w_grass }),
        (1.01f64..=20.0, 1.01f64..=20.0).prop_map(|(omega_forest, omega_grass)| CoverCurves::Fu { omega_forest, omega_grass }),
    ]
}

/// Spread and closure parameters in the ranges of docs/scenario.md, with a
/// logistic closure (which never decreases with age).
fn invasion() -> impl Strategy<Value = InvasionParams> {
    (0.0f64..=1.0, 0u32..=100, 0.0f64..=500.0, 1u32..=100, 1u32..=100, 1u32..=100, 0.5f64..=200.0, 0.01f64..=10.0, 0.0f64..=1.0).prop_map(
        |(r, seed_age, seed_rain, medium, dense_extra, span, half, k, max)| InvasionParams {
            spread_rate_per_yr: r,
            seed_bearing_age_yr: seed_age,
            seed_rain_ha_per_yr: seed_rain,
            medium_age_yr: medium,
            dense_age_yr: (medium + dense_extra).min(200).max(medium + 1),
            initial_dense_span_yr: span,
            closure: ClosureCurve::Logistic { half_closure_age_yr: half, steepness_per_yr: k, max_fraction: max },
        },
    )
}

/// A catchment the catchment-table reader would accept (docs/inputs.md).
fn catchment() -> impl Strategy<Value = Catchment> {
    (
        1.0f64..100_000.0,
        1.0f64..=20_000.0,
        1.0f64..=5_000.0,
        0.0f64..=1.0,
        0.0f64..=1.0,
        proptest::array::uniform3(0.0f64..=1.0),
        proptest::collection::vec(0.0f64..1e6, 2),
    )
        .prop_map(|(area, rain, pet, forest_frac, vuln_frac, class_w, points)| {
            let forest_ha = area * forest_frac;
            let vulnerable_ha = (area - forest_ha) * vuln_frac;
            // Class areas share at most the vulnerable area.
            let total_w = class_w.iter().sum::<f64>().max(1.0);
            let infested = ClassAreas {
                scattered_ha: vulnerable_ha * class_w[0] / total_w,
                medium_ha: vulnerable_ha * class_w[1] / total_w,
                dense_ha: vulnerable_ha * class_w[2] / total_w,
            };
            Catchment {
                id: "p".into(),
                name: "Property".into(),
                area_ha: area,
                rain_mm: rain,
                pet_mm: pet,
                pet_forest_mm: None,
                vulnerable_ha,
                infested,
                stand_ages_ha: None,
                forest_ha,
                flows_to: None,
                point_kg_per_yr: points,
                curves: None,
            }
        })
}

fn params(curves: impl Strategy<Value = CoverCurves>, factor: std::ops::RangeInclusive<f64>) -> impl Strategy<Value = ModelParams> {
    (
        curves,
        factor,
        invasion(),
        proptest::collection::vec((0.0f64..=1e4, 0.0f64..=1e4, prop_oneof![Just(-1.0), Just(0.0), -1.0f64..=2.0]), 2),
        0.0f64..=1000.0,
        (0.0f64..=0.6, 0.0f64..=1.0),
    )
        .prop_map(|(curves, forest_pet_factor, invasion, exports, min_runoff_mm, (fraction, share))| ModelParams {
            curves,
            forest_pet_factor,
            // Any allowed interception (the ranges are the constructor's).
            interception: CanopyInterception::new(fraction, share).unwrap_or(CanopyInterception::DEFAULT),
            invasion,
            contaminants: exports
                .iter()
                .enumerate()
                .map(|(k, &(open, forest, b))| Contaminant {
                    name: format!("c{k}"),
                    open_export_kg_per_ha_yr: open,
                    forest_export_kg_per_ha_yr: forest,
                    guideline_mg_per_l: Some(1.0),
                    // Any allowed exponent (the range is the constructor's).
                    cq: ConcentrationDischarge::new(b).unwrap_or(ConcentrationDischarge::PURE_DILUTION),
                })
                .collect(),
            min_runoff_mm,
            concentration_ceiling: ConcentrationCeiling::DEFAULT,
        })
}

/// A climate record in the climate-table ranges (rain 0–30 000, PET 0–6 000 mm/yr).
fn climate(years: std::ops::Range<usize>) -> impl Strategy<Value = Vec<ClimateYear>> {
    proptest::collection::vec(
        (prop_oneof![9 => 0.0f64..=30_000.0, 1 => Just(0.0)], 0.0f64..=6_000.0)
            .prop_map(|(rain_mm, pet_mm)| ClimateYear { rain_mm, pet_mm }),
        years,
    )
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn et_is_between_zero_and_the_smaller_of_rain_and_pet(c in curve(), rain in depth_mm(), pet in depth_mm()) {
        let et = c.wb().et_mm(rain, pet);
        prop_assert!(et.is_finite(), "{c:?} P={rain} E0={pet}: ET={et}");
        prop_assert!(et >= 0.0 && et <= rain.min(pet), "{c:?} P={rain} E0={pet}: ET={et}");
        let q = c.wb().yield_mm(rain, pet);
        prop_assert!(q >= 0.0 && q <= rain, "{c:?} P={rain} E0={pet}: Q={q}");
        // The water balance closes: P = ET + Q.
        prop_assert!((et + q - rain).abs() <= EXACT * rain.max(1.0), "{c:?} P={rain}: ET {et} + Q {q}");
    }

    #[test]
    fn evaporative_ratio_is_within_its_limits(c in curve(), phi in aridity()) {
        let r = c.wb().evaporative_ratio(phi);
        prop_assert!(r.is_finite() && r >= 0.0 && r <= phi.min(1.0), "{c:?} φ={phi}: ET/P={r}");
    }

    #[test]
    fn more_rain_gives_more_yield(c in curve(), rain in 0.0f64..30_000.0, extra in 0.0f64..10_000.0, pet in 0.0f64..6_000.0) {
        let (q1, q2) = (c.wb().yield_mm(rain, pet), c.wb().yield_mm(rain + extra, pet));
        prop_assert!(q2 >= q1 - EXACT * (rain + extra).max(1.0), "{c:?} E0={pet}: Q({rain})={q1} > Q({})={q2}", rain + extra);
    }

    #[test]
    fn a_larger_curve_parameter_evaporates_more(lo in 0.01f64..=20.0, t in 0.0f64..=1.0, rain in 1.0f64..30_000.0, pet in 1.0f64..6_000.0) {
        // docs: "ET rises with the curve parameter" (w for Zhang, ω for Fu).
        let hi = lo + t * (20.0 - lo);
        let tol = EXACT * rain;
        let (z_lo, z_hi) = (Zhang2001 { w: lo }.et_mm(rain, pet), Zhang2001 { w: hi }.et_mm(rain, pet));
        prop_assert!(z_hi >= z_lo - tol, "Zhang w {lo} → {hi}: ET {z_lo} → {z_hi}");
        let (wlo, whi) = (lo.max(1.01), hi.max(1.01));
        let (f_lo, f_hi) = (Fu1981 { omega: wlo }.et_mm(rain, pet), Fu1981 { omega: whi }.et_mm(rain, pet));
        prop_assert!(f_hi >= f_lo - tol, "Fu ω {wlo} → {whi}: ET {f_lo} → {f_hi}");
    }

    #[test]
    fn more_canopy_gives_less_yield(
        curves in ordered_cover_curves(), rain in 0.0f64..30_000.0, pet in 0.0f64..6_000.0, factor in 1.0f64..=2.0,
        f1 in 0.0f64..=1.0, df in 0.0f64..=1.0,
    ) {
        let f2 = (f1 + df).min(1.0);
        let pet_forest = pet * factor;
        let q = |f: f64| rain - mixed_et_mm(&curves, rain, pet_forest, pet, f);
        prop_assert!(q(f2) <= q(f1) + EXACT * rain.max(1.0), "{curves:?} P={rain} E0={pet}: Q({f1})={} < Q({f2})={}", q(f1), q(f2));
    }

    #[test]
    fn spread_conserves_area_and_stays_on_vulnerable_land(
        inv in invasion(), vulnerable in 0.0f64..1e6, class_w in proptest::array::uniform3(0.0f64..=1.0), years in 0usize..80,
    ) {
        let total_w = class_w.iter().sum::<f64>().max(1.0);
        let start = ClassAreas {
            scattered_ha: vulnerable * class_w[0] / total_w,
            medium_ha: vulnerable * class_w[1] / total_w,
            dense_ha: vulnerable * class_w[2] / total_w,
        };
        let tol = 1e-9 * vulnerable.max(1.0);
        let mut c = Cohorts::from_classes(&inv, start);
        let got = c.class_areas(&inv);
        prop_assert!((got.scattered_ha - start.scattered_ha).abs() <= tol && (got.medium_ha - start.medium_ha).abs() <= tol
            && (got.dense_ha - start.dense_ha).abs() <= tol, "starting classes {start:?} became {got:?}");
        let mut expected = c.infested_ha();
        for _ in 0..years {
            let before = c.infested_ha();
            let new = c.step(&inv, vulnerable);
            prop_assert!(new >= 0.0 && new.is_finite());
            expected += new;
            prop_assert!((c.infested_ha() - before - new).abs() <= tol, "area appeared or vanished in a step");
            prop_assert!(c.infested_ha() <= vulnerable + tol, "infested {} > vulnerable {vulnerable}", c.infested_ha());
            prop_assert!(c.iter_by_age().all(|(_, a)| a >= 0.0));
        }
        prop_assert!((c.infested_ha() - expected).abs() <= tol);
        prop_assert!((c.class_areas(&inv).total_ha() - c.infested_ha()).abs() <= tol);
    }

    #[test]
    fn removal_takes_no_more_than_is_there(
        inv in invasion(), area in 0.0f64..1e5, age in 0usize..300, take in -10.0f64..1e5,
    ) {
        let mut c = Cohorts::from_classes(&inv, ClassAreas { scattered_ha: area / 3.0, medium_ha: area / 3.0, dense_ha: area / 3.0 });
        let (before, at_age) = (c.infested_ha(), c.area_at_age(age));
        let removed = c.remove_at_age(age, take);
        prop_assert!(removed >= 0.0 && removed <= at_age + EXACT && removed <= take.max(0.0) + EXACT);
        prop_assert!((before - removed - c.infested_ha()).abs() <= 1e-9 * before.max(1.0));
    }

    #[test]
    fn new_infestation_never_exceeds_the_free_land(
        r in 0.0f64..=1.0, seed in 0.0f64..1e6, rain_in in 0.0f64..1e6, infested in 0.0f64..1e6, vulnerable in -1.0f64..1e6,
    ) {
        let new = new_infestation_ha(r, seed, rain_in, infested, vulnerable);
        prop_assert!(new >= 0.0 && new <= (vulnerable - infested).max(0.0), "new {new}");
    }

    #[test]
    fn concentrations_are_finite_or_flagged(
        area in 1e-6f64..1e9, canopy in 0.0f64..=1.0, open in 0.0f64..=1e4, forest in 0.0f64..=1e4, point in 0.0f64..1e12,
        yield_mm in prop_oneof![Just(0.0), Just(1e-13), 0.0f64..30_000.0], min_runoff in 0.0f64..=1000.0,
    ) {
        let load = load_kg_per_yr(area, canopy, open, forest, point);
        prop_assert!(load.is_finite() && load >= 0.0);
        let volume = volume_m3(yield_mm, area);
        match concentration_mg_per_l(load, volume, area, min_runoff) {
            Ok(c) => {
                prop_assert!(c.is_finite() && c >= 0.0, "C={c}");
                prop_assert!(volume > 0.0 && yield_mm >= min_runoff * (1.0 - 1e-12));
                // C = 1000·L/V (kg/m³ → mg/L).
                prop_assert!((c - 1000.0 * load / volume).abs() <= 1e-12 * c.max(1.0));
            }
            Err(ConcentrationFlag::LowRunoff) => {
                let depth = volume / (area * M3_PER_MM_HA);
                prop_assert!(volume <= 0.0 || depth < min_runoff, "flagged at depth {depth} ≥ {min_runoff}");
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(96))]

    /// Every year of every projection: water balance closed, yield ≥ 0, canopy a
    /// fraction, concentrations finite or flagged for low runoff.
    #[test]
    fn projections_stay_physical(c in catchment(), p in params(any_cover_curves(), 0.5..=2.0), cl in climate(1..40)) {
        let years = project_catchment(&c, &cl, &p, 2030);
        prop_assert_eq!(years.len(), cl.len());
        let q_mean = years.first().map(|y| long_term_mean_yield_mm(&c, &p, y.canopy_fraction)).unwrap_or(0.0);
        for (y, clim) in years.iter().zip(&cl) {
            prop_assert!(y.et_mm.is_finite() && y.et_mm >= 0.0 && y.et_mm <= clim.rain_mm + EXACT, "{y:?}");
            prop_assert!(y.yield_mm >= 0.0 && (y.et_mm + y.yield_mm - clim.rain_mm).abs() <= EXACT * clim.rain_mm.max(1.0), "{y:?}");
            prop_assert!(y.baseline_yield_mm >= 0.0 && y.uninvaded_yield_mm >= 0.0);
            prop_assert!((0.0..=1.0).contains(&y.canopy_fraction));
            prop_assert!(y.classes.total_ha() <= c.vulnerable_ha + 1e-9 * c.area_ha.max(1.0));
            for (k, conc) in y.concentrations.iter().enumerate() {
                // The ceiling: 10× the concentration of the year's mean load in the mean runoff.
                let m = &p.contaminants[k];
                let mean_load = load_kg_per_yr(c.area_ha, y.canopy_fraction, m.open_export_kg_per_ha_yr, m.forest_export_kg_per_ha_yr, c.point_kg_per_yr.get(k).copied().unwrap_or(0.0));
                let mean_volume = volume_m3(q_mean, c.area_ha);
                let ceiling = (mean_volume > 0.0).then(|| 10.0 * 1000.0 * mean_load / mean_volume);
                match conc {
                    Ok(v) => {
                        prop_assert!(v.is_finite() && *v >= 0.0 && y.yield_mm >= p.min_runoff_mm * (1.0 - 1e-12), "{y:?}");
                        prop_assert!(ceiling.is_none_or(|top| *v <= top * (1.0 + 1e-9)), "{v} above the ceiling {ceiling:?}: {y:?}");
                    }
                    Err(ScreenedFlag::LowRunoff) => prop_assert!(y.yield_mm < p.min_runoff_mm || y.yield_m3 <= 0.0, "{y:?}"),
                    Err(ScreenedFlag::AboveCeiling) => {
                        let stated = 1000.0 * y.loads_kg_per_yr[k] / y.yield_m3;
                        prop_assert!(ceiling.is_some_and(|top| stated >= top * (1.0 - 1e-9)), "{stated} flagged below the ceiling {ceiling:?}: {y:?}");
                    }
                }
                prop_assert!(y.loads_kg_per_yr[k].is_finite() && y.loads_kg_per_yr[k] >= 0.0);
            }
        }
    }

    /// Without control the canopy only grows, so (forest evaporating more than
    /// grass) the projected yield never exceeds the baseline with the starting
    /// cover held, nor the uninvaded yield.
    #[test]
    fn the_spreading_invader_only_takes_water(c in catchment(), p in params(ordered_cover_curves(), 1.0..=2.0), cl in climate(1..40)) {
        let years = project_catchment(&c, &cl, &p, 2030);
        for w in years.windows(2) {
            prop_assert!(w[1].canopy_fraction >= w[0].canopy_fraction - EXACT, "canopy fell: {} → {}", w[0].canopy_fraction, w[1].canopy_fraction);
        }
        for y in &years {
            let tol = EXACT * y.rain_mm.max(1.0);
            prop_assert!(y.yield_mm <= y.baseline_yield_mm + tol, "{y:?}");
            prop_assert!(y.baseline_yield_mm <= y.uninvaded_yield_mm + tol, "{y:?}");
        }
    }

    /// Wetter years give more water in every year of the projection.
    #[test]
    fn more_rain_every_year_gives_more_yield_every_year(
        c in catchment(), p in params(any_cover_curves(), 0.5..=2.0), cl in climate(1..30), extra in 0.0f64..2_000.0,
    ) {
        let wetter: Vec<ClimateYear> = cl.iter().map(|y| ClimateYear { rain_mm: y.rain_mm + extra, ..*y }).collect();
        let (dry, wet) = (project_catchment(&c, &cl, &p, 2030), project_catchment(&c, &wetter, &p, 2030));
        for (d, w) in dry.iter().zip(&wet) {
            prop_assert!(w.yield_mm >= d.yield_mm - EXACT * w.rain_mm.max(1.0), "{} mm more rain gave less water: {d:?} vs {w:?}", extra);
        }
    }

    /// More dense infestation at the start (the rest unchanged) means more canopy
    /// and less water in the first year.
    #[test]
    fn more_dense_cover_at_the_start_gives_less_yield(c in catchment(), p in params(ordered_cover_curves(), 1.0..=2.0), cl in climate(1..3), share in 0.0f64..=1.0) {
        let free = c.vulnerable_ha - c.infested.total_ha();
        let denser = Catchment { infested: ClassAreas { dense_ha: c.infested.dense_ha + share * free.max(0.0), ..c.infested }, ..c.clone() };
        let (a, b) = (&project_catchment(&c, &cl, &p, 2030)[0], &project_catchment(&denser, &cl, &p, 2030)[0]);
        prop_assert!(b.canopy_fraction >= a.canopy_fraction - EXACT);
        prop_assert!(b.yield_mm <= a.yield_mm + EXACT * a.rain_mm.max(1.0), "{a:?} vs {b:?}");
    }
}
