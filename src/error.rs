//! The library's error type.
//!
//! Input problems are collected, not thrown one at a time: a file with ten bad
//! cells yields one [`Error::Invalid`] listing all ten [`Problem`]s, each naming
//! the file, the spreadsheet-style row (header = row 1), the column and what is
//! allowed — or, for a scenario file (TOML), the line and the dotted key, or, for
//! the command line, the option (`option '--shard'`). The command line maps
//! [`Error::Invalid`] to exit code 2.

use std::fmt;
use std::path::{Path, PathBuf};

/// One thing wrong with the user's input, located as precisely as possible.
#[derive(Debug, Clone, PartialEq)]
pub struct Problem {
    /// File the problem is in, if it came from a file.
    pub file: Option<PathBuf>,
    /// Row as a spreadsheet shows it (1-based; the CSV header is row 1), or a TOML line.
    pub row: Option<usize>,
    /// Column (CSV), key (TOML) or command-line option (`--shard`) concerned.
    pub column: Option<String>,
    /// What is wrong and what is allowed.
    pub message: String,
    /// Whether `row` and `column` are a table's row and column, a text file's line
    /// and key, or a command-line option.
    pub place: Place,
}

/// How a problem's position reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Place {
    /// A table cell: `row 3, column 'rain_mm'`.
    #[default]
    Cell,
    /// A key of a scenario file: `line 8, key 'invasion.spread_rate_per_yr'`.
    Key,
    /// A command-line option: `option '--shard'` (the file, if any, is the one the
    /// option names).
    Option,
}

impl Problem {
    /// A problem with only a message.
    pub fn new(message: impl Into<String>) -> Self {
        Problem { file: None, row: None, column: None, message: message.into(), place: Place::Cell }
    }

    /// A problem located in a file.
    pub fn in_file(file: &Path, message: impl Into<String>) -> Self {
        Problem { file: Some(file.to_path_buf()), row: None, column: None, message: message.into(), place: Place::Cell }
    }

    /// Sets the row (spreadsheet numbering).
    pub fn row(mut self, row: usize) -> Self {
        self.row = Some(row);
        self
    }

    /// Sets the column or key.
    pub fn column(mut self, column: impl Into<String>) -> Self {
        self.column = Some(column.into());
        self
    }

    /// Sets the line of a text file (TOML); the problem then reads `line N`.
    pub fn line(mut self, line: usize) -> Self {
        self.row = Some(line);
        self.place = Place::Key;
        self
    }

    /// Sets the dotted key of a scenario file; the problem then reads `key '…'`.
    pub fn key(mut self, key: impl Into<String>) -> Self {
        self.column = Some(key.into());
        self.place = Place::Key;
        self
    }

    /// Sets the command-line option concerned (with its dashes, `--shard`); the
    /// problem then reads `option '--shard'`.
    pub fn option(mut self, option: impl Into<String>) -> Self {
        self.column = Some(option.into());
        self.place = Place::Option;
        self
    }

    /// Sets the file if none is set yet.
    pub fn or_file(mut self, file: &Path) -> Self {
        if self.file.is_none() {
            self.file = Some(file.to_path_buf());
        }
        self
    }
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut wrote = false;
        if let Some(file) = &self.file {
            write!(f, "{}", file.display())?;
            wrote = true;
        }
        let (row, column) = match self.place {
            Place::Cell => ("row", "column"),
            Place::Key => ("line", "key"),
            Place::Option => ("row", "option"),
        };
        if let Some(n) = self.row {
            write!(f, "{}{row} {n}", if wrote { ", " } else { "" })?;
            wrote = true;
        }
        if let Some(col) = &self.column {
            write!(f, "{}{column} '{col}'", if wrote { ", " } else { "" })?;
            wrote = true;
        }
        if wrote {
            write!(f, ": ")?;
        }
        write!(f, "{}", self.message)
    }
}

/// Errors returned by the library.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum Error {
    /// The input is invalid; every problem found is listed.
    #[error("{}", list_problems(.0))]
    Invalid(Vec<Problem>),
    /// Reading or writing a file failed for a reason other than its content.
    #[error("{context}: {source}")]
    Io {
        /// What was being done, naming the file.
        context: String,
        /// The underlying error.
        #[source]
        source: std::io::Error,
    },
    /// Any other failure (not the user's input).
    #[error("{0}")]
    Other(String),
}

impl Error {
    /// One invalid-input problem.
    pub fn invalid(problem: Problem) -> Self {
        Error::Invalid(vec![problem])
    }

    /// An I/O failure with context naming the file.
    pub fn io(context: impl Into<String>, source: std::io::Error) -> Self {
        Error::Io { context: context.into(), source }
    }

    /// True when the error is the user's input (exit code 2).
    pub fn is_invalid_input(&self) -> bool {
        matches!(self, Error::Invalid(_))
    }

    /// The problems, when the error is invalid input.
    pub fn problems(&self) -> &[Problem] {
        match self {
            Error::Invalid(p) => p,
            _ => &[],
        }
    }
}

fn list_problems(problems: &[Problem]) -> String {
    match problems.len() {
        0 => "invalid input".to_string(),
        1 => problems[0].to_string(),
        n => {
            let mut s = format!("{n} problems in the input:");
            for p in problems {
                s.push_str("\n  - ");
                s.push_str(&p.to_string());
            }
            s
        }
    }
}

/// Result alias for library functions.
pub type Result<T> = std::result::Result<T, Error>;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_problem_reads_with_its_place() {
        let cell = Problem::in_file(Path::new("c.csv"), "must be positive").row(3).column("rain_mm");
        assert_eq!(cell.to_string(), "c.csv, row 3, column 'rain_mm': must be positive");
        let key = Problem::in_file(Path::new("s.toml"), "unknown").line(8).key("invasion.x");
        assert_eq!(key.to_string(), "s.toml, line 8, key 'invasion.x': unknown");
        // A command-line option is an option, never a column.
        let opt = Problem::new("1.5 is out of range; allowed 0 to 1").option("--canopy-fraction");
        assert_eq!(opt.to_string(), "option '--canopy-fraction': 1.5 is out of range; allowed 0 to 1");
        assert_eq!(opt.column.as_deref(), Some("--canopy-fraction"));
        let in_file = Problem::in_file(Path::new("s.toml"), "shares one budget").option("--shard");
        assert_eq!(in_file.to_string(), "s.toml, option '--shard': shares one budget");
    }
}
