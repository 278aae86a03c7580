//! The orchestration of a run: the deterministic projection and its outputs
//! ([`deterministic`]), uncertainty ensembles ([`ensemble`]), everything summed over
//! the basin from exact partial sums ([`basin_totals`]), sharded runs and their
//! merge ([`shard`]) and calibration to gauged flows ([`fit`]).
//!
//! This layer ties the others together: it reads with [`crate::input`], projects
//! with [`crate::model`], writes with [`crate::output`] and [`crate::plot`], and
//! writes the report ([`crate::report`]) into the staged folder before it is moved
//! into place. Nothing below imports it.

pub mod bands;
pub mod basin_totals;
pub mod deterministic;
pub mod ensemble;
pub mod finish;
pub mod fit;
pub mod regional;
pub mod sensitivity;
pub mod shard;
