//! Reading inputs into model types: the scenario (TOML), the catchment, climate,
//! weather, budget and observed-flow tables (CSV) and catchment boundaries
//! (GeoJSON). Every reader validates what it reads and reports every problem with
//! file, row and column. Inputs import only the model and [`crate::schema`].

pub mod budget;
pub mod catchments;
pub mod climate;
pub mod gis;
pub mod mean_annual;
pub mod observed;
pub mod scenario;
pub mod stands;
pub mod table;
pub mod toml_reader;
pub mod weather;
