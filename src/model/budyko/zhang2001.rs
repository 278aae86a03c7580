//! Zhang, Dawes & Walker (2001) mean-annual evapotranspiration curve.
//!
//! # Formula
//! Zhang et al. (2001), eq. 8:
//!
//! `ET/P = (1 + w·E0/P) / (1 + w·E0/P + P/E0)`
//!
//! evaluated here in the algebraically identical, overflow-free form
//! `ET/P = 1 − 1 / (1 + φ + w·φ²)` with `φ = E0/P`.
//!
//! # Symbols
//! * `w` — plant-available-water coefficient, dimensionless, > 0 (published: 2.0 forest,
//!   0.5 grass/short vegetation; 0.1–5 is a sensible range).
//! * `φ = E0/P` — aridity index.
//!
//! # Assumptions
//! For `w > 1` the published curve exceeds `E0` when `φ < (w − 1)/w` (very humid
//! climates); the trait method [`WaterBalance::et_mm`] caps ET at `E0` there, as the
//! physical limit requires.
//!
//! # References
//! Zhang, L., Dawes, W. R., & Walker, G. R. (2001). Response of mean annual
//! evapotranspiration to vegetation changes at catchment scale. *Water Resources
//! Research*, 37(3), 701–708. doi:10.1029/2000WR900325

use super::WaterBalance;

/// Zhang et al. (2001) curve with plant-available-water coefficient `w`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Zhang2001 {
    /// Plant-available-water coefficient, dimensionless, > 0.
    pub w: f64,
}

impl WaterBalance for Zhang2001 {
    #[inline]
    fn evaporative_ratio(&self, phi: f64) -> f64 {
        if !(phi > 0.0) {
            return 0.0;
        }
        let denom = 1.0 + phi + self.w * phi * phi;
        let ratio = 1.0 - 1.0 / denom;
        ratio.clamp(0.0, phi.min(1.0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn equals_published_form() {
        // Source: Zhang, Dawes & Walker (2001), eq. 8, written out directly.
        for &(w, phi) in &[(2.0, 1.41), (0.5, 0.3), (0.5, 3.0), (1.0, 0.9)] {
            let direct = (1.0 + w * phi) / (1.0 + w * phi + 1.0 / phi);
            let got = Zhang2001 { w }.evaporative_ratio(phi);
            if direct <= phi {
                assert_abs_diff_eq!(got, direct, epsilon = 1e-12);
            }
        }
    }

    #[test]
    fn extreme_inputs_stay_finite() {
        let z = Zhang2001 { w: 2.0 };
        for phi in [0.0, 1e-300, 1e-12, 1e12, 1e200, f64::INFINITY] {
            let r = z.evaporative_ratio(phi);
            assert!(r.is_finite() && (0.0..=1.0).contains(&r), "phi {phi}: {r}");
        }
        assert_abs_diff_eq!(z.evaporative_ratio(1e200), 1.0, epsilon = 1e-12);
    }
}
