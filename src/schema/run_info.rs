//! run_info.json (filled below).
