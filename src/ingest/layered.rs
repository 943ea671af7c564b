//! Point layers (sites, damage reports) and damage zones from a GeoPackage layer (OGC GeoPackage Encoding Standard 1.3), read
//! through the same [`FeatureSource`] as GeoPackage roads: a file holding several layers needs
//! the layer's option (`--sites-layer`, `--damage-points-layer`, `--zones-layer`; the message
//! lists them), and the CRS is the layer's own (the `--…-crs` options override it; the undefined systems, `srs_id` 0 and -1, mean WGS84
//! longitude/latitude unless overridden).
//!
//! Sites are points, polygons or multipolygons (polygon sites: [`super::outline`]); zones are
//! polygons or multipolygons, each read as a GeoJSON zone is. A feature with an empty geometry
//! is refused for sites (a site must be somewhere) and skipped for zones, as a Shapefile's null
//! shape is.

use super::IngestError;
use super::crs::Crs;
use super::damage::DamageRule;
use super::gpkg::GpkgSource;
use super::points::{PointFeature, PointLayer, PointSpec, feature_err, shape, to_lonlat, user_crs};
use super::reader::FeatureSource;
use super::source::Source;
use super::zones::{ZoneLayer, add_zone_feature};

/// The CRS of the layer: the user's, else the layer's own, else WGS84.
fn layer_crs(src: &GpkgSource, user: Option<&str>) -> Result<Crs, IngestError> {
    match user {
        Some(c) => Crs::from_user(c).map_err(|message| IngestError::Crs {
            path: src.path().to_path_buf(),
            message,
        }),
        None => Ok(src.declared_crs()?.unwrap_or_else(Crs::wgs84)),
    }
}

/// Reads the points (or outlines) of a GeoPackage layer (the layer option chooses among several),
/// converted from the layer's CRS. A feature with an empty geometry is refused: a site or a
/// report must be somewhere.
pub fn read_gpkg_points(source: &Source, spec: &PointSpec) -> Result<PointLayer, IngestError> {
    let mut src = GpkgSource::open_layer(source, spec.layer.as_deref(), spec.kind)?;
    let path = src.path().to_path_buf();
    let named = match user_crs(&path, spec)? {
        Some(c) => Some(c),
        None => src.declared_crs()?,
    };
    let described = named.as_ref().map(Crs::describe);
    let crs = named.unwrap_or_else(Crs::wgs84);
    let layer = src.layer_name();
    let mut features = Vec::new();
    let all = [super::geojson::ALL_PROPERTIES.to_string()];
    let info = src.features(&all, &mut |index, f| {
        let (pos, outline) = shape(spec, f.geometry_type.as_deref(), &f.coords)
            .map_err(|m| feature_err(&path, index, Some("geometry"), m))?;
        features.push(PointFeature {
            index,
            pos,
            outline,
            attributes: f.props.into_iter().collect(),
            member_id: None,
        });
        Ok(())
    })?;
    if let Some(n) = info.skipped.get("empty geometry") {
        return Err(IngestError::Io {
            path,
            source: std::io::Error::other(format!(
                "{n} feature(s) of the {} layer have an empty geometry; a {} needs {}",
                spec.kind.role,
                spec.kind.noun,
                if spec.polygons {
                    "a point or a polygon"
                } else {
                    "a point"
                }
            )),
        });
    }
    to_lonlat(&path, Some(&crs), spec, &mut features)?;
    Ok(PointLayer {
        features,
        input: info.input,
        path,
        layer,
        crs: described,
    })
}

/// Reads the damage zones of a GeoPackage layer (`--zones-layer` chooses among several).
pub fn read_gpkg_zones(
    source: &Source,
    rule: &DamageRule,
    crs: Option<&str>,
    layer: Option<&str>,
) -> Result<ZoneLayer, IngestError> {
    let mut src = GpkgSource::open_layer(source, layer, &super::kind::DAMAGE_ZONES)?;
    let path = src.path().to_path_buf();
    let crs = layer_crs(&src, crs)?;
    // WGS84 positions are range-checked; any other CRS checks them as it converts.
    let conv = (!crs.is_wgs84()).then_some(&crs);
    let mut zones = Vec::new();
    let mut defaulted = 0;
    let wanted = [rule.field.clone()];
    let info = src.features(&wanted, &mut |index, f| {
        add_zone_feature(&path, index, &f, rule, conv, &mut zones, &mut defaulted)
    })?;
    if let Some(n) = info.skipped.get("empty geometry") {
        return Err(IngestError::Io {
            path,
            source: std::io::Error::other(format!(
                "{n} feature(s) of the damage zones layer have an empty geometry; a damage zone \
                 needs a polygon"
            )),
        });
    }
    Ok(ZoneLayer {
        zones,
        input: info.input,
        defaulted,
    })
}
