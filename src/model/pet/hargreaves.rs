//! Hargreaves reference evapotranspiration from air temperature alone.
//!
//! For records with only daily (or monthly mean) maximum and minimum temperature.
//! FAO-56 offers it as an alternative when only air temperature is available and
//! advises verifying it against Penman–Monteith in the region; it tends to
//! underestimate under strong wind and overestimate under high humidity.
//!
//! # Formula
//! FAO-56 eq. 52:
//!
//! `ET0 = 0.0023 (T + 17.8) (Tmax − Tmin)^0.5 · 0.408 Ra`
//!
//! with `T = (Tmax + Tmin)/2` (eq. 9), `Ra` from FAO-56 eq. 21 (see
//! [`super::fao56::extraterrestrial_radiation_mj_m2_day`]) and `0.408` the
//! conversion of MJ m⁻² day⁻¹ to mm/day of evaporation (eq. 20).
//!
//! # Symbols
//! | symbol | meaning | unit | valid range here |
//! |---|---|---|---|
//! | `ET0` | grass reference evapotranspiration | mm/day | ≥ 0 |
//! | `Tmax`, `Tmin` | maximum, minimum air temperature | °C | −60..=60, Tmin ≤ Tmax |
//! | `T` | mean air temperature (eq. 9) | °C | |
//! | `Ra` | extraterrestrial radiation | MJ m⁻² day⁻¹ | ≥ 0 |
//! | `0.0023` | empirical coefficient of Hargreaves & Samani (1985) | – | |
//!
//! # Assumptions
//! * The formula becomes negative when `T < −17.8 °C`; yieldshift returns 0 there
//!   (no evaporative demand), since a negative value has no physical meaning in an
//!   empirical temperature formula. The rule is the crate's single non-negativity rule,
//!   [`super::non_negative_et0`]; [`et0_hargreaves_raw_mm_per_day`] gives the raw value
//!   for callers that count clamped periods.
//! * `Tmax ≥ Tmin` is required (the caller checks); a negative range is treated as 0.
//!
//! # References
//! Hargreaves, G. H., & Samani, Z. A. (1985). Reference crop evapotranspiration
//! from temperature. *Applied Engineering in Agriculture*, 1(2), 96–99.
//! doi:10.13031/2013.26773
//!
//! Allen, R. G., Pereira, L. S., Raes, D., & Smith, M. (1998). *Crop
//! evapotranspiration — Guidelines for computing crop water requirements.* FAO
//! Irrigation and Drainage Paper 56. FAO, Rome. ISBN 92-5-104219-5. Chapter 3, eq. 52.

use super::fao56::{extraterrestrial_radiation_mj_m2_day, mean_temperature_c, MM_PER_DAY_PER_MJ_M2_DAY};
use super::{non_negative_et0, Site};

/// Empirical coefficient of the Hargreaves equation (FAO-56 eq. 52), dimensionless.
pub const HARGREAVES_COEFFICIENT: f64 = 0.0023;

/// Temperature offset of the Hargreaves equation (FAO-56 eq. 52), °C.
pub const HARGREAVES_OFFSET_C: f64 = 17.8;

/// Hargreaves reference evapotranspiration as the formula gives it, mm/day (FAO-56
/// eq. 52), negative when `T < −17.8 °C`.
pub fn et0_hargreaves_raw_mm_per_day(tmax_c: f64, tmin_c: f64, ra_mj_m2_day: f64) -> f64 {
    let t_mean = mean_temperature_c(tmax_c, tmin_c);
    let range = (tmax_c - tmin_c).max(0.0);
    HARGREAVES_COEFFICIENT * (t_mean + HARGREAVES_OFFSET_C) * range.sqrt() * MM_PER_DAY_PER_MJ_M2_DAY * ra_mj_m2_day
}

/// Hargreaves reference evapotranspiration, mm/day (FAO-56 eq. 52), from the
/// temperature extremes (°C) and extraterrestrial radiation `Ra` (MJ m⁻² day⁻¹),
/// after the non-negativity rule ([`super::non_negative_et0`]).
pub fn et0_hargreaves_mm_per_day(tmax_c: f64, tmin_c: f64, ra_mj_m2_day: f64) -> f64 {
    non_negative_et0(et0_hargreaves_raw_mm_per_day(tmax_c, tmin_c, ra_mj_m2_day)).mm_per_day
}

/// The terms of one Hargreaves evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HargreavesTerms {
    /// Mean temperature `T`, °C (eq. 9).
    pub t_mean_c: f64,
    /// Extraterrestrial radiation `Ra`, MJ m⁻² day⁻¹ (eq. 21).
    pub ra_mj_m2_day: f64,
    /// Reference evapotranspiration, mm/day (eq. 52).
    pub et0_mm_per_day: f64,
}

/// Hargreaves ET0 for one day or month at `site` on day `J` (for a month, its 15th).
pub fn hargreaves(site: &Site, day_of_year: u32, tmax_c: f64, tmin_c: f64) -> HargreavesTerms {
    let ra = extraterrestrial_radiation_mj_m2_day(site.latitude_deg(), day_of_year);
    HargreavesTerms {
        t_mean_c: mean_temperature_c(tmax_c, tmin_c),
        ra_mj_m2_day: ra,
        et0_mm_per_day: et0_hargreaves_mm_per_day(tmax_c, tmin_c, ra),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn written_out_formula() {
        // Hand computation: T = 20, range 10 → 0.0023 × 37.8 × √10 × 0.408 × 30
        // = 0.08694 × 3.16228 × 12.24 = 3.3652 mm/day.
        assert_abs_diff_eq!(et0_hargreaves_mm_per_day(25.0, 15.0, 30.0), 3.3652, epsilon = 5e-4);
    }

    #[test]
    fn never_negative() {
        // Raw: 0.0023 × (−35 + 17.8) × √10 × 0.408 × 5 = −0.25520 mm/day (hand computation).
        assert_abs_diff_eq!(et0_hargreaves_raw_mm_per_day(-30.0, -40.0, 5.0), -0.25520, epsilon = 5e-5);
        assert_eq!(et0_hargreaves_mm_per_day(-30.0, -40.0, 5.0), 0.0);
        assert_eq!(et0_hargreaves_mm_per_day(10.0, 10.0, 30.0), 0.0);
        assert_eq!(et0_hargreaves_mm_per_day(10.0, 12.0, 30.0), 0.0);
    }
}
