//! Polygon validity in O(n log n) for rings without pathological overlap: the verdicts of the
//! geometry library's `Validation` for polygons, with the ring self-intersection test (every
//! segment against every other, quadratic: 100,000 positions took minutes) run only on segment
//! pairs whose bounding boxes meet, found through an R-tree. Two segments can only intersect when
//! their boxes meet, so the same pairs fail the same test and the verdicts are the same.

use geo::algorithm::validation::{CoordIndex, InvalidPolygon, RingRole};
use geo::coordinate_position::CoordPos;
use geo::dimensions::Dimensions;
use geo::{Intersects, Line, LineString, Polygon, PreparedGeometry, Relate};
use rstar::{AABB, RTree, primitives::GeomWithData, primitives::Rectangle};

/// The first reason `polygon` is invalid, checked in the library's order (per ring: too few
/// points, self-intersection, a non-finite coordinate; then the holes against the outer ring
/// and each other).
pub fn check_polygon(polygon: &Polygon<f64>) -> Result<(), InvalidPolygon> {
    if polygon.exterior().0.is_empty() {
        return Ok(());
    }
    let rings = std::iter::once(polygon.exterior()).chain(polygon.interiors());
    for (i, ring) in rings.enumerate() {
        if ring.0.is_empty() {
            continue;
        }
        let role = match i {
            0 => RingRole::Exterior,
            _ => RingRole::Interior(i - 1),
        };
        let mut distinct = ring.0.clone();
        distinct.dedup();
        if distinct.len() < 4 {
            return Err(InvalidPolygon::TooFewPointsInRing(role));
        }
        let bad = ring
            .0
            .iter()
            .position(|c| !(c.x.is_finite() && c.y.is_finite()));
        // A ring with a non-finite coordinate is invalid whatever else it holds; its boxes
        // cannot be indexed, so its self-intersection is not looked for.
        if bad.is_none() && self_intersects(ring) {
            return Err(InvalidPolygon::SelfIntersection(role));
        }
        if let Some(k) = bad {
            return Err(InvalidPolygon::NonFiniteCoord(role, CoordIndex(k)));
        }
    }
    holes(polygon)
}

/// True when two segments of `ring` meet other than where one ends and the next begins (the
/// library's test: `i != j`, they intersect, and neither's end is the other's start).
fn self_intersects(ring: &LineString<f64>) -> bool {
    let lines: Vec<Line<f64>> = ring.lines().collect();
    let boxed = |l: &Line<f64>| {
        let (a, b) = (l.start, l.end);
        AABB::from_corners([a.x.min(b.x), a.y.min(b.y)], [a.x.max(b.x), a.y.max(b.y)])
    };
    let tree = RTree::bulk_load(
        lines
            .iter()
            .enumerate()
            .map(|(i, l)| {
                let b = boxed(l);
                GeomWithData::new(Rectangle::from_corners(b.lower(), b.upper()), i)
            })
            .collect(),
    );
    lines.iter().enumerate().any(|(i, line)| {
        tree.locate_in_envelope_intersecting(&boxed(line)).any(|g| {
            let (j, other) = (g.data, &lines[g.data]);
            i != j && line.intersects(other) && line.start != other.end && line.end != other.start
        })
    })
}

/// The holes against the outer ring and against each other, as the library checks them.
fn holes(polygon: &Polygon<f64>) -> Result<(), InvalidPolygon> {
    if polygon.interiors().iter().all(|r| r.0.is_empty()) {
        return Ok(());
    }
    let outer = Polygon::new(polygon.exterior().clone(), vec![]);
    let outer = PreparedGeometry::from(&outer);
    for (i, a) in polygon.interiors().iter().enumerate() {
        if a.0.is_empty() {
            continue;
        }
        let a_poly = Polygon::new(a.clone(), vec![]);
        let a_prep = PreparedGeometry::from(&a_poly);
        let m = outer.relate(&a_prep);
        if !m.is_contains() {
            return Err(InvalidPolygon::InteriorRingNotContainedInExteriorRing(
                RingRole::Interior(i),
            ));
        }
        if m.get(CoordPos::OnBoundary, CoordPos::OnBoundary) == Dimensions::OneDimensional {
            return Err(InvalidPolygon::IntersectingRingsOnALine(
                RingRole::Exterior,
                RingRole::Interior(i),
            ));
        }
        for (j, b) in polygon.interiors().iter().enumerate().skip(i + 1) {
            if b.0.is_empty() {
                continue;
            }
            let m = a_prep.relate(&Polygon::new(b.clone(), vec![]));
            if m.get(CoordPos::Inside, CoordPos::Inside) == Dimensions::TwoDimensional {
                return Err(InvalidPolygon::IntersectingRingsOnAnArea(
                    RingRole::Interior(i),
                    RingRole::Interior(j),
                ));
            }
            if m.get(CoordPos::OnBoundary, CoordPos::OnBoundary) == Dimensions::OneDimensional {
                return Err(InvalidPolygon::IntersectingRingsOnALine(
                    RingRole::Interior(i),
                    RingRole::Interior(j),
                ));
            }
        }
    }
    Ok(())
}

/// The first two parts of a MultiPolygon whose insides overlap, if any (OGC Simple Features
/// §6.1.14: the interiors of a MultiPolygon's parts do not intersect). Parts meeting along an edge
/// or at a point are allowed here: they cover no ground twice. Only parts whose bounding boxes
/// meet are compared (an R-tree), so many small parts cost no quadratic time.
pub fn overlapping_parts(parts: &[Polygon<f64>]) -> Option<(usize, usize)> {
    use geo::BoundingRect;
    if parts.len() < 2 {
        return None;
    }
    let boxes: Vec<Option<AABB<[f64; 2]>>> = parts
        .iter()
        .map(|p| {
            p.bounding_rect()
                .filter(|r| r.min().x.is_finite() && r.max().y.is_finite())
                .map(|r| AABB::from_corners([r.min().x, r.min().y], [r.max().x, r.max().y]))
        })
        .collect();
    let tree = RTree::bulk_load(
        boxes
            .iter()
            .enumerate()
            .filter_map(|(i, b)| {
                b.map(|b| GeomWithData::new(Rectangle::from_corners(b.lower(), b.upper()), i))
            })
            .collect(),
    );
    for (i, b) in boxes.iter().enumerate() {
        let Some(b) = b else { continue };
        let mut near: Vec<usize> = tree
            .locate_in_envelope_intersecting(b)
            .map(|g| g.data)
            .filter(|&j| j > i)
            .collect();
        near.sort_unstable();
        for j in near {
            let m = parts[i].relate(&parts[j]);
            if m.get(CoordPos::Inside, CoordPos::Inside) == Dimensions::TwoDimensional {
                return Some((i, j));
            }
        }
    }
    None
}

/// Refuses a feature whose parts (a MultiPolygon's, or a Shapefile record's outer rings)
/// overlap: the ground they share would be counted twice, and such a MultiPolygon is not valid
/// (OGC Simple Features); every format's zones pass here.
pub(super) fn zone_parts_apart(
    path: &std::path::Path,
    zones: &[super::zones::Zone],
) -> Result<(), super::IngestError> {
    for group in zones.chunk_by(|a, b| a.feature == b.feature) {
        let parts: Vec<Polygon<f64>> = group.iter().map(|z| z.polygon.clone()).collect();
        if let Some((a, b)) = overlapping_parts(&parts) {
            return Err(super::IngestError::Feature {
                path: path.to_path_buf(),
                feature: group[0].feature,
                field: Some("geometry".into()),
                message: format!(
                    "parts {a} and {b} of the zone overlap (OGC Simple Features: the parts of a \
                     MultiPolygon do not overlap); merge them into one polygon in a GIS \
                     (dissolve), or give them as separate features"
                ),
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::Validation;

    #[test]
    fn overlapping_parts_are_found_and_touching_ones_allowed() {
        let sq = |x: f64, y: f64, s: f64| {
            Polygon::new(
                ring(&[(x, y), (x + s, y), (x + s, y + s), (x, y + s)]),
                vec![],
            )
        };
        assert_eq!(
            overlapping_parts(&[sq(0.0, 0.0, 2.0), sq(1.0, 1.0, 2.0)]),
            Some((0, 1))
        );
        // One part inside another overlaps it too.
        assert_eq!(
            overlapping_parts(&[sq(9.0, 9.0, 1.0), sq(0.0, 0.0, 1.0), sq(0.2, 0.2, 0.5)]),
            Some((1, 2))
        );
        // Sharing an edge, or a corner, is no overlap.
        assert_eq!(
            overlapping_parts(&[sq(0.0, 0.0, 1.0), sq(1.0, 0.0, 1.0), sq(2.0, 1.0, 1.0)]),
            None
        );
    }

    /// The library's own verdict and message (geo 0.33 `Validation`, the quadratic check this
    /// module replaces), for comparison.
    fn library(p: &Polygon<f64>) -> Result<(), String> {
        p.check_validation().map_err(|e| e.to_string())
    }

    fn ours(p: &Polygon<f64>) -> Result<(), String> {
        check_polygon(p).map_err(|e| e.to_string())
    }

    fn ring(xy: &[(f64, f64)]) -> LineString<f64> {
        let mut v: Vec<(f64, f64)> = xy.to_vec();
        if v.first() != v.last() {
            v.push(v[0]);
        }
        LineString::from(v)
    }

    #[test]
    fn same_verdicts_on_tricky_polygons() {
        let sq = [(0., 0.), (4., 0.), (4., 4.), (0., 4.)];
        let cases: Vec<Polygon<f64>> = vec![
            Polygon::new(ring(&sq), vec![]),
            // A bow tie, a spike out and back, a ring touching itself at a vertex.
            Polygon::new(ring(&[(0., 0.), (2., 2.), (2., 0.), (0., 2.)]), vec![]),
            Polygon::new(
                ring(&[(0., 0.), (4., 0.), (4., 4.), (6., 6.), (4., 4.), (0., 4.)]),
                vec![],
            ),
            Polygon::new(
                ring(&[(0., 0.), (2., 1.), (4., 0.), (4., 4.), (2., 1.), (0., 4.)]),
                vec![],
            ),
            // Repeated positions, too few distinct ones, a segment folding back on itself.
            Polygon::new(
                ring(&[(0., 0.), (0., 0.), (4., 0.), (4., 4.), (4., 4.), (0., 4.)]),
                vec![],
            ),
            Polygon::new(ring(&[(0., 0.), (4., 0.), (4., 0.), (0., 0.)]), vec![]),
            Polygon::new(ring(&[(0., 0.), (4., 0.), (2., 0.), (2., 3.)]), vec![]),
            // Holes: inside, outside, touching the outer ring along a line, overlapping holes.
            Polygon::new(
                ring(&sq),
                vec![ring(&[(1., 1.), (2., 1.), (2., 2.), (1., 2.)])],
            ),
            Polygon::new(ring(&sq), vec![ring(&[(5., 5.), (6., 5.), (6., 6.)])]),
            Polygon::new(
                ring(&sq),
                vec![ring(&[(0., 1.), (1., 1.), (1., 2.), (0., 2.)])],
            ),
            Polygon::new(
                ring(&sq),
                vec![
                    ring(&[(1., 1.), (3., 1.), (3., 3.), (1., 3.)]),
                    ring(&[(2., 2.), (3.5, 2.), (3.5, 3.5), (2., 3.5)]),
                ],
            ),
            Polygon::new(
                ring(&sq),
                vec![
                    ring(&[(1., 1.), (2., 1.), (2., 2.), (1., 2.)]),
                    ring(&[(2., 1.), (3., 1.), (3., 2.), (2., 2.)]),
                ],
            ),
            Polygon::new(LineString::new(vec![]), vec![]),
        ];
        for p in &cases {
            assert_eq!(ours(p), library(p), "{p:?}");
        }
        // A non-finite coordinate: invalid for both (the message may name another fault first).
        let nan = Polygon::new(
            ring(&[(0., 0.), (4., f64::NAN), (4., 4.), (0., 4.)]),
            vec![],
        );
        assert!(ours(&nan).is_err() && library(&nan).is_err());
    }

    #[test]
    fn same_verdicts_on_random_polygons() {
        // Positions on a small grid, so rings often cross, touch, overlap and repeat themselves.
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut next = |n: u64| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state % n) as f64
        };
        let rand_ring = |next: &mut dyn FnMut(u64) -> f64, lo: f64, span: u64, n: usize| {
            let v: Vec<(f64, f64)> = (0..n).map(|_| (lo + next(span), lo + next(span))).collect();
            ring(&v)
        };
        let (mut valid, mut invalid) = (0, 0);
        for _ in 0..4000 {
            let n = 3 + next(7) as usize;
            let outer = rand_ring(&mut next, 0.0, 6, n);
            let mut holes = Vec::new();
            for _ in 0..next(3) as usize {
                let k = 3 + next(3) as usize;
                holes.push(rand_ring(&mut next, 1.0, 4, k));
            }
            let p = Polygon::new(outer, holes);
            let verdict = library(&p);
            match verdict {
                Ok(()) => valid += 1,
                Err(_) => invalid += 1,
            }
            assert_eq!(ours(&p), verdict, "{p:?}");
        }
        // Both verdicts occur, so the comparison is not one-sided.
        assert!(
            valid > 50 && invalid > 50,
            "{valid} valid, {invalid} invalid"
        );
    }
}
