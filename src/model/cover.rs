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
//! `a_medium ≤ a < a_dense`, dense for `a ≥ a_dense`. Starting areas are placed
//! evenly over the ages of their class: scattered over `0..a_medium`, medium over
//! `a_medium..a_dense`, dense over `a_dense..a_dense + s_dense`.
//!
//! # Symbols
//! * `r` — spread rate, 1/yr (0–1; From memory: unchecked infestations spread about
//!   0.05–0.06/yr).
//! * `S` — seed-bearing area: cohorts with age ≥ `a_seed`, ha.
//! * `R` — seed rain from outside the catchment, ha/yr, ≥ 0.
//! * `I` — infested area, ha; `V` — vulnerable area (can carry the invader), ha, `I ≤ V`.
//! * `a_seed`, `a_medium`, `a_dense` — ages in whole years; `s_dense` — age span of
//!   the starting dense area, years (≥ 1).
//!
//! # Assumptions
//! Spread is spatially implicit: any vulnerable hectare is equally likely to be
//! invaded. Removal by control stops seed production at once.
//!
//! # References
//! Common practice, no published source: compounding spread at about 5–6 %/yr is
//! the figure used in invasive-conifer management; no published source is relied on
//! here.

use super::closure::ClosureCurve;

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
        self.step_with(params, vulnerable_ha, 0.0)
    }

    /// One year of ageing and spread plus `extra_ha` of re-establishment (regrowth
    /// after control), all capped at the uninvaded vulnerable area; returns the new
    /// age-0 area, ha.
    pub fn step_with(&mut self, params: &InvasionParams, vulnerable_ha: f64, extra_ha: f64) -> f64 {
        let seed_ha = self.area_at_least_age(params.seed_bearing_age_yr as usize);
        let infested = self.infested_ha();
        let spread_ha = new_infestation_ha(params.spread_rate_per_yr, seed_ha, params.seed_rain_ha_per_yr, infested, vulnerable_ha);
        let free_ha = (vulnerable_ha - infested).max(0.0);
        let new_ha = (spread_ha + extra_ha.max(0.0)).min(free_ha);
        self.areas_ha.push(new_ha);
        new_ha
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

#[cfg(test)]
mod tests {
    use super::*;

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
