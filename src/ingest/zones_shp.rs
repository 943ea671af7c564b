//! Damage zones from a polygon Shapefile (the GeoJSON and GeoPackage readers are in
//! [`super::zones`] and [`super::layered`]).

use super::IngestError;
use super::damage::DamageRule;
use super::source::InputRecord;
use super::zones::{ZoneLayer, make_zone};

/// Zones from a polygon Shapefile, in the CRS of its `.prj` (or `crs`); rings become polygons
/// through [`assemble`], whatever their order in the record.
pub(super) fn read_shapefile_zones(
    path: &std::path::Path,
    rule: &DamageRule,
    crs: Option<&str>,
) -> Result<ZoneLayer, IngestError> {
    use shapefile::Shape;
    let conv = super::shapefile::layer_crs(path, crs, "--zones-crs")?;
    let mut reader = super::shapefile::open_set(path)?;
    let mut zones = Vec::new();
    let numbers = reader.numeric_text();
    let fields = reader.fields();
    let mut defaulted = 0;
    for (index, item) in reader.records() {
        let fail = |field: &str, message: String| IngestError::Feature {
            path: path.to_path_buf(),
            feature: index,
            field: Some(field.into()),
            message,
        };
        let (shape, record) = item.map_err(|e| {
            let (field, message) = super::set_errors::record(path, &fields, &numbers, index, e);
            IngestError::Feature {
                path: path.to_path_buf(),
                feature: index,
                field,
                message,
            }
        })?;
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
        for polygon in assemble(rings).map_err(|m| fail("geometry", m))? {
            let mut lonlat = Vec::with_capacity(polygon.len());
            for ring in polygon {
                let mut ll = Vec::with_capacity(ring.len());
                for p in ring {
                    ll.push(conv.to_lonlat(p).ok_or_else(|| {
                        fail(
                            "geometry",
                            format!(
                                "{} cannot be converted from {}",
                                crate::decimal::position(p),
                                conv.name
                            ),
                        )
                    })?);
                }
                lonlat.push(ll);
            }
            zones.extend(make_zone(path, index, lonlat, damage)?);
        }
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

/// Polygons (outer ring first, then its holes) from a Shapefile record's rings, in any order.
///
/// The ESRI Shapefile Technical Description (1998) draws outer rings clockwise and holes
/// counter-clockwise but fixes no order, so each hole goes to the smallest outer ring that
/// contains it. A record with no clockwise ring at all is read as outer rings drawn the wrong way
/// round (common practice, no source); a hole inside no outer ring is refused.
pub(super) fn assemble(
    rings: Vec<(bool, Vec<[f64; 2]>)>,
) -> Result<Vec<Vec<Vec<[f64; 2]>>>, String> {
    if !rings.iter().any(|r| r.0) {
        return Ok(rings.into_iter().map(|(_, r)| vec![r]).collect());
    }
    let mut polygons: Vec<Vec<Vec<[f64; 2]>>> = Vec::new();
    let mut holes = Vec::new();
    let mut ring_no = Vec::new();
    for (i, (outer, ring)) in rings.into_iter().enumerate() {
        if outer {
            polygons.push(vec![ring]);
            ring_no.push(i);
        } else {
            holes.push((i, ring));
        }
    }
    let areas: Vec<f64> = polygons.iter().map(|p| area(&p[0]).abs()).collect();
    for (i, hole) in holes {
        let owner = (0..polygons.len())
            .filter(|&k| inside_ring(&hole, &polygons[k][0]))
            .min_by(|&a, &b| areas[a].total_cmp(&areas[b]).then(a.cmp(&b)));
        match owner {
            Some(k) => polygons[k].push(hole),
            None => {
                return Err(format!(
                    "ring {i} is a hole (counter-clockwise) but lies inside none of the outer \
                     rings (clockwise, rings {}); redraw the polygon in a GIS",
                    super::limits::listed(
                        &ring_no.iter().map(|r| r.to_string()).collect::<Vec<_>>()
                    )
                ));
            }
        }
    }
    Ok(polygons)
}

/// Twice the signed area of a ring (shoelace; negative when clockwise).
fn area(ring: &[[f64; 2]]) -> f64 {
    ring.windows(2)
        .map(|w| w[0][0] * w[1][1] - w[1][0] * w[0][1])
        .sum()
}

/// True when the ring `hole` lies inside `shell`: its first vertex that is not a vertex of the
/// shell is inside it (even-odd rule). Rings that may touch at vertices do not cross (OGC Simple
/// Features), so one such vertex decides.
fn inside_ring(hole: &[[f64; 2]], shell: &[[f64; 2]]) -> bool {
    let Some(p) = hole.iter().find(|p| !shell.contains(p)) else {
        return false;
    };
    let mut inside = false;
    for w in shell.windows(2) {
        let (a, b) = (w[0], w[1]);
        if (a[1] > p[1]) != (b[1] > p[1])
            && p[0] < (b[0] - a[0]) * (p[1] - a[1]) / (b[1] - a[1]) + a[0]
        {
            inside = !inside;
        }
    }
    inside
}

#[cfg(test)]
mod tests {
    use super::assemble;

    fn square(x: f64, y: f64, size: f64, clockwise: bool) -> (bool, Vec<[f64; 2]>) {
        let mut r = vec![
            [x, y],
            [x + size, y],
            [x + size, y + size],
            [x, y + size],
            [x, y],
        ];
        if clockwise {
            r.reverse();
        }
        (clockwise, r)
    }

    #[test]
    fn a_hole_before_its_shell_goes_to_the_shell() {
        let p = assemble(vec![
            square(2.0, 2.0, 1.0, false),
            square(0.0, 0.0, 10.0, true),
        ])
        .unwrap();
        assert_eq!(p.len(), 1);
        assert_eq!(p[0].len(), 2);
        assert_eq!(p[0][1][0], [2.0, 2.0], "the hole follows its shell");
    }

    #[test]
    fn holes_go_to_the_shell_that_contains_them_whatever_the_order() {
        // Two shells; the hole of the first is listed after the second.
        let p = assemble(vec![
            square(0.0, 0.0, 10.0, true),
            square(20.0, 0.0, 10.0, true),
            square(1.0, 1.0, 2.0, false),
            square(21.0, 1.0, 2.0, false),
        ])
        .unwrap();
        assert_eq!(p.len(), 2);
        assert_eq!(p[0][1][0], [1.0, 1.0]);
        assert_eq!(p[1][1][0], [21.0, 1.0]);
    }

    #[test]
    fn an_island_in_a_hole_owns_the_holes_inside_it() {
        // Shell 0..100, hole 10..90, island 20..80, the island's hole 30..70: the smallest shell wins.
        let p = assemble(vec![
            square(30.0, 30.0, 40.0, false),
            square(0.0, 0.0, 100.0, true),
            square(10.0, 10.0, 80.0, false),
            square(20.0, 20.0, 60.0, true),
        ])
        .unwrap();
        assert_eq!(p.len(), 2);
        assert_eq!(p[0][1][0], [10.0, 10.0]);
        assert_eq!(p[1][1][0], [30.0, 30.0]);
    }

    #[test]
    fn a_hole_outside_every_shell_is_refused_and_a_lone_reversed_ring_is_a_shell() {
        let e = assemble(vec![
            square(0.0, 0.0, 1.0, true),
            square(5.0, 5.0, 1.0, false),
        ]);
        assert!(e.unwrap_err().contains("ring 1 is a hole"));
        let p = assemble(vec![square(0.0, 0.0, 1.0, false)]).unwrap();
        assert_eq!(p.len(), 1);
    }
}
