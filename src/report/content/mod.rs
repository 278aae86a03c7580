//! What the report says, section by section, built from [`RunData`] only.
//!
//! Every number shown is a cell of one of the run's files (its [`Source`] is kept)
//! or a simple statistic of such cells (a mean of a climate column, a sum of a
//! budget column, a maximum over years), described as such where it appears.

mod catchments;
mod cautions;
mod economics;
mod executive;
mod inputs;
mod intakes;
mod methods;
mod pages;
mod sensitivity;
mod summary;

use super::doc::{Align, Doc, Figure, Source, Table, Text};
use super::figures::{self as figs, Drawn};
use super::fmt::{fixed, sig, signed, UNDEFINED};
use crate::report::folder::{RunData, SummaryRow};
use crate::schema::columns::scope;
use crate::schema::columns::summary as sc;
use crate::schema::file_stem;
use crate::schema::run_info::Curves;
use crate::schema::{BASIN_ID, NO_CONTROL};

pub use crate::report::folder::MAX_DETAILED;

/// Most rows of an input table shown.
pub const MAX_INPUT_ROWS: usize = 200;

const SUMMARY: &str = "summary.csv";
/// What `sensitivity.csv` ranks parameters against when it names no variable
/// (its documented content: the yield change against the baseline).
const RANKED_RESULT: &str = "yield change against the baseline";
const MILLION: f64 = 1e6;

/// The scope of a catchment's own row, or of the basin row.
fn own_scope(catchment: &str) -> &'static str {
    if catchment == BASIN_ID {
        scope::BASIN
    } else {
        scope::LOCAL
    }
}

/// A cell of a catchment's own (or the basin's) row of `summary.csv`.
fn s_src(catchment: &str, strategy: &str, col: &str) -> Source {
    Source::new(SUMMARY, &[catchment, own_scope(catchment), strategy], col)
}

/// A cell of this row of `summary.csv` (any scope).
fn row_src(r: &SummaryRow, col: &str) -> Source {
    Source::new(SUMMARY, &[&r.catchment, &r.scope, &r.strategy], col)
}

fn undefined() -> Text {
    Text::new().plain(UNDEFINED)
}

/// A summary value as a change in % (1 decimal, signed).
fn pct_cell(r: &SummaryRow, col: &str, v: Option<f64>) -> Text {
    match v {
        Some(v) => Text::new().num(signed(v, 1), Some(row_src(r, col))),
        None => undefined(),
    }
}

/// The ensemble range of `variable` for a catchment (its own rows) or the basin,
/// strategy and year as " (p5 to p95)".
fn range_text(d: &RunData, catchment: &str, strategy: &str, variable: &str, year: i32, decimals: usize, signed_fmt: bool) -> Text {
    range_text_in(d, own_scope(catchment), catchment, strategy, variable, year, decimals, signed_fmt)
}

/// [`range_text`] for rows of any scope (`arriving` rows of a receiving node).
#[allow(clippy::too_many_arguments)]
fn range_text_in(
    d: &RunData,
    in_scope: &str,
    catchment: &str,
    strategy: &str,
    variable: &str,
    year: i32,
    decimals: usize,
    signed_fmt: bool,
) -> Text {
    let Some(q) = d.ensemble.as_ref().and_then(|e| e.get_in(in_scope, catchment, strategy, variable, year)) else { return Text::new() };
    let f = |v: f64| if signed_fmt { signed(v, decimals) } else { fixed(v, decimals) };
    let key = [catchment, in_scope, strategy, &year.to_string(), variable];
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
                range_text_in(
                    d,
                    &r.scope,
                    &r.catchment,
                    &r.strategy,
                    crate::schema::columns::ensemble::YIELD_CHANGE_10YR_MEAN_PCT,
                    d.info.start_year + o,
                    1,
                    true,
                )
            } else {
                Text::new()
            })
        })
        .collect();
    v.push(pct_cell(r, sc::YIELD_CHANGE_HORIZON_PCT, r.get(sc::YIELD_CHANGE_HORIZON_PCT)).then(range_text_in(
        d,
        &r.scope,
        &r.catchment,
        &r.strategy,
        crate::schema::columns::ensemble::YIELD_CHANGE_10YR_MEAN_PCT,
        d.info.end_year(),
        1,
        true,
    )));
    v
}

fn change_heads(d: &RunData) -> Vec<String> {
    let mut h: Vec<String> =
        d.offsets.iter().map(|&o| format!("Yield change, 10-yr mean to {} ({o} y), %", d.info.start_year + o)).collect();
    h.push(format!("10-yr mean to the horizon ({}), %", d.info.end_year()));
    h
}

fn num_cell(r: &SummaryRow, col: &str, f: impl Fn(f64) -> String, scale: f64) -> Text {
    match r.get(col) {
        Some(v) => Text::new().num(f(v / scale), Some(row_src(r, col).scaled(scale))),
        None => undefined(),
    }
}

/// A contaminant's guideline status in words: above at the start, first exceeded in a
/// year, or not exceeded; and the years exceeded because of the invasion.
fn exceed_cell(r: &SummaryRow, k: usize, name: &str, has_guideline: bool) -> Text {
    if !has_guideline {
        return Text::new().plain("no guideline");
    }
    let mut t = match (r.status.get(k).map(String::as_str), r.first_exceedance.get(k).copied().flatten()) {
        (Some("above-at-start"), _) => Text::new().plain("above at the start"),
        (_, Some(y)) => Text::new().plain("first exceeded in ").num(y.to_string(), Some(row_src(r, &sc::first_exceedance_year(name)))),
        _ => Text::new().plain("not exceeded"),
    };
    if let (Some(Some(y)), Some(Some(n))) = (r.invasion_first.get(k), r.invasion_years.get(k)) {
        t = t
            .plain("; because of the invasion in ")
            .num(n.to_string(), Some(row_src(r, &sc::invasion_exceedance_years(name))))
            .plain(if *n == 1 { " year, from " } else { " years, from " })
            .num(y.to_string(), Some(row_src(r, &sc::invasion_exceedance_first_year(name))));
    }
    t
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
    executive::executive_summary(d, &mut doc);
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

use catchments::{catchment_detail, catchment_overview};
use cautions::{about_section, cautions_section, limitations_section, references_section};
use economics::{delay_results, economics_results};
use inputs::inputs_section;
use intakes::intakes_section;
use methods::methods_section;
use sensitivity::sensitivity_results;
use summary::summary_section;

// ---------------------------------------------------------------- 4. Results

fn results_section(d: &RunData, doc: &mut Doc, drawn: &[Drawn]) {
    let i = &d.info;
    doc.heading(2, "Results");
    let note_of = |stem: &str| drawn.iter().find(|x| x.stem == stem).map(|x| x.note.clone()).unwrap_or_default();

    intakes_section(d, doc);
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
    pages::left_out_note(d, doc);
    for (id, name, _) in order {
        catchment_detail(d, doc, id, name);
    }

    if d.programmes().next().is_some() {
        economics_results(d, doc);
        delay_results(d, doc);
    }
    sensitivity_results(d, doc);
}
