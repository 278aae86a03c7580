//! Reading inputs into model types and writing outputs. The model never imports
//! this module; data flows `io → model → io/plot`.

pub mod budget;
pub mod catchments;
pub mod climate;
pub mod observed;
pub mod outdir;
pub mod output;
pub mod scenario;
pub mod table;
pub mod toml_reader;
pub mod weather;
