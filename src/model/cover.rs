//! Cover dynamics: the invading stand held as age cohorts.
//!
//! The infested area of a catchment is a list of cohorts, one per year of
//! establishment, each holding an area (ha) and an age (years since establishment).
//! Every year all cohorts age by one year, and cohorts at or past the seed-bearing
//! age seed a new cohort on the still-uninvaded vulnerable land.
//!
//! # Formula
//! New infestation in a year (ha/yr):
//!
//! `ΔI = min( (r·S + R) · (1 − I/V), V − I )`
//!
//! compounding spread from seed-bearing area with a logistic cap at the vulnerable area.
//!
//! Density class follows cohort age: scattered for `a < a_medium`, medium for
//! `a_medium ≤ a < a_dense`, dense for `a ≥ a_dense`.
//!
//! ## Timing of one step ([`Cohorts::step`])
//! 1. `S` and `I` are taken from the cohorts as they stand, i.e. with **last year's
//!    ages**: the seed that establishes in year `t` comes from cohorts aged `≥ a_seed`
//!    at the end of year `t − 1`.
//! 2. Every cohort then ages by one year and the new infestation is added as a cohort
//!    of **age 0** (it counts as age 0 in the year it appears).
//!
//! So a cohort established in year `t` first seeds in year `t + a_seed + 1`.
//!
//! ## Starting cover ([`Cohorts::from_classes`], [`Cohorts::from_ages`])
//! Starting areas are spread in equal shares over whole ages (inclusive ranges):
//! scattered over ages `0 … m − 1`, medium over `m … d − 1`, dense over
//! `d … d + s − 1`, with `m = max(a_medium, 1)`, `d = max(a_dense, m + 1)` and
//! `s = max(s_dense, 1)`. Starting scattered cohorts already at or past `a_seed`
//! (e.g. ages 8 and 9 with `a_seed = 8`, `a_medium = 10`) seed from the first step.
//! A dated stand (a planting, or an invasion whose establishment years are known)
//! gives its areas by age directly: a cohort established in year `y` has age
//! `start_year − y` at the start.
//!
//! ## Spread rate from the areal growth users observe
//! Far from the cap (`I ≪ V`) and without seed rain, the new area `n_t` of year `t`
//! obeys the renewal equation implied by the timing above,
//!
//! `n_t = r · Σ_{j ≥ a_seed + 1} n_{t−j}`,
//!
//! whose solutions grow asymptotically as `λ^t`, `λ` the dominant root of the
//! characteristic (Euler–Lotka) equation
//!
//! `1 = r · Σ_{j ≥ a_seed + 1} λ^{−j} = r · λ^{−a_seed} / (λ − 1)`.
//!
//! Total infested area then grows at the same rate, `g = λ − 1` per year. Hence, for
//! an observed areal growth `g`,
//!
//! `r = g · (1 + g)^a_seed`   ([`spread_rate_for_areal_growth`]),
//!
//! and conversely `g` solves `ln g + a_seed · ln(1 + g) = ln r`, whose left side rises
//! strictly with `g` ([`areal_growth_for_spread_rate`], Brent's method on `ln g`).
//! With `a_seed = 0` the identity is exact from the first year: `I_{t+1} = (1 + r)·I_t`,
//! so `r = g`. With `g = 0.06` and `a_seed = 8`, `r = 0.09563`; conversely `r = 0.06`
//! gives `g = 0.0429`. (Counting seed-bearing from the same year's ages, i.e. lags
//! `j ≥ a_seed`, would give `r = g·(1 + g)^(a_seed − 1) = 0.0902` instead; that is not
//! this model's timing.)
//!
//! # Symbols
//! * `r` — spread rate per seed-bearing area, 1/yr (≥ 0; the scenario reader allows 0–1).
//! * `g` — asymptotic growth of the infested area, 1/yr (> 0), as observed in the field
//!   (unchecked infestations: about 0.05–0.06/yr, common practice, no published
//!   source); doubling time `ln 2 / ln(1 + g)`.
//! * `λ = 1 + g` — dominant root of the characteristic equation, per year.
//! * `S` — seed-bearing area: cohorts with age ≥ `a_seed`, ha.
//! * `R` — seed rain from outside the catchment, ha/yr, ≥ 0.
//! * `I` — infested area, ha; `V` — vulnerable area (can carry the invader), ha, `I ≤ V`.
//! * `n_t` — area established in year `t`, ha.
//! * `a_seed`, `a_medium`, `a_dense` — ages in whole years; `s_dense` — age span of
//!   the starting dense area, years (≥ 1).
//!
//! # Assumptions
//! Spread is spatially implicit: any vulnerable hectare is equally likely to be
//! invaded. Removal by control stops seed production at once. Cohorts never die
//! (the renewal sum runs over all ages). The conversion from `g` to `r` describes the
//! unconstrained phase; the logistic cap `1 − I/V` and seed rain `R` slow or speed the
//! realised growth, and the starting age structure decides how quickly the asymptotic
//! rate is reached.
//!
//! # References
//! Compounding spread at ~5–6 %/yr: common practice in invasive-conifer management
//! (national strategy figures); no single published source is relied on. The renewal
//! (Euler–Lotka) equation is the standard age-structured growth identity; its form here
//! is derived from this model's timing. Root finding: Brent (1973), see [`super::roots`].

use super::closure::ClosureCurve;
use super::roots::{brent_root, RootError};
use std::fmt;

/// Spread and density-class parameters of the invader.
#[derive(Debug, Clone, PartialEq)]
pub struct InvasionParams {
    /// Spread rate `r`, 1/yr.
    pub spread_rate_per_yr: f64,
    /// Age at which a cohort starts producing seed, years.
    pub seed_bearing_age_yr: u32,
    /// Seed rain from outside `R`, ha/yr of new infestation (before the cap).
    pub seed_rain_ha_per_yr: f64,
    /// Age at which scattered becomes medium density, years (≥ 1).
    pub medium_age_yr: u32,
    /// Age at which medium becomes dense, years (> `medium_age_yr`).
    pub dense_age_yr: u32,
    /// Age span over which the starting dense area is spread, years (≥ 1).
    pub initial_dense_span_yr: u32,
    /// Canopy closure with stand age.
    pub closure: ClosureCurve,
}

/// Areas by density class, ha.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct ClassAreas {
    /// Scattered, ha.
    pub scattered_ha: f64,
    /// Medium density, ha.
    pub medium_ha: f64,
    /// Dense, ha.
    pub dense_ha: f64,
}

impl ClassAreas {
    /// Total infested area, ha.
    pub fn total_ha(&self) -> f64 {
        self.scattered_ha + self.medium_ha + self.dense_ha
    }
}

/// Density class of a cohort.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum DensityClass {
    /// Young, scattered trees.
    Scattered,
    /// Thickening stand.
    Medium,
    /// Dense stand.
    Dense,
}

impl DensityClass {
    /// All classes, scattered first.
    pub const ALL: [DensityClass; 3] = [DensityClass::Scattered, DensityClass::Medium, DensityClass::Dense];

    /// Name as written in outputs and inputs.
    pub fn name(self) -> &'static str {
        match self {
            DensityClass::Scattered => "scattered",
            DensityClass::Medium => "medium",
            DensityClass::Dense => "dense",
        }
    }
}

impl InvasionParams {
    /// Density class of a cohort of age `age_yr`.
    #[inline]
    pub fn class_of(&self, age_yr: usize) -> DensityClass {
        if age_yr < self.medium_age_yr as usize {
            DensityClass::Scattered
        } else if age_yr < self.dense_age_yr as usize {
            DensityClass::Medium
        } else {
            DensityClass::Dense
        }
    }

    /// Oldest age of any starting cohort, years.
    pub fn initial_oldest_age_yr(&self) -> usize {
        (self.dense_age_yr + self.initial_dense_span_yr.max(1)) as usize - 1
    }
}

/// The invading stand as age cohorts. Cohort `i` (0 = oldest) has age `len − 1 − i`;
/// the youngest cohort always has age 0 (its area may be zero).
#[derive(Debug, Clone, PartialEq)]
pub struct Cohorts {
    areas_ha: Vec<f64>,
}

impl Cohorts {
    /// Places starting areas in cohorts consistent with their density class.
    pub fn from_classes(params: &InvasionParams, start: ClassAreas) -> Cohorts {
        let oldest = params.initial_oldest_age_yr();
        let mut by_age = vec![0.0; oldest + 1];
        let m = params.medium_age_yr.max(1) as usize;
        let d = (params.dense_age_yr as usize).max(m + 1);
        let span = params.initial_dense_span_yr.max(1) as usize;
        for (lo, hi, area) in [(0, m, start.scattered_ha), (m, d, start.medium_ha), (d, d + span, start.dense_ha)] {
            let per_age = area / (hi - lo) as f64;
            for slot in &mut by_age[lo..hi] {
                *slot += per_age;
            }
        }
        by_age.reverse();
        Cohorts { areas_ha: by_age }
    }

    /// Cohorts from areas by age: `by_age_ha[a]` is the area of age `a` years, ha
    /// (negative or non-finite areas count as 0). An empty slice gives [`Cohorts::empty`].
    pub fn from_ages(by_age_ha: &[f64]) -> Cohorts {
        if by_age_ha.is_empty() {
            return Cohorts::empty();
        }
        let mut areas_ha: Vec<f64> = by_age_ha.iter().map(|&a| if a.is_finite() { a.max(0.0) } else { 0.0 }).collect();
        areas_ha.reverse();
        Cohorts { areas_ha }
    }

    /// A stand with no cohorts (only an empty age-0 cohort).
    pub fn empty() -> Cohorts {
        Cohorts { areas_ha: vec![0.0] }
    }

    /// Number of cohorts (= age of the oldest + 1).
    pub fn len(&self) -> usize {
        self.areas_ha.len()
    }

    /// Always false: there is at least the age-0 cohort.
    pub fn is_empty(&self) -> bool {
        self.areas_ha.is_empty()
    }

    /// Age of the oldest cohort, years.
    pub fn oldest_age_yr(&self) -> usize {
        self.areas_ha.len() - 1
    }

    /// Area of the cohort of age `age_yr`, ha (0 when there is none).
    pub fn area_at_age(&self, age_yr: usize) -> f64 {
        let n = self.areas_ha.len();
        if age_yr >= n {
            0.0
        } else {
            self.areas_ha[n - 1 - age_yr]
        }
    }

    /// Iterates `(age_yr, area_ha)` from youngest to oldest.
    pub fn iter_by_age(&self) -> impl Iterator<Item = (usize, f64)> + '_ {
        self.areas_ha.iter().rev().copied().enumerate()
    }

    /// Mutable areas from youngest to oldest, with ages.
    pub fn iter_by_age_mut(&mut self) -> impl Iterator<Item = (usize, &mut f64)> + '_ {
        self.areas_ha.iter_mut().rev().enumerate()
    }

    /// Total infested area, ha.
    pub fn infested_ha(&self) -> f64 {
        self.areas_ha.iter().sum()
    }

    /// Area of cohorts at or past `min_age_yr`, ha.
    pub fn area_at_least_age(&self, min_age_yr: usize) -> f64 {
        let n = self.areas_ha.len();
        if min_age_yr >= n {
            return 0.0;
        }
        self.areas_ha[..n - min_age_yr].iter().sum()
    }

    /// Areas by density class, ha.
    pub fn class_areas(&self, params: &InvasionParams) -> ClassAreas {
        let mut c = ClassAreas::default();
        for (age, a) in self.iter_by_age() {
            match params.class_of(age) {
                DensityClass::Scattered => c.scattered_ha += a,
                DensityClass::Medium => c.medium_ha += a,
                DensityClass::Dense => c.dense_ha += a,
            }
        }
        c
    }

    /// ET-equivalent closed-canopy area, ha: `Σ area(a) · closure(a)`.
    ///
    /// `closure_by_age[a]` is the closure at whole age `a`; ages past the table's
    /// end take its last value.
    #[inline]
    pub fn canopy_ha(&self, closure_by_age: &[f64]) -> f64 {
        let last = closure_by_age.last().copied().unwrap_or(1.0);
        self.iter_by_age().map(|(age, a)| a * closure_by_age.get(age).copied().unwrap_or(last)).sum()
    }

    /// One year of ageing and spread; returns the new infestation, ha.
    ///
    /// `vulnerable_ha` is the area that can carry the invader (including what is
    /// already infested).
    pub fn step(&mut self, params: &InvasionParams, vulnerable_ha: f64) -> f64 {
        self.step_with(params, vulnerable_ha, 0.0).0
    }

    /// One year of ageing and spread plus `extra_ha` of re-establishment (regrowth
    /// after control) on the uninvaded vulnerable area `F = max(V − I, 0)`.
    ///
    /// The re-establishment takes the free area first (it comes up on land just
    /// cleared), `X' = min(X, F)`; spread takes what is left, `ΔI' = min(ΔI, F − X')`.
    /// Both join the new age-0 cohort; returns `(ΔI', X')`, ha, so that each part is
    /// reported once and as it established.
    pub fn step_with(&mut self, params: &InvasionParams, vulnerable_ha: f64, extra_ha: f64) -> (f64, f64) {
        let seed_ha = self.area_at_least_age(params.seed_bearing_age_yr as usize);
        let infested = self.infested_ha();
        let spread_ha = new_infestation_ha(params.spread_rate_per_yr, seed_ha, params.seed_rain_ha_per_yr, infested, vulnerable_ha);
        let free_ha = (vulnerable_ha - infested).max(0.0);
        let extra = extra_ha.max(0.0).min(free_ha);
        let spread = spread_ha.min(free_ha - extra).max(0.0);
        self.areas_ha.push(spread + extra);
        (spread, extra)
    }

    /// Cohort areas from oldest to youngest, ha.
    #[inline]
    pub fn areas_oldest_first(&self) -> &[f64] {
        &self.areas_ha
    }

    /// Ages every cohort by one year and adds a new age-0 cohort of `new_ha`
    /// (the caller has already capped it at the free vulnerable area).
    #[inline]
    pub fn push_new(&mut self, new_ha: f64) {
        self.areas_ha.push(new_ha);
    }

    /// Removes up to `ha` from the cohort of age `age_yr`; returns the area removed.
    pub fn remove_at_age(&mut self, age_yr: usize, ha: f64) -> f64 {
        let n = self.areas_ha.len();
        if age_yr >= n || !(ha > 0.0) {
            return 0.0;
        }
        let slot = &mut self.areas_ha[n - 1 - age_yr];
        let removed = ha.min(*slot);
        *slot -= removed;
        if *slot < 1e-12 {
            *slot = 0.0;
        }
        removed
    }
}

/// New infestation in one year, ha: `min((r·S + R)(1 − I/V), V − I)`.
#[inline]
pub fn new_infestation_ha(
    spread_rate_per_yr: f64,
    seed_bearing_ha: f64,
    seed_rain_ha_per_yr: f64,
    infested_ha: f64,
    vulnerable_ha: f64,
) -> f64 {
    if !(vulnerable_ha > 0.0) {
        return 0.0;
    }
    let free_ha = (vulnerable_ha - infested_ha).max(0.0);
    let pressure_ha = spread_rate_per_yr * seed_bearing_ha + seed_rain_ha_per_yr;
    (pressure_ha * free_ha / vulnerable_ha).clamp(0.0, free_ha)
}

/// Why an areal growth rate and a spread rate could not be converted into each other.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SpreadRateError {
    /// The areal growth rate is not a finite number above zero.
    GrowthNotPositive(f64),
    /// The spread rate is not a finite number at or above zero.
    RateNegative(f64),
    /// The result is too large to represent (growth and seed-bearing age both very large).
    Overflow {
        /// Areal growth rate given, 1/yr.
        growth_per_yr: f64,
        /// Seed-bearing age given, years.
        seed_bearing_age_yr: u32,
    },
    /// The root finder failed (not expected for valid inputs).
    Root(RootError),
}

impl fmt::Display for SpreadRateError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SpreadRateError::GrowthNotPositive(g) => write!(
                f,
                "areal growth rate {g} per year is not allowed: it must be a finite number above 0 (e.g. 0.06 for 6 %/yr compounding)"
            ),
            SpreadRateError::RateNegative(r) => {
                write!(f, "spread rate {r} per year is not allowed: it must be a finite number at or above 0")
            }
            SpreadRateError::Overflow { growth_per_yr, seed_bearing_age_yr } => write!(
                f,
                "areal growth {growth_per_yr} per year with seed-bearing age {seed_bearing_age_yr} years needs a spread rate too large to represent"
            ),
            SpreadRateError::Root(e) => write!(f, "growth rate could not be solved for: {e}"),
        }
    }
}

impl std::error::Error for SpreadRateError {}

/// Spread rate per seed-bearing area `r` (1/yr) at which the unconstrained cohort
/// model ([`Cohorts::step`], no seed rain, `I ≪ V`) grows in area at exactly
/// `areal_growth_per_yr` = `g` asymptotically: `r = g·(1 + g)^a_seed` (module header).
///
/// `g` is what users observe (e.g. 0.06 for 6 %/yr compounding). Refuses `g ≤ 0` and
/// non-finite `g`. The caller checks the result against the range it accepts for
/// `spread_rate_per_yr` (the result exceeds 1 for large `g·(1 + g)^a_seed`).
pub fn spread_rate_for_areal_growth(areal_growth_per_yr: f64, seed_bearing_age_yr: u32) -> Result<f64, SpreadRateError> {
    let g = areal_growth_per_yr;
    if !(g.is_finite() && g > 0.0) {
        return Err(SpreadRateError::GrowthNotPositive(g));
    }
    let r = g * (f64::from(seed_bearing_age_yr) * g.ln_1p()).exp();
    if r.is_finite() {
        Ok(r)
    } else {
        Err(SpreadRateError::Overflow { growth_per_yr: g, seed_bearing_age_yr })
    }
}

/// Asymptotic areal growth rate `g` (1/yr) of the unconstrained cohort model with
/// spread rate `r` = `spread_rate_per_yr` and seed-bearing age `a_seed`: the root of
/// `ln g + a_seed·ln(1 + g) = ln r`, found by Brent's method in `u = ln g` (the left
/// side rises strictly with `g`, so the root is unique). `r = 0` gives 0.
pub fn areal_growth_for_spread_rate(spread_rate_per_yr: f64, seed_bearing_age_yr: u32) -> Result<f64, SpreadRateError> {
    let r = spread_rate_per_yr;
    if !(r.is_finite() && r >= 0.0) {
        return Err(SpreadRateError::RateNegative(r));
    }
    if r == 0.0 {
        return Ok(0.0);
    }
    let a = f64::from(seed_bearing_age_yr);
    if seed_bearing_age_yr == 0 {
        return Ok(r);
    }
    // Solve in u = ln g: f(u) = u + a·ln(1 + e^u) − ln r rises strictly with u.
    // f(ln r) = a·ln(1 + r) ≥ 0; since ln(1 + e^u) ≤ max(u, 0) + ln 2, f(u_lo) ≤ 0 at
    // u_lo = b for b = ln r − a·ln 2 ≤ 0, and at u_lo = b/(1 + a) for b > 0.
    let ln_r = r.ln();
    let f = |u: f64| u + a * u.exp().ln_1p() - ln_r;
    let b = ln_r - a * std::f64::consts::LN_2;
    let u_lo = if b <= 0.0 { b } else { b / (1.0 + a) };
    let sol = brent_root(f, u_lo, ln_r, 1e-15).map_err(SpreadRateError::Root)?;
    Ok(sol.x.exp())
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::{assert_abs_diff_eq, assert_relative_eq};

    fn params() -> InvasionParams {
        InvasionParams {
            spread_rate_per_yr: 0.06,
            seed_bearing_age_yr: 8,
            seed_rain_ha_per_yr: 0.0,
            medium_age_yr: 10,
            dense_age_yr: 20,
            initial_dense_span_yr: 10,
            closure: ClosureCurve::Logistic { half_closure_age_yr: 12.0, steepness_per_yr: 0.4, max_fraction: 1.0 },
        }
    }

    #[test]
    fn dated_stands_keep_their_ages() {
        let p = params();
        let c = Cohorts::from_ages(&[0.0, 0.0, 5.0, 0.0, 7.0]);
        assert_eq!(c.oldest_age_yr(), 4);
        assert_eq!(c.area_at_age(2), 5.0);
        assert_eq!(c.area_at_age(4), 7.0);
        assert_eq!(c.infested_ha(), 12.0);
        // Ages 2 and 4 are scattered with medium_age_yr = 10.
        assert_eq!(c.class_areas(&p).scattered_ha, 12.0);
        assert_eq!(Cohorts::from_ages(&[]), Cohorts::empty());
        assert_eq!(Cohorts::from_ages(&[f64::NAN, -3.0]).infested_ha(), 0.0);
    }

    #[test]
    fn starting_areas_land_in_their_classes() {
        let p = params();
        let start = ClassAreas { scattered_ha: 100.0, medium_ha: 50.0, dense_ha: 30.0 };
        let c = Cohorts::from_classes(&p, start);
        let got = c.class_areas(&p);
        assert!((got.scattered_ha - 100.0).abs() < 1e-9);
        assert!((got.medium_ha - 50.0).abs() < 1e-9);
        assert!((got.dense_ha - 30.0).abs() < 1e-9);
        assert_eq!(c.oldest_age_yr(), 29);
    }

    /// Infested area after each of `years` unconstrained steps (huge vulnerable area,
    /// no seed rain), starting from `start`.
    fn simulate(p: &InvasionParams, start: ClassAreas, years: usize) -> Vec<f64> {
        let mut c = Cohorts::from_classes(p, start);
        let mut out = vec![c.infested_ha()];
        for _ in 0..years {
            c.step(p, 1e40);
            out.push(c.infested_ha());
        }
        out
    }

    #[test]
    fn observed_six_percent_is_reproduced_by_the_real_cohort_step() {
        // Source: SCIENCE.md §5 (common practice: unchecked infestations grow about
        // 6 %/yr compounding in area; doubling time ln 2 / ln 1.06 = 11.9 years, derived).
        let r = spread_rate_for_areal_growth(0.06, 8).unwrap();
        // Derived (module header): r = 0.06 × 1.06^8 = 0.095631. SCIENCE.md §5 states
        // "about r ≈ 0.096 is needed for 6 %/yr" [derived by an independent check]: agrees.
        assert_abs_diff_eq!(r, 0.06 * 1.06f64.powi(8), epsilon = 1e-15);
        assert_abs_diff_eq!(r, 0.096, epsilon = 5e-4);
        let p = InvasionParams { spread_rate_per_yr: r, seed_rain_ha_per_yr: 0.0, ..params() };
        let start = ClassAreas { scattered_ha: 120.0, medium_ha: 40.0, dense_ha: 15.0 };
        let area = simulate(&p, start, 400);
        // Year-on-year growth over the last 50 years settles at 6.0 ± 0.1 %/yr ...
        for t in 350..400 {
            let g = area[t + 1] / area[t] - 1.0;
            assert_abs_diff_eq!(g, 0.06, epsilon = 1e-3);
            // ... and in fact equals it to rounding (the model's exact asymptotic rate).
            assert_abs_diff_eq!(g, 0.06, epsilon = 1e-9);
        }
        // Doubling time measured on the simulated series: 50·ln 2 / ln(I_400 / I_350).
        let doubling_yr = 50.0 * std::f64::consts::LN_2 / (area[400] / area[350]).ln();
        assert_abs_diff_eq!(doubling_yr, 11.8957, epsilon = 1e-3);
        assert_abs_diff_eq!(doubling_yr, std::f64::consts::LN_2 / 1.06f64.ln(), epsilon = 1e-6);
        // The counter-check that the timing matters: r from the same-year-age reading
        // (lags ≥ a_seed, r = 0.06 × 1.06^7 = 0.0902) grows at only ≈ 5.8 %/yr here.
        let p_wrong = InvasionParams { spread_rate_per_yr: 0.06 * 1.06f64.powi(7), ..p.clone() };
        let a = simulate(&p_wrong, start, 400);
        let g_wrong = a[400] / a[399] - 1.0;
        assert!(g_wrong < 0.059 && g_wrong > 0.056, "{g_wrong}");
    }

    #[test]
    fn entering_r_as_observed_growth_gives_the_issue_figure() {
        // Source: issue text ("~6 %/yr entered as spread_rate_per_yr gives ~4.3 %/yr at
        // the default seed-bearing age of 8 years").
        let g = areal_growth_for_spread_rate(0.06, 8).unwrap();
        assert_abs_diff_eq!(g, 0.043, epsilon = 5e-4);
        // The Brent solution satisfies the characteristic equation (λ − 1)·λ^8 = r.
        assert_abs_diff_eq!(g * (1.0 + g).powi(8), 0.06, epsilon = 1e-14);
        // And the real cohort step agrees.
        let p = InvasionParams { spread_rate_per_yr: 0.06, seed_rain_ha_per_yr: 0.0, ..params() };
        let area = simulate(&p, ClassAreas { scattered_ha: 50.0, medium_ha: 50.0, dense_ha: 50.0 }, 400);
        assert_abs_diff_eq!(area[400] / area[399] - 1.0, g, epsilon = 1e-9);
    }

    #[test]
    fn seed_bearing_from_age_zero_is_the_identity() {
        // Derived: with a_seed = 0 every infested hectare seeds, so I_{t+1} = (1 + r)·I_t
        // from the first step and r = g exactly.
        for g in [0.01, 0.06, 0.3] {
            assert_eq!(spread_rate_for_areal_growth(g, 0).unwrap(), g);
            assert_eq!(areal_growth_for_spread_rate(g, 0).unwrap(), g);
            let p = InvasionParams { spread_rate_per_yr: g, seed_bearing_age_yr: 0, seed_rain_ha_per_yr: 0.0, ..params() };
            let area = simulate(&p, ClassAreas { scattered_ha: 10.0, medium_ha: 5.0, dense_ha: 1.0 }, 30);
            for t in 0..30 {
                assert_relative_eq!(area[t + 1], (1.0 + g) * area[t], max_relative = 1e-12);
            }
        }
    }

    #[test]
    fn conversion_round_trips_over_ages_and_rates() {
        for a in [0u32, 1, 3, 8, 15, 30, 100] {
            for g in [1e-4, 0.01, 0.05, 0.06, 0.2, 0.5] {
                let r = spread_rate_for_areal_growth(g, a).unwrap();
                let back = areal_growth_for_spread_rate(r, a).unwrap();
                assert_relative_eq!(back, g, max_relative = 1e-12);
            }
        }
        assert_eq!(areal_growth_for_spread_rate(0.0, 8).unwrap(), 0.0);
    }

    #[test]
    fn bad_growth_rates_are_refused_with_the_rule() {
        for g in [0.0, -0.06, f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let e = spread_rate_for_areal_growth(g, 8).unwrap_err();
            assert!(matches!(e, SpreadRateError::GrowthNotPositive(_)));
            assert!(e.to_string().contains("must be a finite number above 0"), "{e}");
        }
        for r in [-0.1, f64::NAN, f64::INFINITY] {
            assert!(matches!(areal_growth_for_spread_rate(r, 8), Err(SpreadRateError::RateNegative(_))));
        }
        assert!(matches!(spread_rate_for_areal_growth(1e3, u32::MAX), Err(SpreadRateError::Overflow { .. })));
    }

    #[test]
    fn starting_ages_and_first_seeding_follow_the_documented_timing() {
        // Starting classes: scattered over ages 0..=9, medium 10..=19, dense 20..=29.
        let p = InvasionParams { spread_rate_per_yr: 0.5, seed_bearing_age_yr: 8, seed_rain_ha_per_yr: 0.0, ..params() };
        let c = Cohorts::from_classes(&p, ClassAreas { scattered_ha: 100.0, medium_ha: 50.0, dense_ha: 30.0 });
        for age in 0..=9 {
            assert_abs_diff_eq!(c.area_at_age(age), 10.0, epsilon = 1e-12);
        }
        for age in 10..=19 {
            assert_abs_diff_eq!(c.area_at_age(age), 5.0, epsilon = 1e-12);
        }
        for age in 20..=29 {
            assert_abs_diff_eq!(c.area_at_age(age), 3.0, epsilon = 1e-12);
        }
        assert_eq!(c.area_at_age(30), 0.0);
        // A single new cohort: it appears at age 0 and first seeds a_seed + 1 = 9 steps later.
        let mut c = Cohorts::empty();
        c.push_new(1.0);
        let mut new = Vec::new();
        for _ in 0..10 {
            new.push(c.step(&p, 1e12));
        }
        // Steps 1..=8 see the cohort at ages 0..=7 (before ageing): no seed.
        assert!(new[..8].iter().all(|&n| n == 0.0), "{new:?}");
        // Step 9 sees it at age 8: seeds r × 1 ha (× the negligible cap).
        assert_relative_eq!(new[8], 0.5, max_relative = 1e-9);
    }

    #[test]
    fn ageing_moves_area_between_classes_without_loss() {
        let p = InvasionParams { spread_rate_per_yr: 0.0, ..params() };
        let mut c = Cohorts::from_classes(&p, ClassAreas { scattered_ha: 100.0, ..Default::default() });
        for _ in 0..15 {
            c.step(&p, 1000.0);
        }
        let got = c.class_areas(&p);
        assert!((got.total_ha() - 100.0).abs() < 1e-9);
        assert!(got.medium_ha > 0.0 && got.dense_ha > 0.0);
    }
}
