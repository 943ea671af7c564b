//! ESRI Shapefile road layers (.shp + .shx + .dbf, with the CRS from the .prj), on disk or in a
//! zip archive, as a [`FeatureSource`].
//!
//! PolyLine, PolyLineZ and PolyLineM shapes, multipart included, go through the same validation and
//! damage reading as every format's features (attributes from the .dbf); null shapes and shapes of
//! other types are skipped and counted.

use super::IngestError;
use super::coords::Coords;
use super::crs::Crs;
use super::geojson::RawFeature;
use super::reader::{DeclaredFields, FeatureSource, Format, SourceInfo};
use super::set_files::{SetFiles, open_files, sibling};
pub use super::set_files::{SetItem, ShapeSet, open_set};
use super::source::{HashingReader, InputRecord, Source};
use serde_json::Value;
use shapefile::Shape;
use shapefile::dbase::FieldValue;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// An open Shapefile set as a source of features.
pub struct ShapefileSource {
    path: PathBuf,
    files: SetFiles,
    set: ShapeSet,
    /// The zip archive's record, when the set came from one (a set on disk is fingerprinted
    /// with its sidecars, [`fingerprint`]).
    zip: Option<InputRecord>,
    /// The set was chosen in its zip by name.
    named: bool,
    /// The kind of layer read (roads): its messages name its CRS option.
    kind: &'static super::kind::LayerKind,
}

impl ShapefileSource {
    /// Opens the set named by `source`: a `.shp` with its sidecars, or the one set in a `.zip`
    /// (`pick` names it when the archive holds several).
    pub fn open(
        source: &Source,
        pick: super::reader::Pick,
    ) -> Result<ShapefileSource, IngestError> {
        let (files, zip, named) = match (Format::of(source), source.path()) {
            (Format::ZippedShapefile, _) => {
                let (files, record, named) = super::zipped::set_from_zip(source, pick)?;
                (files, Some(record), named)
            }
            (_, Some(p)) => (SetFiles::from_disk(p)?, None, false),
            (_, None) => {
                return Err(IngestError::Io {
                    path: source.display_path(),
                    source: std::io::Error::other("a Shapefile set is read from files only"),
                });
            }
        };
        let set = open_files(&files)?;
        Ok(ShapefileSource {
            path: files.shp.path.clone(),
            files,
            set,
            zip,
            named,
            kind: pick.kind,
        })
    }
}

/// The lines of a PolyLine shape (plain, M or Z) as a MultiLineString, or why it is skipped.
fn lines(shape: &Shape) -> Result<Coords, String> {
    let parts: Vec<Vec<[f64; 2]>> = match shape {
        Shape::Polyline(p) => p
            .parts()
            .iter()
            .map(|pt| pt.iter().map(|q| [q.x, q.y]).collect())
            .collect(),
        Shape::PolylineM(p) => p
            .parts()
            .iter()
            .map(|pt| pt.iter().map(|q| [q.x, q.y]).collect())
            .collect(),
        Shape::PolylineZ(p) => p
            .parts()
            .iter()
            .map(|pt| pt.iter().map(|q| [q.x, q.y]).collect())
            .collect(),
        Shape::NullShape => return Err("null geometry".into()),
        other => return Err(format!("not a line ({})", other.shapetype())),
    };
    let mut coords = Coords {
        height: 3,
        ..Default::default()
    };
    for part in parts {
        coords.pos.extend(part);
        coords.parts.push(coords.pos.len());
    }
    coords.groups.push(coords.parts.len());
    if coords.parts.is_empty() {
        coords.height = 0;
    }
    Ok(coords)
}

impl FeatureSource for ShapefileSource {
    fn path(&self) -> &Path {
        &self.path
    }

    fn declared_crs(&self) -> Result<Option<Crs>, IngestError> {
        let Some(prj) = &self.files.prj else {
            return Ok(None);
        };
        let text = prj.text.as_ref().map_err(|m| IngestError::Io {
            path: prj.path.clone(),
            source: std::io::Error::other(m.clone()),
        })?;
        Crs::from_wkt(text).map(Some).map_err(|m| IngestError::Crs {
            path: prj.path.clone(),
            message: format!("{m}; {}", super::crs::hint(self.kind.crs_flag)),
        })
    }

    fn default_crs(&self) -> Result<Crs, IngestError> {
        Err(IngestError::Crs {
            path: self.path.clone(),
            message: format!(
                "has no .prj file beside it: {}",
                super::crs::hint(self.kind.crs_flag)
            ),
        })
    }

    fn chosen_by_name(&self) -> bool {
        self.named
    }

    fn declared_fields(&self) -> Option<DeclaredFields> {
        Some(DeclaredFields {
            file: self.files.dbf.path.clone(),
            noun: "field",
            names: self.set.fields(),
        })
    }

    fn features(
        &mut self,
        wanted: &[String],
        sink: &mut dyn FnMut(usize, RawFeature) -> Result<(), IngestError>,
    ) -> Result<SourceInfo, IngestError> {
        let path = self.path.clone();
        let count = self.set.record_count();
        let deleted = self.set.deleted();
        let mut skipped: BTreeMap<String, usize> = BTreeMap::new();
        if deleted > 0 {
            skipped.insert("flagged deleted in the .dbf".into(), deleted);
        }
        let numbers = self.set.numeric_text();
        let fields = self.set.fields();
        for (index, item) in self.set.records() {
            let (shape, record) = item.map_err(|e| {
                let (field, message) =
                    super::set_errors::record(&path, &fields, &numbers, index, e);
                IngestError::Feature {
                    path: path.clone(),
                    feature: index,
                    field,
                    message,
                }
            })?;
            let coords = match lines(&shape) {
                Ok(c) => c,
                Err(reason) => {
                    *skipped.entry(reason).or_default() += 1;
                    continue;
                }
            };
            let mut f = RawFeature {
                geometry_type: Some("MultiLineString".into()),
                coords,
                has_properties: true,
                ..Default::default()
            };
            for name in wanted {
                if let Some(v) = record.get(name) {
                    f.props.push((name.clone(), numbers.value(index, name, v)?));
                }
            }
            sink(index, f)?;
        }
        let input = match &self.zip {
            Some(record) => record.clone(),
            None => fingerprint(&path, "roads")?,
        };
        Ok(SourceInfo {
            features: count,
            skipped,
            input: InputRecord {
                deleted_records: deleted,
                ..input
            },
            osm: false,
            features_cut_at_edge: 0,
        })
    }
}

/// The layer's CRS: the user's (given with `option`), else its `.prj`; a Shapefile without
/// either is an error naming `option`.
pub fn layer_crs(path: &Path, user: Option<&str>, option: &str) -> Result<Crs, IngestError> {
    let crs_err = |message: String| IngestError::Crs {
        path: path.to_path_buf(),
        message,
    };
    if let Some(c) = user {
        return Crs::from_user(c).map_err(crs_err);
    }
    let prj = ["prj", "PRJ"]
        .iter()
        .map(|e| path.with_extension(e))
        .find(|p| p.exists())
        .ok_or_else(|| {
            crs_err(format!(
                "has no .prj file beside it: {}",
                super::crs::hint(option)
            ))
        })?;
    let wkt = super::limits::read_small_text(&prj).map_err(|source| IngestError::Io {
        path: prj.clone(),
        source,
    })?;
    Crs::from_wkt(&wkt).map_err(|m| IngestError::Crs {
        path: prj.clone(),
        message: format!("{m}; {}", super::crs::hint(option)),
    })
}

/// The files of a Shapefile set: the `.shp` itself, then those of its `.shx`, `.dbf`, `.prj` and
/// `.cpg` sidecars that exist (in either letter case), each with its extension in lower case.
pub fn set_files(path: &Path) -> Vec<(&'static str, std::path::PathBuf)> {
    let mut v = vec![("shp", path.to_path_buf())];
    for ext in ["shx", "dbf", "prj", "cpg"] {
        let p = sibling(path, ext);
        if p.exists() {
            v.push((ext, p));
        }
    }
    v
}

/// Path, size and SHA-256 of a Shapefile set: the digest covers the `.shp` and every sidecar
/// ([`set_files`]), so a change to any of them changes it.
pub fn fingerprint(path: &Path, role: &str) -> Result<InputRecord, IngestError> {
    use sha2::{Digest, Sha256};
    let mut h = Sha256::new();
    let mut bytes = 0;
    for (ext, p) in set_files(path) {
        let r = Source::File(p.clone()).open_binary()?;
        let (sha, n) = HashingReader::finish_buffered(r)
            .map_err(|source| IngestError::Io { path: p, source })?;
        h.update(format!("{ext}:{sha}\n").as_bytes());
        bytes += n;
    }
    Ok(InputRecord {
        role: role.into(),
        path: path.display().to_string(),
        bytes,
        sha256: h.finalize().iter().map(|b| format!("{b:02x}")).collect(),
        deleted_records: 0,
    })
}

/// A .dbf value as JSON.
pub fn field_json(v: &FieldValue) -> Value {
    match v {
        FieldValue::Character(Some(s)) => Value::from(s.trim()),
        // A whole number is kept whole, so a numeric id 7 reads as "7", not "7.0".
        FieldValue::Numeric(Some(x)) if x.fract() == 0.0 && x.abs() < 9.0e15 => {
            Value::from(*x as i64)
        }
        FieldValue::Numeric(Some(x)) | FieldValue::Double(x) | FieldValue::Currency(x) => {
            serde_json::Number::from_f64(*x).map_or(Value::Null, Value::Number)
        }
        // A single-precision value by its shortest decimal text, so 0.1 stays 0.1.
        FieldValue::Float(Some(x)) => super::value::cell(&x.to_string()),
        FieldValue::Date(Some(d)) => {
            Value::from(format!("{:04}-{:02}-{:02}", d.year(), d.month(), d.day()))
        }
        FieldValue::Integer(i) => Value::from(*i),
        FieldValue::Logical(Some(b)) => Value::from(*b),
        FieldValue::Memo(s) => Value::from(s.trim()),
        _ => Value::Null,
    }
}
