//! Section 4, by place: the catchment overview and details (the receiving nodes are in `intakes`).

use super::economics::economics_table;
use super::*;

pub(super) fn catchment_overview(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    let mut head = vec!["Catchment".to_string(), "Area, ha".into()];
    head.extend(change_heads(d));
    head.push("Canopy start → end".into());
    for c in &i.contaminants {
        head.push(format!("{} first above guideline", c.name));
    }
    let mut rows = Vec::new();
    for (id, name, _) in &d.catchments {
        let Some(r) = d.summary_row(id, NO_CONTROL) else { continue };
        let mut row = vec![
            Text::new().plain(name.clone()).plain(" (").code(id).plain(")"),
            Text::new().num(fixed(r.area_ha, 0), Some(s_src(id, NO_CONTROL, "area_ha"))),
        ];
        row.extend(change_cells(d, r));
        row.push(num_cell(r, sc::CANOPY_FRACTION_START, |v| fixed(v, 3), 1.0).plain(" → ").then(num_cell(
            r,
            sc::CANOPY_FRACTION_END,
            |v| fixed(v, 3),
            1.0,
        )));
        for (k, c) in i.contaminants.iter().enumerate() {
            row.push(exceed_cell(r, k, &c.name, c.guideline_mg_per_l.is_some()));
        }
        rows.push(row);
    }
    let n = head.len();
    doc.table(Table {
        caption: "Every catchment without control, each from its own (local) runoff: yield change against the baseline, canopy fraction and guideline status"
            .into(),
        align: (0..n).map(|k| if k == 0 || k >= n - i.contaminants.len() { Align::Left } else { Align::Right }).collect(),
        head,
        rows,
        note: Some(Text::new().plain("Source: ").code(SUMMARY).plain(if d.ensemble.is_some() {
            "; ranges in brackets: 5–95 % of ensemble members (ensemble.csv)."
        } else {
            "."
        })),
    });
}

pub(super) fn conc_cell(d: &RunData, id: &str, year: i32, k: usize, name: &str) -> Text {
    let ys = d.years(id, NO_CONTROL);
    match ys.iter().find(|y| y.year == year).and_then(|y| y.conc.get(k).copied().flatten()) {
        Some(v) => {
            Text::new().num(sig(v, 3), Some(Source::new("yearly.csv", &[id, NO_CONTROL, &year.to_string()], &format!("{name}_mg_per_l"))))
        }
        None => undefined(),
    }
}

// Over 100 lines on purpose: one catchment's subsection, paragraph after paragraph in reading order; split up, the prose order would be scattered over functions.
pub(super) fn catchment_detail(d: &RunData, doc: &mut Doc, id: &str, name: &str) {
    let i = &d.info;
    doc.heading(4, name);
    let stem = file_stem(id);
    let Some(nc) = d.summary_row(id, NO_CONTROL) else { return };
    let mut t = Text::new()
        .plain(format!("{name} ("))
        .code(id)
        .plain(", ")
        .num(fixed(nc.area_ha, 0), Some(s_src(id, NO_CONTROL, "area_ha")))
        .plain(" ha). Without control its yield changes by ");
    t = t
        .then(pct_cell(nc, sc::YIELD_CHANGE_HORIZON_PCT, nc.get(sc::YIELD_CHANGE_HORIZON_PCT)))
        .plain(format!(" % by {} against the baseline", i.end_year()));
    if let Some(v) = nc.get(sc::CHANGE_VS_UNINVADED_HORIZON_PCT) {
        t = t
            .plain(" and by ")
            .num(signed(v, 1), Some(s_src(id, NO_CONTROL, sc::CHANGE_VS_UNINVADED_HORIZON_PCT)))
            .plain(" % against the same catchment with no invader at all");
    }
    t = t
        .plain("; in the last year that is ")
        .then(num_cell(nc, sc::WATER_LOST_HORIZON_M3_PER_YR, |v| fixed(v, 2), MILLION))
        .plain(" million m³ less water than the baseline.");
    // The most influential uncertain parameter at the horizon, when ranked.
    if let Some(top) = d.sensitivity.as_ref().and_then(|rows| {
        rows.iter()
            .filter(|r| r.catchment == id && r.strategy == NO_CONTROL && r.at == "horizon" && r.spearman_rho.is_some())
            .min_by_key(|r| r.rank)
    }) {
        let key = [id, NO_CONTROL, "horizon", top.parameter.as_str()];
        t = t
            .plain(" Across the ensemble its yield change at the horizon depends most on ")
            .code(&top.parameter)
            .plain(" (Spearman ρ = ")
            .num(fixed(top.spearman_rho.unwrap_or(f64::NAN), 2), Some(Source::new("sensitivity.csv", &key, "spearman_rho")))
            .plain(").");
    }
    doc.para(t);

    // Strategies.
    let mut head = vec!["Strategy".to_string()];
    head.extend(change_heads(d));
    head.push("Canopy at end".into());
    for c in &i.contaminants {
        head.push(format!("{} first above guideline", c.name));
    }
    let rows: Vec<Vec<Text>> = i
        .strategies
        .iter()
        .filter_map(|st| d.summary_row(id, st))
        .map(|r| {
            let mut row = vec![Text::new().code(&r.strategy)];
            row.extend(change_cells(d, r));
            row.push(num_cell(r, sc::CANOPY_FRACTION_END, |v| fixed(v, 3), 1.0));
            for (k, c) in i.contaminants.iter().enumerate() {
                row.push(exceed_cell(r, k, &c.name, c.guideline_mg_per_l.is_some()));
            }
            row
        })
        .collect();
    let n = head.len();
    doc.table(Table {
        caption: format!("{name}: yield change against the baseline under each strategy"),
        align: (0..n).map(|k| if k == 0 || k >= n - i.contaminants.len() { Align::Left } else { Align::Right }).collect(),
        head,
        rows,
        note: None,
    });

    // Concentrations against guidelines (no-control).
    if !i.contaminants.is_empty() {
        let ys = d.years(id, NO_CONTROL);
        let y20 = d.offsets.iter().find(|&&o| o == 20).map(|o| i.start_year + o).filter(|&y| y <= i.end_year());
        let mut head = vec!["Contaminant".to_string(), "Guideline, mg/L".into(), format!("{}, mg/L", i.start_year)];
        if let Some(y) = y20 {
            head.push(format!("{y}, mg/L"));
        }
        head.push(format!("{}, mg/L", i.end_year()));
        head.push("Highest (year)".into());
        head.push("First above guideline".into());
        let prob = d.ensemble.is_some();
        if prob {
            head.push(format!("Share of members above guideline in {}", i.end_year()));
        }
        let rows: Vec<Vec<Text>> = i
            .contaminants
            .iter()
            .enumerate()
            .map(|(k, c)| {
                let mut row = vec![
                    Text::new().code(&c.name),
                    c.guideline_mg_per_l
                        .map(|g| {
                            Text::new().num(
                                num_plain(g),
                                Some(Source::new("run_info.json", &[], &format!("contaminants.{}.guideline_mg_per_l", c.name))),
                            )
                        })
                        .unwrap_or_else(|| Text::from("none")),
                    conc_cell(d, id, i.start_year, k, &c.name),
                ];
                if let Some(y) = y20 {
                    row.push(conc_cell(d, id, y, k, &c.name));
                }
                row.push(conc_cell(d, id, i.end_year(), k, &c.name));
                let max =
                    ys.iter().filter_map(|y| y.conc.get(k).copied().flatten().map(|v| (v, y.year))).max_by(|a, b| a.0.total_cmp(&b.0));
                row.push(match max {
                    Some((v, y)) => Text::new()
                        .num(sig(v, 3), Some(Source::new("yearly.csv", &[id, NO_CONTROL, &y.to_string()], &format!("{}_mg_per_l", c.name))))
                        .plain(format!(" ({y})")),
                    None => undefined(),
                });
                row.push(exceed_cell(nc, k, &c.name, c.guideline_mg_per_l.is_some()));
                if prob {
                    let q = d.ensemble.as_ref().and_then(|e| e.get(id, NO_CONTROL, &format!("{}_mg_per_l", c.name), i.end_year()));
                    row.push(match q.and_then(|q| q.prob_above_guideline) {
                        Some(p) => Text::new()
                            .num(
                                fixed(100.0 * p, 0),
                                Some(
                                    Source::new(
                                        "ensemble.csv",
                                        &[
                                            id,
                                            crate::schema::columns::scope::LOCAL,
                                            NO_CONTROL,
                                            &i.end_year().to_string(),
                                            &format!("{}_mg_per_l", c.name),
                                        ],
                                        "prob_above_guideline",
                                    )
                                    .scaled(0.01),
                                ),
                            )
                            .plain(" %"),
                        None => undefined(),
                    });
                }
                row
            })
            .collect();
        let n = head.len();
        let low = ys.iter().filter(|y| y.low_runoff).count();
        let mut note = Text::new().plain("Without control; from yearly.csv (first year above guideline from summary.csv).");
        if low > 0 {
            note = note.plain(format!(
                " In {low} of {} years runoff was too small to state a concentration (flag low-runoff); those years are left out.",
                ys.len()
            ));
        }
        let first_idx = head.iter().position(|h| h == "First above guideline");
        doc.table(Table {
            caption: format!("{name}: concentrations against guidelines"),
            align: (0..n).map(|k| if k == 0 || Some(k) == first_idx { Align::Left } else { Align::Right }).collect(),
            head,
            rows,
            note: Some(note),
        });
    }

    // Programme economics for the catchment.
    let progs: Vec<&SummaryRow> = d.programmes().filter_map(|st| d.summary_row(id, st)).collect();
    if !progs.is_empty() {
        doc.table(economics_table(
            d,
            &progs,
            format!("{name}: what each control programme costs and saves (its share of the basin programme)"),
        ));
    }

    // Figures.
    figure_if(
        d,
        doc,
        &format!("{stem}_yield"),
        Text::new()
            .plain(format!("{name}: annual water yield without control, against the baseline (today's cover held) and no invasion.")),
    );
    figure_if(
        d,
        doc,
        &format!("{stem}_yield_range"),
        Text::new().plain(format!(
            "{name}: annual water yield without control with the central parameter values, and the median, 25–75 % and 5–95 % of ensemble members."
        )),
    );
    for c in &i.contaminants {
        let base = format!("{stem}_{}", c.name);
        let s = if has_stem(d, &format!("{base}_range")) { format!("{base}_range") } else { base };
        let g = c.guideline_mg_per_l.map(|g| format!(" against the guideline of {} mg/L", num_plain(g))).unwrap_or_default();
        let bands = if s.ends_with("_range") { ", with 5–95 % and 25–75 % bands and the median across ensemble members" } else { "" };
        figure_if(d, doc, &s, Text::new().plain(format!("{name}: {} concentration without control{g}{bands}.", c.name)));
    }
    figure_if(d, doc, &format!("{stem}_cover"), Text::new().plain(format!("{name}: infested area by density class without control.")));
}
