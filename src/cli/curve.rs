//! `yieldshift curve`: one-point evaluation of the water-balance curves.

use yieldshift::model::budyko::CoverCurves;
use yieldshift::model::interception::{mixed_et_mm, CanopyInterception};
use yieldshift::Error;
use yieldshift::Problem;

/// Arguments of `curve`.
#[derive(Debug, clap::Args)]
pub struct CurveArgs {
    /// Precipitation, mm/yr.
    #[arg(long)]
    pub rain_mm: f64,
    /// Potential evapotranspiration (grass), mm/yr.
    #[arg(long)]
    pub pet_mm: f64,
    /// Potential evapotranspiration over forest, mm/yr (default: same as --pet-mm).
    #[arg(long)]
    pub pet_forest_mm: Option<f64>,
    /// ET-equivalent forest (canopy) fraction, 0–1.
    #[arg(long, default_value_t = 0.0)]
    pub canopy_fraction: f64,
    /// Curve family.
    #[arg(long, value_enum, default_value = "zhang")]
    pub method: Method,
    /// Zhang's w for forest.
    #[arg(long, default_value_t = 2.0)]
    pub w_forest: f64,
    /// Zhang's w for grass.
    #[arg(long, default_value_t = 0.5)]
    pub w_grass: f64,
    /// Fu's ω for forest.
    #[arg(long, default_value_t = 2.97)]
    pub omega_forest: f64,
    /// Fu's ω for grass.
    #[arg(long, default_value_t = 2.16)]
    pub omega_grass: f64,
    /// Annual rainfall interception loss of a closed conifer canopy, fraction of rain (0–0.6).
    #[arg(long, default_value_t = CanopyInterception::DEFAULT_FRACTION)]
    pub interception_fraction: f64,
    /// Share of the interception loss taken from the transpiration demand (0–1).
    #[arg(long, default_value_t = CanopyInterception::DEFAULT_DEMAND_SHARE)]
    pub interception_demand_share: f64,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    pub json: bool,
}

/// `--method` values.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum Method {
    /// Zhang et al. (2001).
    Zhang,
    /// Fu (1981).
    Fu,
}

fn check_range(problems: &mut Vec<Problem>, name: &str, v: f64, lo: f64, hi: f64) {
    if !v.is_finite() || v < lo || v > hi {
        problems.push(Problem::new(format!("{v} is out of range; allowed {lo} to {hi}")).option(name));
    }
}

/// Runs `yieldshift curve`.
pub fn run(a: &CurveArgs) -> anyhow::Result<()> {
    let mut p = Vec::new();
    if !(a.rain_mm > 0.0) {
        p.push(
            Problem::new(format!("{} mm/yr: the evaporative ratio is undefined without rain; give more than 0", a.rain_mm))
                .option("--rain-mm"),
        );
    } else {
        check_range(&mut p, "--rain-mm", a.rain_mm, 0.0, 30_000.0);
    }
    check_range(&mut p, "--pet-mm", a.pet_mm, 0.0, 6_000.0);
    if let Some(v) = a.pet_forest_mm {
        check_range(&mut p, "--pet-forest-mm", v, 0.0, 6_000.0);
    }
    check_range(&mut p, "--canopy-fraction", a.canopy_fraction, 0.0, 1.0);
    match a.method {
        Method::Zhang => {
            check_range(&mut p, "--w-forest", a.w_forest, 0.01, 20.0);
            check_range(&mut p, "--w-grass", a.w_grass, 0.01, 20.0);
        }
        Method::Fu => {
            check_range(&mut p, "--omega-forest", a.omega_forest, 1.01, 20.0);
            check_range(&mut p, "--omega-grass", a.omega_grass, 1.01, 20.0);
        }
    }
    check_range(&mut p, "--interception-fraction", a.interception_fraction, 0.0, CanopyInterception::MAX_FRACTION);
    check_range(&mut p, "--interception-demand-share", a.interception_demand_share, 0.0, 1.0);
    if !p.is_empty() {
        return Err(Error::Invalid(p).into());
    }
    let interception = CanopyInterception::new(a.interception_fraction, a.interception_demand_share)
        .map_err(|e| Error::Invalid(vec![Problem::new(e.to_string()).option("--interception-fraction")]))?;
    let curves = match a.method {
        Method::Zhang => CoverCurves::Zhang { w_forest: a.w_forest, w_grass: a.w_grass },
        Method::Fu => CoverCurves::Fu { omega_forest: a.omega_forest, omega_grass: a.omega_grass },
    };
    let pet_f = a.pet_forest_mm.unwrap_or(a.pet_mm);
    let et_forest = interception.forest_et_mm(&curves, a.rain_mm, pet_f);
    let intercepted = interception.interception_mm(a.rain_mm);
    let et_grass = curves.grass_et_mm(a.rain_mm, a.pet_mm);
    let et = mixed_et_mm(&curves, &interception, a.rain_mm, pet_f, a.pet_mm, a.canopy_fraction);
    let q = (a.rain_mm - et).max(0.0);
    let ratio = if a.rain_mm > 0.0 { et / a.rain_mm } else { 0.0 };
    let aridity = if a.rain_mm > 0.0 { a.pet_mm / a.rain_mm } else { f64::INFINITY };
    if a.json {
        let v = serde_json::json!({
            "method": curves.method_name(),
            "rain_mm": a.rain_mm,
            "pet_mm": a.pet_mm,
            "pet_forest_mm": pet_f,
            "canopy_fraction": a.canopy_fraction,
            "aridity_index": if aridity.is_finite() { Some(aridity) } else { None },
            "interception_fraction": a.interception_fraction,
            "interception_demand_share": a.interception_demand_share,
            "interception_forest_mm": intercepted,
            "et_forest_mm": et_forest,
            "et_grass_mm": et_grass,
            "et_mm": et,
            "yield_mm": q,
            "evaporative_ratio": ratio,
        });
        say!("{v}")?;
    } else {
        let rows: [(&str, String); 11] = [
            ("method", curves.method_name().to_string()),
            ("rain_mm", format!("{:.1}", a.rain_mm)),
            ("pet_mm (grass)", format!("{:.1}", a.pet_mm)),
            ("pet_mm (forest)", format!("{:.1}", pet_f)),
            ("canopy_fraction", format!("{:.3}", a.canopy_fraction)),
            ("interception (forest)", format!("{:.1}", intercepted)),
            ("et_mm forest", format!("{:.1}", et_forest)),
            ("et_mm grass", format!("{:.1}", et_grass)),
            ("et_mm", format!("{:.1}", et)),
            ("yield_mm", format!("{:.1}", q)),
            ("ET/P", format!("{:.4}", ratio)),
        ];
        for (k, v) in rows {
            say!("{k:<21} {v:>10}")?;
        }
    }
    Ok(())
}
