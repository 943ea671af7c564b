//! Critical sites (hospitals, shelters, depots, water plants): points from GeoJSON or CSV.

use super::IngestError;
use super::coords::Coords;
use super::geojson::{ReadFailure, read_collection};
use super::outline::Outline;
use super::source::{HashingReader, InputRecord, Source};
use serde_json::{Map, Value};
use std::collections::HashMap;
use std::path::Path;

/// Property names tried for a site's id when no `--site-id-field` is given (after the GeoJSON `id`).
pub const SITE_ID_FIELDS: &[&str] = &["site_id", "id", "ID", "fid", "FID", "name", "NAME"];
/// Column names tried for longitude in CSV files.
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
/// Column names tried for latitude in CSV files.
pub const LAT_COLUMNS: &[&str] = &["lat", "latitude", "y", "LAT", "Latitude", "Y"];

/// How sites are read.
#[derive(Debug, Clone, Default)]
pub struct SiteSettings {
    /// Field holding each site's id (default: the GeoJSON id, then `site_id`, `id`, `fid`, `name`).
    pub id_field: Option<String>,
    /// Field holding a display name (default `name`).
    pub name_field: Option<String>,
    /// Field holding a numeric priority, higher first (default `priority`; absent means 1).
    pub priority_field: Option<String>,
    /// CSV column with longitudes (default: `lon`, `lng`, `longitude` or `x`).
    pub lon_column: Option<String>,
    /// CSV column with latitudes (default: `lat`, `latitude` or `y`).
    pub lat_column: Option<String>,
    /// The layer's CRS as `EPSG:NNNN` (default: the Shapefile's .prj, or WGS84 lon/lat).
    pub crs: Option<String>,
    /// CSV field separator (`--sites-delimiter`); default: told from the header line.
    pub delimiter: Option<u8>,
    /// The layer of a GeoPackage holding several (`--sites-layer`).
    pub layer: Option<String>,
    /// Tags choosing the sites of an OpenStreetMap extract (`--site-tags`); empty: the default set
    /// ([`super::osm_sites::DEFAULT_SITE_TAGS`]).
    pub osm_tags: Vec<super::cost_table::RoadFilter>,
}

/// One critical site.
#[derive(Debug, Clone, PartialEq)]
pub struct Site {
    /// 0-based position in the input.
    pub index: usize,
    /// The site's id (unique in the layer).
    pub id: String,
    /// Display name, when the layer has one.
    pub name: Option<String>,
    /// Priority: higher sites matter more (default 1).
    pub priority: f64,
    /// Position, lon/lat WGS84 (for a polygon site, a point inside it: [`Outline::check`]).
    pub pos: [f64; 2],
    /// The outline of a site drawn as a polygon, lon/lat; it attaches at the road nearest to it.
    pub outline: Option<Outline>,
    /// All attributes of the input feature or row, carried through to the outputs.
    pub attributes: Map<String, Value>,
}

/// The sites of a layer with the input's fingerprint.
#[derive(Debug, Clone)]
pub struct SiteLayer {
    /// Sites in input order.
    pub sites: Vec<Site>,
    /// Path, size and SHA-256 of the input.
    pub input: InputRecord,
    /// How many sites took a default because their layer lacks the field.
    pub defaults: SiteDefaults,
}

/// Counts of sites that took a default for want of a value: such defaults change the plan, so
/// the run announces them.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct SiteDefaults {
    /// Sites named `site-N` by position because no id field held a value.
    pub generated_ids: usize,
    /// Sites given priority 1 because the priority field held no value.
    pub default_priority: usize,
}

impl SiteDefaults {
    fn add(&mut self, generated_id: bool, default_priority: bool) {
        self.generated_ids += usize::from(generated_id);
        self.default_priority += usize::from(default_priority);
    }
}

/// The sites file's extension, lower case: it decides the format (`csv`/`txt` CSV, `shp`
/// Shapefile, else GeoJSON).
fn extension(source: &Source) -> Option<String> {
    source
        .display_path()
        .extension()
        .and_then(|e| e.to_str())
        .map(|e| e.to_ascii_lowercase())
}

/// True when the sites are read as CSV (the only format with lon/lat columns).
pub fn reads_as_csv(source: &Source) -> bool {
    matches!(extension(source).as_deref(), Some("csv") | Some("txt"))
}

/// Reads sites from GeoJSON (Point features) or CSV (lon/lat columns, header required), by
/// extension. A layer with no sites is refused: a plan for nothing would look like a plan.
pub fn read_sites(source: &Source, settings: &SiteSettings) -> Result<SiteLayer, IngestError> {
    let layer = read_sites_any(source, settings)?;
    if layer.sites.is_empty() {
        return Err(IngestError::Io {
            path: source.display_path(),
            source: std::io::Error::other(
                "the sites layer holds no sites (no features, or a header and no rows): there is \
                 nothing to connect; give a layer with at least one site, or plan without --sites",
            ),
        });
    }
    Ok(layer)
}

fn read_sites_any(source: &Source, settings: &SiteSettings) -> Result<SiteLayer, IngestError> {
    let path = source.display_path();
    let ext = extension(source);
    if ext.as_deref() == Some("shp") {
        return read_shapefile_sites(&path, settings);
    }
    match super::reader::Format::of(source) {
        super::reader::Format::OsmPbf => return super::osm_sites::read_osm_sites(source, settings),
        super::reader::Format::GeoPackage => {
            return super::layered::read_gpkg_sites(source, settings);
        }
        _ => {}
    }
    let mut reader = source.open()?;
    let (mut sites, defaults, declared) = match ext.as_deref() {
        Some("csv") | Some("txt") => {
            let (sites, defaults) = super::sites_csv::read_csv(&mut reader, &path, settings)?;
            (sites, defaults, None)
        }
        _ => read_geojson(&mut reader, &path, settings)?,
    };
    let (sha256, bytes) =
        HashingReader::finish_buffered(reader).map_err(|source| IngestError::Io {
            path: path.clone(),
            source,
        })?;
    if let Some(c) = &settings.crs {
        let crs = super::crs::Crs::from_user(c).map_err(|message| IngestError::Crs {
            path: path.clone(),
            message,
        })?;
        convert(&path, &crs, &mut sites)?;
    } else if let Some(crs) = declared.filter(|c| !c.is_wgs84()) {
        convert(&path, &crs, &mut sites)?;
    } else {
        for s in &sites {
            check_lonlat(&path, s.index, s.pos)?;
            for p in s
                .outline
                .iter()
                .flat_map(|o| o.polygons.iter().flatten().flatten())
            {
                check_lonlat(&path, s.index, *p)?;
            }
        }
    }
    finish_outlines(&path, &mut sites)?;
    check_unique(&path, &sites)?;
    Ok(SiteLayer {
        sites,
        input: InputRecord {
            role: "sites".into(),
            path: path.display().to_string(),
            bytes,
            sha256,
            deleted_records: 0,
        },
        defaults,
    })
}

pub(super) fn feature_err(
    path: &Path,
    feature: usize,
    field: Option<&str>,
    message: String,
) -> IngestError {
    IngestError::Feature {
        path: path.to_path_buf(),
        feature,
        field: field.map(str::to_string),
        message,
    }
}

/// Sites from GeoJSON, with the layer's own CRS (its legacy `crs` member, read as for roads).
fn read_geojson<R: std::io::Read>(
    reader: R,
    path: &Path,
    s: &SiteSettings,
) -> Result<(Vec<Site>, SiteDefaults, Option<super::crs::Crs>), IngestError> {
    let mut sites = Vec::new();
    let mut defaults = SiteDefaults::default();
    // Keep every property: sites are few, and their attributes go to the outputs.
    let member = read_collection_all(reader, |index, f, props| {
        let (pos, outline) = site_shape(f.geometry_type.as_deref(), &f.coords)
            .map_err(|m| feature_err(path, index, Some("geometry"), m))?;
        let mut site = make_site(path, index, pos, props, f.id.as_ref(), s, &mut defaults)?;
        site.outline = outline;
        sites.push(site);
        Ok(())
    })
    .map_err(|e| IngestError::from_read(path, e))?;
    // --sites-crs overrides the member, as --crs does a road layer's.
    let declared = match (&s.crs, member) {
        (None, Some(m)) => Some(super::crs::crs_member(path, Some(&m), "--sites-crs")?),
        _ => None,
    };
    Ok((sites, defaults, declared))
}

/// Like [`read_collection`] but hands every feature's full property map to the callback.
fn read_collection_all<R, F>(
    reader: R,
    mut sink: F,
) -> Result<Option<Value>, ReadFailure<IngestError>>
where
    R: std::io::Read,
    F: FnMut(usize, super::geojson::RawFeature, Map<String, Value>) -> Result<(), IngestError>,
{
    read_collection(
        reader,
        &[super::geojson::ALL_PROPERTIES.to_string()],
        |i, mut f| {
            let props: Map<String, Value> = std::mem::take(&mut f.props).into_iter().collect();
            sink(i, f, props)
        },
    )
    .map(|info| info.crs)
}

/// A site from its attributes: the id from `--site-id-field`, else the GeoJSON `id`, else a field
/// such as `site_id` or `name`, else `site-N`; the display name and the priority likewise.
pub(super) fn make_site(
    path: &Path,
    index: usize,
    pos: [f64; 2],
    attributes: Map<String, Value>,
    member_id: Option<&Value>,
    s: &SiteSettings,
    defaults: &mut SiteDefaults,
) -> Result<Site, IngestError> {
    let found = match &s.id_field {
        Some(f) => attributes.get(f).and_then(text),
        None => member_id.and_then(text).or_else(|| {
            SITE_ID_FIELDS
                .iter()
                .find_map(|k| attributes.get(*k).and_then(text))
        }),
    };
    let field = s.priority_field.as_deref().unwrap_or("priority");
    let no_priority = match attributes.get(field) {
        None | Some(Value::Null) => true,
        Some(Value::String(t)) => t.trim().is_empty(),
        Some(_) => false,
    };
    defaults.add(found.is_none(), no_priority);
    let id = found.unwrap_or_else(|| format!("site-{}", index + 1));
    let name_field = s.name_field.as_deref().unwrap_or("name");
    Ok(Site {
        index,
        id,
        name: attributes.get(name_field).and_then(text),
        priority: priority(path, index, &attributes, s)?,
        pos,
        outline: None,
        attributes,
    })
}

use super::value::text;

fn priority(
    path: &Path,
    index: usize,
    props: &Map<String, Value>,
    s: &SiteSettings,
) -> Result<f64, IngestError> {
    let field = s.priority_field.as_deref().unwrap_or("priority");
    match props.get(field) {
        None | Some(Value::Null) => Ok(1.0),
        Some(Value::Number(n)) => n
            .as_f64()
            .filter(|x| x.is_finite() && *x >= 0.0)
            .ok_or_else(|| {
                feature_err(
                    path,
                    index,
                    Some(field),
                    format!("priority {n} is not a number ≥ 0"),
                )
            }),
        Some(Value::String(t)) if t.trim().is_empty() => Ok(1.0),
        Some(Value::String(t)) => t
            .trim()
            .parse::<f64>()
            .ok()
            .filter(|x| x.is_finite() && *x >= 0.0)
            .ok_or_else(|| {
                feature_err(
                    path,
                    index,
                    Some(field),
                    format!("priority {t:?} is not a number ≥ 0"),
                )
            }),
        Some(other) => Err(feature_err(
            path,
            index,
            Some(field),
            format!("priority {other} is not a number ≥ 0"),
        )),
    }
}

pub(super) fn check_lonlat(path: &Path, index: usize, p: [f64; 2]) -> Result<(), IngestError> {
    if p[0].is_finite() && p[1].is_finite() && p[0].abs() <= 180.0 && p[1].abs() <= 90.0 {
        Ok(())
    } else {
        Err(feature_err(
            path,
            index,
            Some("geometry"),
            format!(
                "{} is not a longitude/latitude in WGS84 range (±180, ±90); if the layer is projected, {}",
                crate::decimal::position(p),
                super::crs::hint("--sites-crs")
            ),
        ))
    }
}

pub(super) fn check_unique(path: &Path, sites: &[Site]) -> Result<(), IngestError> {
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for s in sites {
        if let Some(first) = seen.insert(&s.id, s.index) {
            return Err(feature_err(
                path,
                s.index,
                None,
                format!(
                    "site id {:?} is used twice (also by feature {first}); site ids must be unique",
                    s.id
                ),
            ));
        }
    }
    Ok(())
}

/// Converts site positions and outlines from `crs` to WGS84 longitude/latitude.
pub(super) fn convert(
    path: &Path,
    crs: &super::crs::Crs,
    sites: &mut [Site],
) -> Result<(), IngestError> {
    for s in sites.iter_mut() {
        let mut points: Vec<&mut [f64; 2]> = vec![&mut s.pos];
        points.extend(s.outline.iter_mut().flat_map(|o| o.positions_mut()));
        for p in points {
            convert_one(path, crs, s.index, p)?;
        }
    }
    Ok(())
}

fn convert_one(
    path: &Path,
    crs: &super::crs::Crs,
    index: usize,
    pos: &mut [f64; 2],
) -> Result<(), IngestError> {
    *pos = crs.to_lonlat(*pos).ok_or_else(|| {
        feature_err(
            path,
            index,
            Some("geometry"),
            format!(
                "{} cannot be converted from {} to longitude/latitude: it is implausible for that CRS; check --sites-crs and the layer's units",
                crate::decimal::position(*pos), crs.name
            ),
        )
    })?;
    Ok(())
}

/// Checks every polygon site's outline (in lon/lat) and places the site at its point inside.
pub(super) fn finish_outlines(path: &Path, sites: &mut [Site]) -> Result<(), IngestError> {
    for s in sites.iter_mut() {
        if let Some(o) = &mut s.outline {
            s.pos = o
                .check()
                .map_err(|m| feature_err(path, s.index, Some("geometry"), m))?;
        }
    }
    Ok(())
}

/// A site's point, or its outline, from a feature's geometry in GeoJSON's layout (the GeoJSON
/// and GeoPackage readers give it so); the outline's first position stands in for the point
/// until [`finish_outlines`] places it.
pub(super) fn site_shape(
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
        (Some("Point"), 1) => return Ok((c.pos[0], None)),
        (Some(k), 0) => return Err(format!("the site's {k} is empty")),
        (Some("Polygon"), 3) => vec![rings(0, c.parts.len())],
        (Some("MultiPolygon"), 4) => {
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
        (Some(other), _) => {
            return Err(format!(
                "sites must be Points, Polygons or MultiPolygons, found {other}"
            ));
        }
        (None, _) => return Err("the site has no geometry".into()),
    };
    Ok((c.pos[0], Some(Outline { polygons })))
}

/// Sites from a point Shapefile, in the CRS of its `.prj` (or `--sites-crs`).
fn read_shapefile_sites(path: &Path, s: &SiteSettings) -> Result<SiteLayer, IngestError> {
    use shapefile::Shape;
    let crs = super::shapefile::layer_crs(path, s.crs.as_deref(), "--sites-crs")?;
    let mut reader = super::shapefile::open_set(path)?;
    let mut sites = Vec::new();
    let mut defaults = SiteDefaults::default();
    let numbers = reader.numeric_text();
    let fields = reader.fields();
    for (index, item) in reader.records() {
        let (shape, record) = item.map_err(|e| {
            let (field, message) = super::set_errors::record(path, &fields, e);
            feature_err(path, index, field.as_deref(), message)
        })?;
        let (pos, outline) = match shape {
            Shape::Point(p) => ([p.x, p.y], None),
            Shape::PointM(p) => ([p.x, p.y], None),
            Shape::PointZ(p) => ([p.x, p.y], None),
            Shape::Polygon(p) => {
                shapefile_outline(super::zones_shp::ring_list(p.rings(), |q| [q.x, q.y]))
                    .map_err(|m| feature_err(path, index, Some("geometry"), m))?
            }
            Shape::PolygonM(p) => {
                shapefile_outline(super::zones_shp::ring_list(p.rings(), |q| [q.x, q.y]))
                    .map_err(|m| feature_err(path, index, Some("geometry"), m))?
            }
            Shape::PolygonZ(p) => {
                shapefile_outline(super::zones_shp::ring_list(p.rings(), |q| [q.x, q.y]))
                    .map_err(|m| feature_err(path, index, Some("geometry"), m))?
            }
            other => {
                return Err(feature_err(
                    path,
                    index,
                    Some("geometry"),
                    format!(
                        "sites must be Points or Polygons, found {}",
                        other.shapetype()
                    ),
                ));
            }
        };
        let mut attributes = Map::new();
        for (k, v) in record {
            let value = numbers.value(index, &k, &v)?;
            attributes.insert(k, value);
        }
        let mut site = make_site(path, index, pos, attributes, None, s, &mut defaults)?;
        site.outline = outline;
        sites.push(site);
    }
    convert(path, &crs, &mut sites)?;
    finish_outlines(path, &mut sites)?;
    check_unique(path, &sites)?;
    Ok(SiteLayer {
        sites,
        input: InputRecord {
            deleted_records: reader.deleted(),
            ..super::shapefile::fingerprint(path, "sites")?
        },
        defaults,
    })
}

/// The outline of a Shapefile polygon, its rings assembled by [`super::zones_shp::assemble`].
fn shapefile_outline(
    rings: Vec<(bool, Vec<[f64; 2]>)>,
) -> Result<([f64; 2], Option<Outline>), String> {
    let polygons = super::zones_shp::assemble(rings)?;
    let first = polygons
        .first()
        .and_then(|p| p.first())
        .and_then(|r| r.first())
        .copied()
        .unwrap_or([0.0, 0.0]);
    Ok((first, Some(Outline { polygons })))
}
