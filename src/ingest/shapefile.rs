//! ESRI Shapefile road layers (.shp + .shx + .dbf, with the CRS from the .prj).
//!
//! PolyLine, PolyLineZ and PolyLineM shapes, multipart included, go through the same validation and
//! damage reading as GeoJSON features (attributes from the .dbf); null shapes and shapes of other
//! types are skipped and counted.

use super::IngestError;
use super::coords::Coords;
use super::crs::Crs;
use super::geojson::RawFeature;
use super::roads::{LineLayer, RoadSettings, add_feature, check_empty, finish_coordinates};
use super::source::{HashingReader, InputRecord, Source};
use serde_json::Value;
use shapefile::Shape;
use shapefile::dbase::FieldValue;
use std::fs::File;
use std::io::BufReader;
use std::path::Path;

/// Reads a `.shp` road layer with its `.dbf` attributes and `.prj` CRS (or `--crs`).
pub fn read_shapefile_roads(
    path: &Path,
    settings: &RoadSettings,
) -> Result<LineLayer, IngestError> {
    settings.validate()?;
    let crs = layer_crs(path, settings.crs.as_deref())?;
    let fail = |message: String| IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(message),
    };
    // A Shapefile is a set: without its index or attributes it is incomplete (and may be truncated).
    for (ext, what) in [("shx", "index"), ("dbf", "attribute table")] {
        let p = path.with_extension(ext);
        if !p.exists() && !path.with_extension(ext.to_uppercase()).exists() {
            return Err(fail(format!(
                "the {what} file {} of the Shapefile set is missing",
                p.display()
            )));
        }
    }
    let mut reader = open_set(path)?;
    let fields = reader_fields(path);
    let damage_field = &settings.damage.field;
    if !fields.iter().any(|f| f == damage_field) && damage_field != "damage" {
        return Err(IngestError::Feature {
            path: path.with_extension("dbf"),
            feature: 0,
            field: Some(damage_field.clone()),
            message: format!(
                "the .dbf has no such field; its fields are: {}",
                fields.join(", ")
            ),
        });
    }
    if let Some(id) = &settings.id_field
        && !fields.iter().any(|f| f == id)
    {
        return Err(IngestError::Feature {
            path: path.with_extension("dbf"),
            feature: 0,
            field: Some(id.clone()),
            message: format!(
                "the .dbf has no such field; its fields are: {}",
                fields.join(", ")
            ),
        });
    }
    let wanted = settings.wanted_fields();
    for f in settings
        .category_field
        .iter()
        .chain(settings.filters.iter().map(|f| &f.field))
        .chain(settings.cost_table.class_field.iter())
    {
        if !fields.iter().any(|x| x == f) {
            return Err(IngestError::Feature {
                path: path.with_extension("dbf"),
                feature: 0,
                field: Some(f.clone()),
                message: format!(
                    "the .dbf has no such field; its fields are: {}",
                    fields.join(", ")
                ),
            });
        }
    }
    let mut layer = LineLayer::default();
    let count = reader.record_count();
    if reader.deleted() > 0 {
        layer
            .stats
            .features_skipped
            .insert("flagged deleted in the .dbf".into(), reader.deleted());
    }
    let numbers = reader.numeric_text();
    for (index, item) in reader.records() {
        let (shape, record) = item.map_err(|e| IngestError::Feature {
            path: path.to_path_buf(),
            feature: index,
            field: None,
            message: format!(
                "unreadable shape or attribute record: {}",
                shapefile_error(path, e)
            ),
        })?;
        let mut f = RawFeature::default();
        let parts: Vec<Vec<[f64; 2]>> = match &shape {
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
            Shape::NullShape => {
                *layer
                    .stats
                    .features_skipped
                    .entry("null geometry".into())
                    .or_default() += 1;
                continue;
            }
            other => {
                let kind = format!("{}", other.shapetype());
                *layer
                    .stats
                    .features_skipped
                    .entry(format!("not a line ({kind})"))
                    .or_default() += 1;
                continue;
            }
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
        f.geometry_type = Some("MultiLineString".into());
        f.coords = coords;
        f.has_properties = true;
        for name in &wanted {
            if let Some(v) = record.get(name) {
                f.props.push((name.clone(), numbers.value(index, name, v)?));
            }
        }
        add_feature(&mut layer, path, settings, index, f)?;
    }
    layer.stats.features_read = count;
    layer.input = Some(InputRecord {
        deleted_records: reader.deleted(),
        ..fingerprint(path, "roads")?
    });
    check_empty(&layer, path, count)?;
    finish_coordinates(&mut layer, path, &crs)?;
    Ok(layer)
}

/// The layer's CRS: `--crs`, else its `.prj`; a Shapefile without either is an error.
pub fn layer_crs(path: &Path, user: Option<&str>) -> Result<Crs, IngestError> {
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
            crs_err("has no .prj file beside it: give the layer's CRS with --crs EPSG:NNNN".into())
        })?;
    let wkt = super::limits::read_small_text(&prj).map_err(|source| IngestError::Io {
        path: prj.clone(),
        source,
    })?;
    Crs::from_wkt(&wkt).map_err(|m| IngestError::Crs {
        path: prj.clone(),
        message: m,
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

/// An open Shapefile set: shapes from the .shp (through its checked .shx), records from the .dbf,
/// and which records the .dbf flags deleted.
pub struct ShapeSet {
    shapes: shapefile::ShapeReader<BufReader<File>>,
    table: shapefile::dbase::Reader<BufReader<File>>,
    deleted: Vec<bool>,
    overflow: super::shapeset::NumericText,
}

/// One record of a set: its shape and attributes, or the error reading them.
pub type SetItem = Result<(Shape, shapefile::dbase::Record), shapefile::Error>;

impl ShapeSet {
    /// How many records the .dbf flags deleted (skipped with their shapes).
    pub fn deleted(&self) -> usize {
        self.deleted.iter().filter(|&&d| d).count()
    }

    /// What the .dbf's numeric fields hold beyond the table reader's values (overflow markers, long numbers).
    pub fn numeric_text(&self) -> super::shapeset::NumericText {
        self.overflow.clone()
    }

    /// How many records the set holds, deleted ones included.
    pub fn record_count(&self) -> usize {
        self.deleted.len()
    }

    /// The records not flagged deleted, each with its 0-based record number in the files.
    pub fn records(&mut self) -> impl Iterator<Item = (usize, SetItem)> + '_ {
        let deleted = &self.deleted;
        let mut rows = self.table.iter_records();
        self.shapes
            .iter_shapes()
            .enumerate()
            .filter(|(i, _)| !deleted.get(*i).copied().unwrap_or(false))
            .map(move |(i, shape)| {
                let row = match rows.next() {
                    Some(r) => r.map_err(shapefile::Error::DbaseError),
                    None => Err(shapefile::Error::MissingDbf),
                };
                (i, shape.and_then(|s| row.map(|r| (s, r))))
            })
    }
}

/// The .dbf beside `path`, in either letter case.
fn sibling(path: &Path, ext: &str) -> std::path::PathBuf {
    let lower = path.with_extension(ext);
    let upper = path.with_extension(ext.to_uppercase());
    if !lower.exists() && upper.exists() {
        upper
    } else {
        lower
    }
}

/// Opens a Shapefile set for reading. The .dbf text is decoded by its declared code page (a .cpg
/// file, else the dBASE language driver byte); a table declared or assumed UTF-8 is read lossily
/// (undecodable bytes become U+FFFD) rather than refused. A .dbf whose record count differs from
/// the number of shapes is refused: rows would pair with the wrong roads or be lost.
///
/// A .shx that disagrees with the .shp is refused; records the .dbf flags deleted are skipped
/// together with their shapes by [`ShapeSet::records`].
pub fn open_set(path: &Path) -> Result<ShapeSet, IngestError> {
    use shapefile::dbase;
    let fail = |message: String| IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(message),
    };
    let dbf = sibling(path, "dbf");
    // Every member is checked before any is opened: a named pipe would block the open.
    for p in [path.to_path_buf(), sibling(path, "shx"), dbf.clone()] {
        super::limits::regular_file(&p).map_err(|source| IngestError::Io { path: p, source })?;
    }
    let shapes =
        shapefile::ShapeReader::from_path(path).map_err(|e| fail(shapefile_error(path, e)))?;
    let open_dbf = || {
        File::open(&dbf)
            .map(BufReader::new)
            .map_err(|e| IngestError::Io {
                path: dbf.clone(),
                source: e,
            })
    };
    let declared = super::limits::read_small_text(&sibling(path, "cpg"))
        .ok()
        .and_then(|label| dbase::encoding::DynEncoding::from_name(&label));
    let dbf_fail = |e: dbase::Error| IngestError::Io {
        path: dbf.clone(),
        source: std::io::Error::other(format!("not a readable dBASE table: {e}")),
    };
    let table = match declared {
        Some(enc) => dbase::ReaderBuilder::new()
            .with_encoding(enc)
            .build(open_dbf()?)
            .map_err(dbf_fail)?,
        None => {
            let t = dbase::Reader::new(open_dbf()?).map_err(dbf_fail)?;
            if t.header().code_page_mark == dbase::CodePageMark::Utf8 {
                dbase::ReaderBuilder::new()
                    .with_encoding(dbase::UnicodeLossy)
                    .build(open_dbf()?)
                    .map_err(dbf_fail)?
            } else {
                t
            }
        }
    };
    let rows = table.header().num_records as usize;
    let count = shapes
        .shape_count()
        .map_err(|e| fail(shapefile_error(path, e)))?;
    if rows != count {
        return Err(IngestError::Io {
            path: dbf.clone(),
            source: std::io::Error::other(format!(
                "the attribute table has {rows} record(s) but {} has {count} shape(s); the set is \
                 inconsistent (a file from another version of the layer?)",
                path.display()
            )),
        });
    }
    super::shapeset::check_index(path, &sibling(path, "shx"))?;
    let scan = super::shapeset::scan_table(&dbf)?;
    Ok(ShapeSet {
        shapes,
        table,
        deleted: scan.deleted,
        overflow: scan.text,
    })
}

/// Field names of an open set's attribute table.
fn reader_fields(path: &Path) -> Vec<String> {
    shapefile::dbase::Reader::from_path(sibling(path, "dbf"))
        .map(|r| r.fields().iter().map(|f| f.name().to_string()).collect())
        .unwrap_or_default()
}

fn shapefile_error(path: &Path, e: shapefile::Error) -> String {
    match e {
        shapefile::Error::MissingDbf => format!(
            "the .dbf file ({}) is missing",
            path.with_extension("dbf").display()
        ),
        shapefile::Error::MissingIndexFile => {
            format!(
                "the .shx file ({}) is missing",
                path.with_extension("shx").display()
            )
        }
        other => other.to_string(),
    }
}
