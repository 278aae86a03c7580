//! Priestley–Taylor evaporation from net radiation.
//!
//! Equilibrium evaporation scaled by α = 1.26, for well-watered surfaces where the
//! aerodynamic term is not known (no wind or humidity record). Net radiation is
//! either measured or estimated with the FAO-56 radiation chain
//! ([`super::fao56::radiation_terms`]).
//!
//! # Formula
//! Priestley & Taylor (1972), in their notation `E = α Δ/(Δ + γ) · (Rn − G)/λ`:
//!
//! `ET0 = α · Δ/(Δ + γ) · 0.408 (Rn − G)`
//!
//! with `Δ` from FAO-56 eq. 13 at the mean temperature, `γ` from FAO-56 eq. 7–8
//! at the site elevation, and `0.408 = 1/λ` (FAO-56 eq. 20, λ = 2.45 MJ/kg).
//!
//! # Symbols
//! | symbol | meaning | unit | valid range here |
//! |---|---|---|---|
//! | `ET0` | evaporation from a wet, extensive surface | mm/day | about −2..15 |
//! | `α` | Priestley–Taylor coefficient | – | 1.26 (published); 1.0–1.5 sensible |
//! | `Δ` | slope of the saturation vapour-pressure curve at T | kPa/°C | |
//! | `γ` | psychrometric constant | kPa/°C | |
//! | `Rn` | net radiation | MJ m⁻² day⁻¹ | −10..=40 |
//! | `G` | soil heat flux | MJ m⁻² day⁻¹ | 0 for days |
//! | `T` | mean air temperature | °C | −60..=60 |
//! | `λ` | latent heat of vaporisation, 2.45 | MJ/kg | |
//!
//! # Assumptions
//! * λ is FAO-56's constant 2.45 MJ/kg rather than a temperature-dependent value,
//!   so that the three methods share one energy-to-water conversion.
//! * When net radiation is estimated, the FAO-56 grass albedo (0.23) and eq. 39 for
//!   longwave loss are used, and `T = (Tmax + Tmin)/2`.
//! * Negative results (net radiation below G: condensation) are returned as computed;
//!   values to be used or summed go through [`super::non_negative_et0`] /
//!   [`super::Et0Total`], which set them to zero and count them.
//!
//! # References
//! Priestley, C. H. B., & Taylor, R. J. (1972). On the assessment of surface heat
//! flux and evaporation using large-scale parameters. *Monthly Weather Review*,
//! 100(2), 81–92. doi:10.1175/1520-0493(1972)100<0081:OTAOSH>2.3.CO;2
//!
//! Allen, R. G., Pereira, L. S., Raes, D., & Smith, M. (1998). *Crop
//! evapotranspiration — Guidelines for computing crop water requirements.* FAO
//! Irrigation and Drainage Paper 56. FAO, Rome. ISBN 92-5-104219-5 (eq. 7, 8, 13,
//! 20 and the radiation chain eq. 21–40).

use super::fao56::{
    atmospheric_pressure_kpa, mean_temperature_c, psychrometric_constant_kpa_per_c, radiation_terms, slope_vapour_pressure_curve_kpa_per_c,
    Humidity, RadiationTerms, Solar, MM_PER_DAY_PER_MJ_M2_DAY,
};
use super::Site;

/// Priestley–Taylor coefficient α, dimensionless (Priestley & Taylor 1972).
pub const ALPHA: f64 = 1.26;

/// Priestley–Taylor evaporation, mm/day, from its terms: `delta` and `gamma` in
/// kPa/°C, `rn` and `g` in MJ m⁻² day⁻¹, `alpha` dimensionless.
pub fn et0_priestley_taylor_mm_per_day(delta_kpa_per_c: f64, gamma_kpa_per_c: f64, rn_mj_m2_day: f64, g_mj_m2_day: f64, alpha: f64) -> f64 {
    alpha * delta_kpa_per_c / (delta_kpa_per_c + gamma_kpa_per_c) * MM_PER_DAY_PER_MJ_M2_DAY * (rn_mj_m2_day - g_mj_m2_day)
}

/// Where the net radiation of a period comes from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum NetRadiation {
    /// Measured net radiation.
    Measured {
        /// Mean air temperature for Δ, °C.
        t_mean_c: f64,
        /// Net radiation, MJ m⁻² day⁻¹.
        rn_mj_m2_day: f64,
    },
    /// Estimated with the FAO-56 radiation chain (eq. 21–40).
    Estimated {
        /// Day of the year `J` (for a month, its 15th).
        day_of_year: u32,
        /// Maximum air temperature, °C.
        tmax_c: f64,
        /// Minimum air temperature, °C.
        tmin_c: f64,
        /// Humidity observation (for the longwave term).
        humidity: Humidity,
        /// Sunshine hours or measured solar radiation.
        solar: Solar,
    },
}

/// The terms of one Priestley–Taylor evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PriestleyTaylorTerms {
    /// Psychrometric constant `γ`, kPa/°C.
    pub gamma_kpa_per_c: f64,
    /// Mean temperature `T`, °C.
    pub t_mean_c: f64,
    /// Slope of the vapour-pressure curve `Δ`, kPa/°C.
    pub delta_kpa_per_c: f64,
    /// Net radiation used, MJ m⁻² day⁻¹.
    pub rn_mj_m2_day: f64,
    /// The radiation chain, when Rn was estimated.
    pub radiation: Option<RadiationTerms>,
    /// Soil heat flux `G`, MJ m⁻² day⁻¹.
    pub g_mj_m2_day: f64,
    /// Evaporation, mm/day.
    pub et0_mm_per_day: f64,
}

/// Priestley–Taylor evaporation (α = [`ALPHA`]) for one day or month at `site`,
/// with soil heat flux `g_mj_m2_day` (0 for days).
pub fn priestley_taylor(site: &Site, net_radiation: &NetRadiation, g_mj_m2_day: f64) -> PriestleyTaylorTerms {
    let gamma = psychrometric_constant_kpa_per_c(atmospheric_pressure_kpa(site.elevation_m()));
    let (t_mean_c, rn, radiation) = match *net_radiation {
        NetRadiation::Measured { t_mean_c, rn_mj_m2_day } => (t_mean_c, rn_mj_m2_day, None),
        NetRadiation::Estimated { day_of_year, tmax_c, tmin_c, humidity, solar } => {
            let ea = humidity.actual_vapour_pressure_kpa(tmax_c, tmin_c);
            let terms = radiation_terms(site, day_of_year, solar, tmax_c, tmin_c, ea);
            (mean_temperature_c(tmax_c, tmin_c), terms.rn_mj_m2_day, Some(terms))
        }
    };
    let delta = slope_vapour_pressure_curve_kpa_per_c(t_mean_c);
    PriestleyTaylorTerms {
        gamma_kpa_per_c: gamma,
        t_mean_c,
        delta_kpa_per_c: delta,
        rn_mj_m2_day: rn,
        radiation,
        g_mj_m2_day,
        et0_mm_per_day: et0_priestley_taylor_mm_per_day(delta, gamma, rn, g_mj_m2_day, ALPHA),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::pet::Angstrom;
    use approx::assert_abs_diff_eq;

    #[test]
    fn written_out_formula() {
        // Hand computation with FAO-56 Example 18's printed terms (Δ 0.122, γ 0.0666,
        // Rn 13.28, G 0): 1.26 × 0.122/0.1886 × 0.408 × 13.28 = 1.26 × 0.646872 × 5.41824
        // = 4.4162 mm/day.
        assert_abs_diff_eq!(et0_priestley_taylor_mm_per_day(0.122, 0.0666, 13.28, 0.0, 1.26), 4.4162, epsilon = 5e-4);
    }

    #[test]
    fn measured_and_estimated_agree_when_rn_matches() {
        let site = Site::new(-45.0, 400.0, Angstrom::default()).unwrap();
        let est = priestley_taylor(
            &site,
            &NetRadiation::Estimated {
                day_of_year: 20,
                tmax_c: 24.0,
                tmin_c: 9.0,
                humidity: Humidity::RhMean { rh_mean_pct: 65.0 },
                solar: Solar::SunshineHours(8.0),
            },
            0.0,
        );
        let meas = priestley_taylor(&site, &NetRadiation::Measured { t_mean_c: 16.5, rn_mj_m2_day: est.rn_mj_m2_day }, 0.0);
        assert_abs_diff_eq!(est.et0_mm_per_day, meas.et0_mm_per_day, epsilon = 1e-12);
        assert!(est.radiation.is_some() && meas.radiation.is_none());
    }
}
