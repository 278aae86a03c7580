//! FAO-56 Penman–Monteith reference evapotranspiration and its supporting equations.
//!
//! Every equation of the daily/monthly FAO-56 calculation chain lives in this file,
//! one function each, named after the quantity and its unit. [`penman_monteith`]
//! runs the whole chain and returns every intermediate, so a result can be checked
//! line by line against the worked examples of FAO-56 Chapter 3 and 4.
//!
//! # Formula
//! Reference evapotranspiration, FAO-56 eq. 6:
//!
//! `ET0 = [0.408 Δ (Rn − G) + γ · 900/(T + 273) · u2 · (es − ea)] / [Δ + γ (1 + 0.34 u2)]`
//!
//! Supporting equations (FAO-56 equation numbers):
//! * eq. 7 — `P = 101.3 ((293 − 0.0065 z) / 293)^5.26`
//! * eq. 8 — `γ = 0.665 × 10⁻³ P`
//! * eq. 9 — `T = (Tmax + Tmin) / 2`
//! * eq. 11 — `e°(T) = 0.6108 exp(17.27 T / (T + 237.3))`
//! * eq. 12 — `es = (e°(Tmax) + e°(Tmin)) / 2`
//! * eq. 13 — `Δ = 4098 e°(T) / (T + 237.3)²`
//! * eq. 14 — `ea = e°(Tdew)`
//! * eq. 17 — `ea = [e°(Tmin) RHmax/100 + e°(Tmax) RHmin/100] / 2`
//! * eq. 18 — `ea = e°(Tmin) RHmax/100`
//! * eq. 19 — `ea = RHmean/100 · [e°(Tmax) + e°(Tmin)] / 2`
//! * eq. 48 — `ea = e°(Tmin)` (humidity data missing: Tdew ≈ Tmin)
//! * eq. 20 — radiation as equivalent evaporation: `mm/day = 0.408 × MJ m⁻² day⁻¹` (0.408 = 1/λ, λ = 2.45 MJ/kg)
//! * eq. 21 — `Ra = (24·60/π) Gsc dr [ωs sin φ sin δ + cos φ cos δ sin ωs]`
//! * eq. 22 — `φ[rad] = π/180 · φ[deg]`
//! * eq. 23 — `dr = 1 + 0.033 cos(2π J / 365)`
//! * eq. 24 — `δ = 0.409 sin(2π J / 365 − 1.39)`
//! * eq. 25 — `ωs = arccos(−tan φ tan δ)`
//! * eq. 34 — `N = 24 ωs / π`
//! * eq. 35 — `Rs = (as + bs n/N) Ra` (Ångström)
//! * eq. 36 — `Rso = (as + bs) Ra` (calibrated as, bs) or eq. 37 — `Rso = (0.75 + 2×10⁻⁵ z) Ra`
//! * eq. 38 — `Rns = (1 − α) Rs`, α = 0.23 for the grass reference
//! * eq. 39 — `Rnl = σ [(Tmax,K⁴ + Tmin,K⁴)/2] (0.34 − 0.14 √ea) (1.35 Rs/Rso − 0.35)`
//! * eq. 40 — `Rn = Rns − Rnl`
//! * eq. 42 — `G_day ≈ 0`
//! * eq. 43 — `G_month,i = 0.07 (T_month,i+1 − T_month,i−1)`
//! * eq. 44 — `G_month,i = 0.14 (T_month,i − T_month,i−1)` (next month unknown)
//! * eq. 47 — `u2 = uz · 4.87 / ln(67.8 z − 5.42)`
//!
//! # Symbols
//! | symbol | meaning | unit | valid range here |
//! |---|---|---|---|
//! | `ET0` | grass reference evapotranspiration | mm/day | result, about −1..15 |
//! | `Rn`, `Rns`, `Rnl` | net, net shortwave, net outgoing longwave radiation | MJ m⁻² day⁻¹ | |
//! | `G` | soil heat flux density | MJ m⁻² day⁻¹ | |
//! | `T`, `Tmax`, `Tmin` | mean (eq. 9), maximum, minimum air temperature at 2 m | °C | −60..=60, Tmin ≤ Tmax |
//! | `Tdew` | dew-point temperature | °C | −70..=50 |
//! | `u2`, `uz` | wind speed at 2 m, at measurement height z | m/s | 0..=60 |
//! | `z` (wind) | wind measurement height above ground | m | 0.5..=100 |
//! | `es`, `ea` | saturation, actual vapour pressure | kPa | ea in 0..=10 |
//! | `RHmax`, `RHmin`, `RHmean` | relative humidity | % | 0..=100 |
//! | `Δ` | slope of the saturation vapour-pressure curve at T | kPa/°C | |
//! | `γ` | psychrometric constant | kPa/°C | |
//! | `P` | atmospheric pressure | kPa | |
//! | `z` (site) | elevation above sea level | m | −500..=9000 |
//! | `φ` | latitude, south negative | rad (deg in the API) | −90..=90° |
//! | `J` | day of the year | – | 1..=366 |
//! | `dr`, `δ`, `ωs` | inverse relative Earth–Sun distance, solar declination, sunset hour angle | –, rad, rad | |
//! | `Ra`, `Rs`, `Rso` | extraterrestrial, solar (shortwave), clear-sky radiation | MJ m⁻² day⁻¹ | Rs in 0..=Ra |
//! | `n`, `N` | actual sunshine duration, maximum possible (daylight) hours | h | 0..=N |
//! | `as`, `bs` | Ångström coefficients | – | 0.25, 0.50 unless calibrated |
//! | `Gsc` | solar constant, 0.0820 | MJ m⁻² min⁻¹ | |
//! | `σ` | Stefan–Boltzmann constant, 4.903×10⁻⁹ | MJ K⁻⁴ m⁻² day⁻¹ | |
//! | `α` | albedo of the grass reference, 0.23 | – | |
//!
//! # Assumptions
//! * The reference surface is FAO-56's hypothetical grass: height 0.12 m, surface
//!   resistance 70 s/m, albedo 0.23 (the constants 900 and 0.34 of eq. 6 encode it).
//! * `T` in eq. 6 and `Δ` is the mean of Tmax and Tmin (eq. 9), as FAO-56 requires
//!   for 24-hour periods, not a mean of hourly readings.
//! * Humidity is taken from the best data present, in FAO-56's order of preference
//!   (Chapter 3): actual vapour pressure as given, dew point (eq. 14), RHmax and
//!   RHmin (eq. 17), RHmax alone (eq. 18), RHmean (eq. 19), and finally Tmin as the
//!   dew point (eq. 48, Chapter 3 "missing humidity data", with no aridity
//!   correction Ko). See [`Humidity::from_best_available`].
//! * Rso uses eq. 37 when the Ångström coefficients are FAO-56's defaults (0.25,
//!   0.50) and eq. 36 (`(as + bs) Ra`) when calibrated values are given.
//! * `Rs/Rso` in eq. 39 is capped at 1.0, as FAO-56 requires. When `Rso = 0` (polar
//!   night) the ratio is undefined; yieldshift then takes `Rs/Rso = 1`
//!   (clear-sky longwave loss); FAO-56 does not treat this case.
//! * For latitudes where the sun does not rise or set, the argument of eq. 25 is
//!   clamped to −1..=1 (ωs = π: midnight sun; ωs = 0: polar night).
//! * Daily `G` is 0 (eq. 42). Monthly `G` uses eq. 43 when the previous and next
//!   month's mean temperatures are known and eq. 44 when only the previous one is.
//!   When only the next month is known yieldshift uses the forward difference
//!   `0.14 (T_month,i+1 − T_month,i)` (not in FAO-56; an assumption of this crate,
//!   analogous to eq. 44). With neither neighbour known, `G = 0`.
//! * Eq. 47 is applied only when the wind was measured at a height other than 2 m
//!   (at exactly 2 m the eq. 47 factor is 1.0002, and the measured value is used as is).
//! * No lower limit is imposed on u2. Negative ET0 (net radiation below G, net
//!   condensation) is returned as computed, with every term, so that a result can be
//!   checked line by line; values to be used or summed go through the crate's single
//!   non-negativity rule, [`super::non_negative_et0`] / [`super::Et0Total`], which sets
//!   them to zero and counts them.
//!
//! # References
//! Allen, R. G., Pereira, L. S., Raes, D., & Smith, M. (1998). *Crop
//! evapotranspiration — Guidelines for computing crop water requirements.* FAO
//! Irrigation and Drainage Paper 56. Food and Agriculture Organization of the United
//! Nations, Rome. ISBN 92-5-104219-5. Chapter 2 (eq. 6), Chapter 3 (eq. 7–48),
//! Chapter 4 (Examples 17 and 18).

use super::Site;
use std::f64::consts::PI;

/// Solar constant `Gsc`, MJ m⁻² min⁻¹ (FAO-56, eq. 21).
pub const SOLAR_CONSTANT_MJ_M2_MIN: f64 = 0.0820;

/// Stefan–Boltzmann constant `σ` on a daily basis, MJ K⁻⁴ m⁻² day⁻¹ (FAO-56, eq. 39).
pub const STEFAN_BOLTZMANN_MJ_K4_M2_DAY: f64 = 4.903e-9;

/// Latent heat of vaporisation `λ` used throughout FAO-56, MJ/kg (value at about 20 °C).
pub const LATENT_HEAT_MJ_PER_KG: f64 = 2.45;

/// `1/λ`: converts an energy flux in MJ m⁻² day⁻¹ into mm/day of evaporation (FAO-56 eq. 20).
pub const MM_PER_DAY_PER_MJ_M2_DAY: f64 = 0.408;

/// Albedo of the grass reference surface, dimensionless (FAO-56 eq. 38).
pub const REFERENCE_ALBEDO: f64 = 0.23;

/// Conversion from °C to K used in FAO-56 eq. 39.
const KELVIN_OFFSET_EQ39: f64 = 273.16;

/// Ångström–Prescott coefficients for solar radiation from sunshine hours (FAO-56 eq. 35).
///
/// `Rs = (a_s + b_s n/N) Ra`: `a_s` is the fraction of `Ra` reaching the ground on
/// overcast days (n = 0), `a_s + b_s` the fraction on clear days (n = N).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Angstrom {
    /// Regression constant `a_s`, dimensionless, 0..1. FAO-56 default 0.25.
    pub a_s: f64,
    /// Regression constant `b_s`, dimensionless, 0..1. FAO-56 default 0.50.
    pub b_s: f64,
}

impl Angstrom {
    /// FAO-56's values where no calibration is available: `a_s = 0.25`, `b_s = 0.50`.
    pub const FAO56_DEFAULT: Angstrom = Angstrom { a_s: 0.25, b_s: 0.50 };

    /// True when these are FAO-56's uncalibrated defaults (then Rso uses eq. 37).
    pub fn is_fao56_default(&self) -> bool {
        *self == Angstrom::FAO56_DEFAULT
    }
}

impl Default for Angstrom {
    fn default() -> Self {
        Angstrom::FAO56_DEFAULT
    }
}

/// The humidity observation available for a period, best first (FAO-56 Chapter 3).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Humidity {
    /// Actual vapour pressure given directly, kPa.
    VapourPressure {
        /// Actual vapour pressure, kPa, 0..=10.
        ea_kpa: f64,
    },
    /// Dew-point temperature (eq. 14).
    DewPoint {
        /// Dew point, °C.
        dewpoint_c: f64,
    },
    /// Daily maximum and minimum relative humidity (eq. 17).
    RhMaxMin {
        /// Maximum relative humidity, %, 0..=100.
        rh_max_pct: f64,
        /// Minimum relative humidity, %, 0..=100, ≤ `rh_max_pct`.
        rh_min_pct: f64,
    },
    /// Maximum relative humidity only (eq. 18).
    RhMax {
        /// Maximum relative humidity, %, 0..=100.
        rh_max_pct: f64,
    },
    /// Mean relative humidity (eq. 19).
    RhMean {
        /// Mean relative humidity, %, 0..=100.
        rh_mean_pct: f64,
    },
    /// No humidity data: the dew point is taken as Tmin (eq. 48).
    TminAsDewPoint,
}

impl Humidity {
    /// Picks the best humidity observation present, in FAO-56's order of
    /// preference: `ea` given, dew point, RHmax with RHmin, RHmax alone, RHmean,
    /// and Tmin as the dew point when nothing else is present.
    pub fn from_best_available(
        ea_kpa: Option<f64>,
        dewpoint_c: Option<f64>,
        rh_max_pct: Option<f64>,
        rh_min_pct: Option<f64>,
        rh_mean_pct: Option<f64>,
    ) -> Humidity {
        if let Some(ea_kpa) = ea_kpa {
            Humidity::VapourPressure { ea_kpa }
        } else if let Some(dewpoint_c) = dewpoint_c {
            Humidity::DewPoint { dewpoint_c }
        } else if let (Some(rh_max_pct), Some(rh_min_pct)) = (rh_max_pct, rh_min_pct) {
            Humidity::RhMaxMin { rh_max_pct, rh_min_pct }
        } else if let Some(rh_max_pct) = rh_max_pct {
            Humidity::RhMax { rh_max_pct }
        } else if let Some(rh_mean_pct) = rh_mean_pct {
            Humidity::RhMean { rh_mean_pct }
        } else {
            Humidity::TminAsDewPoint
        }
    }

    /// Actual vapour pressure `ea`, kPa, from this observation and the day's
    /// temperature extremes (°C), by FAO-56 eq. 14, 17, 18, 19 or 48.
    pub fn actual_vapour_pressure_kpa(&self, tmax_c: f64, tmin_c: f64) -> f64 {
        match *self {
            Humidity::VapourPressure { ea_kpa } => ea_kpa,
            Humidity::DewPoint { dewpoint_c } => ea_from_dewpoint_kpa(dewpoint_c),
            Humidity::RhMaxMin { rh_max_pct, rh_min_pct } => ea_from_rh_max_min_kpa(tmax_c, tmin_c, rh_max_pct, rh_min_pct),
            Humidity::RhMax { rh_max_pct } => ea_from_rh_max_kpa(tmin_c, rh_max_pct),
            Humidity::RhMean { rh_mean_pct } => ea_from_rh_mean_kpa(tmax_c, tmin_c, rh_mean_pct),
            Humidity::TminAsDewPoint => ea_from_tmin_kpa(tmin_c),
        }
    }

    /// Short label naming the data used and the FAO-56 equation.
    pub fn label(&self) -> &'static str {
        match self {
            Humidity::VapourPressure { .. } => "ea_kpa as given",
            Humidity::DewPoint { .. } => "dewpoint_c (eq. 14)",
            Humidity::RhMaxMin { .. } => "rh_max_pct and rh_min_pct (eq. 17)",
            Humidity::RhMax { .. } => "rh_max_pct only (eq. 18)",
            Humidity::RhMean { .. } => "rh_mean_pct (eq. 19)",
            Humidity::TminAsDewPoint => "tmin_c as dew point (eq. 48)",
        }
    }
}

/// The shortwave observation available for a period.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Solar {
    /// Actual sunshine duration `n`, hours per day (eq. 35 gives Rs).
    SunshineHours(f64),
    /// Measured incoming solar radiation `Rs`, MJ m⁻² day⁻¹.
    MeasuredMjM2Day(f64),
}

/// Atmospheric pressure `P`, kPa, at `elevation_m` above sea level (FAO-56 eq. 7).
pub fn atmospheric_pressure_kpa(elevation_m: f64) -> f64 {
    101.3 * ((293.0 - 0.0065 * elevation_m) / 293.0).powf(5.26)
}

/// Psychrometric constant `γ`, kPa/°C, at pressure `pressure_kpa` (FAO-56 eq. 8).
pub fn psychrometric_constant_kpa_per_c(pressure_kpa: f64) -> f64 {
    0.665e-3 * pressure_kpa
}

/// Mean air temperature for the FAO-56 equations, °C: `(Tmax + Tmin)/2` (eq. 9).
pub fn mean_temperature_c(tmax_c: f64, tmin_c: f64) -> f64 {
    (tmax_c + tmin_c) / 2.0
}

/// Saturation vapour pressure `e°(T)`, kPa, at air temperature `t_c` °C (FAO-56 eq. 11).
pub fn saturation_vapour_pressure_kpa(t_c: f64) -> f64 {
    0.6108 * (17.27 * t_c / (t_c + 237.3)).exp()
}

/// Mean saturation vapour pressure `es`, kPa, for a day or month (FAO-56 eq. 12).
pub fn mean_saturation_vapour_pressure_kpa(tmax_c: f64, tmin_c: f64) -> f64 {
    (saturation_vapour_pressure_kpa(tmax_c) + saturation_vapour_pressure_kpa(tmin_c)) / 2.0
}

/// Slope of the saturation vapour-pressure curve `Δ`, kPa/°C, at `t_c` °C (FAO-56 eq. 13).
pub fn slope_vapour_pressure_curve_kpa_per_c(t_c: f64) -> f64 {
    4098.0 * saturation_vapour_pressure_kpa(t_c) / (t_c + 237.3).powi(2)
}

/// Actual vapour pressure `ea`, kPa, from the dew point `dewpoint_c` °C (FAO-56 eq. 14).
pub fn ea_from_dewpoint_kpa(dewpoint_c: f64) -> f64 {
    saturation_vapour_pressure_kpa(dewpoint_c)
}

/// Actual vapour pressure `ea`, kPa, from RHmax and RHmin (%) (FAO-56 eq. 17).
pub fn ea_from_rh_max_min_kpa(tmax_c: f64, tmin_c: f64, rh_max_pct: f64, rh_min_pct: f64) -> f64 {
    (saturation_vapour_pressure_kpa(tmin_c) * rh_max_pct / 100.0 + saturation_vapour_pressure_kpa(tmax_c) * rh_min_pct / 100.0) / 2.0
}

/// Actual vapour pressure `ea`, kPa, from RHmax (%) alone (FAO-56 eq. 18).
pub fn ea_from_rh_max_kpa(tmin_c: f64, rh_max_pct: f64) -> f64 {
    saturation_vapour_pressure_kpa(tmin_c) * rh_max_pct / 100.0
}

/// Actual vapour pressure `ea`, kPa, from RHmean (%) (FAO-56 eq. 19).
pub fn ea_from_rh_mean_kpa(tmax_c: f64, tmin_c: f64, rh_mean_pct: f64) -> f64 {
    rh_mean_pct / 100.0 * mean_saturation_vapour_pressure_kpa(tmax_c, tmin_c)
}

/// Actual vapour pressure `ea`, kPa, when no humidity data exist: `e°(Tmin)` (FAO-56 eq. 48).
pub fn ea_from_tmin_kpa(tmin_c: f64) -> f64 {
    saturation_vapour_pressure_kpa(tmin_c)
}

/// Inverse relative distance Earth–Sun `dr`, dimensionless, on day `J` (FAO-56 eq. 23).
pub fn inverse_relative_distance(day_of_year: u32) -> f64 {
    1.0 + 0.033 * (2.0 * PI * f64::from(day_of_year) / 365.0).cos()
}

/// Solar declination `δ`, rad, on day `J` (FAO-56 eq. 24).
pub fn solar_declination_rad(day_of_year: u32) -> f64 {
    0.409 * (2.0 * PI * f64::from(day_of_year) / 365.0 - 1.39).sin()
}

/// Sunset hour angle `ωs`, rad (FAO-56 eq. 25), with the argument clamped to −1..=1
/// so that polar day (ωs = π) and polar night (ωs = 0) are defined.
pub fn sunset_hour_angle_rad(latitude_rad: f64, declination_rad: f64) -> f64 {
    (-latitude_rad.tan() * declination_rad.tan()).clamp(-1.0, 1.0).acos()
}

/// Extraterrestrial radiation `Ra`, MJ m⁻² day⁻¹, at `latitude_deg` on day `J`
/// (FAO-56 eq. 21–25).
pub fn extraterrestrial_radiation_mj_m2_day(latitude_deg: f64, day_of_year: u32) -> f64 {
    let phi = latitude_deg.to_radians(); // eq. 22
    let dr = inverse_relative_distance(day_of_year);
    let delta = solar_declination_rad(day_of_year);
    let ws = sunset_hour_angle_rad(phi, delta);
    let ra = 24.0 * 60.0 / PI * SOLAR_CONSTANT_MJ_M2_MIN * dr * (ws * phi.sin() * delta.sin() + phi.cos() * delta.cos() * ws.sin());
    ra.max(0.0)
}

/// Daylight hours (maximum possible sunshine duration) `N`, h, at `latitude_deg`
/// on day `J` (FAO-56 eq. 34).
pub fn daylight_hours(latitude_deg: f64, day_of_year: u32) -> f64 {
    24.0 / PI * sunset_hour_angle_rad(latitude_deg.to_radians(), solar_declination_rad(day_of_year))
}

/// Solar radiation `Rs`, MJ m⁻² day⁻¹, from sunshine hours `n` and daylight hours `N`
/// by the Ångström formula (FAO-56 eq. 35). `n/N` is capped at 1; when `N = 0`
/// (polar night) `Rs = a_s Ra`, which is 0 since `Ra` is then 0.
pub fn solar_radiation_from_sunshine_mj_m2_day(sunshine_h: f64, daylight_h: f64, ra_mj_m2_day: f64, angstrom: Angstrom) -> f64 {
    let ratio = if daylight_h > 0.0 { (sunshine_h / daylight_h).clamp(0.0, 1.0) } else { 0.0 };
    (angstrom.a_s + angstrom.b_s * ratio) * ra_mj_m2_day
}

/// Clear-sky solar radiation `Rso`, MJ m⁻² day⁻¹: FAO-56 eq. 37 for default
/// Ångström coefficients, eq. 36 (`(a_s + b_s) Ra`) for calibrated ones.
pub fn clear_sky_radiation_mj_m2_day(ra_mj_m2_day: f64, elevation_m: f64, angstrom: Angstrom) -> f64 {
    if angstrom.is_fao56_default() {
        (0.75 + 2e-5 * elevation_m) * ra_mj_m2_day
    } else {
        (angstrom.a_s + angstrom.b_s) * ra_mj_m2_day
    }
}

/// Net shortwave radiation `Rns`, MJ m⁻² day⁻¹, for albedo `albedo` (FAO-56 eq. 38).
pub fn net_shortwave_radiation_mj_m2_day(rs_mj_m2_day: f64, albedo: f64) -> f64 {
    (1.0 - albedo) * rs_mj_m2_day
}

/// Net outgoing longwave radiation `Rnl`, MJ m⁻² day⁻¹ (FAO-56 eq. 39).
///
/// `Rs/Rso` is capped at 1.0; when `Rso ≤ 0` (polar night) it is taken as 1.
pub fn net_longwave_radiation_mj_m2_day(tmax_c: f64, tmin_c: f64, ea_kpa: f64, rs_mj_m2_day: f64, rso_mj_m2_day: f64) -> f64 {
    let tmax_k4 = (tmax_c + KELVIN_OFFSET_EQ39).powi(4);
    let tmin_k4 = (tmin_c + KELVIN_OFFSET_EQ39).powi(4);
    let relative_shortwave = if rso_mj_m2_day > 0.0 { (rs_mj_m2_day / rso_mj_m2_day).clamp(0.0, 1.0) } else { 1.0 };
    STEFAN_BOLTZMANN_MJ_K4_M2_DAY * (tmax_k4 + tmin_k4) / 2.0 * (0.34 - 0.14 * ea_kpa.max(0.0).sqrt()) * (1.35 * relative_shortwave - 0.35)
}

/// Soil heat flux `G` for a monthly period, MJ m⁻² day⁻¹, from mean monthly air
/// temperatures (°C) of the previous, this and the next month.
///
/// FAO-56 eq. 43 when both neighbours are known, eq. 44 when only the previous
/// month is; the forward difference `0.14 (T_next − T_this)` when only the next
/// month is (an assumption of this crate); 0 when neither is.
pub fn soil_heat_flux_monthly_mj_m2_day(t_prev_c: Option<f64>, t_this_c: f64, t_next_c: Option<f64>) -> f64 {
    match (t_prev_c, t_next_c) {
        (Some(prev), Some(next)) => 0.07 * (next - prev),
        (Some(prev), None) => 0.14 * (t_this_c - prev),
        (None, Some(next)) => 0.14 * (next - t_this_c),
        (None, None) => 0.0,
    }
}

/// Soil heat flux `G` for a daily period, MJ m⁻² day⁻¹: 0 (FAO-56 eq. 42).
pub fn soil_heat_flux_daily_mj_m2_day() -> f64 {
    0.0
}

/// Wind speed at 2 m, m/s, from `wind_m_per_s` measured at `height_m` above the
/// ground (FAO-56 eq. 47). A measurement at exactly 2 m is returned unchanged.
pub fn wind_speed_2m_m_per_s(wind_m_per_s: f64, height_m: f64) -> f64 {
    if height_m == 2.0 {
        wind_m_per_s
    } else {
        wind_m_per_s * 4.87 / (67.8 * height_m - 5.42).ln()
    }
}

/// FAO-56 Penman–Monteith reference evapotranspiration, mm/day (eq. 6), from its
/// terms: `delta` and `gamma` in kPa/°C, `rn` and `g` in MJ m⁻² day⁻¹, `t_mean_c`
/// in °C, `u2` in m/s, `es` and `ea` in kPa.
#[allow(clippy::too_many_arguments)]
pub fn et0_penman_monteith_mm_per_day(
    delta_kpa_per_c: f64,
    gamma_kpa_per_c: f64,
    rn_mj_m2_day: f64,
    g_mj_m2_day: f64,
    t_mean_c: f64,
    u2_m_per_s: f64,
    es_kpa: f64,
    ea_kpa: f64,
) -> f64 {
    let radiation = MM_PER_DAY_PER_MJ_M2_DAY * delta_kpa_per_c * (rn_mj_m2_day - g_mj_m2_day);
    let aerodynamic = gamma_kpa_per_c * 900.0 / (t_mean_c + 273.0) * u2_m_per_s * (es_kpa - ea_kpa);
    (radiation + aerodynamic) / (delta_kpa_per_c + gamma_kpa_per_c * (1.0 + 0.34 * u2_m_per_s))
}

/// The radiation balance of one period (FAO-56 eq. 21–40), every term in
/// MJ m⁻² day⁻¹ except daylight hours.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RadiationTerms {
    /// Extraterrestrial radiation `Ra` (eq. 21).
    pub ra_mj_m2_day: f64,
    /// Daylight hours `N`, h (eq. 34).
    pub daylight_h: f64,
    /// Incoming solar radiation `Rs` (measured or eq. 35).
    pub rs_mj_m2_day: f64,
    /// Clear-sky solar radiation `Rso` (eq. 36 or 37).
    pub rso_mj_m2_day: f64,
    /// Net shortwave radiation `Rns` (eq. 38, albedo 0.23).
    pub rns_mj_m2_day: f64,
    /// Net outgoing longwave radiation `Rnl` (eq. 39).
    pub rnl_mj_m2_day: f64,
    /// Net radiation `Rn = Rns − Rnl` (eq. 40).
    pub rn_mj_m2_day: f64,
}

/// Runs the FAO-56 radiation chain for one period at `site` on day `J`: Ra, N, Rs
/// (from sunshine or measured), Rso, Rns, Rnl and Rn.
pub fn radiation_terms(site: &Site, day_of_year: u32, solar: Solar, tmax_c: f64, tmin_c: f64, ea_kpa: f64) -> RadiationTerms {
    let ra = extraterrestrial_radiation_mj_m2_day(site.latitude_deg(), day_of_year);
    let daylight_h = daylight_hours(site.latitude_deg(), day_of_year);
    let rs = match solar {
        Solar::SunshineHours(n) => solar_radiation_from_sunshine_mj_m2_day(n, daylight_h, ra, site.angstrom()),
        Solar::MeasuredMjM2Day(rs) => rs,
    };
    let rso = clear_sky_radiation_mj_m2_day(ra, site.elevation_m(), site.angstrom());
    let rns = net_shortwave_radiation_mj_m2_day(rs, REFERENCE_ALBEDO);
    let rnl = net_longwave_radiation_mj_m2_day(tmax_c, tmin_c, ea_kpa, rs, rso);
    RadiationTerms {
        ra_mj_m2_day: ra,
        daylight_h,
        rs_mj_m2_day: rs,
        rso_mj_m2_day: rso,
        rns_mj_m2_day: rns,
        rnl_mj_m2_day: rnl,
        rn_mj_m2_day: rns - rnl,
    }
}

/// The weather of one day or one month, as the Penman–Monteith chain needs it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PenmanMonteithInput {
    /// Day of the year `J` (for a month, its 15th: see [`super::mid_month_day_of_year`]).
    pub day_of_year: u32,
    /// Maximum air temperature, °C (daily maximum, or monthly mean of daily maxima).
    pub tmax_c: f64,
    /// Minimum air temperature, °C.
    pub tmin_c: f64,
    /// Humidity observation.
    pub humidity: Humidity,
    /// Wind speed at 2 m, m/s (use [`wind_speed_2m_m_per_s`] for other heights).
    pub u2_m_per_s: f64,
    /// Sunshine hours or measured solar radiation.
    pub solar: Solar,
    /// Soil heat flux `G`, MJ m⁻² day⁻¹ (0 for days; eq. 43/44 for months).
    pub g_mj_m2_day: f64,
}

/// Every term of one Penman–Monteith evaluation, for checking against FAO-56.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PenmanMonteithTerms {
    /// Atmospheric pressure `P`, kPa (eq. 7).
    pub pressure_kpa: f64,
    /// Psychrometric constant `γ`, kPa/°C (eq. 8).
    pub gamma_kpa_per_c: f64,
    /// Mean temperature `T`, °C (eq. 9).
    pub t_mean_c: f64,
    /// Slope of the vapour-pressure curve `Δ`, kPa/°C (eq. 13).
    pub delta_kpa_per_c: f64,
    /// Saturation vapour pressure `es`, kPa (eq. 12).
    pub es_kpa: f64,
    /// Actual vapour pressure `ea`, kPa.
    pub ea_kpa: f64,
    /// Radiation balance.
    pub radiation: RadiationTerms,
    /// Soil heat flux `G`, MJ m⁻² day⁻¹.
    pub g_mj_m2_day: f64,
    /// Wind speed at 2 m, m/s.
    pub u2_m_per_s: f64,
    /// Reference evapotranspiration `ET0`, mm/day (eq. 6).
    pub et0_mm_per_day: f64,
}

/// Runs the full FAO-56 Penman–Monteith chain for one day or month at `site`.
pub fn penman_monteith(site: &Site, input: &PenmanMonteithInput) -> PenmanMonteithTerms {
    let pressure_kpa = atmospheric_pressure_kpa(site.elevation_m());
    let gamma = psychrometric_constant_kpa_per_c(pressure_kpa);
    let t_mean_c = mean_temperature_c(input.tmax_c, input.tmin_c);
    let delta = slope_vapour_pressure_curve_kpa_per_c(t_mean_c);
    let es = mean_saturation_vapour_pressure_kpa(input.tmax_c, input.tmin_c);
    let ea = input.humidity.actual_vapour_pressure_kpa(input.tmax_c, input.tmin_c);
    let radiation = radiation_terms(site, input.day_of_year, input.solar, input.tmax_c, input.tmin_c, ea);
    let et0 = et0_penman_monteith_mm_per_day(delta, gamma, radiation.rn_mj_m2_day, input.g_mj_m2_day, t_mean_c, input.u2_m_per_s, es, ea);
    PenmanMonteithTerms {
        pressure_kpa,
        gamma_kpa_per_c: gamma,
        t_mean_c,
        delta_kpa_per_c: delta,
        es_kpa: es,
        ea_kpa: ea,
        radiation,
        g_mj_m2_day: input.g_mj_m2_day,
        u2_m_per_s: input.u2_m_per_s,
        et0_mm_per_day: et0,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn published_single_equation_examples() {
        // From memory: Allen et al. 1998, FAO-56, Example 2 (z = 1800 m: P = 81.8 kPa, γ = 0.054 kPa/°C).
        let p = atmospheric_pressure_kpa(1800.0);
        assert_abs_diff_eq!(p, 81.8, epsilon = 0.05);
        assert_abs_diff_eq!(psychrometric_constant_kpa_per_c(p), 0.054, epsilon = 0.0005);
        // From memory: Allen et al. 1998, FAO-56, Example 3 (Tmax 24.5, Tmin 15 °C: es = 2.39 kPa).
        assert_abs_diff_eq!(mean_saturation_vapour_pressure_kpa(24.5, 15.0), 2.39, epsilon = 0.005);
        // From memory: Allen et al. 1998, FAO-56, Example 14 (3.2 m/s at 10 m: u2 = 2.4 m/s).
        assert_abs_diff_eq!(wind_speed_2m_m_per_s(3.2, 10.0), 2.4, epsilon = 0.05);
        // From memory: Allen et al. 1998, FAO-56, Example 9 (20°S, 3 September: N = 11.7 h).
        assert_abs_diff_eq!(daylight_hours(-20.0, 246), 11.7, epsilon = 0.05);
    }

    #[test]
    fn humidity_ranking_follows_fao56() {
        let all = Humidity::from_best_available(Some(1.0), Some(5.0), Some(90.0), Some(40.0), Some(60.0));
        assert_eq!(all, Humidity::VapourPressure { ea_kpa: 1.0 });
        let no_ea = Humidity::from_best_available(None, Some(5.0), Some(90.0), Some(40.0), Some(60.0));
        assert_eq!(no_ea, Humidity::DewPoint { dewpoint_c: 5.0 });
        let rh = Humidity::from_best_available(None, None, Some(90.0), Some(40.0), Some(60.0));
        assert_eq!(rh, Humidity::RhMaxMin { rh_max_pct: 90.0, rh_min_pct: 40.0 });
        let rh_max = Humidity::from_best_available(None, None, Some(90.0), None, Some(60.0));
        assert_eq!(rh_max, Humidity::RhMax { rh_max_pct: 90.0 });
        let rh_mean = Humidity::from_best_available(None, None, None, Some(40.0), Some(60.0));
        assert_eq!(rh_mean, Humidity::RhMean { rh_mean_pct: 60.0 });
        let none = Humidity::from_best_available(None, None, None, Some(40.0), None);
        assert_eq!(none, Humidity::TminAsDewPoint);
    }

    #[test]
    fn vapour_pressure_identities() {
        // Saturated air at the dew point Tmin: eq. 18 with 100 % equals eq. 48.
        assert_abs_diff_eq!(ea_from_rh_max_kpa(7.0, 100.0), ea_from_tmin_kpa(7.0), epsilon = 1e-12);
        // eq. 19 with 100 % equals es (eq. 12).
        assert_abs_diff_eq!(ea_from_rh_mean_kpa(25.0, 10.0, 100.0), mean_saturation_vapour_pressure_kpa(25.0, 10.0), epsilon = 1e-12);
        // Δ is the derivative of e°(T): compare with a central difference.
        let h = 1e-4;
        let numeric = (saturation_vapour_pressure_kpa(20.0 + h) - saturation_vapour_pressure_kpa(20.0 - h)) / (2.0 * h);
        assert_abs_diff_eq!(slope_vapour_pressure_curve_kpa_per_c(20.0), numeric, epsilon = 1e-3);
    }

    #[test]
    fn soil_heat_flux_cases() {
        // From memory: Allen et al. 1998, FAO-56, Example 13 (March 14.1, April 16.1, May 18.8 °C:
        // G_April = 0.33 by eq. 43, 0.28 by eq. 44).
        assert_abs_diff_eq!(soil_heat_flux_monthly_mj_m2_day(Some(14.1), 16.1, Some(18.8)), 0.33, epsilon = 0.005);
        assert_abs_diff_eq!(soil_heat_flux_monthly_mj_m2_day(Some(14.1), 16.1, None), 0.28, epsilon = 0.005);
        assert_abs_diff_eq!(soil_heat_flux_monthly_mj_m2_day(None, 16.1, Some(18.8)), 0.14 * 2.7, epsilon = 1e-12);
        assert_eq!(soil_heat_flux_monthly_mj_m2_day(None, 16.1, None), 0.0);
        assert_eq!(soil_heat_flux_daily_mj_m2_day(), 0.0);
    }

    #[test]
    fn polar_cases_stay_finite() {
        for lat in [-90.0, -80.0, 70.0, 89.9, 90.0] {
            for j in [1, 80, 172, 266, 355, 366] {
                let ra = extraterrestrial_radiation_mj_m2_day(lat, j);
                let n = daylight_hours(lat, j);
                assert!(ra.is_finite() && ra >= 0.0, "lat {lat} J {j}: Ra {ra}");
                assert!(n.is_finite() && (0.0..=24.0).contains(&n), "lat {lat} J {j}: N {n}");
                let rnl = net_longwave_radiation_mj_m2_day(-20.0, -30.0, 0.1, 0.0, 0.0);
                assert!(rnl.is_finite());
            }
        }
        // Polar night at 80°N on 21 December: no sun, no extraterrestrial radiation.
        assert_eq!(daylight_hours(80.0, 355), 0.0);
        assert_eq!(extraterrestrial_radiation_mj_m2_day(80.0, 355), 0.0);
        // Midnight sun at 80°N on 21 June.
        assert_abs_diff_eq!(daylight_hours(80.0, 172), 24.0, epsilon = 1e-12);
    }

    #[test]
    fn calibrated_angstrom_uses_eq36() {
        let cal = Angstrom { a_s: 0.2, b_s: 0.55 };
        assert_abs_diff_eq!(clear_sky_radiation_mj_m2_day(40.0, 500.0, cal), 0.75 * 40.0, epsilon = 1e-12);
        assert_abs_diff_eq!(clear_sky_radiation_mj_m2_day(40.0, 500.0, Angstrom::default()), 0.76 * 40.0, epsilon = 1e-12);
    }
}
