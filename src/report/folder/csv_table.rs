//! A CSV file of a run folder read whole or streamed, with column lookup by name
//! and located problems (file, spreadsheet row, column).

use crate::error::{Error, Problem, Result};
use std::path::{Path, PathBuf};

/// Most problems listed per file before the rest are summarised.
pub const MAX_PROBLEMS: usize = 25;

/// A CSV file read whole, with column lookup by name.
#[derive(Debug, Clone)]
pub struct CsvTable {
    /// Path on disk.
    pub path: PathBuf,
    /// Name relative to the run folder (e.g. `summary.csv`), used in provenance.
    pub name: String,
    /// Header names.
    pub headers: Vec<String>,
    /// Records.
    pub rows: Vec<csv::StringRecord>,
    /// Spreadsheet row of each record (header = 1).
    pub lines: Vec<usize>,
    /// Numbers use a decimal comma (a `;`-separated input table).
    pub decimal_comma: bool,
}

impl CsvTable {
    /// Reads `dir/rel` whole; `Ok(None)` when the file does not exist.
    pub fn read(dir: &Path, rel: &str) -> Result<Option<CsvTable>> {
        Self::read_filtered(dir, rel, |_, _| true)
    }

    /// Reads `dir/rel` as a stream, keeping only the records `keep` accepts
    /// (called with the header and each well-formed record, so it can also count
    /// what it does not keep). Memory grows with the rows kept, not the file.
    pub fn read_filtered(dir: &Path, rel: &str, mut keep: impl FnMut(&[String], &csv::StringRecord) -> bool) -> Result<Option<CsvTable>> {
        let path = dir.join(rel);
        if !path.is_file() {
            return Ok(None);
        }
        let file = std::fs::File::open(&path).map_err(|e| Error::io(format!("reading {}", path.display()), e))?;
        let mut rd =
            csv::ReaderBuilder::new().has_headers(true).flexible(true).from_reader(std::io::BufReader::with_capacity(1 << 16, file));
        let headers: Vec<String> = rd
            .headers()
            .map_err(|e| Error::invalid(Problem::in_file(&path, format!("cannot read the header: {e}")).row(1)))?
            .iter()
            .enumerate()
            .map(|(i, h)| if i == 0 { h.trim_start_matches('\u{feff}').trim().to_string() } else { h.trim().to_string() })
            .collect();
        let mut rows = Vec::new();
        let mut lines = Vec::new();
        let mut problems = Vec::new();
        let mut rec = csv::StringRecord::new();
        loop {
            match rd.read_record(&mut rec) {
                Ok(false) => break,
                Ok(true) => {
                    let line = rec.position().map_or(0, |p| p.line() as usize);
                    if rec.iter().all(|f| f.trim().is_empty()) {
                        continue;
                    }
                    if rec.len() != headers.len() {
                        problems.push(
                            Problem::in_file(&path, format!("has {} fields where the header has {}", rec.len(), headers.len())).row(line),
                        );
                    } else if keep(&headers, &rec) {
                        lines.push(line);
                        rows.push(rec.clone());
                    }
                }
                Err(e) => {
                    let line = e.position().map(|p| p.line() as usize);
                    let msg = match e.kind() {
                        csv::ErrorKind::Utf8 { .. } => "is not UTF-8 text".to_string(),
                        _ => format!("is not valid CSV: {e}"),
                    };
                    let mut p = Problem::in_file(&path, msg);
                    if let Some(l) = line {
                        p = p.row(l);
                    }
                    problems.push(p);
                    if !matches!(e.kind(), csv::ErrorKind::Utf8 { .. }) {
                        break;
                    }
                }
            }
            if problems.len() >= MAX_PROBLEMS {
                break;
            }
        }
        if !problems.is_empty() {
            return Err(Error::Invalid(problems));
        }
        Ok(Some(CsvTable { path, name: rel.to_string(), headers, rows, lines, decimal_comma: false }))
    }

    /// Reads a copied input table (`inputs/…`) with the reader the run used for it
    /// ([`crate::input::table::read_table`]: BOM, CRLF, `;` and decimal commas, blank
    /// rows), so any table the run accepted can be shown.
    pub fn read_input(dir: &Path, rel: &str) -> Result<Option<CsvTable>> {
        let path = dir.join(rel);
        if !path.is_file() {
            return Ok(None);
        }
        let t = crate::input::table::read_table(&path).map_err(Error::Invalid)?;
        let (lines, rows) = t.rows.into_iter().unzip();
        Ok(Some(CsvTable { path, name: rel.to_string(), headers: t.headers, rows, lines, decimal_comma: t.semicolon }))
    }

    /// A number as the input table writes it (decimal comma allowed in `;` tables).
    pub fn input_number(&self, r: usize, c: usize) -> Option<f64> {
        crate::input::table::parse_number(self.text(r, c), self.decimal_comma).ok().filter(|v| v.is_finite())
    }

    /// Index of column `name`.
    pub fn col(&self, name: &str) -> Option<usize> {
        self.headers.iter().position(|h| h == name)
    }

    /// Indices of the named columns; a problem for each that is missing.
    pub fn require(&self, names: &[&str], problems: &mut Vec<Problem>) -> Vec<usize> {
        names
            .iter()
            .map(|n| {
                self.col(n).unwrap_or_else(|| {
                    problems.push(Problem::in_file(&self.path, format!("has no column '{n}'")).row(1).column(*n));
                    usize::MAX
                })
            })
            .collect()
    }

    /// Trimmed text of a cell (empty for a missing column).
    pub fn text(&self, r: usize, c: usize) -> &str {
        self.rows[r].get(c).map(str::trim).unwrap_or("")
    }

    /// A number cell: `None` when empty; a problem when not a finite number.
    pub fn num(&self, r: usize, c: usize, problems: &mut Vec<Problem>) -> Option<f64> {
        let t = self.text(r, c);
        if t.is_empty() || c == usize::MAX {
            return None;
        }
        match t.parse::<f64>() {
            Ok(v) if v.is_finite() => Some(v),
            _ => {
                if problems.len() < MAX_PROBLEMS {
                    problems.push(
                        Problem::in_file(&self.path, format!("'{t}' is not a number"))
                            .row(self.lines[r])
                            .column(self.headers.get(c).cloned().unwrap_or_default()),
                    );
                }
                None
            }
        }
    }

    /// A number cell that must be present.
    pub fn req_num(&self, r: usize, c: usize, problems: &mut Vec<Problem>) -> f64 {
        match self.num(r, c, problems) {
            Some(v) => v,
            None => {
                if self.text(r, c).is_empty() && problems.len() < MAX_PROBLEMS && c != usize::MAX {
                    problems.push(
                        Problem::in_file(&self.path, "is empty; a number is required")
                            .row(self.lines[r])
                            .column(self.headers.get(c).cloned().unwrap_or_default()),
                    );
                }
                f64::NAN
            }
        }
    }

    /// A whole-number cell (a year): `None` when empty.
    pub fn int(&self, r: usize, c: usize, problems: &mut Vec<Problem>) -> Option<i32> {
        let v = self.num(r, c, problems)?;
        if v.fract() == 0.0 && v.abs() < 1e6 {
            Some(v as i32)
        } else {
            problems.push(
                Problem::in_file(&self.path, format!("'{}' is not a whole number", self.text(r, c)))
                    .row(self.lines[r])
                    .column(self.headers.get(c).cloned().unwrap_or_default()),
            );
            None
        }
    }
}
