//! `yieldshift pet`: reference evapotranspiration from a weather table.
//!
//! Reads the weather CSV, takes the site from options and/or a small TOML file
//! (options win), computes ET0 per day or month with the method the columns allow
//! (or the one asked for), and writes the per-period table and the annual table the
//! scenario's climate table accepts. Prints a short summary: method, rows, years,
//! gaps, incomplete years and the days whose negative ET0 was set to 0.

use std::path::{Path, PathBuf};
use yieldshift::input::weather::{
    compute_pet_file_with, read_site_file, GapRule, PetMethodChoice, PetOutput, SiteFile, SiteMeta, Timestep, STATUS_COMPLETE,
    STATUS_GAP_FILLED, STATUS_INCOMPLETE,
};
use yieldshift::output::pet::{write_annual_csv, write_period_csv};
use yieldshift::{Error, Problem};

/// Gaps listed individually in the summary before the rest are counted.
const GAPS_SHOWN: usize = 10;

/// Arguments of `pet`.
#[derive(clap::Args, Debug)]
pub struct PetArgs {
    /// Weather table (CSV): a `date` column (daily) or `year` and `month` (monthly), with
    /// tmax_c, tmin_c and whatever humidity, wind, sunshine or radiation columns exist.
    pub weather: PathBuf,
    /// Where to write ET0 per day or month (CSV).
    #[arg(long, value_name = "PATH")]
    pub out: PathBuf,
    /// Where to write the annual totals (CSV); default: `<out stem>_annual.csv` beside --out.
    #[arg(long, value_name = "PATH")]
    pub annual_out: Option<PathBuf>,
    /// Site latitude, decimal degrees, south negative (overrides the site file).
    #[arg(long, allow_negative_numbers = true, value_name = "DEG")]
    pub latitude_deg: Option<f64>,
    /// Site elevation, m above sea level (overrides the site file).
    #[arg(long, allow_negative_numbers = true, value_name = "M")]
    pub elevation_m: Option<f64>,
    /// Height of the wind measurement above the ground, m; default 2 (overrides the site file).
    #[arg(long, value_name = "M")]
    pub wind_height_m: Option<f64>,
    /// Site file (TOML) with latitude_deg, elevation_m, wind_height_m, angstrom_a, angstrom_b.
    #[arg(long, value_name = "SITE.toml")]
    pub site: Option<PathBuf>,
    /// Method; `auto` picks the most complete one the columns allow.
    #[arg(long, value_enum, default_value_t = MethodArg::Auto)]
    pub method: MethodArg,
    /// Longest run of consecutive missing days filled by linear interpolation of
    /// daily ET0 (0: never fill; monthly records are never filled).
    #[arg(long, default_value_t = GapRule::default().max_fill_days, value_name = "DAYS")]
    pub fill_max_days: u32,
}

/// `--method` values.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum MethodArg {
    /// Penman–Monteith if humidity, wind and sunshine/radiation are present, else
    /// Priestley–Taylor if radiation is, else Hargreaves.
    Auto,
    /// FAO-56 Penman–Monteith (Allen et al. 1998, eq. 6).
    PenmanMonteith,
    /// Hargreaves (FAO-56 eq. 52), temperature only.
    Hargreaves,
    /// Priestley–Taylor (1972), α = 1.26.
    PriestleyTaylor,
}

impl From<MethodArg> for PetMethodChoice {
    fn from(m: MethodArg) -> Self {
        match m {
            MethodArg::Auto => PetMethodChoice::Auto,
            MethodArg::PenmanMonteith => PetMethodChoice::PenmanMonteith,
            MethodArg::Hargreaves => PetMethodChoice::Hargreaves,
            MethodArg::PriestleyTaylor => PetMethodChoice::PriestleyTaylor,
        }
    }
}

/// Runs `yieldshift pet`.
pub fn run(args: &PetArgs) -> anyhow::Result<()> {
    let site = site_meta(args)?;
    let annual_out = annual_path(args)?;
    check_paths(&args.weather, &args.out, &annual_out)?;
    let choice = PetMethodChoice::from(args.method);
    let rule = GapRule { max_fill_days: args.fill_max_days };
    let output = compute_pet_file_with(&args.weather, &site, choice, rule)?;
    write_period_csv(&args.out, &output.periods)?;
    write_annual_csv(&annual_out, &output.annual)?;
    {
        use std::io::Write as _;
        write!(std::io::stdout().lock(), "{}", summary(&output, choice, &args.out, &annual_out))?;
    }
    Ok(())
}

/// The site from the TOML file (if any) overridden by the options.
fn site_meta(args: &PetArgs) -> Result<SiteMeta, Error> {
    let file = match &args.site {
        Some(p) => read_site_file(p)?,
        None => SiteFile::default(),
    };
    let latitude = args.latitude_deg.or(file.latitude_deg);
    let elevation = args.elevation_m.or(file.elevation_m);
    let mut problems = Vec::new();
    let where_from =
        if args.site.is_some() { "--latitude-deg or latitude_deg in the site file" } else { "--latitude-deg (or a --site file)" };
    if latitude.is_none() {
        let p = Problem::new(format!("the site latitude is required for the radiation terms: give {where_from}"));
        problems.push(if args.site.is_some() { p.column("latitude_deg") } else { p.option("--latitude-deg") });
    }
    if elevation.is_none() {
        let from = if args.site.is_some() { "--elevation-m or elevation_m in the site file" } else { "--elevation-m (or a --site file)" };
        let p = Problem::new(format!("the site elevation is required for the psychrometric constant: give {from}"));
        problems.push(if args.site.is_some() { p.column("elevation_m") } else { p.option("--elevation-m") });
    }
    let (Some(latitude_deg), Some(elevation_m)) = (latitude, elevation) else {
        return Err(Error::Invalid(problems));
    };
    let mut site = SiteMeta::new(latitude_deg, elevation_m);
    if let Some(h) = args.wind_height_m.or(file.wind_height_m) {
        site.wind_height_m = h;
    }
    if let Some(a) = file.angstrom_a {
        site.angstrom_a = a;
    }
    if let Some(b) = file.angstrom_b {
        site.angstrom_b = b;
    }
    // Values are range-checked by the library together with the weather table, so
    // that a bad latitude and bad cells are reported in one run.
    Ok(site)
}

/// `--annual-out`, or `<out stem>_annual.csv` beside `--out`.
fn annual_path(args: &PetArgs) -> Result<PathBuf, Error> {
    if let Some(p) = &args.annual_out {
        return Ok(p.clone());
    }
    match args.out.file_stem() {
        Some(stem) if !stem.is_empty() => Ok(args.out.with_file_name(format!("{}_annual.csv", stem.to_string_lossy()))),
        _ => Err(Error::invalid(Problem::in_file(&args.out, "is not a file name; give --out as a path like results/pet.csv"))),
    }
}

/// Refuses to overwrite the weather table or to write both tables to one file.
fn check_paths(weather: &Path, out: &Path, annual: &Path) -> Result<(), Error> {
    let mut problems = Vec::new();
    if same_file(out, weather) {
        problems.push(Problem::in_file(out, "is the weather table itself; choose another --out").option("--out"));
    }
    if same_file(annual, weather) {
        problems.push(Problem::in_file(annual, "is the weather table itself; choose another --annual-out").option("--annual-out"));
    }
    if same_file(out, annual) {
        problems.push(Problem::in_file(annual, "is the same file as --out; choose another --annual-out").option("--annual-out"));
    }
    if out.is_dir() {
        problems.push(Problem::in_file(out, "is a folder; give --out as a file path like results/pet.csv").option("--out"));
    }
    if annual.is_dir() {
        problems.push(Problem::in_file(annual, "is a folder; give --annual-out as a file path").option("--annual-out"));
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(Error::Invalid(problems))
    }
}

/// True when `a` and `b` name the same file (whether or not it exists yet).
fn same_file(a: &Path, b: &Path) -> bool {
    fn resolve(p: &Path) -> Option<PathBuf> {
        if let Ok(c) = p.canonicalize() {
            return Some(c);
        }
        let parent = p.parent().filter(|d| !d.as_os_str().is_empty()).unwrap_or(Path::new("."));
        Some(parent.canonicalize().ok()?.join(p.file_name()?))
    }
    match (resolve(a), resolve(b)) {
        (Some(x), Some(y)) => x == y,
        _ => a == b,
    }
}

/// "1 day", "3 days".
fn days(n: u32) -> String {
    if n == 1 {
        "1 day".to_string()
    } else {
        format!("{n} days")
    }
}

/// How many computed days had a negative ET0 set to 0, and where (the catchment-years,
/// up to [`GAPS_SHOWN`] of them, with what the rule added to each total).
fn clamped_line(o: &PetOutput) -> String {
    let total: u32 = o.annual.iter().map(|a| a.clamped_days).sum();
    if total == 0 {
        return "negative daily ET0 set to 0: none\n".to_string();
    }
    let years: Vec<String> = o
        .clamped_years()
        .take(GAPS_SHOWN)
        .map(|a| {
            let who = a.catchment.as_deref().map(|c| format!("{c} ")).unwrap_or_default();
            format!("{who}{} {} (+{:.2} mm)", a.year, days(a.clamped_days), a.added_by_clamp_mm)
        })
        .collect();
    let more = o.clamped_years().count().saturating_sub(GAPS_SHOWN);
    let more = if more > 0 { format!(", … and {more} more") } else { String::new() };
    let months = if o.timestep == Timestep::Monthly { " (days of months whose mean was negative)" } else { "" };
    format!("negative daily ET0 set to 0 on {}{months} (pet_clamped_days): {}{more}\n", days(total), years.join(", "))
}

/// The text printed after a successful run.
fn summary(o: &PetOutput, choice: PetMethodChoice, out: &Path, annual_out: &Path) -> String {
    let mut s = String::new();
    let step = match o.timestep {
        Timestep::Daily => "daily",
        Timestep::Monthly => "monthly",
    };
    let how = if choice == PetMethodChoice::Auto { "chosen from the columns present" } else { "as requested" };
    s.push_str(&format!("{}: {} {step} rows read\n", o.source.display(), o.rows_read));
    s.push_str(&format!("method: {} ({how})\n", o.method.name()));
    if !o.humidity_sources.is_empty() {
        let unit = if o.timestep == Timestep::Daily { "days" } else { "months" };
        let parts: Vec<String> = o.humidity_sources.iter().map(|(label, n)| format!("{label} for {n} {unit}")).collect();
        s.push_str(&format!("humidity: {}\n", parts.join("; ")));
    }
    if !o.unused_columns.is_empty() {
        s.push_str(&format!("columns not used by {}: {}\n", o.method.name(), o.unused_columns.join(", ")));
    }
    let count = |status: &str| o.annual.iter().filter(|a| a.status == status).count();
    if let (Some(first), Some(last)) = (o.annual.iter().map(|a| a.year).min(), o.annual.iter().map(|a| a.year).max()) {
        s.push_str(&format!(
            "years {first}–{last}: {} complete, {} gap-filled, {} incomplete\n",
            count(STATUS_COMPLETE),
            count(STATUS_GAP_FILLED),
            count(STATUS_INCOMPLETE)
        ));
    }
    if !o.gaps.is_empty() {
        let missing: u32 = o.gaps.iter().map(|g| g.days).sum();
        let filled: u32 = o.gaps.iter().filter(|g| g.filled).map(|g| g.days).sum();
        let runs = if o.gaps.len() == 1 { "1 gap".to_string() } else { format!("{} gaps", o.gaps.len()) };
        s.push_str(&format!("missing: {} in {runs} ({} filled by interpolation)\n", days(missing), days(filled)));
        for g in o.gaps.iter().take(GAPS_SHOWN) {
            let who = g.catchment.as_deref().map(|c| format!("{c} ")).unwrap_or_default();
            let span = if g.first == g.last { g.first.to_string() } else { format!("{} to {}", g.first, g.last) };
            let what = if g.filled { "filled" } else { "not filled" };
            s.push_str(&format!("  {who}{span} ({}, {what}): {}\n", days(g.days), g.cause));
        }
        if o.gaps.len() > GAPS_SHOWN {
            s.push_str(&format!("  … and {} more gaps\n", o.gaps.len() - GAPS_SHOWN));
        }
    }
    let incomplete: Vec<String> = o
        .incomplete_years()
        .map(|a| {
            let who = a.catchment.as_deref().map(|c| format!("{c} ")).unwrap_or_default();
            format!("{who}{} ({} of {} days missing)", a.year, a.missing_days, a.days + a.missing_days)
        })
        .collect();
    if !incomplete.is_empty() {
        s.push_str(&format!("incomplete years (pet_status = incomplete; the climate table refuses them): {}\n", incomplete.join(", ")));
    }
    s.push_str(&clamped_line(o));
    s.push_str(&format!("wrote {} ({} rows) and {} ({} rows)\n", out.display(), o.periods.len(), annual_out.display(), o.annual.len()));
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::Parser;

    #[derive(Debug, Parser)]
    struct Wrap {
        #[command(flatten)]
        args: PetArgs,
    }

    #[test]
    fn parses_negative_latitude_and_defaults() {
        let w = Wrap::try_parse_from(["x", "w.csv", "--out", "o/pet.csv", "--latitude-deg", "-45.5", "--elevation-m", "300"]).unwrap();
        assert_eq!(w.args.latitude_deg, Some(-45.5));
        assert_eq!(w.args.method, MethodArg::Auto);
        assert_eq!(w.args.fill_max_days, 5);
        assert_eq!(annual_path(&w.args).unwrap(), PathBuf::from("o/pet_annual.csv"));
        let site = site_meta(&w.args).unwrap();
        assert_eq!(site.wind_height_m, 2.0);
    }

    #[test]
    fn missing_site_values_are_reported_together() {
        let w = Wrap::try_parse_from(["x", "w.csv", "--out", "pet.csv"]).unwrap();
        let e = site_meta(&w.args).unwrap_err();
        // Without a site file the missing values are options of the command line.
        let cols: Vec<_> = e.problems().iter().filter_map(|p| p.column.clone()).collect();
        assert_eq!(cols, vec!["--latitude-deg", "--elevation-m"]);
        assert!(e.problems().iter().all(|p| p.place == yieldshift::error::Place::Option), "{e}");
    }

    #[test]
    fn options_override_the_site_file() {
        let dir = tempfile::tempdir().unwrap();
        let site = dir.path().join("site.toml");
        std::fs::write(&site, "latitude_deg = -40\nelevation_m = 50\nwind_height_m = 10\nangstrom_a = 0.2\nangstrom_b = 0.55\n").unwrap();
        let s = site.to_string_lossy().into_owned();
        let w = Wrap::try_parse_from(["x", "w.csv", "--out", "pet.csv", "--site", &s, "--elevation-m", "900"]).unwrap();
        let m = site_meta(&w.args).unwrap();
        assert_eq!((m.latitude_deg, m.elevation_m, m.wind_height_m, m.angstrom_a, m.angstrom_b), (-40.0, 900.0, 10.0, 0.2, 0.55));
    }

    #[test]
    fn runs_end_to_end_and_keeps_library_errors_downcastable() {
        let dir = tempfile::tempdir().unwrap();
        let weather = dir.path().join("w.csv");
        let mut text = String::from("date,tmax_c,tmin_c\n");
        for d in 1..=31 {
            if d != 10 {
                text.push_str(&format!("2021-01-{d:02},{},{}\n", 20 + d % 3, 8 + d % 2));
            }
        }
        std::fs::write(&weather, text).unwrap();
        let out = dir.path().join("res").join("pet.csv");
        let (w, o) = (weather.to_string_lossy().into_owned(), out.to_string_lossy().into_owned());
        let args = Wrap::try_parse_from(["x", &w, "--out", &o, "--latitude-deg", "-45", "--elevation-m", "100"]).unwrap().args;
        run(&args).unwrap();
        let annual = std::fs::read_to_string(dir.path().join("res").join("pet_annual.csv")).unwrap();
        let row: Vec<&str> = annual.lines().nth(1).unwrap().split(',').collect();
        // Only January is present: 30 computed days, 2021-01-10 filled, the rest missing.
        assert_eq!(row[1..].iter().skip(2).copied().collect::<Vec<_>>(), vec!["hargreaves", "30", "335", "incomplete", "0"]);
        let periods = std::fs::read_to_string(&out).unwrap();
        assert!(periods.contains("2021-01-10,") && periods.lines().count() == 32);

        let output = compute_pet_file_with(&weather, &site_meta(&args).unwrap(), PetMethodChoice::Auto, GapRule::default()).unwrap();
        let text = summary(&output, PetMethodChoice::Auto, &out, Path::new("a.csv"));
        assert!(text.contains("method: hargreaves (chosen from the columns present)"), "{text}");
        assert!(text.contains("2021-01-10 (1 day, filled): no rows for these dates"), "{text}");
        assert!(text.contains("incomplete years"), "{text}");

        // Invalid input: the error is the library's, so main can map it to exit code 2.
        std::fs::write(&weather, "date,tmax_c,tmin_c\n2021-01-01,abc,5\n").unwrap();
        let err = run(&args).unwrap_err();
        let lib = err.downcast_ref::<Error>().expect("library error inside anyhow");
        assert!(lib.is_invalid_input());
        assert_eq!(lib.problems()[0].row, Some(2));
    }

    #[test]
    fn the_summary_and_the_annual_table_report_clamped_days() {
        // December at 64°N, clear and saturated (Tmax −10, Tmin −15 °C, RH 100 %,
        // u2 2 m/s): Priestley–Taylor's raw ET0 is negative on these days.
        let dir = tempfile::tempdir().unwrap();
        let weather = dir.path().join("north.csv");
        let mut text = String::from("date,tmax_c,tmin_c,rh_mean_pct,sunshine_h\n");
        let mut negative = 0;
        let site = SiteMeta::new(64.0, 0.0).validate().unwrap();
        for d in 1..=31u32 {
            let j = yieldshift::model::pet::day_of_year(2021, 12, d);
            let sun = (yieldshift::model::pet::fao56::daylight_hours(64.0, j) * 100.0).floor() / 100.0;
            text.push_str(&format!("2021-12-{d:02},-10,-15,100,{sun}\n"));
            let nr = yieldshift::model::pet::priestley_taylor::NetRadiation::Estimated {
                day_of_year: j,
                tmax_c: -10.0,
                tmin_c: -15.0,
                humidity: yieldshift::model::pet::Humidity::RhMean { rh_mean_pct: 100.0 },
                solar: yieldshift::model::pet::Solar::SunshineHours(sun),
            };
            if yieldshift::model::pet::priestley_taylor::priestley_taylor(&site, &nr, 0.0).et0_mm_per_day < 0.0 {
                negative += 1;
            }
        }
        assert!(negative > 0);
        std::fs::write(&weather, text).unwrap();
        let out = dir.path().join("pet.csv");
        let (w, o) = (weather.to_string_lossy().into_owned(), out.to_string_lossy().into_owned());
        let args = Wrap::try_parse_from(["x", &w, "--out", &o, "--latitude-deg", "64", "--elevation-m", "0"]).unwrap().args;
        run(&args).unwrap();
        let annual = std::fs::read_to_string(dir.path().join("pet_annual.csv")).unwrap();
        let row: Vec<&str> = annual.lines().nth(1).unwrap().split(',').collect();
        assert_eq!(row[3], "priestley-taylor");
        assert_eq!(row[7], negative.to_string());
        let output = compute_pet_file_with(&weather, &site_meta(&args).unwrap(), PetMethodChoice::Auto, GapRule::default()).unwrap();
        let text = summary(&output, PetMethodChoice::Auto, &out, Path::new("a.csv"));
        let expected = format!("negative daily ET0 set to 0 on {} (pet_clamped_days): 2021 {} (+", days(negative), days(negative));
        assert!(text.contains(&expected), "{text}");
        // A record without negative days says so.
        std::fs::write(dir.path().join("warm.csv"), "date,tmax_c,tmin_c\n2021-01-01,25,12\n").unwrap();
        let warm =
            compute_pet_file_with(&dir.path().join("warm.csv"), &SiteMeta::new(-45.0, 100.0), PetMethodChoice::Auto, GapRule::default())
                .unwrap();
        assert!(summary(&warm, PetMethodChoice::Auto, &out, Path::new("a.csv")).contains("negative daily ET0 set to 0: none\n"));
    }

    #[test]
    fn refuses_to_overwrite_the_input() {
        let dir = tempfile::tempdir().unwrap();
        let weather = dir.path().join("w.csv");
        std::fs::write(&weather, "date,tmax_c,tmin_c\n").unwrap();
        let e = check_paths(&weather, &weather, &dir.path().join("a.csv")).unwrap_err();
        assert_eq!(e.problems()[0].column.as_deref(), Some("--out"));
        assert!(check_paths(&weather, &dir.path().join("p.csv"), &dir.path().join("p.csv")).is_err());
        assert!(check_paths(&weather, &dir.path().join("p.csv"), &dir.path().join("a.csv")).is_ok());
    }
}
