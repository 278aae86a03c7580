//! Reading hand-made CSV tables robustly: delimiter and BOM sniffing, header maps,
//! spreadsheet row numbers, number parsing with helpful hints, and collecting every
//! problem in a file rather than stopping at the first.

use crate::error::Problem;
use std::collections::HashMap;
use std::io::Read;
use std::path::{Path, PathBuf};

/// Largest input table accepted, bytes (512 MiB). Anything bigger is refused
/// before a byte of it is read.
pub const MAX_TABLE_BYTES: u64 = 512 * 1024 * 1024;

const MIB: u64 = 1024 * 1024;

/// A CSV table read into memory with its header map.
#[derive(Debug)]
pub struct Table {
    /// The file it came from.
    pub path: PathBuf,
    /// Column names as given (trimmed).
    pub headers: Vec<String>,
    index: HashMap<String, usize>,
    /// Data rows with their spreadsheet row number (header = 1).
    pub rows: Vec<(usize, csv::StringRecord)>,
    /// True when the file used `;` as the delimiter (decimal commas then accepted).
    pub semicolon: bool,
}

/// Reads a CSV file. Handles a UTF-8 BOM, CRLF line ends, blank rows and a
/// semicolon delimiter (sniffed from the header line).
///
/// Only regular files are read (a device or pipe named by mistake could be
/// endless), and never more than [`MAX_TABLE_BYTES`].
pub fn read_table(path: &Path) -> Result<Table, Vec<Problem>> {
    let bytes = read_limited(path, MAX_TABLE_BYTES, "tables", "a CSV file").map_err(|p| vec![p])?;
    parse_table(path, &bytes)
}

/// Reads a whole regular file of at most `max_bytes`, refusing folders, devices,
/// pipes and oversized files before reading them. `what` names the kind of file
/// in messages ("tables"), `expected` what it should be ("a CSV file").
pub fn read_limited(path: &Path, max_bytes: u64, what: &str, expected: &str) -> Result<Vec<u8>, Problem> {
    let meta = std::fs::metadata(path).map_err(|e| Problem::in_file(path, format!("cannot read the file: {e}")))?;
    if meta.is_dir() {
        return Err(Problem::in_file(path, format!("is a folder, not {expected}")));
    }
    if !meta.is_file() {
        return Err(Problem::in_file(path, format!("is not a regular file (a device or pipe?); expected {expected}")));
    }
    if meta.len() > max_bytes {
        return Err(Problem::in_file(path, too_big(meta.len(), max_bytes, what)));
    }
    let file = std::fs::File::open(path).map_err(|e| Problem::in_file(path, format!("cannot read the file: {e}")))?;
    let mut bytes = Vec::with_capacity(meta.len() as usize);
    // The file may grow between the size check and the read: never take more than the limit.
    file.take(max_bytes + 1).read_to_end(&mut bytes).map_err(|e| Problem::in_file(path, format!("cannot read the file: {e}")))?;
    if bytes.len() as u64 > max_bytes {
        return Err(Problem::in_file(path, too_big(bytes.len() as u64, max_bytes, what)));
    }
    Ok(bytes)
}

fn too_big(len: u64, max_bytes: u64, what: &str) -> String {
    let size = if len >= 10 * MIB { format!("{} MiB", len / MIB) } else { format!("{len} bytes") };
    let limit = if max_bytes >= MIB { format!("{} MiB", max_bytes / MIB) } else { format!("{max_bytes} bytes") };
    format!("file is {size}; {what} larger than {limit} are refused (is this the right file?)")
}

/// Parses CSV bytes as [`read_table`] does (exposed for tests and fuzzing).
pub fn parse_table(path: &Path, bytes: &[u8]) -> Result<Table, Vec<Problem>> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    let text = std::str::from_utf8(bytes).map_err(|e| {
        let line = bytes[..e.valid_up_to()].iter().filter(|&&b| b == b'\n').count() + 1;
        let hint = if bytes.starts_with(b"\xFF\xFE") || bytes.starts_with(b"\xFE\xFF") {
            "is UTF-16 text; save it as CSV UTF-8"
        } else if bytes.starts_with(b"PK\x03\x04") {
            "is a zip archive (an .xlsx workbook?); export the sheet as CSV UTF-8"
        } else {
            "is not UTF-8 text (save it as CSV UTF-8)"
        };
        vec![Problem::in_file(path, hint).row(line)]
    })?;
    if text.trim().is_empty() {
        return Err(vec![Problem::in_file(path, "is empty: expected a header row and at least one data row")]);
    }
    let first_line = text.lines().find(|l| !l.trim().is_empty()).unwrap_or("");
    let semicolon = first_line.contains(';') && !first_line.contains(',');
    if !first_line.contains(';') && !first_line.contains(',') && first_line.contains('\t') {
        return Err(vec![Problem::in_file(
            path,
            "the header row is separated by tabs; save the sheet as CSV (comma- or semicolon-separated)",
        )
        .row(1)]);
    }
    let delimiter = if semicolon { b';' } else { b',' };
    let mut reader = csv::ReaderBuilder::new().delimiter(delimiter).flexible(true).trim(csv::Trim::All).from_reader(text.as_bytes());
    let headers: Vec<String> = match reader.headers() {
        Ok(h) => h.iter().map(|s| s.trim().to_string()).collect(),
        Err(e) => return Err(vec![Problem::in_file(path, format!("cannot read the header row: {e}")).row(1)]),
    };
    let mut problems = Vec::new();
    let mut index = HashMap::new();
    for (i, h) in headers.iter().enumerate() {
        if h.is_empty() {
            continue;
        }
        if index.insert(h.clone(), i).is_some() {
            problems.push(Problem::in_file(path, "column appears more than once in the header").row(1).column(h.clone()));
        }
    }
    let mut rows = Vec::new();
    let mut counter = RowCounter::new(text.as_bytes(), delimiter);
    for rec in reader.records() {
        match rec {
            Ok(r) => {
                let line = r.position().map(|p| counter.row_at(p.byte() as usize)).unwrap_or(0);
                if r.iter().all(|f| f.trim().is_empty()) {
                    continue;
                }
                // Spreadsheets often export trailing empty cells past the last named column.
                if r.len() > headers.len() && r.iter().skip(headers.len()).any(|f| !f.trim().is_empty()) {
                    let hint = if semicolon {
                        ""
                    } else {
                        " (an unquoted decimal comma or thousands separator, e.g. 12,5 or 1,200, splits a number in two)"
                    };
                    problems.push(
                        Problem::in_file(path, format!("row has {} fields but the header has {}{hint}", r.len(), headers.len())).row(line),
                    );
                    continue;
                }
                rows.push((line, r));
            }
            Err(e) => {
                let line = e.position().map(|p| counter.row_at(p.byte() as usize)).unwrap_or(0);
                problems.push(Problem::in_file(path, format!("malformed CSV: {e}")).row(line));
            }
        }
    }
    if rows.is_empty() && problems.is_empty() {
        problems.push(Problem::in_file(path, "has a header but no data rows").row(1));
    }
    if problems.is_empty() {
        Ok(Table { path: path.to_path_buf(), headers, index, rows, semicolon })
    } else {
        Err(problems)
    }
}

/// Spreadsheet row of a record from the byte offset the csv reader reports.
///
/// A spreadsheet shows one row per line of the file, blank lines included, except
/// that a line break inside a quoted cell (a multi-line note) stays in its row.
/// `csv`'s own `Position::line` skips blank lines and counts breaks inside quotes,
/// so rows are counted here: every line end (`\n`, `\r\n` or a lone `\r`) outside
/// quotes starts a new row. The scan follows the quoting rule of the csv reader: a
/// quote opens a quoted cell only as the first character of a field.
struct RowCounter<'a> {
    bytes: &'a [u8],
    delimiter: u8,
    pos: usize,
    row: usize,
    state: Scan,
}

#[derive(Clone, Copy, PartialEq)]
enum Scan {
    FieldStart,
    Unquoted,
    Quoted,
    QuoteInQuoted,
}

impl<'a> RowCounter<'a> {
    fn new(bytes: &'a [u8], delimiter: u8) -> Self {
        RowCounter { bytes, delimiter, pos: 0, row: 1, state: Scan::FieldStart }
    }

    /// Row (1-based) where the record reported at `byte` starts. Offsets should not
    /// decrease; if one does, counting restarts from the top.
    fn row_at(&mut self, byte: usize) -> usize {
        let n = self.bytes.len();
        let mut start = byte.min(n);
        // The reported offset can sit before the record's own line end (CRLF) or blank lines.
        while start < n && matches!(self.bytes[start], b'\r' | b'\n') {
            start += 1;
        }
        if start < self.pos {
            *self = RowCounter::new(self.bytes, self.delimiter);
        }
        for i in self.pos..start {
            let b = self.bytes[i];
            self.state = match (self.state, b) {
                (Scan::Quoted, b'"') => Scan::QuoteInQuoted,
                (Scan::Quoted, _) => Scan::Quoted,
                (Scan::QuoteInQuoted, b'"') => Scan::Quoted,
                (Scan::FieldStart, b'"') => Scan::Quoted,
                (_, b'\n') => {
                    self.row += 1;
                    Scan::FieldStart
                }
                (_, b'\r') => {
                    if self.bytes.get(i + 1) != Some(&b'\n') {
                        self.row += 1;
                    }
                    Scan::FieldStart
                }
                (_, d) if d == self.delimiter => Scan::FieldStart,
                _ => Scan::Unquoted,
            };
        }
        self.pos = start;
        // A record always begins at a field start; resynchronise after malformed input.
        self.state = Scan::FieldStart;
        self.row
    }
}

impl Table {
    /// Column index of `name`, if present.
    pub fn col(&self, name: &str) -> Option<usize> {
        self.index.get(name).copied()
    }

    /// Checks that every header is known and every required column present.
    /// `known` lists all valid names; `is_known` may accept patterned names too.
    ///
    /// A column with no name is accepted when all its cells are empty (spreadsheets
    /// export such trailing columns); otherwise it is reported by its position and
    /// spreadsheet letter. A missing required column names the unknown header that
    /// is probably meant for it.
    pub fn check_columns(&self, required: &[&str], known: &[&str], is_known: impl Fn(&str) -> bool) -> Vec<Problem> {
        let mut problems = Vec::new();
        let mut unknown: Vec<&str> = Vec::new();
        for (i, h) in self.headers.iter().enumerate() {
            if h.is_empty() {
                let filled = self.rows.iter().find(|(_, r)| r.get(i).is_some_and(|f| !f.trim().is_empty()));
                if let Some((line, _)) = filled {
                    problems.push(
                        Problem::in_file(
                            &self.path,
                            format!(
                                "column {} ({}) has values (first on row {line}) but no name in the header; name it or delete it",
                                i + 1,
                                column_letter(i)
                            ),
                        )
                        .row(1),
                    );
                }
            } else if !known.contains(&h.as_str()) && !is_known(h) {
                unknown.push(h);
                problems.push(Problem::in_file(&self.path, format!("unknown column{}", suggestion(h, known))).row(1).column(h.clone()));
            }
        }
        for r in required {
            if self.col(r).is_none() {
                let hint = match nearest(r, &unknown) {
                    Some(u) => format!(" (is '{u}' meant to be this column?)"),
                    None => String::new(),
                };
                problems.push(Problem::in_file(&self.path, format!("required column is missing from the header{hint}")).row(1).column(*r));
            }
        }
        problems
    }

    /// Trimmed text of a cell (empty when the column is absent or the row is short).
    pub fn text<'a>(&self, rec: &'a csv::StringRecord, col: &str) -> &'a str {
        self.col(col).and_then(|i| rec.get(i)).map(str::trim).unwrap_or("")
    }

    /// Parses a numeric cell. Empty cells give `Ok(None)`.
    pub fn number(&self, line: usize, rec: &csv::StringRecord, col: &str) -> Result<Option<f64>, Problem> {
        let s = self.text(rec, col);
        if s.is_empty() {
            return Ok(None);
        }
        parse_number(s, self.semicolon).map(Some).map_err(|m| Problem::in_file(&self.path, m).row(line).column(col))
    }

    /// A required numeric cell within `lo..=hi` (unit named in messages).
    #[allow(clippy::too_many_arguments)]
    pub fn required_in(
        &self,
        line: usize,
        rec: &csv::StringRecord,
        col: &str,
        lo: f64,
        hi: f64,
        unit: &str,
        problems: &mut Vec<Problem>,
    ) -> Option<f64> {
        match self.number(line, rec, col) {
            Ok(Some(v)) => self.in_range(line, col, v, lo, hi, unit, problems),
            Ok(None) => {
                problems.push(
                    Problem::in_file(&self.path, format!("value is missing; expected a number in {}", range_text(lo, hi, unit)))
                        .row(line)
                        .column(col),
                );
                None
            }
            Err(mut p) => {
                p.message.push_str(&format!("; expected a number in {}", range_text(lo, hi, unit)));
                problems.push(p);
                None
            }
        }
    }

    /// A required numeric cell that must be more than 0 and at most `hi`.
    pub fn required_positive(
        &self,
        line: usize,
        rec: &csv::StringRecord,
        col: &str,
        hi: f64,
        unit: &str,
        problems: &mut Vec<Problem>,
    ) -> Option<f64> {
        let allowed = format!("more than 0 and at most {} {unit}", group_thousands(hi));
        match self.number(line, rec, col) {
            Ok(Some(v)) if v > 0.0 && v <= hi => Some(v),
            Ok(Some(v)) => {
                problems.push(
                    Problem::in_file(&self.path, format!("{} is out of range; allowed {allowed}", fmt_value(v))).row(line).column(col),
                );
                None
            }
            Ok(None) => {
                problems.push(Problem::in_file(&self.path, format!("value is missing; expected a number {allowed}")).row(line).column(col));
                None
            }
            Err(mut p) => {
                p.message.push_str(&format!("; expected a number {allowed}"));
                problems.push(p);
                None
            }
        }
    }

    /// An optional numeric cell within `lo..=hi`.
    #[allow(clippy::too_many_arguments)]
    pub fn optional_in(
        &self,
        line: usize,
        rec: &csv::StringRecord,
        col: &str,
        lo: f64,
        hi: f64,
        unit: &str,
        problems: &mut Vec<Problem>,
    ) -> Option<f64> {
        match self.number(line, rec, col) {
            Ok(Some(v)) => self.in_range(line, col, v, lo, hi, unit, problems),
            Ok(None) => None,
            Err(mut p) => {
                p.message.push_str(&format!("; expected a number in {} (or an empty cell)", range_text(lo, hi, unit)));
                problems.push(p);
                None
            }
        }
    }

    #[allow(clippy::too_many_arguments)]
    fn in_range(&self, line: usize, col: &str, v: f64, lo: f64, hi: f64, unit: &str, problems: &mut Vec<Problem>) -> Option<f64> {
        if v < lo || v > hi {
            let msg = format!("{} is out of range; allowed {}{}", fmt_value(v), range_text(lo, hi, unit), percent_hint(v, unit));
            problems.push(Problem::in_file(&self.path, msg).row(line).column(col));
            None
        } else {
            Some(v)
        }
    }
}

/// " (it looks like a percentage: write 0.45 for 45%)" for a fraction above 1 and
/// at most 100; empty otherwise.
pub fn percent_hint(v: f64, unit: &str) -> String {
    if unit == "fraction" && v > 1.0 && v <= 100.0 {
        format!(" (it looks like a percentage: write {} for {}%)", fmt_value(v / 100.0), fmt_value(v))
    } else {
        String::new()
    }
}

/// Spreadsheet column letter of a 0-based column index (0 → A, 26 → AA).
pub fn column_letter(index: usize) -> String {
    let mut n = index + 1;
    let mut s = Vec::new();
    while n > 0 {
        let r = (n - 1) % 26;
        s.push(b'A' + r as u8);
        n = (n - 1) / 26;
    }
    s.reverse();
    String::from_utf8(s).unwrap_or_default()
}

/// Formats a number for messages without trailing noise.
pub fn fmt_value(v: f64) -> String {
    let s = format!("{v}");
    if s.len() > 12 {
        format!("{v:.6}")
    } else {
        s
    }
}

/// A whole number of 10 000 or more with thin-space-free digit groups of three
/// (`20 000`, as the documentation writes them); other numbers as [`fmt_value`].
pub fn group_thousands(v: f64) -> String {
    if v.fract() != 0.0 || v.abs() < 10_000.0 || v.abs() >= 1e15 {
        return fmt_value(v);
    }
    let digits = format!("{}", v.abs() as u64);
    let mut out = String::new();
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i) % 3 == 0 {
            out.push(' ');
        }
        out.push(c);
    }
    if v < 0.0 {
        format!("-{out}")
    } else {
        out
    }
}

/// "0 to 10 000 mm/yr" style range text.
pub fn range_text(lo: f64, hi: f64, unit: &str) -> String {
    let u = if unit.is_empty() { String::new() } else { format!(" {unit}") };
    if hi.is_infinite() {
        format!("{} or more{u}", group_thousands(lo))
    } else {
        format!("{} to {}{u}", group_thousands(lo), group_thousands(hi))
    }
}

/// Parses a number written by a person, with a hint for common slips.
///
/// Accepts plain decimal numbers (and a decimal comma when `decimal_comma` is set).
/// Rejects NaN and infinities, percent signs, units and thousands separators with
/// a message saying how to write the value.
pub fn parse_number(s: &str, decimal_comma: bool) -> Result<f64, String> {
    let t = s.trim();
    let candidate = if decimal_comma && t.matches(',').count() == 1 && !t.contains('.') { t.replace(',', ".") } else { t.to_string() };
    match candidate.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        Ok(_) => Err(format!("'{t}' is not a finite number (NaN and infinity are not allowed)")),
        Err(_) => Err(number_hint(t, decimal_comma)),
    }
}

/// Characters people (and spreadsheets) put between digit groups.
const GROUP_SEPARATORS: [char; 5] = [' ', '\u{a0}', '\u{202f}', '\u{2009}', '\''];

fn number_hint(t: &str, decimal_comma: bool) -> String {
    let parses = |s: &str| parse_number(s, decimal_comma).is_ok();
    if let Some(p) = t.strip_suffix('%') {
        if p.trim().parse::<f64>().is_ok() {
            return format!("'{t}' has a percent sign; write a plain number (a fraction 0–1 where a fraction is asked)");
        }
    }
    let lower = t.to_ascii_lowercase();
    if lower.starts_with('#') {
        return format!("'{t}' is a spreadsheet error value; fix the formula in the sheet and export again");
    }
    if matches!(lower.as_str(), "na" | "n/a" | "-" | "--" | "?" | "none" | "null" | "missing" | "unknown" | "x") {
        return format!("'{t}' is not a number; give a value (optional columns may be left empty)");
    }
    if let Some(rest) = t.strip_prefix(['\u{2212}', '\u{2013}', '\u{2014}']) {
        if parses(rest) {
            return format!("'{t}' starts with a typographic dash; write -{rest} with the ASCII minus sign");
        }
    }
    if t.contains(GROUP_SEPARATORS) {
        let plain: String = t.chars().filter(|c| !GROUP_SEPARATORS.contains(c)).collect();
        if parses(&plain) {
            return format!("'{t}' has a space or apostrophe between digit groups; write {plain}");
        }
    }
    if t.contains(',') {
        let commas = t.matches(',').count();
        if decimal_comma {
            // Semicolon file: the decimal comma is fine; a dot can only group thousands.
            if t.contains('.') {
                let plain = t.replace('.', "");
                if parses(&plain) {
                    return format!("'{t}' uses '.' between digit groups; write {plain} (no thousands separator)");
                }
            }
        } else if t.contains('.') {
            let (comma, dot) = (t.rfind(',').unwrap_or(0), t.rfind('.').unwrap_or(0));
            if dot > comma && t.replace(',', "").parse::<f64>().is_ok() {
                return format!("'{t}' has a thousands separator; write {}", t.replace(',', ""));
            }
            let european = t.replace('.', "").replace(',', ".");
            if european.parse::<f64>().is_ok() {
                return format!("'{t}' uses '.' between digit groups and a decimal comma; write {european}");
            }
        } else if commas == 1 {
            let dotted = t.replace(',', ".");
            let plain = t.replace(',', "");
            let (before, after) = t.split_once(',').unwrap_or((t, ""));
            let digits_only = |s: &str| !s.is_empty() && s.trim_start_matches(['-', '+']).chars().all(|c| c.is_ascii_digit());
            if digits_only(before) && after.len() == 3 && digits_only(after) && before.trim_start_matches(['-', '+']).len() <= 3 {
                return format!(
                    "'{t}' has a comma: write {plain} if it separates thousands, or {dotted} if it is a decimal comma \
                     (or give the whole file ';' separators)"
                );
            }
            if dotted.parse::<f64>().is_ok() {
                return format!("'{t}' uses a decimal comma; write {dotted} (decimal point), or give the whole file ';' separators");
            }
        } else {
            let plain = t.replace(',', "");
            if plain.parse::<f64>().is_ok() {
                return format!("'{t}' has a thousands separator; write {plain}");
            }
        }
    }
    let digits: String = t.chars().take_while(|c| c.is_ascii_digit() || *c == '.' || *c == '-' || *c == '+').collect();
    if !digits.is_empty() && digits.parse::<f64>().is_ok() && digits.len() < t.len() {
        return format!("'{t}' has text after the number; write {digits} (units are given by the column name)");
    }
    format!("'{t}' is not a number")
}

/// The known name nearest to `given` (case-insensitive Damerau–Levenshtein
/// distance at most a third of its length, and at least 2), if any.
///
/// For very long lists (more than [`NEAREST_LIMIT`] names, e.g. the ids of a
/// 100 000-catchment table) no search is made: the cost would grow with every
/// unknown value and the suggestion would rarely help.
pub fn nearest<'a>(given: &str, known: &[&'a str]) -> Option<&'a str> {
    if known.len() > NEAREST_LIMIT || given.chars().count() > 200 {
        return None;
    }
    let lower = given.to_lowercase();
    let limit = (given.chars().count() / 3).max(2);
    known
        .iter()
        .filter(|k| k.chars().count().abs_diff(lower.chars().count()) <= limit)
        .map(|k| (strsim::damerau_levenshtein(&lower, &k.to_lowercase()), *k))
        .min_by_key(|(d, _)| *d)
        .filter(|(d, _)| *d <= limit)
        .map(|(_, k)| k)
}

/// Longest list of names [`nearest`] searches.
pub const NEAREST_LIMIT: usize = 5_000;

/// Most distinct unknown values of one file that get a "did you mean"
/// suggestion; past this the file is probably the wrong one and searching would
/// only cost time.
pub const MAX_SUGGESTIONS: usize = 100;

/// ", did you mean 'x'?" when a close known name exists; the list of valid names
/// when it is short; nothing otherwise.
pub fn suggestion(given: &str, known: &[&str]) -> String {
    match nearest(given, known) {
        Some(k) => format!(" (did you mean '{k}'?)"),
        None if !known.is_empty() && known.len() <= 24 => format!(" (valid: {})", known.join(", ")),
        None => String::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_with_slips_get_hints() {
        assert_eq!(parse_number("12.5", false), Ok(12.5));
        assert_eq!(parse_number("12,5", true), Ok(12.5));
        assert!(parse_number("12,5", false).unwrap_err().contains("decimal comma"));
        assert!(parse_number("45%", false).unwrap_err().contains("percent"));
        assert!(parse_number("1200 mm", false).unwrap_err().contains("write 1200"));
        assert!(parse_number("1,200,000", false).unwrap_err().contains("thousands"));
        assert!(parse_number("NaN", false).unwrap_err().contains("finite"));
        assert!(parse_number("inf", false).unwrap_err().contains("finite"));
    }

    #[test]
    fn ambiguous_and_regional_separators_get_the_right_hint() {
        // "1,250" may be thousands or a decimal comma: both readings are offered.
        let m = parse_number("1,250", false).unwrap_err();
        assert!(m.contains("write 1250 if it separates thousands") && m.contains("1.250 if it is a decimal comma"), "{m}");
        // A dot between digit groups in a semicolon file is not a decimal point.
        let m = parse_number("1.234,5", true).unwrap_err();
        assert!(m.contains("write 1234,5"), "{m}");
        let m = parse_number("1.234,5", false).unwrap_err();
        assert!(m.contains("write 1234.5"), "{m}");
        assert!(parse_number("1,234.5", false).unwrap_err().contains("write 1234.5"));
        assert!(parse_number("1 250", false).unwrap_err().contains("write 1250"));
        assert!(parse_number("\u{2212}5", false).unwrap_err().contains("write -5"));
        assert!(parse_number("#DIV/0!", false).unwrap_err().contains("spreadsheet error"));
        assert!(parse_number("n/a", false).unwrap_err().contains("left empty"));
    }

    #[test]
    fn suggests_near_names() {
        assert_eq!(suggestion("area_hectares", &["area_ha", "rain_mm"]), " (valid: area_ha, rain_mm)");
        assert_eq!(suggestion("rian_mm", &["area_ha", "rain_mm"]), " (did you mean 'rain_mm'?)");
        assert_eq!(suggestion("Rain_MM", &["area_ha", "rain_mm"]), " (did you mean 'rain_mm'?)");
        assert_eq!(suggestion("x", &[]), "");
    }

    #[test]
    fn groups_and_letters() {
        assert_eq!(range_text(1.0, 20_000.0, "mm/yr"), "1 to 20 000 mm/yr");
        assert_eq!(group_thousands(1e9), "1 000 000 000");
        assert_eq!(group_thousands(0.5), "0.5");
        assert_eq!(column_letter(0), "A");
        assert_eq!(column_letter(25), "Z");
        assert_eq!(column_letter(26), "AA");
    }

    #[test]
    fn bom_crlf_semicolon_and_blank_rows() {
        let t = parse_table(Path::new("x.csv"), b"\xEF\xBB\xBFa;b\r\n1,5;2\r\n\r\n;\r\n3;4\r\n").unwrap();
        assert!(t.semicolon);
        assert_eq!(t.headers, vec!["a", "b"]);
        assert_eq!(t.rows.len(), 2);
        assert_eq!(t.rows[1].0, 5);
        assert_eq!(t.number(2, &t.rows[0].1, "a").unwrap(), Some(1.5));
    }

    #[test]
    fn rows_are_counted_as_a_spreadsheet_shows_them() {
        // A quoted cell spanning three lines is one spreadsheet row; blank lines and
        // lone CR line ends are rows too.
        let text = b"id,notes,x\na,\"line one\nline two\nline three\",1\n\nb,plain,2\rc,\"say \"\"hi\"\"\",3\r\n";
        let t = parse_table(Path::new("x.csv"), text).unwrap();
        let rows: Vec<usize> = t.rows.iter().map(|(r, _)| *r).collect();
        assert_eq!(rows, vec![2, 4, 5]);
        // A quote inside an unquoted cell is literal and does not open a quoted cell.
        let t = parse_table(Path::new("x.csv"), b"id,notes\na,6\" trees\nb,ok\n").unwrap();
        assert_eq!(t.rows.iter().map(|(r, _)| *r).collect::<Vec<_>>(), vec![2, 3]);
    }

    #[test]
    fn trailing_empty_cells_and_tabs() {
        let t = parse_table(Path::new("x.csv"), b"a,b,,\n1,2,,\n3,4\n").unwrap();
        assert_eq!(t.rows.len(), 2);
        assert!(t.check_columns(&["a", "b"], &["a", "b"], |_| false).is_empty());
        let t = parse_table(Path::new("x.csv"), b"a,b,\n1,2,3\n").unwrap();
        let p = t.check_columns(&["a", "b"], &["a", "b"], |_| false);
        assert!(p[0].message.contains("column 3 (C) has values"), "{p:?}");
        let e = parse_table(Path::new("x.csv"), b"a,b\n1,2,3\n").unwrap_err();
        assert!(e[0].message.contains("3 fields but the header has 2"), "{e:?}");
        let e = parse_table(Path::new("x.csv"), b"a\tb\n1\t2\n").unwrap_err();
        assert!(e[0].message.contains("tabs"), "{e:?}");
    }
}
