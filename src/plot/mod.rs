//! Figures (PNG and SVG) drawn with plotters and an embedded font, so text renders
//! on a machine with no system fonts. Plotting reads model results; the model
//! never imports plotting.
//!
//! Every figure is drawn once per backend through [`save_figure`], so PNG and SVG
//! always match.
//!
//! # Print legibility
//! Figures are [`SIZE`] = 2400 × 1500 px. Placed at the text width of an A4 page
//! (about 180 mm) that is roughly 13 px per mm, so the shared text sizes below
//! print at about 9 pt (ticks, legends) to 13 pt (titles). Every figure takes its
//! text sizes and line widths from these constants so they scale together.
//!
//! # Legends
//! Legends never cover data: [`legend`] places the legend box in a corner of the
//! plot only when no line, band or bar passes under it, and otherwise in a strip
//! below the plot.

pub mod axes;
pub mod bars;
pub mod basin;
pub mod budyko_space;
pub mod fit;
pub mod flow_arrows;
pub mod legend;
pub mod map;
pub mod maps;
pub mod palette;
pub mod projection;
pub mod sensitivity;
pub mod series;
pub mod tornado;

use crate::error::{Error, Result};
use crate::schema::numbers::{readable, Thousands};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::Path;
use std::sync::Once;

/// Font family every figure uses (the embedded Noto Sans, registered on first use).
pub const FONT: &str = "sans-serif";

static FONT_ONCE: Once = Once::new();

/// Registers the embedded font with plotters (idempotent).
pub fn register_font() {
    FONT_ONCE.call_once(|| {
        let _ = plotters::style::register_font(FONT, FontStyle::Normal, ttf_noto_sans::REGULAR);
    });
}

/// Which file formats to write.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Formats {
    /// Write `.png`.
    pub png: bool,
    /// Write `.svg`.
    pub svg: bool,
}

impl Formats {
    /// The formats an existing run folder used (from the files in its `figures/`):
    /// PNG and/or SVG; both when it has none.
    pub fn default_from(run_dir: &Path) -> Formats {
        let names: Vec<String> = std::fs::read_dir(run_dir.join("figures"))
            .map(|d| d.filter_map(|e| e.ok()).map(|e| e.file_name().to_string_lossy().into_owned()).collect())
            .unwrap_or_default();
        let png = names.iter().any(|n| n.ends_with(".png"));
        let svg = names.iter().any(|n| n.ends_with(".svg"));
        if png || svg {
            Formats { png, svg }
        } else {
            Formats::default()
        }
    }
}

impl Default for Formats {
    fn default() -> Self {
        Formats { png: true, svg: true }
    }
}

/// A drawing routine that works on any plotters backend.
pub trait Figure {
    /// Draws the figure on `root`.
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> std::result::Result<(), String>;
}

/// Size of figures in pixels (PNG) and user units (SVG): at least 2000 px wide,
/// so a figure placed at A4 text width prints at about 300 dpi.
pub const SIZE: (u32, u32) = (2400, 1500);

/// Figure title text size, px (≈ 13 pt at A4 text width).
pub const TITLE_PX: u32 = 62;
/// Axis title text size, px (≈ 10.5 pt).
pub const AXIS_TITLE_PX: u32 = 50;
/// Tick label text size, px (≈ 9 pt).
pub const TICK_PX: u32 = 42;
/// Legend text size, px (≈ 9 pt).
pub const LEGEND_PX: u32 = 42;
/// Annotation text size (value labels, notes), px (≈ 8 pt).
pub const NOTE_PX: u32 = 38;
/// Width of data lines, px.
pub const LINE_PX: u32 = 6;
/// Width of reference lines (guidelines, limits), px.
pub const REF_LINE_PX: u32 = 4;
/// Outer margin of every figure, px.
pub const MARGIN_PX: u32 = 40;
/// Light grid colour.
pub const GRID: RGBColor = RGBColor(232, 232, 232);
/// Bold grid colour.
pub const GRID_BOLD: RGBColor = RGBColor(200, 200, 200);

/// Largest number of labelled ticks per axis (plotters picks 1, 2 or 5 × 10ᵏ steps).
pub const MAX_TICKS: usize = 10;

/// Decimals needed to label ticks over `lo..hi` with at most `max_ticks` ticks.
///
/// Plotters steps ticks by 1, 2 or 5 × 10ᵏ and takes the finest step that gives at
/// most `max_ticks` ticks; the finest allowed step here is never coarser than the
/// one plotters uses, so the decimals returned are always enough.
pub fn tick_decimals(lo: f64, hi: f64, max_ticks: usize) -> usize {
    let span = (hi - lo).abs();
    if !(span.is_finite() && span > 0.0) || max_ticks < 2 {
        return 0;
    }
    let mut k = (span.log10().floor() as i32) - 2;
    loop {
        for m in [1.0, 2.0, 5.0] {
            let step = m * 10f64.powi(k);
            if span / step + 1.0 <= max_ticks as f64 {
                return (-(step.log10().floor() as i32)).max(0) as usize;
            }
        }
        k += 1;
        if k > 400 {
            return 0;
        }
    }
}

/// A tick or value label: fixed decimals, thousands separators from 1,000 (as in
/// the report's text), and a true minus sign ([`readable`]); empty when not finite.
pub fn number_label(v: f64, decimals: usize) -> String {
    label(v, decimals, true)
}

/// Like [`number_label`] without thousands separators (years: 2030, not 2,030).
pub fn plain_label(v: f64, decimals: usize) -> String {
    label(v, decimals, false)
}

fn label(v: f64, decimals: usize, grouped: bool) -> String {
    let thousands = if grouped { Thousands::Grouped } else { Thousands::Plain };
    readable(v, decimals, thousands).unwrap_or_default()
}

/// Draws `fig` to `stem.png` and/or `stem.svg`.
pub fn save_figure(fig: &impl Figure, stem: &Path, formats: Formats) -> Result<()> {
    register_font();
    let fail = |what: &str, e: String| Error::Other(format!("drawing {}.{what}: {e}", stem.display()));
    if formats.png {
        let path = stem.with_extension("png");
        let root = BitMapBackend::new(&path, SIZE).into_drawing_area();
        fig.draw(&root).map_err(|e| fail("png", e))?;
        root.present().map_err(|e| fail("png", e.to_string()))?;
    }
    if formats.svg {
        let path = stem.with_extension("svg");
        let root = SVGBackend::new(&path, SIZE).into_drawing_area();
        fig.draw(&root).map_err(|e| fail("svg", e))?;
        root.present().map_err(|e| fail("svg", e.to_string()))?;
    }
    Ok(())
}

/// Converts any plotters error to text.
pub(crate) fn err<E: std::fmt::Debug>(e: E) -> String {
    format!("{e:?}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tick_decimals_follow_the_step() {
        assert_eq!(tick_decimals(0.0, 700.0, 10), 0);
        assert_eq!(tick_decimals(0.0, 0.15, 10), 2);
        assert_eq!(tick_decimals(0.3, 1.0, 10), 1);
        assert_eq!(tick_decimals(2027.0, 2087.0, 10), 0);
        assert_eq!(tick_decimals(5.0, 5.0, 10), 0);
    }

    #[test]
    fn number_labels_group_and_sign() {
        assert_eq!(number_label(-2.76, 1), "\u{2212}2.8");
        assert_eq!(number_label(-0.01, 1), "0.0");
        assert_eq!(number_label(12345.0, 0), "12,345");
        assert_eq!(number_label(2500.0, 0), "2,500");
        assert_eq!(number_label(999.0, 0), "999");
        assert_eq!(plain_label(2030.0, 0), "2030");
        assert_eq!(number_label(-1_234_567.891, 2), "\u{2212}1,234,567.89");
    }
}
