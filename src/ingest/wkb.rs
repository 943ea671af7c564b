//! GeoPackage geometry blobs: the `GP` header (OGC GeoPackage Encoding Standard 1.3, §2.1.3)
//! followed by well-known binary (OGC Simple Features, ISO 19125-1 §8.2).
//!
//! Only what a road layer needs is decoded: LineString and MultiLineString (with Z, M or ZM
//! ordinates, which are dropped); any other type is named so the caller can skip and count it.
//! Every count is checked against the bytes left before anything is allocated for it.

use super::coords::Coords;

/// What a blob holds.
#[derive(Debug, PartialEq)]
pub enum Decoded {
    /// Lines, as coordinates nested three deep (one part per line).
    Lines(Coords),
    /// An empty geometry (the header's empty flag, or a line with no points).
    Empty,
    /// A geometry of another type, by its WKB name.
    Other(&'static str),
}

struct Cursor<'a> {
    b: &'a [u8],
    at: usize,
}

impl Cursor<'_> {
    fn take(&mut self, n: usize) -> Result<&[u8], String> {
        let end = self.at.checked_add(n).filter(|&e| e <= self.b.len());
        let Some(end) = end else {
            return Err(format!(
                "the geometry ends after {} bytes, inside a value that needs {n} more",
                self.b.len(),
            ));
        };
        let s = &self.b[self.at..end];
        self.at = end;
        Ok(s)
    }

    fn u32(&mut self, le: bool) -> Result<u32, String> {
        let s: [u8; 4] = self.take(4)?.try_into().unwrap();
        Ok(if le {
            u32::from_le_bytes(s)
        } else {
            u32::from_be_bytes(s)
        })
    }

    fn f64(&mut self, le: bool) -> Result<f64, String> {
        let s: [u8; 8] = self.take(8)?.try_into().unwrap();
        Ok(if le {
            f64::from_le_bytes(s)
        } else {
            f64::from_be_bytes(s)
        })
    }

    fn order(&mut self) -> Result<bool, String> {
        match self.take(1)?[0] {
            0 => Ok(false),
            1 => Ok(true),
            b => Err(format!(
                "byte order {b} is neither 0 (big) nor 1 (little endian)"
            )),
        }
    }
}

/// Decodes a GeoPackage geometry blob; the error says what is wrong with it.
pub fn decode(blob: &[u8]) -> Result<Decoded, String> {
    let Some(mut c) = header(blob)? else {
        return Ok(Decoded::Empty);
    };
    let le = c.order()?;
    let code = c.u32(le)?;
    let (kind, dims) = kind_of(code)?;
    let mut coords = Coords {
        height: 3,
        ..Default::default()
    };
    match kind {
        2 => line(&mut c, le, dims, &mut coords)?,
        5 => {
            let n = c.u32(le)? as usize;
            for _ in 0..n {
                let le = c.order()?;
                let (k, dims) = kind_of(c.u32(le)?)?;
                if k != 2 {
                    return Err(format!("a MultiLineString holds a {}", name(k)));
                }
                line(&mut c, le, dims, &mut coords)?;
            }
        }
        k if k >= 8 => return Err(not_read(k)),
        k => return Ok(Decoded::Other(name(k))),
    }
    ends_here(&c, kind)?;
    if coords.pos.is_empty() {
        return Ok(Decoded::Empty);
    }
    coords.groups.push(coords.parts.len());
    Ok(Decoded::Lines(coords))
}

/// Decodes a GeoPackage geometry blob of any simple type into GeoJSON's layout (the type's name
/// and its coordinates as [`super::coords`] nests them), for layers of points and polygons;
/// `None` for an empty geometry. A GeometryCollection is named, not decoded.
pub fn decode_feature(blob: &[u8]) -> Result<Option<(&'static str, Coords)>, String> {
    let mut c = match header(blob)? {
        Some(c) => c,
        None => return Ok(None),
    };
    let le = c.order()?;
    let (kind, dims) = kind_of(c.u32(le)?)?;
    let mut out = Coords::default();
    match kind {
        1 => {
            let (x, y) = point(&mut c, le, dims)?;
            if x.is_nan() && y.is_nan() {
                // An empty point is written as NaN ordinates (GeoPackage 1.3, §2.1.3.1.2).
                ends_here(&c, kind)?;
                return Ok(None);
            }
            out.pos.push([x, y]);
            out.height = 1;
        }
        2 => {
            line(&mut c, le, dims, &mut out)?;
            out.height = 2;
        }
        3 => {
            rings(&mut c, le, dims, &mut out)?;
            out.groups.push(out.parts.len());
            out.height = 3;
        }
        4..=6 => {
            let n = c.u32(le)? as usize;
            for _ in 0..n {
                let le = c.order()?;
                let (k, dims) = kind_of(c.u32(le)?)?;
                if k != kind - 3 {
                    return Err(format!("a {} holds a {}", name(kind), name(k)));
                }
                match k {
                    1 => {
                        let (x, y) = point(&mut c, le, dims)?;
                        out.pos.push([x, y]);
                        out.parts.push(out.pos.len());
                    }
                    2 => line(&mut c, le, dims, &mut out)?,
                    _ => {
                        rings(&mut c, le, dims, &mut out)?;
                        out.groups.push(out.parts.len());
                    }
                }
            }
            out.height = kind as u8 - 2;
        }
        k => return Err(not_read(k)),
    }
    ends_here(&c, kind)?;
    if out.pos.is_empty() {
        return Ok(None);
    }
    Ok(Some((name(kind), out)))
}

/// Checks the blob's `GP` header and returns a cursor after it; `None` when flagged empty.
fn header(blob: &[u8]) -> Result<Option<Cursor<'_>>, String> {
    if blob.len() < 8 || &blob[..2] != b"GP" {
        return Err("not a GeoPackage geometry (no \"GP\" header)".into());
    }
    let flags = blob[3];
    if flags & 0b0010_0000 != 0 {
        return Err("an extended GeoPackage geometry type, which reknit does not read".into());
    }
    let envelope = match (flags >> 1) & 0b111 {
        0 => 0,
        1 => 32,
        2 | 3 => 48,
        4 => 64,
        e => return Err(format!("envelope code {e} is not one of 0 to 4")),
    };
    if flags & 0b0001_0000 != 0 {
        return Ok(None);
    }
    if 8 + envelope > blob.len() {
        return Err("the header's envelope runs past the end of the geometry".into());
    }
    Ok(Some(Cursor {
        b: blob,
        at: 8 + envelope,
    }))
}

fn point(c: &mut Cursor, le: bool, dims: usize) -> Result<(f64, f64), String> {
    let x = c.f64(le)?;
    let y = c.f64(le)?;
    for _ in 2..dims {
        c.f64(le)?;
    }
    Ok((x, y))
}

/// Reads a polygon's rings (after its type code), each as a part.
fn rings(c: &mut Cursor, le: bool, dims: usize, out: &mut Coords) -> Result<(), String> {
    let n = c.u32(le)? as usize;
    // Each ring takes at least its 4-byte count: a count beyond the bytes left is refused.
    if n.saturating_mul(4) > c.b.len() - c.at {
        return Err(format!(
            "a polygon declares {n} rings, more than the geometry's {} bytes hold",
            c.b.len()
        ));
    }
    for _ in 0..n {
        line(c, le, dims, out)?;
    }
    Ok(())
}

/// The base type (1 to 7) and the number of ordinates of a WKB type code (ISO: +1000 Z, +2000 M,
/// +3000 ZM).
fn kind_of(code: u32) -> Result<(u32, usize), String> {
    let kind = code % 1000;
    let dims = match code / 1000 {
        0 => 2,
        1 | 2 => 3,
        3 => 4,
        _ => return Err(format!("geometry type code {code} is not a WKB type")),
    };
    if !(1..=17).contains(&kind) {
        return Err(format!("geometry type code {code} is not a WKB type"));
    }
    Ok((kind, dims))
}

/// The WKB name of a base type code (ISO 19125-1 and ISO/IEC 13249-3: 8 to 17 are curves,
/// surfaces and triangles).
fn name(kind: u32) -> &'static str {
    match kind {
        1 => "Point",
        2 => "LineString",
        3 => "Polygon",
        4 => "MultiPoint",
        5 => "MultiLineString",
        6 => "MultiPolygon",
        7 => "GeometryCollection",
        8 => "CircularString",
        9 => "CompoundCurve",
        10 => "CurvePolygon",
        11 => "MultiCurve",
        12 => "MultiSurface",
        13 => "Curve",
        14 => "Surface",
        15 => "PolyhedralSurface",
        16 => "TIN",
        _ => "Triangle",
    }
}

/// Why a geometry of a type reknit does not read is refused, with what to do about it.
fn not_read(kind: u32) -> String {
    if kind >= 8 {
        format!(
            "a {} (WKB type {kind}), which reknit does not read: convert it to straight-segment \
             lines or polygons in a GIS (linearise the curves) and give the layer again",
            name(kind)
        )
    } else {
        format!("a {}, which reknit does not read here", name(kind))
    }
}

/// Refuses bytes left after the geometry: a blob holds one geometry and nothing else (GeoPackage
/// 1.3, §2.1.3), so more bytes mean a damaged blob or a count written wrong.
fn ends_here(c: &Cursor, kind: u32) -> Result<(), String> {
    let left = c.b.len() - c.at;
    if left > 0 {
        return Err(format!(
            "{left} byte(s) follow the end of the {} in a geometry of {} bytes: the blob is \
             damaged or its counts are wrong",
            name(kind),
            c.b.len()
        ));
    }
    Ok(())
}

/// Reads one line's points (after its type code) as a new part; a line with no points adds none.
fn line(c: &mut Cursor, le: bool, dims: usize, out: &mut Coords) -> Result<(), String> {
    let n = c.u32(le)? as usize;
    // Each point takes 8 bytes per ordinate: a count beyond the bytes left is refused before any
    // room is made for it.
    if n.saturating_mul(8 * dims) > c.b.len() - c.at {
        return Err(format!(
            "a line declares {n} points, more than the geometry's {} bytes hold",
            c.b.len()
        ));
    }
    if n == 0 {
        return Ok(());
    }
    for _ in 0..n {
        let x = c.f64(le)?;
        let y = c.f64(le)?;
        for _ in 2..dims {
            c.f64(le)?;
        }
        out.pos.push([x, y]);
    }
    out.parts.push(out.pos.len());
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn blob(wkb: &[u8]) -> Vec<u8> {
        // Header: "GP", version 0, flags 0b1 (little endian, no envelope), srs_id 4326.
        let mut b = b"GP\x00\x01".to_vec();
        b.extend_from_slice(&4326i32.to_le_bytes());
        b.extend_from_slice(wkb);
        b
    }

    fn linestring(le: bool, code: u32, pts: &[[f64; 3]], dims: usize) -> Vec<u8> {
        let mut w = vec![le as u8];
        let u = |x: u32| if le { x.to_le_bytes() } else { x.to_be_bytes() };
        let f = |x: f64| if le { x.to_le_bytes() } else { x.to_be_bytes() };
        w.extend_from_slice(&u(code));
        w.extend_from_slice(&u(pts.len() as u32));
        for p in pts {
            for v in &p[..dims] {
                w.extend_from_slice(&f(*v));
            }
        }
        w
    }

    #[test]
    fn lines_in_both_byte_orders_and_with_z() {
        // WKB layout from ISO 19125-1 §8.2 (from memory): order byte, type u32, count u32, doubles.
        let pts = [[1.0, 2.0, 9.0], [3.0, 4.0, 9.0]];
        for (le, code, dims) in [
            (true, 2, 2),
            (false, 2, 2),
            (true, 1002, 3),
            (true, 3002, 4),
        ] {
            let pts4: Vec<[f64; 3]> = pts.to_vec();
            let mut w = linestring(le, code, &pts4, dims.min(3));
            if dims == 4 {
                // ZM: a fourth ordinate per point.
                w = vec![1];
                w.extend_from_slice(&3002u32.to_le_bytes());
                w.extend_from_slice(&2u32.to_le_bytes());
                for p in pts {
                    for v in [p[0], p[1], 9.0, 7.0] {
                        w.extend_from_slice(&v.to_le_bytes());
                    }
                }
            }
            let Decoded::Lines(c) = decode(&blob(&w)).unwrap() else {
                panic!("{code}")
            };
            assert_eq!(c.pos, vec![[1.0, 2.0], [3.0, 4.0]], "{code}");
        }
        let mut multi = vec![1];
        multi.extend_from_slice(&5u32.to_le_bytes());
        multi.extend_from_slice(&2u32.to_le_bytes());
        multi.extend(linestring(true, 2, &pts, 2));
        multi.extend(linestring(false, 2, &pts, 2));
        let Decoded::Lines(c) = decode(&blob(&multi)).unwrap() else {
            panic!()
        };
        assert_eq!(c.parts, vec![2, 4]);
    }

    #[test]
    fn points_and_polygons_in_geojson_layout() {
        // WKB Polygon: order, type 3, ring count, then each ring's count and points (ISO 19125-1
        // §8.2.7, from memory).
        let ring = [[0.0f64, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 0.0]];
        let mut poly = vec![1u8];
        poly.extend_from_slice(&3u32.to_le_bytes());
        poly.extend_from_slice(&2u32.to_le_bytes());
        for _ in 0..2 {
            poly.extend_from_slice(&4u32.to_le_bytes());
            for p in ring {
                poly.extend_from_slice(&p[0].to_le_bytes());
                poly.extend_from_slice(&p[1].to_le_bytes());
            }
        }
        let (kind, c) = decode_feature(&blob(&poly)).unwrap().unwrap();
        assert_eq!((kind, c.height), ("Polygon", 3));
        assert_eq!((c.parts.clone(), c.groups.clone()), (vec![4, 8], vec![2]));
        let mut multi = vec![1u8];
        multi.extend_from_slice(&6u32.to_le_bytes());
        multi.extend_from_slice(&2u32.to_le_bytes());
        multi.extend_from_slice(&poly);
        multi.extend_from_slice(&poly);
        let (kind, c) = decode_feature(&blob(&multi)).unwrap().unwrap();
        assert_eq!((kind, c.height), ("MultiPolygon", 4));
        assert_eq!(c.groups, vec![2, 4]);
        let mut point = vec![0u8];
        point.extend_from_slice(&1001u32.to_be_bytes());
        for v in [5.0f64, 6.0, 7.0] {
            point.extend_from_slice(&v.to_be_bytes());
        }
        let (kind, c) = decode_feature(&blob(&point)).unwrap().unwrap();
        assert_eq!(
            (kind, c.height, c.pos.clone()),
            ("Point", 1, vec![[5.0, 6.0]])
        );
        let mut huge = vec![1u8];
        huge.extend_from_slice(&3u32.to_le_bytes());
        huge.extend_from_slice(&u32::MAX.to_le_bytes());
        assert!(
            decode_feature(&blob(&huge))
                .unwrap_err()
                .contains("declares")
        );
        assert_eq!(decode_feature(b"GP\x00\x11\x00\x00\x00\x00").unwrap(), None);
    }

    #[test]
    fn other_types_truncation_and_huge_counts() {
        let mut point = vec![1];
        point.extend_from_slice(&1u32.to_le_bytes());
        point.extend_from_slice(&[0; 16]);
        assert_eq!(decode(&blob(&point)).unwrap(), Decoded::Other("Point"));
        let w = linestring(true, 2, &[[1.0, 2.0, 0.0], [3.0, 4.0, 0.0]], 2);
        assert!(decode(&blob(&w[..w.len() - 3])).is_err());
        let mut huge = vec![1];
        huge.extend_from_slice(&2u32.to_le_bytes());
        huge.extend_from_slice(&u32::MAX.to_le_bytes());
        assert!(decode(&blob(&huge)).unwrap_err().contains("declares"));
        assert!(decode(b"XX\x00\x01\x00\x00\x00\x00").is_err());
        assert_eq!(
            decode(b"GP\x00\x11\x00\x00\x00\x00").unwrap(),
            Decoded::Empty
        );
    }

    #[test]
    fn bytes_after_the_geometry_and_curved_types_are_refused() {
        // GeoPackage 1.3 §2.1.3: the blob is the header and one WKB geometry, nothing after it.
        let mut w = linestring(true, 2, &[[1.0, 2.0, 0.0], [3.0, 4.0, 0.0]], 2);
        assert!(decode(&blob(&w)).is_ok());
        w.extend_from_slice(&[0, 0, 0]);
        let e = decode(&blob(&w)).unwrap_err();
        assert!(
            e.contains("3 byte(s) follow the end of the LineString"),
            "{e}"
        );
        let mut point = vec![1];
        point.extend_from_slice(&1u32.to_le_bytes());
        point.extend_from_slice(&1.5f64.to_le_bytes());
        point.extend_from_slice(&2.5f64.to_le_bytes());
        assert!(decode_feature(&blob(&point)).unwrap().is_some());
        point.push(7);
        assert!(
            decode_feature(&blob(&point))
                .unwrap_err()
                .contains("1 byte(s) follow")
        );
        // ISO/IEC 13249-3 type codes: 10 CurvePolygon, 9 CompoundCurve (with Z: 1009).
        for (code, what) in [
            (10u32, "CurvePolygon"),
            (1009, "CompoundCurve"),
            (17, "Triangle"),
        ] {
            let mut c = vec![1];
            c.extend_from_slice(&code.to_le_bytes());
            c.extend_from_slice(&0u32.to_le_bytes());
            for e in [
                decode_feature(&blob(&c)).unwrap_err(),
                decode(&blob(&c)).unwrap_err(),
            ] {
                assert!(e.contains(what) && e.contains("linearise"), "{e}");
            }
        }
        let mut c = vec![1];
        c.extend_from_slice(&18u32.to_le_bytes());
        assert!(decode(&blob(&c)).unwrap_err().contains("is not a WKB type"));
    }

    proptest::proptest! {
        /// Random bytes, bytes after a valid header (any flags), and random bodies after a line
        /// or multi-line type code in either byte order: decoded or refused, never a panic.
        #[test]
        fn random_bytes_never_panic(
            body in proptest::collection::vec(proptest::num::u8::ANY, 0..600),
            flags in proptest::num::u8::ANY,
            code in proptest::sample::select(vec![2u32, 5, 1002, 1005, 2002, 3005, 7, 1]),
            le in proptest::bool::ANY,
        ) {
            let _ = decode(&body);
            let mut b = b"GP\x00".to_vec();
            b.push(flags);
            b.extend_from_slice(&4326i32.to_le_bytes());
            b.extend_from_slice(&body);
            let _ = decode(&b);
            let mut w = vec![le as u8];
            w.extend_from_slice(&if le { code.to_le_bytes() } else { code.to_be_bytes() });
            w.extend_from_slice(&body);
            let _ = decode(&blob(&w));
        }
    }
}
