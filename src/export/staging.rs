//! All-or-nothing output folders.
//!
//! Files are written into a hidden staging folder beside the output folder, each synced to disk.
//! When every one is complete the staging folder becomes the output folder by renames: a new
//! folder is renamed into place; an earlier set is first renamed aside, then the staged one takes
//! its name, then the old one is deleted. A run killed at any moment therefore leaves the previous
//! complete set, or no output folder, or the new complete set — never a mix, never a half-written
//! file. Only when the output folder also holds files reknit did not write are the outputs
//! replaced one by one (the old `summary.json` removed first, the new one moved in last), so a
//! folder holding a `summary.json` always holds a complete, consistent set.

use super::ExportError;
use std::fs::{self, File};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

/// Every file name reknit may write into an output folder, `summary.json` last.
pub const OUTPUT_NAMES: &[&str] = &[
    "network.geojson",
    "plan.geojson",
    "sites.geojson",
    "qa.geojson",
    "work-orders.csv",
    "fragility.geojson",
    "backup.geojson",
    "plan.svg",
    "plan.png",
    "report.html",
    "summary.json",
];

/// The file whose presence marks a complete output set.
pub const COMPLETE_MARKER: &str = "summary.json";

const STAGING_PREFIX: &str = ".reknit-staging-";
const RETIRED_PREFIX: &str = ".reknit-retired-";

/// The absolute form of `p` with symbolic links resolved, for the part that exists.
fn resolved(p: &Path) -> std::path::PathBuf {
    let abs = std::path::absolute(p).unwrap_or_else(|_| p.to_path_buf());
    let mut head = abs.as_path();
    let mut tail = Vec::new();
    loop {
        if let Ok(c) = fs::canonicalize(head) {
            let mut r = c;
            for t in tail.iter().rev() {
                r.push(t);
            }
            return r;
        }
        match (head.parent(), head.file_name()) {
            (Some(parent), Some(name)) => {
                tail.push(name.to_os_string());
                head = parent;
            }
            _ => return abs,
        }
    }
}

/// Refuses an output folder that is an input's own folder or lies above an input: an output set
/// must never mix with or replace the files it was made from.
pub fn check_apart(out: &Path, inputs: &[&Path]) -> Result<(), ExportError> {
    let o = resolved(out);
    for &input in inputs {
        let i = resolved(input);
        if i.parent() == Some(o.as_path()) || i.starts_with(&o) {
            return Err(ExportError::OverInputs {
                out: out.to_path_buf(),
                input: input.to_path_buf(),
            });
        }
    }
    Ok(())
}

/// Checks, before any work is done, that `out` can take an output set (nothing is written).
pub fn preflight(out: &Path, force: bool) -> Result<(), ExportError> {
    match fs::symlink_metadata(out) {
        Ok(m) if m.is_dir() => {}
        Ok(m) if m.file_type().is_symlink() => {
            return Err(ExportError::Symlink(out.to_path_buf()));
        }
        Ok(_) => return Err(ExportError::NotAFolder(out.to_path_buf())),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(()),
        Err(source) => {
            return Err(ExportError::Io {
                path: out.to_path_buf(),
                source,
            });
        }
    }
    if !force {
        let existing: Vec<&str> = OUTPUT_NAMES
            .iter()
            .copied()
            .filter(|n| out.join(n).exists())
            .collect();
        if !existing.is_empty() {
            return Err(ExportError::WouldReplace {
                dir: out.to_path_buf(),
                files: existing.join(", "),
            });
        }
    }
    Ok(())
}

/// The folder that holds `out`, and `out`'s own name.
fn parent_and_name(out: &Path) -> (PathBuf, String) {
    let parent = match out.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let name = out
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "out".into());
    (parent, name)
}

/// Removes staging and retired folders left beside (or, from older versions, inside) `out` by
/// interrupted runs; a complete set is untouched.
pub fn remove_stale(out: &Path) {
    let (parent, name) = parent_and_name(out);
    let mine = |n: &str| {
        [STAGING_PREFIX, RETIRED_PREFIX].iter().any(|p| {
            n.strip_prefix(p)
                .is_some_and(|rest| rest.starts_with(&format!("{name}-")))
        })
    };
    for (dir, pick) in [(&parent, true), (&out.to_path_buf(), false)] {
        if let Ok(rd) = fs::read_dir(dir) {
            for entry in rd.flatten() {
                let n = entry.file_name().to_string_lossy().into_owned();
                let stale = if pick {
                    mine(&n)
                } else {
                    n.starts_with(STAGING_PREFIX)
                };
                if stale {
                    let _ = fs::remove_dir_all(entry.path());
                }
            }
        }
    }
}

/// A staging folder collecting one output set.
pub struct Staging {
    out: PathBuf,
    dir: PathBuf,
    written: std::sync::Mutex<Vec<String>>,
    committed: bool,
}

impl Staging {
    /// Creates a fresh staging folder beside `out` (and `out`'s parent folders if needed),
    /// clearing stale ones.
    pub fn begin(out: &Path, force: bool) -> Result<Staging, ExportError> {
        preflight(out, force)?;
        let io = |path: &Path| {
            let path = path.to_path_buf();
            move |source| ExportError::Io { path, source }
        };
        // Renames need a real name: "." or "a/.." become the folder they stand for.
        let out = &fs::canonicalize(out)
            .unwrap_or_else(|_| std::path::absolute(out).unwrap_or(out.to_path_buf()));
        let (parent, name) = parent_and_name(out);
        fs::create_dir_all(&parent).map_err(io(out))?;
        remove_stale(out);
        let dir = parent.join(format!("{STAGING_PREFIX}{name}-{}", std::process::id()));
        fs::create_dir(&dir).map_err(io(out))?;
        Ok(Staging {
            out: out.to_path_buf(),
            dir,
            written: Default::default(),
            committed: false,
        })
    }

    /// Writes one output file into the staging folder through `fill` (several may run in parallel).
    pub fn write<F>(&self, name: &str, fill: F) -> Result<(), ExportError>
    where
        F: FnOnce(&mut BufWriter<File>) -> std::io::Result<()>,
    {
        debug_assert!(
            OUTPUT_NAMES.contains(&name),
            "{name} missing from OUTPUT_NAMES"
        );
        let path = self.dir.join(name);
        let err = |source| ExportError::Io {
            path: self.out.join(name),
            source,
        };
        let f = File::create(&path).map_err(err)?;
        let mut w = BufWriter::with_capacity(1 << 20, f);
        fill(&mut w).map_err(err)?;
        w.flush().map_err(err)?;
        // Synced in commit, all together: the kernel writes this one back meanwhile.
        drop(w.into_inner().map_err(|e| err(e.into_error()))?);
        self.written
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .push(name.to_string());
        Ok(())
    }

    /// The names of the files written so far.
    pub fn names(&self) -> Vec<String> {
        self.written
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .clone()
    }

    /// Puts the staged set in place of any earlier one (see the module notes).
    pub fn commit(mut self) -> Result<(), ExportError> {
        let err = |path: PathBuf| move |source| ExportError::Io { path, source };
        // Every file on disk before any becomes visible (power loss must not leave empty files
        // behind complete-looking names).
        let names = self
            .written
            .get_mut()
            .unwrap_or_else(|p| p.into_inner())
            .clone();
        for n in &names {
            let p = self.dir.join(n);
            File::open(&p)
                .and_then(|f| f.sync_data())
                .map_err(err(self.out.join(n)))?;
        }
        let (parent, name) = parent_and_name(&self.out);
        let sync_parent = || {
            if let Ok(d) = File::open(&parent) {
                let _ = d.sync_all();
            }
        };
        if let Ok(d) = File::open(&self.dir) {
            let _ = d.sync_all();
        }
        let only_ours = |dir: &Path| {
            fs::read_dir(dir).is_ok_and(|rd| {
                rd.flatten().all(|e| {
                    let n = e.file_name().to_string_lossy().into_owned();
                    OUTPUT_NAMES.contains(&n.as_str()) || n.starts_with(STAGING_PREFIX)
                })
            })
        };
        if !self.out.exists() {
            fs::rename(&self.dir, &self.out).map_err(err(self.out.clone()))?;
            sync_parent();
        } else if only_ours(&self.out) {
            let retired = parent.join(format!("{RETIRED_PREFIX}{name}-{}", std::process::id()));
            fs::rename(&self.out, &retired).map_err(err(self.out.clone()))?;
            if let Err(e) = fs::rename(&self.dir, &self.out) {
                // Put the earlier set back rather than leave nothing.
                let _ = fs::rename(&retired, &self.out);
                return Err(err(self.out.clone())(e));
            }
            sync_parent();
            let _ = fs::remove_dir_all(&retired);
        } else {
            // The folder holds other files too: replace ours one by one, marker out first, in last.
            for n in std::iter::once(&COMPLETE_MARKER).chain(OUTPUT_NAMES.iter()) {
                let p = self.out.join(n);
                if p.exists() {
                    fs::remove_file(&p).map_err(err(p.clone()))?;
                }
            }
            let mut names =
                std::mem::take(self.written.get_mut().unwrap_or_else(|p| p.into_inner()));
            names.sort_by_key(|n| (n == COMPLETE_MARKER, n.clone()));
            for n in &names {
                let to = self.out.join(n);
                fs::rename(self.dir.join(n), &to).map_err(err(to.clone()))?;
            }
            if let Ok(d) = File::open(&self.out) {
                let _ = d.sync_all();
            }
            let _ = fs::remove_dir(&self.dir);
        }
        self.committed = true;
        Ok(())
    }
}

impl Drop for Staging {
    fn drop(&mut self) {
        if !self.committed {
            let _ = fs::remove_dir_all(&self.dir);
        }
    }
}
