//! Section 1: the scenario summary (what the run projects, the basin at a glance).

use super::*;
use crate::schema::columns::ensemble::YIELD_CHANGE_10YR_MEAN_PCT;

// ---------------------------------------------------------------- 1. Summary

// Over 100 lines on purpose: the summary reads top to bottom as one text, and each paragraph picks its own cells; the order of the code is the order of the section.
pub(super) fn summary_section(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    doc.heading(2, "Scenario summary");
    let area: f64 = d.catchments.iter().map(|c| c.2).sum();
    let programmes: Vec<&String> = d.programmes().collect();
    let mut t = Text::new()
        .plain(format!("{} projects water yield and contaminant concentrations for ", i.title))
        .plain(format!("{} catchments", d.catchments.len()));
    if let Some(b) = d.summary_row(BASIN_ID, NO_CONTROL) {
        t = t.plain(" (").num(fixed(b.area_ha, 0), Some(s_src(BASIN_ID, NO_CONTROL, "area_ha"))).plain(" ha in all)");
    } else {
        t = t.plain(format!(" ({} ha in all)", fixed(area, 0)));
    }
    t = t
        .plain(" year by year from ")
        .num(i.start_year.to_string(), Some(Source::new("run_info.json", &[], "start_year")))
        .plain(" for ")
        .num(i.horizon_years.to_string(), Some(Source::new("run_info.json", &[], "horizon_years")))
        .plain(format!(
            " years, with the {method} water-balance curve, as conifers spread, thicken and close canopy.",
            method = method_name(&i.hydrology.curves)
        ));
    if programmes.is_empty() {
        t = t.plain(" No control programme was projected: only the no-control reference.");
    } else {
        t = t.plain(format!(
            " Besides the no-control reference, {} control programme{} {} projected: {}.",
            programmes.len(),
            if programmes.len() == 1 { "" } else { "s" },
            if programmes.len() == 1 { "was" } else { "were" },
            programmes.iter().map(|s| s.as_str()).collect::<Vec<_>>().join(", ")
        ));
    }
    doc.para(t);

    // Headline numbers from the basin rows.
    let mut bullets = Vec::new();
    if let Some(b) = d.summary_row(BASIN_ID, NO_CONTROL) {
        let mut t = Text::new().strong("Water yield. ").plain("Without control, the basin's yield changes by ");
        let parts: Vec<Text> = d
            .offsets
            .iter()
            .zip(&b.at_offsets)
            .filter_map(|(&o, v)| {
                v.map(|v| {
                    Text::new()
                        .num(signed(v, 1), Some(s_src(BASIN_ID, NO_CONTROL, &offset_col(o))))
                        .plain(" %")
                        .then(range_text(d, BASIN_ID, NO_CONTROL, YIELD_CHANGE_10YR_MEAN_PCT, i.start_year + o, 1, true))
                        .plain(format!(" over the 10 years to {} ({o} years after the start)", i.start_year + o))
                })
            })
            .collect();
        for (k, p) in parts.into_iter().enumerate() {
            if k > 0 {
                t = t.plain(", ");
            }
            t = t.then(p);
        }
        // The horizon is stated unless it is one of the offsets already given.
        let horizon_given = d.offsets.iter().any(|&o| i.start_year + o == i.end_year());
        if let (Some(h), false) = (b.get(sc::YIELD_CHANGE_HORIZON_PCT), horizon_given) {
            t = t
                .plain(" and ")
                .num(signed(h, 1), Some(s_src(BASIN_ID, NO_CONTROL, sc::YIELD_CHANGE_HORIZON_PCT)))
                .plain(" %")
                .then(range_text(d, BASIN_ID, NO_CONTROL, YIELD_CHANGE_10YR_MEAN_PCT, i.end_year(), 1, true))
                .plain(format!(" over the 10 years to {}", i.end_year()));
        }
        t = t.plain(", against today's cover held fixed (means over 10 years, so that one wet or dry year does not set them).");
        if let (Some(s), Some(e)) = (b.get(sc::CANOPY_FRACTION_START), b.get(sc::CANOPY_FRACTION_END)) {
            t = t
                .plain(" The closed-canopy fraction of the basin goes from ")
                .num(fixed(s, 3), Some(s_src(BASIN_ID, NO_CONTROL, sc::CANOPY_FRACTION_START)))
                .plain(" to ")
                .num(fixed(e, 3), Some(s_src(BASIN_ID, NO_CONTROL, sc::CANOPY_FRACTION_END)))
                .plain(".");
        }
        bullets.push(t);
    }
    // Largest and smallest losses.
    if let Some((k, o)) = figs::comparison_offset(d) {
        let mut rows: Vec<&SummaryRow> =
            d.summary.iter().filter(|r| r.strategy == NO_CONTROL && r.catchment != BASIN_ID && r.at_offsets[k].is_some()).collect();
        rows.sort_by(|a, b| a.at_offsets[k].unwrap_or(0.0).total_cmp(&b.at_offsets[k].unwrap_or(0.0)));
        if let (Some(worst), Some(best)) = (rows.first(), rows.last()) {
            let cell = |r: &SummaryRow| {
                Text::new().num(signed(r.at_offsets[k].unwrap_or(f64::NAN), 1), Some(s_src(&r.catchment, NO_CONTROL, &offset_col(o))))
            };
            bullets.push(
                Text::new()
                    .strong("Catchments. ")
                    .plain(format!("Over the 10 years to {} the largest change is in {} (", i.start_year + o, worst.name))
                    .then(cell(worst))
                    .plain(format!(" %), the smallest in {} (", best.name))
                    .then(cell(best))
                    .plain(" %)."),
            );
        }
    }
    // Guidelines: at the intakes (what arrives there) first, then the catchments' own runoff.
    for (k, c) in i.contaminants.iter().enumerate() {
        let Some(g) = c.guideline_mg_per_l else { continue };
        let mut t = Text::new()
            .strong(format!("{}. ", c.name))
            .plain("Guideline ")
            .num(num_plain(g), Some(Source::new("run_info.json", &[], &format!("contaminants.{}.guideline_mg_per_l", c.name))))
            .plain(" mg/L, without control. ");
        let nodes: Vec<&SummaryRow> = d.arriving.iter().filter(|r| r.strategy == NO_CONTROL).collect();
        for (n, r) in nodes.iter().enumerate() {
            t = t
                .plain(if n == 0 { "Arriving at " } else { "; at " })
                .plain(format!("{}: ", r.name))
                .then(exceed_cell(r, k, &c.name, true));
        }
        if !nodes.is_empty() {
            t = t.plain(". ");
        }
        let local: Vec<&SummaryRow> = d.summary.iter().filter(|r| r.strategy == NO_CONTROL && r.catchment != BASIN_ID).collect();
        let at_start = local.iter().filter(|r| r.status.get(k).is_some_and(|s| s == "above-at-start")).count();
        let mut first: Vec<(&SummaryRow, i32)> =
            local.iter().filter_map(|r| r.first_exceedance.get(k).copied().flatten().map(|y| (*r, y))).collect();
        first.sort_by_key(|x| x.1);
        let invasion = local.iter().filter(|r| r.invasion_years.get(k).copied().flatten().is_some_and(|n| n > 0)).count();
        t = t.plain(format!("In the catchments' own (local) runoff: {at_start} of {} above the guideline at the start", local.len()));
        match first.first() {
            Some((r, y)) => {
                t = t
                    .plain(format!(", {} first exceeded later, earliest {} (", first.len(), r.name))
                    .num(y.to_string(), Some(s_src(&r.catchment, NO_CONTROL, &sc::first_exceedance_year(&c.name))))
                    .plain(")");
            }
            None => t = t.plain(", none first exceeded later"),
        }
        t = t.plain(format!(
            "; {invasion} exceeded because of the invasion (above the guideline in years when the same catchment without invader is not)."
        ));
        bullets.push(t);
    }
    // Best programme by benefit-cost ratio (when water has a value) or levelised cost.
    let basin_rows: Vec<&SummaryRow> = d.summary.iter().filter(|r| r.catchment == BASIN_ID && r.strategy != NO_CONTROL).collect();
    let by_bcr = basin_rows
        .iter()
        .filter(|r| r.get(sc::BENEFIT_COST_RATIO).is_some())
        .max_by(|a, b| a.get(sc::BENEFIT_COST_RATIO).unwrap_or(0.0).total_cmp(&b.get(sc::BENEFIT_COST_RATIO).unwrap_or(0.0)));
    let by_lcoe = basin_rows.iter().filter(|r| r.get(sc::LEVELISED_COST_PER_M3).is_some_and(|v| v > 0.0)).min_by(|a, b| {
        a.get(sc::LEVELISED_COST_PER_M3).unwrap_or(f64::MAX).total_cmp(&b.get(sc::LEVELISED_COST_PER_M3).unwrap_or(f64::MAX))
    });
    if let Some(r) = by_lcoe {
        let mut t = Text::new()
            .strong("Control. ")
            .plain(format!("The lowest levelised cost of water saved is that of {} ($", r.strategy))
            .then(num_cell(r, sc::LEVELISED_COST_PER_M3, |v| sig(v, 3), 1.0))
            .plain("/m³ for a total cost of $")
            .then(num_cell(r, sc::TOTAL_COST, |v| fixed(v, 0), 1.0));
        if let Some(b) = by_bcr {
            t = t
                .plain(format!("); the highest benefit-cost ratio is that of {} (", b.strategy))
                .then(num_cell(b, sc::BENEFIT_COST_RATIO, |v| fixed(v, 2), 1.0))
                .plain(").");
        } else {
            t = t.plain(").");
        }
        bullets.push(t);
    }
    if d.ensemble.is_some() {
        let members = d.ensemble.as_ref().map_or(0.0, |e| e.members);
        bullets.push(Text::new().strong("Ranges. ").plain(format!(
            "Values in brackets are the 5th to 95th percentiles across the {} ensemble members (ensemble.csv) of the same 10-year mean; the value before them is the projection with central parameter values.",
            fixed(members, 0)
        )));
    } else {
        bullets.push(Text::new().strong("Ranges. ").plain(
            "This run folder has no ensemble.csv, so values are single projections with central parameter values; no ranges are given.",
        ));
    }
    doc.bullets(bullets);

    // Basin table by strategy.
    let mut head = vec!["Strategy".to_string()];
    head.extend(change_heads(d));
    head.push("Canopy fraction, start → end".into());
    head.push("Water lost, 10-yr mean to the horizon, million m³/yr".into());
    let rows: Vec<Vec<Text>> = i
        .strategies
        .iter()
        .filter_map(|st| d.summary_row(BASIN_ID, st))
        .map(|r| {
            let mut row = vec![Text::new().code(&r.strategy)];
            row.extend(change_cells(d, r));
            row.push(num_cell(r, sc::CANOPY_FRACTION_START, |v| fixed(v, 3), 1.0).plain(" → ").then(num_cell(
                r,
                sc::CANOPY_FRACTION_END,
                |v| fixed(v, 3),
                1.0,
            )));
            row.push(num_cell(r, sc::WATER_LOST_HORIZON_M3_PER_YR, |v| fixed(v, 2), MILLION));
            row
        })
        .collect();
    if !rows.is_empty() {
        let n = head.len();
        doc.table(Table {
            caption: "The basin (all catchments pooled) under each strategy: yield change against the baseline (today's cover held fixed, same climate)".into(),
            align: (0..n).map(|k| if k == 0 { Align::Left } else { Align::Right }).collect(),
            head,
            rows,
            note: Some(Text::new().plain("Negative changes are losses of water. Source: the basin rows of ").code(SUMMARY).plain(if d.ensemble.is_some() { " (ranges: ensemble.csv)." } else { "." })),
        });
    }
}
