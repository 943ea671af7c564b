//! Point layers from a Shapefile set, on disk or the one set in a zip archive (the layer option
//! chooses among several): Point shapes (plain, M, Z), and Polygon shapes where the layer takes
//! outlines (each hole in the outer ring that contains it, whatever their order). The CRS is the
//! user's option, else the `.prj`; a set without either is refused.

use super::IngestError;
use super::crs::Crs;
use super::outline::Outline;
use super::points::{PointFeature, PointLayer, PointSpec, feature_err, to_lonlat, user_crs};
use super::reader::Format;
use super::set_files::{SetFiles, open_files};
use super::source::Source;
use shapefile::Shape;

/// Reads the points (or outlines) of a Shapefile set named by `source` (`.shp` or `.zip`).
pub(super) fn read(source: &Source, spec: &PointSpec) -> Result<PointLayer, IngestError> {
    let (files, zip) = match (Format::of(source), source.path()) {
        (Format::ZippedShapefile, _) => {
            let pick = super::reader::Pick::always(spec.layer.as_deref(), spec.kind);
            let (files, record, _) = super::zipped::set_from_zip(source, pick)?;
            (files, Some(record))
        }
        (_, Some(p)) => (SetFiles::from_disk(p)?, None),
        (_, None) => {
            return Err(IngestError::Io {
                path: source.display_path(),
                source: std::io::Error::other("a Shapefile set is read from files only"),
            });
        }
    };
    let path = files.shp.path.clone();
    let crs = match user_crs(&path, spec)? {
        Some(c) => c,
        None => declared_crs(&files, spec)?,
    };
    let mut set = open_files(&files)?;
    let numbers = set.numeric_text();
    let fields = set.fields();
    let mut features = Vec::new();
    for (index, item) in set.records() {
        let (shape, record) = item.map_err(|e| {
            let (field, message) = super::set_errors::record(&path, &fields, &numbers, index, e);
            feature_err(&path, index, field.as_deref(), message)
        })?;
        let (pos, outline) = match shape {
            Shape::Point(p) => ([p.x, p.y], None),
            Shape::PointM(p) => ([p.x, p.y], None),
            Shape::PointZ(p) => ([p.x, p.y], None),
            Shape::Polygon(p) if spec.polygons => {
                outline(super::zones_shp::ring_list(p.rings(), |q| [q.x, q.y]))
                    .map_err(|m| feature_err(&path, index, Some("geometry"), m))?
            }
            Shape::PolygonM(p) if spec.polygons => {
                outline(super::zones_shp::ring_list(p.rings(), |q| [q.x, q.y]))
                    .map_err(|m| feature_err(&path, index, Some("geometry"), m))?
            }
            Shape::PolygonZ(p) if spec.polygons => {
                outline(super::zones_shp::ring_list(p.rings(), |q| [q.x, q.y]))
                    .map_err(|m| feature_err(&path, index, Some("geometry"), m))?
            }
            Shape::NullShape => {
                return Err(feature_err(
                    &path,
                    index,
                    Some("geometry"),
                    format!("the {} has no geometry (a null shape)", spec.kind.noun),
                ));
            }
            other => {
                let found = other.shapetype().to_string();
                return Err(feature_err(
                    &path,
                    index,
                    Some("geometry"),
                    super::points::wrong_geometry(spec, &found),
                ));
            }
        };
        let mut attributes = serde_json::Map::new();
        for (k, v) in record {
            let value = numbers.value(index, &k, &v)?;
            attributes.insert(k, value);
        }
        features.push(PointFeature {
            index,
            pos,
            outline,
            attributes,
            member_id: None,
        });
    }
    to_lonlat(&path, Some(&crs), spec, &mut features)?;
    let layer = zip.is_some().then(|| {
        path.file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default()
    });
    let input = match zip {
        Some(record) => record,
        None => super::shapefile::fingerprint(&path, spec.kind.role)?,
    };
    Ok(PointLayer {
        features,
        input: super::source::InputRecord {
            deleted_records: set.deleted(),
            ..input
        },
        path,
        layer,
        crs: Some(crs.describe()),
    })
}

/// The CRS the set's `.prj` declares; a set without one is refused, naming the layer's option.
fn declared_crs(files: &SetFiles, spec: &PointSpec) -> Result<Crs, IngestError> {
    let Some(prj) = &files.prj else {
        return Err(IngestError::Crs {
            path: files.shp.path.clone(),
            message: format!(
                "has no .prj file beside it: give the layer's CRS with {} EPSG:NNNN",
                spec.kind.crs_flag
            ),
        });
    };
    let text = prj.text.as_ref().map_err(|m| IngestError::Io {
        path: prj.path.clone(),
        source: std::io::Error::other(format!(
            "{m}; give the layer's CRS with {} EPSG:NNNN",
            spec.kind.crs_flag
        )),
    })?;
    Crs::from_wkt(text).map_err(|m| IngestError::Crs {
        path: prj.path.clone(),
        message: m,
    })
}

/// The outline of a Shapefile polygon, its rings assembled by [`super::zones_shp::assemble`]
/// (each hole to the outer ring that contains it, whatever their order).
fn outline(rings: Vec<(bool, Vec<[f64; 2]>)>) -> Result<([f64; 2], Option<Outline>), String> {
    let polygons = super::zones_shp::assemble(rings)?;
    let first = polygons
        .first()
        .and_then(|p| p.first())
        .and_then(|r| r.first())
        .copied()
        .unwrap_or([0.0, 0.0]);
    Ok((first, Some(Outline { polygons })))
}
