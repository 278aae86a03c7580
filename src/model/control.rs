//! Control programmes: what is treated each year, at what cost, and what comes back.
//!
//! # Formula
//! In each year a programme is active, for each budget pool (the whole basin, or
//! each catchment):
//! 1. **Follow-up** of land cleared in the last `N` years costs `c_f · A_tracked`
//!    ($/yr). It is paid first; the fraction paid `φ = min(B, cost)/cost`
//!    suppresses that year's regrowth.
//! 2. **Treatment**: candidate cohorts are ranked by the priority rule and treated
//!    in order, each at the cost per hectare of its density class (the cheapest
//!    method unless one is fixed), until the budget `B` (or the fixed area) is used.
//!    Treating `T` ha clears `e·T` ha (efficacy `e`); the rest survives.
//! 3. **Regrowth**: land cleared in year `y` re-establishes at `ρ·A_cleared/N` ha/yr
//!    in each of the `N` following years, times `(1 − φ)`. It joins the new age-0
//!    cohort with spread, capped at the free vulnerable area `F` with regrowth first
//!    (`X' = min(X, F)`); the reported regrowth is `X'`, what established, and the
//!    reported new infestation is spread and seed rain only, so each hectare is
//!    counted once (see [`super::basin`]).
//!
//! Priority rules: *scattered-first* ranks cohorts youngest first (stop stands
//! before they thicken and seed); *densest-first* oldest first; *best-value* by
//! water protected per dollar, `e·ΔQ·10·Σ_{k=1..L} closure(a + k) / c(a)`
//! (m³ per $), recomputed every year over the remaining `L` years, spending a
//! shared budget greedily across catchments.
//!
//! # Symbols
//! `B` budget in the year ($; unspent budget is reported, and carried over only
//! when the programme says so); `c(a)` treatment cost, $/ha, of the density class of
//! age `a`; `e` kill efficacy (0–1); `ρ` regrowth fraction (0–1) over `N` years;
//! `c_f` follow-up cost, $/ha/yr of cleared land; `ΔQ` yield lost per unit canopy
//! fraction at the catchment's mean climate, mm/yr.
//!
//! # Assumptions
//! Best-value ranks by water protected from canopy closure of the treated stand
//! only; the avoided spread from its seed is not valued (it favours young stands
//! anyway, through their cheapness and future closure). Costs are in constant dollars.
//!
//! # References
//! Common practice, no published source: cost per hectare rising steeply with
//! density, and cheap early control, as assumed in invasive-conifer management.

use super::cover::DensityClass;

/// How a programme ranks cohorts for treatment.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PriorityRule {
    /// Youngest cohorts first (containment).
    ScatteredFirst,
    /// Oldest cohorts first.
    DensestFirst,
    /// Highest water protected per dollar first.
    BestValue,
}

impl PriorityRule {
    /// Name as written in scenarios and outputs.
    pub fn name(self) -> &'static str {
        match self {
            PriorityRule::ScatteredFirst => "scattered-first",
            PriorityRule::DensestFirst => "densest-first",
            PriorityRule::BestValue => "best-value",
        }
    }
}

/// How much control effort a programme buys each year.
#[derive(Debug, Clone, PartialEq)]
pub enum Effort {
    /// No budget limit.
    Unlimited,
    /// One budget shared by the basin, $ per projected year (index 0 = start year).
    BasinBudget(Vec<f64>),
    /// A budget per catchment, `[catchment][projected year]`, $.
    CatchmentBudget(Vec<Vec<f64>>),
    /// Treat a fixed area each year regardless of cost, ha per projected year, shared by the basin.
    FixedArea(Vec<f64>),
}

/// A treatment method for one density class.
#[derive(Debug, Clone, PartialEq)]
pub struct TreatmentMethod {
    /// Method name (e.g. `ground`, `aerial`).
    pub name: String,
    /// Density class it treats.
    pub class: DensityClass,
    /// Cost per hectare treated, $/ha.
    pub cost_per_ha: f64,
}

/// A named control programme.
#[derive(Debug, Clone, PartialEq)]
pub struct Strategy {
    /// Name used in the `strategy` column.
    pub name: String,
    /// First year of treatment.
    pub start_year: i32,
    /// Last year of treatment (inclusive), if any.
    pub end_year: Option<i32>,
    /// Ranking of cohorts.
    pub rule: PriorityRule,
    /// Budget or fixed area.
    pub effort: Effort,
    /// Carry unspent budget into the next year.
    pub carry_over: bool,
    /// Cost per ha per density class (scattered, medium, dense), $/ha: the method used.
    pub cost_per_ha: [f64; 3],
    /// Method name used per class (scattered, medium, dense).
    pub method_names: [String; 3],
    /// Fraction of treated area actually cleared, 0–1.
    pub efficacy: f64,
    /// Fraction of cleared area that re-establishes from the seed bank, 0–1.
    pub regrowth_fraction: f64,
    /// Years over which regrowth appears, ≥ 1.
    pub regrowth_years: u32,
    /// Follow-up (surveillance) cost per ha of land cleared within the regrowth window, $/ha/yr.
    pub follow_up_cost_per_ha: f64,
    /// Start delays to report in the cost-of-delay table, years.
    pub delays_yr: Vec<u32>,
}

impl Strategy {
    /// Chooses the method per class: the fixed one where given, else the cheapest.
    ///
    /// Returns `None` for a class with no method.
    pub fn choose_methods(methods: &[TreatmentMethod], fixed: [Option<&str>; 3]) -> [Option<(String, f64)>; 3] {
        let mut out: [Option<(String, f64)>; 3] = [None, None, None];
        for (k, class) in DensityClass::ALL.iter().enumerate() {
            let candidates = methods.iter().filter(|m| m.class == *class);
            let chosen = match fixed[k] {
                Some(name) => candidates.into_iter().find(|m| m.name == name),
                None => candidates.min_by(|a, b| a.cost_per_ha.total_cmp(&b.cost_per_ha)),
            };
            out[k] = chosen.map(|m| (m.name.clone(), m.cost_per_ha));
        }
        out
    }

    /// True when the programme treats in `year`.
    pub fn active(&self, year: i32) -> bool {
        year >= self.start_year && self.end_year.is_none_or(|e| year <= e)
    }

    /// Cost per ha of a class, $/ha.
    #[inline]
    pub fn class_cost(&self, class: DensityClass) -> f64 {
        self.cost_per_ha[class as usize]
    }

    /// The same programme started `delay_yr` later (budget profile shifted with it).
    pub fn delayed(&self, delay_yr: u32) -> Strategy {
        let d = delay_yr as usize;
        let shift = |v: &Vec<f64>| {
            let mut s = vec![0.0; d.min(v.len())];
            s.extend_from_slice(&v[..v.len() - d.min(v.len())]);
            s
        };
        let effort = match &self.effort {
            Effort::Unlimited => Effort::Unlimited,
            Effort::BasinBudget(v) => Effort::BasinBudget(shift(v)),
            Effort::FixedArea(v) => Effort::FixedArea(shift(v)),
            Effort::CatchmentBudget(vs) => Effort::CatchmentBudget(vs.iter().map(shift).collect()),
        };
        Strategy {
            start_year: self.start_year + delay_yr as i32,
            end_year: self.end_year.map(|e| e + delay_yr as i32),
            effort,
            ..self.clone()
        }
    }
}

/// Control outcome of one catchment in one year.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct ControlYear {
    /// Treatment cost, $.
    pub treatment_cost: f64,
    /// Follow-up cost, $.
    pub follow_up_cost: f64,
    /// Area treated, ha.
    pub treated_ha: f64,
    /// Area cleared (treated × efficacy), ha.
    pub cleared_ha: f64,
    /// Area re-established from the seed bank at the end of this year, as established
    /// (after the cap at the free vulnerable area), ha; it is in next year's cover.
    pub regrowth_ha: f64,
}

impl ControlYear {
    /// Total control cost, $.
    pub fn cost(&self) -> f64 {
        self.treatment_cost + self.follow_up_cost
    }
}

/// Budget account of one pool in one year.
///
/// Dollars and hectares are kept apart: a budget programme has a dollar limit and
/// no area limit; a fixed-area programme (`area_ha_per_yr`) has an area limit and
/// no dollar limit (it pays whatever its area costs), so its `available` is infinite.
#[derive(Debug, Clone, PartialEq)]
pub struct BudgetYear {
    /// Calendar year.
    pub year: i32,
    /// `None` for the basin pool, else the catchment index.
    pub pool: Option<usize>,
    /// Budget available (including carried-over), $; infinite when unlimited or fixed-area.
    pub available: f64,
    /// Spent, $.
    pub spent: f64,
    /// Carried into the next year, $.
    pub carried: f64,
    /// Area to treat, ha, for a fixed-area programme; `None` for a budget programme.
    pub available_ha: Option<f64>,
    /// Area treated from the pool, ha.
    pub treated_ha: f64,
}

impl BudgetYear {
    /// Unspent budget, $ (0 when unlimited or fixed-area).
    pub fn unspent(&self) -> f64 {
        if self.available.is_finite() {
            (self.available - self.spent).max(0.0)
        } else {
            0.0
        }
    }

    /// Area left untreated of a fixed-area pool, ha: `max(available_ha − treated_ha, 0)`
    /// (`None` for a budget programme).
    pub fn unspent_ha(&self) -> Option<f64> {
        self.available_ha.map(|a| (a - self.treated_ha).max(0.0))
    }
}
