//! Sections 5–8: limitations, cautions, references and how the report was made.

use super::*;

// ---------------------------------------------------------------- 5–8.

pub(super) fn limitations_section(d: &RunData, doc: &mut Doc) {
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

pub(super) fn cautions_section(d: &RunData, doc: &mut Doc) {
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

pub(super) fn references_section(d: &RunData, doc: &mut Doc) {
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

pub(super) fn about_section(d: &RunData, doc: &mut Doc, drawn: &[Drawn]) {
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
