//! Section 4, first: what arrives at the receiving nodes (supply intakes and any other
//! catchment that receives flow from others). Every number here is of the water that
//! reaches the node — the sums over all catchments draining to it, flow-weighted
//! concentrations (`arriving` rows of `summary.csv` and `ensemble.csv`) — never the
//! node catchment's own runoff, which the per-catchment results show as local.

use super::*;

/// The `arriving` row of a node and strategy.
fn arriving_row<'a>(d: &'a RunData, node: &str, strategy: &str) -> Option<&'a SummaryRow> {
    d.arriving.iter().find(|r| r.catchment == node && r.strategy == strategy)
}

/// Nodes in file order (from their no-control rows).
fn node_ids(d: &RunData) -> Vec<(String, String)> {
    d.arriving.iter().filter(|r| r.strategy == NO_CONTROL).map(|r| (r.catchment.clone(), r.name.clone())).collect()
}

/// Share of members above the guideline at the horizon for what arrives at `node`.
fn prob_cell(d: &RunData, node: &str, strategy: &str, contaminant: &str) -> Text {
    let year = d.info.end_year();
    let variable = crate::schema::columns::mg_per_l(contaminant);
    let q = d.ensemble.as_ref().and_then(|e| e.get_arriving(node, strategy, &variable, year));
    match q.and_then(|q| q.prob_above_guideline) {
        Some(p) => Text::new()
            .num(
                fixed(100.0 * p, 0),
                Some(
                    Source::new("ensemble.csv", &[node, scope::ARRIVING, strategy, &year.to_string(), &variable], "prob_above_guideline")
                        .scaled(0.01),
                ),
            )
            .plain(" %"),
        None => undefined(),
    }
}

/// "At the intakes": one table without control, one per programme, and the node figures.
pub(super) fn intakes_section(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    let nodes = node_ids(d);
    if nodes.is_empty() {
        return;
    }
    doc.heading(3, "At the intakes (receiving nodes)");
    doc.para(
        Text::new()
            .plain(
                "What reaches each catchment that receives flow from others (a supply intake, or any downstream node): volumes summed \
                 over every catchment draining to it, itself included, and concentrations flow-weighted over them. These are the \
                 numbers a water-supply decision turns on; the per-catchment results below are each catchment's own (local) runoff. \
                 Changes are against today's cover held fixed, as means over 10 years ending in the year named. Source: ",
            )
            .code(SUMMARY)
            .plain(" (rows with scope ")
            .code(scope::ARRIVING)
            .plain(")")
            .plain(if d.ensemble.is_some() { "; ranges in brackets: 5–95 % of ensemble members (ensemble.csv)." } else { "." }),
    );
    for strategy in i.strategies.iter() {
        let mut head = vec!["Node".to_string(), "Area drained, ha".into()];
        head.extend(change_heads(d));
        head.push("Water lost, 10-yr mean to the horizon, million m³/yr".into());
        for c in &i.contaminants {
            head.push(format!("{}: guideline status", c.name));
            if d.ensemble.is_some() && c.guideline_mg_per_l.is_some() {
                head.push(format!("{}: members above the guideline in {}", c.name, i.end_year()));
            }
        }
        let programme = strategy != NO_CONTROL;
        if programme {
            head.extend([
                "Programme cost upstream, $ million".into(),
                "Water saved arriving, million m³".into(),
                "Levelised cost, $/m³".into(),
            ]);
            if i.water_value_per_m3.is_some() {
                head.push("Benefit-cost ratio".into());
            }
        }
        let mut rows = Vec::new();
        for (id, name) in &nodes {
            let Some(r) = arriving_row(d, id, strategy) else { continue };
            let mut row = vec![
                Text::new().plain(name.clone()).plain(" (").code(id).plain(")"),
                Text::new().num(fixed(r.area_ha, 0), Some(row_src(r, "area_ha"))),
            ];
            row.extend(change_cells(d, r));
            row.push(num_cell(r, sc::WATER_LOST_HORIZON_M3_PER_YR, |v| fixed(v, 2), MILLION));
            for (k, c) in i.contaminants.iter().enumerate() {
                row.push(exceed_cell(r, k, &c.name, c.guideline_mg_per_l.is_some()));
                if d.ensemble.is_some() && c.guideline_mg_per_l.is_some() {
                    row.push(prob_cell(d, id, strategy, &c.name));
                }
            }
            if programme {
                row.push(num_cell(r, sc::TOTAL_COST, |v| fixed(v, 2), MILLION));
                row.push(num_cell(r, sc::WATER_SAVED_M3, |v| fixed(v, 2), MILLION));
                row.push(num_cell(r, sc::LEVELISED_COST_PER_M3, |v| sig(v, 3), 1.0));
                if i.water_value_per_m3.is_some() {
                    row.push(num_cell(r, sc::BENEFIT_COST_RATIO, |v| fixed(v, 2), 1.0));
                }
            }
            rows.push(row);
        }
        let n = head.len();
        doc.table(Table {
            caption: if programme {
                format!("What arrives at each node under the programme '{strategy}'")
            } else {
                "What arrives at each node without control".to_string()
            },
            align: (0..n).map(|k| if k == 0 { Align::Left } else { Align::Right }).collect(),
            head,
            rows,
            note: Some(Text::new().plain("Source: ").code(SUMMARY).plain(", scope ").code(scope::ARRIVING).plain(".")),
        });
    }
    let members = if d.ensemble.is_some() { ", and the median, 25–75 % and 5–95 % of ensemble members (10-year means)" } else { "" };
    for (id, name) in &nodes {
        let stem = figs::arriving_stem(id);
        figure_if(
            d,
            doc,
            &format!("{stem}_yield"),
            Text::new().plain(format!(
                "{name}: change of the water arriving at the node without control, against today's cover held fixed — each year and its \
                 10-year mean with the central parameters{members}."
            )),
        );
        for c in &i.contaminants {
            let g = c.guideline_mg_per_l.map(|g| format!(" against the guideline of {} mg/L", num_plain(g))).unwrap_or_default();
            figure_if(
                d,
                doc,
                &format!("{stem}_{}", c.name),
                Text::new().plain(format!(
                    "{name}: flow-weighted {} concentration of the water arriving at the node without control{g}{}.",
                    c.name,
                    if d.ensemble.is_some() { ", with the median, 25–75 % and 5–95 % of ensemble members" } else { "" }
                )),
            );
        }
    }
}
