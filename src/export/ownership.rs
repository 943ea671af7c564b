//! Which files of an output folder are reknit's: the names it writes, and the record it keeps of
//! what it wrote, so that replacing outputs never touches a file that merely has an output's name.

use super::ExportError;
use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Every file name reknit may write into an output folder, `summary.json` last.
pub const OUTPUT_NAMES: &[&str] = &[
    "network.geojson",
    "plan.geojson",
    "sites.geojson",
    "qa.geojson",
    "work-orders.csv",
    "single-failures.geojson",
    "backup.geojson",
    "corridors.geojson",
    "changes.geojson",
    "layers.gpkg",
    "plan.svg",
    "plan.png",
    "report.html",
    "map.html",
    "summary.json",
];

/// The file whose presence marks a complete output set.
pub const COMPLETE_MARKER: &str = "summary.json";

/// The hidden file in every output folder listing the files reknit wrote there.
pub const RECORD: &str = ".reknit-outputs";

const RECORD_HEADER: &str = "reknit output set: the files below were written by reknit; its next run with --force replaces them";

/// The record's line saying reknit made the folder itself (so it may replace the whole folder).
const MADE_LINE: &str = "# folder made by reknit";

/// What an existing output folder holds.
#[derive(Debug, Default)]
pub struct Survey {
    /// Outputs reknit recorded writing, present as regular files.
    pub owned: Vec<String>,
    /// Entries with an output's name (or the record's) that reknit did not write, and what each is.
    pub foreign: Vec<(String, &'static str)>,
    /// The folder holds a valid record.
    pub record: bool,
    /// The record says reknit made the folder itself (not a folder the user made or chose).
    pub made_by_reknit: bool,
    /// The folder holds other entries too (the user's own files).
    pub other: bool,
}

impl Survey {
    /// Looks at `out`: `None` when it does not exist; an error when it is not a plain folder.
    pub fn of(out: &Path) -> Result<Option<Survey>, ExportError> {
        match fs::symlink_metadata(out) {
            Ok(m) if m.is_dir() => {}
            Ok(m) if m.file_type().is_symlink() => {
                return Err(ExportError::Symlink(out.to_path_buf()));
            }
            Ok(_) => return Err(ExportError::NotAFolder(out.to_path_buf())),
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(None),
            Err(source) => {
                return Err(ExportError::Io {
                    path: out.to_path_buf(),
                    source,
                });
            }
        }
        let io = |source| ExportError::Io {
            path: out.to_path_buf(),
            source,
        };
        let mut s = Survey::default();
        let mut named = Vec::new();
        for e in fs::read_dir(out).map_err(io)? {
            let e = e.map_err(io)?;
            let n = e.file_name().to_string_lossy().into_owned();
            let m = fs::symlink_metadata(e.path()).map_err(io)?;
            let kind = if m.is_file() {
                None
            } else if m.is_dir() {
                Some("a folder")
            } else if m.file_type().is_symlink() {
                Some("a symbolic link")
            } else {
                Some("not a regular file")
            };
            if n == RECORD {
                match kind {
                    None => s.record = true,
                    Some(k) => s.foreign.push((n, k)),
                }
            } else if OUTPUT_NAMES.contains(&n.as_str()) {
                named.push((n, kind));
            } else {
                s.other = true;
            }
        }
        let listed = if s.record {
            read_record(&out.join(RECORD))
        } else {
            None
        };
        if s.record && listed.is_none() {
            s.record = false;
            s.foreign.push((RECORD.into(), "not a record reknit wrote"));
        }
        let (listed, made) = listed.unwrap_or_default();
        s.made_by_reknit = made;
        named.sort();
        for (n, kind) in named {
            match kind {
                Some(k) => s.foreign.push((n, k)),
                None if listed.contains(&n) => s.owned.push(n),
                None => s
                    .foreign
                    .push((n, "a file reknit has no record of writing")),
            }
        }
        Ok(Some(s))
    }

    /// True when reknit made the folder and it holds nothing but reknit's recorded outputs and
    /// the record: only then may the whole folder be replaced.
    pub fn only_ours(&self) -> bool {
        self.record && self.made_by_reknit && self.foreign.is_empty() && !self.other
    }

    /// Refuses a folder holding an entry with an output's name that reknit did not write.
    pub fn refuse_foreign(&self, out: &Path) -> Result<(), ExportError> {
        match self.foreign.first() {
            None => Ok(()),
            Some((name, what)) => Err(ExportError::NotOurs {
                path: out.join(name),
                what,
            }),
        }
    }
}

/// The names listed in a record and whether reknit made the folder, or `None` when the file is
/// not a record.
fn read_record(p: &Path) -> Option<(Vec<String>, bool)> {
    let f = fs::File::open(p).ok()?;
    let mut text = String::new();
    // A record lists at most a dozen short names: read no more than a few kilobytes of it.
    std::io::Read::read_to_string(&mut std::io::Read::take(f, 16 * 1024), &mut text).ok()?;
    let mut lines = text.lines();
    if lines.next()? != RECORD_HEADER {
        return None;
    }
    let mut made = false;
    let mut names = Vec::new();
    for l in lines {
        if l == MADE_LINE {
            made = true;
        } else if OUTPUT_NAMES.contains(&l) {
            names.push(l.to_string());
        }
    }
    Some((names, made))
}

/// Writes the record listing `names` into `dir`, atomically (a temporary file renamed in place);
/// `made` says reknit made the folder itself.
pub fn write_record(dir: &Path, names: &[String], made: bool) -> std::io::Result<()> {
    let tmp: PathBuf = dir.join(format!("{RECORD}.tmp-{}", std::process::id()));
    let mut f = fs::File::create(&tmp)?;
    writeln!(f, "{RECORD_HEADER}")?;
    if made {
        writeln!(f, "{MADE_LINE}")?;
    }
    for n in names {
        writeln!(f, "{n}")?;
    }
    f.sync_data()?;
    drop(f);
    fs::rename(&tmp, dir.join(RECORD)).inspect_err(|_| {
        let _ = fs::remove_file(&tmp);
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_recorded_file_is_ours_and_a_same_named_one_is_not() {
        let t = tempfile::tempdir().unwrap();
        let d = t.path();
        fs::write(d.join("plan.geojson"), "x").unwrap();
        fs::create_dir(d.join("network.geojson")).unwrap();
        fs::write(d.join("notes.txt"), "mine").unwrap();
        let s = Survey::of(d).unwrap().unwrap();
        assert!(s.owned.is_empty());
        assert_eq!(s.foreign.len(), 2);
        assert!(s.other && !s.record && !s.only_ours());
        write_record(d, &["plan.geojson".into()], false).unwrap();
        let s = Survey::of(d).unwrap().unwrap();
        assert_eq!(s.owned, vec!["plan.geojson".to_string()]);
        assert_eq!(s.foreign, vec![("network.geojson".into(), "a folder")]);
        assert!(!s.made_by_reknit, "a folder the user made stays theirs");
        fs::write(d.join(RECORD), "plan.geojson\n").unwrap();
        let s = Survey::of(d).unwrap().unwrap();
        assert!(
            s.owned.is_empty(),
            "a forged record without its header names nothing"
        );
    }
}
