//! Geometry blobs of a GeoPackage (OGC GeoPackage Encoding Standard 1.3, §2.1.3 "GeoPackage
//! Binary"): the `GP` header (version 0, little-endian, an xy envelope, the srs_id) followed by
//! the geometry as ISO/OGC Well-Known Binary (2-D: Point 1, LineString 2, MultiLineString 5).

/// The CRS of every layer: EPSG:4326, WGS84 longitude/latitude (x east, y north).
pub const SRS_ID: i32 = 4326;

/// A bounding box: `[min_x, max_x, min_y, max_y]`, the envelope's order in the header.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Envelope(pub [f64; 4]);

impl Envelope {
    /// The empty box (no point yet).
    pub const EMPTY: Envelope = Envelope([
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    ]);

    /// Grows the box to hold `c`.
    pub fn add(&mut self, c: [f64; 2]) {
        let e = &mut self.0;
        e[0] = e[0].min(c[0]);
        e[1] = e[1].max(c[0]);
        e[2] = e[2].min(c[1]);
        e[3] = e[3].max(c[1]);
    }

    /// Grows the box to hold `other`.
    pub fn join(&mut self, other: &Envelope) {
        self.add([other.0[0], other.0[2]]);
        self.add([other.0[1], other.0[3]]);
    }

    /// True while no point was added.
    pub fn is_empty(&self) -> bool {
        self.0[0] > self.0[1]
    }
}

/// A coordinate as the GeoJSON layers print it: 7 decimals (about 1 cm), never `-0`, so both
/// formats hold the same positions.
fn at7(c: [f64; 2]) -> [f64; 2] {
    [round(c[0], 7), round(c[1], 7)]
}

/// `x` rounded to `decimals` decimals exactly as [`crate::decimal::push_decimal`] prints it: the
/// same scaled integer, divided back (IEEE division gives the double nearest the decimal text,
/// the one a reader parsing that text gets). Non-finite values stay as they are.
pub fn round(x: f64, decimals: usize) -> f64 {
    let p = 10f64.powi(decimals as i32);
    let scaled = (x * p).round();
    if !x.is_finite() || scaled.abs() >= 9.0e15 {
        return x;
    }
    // `+ 0.0` turns -0 into 0, as the text never shows `-0`.
    scaled / p + 0.0
}

fn header(buf: &mut Vec<u8>, env: &Envelope) {
    buf.extend_from_slice(b"GP");
    buf.push(0); // version 1 of the binary format
    // Flags: bit 0 little-endian, bits 1-3 envelope kind 1 ([minx, maxx, miny, maxy]).
    buf.push(0b0000_0011);
    buf.extend_from_slice(&SRS_ID.to_le_bytes());
    for v in env.0 {
        buf.extend_from_slice(&v.to_le_bytes());
    }
}

fn points(buf: &mut Vec<u8>, pts: &[[f64; 2]]) {
    buf.extend_from_slice(&(pts.len() as u32).to_le_bytes());
    for p in pts {
        let p = at7(*p);
        buf.extend_from_slice(&p[0].to_le_bytes());
        buf.extend_from_slice(&p[1].to_le_bytes());
    }
}

/// Writes a Point blob into `buf` (cleared first) and returns its envelope.
pub fn point(buf: &mut Vec<u8>, c: [f64; 2]) -> Envelope {
    let c = at7(c);
    let mut env = Envelope::EMPTY;
    env.add(c);
    buf.clear();
    header(buf, &env);
    buf.push(1);
    buf.extend_from_slice(&1u32.to_le_bytes());
    buf.extend_from_slice(&c[0].to_le_bytes());
    buf.extend_from_slice(&c[1].to_le_bytes());
    env
}

/// Writes a LineString blob (one part) or a MultiLineString blob (several) into `buf` (cleared
/// first) and returns its envelope.
pub fn lines(buf: &mut Vec<u8>, parts: &[&[[f64; 2]]]) -> Envelope {
    let mut env = Envelope::EMPTY;
    for p in parts.iter().flat_map(|p| p.iter()) {
        env.add(at7(*p));
    }
    buf.clear();
    header(buf, &env);
    if let [one] = parts {
        buf.push(1);
        buf.extend_from_slice(&2u32.to_le_bytes());
        points(buf, one);
    } else {
        buf.push(1);
        buf.extend_from_slice(&5u32.to_le_bytes());
        buf.extend_from_slice(&(parts.len() as u32).to_le_bytes());
        for p in parts {
            buf.push(1);
            buf.extend_from_slice(&2u32.to_le_bytes());
            points(buf, p);
        }
    }
    env
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounding_agrees_with_the_decimal_text() {
        // The value stored must be the one a reader of the GeoJSON text gets.
        for k in 0..200_000 {
            let x = -181.0 + 362.0 * (k as f64 / 200_000.0) + (k as f64 * 0.618_034).fract() * 1e-6;
            for d in [3, 6, 7] {
                let mut s = String::new();
                crate::decimal::push_decimal(&mut s, x, d, true);
                assert_eq!(round(x, d), s.parse::<f64>().unwrap(), "{x} at {d}");
                assert!(round(x, d).is_sign_positive() || round(x, d) != 0.0);
            }
        }
    }

    #[test]
    fn a_line_blob_has_its_header_envelope_and_wkb() {
        // GeoPackage 1.3 §2.1.3: "GP", version 0, flags, srs_id, envelope; then WKB.
        let mut b = Vec::new();
        let env = lines(&mut b, &[&[[1.0, 2.0], [3.0, -4.0]]]);
        assert_eq!(env.0, [1.0, 3.0, -4.0, 2.0]);
        assert_eq!(&b[..4], b"GP\x00\x03");
        assert_eq!(i32::from_le_bytes(b[4..8].try_into().unwrap()), 4326);
        assert_eq!(f64::from_le_bytes(b[8..16].try_into().unwrap()), 1.0);
        assert_eq!(f64::from_le_bytes(b[32..40].try_into().unwrap()), 2.0);
        assert_eq!(b[40], 1);
        assert_eq!(u32::from_le_bytes(b[41..45].try_into().unwrap()), 2);
        assert_eq!(u32::from_le_bytes(b[45..49].try_into().unwrap()), 2);
        assert_eq!(b.len(), 49 + 32);
        // The project's GeoPackage reader (ingest::wkb) reads both kinds back.
        let mut m = Vec::new();
        lines(
            &mut m,
            &[
                &[[179.0, 0.0], [180.0, 1.0]],
                &[[-180.0, 1.0], [-179.0, 2.0]],
            ],
        );
        assert_eq!(m.len(), 40 + 9 + 2 * (9 + 32));
        for (blob, n) in [(&b, 2), (&m, 4)] {
            match crate::ingest::wkb::decode(blob).unwrap() {
                crate::ingest::wkb::Decoded::Lines(c) => assert_eq!(c.pos.len(), n),
                other => panic!("{other:?}"),
            }
        }
    }
}
