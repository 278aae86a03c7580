//! Safe output folders: results are written to a temporary folder beside the
//! target and moved into place only when the whole run succeeded, so a failed or
//! interrupted run leaves earlier results untouched.

use crate::error::{Error, Problem, Result};
use std::path::{Path, PathBuf};

/// Name of the marker file every yieldshift output folder contains.
pub const MARKER: &str = "run_info.json";

/// A staging folder that becomes the output folder on [`Staging::commit`].
#[derive(Debug)]
pub struct Staging {
    target: PathBuf,
    tmp: PathBuf,
    committed: bool,
}

impl Staging {
    /// Prepares to write `target`. Refuses a non-empty folder that does not look
    /// like a yieldshift output unless `force` is set.
    pub fn new(target: &Path, force: bool) -> Result<Staging> {
        if target.exists() {
            if !target.is_dir() {
                return Err(Error::invalid(Problem::in_file(target, "exists and is not a folder; choose another --out")));
            }
            let non_empty = std::fs::read_dir(target).map(|mut d| d.next().is_some()).unwrap_or(false);
            if non_empty && !target.join(MARKER).exists() && !force {
                return Err(Error::invalid(Problem::in_file(
                    target,
                    "is a non-empty folder that is not a yieldshift output; choose another --out or pass --force to replace it",
                )));
            }
        }
        let parent = target.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
        std::fs::create_dir_all(parent).map_err(|e| Error::io(format!("creating {}", parent.display()), e))?;
        let name = target.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "out".into());
        let tmp = parent.join(format!(".{name}.partial-{}", std::process::id()));
        if tmp.exists() {
            let _ = std::fs::remove_dir_all(&tmp);
        }
        std::fs::create_dir_all(&tmp).map_err(|e| Error::io(format!("creating {}", tmp.display()), e))?;
        Ok(Staging { target: target.to_path_buf(), tmp, committed: false })
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
        let old = self.tmp.with_extension("old");
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
