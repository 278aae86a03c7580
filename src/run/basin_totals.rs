//! Basin totals as exact partial sums, so that a run split into shards and merged
//! gives the same bytes as a single run.
//!
//! Everything a run reports for the whole basin — the `basin` rows of
//! `summary.csv`, `delay.csv`, the basin rows of `sensitivity.csv` and the basin
//! figures — is computed here from [`Partials`]: order-independent sums
//! ([`ExactSum`]) over catchments. A single run builds them from all its
//! catchments; each shard writes its own to `shard.json`; `merge` adds them up and
//! calls the same finishing code.

use crate::error::{Error, Result};
use crate::model::catchment::{Catchment, Contaminant};
use crate::model::cover::ClassAreas;
use crate::model::dilution;
use crate::model::economics::ProgrammeTotals;
use crate::model::exact::ExactSum;
use crate::model::summary::summarise;
use crate::model::YearResult;
use crate::output::tables::{self, ControlCells, CsvOut};
use crate::plot::legend::Corner;
use crate::plot::series::{CoverChart, Line, LineChart, Panels};
use crate::plot::{palette, save_figure, Formats};
use crate::schema::numbers::num;
use serde::{Deserialize, Deserializer, Serialize, Serializer};
use std::path::Path;

/// Id used for basin-wide rows.
use crate::schema::BASIN_ID;

/// An [`ExactSum`] that serialises as a decimal string.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Sum(pub ExactSum);

impl Sum {
    /// Adds a value.
    #[inline]
    pub fn add(&mut self, v: f64) {
        self.0.add(v);
    }
    /// The total.
    #[inline]
    pub fn value(self) -> f64 {
        self.0.value()
    }
    /// Adds another sum.
    pub fn merge(&mut self, o: Sum) {
        self.0.merge(o.0);
    }
}

impl Serialize for Sum {
    fn serialize<S: Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        s.serialize_str(&self.0 .0.to_string())
    }
}

impl<'de> Deserialize<'de> for Sum {
    fn deserialize<D: Deserializer<'de>>(d: D) -> std::result::Result<Sum, D::Error> {
        let s = String::deserialize(d)?;
        s.parse::<i128>().map(|v| Sum(ExactSum(v))).map_err(serde::de::Error::custom)
    }
}

/// What the finishing code needs to know about the scenario.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BasinMeta {
    /// Scenario title.
    pub title: String,
    /// First projected year.
    pub start_year: i32,
    /// Years after the start.
    pub horizon_years: usize,
    /// Runoff below which no concentration is stated, mm/yr.
    pub min_runoff_mm: f64,
    /// Discount rate.
    pub discount_rate: f64,
    /// Value of water, $/m³.
    pub water_value_per_m3: Option<f64>,
    /// Contaminant names and guidelines (mg/L).
    pub contaminants: Vec<(String, Option<f64>)>,
    /// Strategies, `no-control` first.
    pub strategies: Vec<String>,
    /// Draw basin figures.
    pub figures: bool,
}

/// One year's basin sums (depths area-weighted: `Σ depth·area`).
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct YearSums {
    rain: Sum,
    pet: Sum,
    et: Sum,
    yield_a: Sum,
    yield_m3: Sum,
    baseline: Sum,
    uninvaded: Sum,
    canopy: Sum,
    scattered: Sum,
    medium: Sum,
    dense: Sum,
    new_infestation: Sum,
    loads: Vec<Sum>,
    /// Loads with no invader (`YearResult::uninvaded_loads_kg_per_yr`), kg/yr.
    #[serde(default)]
    uninvaded_loads: Vec<Sum>,
    cost: Sum,
    saved: Sum,
}

/// Basin sums of one strategy.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct StrategySums {
    /// Strategy name.
    pub name: String,
    area_ha: Sum,
    vulnerable_ha: Sum,
    years: Vec<YearSums>,
}

impl StrategySums {
    /// Empty sums for `n_years` years and `k` contaminants.
    pub fn new(name: &str, n_years: usize, k: usize) -> StrategySums {
        StrategySums {
            name: name.to_string(),
            area_ha: Sum::default(),
            vulnerable_ha: Sum::default(),
            years: (0..n_years)
                .map(|_| YearSums { loads: vec![Sum::default(); k], uninvaded_loads: vec![Sum::default(); k], ..Default::default() })
                .collect(),
        }
    }

    /// Adds one catchment's years (and control cells, when the strategy has them).
    pub fn add(&mut self, c: &Catchment, ys: &[YearResult], cells: &[ControlCells]) {
        self.area_ha.add(c.area_ha);
        self.vulnerable_ha.add(c.vulnerable_ha);
        let a = c.area_ha;
        for (t, (b, y)) in self.years.iter_mut().zip(ys).enumerate() {
            b.rain.add(y.rain_mm * a);
            b.pet.add(y.pet_mm * a);
            b.et.add(y.et_mm * a);
            b.yield_a.add(y.yield_mm * a);
            b.yield_m3.add(y.yield_m3);
            b.baseline.add(y.baseline_yield_mm * a);
            b.uninvaded.add(y.uninvaded_yield_mm * a);
            b.canopy.add(y.canopy_fraction * a);
            b.scattered.add(y.classes.scattered_ha);
            b.medium.add(y.classes.medium_ha);
            b.dense.add(y.classes.dense_ha);
            b.new_infestation.add(y.new_infestation_ha);
            for (l, v) in b.loads.iter_mut().zip(&y.loads_kg_per_yr) {
                l.add(*v);
            }
            for (l, v) in b.uninvaded_loads.iter_mut().zip(&y.uninvaded_loads_kg_per_yr) {
                l.add(*v);
            }
            if let Some(cell) = cells.get(t) {
                b.cost.add(cell.control.cost());
                b.saved.add(cell.water_saved_m3);
            }
        }
    }

    fn merge(&mut self, o: &StrategySums) {
        self.area_ha.merge(o.area_ha);
        self.vulnerable_ha.merge(o.vulnerable_ha);
        for (a, b) in self.years.iter_mut().zip(&o.years) {
            for (x, y) in [
                (&mut a.rain, b.rain),
                (&mut a.pet, b.pet),
                (&mut a.et, b.et),
                (&mut a.yield_a, b.yield_a),
                (&mut a.yield_m3, b.yield_m3),
                (&mut a.baseline, b.baseline),
                (&mut a.uninvaded, b.uninvaded),
                (&mut a.canopy, b.canopy),
                (&mut a.scattered, b.scattered),
                (&mut a.medium, b.medium),
                (&mut a.dense, b.dense),
                (&mut a.new_infestation, b.new_infestation),
                (&mut a.cost, b.cost),
                (&mut a.saved, b.saved),
            ] {
                x.merge(y);
            }
            for (x, y) in a.loads.iter_mut().zip(&b.loads) {
                x.merge(*y);
            }
            for (x, y) in a.uninvaded_loads.iter_mut().zip(&b.uninvaded_loads) {
                x.merge(*y);
            }
        }
    }

    /// The pooled basin as a pseudo-catchment with its year results.
    fn pooled(&self, meta: &BasinMeta) -> (Catchment, Vec<YearResult>) {
        let area = self.area_ha.value();
        let years = self
            .years
            .iter()
            .enumerate()
            .map(|(t, b)| {
                let yield_m3 = b.yield_m3.value();
                let loads: Vec<f64> = b.loads.iter().map(|l| l.value()).collect();
                let uninvaded_loads: Vec<f64> = b.uninvaded_loads.iter().map(|l| l.value()).collect();
                let uninvaded_m3 = dilution::volume_m3(b.uninvaded.value() / area, area);
                let screen =
                    |l: f64, v: f64| dilution::concentration_mg_per_l(l, v, area, meta.min_runoff_mm).map_err(dilution::ScreenedFlag::from);
                YearResult {
                    year: meta.start_year + t as i32,
                    rain_mm: b.rain.value() / area,
                    pet_mm: b.pet.value() / area,
                    et_mm: b.et.value() / area,
                    yield_mm: b.yield_a.value() / area,
                    yield_m3,
                    baseline_yield_mm: b.baseline.value() / area,
                    uninvaded_yield_mm: b.uninvaded.value() / area,
                    canopy_fraction: b.canopy.value() / area,
                    classes: ClassAreas { scattered_ha: b.scattered.value(), medium_ha: b.medium.value(), dense_ha: b.dense.value() },
                    new_infestation_ha: b.new_infestation.value(),
                    concentrations: loads.iter().map(|&l| screen(l, yield_m3)).collect(),
                    uninvaded_concentrations: uninvaded_loads.iter().map(|&l| screen(l, uninvaded_m3)).collect(),
                    loads_kg_per_yr: loads,
                    uninvaded_loads_kg_per_yr: uninvaded_loads,
                    // The basin row is screened by the minimum runoff only (no
                    // long-term mean volume: the ratio ceiling is left out).
                    mean_volume_m3: 0.0,
                    mean_loads_kg_per_yr: Vec::new(),
                }
            })
            .collect();
        let c = Catchment {
            id: BASIN_ID.into(),
            name: format!("{} (all catchments)", meta.title),
            area_ha: area,
            rain_mm: 0.0,
            pet_mm: 0.0,
            pet_forest_mm: None,
            vulnerable_ha: self.vulnerable_ha.value(),
            stand_ages_ha: None,
            infested: ClassAreas::default(),
            forest_ha: 0.0,
            flows_to: None,
            point_kg_per_yr: vec![],
            curves: None,
        };
        (c, years)
    }

    fn totals(&self, meta: &BasinMeta) -> ProgrammeTotals {
        let cost: Vec<f64> = self.years.iter().map(|y| y.cost.value()).collect();
        let saved: Vec<f64> = self.years.iter().map(|y| y.saved.value()).collect();
        ProgrammeTotals::from_years(meta.discount_rate, &cost, &saved)
    }
}

/// Basin sums of one cost-of-delay variant.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct DelaySums {
    /// Strategy.
    pub strategy: String,
    /// Delay, years.
    pub delay_yr: u32,
    /// Delayed start year.
    pub start_year: i32,
    /// Cost per year, $.
    pub cost: Vec<Sum>,
    /// Water saved vs no-control per year, m³.
    pub saved: Vec<Sum>,
    /// Water lost vs baseline over the horizon, m³.
    pub lost: Sum,
    /// Infested area in the last year, ha.
    pub final_infested_ha: Sum,
}

impl DelaySums {
    fn merge(&mut self, o: &DelaySums) {
        for (a, b) in self.cost.iter_mut().zip(&o.cost) {
            a.merge(*b);
        }
        for (a, b) in self.saved.iter_mut().zip(&o.saved) {
            a.merge(*b);
        }
        self.lost.merge(o.lost);
        self.final_infested_ha.merge(o.final_infested_ha);
    }
    fn totals(&self, meta: &BasinMeta) -> ProgrammeTotals {
        let c: Vec<f64> = self.cost.iter().map(|x| x.value()).collect();
        let s: Vec<f64> = self.saved.iter().map(|x| x.value()).collect();
        ProgrammeTotals::from_years(meta.discount_rate, &c, &s)
    }
}

/// Basin sums for the ensemble's basin-level sensitivity.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SensitivitySums {
    /// The uncertain parameters (path, label, what they can move).
    pub labels: Vec<crate::run::sensitivity::RankedParam>,
    /// `(label, year)` of each ranking point.
    pub points: Vec<(String, i32)>,
    /// Total area, ha.
    pub area_ha: Sum,
    /// `[member][point]`: (yield volume, baseline volume), m³.
    pub volumes: Vec<Vec<(Sum, Sum)>>,
    /// `[parameter][member]`: Σ area × drawn value.
    pub weighted_draws: Vec<Vec<Sum>>,
}

impl SensitivitySums {
    /// Empty sums.
    pub fn new(labels: Vec<crate::run::sensitivity::RankedParam>, points: Vec<(String, i32)>, members: usize) -> SensitivitySums {
        let np = points.len();
        let nl = labels.len();
        SensitivitySums {
            labels,
            points,
            area_ha: Sum::default(),
            volumes: vec![vec![(Sum::default(), Sum::default()); np]; members],
            weighted_draws: vec![vec![Sum::default(); members]; nl],
        }
    }

    fn merge(&mut self, o: &SensitivitySums) {
        self.area_ha.merge(o.area_ha);
        for (a, b) in self.volumes.iter_mut().zip(&o.volumes) {
            for (x, y) in a.iter_mut().zip(b) {
                x.0.merge(y.0);
                x.1.merge(y.1);
            }
        }
        for (a, b) in self.weighted_draws.iter_mut().zip(&o.weighted_draws) {
            for (x, y) in a.iter_mut().zip(b) {
                x.merge(*y);
            }
        }
    }
}

/// Everything basin-wide a run (or shard) contributes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Partials {
    /// Scenario facts.
    pub meta: BasinMeta,
    /// Per strategy, `no-control` first.
    pub strategies: Vec<StrategySums>,
    /// Cost-of-delay variants.
    pub delays: Vec<DelaySums>,
    /// Ensemble basin sensitivity, if an ensemble ran with uncertain parameters.
    pub sensitivity: Option<SensitivitySums>,
    /// Ensemble member sums of the whole basin, per strategy (empty without an ensemble).
    #[serde(default)]
    pub ensemble: Vec<EnsembleBasinSums>,
}

/// Member sums of the whole basin for one strategy: the `basin` rows of `ensemble.csv`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EnsembleBasinSums {
    /// Strategy name.
    pub strategy: String,
    /// Basin area, ha.
    pub area_ha: Sum,
    /// `[member][year]`: yield volume (m³), baseline volume (m³), control cost ($).
    pub years: Vec<Vec<[Sum; 3]>>,
}

impl EnsembleBasinSums {
    /// Empty sums.
    pub fn new(strategy: &str, members: usize, years: usize) -> EnsembleBasinSums {
        EnsembleBasinSums { strategy: strategy.into(), area_ha: Sum::default(), years: vec![vec![[Sum::default(); 3]; years]; members] }
    }

    /// Adds a catchment's area.
    pub fn add_area(&mut self, area_ha: f64) {
        self.area_ha.add(area_ha);
    }

    /// Adds one catchment's member `m`, year `t`.
    pub fn add(&mut self, m: usize, t: usize, volume_m3: f64, baseline_m3: f64, cost: f64) {
        let y = &mut self.years[m][t];
        y[0].add(volume_m3);
        y[1].add(baseline_m3);
        y[2].add(cost);
    }

    /// Adds member `m`'s sums over a set of catchments.
    pub fn add_member(&mut self, m: usize, years: &[[Sum; 3]]) {
        for (a, b) in self.years[m].iter_mut().zip(years) {
            for (x, y) in a.iter_mut().zip(b) {
                x.merge(*y);
            }
        }
    }

    fn merge(&mut self, o: &EnsembleBasinSums) {
        self.area_ha.merge(o.area_ha);
        for (m, ys) in o.years.iter().enumerate() {
            self.add_member(m, ys);
        }
    }

    /// The members' values for [`crate::run::bands::write_rows`].
    fn member_values(&self, vars: crate::run::bands::Vars) -> crate::run::bands::MemberValues {
        let n_years = self.years.first().map_or(0, Vec::len);
        let mut mv = crate::run::bands::MemberValues::zeros(vars.len(), n_years, self.years.len());
        let area = self.area_ha.value();
        for (m, ys) in self.years.iter().enumerate() {
            let flow: Vec<f64> = ys.iter().map(|y| y[0].value()).collect();
            let base: Vec<f64> = ys.iter().map(|y| y[1].value()).collect();
            mv.set_yield(m, &flow, &base, |v| v / (10.0 * area));
            for (t, y) in ys.iter().enumerate() {
                mv.vars[vars.cost()][t][m] = y[2].value();
            }
        }
        mv
    }
}

impl Partials {
    /// Adds another shard's partials (same scenario).
    pub fn merge(&mut self, o: &Partials) -> Result<()> {
        if self.meta != o.meta || self.strategies.len() != o.strategies.len() || self.delays.len() != o.delays.len() {
            return Err(Error::invalid(crate::Problem::new("shards come from different scenarios or settings")));
        }
        for (a, b) in self.strategies.iter_mut().zip(&o.strategies) {
            a.merge(b);
        }
        for (a, b) in self.delays.iter_mut().zip(&o.delays) {
            a.merge(b);
        }
        match (&mut self.sensitivity, &o.sensitivity) {
            (Some(a), Some(b)) => a.merge(b),
            (None, None) => {}
            _ => return Err(Error::invalid(crate::Problem::new("shards differ in their ensemble settings"))),
        }
        if self.ensemble.len() != o.ensemble.len()
            || self.ensemble.iter().zip(&o.ensemble).any(|(a, b)| a.strategy != b.strategy || a.years.len() != b.years.len())
        {
            return Err(Error::invalid(crate::Problem::new("shards differ in their ensemble settings")));
        }
        for (a, b) in self.ensemble.iter_mut().zip(&o.ensemble) {
            a.merge(b);
        }
        Ok(())
    }

    fn contaminants(&self) -> Vec<Contaminant> {
        self.meta
            .contaminants
            .iter()
            .map(|(n, g)| Contaminant {
                name: n.clone(),
                open_export_kg_per_ha_yr: 0.0,
                forest_export_kg_per_ha_yr: 0.0,
                guideline_mg_per_l: *g,
                cq: crate::model::dilution::ConcentrationDischarge::PURE_DILUTION,
            })
            .collect()
    }

    /// The basin row of `summary.csv` for strategy `k`.
    pub fn summary_row(&self, k: usize) -> Vec<String> {
        let st = &self.strategies[k];
        let (c, years) = st.pooled(&self.meta);
        let sm = summarise(&c, &years, &self.contaminants());
        let who = tables::SummaryWho { id: BASIN_ID, scope: crate::schema::columns::scope::BASIN, name: &c.name, area_ha: c.area_ha };
        tables::summary_fields(who, &st.name, &sm, &st.totals(&self.meta), self.meta.water_value_per_m3)
    }

    /// Writes `delay.csv`.
    pub fn write_delay(&self, dir: &Path) -> Result<()> {
        let mut out = CsvOut::create(&dir.join("delay.csv"), &tables::delay_header())?;
        for d in &self.delays {
            let t = d.totals(&self.meta);
            let f = [
                d.strategy.clone(),
                d.delay_yr.to_string(),
                d.start_year.to_string(),
                num(t.cost, 2),
                num(t.cost_pv, 2),
                num(t.water_saved_m3, 1),
                num(d.lost.value(), 1),
                num(d.final_infested_ha.value(), 3),
            ];
            out.row(f.iter().map(String::as_str))?;
        }
        out.finish()
    }

    /// Basin sensitivity rankings `(at, year, ranking)`.
    pub fn basin_rankings(&self) -> Vec<(String, i32, Vec<crate::run::sensitivity::Ranked>)> {
        let Some(s) = &self.sensitivity else { return Vec::new() };
        let area = s.area_ha.value();
        let xs: Vec<Vec<f64>> = s.weighted_draws.iter().map(|v| v.iter().map(|x| x.value() / area).collect()).collect();
        s.points
            .iter()
            .enumerate()
            .map(|(pt, (at, year))| {
                let y: Vec<f64> = s
                    .volumes
                    .iter()
                    .map(|v| {
                        let (q, b) = (v[pt].0.value(), v[pt].1.value());
                        if b > 0.0 {
                            100.0 * (q - b) / b
                        } else {
                            f64::NAN
                        }
                    })
                    .collect();
                (at.clone(), *year, crate::run::sensitivity::rank(&s.labels, &xs, &y, None))
            })
            .collect()
    }

    /// Draws the basin figures; returns how many.
    pub fn draw_figures(&self, dir: &Path, formats: Formats) -> Result<usize> {
        if !self.meta.figures {
            return Ok(0);
        }
        let figdir = dir.join("figures");
        let mut n = 0;
        let cover = |st: &StrategySums| {
            let (c, years) = st.pooled(&self.meta);
            CoverChart {
                title: format!("{} — infestation, {}", self.meta.title, st.name),
                years: years.iter().map(|y| y.year as f64).collect(),
                classes: years.iter().map(|y| [y.classes.scattered_ha, y.classes.medium_ha, y.classes.dense_ha]).collect(),
                vulnerable_ha: c.vulnerable_ha,
            }
        };
        for st in &self.strategies {
            save_figure(&cover(st), &figdir.join(format!("basin_{}_cover", crate::schema::file_stem(&st.name))), formats)?;
            n += 1;
        }
        if self.strategies.len() > 1 {
            let lines: Vec<Line> = self
                .strategies
                .iter()
                .skip(1)
                .enumerate()
                .map(|(k, o)| {
                    let (mut cc, mut cw) = (0.0, 0.0);
                    let points = o
                        .years
                        .iter()
                        .map(|y| {
                            cc += y.cost.value();
                            cw += y.saved.value();
                            (cc / 1e6, Some(cw / 1e6))
                        })
                        .collect();
                    Line { label: o.name.clone(), points, colour: palette::series(k), dashed: false }
                })
                .collect();
            let mut chart = LineChart::over_years(
                format!("{} — what control buys", self.meta.title),
                "Cumulative water saved (million m³)".into(),
                lines,
            );
            chart.x_label = "Cumulative control cost (million $)".into();
            chart.x_decimals = 1;
            chart.legend_at = Corner::LowerRight;
            save_figure(&chart, &figdir.join("strategies_cost_vs_water"), formats)?;
            n += 1;
        }
        for name in self.meta.strategies.iter().skip(1) {
            let rows: Vec<&DelaySums> = self.delays.iter().filter(|d| &d.strategy == name).collect();
            if rows.is_empty() {
                continue;
            }
            let totals: Vec<ProgrammeTotals> = rows.iter().map(|d| d.totals(&self.meta)).collect();
            let line = |label: &str, f: &dyn Fn(usize) -> f64, k: usize| Line {
                label: label.into(),
                points: rows.iter().enumerate().map(|(i, r)| (r.delay_yr as f64, Some(f(i)))).collect(),
                colour: palette::series(k),
                dashed: false,
            };
            let mut cost = LineChart::over_years(
                format!("{name}: cost of delay"),
                "Total control cost (million $)".into(),
                vec![line("Nominal", &|i| totals[i].cost / 1e6, 0), line("Present value", &|i| totals[i].cost_pv / 1e6, 1)],
            );
            cost.x_label = "Delay of the start (years)".into();
            cost.legend_at = Corner::UpperLeft;
            let mut water = LineChart::over_years(
                format!("{name}: water lost with delay"),
                "Water lost vs baseline over the horizon (million m³)".into(),
                vec![line("Water lost (negative: more water than today)", &|i| rows[i].lost.value() / 1e6, 2)],
            );
            water.x_label = "Delay of the start (years)".into();
            water.legend_at = Corner::UpperLeft;
            water.y_from_zero = false;
            save_figure(&Panels(vec![cost, water]), &figdir.join(format!("delay_{}", crate::schema::file_stem(name))), formats)?;
            n += 1;
        }
        Ok(n)
    }

    /// Appends the `basin` rows of every strategy to `ensemble.csv` (which holds the
    /// `local` and `arriving` rows), from the exact member sums.
    pub fn append_ensemble(&self, dir: &Path) -> Result<()> {
        if self.ensemble.is_empty() {
            return Ok(());
        }
        let layout = crate::run::bands::BandLayout::new(self.meta.start_year, &self.meta.contaminants);
        let which = layout.vars.without_concentrations();
        let mut out = CsvOut::append(&dir.join("ensemble.csv"), crate::schema::columns::ensemble::COLUMNS.len())?;
        for e in &self.ensemble {
            let mv = e.member_values(layout.vars);
            crate::run::bands::write_rows(&mut out, &layout, BASIN_ID, crate::schema::columns::scope::BASIN, &e.strategy, &mv, &which)?;
        }
        out.finish()
    }

    /// Appends the `basin` rows of every control strategy to `economics.csv` (which
    /// holds the `local` and `arriving` rows): each member's programme totals from the
    /// exact basin sums, water saved against the same member's no-control run.
    pub fn append_economics(&self, dir: &Path) -> Result<()> {
        use crate::model::economics::ProgrammeTotals;
        let Some(reference) = self.ensemble.first() else { return Ok(()) };
        if self.ensemble.len() < 2 {
            return Ok(());
        }
        let mut out = CsvOut::append(&dir.join(crate::schema::columns::economics::FILE), crate::schema::columns::economics::COLUMNS.len())?;
        for e in &self.ensemble[1..] {
            let members: Vec<_> = e
                .years
                .iter()
                .zip(&reference.years)
                .map(|(ys, rs)| {
                    let cost: Vec<f64> = ys.iter().map(|y| y[2].value()).collect();
                    let saved: Vec<f64> = ys.iter().zip(rs).map(|(y, r)| y[0].value() - r[0].value()).collect();
                    crate::run::bands::economics_values(
                        &ProgrammeTotals::from_years(self.meta.discount_rate, &cost, &saved),
                        self.meta.water_value_per_m3,
                    )
                })
                .collect();
            crate::run::bands::write_economics_rows(&mut out, BASIN_ID, crate::schema::columns::scope::BASIN, &e.strategy, &members)?;
        }
        out.finish()
    }

    /// Appends the basin rows to `sensitivity.csv` (which holds the catchment rows).
    pub fn append_sensitivity(&self, dir: &Path) -> Result<()> {
        if self.sensitivity.is_none() {
            return Ok(());
        }
        let mut out = CsvOut::append(&dir.join("sensitivity.csv"), crate::schema::columns::sensitivity::COLUMNS.len())?;
        for (at, year, r) in self.basin_rankings() {
            crate::run::sensitivity::write_sensitivity_rows(&mut out, BASIN_ID, crate::schema::NO_CONTROL, &at, year, &r)?;
        }
        out.finish()
    }
}
