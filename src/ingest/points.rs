//! One reader for point layers (sites, field damage reports) in every format relief teams hold:
//! GeoJSON, CSV (longitude/latitude or x/y columns, [`super::csv_points`]), a Shapefile set on
//! disk or zipped ([`super::points_shp`]) and a GeoPackage layer ([`super::layered`]).
//!
//! Each feature comes with its attributes and where it came from (file, layer, feature number);
//! positions are converted to WGS84 longitude/latitude from the layer's CRS: the user's option,
//! else the Shapefile's `.prj` or the GeoPackage layer's SRS, else WGS84 (a Shapefile without a
//! `.prj` is refused). Messages name the input kind and its own options ([`LayerKind`]).

use super::IngestError;
use super::coords::Coords;
use super::crs::Crs;
use super::geojson::read_collection;
use super::kind::LayerKind;
use super::outline::Outline;
use super::reader::Format;
use super::source::{HashingReader, InputRecord, Source};
use serde_json::{Map, Value};
use std::path::{Path, PathBuf};

/// What a point layer is and how to read it: the words and options its messages name, and the
/// reading choices the user gave.
#[derive(Debug, Clone)]
pub struct PointSpec {
    /// The kind of layer (sites, damage reports): its words, and the options its messages name
    /// (the shared zip, Shapefile, GeoPackage and CSV readers take it too).
    pub kind: &'static LayerKind,
    /// The options naming the coordinate columns, for messages (`--lon-column/--lat-column`).
    pub column_flags: &'static str,
    /// True when polygons and multipolygons are read (sites drawn as outlines).
    pub polygons: bool,
    /// The layer's CRS as given by the user (`EPSG:NNNN`).
    pub crs: Option<String>,
    /// The CSV separator as given by the user.
    pub delimiter: Option<u8>,
    /// The GeoPackage layer or zipped set chosen by the user.
    pub layer: Option<String>,
    /// The CSV longitude column (default: [`LON_COLUMNS`]).
    pub lon_column: Option<String>,
    /// The CSV latitude column (default: [`LAT_COLUMNS`]).
    pub lat_column: Option<String>,
    /// CSV columns read as numbers with the file's decimal mark besides the coordinates (a
    /// priority, a damage factor).
    pub number_columns: Vec<String>,
}

/// Column names tried for longitude (or x) in CSV files.
pub const LON_COLUMNS: &[&str] = &[
    "lon",
    "lng",
    "long",
    "longitude",
    "x",
    "LON",
    "Longitude",
    "X",
];
/// Column names tried for latitude (or y) in CSV files.
pub const LAT_COLUMNS: &[&str] = &["lat", "latitude", "y", "LAT", "Latitude", "Y"];

/// One feature of a point layer.
#[derive(Debug, Clone, PartialEq)]
pub struct PointFeature {
    /// 0-based feature number in the layer (a CSV row: its number below the header).
    pub index: usize,
    /// Position, WGS84 longitude/latitude (for an outline: its first position until placed).
    pub pos: [f64; 2],
    /// The outline of a feature drawn as a polygon (only when [`PointSpec::polygons`]).
    pub outline: Option<Outline>,
    /// Every attribute of the feature or row.
    pub attributes: Map<String, Value>,
    /// The GeoJSON feature's `id` member, when it has one.
    pub member_id: Option<Value>,
}

/// The features of a point layer with where they came from.
#[derive(Debug, Clone)]
pub struct PointLayer {
    /// Features in input order.
    pub features: Vec<PointFeature>,
    /// Path, size and SHA-256 of the input (role: the kind's [`LayerKind::role`]).
    pub input: InputRecord,
    /// The file messages name (inside a zip: the archive's path and the member's name).
    pub path: PathBuf,
    /// The GeoPackage layer or zipped set read, when the format has layers.
    pub layer: Option<String>,
    /// The CRS the positions were converted from (given or declared), described; `None` when the
    /// layer named none and was read as WGS84 longitude/latitude.
    pub crs: Option<String>,
}

impl PointLayer {
    /// Where the layer came from, for [`super::elsewhere::check_near`].
    pub fn origin(&self, spec: &PointSpec) -> super::elsewhere::LayerOrigin {
        super::elsewhere::LayerOrigin {
            path: self.path.clone(),
            role: spec.kind.role,
            crs_flag: spec.kind.crs_flag,
            crs: self.crs.clone(),
        }
    }
}

/// True when `source` is read as CSV (`.csv` or `.txt`).
pub fn reads_as_csv(source: &Source) -> bool {
    let name = source.display_path().to_string_lossy().to_lowercase();
    name.ends_with(".csv") || name.ends_with(".txt")
}

/// Reads a point layer in any supported format (by the file's name), positions in WGS84.
pub fn read_points(source: &Source, spec: &PointSpec) -> Result<PointLayer, IngestError> {
    let mut layer = match Format::of(source) {
        Format::Shapefile | Format::ZippedShapefile => super::points_shp::read(source, spec)?,
        Format::GeoPackage => super::layered::read_gpkg_points(source, spec)?,
        Format::OsmPbf => {
            return Err(IngestError::Io {
                path: source.display_path(),
                source: std::io::Error::other(format!(
                    "an OpenStreetMap extract holds no {}",
                    spec.kind.role
                )),
            });
        }
        Format::GeoJson if reads_as_csv(source) => text_layer(source, spec, true)?,
        Format::GeoJson => text_layer(source, spec, false)?,
    };
    layer.input.role = spec.kind.role.into();
    Ok(layer)
}

/// A GeoJSON or CSV layer: read through the fingerprinting reader, then converted.
fn text_layer(source: &Source, spec: &PointSpec, csv: bool) -> Result<PointLayer, IngestError> {
    let path = source.display_path();
    let mut reader = source.open()?;
    let (mut features, member) = if csv {
        (super::csv_points::read(&mut reader, &path, spec)?, None)
    } else {
        read_geojson(&mut reader, &path, spec)?
    };
    let (sha256, bytes) =
        HashingReader::finish_buffered(reader).map_err(|source| IngestError::Io {
            path: path.clone(),
            source,
        })?;
    // The option overrides a GeoJSON layer's legacy `crs` member, as --crs does a road layer's.
    let crs = match (user_crs(&path, spec)?, member) {
        (Some(c), _) => Some(c),
        (None, Some(m)) => Some(super::crs::crs_member(&path, Some(&m), spec.kind.crs_flag)?),
        (None, None) => None,
    };
    to_lonlat(&path, crs.as_ref(), spec, &mut features)?;
    Ok(PointLayer {
        features,
        input: InputRecord {
            role: spec.kind.role.into(),
            path: path.display().to_string(),
            bytes,
            sha256,
            deleted_records: 0,
        },
        path,
        layer: None,
        crs: crs.map(|c| c.describe()),
    })
}

/// The CRS the user gave for the layer, if any.
pub(super) fn user_crs(path: &Path, spec: &PointSpec) -> Result<Option<Crs>, IngestError> {
    spec.crs
        .as_deref()
        .map(|c| {
            Crs::from_user(c).map_err(|message| IngestError::Crs {
                path: path.to_path_buf(),
                message: format!("{}: {message}", spec.kind.crs_flag),
            })
        })
        .transpose()
}

/// The error naming one feature of a point layer.
pub(super) fn feature_err(
    path: &Path,
    feature: usize,
    field: Option<&str>,
    m: String,
) -> IngestError {
    IngestError::Feature {
        path: path.to_path_buf(),
        feature,
        field: field.map(str::to_string),
        message: m,
    }
}

/// The features of a GeoJSON point layer and its legacy `crs` member, if it has one.
fn read_geojson<R: std::io::Read>(
    reader: R,
    path: &Path,
    spec: &PointSpec,
) -> Result<(Vec<PointFeature>, Option<serde_json::Value>), IngestError> {
    let mut out = Vec::new();
    // Keep every property: point layers are small, and their attributes go to the outputs.
    let info = read_collection(
        reader,
        &[super::geojson::ALL_PROPERTIES.to_string()],
        |index, mut f| {
            let (pos, outline) = shape(spec, f.geometry_type.as_deref(), &f.coords)
                .map_err(|m| feature_err(path, index, Some("geometry"), m))?;
            out.push(PointFeature {
                index,
                pos,
                outline,
                attributes: std::mem::take(&mut f.props).into_iter().collect(),
                member_id: f.id.take(),
            });
            Ok(())
        },
    )
    .map_err(|e| IngestError::from_read(path, e))?;
    Ok((out, info.crs))
}

/// A feature's point, or its outline, from a geometry in GeoJSON's layout (the GeoJSON and
/// GeoPackage readers give it so); an outline's first position stands in for the point until the
/// caller places it.
pub(super) fn shape(
    spec: &PointSpec,
    kind: Option<&str>,
    c: &Coords,
) -> Result<([f64; 2], Option<Outline>), String> {
    let rings = |from: usize, to: usize| -> Vec<Vec<[f64; 2]>> {
        (from..to)
            .map(|r| {
                let start = if r == 0 { 0 } else { c.parts[r - 1] };
                c.pos[start..c.parts[r]].to_vec()
            })
            .collect()
    };
    let polygons = match (kind, c.height) {
        (Some("Point"), 1) if !c.pos.is_empty() => return Ok((c.pos[0], None)),
        (Some(k), 0) | (Some(k @ "Point"), _) => {
            return Err(format!(
                "the {}'s {k} is empty (no position)",
                spec.kind.noun
            ));
        }
        (Some("Polygon"), 3) if spec.polygons => vec![rings(0, c.parts.len())],
        (Some("MultiPolygon"), 4) if spec.polygons => {
            let mut start = 0;
            c.groups
                .iter()
                .map(|&end| {
                    let p = rings(start, end);
                    start = end;
                    p
                })
                .collect()
        }
        (Some(other), _) => return Err(wrong_geometry(spec, other)),
        (None, _) => return Err(format!("the {} has no geometry", spec.kind.noun)),
    };
    Ok((c.pos[0], Some(Outline { polygons })))
}

/// The message for a geometry the layer does not take.
pub(super) fn wrong_geometry(spec: &PointSpec, found: &str) -> String {
    if spec.polygons {
        format!(
            "{} must be Points, Polygons or MultiPolygons, found {found}",
            spec.kind.role
        )
    } else {
        format!("{} must be Points, found {found}", spec.kind.role)
    }
}

/// Converts every position from `crs` to WGS84 longitude/latitude; without a CRS (or with WGS84)
/// each is checked to be a longitude/latitude.
pub(super) fn to_lonlat(
    path: &Path,
    crs: Option<&Crs>,
    spec: &PointSpec,
    features: &mut [PointFeature],
) -> Result<(), IngestError> {
    for f in features.iter_mut() {
        let index = f.index;
        let mut points: Vec<&mut [f64; 2]> = vec![&mut f.pos];
        points.extend(f.outline.iter_mut().flat_map(|o| o.positions_mut()));
        for p in points {
            match crs.filter(|c| !c.is_wgs84()) {
                Some(crs) => {
                    *p = crs.to_lonlat(*p).ok_or_else(|| {
                        feature_err(
                            path,
                            index,
                            Some("geometry"),
                            format!(
                                "{} cannot be converted from {} to longitude/latitude: it is \
                             implausible for that CRS; check {} and the layer's units",
                                crate::decimal::position(*p),
                                crs.name,
                                spec.kind.crs_flag
                            ),
                        )
                    })?
                }
                None => check_lonlat(path, index, *p, spec)?,
            }
        }
    }
    Ok(())
}

/// Refuses a position that is not a finite WGS84 longitude/latitude.
fn check_lonlat(
    path: &Path,
    index: usize,
    p: [f64; 2],
    spec: &PointSpec,
) -> Result<(), IngestError> {
    if p[0].is_finite() && p[1].is_finite() && p[0].abs() <= 180.0 && p[1].abs() <= 90.0 {
        return Ok(());
    }
    Err(feature_err(
        path,
        index,
        Some("geometry"),
        format!(
            "{} is not a longitude/latitude in WGS84 range (±180, ±90); if the layer is projected, \
             {}",
            crate::decimal::position(p),
            super::crs::hint(spec.kind.crs_flag)
        ),
    ))
}
