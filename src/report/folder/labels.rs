//! The readable names of the ranked parameters: the `label` column of
//! `sensitivity.csv` by key path (`parameter`). Folders written before the column
//! existed have no labels; the report then shows the key paths.

use super::csv_table::CsvTable;
use crate::error::Result;
use crate::schema::columns::sensitivity::{LABEL, PARAMETER};
use crate::schema::SENSITIVITY_FILE;
use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

/// `parameter → label` from `sensitivity.csv` (empty without the file or the column).
pub fn read_param_labels(dir: &Path) -> Result<BTreeMap<String, String>> {
    let mut seen = BTreeSet::new();
    let mut cols: Option<(Option<usize>, Option<usize>)> = None;
    // One row per parameter is enough.
    let t = CsvTable::read_filtered(dir, SENSITIVITY_FILE, |h, rec| {
        let (p, l) = *cols.get_or_insert_with(|| (h.iter().position(|x| x == PARAMETER), h.iter().position(|x| x == LABEL)));
        match (p.and_then(|p| rec.get(p)), l) {
            (Some(path), Some(_)) => seen.insert(path.trim().to_string()),
            _ => false,
        }
    })?;
    let Some(t) = t else { return Ok(BTreeMap::new()) };
    let (Some(p), Some(l)) = (t.col(PARAMETER), t.col(LABEL)) else { return Ok(BTreeMap::new()) };
    Ok((0..t.rows.len())
        .map(|r| (t.text(r, p).to_string(), t.text(r, l).to_string()))
        .filter(|(p, l)| !p.is_empty() && !l.is_empty())
        .collect())
}
