//! Sites and damage zones from a GeoPackage layer (OGC GeoPackage Encoding Standard 1.3), read
//! through the same [`FeatureSource`] as GeoPackage roads: a file holding several layers needs
//! `--sites-layer` or `--zones-layer` (the message lists them), and the CRS is the layer's own
//! (`--sites-crs` / `--zones-crs` override it; the undefined systems, `srs_id` 0 and -1, mean WGS84
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
use super::reader::FeatureSource;
use super::sites::{
    SiteDefaults, SiteLayer, SiteSettings, check_unique, convert, feature_err, finish_outlines,
    make_site, site_shape,
};
use super::source::Source;
use super::zones::{ZoneLayer, add_zone_feature};
use serde_json::Map;

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

/// Reads the sites of a GeoPackage layer (`--sites-layer` chooses among several).
pub fn read_gpkg_sites(source: &Source, s: &SiteSettings) -> Result<SiteLayer, IngestError> {
    let mut src = GpkgSource::open_layer(source, s.layer.as_deref(), "--sites-layer", "sites")?;
    let path = src.path().to_path_buf();
    let crs = layer_crs(&src, s.crs.as_deref())?;
    let mut sites = Vec::new();
    let mut defaults = SiteDefaults::default();
    let all = [super::geojson::ALL_PROPERTIES.to_string()];
    let info = src.features(&all, &mut |index, f| {
        let (pos, outline) = site_shape(f.geometry_type.as_deref(), &f.coords)
            .map_err(|m| feature_err(&path, index, Some("geometry"), m))?;
        let attributes: Map<_, _> = f.props.into_iter().collect();
        let mut site = make_site(&path, index, pos, attributes, None, s, &mut defaults)?;
        site.outline = outline;
        sites.push(site);
        Ok(())
    })?;
    convert(&path, &crs, &mut sites)?;
    finish_outlines(&path, &mut sites)?;
    check_unique(&path, &sites)?;
    Ok(SiteLayer {
        sites,
        input: info.input,
        defaults,
    })
}

/// Reads the damage zones of a GeoPackage layer (`--zones-layer` chooses among several).
pub fn read_gpkg_zones(
    source: &Source,
    rule: &DamageRule,
    crs: Option<&str>,
    layer: Option<&str>,
) -> Result<ZoneLayer, IngestError> {
    let mut src = GpkgSource::open_layer(source, layer, "--zones-layer", "damage zones")?;
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
    Ok(ZoneLayer {
        zones,
        input: info.input,
        defaulted,
    })
}
