//! shard.json (filled below).
