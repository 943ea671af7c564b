//! The output guard: the one check every command passes before it may write anything.
//!
//! An output folder must never mix with or replace what a run reads. Paths are compared resolved:
//! absolute, with symbolic links followed for the part that exists and `..` applied after that
//! (so `data/new/..` is `data` even when `data/new` does not exist). A command gets a
//! [`CheckedOut`] only from [`check_out`], and staging an output set needs one, so no command
//! can write without the check.

use super::ExportError;
use std::collections::BTreeMap;
use std::path::{Component, Path, PathBuf};

/// Something a run reads: a file, or a folder read as a whole.
#[derive(Debug, Clone, Copy)]
pub enum InputPath<'a> {
    /// A file (its folder, sidecars included, is off limits as an output folder).
    File(&'a Path),
    /// A folder read as a whole (nothing may be written inside it, nor may it be inside the output).
    Folder(&'a Path),
}

/// An output folder that has passed the guard for a given set of inputs.
#[derive(Debug, Clone)]
pub struct CheckedOut {
    given: PathBuf,
    resolved: PathBuf,
}

impl CheckedOut {
    /// The output folder as the user gave it (for messages).
    pub fn given(&self) -> &Path {
        &self.given
    }

    /// The resolved absolute output folder (for renames: never `.` or `a/..`).
    pub fn resolved(&self) -> &Path {
        &self.resolved
    }
}

/// The absolute form of `p`: symbolic links followed as far as the path exists, `.` dropped and
/// `..` applied to what came before (after links were followed, as the operating system does).
pub fn resolve(p: &Path) -> PathBuf {
    let abs = std::path::absolute(p).unwrap_or_else(|_| p.to_path_buf());
    let mut r = PathBuf::new();
    let mut exists = true;
    for c in abs.components() {
        match c {
            Component::Prefix(_) | Component::RootDir => r.push(c.as_os_str()),
            Component::CurDir => {}
            Component::ParentDir => {
                r.pop();
            }
            Component::Normal(n) => {
                r.push(n);
                if exists {
                    match std::fs::canonicalize(&r) {
                        Ok(c) => r = c,
                        Err(_) => exists = false,
                    }
                }
            }
        }
        if matches!(c, Component::ParentDir) && !exists {
            // Back on a path that may exist again (`new/..`): follow links from here on.
            exists = std::fs::symlink_metadata(&r).is_ok();
            if exists && let Ok(c) = std::fs::canonicalize(&r) {
                r = c;
            }
        }
    }
    r
}

/// Checks that `out` may take an output set made from `inputs`: it is not the folder holding an
/// input file, does not contain an input, and neither lies inside nor contains an input folder.
pub fn check_out(out: &Path, inputs: &[InputPath]) -> Result<CheckedOut, ExportError> {
    let o = resolve(out);
    if o.parent().is_none() {
        return Err(ExportError::RootFolder(out.to_path_buf()));
    }
    for input in inputs {
        let (given, why) = match *input {
            InputPath::File(f) => {
                // A file given through a link is read where the link points, but its sidecars
                // (a Shapefile's .dbf, .shx, .prj) are looked for beside the link: both count.
                let beside = match (f.parent(), f.file_name()) {
                    (Some(p), Some(n)) => Some(
                        resolve(if p.as_os_str().is_empty() {
                            Path::new(".")
                        } else {
                            p
                        })
                        .join(n),
                    ),
                    _ => None,
                };
                let why = [Some(resolve(f)), beside]
                    .into_iter()
                    .flatten()
                    .find_map(|i| {
                        if i == o {
                            Some("is the input")
                        } else if i.parent() == Some(o.as_path()) {
                            Some("is the folder holding the input")
                        } else if i.starts_with(&o) {
                            Some("contains the input")
                        } else {
                            None
                        }
                    });
                (f, why)
            }
            InputPath::Folder(f) => {
                let i = resolve(f);
                let why = if i == o {
                    Some("is the input folder")
                } else if o.starts_with(&i) {
                    Some("lies inside the input folder")
                } else if i.starts_with(&o) {
                    Some("contains the input folder")
                } else {
                    None
                };
                (f, why)
            }
        };
        if let Some(why) = why {
            return Err(ExportError::OverInputs {
                out: out.to_path_buf(),
                input: given.to_path_buf(),
                why,
            });
        }
    }
    // `link/` would follow the link where `link` does not: the given path loses trailing slashes.
    Ok(CheckedOut {
        given: out.components().collect(),
        resolved: o,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn resolves_dot_dot_through_missing_folders() {
        let t = tempfile::tempdir().unwrap();
        let d = t.path().join("data");
        std::fs::create_dir(&d).unwrap();
        let canon = std::fs::canonicalize(&d).unwrap();
        assert_eq!(resolve(&d.join("new/..")), canon);
        assert_eq!(resolve(&d.join("new/deeper/../..")), canon);
        assert_eq!(resolve(&d.join("./x/./y")), canon.join("x/y"));
    }

    #[test]
    fn follows_links_before_dot_dot() {
        let t = tempfile::tempdir().unwrap();
        let root = std::fs::canonicalize(t.path()).unwrap();
        std::fs::create_dir_all(root.join("a/b")).unwrap();
        std::os::unix::fs::symlink(root.join("a/b"), root.join("link")).unwrap();
        // link/.. is a (the link's target's parent), as the operating system resolves it.
        assert_eq!(resolve(&root.join("link/..")), root.join("a"));
    }

    #[test]
    fn refuses_the_folders_around_inputs_and_allows_a_sibling() {
        let t = tempfile::tempdir().unwrap();
        let d = t.path().join("data");
        std::fs::create_dir(&d).unwrap();
        let roads = d.join("roads.geojson");
        std::fs::write(&roads, "{}").unwrap();
        let f = [InputPath::File(&roads)];
        for bad in [
            d.clone(),
            d.join("new/.."),
            t.path().to_path_buf(),
            roads.clone(),
        ] {
            assert!(check_out(&bad, &f).is_err(), "{}", bad.display());
        }
        assert!(check_out(&d.join("plan-folder"), &f).is_ok());
        assert!(check_out(&t.path().join("elsewhere"), &f).is_ok());
        let folder = [InputPath::Folder(&d)];
        assert!(check_out(&d.join("plan-folder"), &folder).is_err());
        assert!(check_out(t.path(), &folder).is_err());
        assert!(check_out(&t.path().join("other"), &folder).is_ok());
        assert!(check_out(Path::new("/"), &[]).is_err());
    }
}

/// The folders holding a list of inputs, resolved once, for checking many output folders.
pub struct InputIndex {
    /// Resolved folder → index of the first input it holds.
    dirs: BTreeMap<PathBuf, usize>,
}

impl InputIndex {
    /// Indexes the folders of `inputs` (for a link, both the link's folder and its target's).
    pub fn new(inputs: &[PathBuf]) -> InputIndex {
        let mut dirs = BTreeMap::new();
        for (i, p) in inputs.iter().enumerate() {
            let parent = p.parent().unwrap_or(Path::new("."));
            let parent = if parent.as_os_str().is_empty() {
                Path::new(".")
            } else {
                parent
            };
            dirs.entry(resolve(parent)).or_insert(i);
            if let Some(target) = std::fs::canonicalize(p)
                .ok()
                .as_deref()
                .and_then(Path::parent)
            {
                dirs.entry(target.to_path_buf()).or_insert(i);
            }
        }
        InputIndex { dirs }
    }

    /// The input (by index) whose folder is `out` or lies inside `out`, if any.
    pub fn clash(&self, out: &Path) -> Option<usize> {
        let o = resolve(out);
        // Paths order component by component, so the folders inside `o` follow it directly.
        self.dirs
            .range(o.clone()..)
            .next()
            .filter(|(d, _)| d.starts_with(&o))
            .map(|(_, &i)| i)
    }
}

#[cfg(test)]
mod index_tests {
    use super::*;

    /// The input whose folder is `out` or lies inside it, through the index.
    fn check_apart(out: &Path, inputs: &[PathBuf]) -> Result<(), PathBuf> {
        match InputIndex::new(inputs).clash(out) {
            Some(i) => Err(inputs[i].clone()),
            None => Ok(()),
        }
    }

    #[test]
    fn folders_holding_inputs_are_refused() {
        let d = tempfile::tempdir().unwrap();
        let root = d.path();
        std::fs::create_dir_all(root.join("a/b")).unwrap();
        std::fs::write(root.join("a/b/roads.geojson"), "x").unwrap();
        let inputs = vec![root.join("a/b/roads.geojson")];
        assert!(
            check_apart(&root.join("a/b"), &inputs).is_err(),
            "the input's folder"
        );
        assert!(
            check_apart(&root.join("a"), &inputs).is_err(),
            "a folder above"
        );
        assert!(
            check_apart(&root.join("a/b/c"), &inputs).is_ok(),
            "inside is apart"
        );
        assert!(
            check_apart(&root.join("a/bc"), &inputs).is_ok(),
            "a name sharing a prefix"
        );
        assert!(
            check_apart(&root.join("x/../a/b"), &inputs).is_err(),
            "`..` normalised"
        );
        assert!(
            check_apart(&root.join("a/new/../b"), &inputs).is_err(),
            "in a missing part"
        );
        std::os::unix::fs::symlink(root.join("a"), root.join("link")).unwrap();
        assert!(
            check_apart(&root.join("link/b"), &inputs).is_err(),
            "through a link"
        );
        std::os::unix::fs::symlink(root.join("a/b/roads.geojson"), root.join("r.geojson")).unwrap();
        let linked = vec![root.join("r.geojson")];
        assert!(
            check_apart(&root.join("a/b"), &linked).is_err(),
            "a link's target"
        );
    }
}
