//! Section 1: the executive summary, in plain sentences, for a reader who reads
//! one page: what reaches each receiving node (e.g. a supply intake) at 20 and 50
//! years and where it stands against each guideline, the basin's water lost, the
//! cheapest programme per cubic metre of water saved, the cost of a 10-year delay,
//! and the cautions.
//!
//! Each sentence is one function that takes its values as arguments ([`Valued`],
//! [`Ranged`]); [`executive_summary`] only picks the cells. A node's values are the
//! rows of `nodes.csv` — what arrives there, pooled and flow-weighted over its
//! upstream catchments — never the node catchment's own local row of
//! `summary.csv`.

use super::*;
use crate::report::folder::NodeYear;
use crate::schema::columns::ensemble::YIELD_CHANGE_10YR_MEAN_PCT;
use crate::schema::columns::{delay as dc, nodes as nc};

/// A number shown in a sentence and the cell it came from (`None`: derived).
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Valued {
    /// The value, in the unit of its file (the source's scale divides it for display).
    pub value: f64,
    /// Its cell.
    pub src: Option<Source>,
}

impl Valued {
    fn new(value: f64, src: Source) -> Valued {
        Valued { value, src: Some(src) }
    }

    /// The value formatted by `f` (after the source's scale), with its source.
    fn text(&self, f: impl Fn(f64) -> String) -> Text {
        let scale = self.src.as_ref().map_or(1.0, |s| s.scale);
        Text::new().num(f(self.value / scale), self.src.clone())
    }
}

/// A central value with its 5–95 % ensemble range, when there is one.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Ranged {
    /// The central value.
    pub central: Valued,
    /// (5th, 95th percentile).
    pub range: Option<(Valued, Valued)>,
}

impl Ranged {
    fn text(&self, f: impl Fn(f64) -> String + Copy) -> Text {
        let t = self.central.text(f);
        match &self.range {
            Some((lo, hi)) => t.plain(" (").then(lo.text(f)).plain(" to ").then(hi.text(f)).plain(")"),
            None => t,
        }
    }
}

/// Where a node's flow-weighted concentration stands against a guideline over the run.
#[derive(Debug, Clone, PartialEq)]
pub(super) enum GuidelineStatus {
    /// Already above it in the first year (its value then).
    AboveAtStart { year: i32, conc: Valued },
    /// Below at the start, first above it in `year`.
    FirstAbove { year: i32, conc: Valued },
    /// Never above it; the highest value and its year.
    Below { highest: Option<(i32, Valued)> },
}

fn pct(v: f64) -> String {
    signed(v, 1)
}

fn list(parts: Vec<Text>) -> Text {
    let n = parts.len();
    let mut t = Text::new();
    for (k, p) in parts.into_iter().enumerate() {
        if k > 0 {
            t = t.plain(if k + 1 == n { " and " } else { ", " });
        }
        t = t.then(p);
    }
    t
}

/// "`name` (`id`, fed by N catchments): the water arriving there changes by X % after 20 years (Y) and … without control."
pub(super) fn node_water_sentence(name: &str, id: &str, upstream: Option<Valued>, changes: &[(i32, i32, Ranged)]) -> Text {
    let mut t = Text::new().strong(name).plain(" (").code(id);
    if let Some(u) = upstream {
        t = t.plain(", where the flow of ").then(u.text(|v| fixed(v, 0))).plain(" catchments meets");
    }
    t = t.plain("): ");
    if changes.is_empty() {
        return t.plain("the run is too short to report the change at 20 or 50 years.");
    }
    let parts = changes.iter().map(|(o, y, r)| r.text(pct).plain(format!(" % over the 10 years to {y} ({o} years on)"))).collect();
    t.plain("without control, the water arriving there changes by ").then(list(parts)).plain(" against today's cover held fixed.")
}

/// "There, nitrate_n (guideline G mg/L) stays below it through YEAR (highest …); total_p is first above it in YEAR (… mg/L)."
pub(super) fn node_guideline_sentence(end_year: i32, statuses: &[(String, Valued, GuidelineStatus)]) -> Text {
    let mg = |v: f64| sig(v, 3);
    let parts: Vec<Text> = statuses
        .iter()
        .map(|(name, g, st)| {
            let head = Text::new().code(name).plain(" (guideline ").then(g.text(num_plain)).plain(" mg/L) ");
            match st {
                GuidelineStatus::AboveAtStart { year, conc } => head
                    .plain(format!("is already above its guideline at the start ({year}: "))
                    .then(conc.text(mg))
                    .plain(" mg/L), before the invasion changes anything"),
                GuidelineStatus::FirstAbove { year, conc } => {
                    head.plain(format!("is first above its guideline in {year} (")).then(conc.text(mg)).plain(" mg/L)")
                }
                GuidelineStatus::Below { highest: Some((y, v)) } => head
                    .plain(format!("stays below its guideline through {end_year} (highest "))
                    .then(v.text(mg))
                    .plain(format!(" mg/L, in {y})")),
                GuidelineStatus::Below { highest: None } => {
                    head.plain(format!("stays below its guideline through {end_year} in every year with a stated concentration"))
                }
            }
        })
        .collect();
    if parts.is_empty() {
        return Text::new();
    }
    Text::new().plain("Flow-weighted at that node, ").then(list(parts)).plain(".")
}

/// "Across the whole basin, yield changes by X % after 20 years … ; in the last year (Y) that is Z million m³ less water than today's cover would give."
pub(super) fn basin_sentence(changes: &[(i32, i32, Ranged)], lost_last_year: Option<Valued>, end_year: i32) -> Text {
    let mut t = Text::new().strong("The basin. ");
    if changes.is_empty() {
        t = t.plain("The run is too short to report the basin's change at 20 or 50 years");
    } else {
        let parts = changes.iter().map(|(o, y, r)| r.text(pct).plain(format!(" % over the 10 years to {y} ({o} years on)"))).collect();
        t = t.plain("Without control the whole basin's water yield changes by ").then(list(parts));
    }
    match lost_last_year {
        Some(l) => t
            .plain(format!("; over the 10 years to {end_year} it yields on average "))
            .then(l.text(|v| fixed(v, 2)))
            .plain(" million m³/yr less water than with today's cover held fixed (negative: more)."),
        None => t.plain("."),
    }
}

/// "The programme with the lowest levelised cost of water saved is S: $X/m³ (range) for a present-value cost of $C."
pub(super) fn best_strategy_sentence(
    strategy: &str,
    levelised: &Ranged,
    cost_pv: Option<Valued>,
    water_saved_pv: Option<Valued>,
    water_saved: Option<Valued>,
) -> Text {
    let mut t = Text::new()
        .strong("Best value. ")
        .plain("Of the control programmes, ")
        .code(strategy)
        .plain(" saves water at the lowest levelised cost: $")
        .then(levelised.text(|v| sig(v, 3)))
        .plain(" per m³");
    if let (Some(c), Some(w)) = (cost_pv, water_saved_pv) {
        t = t
            .plain(" (present value of its cost, $")
            .then(c.text(|v| fixed(v, 0)))
            .plain(", over the present value of the water it saves, ")
            .then(w.text(|v| fixed(v, 1)))
            .plain(" million m³)");
    }
    if let Some(w) = water_saved {
        t = t.plain("; it saves ").then(w.text(|v| fixed(v, 1))).plain(" million m³ of water over the projection");
    }
    t.plain(if levelised.range.is_some() { "; the range is 5–95 % of ensemble members." } else { "." })
}

/// One sentence on starting a programme `delay` years later (two rows of `delay.csv`).
pub(super) fn delay_sentence(
    strategy: &str,
    delay_yr: i32,
    starts: (i32, i32),
    cost_pv: (Valued, Valued),
    saved: (Valued, Valued),
) -> Text {
    let lost = Valued { value: saved.0.value - saved.1.value, src: None };
    let million = |v: f64| fixed(v, 1);
    Text::new()
        .strong("Cost of waiting. ")
        .plain("Starting ")
        .code(strategy)
        .plain(format!(" {delay_yr} years later ({} instead of {}) saves ", starts.1, starts.0))
        .then(Valued { value: lost.value / MILLION, src: None }.text(million))
        .plain(" million m³ less water over the projection (")
        .then(saved.1.text(million))
        .plain(" instead of ")
        .then(saved.0.text(million))
        .plain(" million m³), for a present-value cost of $")
        .then(cost_pv.1.text(|v| fixed(v, 0)))
        .plain(" instead of $")
        .then(cost_pv.0.text(|v| fixed(v, 0)))
        .plain(".")
}

/// The cautions, in one paragraph.
pub(super) fn cautions_sentence(cautions: &str) -> Text {
    Text::new().strong("Cautions. ").plain(cautions).plain(" Read section “Cautions” before using any number in this report.")
}

/// Status of a node's concentration `k` against `guideline` over its years.
pub(super) fn node_status(node: &str, ys: &[NodeYear], k: usize, name: &str, guideline: f64) -> GuidelineStatus {
    let col = crate::schema::columns::mg_per_l(name);
    let at = |y: &NodeYear, v: f64| Valued::new(v, Source::new(NODES, &[node, NO_CONTROL, &y.year.to_string()], &col));
    let conc = |y: &NodeYear| y.conc.get(k).copied().flatten();
    if let Some(first) = ys.first() {
        if let Some(v) = conc(first).filter(|&v| v > guideline) {
            return GuidelineStatus::AboveAtStart { year: first.year, conc: at(first, v) };
        }
    }
    if let Some((y, v)) = ys.iter().find_map(|y| conc(y).filter(|&v| v > guideline).map(|v| (y, v))) {
        return GuidelineStatus::FirstAbove { year: y.year, conc: at(y, v) };
    }
    let highest = ys.iter().filter_map(|y| conc(y).map(|v| (y, v))).max_by(|a, b| a.1.total_cmp(&b.1));
    GuidelineStatus::Below { highest: highest.map(|(y, v)| (y.year, at(y, v))) }
}

const NODES: &str = "nodes.csv";
const DELAY: &str = "delay.csv";
/// Years after the start the executive summary reports.
pub const EXECUTIVE_OFFSETS: [i32; 2] = [20, 50];
/// The delay the executive summary prices, years.
pub const EXECUTIVE_DELAY_YR: i32 = 10;

/// The 5–95 % range of `variable` in `ensemble.csv` for a row key.
fn ensemble_range(d: &RunData, in_scope: &str, catchment: &str, strategy: &str, variable: &str, year: i32) -> Option<(Valued, Valued)> {
    let q = d.ensemble.as_ref()?.get_in(in_scope, catchment, strategy, variable, year)?;
    let key = [catchment, in_scope, strategy, &year.to_string(), variable];
    Some((Valued::new(q.p5, Source::new("ensemble.csv", &key, "p5")), Valued::new(q.p95, Source::new("ensemble.csv", &key, "p95"))))
}

/// The executive summary (section 1).
pub(super) fn executive_summary(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    doc.heading(2, "Executive summary");
    let reported: Vec<(i32, i32)> = EXECUTIVE_OFFSETS.iter().map(|&o| (o, i.start_year + o)).filter(|&(_, y)| y <= i.end_year()).collect();

    // Receiving nodes (what arrives there, from nodes.csv).
    let nodes: Vec<(&String, &Vec<NodeYear>)> =
        d.nodes.iter().filter(|((_, st), _)| st == NO_CONTROL).map(|((n, _), ys)| (n, ys)).collect();
    if nodes.is_empty() {
        doc.para("No catchment receives flow from another in this run, so there are no receiving nodes (supply intakes) to report.");
    } else {
        doc.para(Text::new().plain(
            "At each catchment that receives flow from others (a supply intake, for example), the numbers below are what arrives there: volumes pooled and concentrations flow-weighted over its upstream catchments (summary.csv and ensemble.csv rows with scope arriving; nodes.csv by year), not the node catchment's own runoff. Changes are 10-year means, so that one wet or dry year does not set them.",
        ));
    }
    for (node, ys) in nodes {
        // The 10-year means of what arrives (the node's `arriving` row of summary.csv),
        // with the members' range of the same quantity (its `arriving` rows of ensemble.csv).
        let arriving = d.arriving.iter().find(|r| &r.catchment == node && r.strategy == NO_CONTROL);
        let changes: Vec<(i32, i32, Ranged)> = reported
            .iter()
            .filter_map(|&(o, y)| {
                let r = arriving?;
                let k = d.offsets.iter().position(|&x| x == o)?;
                let v = r.at_offsets.get(k).copied().flatten()?;
                Some((
                    o,
                    y,
                    Ranged {
                        central: Valued::new(v, row_src(r, &offset_col(o))),
                        range: ensemble_range(d, scope::ARRIVING, node, NO_CONTROL, YIELD_CHANGE_10YR_MEAN_PCT, y),
                    },
                ))
            })
            .collect();
        let upstream = ys
            .last()
            .map(|r| Valued::new(r.upstream as f64, Source::new(NODES, &[node, NO_CONTROL, &r.year.to_string()], nc::UPSTREAM_CATCHMENTS)));
        let statuses: Vec<(String, Valued, GuidelineStatus)> = i
            .contaminants
            .iter()
            .enumerate()
            .filter_map(|(k, c)| {
                let g = c.guideline_mg_per_l?;
                let gv =
                    Valued::new(g, Source::new(crate::schema::RUN_INFO_FILE, &[], &format!("contaminants.{}.guideline_mg_per_l", c.name)));
                Some((c.name.clone(), gv, node_status(node, ys, k, &c.name, g)))
            })
            .collect();
        let mut t = node_water_sentence(&display_name(d, node), node, upstream, &changes);
        let g = node_guideline_sentence(i.end_year(), &statuses);
        if !g.0.is_empty() {
            t = t.plain(" ").then(g);
        }
        doc.para(t);
    }

    let mut bullets = Vec::new();
    // The basin (summary.csv basin row, ranges from ensemble.csv).
    if let Some(b) = d.summary_row(BASIN_ID, NO_CONTROL) {
        let changes: Vec<(i32, i32, Ranged)> = reported
            .iter()
            .filter_map(|&(o, y)| {
                let k = d.offsets.iter().position(|&x| x == o)?;
                let v = b.at_offsets.get(k).copied().flatten()?;
                Some((
                    o,
                    y,
                    Ranged {
                        central: Valued::new(v, s_src(BASIN_ID, NO_CONTROL, &offset_col(o))),
                        range: ensemble_range(d, scope::BASIN, BASIN_ID, NO_CONTROL, YIELD_CHANGE_10YR_MEAN_PCT, y),
                    },
                ))
            })
            .collect();
        let lost = b
            .get(sc::WATER_LOST_HORIZON_M3_PER_YR)
            .map(|v| Valued::new(v, s_src(BASIN_ID, NO_CONTROL, sc::WATER_LOST_HORIZON_M3_PER_YR).scaled(MILLION)));
        bullets.push(basin_sentence(&changes, lost, i.end_year()));
    }

    // The programme with the lowest levelised cost (basin rows of summary.csv).
    let best = d
        .summary
        .iter()
        .filter(|r| r.catchment == BASIN_ID && r.strategy != NO_CONTROL)
        .filter(|r| r.get(sc::LEVELISED_COST_PER_M3).is_some_and(|v| v > 0.0))
        .min_by(|a, b| {
            a.get(sc::LEVELISED_COST_PER_M3).unwrap_or(f64::MAX).total_cmp(&b.get(sc::LEVELISED_COST_PER_M3).unwrap_or(f64::MAX))
        });
    if let Some(r) = best {
        let cell = |col: &str, scale: f64| r.get(col).map(|v| Valued::new(v, s_src(BASIN_ID, &r.strategy, col).scaled(scale)));
        let levelised = Ranged {
            central: cell(sc::LEVELISED_COST_PER_M3, 1.0).unwrap_or(Valued { value: f64::NAN, src: None }),
            // ensemble.csv ranges no programme economics yet.
            range: ensemble_range(d, scope::BASIN, BASIN_ID, &r.strategy, sc::LEVELISED_COST_PER_M3, i.end_year()),
        };
        bullets.push(best_strategy_sentence(
            &r.strategy,
            &levelised,
            cell(sc::TOTAL_COST_PV, 1.0),
            cell(sc::WATER_SAVED_PV_M3, MILLION),
            cell(sc::WATER_SAVED_M3, MILLION),
        ));
    } else if d.programmes().next().is_some() {
        bullets.push(
            Text::new()
                .strong("Best value. ")
                .plain("No control programme saved water at a positive cost, so none is ranked by levelised cost."),
        );
    }

    // The cost of a 10-year delay (delay.csv): the best programme if it was delayed, else the first that was.
    let delayed = |st: &str| {
        let on = d.delay.iter().find(|r| r.strategy == st && r.delay_yr == 0)?;
        let late = d.delay.iter().find(|r| r.strategy == st && r.delay_yr == EXECUTIVE_DELAY_YR)?;
        Some((on, late))
    };
    let pair = best.and_then(|r| delayed(&r.strategy)).or_else(|| d.delay.iter().find_map(|r| delayed(&r.strategy)));
    if let Some((on, late)) = pair {
        let v = |r: &crate::report::folder::DelayRow, col: &str, value: f64, scale: f64| {
            Valued::new(value, Source::new(DELAY, &[r.strategy.as_str(), &r.delay_yr.to_string()], col).scaled(scale))
        };
        bullets.push(delay_sentence(
            &on.strategy,
            EXECUTIVE_DELAY_YR,
            (on.start_year, late.start_year),
            (v(on, dc::TOTAL_COST_PV, on.total_cost_pv, 1.0), v(late, dc::TOTAL_COST_PV, late.total_cost_pv, 1.0)),
            (v(on, dc::WATER_SAVED_M3, on.water_saved_m3, MILLION), v(late, dc::WATER_SAVED_M3, late.water_saved_m3, MILLION)),
        ));
    }
    bullets.push(if d.ensemble.is_some() {
        Text::new().strong("Ranges. ").plain("Values in brackets are the 5th to 95th percentiles across ensemble members (ensemble.csv); a value without brackets has no range in the run's files.")
    } else {
        Text::new().strong("Ranges. ").plain("No ensemble was run: every value is a single projection with central parameter values.")
    });
    bullets.push(cautions_sentence(crate::schema::CAUTIONS));
    doc.bullets(bullets);
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::doc::Span;

    fn v(x: f64, col: &str) -> Valued {
        Valued::new(x, Source::new("nodes.csv", &["n", NO_CONTROL, "2047"], col))
    }

    #[test]
    fn node_sentence_reads_and_keeps_sources() {
        let r = Ranged { central: v(-3.12, "yield_change_pct"), range: None };
        let t = node_water_sentence("Lower (intake)", "lower", Some(v(4.0, "upstream_catchments")), &[(20, 2047, r)]);
        assert_eq!(
            t.plain_text(),
            "Lower (intake) (lower, where the flow of 4 catchments meets): without control, the water arriving there changes by −3.1 % over the 10 years to 2047 (20 years on) against today's cover held fixed."
        );
        assert!(t
            .0
            .iter()
            .any(|s| matches!(s, Span::Num { src: Some(src), .. } if src.file == "nodes.csv" && src.column == "yield_change_pct")));
        let ranged = Ranged { central: v(-3.12, "p50"), range: Some((v(-5.0, "p5"), v(-1.04, "p95"))) };
        assert_eq!(ranged.text(pct).plain_text(), "−3.1 (−5.0 to −1.0)");
    }

    #[test]
    fn guideline_status_says_why() {
        let ys = |c: [f64; 3]| -> Vec<NodeYear> {
            c.iter()
                .enumerate()
                .map(|(k, &x)| NodeYear {
                    year: 2027 + k as i32,
                    upstream: 2,
                    change_pct: Some(0.0),
                    yield_m3: 0.0,
                    baseline_yield_m3: 0.0,
                    conc: vec![Some(x)],
                })
                .collect()
        };
        assert!(matches!(node_status("n", &ys([2.0, 1.0, 1.0]), 0, "no3", 1.5), GuidelineStatus::AboveAtStart { year: 2027, .. }));
        assert!(matches!(node_status("n", &ys([1.0, 1.6, 1.0]), 0, "no3", 1.5), GuidelineStatus::FirstAbove { year: 2028, .. }));
        match node_status("n", &ys([1.0, 1.4, 1.2]), 0, "no3", 1.5) {
            GuidelineStatus::Below { highest: Some((2028, h)) } => assert_eq!(h.value, 1.4),
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn delay_sentence_states_both_runs() {
        let d = |x: f64, k: &str, col: &str, s: f64| Valued::new(x, Source::new("delay.csv", &["p", k], col).scaled(s));
        let t = delay_sentence(
            "p",
            10,
            (2027, 2037),
            (d(1_000.0, "0", "total_cost_pv", 1.0), d(1_500.0, "10", "total_cost_pv", 1.0)),
            (d(5.0e8, "0", "water_saved_m3", MILLION), d(4.0e8, "10", "water_saved_m3", MILLION)),
        );
        assert_eq!(
            t.plain_text(),
            "Cost of waiting. Starting p 10 years later (2037 instead of 2027) saves 100.0 million m³ less water over the projection (400.0 instead of 500.0 million m³), for a present-value cost of $1,500 instead of $1,000."
        );
    }
}
