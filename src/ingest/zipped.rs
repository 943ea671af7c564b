//! A Shapefile set inside a `.zip` archive (stored or deflated members, folders allowed), read
//! into memory with every member's inflated size bounded, so a hostile archive (a zip bomb) is
//! refused before it can fill the memory.
//!
//! The archive's own SHA-256 is its fingerprint. Members that are not data are ignored: folders,
//! and the resource-fork copies some archivers add (`__MACOSX/…`, `._name`). An archive holding
//! several sets needs `--roads-layer NAME` (the set's file name without `.shp`, or its path inside
//! the archive); the message lists them.

use super::IngestError;
use super::limits::{MAX_SMALL_FILE, MAX_ZIP_MEMBER, MAX_ZIP_SET};
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
    pick: super::reader::Pick,
) -> Result<(SetFiles, InputRecord, bool), IngestError> {
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
        role: pick.kind.role.into(),
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
    if archive.has_duplicate_names() {
        // The zip reader keeps one copy per name: the names come from the central directory.
        let start = archive.central_directory_start() as usize;
        let bytes = archive.into_inner().into_inner();
        let names = central_names(&bytes, start);
        let message = twice(&names).unwrap_or_else(|| twice_message(None));
        return Err(refuse(&path, message));
    }
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
    if let Some(message) = twice(&names) {
        return Err(refuse(&path, message));
    }
    // With several road inputs, a zip of one set is read whole whatever --roads-layer names.
    let sets = names
        .iter()
        .filter(|n| strip_ext(n, "shp").is_some())
        .count();
    let flag = pick.kind.layer_flag;
    let pick = match pick.name {
        Some(_) if pick.where_several && sets == 1 => None,
        name => name,
    };
    let stem = choose(&path, &names, pick, flag)?;
    let find = |ext: &str| {
        names
            .iter()
            .find(|n| strip_ext(n, ext) == Some(stem.as_str()))
            .cloned()
    };
    let (shp_name, shx_name, dbf_name) = (find("shp"), find("shx"), find("dbf"));
    set_size(&mut archive, &path, [&shp_name, &shx_name, &dbf_name])?;
    let mut member = |name: Option<String>, what: &str, ext: &str| match name {
        Some(n) => read_member(&mut archive, &path, &n, MAX_ZIP_MEMBER, header_check(ext)),
        None => Err(refuse(
            &path,
            format!(
                "holds {stem}.shp but not its {what} file {stem}.{ext}: a Shapefile set needs its \
                 .shp, .shx and .dbf side by side in the archive"
            ),
        )),
    };
    let shp = member(shp_name, "shapes", "shp")?;
    let shx = member(shx_name, "index", "shx")?;
    let dbf = member(dbf_name, "attribute table", "dbf")?;
    let mut sidecar = |ext: &str| {
        find(ext).map(|n| {
            let text = read_member(&mut archive, &path, &n, MAX_SMALL_FILE, None)
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
        pick.is_some(),
    ))
}

/// The message for the first data member named twice (letter case of the extension aside:
/// `roads.shp` and `roads.SHP` are one file to a reader matching extensions), if any. Readers
/// disagree on which copy counts, so such an archive is refused rather than one copy read.
fn twice(names: &[String]) -> Option<String> {
    let mut seen: std::collections::HashMap<String, (usize, &str)> = Default::default();
    for (i, n) in names.iter().enumerate().filter(|(_, n)| is_data(n)) {
        let key = match n.rsplit_once('.') {
            Some((stem, ext)) if !ext.contains('/') => {
                format!("{stem}.{}", ext.to_ascii_lowercase())
            }
            _ => n.clone(),
        };
        if let Some((j, first)) = seen.get(&key) {
            return Some(twice_message(Some((*j, *first, i, n.as_str()))));
        }
        seen.insert(key, (i, n));
    }
    None
}

fn twice_message(pair: Option<(usize, &str, usize, &str)>) -> String {
    let which = match pair {
        Some((j, a, i, b)) => format!(": member {j} \"{a}\" and member {i} \"{b}\""),
        None => String::new(),
    };
    format!(
        "holds two members with the same name{which}; tools differ on which copy they read, so \
         remove one and zip the set again"
    )
}

/// The member names in the central directory starting at `start` (APPNOTE 6.3 §4.3.12: each
/// header's signature `PK\x01\x02`, name length at 28, extra and comment lengths at 30 and 32,
/// the name at 46), in order; every copy of a name, unlike the zip reader's own table.
fn central_names(b: &[u8], start: usize) -> Vec<String> {
    let u16_at = |i: usize| {
        b.get(i..i + 2)
            .map(|x| u16::from_le_bytes([x[0], x[1]]) as usize)
    };
    let mut names = Vec::new();
    let sig = b"PK\x01\x02";
    // The reader's offset is from the archive's start; should anything precede it, the first
    // header is looked for instead.
    let mut i = match b.get(start..start + 4) {
        Some(s) if s == sig => start,
        _ => b.windows(4).position(|w| w == sig).unwrap_or(b.len()),
    };
    while b.get(i..i + 4) == Some(&sig[..]) {
        let (Some(n), Some(e), Some(c)) = (u16_at(i + 28), u16_at(i + 30), u16_at(i + 32)) else {
            break;
        };
        let Some(name) = b.get(i + 46..i + 46 + n) else {
            break;
        };
        names.push(String::from_utf8_lossy(name).into_owned());
        i += 46 + n + e + c;
    }
    names
}

/// The path shown for member `name` of the archive at `zip`.
fn inside(zip: &Path, name: &str) -> PathBuf {
    PathBuf::from(format!("{}/{name}", zip.display()))
}

/// The stem (member path without `.shp`) of the set to read: the only one, or the one `pick`
/// names; otherwise a message listing what the archive holds.
fn choose(
    path: &Path,
    names: &[String],
    pick: Option<&str>,
    flag: &str,
) -> Result<String, IngestError> {
    let sets: Vec<&str> = names.iter().filter_map(|n| strip_ext(n, "shp")).collect();
    let listed = |v: &[&str]| {
        super::limits::listed(&v.iter().map(|s| format!("{s}.shp")).collect::<Vec<_>>())
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
        ([], None) => Err(refuse(
            path,
            format!(
                "holds no Shapefile set (no .shp member); its members are: {}",
                if names.is_empty() {
                    "(none)".into()
                } else {
                    super::limits::listed(names)
                },
            ),
        )),
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
                "holds {} Shapefile sets ({}); choose one with {flag} NAME (its file name \
                 without .shp, or its path inside the archive)",
                many.len(),
                listed(many)
            ),
        )),
        (many, Some(p)) => Err(refuse(
            path,
            format!(
                "holds {} Shapefile sets named \"{p}\" ({}); give its path inside the archive to \
                 {flag}",
                many.len(),
                listed(many)
            ),
        )),
    }
}

/// Refuses a set whose `.shp`, `.shx` and `.dbf` declare more than [`MAX_ZIP_SET`] bytes
/// inflated together, before any of them is inflated (each is then held to its declared size).
fn set_size(
    archive: &mut Archive,
    zip: &Path,
    names: [&Option<String>; 3],
) -> Result<(), IngestError> {
    let mut total = 0u64;
    let mut each = Vec::new();
    for n in names.into_iter().flatten() {
        let f = archive
            .by_name(n)
            .map_err(|e| refuse(zip, format!("member {n}: cannot be read: {e}")))?;
        total = total.saturating_add(f.size());
        each.push(format!("{n} {} bytes", f.size()));
    }
    if total > MAX_ZIP_SET {
        return Err(refuse(
            zip,
            format!(
                "its Shapefile set declares {total} bytes inflated ({}), more than the {} MiB \
                 reknit inflates from a zip archive (a zip bomb?); unzip a set this large and \
                 give its .shp",
                each.join(", "),
                MAX_ZIP_SET >> 20
            ),
        ));
    }
    Ok(())
}

/// What a member's first bytes must say, checked before the rest is inflated: a `.shp` or
/// `.shx` starts with the file code 9994 (big-endian); a `.dbf` header declares a header length
/// of at least 33 bytes (32, a field descriptor or none, and the terminator).
pub type HeaderCheck = fn(&[u8]) -> Result<(), String>;

fn header_check(ext: &str) -> Option<HeaderCheck> {
    match ext {
        "shp" | "shx" => Some(shape_header as HeaderCheck),
        "dbf" => Some(table_header as HeaderCheck),
        _ => None,
    }
}

fn shape_header(b: &[u8]) -> Result<(), String> {
    let code = b
        .get(..4)
        .map(|c| i32::from_be_bytes([c[0], c[1], c[2], c[3]]));
    match code {
        Some(9994) => Ok(()),
        Some(c) => Err(format!(
            "is not a Shapefile part: its header's file code is {c}, not 9994"
        )),
        None => Err("is not a Shapefile part: shorter than its 100-byte header".into()),
    }
}

fn table_header(b: &[u8]) -> Result<(), String> {
    match b.get(8..10) {
        Some(h) if u16::from_le_bytes([h[0], h[1]]) >= 33 => Ok(()),
        Some(h) => Err(format!(
            "is not a dBASE table: its header declares a header length of {} bytes (at least \
             33 expected)",
            u16::from_le_bytes([h[0], h[1]])
        )),
        None => Err("is not a dBASE table: shorter than its 32-byte header".into()),
    }
}

/// Inflates member `name` whole, refusing more than `cap` bytes (by its declared size before
/// inflating, and by what it actually inflates to) and any member whose content disagrees with
/// its declared size or checksum. `check` looks at the first 100 bytes before the rest is
/// inflated, so a member that is not what its name says costs no memory.
pub fn read_member(
    archive: &mut Archive,
    zip: &Path,
    name: &str,
    cap: u64,
    check: Option<HeaderCheck>,
) -> Result<Member, IngestError> {
    let fail = |message: String| refuse(zip, format!("member {name}: {message}"));
    let mut f = archive
        .by_name(name)
        .map_err(|e| fail(format!("cannot be read: {e}")))?;
    // Only Stored (0) and Deflate (8) are read (APPNOTE.TXT §4.4.5): a member packed another way
    // is not corrupt, and the analyst can re-zip it.
    #[allow(deprecated)]
    let method = f.compression().to_u16();
    if method != 0 && method != 8 {
        return Err(fail(format!(
            "is compressed with {} (zip method {method}), which reknit does not read; re-zip the \
             set with the ordinary Deflate method (for example `zip -Z deflate NEW.zip` and the \
             set's files, or a file manager's \"compress\")",
            zip::CompressionMethod::name_from_u16(method)
        )));
    }
    let declared = f.size();
    let limit = format!(
        "more than the {} MiB reknit inflates for one member of this kind (a zip bomb?)",
        cap >> 20
    );
    if declared > cap {
        return Err(fail(format!("declares {declared} bytes inflated, {limit}")));
    }
    let corrupt = |e: std::io::Error| fail(format!("is corrupt: {e}"));
    let mut head = Vec::with_capacity(100);
    (&mut f)
        .take(declared.min(100))
        .read_to_end(&mut head)
        .map_err(corrupt)?;
    if let Some(check) = check {
        check(&head).map_err(fail)?;
    }
    // Room for one byte beyond the declared size, so an overlong member is seen without growing.
    let mut out = Vec::with_capacity(declared as usize + 1);
    out.extend_from_slice(&head);
    (&mut f)
        .take(declared + 1 - head.len() as u64)
        .read_to_end(&mut out)
        .map_err(corrupt)?;
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
        assert_eq!(
            choose(p, &names, Some("rivers"), "--roads-layer").unwrap(),
            "b/rivers"
        );
        assert_eq!(
            choose(p, &names, Some("a/roads.shp"), "--roads-layer").unwrap(),
            "a/roads"
        );
        // The message names the option of the layer's own kind.
        let e = choose(p, &names, None, "--sites-layer")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("3 Shapefile sets")
                && e.contains("b/rivers.shp")
                && e.contains("choose one with --sites-layer NAME"),
            "{e}"
        );
        let e = choose(p, &names, Some("roads"), "--roads-layer")
            .unwrap_err()
            .to_string();
        assert!(e.contains("path inside the archive"), "{e}");
        let e = choose(p, &names[3..], None, "--roads-layer")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("no Shapefile set") && e.contains("notes.txt"),
            "{e}"
        );
    }
}
