//! Batch manifests: shared defaults and one table (or CSV row) per district.
//!
//! TOML:
//! ```toml
//! [defaults]
//! snap = 0.5
//! effort = "normal"
//!
//! [[district]]
//! name = "North Vale"
//! roads = "north/roads.geojson"
//! sites = "north/sites.geojson"
//! hub = "S1"
//! ```
//! CSV: a header with `name`, `roads` and any setting as columns; empty cells take the defaults.
//! Paths are relative to the manifest's folder.

use super::BatchError;
use crate::ingest::source::Source;
use crate::job::PlanJob;
use crate::solve::MstAlgorithm;
use crate::solve::steiner::Effort;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// Settings a manifest may give, for all districts (`[defaults]`) or one.
pub const SETTING_KEYS: &[&str] = &[
    "snap",
    "damage_field",
    "default_damage",
    "closed_value",
    "id_field",
    "mst",
    "max_attach",
    "hub",
    "whole_network",
    "effort",
    "site_id_field",
    "site_name_field",
    "priority_field",
    "lon_column",
    "lat_column",
    "damage_zones",
    "zone_damage_field",
    "category_field",
];

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

/// A setting value as read from TOML or CSV.
#[derive(Debug, Clone)]
enum Val {
    Text(String),
    Num(f64),
    Bool(bool),
}

/// Reads a TOML (or, by extension, CSV) manifest.
pub fn read_manifest(path: &Path) -> Result<Vec<District>, BatchError> {
    let text = std::fs::read_to_string(path).map_err(|e| BatchError::Manifest {
        path: path.to_path_buf(),
        message: format!("cannot read: {e}"),
    })?;
    let err = |message: String| BatchError::Manifest {
        path: path.to_path_buf(),
        message,
    };
    let base = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let is_csv = path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"));
    let (defaults, entries) = if is_csv {
        read_csv(&text).map_err(err)?
    } else {
        read_toml(&text).map_err(err)?
    };
    if entries.is_empty() {
        return Err(err("the manifest lists no districts".into()));
    }
    let mut seen: BTreeMap<String, String> = BTreeMap::new();
    let mut out = Vec::new();
    for (index, mut e) in entries.into_iter().enumerate() {
        let at = |m: String| err(format!("district {}: {m}", index + 1));
        let name = match e.remove("name") {
            Some(Val::Text(n)) if !n.trim().is_empty() => n,
            Some(_) => return Err(at("\"name\" must be non-empty text".into())),
            None => return Err(at("has no \"name\"".into())),
        };
        let at = |m: String| err(format!("district {:?}: {m}", name));
        let folder = super::names::folder_name(&name);
        if let Some(other) = seen.insert(folder.to_lowercase(), name.clone()) {
            return Err(at(format!(
                "its folder name {folder:?} collides with district {other:?}; rename one of them"
            )));
        }
        let roads = match e.remove("roads") {
            Some(Val::Text(p)) if !p.trim().is_empty() => base.join(p.trim()),
            _ => return Err(at("has no \"roads\" path".into())),
        };
        let sites = match e.remove("sites") {
            Some(Val::Text(p)) if !p.trim().is_empty() => Some(base.join(p.trim())),
            None => None,
            Some(Val::Text(_)) => None,
            Some(_) => return Err(at("\"sites\" must be a path".into())),
        };
        let zones = match e.remove("damage_zones") {
            Some(Val::Text(p)) if !p.trim().is_empty() => Some(base.join(p.trim())),
            None => None,
            Some(_) => return Err(at("\"damage_zones\" must be a path".into())),
        };
        let mut job = PlanJob::new(Source::File(roads), PathBuf::new());
        job.sites = sites.map(Source::File);
        job.zones = zones.map(Source::File);
        apply(&mut job, &defaults).map_err(|m| err(format!("[defaults]: {m}")))?;
        apply(&mut job, &e).map_err(at)?;
        out.push(District {
            index,
            name,
            folder,
            job,
        });
    }
    Ok(out)
}

fn check_keys(table: &BTreeMap<String, Val>, extra: &[&str]) -> Result<(), String> {
    for k in table.keys() {
        if !SETTING_KEYS.contains(&k.as_str()) && !extra.contains(&k.as_str()) {
            let mut known: Vec<&str> = extra.to_vec();
            known.extend_from_slice(SETTING_KEYS);
            return Err(format!(
                "unknown key {k:?}; known keys: {}",
                known.join(", ")
            ));
        }
    }
    Ok(())
}

/// Settings by key.
type Table = BTreeMap<String, Val>;

/// The defaults and one table per district.
type Parsed = (Table, Vec<Table>);

fn read_toml(text: &str) -> Result<Parsed, String> {
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
    let table = |v: &toml::Value, what: &str| -> Result<BTreeMap<String, Val>, String> {
        let t = v
            .as_table()
            .ok_or_else(|| format!("{what} must be a table"))?;
        t.iter()
            .map(|(k, v)| {
                let val = match v {
                    toml::Value::String(s) => Val::Text(s.clone()),
                    toml::Value::Integer(i) => Val::Num(*i as f64),
                    toml::Value::Float(f) => Val::Num(*f),
                    toml::Value::Boolean(b) => Val::Bool(*b),
                    other => return Err(format!("{what}: {k:?} has an unsupported value {other}")),
                };
                Ok((k.clone(), val))
            })
            .collect()
    };
    let defaults = match doc.get("defaults") {
        Some(d) => table(d, "[defaults]")?,
        None => BTreeMap::new(),
    };
    check_keys(&defaults, &[])?;
    let mut entries = Vec::new();
    if let Some(list) = doc.get("district") {
        let arr = list
            .as_array()
            .ok_or("\"district\" must be an array of tables ([[district]])")?;
        for (i, d) in arr.iter().enumerate() {
            let t = table(d, &format!("district {}", i + 1))?;
            check_keys(&t, &["name", "roads", "sites"])
                .map_err(|m| format!("district {}: {m}", i + 1))?;
            entries.push(t);
        }
    }
    Ok((defaults, entries))
}

fn read_csv(text: &str) -> Result<Parsed, String> {
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let headers: Vec<String> = r
        .headers()
        .map_err(|e| format!("not valid CSV: {e}"))?
        .iter()
        .map(|h| h.trim().to_string())
        .collect();
    let mut entries = Vec::new();
    for (i, rec) in r.records().enumerate() {
        let rec = rec.map_err(|e| format!("not valid CSV: {e}"))?;
        let mut t = BTreeMap::new();
        for (h, v) in headers.iter().zip(rec.iter()) {
            let v = v.trim();
            if v.is_empty() {
                continue;
            }
            let val = match (h.as_str(), v) {
                ("whole_network", "true") => Val::Bool(true),
                ("whole_network", "false") => Val::Bool(false),
                (_, v) => match v.parse::<f64>() {
                    Ok(x) if !["name", "roads", "sites", "hub"].contains(&h.as_str()) => {
                        Val::Num(x)
                    }
                    _ => Val::Text(v.to_string()),
                },
            };
            t.insert(h.clone(), val);
        }
        check_keys(&t, &["name", "roads", "sites"]).map_err(|m| format!("row {}: {m}", i + 2))?;
        entries.push(t);
    }
    Ok((BTreeMap::new(), entries))
}

fn apply(job: &mut PlanJob, t: &BTreeMap<String, Val>) -> Result<(), String> {
    let num = |k: &str, v: &Val| match v {
        Val::Num(x) => Ok(*x),
        _ => Err(format!("{k:?} must be a number")),
    };
    let text = |k: &str, v: &Val| match v {
        Val::Text(s) => Ok(s.clone()),
        Val::Num(x) => Ok(x.to_string()),
        Val::Bool(_) => Err(format!("{k:?} must be text")),
    };
    for (k, v) in t {
        match k.as_str() {
            "snap" => job.road_settings.snap_m = num(k, v)?,
            "damage_field" => job.road_settings.damage.field = text(k, v)?,
            "default_damage" => job.road_settings.damage.default = num(k, v)?,
            "closed_value" => job.road_settings.damage.closed_value = text(k, v)?,
            "id_field" => job.road_settings.id_field = Some(text(k, v)?),
            "mst" => {
                job.mst = match text(k, v)?.as_str() {
                    "kruskal" => MstAlgorithm::Kruskal,
                    "prim" => MstAlgorithm::Prim,
                    o => return Err(format!("\"mst\" is {o:?}; use \"kruskal\" or \"prim\"")),
                }
            }
            "max_attach" => job.max_attach_m = num(k, v)?,
            "hub" => job.hub = Some(text(k, v)?),
            "whole_network" => {
                job.whole_network = match v {
                    Val::Bool(b) => *b,
                    _ => return Err("\"whole_network\" must be true or false".into()),
                }
            }
            "effort" => {
                job.effort = match text(k, v)?.as_str() {
                    "quick" => Effort::Quick,
                    "normal" => Effort::Normal,
                    "thorough" => Effort::Thorough,
                    o => {
                        return Err(format!(
                            "\"effort\" is {o:?}; use quick, normal or thorough"
                        ));
                    }
                }
            }
            "site_id_field" => job.site_settings.id_field = Some(text(k, v)?),
            "site_name_field" => job.site_settings.name_field = Some(text(k, v)?),
            "priority_field" => job.site_settings.priority_field = Some(text(k, v)?),
            "lon_column" => job.site_settings.lon_column = Some(text(k, v)?),
            "lat_column" => job.site_settings.lat_column = Some(text(k, v)?),
            "zone_damage_field" => job.zone_damage.field = text(k, v)?,
            "category_field" => job.road_settings.category_field = Some(text(k, v)?),
            _ => {}
        }
    }
    Ok(())
}
