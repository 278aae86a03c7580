//! `shard.json`: what a shard of a sharded run holds, for `merge`.
//!
//! Written compact (one line, no final line end), fields in the order below. The
//! exact basin partial sums are the run layer's own type (`run::basin_totals::Partials`),
//! so the description is generic over them.

use serde::{Deserialize, Serialize};

/// The description of one shard, with the run's partial sums `P`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ShardInfo<P> {
    /// [`TOOL`](super::run_info::TOOL).
    pub tool: String,
    /// This shard, 1-based.
    pub shard: usize,
    /// Shards in all.
    pub of: usize,
    /// Every catchment of the full table, in order (to sort merged rows).
    pub table_order: Vec<String>,
    /// The catchments in this shard.
    pub catchments: Vec<String>,
    /// Whether the run draws figures (maps are drawn at merge time).
    #[serde(default)]
    pub figures: bool,
    /// Exact partial sums of the basin totals.
    pub partials: P,
}

impl<P: Serialize> ShardInfo<P> {
    /// The file's text: compact JSON.
    pub fn to_json(&self) -> crate::Result<String> {
        serde_json::to_string(self).map_err(|e| crate::Error::Other(format!("writing {}: {e}", super::SHARD_FILE)))
    }
}
