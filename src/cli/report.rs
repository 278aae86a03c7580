//! `yieldshift report DIR`: regenerate the report and its figures from an
//! existing run folder, without recomputing the projection.

use anyhow::Context;
use std::path::PathBuf;

/// Arguments of `report`.
#[derive(clap::Args, Debug)]
pub struct ReportArgs {
    /// Output folder of an earlier `yieldshift run` (holds run_info.json, summary.csv, yearly.csv).
    pub dir: PathBuf,
}

/// Runs `yieldshift report`.
pub fn run(a: &ReportArgs) -> anyhow::Result<()> {
    let out = yieldshift::report::write_report(&a.dir).with_context(|| format!("writing the report of {}", a.dir.display()))?;
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
