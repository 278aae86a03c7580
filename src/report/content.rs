//! What the report says, section by section, built from [`RunData`] only.
//!
//! Every number shown is a cell of one of the run's files (its [`Source`] is kept)
//! or a simple statistic of such cells (a mean of a climate column, a sum of a
//! budget column, a maximum over years), described as such where it appears.

use super::doc::{Align, Doc, Figure, Source, Table, Text};
use super::figures::{self as figs, Drawn};
use super::fmt::{fixed, sig, signed, UNDEFINED};
use super::folder::{RunData, SummaryRow};
use crate::schema::columns::summary as sc;
use crate::schema::run_info::Curves;
use crate::schema::{BASIN_ID, NO_CONTROL};
use crate::schema::file_stem;

pub use super::folder::MAX_DETAILED;

/// Most rows of an input table shown.
pub const MAX_INPUT_ROWS: usize = 200;

const SUMMARY: &str = "summary.csv";
/// What `sensitivity.csv` ranks parameters against when it names no variable
/// (its documented content: the yield change against the baseline).
const RANKED_RESULT: &str = "yield change against the baseline";
const MILLION: f64 = 1e6;

fn s_src(catchment: &str, strategy: &str, col: &str) -> Source {
    Source::new(SUMMARY, &[catchment, strategy], col)
}

fn undefined() -> Text {
    Text::new().plain(UNDEFINED)
}

/// A summary value as a change in % (1 decimal, signed).
fn pct_cell(r: &SummaryRow, col: &str, v: Option<f64>) -> Text {
    match v {
        Some(v) => Text::new().num(signed(v, 1), Some(s_src(&r.catchment, &r.strategy, col))),
        None => undefined(),
    }
}

/// The ensemble range of `variable` for a catchment, strategy and year as " (p5 to p95)".
fn range_text(d: &RunData, catchment: &str, strategy: &str, variable: &str, year: i32, decimals: usize, signed_fmt: bool) -> Text {
    let Some(e) = &d.ensemble else { return Text::new() };
    let Some(q) = e.get(catchment, strategy, variable, year) else { return Text::new() };
    let f = |v: f64| if signed_fmt { signed(v, decimals) } else { fixed(v, decimals) };
    let key = [catchment, strategy, &year.to_string(), variable];
    let src = |c: &str| Some(Source::new("ensemble.csv", &key, c));
    Text::new().plain(" (").num(f(q.p5), src("p5")).plain(" to ").num(f(q.p95), src("p95")).plain(")")
}

fn offset_col(o: i32) -> String {
    format!("yield_change_{o}y_pct")
}

/// Change cells at each offset and the horizon, with ensemble ranges when present.
fn change_cells(d: &RunData, r: &SummaryRow) -> Vec<Text> {
    let mut v: Vec<Text> = d
        .offsets
        .iter()
        .zip(&r.at_offsets)
        .map(|(&o, val)| {
            pct_cell(r, &offset_col(o), *val).then(if val.is_some() {
                range_text(d, &r.catchment, &r.strategy, "yield_change_pct", d.info.start_year + o, 1, true)
            } else {
                Text::new()
            })
        })
        .collect();
    v.push(pct_cell(r, sc::YIELD_CHANGE_HORIZON_PCT, r.get(sc::YIELD_CHANGE_HORIZON_PCT)).then(range_text(
        d,
        &r.catchment,
        &r.strategy,
        "yield_change_pct",
        d.info.end_year(),
        1,
        true,
    )));
    v
}

fn change_heads(d: &RunData) -> Vec<String> {
    let mut h: Vec<String> = d.offsets.iter().map(|&o| format!("Yield change at {o} y ({}), %", d.info.start_year + o)).collect();
    h.push(format!("At horizon ({}), %", d.info.end_year()));
    h
}

fn num_cell(r: &SummaryRow, col: &str, f: impl Fn(f64) -> String, scale: f64) -> Text {
    match r.get(col) {
        Some(v) => Text::new().num(f(v / scale), Some(s_src(&r.catchment, &r.strategy, col).scaled(scale))),
        None => undefined(),
    }
}

fn exceed_cell(r: &SummaryRow, k: usize, name: &str, has_guideline: bool) -> Text {
    if !has_guideline {
        return Text::new().plain("no guideline");
    }
    match r.first_exceedance.get(k).copied().flatten() {
        Some(y) => Text::new().num(y.to_string(), Some(s_src(&r.catchment, &r.strategy, &format!("{name}_first_exceedance_year")))),
        None => Text::new().plain("not exceeded"),
    }
}

fn display_name(d: &RunData, id: &str) -> String {
    if id == BASIN_ID {
        return "Basin (all catchments)".into();
    }
    d.catchments.iter().find(|c| c.0 == id).map(|c| c.1.clone()).unwrap_or_else(|| id.to_string())
}

fn figure_if(d: &RunData, doc: &mut Doc, stem: &str, caption: Text) -> bool {
    let png = Some(format!("{stem}.png")).filter(|f| d.has_figure(f));
    let svg = Some(format!("{stem}.svg")).filter(|f| d.has_figure(f));
    if png.is_none() && svg.is_none() {
        return false;
    }
    doc.figure(Figure { png, svg, caption });
    true
}

/// True when `figures/<stem>.png` or `.svg` exists.
fn has_stem(d: &RunData, stem: &str) -> bool {
    d.has_figure(&format!("{stem}.png")) || d.has_figure(&format!("{stem}.svg"))
}

fn method_name(m: &Curves) -> &'static str {
    match m {
        Curves::Zhang { .. } => "Zhang et al. (2001)",
        Curves::Fu { .. } => "Fu (1981)",
    }
}

fn num_plain(v: f64) -> String {
    // Parameters as the scenario gave them: shortest exact decimal form.
    let s = format!("{v:?}");
    if s.contains('e') {
        sig(v, 6)
    } else {
        s
    }
}

/// A number of run_info.json (at the dotted `path`) as a reader would write it
/// ([`super::fmt::param`]: whole numbers plainly, `2.0` as 2, `0.06`).
fn info_num(path: &str, v: f64) -> Text {
    Text::new().num(super::fmt::param(v), Some(Source::new(crate::schema::RUN_INFO_FILE, &[], path)))
}

/// Builds the report document.
pub fn build(d: &RunData, drawn: &[Drawn]) -> Doc {
    let i = &d.info;
    let method = method_name(&i.hydrology.curves);
    let mut doc = Doc::new(
        i.title.clone(),
        format!(
            "Screening report · {} catchments · {}–{} · {} · yieldshift {}",
            d.catchments.len(),
            i.start_year,
            i.end_year(),
            method,
            i.version
        ),
    );
    doc.notice(
        "Screening-level estimate",
        vec![Text::new()
            .plain(
                "Mean-annual water-balance curves applied year by year: indicative, not a site hydrological assessment. \
             Read section ",
            )
            .plain("“Cautions”")
            .plain(" before using any number in this report.")],
    );
    summary_section(d, &mut doc);
    inputs_section(d, &mut doc);
    methods_section(d, &mut doc);
    results_section(d, &mut doc, drawn);
    limitations_section(d, &mut doc);
    cautions_section(d, &mut doc);
    references_section(d, &mut doc);
    about_section(d, &mut doc, drawn);
    doc
}

// ---------------------------------------------------------------- 1. Summary

fn summary_section(d: &RunData, doc: &mut Doc) {
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
                        .then(range_text(d, BASIN_ID, NO_CONTROL, "yield_change_pct", i.start_year + o, 1, true))
                        .plain(format!(" after {o} years ({})", i.start_year + o))
                })
            })
            .collect();
        for (k, p) in parts.into_iter().enumerate() {
            if k > 0 {
                t = t.plain(", ");
            }
            t = t.then(p);
        }
        if let Some(h) = b.get(sc::YIELD_CHANGE_HORIZON_PCT) {
            t = t
                .plain(" and ")
                .num(signed(h, 1), Some(s_src(BASIN_ID, NO_CONTROL, sc::YIELD_CHANGE_HORIZON_PCT)))
                .plain(format!(" % by {}", i.end_year()))
                .then(range_text(d, BASIN_ID, NO_CONTROL, "yield_change_pct", i.end_year(), 1, true));
        }
        t = t.plain(", against today's cover held fixed.");
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
                    .plain(format!("After {o} years the largest change is in {} (", worst.name))
                    .then(cell(worst))
                    .plain(format!(" %), the smallest in {} (", best.name))
                    .then(cell(best))
                    .plain(" %)."),
            );
        }
    }
    // Guidelines.
    for (k, c) in i.contaminants.iter().enumerate() {
        let Some(g) = c.guideline_mg_per_l else { continue };
        let mut first: Vec<(&SummaryRow, i32)> = d
            .summary
            .iter()
            .filter(|r| r.strategy == NO_CONTROL && r.catchment != BASIN_ID)
            .filter_map(|r| r.first_exceedance.get(k).copied().flatten().map(|y| (r, y)))
            .collect();
        first.sort_by_key(|x| x.1);
        let mut t = Text::new()
            .strong(format!("{}. ", c.name))
            .plain("Guideline ")
            .num(num_plain(g), Some(Source::new("run_info.json", &[], &format!("contaminants.{}.guideline_mg_per_l", c.name))))
            .plain(" mg/L: ");
        if first.is_empty() {
            t = t.plain("not exceeded in any catchment without control.");
        } else {
            t = t.plain(format!("exceeded without control in {} of {} catchments, first in ", first.len(), d.catchments.len()));
            let (r, y) = first[0];
            t = t
                .plain(format!("{} (", r.name))
                .num(y.to_string(), Some(s_src(&r.catchment, NO_CONTROL, &format!("{}_first_exceedance_year", c.name))))
                .plain(").");
        }
        bullets.push(t);
    }
    // Best programme by benefit-cost ratio (when water has a value) or levelised cost.
    let basin_rows: Vec<&SummaryRow> = d.summary.iter().filter(|r| r.catchment == BASIN_ID && r.strategy != NO_CONTROL).collect();
    let by_bcr = basin_rows
        .iter()
        .filter(|r| r.get(sc::BENEFIT_COST_RATIO).is_some())
        .max_by(|a, b| a.get(sc::BENEFIT_COST_RATIO).unwrap_or(0.0).total_cmp(&b.get(sc::BENEFIT_COST_RATIO).unwrap_or(0.0)));
    let by_lcoe = basin_rows
        .iter()
        .filter(|r| r.get(sc::LEVELISED_COST_PER_M3).is_some_and(|v| v > 0.0))
        .min_by(|a, b| a.get(sc::LEVELISED_COST_PER_M3).unwrap_or(f64::MAX).total_cmp(&b.get(sc::LEVELISED_COST_PER_M3).unwrap_or(f64::MAX)));
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
            "Values in brackets are the 5th to 95th percentiles across the {} ensemble members (ensemble.csv); the value before them is the projection with central parameter values.",
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
    head.push("Water lost in last year, million m³/yr".into());
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

// ---------------------------------------------------------------- 2. Inputs

fn toml_text(v: &toml::Value) -> String {
    match v {
        toml::Value::String(s) => s.clone(),
        toml::Value::Integer(i) => i.to_string(),
        toml::Value::Float(f) => num_plain(*f),
        toml::Value::Boolean(b) => b.to_string(),
        toml::Value::Datetime(d) => d.to_string(),
        toml::Value::Array(a) => format!("[{}]", a.iter().map(toml_text).collect::<Vec<_>>().join(", ")),
        toml::Value::Table(t) => match distribution_text(t) {
            Some(s) => s,
            None => format!("{{ {} }}", t.iter().map(|(k, v)| format!("{k} = {}", toml_text(v))).collect::<Vec<_>>().join(", ")),
        },
    }
}

/// `{ dist = "triangular", min = .., mode = .., max = .. }` as readable text.
fn distribution_text(t: &toml::Table) -> Option<String> {
    let kind = t.get("dist")?.as_str()?;
    // Parameters in their natural order (min, mode, max; mean, sd; …), others after.
    const ORDER: [&str; 8] = ["value", "mean", "median", "sd", "sigma_log", "min", "mode", "max"];
    let mut keys: Vec<&String> = t.keys().filter(|k| *k != "dist" && *k != "per").collect();
    keys.sort_by_key(|k| ORDER.iter().position(|o| o == k).unwrap_or(ORDER.len()));
    let params: Vec<String> = keys.iter().map(|k| format!("{k} {}", toml_text(&t[k.as_str()]))).collect();
    let per = match t.get("per").and_then(|v| v.as_str()) {
        Some("catchment") => "drawn independently for each catchment",
        _ => "one draw per member, shared by all catchments",
    };
    Some(format!("{kind}: {} ({per})", params.join(", ")))
}

/// Every distribution in the scenario: (key path, distribution text).
fn distributions(table: &toml::Table, prefix: &str, out: &mut Vec<(String, String)>) {
    for (k, v) in table {
        let path = if prefix.is_empty() { k.clone() } else { format!("{prefix}.{k}") };
        match v {
            toml::Value::Table(t) if t.contains_key("dist") => {
                if let Some(s) = distribution_text(t) {
                    out.push((path, s));
                }
            }
            toml::Value::Table(t) => distributions(t, &path, out),
            toml::Value::Array(a) => {
                for (n, item) in a.iter().enumerate() {
                    if let toml::Value::Table(t) = item {
                        let label = t
                            .get("name")
                            .or_else(|| t.get("catchment"))
                            .and_then(|v| v.as_str())
                            .map(|s| format!("{path}[{s}]"))
                            .unwrap_or_else(|| format!("{path}[{}]", n + 1));
                        distributions(t, &label, out);
                    }
                }
            }
            _ => {}
        }
    }
}

fn input_table_from_csv(t: &super::folder::CsvTable, caption: String) -> Table {
    let numeric: Vec<bool> = (0..t.headers.len())
        .map(|c| (0..t.rows.len()).all(|r| t.text(r, c).is_empty() || t.input_number(r, c).is_some()) && !t.rows.is_empty())
        .collect();
    let keep: Vec<usize> = (0..t.headers.len()).filter(|&c| t.headers[c] != "notes").collect();
    let rows: Vec<Vec<Text>> =
        (0..t.rows.len().min(MAX_INPUT_ROWS)).map(|r| keep.iter().map(|&c| Text::new().plain(t.text(r, c))).collect()).collect();
    let note = (t.rows.len() > MAX_INPUT_ROWS)
        .then(|| Text::new().plain(format!("First {MAX_INPUT_ROWS} of {} rows; all are in ", t.rows.len())).code(&t.name).plain("."));
    Table {
        caption,
        head: keep.iter().map(|&c| t.headers[c].clone()).collect(),
        align: keep.iter().map(|&c| if numeric[c] { Align::Right } else { Align::Left }).collect(),
        rows,
        note: note
            .or_else(|| Some(Text::new().plain("As given in ").code(&t.name).plain("; units are in the column names (mm/yr, ha, kg/yr)."))),
    }
}

fn inputs_section(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    doc.heading(2, "Inputs");
    doc.heading(3, "The run");
    let src = |k: &str| Some(Source::new("run_info.json", &[], k));
    let mut rows = vec![
        vec![Text::from("Scenario file"), Text::new().code(&i.scenario)],
        vec![Text::from("Catchment table"), Text::new().code(&i.catchment_table)],
        vec![
            Text::from("Climate table"),
            match &i.climate_table {
                Some(c) => Text::new().code(c),
                None => Text::from("none: every year uses each catchment's long-term means"),
            },
        ],
        vec![
            Text::from("Projected years"),
            Text::new().num(i.start_year.to_string(), src("start_year")).plain("–").plain(i.end_year().to_string()),
        ],
        vec![Text::from("Water-balance method"), Text::from(method_name(&i.hydrology.curves))],
        vec![Text::from("Strategies"), Text::from(i.strategies.join(", "))],
        vec![Text::from("Discount rate, per year"), Text::new().num(num_plain(i.discount_rate), src("discount_rate"))],
        vec![
            Text::from("Value of water, $/m³"),
            match i.water_value_per_m3 {
                Some(v) => Text::new().num(num_plain(v), src("water_value_per_m3")),
                None => Text::from("not given (no NPV or benefit-cost ratio)"),
            },
        ],
        vec![Text::from("Written by"), Text::from(format!("yieldshift {}", i.version))],
    ];
    if let Some(e) = &d.ensemble {
        rows.push(vec![Text::from("Ensemble members"), Text::from(fixed(e.members, 0))]);
    }
    doc.table(Table {
        caption: "What was run (run_info.json)".into(),
        head: vec!["Item".into(), "Value".into()],
        align: vec![Align::Left, Align::Left],
        rows,
        note: None,
    });

    doc.heading(3, "Catchments");
    match &d.catchment_input {
        Some(t) => {
            doc.table(input_table_from_csv(t, "The catchment table as copied into the run folder".into()));
        }
        None => doc.para(
            Text::new()
                .plain("The catchment table was not copied into this run folder (")
                .code("inputs/")
                .plain("); see the catchment names and areas in the results."),
        ),
    }

    doc.heading(3, "Contaminants");
    let rows: Vec<Vec<Text>> = i
        .contaminants
        .iter()
        .map(|c| {
            let p = |k: &str| Some(Source::new("run_info.json", &[], &format!("contaminants.{}.{k}", c.name)));
            vec![
                Text::new().code(&c.name),
                Text::new().num(num_plain(c.open_export_kg_per_ha_yr), p("open_export_kg_per_ha_yr")),
                Text::new().num(num_plain(c.forest_export_kg_per_ha_yr), p("forest_export_kg_per_ha_yr")),
                match c.guideline_mg_per_l {
                    Some(g) => Text::new().num(num_plain(g), p("guideline_mg_per_l")),
                    None => Text::from("none"),
                },
            ]
        })
        .collect();
    if !rows.is_empty() {
        doc.table(Table {
            caption: "Contaminant export coefficients and guidelines".into(),
            head: vec!["Contaminant".into(), "Open land export, kg/ha/yr".into(), "Under conifer canopy, kg/ha/yr".into(), "Guideline, mg/L".into()],
            align: vec![Align::Left, Align::Right, Align::Right, Align::Right],
            rows,
            note: Some(Text::from("Guidelines are as the scenario states them; check the basis (e.g. nitrate as N or as NO₃⁻) against the applicable standard.")),
        });
    }

    doc.heading(3, "Climate");
    climate_inputs(d, doc);

    doc.heading(3, "Scenario parameters");
    match &d.scenario {
        Some(s) => scenario_tables(s, doc),
        None => doc.para(
            Text::new()
                .plain("The scenario file was not copied into this run folder; the parameters recorded in ")
                .code("run_info.json")
                .plain(" appear in the methods section."),
        ),
    }
}

fn climate_inputs(d: &RunData, doc: &mut Doc) {
    let Some(t) = &d.climate_input else {
        doc.para(match &d.info.climate_table {
            Some(_) => Text::from("The climate table was not copied into this run folder."),
            None => Text::from(
                "No climate table: every projected year uses each catchment's long-term mean rainfall and PET from the catchment table.",
            ),
        });
        return;
    };
    let (Some(cc), Some(yc)) = (t.col("catchment"), t.col("year")) else {
        doc.para(Text::new().plain("The climate table ").code(&t.name).plain(" has no catchment or year column."));
        return;
    };
    let rc = t.col("rain_mm");
    let pc = t.col("pet_mm");
    /// Record years and sums of one catchment's climate rows.
    struct Record {
        id: String,
        first: i64,
        last: i64,
        rows: usize,
        rain_sum: f64,
        rain_n: usize,
        pet_sum: f64,
        pet_n: usize,
    }
    let mut per: Vec<Record> = Vec::new();
    for r in 0..t.rows.len() {
        let id = t.text(r, cc).to_string();
        let Some(y) = t.input_number(r, yc).filter(|y| y.fract() == 0.0).map(|y| y as i64) else { continue };
        let idx = match per.iter().position(|p| p.id == id) {
            Some(k) => k,
            None => {
                per.push(Record { id, first: y, last: y, rows: 0, rain_sum: 0.0, rain_n: 0, pet_sum: 0.0, pet_n: 0 });
                per.len() - 1
            }
        };
        let p = &mut per[idx];
        p.first = p.first.min(y);
        p.last = p.last.max(y);
        p.rows += 1;
        if let Some(v) = rc.and_then(|c| t.input_number(r, c)) {
            p.rain_sum += v;
            p.rain_n += 1;
        }
        if let Some(v) = pc.and_then(|c| t.input_number(r, c)) {
            p.pet_sum += v;
            p.pet_n += 1;
        }
    }
    let mean = |s: f64, n: usize| if n > 0 { Text::from(fixed(s / n as f64, 0)) } else { undefined() };
    let rows: Vec<Vec<Text>> = per
        .iter()
        .map(|p| {
            vec![
                Text::new().code(&p.id),
                Text::from(format!("{}–{}", p.first, p.last)),
                Text::from(p.rows.to_string()),
                mean(p.rain_sum, p.rain_n),
                mean(p.pet_sum, p.pet_n),
            ]
        })
        .collect();
    let rule = d
        .scenario
        .as_ref()
        .and_then(|s| s.table.get("climate").and_then(|c| c.get("beyond_record")).and_then(|v| v.as_str()).map(str::to_string))
        .unwrap_or_else(|| "cycle".into());
    let rule_text = match rule.as_str() {
        "mean" => "use each catchment's long-term means",
        "error" => "are refused",
        _ => "repeat the record cyclically",
    };
    doc.table(Table {
        caption: "The annual climate record (means over each catchment's record years)".into(),
        head: vec!["Catchment".into(), "Years".into(), "Records".into(), "Mean rainfall, mm/yr".into(), "Mean PET, mm/yr".into()],
        align: vec![Align::Left, Align::Left, Align::Right, Align::Right, Align::Right],
        rows,
        note: Some(
            Text::new()
                .plain("Computed from ")
                .code(&t.name)
                .plain(format!(". Projected years outside a catchment's record {rule_text} (beyond_record = \"{rule}\").")),
        ),
    });
}

fn scenario_tables(s: &super::folder::ScenarioDoc, doc: &mut Doc) {
    // Scalars and plain tables as key/value rows; arrays of tables as their own tables.
    let mut kv: Vec<Vec<Text>> = Vec::new();
    let mut arrays: Vec<(&String, &Vec<toml::Value>)> = Vec::new();
    let is_section = |v: &toml::Value| matches!(v, toml::Value::Table(t) if !t.contains_key("dist"));
    for (k, v) in s.table.iter().filter(|(_, v)| !is_section(v)) {
        match v {
            toml::Value::Array(a) if a.iter().all(|x| x.is_table()) && !a.is_empty() => arrays.push((k, a)),
            _ => kv.push(vec![Text::new().code(k), Text::from(toml_text(v))]),
        }
    }
    for (k, v) in s.table.iter().filter(|(_, v)| is_section(v)) {
        if let toml::Value::Table(t) = v {
            for (k2, v2) in t {
                kv.push(vec![Text::new().code(format!("[{k}] {k2}")), Text::from(toml_text(v2))]);
            }
        }
    }
    doc.table(Table {
        caption: format!("Scenario settings as written in {}", s.name),
        head: vec!["Key".into(), "Value".into()],
        align: vec![Align::Left, Align::Left],
        rows: kv,
        note: Some(Text::from("Keys the scenario leaves out take their documented defaults (docs/scenario.md); the values the run used for the model core are listed in the methods section.")),
    });
    for (name, items) in arrays {
        let mut keys: Vec<String> =
            ["name", "catchment"].iter().filter(|k| items.iter().any(|it| it.get(**k).is_some())).map(|k| k.to_string()).collect();
        for it in items {
            if let Some(t) = it.as_table() {
                for k in t.keys() {
                    if !keys.contains(k) {
                        keys.push(k.clone());
                    }
                }
            }
        }
        let rows: Vec<Vec<Text>> = items
            .iter()
            .filter_map(|it| it.as_table())
            .map(|t| keys.iter().map(|k| t.get(k).map(|v| Text::from(toml_text(v))).unwrap_or_else(undefined)).collect())
            .collect();
        doc.table(Table {
            caption: format!("[[{name}]] entries of the scenario"),
            align: vec![Align::Left; keys.len()],
            head: keys,
            rows,
            note: None,
        });
    }
    let mut dists = Vec::new();
    distributions(&s.table, "", &mut dists);
    if !dists.is_empty() {
        doc.table(Table {
            caption: "Parameters given as distributions (sampled by the ensemble; the central value is used for the single projection)"
                .into(),
            head: vec!["Parameter".into(), "Distribution".into()],
            align: vec![Align::Left, Align::Left],
            rows: dists.into_iter().map(|(p, t)| vec![Text::new().code(p), Text::from(t)]).collect(),
            note: None,
        });
    } else {
        doc.para("Every parameter of this scenario is a fixed value (no distributions).");
    }
}

// ---------------------------------------------------------------- 3. Methods

/// A closure or dilution parameter: from run_info.json if recorded there, else
/// from the scenario file, else the documented default (named, not numbered).
fn recorded(d: &RunData, info_path: &str, value: Option<f64>, section: &str, key: &str) -> Text {
    if let Some(v) = value {
        return info_num(info_path, v);
    }
    if let Some(s) = &d.scenario {
        if let Some(v) = s.table.get(section).and_then(|t| t.get(key)) {
            return match v {
                // A distribution: its central value drives the single run (docs/scenario.md).
                toml::Value::Table(t) => {
                    Text::new().plain("the central value of ").plain(distribution_text(t).unwrap_or_else(|| toml_text(v))).plain(";")
                }
                toml::Value::Integer(_) | toml::Value::Float(_) => {
                    Text::new().num(toml_text(v), Some(Source::new(&s.name, &[section], key)))
                }
                _ => Text::new().plain(toml_text(v)),
            };
        }
    }
    Text::new().plain("the documented default (not recorded in this run folder)")
}

fn methods_section(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    doc.heading(2, "Methods");
    doc.para(
        "Each catchment is projected on an annual time step. The steps below are the ones this run used, with its parameter values; \
         numbers in the text are read from run_info.json or the scenario copied into inputs/.",
    );
    doc.heading(3, "Evapotranspiration and water yield");
    let closure = |k: &str| i.canopy_closure.as_ref().and_then(|c| c.logistic_parameter(k));
    match i.hydrology.curves {
        Curves::Zhang { w_forest, w_grass } => {
            doc.equation(
                "ET/P = (1 + w·E0/P) / (1 + w·E0/P + P/E0)",
                "Zhang, Dawes & Walker (2001), eq. 8; P rainfall, E0 potential evapotranspiration, both mm/yr",
            );
            doc.para(
                Text::new()
                    .plain("with the plant-available-water coefficient w = ")
                    .then(info_num("hydrology.w_forest", w_forest))
                    .plain(" for forest (conifer canopy and existing forest) and w = ")
                    .then(info_num("hydrology.w_grass", w_grass))
                    .plain(" for grass and tussock. ET never exceeds min(P, E0)."),
            );
        }
        Curves::Fu { omega_forest, omega_grass } => {
            doc.equation(
                "ET/P = 1 + φ − (1 + φ^ω)^(1/ω),   φ = E0/P",
                "Fu (1981), in the form of Zhang et al. (2004), eq. 4; evaluated in a numerically stable form",
            );
            doc.para(
                Text::new()
                    .plain("with ω = ")
                    .then(info_num("hydrology.omega_forest", omega_forest))
                    .plain(" for forest and ω = ")
                    .then(info_num("hydrology.omega_grass", omega_grass))
                    .plain(" for grass and tussock. ET never exceeds min(P, E0)."),
            );
        }
    }
    doc.equation(
        "ET = f·ET_forest(P, E0_forest) + (1 − f)·ET_grass(P, E0);   Q = P − ET;   V = 10·Q·A",
        "Mixing of cover types (Zhang et al. 2001); Q yield in mm/yr, A area in ha, V volume in m³/yr",
    );
    doc.para(
        Text::new()
            .plain("where f is the ET-equivalent closed-forest fraction of the catchment (column canopy_fraction). Forest evaporative demand is E0_forest = ")
            .then(info_num("hydrology.forest_pet_factor", i.hydrology.forest_pet_factor))
            .plain(" × E0 where the catchment table gives no pet_forest_mm. The baseline holds today's cover fixed under the same climate; yield change is (Q − Q_baseline)/Q_baseline."),
    );
    if d.scenario.as_ref().is_some_and(|s| s.table.contains_key("calibration")) {
        doc.para("The scenario has [[calibration]] entries: the catchments named there use their own fitted curve parameters (listed under Inputs) instead of the values above.");
    }

    doc.heading(3, "Spread and density of the invader");
    doc.equation(
        "ΔI = min( (r·S + R)·(1 − I/V), V − I )",
        "Compounding spread from seed-bearing area with a logistic cap (age-cohort model)",
    );
    doc.para(
        Text::new()
            .plain("I is the infested area, V the vulnerable area, S the area of cohorts at or past the seed-bearing age of ")
            .then(info_num("invasion.seed_bearing_age_yr", i.invasion.seed_bearing_age_yr as f64))
            .plain(" years, r = ")
            .then(info_num("invasion.spread_rate_per_yr", i.invasion.spread_rate_per_yr))
            .plain(" per year and R = ")
            .then(info_num("invasion.seed_rain_ha_per_yr", i.invasion.seed_rain_ha_per_yr))
            .plain(" ha/yr of seed rain from outside. Cohorts are scattered until age ")
            .then(info_num("invasion.medium_age_yr", i.invasion.medium_age_yr as f64))
            .plain(", medium until age ")
            .then(info_num("invasion.dense_age_yr", i.invasion.dense_age_yr as f64))
            .plain(", and dense after that. Area is conserved: cleared land returns to the uninvaded vulnerable land."),
    );

    doc.heading(3, "Canopy closure");
    let curve = d
        .scenario
        .as_ref()
        .and_then(|s| s.table.get("canopy_closure").and_then(|c| c.get("curve")).and_then(|v| v.as_str()).map(str::to_string));
    if curve.as_deref() == Some("table") {
        doc.para(
            Text::new()
                .plain("Closure follows the scenario's table of stand ages ")
                .then(recorded(d, "canopy_closure.ages_yr", None, "canopy_closure", "ages_yr"))
                .plain(" and fractions ")
                .then(recorded(d, "canopy_closure.fractions", None, "canopy_closure", "fractions"))
                .plain(
                    ", interpolated linearly and held at the ends. Each cohort contributes area × closure(age) of ET-equivalent forest.",
                ),
        );
    } else {
        doc.equation(
            "L(a) = 1 / (1 + exp(−k·(a − a½)));   closure(a) = c_max·(L(a) − L(0)) / (1 − L(0))",
            "Logistic closure with stand age a, rescaled to start at zero (after Scott & Smith 1997)",
        );
        doc.para(
            Text::new()
                .plain("with half-closure age a½ = ")
                .then(recorded(d, "canopy_closure.half_closure_age_yr", closure("half_closure_age_yr"), "canopy_closure", "half_closure_age_yr"))
                .plain(" years, steepness k = ")
                .then(recorded(d, "canopy_closure.steepness_per_yr", closure("steepness_per_yr"), "canopy_closure", "steepness_per_yr"))
                .plain(" per year and mature closure c_max = ")
                .then(recorded(d, "canopy_closure.max_fraction", closure("max_fraction"), "canopy_closure", "max_fraction"))
                .plain(". The canopy fraction is f = (existing forest + Σ cohort area × closure(age)) / catchment area."),
        );
    }

    doc.heading(3, "Contaminant loads and dilution");
    doc.equation(
        "L = A·[f·e_forest + (1 − f)·e_open] + L_point;   C = 1000·L / V",
        "Export-coefficient load (kg/yr) and flow-weighted concentration (mg/L) of the year's runoff volume V (m³/yr)",
    );
    doc.para(
        Text::new()
            .plain("Export coefficients e_open and e_forest are those of the contaminant table above; point loads come from the catchment table. Below a runoff depth of ")
            .then(recorded(d, "min_runoff_mm", i.min_runoff_mm, "dilution", "min_runoff_mm"))
            .plain(" mm/yr no concentration is stated (the cell is empty and flagged low-runoff). At receiving nodes, volumes and loads of all upstream catchments are summed and the flow-weighted concentration reported."),
    );

    if d.programmes().next().is_some() {
        doc.heading(3, "Control programmes");
        doc.para(
            "In each year a programme is active it first pays follow-up on land cleared in recent years (the share paid suppresses regrowth from the seed bank), \
             then treats cohorts in the order of its rule — youngest first (scattered-first), oldest first (densest-first), or most water protected per dollar \
             (best-value) — at the cost per hectare of each cohort's density class, until the budget or fixed area is used. Treated area × efficacy is cleared \
             and stops producing seed. Water saved is the programme's yield minus the no-control yield of the same catchment and year.",
        );
        doc.equation(
            "water protected per $ = e·ΔQ·10·Σ_{k=1..L} closure(a + k) / c(a)",
            "Best-value ranking: efficacy e, yield lost per unit canopy ΔQ (mm/yr), remaining years L, cost per hectare c(a)",
        );
    }
    doc.heading(3, "Discounting and programme economics");
    doc.equation(
        "PV = Σ_t C_t / (1 + r)^t;   levelised cost = PV(cost) / PV(water saved)",
        "Present value of a yearly stream, year 0 = the start year (undiscounted)",
    );
    let mut t = Text::new().plain("with the discount rate r = ").then(info_num("discount_rate", i.discount_rate)).plain(" per year.");
    if let Some(v) = i.water_value_per_m3 {
        t = t
            .plain(" With the value of water v = ")
            .then(info_num("water_value_per_m3", v))
            .plain(" $/m³: NPV = v·PV(water) − PV(cost) and benefit-cost ratio = v·PV(water)/PV(cost).");
    }
    doc.para(t);
    if d.ensemble.is_some() || d.sensitivity.is_some() {
        doc.heading(3, "Uncertainty");
        let sampling = d
            .scenario
            .as_ref()
            .and_then(|s| s.table.get("ensemble").and_then(|e| e.get("sampling")).and_then(|v| v.as_str()).map(str::to_string))
            .unwrap_or_else(|| "latin-hypercube".into());
        let scheme = if sampling == "monte-carlo" {
            "independent random draws (plain Monte Carlo)"
        } else {
            "Latin hypercube sampling (McKay et al. 1979), one draw per stratum of each parameter"
        };
        let ens = d.scenario.as_ref().and_then(|s| s.table.get("ensemble")).and_then(|e| e.as_table());
        let get = |k: &str| ens.and_then(|e| e.get(k)).map(toml_text);
        let climate = match get("climate").as_deref() {
            Some("bootstrap") => format!(
                " Members also differ in climate: each draws a moving-block bootstrap of the climate record's years{}, shared by every catchment.",
                get("block_years").map(|b| format!(" in blocks of {b} years")).unwrap_or_default()
            ),
            Some("stochastic") => format!(
                " Members also differ in climate: annual rainfall is a log-normal AR(1) sequence around each catchment's mean{}, shared by every catchment.",
                match (get("rain_cv"), get("rain_lag1")) {
                    (Some(cv), Some(r)) => format!(" (coefficient of variation {cv}, lag-1 autocorrelation {r})"),
                    _ => String::new(),
                }
            ),
            _ => " Every member has the same climate.".to_string(),
        };
        let members = d.ensemble.as_ref().map(|e| format!(" The run has {} members", fixed(e.members, 0))).unwrap_or_default();
        let seed = get("seed").map(|s| format!(" (seed {s}, so the ensemble is reproducible)")).unwrap_or_default();
        doc.para(format!(
            "Each ensemble member draws every parameter given as a distribution (Inputs) by {scheme} and is projected like the single run.{climate}{members}{seed}{} \
             Ranges are percentiles across members of each year's value; the probability above a guideline is the share of members above it that year.",
            if members.is_empty() { "" } else { "." }
        ));
        if d.sensitivity.is_some() {
            doc.equation(
                "ρ = Spearman rank correlation between a parameter's draws and the result across members",
                "Rank correlation and standardised regression coefficients (Saltelli et al. 2008)",
            );
        }
    }
}

// ---------------------------------------------------------------- 4. Results

fn results_section(d: &RunData, doc: &mut Doc, drawn: &[Drawn]) {
    let i = &d.info;
    doc.heading(2, "Results");
    let note_of = |stem: &str| drawn.iter().find(|x| x.stem == stem).map(|x| x.note.clone()).unwrap_or_default();

    doc.heading(3, "The basin");
    if let Some((_, o)) = figs::comparison_offset(d) {
        figure_if(
            d,
            doc,
            figs::COMPARISON,
            Text::new().plain(format!(
                "Yield change {o} years after the start ({}) without control, catchments sorted from the largest loss; the basin bar pools all catchments. {}{}",
                i.start_year + o,
                if d.ensemble.is_some() { "Whiskers: 5–95 % of ensemble members. " } else { "" },
                note_of(figs::COMPARISON)
            )),
        );
    }
    figure_if(
        d,
        doc,
        figs::BUDYKO,
        Text::new().plain(format!(
            "Each catchment's path in Budyko space without control, over the {} curves for forest and for grass/tussock this run used, with the energy and water limits. \
             Hollow markers: start; filled markers: end. {} Moving up from the grass curve towards the forest curve is the invader's extra evapotranspiration; moving sideways is the climate record.{}",
            method_name(&i.hydrology.curves),
            note_of(figs::BUDYKO),
            if i.hydrology.forest_pet_factor > 1.0 {
                " The forest curve uses the forest evaporative demand (E0 times the forest PET factor), so it can lie above the ET = E0 line, which is drawn for grass/tussock PET."
            } else {
                ""
            }
        )),
    );
    // Maps, when the run had catchment boundaries (drawn by the run, not the report).
    if let Some((_, o)) = figs::comparison_offset(d).filter(|(_, o)| *o == 20) {
        figure_if(
            d,
            doc,
            "map_yield_change_20y",
            Text::new()
                .plain(format!("Map of the yield change {o} years after the start ({}) without control, by catchment.", i.start_year + o)),
        );
    }
    figure_if(
        d,
        doc,
        "map_yield_change_horizon",
        Text::new().plain(format!("Map of the yield change at the horizon ({}) without control, by catchment.", i.end_year())),
    );
    let basin_cover = format!("basin_{}_cover", file_stem(NO_CONTROL));
    figure_if(
        d,
        doc,
        &basin_cover,
        Text::new().plain("Infested area of the whole basin by density class without control, against the vulnerable area."),
    );

    doc.heading(3, "Catchments");
    catchment_overview(d, doc);
    let order = d.detailed_catchments();
    if order.len() < d.catchments.len() {
        doc.para(format!(
            "Detailed results follow for the {MAX_DETAILED} catchments with the largest yield loss at the horizon; every catchment is in the table above and in summary.csv."
        ));
    }
    for (id, name, _) in order {
        catchment_detail(d, doc, id, name);
    }

    nodes_results(d, doc);
    if d.programmes().next().is_some() {
        economics_results(d, doc);
        delay_results(d, doc);
    }
    sensitivity_results(d, doc);
}

fn catchment_overview(d: &RunData, doc: &mut Doc) {
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
        row.push(num_cell(r, sc::CANOPY_FRACTION_START, |v| fixed(v, 3), 1.0).plain(" → ").then(num_cell(r, sc::CANOPY_FRACTION_END, |v| fixed(v, 3), 1.0)));
        for (k, c) in i.contaminants.iter().enumerate() {
            row.push(exceed_cell(r, k, &c.name, c.guideline_mg_per_l.is_some()));
        }
        rows.push(row);
    }
    let n = head.len();
    doc.table(Table {
        caption: "Every catchment without control: yield change against the baseline, canopy fraction and first year above each guideline"
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

fn conc_cell(d: &RunData, id: &str, year: i32, k: usize, name: &str) -> Text {
    let ys = d.years(id, NO_CONTROL);
    match ys.iter().find(|y| y.year == year).and_then(|y| y.conc.get(k).copied().flatten()) {
        Some(v) => {
            Text::new().num(sig(v, 3), Some(Source::new("yearly.csv", &[id, NO_CONTROL, &year.to_string()], &format!("{name}_mg_per_l"))))
        }
        None => undefined(),
    }
}

fn catchment_detail(d: &RunData, doc: &mut Doc, id: &str, name: &str) {
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
    t = t.then(pct_cell(nc, sc::YIELD_CHANGE_HORIZON_PCT, nc.get(sc::YIELD_CHANGE_HORIZON_PCT))).plain(format!(" % by {} against the baseline", i.end_year()));
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
                                        &[id, NO_CONTROL, &i.end_year().to_string(), &format!("{}_mg_per_l", c.name)],
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

fn economics_table(d: &RunData, rows: &[&SummaryRow], caption: String) -> Table {
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
    }
    let body = rows
        .iter()
        .map(|r| {
            let mut row = vec![
                Text::new().code(&r.strategy),
                num_cell(r, sc::TOTAL_COST, |v| fixed(v, 0), 1.0),
                num_cell(r, sc::TOTAL_COST_PV, |v| fixed(v, 0), 1.0),
                num_cell(r, sc::WATER_SAVED_M3, |v| fixed(v, 2), MILLION),
                num_cell(r, sc::WATER_SAVED_PV_M3, |v| fixed(v, 2), MILLION),
                num_cell(r, sc::COST_PER_M3, |v| sig(v, 3), 1.0),
                num_cell(r, sc::LEVELISED_COST_PER_M3, |v| sig(v, 3), 1.0),
            ];
            if has_value {
                row.push(num_cell(r, sc::NPV, |v| fixed(v, 0), 1.0));
                row.push(num_cell(r, sc::BENEFIT_COST_RATIO, |v| fixed(v, 2), 1.0));
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
        note: Some(Text::new().plain("Water saved is against no-control in the same catchment and year, summed over the horizon; present values at the run's discount rate. Source: ").code(SUMMARY).plain(".")),
    }
}

fn nodes_results(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    let nodes: Vec<&String> = d.nodes.keys().filter(|(_, st)| st == NO_CONTROL).map(|(n, _)| n).collect();
    if nodes.is_empty() {
        return;
    }
    doc.heading(3, "Receiving nodes");
    let mut head = vec!["Node".to_string(), "Catchments upstream (incl. itself)".into(), format!("Yield change in {}, %", i.end_year())];
    for c in &i.contaminants {
        head.push(format!("{} in {}, mg/L", c.name, i.end_year()));
        head.push(format!("{} first year above guideline", c.name));
    }
    let mut rows = Vec::new();
    for n in &nodes {
        let ys = &d.nodes[&((*n).clone(), NO_CONTROL.to_string())];
        let Some(last) = ys.last() else { continue };
        let key = |y: i32| vec![n.as_str().to_string(), NO_CONTROL.to_string(), y.to_string()];
        let src = |y: i32, col: &str| {
            let k = key(y);
            Some(Source { file: "nodes.csv".into(), key: k, column: col.into(), scale: 1.0 })
        };
        let mut row = vec![
            Text::new().plain(display_name(d, n)).plain(" (").code(n.as_str()).plain(")"),
            Text::new().num(last.upstream.to_string(), src(last.year, "upstream_catchments")),
            match last.change_pct {
                Some(v) => Text::new().num(signed(v, 1), src(last.year, "yield_change_pct")),
                None => undefined(),
            },
        ];
        for (k, c) in i.contaminants.iter().enumerate() {
            let col = format!("{}_mg_per_l", c.name);
            row.push(match last.conc.get(k).copied().flatten() {
                Some(v) => Text::new().num(sig(v, 3), src(last.year, &col)),
                None => undefined(),
            });
            row.push(match c.guideline_mg_per_l {
                None => Text::from("no guideline"),
                Some(g) => match ys.iter().find(|y| y.conc.get(k).copied().flatten().is_some_and(|v| v > g)) {
                    Some(y) => Text::new()
                        .num(y.year.to_string(), src(y.year, &col))
                        .plain(" (")
                        .num(sig(y.conc[k].unwrap_or(f64::NAN), 3), src(y.year, &col))
                        .plain(" mg/L)"),
                    None => Text::from("not exceeded"),
                },
            });
        }
        rows.push(row);
    }
    let n = head.len();
    doc.table(Table {
        caption: "Catchments that receive flow from others (e.g. a supply intake): pooled volumes and flow-weighted concentrations without control".into(),
        align: (0..n).map(|k| if k == 0 || (k >= 4 && (k - 4) % 2 == 0) { Align::Left } else { Align::Right }).collect(),
        head,
        rows,
        note: Some(Text::new().plain("Source: ").code("nodes.csv").plain("; the first year above a guideline is the first row of the node whose concentration exceeds it.")),
    });
}

fn economics_results(d: &RunData, doc: &mut Doc) {
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
    let budget: Vec<(&(String, String), &super::folder::BudgetTotals)> = d.budget.iter().collect();
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
                ]
            })
            .collect();
        doc.table(Table {
            caption: "Budgets over the horizon, by strategy and budget pool (sums of budget.csv)".into(),
            head: vec!["Strategy".into(), "Pool".into(), "Years".into(), "Available, $".into(), "Spent, $".into(), "Unspent, $".into()],
            align: vec![Align::Left, Align::Left, Align::Right, Align::Right, Align::Right, Align::Right],
            rows,
            note: None,
        });
    }
}

fn delay_results(d: &RunData, doc: &mut Doc) {
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
        let mut rows: Vec<&super::folder::DelayRow> = d.delay.iter().filter(|r| &r.strategy == st).collect();
        rows.sort_by_key(|r| r.delay_yr);
        let src = |r: &super::folder::DelayRow, col: &str, scale: f64| {
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

fn sensitivity_results(d: &RunData, doc: &mut Doc) {
    doc.heading(3, "Sensitivity");
    let (Some(rows), Some((catchment, strategy))) = (&d.sensitivity, figs::sensitivity_subject(d)) else {
        doc.para(
            "This run folder has no sensitivity.csv (no ensemble with uncertain parameters was run), so no sensitivity ranking is given.",
        );
        return;
    };
    let mut ats: Vec<(String, i32)> =
        rows.iter().filter(|r| r.catchment == catchment && r.strategy == strategy).map(|r| (r.at.clone(), r.year)).collect();
    ats.sort_by_key(|a| a.1);
    ats.dedup();
    let subject = display_name(d, &catchment);
    let result = rows.iter().find_map(|r| r.variable.clone()).unwrap_or_else(|| RANKED_RESULT.to_string());
    doc.para(format!(
        "Which uncertain parameters drive the {result} of {subject} under {strategy}: the Spearman rank correlation ρ between each parameter's draws and that result across ensemble members (its sign gives the direction: ρ > 0, a higher value of the parameter gives a higher result, i.e. less loss), and the standardised regression coefficient. Rank 1 is the most influential."
    ));
    for (at, year) in &ats {
        let mut rs: Vec<&super::folder::SensitivityRow> =
            rows.iter().filter(|r| r.catchment == catchment && r.strategy == strategy && &r.at == at && r.year == *year).collect();
        rs.sort_by_key(|r| r.rank);
        let variable = rs.iter().find_map(|r| r.variable.clone());
        let body = rs
            .iter()
            .map(|r| {
                let key = [catchment.as_str(), strategy.as_str(), at.as_str(), r.parameter.as_str()];
                vec![
                    Text::new().num(r.rank.to_string(), Some(Source::new("sensitivity.csv", &key, "rank"))),
                    Text::new().code(&r.parameter),
                    match r.spearman_rho {
                        Some(v) => Text::new().num(fixed(v, 2), Some(Source::new("sensitivity.csv", &key, "spearman_rho"))),
                        None => undefined(),
                    },
                    match r.src {
                        Some(v) => Text::new().num(fixed(v, 2), Some(Source::new("sensitivity.csv", &key, "src"))),
                        None => undefined(),
                    },
                ]
            })
            .collect();
        doc.table(Table {
            caption: format!(
                "{subject}, {strategy}: parameter ranking, {} ({year}){}",
                figs::at_label(at).to_lowercase(),
                variable.map(|v| format!(", result {v}")).unwrap_or_default()
            ),
            head: vec!["Rank".into(), "Parameter".into(), "Spearman ρ".into(), "Standardised regression coefficient".into()],
            align: vec![Align::Right, Align::Left, Align::Right, Align::Right],
            rows: body,
            note: Some(Text::new().plain("Source: ").code("sensitivity.csv").plain(".")),
        });
        figure_if(
            d,
            doc,
            &figs::sensitivity_stem(at),
            Text::new().plain(format!(
                "{subject}, {strategy}, {} ({year}): rank correlation of each uncertain parameter with the result (bars, highest rank at the top) and standardised regression coefficient (diamonds).",
                figs::at_label(at).to_lowercase()
            )),
        );
    }
}

// ---------------------------------------------------------------- 5–8.

fn limitations_section(d: &RunData, doc: &mut Doc) {
    doc.heading(2, "Assumptions and limitations");
    let item = |lead: &str, rest: &str| Text::new().strong(lead).plain(" ").plain(rest);
    let mut items = vec![
        item("Mean-annual curves applied year by year.", "The Budyko-type curves describe long-term averages; applied to single years they ignore storage carry-over between years (soil moisture, groundwater), snow, and the timing of rain within the year. Treat any single year as indicative; read trends over several years."),
        item("Spatially implicit spread.", "Any vulnerable hectare is equally likely to be invaded; topography, wind direction, seed sources and land management are not represented beyond the spread rate, seed rain and the vulnerable area."),
        item("Cover by age.", "Density class and canopy closure follow stand age alone; site productivity and species differences enter only through the closure curve and the curve parameters."),
        item("Long-term average loads.", "Export coefficients give long-term average loads, fully mixed and conserved in the year's runoff. They do not describe storm events, seasonal low flows or in-stream processing, which govern many guideline exceedances."),
        item("Constant dollars.", "Treatment costs per hectare and efficacy are the scenario's inputs, not site quotes."),
    ];
    let low: usize = d.low_runoff_years.values().sum();
    if low > 0 {
        items.push(item("Low runoff.", &format!("In {low} catchment-years without control, runoff fell below the minimum for stating a concentration; those concentrations are missing, not zero.")));
    }
    if d.info.climate_table.is_some() {
        items.push(item("Recorded climate.", "The climate of the projected years is the record in the climate table (repeated or replaced by long-term means beyond it); it is not a climate projection."));
    } else {
        items.push(item("Mean climate.", "Every projected year has the same long-term mean climate: there is no year-to-year variability and no climate change in these projections."));
    }
    if d.ensemble.is_none() {
        items.push(item("No ranges.", "No ensemble was run: no parameter or climate uncertainty is quantified, and the single projection should not be read as more precise than its inputs."));
    } else {
        items.push(item("Ranges are partial.", "Ensemble ranges reflect only the parameters given as distributions (and climate variability, if the scenario asked for it); uncertainty in the model structure is not included."));
    }
    doc.bullets(items);
}

fn cautions_section(d: &RunData, doc: &mut Doc) {
    doc.heading(2, "Cautions");
    doc.notice(
        "Read before use",
        vec![
            Text::new()
                .strong("Screening-level estimate. ")
                .plain("These projections are for screening and comparing options, not for design or allocation."),
            Text::new()
                .strong("Mean-annual curves ignore storage. ")
                .plain("Water-balance curves for long-term means, applied year by year, ignore storage carry-over between years."),
            Text::new()
                .strong("Not a substitute for a site hydrological assessment. ")
                .plain("Local measurements and a site study are needed before decisions rest on these numbers."),
            Text::new()
                .strong("Defer to local regulation and qualified practitioners. ")
                .plain("Regulators, hydrologists and water-quality practitioners decide what applies at a site."),
            Text::new().em("As recorded by the run: ").plain(d.info.cautions.clone()),
        ],
    );
}

fn references_section(d: &RunData, doc: &mut Doc) {
    doc.heading(2, "References");
    let mut refs = vec![
        "Zhang, L., Dawes, W. R., & Walker, G. R. (2001). Response of mean annual evapotranspiration to vegetation changes at catchment scale. Water Resources Research, 37(3), 701–708. doi:10.1029/2000WR900325",
        "Fu, B. P. (1981). On the calculation of the evaporation from land surface. Scientia Atmospherica Sinica, 5(1), 23–31 (in Chinese).",
        "Zhang, L., Hickel, K., Dawes, W. R., Chiew, F. H. S., Western, A. W., & Briggs, P. R. (2004). A rational function approach for estimating mean annual evapotranspiration. Water Resources Research, 40, W02502. doi:10.1029/2003WR002710",
        "Budyko, M. I. (1974). Climate and Life. Academic Press, New York.",
        "Scott, D. F., & Smith, R. E. (1997). Preliminary empirical models to predict reductions in total and low flows resulting from afforestation. Water SA, 23(2), 135–140.",
        "Johnes, P. J. (1996). Evaluation and management of the impact of land use change on the nitrogen and phosphorus load delivered to surface waters: the export coefficient modelling approach. Journal of Hydrology, 183, 323–349.",
    ];
    if d.ensemble.is_some() || d.sensitivity.is_some() {
        refs.push("McKay, M. D., Beckman, R. J., & Conover, W. J. (1979). A comparison of three methods for selecting values of input variables in the analysis of output from a computer code. Technometrics, 21(2), 239–245.");
        refs.push("Saltelli, A., Ratto, M., Andres, T., Campolongo, F., Cariboni, J., Gatelli, D., Saisana, M., & Tarantola, S. (2008). Global Sensitivity Analysis: The Primer. Wiley.");
    }
    doc.bullets(refs.into_iter().map(Text::from).collect());
}

fn about_section(d: &RunData, doc: &mut Doc, drawn: &[Drawn]) {
    doc.heading(2, "About this report");
    let mut files: Vec<&str> = vec!["run_info.json", "summary.csv", "yearly.csv"];
    for (f, present) in [
        ("nodes.csv", !d.nodes.is_empty()),
        ("budget.csv", !d.budget.is_empty()),
        ("delay.csv", !d.delay.is_empty()),
        ("ensemble.csv", d.ensemble.is_some()),
        ("sensitivity.csv", d.sensitivity.is_some()),
    ] {
        if present {
            files.push(f);
        }
    }
    let mut t = Text::new().plain("Written from the files of the run folder only — ");
    for (k, f) in files.iter().enumerate() {
        if k > 0 {
            t = t.plain(", ");
        }
        t = t.code(*f);
    }
    t = t.plain(", the inputs copied into ").code("inputs/").plain(" and the figures in ").code("figures/");
    t = t
        .plain(format!(
            " — without recomputing the projection. The report drew {} figures itself from these tables ({}); the others were drawn by the run. Regenerate it with ",
            drawn.len(),
            drawn.iter().map(|x| format!("{}.png", x.stem)).collect::<Vec<_>>().join(", ")
        ))
        .code("yieldshift report <folder>")
        .plain(". In the HTML version every number read from a file carries its source (file, row and column) as a data-src attribute.");
    doc.para(t);
}
