//! Batch manifests: shared defaults and one table (or CSV row) per district.
//!
//! TOML:
//! ```toml
//! [defaults]
//! snap = 0.5
//! effort = "normal"
//!
//! [[district]]
//! name = "Low Fennick"
//! roads = "north/roads.geojson"
//! sites = "north/sites.geojson"
//! hub = "S1"
//! ```
//! CSV: a header of key names and one row per district; empty cells take the defaults.
//! Every key ([`super::keys::KEYS`]) is accepted in `[defaults]` and in a district alike (except
//! `name`, which is per district); paths in either are relative to the manifest's folder.

use super::BatchError;
use super::keys::{self, Key};
use super::values::{self, Value};
use crate::ingest::source::Source;
use crate::job::{Options, PlanJob};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// One district of a manifest, ready to run.
#[derive(Debug, Clone)]
pub struct District {
    /// Position in the manifest (0-based).
    pub index: usize,
    /// The district's name as written.
    pub name: String,
    /// Its folder under the batch output folder.
    pub folder: String,
    /// The planning job (its `out` is set by the runner).
    pub job: PlanJob,
}

/// A manifest read and checked: its districts and its identity.
#[derive(Debug, Clone)]
pub struct Manifest {
    /// The districts in manifest order.
    pub districts: Vec<District>,
    /// SHA-256 of the reknit version, the manifest's format and its bytes: the shards of one
    /// batch share it, and `merge` refuses summaries that do not.
    pub id: String,
}

/// Values given in one place (`[defaults]`, a district table, a CSV row) by key.
struct Entry {
    /// Where, for messages: `[defaults]`, `district 3 ("Eastvane")`, `row 4 ("Eastvane")`.
    place: String,
    values: BTreeMap<&'static str, Value>,
}

/// Reads a TOML (or, by extension, CSV) manifest and checks every district's settings.
pub fn read_manifest(path: &Path) -> Result<Manifest, BatchError> {
    let err = |message: String| BatchError::Manifest {
        path: path.to_path_buf(),
        message,
    };
    let text = crate::ingest::limits::read_small_text(path)
        .map_err(|e| err(format!("cannot read: {e}")))?;
    let text = text.as_str();
    let base = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let is_csv = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"));
    let (defaults, entries) = if is_csv {
        (None, read_csv(text, &base).map_err(err)?)
    } else {
        read_toml(text, &base).map_err(err)?
    };
    if entries.is_empty() {
        return Err(err("the manifest lists no districts".into()));
    }
    let mut seen: BTreeMap<String, String> = BTreeMap::new();
    let mut districts = Vec::with_capacity(entries.len());
    for (index, e) in entries.iter().enumerate() {
        let d = district(index, defaults.as_ref(), e).map_err(err)?;
        if let Some(other) = seen.insert(d.folder.to_lowercase(), d.name.clone()) {
            return Err(err(format!(
                "{}: its folder name {:?} collides with district {other:?}; rename one of them",
                e.place, d.folder
            )));
        }
        districts.push(d);
    }
    Ok(Manifest {
        districts,
        // The same manifest text in another folder reads other files: its folder is part of it.
        id: identity(
            &format!(
                "{}\n{}",
                if is_csv { "csv" } else { "toml" },
                crate::export::guard::resolve(path).display()
            ),
            text.as_bytes(),
        ),
    })
}

/// SHA-256 of the reknit version, the manifest's format and place, and its bytes.
fn identity(format: &str, bytes: &[u8]) -> String {
    use sha2::{Digest, Sha256};
    let mut h = Sha256::new();
    h.update(format!("reknit {}\n{format}\n", env!("CARGO_PKG_VERSION")).as_bytes());
    h.update(bytes);
    h.finalize().iter().map(|b| format!("{b:02x}")).collect()
}

/// One district's job: the defaults, then its own values over them, applied key by key through
/// the one table, then checked and typed by the function `reknit plan` uses for its flags.
fn district(index: usize, defaults: Option<&Entry>, e: &Entry) -> Result<District, String> {
    let mut merged: Merged = BTreeMap::new();
    for entry in defaults.into_iter().chain([e]) {
        for (k, v) in &entry.values {
            merged.insert(k, (v, &entry.place));
        }
    }
    let Some((Value::Text(name), _)) = merged.get("name").copied() else {
        return Err(format!("{}: has no \"name\"", e.place));
    };
    let name = name.clone();
    if !merged.contains_key("roads") {
        return Err(format!(
            "{}: has no \"roads\" (in the district or in [defaults])",
            e.place
        ));
    }
    // A default the district has no use for (`effort` for a whole-network district) is left out
    // for it, once its value is found valid; a key given in the district itself must apply, or
    // `build` refuses it.
    let all = options(&merged, e)?;
    crate::job::settings::check_values(&all).map_err(|err| setting_error(err, &merged, e))?;
    for (flag, _) in crate::job::settings::ignored(&all) {
        let key = flag.trim_start_matches('-').replace('-', "_");
        if merged
            .get(key.as_str())
            .is_some_and(|(_, place)| *place != e.place)
        {
            merged.remove(key.as_str());
        }
    }
    let job =
        crate::job::build(&options(&merged, e)?).map_err(|err| setting_error(err, &merged, e))?;
    Ok(District {
        index,
        folder: super::names::folder_name(&name),
        name,
        job,
    })
}

/// A setting's error named by its key, and by where the value came from when not the district.
fn setting_error(err: crate::ingest::IngestError, merged: &Merged, e: &Entry) -> String {
    match err {
        crate::ingest::IngestError::Setting { name, message } => {
            let key = name.trim_start_matches('-').replace('-', "_");
            let from = match merged.get(key.as_str()) {
                Some((_, place)) if *place != e.place => format!(" (from {place})"),
                _ => String::new(),
            };
            format!("{}: \"{key}\"{from}: {message}", e.place)
        }
        other => format!("{}: {other}", e.place),
    }
}

/// Each key's value and where it was given (`[defaults]` or the district's own place).
type Merged<'a> = BTreeMap<&'static str, (&'a Value, &'a str)>;

/// The district's options: every merged value applied through the one key table.
fn options(merged: &Merged, e: &Entry) -> Result<Options, String> {
    let mut options = Options::new(Source::File(PathBuf::new()), PathBuf::new());
    for k in keys::KEYS {
        if let Some((v, place)) = merged.get(k.name) {
            (k.set)(&mut options, v).map_err(|m| {
                let from = if *place == e.place {
                    String::new()
                } else {
                    format!(" (from {place})")
                };
                format!("{}: \"{}\"{from}: {m}", e.place, k.name)
            })?;
        }
    }
    Ok(options)
}

/// Checks one key and its value given in `place`.
fn entry_value(
    place: &str,
    name: &str,
    read: impl FnOnce(&'static Key) -> Result<Value, String>,
) -> Result<(&'static str, Value), String> {
    let k = keys::find(name).ok_or_else(|| {
        format!(
            "{place}: unknown key {name:?}; known keys: {}",
            keys::known()
        )
    })?;
    if k.district_only && place == "[defaults]" {
        return Err(format!(
            "[defaults]: {name:?} is given per district, not in [defaults]"
        ));
    }
    let v = read(k).map_err(|m| format!("{place}: {name:?} {m}"))?;
    Ok((k.name, v))
}

/// The defaults and one entry per district.
type Parsed = (Option<Entry>, Vec<Entry>);

fn read_toml(text: &str, base: &Path) -> Result<Parsed, String> {
    let doc: toml::Table = text
        .parse()
        .map_err(|e: toml::de::Error| format!("not valid TOML: {e}"))?;
    for k in doc.keys() {
        if k != "defaults" && k != "district" {
            return Err(format!(
                "unknown top-level key {k:?}; a manifest has [defaults] and [[district]] tables"
            ));
        }
    }
    let entry = |v: &toml::Value, place: String| -> Result<Entry, String> {
        let t = v
            .as_table()
            .ok_or_else(|| format!("{place} must be a table"))?;
        let values = t
            .iter()
            .map(|(k, v)| entry_value(&place, k, |key| values::from_toml(key.kind, v, base)))
            .collect::<Result<_, _>>()?;
        Ok(Entry { place, values })
    };
    let defaults = match doc.get("defaults") {
        Some(d) => Some(entry(d, "[defaults]".into())?),
        None => None,
    };
    let mut entries = Vec::new();
    if let Some(list) = doc.get("district") {
        let arr = list
            .as_array()
            .ok_or("\"district\" must be an array of tables ([[district]])")?;
        for (i, d) in arr.iter().enumerate() {
            let name = d.get("name").and_then(|n| n.as_str());
            entries.push(entry(d, place("district", i + 1, name))?);
        }
    }
    Ok((defaults, entries))
}

/// `district 3 ("Eastvane")` or `district 3` for messages.
fn place(what: &str, n: usize, name: Option<&str>) -> String {
    match name {
        Some(name) => format!("{what} {n} ({name:?})"),
        None => format!("{what} {n}"),
    }
}

/// A CSV error with its line counted as the reader splits rows (CRLF, LF or CR), not as the
/// `csv` crate counts them (LF only).
fn csv_error(text: &str, e: &csv::Error) -> String {
    let line = e.position().map_or(0, |p| {
        crate::ingest::csv_lines::line_at(text.as_bytes(), p.byte())
    });
    match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => format!(
            "not valid CSV: line {line} has {len} field(s) where the header has {expected_len}"
        ),
        csv::ErrorKind::Utf8 { .. } => format!("not valid CSV: line {line} is not UTF-8"),
        _ => format!("not valid CSV at line {line}"),
    }
}

fn read_csv(text: &str, base: &Path) -> Result<Vec<Entry>, String> {
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let headers: Vec<String> = r
        .headers()
        .map_err(|e| format!("not valid CSV: {e}"))?
        .iter()
        .map(|h| h.trim().to_string())
        .collect();
    if let [h] = headers.as_slice()
        && let Some(sep) = [';', '\t', '|'].into_iter().find(|c| h.contains(*c))
    {
        return Err(format!(
            "not comma-separated CSV: the header is one column holding {sep:?}; reknit reads \
                 comma-separated CSV (RFC 4180): save it again with commas"
        ));
    }
    let mut columns: Vec<&'static Key> = Vec::with_capacity(headers.len());
    for h in &headers {
        let k = keys::find(h).ok_or_else(|| {
            format!(
                "the header: unknown column {h:?}; known keys: {}",
                keys::known()
            )
        })?;
        if columns.iter().any(|c| c.name == k.name) {
            return Err(format!("the header: column {h:?} appears twice"));
        }
        columns.push(k);
    }
    let name_col = columns.iter().position(|k| k.name == "name");
    let mut entries = Vec::new();
    for (i, rec) in r.records().enumerate() {
        let rec = rec.map_err(|e| csv_error(text, &e))?;
        let name = name_col
            .and_then(|c| rec.get(c))
            .filter(|n| !n.trim().is_empty());
        // Rows are counted as records (a quoted cell may span lines; the header is row 1).
        let place = place("row", i + 2, name.map(str::trim));
        let mut values = BTreeMap::new();
        for (k, cell) in columns.iter().zip(rec.iter()) {
            if cell.trim().is_empty() {
                continue;
            }
            let (k, v) = entry_value(&place, k.name, |key| {
                values::from_cell(key.kind, cell, base)
            })?;
            values.insert(k, v);
        }
        entries.push(Entry { place, values });
    }
    Ok(entries)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_short_row_names_its_line_whatever_the_line_ends() {
        for end in ["\n", "\r\n", "\r"] {
            let t = ["name,roads", "A,a.geojson", "B", ""].join(end);
            let e = read_csv(&t, Path::new(".")).map(|_| ()).unwrap_err();
            assert!(e.contains("line 3 has 1 field(s)"), "{end:?}: {e}");
        }
    }
}
