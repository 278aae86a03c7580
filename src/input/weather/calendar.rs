//! Calendar arithmetic of the weather record: the periods (days and months), day
//! numbers for runs of consecutive days, and strict `YYYY-MM-DD` dates.
//!
//! Month lengths, leap years and the day of the year `J` come from
//! [`crate::model::pet`], whose radiation equations use them; they are re-exported
//! here so that this file is the weather reader's one calendar. Everything is the
//! proleptic Gregorian calendar.

use std::fmt;

pub use crate::model::pet::{day_of_year, days_in_month, days_in_year, is_leap_year, mid_month_day_of_year};

/// One period of the record.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Period {
    /// A day.
    Day {
        /// Calendar year.
        year: i32,
        /// Month, 1–12.
        month: u32,
        /// Day of the month, 1–31.
        day: u32,
    },
    /// A month.
    Month {
        /// Calendar year.
        year: i32,
        /// Month, 1–12.
        month: u32,
    },
}

impl Period {
    /// The calendar year.
    pub fn year(&self) -> i32 {
        match *self {
            Period::Day { year, .. } | Period::Month { year, .. } => year,
        }
    }

    /// Number of days the period covers.
    pub fn days(&self) -> u32 {
        match *self {
            Period::Day { .. } => 1,
            Period::Month { year, month } => days_in_month(year, month),
        }
    }

    /// Day of the year used by the radiation equations (the 15th for a month).
    pub fn day_of_year(&self) -> u32 {
        match *self {
            Period::Day { year, month, day } => day_of_year(year, month, day),
            Period::Month { year, month } => mid_month_day_of_year(year, month),
        }
    }

    /// A number that grows by one from each period to the next of its kind: days
    /// since 1970-01-01 for a day, `year × 12 + month − 1` for a month.
    pub(crate) fn key(&self) -> i64 {
        match *self {
            Period::Day { year, month, day } => days_from_civil(year, month, day),
            Period::Month { year, month } => month_index(year, month),
        }
    }

    /// The day whose [`Period::key`] is `key`.
    pub(crate) fn day_from_key(key: i64) -> Period {
        let (year, month, day) = civil_from_days(key);
        Period::Day { year, month, day }
    }

    /// The month whose [`Period::key`] is `key`.
    pub(crate) fn month_from_key(key: i64) -> Period {
        Period::Month { year: key.div_euclid(12) as i32, month: (key.rem_euclid(12) + 1) as u32 }
    }
}

impl fmt::Display for Period {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Period::Day { year, month, day } => write!(f, "{year:04}-{month:02}-{day:02}"),
            Period::Month { year, month } => write!(f, "{year:04}-{month:02}"),
        }
    }
}

/// `year × 12 + month − 1`: consecutive months get consecutive numbers.
pub(crate) fn month_index(year: i32, month: u32) -> i64 {
    i64::from(year) * 12 + i64::from(month) - 1
}

/// Days since 1970-01-01 of a proleptic Gregorian date.
pub(crate) fn days_from_civil(year: i32, month: u32, day: u32) -> i64 {
    let y = i64::from(year) - i64::from(month <= 2);
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let m = i64::from(month);
    let doy = (153 * (if m > 2 { m - 3 } else { m + 9 }) + 2) / 5 + i64::from(day) - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// Inverse of [`days_from_civil`].
pub(crate) fn civil_from_days(z: i64) -> (i32, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let day = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let month = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    let year = (yoe + era * 400 + i64::from(month <= 2)) as i32;
    (year, month, day)
}

/// Parses a strict `YYYY-MM-DD` date with a year in 1000–3000; the message of an
/// error says what is wrong and how to write the date.
pub(crate) fn parse_date(s: &str) -> Result<(i32, u32, u32), String> {
    if s.is_empty() {
        return Err("date is missing; write it as YYYY-MM-DD (for example 2021-03-05)".to_string());
    }
    let parts: Vec<&str> = s.split('-').collect();
    let shape_ok = parts.len() == 3
        && parts[0].len() == 4
        && parts[1].len() == 2
        && parts[2].len() == 2
        && parts.iter().all(|p| p.bytes().all(|b| b.is_ascii_digit()));
    if !shape_ok {
        return Err(format!("'{s}' is not a date written YYYY-MM-DD (for example 2021-03-05)"));
    }
    let (Ok(year), Ok(month), Ok(day)) = (parts[0].parse::<i32>(), parts[1].parse::<u32>(), parts[2].parse::<u32>()) else {
        return Err(format!("'{s}' is not a date written YYYY-MM-DD (for example 2021-03-05)"));
    };
    if !(1000..=3000).contains(&year) {
        return Err(format!("'{s}': year {year} is outside 1000–3000"));
    }
    if !(1..=12).contains(&month) || day == 0 || day > days_in_month(year, month) {
        return Err(format!("'{s}' is not a date that exists (YYYY-MM-DD)"));
    }
    Ok((year, month, day))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn leap_years_follow_the_gregorian_rule() {
        // Divisible by 4, except centuries, except every fourth century.
        assert!(!is_leap_year(1900));
        assert!(is_leap_year(2000));
        assert!(is_leap_year(2024));
        assert!(!is_leap_year(2021));
        assert!(!is_leap_year(2100));
        assert_eq!(days_in_year(1900), 365);
        assert_eq!(days_in_year(2000), 366);
        assert_eq!(days_in_month(1900, 2), 28);
        assert_eq!(days_in_month(2000, 2), 29);
        assert_eq!(days_in_month(2021, 4), 30);
        assert_eq!(days_in_month(2021, 12), 31);
        assert_eq!(days_in_month(2021, 13), 0);
        let months: u32 = (1..=12).map(|m| days_in_month(2024, m)).sum();
        assert_eq!(months, 366);
    }

    #[test]
    fn day_of_year_on_known_dates() {
        assert_eq!(day_of_year(2024, 12, 31), 366);
        assert_eq!(day_of_year(2023, 12, 31), 365);
        assert_eq!(day_of_year(2021, 1, 1), 1);
        // Allen et al. (1998), FAO-56, Example 8: 3 September is day 246.
        assert_eq!(day_of_year(2015, 9, 3), 246);
        assert_eq!(Period::Day { year: 2015, month: 9, day: 3 }.day_of_year(), 246);
        // 1 March: day 60 in a common year (1900), 61 in a leap year (2000).
        assert_eq!(day_of_year(1900, 3, 1), 60);
        assert_eq!(day_of_year(2000, 3, 1), 61);
        // A month is evaluated on its 15th: 15 April is day 105 (FAO-56, Example 17).
        assert_eq!(Period::Month { year: 2015, month: 4 }.day_of_year(), 105);
    }

    #[test]
    fn periods_cover_their_days() {
        assert_eq!(Period::Month { year: 2000, month: 2 }.days(), 29);
        assert_eq!(Period::Month { year: 1900, month: 2 }.days(), 28);
        assert_eq!(Period::Day { year: 1900, month: 2, day: 28 }.days(), 1);
        assert_eq!(Period::Day { year: 2021, month: 3, day: 5 }.to_string(), "2021-03-05");
        assert_eq!(Period::Month { year: 2021, month: 3 }.to_string(), "2021-03");
        assert_eq!(Period::Month { year: 2021, month: 3 }.year(), 2021);
    }

    #[test]
    fn civil_day_numbers_round_trip() {
        assert_eq!(days_from_civil(1970, 1, 1), 0);
        // 2000-01-01 is 10 957 days after 1970-01-01 (30 years, 7 of them leap).
        assert_eq!(days_from_civil(2000, 1, 1), 30 * 365 + 7);
        assert_eq!(days_from_civil(2000, 3, 1) - days_from_civil(2000, 2, 28), 2);
        assert_eq!(days_from_civil(1900, 3, 1) - days_from_civil(1900, 2, 28), 1);
        assert_eq!(days_from_civil(2025, 1, 1) - days_from_civil(2024, 1, 1), 366);
        for z in [-200_000i64, -1, 0, 1, 10_957, 59, 60, 400_000] {
            let (y, m, d) = civil_from_days(z);
            assert_eq!(days_from_civil(y, m, d), z);
        }
        let mut z = days_from_civil(1999, 1, 1);
        for year in 1999..=2001 {
            for month in 1..=12 {
                for day in 1..=days_in_month(year, month) {
                    assert_eq!(civil_from_days(z), (year, month, day));
                    assert_eq!(Period::day_from_key(z), Period::Day { year, month, day });
                    z += 1;
                }
            }
        }
    }

    #[test]
    fn month_keys_step_by_one_across_years() {
        let dec = Period::Month { year: 2020, month: 12 };
        let jan = Period::Month { year: 2021, month: 1 };
        assert_eq!(jan.key() - dec.key(), 1);
        assert_eq!(Period::month_from_key(dec.key() + 1), jan);
        assert_eq!(Period::month_from_key(month_index(2021, 7)), Period::Month { year: 2021, month: 7 });
        let d = Period::Day { year: 2024, month: 12, day: 31 };
        assert_eq!(Period::day_from_key(d.key() + 1), Period::Day { year: 2025, month: 1, day: 1 });
    }

    #[test]
    fn dates_are_strict() {
        assert_eq!(parse_date("2021-03-05"), Ok((2021, 3, 5)));
        assert!(parse_date("2021-3-5").is_err());
        assert!(parse_date("05/03/2021").is_err());
        assert!(parse_date("2021-02-29").is_err());
        assert_eq!(parse_date("2020-02-29"), Ok((2020, 2, 29)));
        assert!(parse_date("1900-02-29").is_err());
        assert_eq!(parse_date("2000-02-29"), Ok((2000, 2, 29)));
        assert!(parse_date("2021-13-01").is_err());
        assert!(parse_date("2021-04-31").is_err());
        assert!(parse_date("0999-01-01").unwrap_err().contains("outside 1000–3000"));
        assert!(parse_date("").is_err());
        assert!(parse_date("2021-0a-01").is_err());
    }
}
