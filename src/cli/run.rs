//! `yieldshift run` and `yieldshift check`.

use anyhow::Context;
use std::path::PathBuf;
use yieldshift::input::scenario::load_scenario;
use yieldshift::plot::Formats;
use yieldshift::run::deterministic::{self, FigureChoice, RunOptions};

/// Arguments of `run`.
#[derive(Debug, clap::Args)]
pub struct RunArgs {
    /// Scenario file (TOML).
    pub scenario: PathBuf,
    /// Output folder (created; replaced atomically if it holds an earlier yieldshift run).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Replace a non-empty output folder that is not a yieldshift output.
    #[arg(long)]
    pub force: bool,
    /// Per-catchment figures: auto (up to 60 catchments), all, none.
    #[arg(long, value_enum, default_value = "auto")]
    pub figures: FigureArg,
    /// Figure formats to write.
    #[arg(long, value_enum, default_value = "png-svg")]
    pub figure_format: FormatArg,
    /// Worker threads for ensembles (default: one per core). Results do not depend on it.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=1024))]
    pub threads: Option<u16>,
    /// Run only the K-th of N deterministic slices of the catchments (e.g. 3/8); combine with `merge`.
    #[arg(long, value_name = "K/N", value_parser = yieldshift::run::shard::parse_shard)]
    pub shard: Option<(usize, usize)>,
    /// Per-catchment pages of the report for only the N catchments with the largest yield loss at the horizon (a number, or `all`; default 30).
    #[arg(long, value_name = "N|all")]
    pub report_catchments: Option<yieldshift::report::CatchmentPages>,
    /// Print nothing but errors (no progress bar).
    #[arg(long, short)]
    pub quiet: bool,
}

/// `--figures` values.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum FigureArg {
    /// Per-catchment figures for small basins.
    Auto,
    /// Always.
    All,
    /// Never.
    None,
}

/// `--figure-format` values.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum FormatArg {
    /// PNG only.
    Png,
    /// SVG only.
    Svg,
    /// Both.
    PngSvg,
}

/// Arguments of `merge`.
#[derive(Debug, clap::Args)]
pub struct MergeArgs {
    /// Output folders of `run --shard K/N`, one per shard (any order).
    #[arg(required = true)]
    pub shards: Vec<PathBuf>,
    /// Merged output folder.
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Replace a non-empty output folder that is not a yieldshift output.
    #[arg(long)]
    pub force: bool,
}

/// Runs `yieldshift merge`.
pub fn merge(a: &MergeArgs) -> anyhow::Result<()> {
    let m = yieldshift::run::shard::merge(&a.shards, &a.out, a.force)?;
    say!("merged {} shards ({} catchments) into {}", m.shards, m.catchments, m.out.display())?;
    Ok(())
}

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
pub struct CheckArgs {
    /// Scenario file (TOML).
    pub scenario: PathBuf,
}

/// Runs `yieldshift run`.
pub fn run(a: &RunArgs) -> anyhow::Result<()> {
    let scenario = load_scenario(&a.scenario)?;
    for w in &scenario.warnings {
        eprintln!("warning: {w}");
    }
    let opts = RunOptions {
        out: a.out.clone(),
        force: a.force,
        figures: match a.figures {
            FigureArg::Auto => FigureChoice::Auto,
            FigureArg::All => FigureChoice::All,
            FigureArg::None => FigureChoice::None,
        },
        formats: match a.figure_format {
            FormatArg::Png => Formats { png: true, svg: false },
            FormatArg::Svg => Formats { png: false, svg: true },
            FormatArg::PngSvg => Formats { png: true, svg: true },
        },
        threads: a.threads.map(usize::from),
        progress: !a.quiet,
        shard: a.shard,
    };
    let outcome = deterministic::run(&scenario, &opts).with_context(|| format!("running {}", a.scenario.display()))?;
    // The run wrote its report with the default pages; another choice writes it again
    // (figures as the run drew them, so range figures exist for every page).
    if let Some(pages) = a.report_catchments.filter(|p| *p != yieldshift::report::CatchmentPages::default()) {
        if outcome.out.join(yieldshift::report::HTML_FILE).is_file() {
            let report = yieldshift::report::ReportOptions { figures: !matches!(a.figures, FigureArg::None), formats: opts.formats };
            yieldshift::report::write_report_pages(&outcome.out, &report, pages)
                .with_context(|| format!("writing the report of {}", outcome.out.display()))?;
        }
    }
    if !a.quiet {
        say!(
            "{}: {} catchments × {} years ({}–{}), method {}",
            scenario.title,
            outcome.catchments,
            outcome.years,
            scenario.start_year,
            scenario.start_year + scenario.horizon_years as i32,
            scenario.params.curves.method_name()
        )?;
        if outcome.members > 0 {
            say!("ensemble: {} members, {} uncertain parameters", outcome.members, scenario.uncertain.len())?;
        }
        say!("wrote {} ({} strategies, {} figures)", outcome.out.display(), outcome.strategies.len(), outcome.figures)?;
        say!("Screening estimates only; see run_info.json for cautions.")?;
    }
    Ok(())
}

/// Runs `yieldshift check`.
pub fn check(a: &CheckArgs) -> anyhow::Result<()> {
    let s = load_scenario(&a.scenario)?;
    for w in &s.warnings {
        eprintln!("warning: {w}");
    }
    say!(
        "{}: valid — {} catchments, {} contaminants, {}–{}, method {}{}",
        a.scenario.display(),
        s.catchments.len(),
        s.params.contaminants.len(),
        s.start_year,
        s.start_year + s.horizon_years as i32,
        s.params.curves.method_name(),
        if s.climate.is_some() { ", with climate table" } else { "" }
    )?;
    Ok(())
}
