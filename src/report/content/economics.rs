//! Section 4, programmes: control economics and the cost of delay.

use super::*;

/// The members' 5–95 % range of a programme's `variable` (economics.csv) as " (p5 to p95)".
fn eco_range(d: &RunData, r: &SummaryRow, variable: &str, f: impl Fn(f64) -> String, scale: f64) -> Text {
    let Some(q) =
        d.economics.as_ref().and_then(|e| e.get(&(r.catchment.clone(), r.scope.clone(), r.strategy.clone(), variable.to_string())))
    else {
        return Text::new();
    };
    let key = [r.catchment.as_str(), r.scope.as_str(), r.strategy.as_str(), variable];
    let src = |c: &str| Some(Source::new(crate::schema::columns::economics::FILE, &key, c).scaled(scale));
    Text::new().plain(" (").num(f(q.p5 / scale), src("p5")).plain(" to ").num(f(q.p95 / scale), src("p95")).plain(")")
}

/// The share of members whose NPV is above zero, as a percentage.
fn npv_above_zero(d: &RunData, r: &SummaryRow) -> Text {
    let key = (r.catchment.clone(), r.scope.clone(), r.strategy.clone(), sc::NPV.to_string());
    match d.economics.as_ref().and_then(|e| e.get(&key)).and_then(|q| q.prob_above_zero) {
        Some(p) => Text::new()
            .num(
                fixed(100.0 * p, 0),
                Some(
                    Source::new(
                        crate::schema::columns::economics::FILE,
                        &[&r.catchment, &r.scope, &r.strategy, sc::NPV],
                        "prob_above_zero",
                    )
                    .scaled(0.01),
                ),
            )
            .plain(" %"),
        None => undefined(),
    }
}

pub(super) fn economics_table(d: &RunData, rows: &[&SummaryRow], caption: String) -> Table {
    let ranged = d.economics.is_some();
    let has_value = d.info.water_value_per_m3.is_some();
    let mut head: Vec<String> = vec![
        "Strategy".into(),
        "Total cost, $".into(),
        "Present value of cost, $".into(),
        "Water saved, million m³".into(),
        "Discounted water saved, million m³".into(),
        "Cost per m³, $".into(),
        "Levelised cost, $/m³".into(),
    ];
    if has_value {
        head.push("NPV, $".into());
        head.push("Benefit-cost ratio".into());
        if ranged {
            head.push("Members with NPV above zero".into());
        }
    }
    let body = rows
        .iter()
        .map(|r| {
            let mut row = vec![
                Text::new().code(&r.strategy),
                num_cell(r, sc::TOTAL_COST, |v| fixed(v, 0), 1.0),
                num_cell(r, sc::TOTAL_COST_PV, |v| fixed(v, 0), 1.0),
                num_cell(r, sc::WATER_SAVED_M3, |v| fixed(v, 2), MILLION).then(eco_range(
                    d,
                    r,
                    sc::WATER_SAVED_M3,
                    |v| fixed(v, 2),
                    MILLION,
                )),
                num_cell(r, sc::WATER_SAVED_PV_M3, |v| fixed(v, 2), MILLION),
                num_cell(r, sc::COST_PER_M3, |v| sig(v, 3), 1.0),
                num_cell(r, sc::LEVELISED_COST_PER_M3, |v| sig(v, 3), 1.0).then(eco_range(
                    d,
                    r,
                    sc::LEVELISED_COST_PER_M3,
                    |v| sig(v, 3),
                    1.0,
                )),
            ];
            if has_value {
                row.push(num_cell(r, sc::NPV, |v| fixed(v, 0), 1.0).then(eco_range(d, r, sc::NPV, |v| fixed(v, 0), 1.0)));
                row.push(num_cell(r, sc::BENEFIT_COST_RATIO, |v| fixed(v, 2), 1.0).then(eco_range(
                    d,
                    r,
                    sc::BENEFIT_COST_RATIO,
                    |v| fixed(v, 2),
                    1.0,
                )));
                if ranged {
                    row.push(npv_above_zero(d, r));
                }
            }
            row
        })
        .collect();
    let n = head.len();
    Table {
        caption,
        align: (0..n).map(|k| if k == 0 { Align::Left } else { Align::Right }).collect(),
        head,
        rows: body,
        note: Some(
            Text::new()
                .plain("Water saved is against no-control in the same catchment and year, summed over the horizon; present values at the run's discount rate. Source: ")
                .code(SUMMARY)
                .plain(if ranged { "; ranges in brackets: 5–95 % of ensemble members (economics.csv, each member against its own no-control run)." } else { "." }),
        ),
    }
}

pub(super) fn economics_results(d: &RunData, doc: &mut Doc) {
    doc.heading(3, "Strategy economics");
    let rows: Vec<&SummaryRow> = d.programmes().filter_map(|st| d.summary_row(BASIN_ID, st)).collect();
    if !rows.is_empty() {
        doc.table(economics_table(
            d,
            &rows,
            "The basin: what each control programme costs and what water it saves over the horizon".into(),
        ));
    }
    figure_if(
        d,
        doc,
        "strategies_cost_vs_water",
        Text::new().plain("Cumulative control cost against cumulative water saved for the basin, one line per programme: the steeper the line, the more water each dollar buys."),
    );
    for st in d.programmes() {
        figure_if(
            d,
            doc,
            &format!("basin_{}_cover", file_stem(st)),
            Text::new().plain(format!("Infested area of the basin by density class under {st}.")),
        );
        figure_if(
            d,
            doc,
            &format!("map_yield_change_horizon_{}", file_stem(st)),
            Text::new().plain(format!("Map of the yield change at the horizon ({}) under {st}, by catchment.", d.info.end_year())),
        );
    }
    let budget: Vec<(&(String, String), &crate::report::folder::BudgetTotals)> = d.budget.iter().collect();
    if !budget.is_empty() {
        let rows = budget
            .iter()
            .map(|((st, pool), b)| {
                vec![
                    Text::new().code(st),
                    Text::new().code(pool),
                    Text::from(b.years.to_string()),
                    b.available.map(|v| Text::from(fixed(v, 0))).unwrap_or_else(|| Text::from("unlimited")),
                    Text::from(fixed(b.spent, 0)),
                    Text::from(fixed(b.unspent, 0)),
                    b.available_ha.map(|v| Text::from(fixed(v, 1))).unwrap_or_else(|| Text::from("no area limit")),
                    Text::from(fixed(b.treated_ha, 1)),
                ]
            })
            .collect();
        doc.table(Table {
            caption: "Budgets over the horizon, by strategy and budget pool (sums of budget.csv)".into(),
            head: vec![
                "Strategy".into(),
                "Pool".into(),
                "Years".into(),
                "Available, $".into(),
                "Spent, $".into(),
                "Unspent, $".into(),
                "Area available, ha".into(),
                "Treated, ha".into(),
            ],
            align: vec![Align::Left, Align::Left, Align::Right, Align::Right, Align::Right, Align::Right, Align::Right, Align::Right],
            rows,
            note: None,
        });
    }
}

pub(super) fn delay_results(d: &RunData, doc: &mut Doc) {
    if d.delay.is_empty() {
        return;
    }
    doc.heading(3, "Cost of delay");
    let mut strategies: Vec<&String> = Vec::new();
    for r in &d.delay {
        if !strategies.contains(&&r.strategy) {
            strategies.push(&r.strategy);
        }
    }
    for st in strategies {
        let mut rows: Vec<&crate::report::folder::DelayRow> = d.delay.iter().filter(|r| &r.strategy == st).collect();
        rows.sort_by_key(|r| r.delay_yr);
        let src = |r: &crate::report::folder::DelayRow, col: &str, scale: f64| {
            Some(Source::new("delay.csv", &[st.as_str(), &r.delay_yr.to_string()], col).scaled(scale))
        };
        if let (Some(a), Some(b)) = (rows.first(), rows.last()) {
            if a.delay_yr != b.delay_yr {
                doc.para(
                    Text::new()
                        .plain(format!("Starting {st} {} years later changes its total cost from $", b.delay_yr - a.delay_yr))
                        .num(fixed(a.total_cost, 0), src(a, "total_cost", 1.0))
                        .plain(" to $")
                        .num(fixed(b.total_cost, 0), src(b, "total_cost", 1.0))
                        .plain(" and the water lost against the baseline over the horizon from ")
                        .num(fixed(a.water_lost_vs_baseline_m3 / MILLION, 2), src(a, "water_lost_vs_baseline_m3", MILLION))
                        .plain(" to ")
                        .num(fixed(b.water_lost_vs_baseline_m3 / MILLION, 2), src(b, "water_lost_vs_baseline_m3", MILLION))
                        .plain(" million m³ (negative: more water than the baseline)."),
                );
            }
        }
        let body = rows
            .iter()
            .map(|r| {
                vec![
                    Text::new().num(r.delay_yr.to_string(), src(r, "delay_yr", 1.0)),
                    Text::new().num(r.start_year.to_string(), src(r, "start_year", 1.0)),
                    Text::new().num(fixed(r.total_cost, 0), src(r, "total_cost", 1.0)),
                    Text::new().num(fixed(r.total_cost_pv, 0), src(r, "total_cost_pv", 1.0)),
                    Text::new().num(fixed(r.water_saved_m3 / MILLION, 2), src(r, "water_saved_m3", MILLION)),
                    Text::new().num(fixed(r.water_lost_vs_baseline_m3 / MILLION, 2), src(r, "water_lost_vs_baseline_m3", MILLION)),
                    Text::new().num(fixed(r.final_infested_ha, 0), src(r, "final_infested_ha", 1.0)),
                ]
            })
            .collect();
        doc.table(Table {
            caption: format!("{st}: the same programme started later"),
            head: vec![
                "Delay, years".into(),
                "Start year".into(),
                "Total cost, $".into(),
                "Present value of cost, $".into(),
                "Water saved, million m³".into(),
                "Water lost vs baseline, million m³".into(),
                "Infested at horizon, ha".into(),
            ],
            align: vec![Align::Right; 7],
            rows: body,
            note: Some(Text::new().plain("Source: ").code("delay.csv").plain(". A later start costs more in total because the stands it meets are denser; its present value can still fall because the spending is discounted further.")),
        });
        figure_if(
            d,
            doc,
            &format!("delay_{}", file_stem(st)),
            Text::new().plain(format!("{st}: total cost and water lost as the start is delayed.")),
        );
    }
}
