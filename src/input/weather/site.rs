//! Where the weather was observed: the site values (latitude, elevation, wind
//! measurement height, Ångström coefficients), their checks, and the small site
//! TOML file `yieldshift pet --site` reads.

use crate::error::{Error, Problem, Result};
use crate::input::table::fmt_value;
use crate::input::toml_reader::TomlDoc;
use crate::model::pet::fao56::Angstrom;
use crate::model::pet::Site;
use std::path::Path;

/// Site metadata for the weather record.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SiteMeta {
    /// Latitude, decimal degrees, south negative, −90..=90. No default.
    pub latitude_deg: f64,
    /// Elevation above sea level, m, −500..=9000.
    pub elevation_m: f64,
    /// Height of the wind measurement above the ground, m, 0.5..=100 (default 2).
    pub wind_height_m: f64,
    /// Ångström `a_s` (default 0.25, FAO-56).
    pub angstrom_a: f64,
    /// Ångström `b_s` (default 0.50, FAO-56).
    pub angstrom_b: f64,
}

impl SiteMeta {
    /// Default wind measurement height, m.
    pub const DEFAULT_WIND_HEIGHT_M: f64 = 2.0;

    /// A site with the given latitude and elevation, wind measured at 2 m and
    /// FAO-56's default Ångström coefficients.
    pub fn new(latitude_deg: f64, elevation_m: f64) -> SiteMeta {
        SiteMeta {
            latitude_deg,
            elevation_m,
            wind_height_m: Self::DEFAULT_WIND_HEIGHT_M,
            angstrom_a: Angstrom::FAO56_DEFAULT.a_s,
            angstrom_b: Angstrom::FAO56_DEFAULT.b_s,
        }
    }

    /// Checks every value, returning the model's [`Site`] or every problem found.
    pub fn validate(&self) -> std::result::Result<Site, Vec<Problem>> {
        let mut problems = Vec::new();
        let angstrom = Angstrom { a_s: self.angstrom_a, b_s: self.angstrom_b };
        if let Err(e) = Site::new(self.latitude_deg, 0.0, Angstrom::default()) {
            problems.push(Problem::new(e.to_string()).column("latitude_deg"));
        }
        if let Err(e) = Site::new(0.0, self.elevation_m, Angstrom::default()) {
            problems.push(Problem::new(e.to_string()).column("elevation_m"));
        }
        if let Err(e) = Site::new(0.0, 0.0, angstrom) {
            problems.push(Problem::new(e.to_string()).column("angstrom_a"));
        }
        if !(self.wind_height_m.is_finite() && (0.5..=100.0).contains(&self.wind_height_m)) {
            problems.push(
                Problem::new(format!(
                    "wind measurement height {} m is not allowed: it must be in 0.5..=100 m above the ground",
                    fmt_value(self.wind_height_m)
                ))
                .column("wind_height_m"),
            );
        }
        if !problems.is_empty() {
            return Err(problems);
        }
        Site::new(self.latitude_deg, self.elevation_m, angstrom).map_err(|e| vec![Problem::new(e.to_string())])
    }
}

/// Site values read from a small TOML file; each may be absent.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct SiteFile {
    /// `latitude_deg`, decimal degrees, south negative.
    pub latitude_deg: Option<f64>,
    /// `elevation_m`, m above sea level.
    pub elevation_m: Option<f64>,
    /// `wind_height_m`, m above the ground.
    pub wind_height_m: Option<f64>,
    /// `angstrom_a`, dimensionless.
    pub angstrom_a: Option<f64>,
    /// `angstrom_b`, dimensionless.
    pub angstrom_b: Option<f64>,
}

/// Reads a site TOML file with the keys `latitude_deg`, `elevation_m`,
/// `wind_height_m`, `angstrom_a`, `angstrom_b` (all optional). Unknown keys and
/// out-of-range values are reported with their line.
pub fn read_site_file(path: &Path) -> Result<SiteFile> {
    let text = std::fs::read_to_string(path).map_err(|e| Error::io(format!("reading {}", path.display()), e))?;
    let (doc, table) = TomlDoc::parse(path, text).map_err(Error::invalid)?;
    let root = doc.root(&table);
    let site = SiteFile {
        latitude_deg: root.opt_f64_in("latitude_deg", -90.0, 90.0, "degrees (south negative)"),
        elevation_m: root.opt_f64_in("elevation_m", -500.0, 9000.0, "m"),
        wind_height_m: root.opt_f64_in("wind_height_m", 0.5, 100.0, "m"),
        angstrom_a: root.opt_f64_in("angstrom_a", 0.0, 1.0, ""),
        angstrom_b: root.opt_f64_in("angstrom_b", 0.0, 1.0, ""),
    };
    root.finish();
    let problems = doc.take_problems();
    if problems.is_empty() {
        Ok(site)
    } else {
        Err(Error::Invalid(problems))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn site_validation_lists_every_problem() {
        let mut s = SiteMeta::new(95.0, 20_000.0);
        s.wind_height_m = 0.0;
        let p = s.validate().unwrap_err();
        let cols: Vec<_> = p.iter().filter_map(|p| p.column.as_deref()).collect();
        assert_eq!(cols, vec!["latitude_deg", "elevation_m", "wind_height_m"]);
        assert!(SiteMeta::new(-45.5, 300.0).validate().is_ok());
    }

    #[test]
    fn site_file_is_checked() {
        let dir = tempfile::tempdir().unwrap();
        let good = dir.path().join("site.toml");
        std::fs::write(&good, "latitude_deg = -45.2\nelevation_m = 420\n").unwrap();
        let s = read_site_file(&good).unwrap();
        assert_eq!(s.latitude_deg, Some(-45.2));
        assert_eq!(s.elevation_m, Some(420.0));
        assert_eq!(s.wind_height_m, None);
        let bad = dir.path().join("bad.toml");
        std::fs::write(&bad, "latitude_deg = -45.2\nelevaton_m = 420\nwind_height_m = 0\n").unwrap();
        let problems = match read_site_file(&bad).unwrap_err() {
            Error::Invalid(p) => p,
            other => panic!("expected invalid input, got {other}"),
        };
        let located: Vec<(Option<usize>, Option<&str>)> = problems.iter().map(|p| (p.row, p.column.as_deref())).collect();
        assert!(located.contains(&(Some(2), Some("elevaton_m"))), "{located:?}");
        assert!(located.contains(&(Some(3), Some("wind_height_m"))), "{located:?}");
    }
}
