//! Output folders kept apart from inputs, checked before any district runs: no district's output
//! folder may be, or hold, the folder of any district's input or of the manifest.
//!
//! Paths are compared resolved: absolute, symbolic links resolved for the part that exists, `.`
//! and `..` taken lexically in the part that does not. An input given through a link is checked
//! both where the link is and where it points.

use std::collections::BTreeMap;
use std::path::{Component, Path, PathBuf};

/// The absolute form of `p`, symbolic links resolved for the longest part that exists and the rest
/// normalised lexically.
pub fn resolve(p: &Path) -> PathBuf {
    let abs = std::path::absolute(p).unwrap_or_else(|_| p.to_path_buf());
    let comps: Vec<Component> = abs.components().collect();
    for cut in (1..=comps.len()).rev() {
        let head: PathBuf = comps[..cut].iter().collect();
        if let Ok(base) = std::fs::canonicalize(&head) {
            return lexical(base, &comps[cut..]);
        }
    }
    lexical(PathBuf::new(), &comps)
}

/// `base` with `rest` pushed on, `.` skipped and `..` removing the last component.
fn lexical(mut base: PathBuf, rest: &[Component]) -> PathBuf {
    for c in rest {
        match c {
            Component::ParentDir => {
                base.pop();
            }
            Component::CurDir => {}
            c => base.push(c),
        }
    }
    base
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

/// Refuses an output folder that is the folder of one of `inputs` or holds one at any depth;
/// the error is the input.
pub fn check_apart(out: &Path, inputs: &[PathBuf]) -> Result<(), PathBuf> {
    match InputIndex::new(inputs).clash(out) {
        Some(i) => Err(inputs[i].clone()),
        None => Ok(()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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
