//! All-or-nothing output folders.
//!
//! Files are written into a hidden staging folder inside the output folder and moved into place only
//! when every one is complete, `summary.json` last. A folder holding a `summary.json` therefore holds
//! a complete, consistent output set; a run killed at any point leaves at worst a folder without one.

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

/// Removes staging folders left by interrupted runs (a complete set beside them is untouched).
pub fn remove_stale(out: &Path) {
    if let Ok(rd) = fs::read_dir(out) {
        for entry in rd.flatten() {
            if entry
                .file_name()
                .to_string_lossy()
                .starts_with(STAGING_PREFIX)
            {
                let _ = fs::remove_dir_all(entry.path());
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
    created_out: bool,
}

impl Staging {
    /// Creates `out` if needed and a fresh staging folder inside it, clearing stale ones.
    pub fn begin(out: &Path, force: bool) -> Result<Staging, ExportError> {
        preflight(out, force)?;
        let io = |path: &Path| {
            let path = path.to_path_buf();
            move |source| ExportError::Io { path, source }
        };
        let created_out = !out.exists();
        fs::create_dir_all(out).map_err(io(out))?;
        if let Ok(rd) = fs::read_dir(out) {
            for entry in rd.flatten() {
                if entry
                    .file_name()
                    .to_string_lossy()
                    .starts_with(STAGING_PREFIX)
                {
                    let _ = fs::remove_dir_all(entry.path());
                }
            }
        }
        let dir = out.join(format!("{STAGING_PREFIX}{}", std::process::id()));
        if let Err(e) = fs::create_dir(&dir) {
            if created_out {
                let _ = fs::remove_dir(out);
            }
            return Err(io(&dir)(e));
        }
        Ok(Staging {
            out: out.to_path_buf(),
            dir,
            written: Default::default(),
            committed: false,
            created_out,
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
        let f = w.into_inner().map_err(|e| err(e.into_error()))?;
        f.sync_data().map_err(err)?;
        self.written
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .push(name.to_string());
        Ok(())
    }

    /// Moves the staged files into the output folder, replacing any earlier set, `summary.json` last.
    pub fn commit(mut self) -> Result<(), ExportError> {
        let err = |path: PathBuf| move |source| ExportError::Io { path, source };
        // Retire the old set first: without its marker it no longer looks complete.
        for name in std::iter::once(&COMPLETE_MARKER).chain(OUTPUT_NAMES.iter()) {
            let p = self.out.join(name);
            if p.exists() {
                fs::remove_file(&p).map_err(err(p.clone()))?;
            }
        }
        let mut names = std::mem::take(self.written.get_mut().unwrap_or_else(|p| p.into_inner()));
        names.sort_by_key(|n| (n == COMPLETE_MARKER, n.clone()));
        for name in &names {
            let to = self.out.join(name);
            fs::rename(self.dir.join(name), &to).map_err(err(to.clone()))?;
        }
        if let Ok(d) = File::open(&self.out) {
            let _ = d.sync_all();
        }
        let _ = fs::remove_dir(&self.dir);
        self.committed = true;
        Ok(())
    }
}

impl Drop for Staging {
    fn drop(&mut self) {
        if !self.committed {
            let _ = fs::remove_dir_all(&self.dir);
            if self.created_out {
                // Only succeeds when empty: a failed run leaves no trace of a folder it made.
                let _ = fs::remove_dir(&self.out);
            }
        }
    }
}
