//! Checks made before a batch writes anything: no district's output folder is, or holds, the
//! folder of any input of any district or of the manifest, and no input or manifest lies in the
//! batch output folder under a name the batch writes (its summaries, hidden staging folders).

use super::BatchError;
use super::manifest::District;
use crate::export::guard::{InputIndex, resolve};
use std::path::{Path, PathBuf};

/// Who reads an input: a district's key, or the batch itself (the manifest).
struct Owner<'a> {
    district: Option<&'a str>,
    key: &'static str,
}

impl Owner<'_> {
    fn describe(&self, path: &Path) -> String {
        match self.district {
            Some(d) => format!("{} (\"{}\" of district {d:?})", path.display(), self.key),
            None => format!("{} (the manifest)", path.display()),
        }
    }
}

/// The manifest key naming an input of a given role.
fn key_of(role: &str) -> &'static str {
    match role {
        "roads" => "roads",
        "sites" => "sites",
        "damage zones" => "damage_zones",
        "damage reports" => "damage_points",
        _ => "cost_table",
    }
}

/// Every file the batch reads, a Shapefile's sidecars included, with who reads it.
fn inputs<'a>(manifest: &Path, districts: &'a [District]) -> (Vec<PathBuf>, Vec<Owner<'a>>) {
    let mut paths = vec![manifest.to_path_buf()];
    let mut owners = vec![Owner {
        district: None,
        key: "manifest",
    }];
    for d in districts {
        for (role, src) in crate::job::fingerprint::job_inputs(&d.job) {
            let Some(p) = src.path() else { continue };
            let files = if p.extension().is_some_and(|e| e.eq_ignore_ascii_case("shp")) {
                crate::ingest::shapefile::set_files(p)
                    .into_iter()
                    .map(|(_, f)| f)
                    .collect()
            } else {
                vec![p.to_path_buf()]
            };
            for f in files {
                paths.push(f);
                owners.push(Owner {
                    district: Some(&d.name),
                    key: key_of(role),
                });
            }
        }
    }
    (paths, owners)
}

/// Refuses the batch (naming the district, the key and the file) when an output could replace or
/// mix with an input.
pub fn check(manifest: &Path, out: &Path, districts: &[District]) -> Result<(), BatchError> {
    let refuse = |message: String| BatchError::Manifest {
        path: manifest.to_path_buf(),
        message,
    };
    let (paths, owners) = inputs(manifest, districts);
    let index = InputIndex::new(&paths);
    for d in districts {
        let folder = out.join(&d.folder);
        if let Some(i) = index.clash(&folder) {
            return Err(refuse(format!(
                "district {:?}: its output folder {} is, or holds, the folder of the input {}; \
                 outputs never share a folder with inputs: choose an --out apart from the inputs",
                d.name,
                folder.display(),
                owners[i].describe(&paths[i])
            )));
        }
    }
    let root = resolve(out);
    for (p, owner) in paths.iter().zip(&owners) {
        let mut forms = vec![resolve(p)];
        forms.extend(std::fs::canonicalize(p).ok());
        for f in forms {
            let Ok(rest) = f.strip_prefix(&root) else {
                continue;
            };
            let first = rest
                .components()
                .next()
                .map(|c| c.as_os_str().to_string_lossy().into_owned())
                .unwrap_or_default();
            let summary_name = rest.components().count() == 1
                && (first.starts_with("batch-summary") || first.starts_with(".batch-summary"));
            if summary_name || first.starts_with(".reknit-") {
                return Err(refuse(format!(
                    "the input {} lies in the output folder {} under a name the batch writes \
                     (batch summaries, staging folders); move it or choose another --out",
                    owner.describe(p),
                    out.display()
                )));
            }
        }
    }
    Ok(())
}
