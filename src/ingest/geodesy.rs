//! Lengths on the WGS84 ellipsoid.
//!
//! Karney's geodesic (through the geo crate) is exact to nanometres but costs about a microsecond per
//! vertex pair. Road vertices are usually metres apart, where the mid-latitude ellipsoidal formula
//! (meridian and prime-vertical radii of curvature at the mean latitude) agrees with it to far below a
//! millimetre, so short steps use that and long or polar steps fall back to Karney.

use geo::{Distance, Geodesic, Point};

/// WGS84 semi-major axis in metres.
pub const WGS84_A: f64 = 6_378_137.0;
/// WGS84 flattening.
pub const WGS84_F: f64 = 1.0 / 298.257_223_563;
const E2: f64 = WGS84_F * (2.0 - WGS84_F);

/// Steps longer than this (metres, estimated) are measured with Karney's method.
const LOCAL_MAX_M: f64 = 1_000.0;
/// Steps reaching beyond this latitude (degrees) are measured with Karney's method.
const LOCAL_MAX_LAT: f64 = 80.0;

/// Metres per degree of latitude and of longitude at latitude `lat_deg` (WGS84 radii of curvature).
pub fn metres_per_degree(lat_deg: f64) -> (f64, f64) {
    let phi = lat_deg.to_radians();
    let s = phi.sin();
    let w2 = 1.0 - E2 * s * s;
    let n = WGS84_A / w2.sqrt();
    let m = WGS84_A * (1.0 - E2) / (w2 * w2.sqrt());
    let k = std::f64::consts::PI / 180.0;
    (m * k, n * phi.cos() * k)
}

/// Distance in metres between two lon/lat points by the mid-latitude ellipsoidal formula.
///
/// Accurate to well under a millimetre for steps up to 1 km below 80° latitude; use [`distance_m`]
/// when the step may be longer.
pub fn local_distance_m(a: [f64; 2], b: [f64; 2]) -> f64 {
    let (my, mx) = metres_per_degree(0.5 * (a[1] + b[1]));
    let mut dlon = b[0] - a[0];
    if dlon > 180.0 {
        dlon -= 360.0;
    } else if dlon < -180.0 {
        dlon += 360.0;
    }
    let dx = dlon * mx;
    let dy = (b[1] - a[1]) * my;
    (dx * dx + dy * dy).sqrt()
}

/// Geodesic distance in metres between two lon/lat points on WGS84 (Karney's method).
pub fn karney_distance_m(a: [f64; 2], b: [f64; 2]) -> f64 {
    Geodesic.distance(Point::new(a[0], a[1]), Point::new(b[0], b[1]))
}

/// Distance in metres between two lon/lat points: the fast local formula where it is exact enough,
/// Karney's geodesic otherwise.
pub fn distance_m(a: [f64; 2], b: [f64; 2]) -> f64 {
    let d = local_distance_m(a, b);
    if d <= LOCAL_MAX_M && a[1].abs() <= LOCAL_MAX_LAT && b[1].abs() <= LOCAL_MAX_LAT {
        d
    } else {
        karney_distance_m(a, b)
    }
}

/// A new point rounded to 7 decimals (about 1 cm), the precision of every output layer, so the
/// geometry measured is the geometry written.
pub fn round7(p: [f64; 2]) -> [f64; 2] {
    [(p[0] * 1e7).round() / 1e7, (p[1] * 1e7).round() / 1e7]
}

/// Length in metres of a lon/lat polyline given as a sequence of positions.
pub fn polyline_length_m<I: IntoIterator<Item = [f64; 2]>>(points: I) -> f64 {
    let mut it = points.into_iter();
    let Some(mut prev) = it.next() else {
        return 0.0;
    };
    let mut total = 0.0;
    for p in it {
        total += distance_m(prev, p);
        prev = p;
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Worst disagreement between the local formula and Karney's geodesic over random short steps.
    #[test]
    fn local_formula_within_a_tenth_of_a_millimetre_of_karney() {
        let mut state = 0x9E37_79B9_7F4A_7C15u64;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut worst: f64 = 0.0;
        for _ in 0..20_000 {
            let lat = -LOCAL_MAX_LAT + 2.0 * LOCAL_MAX_LAT * next();
            let lon = -180.0 + 360.0 * next();
            let len = LOCAL_MAX_M * next();
            let az = std::f64::consts::TAU * next();
            let (my, mx) = metres_per_degree(lat);
            let b = [lon + len * az.sin() / mx, lat + len * az.cos() / my];
            if b[1].abs() > LOCAL_MAX_LAT {
                continue;
            }
            let err = (local_distance_m([lon, lat], b) - karney_distance_m([lon, lat], b)).abs();
            worst = worst.max(err);
        }
        assert!(worst < 1e-4, "worst error {worst} m");
    }

    #[test]
    fn long_steps_use_karney() {
        let a = [0.0, 0.0];
        let b = [1.0, 1.0];
        assert_eq!(distance_m(a, b), karney_distance_m(a, b));
    }

    #[test]
    fn antimeridian_step_is_short() {
        let d = local_distance_m([179.9999, 10.0], [-179.9999, 10.0]);
        assert!(d < 30.0, "{d}");
    }
}
