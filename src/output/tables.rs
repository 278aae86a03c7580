//! Tidy CSV outputs (`yearly.csv`, `summary.csv`, `nodes.csv`, `budget.csv`,
//! `delay.csv`), the one CSV writer of the crate ([`CsvOut`]) and `run_info.json`.
//!
//! Numbers are written with fixed decimals so that outputs are byte-stable;
//! undefined values (a change against a zero baseline, a concentration in a
//! year with too little runoff or above the concentration ceiling) are left empty
//! and explained in `flags`.
//! No cell is ever NaN or infinite.

use crate::error::{Error, Result};
use crate::model::control::{BudgetYear, ControlYear};
use crate::model::dilution::ScreenedFlag;
use crate::model::economics::ProgrammeTotals;
use crate::model::summary::{CatchmentSummary, GuidelineStatus, NodeYear, REPORT_OFFSETS_YR};
use crate::model::{Catchment, Contaminant, YearResult};
use crate::schema::columns::{self, flags};
use crate::schema::numbers::{num, opt_num};
use std::io::Write;
use std::path::{Path, PathBuf};

/// The one CSV dialect of every table this crate writes: comma-separated, a
/// field quoted only when it holds a comma, a quote, CR or LF (quotes doubled),
/// records ended by LF. Record lengths are checked by [`CsvOut`] itself.
fn dialect() -> csv::WriterBuilder {
    let mut b = csv::WriterBuilder::new();
    b.quote_style(csv::QuoteStyle::Necessary).terminator(csv::Terminator::Any(b'\n')).has_headers(false).flexible(true);
    b
}

/// Rows encoded by an in-memory [`CsvOut`] (see [`CsvOut::in_memory`]), to be
/// written in order into a file by [`CsvOut::write_rows`].
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct CsvRows(Vec<u8>);

impl CsvRows {
    /// The encoded text (whole lines).
    pub fn as_bytes(&self) -> &[u8] {
        &self.0
    }
}

/// The one CSV writing path of the crate: every table goes through here, to a
/// file ([`CsvOut::create`], [`CsvOut::append`]) or to memory for rows computed
/// in parallel ([`CsvOut::in_memory`]). Failures name the file; a row whose
/// number of fields differs from the header is refused, naming the row.
pub struct CsvOut<W: Write = std::fs::File> {
    /// `None` only for the instant [`CsvOut::write_rows`] takes the file out.
    w: Option<csv::Writer<W>>,
    path: PathBuf,
    /// Fields of every row (the header's), when known.
    width: Option<usize>,
    /// Records written so far, header included (for messages).
    records: usize,
}

/// Buffer of a file-backed writer (the file itself is unbuffered).
const FILE_BUFFER: usize = 1 << 16;

impl CsvOut<std::fs::File> {
    /// Creates the file and writes the header.
    pub fn create<H: AsRef<str>>(path: &Path, header: &[H]) -> Result<CsvOut> {
        let f = std::fs::File::create(path).map_err(|e| Error::io(format!("creating {}", path.display()), e))?;
        let w = dialect().buffer_capacity(FILE_BUFFER).from_writer(f);
        let mut out = CsvOut { w: Some(w), path: path.to_path_buf(), width: Some(header.len()), records: 0 };
        out.row(header)?;
        Ok(out)
    }

    /// Opens an existing table to add rows at its end; `width` is its number of columns.
    pub fn append(path: &Path, width: usize) -> Result<CsvOut> {
        let f = std::fs::OpenOptions::new().append(true).open(path).map_err(|e| Error::io(format!("opening {}", path.display()), e))?;
        let w = dialect().buffer_capacity(FILE_BUFFER).from_writer(f);
        Ok(CsvOut { w: Some(w), path: path.to_path_buf(), width: Some(width), records: 0 })
    }
}

impl CsvOut<Vec<u8>> {
    /// Rows of `width` fields encoded in memory (no header), for [`CsvOut::write_rows`].
    pub fn in_memory(width: usize) -> CsvOut<Vec<u8>> {
        CsvOut { w: Some(dialect().from_writer(Vec::new())), path: PathBuf::from("(rows in memory)"), width: Some(width), records: 0 }
    }

    /// The rows written so far.
    pub fn into_rows(mut self) -> Result<CsvRows> {
        let w = self.w.take().ok_or_else(|| self.gone())?;
        w.into_inner().map(CsvRows).map_err(|e| Error::io(format!("writing {}", self.path.display()), e.into_error()))
    }
}

impl<W: Write> CsvOut<W> {
    fn gone(&self) -> Error {
        Error::Other(format!("writing {}: the writer was lost after an earlier failure", self.path.display()))
    }

    fn fail(&self, e: csv::Error) -> Error {
        match e.into_kind() {
            csv::ErrorKind::Io(io) => Error::io(format!("writing {}", self.path.display()), io),
            other => Error::Other(format!("writing {}: {other:?}", self.path.display())),
        }
    }

    /// Writes one record; fields holding a comma, quote, CR or LF are quoted.
    pub fn row<T: AsRef<str>>(&mut self, fields: impl IntoIterator<Item = T>) -> Result<()> {
        let Some(w) = self.w.as_mut() else { return Err(self.gone()) };
        let mut n = 0;
        let mut res = Ok(());
        for f in fields {
            n += 1;
            if res.is_ok() {
                res = w.write_field(f.as_ref());
            }
        }
        res = res.and_then(|_| w.write_record(None::<&[u8]>));
        res.map_err(|e| self.fail(e))?;
        self.records += 1;
        match self.width {
            Some(width) if width != n => Err(Error::Other(format!(
                "writing {}: record {} has {n} fields where the header has {width} (a yieldshift bug; please report it)",
                self.path.display(),
                self.records
            ))),
            _ => Ok(()),
        }
    }

    /// Writes rows encoded by an in-memory writer, as they are.
    pub fn write_rows(&mut self, rows: &CsvRows) -> Result<()> {
        if rows.0.is_empty() {
            return Ok(());
        }
        let w = self.w.take().ok_or_else(|| self.gone())?;
        let mut inner = w.into_inner().map_err(|e| Error::io(format!("writing {}", self.path.display()), e.into_error()))?;
        inner.write_all(&rows.0).map_err(|e| Error::io(format!("writing {}", self.path.display()), e))?;
        self.w = Some(dialect().buffer_capacity(FILE_BUFFER).from_writer(inner));
        Ok(())
    }

    /// Flushes everything written to the file.
    pub fn finish(mut self) -> Result<()> {
        let w = self.w.take().ok_or_else(|| self.gone())?;
        let mut inner = w.into_inner().map_err(|e| Error::io(format!("writing {}", self.path.display()), e.into_error()))?;
        inner.flush().map_err(|e| Error::io(format!("writing {}", self.path.display()), e))
    }
}

/// Header of `yearly.csv` ([`columns::yearly::columns`]).
pub fn yearly_header(contaminants: &[Contaminant]) -> Vec<String> {
    columns::yearly::columns(&names(contaminants))
}

fn names(contaminants: &[Contaminant]) -> Vec<&str> {
    contaminants.iter().map(|c| c.name.as_str()).collect()
}

/// Flags for a year's concentrations (`low-runoff:<name>` or `above-ceiling:<name>`
/// per contaminant not stated).
fn concentration_flags(concs: &[std::result::Result<f64, ScreenedFlag>], contaminants: &[Contaminant]) -> String {
    let flags: Vec<String> =
        concs.iter().zip(contaminants).filter_map(|(c, m)| c.err().map(|f| flags::concentration(f, &m.name))).collect();
    flags.join(&flags::SEPARATOR.to_string())
}

/// Control columns of one `yearly.csv` row.
#[derive(Debug, Clone, Copy, Default)]
pub struct ControlCells {
    /// The year's control outcome.
    pub control: ControlYear,
    /// Water saved vs no-control in the same catchment and year, m³.
    pub water_saved_m3: f64,
    /// Cost so far, $.
    pub cumulative_cost: f64,
    /// Water saved so far, m³.
    pub cumulative_water_saved_m3: f64,
}

/// Fields of one `yearly.csv` row.
pub fn yearly_fields(c: &Catchment, strategy: &str, y: &YearResult, ctl: &ControlCells, contaminants: &[Contaminant]) -> Vec<String> {
    let mut f = vec![
        c.id.clone(),
        strategy.to_string(),
        y.year.to_string(),
        num(y.rain_mm, 1),
        num(y.pet_mm, 1),
        num(y.et_mm, 3),
        num(y.yield_mm, 3),
        num(y.yield_m3, 1),
        num(y.baseline_yield_mm, 3),
        num(y.uninvaded_yield_mm, 3),
        opt_num(y.yield_change_pct(), 4),
        opt_num(y.change_vs_uninvaded_pct(), 4),
        num(y.canopy_fraction, 6),
        num(y.classes.scattered_ha, 3),
        num(y.classes.medium_ha, 3),
        num(y.classes.dense_ha, 3),
        num(y.classes.total_ha(), 3),
        num(y.new_infestation_ha, 3),
        num(ctl.control.cost(), 2),
        num(ctl.control.treated_ha, 3),
        num(ctl.control.cleared_ha, 3),
        num(ctl.control.regrowth_ha, 3),
        num(ctl.water_saved_m3, 1),
        num(ctl.cumulative_cost, 2),
        num(ctl.cumulative_water_saved_m3, 1),
    ];
    for (k, _) in contaminants.iter().enumerate() {
        f.push(num(y.loads_kg_per_yr[k], 3));
        f.push(y.concentrations[k].map(|v| num(v, 5)).unwrap_or_default());
    }
    let mut flags = concentration_flags(&y.concentrations, contaminants);
    if y.baseline_yield_mm <= 0.0 {
        if !flags.is_empty() {
            flags.push(flags::SEPARATOR);
        }
        flags.push_str(flags::ZERO_BASELINE_YIELD);
    }
    f.push(flags);
    f
}

/// Header of `summary.csv` ([`columns::summary::columns`]).
pub fn summary_header(contaminants: &[Contaminant]) -> Vec<String> {
    columns::summary::columns(&REPORT_OFFSETS_YR, &names(contaminants))
}

/// Who a `summary.csv` row describes: id, [`columns::scope`] word, display name and area (ha).
#[derive(Debug, Clone, Copy)]
pub struct SummaryWho<'a> {
    /// Catchment id (the node's catchment for `arriving`, `basin` for the basin).
    pub id: &'a str,
    /// `local`, `arriving` or `basin`.
    pub scope: &'a str,
    /// Display name.
    pub name: &'a str,
    /// Area (drained area for `arriving`), ha.
    pub area_ha: f64,
}

impl<'a> SummaryWho<'a> {
    /// A catchment's own (local) row.
    pub fn local(c: &'a Catchment) -> SummaryWho<'a> {
        SummaryWho { id: &c.id, scope: columns::scope::LOCAL, name: &c.name, area_ha: c.area_ha }
    }
}

/// Fields of one `summary.csv` row; `water_value_per_m3` enables NPV and BCR.
pub fn summary_fields(
    who: SummaryWho,
    strategy: &str,
    s: &CatchmentSummary,
    totals: &ProgrammeTotals,
    water_value_per_m3: Option<f64>,
) -> Vec<String> {
    let mut f = vec![who.id.to_string(), who.scope.to_string(), who.name.to_string(), strategy.to_string(), num(who.area_ha, 3)];
    for v in &s.change_at_offsets_pct {
        f.push(opt_num(*v, 4));
    }
    f.push(opt_num(s.change_at_horizon_pct, 4));
    f.push(opt_num(s.change_vs_uninvaded_at_horizon_pct, 4));
    f.push(num(s.water_lost_at_horizon_m3, 1));
    f.push(num(s.canopy_fraction_start, 6));
    f.push(num(s.canopy_fraction_end, 6));
    let year = |y: Option<i32>| y.map(|y| y.to_string()).unwrap_or_default();
    for e in &s.exceedance {
        f.push(e.status.word().to_string());
        f.push(year(e.first_exceeded_year()));
        f.push(year(e.invasion_first_year));
        f.push(if e.status == GuidelineStatus::NoGuideline { String::new() } else { e.invasion_years.to_string() });
    }
    f.push(num(totals.cost, 2));
    f.push(num(totals.cost_pv, 2));
    f.push(num(totals.water_saved_m3, 1));
    f.push(num(totals.water_saved_pv_m3, 1));
    f.push(opt_num(totals.cost_per_m3(), 6));
    f.push(opt_num(totals.levelised_cost_per_m3(), 6));
    f.push(opt_num(water_value_per_m3.map(|v| totals.npv(v)), 2));
    f.push(opt_num(water_value_per_m3.and_then(|v| totals.bcr(v)), 4));
    f
}

/// Header of `budget.csv`.
pub fn budget_header() -> Vec<String> {
    columns::owned(&columns::budget::COLUMNS)
}

/// Fields of one `budget.csv` row (`pool` is `basin` or a catchment id).
pub fn budget_fields(strategy: &str, pool: &str, b: &BudgetYear) -> Vec<String> {
    vec![
        strategy.to_string(),
        pool.to_string(),
        b.year.to_string(),
        if b.available.is_finite() { num(b.available, 2) } else { columns::budget::UNLIMITED.into() },
        num(b.spent, 2),
        if b.available.is_finite() { num(b.unspent(), 2) } else { String::new() },
        num(b.carried, 2),
        opt_num(b.available_ha, 2),
        num(b.treated_ha, 2),
        opt_num(b.unspent_ha(), 2),
    ]
}

/// Header of `delay.csv`.
pub fn delay_header() -> Vec<String> {
    columns::owned(&columns::delay::COLUMNS)
}

/// Header of `nodes.csv`.
pub fn nodes_header(contaminants: &[Contaminant]) -> Vec<String> {
    columns::nodes::columns(&names(contaminants))
}

/// Fields of one `nodes.csv` row.
pub fn node_fields(node_id: &str, strategy: &str, upstream: usize, y: &NodeYear, contaminants: &[Contaminant]) -> Vec<String> {
    let mut f = vec![
        node_id.to_string(),
        strategy.to_string(),
        y.year.to_string(),
        upstream.to_string(),
        num(y.area_ha, 3),
        num(y.yield_m3, 1),
        num(y.baseline_yield_m3, 1),
        opt_num(y.yield_change_pct(), 4),
    ];
    for k in 0..contaminants.len() {
        f.push(num(y.loads_kg_per_yr[k], 3));
        f.push(y.concentrations[k].map(|v| num(v, 5)).unwrap_or_default());
    }
    f.push(concentration_flags(&y.concentrations, contaminants));
    f
}

/// Writes `run_info.json` ([`crate::schema::run_info`]: a run's [`RunInfo`](crate::schema::run_info::RunInfo)
/// or a calibration's [`FitRunInfo`](crate::schema::run_info::FitRunInfo)), atomically.
pub fn write_run_info(dir: &Path, info: &impl serde::Serialize) -> Result<()> {
    let text = crate::schema::run_info::to_json(info)?;
    crate::output::outdir::write_atomic(&dir.join(crate::schema::RUN_INFO_FILE), text.as_bytes())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_concentration_above_the_ceiling_is_an_empty_cell_and_a_flag() {
        use crate::model::cover::ClassAreas;
        use crate::model::dilution::{ConcentrationDischarge, ScreenedFlag};
        let m = |name: &str| Contaminant {
            name: name.into(),
            open_export_kg_per_ha_yr: 1.0,
            forest_export_kg_per_ha_yr: 1.0,
            guideline_mg_per_l: None,
            cq: ConcentrationDischarge::PURE_DILUTION,
        };
        let contaminants = [m("no3"), m("srp"), m("ecoli")];
        let c = Catchment {
            id: "a".into(),
            name: "A".into(),
            area_ha: 10.0,
            rain_mm: 1000.0,
            pet_mm: 800.0,
            pet_forest_mm: None,
            vulnerable_ha: 0.0,
            infested: ClassAreas::default(),
            stand_ages_ha: None,
            forest_ha: 0.0,
            flows_to: None,
            point_kg_per_yr: vec![0.0; 3],
            curves: None,
        };
        let y = YearResult {
            year: 2030,
            rain_mm: 300.0,
            pet_mm: 800.0,
            et_mm: 298.0,
            yield_mm: 2.0,
            yield_m3: 200.0,
            baseline_yield_mm: 2.0,
            uninvaded_yield_mm: 2.0,
            canopy_fraction: 0.0,
            classes: ClassAreas::default(),
            new_infestation_ha: 0.0,
            loads_kg_per_yr: vec![10.0, 1.0, 2.0],
            mean_volume_m3: 2000.0,
            mean_loads_kg_per_yr: vec![10.0, 1.0, 2.0],
            concentrations: vec![Err(ScreenedFlag::AboveCeiling), Ok(5.0), Err(ScreenedFlag::LowRunoff)],
            uninvaded_loads_kg_per_yr: vec![10.0, 1.0, 2.0],
            uninvaded_concentrations: vec![Ok(1.0), Ok(5.0), Err(ScreenedFlag::LowRunoff)],
        };
        let f = yearly_fields(&c, "no-control", &y, &ControlCells::default(), &contaminants);
        let header = yearly_header(&contaminants);
        assert_eq!(f.len(), header.len());
        let cell = |col: &str| f[header.iter().position(|h| h == col).unwrap()].as_str();
        assert_eq!(cell("no3_mg_per_l"), "");
        assert_eq!(cell("srp_mg_per_l"), "5.00000");
        assert_eq!(cell("ecoli_mg_per_l"), "");
        assert_eq!(cell(columns::FLAGS), "above-ceiling:no3;low-runoff:ecoli");
    }

    /// The hand quoting this crate used before it wrote through the csv crate:
    /// quote a field holding a comma, quote, CR or LF; double the quotes.
    fn hand_quoted(fields: &[&str]) -> String {
        let mut out = String::new();
        for (i, f) in fields.iter().enumerate() {
            if i > 0 {
                out.push(',');
            }
            if f.bytes().any(|b| matches!(b, b',' | b'"' | b'\n' | b'\r')) {
                out.push('"');
                out.push_str(&f.replace('"', "\"\""));
                out.push('"');
            } else {
                out.push_str(f);
            }
        }
        out.push('\n');
        out
    }

    fn encoded(rows: &[Vec<&str>]) -> String {
        let width = rows.first().map_or(0, Vec::len);
        let mut w = CsvOut::in_memory(width);
        for r in rows {
            w.row(r).unwrap();
        }
        String::from_utf8(w.into_rows().unwrap().0).unwrap()
    }

    #[test]
    fn quotes_exactly_what_the_hand_quoting_did() {
        let awkward = [
            "",
            "plain",
            "a,b",
            "say \"hi\"",
            "two\nlines",
            "cr\rhere",
            "crlf\r\n",
            " padded ",
            "tab\there",
            "semi;colon",
            "'single'",
            "#hash",
            "Lac Tekapō",
            "−12.5",
            "\"",
            ",",
            "=1+1",
            "back\\slash",
        ];
        // Every field in every position, and rows of two and three fields.
        for a in awkward {
            for b in awkward {
                let row = vec![a, b, "x"];
                assert_eq!(encoded(std::slice::from_ref(&row)), hand_quoted(&row), "{row:?}");
                let row = vec!["x", a, b];
                assert_eq!(encoded(std::slice::from_ref(&row)), hand_quoted(&row), "{row:?}");
            }
        }
        // Rows that are all empty fields are written as separators only.
        assert_eq!(encoded(&[vec!["", "", ""]]), ",,\n");
    }

    #[test]
    fn a_lone_empty_field_is_quoted_so_it_reads_back() {
        // The hand quoting wrote a bare line end, which a reader skips as a
        // blank line; the csv crate writes `""`, one empty field. No table of
        // this crate has a single column, so no output changes.
        assert_eq!(encoded(&[vec![""]]), "\"\"\n");
        let mut r = csv::ReaderBuilder::new().has_headers(false).from_reader("\"\"\n".as_bytes());
        let rec = r.records().next().unwrap().unwrap();
        assert_eq!(rec.len(), 1);
        assert_eq!(&rec[0], "");
    }

    #[test]
    fn rows_in_memory_append_and_width() {
        let tmp = tempfile::tempdir().unwrap();
        let path = tmp.path().join("t.csv");
        let mut w = CsvOut::create(&path, &["a", "b"]).unwrap();
        let mut m = CsvOut::in_memory(2);
        m.row(["1", "x,y"]).unwrap();
        w.write_rows(&m.into_rows().unwrap()).unwrap();
        w.row(["2", "z"]).unwrap();
        w.finish().unwrap();
        let mut a = CsvOut::append(&path, 2).unwrap();
        a.row(["3", ""]).unwrap();
        let e = a.row(["4"]).unwrap_err().to_string();
        assert!(e.contains("t.csv") && e.contains("1 fields where the header has 2"), "{e}");
        drop(a);
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "a,b\n1,\"x,y\"\n2,z\n3,\n4\n");
        let e = CsvOut::create(&tmp.path().join("no/such/dir.csv"), &["a"]).err().unwrap().to_string();
        assert!(e.contains("dir.csv"), "{e}");
    }
}
