//! The model core: pure functions and small structs, no file system, no
//! command line, no plotting.
//!
//! Data flows `catchment + climate + parameters → cover → canopy fraction →
//! evapotranspiration → yield → loads and concentrations → summaries`.
//! Each formulation lives in its own file with its formula, units and reference.

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
pub mod kernel;
pub mod network;
pub mod params;
pub mod pet;
pub mod projection;
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
