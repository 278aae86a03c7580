//! Missing periods and the gap rule.
//!
//! Each catchment's record is laid on a calendar of slots, one per day (or month)
//! from 1 January of its first year to 31 December of its last. A slot is missing
//! when the file has no row for it or the row lacks a value the method needs. Each
//! maximal run of missing slots is a [`Gap`]; a daily run of at most
//! [`GapRule::max_fill_days`] with computed days on both sides is filled by linear
//! interpolation of the daily ET0 used (after the non-negativity rule, so a filled
//! day is never negative). Monthly records are never filled.

use super::calendar::Period;
use super::compute::{Et0, Outcome};
use super::rows::Row;
use std::collections::{BTreeMap, HashMap};

/// The rule for filling missing days.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct GapRule {
    /// Longest run of consecutive missing days filled by linear interpolation of
    /// daily ET0 (0 disables filling). Default 5.
    pub max_fill_days: u32,
}

impl Default for GapRule {
    fn default() -> Self {
        GapRule { max_fill_days: 5 }
    }
}

/// A run of consecutive missing periods.
#[derive(Debug, Clone, PartialEq)]
pub struct Gap {
    /// Catchment, when the file has a `catchment` column.
    pub catchment: Option<String>,
    /// First missing period.
    pub first: Period,
    /// Last missing period.
    pub last: Period,
    /// Days covered by the run.
    pub days: u32,
    /// True when the run was filled by the gap rule.
    pub filled: bool,
    /// Why the periods are missing (no rows, or which values were blank in which rows).
    pub cause: String,
}

/// One slot of a daily or monthly calendar.
#[derive(Debug, Clone, Copy)]
pub(super) enum Slot {
    /// Computed from the row's weather.
    Computed(Et0),
    /// Interpolated across a gap, mm/day (≥ 0).
    Filled(f64),
    /// No value; `row` is the index of the row when there is one (blank or refused).
    Missing { row: Option<usize> },
}

/// A catchment's record laid on its calendar.
pub(super) struct Slots<'a> {
    pub(super) slots: Vec<Slot>,
    /// Row index → the blank columns that made its slot missing.
    blanks: HashMap<usize, &'a [&'static str]>,
}

impl<'a> Slots<'a> {
    /// `len` slots from key `start`; each row goes to slot `row.key − start`.
    pub(super) fn place(rows: &[Row], outcomes: &'a [Outcome], start: i64, len: usize) -> Slots<'a> {
        let mut slots = vec![Slot::Missing { row: None }; len];
        let mut blanks = HashMap::new();
        for (i, (row, outcome)) in rows.iter().zip(outcomes).enumerate() {
            let idx = (row.key - start) as usize;
            slots[idx] = match outcome {
                Outcome::Value(e) => Slot::Computed(*e),
                Outcome::Blank(cols) => {
                    blanks.insert(i, cols.as_slice());
                    Slot::Missing { row: Some(i) }
                }
                Outcome::Rejected => Slot::Missing { row: Some(i) },
            };
        }
        Slots { slots, blanks }
    }

    /// Finds every run of missing slots, fills those the rule allows (`None`: fill
    /// nothing) and returns the runs as gaps. `period_at(i)` is slot `i`'s period.
    pub(super) fn gaps(
        &mut self,
        catchment: &Option<String>,
        rows: &[Row],
        rule: Option<GapRule>,
        period_at: impl Fn(usize) -> Period,
    ) -> Vec<Gap> {
        let len = self.slots.len();
        let mut gaps = Vec::new();
        let mut idx = 0;
        while idx < len {
            if !matches!(self.slots[idx], Slot::Missing { .. }) {
                idx += 1;
                continue;
            }
            let run_start = idx;
            while idx < len && matches!(self.slots[idx], Slot::Missing { .. }) {
                idx += 1;
            }
            let run_end = idx - 1; // inclusive
            let cause = self.cause(run_start, run_end, rows);
            let filled = rule.is_some_and(|r| self.fill(run_start, run_end, r));
            let days = (run_start..=run_end).map(|i| period_at(i).days()).sum();
            gaps.push(Gap { catchment: catchment.clone(), first: period_at(run_start), last: period_at(run_end), days, filled, cause });
        }
        gaps
    }

    /// Fills slots `first..=last` by linear interpolation between the values on
    /// either side, when both exist and the run is short enough; true if filled.
    fn fill(&mut self, first: usize, last: usize, rule: GapRule) -> bool {
        let run_len = (last - first + 1) as u32;
        let before = first.checked_sub(1).and_then(|i| value_of(self.slots[i]));
        let after = self.slots.get(last + 1).and_then(|s| value_of(*s));
        match (before, after) {
            (Some(a), Some(b)) if run_len <= rule.max_fill_days => {
                for k in 0..run_len {
                    let w = f64::from(k + 1) / f64::from(run_len + 1);
                    self.slots[first + k as usize] = Slot::Filled(a + (b - a) * w);
                }
                true
            }
            _ => false,
        }
    }

    /// Describes why slots `first..=last` are missing: absent rows and/or blank
    /// values by row.
    fn cause(&self, first: usize, last: usize, rows: &[Row]) -> String {
        let (at_start, at_end) = (first == 0, last + 1 == self.slots.len());
        let mut no_rows = 0usize;
        let mut by_cols: BTreeMap<String, Vec<usize>> = BTreeMap::new();
        for slot in &self.slots[first..=last] {
            match *slot {
                Slot::Missing { row: None } => no_rows += 1,
                Slot::Missing { row: Some(i) } => {
                    let cols = self.blanks.get(&i).map(|c| c.join(", ")).unwrap_or_default();
                    by_cols.entry(cols).or_default().push(rows[i].line);
                }
                _ => {}
            }
        }
        let mut parts = Vec::new();
        if no_rows > 0 {
            parts.push(if by_cols.is_empty() && at_start && at_end {
                "no rows at all".to_string()
            } else if by_cols.is_empty() && at_start {
                "before the first date in the file".to_string()
            } else if by_cols.is_empty() && at_end {
                "after the last date in the file".to_string()
            } else {
                "no rows for these dates".to_string()
            });
        }
        for (cols, lines) in by_cols {
            let shown: Vec<String> = lines.iter().take(5).map(|l| l.to_string()).collect();
            let more = if lines.len() > 5 { format!(" and {} more", lines.len() - 5) } else { String::new() };
            let noun = if lines.len() == 1 { "row" } else { "rows" };
            parts.push(format!("blank {cols} in {noun} {}{more}", shown.join(", ")));
        }
        parts.join("; ")
    }
}

/// The daily ET0 a slot holds (after the non-negativity rule), if any.
fn value_of(slot: Slot) -> Option<f64> {
    match slot {
        Slot::Computed(e) => Some(e.used.mm_per_day),
        Slot::Filled(x) => Some(x),
        Slot::Missing { .. } => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fills_between_the_values_used_never_below_zero() {
        // A clamped day (raw −0.8) next to a 3-day gap and a day at 2.0 mm/day: the
        // filled days lie on the line from 0 (the value used), not from −0.8.
        let mut s = Slots {
            slots: vec![
                Slot::Computed(Et0::from_raw(-0.8)),
                Slot::Missing { row: None },
                Slot::Missing { row: None },
                Slot::Missing { row: None },
                Slot::Computed(Et0::from_raw(2.0)),
            ],
            blanks: HashMap::new(),
        };
        let day = |i: usize| Period::Day { year: 2021, month: 1, day: i as u32 + 1 };
        let gaps = s.gaps(&None, &[], Some(GapRule::default()), day);
        assert_eq!(gaps.len(), 1);
        assert_eq!((gaps[0].first, gaps[0].last, gaps[0].days, gaps[0].filled), (day(1), day(3), 3, true));
        assert_eq!(gaps[0].cause, "no rows for these dates");
        let filled: Vec<f64> = s.slots.iter().filter_map(|s| if let Slot::Filled(x) = s { Some(*x) } else { None }).collect();
        assert_eq!(filled, vec![0.5, 1.0, 1.5]);
    }

    #[test]
    fn a_run_longer_than_the_rule_or_at_an_edge_stays_missing() {
        let day = |i: usize| Period::Day { year: 2021, month: 1, day: i as u32 + 1 };
        let mut s = Slots {
            slots: vec![Slot::Missing { row: None }, Slot::Computed(Et0::from_raw(1.0)), Slot::Missing { row: None }],
            blanks: HashMap::new(),
        };
        let gaps = s.gaps(&None, &[], Some(GapRule::default()), day);
        assert_eq!(
            gaps.iter().map(|g| (g.filled, g.cause.as_str())).collect::<Vec<_>>(),
            vec![(false, "before the first date in the file"), (false, "after the last date in the file")]
        );
        let mut s = Slots {
            slots: vec![Slot::Computed(Et0::from_raw(1.0)), Slot::Missing { row: None }, Slot::Computed(Et0::from_raw(1.0))],
            blanks: HashMap::new(),
        };
        assert!(!s.gaps(&None, &[], Some(GapRule { max_fill_days: 0 }), day)[0].filled);
        assert!(!s.gaps(&None, &[], None, day)[0].filled);
    }
}
