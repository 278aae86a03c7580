//! Figures (PNG and SVG) drawn with plotters and an embedded font, so text renders
//! on a machine with no system fonts. Plotting reads model results; the model
//! never imports plotting.
//!
//! Every figure is drawn once per backend through [`save_figure`], so PNG and SVG
//! always match.

pub mod bands;
pub mod palette;
pub mod fit;
pub mod map;
pub mod series;
pub mod tornado;

use crate::error::{Error, Result};
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

/// Size of figures in pixels (PNG) and user units (SVG).
pub const SIZE: (u32, u32) = (1600, 1000);

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
