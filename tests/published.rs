//! The model checked against published equations, tables and paired-catchment
//! results. Each check names its source.

mod common;

use approx::assert_abs_diff_eq;
use common::{params, tussock, EXACT, TABLE_1DP};
use yieldshift::model::budyko::{mixed_et_mm, Budyko1974, CoverCurves, Fu1981, WaterBalance, Zhang2001};
use yieldshift::model::cover::{new_infestation_ha, Cohorts};
use yieldshift::model::dilution::{concentration_from_depth_mg_per_l, concentration_mg_per_l, load_kg_per_yr, volume_m3};
use yieldshift::model::network::Network;
use yieldshift::model::summary::node_totals;
use yieldshift::model::{project_catchment, ClassAreas, ClimateYear};

#[test]
fn zhang_2001_simplified_curves_table() {
    // Source: Zhang, Dawes & Walker (2001), WRR 37(3), eq. 8 with their simplified-curve
    // E0 of 1410 mm (forest, w = 2.0) and 1100 mm (grass, w = 0.5); table values as
    // tabulated in ../shared/SCIENCE.md §1 (derived from the published equation, 1 dp).
    let rows = [
        // P, forest ET, forest Q, grass ET, grass Q, Q reduction %
        (500.0, 474.7, 25.3, 411.0, 89.0, 71.5),
        (1000.0, 843.4, 156.6, 630.3, 369.7, 57.6),
        (1500.0, 1095.4, 404.6, 750.8, 749.2, 46.0),
        (2000.0, 1259.0, 741.0, 824.4, 1175.6, 37.0),
    ];
    let forest = Zhang2001 { w: 2.0 };
    let grass = Zhang2001 { w: 0.5 };
    for (p, fet, fq, get, gq, red) in rows {
        assert_abs_diff_eq!(forest.et_mm(p, 1410.0), fet, epsilon = TABLE_1DP);
        assert_abs_diff_eq!(forest.yield_mm(p, 1410.0), fq, epsilon = TABLE_1DP);
        assert_abs_diff_eq!(grass.et_mm(p, 1100.0), get, epsilon = TABLE_1DP);
        assert_abs_diff_eq!(grass.yield_mm(p, 1100.0), gq, epsilon = TABLE_1DP);
        let r = 100.0 * (1.0 - forest.yield_mm(p, 1410.0) / grass.yield_mm(p, 1100.0));
        assert_abs_diff_eq!(r, red, epsilon = 0.05 + 1e-9);
    }
}

#[test]
fn zhang_ratio_at_unit_aridity_is_one_plus_w_over_two_plus_w() {
    // Source: Zhang et al. (2001) eq. 8 at E0/P = 1: ET/P = (1 + w)/(2 + w) (algebra).
    for w in [0.1, 0.5, 1.0, 2.0, 5.0] {
        let expected = (1.0 + w) / (2.0 + w);
        assert_abs_diff_eq!(Zhang2001 { w }.evaporative_ratio(1.0), expected, epsilon = EXACT);
    }
    assert_abs_diff_eq!(Zhang2001 { w: 2.0 }.et_mm(800.0, 800.0), 600.0, epsilon = 1e-9);
    assert_abs_diff_eq!(Zhang2001 { w: 0.5 }.et_mm(800.0, 800.0), 480.0, epsilon = 1e-9);
}

#[test]
fn fu_1981_against_budyko_1974() {
    // Source: Fu (1981) and Budyko (1974) curves; values at φ = 0.5/1/2 as tabulated in
    // ../shared/SCIENCE.md §1 (derived from the published equations, 4 dp). Fu with
    // ω ≈ 2.6 follows Budyko's curve (Zhang et al. 2004, WRR 40, W02502).
    let fu = Fu1981 { omega: 2.6 };
    let bud = Budyko1974;
    for (phi, b, f) in [(0.5, 0.4355, 0.4395), (1.0, 0.6938, 0.6945), (2.0, 0.8940, 0.8790)] {
        assert_abs_diff_eq!(bud.evaporative_ratio(phi), b, epsilon = 0.00005 + 1e-9);
        assert_abs_diff_eq!(fu.evaporative_ratio(phi), f, epsilon = 0.00005 + 1e-9);
    }
    // Source: SCIENCE.md §1: the largest gap over φ = 0.2–5 is about 0.023; the issue's
    // acceptance bound is 0.03.
    let max_gap = (0..=480)
        .map(|i| 0.2 + i as f64 * 0.01)
        .map(|phi| (fu.evaporative_ratio(phi) - bud.evaporative_ratio(phi)).abs())
        .fold(0.0, f64::max);
    assert!(max_gap < 0.03, "max gap {max_gap}");
    assert!(max_gap > 0.015, "gap {max_gap} suspiciously small: curves should differ slightly");
}

#[test]
fn fu_1981_closed_form_values() {
    // Source: Fu (1981) in the form of Zhang et al. (2004) eq. 4, evaluated by hand:
    // ω = 2, φ = 1: 1 + 1 − 2^(1/2) = 0.585786…; ω = 3, φ = 2: 3 − 9^(1/3) = 0.919916…
    assert_abs_diff_eq!(Fu1981 { omega: 2.0 }.evaporative_ratio(1.0), 2.0 - 2f64.sqrt(), epsilon = EXACT);
    assert_abs_diff_eq!(Fu1981 { omega: 3.0 }.evaporative_ratio(2.0), 3.0 - 9f64.cbrt(), epsilon = EXACT);
}

fn all_curves() -> Vec<(String, Box<dyn WaterBalance>)> {
    let mut v: Vec<(String, Box<dyn WaterBalance>)> = vec![("budyko".into(), Box::new(Budyko1974))];
    for w in [0.1, 0.5, 1.0, 2.0, 4.0] {
        v.push((format!("zhang w={w}"), Box::new(Zhang2001 { w })));
    }
    for o in [1.2, 2.16, 2.6, 2.97, 5.0] {
        v.push((format!("fu ω={o}"), Box::new(Fu1981 { omega: o })));
    }
    v
}

#[test]
fn every_curve_keeps_the_budyko_limits() {
    // Source: Budyko (1974) supply and demand limits: 0 ≤ ET ≤ min(P, E0); ET/P → 1 as
    // φ → ∞ and ET → E0 as φ → 0.
    for (name, c) in all_curves() {
        for p in [1.0, 200.0, 800.0, 1500.0, 4000.0] {
            for e0 in [0.0, 1.0, 100.0, 700.0, 1400.0, 3000.0] {
                let et = c.et_mm(p, e0);
                assert!(et >= 0.0 && et <= p.min(e0) + 1e-9, "{name}: P {p} E0 {e0} ET {et}");
                assert_abs_diff_eq!(c.yield_mm(p, e0), p - et, epsilon = 1e-9);
            }
        }
        // Fu converges slowly for ω near 1 (1 − ET/P ≈ φ^(1−ω)/ω), hence the very large φ.
        assert!(c.evaporative_ratio(1e12) > 0.99, "{name}");
        let tiny = 1e-12;
        assert!((c.evaporative_ratio(tiny) / tiny - 1.0).abs() < 0.01, "{name}: ET/E0 at φ→0");
    }
}

#[test]
fn et_rises_with_parameter_and_canopy_fraction() {
    // Source: Zhang et al. (2001) §4 and Fu (1981): ET increases with w (or ω); forest
    // (w = 2) evaporates more than grass (w = 0.5), so ET rises with canopy fraction.
    for phi in [0.3, 0.8, 1.0, 2.0, 4.0] {
        let zs: Vec<f64> = [0.2, 0.5, 1.0, 2.0, 3.0].iter().map(|&w| Zhang2001 { w }.evaporative_ratio(phi)).collect();
        assert!(zs.windows(2).all(|w| w[1] >= w[0]), "zhang φ {phi}: {zs:?}");
        let fs: Vec<f64> = [1.5, 2.0, 2.6, 3.5].iter().map(|&o| Fu1981 { omega: o }.evaporative_ratio(phi)).collect();
        assert!(fs.windows(2).all(|w| w[1] >= w[0]), "fu φ {phi}: {fs:?}");
    }
    for curves in [CoverCurves::ZHANG_DEFAULT, CoverCurves::Fu { omega_forest: 2.97, omega_grass: 2.16 }] {
        for (p, e0) in [(600.0, 900.0), (1400.0, 1100.0), (2500.0, 700.0)] {
            let ets: Vec<f64> = (0..=10).map(|i| mixed_et_mm(&curves, p, e0, e0, i as f64 / 10.0)).collect();
            assert!(ets.windows(2).all(|w| w[1] >= w[0] - 1e-12), "{curves:?} P {p}: {ets:?}");
            assert!(ets[10] > ets[0]);
        }
    }
}

#[test]
fn converting_tussock_to_pine_at_1400_mm_loses_30_to_50_percent() {
    // Source: Farley, Jobbágy & Jackson (2005), Global Change Biology 11: pines on
    // grassland cut runoff by 40% (±3) on average. Fact of the trade: ~40% within two
    // decades. Checked for forest PET equal to grass PET, and for the Zhang et al.
    // (2001) forest/grass E0 ratio 1410/1100.
    let z = CoverCurves::ZHANG_DEFAULT;
    for forest_pet in [1100.0, 1100.0 * 1410.0 / 1100.0] {
        let grass_q = 1400.0 - mixed_et_mm(&z, 1400.0, forest_pet, 1100.0, 0.0);
        let forest_q = 1400.0 - mixed_et_mm(&z, 1400.0, forest_pet, 1100.0, 1.0);
        let loss = 100.0 * (1.0 - forest_q / grass_q);
        assert!((30.0..=50.0).contains(&loss), "E0 forest {forest_pet}: loss {loss:.1}%");
    }
}

#[test]
fn full_invasion_of_humid_tussock_loses_thirty_to_forty_five_percent_within_about_22_years() {
    // Common practice, no published source: a tussock catchment converted to conifer
    // forest lost about 40% (42%) of its water yield within about 22 years.
    // Source: Farley, Jobbágy & Jackson (2005), Global Change Biology 11: 1565–1576:
    // pines on grassland cut runoff by 40% (±3) on average, with losses growing for at
    // least 20 years; Fahey (1994), NZ J. Forestry 39(3): 18–25: 30–50% for pasture.
    // At the humid high-country sites users manage (P 1300–1500 mm, E0 700–800 mm) the
    // defaults (Zhang w 2 / 0.5, canopy interception 0.25, one PET for both covers)
    // must land in 30–45%: before canopy interception they gave 15–23%.
    let p = params();
    for rain_mm in [1300.0, 1400.0, 1500.0] {
        for pet_mm in [700.0, 750.0, 800.0] {
            let c = tussock(1000.0, rain_mm, pet_mm, 1000.0, ClassAreas { scattered_ha: 1000.0, medium_ha: 0.0, dense_ha: 0.0 });
            let years = project_catchment(&c, &vec![c.mean_climate(); 31], &p, 2000);
            let loss22 = -years[22].change_vs_uninvaded_pct().unwrap();
            assert!((30.0..=45.0).contains(&loss22), "P {rain_mm}, E0 {pet_mm}: loss at 22 years {loss22:.1}%");
            let loss5 = -years[5].change_vs_uninvaded_pct().unwrap();
            assert!(loss5 < loss22, "loss should grow with stand age: {loss5:.1} vs {loss22:.1}");
        }
    }
}

#[test]
fn bosch_hewlett_about_40_mm_per_10_percent_conifer_cover() {
    // Source: Bosch & Hewlett (1982), J. Hydrology 55: ~40 mm/yr change in yield per 10%
    // change in conifer cover (humid sites). At P = 2000 mm with Zhang's simplified
    // curves the change is 43.5 mm per 10%; accept 30–55 mm.
    let z = CoverCurves::ZHANG_DEFAULT;
    let q = |f: f64| 2000.0 - mixed_et_mm(&z, 2000.0, 1410.0, 1100.0, f);
    let per_10pct = (q(0.0) - q(1.0)) / 10.0;
    assert!((30.0..=55.0).contains(&per_10pct), "{per_10pct}");
    assert_abs_diff_eq!(q(0.3) - q(0.4), per_10pct, epsilon = 1e-9);
}

#[test]
fn unchecked_spread_at_six_percent_doubles_in_about_twelve_years() {
    // Common practice, no published source: unchecked infestations spread ~6%/yr
    // compounding. Doubling time ln 2 / ln 1.06 = 11.9 years (derived).
    let mut p = params().invasion;
    p.seed_bearing_age_yr = 0;
    let vulnerable = 1e9;
    let mut c = Cohorts::from_classes(&p, ClassAreas { scattered_ha: 100.0, medium_ha: 0.0, dense_ha: 0.0 });
    let mut t = 0;
    while c.infested_ha() < 200.0 {
        c.step(&p, vulnerable);
        t += 1;
        // Far from the cap, the area follows 100·1.06^t.
        assert_abs_diff_eq!(c.infested_ha() / (100.0 * 1.06f64.powi(t)), 1.0, epsilon = 1e-5);
    }
    let doubling = 2f64.ln() / 1.06f64.ln();
    assert_abs_diff_eq!(doubling, 11.9, epsilon = 0.05);
    assert_eq!(t, 12, "first whole year at or past doubling");
}

#[test]
fn spread_never_exceeds_the_vulnerable_area_and_conserves_area() {
    // Common practice, no published source: logistic cap at the vulnerable area.
    let mut p = params().invasion;
    p.spread_rate_per_yr = 0.9;
    p.seed_bearing_age_yr = 2;
    p.seed_rain_ha_per_yr = 50.0;
    let vulnerable = 500.0;
    let mut c = Cohorts::from_classes(&p, ClassAreas { scattered_ha: 100.0, medium_ha: 50.0, dense_ha: 20.0 });
    for _ in 0..200 {
        let before = c.infested_ha();
        let new = c.step(&p, vulnerable);
        let after = c.infested_ha();
        assert!(after <= vulnerable + 1e-9, "{after}");
        assert_abs_diff_eq!(after, before + new, epsilon = 1e-9);
        let cls = c.class_areas(&p);
        assert_abs_diff_eq!(cls.total_ha(), after, epsilon = 1e-9);
        assert!(c.iter_by_age().all(|(_, a)| a >= 0.0));
    }
    assert_abs_diff_eq!(c.infested_ha(), vulnerable, epsilon = 1e-6);
    assert_eq!(new_infestation_ha(0.5, 100.0, 0.0, 500.0, 500.0), 0.0);
}

#[test]
fn dilution_unit_conversions() {
    // Source: unit conversion (1 mm over 1 ha = 10 m³; 1 kg/m³ = 1000 mg/L), worked
    // examples in ../shared/SCIENCE.md §4.
    assert_abs_diff_eq!(concentration_from_depth_mg_per_l(10.0, 250.0).unwrap(), 4.0, epsilon = EXACT);
    assert_abs_diff_eq!(concentration_from_depth_mg_per_l(2.0, 500.0).unwrap(), 0.40, epsilon = EXACT);
    let v = volume_m3(250.0, 100.0);
    assert_abs_diff_eq!(v, 250_000.0, epsilon = EXACT);
    let l = load_kg_per_yr(100.0, 0.3, 10.0, 10.0, 0.0);
    assert_abs_diff_eq!(concentration_mg_per_l(l, v, 100.0, 1.0).unwrap(), 4.0, epsilon = 1e-12);
    // Source: SCIENCE.md §4: with an unchanged load a 40% drop in runoff raises the
    // concentration 1/0.6 = 1.67×.
    let c0 = concentration_mg_per_l(l, v, 100.0, 1.0).unwrap();
    let c1 = concentration_mg_per_l(l, 0.6 * v, 100.0, 1.0).unwrap();
    assert_abs_diff_eq!(c1 / c0, 1.0 / 0.6, epsilon = 1e-12);
    assert!(concentration_mg_per_l(l, 0.0, 100.0, 1.0).is_err());
    assert!(concentration_mg_per_l(l, volume_m3(0.5, 100.0), 100.0, 1.0).is_err());
    assert_eq!(concentration_from_depth_mg_per_l(1.0, 0.0), None);
}

#[test]
fn network_sums_conserve_mass() {
    // Source: conservation of mass (no in-stream losses): the outlet receives the sum of
    // every catchment's volume and load.
    let p = params();
    let cs: Vec<_> = (0..4)
        .map(|i| {
            let mut c = tussock(
                500.0 + 100.0 * i as f64,
                900.0 + 200.0 * i as f64,
                800.0,
                400.0,
                ClassAreas { scattered_ha: 20.0, ..Default::default() },
            );
            c.id = format!("c{i}");
            c.point_kg_per_yr = vec![100.0 * i as f64];
            c
        })
        .collect();
    let net = Network::new(vec![Some(2), Some(2), Some(3), None]).unwrap();
    let proj: Vec<_> = cs.iter().map(|c| project_catchment(c, &[c.mean_climate(); 11], &p, 2030)).collect();
    let nodes = node_totals(&net, &cs, &proj, 1, 1.0, &yieldshift::model::dilution::ConcentrationCeiling::DEFAULT);
    assert_eq!(nodes.iter().map(|n| n.0).collect::<Vec<_>>(), vec![2, 3]);
    let outlet = &nodes[1].1;
    for t in 0..11 {
        let v: f64 = proj.iter().map(|p| p[t].yield_m3).sum();
        let l: f64 = proj.iter().map(|p| p[t].loads_kg_per_yr[0]).sum();
        assert_abs_diff_eq!(outlet[t].yield_m3, v, epsilon = 1e-6 * v);
        assert_abs_diff_eq!(outlet[t].loads_kg_per_yr[0], l, epsilon = 1e-9 * l);
        assert_abs_diff_eq!(outlet[t].concentrations[0].unwrap(), 1000.0 * l / v, epsilon = 1e-12);
        assert_abs_diff_eq!(outlet[t].area_ha, cs.iter().map(|c| c.area_ha).sum::<f64>(), epsilon = 1e-9);
    }
    let mid = &nodes[0].1[4];
    let v: f64 = proj[..3].iter().map(|p| p[4].yield_m3).sum();
    assert_abs_diff_eq!(mid.yield_m3, v, epsilon = 1e-6 * v);
}

#[test]
fn projection_year_zero_is_the_baseline_and_loss_grows() {
    // Common practice, no published source: with the starting cover held fixed the
    // baseline equals year 0; spread and closure only add canopy, so yield falls.
    let p = params();
    let c = tussock(2000.0, 1200.0, 900.0, 1800.0, ClassAreas { scattered_ha: 100.0, medium_ha: 50.0, dense_ha: 20.0 });
    let clim = vec![ClimateYear { rain_mm: 1200.0, pet_mm: 900.0 }; 41];
    let y = project_catchment(&c, &clim, &p, 2027);
    assert_eq!(y.len(), 41);
    assert_eq!(y[0].year, 2027);
    assert_abs_diff_eq!(y[0].yield_mm, y[0].baseline_yield_mm, epsilon = EXACT);
    assert!(y.windows(2).all(|w| w[1].yield_mm <= w[0].yield_mm + 1e-9));
    assert!(y.iter().all(|r| r.uninvaded_yield_mm >= r.baseline_yield_mm - 1e-9));
    assert!(y[40].yield_change_pct().unwrap() < -5.0);
}

/// Wet, ordinary and dry years around a catchment of 1200 mm rain, 900 mm PET.
fn wet_and_dry_years() -> Vec<ClimateYear> {
    [1200.0, 2100.0, 600.0, 1200.0, 1500.0, 450.0, 900.0].iter().map(|&rain_mm| ClimateYear { rain_mm, pet_mm: 900.0 }).collect()
}

#[test]
fn chemostatic_diffuse_concentration_is_the_same_in_wet_and_dry_years() {
    // Source: Godsey, Kirchner & Clow (2009), Hydrol. Process. 23, 1844–1864: a
    // concentration–discharge exponent b ≈ 0 is chemostatic, concentration
    // independent of discharge. No invader and no point source, so the diffuse
    // concentration must be 100·e/Q̄ mg/L in every year whatever the runoff.
    use yieldshift::model::dilution::ConcentrationDischarge;
    use yieldshift::model::projection::long_term_mean_yield_mm;
    let mut p = params();
    p.contaminants[0].cq = ConcentrationDischarge::CHEMOSTATIC;
    let c = tussock(1000.0, 1200.0, 900.0, 0.0, ClassAreas::default());
    let years = project_catchment(&c, &wet_and_dry_years(), &p, 2030);
    let q_mean = long_term_mean_yield_mm(&c, &p, 0.0);
    let expected = concentration_from_depth_mg_per_l(10.0, q_mean).unwrap();
    let (dry, wet) = (years[5].yield_mm, years[1].yield_mm);
    assert!(wet > 3.0 * dry, "the years must differ in runoff: {dry} vs {wet}");
    for y in &years {
        assert_abs_diff_eq!(y.concentrations[0].unwrap(), expected, epsilon = 1e-12 * expected);
        // The load follows the flow instead: L = L̄·Q/Q̄.
        assert_abs_diff_eq!(y.loads_kg_per_yr[0], 10.0 * 1000.0 * y.yield_mm / q_mean, epsilon = 1e-9 * y.loads_kg_per_yr[0]);
    }
}

#[test]
fn pure_dilution_default_gives_todays_fixed_load_numbers() {
    // Derived (unit conversion, Johnes 1996 export coefficients): with b = −1 the load
    // is A·[f·e_forest + (1 − f)·e_open] + L_point in every year and C = 1000·L/V,
    // bit for bit as before the exponent existed.
    let p = params();
    let mut c = tussock(2000.0, 1200.0, 900.0, 1800.0, ClassAreas { scattered_ha: 120.0, medium_ha: 60.0, dense_ha: 30.0 });
    c.point_kg_per_yr = vec![250.0];
    for y in project_catchment(&c, &wet_and_dry_years(), &p, 2030) {
        let m = &p.contaminants[0];
        let load = load_kg_per_yr(c.area_ha, y.canopy_fraction, m.open_export_kg_per_ha_yr, m.forest_export_kg_per_ha_yr, 250.0);
        assert_eq!(y.loads_kg_per_yr[0], load);
        let today = concentration_mg_per_l(load, volume_m3(y.yield_mm, c.area_ha), c.area_ha, p.min_runoff_mm).unwrap();
        assert_eq!(y.concentrations[0], Ok(today));
    }
}

#[test]
fn a_near_dry_year_is_flagged_above_the_ceiling_instead_of_stated() {
    // Derived: C = 100·l/Q (1 mm over 1 ha = 10 m³). A fixed load of l kg/ha/yr in a
    // near-dry year of Q mm would read 250 mg/L when l = 2.5·Q; that is far above
    // 10× the long-term mean 100·l/Q̄, so the year is flagged, not stated.
    use yieldshift::model::dilution::{ConcentrationCeiling, ScreenedFlag};
    let mut p = params();
    let c = tussock(1000.0, 1200.0, 900.0, 0.0, ClassAreas::default());
    let dry = [ClimateYear { rain_mm: 1200.0, pet_mm: 900.0 }, ClimateYear { rain_mm: 200.0, pet_mm: 900.0 }];
    let q_dry = project_catchment(&c, &dry, &p, 2030)[1].yield_mm;
    assert!(q_dry > p.min_runoff_mm, "the dry year must not be low-runoff: {q_dry} mm");
    let l = 2.5 * q_dry;
    p.contaminants[0].open_export_kg_per_ha_yr = l;
    p.contaminants[0].forest_export_kg_per_ha_yr = l;
    p.concentration_ceiling = ConcentrationCeiling::NONE;
    let unscreened = project_catchment(&c, &dry, &p, 2030);
    assert_abs_diff_eq!(unscreened[1].concentrations[0].unwrap(), 250.0, epsilon = 1e-9);
    p.concentration_ceiling = ConcentrationCeiling::DEFAULT;
    let screened = project_catchment(&c, &dry, &p, 2030);
    assert_eq!(screened[1].concentrations[0], Err(ScreenedFlag::AboveCeiling));
    // The ordinary year is stated, and the same in both.
    assert_eq!(screened[0].concentrations[0], unscreened[0].concentrations[0]);
    assert!(screened[0].concentrations[0].is_ok());
}

#[test]
fn a_receiving_node_in_a_near_dry_year_is_flagged_above_the_ceiling() {
    // Derived: the pooled concentration 1000·ΣL/ΣV is screened against 10× the pooled
    // long-term mean 1000·ΣL̄/ΣV̄, as for one catchment.
    use yieldshift::model::dilution::{ConcentrationCeiling, ScreenedFlag};
    let p = params();
    let cs: Vec<_> = (0..2)
        .map(|i| {
            let mut c = tussock(1000.0, 1200.0, 900.0, 0.0, ClassAreas::default());
            c.id = format!("c{i}");
            c
        })
        .collect();
    let net = Network::new(vec![Some(1), None]).unwrap();
    let climate = [ClimateYear { rain_mm: 1200.0, pet_mm: 900.0 }, ClimateYear { rain_mm: 200.0, pet_mm: 900.0 }];
    let proj: Vec<_> = cs.iter().map(|c| project_catchment(c, &climate, &p, 2030)).collect();
    assert!(proj[0][1].yield_mm > p.min_runoff_mm);
    let screened = node_totals(&net, &cs, &proj, 1, 1.0, &ConcentrationCeiling::DEFAULT);
    let unscreened = node_totals(&net, &cs, &proj, 1, 1.0, &ConcentrationCeiling::NONE);
    let (wet, dry) = (&unscreened[0].1[0], &unscreened[0].1[1]);
    let mean_c = wet.concentrations[0].unwrap();
    assert!(dry.concentrations[0].unwrap() > 10.0 * mean_c, "{dry:?}");
    assert_eq!(screened[0].1[1].concentrations[0], Err(ScreenedFlag::AboveCeiling));
    assert_eq!(screened[0].1[0].concentrations[0], Ok(mean_c));
}
