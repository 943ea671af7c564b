//! Critical sites (hospitals, shelters, depots, water plants): points or outlines from any point
//! layer format ([`super::points`]) or an OpenStreetMap extract, with their ids, names and
//! priorities.

use super::IngestError;
use super::outline::Outline;
use super::points::{PointSpec, read_points};
use super::source::{InputRecord, Source};
use serde_json::{Map, Value};
use std::collections::HashMap;
use std::path::Path;

pub use super::points::{LAT_COLUMNS, LON_COLUMNS, reads_as_csv};

/// Property names tried for a site's id when no `--site-id-field` is given (after the GeoJSON `id`).
pub const SITE_ID_FIELDS: &[&str] = &["site_id", "id", "ID", "fid", "FID", "name", "NAME"];
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
    /// Where a point layer came from, for the check against the roads' extent (`None` for an
    /// OpenStreetMap extract, always longitude/latitude).
    pub origin: Option<super::elsewhere::LayerOrigin>,
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

/// Reads sites from any point layer format or an OpenStreetMap extract, by the file's name. A layer with no sites is refused: a plan for nothing would look like a plan.
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

impl SiteSettings {
    /// How the generic point reader reads a sites layer: its words, options and choices.
    pub fn point_spec(&self) -> PointSpec {
        PointSpec {
            kind: &super::kind::SITES,
            column_flags: "--lon-column/--lat-column",
            polygons: true,
            crs: self.crs.clone(),
            delimiter: self.delimiter,
            layer: self.layer.clone(),
            lon_column: self.lon_column.clone(),
            lat_column: self.lat_column.clone(),
            number_columns: vec![
                self.priority_field
                    .clone()
                    .unwrap_or_else(|| "priority".into()),
            ],
        }
    }
}

fn read_sites_any(source: &Source, settings: &SiteSettings) -> Result<SiteLayer, IngestError> {
    if super::reader::Format::of(source) == super::reader::Format::OsmPbf {
        return super::osm_sites::read_osm_sites(source, settings);
    }
    let spec = settings.point_spec();
    let layer = read_points(source, &spec)?;
    let origin = layer.origin(&spec);
    let path = layer.path;
    let mut defaults = SiteDefaults::default();
    let mut sites = Vec::with_capacity(layer.features.len());
    for f in layer.features {
        let mut site = make_site(
            &path,
            f.index,
            f.pos,
            f.attributes,
            f.member_id.as_ref(),
            settings,
            &mut defaults,
        )?;
        site.outline = f.outline;
        sites.push(site);
    }
    finish_outlines(&path, &mut sites)?;
    check_unique(&path, &sites)?;
    Ok(SiteLayer {
        sites,
        input: layer.input,
        defaults,
        origin: Some(origin),
    })
}

pub(super) use super::points::feature_err;

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
                    format!(
                        "priority {} is not a number ≥ 0",
                        super::limits::excerpt(&n.to_string())
                    ),
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
                    format!(
                        "priority {:?} is not a number ≥ 0",
                        super::limits::excerpt(t)
                    ),
                )
            }),
        Some(other) => Err(feature_err(
            path,
            index,
            Some(field),
            format!(
                "priority {} is not a number ≥ 0",
                super::limits::excerpt(&other.to_string())
            ),
        )),
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
