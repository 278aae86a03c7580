//! Canopy closure: how much of a stand's area acts, for evapotranspiration, like
//! closed forest, as a function of stand age.
//!
//! # Formula
//! Logistic form (the sigmoid response of flow reduction to stand age; a common
//! form in paired-catchment syntheses, e.g. Scott & Smith 1997):
//!
//! `L(a) = 1 / (1 + exp(−k·(a − a½)))`
//!
//! rescaled so that a new stand has no canopy and the curve tends to `c_max`:
//!
//! `closure(a) = c_max · (L(a) − L(0)) / (1 − L(0))`
//!
//! Table form: a user list of `(age, fraction)` points, interpolated linearly,
//! held at the first value before the first age and at the last value after.
//!
//! # Symbols
//! * `a` — stand age, years since establishment, ≥ 0.
//! * `a½` — half-closure age, years (scenario 0.5–200). Half of `c_max` is reached
//!   slightly after `a½` because of the rescaling (negligible when `k·a½ > 4`).
//! * `k` — steepness, 1/yr (scenario 0.01–10).
//! * `c_max` — fraction of closed-forest evapotranspiration the mature stand reaches, 0–1.
//! * Table: ages, years, strictly increasing; fractions 0–1.
//!
//! # Assumptions
//! * Closure depends on stand age only, not on site, climate or stocking; the
//!   logistic's parameters are scenario inputs, not published values.
//! * A stand acts on evapotranspiration as the fraction `closure(a)` of closed forest
//!   (the forest curve) and `1 − closure(a)` of grass; results are clamped to 0–1.
//!
//! # References
//! Scott, D. F., & Smith, R. E. (1997). Preliminary empirical models to predict
//! reductions in total and low flows resulting from afforestation. *Water SA*, 23(2), 135–140.

/// A closure curve: ET-equivalent forest fraction (0–1) as a function of stand age.
#[derive(Debug, Clone, PartialEq)]
pub enum ClosureCurve {
    /// Rescaled logistic in stand age.
    Logistic {
        /// Age at which closure is about half of `max_fraction`, years.
        half_closure_age_yr: f64,
        /// Steepness of the logistic, 1/yr.
        steepness_per_yr: f64,
        /// Closure of a mature stand, fraction 0–1.
        max_fraction: f64,
    },
    /// Piecewise-linear table of `(age_yr, fraction)`, ages strictly increasing.
    Table {
        /// Stand ages, years, strictly increasing.
        ages_yr: Vec<f64>,
        /// Closure fractions (0–1) at those ages.
        fractions: Vec<f64>,
    },
}

impl ClosureCurve {
    /// Closure fraction (0–1) at stand age `age_yr`.
    pub fn fraction_at(&self, age_yr: f64) -> f64 {
        let a = age_yr.max(0.0);
        let v = match self {
            ClosureCurve::Logistic { half_closure_age_yr, steepness_per_yr, max_fraction } => {
                let l = |x: f64| 1.0 / (1.0 + (-steepness_per_yr * (x - half_closure_age_yr)).exp());
                let l0 = l(0.0);
                if l0 >= 1.0 {
                    *max_fraction
                } else {
                    max_fraction * (l(a) - l0) / (1.0 - l0)
                }
            }
            ClosureCurve::Table { ages_yr, fractions } => interpolate(ages_yr, fractions, a),
        };
        v.clamp(0.0, 1.0)
    }

    /// Closure fractions for ages `0, 1, …, max_age_yr`, for fast lookup.
    pub fn table_by_whole_year(&self, max_age_yr: usize) -> Vec<f64> {
        (0..=max_age_yr).map(|a| self.fraction_at(a as f64)).collect()
    }
}

fn interpolate(xs: &[f64], ys: &[f64], x: f64) -> f64 {
    match xs.len() {
        0 => 0.0,
        _ if x <= xs[0] => ys[0],
        n if x >= xs[n - 1] => ys[n - 1],
        _ => {
            let i = xs.partition_point(|&v| v <= x);
            let (x0, x1, y0, y1) = (xs[i - 1], xs[i], ys[i - 1], ys[i]);
            y0 + (y1 - y0) * (x - x0) / (x1 - x0)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn logistic_starts_at_zero_and_rises_to_max() {
        let c = ClosureCurve::Logistic { half_closure_age_yr: 12.0, steepness_per_yr: 0.4, max_fraction: 0.9 };
        assert_abs_diff_eq!(c.fraction_at(0.0), 0.0, epsilon = 1e-12);
        assert!(c.fraction_at(12.0) > 0.4 && c.fraction_at(12.0) < 0.46);
        assert_abs_diff_eq!(c.fraction_at(200.0), 0.9, epsilon = 1e-9);
        let t = c.table_by_whole_year(60);
        assert!(t.windows(2).all(|w| w[1] >= w[0]));
    }

    #[test]
    fn table_interpolates_linearly_and_holds_ends() {
        let c = ClosureCurve::Table { ages_yr: vec![5.0, 15.0, 25.0], fractions: vec![0.0, 0.5, 1.0] };
        assert_abs_diff_eq!(c.fraction_at(0.0), 0.0);
        assert_abs_diff_eq!(c.fraction_at(10.0), 0.25);
        assert_abs_diff_eq!(c.fraction_at(20.0), 0.75);
        assert_abs_diff_eq!(c.fraction_at(99.0), 1.0);
    }
}
