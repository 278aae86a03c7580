//! Running a basin in shards and merging them: `run --shard K/N` projects the
//! K-th of N deterministic slices of the catchments; `merge` combines the shard
//! folders into the same files, byte for byte, that one run writes.
//!
//! Slices keep every drainage network whole (a catchment and everything that
//! flows into or out of it are in one shard) and follow table order. Basin-wide
//! results are merged from exact partial sums ([`crate::run::basin_totals`]). A control
//! strategy whose budget is shared across the basin couples every catchment and
//! cannot be sharded: such scenarios are refused.

use crate::error::{Error, Problem, Result};
use crate::input::scenario::Scenario;
use crate::model::control::Effort;
use crate::model::network::Network;
use crate::output::outdir::Staging;
use crate::output::tables::CsvOut;
use crate::run::basin_totals::Partials;
use crate::schema::run_info::RunInfo;
use crate::schema::{
    BUDGET_FILE, ENSEMBLE_FILE, INPUTS_DIR, MEMBERS_FILE, NODES_FILE, RUN_INFO_FILE, SENSITIVITY_FILE, SHARD_FILE, SUMMARY_FILE,
    YEARLY_FILE,
};
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Parses `K/N` (1 ≤ K ≤ N).
pub fn parse_shard(text: &str) -> std::result::Result<(usize, usize), String> {
    let (k, n) = text.split_once('/').ok_or_else(|| format!("'{text}' is not K/N (e.g. 2/8)"))?;
    let k: usize = k.trim().parse().map_err(|_| format!("'{k}' is not a whole number"))?;
    let n: usize = n.trim().parse().map_err(|_| format!("'{n}' is not a whole number"))?;
    if n == 0 || k == 0 || k > n {
        return Err(format!("shard {k}/{n}: need 1 ≤ K ≤ N"));
    }
    Ok((k, n))
}

/// Shard (1-based) of every catchment: whole drainage networks, in table order,
/// balanced by catchment count.
pub fn assign_shards(s: &Scenario, n: usize) -> Vec<usize> {
    let c = s.catchments.len();
    // Union-find over flows_to links.
    let mut parent: Vec<usize> = (0..c).collect();
    fn find(p: &mut [usize], i: usize) -> usize {
        let mut r = i;
        while p[r] != r {
            r = p[r];
        }
        let mut j = i;
        while p[j] != r {
            let next = p[j];
            p[j] = r;
            j = next;
        }
        r
    }
    for i in 0..c {
        if let Some(d) = s.network.downstream(i) {
            let (a, b) = (find(&mut parent, i), find(&mut parent, d));
            if a != b {
                parent[a.max(b)] = a.min(b);
            }
        }
    }
    let roots: Vec<usize> = (0..c).map(|i| find(&mut parent, i)).collect();
    // Components in order of their first catchment; shard from the count before them.
    let mut first_seen: HashMap<usize, usize> = HashMap::new();
    let mut before = 0usize;
    let mut sizes: HashMap<usize, usize> = HashMap::new();
    for &r in &roots {
        *sizes.entry(r).or_default() += 1;
    }
    let mut shard_of_root: HashMap<usize, usize> = HashMap::new();
    for &r in &roots {
        if first_seen.insert(r, before).is_none() {
            shard_of_root.insert(r, before * n / c.max(1) + 1);
            before += sizes[&r];
        }
    }
    roots.iter().map(|r| shard_of_root[r]).collect()
}

/// The scenario restricted to shard `k` of `n`.
pub fn shard_scenario(full: &Scenario, k: usize, n: usize) -> Result<Scenario> {
    if k == 0 || k > n {
        return Err(Error::invalid(Problem::new(format!("shard {k}/{n}: need 1 ≤ K ≤ N")).option("--shard")));
    }
    for st in &full.strategies {
        if !matches!(st.effort, Effort::CatchmentBudget(_)) {
            return Err(Error::invalid(
                Problem::in_file(
                    &full.path,
                    format!(
                        "strategy '{}' shares one budget (or area) across the basin, which couples every catchment; \
                         a sharded run needs budget_scope = \"catchment\" for every strategy",
                        st.name
                    ),
                )
                .option("--shard"),
            ));
        }
    }
    let shards = assign_shards(full, n);
    let keep: Vec<usize> = (0..full.catchments.len()).filter(|&i| shards[i] == k).collect();
    let new_index: HashMap<usize, usize> = keep.iter().enumerate().map(|(j, &i)| (i, j)).collect();
    let downstream = keep.iter().map(|&i| full.network.downstream(i).map(|d| new_index[&d])).collect();
    let network = Network::new(downstream).map_err(|e| Error::Other(format!("shard network: {e:?}")))?;
    let mut s = full.clone();
    s.catchments = keep.iter().map(|&i| full.catchments[i].clone()).collect();
    s.network = network;
    for st in &mut s.strategies {
        if let Effort::CatchmentBudget(b) = &st.effort {
            st.effort = Effort::CatchmentBudget(keep.iter().map(|&i| b[i].clone()).collect());
        }
    }
    Ok(s)
}

/// `shard.json` of this run's shards.
type ShardInfo = crate::schema::shard::ShardInfo<Partials>;

/// Writes `shard.json` into a shard's output folder.
pub fn write_shard_info(dir: &Path, full: &Scenario, sub: &Scenario, k: usize, n: usize, partials: &Partials, figures: bool) -> Result<()> {
    let info = ShardInfo {
        tool: crate::schema::run_info::TOOL.into(),
        shard: k,
        of: n,
        table_order: full.catchments.iter().map(|c| c.id.clone()).collect(),
        catchments: sub.catchments.iter().map(|c| c.id.clone()).collect(),
        figures,
        partials: partials.clone(),
    };
    crate::output::outdir::write_atomic(&dir.join(SHARD_FILE), info.to_json()?.as_bytes())
}

/// What `merge` produced.
#[derive(Debug, Clone)]
pub struct MergeOutcome {
    /// The merged folder.
    pub out: PathBuf,
    /// Shards merged.
    pub shards: usize,
    /// Catchments in all.
    pub catchments: usize,
}

fn read_info(dir: &Path) -> Result<ShardInfo> {
    let path = dir.join(SHARD_FILE);
    let text = std::fs::read_to_string(&path)
        .map_err(|e| Error::invalid(Problem::in_file(&path, format!("cannot read it ({e}); is this the output of `run --shard K/N`?"))))?;
    serde_json::from_str(&text).map_err(|e| Error::invalid(Problem::in_file(&path, format!("is not a valid shard description: {e}"))))
}

/// Parsed CSV rows of a file (header, records).
fn read_rows(path: &Path) -> Result<(Vec<String>, Vec<Vec<String>>)> {
    let mut r = csv::ReaderBuilder::new()
        .has_headers(true)
        .flexible(true)
        .from_path(path)
        .map_err(|e| Error::invalid(Problem::in_file(path, format!("cannot read: {e}"))))?;
    let header: Vec<String> =
        r.headers().map_err(|e| Error::invalid(Problem::in_file(path, e.to_string())))?.iter().map(str::to_string).collect();
    let mut rows = Vec::new();
    for rec in r.records() {
        let rec = rec.map_err(|e| Error::invalid(Problem::in_file(path, e.to_string())))?;
        if rec.len() != header.len() {
            let line = rec.position().map_or(0, |p| p.line() as usize);
            return Err(Error::invalid(
                Problem::in_file(path, format!("has {} fields where the header has {}", rec.len(), header.len())).row(line),
            ));
        }
        rows.push(rec.iter().map(str::to_string).collect());
    }
    Ok((header, rows))
}

/// Most missing shards listed one by one; beyond that they are counted.
const MAX_MISSING_LISTED: usize = 10;

/// Problems with the set of shard numbers `have` (sorted) for a run of `n`
/// shards: each missing or repeated shard. The stated `n` is not trusted: the
/// work done and the problems listed are bounded by the number of shards given.
fn shard_count_problems(have: &[usize], n: usize) -> Vec<Problem> {
    let mut problems = Vec::new();
    let mut last_repeated = None;
    for w in have.windows(2) {
        if w[0] == w[1] && last_repeated != Some(w[0]) {
            problems.push(Problem::new(format!("shard {}/{n} is given more than once", w[0])));
            last_repeated = Some(w[0]);
        }
    }
    let mut distinct: Vec<usize> = have.iter().copied().filter(|&k| (1..=n).contains(&k)).collect();
    distinct.dedup();
    let missing_count = n - distinct.len();
    if missing_count == 0 {
        return problems;
    }
    // The first missing shards, found by walking the given ones (never all of 1..=n).
    let mut missing = Vec::new();
    let mut next = 1;
    for &k in distinct.iter().chain(std::iter::once(&(n + 1))) {
        while next < k && missing.len() < MAX_MISSING_LISTED {
            missing.push(next);
            next += 1;
        }
        next = k + 1;
        if missing.len() == MAX_MISSING_LISTED {
            break;
        }
    }
    if missing_count <= MAX_MISSING_LISTED {
        problems.extend(missing.iter().map(|k| Problem::new(format!("shard {k}/{n} is missing"))));
    } else {
        let listed: Vec<String> = missing.iter().map(|k| k.to_string()).collect();
        problems.push(Problem::new(format!(
            "the shards say N = {n} but {} were given: shards {} and {} more are missing",
            have.len(),
            listed.join(", "),
            missing_count - missing.len()
        )));
    }
    problems
}

/// Merges shard folders into `out`.
// Over 100 lines on purpose: the merge's steps in order (check the shards, merge the partial sums, concatenate the tables, finish the basin, commit); the order is the point.
pub fn merge(dirs: &[PathBuf], out: &Path, force: bool) -> Result<MergeOutcome> {
    if dirs.is_empty() {
        return Err(Error::invalid(Problem::new("give the shard folders to merge")));
    }
    let mut infos: Vec<(PathBuf, ShardInfo)> = Vec::new();
    for d in dirs {
        infos.push((d.clone(), read_info(d)?));
    }
    infos.sort_by_key(|(_, i)| i.shard);
    let n = infos[0].1.of;
    let mut problems = Vec::new();
    for (d, i) in &infos {
        if i.of != n || i.table_order != infos[0].1.table_order {
            problems.push(Problem::in_file(&d.join(SHARD_FILE), "belongs to a different sharded run (scenario or N differ)"));
        }
    }
    for (d, i) in &infos {
        if i.shard == 0 || i.shard > i.of {
            problems.push(Problem::in_file(&d.join(SHARD_FILE), format!("names shard {}/{}: need 1 ≤ K ≤ N", i.shard, i.of)));
        }
    }
    problems.extend(shard_count_problems(&infos.iter().map(|(_, i)| i.shard).collect::<Vec<_>>(), n));
    let run_info = std::fs::read(infos[0].0.join(RUN_INFO_FILE)).unwrap_or_default();
    for (d, _) in &infos[1..] {
        if std::fs::read(d.join(RUN_INFO_FILE)).unwrap_or_default() != run_info {
            problems
                .push(Problem::in_file(&d.join(RUN_INFO_FILE), "differs from the first shard's: shards must come from the same scenario"));
        }
    }
    if !problems.is_empty() {
        return Err(Error::Invalid(problems));
    }
    let mut partials = infos[0].1.partials.clone();
    for (_, i) in &infos[1..] {
        partials.merge(&i.partials)?;
    }
    let order: HashMap<&str, usize> = infos[0].1.table_order.iter().enumerate().map(|(j, id)| (id.as_str(), j)).collect();
    let strategies: HashMap<&str, usize> = partials.meta.strategies.iter().enumerate().map(|(j, s)| (s.as_str(), j)).collect();
    let cat = |id: &str| order.get(id).copied().unwrap_or(usize::MAX);
    let strat = |name: &str| strategies.get(name).copied().unwrap_or(usize::MAX);

    let staging = Staging::new(out, force)?;
    let dir = staging.dir().to_path_buf();
    // Per-catchment tables: concatenate every shard's rows, stable-sorted into
    // single-run order: by strategy, then by the named columns (catchments in
    // table order, years as numbers).
    use crate::schema::columns::{budget, economics, ensemble, members, nodes, sensitivity, yearly};
    let tables: [(&str, [&str; 3]); 7] = [
        (YEARLY_FILE, [yearly::STRATEGY, yearly::CATCHMENT, ""]),
        (NODES_FILE, [nodes::STRATEGY, nodes::NODE, ""]),
        (BUDGET_FILE, [budget::STRATEGY, budget::YEAR, budget::POOL]),
        (ENSEMBLE_FILE, [ensemble::STRATEGY, ensemble::SCOPE, ensemble::CATCHMENT]),
        (MEMBERS_FILE, [members::STRATEGY, members::CATCHMENT, ""]),
        (SENSITIVITY_FILE, [sensitivity::STRATEGY, sensitivity::CATCHMENT, ""]),
        (economics::FILE, [economics::STRATEGY, economics::SCOPE, economics::CATCHMENT]),
    ];
    for (name, key) in tables {
        if !infos[0].0.join(name).exists() {
            continue;
        }
        let mut header = Vec::new();
        let mut rows: Vec<Vec<String>> = Vec::new();
        for (d, _) in &infos {
            let (h, r) = read_rows(&d.join(name))?;
            header = h;
            rows.extend(r);
        }
        let path = infos[0].0.join(name);
        let at = |c: &str| -> Result<Option<usize>> {
            if c.is_empty() {
                return Ok(None);
            }
            header.iter().position(|h| h == c).map(Some).ok_or_else(|| {
                Error::invalid(Problem::in_file(&path, format!("has no column '{c}'; is this a yieldshift shard?")).row(1).column(c))
            })
        };
        let (k0, k1, k2) = (at(key[0])?, at(key[1])?, at(key[2])?);
        let rank = |r: &[String], k: Option<usize>, c: &str| -> usize {
            let Some(v) = k.and_then(|k| r.get(k)) else { return 0 };
            match c {
                crate::schema::columns::STRATEGY => strat(v),
                crate::schema::columns::SCOPE => scope_rank(v),
                crate::schema::columns::YEAR => v.parse().unwrap_or(0),
                _ => cat(v),
            }
        };
        rows.sort_by_key(|r| (rank(r, k0, key[0]), rank(r, k1, key[1]), rank(r, k2, key[2])));
        let mut w = CsvOut::create(&dir.join(name), &header)?;
        for r in &rows {
            w.row(r)?;
        }
        w.finish()?;
    }
    // summary.csv: catchment rows per strategy; finish_basin adds the basin rows.
    let mut summary: Vec<Vec<String>> = Vec::new();
    let mut summary_header = Vec::new();
    for (d, _) in &infos {
        let (h, r) = read_rows(&d.join(SUMMARY_FILE))?;
        summary_header = h;
        summary.extend(r);
    }
    let summary_path = infos[0].0.join(SUMMARY_FILE);
    let col = |c: &str| {
        summary_header.iter().position(|h| h == c).ok_or_else(|| {
            Error::invalid(Problem::in_file(&summary_path, format!("has no column '{c}'; is this a yieldshift shard?")).row(1).column(c))
        })
    };
    let (ci, si, sc) = (
        col(crate::schema::columns::summary::CATCHMENT)?,
        col(crate::schema::columns::summary::STRATEGY)?,
        col(crate::schema::columns::SCOPE)?,
    );
    summary.sort_by_key(|r| (strat(&r[si]), scope_rank(&r[sc]), cat(&r[ci])));
    let mut grouped: Vec<Vec<Vec<String>>> = vec![Vec::new(); partials.meta.strategies.len()];
    for r in summary {
        let k = strat(&r[si]);
        if k < grouped.len() {
            grouped[k].push(r);
        }
    }
    // Figures of single catchments, inputs and run_info come from the shards as they are.
    std::fs::create_dir_all(dir.join("figures")).map_err(|e| Error::io("creating figures/", e))?;
    for (d, _) in &infos {
        copy_dir(&d.join("figures"), &dir.join("figures"))?;
    }
    copy_dir(&infos[0].0.join("inputs"), &dir.join("inputs"))?;
    crate::output::outdir::write_atomic(&dir.join(RUN_INFO_FILE), &run_info)?;
    let formats = crate::plot::Formats::default_from(&infos[0].0);
    crate::run::finish::finish_basin(&dir, &partials, &grouped, formats)?;
    // Boundaries, when the run had them: re-read from inputs/ and write the GIS outputs.
    let info = RunInfo::read(&dir)?;
    if let Some((Some(file), idp)) = info.gis.as_ref().map(|g| (g.boundaries.as_ref(), &g.id_property)) {
        let ids: Vec<&str> = infos[0].1.table_order.iter().map(String::as_str).collect();
        let b = crate::input::gis::read_boundaries(&dir.join(INPUTS_DIR).join(file), idp, &ids).map_err(Error::Invalid)?;
        crate::run::finish::gis_outputs(&dir, &b, infos[0].1.figures, formats)?;
    }
    crate::report::write_report_with(&dir, &crate::report::ReportOptions { figures: infos[0].1.figures, formats })?;
    let catchments = infos.iter().map(|(_, i)| i.catchments.len()).sum();
    let out = staging.commit()?;
    Ok(MergeOutcome { out, shards: n, catchments })
}

/// Rank of a `scope` value in file order (local rows, then arriving, then basin).
fn scope_rank(v: &str) -> usize {
    crate::schema::columns::scope::ORDER.iter().position(|s| *s == v).unwrap_or(usize::MAX)
}

fn copy_dir(from: &Path, to: &Path) -> Result<()> {
    if !from.exists() {
        return Ok(());
    }
    std::fs::create_dir_all(to).map_err(|e| Error::io(format!("creating {}", to.display()), e))?;
    let entries = std::fs::read_dir(from).map_err(|e| Error::io(format!("reading {}", from.display()), e))?;
    for e in entries {
        let e = e.map_err(|e| Error::io(format!("reading {}", from.display()), e))?;
        if e.path().is_file() {
            std::fs::copy(e.path(), to.join(e.file_name())).map_err(|err| Error::io(format!("copying {}", e.path().display()), err))?;
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_huge_stated_shard_count_is_not_trusted() {
        // Regression: `"of": 2000000` in shard.json listed two million problems.
        let p = shard_count_problems(&[1, 2], 2_000_000);
        assert_eq!(p.len(), 1, "{p:?}");
        assert!(
            p[0].message.contains("N = 2000000 but 2 were given: shards 3, 4, 5, 6, 7, 8, 9, 10, 11, 12 and 1999988 more"),
            "{}",
            p[0].message
        );
    }

    #[test]
    fn missing_and_repeated_shards_are_named() {
        let msgs = |v: Vec<Problem>| v.into_iter().map(|p| p.message).collect::<Vec<_>>();
        assert_eq!(msgs(shard_count_problems(&[1, 3], 3)), vec!["shard 2/3 is missing"]);
        assert_eq!(msgs(shard_count_problems(&[1, 1, 2], 3)), vec!["shard 1/3 is given more than once", "shard 3/3 is missing"]);
        assert!(shard_count_problems(&[1, 2, 3], 3).is_empty());
    }
}
