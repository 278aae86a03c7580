//! # yieldshift
//!
//! Screening projections of what invading conifers do to the water of tussock and
//! grass catchments: annual evapotranspiration from Budyko-type curves (Zhang et
//! al. 2001; Fu 1981), water yield, dilution of existing contaminant loads, year by
//! year as the invader spreads, thickens and closes canopy.
//!
//! The crate is a library and the `yieldshift` command-line program. The library's
//! layers only point down (a test, `tests/layers.rs`, refuses an upward import):
//!
//! | layer | modules | may import |
//! |---|---|---|
//! | 0 | [`model`]: the pure model core | `std`, `rand`, `rand_chacha`, `statrs` |
//! | 1 | [`schema`] (run-folder vocabulary), [`error`] | model |
//! | 2 | [`input`]: readers and validation | below |
//! | 3 | [`output`]: CSV, GeoJSON, atomic folders | below |
//! | 4 | [`plot`]: figures and maps | below |
//! | 5 | [`report`]: the report from a run folder | below |
//! | 6 | [`run`]: the orchestration of a run | below |
//!
//! The command line (`src/cli/`) belongs to the binary only.
//!
//! ```
//! use yieldshift::model::budyko::{WaterBalance, Zhang2001};
//! // Grass (w = 0.5) at P = E0 = 1000 mm: ET/P = (1 + w)/(2 + w) = 0.6.
//! let et = Zhang2001 { w: 0.5 }.et_mm(1000.0, 1000.0);
//! assert!((et - 600.0).abs() < 1e-9);
//! ```
//!
//! Results are screening estimates, not a substitute for a site hydrological
//! assessment; defer to local regulation and qualified practitioners.
#![deny(missing_docs)]

pub mod error;
pub mod input;
pub mod model;
pub mod output;
pub mod plot;
pub mod report;
pub mod run;
pub mod schema;

pub use error::{Error, Problem, Result};
