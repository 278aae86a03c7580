//! Figures the report draws from the run's CSV files (nothing is recomputed):
//! the catchment comparison, the Budyko-space diagram, the sensitivity bars
//! (when `sensitivity.csv` exists) and, when `ensemble.csv` exists, yield and
//! concentration over time with their 5–95 % and 25–75 % bands.
//!
//! Each is written to `figures/` as PNG and/or SVG. Names start with `basin_` for
//! basin-wide figures and end with `_range` for ensemble figures, so they never
//! replace a figure the run itself wrote.

use super::folder::RunData;
use crate::error::Result;
use crate::model::budyko::CoverCurves;
use crate::plot::basin::{catchment_comparison, CatchmentChange};
use crate::plot::budyko_space::{BudykoSpace, Trajectory};
use crate::plot::legend::Corner;
use crate::plot::sensitivity::{influence_chart, Influence, InfluencePanel};
use crate::plot::series::{Band, Line, LineChart};
use crate::plot::{palette, save_figure, Formats};
use crate::schema::file_stem;
use crate::schema::{BASIN_ID, NO_CONTROL};

/// Stem of the catchment comparison figure.
pub const COMPARISON: &str = "basin_yield_change_by_catchment";
/// Stem of the Budyko-space figure.
pub const BUDYKO: &str = "basin_budyko_space";
/// Stem prefix of the sensitivity figures (one per time of evaluation).
pub const SENSITIVITY: &str = "basin_sensitivity";

/// Stem of the sensitivity figure for one `at` value of `sensitivity.csv`.
pub fn sensitivity_stem(at: &str) -> String {
    format!("{SENSITIVITY}_{}", file_stem(at))
}

fn subject_name(d: &RunData, id: &str) -> String {
    if id == BASIN_ID {
        return "Basin".into();
    }
    d.catchments.iter().find(|c| c.0 == id).map(|c| c.1.clone()).unwrap_or_else(|| id.to_string())
}
/// Years averaged for each point of a Budyko-space trajectory (fewer if the run is shorter).
pub const BUDYKO_WINDOW_YR: usize = 10;
pub use super::folder::BUDYKO_MAX;

/// A figure the report drew, with what the caption needs to say about it.
#[derive(Debug, Clone, PartialEq)]
pub struct Drawn {
    /// File stem inside `figures/`.
    pub stem: String,
    /// Facts for the caption (window, catchments left out, offset used…).
    pub note: String,
}

/// The offset (years after the start) the comparison uses: 20 if the run has it,
/// else the largest reported offset, else none (the horizon is used).
pub fn comparison_offset(d: &RunData) -> Option<(usize, i32)> {
    let i20 = d.offsets.iter().position(|&o| o == 20);
    let pick = i20.or_else(|| {
        let valid: Vec<usize> = (0..d.offsets.len()).filter(|&i| d.offsets[i] as i64 <= d.info.horizon_years as i64).collect();
        valid.last().copied()
    })?;
    Some((pick, d.offsets[pick]))
}

fn curves(d: &RunData) -> CoverCurves {
    d.info.cover_curves()
}

/// Draws every figure the report owns; returns those drawn.
// Over 100 lines on purpose: a list of independent figures, each a few lines; one function keeps the list (and the report's figure order) in one place.
pub fn draw_all(d: &RunData, formats: Formats) -> Result<Vec<Drawn>> {
    let dir = d.dir.join("figures");
    std::fs::create_dir_all(&dir).map_err(|e| crate::Error::io(format!("creating {}", dir.display()), e))?;
    let mut out = Vec::new();

    // 1. Catchment comparison.
    // (axis label, year shown, (id, name, change) per summary row)
    type Values = Vec<(String, String, Option<f64>)>;
    let (col_label, year, values): (String, i32, Values) = match comparison_offset(d) {
        Some((i, o)) => (
            format!("Yield change, 10-year mean to {} ({o} years after the start), vs baseline (%)", d.info.start_year + o),
            d.info.start_year + o,
            d.summary.iter().filter(|r| r.strategy == NO_CONTROL).map(|r| (r.catchment.clone(), r.name.clone(), r.at_offsets[i])).collect(),
        ),
        None => (
            format!("Yield change, 10-year mean to the horizon ({}), vs baseline (%)", d.info.end_year()),
            d.info.end_year(),
            d.summary
                .iter()
                .filter(|r| r.strategy == NO_CONTROL)
                .map(|r| (r.catchment.clone(), r.name.clone(), r.get(crate::schema::columns::summary::YIELD_CHANGE_HORIZON_PCT)))
                .collect(),
        ),
    };
    let rows: Vec<CatchmentChange> = values
        .iter()
        .filter_map(|(id, name, v)| {
            let range = d
                .ensemble
                .as_ref()
                .and_then(|e| e.get(id, NO_CONTROL, crate::schema::columns::ensemble::YIELD_CHANGE_10YR_MEAN_PCT, year))
                .map(|q| (q.p5, q.p95));
            v.map(|v| CatchmentChange {
                name: if id == BASIN_ID { "Basin (all catchments)".to_string() } else { name.clone() },
                change_pct: v,
                range_pct: range,
                is_basin: id == BASIN_ID,
            })
        })
        .collect();
    if !rows.is_empty() {
        let (chart, left_out) = catchment_comparison(
            format!("{} — yield change by catchment, {NO_CONTROL}", d.info.title),
            col_label,
            Some("5–95 % range across ensemble members".into()),
            &rows,
        );
        save_figure(&chart, &dir.join(COMPARISON), formats)?;
        let note = if left_out > 0 { format!("The {left_out} catchments with the smallest losses are not drawn.") } else { String::new() };
        out.push(Drawn { stem: COMPARISON.into(), note });
    }

    // 2. Budyko space: moving-window means of each catchment's own years.
    let n_years = d.info.horizon_years + 1;
    let window = BUDYKO_WINDOW_YR.min(n_years).max(1);
    let mut cands: Vec<Trajectory> = Vec::new();
    for (id, name, _) in d.catchments.iter().filter(|c| d.budyko.contains(&c.0)) {
        let ys = d.years(id, NO_CONTROL);
        if ys.len() < window {
            continue;
        }
        let pts: Vec<(f64, f64)> = window_starts(ys.len(), window)
            .into_iter()
            .map(|k| &ys[k..k + window])
            .filter_map(|w| {
                let p: f64 = w.iter().map(|y| y.rain_mm).sum();
                let e0: f64 = w.iter().map(|y| y.pet_mm).sum();
                let et: f64 = w.iter().map(|y| y.et_mm).sum();
                (p > 0.0).then(|| (e0 / p, et / p))
            })
            .collect();
        if pts.is_empty() {
            continue;
        }
        cands.push(Trajectory { label: name.clone(), points: pts });
    }
    let total = d.catchments.len();
    if !cands.is_empty() {
        let s = d.info.start_year;
        let e = d.info.end_year();
        let w = window as i32;
        let fig = BudykoSpace {
            title: format!("{} — catchments in Budyko space, {NO_CONTROL}", d.info.title),
            curves: curves(d),
            forest_pet_factor: d.info.hydrology.forest_pet_factor,
            trajectories: cands,
            start_label: format!("Start: mean of {s}–{}", s + w - 1),
            end_label: format!("End: mean of {}–{e}", e - w + 1),
        };
        save_figure(&fig, &dir.join(BUDYKO), formats)?;
        let mut note = format!(
            "Each point is the mean over a {window}-year window (ΣET/ΣP against ΣE0/ΣP), windows spaced evenly from the first {window} years to the last {window}."
        );
        if total > BUDYKO_MAX {
            note.push_str(&format!(" The {BUDYKO_MAX} catchments with the largest change at the horizon are drawn, of {total}."));
        }
        out.push(Drawn { stem: BUDYKO.into(), note });
    }

    // 3. Sensitivity.
    if let Some(rows) = &d.sensitivity {
        if let Some((catchment, strategy)) = sensitivity_subject(d) {
            let mut ats: Vec<(String, i32)> =
                rows.iter().filter(|r| r.catchment == catchment && r.strategy == strategy).map(|r| (r.at.clone(), r.year)).collect();
            ats.sort_by_key(|a| a.1);
            ats.dedup();
            for (at, year) in &ats {
                let panel = InfluencePanel {
                    title: format!(
                        "{}, {strategy}: parameter influence, {} ({year})",
                        subject_name(d, &catchment),
                        at_label(at).to_lowercase()
                    ),
                    influences: rows
                        .iter()
                        .filter(|r| r.catchment == catchment && r.strategy == strategy && &r.at == at && r.year == *year)
                        .filter_map(|r| {
                            r.spearman_rho.map(|rho| Influence {
                                parameter: d.param_label(&r.parameter).to_string(),
                                spearman_rho: rho,
                                src: r.src,
                                rank: r.rank,
                            })
                        })
                        .collect(),
                };
                if !panel.influences.is_empty() {
                    let stem = sensitivity_stem(at);
                    save_figure(&influence_chart(&panel), &dir.join(&stem), formats)?;
                    out.push(Drawn { stem, note: format!("{catchment}, {strategy}, {at}") });
                }
            }
        }
    }

    // 4. What arrives at the receiving nodes.
    arriving_figures(d, &dir, formats, &mut out)?;

    // 5. Ensemble ranges over time.
    if let Some(e) = &d.ensemble {
        // Only for the catchments the report details (all of them in small basins).
        let mut subjects: Vec<(String, String)> = d.detailed_catchments().into_iter().map(|c| (c.0.clone(), c.1.clone())).collect();
        subjects.push((BASIN_ID.to_string(), "Basin (all catchments)".to_string()));
        for (id, name) in subjects {
            let stem = file_stem(&id);
            let years = d.years(&id, NO_CONTROL);
            let ys = e.series(&id, NO_CONTROL, "yield_mm");
            if !ys.is_empty() {
                let mut chart = LineChart::over_years(
                    format!("{name} — water yield with ensemble ranges"),
                    "Water yield (mm/yr)".into(),
                    vec![
                        Line {
                            label: "Ensemble median".into(),
                            points: ys.iter().map(|(y, q)| (*y as f64, Some(q.p50))).collect(),
                            colour: palette::RANGE,
                            dashed: true,
                        },
                        Line {
                            label: "Projected (central parameters)".into(),
                            points: years.iter().map(|y| (y.year as f64, Some(y.yield_mm))).collect(),
                            colour: palette::YIELD,
                            dashed: false,
                        },
                    ],
                );
                chart.bands = bands(&ys, palette::YIELD);
                chart.legend_at = Corner::LowerLeft;
                save_figure(&chart, &dir.join(format!("{stem}_yield_range")), formats)?;
                out.push(Drawn { stem: format!("{stem}_yield_range"), note: id.clone() });
            }
            for (k, c) in d.info.contaminants.iter().enumerate() {
                let qs = e.series(&id, NO_CONTROL, &format!("{}_mg_per_l", c.name));
                if qs.is_empty() {
                    continue;
                }
                let mut chart = LineChart::over_years(
                    format!("{name} — {} with ensemble ranges", c.name),
                    format!("{} (mg/L)", c.name),
                    vec![
                        Line {
                            label: "Ensemble median".into(),
                            points: qs.iter().map(|(y, q)| (*y as f64, Some(q.p50))).collect(),
                            colour: palette::RANGE,
                            dashed: true,
                        },
                        Line {
                            label: "Projected (central parameters)".into(),
                            points: years.iter().map(|y| (y.year as f64, y.conc.get(k).copied().flatten())).collect(),
                            colour: palette::series(k + 1),
                            dashed: false,
                        },
                    ],
                );
                chart.bands = bands(&qs, palette::series(k + 1));
                chart.thresholds =
                    c.guideline_mg_per_l.map(|g| vec![(format!("Guideline {g} mg/L"), g, palette::GUIDELINE)]).unwrap_or_default();
                chart.legend_at = Corner::UpperLeft;
                let stem_c = format!("{stem}_{}_range", c.name);
                save_figure(&chart, &dir.join(&stem_c), formats)?;
                out.push(Drawn { stem: stem_c, note: id.clone() });
            }
        }
    }
    Ok(out)
}

/// Stem of the figures of what arrives at a receiving node (kept apart from the
/// node catchment's own figures).
pub fn arriving_stem(id: &str) -> String {
    format!("{}_arriving", file_stem(id))
}

/// Figures of what arrives at each receiving node without control: the yield change
/// (each year and its 10-year mean, central run) and each concentration, with the
/// ensemble's bands when an ensemble ran.
fn arriving_figures(d: &RunData, dir: &std::path::Path, formats: Formats, out: &mut Vec<Drawn>) -> Result<()> {
    use crate::schema::columns::ensemble::YIELD_CHANGE_10YR_MEAN_PCT;
    for ((id, strategy), years) in &d.nodes {
        if strategy != NO_CONTROL || years.is_empty() {
            continue;
        }
        let name = d.arriving.iter().find(|r| &r.catchment == id).map_or_else(|| id.clone(), |r| r.name.clone());
        let stem = arriving_stem(id);
        let vol: Vec<f64> = years.iter().map(|y| y.yield_m3).collect();
        let base: Vec<f64> = years.iter().map(|y| y.baseline_yield_m3).collect();
        let mut lines = vec![
            Line {
                label: "Each year (central parameters)".into(),
                points: years.iter().map(|y| (y.year as f64, y.change_pct)).collect(),
                colour: palette::BASELINE,
                dashed: true,
            },
            Line {
                label: "10-year mean (central parameters)".into(),
                points: years
                    .iter()
                    .enumerate()
                    .map(|(t, y)| (y.year as f64, crate::model::summary::window_change_pct(&vol, &base, t)))
                    .collect(),
                colour: palette::YIELD,
                dashed: false,
            },
        ];
        let qs = d.ensemble.as_ref().map(|e| e.series_arriving(id, NO_CONTROL, YIELD_CHANGE_10YR_MEAN_PCT)).unwrap_or_default();
        if !qs.is_empty() {
            lines.push(Line {
                label: "Ensemble median (10-year mean)".into(),
                points: qs.iter().map(|(y, q)| (*y as f64, Some(q.p50))).collect(),
                colour: palette::RANGE,
                dashed: true,
            });
        }
        let mut chart =
            LineChart::over_years(format!("{name} — change of the water arriving"), "Yield change vs baseline (%)".into(), lines);
        chart.bands = if qs.is_empty() { Vec::new() } else { bands(&qs, palette::YIELD) };
        chart.legend_at = Corner::LowerLeft;
        save_figure(&chart, &dir.join(format!("{stem}_yield")), formats)?;
        out.push(Drawn { stem: format!("{stem}_yield"), note: id.clone() });
        for (k, c) in d.info.contaminants.iter().enumerate() {
            let qs = d.ensemble.as_ref().map(|e| e.series_arriving(id, NO_CONTROL, &format!("{}_mg_per_l", c.name))).unwrap_or_default();
            let mut lines = vec![Line {
                label: "Central parameters".into(),
                points: years.iter().map(|y| (y.year as f64, y.conc.get(k).copied().flatten())).collect(),
                colour: palette::series(k + 1),
                dashed: false,
            }];
            if !qs.is_empty() {
                lines.push(Line {
                    label: "Ensemble median".into(),
                    points: qs.iter().map(|(y, q)| (*y as f64, Some(q.p50))).collect(),
                    colour: palette::RANGE,
                    dashed: true,
                });
            }
            let mut chart = LineChart::over_years(format!("{name} — {} arriving", c.name), format!("{} (mg/L)", c.name), lines);
            chart.bands = if qs.is_empty() { Vec::new() } else { bands(&qs, palette::series(k + 1)) };
            chart.thresholds =
                c.guideline_mg_per_l.map(|g| vec![(format!("Guideline {g} mg/L"), g, palette::GUIDELINE)]).unwrap_or_default();
            chart.legend_at = Corner::UpperLeft;
            let stem_c = format!("{stem}_{}", c.name);
            save_figure(&chart, &dir.join(&stem_c), formats)?;
            out.push(Drawn { stem: stem_c, note: id.clone() });
        }
    }
    Ok(())
}

/// Starts of `window`-year windows over `n` years, evenly spaced from the first
/// window to the last (so the first and last windows are the run's first and
/// last `window` years), about one window apart.
pub fn window_starts(n: usize, window: usize) -> Vec<usize> {
    if window == 0 || n < window {
        return vec![];
    }
    let room = n - window;
    let m = room.div_ceil(window) + 1;
    if m == 1 {
        return vec![0];
    }
    (0..m).map(|k| ((k * room) as f64 / (m - 1) as f64).round() as usize).collect()
}

fn bands(qs: &[(i32, super::folder::Quantiles)], colour: plotters::style::RGBColor) -> Vec<Band> {
    vec![
        Band {
            label: "5–95 % of members".into(),
            points: qs.iter().map(|(y, q)| (*y as f64, q.p5, q.p95)).collect(),
            colour,
            opacity: 0.16,
        },
        Band {
            label: "25–75 % of members".into(),
            points: qs.iter().map(|(y, q)| (*y as f64, q.p25, q.p75)).collect(),
            colour,
            opacity: 0.34,
        },
    ]
}

/// Human text for a sensitivity `at` value.
pub fn at_label(at: &str) -> String {
    match at {
        "horizon" => "At the horizon".to_string(),
        other => match other.strip_prefix("year-") {
            Some(n) => format!("{n} years after the start"),
            None => other.to_string(),
        },
    }
}

/// Which rows of `sensitivity.csv` the report shows: the basin under no-control if
/// present, else the first catchment and strategy in the file.
pub fn sensitivity_subject(d: &RunData) -> Option<(String, String)> {
    let rows = d.sensitivity.as_ref()?;
    if rows.iter().any(|r| r.catchment == BASIN_ID && r.strategy == NO_CONTROL) {
        return Some((BASIN_ID.into(), NO_CONTROL.into()));
    }
    rows.first().map(|r| (r.catchment.clone(), r.strategy.clone()))
}

#[cfg(test)]
mod tests {
    use super::window_starts;

    #[test]
    fn windows_cover_first_and_last_years() {
        assert_eq!(window_starts(61, 10), vec![0, 9, 17, 26, 34, 43, 51]);
        assert_eq!(window_starts(10, 10), vec![0]);
        assert_eq!(window_starts(5, 10), Vec::<usize>::new());
        assert_eq!(window_starts(21, 10), vec![0, 6, 11]);
    }
}
