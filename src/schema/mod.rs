//! The vocabulary of a run folder, shared by every layer above the model: the
//! reserved ids (`no-control`, `basin`), file names, safe file stems, the cautions,
//! every CSV column list ([`columns`]), the number formats of the tables
//! ([`numbers`]) and the serde types of `run_info.json` and `shard.json`
//! ([`run_info`], [`shard`]).
//!
//! Writers, readers (report, merge, GIS) and tests all take these definitions from
//! here, so a format is defined once. This module imports only the model and `std`
//! (and serde for its types): it is the leaf of the layers above the model.

pub mod columns;
pub mod numbers;
pub mod run_info;
pub mod shard;

/// Name of the reference strategy (no control).
pub const NO_CONTROL: &str = "no-control";

/// Catchment id of the whole-basin rows (reserved: no catchment may use it).
pub const BASIN_ID: &str = "basin";

/// `run_info.json`: the settings of a run; its presence marks a folder as a yieldshift output.
pub const RUN_INFO_FILE: &str = "run_info.json";
/// `yearly.csv`.
pub const YEARLY_FILE: &str = "yearly.csv";
/// `summary.csv`.
pub const SUMMARY_FILE: &str = "summary.csv";
/// `nodes.csv`.
pub const NODES_FILE: &str = "nodes.csv";
/// `budget.csv`.
pub const BUDGET_FILE: &str = "budget.csv";
/// `delay.csv`.
pub const DELAY_FILE: &str = "delay.csv";
/// `ensemble.csv`.
pub const ENSEMBLE_FILE: &str = "ensemble.csv";
/// `sensitivity.csv`.
pub const SENSITIVITY_FILE: &str = "sensitivity.csv";
/// `members.csv`.
pub const MEMBERS_FILE: &str = "members.csv";
/// `shard.json`: what a shard holds, for `merge`.
pub const SHARD_FILE: &str = "shard.json";
/// File name of the results GeoJSON in a run folder.
pub const RESULTS_FILE: &str = "catchments.geojson";
/// Foreign member of the results FeatureCollection describing the run and listing
/// the properties it wrote (RFC 7946 §6.1).
pub const RESULTS_MEMBER: &str = "yieldshift_run";
/// Folder of the figures in a run folder.
pub const FIGURES_DIR: &str = "figures";
/// Folder of the copied inputs in a run folder.
pub const INPUTS_DIR: &str = "inputs";

/// The cautions every output carries.
pub const CAUTIONS: &str = "Screening estimates only: mean-annual water-balance curves applied year by year ignore \
storage carry-over and local factors. Not a substitute for a site hydrological assessment. Defer to local \
regulations and to qualified hydrologists and water-quality practitioners before making water-supply or \
environmental decisions.";

/// Safe file-name stem for a catchment or strategy name: ASCII letters, digits,
/// `-` and `_` kept, everything else replaced by `_`.
pub fn file_stem(id: &str) -> String {
    id.chars().map(|c| if c.is_ascii_alphanumeric() || c == '-' || c == '_' { c } else { '_' }).collect()
}
