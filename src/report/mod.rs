//! The run report: `report.html` (self-contained, prints on A4) and `report.md`
//! (figures linked), written from a run folder's own files.
//!
//! [`write_report`] reads `run_info.json`, the CSV tables (`summary.csv`,
//! `yearly.csv`, `nodes.csv`, `budget.csv`, `delay.csv`, and `ensemble.csv` /
//! `sensitivity.csv` when an ensemble was run) and the inputs copied into
//! `inputs/`; draws the figures that need only those tables (catchment comparison,
//! Budyko space, sensitivity, ensemble bands); and writes the two documents. It
//! never recomputes the projection: every number in the report is a cell of one of
//! those files, or a plain statistic of such cells (a mean, a sum, a maximum), so
//! `yieldshift report DIR` regenerates the same report from the same folder.
//!
//! Layout: [`folder`] reads the files, [`content`] decides what the report says,
//! [`doc`] holds it as a document tree, [`html`] and [`markdown`] render that tree,
//! [`figures`] draws the report's own figures.

pub mod base64;
pub mod content;
pub mod doc;
pub mod embed;
pub mod figures;
pub mod fmt;
pub mod folder;
pub mod html;
pub mod markdown;

use crate::error::Result;
use crate::output::outdir::write_atomic;
use crate::plot::Formats;
use std::path::{Path, PathBuf};

/// File name of the HTML report inside the run folder.
pub const HTML_FILE: &str = "report.html";
/// File name of the Markdown report inside the run folder.
pub const MARKDOWN_FILE: &str = "report.md";
/// Largest `report.html` the report is designed to stay under, bytes (5 MB,
/// small enough to e-mail): figures are embedded at report resolution
/// ([`embed`]); the demo's report is tested against it.
pub const MAX_HTML_BYTES: u64 = 5_000_000;

/// What [`write_report`] wrote.
#[derive(Debug, Clone, PartialEq)]
pub struct ReportOutcome {
    /// `DIR/report.html`.
    pub html: PathBuf,
    /// `DIR/report.md`.
    pub markdown: PathBuf,
    /// Figures the report drew (each counted once, whatever the formats).
    pub drawn: usize,
    /// Files of the figures the report drew into `DIR/figures/` (PNG and/or SVG paths).
    pub figures: Vec<PathBuf>,
    /// Figures embedded in the report (file names in `figures/`).
    pub embedded: Vec<String>,
}

/// How the report draws its own figures.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ReportOptions {
    /// Draw the report's figures (catchment comparison, Budyko space, sensitivity,
    /// ensemble ranges); when false the report embeds only figures already there.
    pub figures: bool,
    /// Formats of the figures drawn. The HTML embeds the smaller of the SVG and
    /// the PNG at report resolution ([`embed`]).
    pub formats: Formats,
}

impl ReportOptions {
    /// Figures on, in the formats the run folder already uses
    /// ([`Formats::default_from`]: both when `figures/` is empty).
    pub fn for_folder(run_dir: &Path) -> ReportOptions {
        ReportOptions { figures: true, formats: Formats::default_from(run_dir) }
    }
}

/// How many catchments get their own pages (text, tables, figures) in the report.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CatchmentPages {
    /// The `n` catchments with the largest yield loss at the horizon without control.
    Most(usize),
    /// Every catchment.
    All,
}

impl Default for CatchmentPages {
    /// [`folder::MAX_DETAILED`] catchments.
    fn default() -> CatchmentPages {
        CatchmentPages::Most(folder::MAX_DETAILED)
    }
}

impl CatchmentPages {
    /// The most catchments detailed.
    pub fn limit(self) -> usize {
        match self {
            CatchmentPages::Most(n) => n,
            CatchmentPages::All => usize::MAX,
        }
    }
}

impl std::str::FromStr for CatchmentPages {
    type Err = String;
    /// A whole number (0 for none) or `all`.
    fn from_str(s: &str) -> std::result::Result<CatchmentPages, String> {
        match s.trim() {
            "all" => Ok(CatchmentPages::All),
            t => t
                .parse::<usize>()
                .map(CatchmentPages::Most)
                .map_err(|_| format!("'{s}' is not a number of catchments; give a whole number such as 10, or 'all'")),
        }
    }
}

/// Reads the run folder `run_dir`, draws the report's figures into
/// `run_dir/figures/` (in the formats the folder already uses), and writes
/// `run_dir/report.html` and `run_dir/report.md`.
///
/// # Errors
/// [`Error::Invalid`] when the folder is not a complete run folder (naming each
/// missing file) or a file in it cannot be read as the run wrote it (naming the
/// file, row and column); [`Error::Io`] when writing fails.
pub fn write_report(run_dir: &Path) -> Result<ReportOutcome> {
    write_report_with(run_dir, &ReportOptions::for_folder(run_dir))
}

/// [`write_report`] with explicit options (e.g. no figures for `--figures none`).
pub fn write_report_with(run_dir: &Path, opts: &ReportOptions) -> Result<ReportOutcome> {
    write_report_pages(run_dir, opts, CatchmentPages::default())
}

/// [`write_report_with`], giving own pages to the catchments `pages` selects (the
/// report names those left out and how to include them).
pub fn write_report_pages(run_dir: &Path, opts: &ReportOptions, pages: CatchmentPages) -> Result<ReportOutcome> {
    let data = folder::read_run_with(run_dir, pages.limit())?;
    let drawn = if opts.figures && (opts.formats.png || opts.formats.svg) { figures::draw_all(&data, opts.formats)? } else { Vec::new() };
    // Re-list figures/ so the report embeds what is there now.
    let data = folder::RunData {
        figures: match std::fs::read_dir(run_dir.join("figures")) {
            Ok(rd) => rd.filter_map(|e| e.ok()).map(|e| e.file_name().to_string_lossy().into_owned()).collect(),
            Err(_) => data.figures.clone(),
        },
        ..data
    };
    let document = content::build(&data, &drawn);
    let footer = doc::Text::new().plain(format!(
        "{} — screening report written by yieldshift {} from the run folder's files. Screening-level estimates only: not a substitute for a site hydrological assessment; defer to local regulation and qualified practitioners.",
        data.info.title, data.info.version
    ));
    let html_path = run_dir.join(HTML_FILE);
    let md_path = run_dir.join(MARKDOWN_FILE);
    // Each document through its own temporary file: a failed write never leaves
    // a half-written report in place of a good one.
    write_atomic(&html_path, html::render(&document, run_dir, &footer).as_bytes())?;
    write_atomic(&md_path, markdown::render(&document, &footer).as_bytes())?;
    let embedded = document
        .blocks
        .iter()
        .filter_map(|b| match b {
            doc::Block::Figure { figure, .. } => Some(figure.shown().to_string()),
            _ => None,
        })
        .collect();
    let figdir = run_dir.join("figures");
    let exts: Vec<&str> = [(opts.formats.png, "png"), (opts.formats.svg, "svg")].iter().filter(|x| x.0).map(|x| x.1).collect();
    let figures = drawn.iter().flat_map(|d| exts.iter().map(|e| figdir.join(format!("{}.{e}", d.stem))).collect::<Vec<_>>()).collect();
    Ok(ReportOutcome { html: html_path, markdown: md_path, drawn: drawn.len(), figures, embedded })
}
