//! `yieldshift report DIR`: regenerate the report and its figures from an
//! existing run folder, without recomputing the projection.

use anyhow::Context;
use std::path::PathBuf;

/// Arguments of `report`.
#[derive(clap::Args, Debug)]
pub struct ReportArgs {
    /// Output folder of an earlier `yieldshift run` (holds run_info.json, summary.csv, yearly.csv).
    pub dir: PathBuf,
    /// Per-catchment pages for only the N catchments with the largest yield loss at the horizon (a number, or `all`; default 30).
    #[arg(long, value_name = "N|all")]
    pub report_catchments: Option<yieldshift::report::CatchmentPages>,
}

/// Runs `yieldshift report`.
pub fn run(a: &ReportArgs) -> anyhow::Result<()> {
    let opts = yieldshift::report::ReportOptions::for_folder(&a.dir);
    let out = yieldshift::report::write_report_pages(&a.dir, &opts, a.report_catchments.unwrap_or_default())
        .with_context(|| format!("writing the report of {}", a.dir.display()))?;
    say!(
        "wrote {} and {} ({} figures embedded, {} of them drawn from the run's tables)",
        out.html.display(),
        out.markdown.display(),
        out.embedded.len(),
        out.drawn
    )?;
    say!("Screening estimates only; read the report's cautions before use.")?;
    Ok(())
}
