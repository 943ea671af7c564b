//! Streaming parse of a GeoJSON `coordinates` member of any depth into flat arrays.
//!
//! Positions land in one flat vector with offsets per line or ring, so a feature costs two or three
//! allocations however many vertices it has, and nesting deeper than any GeoJSON geometry is refused
//! before it can grow the stack.

use serde::de::{self, DeserializeSeed, SeqAccess, Visitor};
use std::fmt;

/// Deepest nesting any GeoJSON geometry uses (MultiPolygon: polygons → rings → positions → numbers).
const MAX_LEVEL: u8 = 4;

/// Positions of one geometry, flattened: `parts` ends each line or ring, `groups` ends each polygon.
#[derive(Debug, Default, Clone, PartialEq)]
pub struct Coords {
    /// Every position (first two numbers; any third or fourth is ignored).
    pub pos: Vec<[f64; 2]>,
    /// End offset into `pos` of each array of positions (line, ring).
    pub parts: Vec<usize>,
    /// End offset into `parts` of each array of arrays of positions (polygon).
    pub groups: Vec<usize>,
    /// Nesting height of the outermost array: 0 empty, 1 position, 2 line, 3 lines/rings, 4 polygons.
    pub height: u8,
}

impl Coords {
    /// Iterates the position slices of each part (line or ring) in order.
    pub fn part_slices(&self) -> impl Iterator<Item = &[[f64; 2]]> {
        let mut start = 0;
        self.parts.iter().map(move |&end| {
            let s = &self.pos[start..end];
            start = end;
            s
        })
    }
}

/// Deserialises the outermost `coordinates` array into a [`Coords`].
pub struct CoordsSeed<'a>(pub &'a mut Coords);

impl<'de> DeserializeSeed<'de> for CoordsSeed<'_> {
    type Value = ();
    fn deserialize<D: de::Deserializer<'de>>(self, d: D) -> Result<(), D::Error> {
        let out = self.0;
        out.height = d.deserialize_seq(ArrayVisitor { out, level: 1 })?;
        Ok(())
    }
}

struct ArrayVisitor<'a> {
    out: &'a mut Coords,
    level: u8,
}

enum Elem {
    Num(f64),
    Arr(u8),
}

struct ElemSeed<'a> {
    out: &'a mut Coords,
    level: u8,
}

impl<'de> DeserializeSeed<'de> for ElemSeed<'_> {
    type Value = Elem;
    fn deserialize<D: de::Deserializer<'de>>(self, d: D) -> Result<Elem, D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for ElemSeed<'_> {
    type Value = Elem;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a number or an array of coordinates")
    }
    fn visit_f64<E: de::Error>(self, v: f64) -> Result<Elem, E> {
        Ok(Elem::Num(v))
    }
    fn visit_i64<E: de::Error>(self, v: i64) -> Result<Elem, E> {
        Ok(Elem::Num(v as f64))
    }
    fn visit_u64<E: de::Error>(self, v: u64) -> Result<Elem, E> {
        Ok(Elem::Num(v as f64))
    }
    fn visit_seq<A: SeqAccess<'de>>(self, seq: A) -> Result<Elem, A::Error> {
        let h = ArrayVisitor {
            out: self.out,
            level: self.level,
        }
        .visit_seq(seq)?;
        Ok(Elem::Arr(h))
    }
}

impl<'de> Visitor<'de> for ArrayVisitor<'_> {
    type Value = u8;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("an array of coordinates")
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<u8, A::Error> {
        if self.level > MAX_LEVEL {
            return Err(de::Error::custom(
                "coordinates are nested deeper than any GeoJSON geometry allows",
            ));
        }
        let out = self.out;
        let level = self.level;
        let first = seq.next_element_seed(ElemSeed {
            out: &mut *out,
            level: level + 1,
        })?;
        match first {
            None if level == 1 => Ok(0),
            None => Err(de::Error::custom(
                "empty coordinate array inside a geometry",
            )),
            Some(Elem::Num(x)) => {
                let mut n = 1;
                let mut y = f64::NAN;
                while let Some(e) = seq.next_element_seed(ElemSeed {
                    out: &mut *out,
                    level: level + 1,
                })? {
                    match e {
                        Elem::Num(v) => {
                            if n == 1 {
                                y = v;
                            }
                            n += 1;
                        }
                        Elem::Arr(_) => {
                            return Err(de::Error::custom("a position mixes numbers and arrays"));
                        }
                    }
                }
                if n < 2 {
                    return Err(de::Error::custom(
                        "a position has fewer than 2 numbers (longitude, latitude)",
                    ));
                }
                if n > 4 {
                    return Err(de::Error::custom("a position has more than 4 numbers"));
                }
                out.pos.push([x, y]);
                Ok(1)
            }
            Some(Elem::Arr(h)) => {
                while let Some(e) = seq.next_element_seed(ElemSeed {
                    out: &mut *out,
                    level: level + 1,
                })? {
                    match e {
                        Elem::Arr(h2) if h2 == h => {}
                        _ => {
                            return Err(de::Error::custom(
                                "coordinate arrays of different depths are mixed",
                            ));
                        }
                    }
                }
                let height = h + 1;
                match height {
                    2 => out.parts.push(out.pos.len()),
                    3 => out.groups.push(out.parts.len()),
                    _ => {}
                }
                Ok(height)
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(s: &str) -> Result<Coords, String> {
        let mut c = Coords::default();
        let mut de = serde_json::Deserializer::from_str(s);
        CoordsSeed(&mut c)
            .deserialize(&mut de)
            .map_err(|e| e.to_string())?;
        Ok(c)
    }

    #[test]
    fn line_and_multiline() {
        let c = parse("[[1,2],[3,4.5,9]]").unwrap();
        assert_eq!(c.height, 2);
        assert_eq!(c.pos, vec![[1.0, 2.0], [3.0, 4.5]]);
        assert_eq!(c.parts, vec![2]);
        let m = parse("[[[0,0],[1,1]],[[2,2],[3,3],[4,4]]]").unwrap();
        assert_eq!(m.height, 3);
        assert_eq!(m.parts, vec![2, 5]);
        assert_eq!(m.groups, vec![2]);
        let parts: Vec<usize> = m.part_slices().map(|s| s.len()).collect();
        assert_eq!(parts, vec![2, 3]);
    }

    #[test]
    fn empty_and_point() {
        assert_eq!(parse("[]").unwrap().height, 0);
        assert_eq!(parse("[5, 6]").unwrap().height, 1);
    }

    #[test]
    fn rejects_malformed() {
        assert!(parse("[[1]]").unwrap_err().contains("fewer than 2"));
        assert!(parse("[[1,2],[[3,4]]]").unwrap_err().contains("mix"));
        assert!(parse("[[1,2],[]]").unwrap_err().contains("empty"));
        assert!(parse("[[[[[[1,2]]]]]]").unwrap_err().contains("deeper"));
        assert!(parse("[[1,\"a\"]]").is_err());
        // Deep nesting is refused without recursing far.
        let deep = format!("{}{}", "[".repeat(100_000), "]".repeat(100_000));
        assert!(parse(&deep).is_err());
    }
}
