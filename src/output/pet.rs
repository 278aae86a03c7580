//! The tables `yieldshift pet` writes: ET0 per day or month, and the annual totals
//! whose columns ([`ANNUAL_COLUMNS`]) the scenario's climate table accepts. Each
//! file is written beside its target under a temporary name and renamed into place.

use crate::error::{Error, Result};
use crate::input::weather::{AnnualPet, Period, PeriodPet, ANNUAL_COLUMNS};
use crate::schema::numbers::num;
use std::path::Path;

/// Writes the per-period table: `catchment` (when any row has one), `date` or
/// `year,month`, `et0_mm_per_day`, `et0_mm`, `method`. The file is written beside
/// the target under a temporary name and renamed into place.
pub fn write_period_csv(out: &Path, rows: &[PeriodPet]) -> Result<()> {
    let monthly = rows.first().is_some_and(|r| matches!(r.period, Period::Month { .. }));
    if rows.iter().any(|r| matches!(r.period, Period::Month { .. }) != monthly) {
        return Err(Error::Other("cannot write daily and monthly periods in one table".to_string()));
    }
    let with_catchment = rows.iter().any(|r| r.catchment.is_some());
    let mut header: Vec<&str> = Vec::new();
    if with_catchment {
        header.push("catchment");
    }
    header.extend(if monthly { &["year", "month"][..] } else { &["date"][..] });
    header.extend(["et0_mm_per_day", "et0_mm", "method"]);
    let mut w = csv::WriterBuilder::new().terminator(csv::Terminator::Any(b'\n')).from_writer(Vec::new());
    let csv_err = |e: csv::Error| Error::Other(format!("formatting {}: {e}", out.display()));
    w.write_record(&header).map_err(csv_err)?;
    for r in rows {
        let mut rec: Vec<String> = Vec::with_capacity(6);
        if with_catchment {
            rec.push(r.catchment.clone().unwrap_or_default());
        }
        match r.period {
            Period::Month { year, month } => {
                rec.push(year.to_string());
                rec.push(month.to_string());
            }
            p @ Period::Day { .. } => rec.push(p.to_string()),
        }
        rec.push(num(r.et0_mm_per_day, 3));
        rec.push(num(r.et0_mm, 3));
        rec.push(r.method.to_string());
        w.write_record(&rec).map_err(csv_err)?;
    }
    let bytes = w.into_inner().map_err(|e| Error::Other(format!("formatting {}: {e}", out.display())))?;
    write_atomically(out, &bytes)
}

/// Writes the annual table with exactly the columns [`ANNUAL_COLUMNS`]
/// (`catchment` empty when the weather file had none), atomically.
pub fn write_annual_csv(out: &Path, rows: &[AnnualPet]) -> Result<()> {
    let mut w = csv::WriterBuilder::new().terminator(csv::Terminator::Any(b'\n')).from_writer(Vec::new());
    let csv_err = |e: csv::Error| Error::Other(format!("formatting {}: {e}", out.display()));
    w.write_record(ANNUAL_COLUMNS).map_err(csv_err)?;
    for r in rows {
        let fields: [String; ANNUAL_COLUMNS.len()] = [
            r.catchment.clone().unwrap_or_default(),
            r.year.to_string(),
            num(r.pet_mm, 2),
            r.method.to_string(),
            r.days.to_string(),
            r.missing_days.to_string(),
            r.status.to_string(),
            r.clamped_days.to_string(),
        ];
        w.write_record(fields).map_err(csv_err)?;
    }
    let bytes = w.into_inner().map_err(|e| Error::Other(format!("formatting {}: {e}", out.display())))?;
    write_atomically(out, &bytes)
}

/// Creates the folder of `out` if needed and writes `bytes` there atomically
/// ([`crate::output::outdir::write_atomic`]).
fn write_atomically(out: &Path, bytes: &[u8]) -> Result<()> {
    let parent = out.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
    std::fs::create_dir_all(parent).map_err(|e| Error::io(format!("creating {}", parent.display()), e))?;
    crate::output::outdir::write_atomic(out, bytes)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::input::weather::STATUS_COMPLETE;

    #[test]
    fn writers_produce_the_contract_columns_and_leave_no_temp_files() {
        let dir = tempfile::tempdir().unwrap();
        let rows = vec![AnnualPet {
            catchment: Some("upper, east".into()),
            year: 2021,
            pet_mm: 812.345,
            method: "hargreaves",
            days: 365,
            missing_days: 0,
            status: STATUS_COMPLETE,
            clamped_days: 3,
            added_by_clamp_mm: 0.4,
        }];
        let out = dir.path().join("sub").join("annual.csv");
        write_annual_csv(&out, &rows).unwrap();
        let text = std::fs::read_to_string(&out).unwrap();
        assert_eq!(
            text,
            "catchment,year,pet_mm,pet_method,pet_days,pet_missing_days,pet_status,pet_clamped_days\n\"upper, east\",2021,812.35,hargreaves,365,0,complete,3\n"
        );
        let periods = vec![PeriodPet {
            catchment: None,
            period: Period::Month { year: 2021, month: 4 },
            et0_mm_per_day: 5.7234,
            et0_mm: 171.702,
            method: "penman-monteith",
            clamped: false,
        }];
        let pout = dir.path().join("sub").join("periods.csv");
        write_period_csv(&pout, &periods).unwrap();
        assert_eq!(
            std::fs::read_to_string(&pout).unwrap(),
            "year,month,et0_mm_per_day,et0_mm,method\n2021,4,5.723,171.702,penman-monteith\n"
        );
        let names: Vec<_> = std::fs::read_dir(dir.path().join("sub")).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(names.len(), 2, "{names:?}");
    }

    #[test]
    fn daily_and_monthly_periods_are_not_mixed() {
        let dir = tempfile::tempdir().unwrap();
        let row = |period| PeriodPet { catchment: None, period, et0_mm_per_day: 1.0, et0_mm: 1.0, method: "hargreaves", clamped: false };
        let rows = [row(Period::Month { year: 2021, month: 4 }), row(Period::Day { year: 2021, month: 4, day: 1 })];
        assert!(write_period_csv(&dir.path().join("p.csv"), &rows).is_err());
        assert!(!dir.path().join("p.csv").exists());
    }
}
