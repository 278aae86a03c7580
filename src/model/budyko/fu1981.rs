//! Fu (1981) mean-annual evapotranspiration curve.
//!
//! # Formula
//! `ET/P = 1 + φ − (1 + φ^ω)^(1/ω)`, with `φ = E0/P` (Fu 1981; in the form of
//! Zhang et al. 2004, eq. 4).
//!
//! Evaluated in a numerically stable form (the naive form loses all precision at
//! large `φ`):
//! * `φ < 1`: `φ − expm1(ln(1 + φ^ω)/ω)`
//! * `φ ≥ 1`: `1 − φ·expm1(ln(1 + φ^(−ω))/ω)`
//!
//! # Symbols
//! * `ω` — shape parameter, dimensionless, > 1 (larger ω: more evaporation; ω ≈ 2.6
//!   follows Budyko's 1974 curve closely, Zhang et al. 2004). The scenario accepts
//!   1.01–20; 1.1–10 covers most catchments.
//! * `φ = E0/P` — aridity index, dimensionless, ≥ 0 (`+∞` allowed: ratio 1).
//!
//! # Assumptions
//! Long-term means; applied to single years it ignores storage carry-over. The
//! result is clamped to the physical limits `0 ≤ ET/P ≤ min(1, φ)`.
//!
//! # References
//! Fu, B. P. (1981). On the calculation of the evaporation from land surface.
//! *Scientia Atmospherica Sinica*, 5(1), 23–31 (in Chinese).
//! Zhang, L., Hickel, K., Dawes, W. R., Chiew, F. H. S., Western, A. W., & Briggs,
//! P. R. (2004). A rational function approach for estimating mean annual
//! evapotranspiration. *Water Resources Research*, 40, W02502. doi:10.1029/2003WR002710

use super::WaterBalance;

/// Fu (1981) curve with shape parameter `omega`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fu1981 {
    /// Shape parameter ω, dimensionless, > 1.
    pub omega: f64,
}

impl WaterBalance for Fu1981 {
    #[inline]
    fn evaporative_ratio(&self, phi: f64) -> f64 {
        if !(phi > 0.0) {
            return 0.0;
        }
        let w = self.omega;
        let ratio = if phi < 1.0 {
            phi - (phi.powf(w).ln_1p() / w).exp_m1()
        } else if phi.is_infinite() {
            1.0
        } else {
            1.0 - phi * (phi.powf(-w).ln_1p() / w).exp_m1()
        };
        ratio.clamp(0.0, phi.min(1.0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn stable_form_equals_naive_form_where_naive_is_accurate() {
        // Source: Fu (1981) as written in Zhang et al. (2004), eq. 4.
        for &omega in &[1.5, 2.6, 4.0] {
            for &phi in &[0.1f64, 0.5, 1.0, 2.0, 5.0] {
                let naive: f64 = 1.0 + phi - (1.0 + phi.powf(omega)).powf(1.0 / omega);
                assert_abs_diff_eq!(Fu1981 { omega }.evaporative_ratio(phi), naive, epsilon = 1e-12);
            }
        }
    }

    #[test]
    fn extreme_inputs_stay_finite() {
        let f = Fu1981 { omega: 2.6 };
        for phi in [0.0, 1e-300, 1e8, 1e100, 1e300, f64::INFINITY] {
            let r = f.evaporative_ratio(phi);
            assert!(r.is_finite() && (0.0..=1.0).contains(&r), "phi {phi}: {r}");
        }
    }
}
