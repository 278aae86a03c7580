//! Section 3: the methods, with the parameter values this run used.

use super::inputs::{distribution_text, toml_text};
use super::*;

// ---------------------------------------------------------------- 3. Methods

/// A closure or dilution parameter: from run_info.json if recorded there, else
/// from the scenario file, else the documented default (named, not numbered).
pub(super) fn recorded(d: &RunData, info_path: &str, value: Option<f64>, section: &str, key: &str) -> Text {
    if let Some(v) = value {
        return info_num(info_path, v);
    }
    if let Some(s) = &d.scenario {
        if let Some(v) = s.table.get(section).and_then(|t| t.get(key)) {
            return match v {
                // A distribution: its central value drives the single run (docs/scenario.md).
                toml::Value::Table(t) => {
                    Text::new().plain("the central value of ").plain(distribution_text(t).unwrap_or_else(|| toml_text(v))).plain(";")
                }
                toml::Value::Integer(_) | toml::Value::Float(_) => {
                    Text::new().num(toml_text(v), Some(Source::new(&s.name, &[section], key)))
                }
                _ => Text::new().plain(toml_text(v)),
            };
        }
    }
    Text::new().plain("the documented default (not recorded in this run folder)")
}

// Over 100 lines on purpose: the methods read top to bottom as one text (equations, then the parameter values of this run); the order of the code is the order of the section.
pub(super) fn methods_section(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    doc.heading(2, "Methods");
    doc.para(
        "Each catchment is projected on an annual time step. The steps below are the ones this run used, with its parameter values; \
         numbers in the text are read from run_info.json or the scenario copied into inputs/.",
    );
    doc.heading(3, "Evapotranspiration and water yield");
    let closure = |k: &str| i.canopy_closure.as_ref().and_then(|c| c.logistic_parameter(k));
    match i.hydrology.curves {
        Curves::Zhang { w_forest, w_grass } => {
            doc.equation(
                "ET/P = (1 + w·E0/P) / (1 + w·E0/P + P/E0)",
                "Zhang, Dawes & Walker (2001), eq. 8; P rainfall, E0 potential evapotranspiration, both mm/yr",
            );
            doc.para(
                Text::new()
                    .plain("with the plant-available-water coefficient w = ")
                    .then(info_num("hydrology.w_forest", w_forest))
                    .plain(" for forest (conifer canopy and existing forest) and w = ")
                    .then(info_num("hydrology.w_grass", w_grass))
                    .plain(" for grass and tussock. ET never exceeds min(P, E0)."),
            );
        }
        Curves::Fu { omega_forest, omega_grass } => {
            doc.equation(
                "ET/P = 1 + φ − (1 + φ^ω)^(1/ω),   φ = E0/P",
                "Fu (1981), in the form of Zhang et al. (2004), eq. 4; evaluated in a numerically stable form",
            );
            doc.para(
                Text::new()
                    .plain("with ω = ")
                    .then(info_num("hydrology.omega_forest", omega_forest))
                    .plain(" for forest and ω = ")
                    .then(info_num("hydrology.omega_grass", omega_grass))
                    .plain(" for grass and tussock. ET never exceeds min(P, E0)."),
            );
        }
    }
    doc.equation(
        "ET = f·ET_forest(P, E0_forest) + (1 − f)·ET_grass(P, E0);   Q = P − ET;   V = 10·Q·A",
        "Mixing of cover types (Zhang et al. 2001); Q yield in mm/yr, A area in ha, V volume in m³/yr",
    );
    doc.para(
        Text::new()
            .plain("where f is the ET-equivalent closed-forest fraction of the catchment (column canopy_fraction). Forest evaporative demand is E0_forest = ")
            .then(info_num("hydrology.forest_pet_factor", i.hydrology.forest_pet_factor))
            .plain(" × E0 where the catchment table gives no pet_forest_mm. The baseline holds today's cover fixed under the same climate; yield change is (Q − Q_baseline)/Q_baseline."),
    );
    if let (Some(c), Some(b)) = (i.hydrology.interception_fraction.filter(|&c| c > 0.0), i.hydrology.interception_demand_share) {
        doc.equation(
            "ET_forest = I + f_forest(P − I, max(E0_forest − β·I, 0)),   I = c·P",
            "Rainfall interception by a closed conifer canopy added to the forest curve (annual form; the canopy's extra water use in humid climates is mostly evaporation of intercepted rain: Fahey 1994; interception of closed conifer stands about 0.22–0.29 of rain)",
        );
        doc.para(
            Text::new()
                .plain("with the annual interception loss c = ")
                .then(info_num("hydrology.interception_fraction", c))
                .plain(" of gross rainfall and the share β = ")
                .then(info_num("hydrology.interception_demand_share", b))
                .plain(
                    " of it drawn from the daytime demand that drives transpiration (the rest evaporates at night on advected energy). \
                     The defaults reproduce published paired-catchment losses at humid tussock sites within the tolerances of docs/validation.md.",
                ),
        );
    }
    doc.para(pet_provenance(d));
    if d.scenario.as_ref().is_some_and(|s| s.table.contains_key("calibration")) {
        doc.para("The scenario has [[calibration]] entries: the catchments named there use their own fitted curve parameters (listed under Inputs) instead of the values above.");
    }

    doc.heading(3, "Spread and density of the invader");
    doc.equation(
        "ΔI = min( (r·S + R)·(1 − I/V), V − I )",
        "Compounding spread from seed-bearing area with a logistic cap (age-cohort model)",
    );
    doc.para(
        Text::new()
            .plain("I is the infested area, V the vulnerable area, S the area of cohorts at or past the seed-bearing age of ")
            .then(info_num("invasion.seed_bearing_age_yr", i.invasion.seed_bearing_age_yr as f64))
            .plain(" years, r = ")
            .then(info_num("invasion.spread_rate_per_yr", i.invasion.spread_rate_per_yr))
            .plain(" per year and R = ")
            .then(info_num("invasion.seed_rain_ha_per_yr", i.invasion.seed_rain_ha_per_yr))
            .plain(" ha/yr of seed rain from outside. Cohorts are scattered until age ")
            .then(info_num("invasion.medium_age_yr", i.invasion.medium_age_yr as f64))
            .plain(", medium until age ")
            .then(info_num("invasion.dense_age_yr", i.invasion.dense_age_yr as f64))
            .plain(", and dense after that. Area is conserved: cleared land returns to the uninvaded vulnerable land."),
    );

    doc.heading(3, "Canopy closure");
    let curve = d
        .scenario
        .as_ref()
        .and_then(|s| s.table.get("canopy_closure").and_then(|c| c.get("curve")).and_then(|v| v.as_str()).map(str::to_string));
    if curve.as_deref() == Some("table") {
        doc.para(
            Text::new()
                .plain("Closure follows the scenario's table of stand ages ")
                .then(recorded(d, "canopy_closure.ages_yr", None, "canopy_closure", "ages_yr"))
                .plain(" and fractions ")
                .then(recorded(d, "canopy_closure.fractions", None, "canopy_closure", "fractions"))
                .plain(
                    ", interpolated linearly and held at the ends. Each cohort contributes area × closure(age) of ET-equivalent forest.",
                ),
        );
    } else {
        doc.equation(
            "L(a) = 1 / (1 + exp(−k·(a − a½)));   closure(a) = c_max·(L(a) − L(0)) / (1 − L(0))",
            "Logistic closure with stand age a, rescaled to start at zero (after Scott & Smith 1997)",
        );
        doc.para(
            Text::new()
                .plain("with half-closure age a½ = ")
                .then(recorded(
                    d,
                    "canopy_closure.half_closure_age_yr",
                    closure("half_closure_age_yr"),
                    "canopy_closure",
                    "half_closure_age_yr",
                ))
                .plain(" years, steepness k = ")
                .then(recorded(d, "canopy_closure.steepness_per_yr", closure("steepness_per_yr"), "canopy_closure", "steepness_per_yr"))
                .plain(" per year and mature closure c_max = ")
                .then(recorded(d, "canopy_closure.max_fraction", closure("max_fraction"), "canopy_closure", "max_fraction"))
                .plain(". The canopy fraction is f = (existing forest + Σ cohort area × closure(age)) / catchment area."),
        );
    }

    doc.heading(3, "Contaminant loads and dilution");
    doc.equation(
        "L = A·[f·e_forest + (1 − f)·e_open] + L_point;   C = 1000·L / V",
        "Export-coefficient load (kg/yr) and flow-weighted concentration (mg/L) of the year's runoff volume V (m³/yr)",
    );
    doc.para(
        Text::new()
            .plain("Export coefficients e_open and e_forest are those of the contaminant table above; point loads come from the catchment table. Below a runoff depth of ")
            .then(recorded(d, "min_runoff_mm", i.min_runoff_mm, "dilution", "min_runoff_mm"))
            .plain(" mm/yr no concentration is stated (the cell is empty and flagged low-runoff). At receiving nodes, volumes and loads of all upstream catchments are summed and the flow-weighted concentration reported."),
    );

    if d.programmes().next().is_some() {
        doc.heading(3, "Control programmes");
        doc.para(
            "In each year a programme is active it first pays follow-up on land cleared in recent years (the share paid suppresses regrowth from the seed bank), \
             then treats cohorts in the order of its rule — youngest first (scattered-first), oldest first (densest-first), or most water protected per dollar \
             (best-value) — at the cost per hectare of each cohort's density class, until the budget or fixed area is used. Treated area × efficacy is cleared \
             and stops producing seed. Water saved is the programme's yield minus the no-control yield of the same catchment and year.",
        );
        doc.equation(
            "water protected per $ = e·ΔQ·10·Σ_{k=1..L} closure(a + k) / c(a)",
            "Best-value ranking: efficacy e, yield lost per unit canopy ΔQ (mm/yr), remaining years L, cost per hectare c(a)",
        );
    }
    doc.heading(3, "Discounting and programme economics");
    doc.equation(
        "PV = Σ_t C_t / (1 + r)^t;   levelised cost = PV(cost) / PV(water saved)",
        "Present value of a yearly stream, year 0 = the start year (undiscounted)",
    );
    let mut t = Text::new().plain("with the discount rate r = ").then(info_num("discount_rate", i.discount_rate)).plain(" per year.");
    if let Some(v) = i.water_value_per_m3 {
        t = t
            .plain(" With the value of water v = ")
            .then(info_num("water_value_per_m3", v))
            .plain(" $/m³: NPV = v·PV(water) − PV(cost) and benefit-cost ratio = v·PV(water)/PV(cost).");
    }
    doc.para(t);
    if d.ensemble.is_some() || d.sensitivity.is_some() {
        doc.heading(3, "Uncertainty");
        let sampling = d
            .scenario
            .as_ref()
            .and_then(|s| s.table.get("ensemble").and_then(|e| e.get("sampling")).and_then(|v| v.as_str()).map(str::to_string))
            .unwrap_or_else(|| "latin-hypercube".into());
        let scheme = if sampling == "monte-carlo" {
            "independent random draws (plain Monte Carlo)"
        } else {
            "Latin hypercube sampling (McKay et al. 1979), one draw per stratum of each parameter"
        };
        let ens = d.scenario.as_ref().and_then(|s| s.table.get("ensemble")).and_then(|e| e.as_table());
        let get = |k: &str| ens.and_then(|e| e.get(k)).map(toml_text);
        let climate = match get("climate").as_deref() {
            Some("bootstrap") => format!(
                " Members also differ in climate: each draws a moving-block bootstrap of the climate record's years{}, shared by every catchment.",
                get("block_years").map(|b| format!(" in blocks of {b} years")).unwrap_or_default()
            ),
            Some("stochastic") => format!(
                " Members also differ in climate: annual rainfall is a log-normal AR(1) sequence around each catchment's mean{}, shared by every catchment.",
                match (get("rain_cv"), get("rain_lag1")) {
                    (Some(cv), Some(r)) => format!(" (coefficient of variation {cv}, lag-1 autocorrelation {r})"),
                    _ => String::new(),
                }
            ),
            _ => " Every member has the same climate.".to_string(),
        };
        let members = d.ensemble.as_ref().map(|e| format!(" The run has {} members", fixed(e.members, 0))).unwrap_or_default();
        let seed = get("seed").map(|s| format!(" (seed {s}, so the ensemble is reproducible)")).unwrap_or_default();
        doc.para(format!(
            "Each ensemble member draws every parameter given as a distribution (Inputs) by {scheme} and is projected like the single run.{climate}{members}{seed}{} \
             Ranges are percentiles across members of each year's value; the probability above a guideline is the share of members above it that year.",
            if members.is_empty() { "" } else { "." }
        ));
        if d.sensitivity.is_some() {
            doc.equation(
                "ρ = Spearman rank correlation between a parameter's draws and the result across members",
                "Rank correlation and standardised regression coefficients (Saltelli et al. 2008)",
            );
        }
    }
}

/// Where each catchment's potential evapotranspiration comes from.
fn pet_provenance(d: &RunData) -> Text {
    let i = &d.info;
    let mut t = Text::new().strong("Potential evapotranspiration (E0). ");
    match &i.pet_from_weather {
        Some(w) => {
            t = t.plain(format!(
                "Computed from the daily weather table {} by the {} method (FAO Irrigation and Drainage Paper 56, Allen et al. 1998; \
                 yieldshift pet), summed to annual totals for every catchment and year the table covers",
                w.weather_table, w.method
            ));
            if w.partial.is_empty() {
                t = t.plain("; every projected year of every catchment has it.");
            } else {
                t = t.plain(
                    ". The table covers only part of the projection of these catchments, whose other years use the long-term pet_mm \
                     of the catchment table (a step between the two is possible): ",
                );
                for (k, p) in w.partial.iter().enumerate() {
                    if k > 0 {
                        t = t.plain("; ");
                    }
                    t = t.code(&p.catchment).plain(format!(
                        " {} of {} years from the weather table",
                        p.weather_years,
                        p.weather_years + p.long_term_years
                    ));
                }
                t = t.plain(".");
            }
        }
        None if i.climate_table.is_some() => {
            t = t.plain(
                "From the climate table's pet_mm where it gives one for the year (as given by the user: its method is the user's), \
                 otherwise the catchment table's long-term pet_mm.",
            )
        }
        None => t = t.plain("The catchment table's long-term pet_mm, every year (as given by the user: its method is the user's)."),
    }
    t
}
