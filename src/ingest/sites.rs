//! Critical sites (hospitals, shelters, depots, water plants): points from GeoJSON or CSV.

use super::IngestError;
use super::geojson::{ReadFailure, read_collection};
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
    /// Position, lon/lat WGS84.
    pub pos: [f64; 2],
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

/// Reads sites from GeoJSON (Point features) or CSV (lon/lat columns, header required), by extension.
pub fn read_sites(source: &Source, settings: &SiteSettings) -> Result<SiteLayer, IngestError> {
    let path = source.display_path();
    let ext = extension(source);
    if ext.as_deref() == Some("shp") {
        return read_shapefile_sites(&path, settings);
    }
    if super::reader::Format::of(source) == super::reader::Format::OsmPbf {
        return super::osm_sites::read_osm_sites(source, settings);
    }
    let mut reader = source.open()?;
    let (mut sites, defaults) = match ext.as_deref() {
        Some("csv") | Some("txt") => read_csv(&mut reader, &path, settings)?,
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
    } else {
        for s in &sites {
            check_lonlat(&path, s.index, s.pos)?;
        }
    }
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

fn feature_err(path: &Path, feature: usize, field: Option<&str>, message: String) -> IngestError {
    IngestError::Feature {
        path: path.to_path_buf(),
        feature,
        field: field.map(str::to_string),
        message,
    }
}

fn read_geojson<R: std::io::Read>(
    reader: R,
    path: &Path,
    s: &SiteSettings,
) -> Result<(Vec<Site>, SiteDefaults), IngestError> {
    let mut sites = Vec::new();
    let mut defaults = SiteDefaults::default();
    // Keep every property: sites are few, and their attributes go to the outputs.
    read_collection_all(reader, |index, f, props| {
        match f.geometry_type.as_deref() {
            Some("Point") if f.coords.height == 1 => {}
            Some(other) => {
                return Err(feature_err(
                    path,
                    index,
                    Some("geometry"),
                    format!("sites must be Points, found {other}"),
                ));
            }
            None => {
                return Err(feature_err(
                    path,
                    index,
                    Some("geometry"),
                    "the site has no geometry".into(),
                ));
            }
        }
        let pos = f.coords.pos[0];
        sites.push(make_site(
            path,
            index,
            pos,
            props,
            f.id.as_ref(),
            s,
            &mut defaults,
        )?);
        Ok(())
    })
    .map_err(|e| IngestError::from_read(path, e))?;
    Ok((sites, defaults))
}

/// Like [`read_collection`] but hands every feature's full property map to the callback.
fn read_collection_all<R, F>(reader: R, mut sink: F) -> Result<(), ReadFailure<IngestError>>
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
    .map(|_| ())
}

/// The separator of a header that is one column holding `;`, a tab or `|` (a CSV written with a
/// separator other than the comma), if any.
pub(crate) fn other_separator(headers: &csv::StringRecord) -> Option<char> {
    if headers.len() != 1 {
        return None;
    }
    [';', '\t', '|']
        .into_iter()
        .find(|c| headers[0].contains(*c))
}

fn read_csv<R: std::io::Read>(
    reader: R,
    path: &Path,
    s: &SiteSettings,
) -> Result<(Vec<Site>, SiteDefaults), IngestError> {
    let mut defaults = SiteDefaults::default();
    let mut rdr =
        csv::ReaderBuilder::new()
            .flexible(false)
            .from_reader(super::limits::LineLimit::new(
                reader,
                super::limits::MAX_CSV_ROW,
            ));
    let csv_err = |e: csv::Error| {
        let line = e.position().map(|p| p.line()).unwrap_or(0);
        // Not `Syntax`, whose message says GeoJSON.
        IngestError::Io {
            path: path.to_path_buf(),
            source: std::io::Error::other(format!("not valid CSV at line {line}: {e}")),
        }
    };
    let headers = rdr.headers().map_err(csv_err)?.clone();
    let find =
        |given: &Option<String>, defaults: &[&str], what: &str| -> Result<usize, IngestError> {
            let names: Vec<&str> = match given {
                Some(g) => vec![g.as_str()],
                None => defaults.to_vec(),
            };
            names
                .iter()
                .find_map(|n| headers.iter().position(|h| h.trim() == *n))
                .ok_or_else(|| IngestError::Feature {
                    path: path.to_path_buf(),
                    feature: 0,
                    field: Some(names.join("|")),
                    message: format!(
                        "no {what} column; the columns are: {}",
                        headers.iter().collect::<Vec<_>>().join(", ")
                    ),
                })
        };
    if let Some(sep) = other_separator(&headers) {
        return Err(IngestError::Io {
            path: path.to_path_buf(),
            source: std::io::Error::other(format!(
                "not comma-separated CSV: the header is one column holding {sep:?}; \
                 reknit reads comma-separated CSV (RFC 4180): save it again with commas, or convert it, \
                 e.g. ogr2ogr -f CSV -lco SEPARATOR=COMMA out.csv in.csv"
            )),
        });
    }
    let lon_i = find(&s.lon_column, LON_COLUMNS, "longitude")?;
    let lat_i = find(&s.lat_column, LAT_COLUMNS, "latitude")?;
    let mut sites = Vec::new();
    for (index, rec) in rdr.records().enumerate() {
        let rec = rec.map_err(csv_err)?;
        let num = |i: usize| -> Result<f64, IngestError> {
            let v = rec.get(i).unwrap_or("").trim();
            v.parse::<f64>()
                .ok()
                .filter(|x| x.is_finite())
                .ok_or_else(|| {
                    feature_err(
                        path,
                        index,
                        Some(&headers[i]),
                        format!("{v:?} is not a number"),
                    )
                })
        };
        let pos = [num(lon_i)?, num(lat_i)?];
        let mut attributes = Map::new();
        for (h, v) in headers.iter().zip(rec.iter()) {
            attributes.insert(h.to_string(), super::value::cell(v));
        }
        sites.push(make_site(
            path,
            index,
            pos,
            attributes,
            None,
            s,
            &mut defaults,
        )?);
    }
    Ok((sites, defaults))
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

fn check_lonlat(path: &Path, index: usize, p: [f64; 2]) -> Result<(), IngestError> {
    if p[0].is_finite() && p[1].is_finite() && p[0].abs() <= 180.0 && p[1].abs() <= 90.0 {
        Ok(())
    } else {
        Err(feature_err(
            path,
            index,
            Some("geometry"),
            format!(
                "({}, {}) is not a longitude/latitude in WGS84 range (±180, ±90)",
                p[0], p[1]
            ),
        ))
    }
}

fn check_unique(path: &Path, sites: &[Site]) -> Result<(), IngestError> {
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

/// Converts site positions from `crs` to WGS84 longitude/latitude.
fn convert(path: &Path, crs: &super::crs::Crs, sites: &mut [Site]) -> Result<(), IngestError> {
    for s in sites.iter_mut() {
        s.pos = crs.to_lonlat(s.pos).ok_or_else(|| {
            feature_err(
                path,
                s.index,
                Some("geometry"),
                format!(
                    "({}, {}) cannot be converted from {} to longitude/latitude: it is implausible for that CRS; check --sites-crs and the layer's units",
                    s.pos[0], s.pos[1], crs.name
                ),
            )
        })?;
    }
    Ok(())
}

/// Sites from a point Shapefile, in the CRS of its `.prj` (or `--sites-crs`).
fn read_shapefile_sites(path: &Path, s: &SiteSettings) -> Result<SiteLayer, IngestError> {
    use shapefile::Shape;
    let crs = super::shapefile::layer_crs(path, s.crs.as_deref())?;
    let mut reader = super::shapefile::open_set(path)?;
    let mut sites = Vec::new();
    let mut defaults = SiteDefaults::default();
    let numbers = reader.numeric_text();
    for (index, item) in reader.records() {
        let (shape, record) =
            item.map_err(|e| feature_err(path, index, None, format!("unreadable record: {e}")))?;
        let pos = match shape {
            Shape::Point(p) => [p.x, p.y],
            Shape::PointM(p) => [p.x, p.y],
            Shape::PointZ(p) => [p.x, p.y],
            other => {
                return Err(feature_err(
                    path,
                    index,
                    Some("geometry"),
                    format!("sites must be Points, found {}", other.shapetype()),
                ));
            }
        };
        let mut attributes = Map::new();
        for (k, v) in record {
            let value = numbers.value(index, &k, &v)?;
            attributes.insert(k, value);
        }
        sites.push(make_site(
            path,
            index,
            pos,
            attributes,
            None,
            s,
            &mut defaults,
        )?);
    }
    convert(path, &crs, &mut sites)?;
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
