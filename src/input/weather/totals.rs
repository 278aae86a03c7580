//! Per-period values and annual totals of one catchment's record.
//!
//! Every period's ET0 is summed through [`Et0Total`], the crate's one
//! non-negativity rule with its count: a day (or month) whose raw ET0 was negative
//! contributes 0 and is counted in [`AnnualPet::clamped_days`].

use super::calendar::{days_from_civil, days_in_year, month_index, Period};
use super::compute::Outcome;
use super::gaps::{GapRule, Slot, Slots};
use super::rows::Row;
use super::PetOutput;
use crate::model::pet::{Et0Total, PetMethod};

/// The columns of the annual table, in order.
pub const ANNUAL_COLUMNS: [&str; 8] =
    ["catchment", "year", "pet_mm", "pet_method", "pet_days", "pet_missing_days", "pet_status", "pet_clamped_days"];

/// `method` written for a day whose ET0 was interpolated across a gap.
pub const GAP_FILLED: &str = "gap-filled";

/// Year status: every day computed from weather.
pub const STATUS_COMPLETE: &str = "complete";
/// Year status: every missing day filled by the gap rule.
pub const STATUS_GAP_FILLED: &str = "gap-filled";
/// Year status: some days missing and not filled; `pet_mm` is short.
pub const STATUS_INCOMPLETE: &str = "incomplete";

/// ET0 of one period.
#[derive(Debug, Clone, PartialEq)]
pub struct PeriodPet {
    /// Catchment, when the file has a `catchment` column.
    pub catchment: Option<String>,
    /// The day or month.
    pub period: Period,
    /// Mean daily reference evapotranspiration over the period, mm/day, ≥ 0 (after
    /// the non-negativity rule).
    pub et0_mm_per_day: f64,
    /// Total over the period, mm (`et0_mm_per_day` × days in the period).
    pub et0_mm: f64,
    /// The method's name, or [`GAP_FILLED`] for an interpolated day.
    pub method: &'static str,
    /// True when the method's raw value was negative and was set to 0.
    pub clamped: bool,
}

/// Annual total of one catchment and year.
#[derive(Debug, Clone, PartialEq)]
pub struct AnnualPet {
    /// Catchment, when the file has a `catchment` column.
    pub catchment: Option<String>,
    /// Calendar year.
    pub year: i32,
    /// Total ET0 of the year, mm: computed plus gap-filled days (short when
    /// incomplete), each after the non-negativity rule, so never negative.
    pub pet_mm: f64,
    /// Method's name.
    pub method: &'static str,
    /// Days of the year whose ET0 was computed from weather.
    pub days: u32,
    /// Days of the year without a computed value (filled or not); `days + missing_days`
    /// is the length of the year.
    pub missing_days: u32,
    /// [`STATUS_COMPLETE`], [`STATUS_GAP_FILLED`] or [`STATUS_INCOMPLETE`].
    pub status: &'static str,
    /// Computed days whose raw ET0 was negative and was set to 0 (for a monthly
    /// record: the days of such months).
    pub clamped_days: u32,
    /// What setting them to 0 added to `pet_mm`, mm (the raw values' shortfall).
    pub added_by_clamp_mm: f64,
}

fn status(missing: u32, filled: u32) -> &'static str {
    if missing == 0 {
        STATUS_COMPLETE
    } else if filled == missing {
        STATUS_GAP_FILLED
    } else {
        STATUS_INCOMPLETE
    }
}

/// Lays a daily series on its calendar, fills gaps by `rule`, and adds its days,
/// gaps and annual totals to `out`.
pub(super) fn assemble_daily(
    catchment: Option<String>,
    rows: &[Row],
    outcomes: &[Outcome],
    method: PetMethod,
    rule: GapRule,
    out: &mut PetOutput,
) {
    let (Some(first), Some(last)) = (rows.first(), rows.last()) else { return };
    let (first_year, last_year) = (first.period.year(), last.period.year());
    let start = days_from_civil(first_year, 1, 1);
    let len = (days_from_civil(last_year, 12, 31) - start + 1) as usize;
    let mut slots = Slots::place(rows, outcomes, start, len);
    out.gaps.extend(slots.gaps(&catchment, rows, Some(rule), |i| Period::day_from_key(start + i as i64)));
    let name = method.name();
    let mut year_start = 0usize;
    for year in first_year..=last_year {
        let n = days_in_year(year) as usize;
        let (mut days, mut filled, mut total) = (0u32, 0u32, Et0Total::new());
        for (k, slot) in slots.slots[year_start..year_start + n].iter().enumerate() {
            let (used, method_name) = match *slot {
                Slot::Computed(e) => {
                    days += 1;
                    (total.add(e.raw_mm_per_day, 1), name)
                }
                Slot::Filled(x) => {
                    filled += 1;
                    (total.add(x, 1), GAP_FILLED)
                }
                Slot::Missing { .. } => continue,
            };
            out.periods.push(PeriodPet {
                catchment: catchment.clone(),
                period: Period::day_from_key(start + (year_start + k) as i64),
                et0_mm_per_day: used.mm_per_day,
                et0_mm: used.mm_per_day,
                method: method_name,
                clamped: used.clamped,
            });
        }
        let missing = n as u32 - days;
        out.annual.push(annual(&catchment, year, name, days, missing, status(missing, filled), &total));
        year_start += n;
    }
}

/// Lays a monthly series on its calendar and adds its months, gaps and annual
/// totals to `out`. Missing months are never filled.
pub(super) fn assemble_monthly(catchment: Option<String>, rows: &[Row], outcomes: &[Outcome], method: PetMethod, out: &mut PetOutput) {
    let (Some(first), Some(last)) = (rows.first(), rows.last()) else { return };
    let (first_year, last_year) = (first.period.year(), last.period.year());
    let start = month_index(first_year, 1);
    let len = ((last_year - first_year + 1) * 12) as usize;
    let mut slots = Slots::place(rows, outcomes, start, len);
    out.gaps.extend(slots.gaps(&catchment, rows, None, |i| Period::month_from_key(start + i as i64)));
    let name = method.name();
    for (y, year) in (first_year..=last_year).enumerate() {
        let (mut days, mut total) = (0u32, Et0Total::new());
        for i in y * 12..(y + 1) * 12 {
            if let Slot::Computed(e) = slots.slots[i] {
                let period = Period::month_from_key(start + i as i64);
                let n = period.days();
                days += n;
                let used = total.add(e.raw_mm_per_day, n);
                out.periods.push(PeriodPet {
                    catchment: catchment.clone(),
                    period,
                    et0_mm_per_day: used.mm_per_day,
                    et0_mm: used.mm_per_day * f64::from(n),
                    method: name,
                    clamped: used.clamped,
                });
            }
        }
        let missing = days_in_year(year) - days;
        out.annual.push(annual(&catchment, year, name, days, missing, status(missing, 0), &total));
    }
}

fn annual(
    catchment: &Option<String>,
    year: i32,
    method: &'static str,
    days: u32,
    missing: u32,
    status: &'static str,
    total: &Et0Total,
) -> AnnualPet {
    AnnualPet {
        catchment: catchment.clone(),
        year,
        pet_mm: total.total_mm,
        method,
        days,
        missing_days: missing,
        status,
        clamped_days: total.clamped_days,
        added_by_clamp_mm: total.added_by_clamp_mm,
    }
}
