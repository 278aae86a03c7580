//! # yieldshift
//!
//! Screening projections of what invading conifers do to the water of tussock and
//! grass catchments: annual evapotranspiration from Budyko-type curves (Zhang et
//! al. 2001; Fu 1981), water yield, dilution of existing contaminant loads, year by
//! year as the invader spreads, thickens and closes canopy.
//!
//! The crate is a library (the model core in [`model`], file formats in [`io`],
//! figures in [`plot`]) and the `yieldshift` command-line program.
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

pub mod basin_totals;
pub mod cli;
pub mod ensemble;
pub mod error;
pub mod fit_run;
pub mod gis;
pub mod io;
pub mod model;
pub mod pipeline;
pub mod plot;
pub mod report;
pub mod shard;

pub use error::{Error, Problem, Result};
