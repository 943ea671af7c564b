//! Longitudes that wrap at ±180° and local planar frames.
//!
//! Longitude 180 and -180 are one meridian: RFC 7946 §3.1.9 cuts lines there, so a road may end at
//! 180 in one feature (or part) and go on from -180 in another. A step between consecutive positions
//! runs the short way round (RFC 7946 §3.1.1: the shortest line between them), so a network's
//! geometry may hold steps whose longitudes jump by almost 360°. Every planar computation therefore
//! works in a local frame around a reference position whose longitudes are unwrapped to within 180°
//! of it, so it has no seam at ±180°; distances compared with a tolerance are geodesic, so they do
//! not stretch near the poles.
//! Spatial indices hold each segment unwrapped (its second end moved by whole turns to within 180° of
//! its first) and are searched with the query box shifted by a turn where it reaches past ±180°.

/// The longitude in [-180, 180): 180 and -180 give one value, the key of a meridian.
pub fn canonical_lon(lon: f64) -> f64 {
    let l = if lon >= 180.0 {
        lon - 360.0
    } else if lon < -180.0 {
        lon + 360.0
    } else {
        lon
    };
    l + 0.0
}

/// True when two lon/lat positions are the same point (180 and -180 are one meridian).
pub fn same_place(a: [f64; 2], b: [f64; 2]) -> bool {
    a[1] == b[1] && canonical_lon(a[0]) == canonical_lon(b[0])
}

/// `lon` moved by whole turns to within 180° of `reference`.
pub fn near(lon: f64, reference: f64) -> f64 {
    let d = lon - reference;
    if d > 180.0 {
        lon - 360.0
    } else if d < -180.0 {
        lon + 360.0
    } else {
        lon
    }
}

/// `b` with its longitude moved to within 180° of `a`'s: the segment a–b drawn the short way round.
pub fn unwrap(b: [f64; 2], a: [f64; 2]) -> [f64; 2] {
    [near(b[0], a[0]), b[1]]
}

/// A longitude moved by whole turns into [-180, 180] (180 and -180 are kept as they are).
pub fn fold(lon: f64) -> f64 {
    if lon > 180.0 {
        lon - 360.0
    } else if lon < -180.0 {
        lon + 360.0
    } else {
        lon
    }
}

/// The point at fraction `t` along the short way from `a` to `b`, longitude within ±180°.
pub fn lerp(a: [f64; 2], b: [f64; 2], t: f64) -> [f64; 2] {
    let b = unwrap(b, a);
    [fold(a[0] + t * (b[0] - a[0])), a[1] + t * (b[1] - a[1])]
}

/// The boxes to search for things near a box `[lo, hi]` given around a position within ±180° (its
/// longitudes may reach past ±180°): the box itself and its copies a turn away that reach into the
/// stored data's longitudes `data_lon` (unwrapped segments reach up to a turn beyond ±180°). A box a
/// turn or more wide covers every longitude.
pub fn search_boxes(lo: [f64; 2], hi: [f64; 2], data_lon: [f64; 2]) -> Vec<([f64; 2], [f64; 2])> {
    if hi[0] - lo[0] >= 360.0 {
        return vec![([data_lon[0], lo[1]], [data_lon[1], hi[1]])];
    }
    [0.0, -360.0, 360.0]
        .into_iter()
        .filter(|&k| k == 0.0 || (lo[0] + k <= data_lon[1] && hi[0] + k >= data_lon[0]))
        .map(|k| ([lo[0] + k, lo[1]], [hi[0] + k, hi[1]]))
        .collect()
}

/// The parts of a line cut where a step crosses ±180° (the short way round), each ending or
/// starting on the meridian (RFC 7946 §3.1.9); parts of a single position are dropped, so a line
/// that only touches the meridian stays whole.
pub fn split_at_antimeridian(coords: &[[f64; 2]]) -> Vec<Vec<[f64; 2]>> {
    let Some(&first) = coords.first() else {
        return Vec::new();
    };
    let mut parts = vec![vec![first]];
    for w in coords.windows(2) {
        let (a, b) = (w[0], w[1]);
        if (b[0] - a[0]).abs() > 180.0 {
            let (side, other) = if a[0] > 0.0 {
                (180.0, -180.0)
            } else {
                (-180.0, 180.0)
            };
            let to_meridian = side - a[0];
            let span = to_meridian + (b[0] - other);
            let t = if span == 0.0 { 0.0 } else { to_meridian / span };
            let lat = a[1] + t * (b[1] - a[1]);
            let last = parts.last_mut().expect("a part is always open");
            if a[0] != side {
                last.push([side, lat]);
            }
            parts.push(vec![[other, lat]]);
            if b[0] != other {
                parts.last_mut().expect("just opened").push(b);
            }
        } else {
            parts.last_mut().expect("a part is always open").push(b);
        }
    }
    parts.retain(|p| p.len() > 1);
    parts
}

/// A local planar frame around an origin: metres east and north, longitudes unwrapped to within
/// 180° of the origin's and scaled by the WGS84 radii of curvature there. It is affine in
/// longitude/latitude, so a segment straight in lon/lat (RFC 7946 §3.1.1) stays straight and lines
/// through one point still meet in one point; distances compared with a tolerance are measured
/// geodesically (`foot`), so the frame's stretch away from the origin (large near the poles) only
/// moves a foot along its segment by a second-order amount, never the distance reported.
#[derive(Debug, Clone, Copy)]
pub struct Frame {
    origin: [f64; 2],
    mx: f64,
    my: f64,
}

impl Frame {
    /// The frame whose origin is `p`.
    pub fn at(p: [f64; 2]) -> Frame {
        let (my, mx) = super::geodesy::metres_per_degree(p[1]);
        Frame { origin: p, mx, my }
    }

    /// Metres east and north of the origin (longitude taken the short way round).
    pub fn xy(&self, q: [f64; 2]) -> [f64; 2] {
        [
            (near(q[0], self.origin[0]) - self.origin[0]) * self.mx,
            (q[1] - self.origin[1]) * self.my,
        ]
    }

    /// Fraction along segment a–b of its point closest to the origin (in the frame).
    pub fn foot_t(&self, a: [f64; 2], b: [f64; 2]) -> f64 {
        let ([ax, ay], [bx, by]) = (self.xy(a), self.xy(b));
        let (dx, dy) = (bx - ax, by - ay);
        let len2 = dx * dx + dy * dy;
        if len2 > 0.0 {
            (-(ax * dx + ay * dy) / len2).clamp(0.0, 1.0)
        } else {
            0.0
        }
    }

    /// Geodesic distance (m) from the origin to segment a–b's closest point, and the fraction
    /// along the segment of that point.
    pub fn foot(&self, a: [f64; 2], b: [f64; 2]) -> (f64, f64) {
        let t = self.foot_t(a, b);
        (super::geodesy::distance_m(self.origin, lerp(a, b, t)), t)
    }
}

/// Longitude and latitude spans (degrees) that hold every position within `reach_m` metres of a
/// position at latitude up to `max_lat` (absolute); `None` for longitude when such a circle may
/// reach round a pole, so every longitude must be searched.
pub fn reach_deg(reach_m: f64, max_lat: f64) -> (Option<f64>, f64) {
    // A degree of latitude is at least 110,574 m (at the equator); a geodesic of length d keeps
    // within d of its ends' latitudes, where a degree of longitude is N·cos(lat) long.
    let dlat = reach_m / 110_574.0 * 1.001;
    let far = max_lat.abs() + 2.0 * dlat;
    if far >= 89.999 {
        return (None, dlat);
    }
    let (_, mx) = super::geodesy::metres_per_degree(far);
    let dlon = reach_m / mx * 1.001;
    ((dlon < 120.0).then_some(dlon), dlat)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ingest::geodesy::karney_distance_m;

    #[test]
    fn one_meridian_one_key() {
        assert_eq!(canonical_lon(180.0), canonical_lon(-180.0));
        assert!(same_place([180.0, 5.0], [-180.0, 5.0]));
        assert!(!same_place([179.0, 5.0], [-179.0, 5.0]));
        assert_eq!(near(-179.0, 179.0), 181.0);
        assert_eq!(lerp([179.0, 0.0], [-179.0, 2.0], 0.25), [179.5, 0.5]);
        assert_eq!(lerp([179.0, 0.0], [-179.0, 2.0], 0.75), [-179.5, 1.5]);
    }

    /// Feet are found on the segment straight in lon/lat and measured geodesically: against
    /// Karney's geodesic (geo crate) at the equator, across ±180° and at 85° and 89.9995°.
    #[test]
    fn feet_are_geodesic() {
        for (p, a, b) in [
            ([10.0, 0.0], [10.006, 0.006], [10.012, 0.006]),
            ([179.999, -30.0], [-179.996, -29.997], [179.99, -29.997]),
            ([0.0, 85.0], [0.05, 85.005], [0.1, 85.005]),
            ([0.0, 89.9995], [180.0, 89.9996], [179.0, 89.9996]),
        ] {
            let f = Frame::at(p);
            let (d, t) = f.foot(a, b);
            let q = lerp(a, b, t);
            assert!((d - karney_distance_m(p, q)).abs() < 1e-3, "{p:?}: {d}");
            // No other point of the segment is nearer by more than 1 % (checked at 1,000 steps).
            let best = (0..=1000)
                .map(|i| karney_distance_m(p, lerp(a, b, i as f64 / 1000.0)))
                .fold(f64::MAX, f64::min);
            assert!(d <= best * 1.01 + 1e-3, "{p:?}: {d} vs {best}");
        }
    }

    #[test]
    fn search_boxes_reach_across_the_meridian() {
        let boxes = search_boxes([179.9, 0.0], [180.1, 1.0], [-180.0, 180.0]);
        assert_eq!(boxes.len(), 2);
        assert_eq!(boxes[1].0[0], 179.9 - 360.0);
        assert_eq!(
            search_boxes([0.0, 0.0], [1.0, 1.0], [-180.0, 180.0]).len(),
            1
        );
        assert_eq!(reach_deg(10.0, 89.9999).0, None);
    }
}
