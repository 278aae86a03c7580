//! ET0 of each row with the method the layout chose, then the crate's one
//! non-negativity rule ([`crate::model::pet::non_negative_et0`]) before the value is
//! stored, filled across gaps or summed.
//!
//! Shortwave data are checked against what the sun can deliver at the site on the
//! day (sunshine ≤ daylight length, solar radiation ≤ Ra), since a value above
//! either usually means a wrong latitude sign or wrong units.

use super::columns::{Layout, Timestep};
use super::rows::{Row, Values};
use crate::error::Problem;
use crate::input::table::fmt_value;
use crate::model::pet::fao56::{
    self, daylight_hours, extraterrestrial_radiation_mj_m2_day, mean_temperature_c, soil_heat_flux_monthly_mj_m2_day,
    wind_speed_2m_m_per_s, Humidity, PenmanMonteithInput, Solar,
};
use crate::model::pet::hargreaves;
use crate::model::pet::priestley_taylor::{self, NetRadiation};
use crate::model::pet::{non_negative_et0, NonNegativeEt0, PetMethod, Site};
use std::collections::HashMap;
use std::path::Path;

/// Sunshine may exceed the computed daylight length by this much (h) before it is
/// refused, to allow for rounding in published records; it is then capped at N.
const SUNSHINE_TOLERANCE_H: f64 = 0.1;

/// One period's ET0: the method's raw result and the value after the rule.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Et0 {
    /// What the method gives, mm/day; may be negative (net radiation below G).
    pub(super) raw_mm_per_day: f64,
    /// After [`non_negative_et0`]: the value stored and summed.
    pub(super) used: NonNegativeEt0,
}

impl Et0 {
    /// Applies the non-negativity rule to a method's raw result.
    pub(super) fn from_raw(raw_mm_per_day: f64) -> Et0 {
        Et0 { raw_mm_per_day, used: non_negative_et0(raw_mm_per_day) }
    }
}

/// Result of evaluating one row.
#[derive(Debug, Clone)]
pub(super) enum Outcome {
    /// ET0 was computed.
    Value(Et0),
    /// A value the method needs is blank: which columns.
    Blank(Vec<&'static str>),
    /// The row's values are impossible; the problem has been reported.
    Rejected,
}

/// What every row of one file is evaluated with.
pub(super) struct Context<'a> {
    pub(super) path: &'a Path,
    pub(super) layout: &'a Layout,
    pub(super) site: &'a Site,
    pub(super) wind_height_m: f64,
}

/// Computes ET0 for each row of one catchment's sorted series; counts in
/// `humidity_counts` how often each kind of humidity data was used.
pub(super) fn evaluate_series(
    cx: &Context<'_>,
    rows: &[Row],
    problems: &mut Vec<Problem>,
    humidity_counts: &mut HashMap<&'static str, usize>,
) -> Vec<Outcome> {
    let by_key: HashMap<i64, usize> = rows.iter().enumerate().map(|(i, r)| (r.key, i)).collect();
    let mut outcomes = Vec::with_capacity(rows.len());
    for row in rows {
        let g = soil_heat_flux(cx.layout.timestep, row, |k| by_key.get(&k).and_then(|&i| rows[i].v.month_temperature_c()));
        let mut blank: Vec<&'static str> = Vec::new();
        let raw = match cx.layout.method {
            PetMethod::Hargreaves => hargreaves_row(cx, row, &mut blank),
            PetMethod::PenmanMonteith => penman_monteith_row(cx, row, g, &mut blank, problems, humidity_counts),
            PetMethod::PriestleyTaylor => priestley_taylor_row(cx, row, g, &mut blank, problems, humidity_counts),
        };
        let outcome = match raw {
            RowResult::Raw(x) if !x.is_finite() => {
                // Not expected for range-checked input; reported rather than written.
                problems.push(Problem::in_file(cx.path, "ET0 could not be computed from this row's values").row(row.line));
                Outcome::Rejected
            }
            RowResult::Raw(x) => Outcome::Value(Et0::from_raw(x)),
            RowResult::Blank => Outcome::Blank(blank),
            RowResult::Rejected => Outcome::Rejected,
        };
        outcomes.push(outcome);
    }
    outcomes
}

/// A method's result for one row, before the non-negativity rule.
enum RowResult {
    /// The raw ET0, mm/day.
    Raw(f64),
    /// Values are blank; the columns have been pushed to `blank`.
    Blank,
    /// The row was refused; the problem has been reported.
    Rejected,
}

/// Soil heat flux G, MJ m⁻² day⁻¹: 0 for a day (FAO-56 eq. 42); for a month, eq. 43/44
/// from the neighbouring months' mean temperatures (the row's own `tmean_prev_c` /
/// `tmean_next_c`, else the neighbouring rows, looked up by key with `neighbour`).
fn soil_heat_flux(timestep: Timestep, row: &Row, neighbour: impl Fn(i64) -> Option<f64>) -> f64 {
    match timestep {
        Timestep::Daily => fao56::soil_heat_flux_daily_mj_m2_day(),
        Timestep::Monthly => {
            let v = &row.v;
            let prev = v.tmean_prev_c.or_else(|| neighbour(row.key - 1));
            let next = v.tmean_next_c.or_else(|| neighbour(row.key + 1));
            match v.month_temperature_c() {
                Some(t) => soil_heat_flux_monthly_mj_m2_day(prev, t, next),
                None => 0.0,
            }
        }
    }
}

fn humidity_of(v: &Values) -> Humidity {
    Humidity::from_best_available(v.ea_kpa, v.dewpoint_c, v.rh_max_pct, v.rh_min_pct, v.rh_mean_pct)
}

/// Hargreaves (FAO-56 eq. 52) before the non-negativity rule, so that the days the
/// rule changes are counted like those of the other methods.
fn hargreaves_row(cx: &Context<'_>, row: &Row, blank: &mut Vec<&'static str>) -> RowResult {
    let v = &row.v;
    match (v.tmax_c, v.tmin_c) {
        (Some(tmax), Some(tmin)) => {
            let ra = hargreaves::hargreaves(cx.site, row.period.day_of_year(), tmax, tmin).ra_mj_m2_day;
            RowResult::Raw(hargreaves::et0_hargreaves_raw_mm_per_day(tmax, tmin, ra))
        }
        _ => {
            blank_temps(v, blank);
            RowResult::Blank
        }
    }
}

fn penman_monteith_row(
    cx: &Context<'_>,
    row: &Row,
    g: f64,
    blank: &mut Vec<&'static str>,
    problems: &mut Vec<Problem>,
    humidity_counts: &mut HashMap<&'static str, usize>,
) -> RowResult {
    let v = &row.v;
    let j = row.period.day_of_year();
    blank_temps(v, blank);
    if v.wind_m_per_s.is_none() {
        blank.push("wind_m_per_s");
    }
    let solar = shortwave(cx.layout, v, blank);
    let (Some(tmax_c), Some(tmin_c), Some(wind), Some(solar), true) = (v.tmax_c, v.tmin_c, v.wind_m_per_s, solar, blank.is_empty()) else {
        return RowResult::Blank;
    };
    if !check_shortwave(cx.path, row, cx.site, j, solar, problems) {
        return RowResult::Rejected;
    }
    let humidity = humidity_of(v);
    let input = PenmanMonteithInput {
        day_of_year: j,
        tmax_c,
        tmin_c,
        humidity,
        u2_m_per_s: wind_speed_2m_m_per_s(wind, cx.wind_height_m),
        solar,
        g_mj_m2_day: g,
    };
    *humidity_counts.entry(humidity.label()).or_default() += 1;
    RowResult::Raw(fao56::penman_monteith(cx.site, &input).et0_mm_per_day)
}

/// Priestley–Taylor with measured net radiation when the row has it, else with net
/// radiation estimated from temperature, humidity and shortwave data.
fn priestley_taylor_row(
    cx: &Context<'_>,
    row: &Row,
    g: f64,
    blank: &mut Vec<&'static str>,
    problems: &mut Vec<Problem>,
    humidity_counts: &mut HashMap<&'static str, usize>,
) -> RowResult {
    let v = &row.v;
    if let Some(rn) = v.rn_mj_m2 {
        let t_mean = match (v.tmax_c, v.tmin_c) {
            (Some(a), Some(b)) => Some(mean_temperature_c(a, b)),
            _ => v.tmean_c,
        };
        let Some(t_mean_c) = t_mean else {
            blank.push("tmean_c (or tmax_c and tmin_c)");
            return RowResult::Blank;
        };
        let nr = NetRadiation::Measured { t_mean_c, rn_mj_m2_day: rn };
        return RowResult::Raw(priestley_taylor::priestley_taylor(cx.site, &nr, g).et0_mm_per_day);
    }
    if cx.layout.used.contains(&"rn_mj_m2") {
        blank.push("rn_mj_m2");
    }
    let mut needed = Vec::new();
    blank_temps(v, &mut needed);
    let solar = shortwave(cx.layout, v, &mut needed);
    let (Some(tmax_c), Some(tmin_c), Some(solar)) = (v.tmax_c, v.tmin_c, solar) else {
        blank.extend(needed);
        return RowResult::Blank;
    };
    let j = row.period.day_of_year();
    if !check_shortwave(cx.path, row, cx.site, j, solar, problems) {
        return RowResult::Rejected;
    }
    let humidity = humidity_of(v);
    let nr = NetRadiation::Estimated { day_of_year: j, tmax_c, tmin_c, humidity, solar };
    *humidity_counts.entry(humidity.label()).or_default() += 1;
    RowResult::Raw(priestley_taylor::priestley_taylor(cx.site, &nr, g).et0_mm_per_day)
}

fn blank_temps(v: &Values, blank: &mut Vec<&'static str>) {
    if v.tmax_c.is_none() {
        blank.push("tmax_c");
    }
    if v.tmin_c.is_none() {
        blank.push("tmin_c");
    }
}

/// Measured solar radiation when given, else sunshine hours (FAO-56 prefers measured Rs).
fn shortwave(layout: &Layout, v: &Values, blank: &mut Vec<&'static str>) -> Option<Solar> {
    if let Some(rs) = v.solar_mj_m2 {
        Some(Solar::MeasuredMjM2Day(rs))
    } else if let Some(n) = v.sunshine_h {
        Some(Solar::SunshineHours(n))
    } else {
        let has_solar = layout.used.contains(&"solar_mj_m2");
        let has_sun = layout.used.contains(&"sunshine_h");
        blank.push(match (has_solar, has_sun) {
            (true, true) => "solar_mj_m2 and sunshine_h",
            (true, false) => "solar_mj_m2",
            _ => "sunshine_h",
        });
        None
    }
}

/// Checks shortwave data against what the sun can deliver at the site on the day.
fn check_shortwave(path: &Path, row: &Row, site: &Site, j: u32, solar: Solar, problems: &mut Vec<Problem>) -> bool {
    let lat = site.latitude_deg();
    match solar {
        Solar::SunshineHours(n) => {
            let daylight = daylight_hours(lat, j);
            if n > daylight + SUNSHINE_TOLERANCE_H {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "sunshine_h {} exceeds the {:.1} h of daylight at latitude {}° on {}; check the latitude (south negative) and that the value is hours per day",
                            fmt_value(n),
                            daylight,
                            fmt_value(lat),
                            row.period
                        ),
                    )
                    .row(row.line)
                    .column("sunshine_h"),
                );
                return false;
            }
        }
        Solar::MeasuredMjM2Day(rs) => {
            let ra = extraterrestrial_radiation_mj_m2_day(lat, j);
            if rs > ra {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "solar_mj_m2 {} exceeds the extraterrestrial radiation {:.2} MJ m-2 day-1 at latitude {}° on {}; check the latitude (south negative) and the units (MJ m-2 day-1)",
                            fmt_value(rs),
                            ra,
                            fmt_value(lat),
                            row.period
                        ),
                    )
                    .row(row.line)
                    .column("solar_mj_m2"),
                );
                return false;
            }
        }
    }
    true
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_rule_is_applied_to_every_computed_value() {
        let cold = Et0::from_raw(-0.59);
        assert_eq!(cold.raw_mm_per_day, -0.59);
        assert_eq!(cold.used, NonNegativeEt0 { mm_per_day: 0.0, clamped: true });
        let warm = Et0::from_raw(3.88);
        assert_eq!(warm.used, NonNegativeEt0 { mm_per_day: 3.88, clamped: false });
    }
}
