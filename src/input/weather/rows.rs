//! Row checks: every cell of a weather row is parsed and range-checked, the row's
//! values are checked against each other (Tmin ≤ Tmax, dew point ≤ Tmax, …), and
//! the rows are grouped into one time-sorted series per catchment with repeated
//! periods reported.

use super::calendar::{parse_date, Period};
use super::columns::{Layout, Timestep, RANGES};
use crate::error::Problem;
use crate::input::table::{fmt_value, parse_number, Table};
use crate::model::pet::fao56::{mean_temperature_c, saturation_vapour_pressure_kpa};
use std::collections::HashMap;
use std::path::Path;

/// Numeric values of one row (only the columns the method reads are filled).
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct Values {
    pub(super) tmax_c: Option<f64>,
    pub(super) tmin_c: Option<f64>,
    pub(super) tmean_c: Option<f64>,
    pub(super) rh_max_pct: Option<f64>,
    pub(super) rh_min_pct: Option<f64>,
    pub(super) rh_mean_pct: Option<f64>,
    pub(super) dewpoint_c: Option<f64>,
    pub(super) ea_kpa: Option<f64>,
    pub(super) wind_m_per_s: Option<f64>,
    pub(super) sunshine_h: Option<f64>,
    pub(super) solar_mj_m2: Option<f64>,
    pub(super) rn_mj_m2: Option<f64>,
    pub(super) tmean_prev_c: Option<f64>,
    pub(super) tmean_next_c: Option<f64>,
}

impl Values {
    fn slot(&mut self, col: &str) -> Option<&mut Option<f64>> {
        Some(match col {
            "tmax_c" => &mut self.tmax_c,
            "tmin_c" => &mut self.tmin_c,
            "tmean_c" => &mut self.tmean_c,
            "rh_max_pct" => &mut self.rh_max_pct,
            "rh_min_pct" => &mut self.rh_min_pct,
            "rh_mean_pct" => &mut self.rh_mean_pct,
            "dewpoint_c" => &mut self.dewpoint_c,
            "ea_kpa" => &mut self.ea_kpa,
            "wind_m_per_s" => &mut self.wind_m_per_s,
            "sunshine_h" => &mut self.sunshine_h,
            "solar_mj_m2" => &mut self.solar_mj_m2,
            "rn_mj_m2" => &mut self.rn_mj_m2,
            "tmean_prev_c" => &mut self.tmean_prev_c,
            "tmean_next_c" => &mut self.tmean_next_c,
            _ => return None,
        })
    }

    /// The month's (or day's) mean temperature: `tmean_c`, else `(Tmax + Tmin)/2`.
    pub(super) fn month_temperature_c(&self) -> Option<f64> {
        self.tmean_c.or(match (self.tmax_c, self.tmin_c) {
            (Some(a), Some(b)) => Some(mean_temperature_c(a, b)),
            _ => None,
        })
    }
}

/// One checked row.
#[derive(Debug, Clone)]
pub(super) struct Row {
    /// Spreadsheet row (header = 1).
    pub(super) line: usize,
    pub(super) catchment: Option<String>,
    pub(super) period: Period,
    /// [`Period::key`]: day number (days since 1970-01-01) or month number.
    pub(super) key: i64,
    pub(super) v: Values,
}

/// Parses and checks every row; rows with any problem are reported and left out.
pub(super) fn parse_rows(table: &Table, layout: &Layout, problems: &mut Vec<Problem>) -> Vec<Row> {
    let mut rows = Vec::with_capacity(table.rows.len());
    for (line, rec) in &table.rows {
        let line = *line;
        let before = problems.len();
        let catchment = layout.has_catchment.then(|| catchment_of(table, line, rec, problems));
        let period = period_of(table, layout.timestep, line, rec, problems);
        let v = values_of(table, layout, line, rec, problems);
        check_row_consistency(&table.path, line, &v, problems);
        if problems.len() > before {
            continue;
        }
        let Some(period) = period else { continue };
        rows.push(Row { line, catchment, key: period.key(), period, v });
    }
    rows
}

fn catchment_of(table: &Table, line: usize, rec: &csv::StringRecord, problems: &mut Vec<Problem>) -> String {
    let id = table.text(rec, "catchment");
    if id.is_empty() {
        problems.push(
            Problem::in_file(&table.path, "catchment is empty; every row needs one when the column is present")
                .row(line)
                .column("catchment"),
        );
    }
    id.to_string()
}

fn period_of(table: &Table, timestep: Timestep, line: usize, rec: &csv::StringRecord, problems: &mut Vec<Problem>) -> Option<Period> {
    match timestep {
        Timestep::Daily => match parse_date(table.text(rec, "date")) {
            Ok((year, month, day)) => Some(Period::Day { year, month, day }),
            Err(m) => {
                problems.push(Problem::in_file(&table.path, m).row(line).column("date"));
                None
            }
        },
        Timestep::Monthly => {
            let year = whole_number(table, line, rec, "year", 1000, 3000, problems);
            let month = whole_number(table, line, rec, "month", 1, 12, problems);
            match (year, month) {
                (Some(y), Some(m)) => Some(Period::Month { year: y as i32, month: m as u32 }),
                _ => None,
            }
        }
    }
}

/// The numeric cells the method reads; blanks and `NA` stay `None`.
fn values_of(table: &Table, layout: &Layout, line: usize, rec: &csv::StringRecord, problems: &mut Vec<Problem>) -> Values {
    let path = &table.path;
    let mut v = Values::default();
    for &(col, lo, hi, unit) in RANGES.iter().filter(|r| layout.used.contains(&r.0)) {
        let text = table.text(rec, col);
        if text.is_empty() || text == "NA" {
            continue;
        }
        match parse_number(text, table.semicolon) {
            Ok(x) if (lo..=hi).contains(&x) => {
                if let Some(slot) = v.slot(col) {
                    *slot = Some(x);
                }
            }
            Ok(x) => {
                let mut msg = format!("{} is out of range; allowed {} to {} {unit}", fmt_value(x), fmt_value(lo), fmt_value(hi));
                if unit == "%" && x > 100.0 {
                    msg.push_str(" (relative humidity cannot exceed 100 %)");
                }
                if col == "solar_mj_m2" && x > hi {
                    msg.push_str(" (daily totals in MJ m-2 day-1 are expected; W/m2 × 0.0864 = MJ m-2 day-1)");
                }
                problems.push(Problem::in_file(path, msg).row(line).column(col));
            }
            Err(m) => problems.push(Problem::in_file(path, m).row(line).column(col)),
        }
    }
    v
}

fn whole_number(
    table: &Table,
    line: usize,
    rec: &csv::StringRecord,
    col: &str,
    lo: i64,
    hi: i64,
    problems: &mut Vec<Problem>,
) -> Option<i64> {
    let text = table.text(rec, col);
    if text.is_empty() {
        problems.push(
            Problem::in_file(&table.path, format!("value is missing; expected a whole number from {lo} to {hi}")).row(line).column(col),
        );
        return None;
    }
    match parse_number(text, false) {
        Ok(x) if x.fract() == 0.0 && x >= lo as f64 && x <= hi as f64 => Some(x as i64),
        Ok(x) => {
            problems.push(
                Problem::in_file(&table.path, format!("{} is not allowed; expected a whole number from {lo} to {hi}", fmt_value(x)))
                    .row(line)
                    .column(col),
            );
            None
        }
        Err(m) => {
            problems.push(Problem::in_file(&table.path, m).row(line).column(col));
            None
        }
    }
}

/// Values of one row that contradict each other.
fn check_row_consistency(path: &Path, line: usize, v: &Values, problems: &mut Vec<Problem>) {
    if let (Some(tmax), Some(tmin)) = (v.tmax_c, v.tmin_c) {
        if tmin > tmax {
            problems.push(
                Problem::in_file(
                    path,
                    format!("tmin_c {} is above tmax_c {}; check for swapped columns", fmt_value(tmin), fmt_value(tmax)),
                )
                .row(line)
                .column("tmin_c"),
            );
        } else if let Some(tmean) = v.tmean_c {
            if tmean < tmin || tmean > tmax {
                problems.push(
                    Problem::in_file(
                        path,
                        format!("tmean_c {} lies outside tmin_c {} to tmax_c {}", fmt_value(tmean), fmt_value(tmin), fmt_value(tmax)),
                    )
                    .row(line)
                    .column("tmean_c"),
                );
            }
        }
        if let Some(dew) = v.dewpoint_c {
            if dew > tmax {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "dewpoint_c {} is above tmax_c {}; the dew point cannot exceed the air temperature",
                            fmt_value(dew),
                            fmt_value(tmax)
                        ),
                    )
                    .row(line)
                    .column("dewpoint_c"),
                );
            }
        }
        if let Some(ea) = v.ea_kpa {
            let es_max = saturation_vapour_pressure_kpa(tmax);
            if ea > es_max {
                problems.push(
                    Problem::in_file(
                        path,
                        format!(
                            "ea_kpa {} exceeds the saturation vapour pressure {:.3} kPa at tmax_c {}; check the units (kPa; hPa ÷ 10)",
                            fmt_value(ea),
                            es_max,
                            fmt_value(tmax)
                        ),
                    )
                    .row(line)
                    .column("ea_kpa"),
                );
            }
        }
    }
    if let (Some(hi), Some(lo)) = (v.rh_max_pct, v.rh_min_pct) {
        if lo > hi {
            problems.push(
                Problem::in_file(path, format!("rh_min_pct {} is above rh_max_pct {}", fmt_value(lo), fmt_value(hi)))
                    .row(line)
                    .column("rh_min_pct"),
            );
        }
    }
}

/// Groups rows by catchment (file order), sorts each by time, reports duplicates.
pub(super) fn group_series(path: &Path, rows: Vec<Row>, problems: &mut Vec<Problem>) -> Vec<(Option<String>, Vec<Row>)> {
    let mut order: Vec<Option<String>> = Vec::new();
    let mut groups: HashMap<Option<String>, Vec<Row>> = HashMap::new();
    for row in rows {
        if !groups.contains_key(&row.catchment) {
            order.push(row.catchment.clone());
        }
        groups.entry(row.catchment.clone()).or_default().push(row);
    }
    let mut out = Vec::with_capacity(order.len());
    for c in order {
        let mut rows = groups.remove(&c).unwrap_or_default();
        rows.sort_by_key(|r| (r.key, r.line));
        for pair in rows.windows(2) {
            if pair[0].key == pair[1].key {
                let whose = c.as_ref().map(|c| format!(" for catchment '{c}'")).unwrap_or_default();
                problems.push(
                    Problem::in_file(path, format!("{} appears twice{whose}: also in row {}", pair[1].period, pair[0].line))
                        .row(pair[1].line)
                        .column(if matches!(pair[1].period, Period::Day { .. }) { "date" } else { "month" }),
                );
            }
        }
        out.push((c, rows));
    }
    out
}
