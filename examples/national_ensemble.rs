//! Throughput and memory of a national screening ensemble (no-control).
//!
//! Generates an invented table of `N` catchments and a scenario with uncertain
//! parameters, runs the full ensemble (writing `ensemble.csv` and
//! `sensitivity.csv`, figures off) and reports member-catchment-years per second.
//!
//! ```text
//! cargo run --release --example national_ensemble -- 10000 50 40
//! /usr/bin/time -v target/release/examples/national_ensemble 10000 50 200   # peak memory
//! ```
//! Arguments: catchments (default 10000), horizon years (50), members (40), threads (all).

use std::fmt::Write as _;
use std::time::Instant;
use yieldshift::input::scenario::load_scenario;
use yieldshift::plot::Formats;
use yieldshift::run::deterministic::{run, FigureChoice, RunOptions};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<usize> = std::env::args().skip(1).filter_map(|a| a.parse().ok()).collect();
    let n = args.first().copied().unwrap_or(10_000);
    let horizon = args.get(1).copied().unwrap_or(50);
    let members = args.get(2).copied().unwrap_or(40);
    let threads = args.get(3).copied();
    let dir = std::env::temp_dir().join(format!("yieldshift-national-{}", std::process::id()));
    std::fs::create_dir_all(&dir)?;
    let mut table =
        String::from("id,area_ha,rain_mm,pet_mm,vulnerable_fraction,scattered_ha,medium_ha,dense_ha,forest_ha,nitrate_n_point_kg_per_yr\n");
    for i in 0..n {
        // Invented catchments spanning humid to sub-humid climates.
        let k = (i % 97) as f64;
        let area = 500.0 + 37.0 * k;
        writeln!(
            table,
            "c{i:05},{area},{},{},0.7,{},{},{},{},0",
            700.0 + 18.0 * k,
            750.0 + 2.0 * k,
            0.02 * area,
            0.01 * area,
            0.005 * area,
            0.05 * area
        )?;
    }
    std::fs::write(dir.join("catchments.csv"), table)?;
    std::fs::write(
        dir.join("scenario.toml"),
        format!(
            "title = \"national screening benchmark (invented)\"\nstart_year = 2027\nhorizon_years = {horizon}\ncatchments = \"catchments.csv\"\n\n\
             [hydrology]\nw_grass = {{ dist = \"uniform\", min = 0.35, max = 0.7, per = \"catchment\" }}\nw_forest = {{ dist = \"pert\", min = 1.5, mode = 2.0, max = 2.5 }}\n\n\
             [invasion]\nspread_rate_per_yr = {{ dist = \"triangular\", min = 0.04, mode = 0.06, max = 0.08 }}\n\n\
             [ensemble]\nmembers = {members}\nclimate = \"stochastic\"\nrain_cv = 0.15\nrain_lag1 = 0.2\n\n\
             [[contaminant]]\nname = \"nitrate_n\"\nopen_export_kg_per_ha_yr = 2.5\nforest_export_kg_per_ha_yr = 2.0\nguideline_mg_per_l = 1.0\n"
        ),
    )?;
    let scenario = load_scenario(&dir.join("scenario.toml"))?;
    let opts = RunOptions {
        force: true,
        figures: FigureChoice::None,
        formats: Formats { png: false, svg: false },
        threads,
        ..RunOptions::new(dir.join("out"))
    };
    let t0 = Instant::now();
    run(&scenario, &opts)?;
    let secs = t0.elapsed().as_secs_f64();
    let cy = (n * (horizon + 1) * members) as f64;
    println!(
        "{n} catchments × {} years × {members} members in {secs:.2} s: {:.3e} member-catchment-years/s (whole run, CSV output included)",
        horizon + 1,
        cy / secs
    );
    std::fs::remove_dir_all(&dir)?;
    Ok(())
}
