//! Reading a road centerline layer into flat arrays of line parts.

pub use super::crs::crs_member;
use super::crs::{Crs, LengthRule};
use super::damage::{Damage, DamageRule};
use super::source::{InputRecord, Source};
use super::{IngestError, MAX_SNAP_M};
use crate::decimal::Fixed;
use crate::network::FeatureMeta;
use serde_json::Value;
use std::collections::BTreeMap;
use std::path::Path;

/// Property names taken as a feature's id when no `--id-field` is given and it has no `id` member.
pub const ID_FIELDS: &[&str] = &[
    "id", "ID", "Id", "osm_id", "fid", "FID", "objectid", "OBJECTID", "ObjectID", "gid", "GID",
];

/// Property names read for a road's name and reference number (work orders show them).
pub const LABEL_FIELDS: &[&str] = &["name", "NAME", "Name", "ref", "REF", "Ref"];

/// How road features are read and noded.
#[derive(Debug, Clone)]
pub struct RoadSettings {
    /// Vertices closer than this many metres are merged (0: exact coordinates only).
    pub snap_m: f64,
    /// How the damage factor is read.
    pub damage: DamageRule,
    /// Property holding each feature's id; `None` looks for the `id` member, then common id fields.
    pub id_field: Option<String>,
    /// The layer's CRS as `EPSG:NNNN`, overriding the `.prj` or GeoJSON `crs` member.
    pub crs: Option<String>,
    /// Join lines where they cross without a shared vertex (data digitised without junctions).
    pub node_crossings: bool,
    /// Property holding a damage category (looked up in `cost_table`) instead of a factor.
    pub category_field: Option<String>,
    /// Damage categories and road-class rates.
    pub cost_table: super::cost_table::CostTable,
    /// The file the cost table was read from, if any (an input the output guard protects).
    pub cost_table_file: Option<std::path::PathBuf>,
    /// Features kept or dropped by field values, applied in order.
    pub filters: Vec<super::cost_table::RoadFilter>,
    /// Property saying whether a road is on a bridge, culvert or tunnel; `None` reads the common
    /// fields ([`super::structures::FIELDS`]).
    pub structure_field: Option<String>,
    /// Attribution the data's source asks for (`--attribution`); OpenStreetMap's is added itself.
    pub attribution: Option<String>,
    /// The layer to read from a file that holds several (a GeoPackage; `--roads-layer`).
    pub layer: Option<String>,
}

impl RoadSettings {
    /// Every property the readers must keep for these settings.
    pub fn wanted_fields(&self) -> Vec<String> {
        let mut w = vec![self.damage.field.clone()];
        match &self.id_field {
            Some(f) => w.push(f.clone()),
            None => w.extend(ID_FIELDS.iter().map(|s| s.to_string())),
        }
        w.extend(self.category_field.clone());
        w.extend(self.cost_table.class_field.clone());
        w.extend(self.filters.iter().map(|f| f.field.clone()));
        w.extend(LABEL_FIELDS.iter().map(|s| s.to_string()));
        w.extend(super::structures::wanted(self.structure_field.as_deref()));
        w.extend(super::attribution::OSM_FIELDS.iter().map(|s| s.to_string()));
        w
    }
}

impl Default for RoadSettings {
    fn default() -> Self {
        RoadSettings {
            snap_m: 0.5,
            damage: DamageRule::default(),
            id_field: None,
            crs: None,
            node_crossings: false,
            category_field: None,
            cost_table: Default::default(),
            cost_table_file: None,
            filters: Vec::new(),
            structure_field: None,
            attribution: None,
            layer: None,
        }
    }
}

impl RoadSettings {
    /// Checks every setting's range.
    pub fn validate(&self) -> Result<(), IngestError> {
        if !self.snap_m.is_finite() || self.snap_m < 0.0 || self.snap_m > MAX_SNAP_M {
            return Err(IngestError::Setting {
                name: "--snap",
                message: format!(
                    "{} m is outside 0 to {MAX_SNAP_M} m (a tolerance this large would merge \
                     separate roads)",
                    crate::decimal::shown(self.snap_m)
                ),
            });
        }
        let d = self.damage.default;
        if !d.is_finite() || d > super::damage::MAX_FACTOR {
            return Err(IngestError::Setting {
                name: "--default-damage",
                message: format!(
                    "{} is not a factor from 0 to {} (negative means closed)",
                    crate::decimal::shown(d),
                    super::damage::MAX_FACTOR
                ),
            });
        }
        Ok(())
    }
}

/// Counts from reading a layer.
#[derive(Debug, Clone, Default, serde::Serialize)]
pub struct ReadStats {
    /// Features in the file.
    pub features_read: usize,
    /// Features that contributed at least one line.
    pub features_used: usize,
    /// Features skipped, by reason.
    pub features_skipped: BTreeMap<String, usize>,
    /// Line parts read (a MultiLineString contributes one per line).
    pub line_parts: usize,
    /// Vertices read.
    pub vertices: usize,
    /// Features used whose damage came from the default (`--default-damage`): no value in the
    /// damage field, or no category with `--category-field`.
    pub damage_defaulted: usize,
    /// Features that lost part of their geometry at the file's edge (an OpenStreetMap way cut at
    /// the extract's boundary keeps its located runs); omitted when none.
    #[serde(skip_serializing_if = "is_zero")]
    pub features_cut_at_edge: usize,
}

fn is_zero(n: &usize) -> bool {
    *n == 0
}

/// Road lines as flat arrays: the vertices of part `p` are `coords[part_start(p)..part_ends[p]]`.
#[derive(Debug, Clone, Default)]
pub struct LineLayer {
    /// Lon/lat (WGS84) of every vertex of every part.
    pub coords: Vec<[f64; 2]>,
    /// The same vertices in the source's projected CRS, when lengths are measured there (planar
    /// length × unit); empty otherwise.
    pub native: Vec<[f64; 2]>,
    /// Metres per native unit.
    pub to_meter: f64,
    /// The source CRS, described for summaries.
    pub crs_name: String,
    /// How lengths were measured, described for summaries.
    pub length_method: String,
    /// Accuracy notes about the CRS conversion.
    pub crs_note: Option<String>,
    /// End offset of each part in `coords`.
    pub part_ends: Vec<usize>,
    /// Index into `features` of each part.
    pub part_feature: Vec<u32>,
    /// Attributes of each feature that contributed lines.
    pub features: Vec<FeatureMeta>,
    /// The features' texts, each kept once.
    pub texts: crate::texts::TextTable,
    /// Counts from reading.
    pub stats: ReadStats,
    /// Path, size and fingerprint of the input.
    pub input: Option<InputRecord>,
    /// True when some feature carries a field only OpenStreetMap exports have (`osm_id`, `@id`).
    pub osm_fields: bool,
    /// The input layers laid end to end here, each with its label and first feature.
    pub layers: Vec<super::layers::SourceLayer>,
    /// The records of the layers after the first (`--roads` given more than once).
    pub more_inputs: Vec<InputRecord>,
}

impl LineLayer {
    /// The vertices of part `p`.
    pub fn part(&self, p: usize) -> &[[f64; 2]] {
        let start = if p == 0 { 0 } else { self.part_ends[p - 1] };
        &self.coords[start..self.part_ends[p]]
    }
}

/// Reads a road layer in the format its name tells ([`super::reader::Format`]), through the
/// one path every format takes ([`super::reader::read_lines`]).
pub fn read_roads(source: &Source, settings: &RoadSettings) -> Result<LineLayer, IngestError> {
    super::layers::read_layers(std::slice::from_ref(source), settings)
}

/// Fails when a layer holds no lines, saying what it held instead.
pub fn check_empty(layer: &LineLayer, path: &Path, features: usize) -> Result<(), IngestError> {
    if layer.part_ends.is_empty() {
        let path = path.to_path_buf();
        let detail = if features == 0 {
            "the layer is empty: it holds no features".to_string()
        } else {
            let reasons: Vec<String> = layer
                .stats
                .features_skipped
                .iter()
                .map(|(k, v)| format!("{v} × {k}"))
                .collect();
            format!("{features} features, all skipped: {}", reasons.join(", "))
        };
        return Err(IngestError::Empty { path, detail });
    }
    Ok(())
}

/// Checks or converts every vertex to WGS84 longitude/latitude, keeping the native coordinates when
/// lengths are planar; errors name the feature and vertex.
pub fn finish_coordinates(
    layer: &mut LineLayer,
    path: &Path,
    crs: &Crs,
) -> Result<(), IngestError> {
    use rayon::prelude::*;
    layer.crs_name = crs.describe();
    layer.crs_note = crs.note.clone();
    layer.to_meter = crs.to_meter;
    let bad = |layer: &LineLayer, i: usize, what: String| {
        let part = layer.part_ends.partition_point(|&e| e <= i);
        let start = if part == 0 {
            0
        } else {
            layer.part_ends[part - 1]
        };
        let f = &layer.features[layer.part_feature[part] as usize];
        IngestError::Feature {
            path: path.to_path_buf(),
            feature: f.source_index as usize,
            field: Some("geometry".into()),
            message: format!("vertex {} {what}", i - start),
        }
    };
    if crs.is_wgs84() {
        layer.length_method = "geodesic on the WGS84 ellipsoid (Karney; mid-latitude formula for steps under 1 km, within 0.1 mm of it)".into();
        if let Some(i) = layer
            .coords
            .iter()
            .position(|p| !(p[0].abs() <= 180.0 && p[1].abs() <= 90.0))
        {
            let p = layer.coords[i];
            return Err(bad(
                layer,
                i,
                format!(
                    "{} is not a longitude/latitude in WGS84 range (±180, ±90); if the layer is projected, give its CRS with --crs EPSG:NNNN",
                    crate::decimal::position(p)
                ),
            ));
        }
        return Ok(());
    }
    let converted: Vec<Option<[f64; 2]>> =
        layer.coords.par_iter().map(|&p| crs.to_lonlat(p)).collect();
    if let Some(i) = converted.iter().position(Option::is_none) {
        let p = layer.coords[i];
        return Err(bad(
            layer,
            i,
            format!(
                "{} cannot be converted from {} to longitude/latitude: it is implausible for that CRS; check --crs and the layer's units",
                crate::decimal::position(p),
                crs.name
            ),
        ));
    }
    let lonlat: Vec<[f64; 2]> = converted.into_iter().flatten().collect();
    let native = std::mem::replace(&mut layer.coords, lonlat);
    match crs.lengths {
        LengthRule::Planar => {
            if let Some((i, grid, ground)) = implausible_step(layer, &native, crs.to_meter) {
                return Err(bad(
                    layer,
                    i,
                    format!(
                        "to the next is {} m in {} but {} m on the ground: the coordinates are implausible for that CRS; check --crs and the layer's units",
                        Fixed(grid, 0),
                        crs.name,
                        Fixed(ground, 0)
                    ),
                ));
            }
            layer.native = native;
            layer.length_method = format!(
                "planar in {} × {} m per unit (conformal projection)",
                crs.name, crs.to_meter
            );
        }
        LengthRule::Geodesic => {
            layer.length_method = format!(
                "geodesic on the WGS84 ellipsoid after converting from {} (its planar distances are not ground distances)",
                crs.name
            );
        }
    }
    Ok(())
}

/// The first step between consecutive vertices whose grid length and ground length differ more
/// than any conformal grid allows near its area (a factor of 1.5): (vertex index, grid metres,
/// ground metres). Steps under a metre are not judged.
fn implausible_step(
    layer: &LineLayer,
    native: &[[f64; 2]],
    to_meter: f64,
) -> Option<(usize, f64, f64)> {
    use rayon::prelude::*;
    let lonlat = &layer.coords;
    (0..layer.part_ends.len())
        .into_par_iter()
        .filter_map(|part| {
            let start = if part == 0 {
                0
            } else {
                layer.part_ends[part - 1]
            };
            (start + 1..layer.part_ends[part]).find_map(|i| {
                let (a, b) = (native[i - 1], native[i]);
                let grid = (b[0] - a[0]).hypot(b[1] - a[1]) * to_meter;
                let ground = super::geodesy::distance_m(lonlat[i - 1], lonlat[i]);
                let off = grid.max(ground) > 1.0 && (grid > 1.5 * ground || ground > 1.5 * grid);
                off.then_some((i - 1, grid, ground))
            })
        })
        .min_by_key(|x| x.0)
}

pub(super) fn add_feature(
    layer: &mut LineLayer,
    path: &Path,
    settings: &RoadSettings,
    index: usize,
    f: super::geojson::RawFeature,
) -> Result<(), IngestError> {
    let fail = |field: Option<&str>, message: String| IngestError::Feature {
        path: path.to_path_buf(),
        feature: index,
        field: field.map(str::to_string),
        message,
    };
    let skip = |layer: &mut LineLayer, reason: String| {
        *layer.stats.features_skipped.entry(reason).or_default() += 1;
    };
    let Some(kind) = f.geometry_type.as_deref() else {
        skip(layer, "null geometry".into());
        return Ok(());
    };
    let expected_height = match kind {
        "LineString" => 2,
        "MultiLineString" => 3,
        "Point" | "MultiPoint" | "Polygon" | "MultiPolygon" | "GeometryCollection" => {
            skip(layer, format!("not a line ({kind})"));
            return Ok(());
        }
        other => {
            return Err(fail(
                Some("geometry"),
                format!("unknown geometry type \"{other}\""),
            ));
        }
    };
    let c = &f.coords;
    if c.height == 0 {
        // RFC 7946 §3.1.4 asks two or more positions of every LineString: an empty road is an error.
        return Err(fail(
            Some("geometry"),
            format!("the {kind} has no positions"),
        ));
    }
    if c.height != expected_height {
        return Err(fail(
            Some("geometry"),
            format!(
                "a {kind} needs coordinates nested {expected_height} deep, found {}",
                c.height
            ),
        ));
    }
    for (pi, part) in c.part_slices().enumerate() {
        if part.len() < 2 {
            // RFC 7946 §3.1.4: a LineString has two or more positions.
            return Err(fail(
                Some("geometry"),
                format!(
                    "line {pi} has {} position(s); a LineString needs at least 2 (RFC 7946 §3.1.4)",
                    part.len()
                ),
            ));
        }
        for (vi, p) in part.iter().enumerate() {
            if !(p[0].is_finite() && p[1].is_finite()) {
                return Err(fail(
                    Some("geometry"),
                    format!(
                        "line {pi} vertex {vi} {} is not a finite number",
                        crate::decimal::position(*p)
                    ),
                ));
            }
        }
    }
    let text = super::value::text;
    for filter in &settings.filters {
        if !filter.passes(f.prop(&filter.field)) {
            let how = if filter.keep {
                "not kept by"
            } else {
                "dropped by"
            };
            skip(
                layer,
                format!("{how} {}={}", filter.field, filter.values.join(",")),
            );
            return Ok(());
        }
    }
    let (mut damage, category) = match &settings.category_field {
        Some(cf) => match f.prop(cf).and_then(text).filter(|c| !c.is_empty()) {
            Some(c) => (
                settings
                    .cost_table
                    .category(&c)
                    .map_err(|m| fail(Some(cf), m))?,
                Some(c),
            ),
            None => {
                layer.stats.damage_defaulted += 1;
                (settings.damage.missing(), None)
            }
        },
        None => {
            let field = &settings.damage.field;
            if DamageRule::is_missing(f.prop(field)) {
                layer.stats.damage_defaulted += 1;
            }
            let d = settings
                .damage
                .interpret(f.prop(field))
                .map_err(|m| fail(Some(field), m))?;
            (d, None)
        }
    };
    if let Some(cf) = &settings.cost_table.class_field {
        let rate = settings.cost_table.rate(f.prop(cf));
        if let Damage::Factor(x) = damage {
            // The cap bounds the effort per metre, whatever it is made of.
            if x * rate > super::damage::MAX_FACTOR {
                return Err(fail(
                    Some(cf),
                    format!(
                        "damage factor {x} × class rate {rate} = {} exceeds the largest accepted damage factor {}",
                        x * rate,
                        super::damage::MAX_FACTOR
                    ),
                ));
            }
            damage = Damage::Factor(x * rate);
        }
    }
    let source_id = feature_id(&f, settings);
    let fi = layer.features.len() as u32;
    let find = |keys: &[&str]| {
        keys.iter()
            .find_map(|k| f.prop(k).and_then(text))
            .filter(|s| !s.is_empty())
    };
    let label = match (find(&LABEL_FIELDS[..3]), find(&LABEL_FIELDS[3..])) {
        (Some(n), Some(r)) => Some(format!("{n} ({r})")),
        (Some(n), None) => Some(n),
        (None, Some(r)) => Some(r),
        (None, None) => None,
    };
    layer.features.push(FeatureMeta {
        source_index: index as u32,
        source_id,
        damage,
        category: layer.texts.intern_opt(category.as_deref()),
        label: layer.texts.intern_opt(label.as_deref()),
        structure: layer
            .texts
            .intern_opt(super::structures::of(&f, settings.structure_field.as_deref()).as_deref()),
    });
    layer.osm_fields |= super::attribution::OSM_FIELDS
        .iter()
        .any(|k| f.prop(k).is_some());
    for part in c.part_slices() {
        layer.coords.extend_from_slice(part);
        layer.part_ends.push(layer.coords.len());
        layer.part_feature.push(fi);
        layer.stats.line_parts += 1;
        layer.stats.vertices += part.len();
    }
    layer.stats.features_used += 1;
    Ok(())
}

pub(super) fn feature_id(f: &super::geojson::RawFeature, settings: &RoadSettings) -> Option<Value> {
    let usable = |v: &Value| matches!(v, Value::String(_) | Value::Number(_));
    if let Some(field) = &settings.id_field {
        return f.prop(field).filter(|v| usable(v)).cloned();
    }
    if let Some(id) = f.id.as_ref().filter(|v| usable(v)) {
        return Some(id.clone());
    }
    ID_FIELDS
        .iter()
        .find_map(|k| f.prop(k).filter(|v| usable(v)))
        .cloned()
}
