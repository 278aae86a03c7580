//! Reference evapotranspiration (evaporative demand) from weather records.
//!
//! Three published methods, one file each, all expressed as the FAO-56 grass
//! reference evapotranspiration `ET0` in mm/day:
//!
//! * [`fao56`] — FAO-56 Penman–Monteith (Allen et al. 1998, eq. 6) with every
//!   supporting equation (vapour pressures, radiation balance, soil heat flux,
//!   wind-height adjustment). Needs temperature, humidity (or the Tmin fallback),
//!   wind and sunshine or solar radiation.
//! * [`hargreaves`] — Hargreaves & Samani (1985) as FAO-56 eq. 52. Needs only
//!   Tmax, Tmin and the site latitude.
//! * [`priestley_taylor`] — Priestley & Taylor (1972), α = 1.26, with net
//!   radiation measured or estimated through the FAO-56 radiation chain.
//!
//! The module also holds the site description shared by the methods ([`Site`]),
//! the calendar arithmetic the radiation equations need ([`day_of_year`],
//! [`mid_month_day_of_year`]) and the one rule that turns a raw ET0 into the value
//! that is used and summed ([`non_negative_et0`], [`Et0Total`]).
//!
//! # Formula
//! Non-negativity rule, applied to every period's raw ET0 of every method:
//!
//! `ET0_used = max(ET0_raw, 0)`, `clamped = (ET0_raw < 0)`
//!
//! Annual (or any period) total over periods `k` of `d_k` days:
//! `ET0_total = Σ_k d_k · ET0_used,k`; the amount the rule added is
//! `Σ_k d_k · max(−ET0_raw,k, 0)`.
//!
//! # Symbols
//! * `ET0_raw` — a method's result for one day, or one month's mean daily rate, mm/day
//!   (may be negative: Penman–Monteith and Priestley–Taylor go below zero when net
//!   radiation is negative, e.g. in high-latitude winters).
//! * `ET0_used` — the value to use and sum, mm/day, ≥ 0.
//! * `d_k` — days in period `k` (1 for a day, 28–31 for a month).
//!
//! # Assumptions
//! * A negative daily ET0 (net condensation, or net radiation below G) is evaporative
//!   demand of zero for a water balance: the deposition it represents is small and is
//!   not counted as water input. Setting negative daily ET0 to zero is common practice
//!   for FAO-56 calculations (common practice, no published source confirmed here for
//!   the exact rule). It raises annual totals slightly; [`Et0Total`] reports by how much
//!   and on how many periods, so a caller can state it.
//! * A raw value that is not a finite number is also returned as 0 with `clamped`
//!   set; inputs are range-checked by the caller, so this does not arise from valid data.
//! * [`hargreaves`] already applies this rule inside its function (through
//!   [`non_negative_et0`]); the Penman–Monteith and Priestley–Taylor functions return
//!   raw values, with every term, so that they can be checked against FAO-56 line by line.
//!
//! Everything here is a pure function of its arguments: no files, no printing.
//! Inputs are assumed to have been range-checked by the caller (the weather reader
//! in `crate::input::weather` does this and reports every bad cell); the functions
//! still return finite numbers for any finite input within the documented ranges.
//!
//! # Formula
//! The methods' equations are in their files. Defined here:
//! * Gregorian leap year: divisible by 4 and not by 100, or divisible by 400.
//! * Day of the year `J` as FAO-56 uses it: the days of the months before `month`
//!   plus `day` (1 on 1 January, 365 or 366 on 31 December).
//! * Day of a monthly record: `J` of the 15th of the month (FAO-56 Example 17
//!   evaluates April's radiation on 15 April, `J = 105`).
//!
//! # Symbols
//! | symbol | meaning | unit | valid range here |
//! |---|---|---|---|
//! | `ET0` | grass reference evapotranspiration | mm/day | usually ≥ 0; Penman–Monteith and Priestley–Taylor return net condensation as negative, Hargreaves returns 0 |
//! | latitude `φ` | site latitude, south negative | decimal degrees | −90..=90 |
//! | `z` | site elevation above sea level | m | −500..=9000 |
//! | `a_s`, `b_s` | Ångström coefficients (FAO-56 eq. 35) | – | each in (0, 1), `a_s + b_s ≤ 1`; FAO-56 default 0.25, 0.50 |
//! | `J` | day of the year | – | 1..=366 |
//!
//! # Assumptions
//! * Dates are Gregorian; the caller checks that a date exists.
//! * A monthly record's radiation terms are those of the middle of the month.
//!
//! # References
//! Allen, R. G., Pereira, L. S., Raes, D., & Smith, M. (1998). *Crop
//! evapotranspiration — Guidelines for computing crop water requirements.* FAO
//! Irrigation and Drainage Paper 56. Food and Agriculture Organization of the United
//! Nations, Rome. ISBN 92-5-104219-5.

pub mod fao56;
pub mod hargreaves;
pub mod priestley_taylor;

pub use fao56::{Angstrom, Humidity, Solar};

use std::fmt;

/// The reference-evapotranspiration methods yieldshift implements.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum PetMethod {
    /// FAO-56 Penman–Monteith, eq. 6.
    PenmanMonteith,
    /// Hargreaves (FAO-56 eq. 52), temperature only.
    Hargreaves,
    /// Priestley–Taylor (1972), α = 1.26.
    PriestleyTaylor,
}

impl PetMethod {
    /// Every method, in order of preference when the data allow it.
    pub const ALL: [PetMethod; 3] = [PetMethod::PenmanMonteith, PetMethod::PriestleyTaylor, PetMethod::Hargreaves];

    /// The name written in output files and accepted on the command line.
    pub fn name(self) -> &'static str {
        match self {
            PetMethod::PenmanMonteith => "penman-monteith",
            PetMethod::Hargreaves => "hargreaves",
            PetMethod::PriestleyTaylor => "priestley-taylor",
        }
    }

    /// The method with the given [`name`](Self::name), if any.
    pub fn from_name(name: &str) -> Option<PetMethod> {
        PetMethod::ALL.into_iter().find(|m| m.name() == name)
    }
}

impl fmt::Display for PetMethod {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Why a [`Site`] could not be built. Each message states the rule.
#[derive(Debug, Clone, PartialEq)]
pub enum SiteError {
    /// Latitude outside −90..=90 degrees or not finite.
    Latitude(f64),
    /// Elevation outside −500..=9000 m or not finite.
    Elevation(f64),
    /// Ångström coefficients outside their physical range.
    Angstrom {
        /// The rejected `a_s`.
        a_s: f64,
        /// The rejected `b_s`.
        b_s: f64,
    },
}

impl fmt::Display for SiteError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SiteError::Latitude(v) => {
                write!(f, "latitude {v} is not allowed: it must be a finite number of degrees in -90..=90 (south negative)")
            }
            SiteError::Elevation(v) => {
                write!(f, "elevation {v} m is not allowed: it must be a finite number of metres above sea level in -500..=9000")
            }
            SiteError::Angstrom { a_s, b_s } => write!(
                f,
                "Angstrom coefficients a_s = {a_s}, b_s = {b_s} are not allowed: each must be in 0..1 and a_s + b_s must be in 0..=1"
            ),
        }
    }
}

impl std::error::Error for SiteError {}

/// Where the weather was observed: what the radiation and pressure equations need.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Site {
    latitude_deg: f64,
    elevation_m: f64,
    angstrom: Angstrom,
}

impl Site {
    /// Builds a site, checking every value.
    ///
    /// * `latitude_deg` — decimal degrees, south negative, in −90..=90.
    /// * `elevation_m` — metres above sea level, in −500..=9000.
    /// * `angstrom` — Ångström coefficients (see [`Angstrom`]); each in the open
    ///   interval 0..1 with `a_s + b_s ≤ 1`.
    pub fn new(latitude_deg: f64, elevation_m: f64, angstrom: Angstrom) -> Result<Site, SiteError> {
        if !(latitude_deg.is_finite() && (-90.0..=90.0).contains(&latitude_deg)) {
            return Err(SiteError::Latitude(latitude_deg));
        }
        if !(elevation_m.is_finite() && (-500.0..=9000.0).contains(&elevation_m)) {
            return Err(SiteError::Elevation(elevation_m));
        }
        let Angstrom { a_s, b_s } = angstrom;
        let ok = a_s.is_finite() && b_s.is_finite() && a_s > 0.0 && a_s < 1.0 && b_s > 0.0 && b_s < 1.0 && a_s + b_s <= 1.0;
        if !ok {
            return Err(SiteError::Angstrom { a_s, b_s });
        }
        Ok(Site { latitude_deg, elevation_m, angstrom })
    }

    /// Latitude, decimal degrees, south negative.
    pub fn latitude_deg(&self) -> f64 {
        self.latitude_deg
    }

    /// Elevation above sea level, m.
    pub fn elevation_m(&self) -> f64 {
        self.elevation_m
    }

    /// Ångström coefficients used to turn sunshine hours into solar radiation.
    pub fn angstrom(&self) -> Angstrom {
        self.angstrom
    }
}

/// One period's ET0 after the non-negativity rule (see the module header).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NonNegativeEt0 {
    /// ET0 to use and to sum, mm/day, ≥ 0.
    pub mm_per_day: f64,
    /// True when the raw value was below zero (or not a finite number) and was set to 0.
    pub clamped: bool,
}

/// Applies the non-negativity rule to a raw ET0 (mm/day) of any method: negative
/// (and non-finite) values become 0 with `clamped = true`; other values pass unchanged.
///
/// This is the single place the rule lives. The weather reader calls it on every
/// Penman–Monteith and Priestley–Taylor result before summing (Hargreaves already
/// calls it internally).
#[inline]
pub fn non_negative_et0(raw_mm_per_day: f64) -> NonNegativeEt0 {
    if raw_mm_per_day >= 0.0 && raw_mm_per_day.is_finite() {
        NonNegativeEt0 { mm_per_day: raw_mm_per_day, clamped: false }
    } else {
        NonNegativeEt0 { mm_per_day: 0.0, clamped: true }
    }
}

/// A running total of ET0 over periods (days or months), with the periods the
/// non-negativity rule changed counted.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Et0Total {
    /// Sum of `days × ET0_used`, mm.
    pub total_mm: f64,
    /// Periods added.
    pub periods: u32,
    /// Days covered by the periods added.
    pub days: u32,
    /// Periods whose raw ET0 was below zero (or not finite) and were set to 0.
    pub clamped_periods: u32,
    /// Days covered by the clamped periods.
    pub clamped_days: u32,
    /// What the rule added to the total: `Σ days × max(−ET0_raw, 0)` over finite raw values, mm.
    pub added_by_clamp_mm: f64,
}

impl Et0Total {
    /// An empty total.
    pub fn new() -> Et0Total {
        Et0Total::default()
    }

    /// Adds one period of `days` days whose raw ET0 is `raw_mm_per_day`; returns the
    /// value used for it.
    pub fn add(&mut self, raw_mm_per_day: f64, days: u32) -> NonNegativeEt0 {
        let used = non_negative_et0(raw_mm_per_day);
        self.total_mm += used.mm_per_day * f64::from(days);
        self.periods += 1;
        self.days += days;
        if used.clamped {
            self.clamped_periods += 1;
            self.clamped_days += days;
            if raw_mm_per_day.is_finite() {
                self.added_by_clamp_mm += -raw_mm_per_day * f64::from(days);
            }
        }
        used
    }
}

/// True for Gregorian leap years.
pub fn is_leap_year(year: i32) -> bool {
    (year % 4 == 0 && year % 100 != 0) || year % 400 == 0
}

/// Number of days in `month` (1–12) of `year`; 0 for a month outside 1–12.
pub fn days_in_month(year: i32, month: u32) -> u32 {
    match month {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        2 if is_leap_year(year) => 29,
        2 => 28,
        _ => 0,
    }
}

/// Number of days in `year` (365 or 366).
pub fn days_in_year(year: i32) -> u32 {
    if is_leap_year(year) {
        366
    } else {
        365
    }
}

/// Day of the year `J` as FAO-56 uses it: 1 on 1 January, 365 or 366 on 31 December.
///
/// `month` is 1–12 and `day` 1–31; the caller checks that the date exists.
pub fn day_of_year(year: i32, month: u32, day: u32) -> u32 {
    let before: u32 = (1..month.min(13)).map(|m| days_in_month(year, m)).sum();
    before + day
}

/// Day of the year used for a monthly record: the 15th of the month.
///
/// The radiation terms of a monthly period are evaluated on the middle of the month,
/// as in FAO-56 Example 17, whose Ra = 38.06 MJ m⁻² day⁻¹ for April is the value of
/// eq. 21 on 15 April (J = 105).
pub fn mid_month_day_of_year(year: i32, month: u32) -> u32 {
    day_of_year(year, month, 15)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn day_numbers() {
        // Source: Allen et al. 1998, FAO-56, Example 8 (3 September = day 246).
        assert_eq!(day_of_year(2015, 9, 3), 246);
        // Source: Allen et al. 1998, FAO-56, Example 18 (6 July = day 187).
        assert_eq!(day_of_year(2015, 7, 6), 187);
        // Source: Allen et al. 1998, FAO-56, Example 17 (15 April = day 105).
        assert_eq!(mid_month_day_of_year(2015, 4), 105);
        assert_eq!(day_of_year(2016, 12, 31), 366);
        assert_eq!(day_of_year(2015, 12, 31), 365);
        assert_eq!(day_of_year(2000, 3, 1), 61);
        assert_eq!(day_of_year(1900, 3, 1), 60);
    }

    #[test]
    fn site_rules() {
        let a = Angstrom::default();
        assert!(Site::new(-45.0, 300.0, a).is_ok());
        assert!(Site::new(90.0, 0.0, a).is_ok());
        assert_eq!(Site::new(91.0, 0.0, a), Err(SiteError::Latitude(91.0)));
        assert!(Site::new(f64::NAN, 0.0, a).is_err());
        assert!(Site::new(0.0, f64::INFINITY, a).is_err());
        assert!(Site::new(0.0, 10_000.0, a).is_err());
        assert!(Site::new(0.0, 0.0, Angstrom { a_s: 0.6, b_s: 0.5 }).is_err());
        assert!(Site::new(0.0, 0.0, Angstrom { a_s: 0.0, b_s: 0.5 }).is_err());
        // The messages state the rule broken.
        assert_eq!(
            SiteError::Latitude(91.0).to_string(),
            "latitude 91 is not allowed: it must be a finite number of degrees in -90..=90 (south negative)"
        );
        assert!(SiteError::Elevation(1e4).to_string().contains("in -500..=9000"));
        assert!(SiteError::Angstrom { a_s: 0.6, b_s: 0.5 }.to_string().contains("a_s + b_s must be in 0..=1"));
    }

    #[test]
    fn the_rule_passes_demand_and_zeroes_the_rest() {
        // Common practice, no published source: negative daily ET0 is set to zero.
        assert_eq!(non_negative_et0(3.88), NonNegativeEt0 { mm_per_day: 3.88, clamped: false });
        assert_eq!(non_negative_et0(0.0), NonNegativeEt0 { mm_per_day: 0.0, clamped: false });
        assert_eq!(non_negative_et0(-0.59), NonNegativeEt0 { mm_per_day: 0.0, clamped: true });
        assert_eq!(non_negative_et0(-1e-12), NonNegativeEt0 { mm_per_day: 0.0, clamped: true });
        for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            assert_eq!(non_negative_et0(bad), NonNegativeEt0 { mm_per_day: 0.0, clamped: true });
        }
    }

    /// Midwinter at 64°N, sea level, 21 December (J = 355), a clear, calm-ish, saturated
    /// day: Tmax −10 °C, Tmin −15 °C, RHmean 100 %, u2 2 m/s, sunshine = daylight, G = 0.
    ///
    /// Source: hand computation with the FAO-56 equations (Allen et al. 1998), written out
    /// independently of this crate: eq. 23 dr = 1.03251; eq. 24 δ = −0.40898 rad; eq. 25
    /// ωs = 0.47640 rad; eq. 34 N = 3.6394 h; eq. 21 Ra = 0.54990 MJ m⁻² day⁻¹; eq. 35 and 37
    /// Rs = Rso = 0.41242; eq. 38 Rns = 0.31757; eq. 19 ea = es = 0.23809 kPa (so the
    /// aerodynamic term of eq. 6 is zero); eq. 39 Rnl = 6.15276; eq. 40 Rn = −5.83519;
    /// eq. 13 Δ = 0.018959 kPa/°C at T = −12.5 °C; eq. 7–8 γ = 0.067365 kPa/°C.
    /// Eq. 6: ET0 = 0.408·Δ·Rn / (Δ + γ(1 + 0.34·2)) = −0.34161 mm/day.
    /// Priestley–Taylor: 1.26·Δ/(Δ + γ)·0.408·Rn = −0.65884 mm/day.
    /// The longwave loss of a clear polar-night day exceeds the little shortwave gain, so
    /// both raw values are negative and the rule must set them to zero.
    #[test]
    fn high_latitude_winter_is_clamped_for_both_radiation_methods() {
        use super::fao56::{daylight_hours, penman_monteith, PenmanMonteithInput};
        use super::priestley_taylor::{priestley_taylor, NetRadiation};
        use approx::assert_abs_diff_eq;
        let site = Site::new(64.0, 0.0, Angstrom::default()).unwrap();
        let j = day_of_year(2021, 12, 21);
        assert_eq!(j, 355);
        let n_h = daylight_hours(64.0, j);
        assert_abs_diff_eq!(n_h, 3.6394, epsilon = 1e-3);
        let humidity = Humidity::RhMean { rh_mean_pct: 100.0 };
        let solar = Solar::SunshineHours(n_h);
        let pm = penman_monteith(
            &site,
            &PenmanMonteithInput { day_of_year: j, tmax_c: -10.0, tmin_c: -15.0, humidity, u2_m_per_s: 2.0, solar, g_mj_m2_day: 0.0 },
        );
        assert_abs_diff_eq!(pm.radiation.ra_mj_m2_day, 0.54990, epsilon = 1e-4);
        assert_abs_diff_eq!(pm.radiation.rn_mj_m2_day, -5.8352, epsilon = 1e-3);
        assert_abs_diff_eq!(pm.et0_mm_per_day, -0.34161, epsilon = 1e-4);
        let pt = priestley_taylor(&site, &NetRadiation::Estimated { day_of_year: j, tmax_c: -10.0, tmin_c: -15.0, humidity, solar }, 0.0);
        assert_abs_diff_eq!(pt.et0_mm_per_day, -0.65884, epsilon = 1e-4);
        for raw in [pm.et0_mm_per_day, pt.et0_mm_per_day] {
            assert_eq!(non_negative_et0(raw), NonNegativeEt0 { mm_per_day: 0.0, clamped: true });
        }
    }

    #[test]
    fn totals_count_clamped_periods_and_what_the_rule_added() {
        use approx::assert_abs_diff_eq;
        // Three days (2.0, −0.5, 1.0 mm/day) and one 31-day month at −0.1 mm/day.
        let mut t = Et0Total::new();
        assert_eq!(t.add(2.0, 1).mm_per_day, 2.0);
        assert!(t.add(-0.5, 1).clamped);
        t.add(1.0, 1);
        t.add(-0.1, 31);
        assert_abs_diff_eq!(t.total_mm, 3.0, epsilon = 1e-12);
        assert_eq!((t.periods, t.days, t.clamped_periods, t.clamped_days), (4, 34, 2, 32));
        // The raw sum would have been 3.0 − 0.5 − 3.1 = −0.6 mm; the rule added 3.6 mm.
        assert_abs_diff_eq!(t.added_by_clamp_mm, 3.6, epsilon = 1e-12);
        assert_abs_diff_eq!(t.total_mm - t.added_by_clamp_mm, -0.6, epsilon = 1e-12);
    }

    #[test]
    fn method_names_round_trip() {
        for m in PetMethod::ALL {
            assert_eq!(PetMethod::from_name(m.name()), Some(m));
        }
        assert_eq!(PetMethod::from_name("thornthwaite"), None);
    }
}
