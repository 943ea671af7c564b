//! Sites drawn as polygons (a hospital as its building outline): the rings checked, a point inside
//! for the maps, and how far a road segment is from the outline.
//!
//! A polygon site attaches at the road nearest to its outline: the distance is from the road to the
//! nearest point of the outline, and 0 when a road meets the polygon (crosses its boundary or runs
//! inside it). Among roads at the same distance (every road meeting the polygon is at 0) the one
//! nearest the site's point wins, and a road meeting the polygon attaches at its point inside the
//! polygon nearest the site's point. The site's point ([`Outline::check`]) is the middle of the
//! widest stretch inside the polygon along a line of latitude: always inside, unlike a centroid,
//! which can fall outside an L-shaped or courtyard building.

use super::geodesy::{distance_m, metres_per_degree};
use super::wrap::{Frame, lerp, near};

/// The rings of a polygon site, lon/lat: polygons, each with its outer ring first and its holes
/// after, every ring closed (first position = last).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Outline {
    /// Polygons of rings of positions.
    pub polygons: Vec<Vec<Vec<[f64; 2]>>>,
}

/// Most latitudes tried when looking for the widest stretch inside a polygon.
const MAX_SCANLINES: usize = 64;

impl Outline {
    /// Every position, for CRS conversion and range checks.
    pub fn positions_mut(&mut self) -> impl Iterator<Item = &mut [f64; 2]> {
        self.polygons.iter_mut().flatten().flatten()
    }

    /// Checks the rings (closed, an area, not crossing themselves or each other) and returns the
    /// site's point inside; the error says what is wrong. Longitudes are unwrapped to within 180°
    /// of the first position, so a building across ±180° stays whole.
    pub fn check(&mut self) -> Result<[f64; 2], String> {
        let Some(anchor) = self
            .polygons
            .first()
            .and_then(|p| p.first())
            .and_then(|r| r.first())
        else {
            return Err("the polygon has no rings".into());
        };
        let anchor = anchor[0];
        for (pi, rings) in self.polygons.iter_mut().enumerate() {
            if rings.is_empty() {
                return Err(format!("polygon {pi} has no rings"));
            }
            for (r, ring) in rings.iter_mut().enumerate() {
                if ring.len() < 4 || ring.first() != ring.last() {
                    return Err(format!(
                        "ring {r} is not closed: a ring needs at least 4 positions, the last equal \
                         to the first (RFC 7946 §3.1.6)"
                    ));
                }
                for p in ring.iter_mut() {
                    p[0] = near(p[0], anchor);
                }
            }
            let polygon = to_geo(rings);
            if on_one_line(&rings[0]) {
                return Err(format!(
                    "polygon {pi} has no area (its positions lie on one line or one point); give \
                     the site as a Point instead"
                ));
            }
            if let Err(e) = super::valid::check_polygon(&polygon) {
                return Err(format!(
                    "polygon {pi} is not valid ({e}); fix the outline (e.g. a ring crossing itself), \
                     or give the site as a Point"
                ));
            }
            if geo::Area::unsigned_area(&polygon) <= 0.0 {
                return Err(format!(
                    "polygon {pi} has no area (its positions lie on one line or one point); give \
                     the site as a Point instead"
                ));
            }
        }
        let parts: Vec<geo::Polygon<f64>> = self.polygons.iter().map(|r| to_geo(r)).collect();
        if let Some((a, b)) = super::valid::overlapping_parts(&parts) {
            return Err(format!(
                "polygons {a} and {b} of the site overlap (OGC Simple Features: the parts of a \
                 MultiPolygon do not overlap); merge them into one polygon in a GIS (dissolve)"
            ));
        }
        let p = self.inside_point().ok_or("the polygon has no inside")?;
        Ok([super::wrap::fold(p[0]), p[1]])
    }

    /// The middle of the widest stretch inside any polygon along a line of latitude (tried at the
    /// mean latitude of each outer ring and between the rings' distinct latitudes).
    fn inside_point(&self) -> Option<[f64; 2]> {
        let mut best: Option<(f64, [f64; 2])> = None;
        for rings in &self.polygons {
            let outer = &rings[0][..rings[0].len() - 1];
            let mean = outer.iter().map(|p| p[1]).sum::<f64>() / outer.len() as f64;
            let mut ys: Vec<f64> = rings.iter().flatten().map(|p| p[1]).collect();
            ys.sort_by(f64::total_cmp);
            ys.dedup();
            let step = (ys.len() / MAX_SCANLINES).max(1);
            let between = ys.windows(2).step_by(step).map(|w| 0.5 * (w[0] + w[1]));
            for y in std::iter::once(mean).chain(between) {
                let mut xs: Vec<f64> = rings
                    .iter()
                    .flat_map(|ring| ring.windows(2))
                    .filter(|w| (w[0][1] > y) != (w[1][1] > y))
                    .map(|w| w[0][0] + (y - w[0][1]) / (w[1][1] - w[0][1]) * (w[1][0] - w[0][0]))
                    .collect();
                xs.sort_by(f64::total_cmp);
                let scale = metres_per_degree(y).1;
                for c in xs.chunks_exact(2) {
                    let width = (c[1] - c[0]) * scale;
                    if best.is_none_or(|(w, _)| width > w) {
                        best = Some((width, [0.5 * (c[0] + c[1]), y]));
                    }
                }
            }
        }
        best.map(|(_, p)| p)
    }

    /// The box round every position (longitudes as unwrapped by [`Outline::check`]).
    pub fn bbox(&self) -> ([f64; 2], [f64; 2]) {
        let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
        for p in self.polygons.iter().flatten().flatten() {
            lo = [lo[0].min(p[0]), lo[1].min(p[1])];
            hi = [hi[0].max(p[0]), hi[1].max(p[1])];
        }
        (lo, hi)
    }

    /// The outline seen from `frame` (origin: the site's point), ready to measure roads against.
    pub fn placed(&self, frame: Frame) -> Placed<'_> {
        let xy = self
            .polygons
            .iter()
            .map(|rs| {
                rs.iter()
                    .map(|r| r.iter().map(|&q| frame.xy(q)).collect())
                    .collect()
            })
            .collect();
        Placed {
            outline: self,
            frame,
            xy,
        }
    }
}

/// An outline in a local plane round the site's point: its rings in metres east and north.
pub struct Placed<'a> {
    outline: &'a Outline,
    frame: Frame,
    xy: Vec<Vec<Vec<[f64; 2]>>>,
}

impl Placed<'_> {
    /// How road segment a–b reaches the outline: the geodesic distance between the nearest
    /// points of the two (0 when the segment meets the polygon), the distance in metres from the
    /// site's point to the attachment point (to break ties), and the fraction along a–b of the
    /// attachment point.
    pub fn reach(&self, a: [f64; 2], b: [f64; 2]) -> (f64, f64, f64) {
        let (pa, pb) = (self.frame.xy(a), self.frame.xy(b));
        let at = |t: f64| [pa[0] + t * (pb[0] - pa[0]), pa[1] + t * (pb[1] - pa[1])];
        let from_site = |t: f64| {
            let p = at(t);
            p[0].hypot(p[1])
        };
        // Where a–b crosses or touches a ring, and the stretches between that lie inside.
        let mut hits = Vec::new();
        for ring in self.xy.iter().flatten() {
            for w in ring.windows(2) {
                hits.extend(crossing(pa, pb, w[0], w[1]));
            }
        }
        let mut ts = vec![0.0, 1.0];
        ts.extend_from_slice(&hits);
        ts.sort_by(f64::total_cmp);
        ts.dedup();
        let foot = foot_t([0.0, 0.0], pa, pb);
        let mut candidates = hits;
        for w in ts.windows(2) {
            if self.contains(at(0.5 * (w[0] + w[1]))) {
                candidates.push(foot.clamp(w[0], w[1]));
            }
        }
        if let Some(t) = candidates
            .into_iter()
            .min_by(|x, y| from_site(*x).total_cmp(&from_site(*y)).then(x.total_cmp(y)))
        {
            return (0.0, from_site(t), t);
        }
        // Apart: the nearest pairs are ring vertices and their feet on a–b, or ends of a–b and
        // their feet on ring edges, found in the plane. Where several tie (an edge parallel to
        // the road), the stretch of a–b they span is cut at the foot of the site's point, so the
        // answer does not depend on the order or direction of the rings.
        let mut pairs: Vec<(f64, f64)> = Vec::new();
        for rs in self.xy.iter().flatten() {
            for q in rs {
                let t = foot_t(*q, pa, pb);
                let p = at(t);
                pairs.push(((p[0] - q[0]).hypot(p[1] - q[1]), t));
            }
            for w in rs.windows(2) {
                for (t, p) in [(0.0, pa), (1.0, pb)] {
                    let q = along(w[0], w[1], foot_t(p, w[0], w[1]));
                    pairs.push(((p[0] - q[0]).hypot(p[1] - q[1]), t));
                }
            }
        }
        let least = pairs.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
        let tied = |d: f64| d <= least + 1e-6 + 1e-9 * least;
        let (lo, hi) = pairs
            .iter()
            .filter(|p| tied(p.0))
            .fold((1.0f64, 0.0f64), |(lo, hi), p| (lo.min(p.1), hi.max(p.1)));
        let t = foot.clamp(lo, hi.max(lo));
        // The outline's point nearest the attachment point, measured on the ellipsoid.
        let p = at(t);
        let mut near: Option<(f64, [f64; 2])> = None;
        let lonlat = self.outline.polygons.iter().flatten();
        for (rs, ring_ll) in self.xy.iter().flatten().zip(lonlat) {
            for (k, w) in rs.windows(2).enumerate() {
                let s = foot_t(p, w[0], w[1]);
                let q = along(w[0], w[1], s);
                let d = (p[0] - q[0]).hypot(p[1] - q[1]);
                if near.is_none_or(|(nd, _)| d < nd) {
                    near = Some((d, lerp(ring_ll[k], ring_ll[k + 1], s)));
                }
            }
        }
        let q = near.expect("a checked outline has edges").1;
        (distance_m(lerp(a, b, t), q), from_site(t), t)
    }

    /// True when a point of the plane lies inside some polygon (even-odd over its rings).
    fn contains(&self, p: [f64; 2]) -> bool {
        self.xy.iter().any(|rings| {
            let mut inside = false;
            for w in rings.iter().flat_map(|r| r.windows(2)) {
                let (u, v) = (w[0], w[1]);
                if (u[1] > p[1]) != (v[1] > p[1])
                    && p[0] < u[0] + (p[1] - u[1]) / (v[1] - u[1]) * (v[0] - u[0])
                {
                    inside = !inside;
                }
            }
            inside
        })
    }
}

/// True when every position of a ring lies on one line (or is one point): a ring with no inside.
fn on_one_line(ring: &[[f64; 2]]) -> bool {
    let p0 = ring[0];
    let Some(p1) = ring.iter().copied().find(|p| *p != p0) else {
        return true;
    };
    ring.iter()
        .all(|q| (p1[0] - p0[0]) * (q[1] - p0[1]) - (p1[1] - p0[1]) * (q[0] - p0[0]) == 0.0)
}

/// A polygon of the geo crate from rings, for its area and validity checks.
fn to_geo(rings: &[Vec<[f64; 2]>]) -> geo::Polygon<f64> {
    let ls = |r: &Vec<[f64; 2]>| {
        geo::LineString::from(
            r.iter()
                .map(|p| geo::Coord { x: p[0], y: p[1] })
                .collect::<Vec<_>>(),
        )
    };
    geo::Polygon::new(ls(&rings[0]), rings[1..].iter().map(ls).collect())
}

/// The point at fraction `s` along a–b, in the plane.
fn along(a: [f64; 2], b: [f64; 2], s: f64) -> [f64; 2] {
    [a[0] + s * (b[0] - a[0]), a[1] + s * (b[1] - a[1])]
}

/// Fraction along a–b of its point nearest `p`, in the plane.
fn foot_t(p: [f64; 2], a: [f64; 2], b: [f64; 2]) -> f64 {
    let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
    let len2 = dx * dx + dy * dy;
    if len2 > 0.0 {
        (((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    }
}

/// Fraction along a–b where it meets segment c–d (crossing or touching), if it does; a collinear
/// overlap gives the fraction of its first common point.
fn crossing(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> Option<f64> {
    let r = [b[0] - a[0], b[1] - a[1]];
    let s = [d[0] - c[0], d[1] - c[1]];
    let q = [c[0] - a[0], c[1] - a[1]];
    let den = r[0] * s[1] - r[1] * s[0];
    if den == 0.0 {
        // Parallel: they meet only when collinear and overlapping.
        if q[0] * r[1] - q[1] * r[0] != 0.0 {
            return None;
        }
        let len2 = r[0] * r[0] + r[1] * r[1];
        if len2 == 0.0 {
            return None;
        }
        let tc = (q[0] * r[0] + q[1] * r[1]) / len2;
        let td = ((d[0] - a[0]) * r[0] + (d[1] - a[1]) * r[1]) / len2;
        let (lo, hi) = (tc.min(td), tc.max(td));
        return (hi >= 0.0 && lo <= 1.0).then_some(lo.max(0.0));
    }
    let t = (q[0] * s[1] - q[1] * s[0]) / den;
    let u = (q[0] * r[1] - q[1] * r[0]) / den;
    ((0.0..=1.0).contains(&t) && (0.0..=1.0).contains(&u)).then_some(t)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square(x0: f64, y0: f64, s: f64) -> Vec<[f64; 2]> {
        vec![
            [x0, y0],
            [x0 + s, y0],
            [x0 + s, y0 + s],
            [x0, y0 + s],
            [x0, y0],
        ]
    }

    #[test]
    fn checks_name_what_is_wrong() {
        let mut open = Outline {
            polygons: vec![vec![square(0.0, 0.0, 0.001)[..4].to_vec()]],
        };
        assert!(open.check().unwrap_err().contains("not closed"));
        let mut flat = Outline {
            polygons: vec![vec![vec![
                [0.0, 0.0],
                [0.001, 0.0],
                [0.002, 0.0],
                [0.0, 0.0],
            ]]],
        };
        assert!(flat.check().unwrap_err().contains("no area"));
        // A bow tie: the ring crosses itself.
        let mut bow = Outline {
            polygons: vec![vec![vec![
                [0.0, 0.0],
                [0.001, 0.001],
                [0.001, 0.0],
                [0.0, 0.001],
                [0.0, 0.0],
            ]]],
        };
        assert!(
            bow.check().unwrap_err().contains("not valid"),
            "{:?}",
            bow.check()
        );
    }

    #[test]
    fn the_point_is_inside_a_courtyard_building() {
        // A square with a square hole round its centre: the centroid lies in the courtyard.
        let mut o = Outline {
            polygons: vec![vec![square(0.0, 0.0, 0.003), square(0.001, 0.001, 0.001)]],
        };
        let p = o.check().unwrap();
        let in_hole = p[0] > 0.001 && p[0] < 0.002 && p[1] > 0.001 && p[1] < 0.002;
        let in_square = p[0] > 0.0 && p[0] < 0.003 && p[1] > 0.0 && p[1] < 0.003;
        assert!(in_square && !in_hole, "{p:?}");
    }

    #[test]
    fn a_road_through_the_polygon_is_at_zero_and_one_beside_it_at_its_gap() {
        let mut o = Outline {
            polygons: vec![vec![square(0.0, 0.0, 0.001)]],
        };
        let p = o.check().unwrap();
        let f = o.placed(Frame::at(p));
        let (d, _, t) = f.reach([-0.001, 0.0005], [0.002, 0.0005]);
        assert_eq!(d, 0.0);
        // Attached inside the polygon, at the foot from the site's point.
        let q = lerp([-0.001, 0.0005], [0.002, 0.0005], t);
        assert!(q[0] > 0.0 && q[0] < 0.001, "{q:?}");
        // A road wholly inside.
        assert_eq!(f.reach([0.0002, 0.0002], [0.0003, 0.0003]).0, 0.0);
        // A road 0.0005° east of the east side, parallel to it: about 55.7 m at the equator
        // (0.0005 × 111,319.5 m per degree of longitude, WGS84 equatorial radius, from memory).
        let (d, _, _) = f.reach([0.0015, -0.001], [0.0015, 0.002]);
        assert!((d - 55.66).abs() < 0.05, "{d}");
    }
}
