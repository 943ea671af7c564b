//! OpenStreetMap extracts in the PBF encoding (`.osm.pbf`): roads from the ways tagged `highway`.
//!
//! A way is a road when it has a `highway` tag, is not `area=yes` (a square or car park drawn as
//! an area) and its `highway` value is not in [`NOT_ROADS`] (roads that are not there, or not
//! roads); those left out are counted by reason and value in summary.json. `--keep-where
//! highway=a,b,…` replaces [`NOT_ROADS`]: only the values named are kept. Every tag the road rules
//! read becomes an attribute (`name`/`ref` give the road's name, `highway` the class for a cost
//! table's `[classes]`, `bridge`/`tunnel` the structure flag); `osm_id` holds the way's id.
//!
//! Ways share junctions by node id. Each node's position is the file's integer (1e-7 degree), so
//! two ways that share a node share exactly the same coordinates, and noding at `--snap 0` joins
//! them there and nowhere else but at other nodes with the very same position. A way whose nodes
//! are partly missing (cut at the extract's edge) keeps its runs of two or more located nodes.
//!
//! The file is read twice: once for the ways (their node ids kept), once for the positions of just
//! the nodes those ways use, so memory grows with the road network, not with the whole extract.

use super::IngestError;
use super::coords::Coords;
use super::crs::Crs;
use super::geojson::RawFeature;
use super::reader::{FeatureSource, SourceInfo};
use super::roads::RoadSettings;
use super::source::{HashingReader, InputRecord, Source};
use osmpbf::{Element, ElementReader};
use serde_json::Value;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// `highway` values left out by default: planned, under construction, gone or disused roads, and
/// features that are not roads (platforms, rest areas, service areas, stops, lifts). Common
/// practice of OpenStreetMap road routing, no source.
pub const NOT_ROADS: &[&str] = &[
    "proposed",
    "planned",
    "construction",
    "abandoned",
    "disused",
    "razed",
    "demolished",
    "dismantled",
    "platform",
    "rest_area",
    "services",
    "bus_stop",
    "elevator",
];

/// A road way as kept from the first pass.
struct Way {
    id: i64,
    refs: Vec<i64>,
    tags: Vec<(String, Value)>,
}

/// An `.osm.pbf` file read as a source of road features.
pub struct OsmRoads {
    source: Source,
    path: PathBuf,
    /// True when the default list [`NOT_ROADS`] applies (no `--keep-where highway=…`).
    default_exclusion: bool,
}

impl OsmRoads {
    /// A reader of `source` under `settings` (which decide whether [`NOT_ROADS`] applies).
    pub fn new(source: &Source, settings: &RoadSettings) -> OsmRoads {
        OsmRoads {
            source: source.clone(),
            path: source.display_path(),
            default_exclusion: !settings
                .filters
                .iter()
                .any(|f| f.keep && f.field == "highway"),
        }
    }

    fn refuse(&self, e: osmpbf::Error) -> IngestError {
        refuse(&self.path, e)
    }
}

/// The error for a file the PBF decoder refuses (truncated, not PBF, a block too large).
pub fn refuse(path: &Path, e: osmpbf::Error) -> IngestError {
    IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(format!(
            "not a readable OpenStreetMap PBF extract: {e} (a truncated or damaged file?)"
        )),
    }
}

/// Opens the extract for the decoder (which needs a reader it can send between threads).
pub fn open(source: &Source) -> Result<ElementReader<Box<dyn std::io::Read + Send>>, IngestError> {
    let path = source.display_path();
    let io = |e| IngestError::Io {
        path: path.clone(),
        source: e,
    };
    let inner: Box<dyn std::io::Read + Send> = match source {
        Source::File(p) => {
            super::limits::regular_file(p).map_err(io)?;
            Box::new(std::io::BufReader::new(std::fs::File::open(p).map_err(io)?))
        }
        Source::Bundled { bytes, .. } => Box::new(*bytes),
        Source::Memory { bytes, .. } => Box::new(std::io::Cursor::new(bytes.clone())),
    };
    Ok(ElementReader::new(inner))
}

/// Size and SHA-256 of the whole extract, as every input is recorded.
pub fn fingerprint(source: &Source, role: &str) -> Result<InputRecord, IngestError> {
    let path = source.display_path();
    let (sha256, bytes) =
        HashingReader::finish_buffered(source.open_binary()?).map_err(|e| IngestError::Io {
            path: path.clone(),
            source: e,
        })?;
    Ok(InputRecord {
        role: role.into(),
        path: path.display().to_string(),
        bytes,
        sha256,
        deleted_records: 0,
    })
}

/// Sorted, distinct node ids and their positions once found (`None`: not in the extract).
pub struct Positions {
    ids: Vec<i64>,
    pos: Vec<Option<[f64; 2]>>,
}

impl Positions {
    /// Positions wanted for these node ids.
    pub fn wanted(mut ids: Vec<i64>) -> Positions {
        ids.sort_unstable();
        ids.dedup();
        let pos = vec![None; ids.len()];
        Positions { ids, pos }
    }

    /// Reads the positions of the wanted nodes from the extract; `tagged` sees every node with tags.
    pub fn fill(
        &mut self,
        source: &Source,
        mut tagged: impl FnMut(i64, [f64; 2], &mut dyn Iterator<Item = (&str, &str)>),
    ) -> Result<(), IngestError> {
        let path = source.display_path();
        open(source)?
            .for_each(|e| {
                let (id, p) = match &e {
                    Element::DenseNode(n) => (n.id(), lonlat(n.decimicro_lon(), n.decimicro_lat())),
                    Element::Node(n) => (n.id(), lonlat(n.decimicro_lon(), n.decimicro_lat())),
                    _ => return,
                };
                if let Ok(i) = self.ids.binary_search(&id) {
                    self.pos[i] = Some(p);
                }
                match &e {
                    Element::DenseNode(n) => tagged(id, p, &mut n.tags()),
                    Element::Node(n) => tagged(id, p, &mut n.tags()),
                    _ => {}
                }
            })
            .map_err(|e| refuse(&path, e))
    }

    /// The position of node `id`, when the extract holds it.
    pub fn get(&self, id: i64) -> Option<[f64; 2]> {
        self.ids.binary_search(&id).ok().and_then(|i| self.pos[i])
    }
}

/// A position in degrees from the file's integer 1e-7 degrees (division keeps it exact to the
/// nearest double, the same for every node at that place).
fn lonlat(lon: i32, lat: i32) -> [f64; 2] {
    [lon as f64 / 1e7, lat as f64 / 1e7]
}

/// The runs of consecutive located nodes of a way with at least two nodes each.
pub fn located_runs(refs: &[i64], at: &Positions) -> (Vec<Vec<[f64; 2]>>, bool) {
    let mut runs = Vec::new();
    let mut run: Vec<[f64; 2]> = Vec::new();
    let mut cut = false;
    for &r in refs {
        match at.get(r) {
            Some(p) => run.push(p),
            None => {
                cut = true;
                if run.len() >= 2 {
                    runs.push(std::mem::take(&mut run));
                }
                run.clear();
            }
        }
    }
    if run.len() >= 2 {
        runs.push(run);
    }
    (runs, cut)
}

impl FeatureSource for OsmRoads {
    fn path(&self) -> &Path {
        &self.path
    }

    fn declared_crs(&self) -> Result<Option<Crs>, IngestError> {
        // OpenStreetMap stores WGS84 longitude/latitude, always.
        Ok(Some(Crs::wgs84()))
    }

    fn features(
        &mut self,
        wanted: &[String],
        sink: &mut dyn FnMut(usize, RawFeature) -> Result<(), IngestError>,
    ) -> Result<SourceInfo, IngestError> {
        let mut skipped: BTreeMap<String, usize> = BTreeMap::new();
        let mut ways = Vec::new();
        let mut features = 0;
        let exclude = self.default_exclusion;
        open(&self.source)?
            .for_each(|e| {
                let Element::Way(w) = e else { return };
                let Some(highway) = w.tags().find(|(k, _)| *k == "highway").map(|(_, v)| v)
                else {
                    return;
                };
                features += 1;
                if w.tags().any(|(k, v)| k == "area" && v == "yes") {
                    *skipped
                        .entry("area=yes (a highway drawn as an area)".into())
                        .or_default() += 1;
                    return;
                }
                if exclude && NOT_ROADS.contains(&highway) {
                    *skipped
                        .entry(format!(
                            "highway={highway} (not a usable road; left out by default, --keep-where highway=… chooses)"
                        ))
                        .or_default() += 1;
                    return;
                }
                let tags = w
                    .tags()
                    .filter(|(k, _)| *k == "highway" || wanted.iter().any(|x| x == k))
                    .map(|(k, v)| (k.to_string(), Value::from(v)))
                    .collect();
                ways.push(Way {
                    id: w.id(),
                    refs: w.refs().collect(),
                    tags,
                });
            })
            .map_err(|e| self.refuse(e))?;
        let mut at = Positions::wanted(ways.iter().flat_map(|w| w.refs.iter().copied()).collect());
        at.fill(&self.source, |_, _, _| {})?;
        let mut features_cut_at_edge = 0;
        for (index, way) in ways.into_iter().enumerate() {
            let (runs, cut) = located_runs(&way.refs, &at);
            if runs.is_empty() {
                *skipped
                    .entry("a way with fewer than two of its nodes in the extract".into())
                    .or_default() += 1;
                continue;
            }
            features_cut_at_edge += cut as usize;
            let mut f = RawFeature {
                geometry_type: Some("MultiLineString".into()),
                coords: Coords {
                    height: 3,
                    ..Default::default()
                },
                id: None,
                props: way.tags,
                has_properties: true,
                keys: Vec::new(),
            };
            f.props.push(("osm_id".into(), Value::from(way.id)));
            for run in runs {
                f.coords.pos.extend(run);
                f.coords.parts.push(f.coords.pos.len());
            }
            f.coords.groups.push(f.coords.parts.len());
            sink(index, f).map_err(|e| name_way(e, way.id))?;
        }
        Ok(SourceInfo {
            features,
            skipped,
            input: fingerprint(&self.source, "roads")?,
            osm: true,
            features_cut_at_edge,
        })
    }
}

/// Adds the way's OpenStreetMap id to a message about one feature (other errors are not about
/// the way alone).
fn name_way(e: IngestError, id: i64) -> IngestError {
    match e {
        IngestError::Feature { .. } => e.map_message(|m| format!("{m} (OpenStreetMap way {id})")),
        other => other,
    }
}

/// Refuses a `--crs` other than WGS84 for an extract (OpenStreetMap is WGS84 always).
pub fn check_user_crs(source: &Source, settings: &RoadSettings) -> Result<(), IngestError> {
    if let Some(c) = &settings.crs {
        let crs = Crs::from_user(c).map_err(|message| IngestError::Crs {
            path: source.display_path(),
            message,
        })?;
        if !crs.is_wgs84() {
            return Err(IngestError::Crs {
                path: source.display_path(),
                message: format!(
                    "an OpenStreetMap extract is always WGS84 longitude/latitude; --crs {c} does not apply to it"
                ),
            });
        }
    }
    Ok(())
}
