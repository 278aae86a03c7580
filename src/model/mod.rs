//! The model core: pure functions and small structs, no file system, no
//! command line, no plotting.
//!
//! Data flows `catchment + climate + parameters → cover → canopy fraction →
//! evapotranspiration → yield → loads and concentrations → summaries`.
//! Each formulation lives in its own file with its formula, units and reference.
//!
//! # Formula
//! None here: every equation is stated, with its source, in the file that
//! computes it ([`budyko`] for the water-balance curves, [`pet`] for evaporative
//! demand, [`cover`] and [`closure`] for the invading stand, [`dilution`] for loads
//! and concentrations, [`projection`] for the year-by-year chain).
//!
//! # Symbols
//! Units are part of every quantity's name: `_mm` (mm or mm/yr of water depth),
//! `_ha` (hectares), `_m3` (m³), `_kg_per_yr`, `_mg_per_l`, `_yr` (years), `_pct`
//! (%); fractions are 0–1. Each file lists its own symbols and ranges.
//!
//! # Assumptions
//! The model trusts its inputs: [`crate::input`] reads and range-checks them. The model
//! imports only `std`, `rand`, `rand_chacha` and `statrs`.
//!
//! # References
//! Given in each file.

pub mod basin;
pub mod budyko;
pub mod catchment;
pub mod climate_gen;
pub mod closure;
pub mod control;
pub mod cover;
pub mod dilution;
pub mod economics;
pub mod exact;
pub mod fit;
pub mod interception;
pub mod kernel;
pub mod network;
pub mod params;
pub mod pet;
pub mod projection;
pub mod regional;
pub mod roots;
pub mod skill;
pub mod stats;
pub mod summary;
pub mod uncertainty;

pub use budyko::{CoverCurves, WaterBalance};
pub use catchment::{Catchment, ClimateYear, Contaminant, ModelParams};
pub use closure::ClosureCurve;
pub use cover::{ClassAreas, Cohorts, DensityClass, InvasionParams};
pub use projection::{project_catchment, YearResult};
