//! Damage zones from a polygon Shapefile (the GeoJSON and GeoPackage readers are in
//! [`super::zones`] and [`super::layered`]).

use super::IngestError;
use super::damage::DamageRule;
use super::source::InputRecord;
use super::zones::{ZoneLayer, make_zone};

/// Zones from a polygon Shapefile, in the CRS of its `.prj` (or `crs`). Each outer ring (clockwise
/// in Shapefiles) starts a polygon; the holes that follow belong to it.
pub(super) fn read_shapefile_zones(
    path: &std::path::Path,
    rule: &DamageRule,
    crs: Option<&str>,
) -> Result<ZoneLayer, IngestError> {
    use shapefile::Shape;
    let conv = super::shapefile::layer_crs(path, crs)?;
    let mut reader = super::shapefile::open_set(path)?;
    let mut zones = Vec::new();
    let numbers = reader.numeric_text();
    let mut defaulted = 0;
    for (index, item) in reader.records() {
        let fail = |field: &str, message: String| IngestError::Feature {
            path: path.to_path_buf(),
            feature: index,
            field: Some(field.into()),
            message,
        };
        let (shape, record) =
            item.map_err(|e| fail("geometry", format!("unreadable record: {e}")))?;
        let value = match record.get(&rule.field) {
            Some(v) => Some(numbers.value(index, &rule.field, v)?),
            None => None,
        };
        defaulted += usize::from(DamageRule::is_missing(value.as_ref()));
        let damage = rule
            .interpret(value.as_ref())
            .map_err(|m| fail(&rule.field, m))?;
        let rings: Vec<(bool, Vec<[f64; 2]>)> = match &shape {
            Shape::Polygon(p) => ring_list(p.rings(), |q| [q.x, q.y]),
            Shape::PolygonZ(p) => ring_list(p.rings(), |q| [q.x, q.y]),
            Shape::PolygonM(p) => ring_list(p.rings(), |q| [q.x, q.y]),
            Shape::NullShape => {
                return Err(fail(
                    "geometry",
                    "the zone has no geometry (a null shape)".into(),
                ));
            }
            other => {
                return Err(fail(
                    "geometry",
                    format!("damage zones must be Polygons, found {}", other.shapetype()),
                ));
            }
        };
        let mut current: Vec<Vec<[f64; 2]>> = Vec::new();
        for (outer, ring) in rings {
            let mut ll = Vec::with_capacity(ring.len());
            for p in ring {
                ll.push(conv.to_lonlat(p).ok_or_else(|| {
                    fail(
                        "geometry",
                        format!(
                            "({}, {}) cannot be converted from {}",
                            p[0], p[1], conv.name
                        ),
                    )
                })?);
            }
            if outer && !current.is_empty() {
                zones.extend(make_zone(
                    path,
                    index,
                    std::mem::take(&mut current),
                    damage,
                )?);
            }
            current.push(ll);
        }
        zones.extend(make_zone(path, index, current, damage)?);
    }
    Ok(ZoneLayer {
        zones,
        defaulted,
        input: InputRecord {
            deleted_records: reader.deleted(),
            ..super::shapefile::fingerprint(path, "damage zones")?
        },
    })
}

/// A Shapefile polygon's rings as (is outer, positions).
pub(super) fn ring_list<P>(
    rings: &[shapefile::PolygonRing<P>],
    xy: impl Fn(&P) -> [f64; 2],
) -> Vec<(bool, Vec<[f64; 2]>)> {
    rings
        .iter()
        .map(|r| {
            (
                matches!(r, shapefile::PolygonRing::Outer(_)),
                r.points().iter().map(&xy).collect(),
            )
        })
        .collect()
}
