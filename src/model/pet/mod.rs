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
//! The module also holds the site description shared by the methods ([`Site`]) and
//! the calendar arithmetic the radiation equations need ([`day_of_year`],
//! [`mid_month_day_of_year`]).
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
    fn method_names_round_trip() {
        for m in PetMethod::ALL {
            assert_eq!(PetMethod::from_name(m.name()), Some(m));
        }
        assert_eq!(PetMethod::from_name("thornthwaite"), None);
    }
}
