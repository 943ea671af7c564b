//! Damage zones: flood extents, landslide areas and the like, as polygons with a damage each. An
//! edge's cost becomes the sum over its pieces of length × the factor of the zone covering the piece
//! (the largest where zones overlap; the edge's own factor outside every zone). A piece inside a
//! zone marked closed makes the whole edge impassable.

use super::IngestError;
use super::damage::{Damage, DamageRule};
use super::geojson::read_collection;
use super::source::{HashingReader, InputRecord, Source};
use crate::network::{Network, cost_of};
use geo::{Contains, Coord, LineString, Point, Polygon};
use rayon::prelude::*;
use rstar::{AABB, RTree, primitives::GeomWithData, primitives::Rectangle};

/// One zone polygon with its damage.
#[derive(Debug, Clone)]
pub struct Zone {
    /// Outer ring and holes, lon/lat.
    pub polygon: Polygon<f64>,
    /// Damage inside the zone.
    pub damage: Damage,
    /// 0-based position of the source feature.
    pub feature: usize,
}

/// The zones of a layer with its fingerprint.
#[derive(Debug, Clone)]
pub struct ZoneLayer {
    /// Zones in input order (a MultiPolygon gives one per polygon).
    pub zones: Vec<Zone>,
    /// Path, size and SHA-256 of the input.
    pub input: InputRecord,
    /// Features whose damage took the default: no value in the damage field.
    pub defaulted: usize,
}

/// Reads damage zones from GeoJSON (Polygon / MultiPolygon features, lon/lat unless `crs` says
/// otherwise), a Shapefile or a GeoPackage layer (`layer` chooses among several); invalid polygons
/// are errors naming the feature.
pub fn read_zones(
    source: &Source,
    rule: &DamageRule,
    crs: Option<&str>,
    layer: Option<&str>,
) -> Result<ZoneLayer, IngestError> {
    let zones = read_zones_any(source, rule, crs, layer)?;
    super::valid::zone_parts_apart(&source.display_path(), &zones.zones)?;
    // No zone at all would plan as if nothing were damaged: refused, not read as "no damage".
    if zones.zones.is_empty() {
        return Err(IngestError::Io {
            path: source.display_path(),
            source: std::io::Error::other(
                "the damage zones layer holds no zones (no features): a plan would treat every \
                 road as undamaged; give a layer with at least one polygon, or plan without \
                 --damage-zones",
            ),
        });
    }
    Ok(zones)
}

fn read_zones_any(
    source: &Source,
    rule: &DamageRule,
    crs: Option<&str>,
    layer: Option<&str>,
) -> Result<ZoneLayer, IngestError> {
    let path = source.display_path();
    if super::reader::Format::of(source) == super::reader::Format::GeoPackage {
        return super::layered::read_gpkg_zones(source, rule, crs, layer);
    }
    if path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("shp"))
    {
        return super::zones_shp::read_shapefile_zones(&path, rule, crs);
    }
    let conv = match crs {
        Some(c) => Some(
            super::crs::Crs::from_user(c).map_err(|message| IngestError::Crs {
                path: path.clone(),
                message,
            })?,
        ),
        None => None,
    };
    let mut reader = source.open()?;
    let mut zones = Vec::new();
    let mut defaulted = 0;
    // Without --zones-crs the layer's own `crs` member decides (read as for roads), and it may
    // come after the features: they wait, unconverted, until the whole collection is read.
    let mut waiting = Vec::new();
    let info = read_collection(
        &mut reader,
        std::slice::from_ref(&rule.field),
        |index, f| match &conv {
            Some(c) => {
                add_zone_feature(&path, index, &f, rule, Some(c), &mut zones, &mut defaulted)
            }
            None => {
                waiting.push((index, f));
                Ok(())
            }
        },
    )
    .map_err(|e| IngestError::from_read(&path, e))?;
    if conv.is_none() {
        let declared = super::crs::crs_member(&path, info.crs.as_ref(), "--zones-crs")?;
        let declared = (!declared.is_wgs84()).then_some(&declared);
        for (index, f) in waiting {
            add_zone_feature(&path, index, &f, rule, declared, &mut zones, &mut defaulted)?;
        }
    }
    let (sha256, bytes) =
        HashingReader::finish_buffered(reader).map_err(|source| IngestError::Io {
            path: path.clone(),
            source,
        })?;
    Ok(ZoneLayer {
        zones,
        defaulted,
        input: InputRecord {
            role: "damage zones".into(),
            path: path.display().to_string(),
            bytes,
            sha256,
            deleted_records: 0,
        },
    })
}

/// Adds the zones of one feature (a Polygon or MultiPolygon in GeoJSON's layout, in lon/lat
/// unless `conv` converts it); the GeoJSON and GeoPackage readers share it.
pub(super) fn add_zone_feature(
    path: &std::path::Path,
    index: usize,
    f: &super::geojson::RawFeature,
    rule: &DamageRule,
    conv: Option<&super::crs::Crs>,
    zones: &mut Vec<Zone>,
    defaulted: &mut usize,
) -> Result<(), IngestError> {
    let fail = |feature: usize, field: &str, message: String| IngestError::Feature {
        path: path.to_path_buf(),
        feature,
        field: Some(field.into()),
        message,
    };
    *defaulted += usize::from(DamageRule::is_missing(f.prop(&rule.field)));
    let damage = rule
        .interpret(f.prop(&rule.field))
        .map_err(|m| fail(index, &rule.field, m))?;
    let c = &f.coords;
    let polys: Vec<(usize, usize)> = match (f.geometry_type.as_deref(), c.height) {
        (Some("Polygon"), 3) => vec![(0, c.parts.len())],
        (Some("MultiPolygon"), 4) => {
            let mut v = Vec::new();
            let mut s = 0;
            for &e in &c.groups {
                v.push((s, e));
                s = e;
            }
            v
        }
        (Some(k), _) => {
            return Err(fail(
                index,
                "geometry",
                format!("damage zones must be Polygons, found {k}"),
            ));
        }
        (None, _) => return Err(fail(index, "geometry", "the zone has no geometry".into())),
    };
    // An empty geometry is refused like a null one: the zone's damage would apply nowhere.
    if c.pos.is_empty() || polys.iter().all(|&(a, b)| a == b) {
        return Err(fail(
            index,
            "geometry",
            "the zone's geometry is empty (no positions)".into(),
        ));
    }
    for (p0, p1) in polys {
        let mut rings: Vec<Vec<[f64; 2]>> = Vec::new();
        for r in p0..p1 {
            let start = if r == 0 { 0 } else { c.parts[r - 1] };
            let mut ring: Vec<[f64; 2]> = c.pos[start..c.parts[r]].to_vec();
            if let Some(cv) = &conv {
                for p in ring.iter_mut() {
                    *p = cv.to_lonlat(*p).ok_or_else(|| {
                        fail(
                            index,
                            "geometry",
                            format!(
                                "{} cannot be converted from {}",
                                crate::decimal::position(*p),
                                cv.name
                            ),
                        )
                    })?;
                }
            } else if let Some(p) = ring
                .iter()
                .find(|p| !(p[0].abs() <= 180.0 && p[1].abs() <= 90.0))
            {
                return Err(fail(
                    index,
                    "geometry",
                    format!(
                        "{} is not a longitude/latitude in WGS84 range (±180, ±90); if the layer \
                         is projected, {}",
                        crate::decimal::position(*p),
                        super::crs::hint("--zones-crs")
                    ),
                ));
            }
            if ring.len() < 4 || ring.first() != ring.last() {
                return Err(fail(
                    index,
                    "geometry",
                    format!(
                        "ring {r} is not closed (RFC 7946 §3.1.6: at least 4 positions, first = last)"
                    ),
                ));
            }
            rings.push(ring);
        }
        zones.extend(make_zone(path, index, rings, damage)?);
    }
    Ok(())
}

/// Builds a validated zone from rings in lon/lat (outer first); errors name the feature.
///
/// Each ring edge runs the short way round (RFC 7946 §3.1.1: the shortest line between two
/// positions), so a ring that steps from 179° to -179° encloses the area across ±180°, not the rest
/// of the world. Such a polygon is read with its longitudes unwrapped and cut at the meridian into
/// one zone per side (the form RFC 7946 §3.1.9 recommends writing), so every zone lies within ±180°.
pub(super) fn make_zone(
    path: &std::path::Path,
    index: usize,
    mut rings: Vec<Vec<[f64; 2]>>,
    damage: Damage,
) -> Result<Vec<Zone>, IngestError> {
    let fail = |message: String| IngestError::Feature {
        path: path.to_path_buf(),
        feature: index,
        field: Some("geometry".into()),
        message,
    };
    for (r, ring) in rings.iter().enumerate() {
        if ring.len() < 4 || ring.first() != ring.last() {
            return Err(fail(format!(
                "ring {r} is not closed (at least 4 positions, first = last)"
            )));
        }
    }
    let wraps = rings
        .iter()
        .any(|ring| ring.windows(2).any(|w| (w[1][0] - w[0][0]).abs() > 180.0));
    if wraps {
        let anchor = rings.first().map_or(0.0, |r| r[0][0]);
        for (r, ring) in rings.iter_mut().enumerate() {
            ring[0][0] = super::wrap::near(ring[0][0], anchor);
            for i in 1..ring.len() {
                ring[i][0] = super::wrap::near(ring[i][0], ring[i - 1][0]);
            }
            let last = ring.len() - 1;
            if ring[last][0] != ring[0][0] {
                return Err(fail(format!(
                    "ring {r} goes round a pole (its longitudes wrap a whole turn); write it with edges \
                     along ±180° or cut it there (RFC 7946 §3.1.9)"
                )));
            }
            ring[last] = ring[0];
        }
    }
    let mut ls = rings.into_iter().map(|ring| {
        LineString::from(
            ring.iter()
                .map(|p| Coord { x: p[0], y: p[1] })
                .collect::<Vec<_>>(),
        )
    });
    let Some(outer) = ls.next() else {
        return Ok(Vec::new());
    };
    let polygon = Polygon::new(outer, ls.collect());
    if let Err(e) = super::valid::check_polygon(&polygon) {
        return Err(fail(format!(
            "the polygon is not valid ({e}); fix it before use"
        )));
    }
    if geo::Area::unsigned_area(&polygon) <= 0.0 {
        return Err(fail("the polygon has zero area".into()));
    }
    let zone = |polygon| Zone {
        polygon,
        damage,
        feature: index,
    };
    if !wraps {
        return Ok(vec![zone(polygon)]);
    }
    // The part on each side of the meridian, moved back within ±180°.
    let mut out = Vec::new();
    for turn in [-360.0, 0.0, 360.0] {
        let side = geo::Rect::new(
            Coord {
                x: -180.0 - turn,
                y: -90.0,
            },
            Coord {
                x: 180.0 - turn,
                y: 90.0,
            },
        )
        .to_polygon();
        for mut part in geo::BooleanOps::intersection(&polygon, &side) {
            geo::MapCoordsInPlace::map_coords_in_place(&mut part, |c| Coord {
                x: c.x + turn,
                y: c.y,
            });
            if geo::Area::unsigned_area(&part) > 0.0 {
                out.push(zone(part));
            }
        }
    }
    Ok(out)
}

/// The pieces of a lon/lat polyline by zone cover: (length share of the whole line, index of the
/// covering zone with the largest damage, or None outside every zone). Shares add up to 1.
pub fn pieces(line: &[[f64; 2]], zones: &[&Zone]) -> Vec<(f64, Option<usize>)> {
    // Steps across ±180° are cut there, so every segment lies on one side, as every zone does.
    let segs: Vec<([f64; 2], [f64; 2])> = sides(line)
        .iter()
        .flat_map(|p| p.windows(2).map(|w| (w[0], w[1])).collect::<Vec<_>>())
        .collect();
    let seg_len: Vec<f64> = segs
        .iter()
        .map(|&(a, b)| super::geodesy::distance_m(a, b))
        .collect();
    let total: f64 = seg_len.iter().sum();
    let mut out = Vec::new();
    if total <= 0.0 {
        return out;
    }
    for (k, &(a, b)) in segs.iter().enumerate() {
        let mut ts = vec![0.0, 1.0];
        for z in zones {
            for ring in std::iter::once(z.polygon.exterior()).chain(z.polygon.interiors()) {
                for e in ring.lines() {
                    if let Some(t) = cross(a, b, [e.start.x, e.start.y], [e.end.x, e.end.y]) {
                        ts.push(t);
                    }
                }
            }
        }
        ts.sort_by(f64::total_cmp);
        ts.dedup();
        for t in ts.windows(2) {
            if t[1] - t[0] <= 0.0 {
                continue;
            }
            let m = 0.5 * (t[0] + t[1]);
            let p = Point::new(a[0] + m * (b[0] - a[0]), a[1] + m * (b[1] - a[1]));
            let cover = zones
                .iter()
                .enumerate()
                .filter(|(_, z)| z.polygon.contains(&p))
                .max_by(|x, y| {
                    rank(x.1.damage)
                        .total_cmp(&rank(y.1.damage))
                        .then(y.0.cmp(&x.0))
                })
                .map(|(i, _)| i);
            out.push((seg_len[k] * (t[1] - t[0]) / total, cover));
        }
    }
    out
}

/// The line's parts on each side of ±180° (the line itself when no step crosses the meridian).
fn sides(line: &[[f64; 2]]) -> Vec<Vec<[f64; 2]>> {
    if line.windows(2).any(|w| (w[1][0] - w[0][0]).abs() > 180.0) {
        super::wrap::split_at_antimeridian(line)
    } else {
        vec![line.to_vec()]
    }
}

/// Orders damages: closed above every factor.
fn rank(d: Damage) -> f64 {
    d.factor().unwrap_or(f64::INFINITY)
}

/// Fraction along a–b where it crosses segment c–d, if it does.
fn cross(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> Option<f64> {
    let r = [b[0] - a[0], b[1] - a[1]];
    let s = [d[0] - c[0], d[1] - c[1]];
    let den = r[0] * s[1] - r[1] * s[0];
    if den == 0.0 {
        return None;
    }
    let q = [c[0] - a[0], c[1] - a[1]];
    let t = (q[0] * s[1] - q[1] * s[0]) / den;
    let u = (q[0] * r[1] - q[1] * r[0]) / den;
    ((0.0..=1.0).contains(&t) && (0.0..=1.0).contains(&u)).then_some(t)
}

/// Re-costs every edge that meets a zone; returns how many edges changed.
pub fn apply_zones(net: &mut Network, layer: &ZoneLayer) -> usize {
    if layer.zones.is_empty() {
        return 0;
    }
    let tree: RTree<GeomWithData<Rectangle<[f64; 2]>, usize>> = RTree::bulk_load(
        layer
            .zones
            .iter()
            .enumerate()
            .filter_map(|(i, z)| {
                let r = geo::BoundingRect::bounding_rect(&z.polygon)?;
                Some(GeomWithData::new(
                    Rectangle::from_corners([r.min().x, r.min().y], [r.max().x, r.max().y]),
                    i,
                ))
            })
            .collect(),
    );
    let updates: Vec<Option<(Damage, u64)>> = (0..net.edges.len())
        .into_par_iter()
        .map(|e| {
            let edge = &net.edges[e];
            if edge.damage.is_closed() {
                return None;
            }
            let g = net.edge_geometry(e);
            // The zones near each side's part (zones lie within ±180°, as the parts do).
            let mut cand: Vec<usize> = Vec::new();
            for part in sides(g) {
                let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
                for p in &part {
                    lo = [lo[0].min(p[0]), lo[1].min(p[1])];
                    hi = [hi[0].max(p[0]), hi[1].max(p[1])];
                }
                cand.extend(
                    tree.locate_in_envelope_intersecting(&AABB::from_corners(lo, hi))
                        .map(|z| z.data),
                );
            }
            if cand.is_empty() {
                return None;
            }
            cand.sort_unstable();
            cand.dedup();
            let zs: Vec<&super::zones::Zone> = cand.iter().map(|&i| &layer.zones[i]).collect();
            let own = edge.damage.factor().unwrap_or(0.0);
            let mut cost = 0.0;
            let mut touched = false;
            for (share, cover) in pieces(g, &zs) {
                let factor = match cover.map(|i| zs[i].damage) {
                    Some(Damage::Closed) => return Some((Damage::Closed, 0)),
                    Some(Damage::Factor(f)) => {
                        touched = true;
                        f.max(own)
                    }
                    None => own,
                };
                cost += share * edge.length_m * 1000.0 * factor;
            }
            if !touched {
                return None;
            }
            let cost = cost.round() as u64;
            let mean = if edge.length_m > 0.0 {
                cost as f64 / (edge.length_m * 1000.0)
            } else {
                own
            };
            Some((Damage::Factor(mean), cost))
        })
        .collect();
    let mut changed = 0;
    for (edge, u) in net.edges.iter_mut().zip(updates) {
        if let Some((damage, cost)) = u {
            edge.damage = damage;
            edge.cost = if damage.is_closed() { 0 } else { cost };
            changed += 1;
        }
    }
    let _ = cost_of;
    changed
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square(x0: f64, y0: f64, s: f64, d: Damage) -> Zone {
        let ring = LineString::from(vec![
            (x0, y0),
            (x0 + s, y0),
            (x0 + s, y0 + s),
            (x0, y0 + s),
            (x0, y0),
        ]);
        Zone {
            polygon: Polygon::new(ring, vec![]),
            damage: d,
            feature: 0,
        }
    }

    #[test]
    fn line_half_inside_a_zone() {
        // By hand: a straight line from x = 0 to 0.002° crossing into a zone from x = 0.001°.
        let z = square(0.001, -0.001, 0.01, Damage::Factor(0.5));
        let line = [[0.0, 0.0], [0.002, 0.0]];
        let p = pieces(&line, &[&z]);
        assert_eq!(p.len(), 2);
        assert!((p[0].0 - 0.5).abs() < 1e-9 && p[0].1.is_none());
        assert!((p[1].0 - 0.5).abs() < 1e-9 && p[1].1 == Some(0));
    }

    #[test]
    fn shares_add_up_to_the_whole_line() {
        // Round trip: the pieces' lengths sum to the line's length within 1 mm.
        let zones = [
            square(0.0005, -0.001, 0.001, Damage::Factor(0.4)),
            square(0.0012, -0.0001, 0.0003, Damage::Factor(0.9)),
        ];
        let zs: Vec<&Zone> = zones.iter().collect();
        let line = [[0.0, 0.0], [0.001, 0.0002], [0.0015, -0.0001], [0.003, 0.0]];
        let total = crate::ingest::geodesy::polyline_length_m(line.iter().copied());
        let sum: f64 = pieces(&line, &zs).iter().map(|(s, _)| s * total).sum();
        assert!((sum - total).abs() < 1e-3, "{sum} vs {total}");
        // Overlap: the larger factor wins inside the small square.
        assert!(pieces(&line, &zs).iter().any(|(_, c)| *c == Some(1)));
    }

    #[test]
    fn a_ring_across_the_meridian_is_cut_into_its_two_sides() {
        // Edges run the short way round (RFC 7946 §3.1.1): 179°E to 179°W is 2° wide, not 358°.
        let ring = vec![
            [179.0, -1.0],
            [-179.0, -1.0],
            [-179.0, 1.0],
            [179.0, 1.0],
            [179.0, -1.0],
        ];
        let path = std::path::Path::new("zones.geojson");
        let zones = make_zone(path, 0, vec![ring], Damage::Factor(2.0)).unwrap();
        assert_eq!(zones.len(), 2);
        let area: f64 = zones
            .iter()
            .map(|z| geo::Area::unsigned_area(&z.polygon))
            .sum();
        assert!((area - 4.0).abs() < 1e-9, "{area}");
        for z in &zones {
            let r = geo::BoundingRect::bounding_rect(&z.polygon).unwrap();
            assert!(r.min().x >= -180.0 && r.max().x <= 180.0, "{r:?}");
            assert!(r.max().x - r.min().x <= 1.0 + 1e-9, "{r:?}");
        }
        let zs: Vec<&Zone> = zones.iter().collect();
        // A road from 179.5°E to 179.5°W lies wholly inside; one at 0° does not touch it.
        let across = pieces(&[[179.5, 0.0], [-179.5, 0.0]], &zs);
        let inside: f64 = across.iter().filter(|p| p.1.is_some()).map(|p| p.0).sum();
        assert!((inside - 1.0).abs() < 1e-9, "{across:?}");
        assert!(
            pieces(&[[0.0, 0.0], [0.0, 0.5]], &zs)
                .iter()
                .all(|p| p.1.is_none())
        );
        // A ring round a pole (longitudes wrapping a whole turn) is refused.
        let polar = vec![
            [0.0, 80.0],
            [90.0, 80.0],
            [180.0, 80.0],
            [-90.0, 80.0],
            [0.0, 80.0],
        ];
        assert!(make_zone(path, 0, vec![polar], Damage::Factor(2.0)).is_err());
    }
}
