//! Basin projection: every catchment advanced year by year together, so that a
//! control programme can spend a shared budget across catchments.
//!
//! Each year: (1) every catchment's cover gives its year results
//! ([`super::projection::year_result`]); (2) an active programme pays follow-up and
//! treats cohorts ([`super::control`]); (3) regrowth, ageing and spread
//! ([`super::cover`]). With no programme (or a zero budget) the results are exactly
//! those of [`super::projection::project_catchment`].
//!
//! # Formula
//! This file sequences equations defined and documented elsewhere: canopy fraction,
//! evapotranspiration, yield, loads and concentrations in [`super::projection`];
//! follow-up, treatment, regrowth and the priority rules in [`super::control`];
//! ageing and spread in [`super::cover`]. What it computes itself:
//! * Budget of pool `k` in year `t`: `B_avail = B_k,t + carry_k,t−1` ($), and
//!   `carry_k,t = max(0, B_avail − spent_k,t)` when the programme carries over
//!   (else 0). A fixed-area pool holds `A_fix,t` ha of treatment, has no dollar
//!   limit and carries nothing; its account reports `A_fix,t` and the area treated
//!   (ha) apart from the dollars spent.
//! * Yield lost per unit canopy fraction (for best-value), at the catchment's
//!   long-term mean climate: `ΔQ = max(0, Q(f = 0) − Q(f = 1))`, mm/yr (ET is linear
//!   in `f`, [`super::budyko::mixed_et_mm`]).
//! * Best-value key of a cohort of age `a` with `L = n − 1 − t` projected years left:
//!   `e·ΔQ·10·Σ_{k=1..L} closure(a + k) / c(a)` (m³ per $; the largest possible key
//!   when `c(a) = 0`), the closure sum taken from prefix sums of the whole-year
//!   closure table ([`super::closure::ClosureCurve::table_by_whole_year`]).
//! * Area treated from a cohort of `A_a` ha with `left` still to spend:
//!   `T = min(A_a, left/c(a))` ha (`min(A_a, left)` for a fixed area); cleared `e·T` ha.
//! * Regrowth of catchment `i` in year `t`: `X = Σ ρ·A_cleared/N·(1 − φ_i,t)` ha over
//!   the clearings of the last `N` years, added to the new age-0 cohort with spread
//!   and capped with it at the free vulnerable area `F`, regrowth first:
//!   `X' = min(X, F)`, spread `ΔI' = min(ΔI, F − X')` ([`super::cover::Cohorts::step_with`]).
//!   `regrowth_ha` of year `t` is `X'` (what established); `new_infestation_ha` of
//!   year `t + 1` is `ΔI'` (spread and seed rain only), so nothing is counted twice:
//!   `I_{t+1} = I_t − cleared_t + X'_t + ΔI'_{t+1}` (`I` the infested area at the
//!   start of the year, `ΔI'_{t+1}` the row of year `t + 1`).
//!
//! # Symbols
//! * `t` — projected year, 0 = start year; `n` — years projected.
//! * `k` — budget pool: the basin, or one catchment; `B_k,t` — its budget, $, ≥ 0;
//!   `A_fix,t` — fixed treatment area, ha, ≥ 0.
//! * `c(a)` — treatment cost of the density class of age `a`, $/ha, ≥ 0; `e` —
//!   efficacy, 0–1; `ρ` — regrowth fraction, 0–1; `N` — regrowth years, ≥ 1;
//!   `φ_i,t` — fraction of catchment `i`'s follow-up paid, 0–1.
//! * `Q(f)` — yield at canopy fraction `f` (0–1), mm/yr; `closure(a)` — 0–1.
//!
//! # Assumptions
//! * Catchments interact only through a shared budget: spread never crosses a
//!   catchment boundary (seed rain from outside is each catchment's own input).
//! * A year's results use the cover at the start of the year; treatment, regrowth
//!   and spread change the following year's cover.
//! * The budget is spent greedily in priority order; a cohort that cannot be paid in
//!   full is treated in part; ties are broken by catchment id (text order), then
//!   age (youngest first), so the result does not depend on the order of the
//!   catchment table.
//! * A fixed-area programme buys hectares, not dollars: its follow-up is always paid
//!   in full (so it always suppresses regrowth) and does not use up the area.
//!
//! # References
//! Common practice, no published source: greedy allocation of a budget in priority
//! order. The sources of the control equations are given in [`super::control`].

use super::catchment::{Catchment, ClimateYear, ModelParams};
use super::control::{BudgetYear, ControlYear, Effort, PriorityRule, Strategy};
use super::cover::Cohorts;
use super::dilution::M3_PER_MM_HA;
use super::projection::{canopy_fraction, et_and_yield_mm, year_result, YearResult};

/// Results of a basin run.
#[derive(Debug, Clone)]
pub struct BasinRun {
    /// `years[catchment][t]`.
    pub years: Vec<Vec<YearResult>>,
    /// `control[catchment][t]` (all zero without a programme).
    pub control: Vec<Vec<ControlYear>>,
    /// Budget accounts per pool and year (empty without a programme).
    pub budget: Vec<BudgetYear>,
}

struct Tracked {
    cleared_ha: f64,
    years_left: u32,
}

struct State {
    cohorts: Cohorts,
    f0: f64,
    f_uninvaded: f64,
    new_ha: f64,
    tracked: Vec<Tracked>,
    /// Yield lost per unit canopy fraction at mean climate, mm/yr (for best-value).
    dq_mm: f64,
}

struct Slot {
    catchment: usize,
    age: usize,
    area_ha: f64,
    cost_per_ha: f64,
    key: f64,
}

/// Projects every catchment, under `strategy` if given.
///
/// `climates[i][t]` is catchment `i`'s climate in year `start_year + t`; all series
/// must have the same length. `params` holds one set shared by all catchments, or
/// one per catchment (ensemble members with per-catchment draws).
// Over 100 lines on purpose: one year of the basin in order (follow-up, treatment by the rule's priority, spread, water), where the budget couples every catchment; the steps share the per-catchment state.
pub fn project_basin(
    catchments: &[Catchment],
    climates: &[Vec<ClimateYear>],
    params: &[ModelParams],
    start_year: i32,
    strategy: Option<&Strategy>,
) -> BasinRun {
    let n = catchments.len();
    assert!(params.len() == 1 || params.len() == n, "one parameter set, or one per catchment");
    let par = |i: usize| if params.len() == 1 { &params[0] } else { &params[i] };
    let n_years = climates.first().map_or(0, Vec::len);
    let mut states: Vec<State> = catchments
        .iter()
        .enumerate()
        .map(|(i, c)| {
            let p = par(i);
            let cohorts = c.starting_cohorts(&p.invasion);
            let (_, q_open) = et_and_yield_mm(c, p, c.mean_climate(), 0.0);
            let (_, q_forest) = et_and_yield_mm(c, p, c.mean_climate(), 1.0);
            State {
                cohorts,
                f0: 0.0,
                f_uninvaded: c.uninvaded_canopy_fraction(),
                new_ha: 0.0,
                tracked: Vec::new(),
                dq_mm: (q_open - q_forest).max(0.0),
            }
        })
        .collect();
    let max_age = states.iter().map(|s| s.cohorts.oldest_age_yr()).max().unwrap_or(0) + 2 * n_years + 2;
    // Closure tables and their prefix sums: one shared, or one per catchment.
    let tables: Vec<(Vec<f64>, Vec<f64>)> = params
        .iter()
        .map(|p| {
            let closure = p.invasion.closure.table_by_whole_year(max_age);
            let mut prefix = vec![0.0; closure.len() + 1];
            for (i, c) in closure.iter().enumerate() {
                prefix[i + 1] = prefix[i] + c;
            }
            (closure, prefix)
        })
        .collect();
    let table = |i: usize| if tables.len() == 1 { &tables[0] } else { &tables[i] };
    for (i, (s, c)) in states.iter_mut().zip(catchments).enumerate() {
        s.f0 = canopy_fraction(c, &s.cohorts, &table(i).0);
    }

    let mut years: Vec<Vec<YearResult>> = (0..n).map(|_| Vec::with_capacity(n_years)).collect();
    let mut control: Vec<Vec<ControlYear>> = (0..n).map(|_| vec![ControlYear::default(); n_years]).collect();
    let mut budget = Vec::new();
    let mut carry: Vec<f64> = vec![0.0; n.max(1)];

    for t in 0..n_years {
        let year = start_year + t as i32;
        for (i, c) in catchments.iter().enumerate() {
            let s = &states[i];
            let p = par(i);
            let f = canopy_fraction(c, &s.cohorts, &table(i).0);
            years[i].push(year_result(c, p, year, climates[i][t], f, s.f0, s.f_uninvaded, s.cohorts.class_areas(&p.invasion), s.new_ha));
        }
        let mut suppressed = vec![0.0; n];
        if let Some(st) = strategy.filter(|st| st.active(year)) {
            let remaining_years = n_years - 1 - t;
            let pools: Vec<(Option<usize>, Vec<usize>, f64, bool)> = match &st.effort {
                Effort::Unlimited => vec![(None, (0..n).collect(), f64::INFINITY, false)],
                Effort::BasinBudget(b) => vec![(None, (0..n).collect(), b.get(t).copied().unwrap_or(0.0) + carry[0], false)],
                Effort::FixedArea(a) => vec![(None, (0..n).collect(), a.get(t).copied().unwrap_or(0.0), true)],
                Effort::CatchmentBudget(bs) => {
                    (0..n).map(|i| (Some(i), vec![i], bs[i].get(t).copied().unwrap_or(0.0) + carry[i], false)).collect()
                }
            };
            for (pool, members, available, by_area) in pools {
                let mut left = available;
                // 1. Follow-up of recently cleared land, paid first.
                let fu_cost: Vec<f64> = members
                    .iter()
                    .map(|&i| st.follow_up_cost_per_ha * states[i].tracked.iter().map(|r| r.cleared_ha).sum::<f64>())
                    .collect();
                let fu_total: f64 = fu_cost.iter().sum();
                let paid_frac = if fu_total <= 0.0 || by_area { 1.0 } else { (left / fu_total).min(1.0) };
                for (k, &i) in members.iter().enumerate() {
                    control[i][t].follow_up_cost = fu_cost[k] * paid_frac;
                    suppressed[i] = paid_frac;
                }
                if !by_area {
                    left -= fu_total * paid_frac;
                }
                // 2. Treatment in priority order.
                let mut slots: Vec<Slot> = Vec::new();
                for &i in &members {
                    let (closure, closure_prefix) = table(i);
                    for (age, area) in states[i].cohorts.iter_by_age() {
                        if area <= 0.0 {
                            continue;
                        }
                        let cost = st.class_cost(par(i).invasion.class_of(age));
                        let key = match st.rule {
                            PriorityRule::ScatteredFirst => -(age as f64),
                            PriorityRule::DensestFirst => age as f64,
                            PriorityRule::BestValue => {
                                let hi = (age + 1 + remaining_years).min(closure.len());
                                let lo = (age + 1).min(hi);
                                let value_m3_per_ha =
                                    st.efficacy * states[i].dq_mm * M3_PER_MM_HA * (closure_prefix[hi] - closure_prefix[lo]);
                                if cost > 0.0 {
                                    value_m3_per_ha / cost
                                } else {
                                    f64::MAX
                                }
                            }
                        };
                        slots.push(Slot { catchment: i, age, area_ha: area, cost_per_ha: cost, key });
                    }
                }
                // Highest key first; ties broken by catchment id, then age (youngest first), never by table order.
                slots.sort_by(|a, b| {
                    b.key
                        .total_cmp(&a.key)
                        .then_with(|| catchments[a.catchment].id.cmp(&catchments[b.catchment].id))
                        .then(a.age.cmp(&b.age))
                });
                for sl in slots {
                    if left <= 0.0 {
                        break;
                    }
                    let treat_ha = if by_area {
                        sl.area_ha.min(left)
                    } else if sl.cost_per_ha > 0.0 {
                        sl.area_ha.min(left / sl.cost_per_ha)
                    } else {
                        sl.area_ha
                    };
                    if treat_ha <= 0.0 {
                        continue;
                    }
                    let cost = treat_ha * sl.cost_per_ha;
                    left -= if by_area { treat_ha } else { cost };
                    let cleared = states[sl.catchment].cohorts.remove_at_age(sl.age, treat_ha * st.efficacy);
                    let cy = &mut control[sl.catchment][t];
                    cy.treatment_cost += cost;
                    cy.treated_ha += treat_ha;
                    cy.cleared_ha += cleared;
                }
                let spent: f64 = members.iter().map(|&i| control[i][t].cost()).sum();
                let treated_ha: f64 = members.iter().map(|&i| control[i][t].treated_ha).sum();
                let carried = if st.carry_over && !by_area && available.is_finite() { (available - spent).max(0.0) } else { 0.0 };
                carry[pool.unwrap_or(0)] = carried;
                // A fixed-area pool holds hectares, not dollars: its dollar budget has no limit.
                let (available, available_ha) = if by_area { (f64::INFINITY, Some(available)) } else { (available, None) };
                budget.push(BudgetYear { year, pool, available, spent, carried, available_ha, treated_ha });
            }
        }
        // 3. Regrowth, then ageing and spread.
        for (i, c) in catchments.iter().enumerate() {
            let s = &mut states[i];
            let mut regrowth = 0.0;
            if let Some(st) = strategy {
                let n_yr = st.regrowth_years.max(1) as f64;
                for r in &mut s.tracked {
                    regrowth += st.regrowth_fraction * r.cleared_ha / n_yr * (1.0 - suppressed[i]);
                    r.years_left -= 1;
                }
                s.tracked.retain(|r| r.years_left > 0);
                let cleared = control[i][t].cleared_ha;
                if cleared > 0.0 && st.regrowth_years > 0 && (st.regrowth_fraction > 0.0 || st.follow_up_cost_per_ha > 0.0) {
                    s.tracked.push(Tracked { cleared_ha: cleared, years_left: st.regrowth_years });
                }
            }
            // Regrowth and spread share the new age-0 cohort and the free area (regrowth
            // first); each is reported once, as established: spread as next year's
            // `new_infestation_ha`, regrowth as this year's `regrowth_ha`.
            let (spread, established) = s.cohorts.step_with(&par(i).invasion, c.vulnerable_ha, regrowth);
            s.new_ha = spread;
            control[i][t].regrowth_ha = established;
        }
    }
    BasinRun { years, control, budget }
}
