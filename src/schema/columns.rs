//! Column lists (filled below).
