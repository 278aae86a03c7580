//! The scenario's numeric parameters as data: one row per key, giving its TOML
//! path, what happens when it is absent (a default, required, or unset), its
//! unit, its allowed range and a one-line meaning.
//!
//! The table is the one source for: the scenario reader's defaults and range
//! checks, the ensemble's typed application of drawn values ([`ParamId`],
//! [`ParamRef`]), the bounds of curve fitting (`model::fit`), the bounds to
//! which draws are truncated ([`ParamId::range`]), and `docs/scenario.md`, which
//! a test checks against it.
//!
//! Pure data over `std` only: no reading, no formatting of messages.

use std::ops::Bound;

/// An allowed range. An end is included, excluded or absent (unbounded).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Range {
    /// Lower end.
    pub min: Bound<f64>,
    /// Upper end.
    pub max: Bound<f64>,
}

impl Range {
    /// `min ≤ x ≤ max`.
    pub const fn closed(min: f64, max: f64) -> Range {
        Range { min: Bound::Included(min), max: Bound::Included(max) }
    }

    /// `x ≥ min`, no upper end.
    pub const fn at_least(min: f64) -> Range {
        Range { min: Bound::Included(min), max: Bound::Unbounded }
    }

    /// The ends as numbers: an absent end is ±∞; an excluded end is its value.
    pub const fn bounds(self) -> (f64, f64) {
        let lo = match self.min {
            Bound::Included(v) | Bound::Excluded(v) => v,
            Bound::Unbounded => f64::NEG_INFINITY,
        };
        let hi = match self.max {
            Bound::Included(v) | Bound::Excluded(v) => v,
            Bound::Unbounded => f64::INFINITY,
        };
        (lo, hi)
    }

    /// True when `x` is finite and within the range.
    pub fn contains(self, x: f64) -> bool {
        let above = match self.min {
            Bound::Included(v) => x >= v,
            Bound::Excluded(v) => x > v,
            Bound::Unbounded => true,
        };
        let below = match self.max {
            Bound::Included(v) => x <= v,
            Bound::Excluded(v) => x < v,
            Bound::Unbounded => true,
        };
        x.is_finite() && above && below
    }
}

/// What a key holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// A number.
    Number,
    /// A whole number.
    Whole,
    /// A list of numbers, each within the range.
    List,
}

/// What the reader does when a key is absent.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Absent {
    /// The key takes this value.
    Default(f64),
    /// The key must be given (for some keys, only when another key is given).
    Required,
    /// The key stays unset: the feature it configures is not used.
    Unset,
}

impl Absent {
    /// The default value, if there is one.
    pub const fn value(self) -> Option<f64> {
        match self {
            Absent::Default(v) => Some(v),
            Absent::Required | Absent::Unset => None,
        }
    }
}

/// One row of the parameter table.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ParamSpec {
    /// The row's typed id.
    pub id: ParamId,
    /// The table holding the key: `""` for the top level, `invasion`, or `contaminant`
    /// for the entries of `[[contaminant]]`.
    pub section: &'static str,
    /// The table is an array of tables (`[[section]]`): paths name the entry.
    pub repeated: bool,
    /// The key within its table.
    pub key: &'static str,
    /// Number, whole number or list.
    pub kind: Kind,
    /// What an absent key means.
    pub absent: Absent,
    /// Unit as `docs/scenario.md` writes it (`–` for a dimensionless number,
    /// `year` for a calendar year).
    pub unit: &'static str,
    /// Allowed values (each item's, for a list).
    pub range: Range,
    /// The key may be given as a distribution, drawn by ensemble members.
    pub may_vary: bool,
    /// What the key means, in one line.
    pub meaning: &'static str,
}

impl ParamSpec {
    /// The dotted key path as written in messages, without an entry number:
    /// `start_year`, `invasion.spread_rate_per_yr`, `contaminant.name`.
    pub fn path(&self) -> String {
        if self.section.is_empty() {
            self.key.to_string()
        } else {
            format!("{}.{}", self.section, self.key)
        }
    }

    /// The unit to write after a number in a message: none for a dimensionless
    /// number (`–`) or a calendar year, otherwise [`ParamSpec::unit`].
    pub fn message_unit(&self) -> &'static str {
        match self.unit {
            "–" | "year" => "",
            u => u,
        }
    }
}

/// Every numeric scenario parameter, in table order (see [`PARAMS`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ParamId {
    /// `start_year`.
    StartYear,
    /// `horizon_years`.
    HorizonYears,
    /// `climate.rain_scale`.
    RainScale,
    /// `climate.pet_scale`.
    PetScale,
    /// `climate.latitude_deg`.
    LatitudeDeg,
    /// `climate.elevation_m`.
    ElevationM,
    /// `climate.wind_height_m`.
    WindHeightM,
    /// `gis.area_tolerance`.
    AreaTolerance,
    /// `hydrology.w_forest`.
    WForest,
    /// `hydrology.w_grass`.
    WGrass,
    /// `hydrology.omega_forest`.
    OmegaForest,
    /// `hydrology.omega_grass`.
    OmegaGrass,
    /// `hydrology.forest_pet_factor`.
    ForestPetFactor,
    /// `hydrology.interception_fraction`.
    InterceptionFraction,
    /// `hydrology.interception_demand_share`.
    InterceptionDemandShare,
    /// `invasion.spread_rate_per_yr`.
    SpreadRate,
    /// `invasion.areal_growth_rate_per_yr`.
    ArealGrowth,
    /// `invasion.seed_bearing_age_yr`.
    SeedBearingAge,
    /// `invasion.seed_rain_ha_per_yr`.
    SeedRain,
    /// `invasion.medium_age_yr`.
    MediumAge,
    /// `invasion.dense_age_yr`.
    DenseAge,
    /// `invasion.initial_dense_span_yr`.
    InitialDenseSpan,
    /// `canopy_closure.half_closure_age_yr`.
    HalfClosureAge,
    /// `canopy_closure.steepness_per_yr`.
    ClosureSteepness,
    /// `canopy_closure.max_fraction`.
    ClosureMaxFraction,
    /// `canopy_closure.ages_yr`.
    ClosureAges,
    /// `canopy_closure.fractions`.
    ClosureFractions,
    /// `dilution.min_runoff_mm`.
    MinRunoff,
    /// `contaminant[n].open_export_kg_per_ha_yr`.
    OpenExport,
    /// `contaminant[n].forest_export_kg_per_ha_yr`.
    ForestExport,
    /// `contaminant[n].guideline_mg_per_l`.
    Guideline,
    /// `contaminant[n].cq_exponent`.
    CqExponent,
    /// `calibration[n].w_forest`.
    CalibrationWForest,
    /// `calibration[n].w_grass`.
    CalibrationWGrass,
    /// `calibration[n].omega_forest`.
    CalibrationOmegaForest,
    /// `calibration[n].omega_grass`.
    CalibrationOmegaGrass,
    /// `economics.discount_rate`.
    DiscountRate,
    /// `economics.water_value_per_m3`.
    WaterValue,
    /// `treatment[n].cost_per_ha`.
    TreatmentCost,
    /// `strategy[n].start_year`.
    StrategyStartYear,
    /// `strategy[n].end_year`.
    StrategyEndYear,
    /// `strategy[n].budget_per_yr`.
    BudgetPerYr,
    /// `strategy[n].area_ha_per_yr`.
    AreaPerYr,
    /// `strategy[n].efficacy`.
    Efficacy,
    /// `strategy[n].regrowth_fraction`.
    RegrowthFraction,
    /// `strategy[n].regrowth_years`.
    RegrowthYears,
    /// `strategy[n].follow_up_cost_per_ha`.
    FollowUpCost,
    /// `strategy[n].delays_yr`.
    Delays,
    /// `ensemble.members`.
    Members,
    /// `ensemble.seed`.
    Seed,
    /// `ensemble.block_years`.
    BlockYears,
    /// `ensemble.rain_cv`.
    RainCv,
    /// `ensemble.rain_lag1`.
    RainLag1,
    /// `ensemble.pet_cv`.
    PetCv,
}

impl ParamId {
    /// This parameter's row of [`PARAMS`].
    pub fn spec(self) -> &'static ParamSpec {
        &PARAMS[self as usize]
    }

    /// The allowed range: what the reader accepts, what a fit may return, and
    /// where ensemble draws are truncated.
    pub const fn range(self) -> Range {
        TABLE[self as usize].range
    }

    /// The default value, if the key has one.
    pub const fn default_value(self) -> Option<f64> {
        TABLE[self as usize].absent.value()
    }

    /// What part of the model the parameter enters (exhaustive, so a new
    /// parameter must say where it belongs).
    pub const fn role(self) -> Role {
        use ParamId::*;
        match self {
            StartYear | HorizonYears | RainScale | PetScale | LatitudeDeg | ElevationM | WindHeightM | Members | Seed | BlockYears
            | RainCv | RainLag1 | PetCv => Role::Climate,
            WForest
            | WGrass
            | OmegaForest
            | OmegaGrass
            | ForestPetFactor
            | InterceptionFraction
            | InterceptionDemandShare
            | CalibrationWForest
            | CalibrationWGrass
            | CalibrationOmegaForest
            | CalibrationOmegaGrass => Role::WaterBalance,
            SpreadRate | ArealGrowth | SeedBearingAge | SeedRain | MediumAge | DenseAge | InitialDenseSpan | HalfClosureAge
            | ClosureSteepness | ClosureMaxFraction | ClosureAges | ClosureFractions => Role::Cover,
            MinRunoff | OpenExport | ForestExport | Guideline | CqExponent => Role::WaterQuality,
            TreatmentCost | StrategyStartYear | StrategyEndYear | BudgetPerYr | AreaPerYr | Efficacy | RegrowthFraction | RegrowthYears
            | FollowUpCost | Delays => Role::Control,
            DiscountRate | WaterValue => Role::Economics,
            AreaTolerance => Role::Checks,
        }
    }

    /// True when a change of this parameter can change `result`; false when the
    /// result does not depend on it at all (e.g. a treatment cost cannot move the
    /// yield without control). Rankings of a result leave out the parameters that
    /// cannot move it.
    pub const fn can_move(self, result: Outcome) -> bool {
        let r = self.role();
        let drives_flow = matches!(r, Role::Climate | Role::WaterBalance | Role::Cover);
        match result {
            Outcome::NoControlYield => drives_flow,
            Outcome::NoControlConcentration => drives_flow || matches!(r, Role::WaterQuality) && !matches!(self, ParamId::Guideline),
            // A budget buys fewer hectares when a treatment costs more, so costs move
            // the controlled yield too.
            Outcome::ControlledYield => drives_flow || matches!(r, Role::Control),
            Outcome::Economics => drives_flow || matches!(r, Role::Control | Role::Economics),
        }
    }
}

/// Where a parameter enters the model ([`ParamId::role`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Role {
    /// The years and the climate (record, scaling, stochastic generation, PET site).
    Climate,
    /// The water-balance curves and interception.
    WaterBalance,
    /// Spread, density classes and canopy closure of the invader.
    Cover,
    /// Loads, dilution and guidelines.
    WaterQuality,
    /// Treatments and control strategies.
    Control,
    /// Discounting and the value of water.
    Economics,
    /// Input checks only (changes no result).
    Checks,
}

/// A result a parameter may move ([`ParamId::can_move`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Outcome {
    /// Water yield (and its change against the baseline) without control.
    NoControlYield,
    /// Contaminant concentrations without control.
    NoControlConcentration,
    /// Water yield under a control strategy.
    ControlledYield,
    /// Costs, water saved and present values of a programme.
    Economics,
}

/// A parameter an ensemble draws: which key, and for a key of an array of
/// tables, which entry. Made only by [`ParamRef::resolve`], so it always names a
/// key that may vary ([`ParamSpec::may_vary`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct ParamRef {
    id: ParamId,
    entry: Option<usize>,
}

impl ParamRef {
    /// Resolves a dotted key path as the scenario reader records it
    /// (`invasion.spread_rate_per_yr`, `contaminant[2].open_export_kg_per_ha_yr`,
    /// entries numbered from 1) to the parameter it sets. `None` when the path
    /// names no key of the table, names a key that cannot vary, or gives an entry
    /// number for a plain table (or none for an array of tables).
    pub fn resolve(path: &str) -> Option<ParamRef> {
        let (table, key) = path.rsplit_once('.').unwrap_or(("", path));
        let (section, entry) = match table.strip_suffix(']') {
            Some(t) => {
                let (name, n) = t.split_once('[')?;
                let n: usize = n.parse().ok()?;
                (name, Some(n.checked_sub(1)?))
            }
            None => (table, None),
        };
        PARAMS
            .iter()
            .find(|p| p.section == section && p.key == key && p.may_vary && p.repeated == entry.is_some())
            .map(|p| ParamRef { id: p.id, entry })
    }

    /// The parameter.
    pub fn id(self) -> ParamId {
        self.id
    }

    /// The entry (0-based) of the array of tables, for keys of `[[contaminant]]`,
    /// `[[calibration]]`, `[[treatment]]` and `[[strategy]]`.
    pub fn entry(self) -> Option<usize> {
        self.entry
    }

    /// The table the key is in, as the reader names it: `invasion`, `calibration[2]`.
    pub fn table_path(self) -> String {
        let s = self.id.spec();
        match self.entry {
            Some(i) => format!("{}[{}]", s.section, i + 1),
            None => s.section.to_string(),
        }
    }

    /// The dotted key path, the inverse of [`ParamRef::resolve`].
    pub fn path(self) -> String {
        let table = self.table_path();
        if table.is_empty() {
            self.id.spec().key.to_string()
        } else {
            format!("{table}.{}", self.id.spec().key)
        }
    }
}

/// Every row, in [`ParamId`] order.
pub static PARAMS: [ParamSpec; 54] = TABLE;

/// Zhang's `w`, for forest and for grass (in `[hydrology]` and `[[calibration]]`).
const W_RANGE: Range = Range::closed(0.01, 20.0);
/// Fu's `ω` (> 1 for a curve between the energy and water limits).
const OMEGA_RANGE: Range = Range::closed(1.01, 20.0);

#[allow(clippy::too_many_arguments)]
const fn row(
    id: ParamId,
    section: &'static str,
    repeated: bool,
    key: &'static str,
    kind: Kind,
    absent: Absent,
    unit: &'static str,
    range: Range,
    may_vary: bool,
    meaning: &'static str,
) -> ParamSpec {
    ParamSpec { id, section, repeated, key, kind, absent, unit, range, may_vary, meaning }
}

use Absent::{Default as D, Required as REQ, Unset as NONE};
use Kind::{List, Number as NUM, Whole};
use ParamId as P;

const TOP: &str = "";
const VARY: bool = true;
const FIXED: bool = false;

// One row per line, as a table reads.
#[rustfmt::skip]
const TABLE: [ParamSpec; 54] = [
    row(P::StartYear, TOP, false, "start_year", Whole, REQ, "year", Range::closed(1800.0, 2500.0), FIXED, "year 0: the current cover"),
    row(P::HorizonYears, TOP, false, "horizon_years", Whole, REQ, "years", Range::closed(1.0, 300.0), FIXED, "years projected after the start year"),
    row(P::RainScale, "climate", false, "rain_scale", NUM, D(1.0), "–", Range::closed(0.1, 3.0), VARY, "multiplier on every year's rainfall"),
    row(P::PetScale, "climate", false, "pet_scale", NUM, D(1.0), "–", Range::closed(0.1, 3.0), VARY, "multiplier on every year's PET"),
    row(P::LatitudeDeg, "climate", false, "latitude_deg", NUM, REQ, "degrees (south negative)", Range::closed(-90.0, 90.0), FIXED, "site latitude, needed with weather"),
    row(P::ElevationM, "climate", false, "elevation_m", NUM, REQ, "m", Range::closed(-500.0, 9000.0), FIXED, "site elevation, needed with weather"),
    row(P::WindHeightM, "climate", false, "wind_height_m", NUM, D(2.0), "m", Range::closed(0.5, 100.0), FIXED, "wind measurement height"),
    row(P::AreaTolerance, "gis", false, "area_tolerance", NUM, D(0.05), "fraction", Range::closed(0.0, 1.0), FIXED, "relative difference between boundary and table areas above which a warning is given"),
    row(P::WForest, "hydrology", false, "w_forest", NUM, D(2.0), "–", W_RANGE, VARY, "Zhang's plant-available-water coefficient for forest"),
    row(P::WGrass, "hydrology", false, "w_grass", NUM, D(0.5), "–", W_RANGE, VARY, "Zhang's w for grass and tussock"),
    row(P::OmegaForest, "hydrology", false, "omega_forest", NUM, D(2.97), "–", OMEGA_RANGE, VARY, "Fu's omega for forest"),
    row(P::OmegaGrass, "hydrology", false, "omega_grass", NUM, D(2.16), "–", OMEGA_RANGE, VARY, "Fu's omega for grass"),
    row(P::ForestPetFactor, "hydrology", false, "forest_pet_factor", NUM, D(1.0), "–", Range::closed(0.5, 2.0), VARY, "forest PET as a multiple of grass PET"),
    row(P::InterceptionFraction, "hydrology", false, "interception_fraction", NUM, D(0.25), "fraction of rain", Range::closed(0.0, 0.6), VARY, "annual rainfall interception loss of a closed conifer canopy"),
    row(P::InterceptionDemandShare, "hydrology", false, "interception_demand_share", NUM, D(0.6), "fraction", Range::closed(0.0, 1.0), VARY, "share of interception loss taken from the demand that drives transpiration"),
    row(P::SpreadRate, "invasion", false, "spread_rate_per_yr", NUM, D(0.06), "1/yr", Range::closed(0.0, 1.0), VARY, "compounding spread rate r from seed-bearing area"),
    row(P::ArealGrowth, "invasion", false, "areal_growth_rate_per_yr", NUM, NONE, "1/yr", Range { min: Bound::Excluded(0.0), max: Bound::Included(0.5) }, FIXED, "observed areal growth of an unchecked infestation; replaces spread_rate_per_yr by the r that gives it"),
    row(P::SeedBearingAge, "invasion", false, "seed_bearing_age_yr", Whole, D(8.0), "years", Range::closed(0.0, 100.0), VARY, "age from which cohorts produce seed (draws are rounded)"),
    row(P::SeedRain, "invasion", false, "seed_rain_ha_per_yr", NUM, D(0.0), "ha/yr", Range::closed(0.0, 1e7), VARY, "new infestation from seed blown in from outside"),
    row(P::MediumAge, "invasion", false, "medium_age_yr", Whole, D(10.0), "years", Range::closed(1.0, 100.0), FIXED, "age at which scattered becomes medium density"),
    row(P::DenseAge, "invasion", false, "dense_age_yr", Whole, D(20.0), "years", Range::closed(2.0, 200.0), FIXED, "age at which medium becomes dense"),
    row(P::InitialDenseSpan, "invasion", false, "initial_dense_span_yr", Whole, D(10.0), "years", Range::closed(1.0, 100.0), FIXED, "years of age over which the starting dense area is spread"),
    row(P::HalfClosureAge, "canopy_closure", false, "half_closure_age_yr", NUM, D(12.0), "years", Range::closed(0.5, 200.0), VARY, "logistic closure: age of about half closure"),
    row(P::ClosureSteepness, "canopy_closure", false, "steepness_per_yr", NUM, D(0.35), "1/yr", Range::closed(0.01, 10.0), VARY, "logistic closure: steepness"),
    row(P::ClosureMaxFraction, "canopy_closure", false, "max_fraction", NUM, D(1.0), "fraction", Range::closed(0.0, 1.0), VARY, "logistic closure: forest fraction of a mature stand"),
    row(P::ClosureAges, "canopy_closure", false, "ages_yr", List, NONE, "years", Range::closed(0.0, 500.0), FIXED, "closure table: stand ages"),
    row(P::ClosureFractions, "canopy_closure", false, "fractions", List, NONE, "fraction", Range::closed(0.0, 1.0), FIXED, "closure table: closure at those ages"),
    row(P::MinRunoff, "dilution", false, "min_runoff_mm", NUM, D(1.0), "mm/yr", Range { min: Bound::Excluded(0.0), max: Bound::Included(1000.0) }, FIXED, "runoff depth below which no concentration is stated"),
    row(P::OpenExport, "contaminant", true, "open_export_kg_per_ha_yr", NUM, REQ, "kg/ha/yr", Range::closed(0.0, 1e4), VARY, "export coefficient of open land"),
    row(P::ForestExport, "contaminant", true, "forest_export_kg_per_ha_yr", NUM, REQ, "kg/ha/yr", Range::closed(0.0, 1e4), VARY, "export coefficient under conifer canopy"),
    row(P::Guideline, "contaminant", true, "guideline_mg_per_l", NUM, NONE, "mg/L", Range::closed(0.0, 1e6), FIXED, "guideline concentration for first-exceedance years"),
    row(P::CqExponent, "contaminant", true, "cq_exponent", NUM, D(-1.0), "–", Range::closed(-1.0, 2.0), FIXED, "concentration-discharge exponent b of the diffuse load, C ∝ Q^b: -1 pure dilution of a fixed load (worst case), 0 chemostatic"),
    row(P::CalibrationWForest, "calibration", true, "w_forest", NUM, NONE, "–", W_RANGE, VARY, "fitted Zhang's w for forest of one catchment"),
    row(P::CalibrationWGrass, "calibration", true, "w_grass", NUM, NONE, "–", W_RANGE, VARY, "fitted Zhang's w for grass of one catchment"),
    row(P::CalibrationOmegaForest, "calibration", true, "omega_forest", NUM, NONE, "–", OMEGA_RANGE, VARY, "fitted Fu's omega for forest of one catchment"),
    row(P::CalibrationOmegaGrass, "calibration", true, "omega_grass", NUM, NONE, "–", OMEGA_RANGE, VARY, "fitted Fu's omega for grass of one catchment"),
    row(P::DiscountRate, "economics", false, "discount_rate", NUM, D(0.05), "per year", Range::closed(0.0, 0.5), FIXED, "discount rate of present values"),
    row(P::WaterValue, "economics", false, "water_value_per_m3", NUM, NONE, "$/m³", Range::closed(0.0, 1000.0), FIXED, "value of water, for net present value"),
    row(P::TreatmentCost, "treatment", true, "cost_per_ha", NUM, REQ, "$/ha", Range::closed(0.0, 1e7), VARY, "cost per hectare treated"),
    row(P::StrategyStartYear, "strategy", true, "start_year", Whole, REQ, "year", Range::closed(1800.0, 2800.0), FIXED, "first year of treatment"),
    row(P::StrategyEndYear, "strategy", true, "end_year", Whole, NONE, "year", Range::closed(1800.0, 2800.0), FIXED, "last year of treatment"),
    row(P::BudgetPerYr, "strategy", true, "budget_per_yr", NUM, NONE, "$/yr", Range::closed(0.0, 1e12), FIXED, "constant annual budget"),
    row(P::AreaPerYr, "strategy", true, "area_ha_per_yr", NUM, NONE, "ha/yr", Range::closed(0.0, 1e9), FIXED, "area treated each year regardless of cost"),
    row(P::Efficacy, "strategy", true, "efficacy", NUM, D(0.95), "fraction", Range::closed(0.0, 1.0), VARY, "fraction of treated area actually cleared"),
    row(P::RegrowthFraction, "strategy", true, "regrowth_fraction", NUM, D(0.0), "fraction", Range::closed(0.0, 1.0), VARY, "fraction of cleared area that re-establishes unless followed up"),
    row(P::RegrowthYears, "strategy", true, "regrowth_years", Whole, D(5.0), "years", Range::closed(1.0, 50.0), FIXED, "years over which regrowth appears"),
    row(P::FollowUpCost, "strategy", true, "follow_up_cost_per_ha", NUM, D(0.0), "$/ha/yr", Range::closed(0.0, 1e6), VARY, "surveillance cost per hectare of recently cleared land"),
    row(P::Delays, "strategy", true, "delays_yr", List, NONE, "years", Range::closed(0.0, 300.0), FIXED, "start delays for the cost-of-delay table"),
    row(P::Members, "ensemble", false, "members", Whole, D(100.0), "members", Range::closed(1.0, 100_000.0), FIXED, "ensemble members"),
    row(P::Seed, "ensemble", false, "seed", Whole, D(1.0), "–", Range::at_least(0.0), FIXED, "random seed"),
    row(P::BlockYears, "ensemble", false, "block_years", Whole, D(5.0), "years", Range::closed(1.0, 100.0), FIXED, "bootstrap block length"),
    row(P::RainCv, "ensemble", false, "rain_cv", NUM, D(0.15), "–", Range::closed(0.0, 2.0), FIXED, "stochastic climate: coefficient of variation of annual rainfall"),
    row(P::RainLag1, "ensemble", false, "rain_lag1", NUM, D(0.2), "–", Range::closed(-0.95, 0.95), FIXED, "stochastic climate: lag-1 autocorrelation of log rainfall"),
    row(P::PetCv, "ensemble", false, "pet_cv", NUM, D(0.0), "–", Range::closed(0.0, 1.0), FIXED, "stochastic climate: coefficient of variation of annual PET"),
];

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn control_and_economics_cannot_move_the_yield_without_control() {
        use super::Outcome as R;
        for p in &PARAMS {
            let id = p.id;
            let flow = matches!(p.section, "hydrology" | "invasion" | "canopy_closure" | "calibration")
                || matches!(id, ParamId::RainScale | ParamId::PetScale);
            if flow {
                assert!(id.can_move(R::NoControlYield), "{}", p.path());
            }
            if matches!(p.section, "strategy" | "treatment" | "economics" | "contaminant" | "dilution" | "gis") {
                assert!(!id.can_move(R::NoControlYield), "{} cannot move the yield without control", p.path());
            }
        }
        assert!(ParamId::Efficacy.can_move(R::ControlledYield));
        assert!(ParamId::TreatmentCost.can_move(R::ControlledYield), "a budget buys less when costs rise");
        assert!(!ParamId::TreatmentCost.can_move(R::NoControlConcentration));
        assert!(ParamId::OpenExport.can_move(R::NoControlConcentration));
        assert!(!ParamId::Guideline.can_move(R::NoControlConcentration));
        assert!(!ParamId::WaterValue.can_move(R::ControlledYield));
        assert!(ParamId::WaterValue.can_move(R::Economics));
        assert!(!ParamId::AreaTolerance.can_move(R::Economics));
    }

    #[test]
    fn rows_are_in_id_order_and_keys_are_unique() {
        for (i, p) in PARAMS.iter().enumerate() {
            assert_eq!(p.id as usize, i, "{} is row {i}", p.path());
            assert!(PARAMS[..i].iter().all(|q| q.path() != p.path()), "{} twice", p.path());
            let (lo, hi) = p.range.bounds();
            assert!(lo < hi, "{}", p.path());
            if let Some(d) = p.absent.value() {
                assert!(p.range.contains(d), "{}: default {d} outside its range", p.path());
                assert!(p.kind != Kind::Whole || d.fract() == 0.0, "{}", p.path());
            }
            assert!(!p.meaning.is_empty());
        }
    }

    #[test]
    fn paths_resolve_to_typed_ids_and_back() {
        let r = ParamRef::resolve("invasion.spread_rate_per_yr").unwrap();
        assert_eq!((r.id(), r.entry()), (ParamId::SpreadRate, None));
        let r = ParamRef::resolve("contaminant[2].open_export_kg_per_ha_yr").unwrap();
        assert_eq!((r.id(), r.entry()), (ParamId::OpenExport, Some(1)));
        assert_eq!(r.table_path(), "contaminant[2]");
        for bad in [
            "invasion.spread_rate",
            "contaminant.open_export_kg_per_ha_yr",
            "contaminant[0].open_export_kg_per_ha_yr",
            "contaminant[x].open_export_kg_per_ha_yr",
            "invasion[1].spread_rate_per_yr",
            "start_year",
            "invasion.medium_age_yr",
            "",
        ] {
            assert_eq!(ParamRef::resolve(bad), None, "{bad}");
        }
        for p in PARAMS.iter().filter(|p| p.may_vary) {
            let path = if p.repeated { format!("{}[3].{}", p.section, p.key) } else { p.path() };
            let r = ParamRef::resolve(&path).unwrap_or_else(|| panic!("{path}"));
            assert_eq!(r.id(), p.id);
            assert_eq!(r.path(), path);
        }
    }

    #[test]
    fn ranges_include_or_exclude_their_ends() {
        let r = Range { min: Bound::Excluded(0.0), max: Bound::Included(1.0) };
        assert!(!r.contains(0.0) && r.contains(1e-12) && r.contains(1.0) && !r.contains(1.0 + 1e-12));
        assert!(!Range::closed(0.0, 1.0).contains(f64::NAN));
        assert!(Range::at_least(0.0).contains(1e300) && !Range::at_least(0.0).contains(f64::INFINITY));
        assert_eq!(Range::at_least(2.0).bounds(), (2.0, f64::INFINITY));
        assert_eq!(ParamId::WGrass.range(), ParamId::CalibrationWGrass.range());
        assert_eq!(ParamId::SpreadRate.default_value(), Some(0.06));
    }

    #[test]
    fn the_model_default_curves_are_the_table_defaults() {
        let (Some(w_forest), Some(w_grass)) = (ParamId::WForest.default_value(), ParamId::WGrass.default_value()) else { panic!() };
        assert_eq!(crate::model::budyko::CoverCurves::ZHANG_DEFAULT, crate::model::budyko::CoverCurves::Zhang { w_forest, w_grass });
    }
}
