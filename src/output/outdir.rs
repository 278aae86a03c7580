//! Safe output folders: results are written to a temporary folder beside the
//! target and moved into place only when the whole run succeeded, so a failed or
//! interrupted run leaves earlier results untouched.
//!
//! Beside a target `DIR` the staging folder is `.DIR.partial-<pid>`; while the
//! finished results are swapped in, the earlier results sit in
//! `.DIR.previous-<pid>` for the instant between two renames. A run killed
//! outright (SIGKILL, power loss, Ctrl-C: no destructor runs) can leave either
//! behind. The next run into the same `DIR` tidies them up: a staging folder of a
//! process that no longer exists is removed, and earlier results stranded in a
//! `.previous-` folder are moved back into `DIR` when `DIR` itself is missing.
//! Whether a process exists is known only where `/proc` is available (Linux);
//! elsewhere nothing is removed.

use crate::error::{Error, Problem, Result};
use crate::schema::RUN_INFO_FILE;
use std::io::Write as _;
use std::path::{Path, PathBuf};

/// A staging folder that becomes the output folder on [`Staging::commit`].
#[derive(Debug)]
pub struct Staging {
    target: PathBuf,
    tmp: PathBuf,
    previous: PathBuf,
    committed: bool,
}

impl Staging {
    /// Prepares to write `target`. Refuses a non-empty folder that does not look
    /// like a yieldshift output unless `force` is set.
    pub fn new(target: &Path, force: bool) -> Result<Staging> {
        let Some(name) = target.file_name().map(|n| n.to_string_lossy().into_owned()) else {
            return Err(Error::invalid(Problem::in_file(target, "is not a folder name; give --out a named folder, e.g. --out results")));
        };
        let parent = target.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new(".")).to_path_buf();
        if parent.is_dir() {
            tidy_leftovers(&parent, &name, target);
        }
        if target.exists() {
            if !target.is_dir() {
                return Err(Error::invalid(Problem::in_file(target, "exists and is not a folder; choose another --out")));
            }
            let non_empty = std::fs::read_dir(target).map(|mut d| d.next().is_some()).unwrap_or(false);
            if non_empty && !target.join(RUN_INFO_FILE).exists() && !force {
                return Err(Error::invalid(Problem::in_file(
                    target,
                    "is a non-empty folder that is not a yieldshift output; choose another --out or pass --force to replace it",
                )));
            }
        }
        std::fs::create_dir_all(&parent).map_err(|e| Error::io(format!("creating {}", parent.display()), e))?;
        let pid = std::process::id();
        let tmp = parent.join(format!(".{name}{PARTIAL}{pid}"));
        let previous = parent.join(format!(".{name}{PREVIOUS}{pid}"));
        if tmp.exists() {
            let _ = std::fs::remove_dir_all(&tmp);
        }
        std::fs::create_dir_all(&tmp).map_err(|e| Error::io(format!("creating {}", tmp.display()), e))?;
        Ok(Staging { target: target.to_path_buf(), tmp, previous, committed: false })
    }

    /// The folder to write into now.
    pub fn dir(&self) -> &Path {
        &self.tmp
    }

    /// The final output folder.
    pub fn target(&self) -> &Path {
        &self.target
    }

    /// Moves the staged results into place, replacing any earlier results.
    pub fn commit(mut self) -> Result<PathBuf> {
        let old = self.previous.clone();
        if old.exists() {
            std::fs::remove_dir_all(&old).map_err(|e| Error::io(format!("removing {}", old.display()), e))?;
        }
        if self.target.exists() {
            std::fs::rename(&self.target, &old).map_err(|e| Error::io(format!("moving aside {}", self.target.display()), e))?;
        }
        if let Err(e) = std::fs::rename(&self.tmp, &self.target) {
            if old.exists() {
                let _ = std::fs::rename(&old, &self.target);
            }
            return Err(Error::io(format!("moving results into {}", self.target.display()), e));
        }
        self.committed = true;
        if old.exists() {
            let _ = std::fs::remove_dir_all(&old);
        }
        Ok(self.target.clone())
    }
}

impl Drop for Staging {
    fn drop(&mut self) {
        if !self.committed {
            let _ = std::fs::remove_dir_all(&self.tmp);
        }
    }
}

const PARTIAL: &str = ".partial-";
const PREVIOUS: &str = ".previous-";

/// Removes staging folders of dead runs into `target` and restores earlier
/// results stranded by a run killed mid-swap. Errors are ignored: tidying is a
/// courtesy, never a reason to fail a run.
fn tidy_leftovers(parent: &Path, name: &str, target: &Path) {
    let Ok(entries) = std::fs::read_dir(parent) else { return };
    let partial = format!(".{name}{PARTIAL}");
    let previous = format!(".{name}{PREVIOUS}");
    let mut stranded = Vec::new();
    for e in entries.flatten() {
        let file = e.file_name().to_string_lossy().into_owned();
        let (kind, pid) = if let Some(p) = file.strip_prefix(&partial) {
            (PARTIAL, p)
        } else if let Some(p) = file.strip_prefix(&previous) {
            (PREVIOUS, p)
        } else {
            continue;
        };
        let Ok(pid) = pid.parse::<u32>() else { continue };
        if !process_is_gone(pid) {
            continue;
        }
        if kind == PARTIAL {
            let _ = std::fs::remove_dir_all(e.path());
        } else {
            stranded.push(e.path());
        }
    }
    for old in stranded {
        if !target.exists() && old.join(RUN_INFO_FILE).exists() {
            let _ = std::fs::rename(&old, target);
        } else if target.join(RUN_INFO_FILE).exists() {
            // Newer results are in place: the stranded copy is superseded.
            let _ = std::fs::remove_dir_all(&old);
        }
    }
}

/// True only when the process is known not to exist (Linux `/proc`); false when
/// it exists or cannot be known.
fn process_is_gone(pid: u32) -> bool {
    if pid == std::process::id() {
        return false;
    }
    let proc_root = Path::new("/proc");
    cfg!(target_os = "linux") && proc_root.join("self").exists() && !proc_root.join(pid.to_string()).exists()
}

/// Writes `bytes` to `path` atomically: a reader sees the earlier file or the
/// new one, never a part; a failed write leaves the earlier file untouched.
/// For every single file written outside a staging folder (`report.html`,
/// `report.md` when `yieldshift report DIR` regenerates them) and for the run's
/// own small files (`run_info.json`, `shard.json`, `calibration.toml`).
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<()> {
    write_atomic_with(path, |f| f.write_all(bytes))
}

/// [`write_atomic`] with the content streamed by `fill` into the temporary file.
///
/// The temporary file sits in the same folder (so the rename cannot cross file
/// systems) under [`staging_name`]: the final name, the process id and a
/// per-process counter, so two files, two threads or two processes never stage
/// to the same name. The file is synced before the rename and the folder after
/// it where the platform allows, so the new content survives a crash.
pub fn write_atomic_with(path: &Path, fill: impl FnOnce(&mut std::fs::File) -> std::io::Result<()>) -> Result<()> {
    let tmp = staging_name(path)?;
    let written = std::fs::File::create(&tmp).and_then(|mut f| {
        fill(&mut f)?;
        f.sync_all()
    });
    if let Err(e) = written {
        let _ = std::fs::remove_file(&tmp);
        return Err(Error::io(format!("writing {}", path.display()), e));
    }
    if let Err(e) = std::fs::rename(&tmp, path) {
        let _ = std::fs::remove_file(&tmp);
        return Err(Error::io(format!("replacing {}", path.display()), e));
    }
    sync_folder(folder_of(path));
    Ok(())
}

/// The folder a file is in (`.` for a bare name).
fn folder_of(path: &Path) -> &Path {
    path.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."))
}

/// A fresh temporary name beside `path`: `.<name>.tmp-<pid>-<n>`.
pub fn staging_name(path: &Path) -> Result<PathBuf> {
    static NEXT: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(0);
    let Some(name) = path.file_name() else {
        return Err(Error::invalid(Problem::in_file(path, "is not a file name")));
    };
    let n = NEXT.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
    Ok(folder_of(path).join(format!(".{}.tmp-{}-{n}", name.to_string_lossy(), std::process::id())))
}

/// Makes a rename in `dir` durable (Unix: fsync of the folder); a courtesy, errors ignored.
fn sync_folder(dir: &Path) {
    #[cfg(unix)]
    if let Ok(d) = std::fs::File::open(dir) {
        let _ = d.sync_all();
    }
    #[cfg(not(unix))]
    let _ = dir;
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A pid that is not running: the largest pid Linux can hand out is 2²² (4 194 304).
    // Source: Linux kernel documentation, /proc/sys/kernel/pid_max ("PID_MAX_LIMIT, approximately 4 million").
    const DEAD_PID: u32 = 4_194_305;

    #[test]
    fn commit_replaces_earlier_results_and_leaves_nothing_beside() {
        let tmp = tempfile::tempdir().unwrap();
        let target = tmp.path().join("res");
        for round in 0..2 {
            let s = Staging::new(&target, false).unwrap();
            std::fs::write(s.dir().join(RUN_INFO_FILE), format!("{round}")).unwrap();
            s.commit().unwrap();
            assert_eq!(std::fs::read_to_string(target.join(RUN_INFO_FILE)).unwrap(), format!("{round}"));
        }
        let names: Vec<String> =
            std::fs::read_dir(tmp.path()).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).collect();
        assert_eq!(names, vec!["res".to_string()]);
    }

    #[test]
    fn a_dropped_staging_leaves_earlier_results_untouched() {
        let tmp = tempfile::tempdir().unwrap();
        let target = tmp.path().join("res");
        std::fs::create_dir(&target).unwrap();
        std::fs::write(target.join(RUN_INFO_FILE), "earlier").unwrap();
        {
            let s = Staging::new(&target, false).unwrap();
            std::fs::write(s.dir().join(RUN_INFO_FILE), "half-written").unwrap();
        }
        assert_eq!(std::fs::read_to_string(target.join(RUN_INFO_FILE)).unwrap(), "earlier");
        assert_eq!(std::fs::read_dir(tmp.path()).unwrap().count(), 1);
    }

    #[test]
    fn leftovers_of_a_killed_run_are_tidied() {
        if !(cfg!(target_os = "linux") && Path::new("/proc/self").exists()) || Path::new(&format!("/proc/{DEAD_PID}")).exists() {
            return;
        }
        let tmp = tempfile::tempdir().unwrap();
        let target = tmp.path().join("res");
        // Killed mid-swap: the earlier results sit in .previous-, DIR is missing.
        let stranded = tmp.path().join(format!(".res{PREVIOUS}{DEAD_PID}"));
        std::fs::create_dir(&stranded).unwrap();
        std::fs::write(stranded.join(RUN_INFO_FILE), "earlier").unwrap();
        let partial = tmp.path().join(format!(".res{PARTIAL}{DEAD_PID}"));
        std::fs::create_dir(&partial).unwrap();
        let s = Staging::new(&target, false).unwrap();
        assert_eq!(std::fs::read_to_string(target.join(RUN_INFO_FILE)).unwrap(), "earlier", "earlier results restored");
        assert!(!stranded.exists() && !partial.exists());
        drop(s);
        assert_eq!(std::fs::read_to_string(target.join(RUN_INFO_FILE)).unwrap(), "earlier");
    }

    #[test]
    fn refuses_unnamed_and_foreign_targets() {
        assert!(Staging::new(Path::new(".."), false).unwrap_err().is_invalid_input());
        let tmp = tempfile::tempdir().unwrap();
        std::fs::write(tmp.path().join("mine.txt"), "keep").unwrap();
        let e = Staging::new(tmp.path(), false).unwrap_err();
        assert!(e.to_string().contains("--force"), "{e}");
        assert_eq!(std::fs::read_to_string(tmp.path().join("mine.txt")).unwrap(), "keep");
    }

    #[test]
    fn atomic_writes_in_a_row_both_arrive_and_a_failure_keeps_the_earlier_file() {
        let tmp = tempfile::tempdir().unwrap();
        let (html, md) = (tmp.path().join("report.html"), tmp.path().join("report.md"));
        assert_ne!(staging_name(&html).unwrap(), staging_name(&md).unwrap());
        assert_ne!(staging_name(&html).unwrap(), staging_name(&html).unwrap());
        write_atomic(&html, b"<p>one</p>").unwrap();
        write_atomic(&md, b"one").unwrap();
        assert_eq!(std::fs::read_to_string(&html).unwrap(), "<p>one</p>");
        assert_eq!(std::fs::read_to_string(&md).unwrap(), "one");
        // A write that fails half-way: the earlier file stays, nothing is left beside it.
        let e = write_atomic_with(&html, |f| {
            f.write_all(b"<p>tw")?;
            Err(std::io::Error::other("disk full"))
        })
        .unwrap_err();
        assert!(e.to_string().contains("report.html"), "{e}");
        assert_eq!(std::fs::read_to_string(&html).unwrap(), "<p>one</p>");
        // A rename that fails (the target is a folder): the folder stays, no temporary file is left.
        let taken = tmp.path().join("taken");
        std::fs::create_dir(&taken).unwrap();
        std::fs::write(taken.join("keep"), "k").unwrap();
        assert!(write_atomic(&taken, b"x").is_err());
        assert_eq!(std::fs::read_to_string(taken.join("keep")).unwrap(), "k");
        let mut names: Vec<String> =
            std::fs::read_dir(tmp.path()).unwrap().map(|e| e.unwrap().file_name().to_string_lossy().into_owned()).collect();
        names.sort();
        assert_eq!(names, ["report.html", "report.md", "taken"]);
        write_atomic(&html, b"<p>two</p>").unwrap();
        assert_eq!(std::fs::read_to_string(&html).unwrap(), "<p>two</p>");
    }
}
