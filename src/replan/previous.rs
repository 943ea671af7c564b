//! The previous plan's folder, read and never written: its `summary.json` (settings, inputs,
//! history), the work orders of the `plan` and `backup` layers, and which sites were joined. The
//! layers are GeoJSON files, or tables of `layers.gpkg` when the summary records
//! `output_format` `gpkg`.

use super::ReplanError;
use super::history::{self, Round};
use super::restore::JOINED_FIELDS;
use serde::Deserialize;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// An input as the previous summary recorded it.
#[derive(Debug, Clone, Deserialize)]
pub struct RecordedInput {
    /// Its role (`roads`, `damage zones`, `damage reports`, `sites`, `cost table`, …).
    pub role: String,
    /// The path as given to that run.
    pub path: String,
    /// SHA-256 of its bytes (a Shapefile's: of its files together).
    pub sha256: String,
}

/// One piece of road of the previous plan (or of its backup links).
#[derive(Debug, Clone, PartialEq)]
pub struct OldPiece {
    /// Its work-order key.
    pub key: String,
    /// True when it needed repair.
    pub repair: bool,
    /// Its cost then, repair-metres.
    pub cost_m: f64,
}

/// What the previous folder holds.
#[derive(Debug, Clone)]
pub struct Previous {
    /// The folder as given.
    pub dir: PathBuf,
    /// Its settings, as recorded.
    pub settings: serde_json::Map<String, serde_json::Value>,
    /// Its inputs, as recorded.
    pub inputs: Vec<RecordedInput>,
    /// Its fingerprint.
    pub fingerprint: String,
    /// Its rounds (round 1 alone for a first plan written before histories were kept).
    pub history: Vec<Round>,
    /// The plan's pieces, in layer order.
    pub plan: Vec<OldPiece>,
    /// The backup links' pieces.
    pub backup: Vec<OldPiece>,
    /// Each site's id and whether it was joined to the hub.
    pub sites: BTreeMap<String, bool>,
    /// Keys of the repairs finished in earlier rounds (a re-plan's `replan.finished_to_date`).
    pub finished_to_date: Vec<String>,
}

#[derive(Deserialize)]
struct Layer {
    features: Vec<Feature>,
}

#[derive(Deserialize)]
struct Feature {
    properties: serde_json::Map<String, serde_json::Value>,
}

fn broken(path: &Path, message: impl Into<String>) -> ReplanError {
    ReplanError::Previous {
        path: path.to_path_buf(),
        message: message.into(),
    }
}

/// Where the previous plan's layers are.
enum Store<'a> {
    /// One GeoJSON file per layer in this folder.
    Files(&'a Path),
    /// Tables of this GeoPackage.
    Gpkg(PathBuf),
}

impl Store<'_> {
    /// The file an error about layer `name` names.
    fn path(&self, name: &str) -> PathBuf {
        match self {
            Store::Files(dir) => dir.join(format!("{name}.geojson")),
            Store::Gpkg(p) => p.clone(),
        }
    }

    /// The properties of layer `name`'s features, or `None` when the run wrote no such layer.
    fn layer(&self, name: &str) -> Result<Option<Vec<Props>>, ReplanError> {
        match self {
            Store::Files(_) => layer(&self.path(name)),
            Store::Gpkg(p) => super::previous_gpkg::layer(p, name).map_err(|m| broken(p, m)),
        }
    }
}

type Props = serde_json::Map<String, serde_json::Value>;

fn layer(path: &Path) -> Result<Option<Vec<Props>>, ReplanError> {
    if !path.exists() {
        return Ok(None);
    }
    crate::ingest::limits::regular_file(path).map_err(|e| broken(path, e.to_string()))?;
    let f = std::fs::File::open(path).map_err(|e| broken(path, e.to_string()))?;
    let l: Layer = serde_json::from_reader(std::io::BufReader::new(f))
        .map_err(|e| broken(path, format!("not a layer reknit wrote: {e}")))?;
    Ok(Some(l.features.into_iter().map(|f| f.properties).collect()))
}

fn pieces(store: &Store, name: &str, backup: bool) -> Result<Vec<OldPiece>, ReplanError> {
    let path = &store.path(name);
    let Some(features) = store.layer(name)? else {
        return match backup {
            true => Ok(Vec::new()),
            false => Err(broken(
                path,
                match store {
                    Store::Files(_) => "missing: give the folder of a plan reknit wrote".into(),
                    Store::Gpkg(_) => {
                        format!("has no {name} layer: give the folder of a plan reknit wrote")
                    }
                },
            )),
        };
    };
    features
        .into_iter()
        .enumerate()
        .map(|(i, p)| {
            let key = p.get("work_order").and_then(|v| v.as_str());
            let cost = p.get("cost").and_then(|v| v.as_f64());
            let repair = if backup {
                Some(true)
            } else {
                p.get("repair").and_then(|v| v.as_bool())
            };
            match (key, cost, repair) {
                (Some(k), Some(c), Some(r)) => Ok(OldPiece {
                    key: k.to_string(),
                    repair: r,
                    cost_m: c,
                }),
                _ => Err(broken(
                    path,
                    format!("layer {name}, feature {i}: no `work_order`, `cost` or `repair`"),
                )),
            }
        })
        .collect()
}

/// Reads the previous folder; anything missing or not as reknit writes it is an error naming
/// the file.
pub fn read(dir: &Path) -> Result<Previous, ReplanError> {
    let sp = dir.join("summary.json");
    let text = crate::ingest::limits::read_small_text(&sp).map_err(|e| {
        broken(
            &sp,
            format!("cannot read ({e}): give the folder of a plan reknit wrote"),
        )
    })?;
    let v: serde_json::Value =
        serde_json::from_str(&text).map_err(|e| broken(&sp, e.to_string()))?;
    if v.pointer("/tool/name").and_then(|n| n.as_str()) != Some("reknit") {
        return Err(broken(
            &sp,
            "not a summary reknit wrote (no tool.name \"reknit\")",
        ));
    }
    let field = |k: &str| v.get(k).cloned().unwrap_or(serde_json::Value::Null);
    let settings = field("settings")
        .as_object()
        .cloned()
        .ok_or_else(|| broken(&sp, "no `settings`"))?;
    let inputs: Vec<RecordedInput> = serde_json::from_value(field("inputs"))
        .map_err(|e| broken(&sp, format!("`inputs`: {e}")))?;
    let total = field("total_cost")
        .as_f64()
        .ok_or_else(|| broken(&sp, "no `total_cost`"))?;
    let history = match field("history") {
        serde_json::Value::Null => history::first(total),
        h => serde_json::from_value(h).map_err(|e| broken(&sp, format!("`history`: {e}")))?,
    };
    let store = match settings.get("output_format").and_then(|f| f.as_str()) {
        Some("gpkg") => Store::Gpkg(dir.join(crate::export::sink::GPKG_FILE)),
        _ => Store::Files(dir),
    };
    if let Store::Gpkg(p) = &store
        && !p.exists()
    {
        return Err(broken(
            p,
            "missing: the previous plan's summary says its layers were written as a GeoPackage \
             (output_format gpkg); give the folder of a plan reknit wrote",
        ));
    }
    let mut sites = BTreeMap::new();
    let sites_path = store.path("sites");
    for (i, p) in store
        .layer("sites")?
        .unwrap_or_default()
        .into_iter()
        .enumerate()
    {
        let id = p.get("site_id").and_then(|v| v.as_str());
        let joined = JOINED_FIELDS
            .iter()
            .find_map(|f| p.get(*f).and_then(|v| v.as_bool()));
        match (id, joined) {
            (Some(id), Some(j)) => sites.insert(id.to_string(), j),
            _ => {
                return Err(broken(
                    &sites_path,
                    format!("layer sites, feature {i}: no `site_id` or joined flag"),
                ));
            }
        };
    }
    Ok(Previous {
        dir: dir.to_path_buf(),
        settings,
        inputs,
        fingerprint: field("fingerprint")
            .as_str()
            .unwrap_or_default()
            .to_string(),
        history,
        plan: pieces(&store, "plan", false)?,
        backup: pieces(&store, "backup", true)?,
        sites,
        finished_to_date: match v.pointer("/replan/finished_to_date") {
            None | Some(serde_json::Value::Null) => Vec::new(),
            Some(f) => serde_json::from_value(f.clone())
                .map_err(|e| broken(&sp, format!("`replan.finished_to_date`: {e}")))?,
        },
    })
}
