//! A Shapefile set inside a `.zip` archive (stored or deflated members, folders allowed), read
//! into memory with every member's inflated size bounded, so a hostile archive (a zip bomb) is
//! refused before it can fill the memory.
//!
//! The archive's own SHA-256 is its fingerprint. Members that are not data are ignored: folders,
//! and the resource-fork copies some archivers add (`__MACOSX/…`, `._name`). An archive holding
//! several sets needs `--roads-layer NAME` (the set's file name without `.shp`, or its path inside
//! the archive); the message lists them.

use super::IngestError;
use super::limits::{MAX_SMALL_FILE, MAX_ZIP_MEMBER};
use super::set_files::{Member, SetFiles, Sidecar};
use super::source::{HashingReader, InputRecord, Source};
use std::io::{Cursor, Read};
use std::path::{Path, PathBuf};

type Archive = zip::ZipArchive<Cursor<Vec<u8>>>;

fn refuse(path: &Path, message: String) -> IngestError {
    IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(message),
    }
}

/// True for a member name that holds data: not a folder, not a resource-fork copy.
fn is_data(name: &str) -> bool {
    let file = name.rsplit('/').next().unwrap_or(name);
    !name.ends_with('/')
        && !name.starts_with("__MACOSX/")
        && !name.contains("/__MACOSX/")
        && !file.starts_with("._")
        && !file.is_empty()
}

/// `name` without its extension when that extension is `ext` (letter case ignored).
fn strip_ext<'a>(name: &'a str, ext: &str) -> Option<&'a str> {
    let cut = name.len().checked_sub(ext.len() + 1)?;
    (name.is_char_boundary(cut)
        && name[cut..].starts_with('.')
        && name[cut + 1..].eq_ignore_ascii_case(ext))
    .then(|| &name[..cut])
}

/// The Shapefile set in the archive `source`, and the archive's record (path, size, SHA-256).
/// `pick` chooses among several sets, by file name without `.shp` or path inside the archive.
pub fn set_from_zip(
    source: &Source,
    pick: Option<&str>,
) -> Result<(SetFiles, InputRecord), IngestError> {
    let path = source.display_path();
    let mut reader = source.open_binary()?;
    let mut bytes = Vec::new();
    reader
        .read_to_end(&mut bytes)
        .map_err(|e| IngestError::Io {
            path: path.clone(),
            source: e,
        })?;
    let (sha256, size) =
        HashingReader::finish_buffered(reader).map_err(|source| IngestError::Io {
            path: path.clone(),
            source,
        })?;
    let record = InputRecord {
        role: "roads".into(),
        path: path.display().to_string(),
        bytes: size,
        sha256,
        deleted_records: 0,
    };
    let mut archive = zip::ZipArchive::new(Cursor::new(bytes)).map_err(|e| {
        refuse(
            &path,
            format!("not a readable zip archive (truncated, or not a zip?): {e}"),
        )
    })?;
    let mut names: Vec<String> = Vec::new();
    for i in 0..archive.len() {
        match archive.name_for_index(i) {
            Some(Ok(n)) if is_data(&n) => names.push(n.into_owned()),
            Some(Ok(_)) | None => {}
            Some(Err(e)) => {
                return Err(refuse(
                    &path,
                    format!("member {i}'s name cannot be read: {e}"),
                ));
            }
        }
    }
    let stem = choose(&path, &names, pick)?;
    let find = |ext: &str| {
        names
            .iter()
            .find(|n| strip_ext(n, ext) == Some(stem.as_str()))
            .cloned()
    };
    let mut member = |name: Option<String>, what: &str, ext: &str| match name {
        Some(n) => read_member(&mut archive, &path, &n, MAX_ZIP_MEMBER),
        None => Err(refuse(
            &path,
            format!(
                "holds {stem}.shp but not its {what} file {stem}.{ext}: a Shapefile set needs its \
                 .shp, .shx and .dbf side by side in the archive"
            ),
        )),
    };
    let shp = member(find("shp"), "shapes", "shp")?;
    let shx = member(find("shx"), "index", "shx")?;
    let dbf = member(find("dbf"), "attribute table", "dbf")?;
    let mut sidecar = |ext: &str| {
        find(ext).map(|n| {
            let text = read_member(&mut archive, &path, &n, MAX_SMALL_FILE)
                .map_err(|e| e.to_string())
                .and_then(|m| {
                    super::limits::small_text(m.bytes.to_vec()).map_err(|e| e.to_string())
                });
            Sidecar {
                path: inside(&path, &n),
                text,
            }
        })
    };
    let (prj, cpg) = (sidecar("prj"), sidecar("cpg"));
    Ok((
        SetFiles {
            shp,
            shx,
            dbf,
            prj,
            cpg,
        },
        record,
    ))
}

/// The path shown for member `name` of the archive at `zip`.
fn inside(zip: &Path, name: &str) -> PathBuf {
    PathBuf::from(format!("{}/{name}", zip.display()))
}

/// The stem (member path without `.shp`) of the set to read: the only one, or the one `pick`
/// names; otherwise a message listing what the archive holds.
fn choose(path: &Path, names: &[String], pick: Option<&str>) -> Result<String, IngestError> {
    let sets: Vec<&str> = names.iter().filter_map(|n| strip_ext(n, "shp")).collect();
    let listed = |v: &[&str]| {
        v.iter()
            .map(|s| format!("{s}.shp"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let file_stem = |s: &str| s.rsplit('/').next().unwrap_or(s).to_string();
    let chosen: Vec<&str> = match pick {
        Some(p) => {
            let p = strip_ext(p, "shp").unwrap_or(p);
            sets.iter()
                .copied()
                .filter(|s| *s == p || file_stem(s) == p)
                .collect()
        }
        None => sets.clone(),
    };
    match (chosen.as_slice(), pick) {
        ([one], _) => Ok(one.to_string()),
        ([], None) => {
            let shown: Vec<&str> = names.iter().take(20).map(String::as_str).collect();
            Err(refuse(
                path,
                format!(
                    "holds no Shapefile set (no .shp member); its members are: {}{}",
                    if shown.is_empty() {
                        "(none)".into()
                    } else {
                        shown.join(", ")
                    },
                    if names.len() > 20 { ", …" } else { "" }
                ),
            ))
        }
        ([], Some(p)) => Err(refuse(
            path,
            format!(
                "holds no Shapefile set named \"{p}\"; its sets are: {}",
                if sets.is_empty() {
                    "(none)".into()
                } else {
                    listed(&sets)
                }
            ),
        )),
        (many, None) => Err(refuse(
            path,
            format!(
                "holds {} Shapefile sets ({}); choose one with --roads-layer NAME (its file name \
                 without .shp, or its path inside the archive)",
                many.len(),
                listed(many)
            ),
        )),
        (many, Some(p)) => Err(refuse(
            path,
            format!(
                "holds {} Shapefile sets named \"{p}\" ({}); give its path inside the archive to \
                 --roads-layer",
                many.len(),
                listed(many)
            ),
        )),
    }
}

/// Inflates member `name` whole, refusing more than `cap` bytes (by its declared size before
/// inflating, and by what it actually inflates to) and any member whose content disagrees with
/// its declared size or checksum.
pub fn read_member(
    archive: &mut Archive,
    zip: &Path,
    name: &str,
    cap: u64,
) -> Result<Member, IngestError> {
    let fail = |message: String| refuse(zip, format!("member {name}: {message}"));
    let mut f = archive
        .by_name(name)
        .map_err(|e| fail(format!("cannot be read: {e}")))?;
    let declared = f.size();
    let limit = format!(
        "more than the {} MiB reknit inflates for one member of this kind (a zip bomb?)",
        cap >> 20
    );
    if declared > cap {
        return Err(fail(format!("declares {declared} bytes inflated, {limit}")));
    }
    let mut out = Vec::new();
    (&mut f)
        .take(declared + 1)
        .read_to_end(&mut out)
        .map_err(|e| fail(format!("is corrupt: {e}")))?;
    let got = out.len() as u64;
    if got > declared {
        return Err(fail(format!(
            "inflates to more than the {declared} bytes its header declares: the archive is \
             corrupt or hostile (a zip bomb?)"
        )));
    }
    if got < declared {
        return Err(fail(format!(
            "ends after {got} of the {declared} bytes its header declares: the archive is truncated or corrupt"
        )));
    }
    Ok(Member {
        path: inside(zip, name),
        bytes: out.into(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_and_extensions() {
        assert_eq!(strip_ext("a/Roads.SHP", "shp"), Some("a/Roads"));
        assert_eq!(strip_ext("roads.shp.xml", "shp"), None);
        assert_eq!(strip_ext("shp", "shp"), None);
        assert_eq!(strip_ext("é.shp", "shp"), Some("é"));
        assert!(is_data("county/roads.shp"));
        assert!(!is_data("__MACOSX/county/._roads.shp"));
        assert!(!is_data("county/._roads.shp"));
        assert!(!is_data("county/"));
    }

    #[test]
    fn one_set_is_chosen_or_the_sets_are_listed() {
        let p = Path::new("c.zip");
        let names: Vec<String> = ["a/roads.shp", "b/roads.shp", "b/rivers.shp", "notes.txt"]
            .map(String::from)
            .to_vec();
        assert_eq!(choose(p, &names, Some("rivers")).unwrap(), "b/rivers");
        assert_eq!(choose(p, &names, Some("a/roads.shp")).unwrap(), "a/roads");
        let e = choose(p, &names, None).unwrap_err().to_string();
        assert!(
            e.contains("3 Shapefile sets") && e.contains("b/rivers.shp"),
            "{e}"
        );
        let e = choose(p, &names, Some("roads")).unwrap_err().to_string();
        assert!(e.contains("path inside the archive"), "{e}");
        let e = choose(p, &names[3..], None).unwrap_err().to_string();
        assert!(
            e.contains("no Shapefile set") && e.contains("notes.txt"),
            "{e}"
        );
    }
}
