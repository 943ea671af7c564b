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
//!
//! Every output folder carries a record of the files reknit wrote into it ([`RECORD`]); `--force`
//! replaces only those. A file or folder that merely has an output's name is never touched.
//! Staging and retired folders carry the output's exact name, the process id and a nonce, and are
//! locked by their process while it runs, so clean-up removes only abandoned folders of the very
//! same output, never a running neighbour's.

use super::ExportError;
use super::guard::CheckedOut;
use super::ownership::{Survey, write_record};
use std::fs::{self, File};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

pub use super::ownership::{COMPLETE_MARKER, OUTPUT_NAMES, RECORD};

const STAGING_PREFIX: &str = ".reknit-staging-";
const RETIRED_PREFIX: &str = ".reknit-retired-";

/// Checks, before any work is done, that `out` can take an output set (nothing is written).
pub fn preflight(out: &CheckedOut, force: bool) -> Result<(), ExportError> {
    // An abandoned run may have left the previous set aside: put it back before judging.
    remove_stale(out.resolved());
    let Some(survey) = Survey::of(out.given())? else {
        return Ok(());
    };
    survey.refuse_foreign(out.given())?;
    if !force && !survey.owned.is_empty() {
        return Err(ExportError::WouldReplace {
            dir: out.given().to_path_buf(),
            files: survey.owned.join(", "),
        });
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

/// True when `entry` is `prefix` + `name` + `-PID-NONCE` exactly (both decimal).
fn is_own_temp(entry: &str, prefix: &str, name: &str) -> bool {
    let Some(rest) = entry
        .strip_prefix(prefix)
        .and_then(|r| r.strip_prefix(name))
        .and_then(|r| r.strip_prefix('-'))
    else {
        return false;
    };
    let digits = |s: &str| !s.is_empty() && s.bytes().all(|b| b.is_ascii_digit());
    rest.split_once('-')
        .is_some_and(|(pid, nonce)| digits(pid) && digits(nonce))
}

/// Opens a folder and takes its lock without waiting: `Some` when no running process holds it.
fn lock_if_abandoned(dir: &Path) -> Option<File> {
    let f = File::open(dir).ok()?;
    f.try_lock().ok()?;
    Some(f)
}

/// Removes the staging and retired folders of `out` (exact name) that interrupted runs left; a
/// running process's folders are locked and untouched. When `out` itself is missing because a run
/// died between its two renames, the previous set is put back.
pub fn remove_stale(out: &Path) {
    let (parent, name) = parent_and_name(out);
    let Ok(rd) = fs::read_dir(&parent) else {
        return;
    };
    let mut entries: Vec<String> = rd
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .collect();
    entries.sort();
    for n in entries {
        let retired = is_own_temp(&n, RETIRED_PREFIX, &name);
        if !retired && !is_own_temp(&n, STAGING_PREFIX, &name) {
            continue;
        }
        let p = parent.join(&n);
        if fs::symlink_metadata(&p).map_or(true, |m| !m.is_dir()) {
            continue;
        }
        let Some(_lock) = lock_if_abandoned(&p) else {
            continue;
        };
        if retired && fs::symlink_metadata(out).is_err() && fs::rename(&p, out).is_ok() {
            continue;
        }
        let _ = fs::remove_dir_all(&p);
    }
}

/// A name for a temporary folder of this process that no other run uses.
fn temp_name(prefix: &str, name: &str) -> String {
    use std::sync::atomic::{AtomicU64, Ordering};
    static COUNTER: AtomicU64 = AtomicU64::new(0);
    let nanos = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.subsec_nanos() as u64);
    let nonce = COUNTER.fetch_add(1, Ordering::Relaxed) * 1_000_000_000 + nanos;
    format!("{prefix}{name}-{}-{nonce}", std::process::id())
}

/// A staging folder collecting one output set.
pub struct Staging {
    out: PathBuf,
    given: PathBuf,
    dir: PathBuf,
    written: std::sync::Mutex<Vec<String>>,
    committed: bool,
    force: bool,
    /// Parent folders this run created, deepest first: removed again when it fails.
    created: Vec<PathBuf>,
    _lock: Option<File>,
}

impl Staging {
    /// Creates a fresh staging folder beside `out` (and `out`'s parent folders if needed),
    /// clearing abandoned ones.
    pub fn begin(out: &CheckedOut, force: bool) -> Result<Staging, ExportError> {
        let io = |path: &Path| {
            let path = path.to_path_buf();
            move |source| ExportError::Io { path, source }
        };
        let (parent, name) = parent_and_name(out.resolved());
        let created: Vec<PathBuf> = parent
            .ancestors()
            .take_while(|a| fs::symlink_metadata(a).is_err())
            .map(Path::to_path_buf)
            .collect();
        fs::create_dir_all(&parent).map_err(io(out.given()))?;
        preflight(out, force)?;
        let dir = parent.join(temp_name(STAGING_PREFIX, &name));
        fs::create_dir(&dir).map_err(io(out.given()))?;
        let lock = File::open(&dir).ok().filter(|f| f.lock().is_ok());
        Ok(Staging {
            out: out.resolved().to_path_buf(),
            given: out.given().to_path_buf(),
            dir,
            written: Default::default(),
            committed: false,
            force,
            created,
            _lock: lock,
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
            path: self.given.join(name),
            source,
        };
        let f = File::create(&path).map_err(err)?;
        // Big layers hand over blocks of about a megabyte: a block at least as long as the
        // buffer goes straight to the file instead of being copied through the buffer first.
        let mut w = BufWriter::with_capacity(1 << 18, f);
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

    /// Writes one output file that `make` creates itself at the path it is given (a database,
    /// which SQLite opens by name); the file is staged and committed like every other.
    pub fn write_at<F>(&self, name: &str, make: F) -> Result<(), ExportError>
    where
        F: FnOnce(&Path) -> std::io::Result<()>,
    {
        debug_assert!(
            OUTPUT_NAMES.contains(&name),
            "{name} missing from OUTPUT_NAMES"
        );
        make(&self.dir.join(name)).map_err(|source| ExportError::Io {
            path: self.given.join(name),
            source,
        })?;
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
        let mut names = std::mem::take(self.written.get_mut().unwrap_or_else(|p| p.into_inner()));
        names.sort_by_key(|n| (n == COMPLETE_MARKER, n.clone()));
        let survey = self.judge(Survey::of(&self.out)?)?;
        match survey {
            None => {
                self.seal(&names, true)?;
                fs::rename(&self.dir, &self.out).map_err(self.io(&self.given))?;
                self.sync_parent();
            }
            Some(s) if s.only_ours() && !holds_working_folder(&self.out) => {
                self.seal(&names, true)?;
                if !self.swap()? {
                    let again = self.judge(Survey::of(&self.out)?)?.unwrap_or_default();
                    self.replace_files(&names, &again)?;
                }
            }
            Some(s) => self.replace_files(&names, &s)?,
        }
        self.committed = true;
        Ok(())
    }

    /// Refuses, at the last moment, what the set may not replace: entries reknit did not write,
    /// and (without `--force`) outputs another run put there since this one began.
    fn judge(&self, survey: Option<Survey>) -> Result<Option<Survey>, ExportError> {
        if let Some(s) = &survey {
            s.refuse_foreign(&self.given)?;
            if !self.force && !s.owned.is_empty() {
                return Err(ExportError::WouldReplace {
                    dir: self.given.clone(),
                    files: s.owned.join(", "),
                });
            }
        }
        Ok(survey)
    }

    fn io(&self, path: &Path) -> impl Fn(std::io::Error) -> ExportError {
        let path = path.to_path_buf();
        move |source| ExportError::Io {
            path: path.clone(),
            source,
        }
    }

    fn sync_parent(&self) {
        if let Some(d) = self.out.parent().and_then(|p| File::open(p).ok()) {
            let _ = d.sync_all();
        }
    }

    /// Writes the record into the staging folder and syncs every staged file and the folder.
    fn seal(&self, names: &[String], made: bool) -> Result<(), ExportError> {
        write_record(&self.dir, names, made).map_err(self.io(&self.given.join(RECORD)))?;
        // Every file on disk before any becomes visible (power loss must not leave empty files
        // behind complete-looking names).
        for n in names.iter().map(String::as_str).chain([RECORD]) {
            File::open(self.dir.join(n))
                .and_then(|f| f.sync_data())
                .map_err(self.io(&self.given.join(n)))?;
        }
        if let Ok(d) = File::open(&self.dir) {
            let _ = d.sync_all();
        }
        Ok(())
    }

    /// Replaces reknit's own folder by the staged one; `false` (nothing changed) when the folder,
    /// looked at again under its lock, is no longer reknit's alone.
    fn swap(&self) -> Result<bool, ExportError> {
        let (parent, name) = parent_and_name(&self.out);
        // Wait for any other run swapping this very folder, then look again under its lock.
        let held = File::open(&self.out).map_err(self.io(&self.given))?;
        held.lock().map_err(self.io(&self.given))?;
        if !self
            .judge(Survey::of(&self.out)?)?
            .is_some_and(|s| s.only_ours())
        {
            return Ok(false);
        }
        let retired = parent.join(temp_name(RETIRED_PREFIX, &name));
        fs::rename(&self.out, &retired).map_err(self.io(&self.given))?;
        // A file saved into the folder in the meantime makes it the user's again: put it back.
        if !Survey::of(&retired)?.is_some_and(|s| s.only_ours()) {
            fs::rename(&retired, &self.out).map_err(self.io(&self.given))?;
            return Ok(false);
        }
        if let Err(e) = fs::rename(&self.dir, &self.out) {
            // Put the earlier set back rather than leave nothing.
            let _ = fs::rename(&retired, &self.out);
            return Err(self.io(&self.given)(e));
        }
        self.sync_parent();
        let _ = fs::remove_dir_all(&retired);
        Ok(true)
    }

    /// Replaces reknit's recorded files one by one inside a folder that is not reknit's alone:
    /// marker out first, in last, under a record naming old and new so that a run stopped
    /// midway leaves nothing unaccounted for.
    fn replace_files(&self, names: &[String], s: &Survey) -> Result<(), ExportError> {
        let made = s.record && s.made_by_reknit;
        self.seal(names, made)?;
        let mut union = s.owned.clone();
        union.extend(names.iter().cloned());
        union.sort();
        union.dedup();
        write_record(&self.out, &union, made).map_err(self.io(&self.given.join(RECORD)))?;
        let old = s.owned.iter().map(String::as_str);
        for n in std::iter::once(COMPLETE_MARKER).chain(old) {
            let p = self.out.join(n);
            if fs::symlink_metadata(&p).is_ok_and(|m| m.is_file()) {
                fs::remove_file(&p).map_err(self.io(&self.given.join(n)))?;
            }
        }
        for n in names {
            fs::rename(self.dir.join(n), self.out.join(n)).map_err(self.io(&self.given.join(n)))?;
        }
        fs::rename(self.dir.join(RECORD), self.out.join(RECORD))
            .map_err(self.io(&self.given.join(RECORD)))?;
        if let Ok(d) = File::open(&self.out) {
            let _ = d.sync_all();
        }
        let _ = fs::remove_dir(&self.dir);
        Ok(())
    }
}

/// True when `out` is the working folder or holds it: such a folder is never swapped away from
/// under the user's shell.
fn holds_working_folder(out: &Path) -> bool {
    std::env::current_dir()
        .ok()
        .and_then(|c| fs::canonicalize(c).ok())
        .is_some_and(|c| c.starts_with(out))
}

impl Drop for Staging {
    fn drop(&mut self) {
        if !self.committed {
            let _ = fs::remove_dir_all(&self.dir);
            for d in &self.created {
                // Only while empty: another run may have put its own outputs there meanwhile.
                let _ = fs::remove_dir(d);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn temp_names_match_their_own_output_only() {
        let n = temp_name(STAGING_PREFIX, "cc");
        assert!(is_own_temp(&n, STAGING_PREFIX, "cc"));
        assert!(!is_own_temp(&n, RETIRED_PREFIX, "cc"));
        let n2 = temp_name(STAGING_PREFIX, "cc-2");
        assert!(!is_own_temp(&n2, STAGING_PREFIX, "cc"), "{n2}");
        assert!(is_own_temp(&n2, STAGING_PREFIX, "cc-2"));
        let v = temp_name(STAGING_PREFIX, "north-vale");
        assert!(!is_own_temp(&v, STAGING_PREFIX, "north"));
        assert!(!is_own_temp(
            ".reknit-staging-north-12",
            STAGING_PREFIX,
            "north"
        ));
        assert!(!is_own_temp(
            ".reknit-staging-north-1-2-3",
            STAGING_PREFIX,
            "north"
        ));
        assert_ne!(n, temp_name(STAGING_PREFIX, "cc"));
    }

    #[test]
    fn a_running_staging_folder_is_left_alone() {
        let t = tempfile::tempdir().unwrap();
        let out = t.path().join("north");
        let live = t.path().join(temp_name(STAGING_PREFIX, "north"));
        let dead = t.path().join(temp_name(STAGING_PREFIX, "north"));
        fs::create_dir(&live).unwrap();
        fs::create_dir(&dead).unwrap();
        let held = File::open(&live).unwrap();
        held.lock().unwrap();
        remove_stale(&out);
        assert!(
            live.exists(),
            "a locked staging folder belongs to a running process"
        );
        assert!(!dead.exists(), "an unlocked one was abandoned");
    }
}
