//! One interface for every input format: a source of features, each with its geometry and
//! attributes, and the CRS the file declares.
//!
//! A format's reader only decodes its file into [`RawFeature`]s; what a road layer makes of them
//! (value typing, filters, damage, classes, structures, ids, labels), which named attributes must
//! exist, and how coordinates are checked and converted happens once, in [`read_lines`], whatever
//! the format. The formats:
//!
//! | format | reader | CRS |
//! | --- | --- | --- |
//! | GeoJSON (RFC 7946) | [`super::geojson_source`] | WGS84, or the legacy `crs` member |
//! | ESRI Shapefile | [`super::shapefile`] (the set: [`super::shapeset`]) | its `.prj` |
//! | zipped Shapefile `.zip` | [`super::zipped`], then as a Shapefile | its `.prj` |
//! | OpenStreetMap `.osm.pbf` | [`super::osm`] | WGS84 always |
//! | GeoPackage `.gpkg` | [`super::gpkg`] (geometry blobs: [`super::wkb`]) | the layer's `srs_id` |

use super::IngestError;
use super::crs::Crs;
use super::geojson::RawFeature;
use super::roads::{LineLayer, RoadSettings, add_feature, check_empty, finish_coordinates};
use super::source::{InputRecord, Source};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// The format of an input, told by its file name.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// GeoJSON text (the default for any name not listed below).
    GeoJson,
    /// An ESRI Shapefile set, named by its `.shp`.
    Shapefile,
    /// A `.zip` archive holding a Shapefile set.
    ZippedShapefile,
    /// An OpenStreetMap extract in the PBF encoding (`.osm.pbf`, `.pbf`).
    OsmPbf,
    /// A GeoPackage (`.gpkg`): an SQLite file of one or more layers.
    GeoPackage,
}

impl Format {
    /// The format of `source` by its name's ending (letter case ignored).
    pub fn of(source: &Source) -> Format {
        let name = source.display_path().to_string_lossy().to_lowercase();
        if name.ends_with(".pbf") {
            Format::OsmPbf
        } else if name.ends_with(".gpkg") {
            Format::GeoPackage
        } else if name.ends_with(".zip") {
            Format::ZippedShapefile
        } else if name.ends_with(".shp") && source.path().is_some() {
            Format::Shapefile
        } else {
            Format::GeoJson
        }
    }

    /// True for formats whose file may hold several layers, one chosen by `--roads-layer`.
    pub fn has_layers(self) -> bool {
        matches!(self, Format::GeoPackage | Format::ZippedShapefile)
    }
}

/// What a whole read of a source found besides its features.
#[derive(Debug)]
pub struct SourceInfo {
    /// Features in the file that the layer could use (for an extract: the ways tagged `highway`).
    pub features: usize,
    /// Features the reader itself left out, by reason (counted in summary.json with the rest).
    pub skipped: BTreeMap<String, usize>,
    /// Path, size and fingerprint of the input.
    pub input: InputRecord,
    /// True when the data is OpenStreetMap's (its licence asks for attribution).
    pub osm: bool,
    /// Features that lost part of their geometry to the file's edge, as a note for summaries.
    pub features_cut_at_edge: usize,
}

/// The attribute names a layer declares before any feature is read (a table's columns), with the
/// file that declares them, for messages about a named field.
#[derive(Debug, Clone)]
pub struct DeclaredFields {
    /// The file holding the table (a Shapefile's `.dbf`; the GeoPackage itself).
    pub file: PathBuf,
    /// What the names are called there ("field", "column").
    pub noun: &'static str,
    /// The names, in table order.
    pub names: Vec<String>,
}

/// A source of features: the one interface every format's reader offers.
pub trait FeatureSource {
    /// The path shown in messages.
    fn path(&self) -> &Path;

    /// The CRS the file declares, or `None` when the format leaves it to the user (`--crs`).
    /// Called after [`FeatureSource::features`]: a GeoJSON `crs` member may follow the features.
    fn declared_crs(&self) -> Result<Option<Crs>, IngestError>;

    /// The CRS when neither the file nor `--crs` gives one: WGS84, unless the format must declare
    /// it (a Shapefile without its `.prj` is an error).
    fn default_crs(&self) -> Result<Crs, IngestError> {
        Ok(Crs::wgs84())
    }

    /// The name of the layer read inside the file, when the file holds layers by name (a
    /// GeoPackage's table); part of the layer's label in the outputs.
    fn layer_name(&self) -> Option<String> {
        None
    }

    /// True when the layer was chosen by its name (`--roads-layer`), not read as the only one.
    fn chosen_by_name(&self) -> bool {
        false
    }

    /// The attribute names the file declares up front, when it has a table of them; a field the
    /// user names is then checked before any feature is read.
    fn declared_fields(&self) -> Option<DeclaredFields> {
        None
    }

    /// Calls `sink(index, feature)` for every feature in file order, keeping only the `wanted`
    /// attributes; `index` is the feature's 0-based number in messages.
    fn features(
        &mut self,
        wanted: &[String],
        sink: &mut dyn FnMut(usize, RawFeature) -> Result<(), IngestError>,
    ) -> Result<SourceInfo, IngestError>;
}

/// How a layer option (`--roads-layer`, `--sites-layer`…) chooses within one input (a zip of
/// Shapefile sets, a GeoPackage).
#[derive(Debug, Clone, Copy)]
pub struct Pick<'a> {
    /// The name given, if any.
    pub name: Option<&'a str>,
    /// The kind of layer chosen: its messages name its options.
    pub kind: &'static super::kind::LayerKind,
    /// One of several road inputs: an input holding a single layer is read whole, and the name
    /// chooses only in inputs that hold several (some input must hold it: [`super::layers`]).
    pub where_several: bool,
}

impl<'a> Pick<'a> {
    /// The name, always applied (one input, or sites and zones), for a layer of `kind`.
    pub fn always(name: Option<&'a str>, kind: &'static super::kind::LayerKind) -> Pick<'a> {
        Pick {
            name,
            kind,
            where_several: false,
        }
    }
}

/// The road layers' pick: `--roads-layer`, applied where it means something when `several`.
fn pick(settings: &RoadSettings, several: bool) -> Pick<'_> {
    Pick {
        name: settings.layer.as_deref(),
        kind: &super::kind::ROADS,
        where_several: several,
    }
}

/// Opens the reader of `source`'s format: the one place a format is chosen.
/// With `several` layers in the run, `--crs` applies only to layers without a CRS of their own, so
/// an extract's WGS84 is never in question.
pub fn open_source(
    source: &Source,
    settings: &RoadSettings,
    several: bool,
) -> Result<Box<dyn FeatureSource>, IngestError> {
    Ok(match Format::of(source) {
        Format::Shapefile | Format::ZippedShapefile => Box::new(
            super::shapefile::ShapefileSource::open(source, pick(settings, several))?,
        ),
        Format::OsmPbf => {
            if !several {
                super::osm::check_user_crs(source, settings)?;
            }
            Box::new(super::osm::OsmRoads::new(source, settings))
        }
        Format::GeoPackage => Box::new(super::gpkg::GpkgSource::open(
            source,
            pick(settings, several),
        )?),
        Format::GeoJson => Box::new(super::geojson_source::GeoJsonSource::new(source)),
    })
}

/// Reads a road layer from any [`FeatureSource`]: every feature goes through the same typing,
/// filters, damage and structure rules, every named field through the same check, and every
/// vertex through the same CRS checks.
pub fn read_lines(
    source: &mut dyn FeatureSource,
    settings: &RoadSettings,
) -> Result<LineLayer, IngestError> {
    read_lines_as(source, settings, false)
}

/// [`read_lines`] for one of `several` layers: then `--crs` applies only when the layer declares
/// no CRS of its own (with one layer it overrides the layer's own).
pub fn read_lines_as(
    source: &mut dyn FeatureSource,
    settings: &RoadSettings,
    several: bool,
) -> Result<LineLayer, IngestError> {
    settings.validate()?;
    let path: PathBuf = source.path().to_path_buf();
    // A --crs that cannot be used is refused before the file is read.
    let user_crs = match &settings.crs {
        Some(c) => Some(Crs::from_user(c).map_err(|message| IngestError::Crs {
            path: path.clone(),
            message,
        })?),
        None => None,
    };
    if let Some(declared) = source.declared_fields()
        && let Some(missing) = named_fields(settings)
            .into_iter()
            .find(|n| !declared.names.contains(n))
    {
        return Err(IngestError::Feature {
            path: declared.file,
            feature: 0,
            field: Some(missing.clone()),
            message: format!(
                "the layer has no such {0}; its {0}s are: {1}",
                declared.noun,
                listed(&declared.names)
            ),
        });
    }
    let mut layer = LineLayer::default();
    let wanted = settings.wanted_fields();
    let mut seen = std::collections::BTreeSet::new();
    let mut first_keys: Vec<String> = Vec::new();
    let info = source.features(&wanted, &mut |index, mut f| {
        if first_keys.is_empty() {
            first_keys = std::mem::take(&mut f.keys);
        }
        for (k, _) in &f.props {
            if !seen.contains(k) {
                seen.insert(k.clone());
            }
        }
        add_feature(&mut layer, &path, settings, index, f)
    })?;
    for (reason, n) in info.skipped {
        *layer.stats.features_skipped.entry(reason).or_default() += n;
    }
    layer.stats.features_read = info.features;
    layer.stats.features_cut_at_edge = info.features_cut_at_edge;
    layer.osm_fields |= info.osm;
    layer.input = Some(info.input);
    check_empty(&layer, &path, info.features)?;
    if let Some(missing) = named_fields(settings)
        .into_iter()
        .find(|n| !seen.contains(n))
    {
        // Formats without a table: the first feature's names tell what the layer calls things.
        let names = if first_keys.is_empty() {
            seen.iter().cloned().collect()
        } else {
            first_keys
        };
        return Err(IngestError::Feature {
            path,
            feature: 0,
            field: Some(missing.clone()),
            message: format!(
                "no feature has this property; the first feature's properties are: {}",
                listed(&names)
            ),
        });
    }
    // One layer: --crs overrides what it declares. Several: each keeps the CRS it declares and
    // --crs gives it to those declaring none, or one they declare unreadably (the message for
    // an unreadable .prj asks for --crs, so --crs must then work).
    let crs = match (user_crs, several) {
        (Some(c), false) => c,
        (user, _) => match (source.declared_crs(), user) {
            (Ok(Some(c)), _) | (Ok(None), Some(c)) | (Err(IngestError::Crs { .. }), Some(c)) => c,
            (Ok(None), None) => source.default_crs()?,
            (Err(e), _) => return Err(e),
        },
    };
    finish_coordinates(&mut layer, &path, &crs)?;
    // The input's own file name (a zip's, not its member's).
    let given = layer
        .input
        .as_ref()
        .map_or_else(|| path.clone(), |i| PathBuf::from(&i.path));
    let name = given
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| given.display().to_string());
    layer.layers = vec![super::layers::SourceLayer {
        label: match source.layer_name() {
            Some(t) => format!("{name}:{t}"),
            None => name,
        },
        first_feature: 0,
    }];
    Ok(layer)
}

/// Names joined for a message, or "(none)".
fn listed(names: &[String]) -> String {
    if names.is_empty() {
        "(none)".into()
    } else {
        super::limits::listed(names)
    }
}

/// The attributes the user named explicitly: each must appear in some feature.
fn named_fields(settings: &RoadSettings) -> Vec<String> {
    let mut named: Vec<&String> = Vec::new();
    if settings.damage.field != "damage" && settings.category_field.is_none() {
        named.push(&settings.damage.field);
    }
    named.extend(settings.id_field.iter());
    named.extend(settings.category_field.iter());
    named.extend(settings.cost_table.class_field.iter());
    named.extend(settings.filters.iter().map(|f| &f.field));
    named.extend(settings.structure_field.iter());
    named.into_iter().cloned().collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formats_by_name() {
        let f = |n: &str| Format::of(&Source::File(n.into()));
        assert_eq!(f("x/li.osm.pbf"), Format::OsmPbf);
        assert_eq!(f("x/LI.OSM.PBF"), Format::OsmPbf);
        assert_eq!(f("roads.shp"), Format::Shapefile);
        assert_eq!(f("County.GPKG"), Format::GeoPackage);
        assert_eq!(f("roads.geojson"), Format::GeoJson);
        assert_eq!(f("roads.json"), Format::GeoJson);
    }
}
