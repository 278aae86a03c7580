//! Calibration: fit statistics against an independent library, recovery of known
//! curve parameters from synthetic records, impossible records, the observed-flow
//! reader, and `yieldshift fit` end to end.

use approx::{assert_abs_diff_eq, assert_relative_eq};
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use yieldshift::input::observed::{read_observed, LeftOutReason};
use yieldshift::input::scenario::load_scenario;
use yieldshift::model::budyko::CoverCurves;
use yieldshift::model::fit::{Cover, FitError, GaugeRecord, GaugeYear, FU_OMEGA_RANGE, ZHANG_W_RANGE};
use yieldshift::model::skill::{kge, nse, pbias_pct, rmse, Skill};
use yieldshift::model::uncertainty::{open01, stable_hash, stream};

/// Recovery of a known parameter by the long-term mean fit (bracketed root, issue requirement 1e-9).
const MEAN_FIT_TOL: f64 = 1e-9;
/// Recovery by the series fit (bounded minimisation; resolution ≈ 1.5e-8·θ, requirement 1e-6).
const SERIES_FIT_TOL: f64 = 1e-6;
/// Agreement with the hydroeval fixture: 17-digit values, the same formulas, different summation order.
const FIXTURE_REL: f64 = 1e-11;

// ---------------------------------------------------------------------------
// Independent closed forms used to make synthetic records (not the model's code).

/// Zhang et al. (2001) eq. 8 as published, `ET/P = (1 + wφ)/(1 + wφ + 1/φ)`, with ET
/// capped at min(P, E0) (the physical limits the model also applies).
fn zhang_et_mm(p: f64, e0: f64, w: f64) -> f64 {
    let phi = e0 / p;
    let ratio = (1.0 + w * phi) / (1.0 + w * phi + 1.0 / phi);
    (p * ratio).min(p).min(e0)
}

/// Fu (1981), `ET/P = 1 + φ − (1 + φ^ω)^(1/ω)` (direct form; accurate for 0.1 < φ < 10).
fn fu_et_mm(p: f64, e0: f64, omega: f64) -> f64 {
    let phi: f64 = e0 / p;
    p * (1.0 + phi - (1.0 + phi.powf(omega)).powf(1.0 / omega))
}

/// An invented 30-year climate: rainfall 700–1900 mm/yr, PET 760–940 mm/yr.
fn climate(t: usize) -> (f64, f64) {
    let rain = 1300.0 + 600.0 * ((t as f64 * 2.399).sin());
    let pet = 850.0 - 90.0 * ((t as f64 * 1.13 + 0.4).cos());
    (rain, pet)
}

/// Standard normal deviates by the Box–Muller transform (Box & Muller 1958), from
/// uniforms in (0, 1).
fn normal(rng: &mut impl rand::Rng) -> f64 {
    let u1 = open01(rng);
    let u2 = open01(rng);
    (-2.0 * u1.ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
}

/// A synthetic Zhang record: grass w = `w`, forest w = 2.0 on canopy fraction `f`,
/// forest PET = 1.1 × grass PET, with Gaussian noise of `noise_mm` on each year's yield.
fn zhang_record(w: f64, f: f64, noise_mm: f64, seed: u64, cover: Cover, w_forest: f64) -> GaugeRecord {
    // The noise has its own sampling dimension, apart from the bootstrap's.
    let mut rng = stream(seed, stable_hash("test.fit.noise"), 0);
    let years = (0..30)
        .map(|t| {
            let (p, e0) = climate(t);
            let et = f * zhang_et_mm(p, 1.1 * e0, w_forest) + (1.0 - f) * zhang_et_mm(p, e0, w);
            let q = (p - et + noise_mm * normal(&mut rng)).max(0.0);
            GaugeYear { year: 1990 + t as i32, rain_mm: p, pet_mm: e0, pet_forest_mm: 1.1 * e0, observed_yield_mm: q }
        })
        .collect();
    // Start the fit from the published defaults, not from the truth.
    GaugeRecord::new(CoverCurves::Zhang { w_forest: 2.0, w_grass: 0.5 }, cover, f, years).unwrap()
}

// ---------------------------------------------------------------------------
// Statistics

fn fixture() -> Vec<csv::StringRecord> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/skill_reference.csv");
    let mut r = csv::ReaderBuilder::new().comment(Some(b'#')).from_path(path).unwrap();
    r.records().map(|x| x.unwrap()).collect()
}

fn values(cell: &str) -> Vec<f64> {
    cell.split(' ').map(|v| v.parse().unwrap()).collect()
}

#[test]
fn statistics_agree_with_hydroeval() {
    // Source: hydroeval 0.1.0 (PyPI), fixture tests/fixtures/skill_reference.csv written by
    // scripts/skill_reference.py (numpy 2.4.6). Columns: case,n,observed,simulated,nse,kge,
    // kge_r,kge_alpha,kge_beta,pbias_hydroeval,rmse.
    let rows = fixture();
    assert_eq!(rows.len(), 8, "fixture rows");
    for r in &rows {
        let case = &r[0];
        let obs = values(&r[2]);
        let sim = values(&r[3]);
        assert_eq!(obs.len(), r[1].parse::<usize>().unwrap(), "{case}");
        let want = |i: usize| r[i].parse::<f64>().unwrap();
        // Source: hydroeval 0.1.0 nse, fixture column 4.
        assert_relative_eq!(nse(&sim, &obs).unwrap(), want(4), max_relative = FIXTURE_REL, epsilon = 1e-13);
        let k = kge(&sim, &obs).unwrap();
        // Source: hydroeval 0.1.0 kge (returns KGE, r, alpha, beta), fixture columns 5–8.
        assert_relative_eq!(k.kge, want(5), max_relative = FIXTURE_REL, epsilon = 1e-13);
        assert_relative_eq!(k.r, want(6), max_relative = FIXTURE_REL, epsilon = 1e-13);
        assert_relative_eq!(k.alpha, want(7), max_relative = FIXTURE_REL, epsilon = 1e-13);
        assert_relative_eq!(k.beta, want(8), max_relative = FIXTURE_REL, epsilon = 1e-13);
        // Source: hydroeval 0.1.0 pbias = 100·Σ(obs − sim)/Σobs, fixture column 9; yieldshift's
        // convention is the opposite sign (positive = overestimate), so compare with its negative.
        assert_relative_eq!(pbias_pct(&sim, &obs).unwrap(), -want(9), max_relative = 10.0 * FIXTURE_REL, epsilon = 1e-11);
        // Source: hydroeval 0.1.0 rmse, fixture column 10.
        assert_relative_eq!(rmse(&sim, &obs).unwrap(), want(10), max_relative = FIXTURE_REL);
    }
    // The sign convention, on the fixture's named cases (hydroeval: negative for "overestimate").
    let over = rows.iter().find(|r| &r[0] == "overestimate").unwrap();
    assert!(pbias_pct(&values(&over[3]), &values(&over[2])).unwrap() > 0.0);
}

#[test]
fn nse_is_one_for_a_perfect_simulation_and_zero_for_the_observed_mean() {
    let obs: Vec<f64> = (0..20).map(|t| climate(t).0 * 0.4).collect();
    // Source: Nash & Sutcliffe (1970): efficiency 1 when the residual sum of squares is zero.
    assert_abs_diff_eq!(nse(&obs, &obs).unwrap(), 1.0, epsilon = 1e-15);
    // Source: Nash & Sutcliffe (1970): efficiency 0 when the residual variance equals the
    // initial variance, i.e. when the observed mean is the simulation.
    let m = obs.iter().sum::<f64>() / obs.len() as f64;
    let mean_sim = vec![m; obs.len()];
    assert_abs_diff_eq!(nse(&mean_sim, &obs).unwrap(), 0.0, epsilon = 1e-12);
    // Source: Gupta et al. (2009): KGE = 1 when r = α = β = 1.
    assert_abs_diff_eq!(kge(&obs, &obs).unwrap().kge, 1.0, epsilon = 1e-12);
    // Source: definitions (module doc of yieldshift::model::skill): no bias, no error.
    let s = Skill::compute(&obs, &obs).unwrap();
    assert_abs_diff_eq!(s.pbias_pct.unwrap(), 0.0, epsilon = 1e-12);
    assert_abs_diff_eq!(s.rmse_mm.unwrap(), 0.0, epsilon = 1e-12);
    // The mean simulation does not vary, so its correlation (and KGE) is undefined, not NaN.
    assert!(Skill::compute(&mean_sim, &obs).unwrap().kge.is_none());
}

// ---------------------------------------------------------------------------
// Recovery of known parameters

#[test]
fn noise_free_zhang_record_recovers_w() {
    // Source: Zhang et al. (2001) eq. 8 generates the record (zhang_et_mm above); the
    // fit must return the w it was made with.
    for &(w, f) in &[(0.9, 0.0), (0.3, 0.15), (1.7, 0.35), (0.05, 0.0)] {
        let r = zhang_record(w, f, 0.0, 1, Cover::Grass, 2.0);
        let m = r.fit_mean().unwrap();
        assert_abs_diff_eq!(m.value, w, epsilon = MEAN_FIT_TOL);
        assert_abs_diff_eq!(m.simulated_mm, m.observed_mm, epsilon = 1e-9);
        for k in [1, 3, 5] {
            let s = r.fit_series(k).unwrap();
            assert_abs_diff_eq!(s.value, w, epsilon = SERIES_FIT_TOL);
            assert!(s.sse_mm2 < 1e-6, "window {k}: {}", s.sse_mm2);
        }
        // Statistics of the fitted simulation: a perfect fit.
        let sk = Skill::compute(&r.simulated_yield_mm(m.value), &r.observed_yield_mm()).unwrap();
        assert_abs_diff_eq!(sk.nse.unwrap(), 1.0, epsilon = 1e-9);
    }
}

#[test]
fn noise_free_record_recovers_forest_w() {
    // Source: Zhang et al. (2001) eq. 8; forest w = 2.6 made the record, grass held at 0.5.
    let r = zhang_record(0.5, 0.4, 0.0, 1, Cover::Forest, 2.6);
    assert_eq!(r.key(), "w_forest");
    assert_abs_diff_eq!(r.fit_mean().unwrap().value, 2.6, epsilon = MEAN_FIT_TOL);
    assert_abs_diff_eq!(r.fit_series(1).unwrap().value, 2.6, epsilon = SERIES_FIT_TOL);
}

#[test]
fn noise_free_fu_record_recovers_omega() {
    // Source: Fu (1981) curve (fu_et_mm above, direct form) generates the record.
    for &omega in &[1.6, 2.16, 3.4] {
        let years = (0..30)
            .map(|t| {
                let (p, e0) = climate(t);
                GaugeYear {
                    year: 1990 + t as i32,
                    rain_mm: p,
                    pet_mm: e0,
                    pet_forest_mm: e0,
                    observed_yield_mm: p - fu_et_mm(p, e0, omega),
                }
            })
            .collect();
        let r = GaugeRecord::new(CoverCurves::Fu { omega_forest: 2.97, omega_grass: 2.16 }, Cover::Grass, 0.0, years).unwrap();
        assert_eq!(r.key(), "omega_grass");
        assert_abs_diff_eq!(r.fit_mean().unwrap().value, omega, epsilon = MEAN_FIT_TOL);
        assert_abs_diff_eq!(r.fit_series(1).unwrap().value, omega, epsilon = SERIES_FIT_TOL);
    }
}

#[test]
fn bootstrap_interval_covers_the_true_value() {
    // Source: Efron & Tibshirani (1993): a 95 % percentile interval should contain the
    // generating value in about 95 % of records. 40 invented records with noise of 60 mm
    // on yields of about 300–1100 mm. Binomial(40, 0.95) gives 34 or more hits with
    // probability 0.997 (0.96 even if the percentile interval under-covered at 92 %, as
    // it can in small samples); the records are seeded, so the count is fixed (40 now).
    let w_true = 0.8;
    let mut hits = 0;
    for seed in 0..40u64 {
        let r = zhang_record(w_true, 0.1, 60.0, 1000 + seed, Cover::Grass, 2.0);
        let iv = r.bootstrap_mean(400, seed, 0.95).unwrap();
        assert!(iv.low < iv.high, "seed {seed}");
        if (iv.low..=iv.high).contains(&w_true) {
            hits += 1;
        }
    }
    assert!(hits >= 34, "interval covered the true w in {hits} of 40 records");
    // And one record in full: the interval holds both the truth and the point fit.
    let r = zhang_record(w_true, 0.1, 60.0, 7, Cover::Grass, 2.0);
    let m = r.fit_mean().unwrap();
    let iv = r.bootstrap_mean(1000, 42, 0.95).unwrap();
    assert!(iv.low <= w_true && w_true <= iv.high, "{iv:?}");
    assert!(iv.low <= m.value && m.value <= iv.high, "{iv:?} vs {}", m.value);
    assert_eq!(iv.at_bound, 0);
}

#[test]
fn bootstrap_is_reproducible_from_its_seed() {
    let r = zhang_record(0.8, 0.1, 60.0, 3, Cover::Grass, 2.0);
    let a = r.bootstrap_mean(300, 9, 0.9).unwrap();
    let b = r.bootstrap_mean(300, 9, 0.9).unwrap();
    let c = r.bootstrap_mean(300, 10, 0.9).unwrap();
    assert_eq!(a, b);
    assert_ne!(a.low, c.low);
}

// ---------------------------------------------------------------------------
// Impossible records

fn record_with_yields(q: impl Fn(f64, f64) -> f64) -> GaugeRecord {
    let years = (0..10)
        .map(|t| {
            let (p, e0) = climate(t);
            GaugeYear { year: 2000 + t as i32, rain_mm: p, pet_mm: e0, pet_forest_mm: e0, observed_yield_mm: q(p, e0) }
        })
        .collect();
    GaugeRecord::new(CoverCurves::ZHANG_DEFAULT, Cover::Grass, 0.0, years).unwrap()
}

#[test]
fn impossible_mean_yields_are_errors_not_clamped_values() {
    // Yield above rainfall: no curve can produce it.
    let e = record_with_yields(|p, _| 1.05 * p).fit_mean().unwrap_err();
    assert!(matches!(e, FitError::MeanYieldNotBelowRain { .. }), "{e:?}");
    assert!(e.to_string().contains("not below the mean rainfall"), "{e}");

    // Yield below rainfall but above the curve at the lowest w (Zhang eq. 8 at w = 0.01
    // still evaporates ET/P ≥ 1 − 1/(1 + φ) of rainfall): needs less ET than allowed.
    // Source: Zhang et al. (2001) eq. 8 at w → 0: ET/P = 1 − 1/(1 + φ) ≈ 0.39 at φ = 0.65.
    let e = record_with_yields(|p, _| 0.95 * p).fit_mean().unwrap_err();
    match &e {
        FitError::MeanYieldAboveCurve { key, bound, highest_mm, observed_mm } => {
            assert_eq!(*key, "w_grass");
            assert_eq!(*bound, ZHANG_W_RANGE.0);
            assert!(highest_mm < observed_mm);
        }
        other => panic!("expected MeanYieldAboveCurve, got {other:?}"),
    }
    assert!(e.to_string().contains("lowest allowed w_grass = 0.01"), "{e}");

    // Yield far below what even w = 20 leaves: needs more ET than the curve allows.
    let e = record_with_yields(|_, _| 1.0).fit_mean().unwrap_err();
    match &e {
        FitError::MeanYieldBelowCurve { bound, .. } => assert_eq!(*bound, ZHANG_W_RANGE.1),
        other => panic!("expected MeanYieldBelowCurve, got {other:?}"),
    }
    assert!(e.to_string().contains("highest allowed w_grass = 20"), "{e}");

    // Fu's ω range is [1.01, 20].
    let years = record_with_yields(|_, _| 1.0).years().to_vec();
    let fu = GaugeRecord::new(CoverCurves::Fu { omega_forest: 2.97, omega_grass: 2.16 }, Cover::Grass, 0.0, years).unwrap();
    assert!(matches!(fu.fit_mean(), Err(FitError::MeanYieldBelowCurve { key: "omega_grass", bound, .. }) if bound == FU_OMEGA_RANGE.1));
}

#[test]
fn unfittable_inputs_are_errors() {
    // Fewer than three years.
    let y = GaugeYear { year: 2000, rain_mm: 1000.0, pet_mm: 800.0, pet_forest_mm: 800.0, observed_yield_mm: 300.0 };
    assert!(matches!(GaugeRecord::new(CoverCurves::ZHANG_DEFAULT, Cover::Grass, 0.0, vec![y, y]), Err(FitError::TooFewYears { .. })));
    // Negative or non-finite values.
    let bad = GaugeYear { observed_yield_mm: -1.0, ..y };
    assert!(matches!(GaugeRecord::new(CoverCurves::ZHANG_DEFAULT, Cover::Grass, 0.0, vec![y, y, bad]), Err(FitError::InvalidYear { .. })));
    let bad = GaugeYear { rain_mm: f64::NAN, ..y };
    assert!(matches!(GaugeRecord::new(CoverCurves::ZHANG_DEFAULT, Cover::Grass, 0.0, vec![y, bad, y]), Err(FitError::InvalidYear { .. })));
    // A moving average longer than the record.
    let r = zhang_record(0.8, 0.0, 0.0, 1, Cover::Grass, 2.0);
    assert!(matches!(r.fit_series(0), Err(FitError::InvalidWindow(0))));
    assert!(matches!(r.fit_series(15).map(|s| s.windows), Ok(16)));
    // No forest to fit.
    let r = zhang_record(0.8, 0.0, 0.0, 1, Cover::Forest, 2.0);
    assert!(matches!(r.fit_mean(), Err(FitError::NoSensitivity { .. })));
}

// ---------------------------------------------------------------------------
// Observed-flow table and the command line

const CATCHMENTS: &str = "id,name,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha,forest_ha\n\
gauged,Gauged Creek,1200,1300,850,900,40,20,10,100\n\
second,Second Stream,800,1000,900,600,0,0,0,0\n\
dry,Dry Burn,500,700,950,400,0,0,0,0\n";

/// True parameters used to make the observed flows.
const W_GAUGED: f64 = 0.9;
const W_SECOND: f64 = 0.35;

/// Writes a scenario with a 1990–2019 climate record for `gauged` and `second`.
fn write_scenario(dir: &Path, extra: &str) -> PathBuf {
    std::fs::write(dir.join("catchments.csv"), CATCHMENTS).unwrap();
    let mut cl = String::from("catchment,year,rain_mm,pet_mm\n");
    for (k, id) in ["gauged", "second"].iter().enumerate() {
        for t in 0..30 {
            let (p, e) = climate(t + 7 * k);
            cl.push_str(&format!("{id},{},{:.0},{:.0}\n", 1990 + t, p * (1.0 - 0.2 * k as f64), e));
        }
    }
    std::fs::write(dir.join("climate.csv"), cl).unwrap();
    let s = dir.join("scenario.toml");
    std::fs::write(
        &s,
        format!(
            "start_year = 2020\nhorizon_years = 10\ncatchments = \"catchments.csv\"\n\n[climate]\ntable = \"climate.csv\"\n\n\
             [hydrology]\nmethod = \"zhang\"\nw_forest = 2.0\nw_grass = 0.5\nforest_pet_factor = 1.1\ninterception_fraction = 0\n{extra}"
        ),
    )
    .unwrap();
    s
}

/// Observed flows made from Zhang's eq. 8 with known w (no noise), the catchments'
/// starting canopy fractions and forest PET = 1.1 × PET (the scenario turns canopy
/// interception off, so the pure curve is what is fitted). `gauged` 1995 is left
/// empty, 2020 lies beyond the climate record, and `second` is given in m³.
fn write_observed(dir: &Path, scenario: &Path) -> PathBuf {
    let sc = load_scenario(scenario).unwrap();
    let mut text = String::from("catchment,year,flow_mm,flow_m3,notes\n");
    for (i, c) in sc.catchments.iter().enumerate().take(2) {
        let w = [W_GAUGED, W_SECOND][i];
        let f = yieldshift::model::projection::starting_canopy_fraction(c, &sc.params);
        let series = sc.climate.as_ref().unwrap();
        for year in 1990..=2020 {
            let cl = series.year_for(&c.id, year, c.mean_climate(), yieldshift::input::climate::BeyondRecord::Mean);
            let et = f * zhang_et_mm(cl.rain_mm, 1.1 * cl.pet_mm, 2.0) + (1.0 - f) * zhang_et_mm(cl.rain_mm, cl.pet_mm, w);
            let q = cl.rain_mm - et;
            match (c.id.as_str(), year) {
                ("gauged", 1995) => text.push_str("gauged,1995,,,gauge out of service\n"),
                ("gauged", _) => text.push_str(&format!("gauged,{year},{q:.10},,\n")),
                ("second", _) => text.push_str(&format!("second,{year},,{:.6},\n", q * 10.0 * c.area_ha)),
                _ => unreachable!(),
            }
        }
    }
    let p = dir.join("observed.csv");
    std::fs::write(&p, text).unwrap();
    p
}

fn bin(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_yieldshift")).args(args).output().expect("binary runs")
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn fit_rows(path: &Path) -> Vec<std::collections::HashMap<String, String>> {
    let mut r = csv::Reader::from_path(path).unwrap();
    let h = r.headers().unwrap().clone();
    r.records().map(|x| h.iter().map(String::from).zip(x.unwrap().iter().map(String::from)).collect()).collect()
}

#[test]
fn observed_table_is_aligned_with_the_climate_and_gaps_are_reported() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write_scenario(tmp.path(), "");
    let o = write_observed(tmp.path(), &s);
    let sc = load_scenario(&s).unwrap();
    let obs = read_observed(&o, &sc).unwrap();
    assert_eq!(obs.series.len(), 2);
    assert_eq!(obs.series[0].years.len(), 29);
    assert_eq!(obs.series[1].years.len(), 30);
    let reasons: Vec<_> = obs.left_out.iter().map(|l| (l.catchment.as_str(), l.year, &l.reason)).collect();
    assert_eq!(reasons.len(), 3, "{reasons:?}");
    assert!(reasons.contains(&("gauged", 1995, &LeftOutReason::MissingFlow)));
    assert!(reasons.contains(&("gauged", 2020, &LeftOutReason::NoClimate { record: Some((1990, 2019)) })));
    assert!(reasons.contains(&("second", 2020, &LeftOutReason::NoClimate { record: Some((1990, 2019)) })));
    // flow_m3 → mm: 1 mm over 1 ha is 10 m³ (unit conversion).
    let y = obs.series[1].years[0];
    let area = sc.catchments[1].area_ha;
    let raw: f64 = std::fs::read_to_string(&o)
        .unwrap()
        .lines()
        .find(|l| l.starts_with("second,1990,"))
        .unwrap()
        .split(',')
        .nth(3)
        .unwrap()
        .parse()
        .unwrap();
    assert_abs_diff_eq!(y.flow_mm, raw / (10.0 * area), epsilon = 1e-12);
}

#[test]
fn observed_table_errors_name_row_and_column() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write_scenario(tmp.path(), "");
    let sc = load_scenario(&s).unwrap();
    let p = tmp.path().join("bad.csv");
    std::fs::write(
        &p,
        "catchment,year,flow_mm,flow_m3\ngauged,2000,410,\ngaugd,2001,400,\ngauged,2002,12 mm,\ngauged,2000,380,\nsecond,2003.5,300,\nsecond,2004,300,2000000\nsecond,2005,-3,\n",
    )
    .unwrap();
    let e = read_observed(&p, &sc).unwrap_err();
    assert!(e.is_invalid_input());
    let at = |row: usize, col: &str| {
        e.problems().iter().find(|q| q.row == Some(row) && q.column.as_deref() == Some(col)).map(|q| q.message.clone())
    };
    assert!(at(3, "catchment").unwrap().contains("did you mean 'gauged'"), "{e}");
    assert!(at(4, "flow_mm").unwrap().contains("write 12"), "{e}");
    assert!(at(5, "year").unwrap().contains("appears twice (first on row 2)"), "{e}");
    assert!(at(6, "year").unwrap().contains("whole number"), "{e}");
    assert!(at(7, "flow_m3").unwrap().contains("not both"), "{e}");
    assert!(at(8, "flow_mm").unwrap().contains("out of range"), "{e}");
    assert_eq!(e.problems().len(), 6, "{e}");
    assert!(e.problems().iter().all(|q| q.file.as_deref() == Some(p.as_path())));
}

#[test]
fn fit_command_recovers_known_w_and_its_snippet_loads() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write_scenario(tmp.path(), "");
    let o = write_observed(tmp.path(), &s);
    let out = tmp.path().join("fit-out");
    let run = bin(&[
        "fit",
        s.to_str().unwrap(),
        "--observed",
        o.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--bootstrap",
        "200",
        "--moving-average-yr",
        "3",
        "--donor",
        "dry=second",
    ]);
    assert!(run.status.success(), "{}", text(&run));
    assert!(text(&run).contains("gauged 1995 left out"), "{}", text(&run));

    let rows = fit_rows(&out.join("fit.csv"));
    assert_eq!(rows.len(), 2);
    for (row, w, used, left) in [(&rows[0], W_GAUGED, "29", "2"), (&rows[1], W_SECOND, "30", "1")] {
        assert_eq!(row["parameter"], "w_grass");
        let v: f64 = row["value_mean_fit"].parse().unwrap();
        // Source: the flows were made with Zhang et al. (2001) eq. 8 at this w (write_observed).
        // fit.csv rounds to 10 decimals; the flows were written with 10 decimals.
        assert_abs_diff_eq!(v, w, epsilon = SERIES_FIT_TOL);
        assert_abs_diff_eq!(row["value_series_fit"].parse::<f64>().unwrap(), w, epsilon = SERIES_FIT_TOL);
        assert_abs_diff_eq!(row["nse"].parse::<f64>().unwrap(), 1.0, epsilon = 1e-6);
        assert_abs_diff_eq!(row["pbias_pct"].parse::<f64>().unwrap(), 0.0, epsilon = 1e-4);
        assert!(row["nse_scenario"].parse::<f64>().unwrap() < 0.999);
        assert_eq!(row["years_used"], used);
        assert_eq!(row["years_left_out"], left);
        assert_eq!(row["moving_average_yr"], "3");
        let (lo, hi): (f64, f64) = (row["interval_low"].parse().unwrap(), row["interval_high"].parse().unwrap());
        assert!(lo <= v + 1e-6 && v - 1e-6 <= hi, "{lo} {v} {hi}");
    }
    // Left-out years are listed with their rows.
    let left = std::fs::read_to_string(out.join("left_out.csv")).unwrap();
    assert!(left.contains("gauged,1995,7,flow is empty"), "{left}");

    // calibration.toml pasted into the scenario reproduces the fitted values.
    let snippet = std::fs::read_to_string(out.join("calibration.toml")).unwrap();
    assert!(snippet.contains("catchment = \"dry\"") && snippet.contains("donor = \"second\""), "{snippet}");
    let with_cal = write_scenario(tmp.path(), &format!("\n{snippet}"));
    let sc = load_scenario(&with_cal).unwrap();
    for (i, row) in rows.iter().enumerate() {
        let v: f64 = row["value_mean_fit"].parse().unwrap();
        match sc.catchments[i].curves {
            Some(CoverCurves::Zhang { w_forest, w_grass }) => {
                assert_eq!(w_forest, 2.0);
                assert_abs_diff_eq!(w_grass, v, epsilon = 1e-9);
            }
            other => panic!("{other:?}"),
        }
    }
    assert_eq!(sc.catchments[2].curves, sc.catchments[1].curves, "donor");
    // Refitting the calibrated scenario finds the value it was given (a fixed point).
    let obs = read_observed(&o, &sc).unwrap();
    for s in &obs.series {
        let years: Vec<_> = s.years.iter().map(|y| (y.year, y.climate, y.flow_mm)).collect();
        let r = GaugeRecord::for_catchment(&sc.catchments[s.catchment], &sc.params, Cover::Grass, &years).unwrap();
        assert_abs_diff_eq!(r.fit_mean().unwrap().value, r.scenario_value(), epsilon = MEAN_FIT_TOL);
    }

    // Figures: two per fitted catchment, full size and not blank.
    for stem in ["gauged_fit_yield", "gauged_budyko", "second_fit_yield", "second_budyko"] {
        let p = out.join("figures").join(format!("{stem}.png"));
        let dec = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(&p).unwrap()));
        let mut r = dec.read_info().unwrap();
        let mut buf = vec![0; r.output_buffer_size()];
        let info = r.next_frame(&mut buf).unwrap();
        assert_eq!((info.width, info.height), yieldshift::plot::SIZE);
        let distinct = buf[..info.buffer_size()].chunks(3).map(|c| c.to_vec()).collect::<std::collections::HashSet<_>>().len();
        assert!(distinct > 10, "{stem} looks blank");
        assert!(out.join("figures").join(format!("{stem}.svg")).exists());
    }
    let info = std::fs::read_to_string(out.join("run_info.json")).unwrap();
    assert!(info.contains("positive = the simulation overestimates"), "{info}");
    assert!(std::fs::read_dir(tmp.path()).unwrap().all(|e| !e.unwrap().file_name().to_string_lossy().contains("partial")));
}

#[test]
fn fit_command_is_reproducible_with_a_seed() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write_scenario(tmp.path(), "");
    let o = write_observed(tmp.path(), &s);
    let fit = |name: &str| {
        let out = tmp.path().join(name);
        let r = bin(&[
            "fit",
            s.to_str().unwrap(),
            "--observed",
            o.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--bootstrap",
            "150",
            "--seed",
            "5",
            "-q",
        ]);
        assert!(r.status.success(), "{}", text(&r));
        assert!(r.stdout.is_empty(), "--quiet prints nothing");
        std::fs::read_to_string(out.join("fit.csv")).unwrap()
    };
    assert_eq!(fit("a"), fit("b"));
}

#[test]
fn bad_observed_file_exits_2_naming_row_and_column() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write_scenario(tmp.path(), "");
    let o = tmp.path().join("obs.csv");
    std::fs::write(&o, "catchment,year,flow_mm\ngauged,1990,400\ngauged,1991,abc\ngauged,1992,500\n").unwrap();
    let out = tmp.path().join("res");
    let r = bin(&["fit", s.to_str().unwrap(), "--observed", o.to_str().unwrap(), "--out", out.to_str().unwrap()]);
    assert_eq!(r.status.code(), Some(2), "{}", text(&r));
    let t = text(&r);
    assert!(t.contains("row 3") && t.contains("column 'flow_mm'") && t.contains("'abc' is not a number"), "{t}");
    assert!(!out.exists(), "no output on error");
}

#[test]
fn impossible_record_exits_2_and_writes_nothing() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write_scenario(tmp.path(), "");
    let sc = load_scenario(&s).unwrap();
    let cl = sc.climate.as_ref().unwrap();
    let mut t = String::from("catchment,year,flow_mm\n");
    for year in 1990..2000 {
        let c = &sc.catchments[0];
        let rain = cl.year_for(&c.id, year, c.mean_climate(), yieldshift::input::climate::BeyondRecord::Mean).rain_mm;
        t.push_str(&format!("gauged,{year},{:.1}\n", rain * 1.3));
    }
    let o = tmp.path().join("obs.csv");
    std::fs::write(&o, t).unwrap();
    let out = tmp.path().join("res");
    let r = bin(&["fit", s.to_str().unwrap(), "--observed", o.to_str().unwrap(), "--out", out.to_str().unwrap()]);
    assert_eq!(r.status.code(), Some(2), "{}", text(&r));
    let msg = text(&r);
    assert!(msg.contains("catchment 'gauged'") && msg.contains("not below the mean rainfall") && msg.contains("row 2"), "{msg}");
    assert!(!out.exists());
    // Bad options are usage errors too.
    let r = bin(&[
        "fit",
        s.to_str().unwrap(),
        "--observed",
        o.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--moving-average-yr",
        "0",
        "--donor",
        "dry",
    ]);
    assert_eq!(r.status.code(), Some(2), "{}", text(&r));
    let msg = text(&r);
    assert!(msg.contains("--moving-average-yr") && msg.contains("UNGAUGED=GAUGED"), "{msg}");
}

#[test]
fn calibration_ids_with_quotes_and_backslashes_read_back_through_the_scenario() {
    // Ids may hold `"` and `\`: calibration.toml must encode them so that the
    // scenario reader finds the same catchments.
    let (gauged, ungauged) = ("q\"uote", "back\\slash");
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    std::fs::write(
        dir.join("catchments.csv"),
        "id,name,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha,forest_ha\n\
         \"q\"\"uote\",\"Quote \"\"Creek\"\"\",1200,1300,850,900,0,0,0,0\n\
         back\\slash,Slash Stream,800,1000,900,600,0,0,0,0\n",
    )
    .unwrap();
    let mut cl = String::from("catchment,year,rain_mm,pet_mm\n");
    let mut obs = String::from("catchment,year,flow_mm\n");
    for t in 0..30 {
        let (p, e) = climate(t);
        let (p, e) = (p.round(), e.round());
        cl.push_str(&format!("\"q\"\"uote\",{},{p},{e}\n\"back\\slash\",{},{p},{e}\n", 1990 + t, 1990 + t));
        obs.push_str(&format!("\"q\"\"uote\",{},{:.10}\n", 1990 + t, p - zhang_et_mm(p, e, W_GAUGED)));
    }
    std::fs::write(dir.join("climate.csv"), cl).unwrap();
    std::fs::write(dir.join("observed.csv"), obs).unwrap();
    let base = "start_year = 2020\nhorizon_years = 10\ncatchments = \"catchments.csv\"\n\n[climate]\ntable = \"climate.csv\"\n\n\
                [hydrology]\nmethod = \"zhang\"\nw_forest = 2.0\nw_grass = 0.5\nforest_pet_factor = 1.1\n";
    let s = dir.join("scenario.toml");
    std::fs::write(&s, base).unwrap();
    let out = dir.join("fit");
    let donor = format!("{ungauged}={gauged}");
    let r = bin(&[
        "fit",
        s.to_str().unwrap(),
        "--observed",
        dir.join("observed.csv").to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--donor",
        &donor,
    ]);
    assert!(r.status.success(), "{}", text(&r));

    let snippet = std::fs::read_to_string(out.join("calibration.toml")).unwrap();
    let cal = dir.join("calibrated.toml");
    std::fs::write(&cal, format!("{base}\n{snippet}")).unwrap();
    let sc = load_scenario(&cal).unwrap_or_else(|e| panic!("{e}\n{snippet}"));
    let ids: Vec<&str> = sc.catchments.iter().map(|c| c.id.as_str()).collect();
    assert_eq!(ids, [gauged, ungauged]);
    let fitted = fit_rows(&out.join("fit.csv"))[0]["value_mean_fit"].parse::<f64>().unwrap();
    assert_abs_diff_eq!(fitted, W_GAUGED, epsilon = 1e-6);
    for c in &sc.catchments {
        match c.curves {
            Some(CoverCurves::Zhang { w_grass, .. }) => assert_abs_diff_eq!(w_grass, fitted, epsilon = 1e-9),
            other => panic!("{}: {other:?}\n{snippet}", c.id),
        }
    }
}
