//! Section 4, uncertainty: what drives the results (sensitivity.csv).

use super::*;

pub(super) fn sensitivity_results(d: &RunData, doc: &mut Doc) {
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
        "Which uncertain parameters drive the {result} of {subject} under {strategy}: the Spearman rank correlation ρ between each parameter's draws and that result across ensemble members (its sign gives the direction: ρ > 0, a higher value of the parameter gives a higher result, i.e. less loss), and the standardised regression coefficient. Rank 1 is the most influential. Parameters that cannot change this result (those of control programmes, treatments, economics and water quality) are not ranked."
    ));
    for (at, year) in &ats {
        let mut rs: Vec<&crate::report::folder::SensitivityRow> =
            rows.iter().filter(|r| r.catchment == catchment && r.strategy == strategy && &r.at == at && r.year == *year).collect();
        rs.sort_by_key(|r| r.rank);
        let variable = rs.iter().find_map(|r| r.variable.clone());
        let body = rs
            .iter()
            .map(|r| {
                let key = [catchment.as_str(), strategy.as_str(), at.as_str(), r.parameter.as_str()];
                vec![
                    Text::new().num(r.rank.to_string(), Some(Source::new("sensitivity.csv", &key, "rank"))),
                    if d.param_label(&r.parameter) == r.parameter {
                        Text::new().code(&r.parameter)
                    } else {
                        Text::new().plain(d.param_label(&r.parameter)).plain(" (").code(&r.parameter).plain(")")
                    },
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
