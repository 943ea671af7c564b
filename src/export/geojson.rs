//! Streaming GeoJSON writer (RFC 7946: WGS84 lon/lat, no `crs` member, at most 7 decimals).

use crate::decimal::{push_decimal, push_digits};
use serde_json::Value;
use std::io::{self, Write};

/// One property value; numbers with a fixed number of decimals print identically on every machine.
#[derive(Debug, Clone)]
pub enum Prop<'a> {
    /// JSON null.
    Null,
    /// An integer.
    Int(i64),
    /// A number printed with 3 decimals (metres, repair-metres).
    Fixed3(f64),
    /// A number printed with up to 6 decimals, trailing zeros trimmed.
    Num(f64),
    /// A coordinate printed with up to 7 decimals, trailing zeros trimmed.
    Num7(f64),
    /// A string.
    Str(&'a str),
    /// A boolean.
    Bool(bool),
    /// Any JSON value, as given.
    Json(&'a Value),
}

/// Writes a FeatureCollection one feature per line.
pub struct GeoJsonWriter<W: Write> {
    w: W,
    first: bool,
    buf: String,
}

impl<W: Write> GeoJsonWriter<W> {
    /// Starts a plain collection (no foreign members): for layers made as inputs, such as the
    /// synthetic road layers.
    pub fn new(mut w: W) -> io::Result<Self> {
        w.write_all(b"{\"type\":\"FeatureCollection\",\"features\":[\n")?;
        Ok(GeoJsonWriter {
            w,
            first: true,
            buf: String::with_capacity(4096),
        })
    }

    /// Starts an output layer: the collection carries the cautions ([`crate::cautions::CAUTIONS`])
    /// as a top-level `cautions` member and, when the data asks for one, an `attribution` member,
    /// so a layer passed on alone still carries them. RFC 7946 §6.1 allows such foreign members.
    pub fn layer(mut w: W, attribution: Option<&str>) -> io::Result<Self> {
        let mut head = String::from("{\"type\":\"FeatureCollection\",\"cautions\":[");
        for (i, c) in crate::cautions::CAUTIONS.iter().enumerate() {
            if i > 0 {
                head.push(',');
            }
            push_json_str(&mut head, c);
        }
        head.push(']');
        if let Some(a) = attribution {
            head.push_str(",\"attribution\":");
            push_json_str(&mut head, a);
        }
        head.push_str(",\"features\":[\n");
        w.write_all(head.as_bytes())?;
        Ok(GeoJsonWriter {
            w,
            first: true,
            buf: String::with_capacity(4096),
        })
    }

    /// Writes a LineString feature; a line crossing the ±180° meridian is written as a
    /// MultiLineString split there, as RFC 7946 §3.1.9 recommends.
    pub fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) -> io::Result<()> {
        self.start(props);
        let crosses = coords.windows(2).any(|w| (w[1][0] - w[0][0]).abs() > 180.0);
        let parts = if crosses {
            crate::ingest::wrap::split_at_antimeridian(coords)
        } else {
            Vec::new()
        };
        let lines: Vec<&[[f64; 2]]> = if parts.len() > 1 {
            parts.iter().map(Vec::as_slice).collect()
        } else if let Some(p) = parts.first() {
            vec![p.as_slice()]
        } else {
            vec![coords]
        };
        let kind = if lines.len() > 1 {
            "MultiLineString"
        } else {
            "LineString"
        };
        self.buf.push_str("\"geometry\":{\"type\":\"");
        self.buf.push_str(kind);
        self.buf.push_str("\",\"coordinates\":");
        if lines.len() > 1 {
            self.buf.push('[');
        }
        for (k, line) in lines.iter().enumerate() {
            if k > 0 {
                self.buf.push(',');
            }
            self.buf.push('[');
            for (i, c) in line.iter().enumerate() {
                if i > 0 {
                    self.buf.push(',');
                }
                push_position(&mut self.buf, *c);
            }
            self.buf.push(']');
        }
        if lines.len() > 1 {
            self.buf.push(']');
        }
        self.buf.push_str("}}");
        self.flush_feature()
    }

    /// Writes a Point feature.
    pub fn point(&mut self, props: &[(&str, Prop)], c: [f64; 2]) -> io::Result<()> {
        self.start(props);
        self.buf
            .push_str("\"geometry\":{\"type\":\"Point\",\"coordinates\":");
        push_position(&mut self.buf, c);
        self.buf.push_str("}}");
        self.flush_feature()
    }

    /// Writes a Polygon feature (outer ring first).
    pub fn polygon(&mut self, props: &[(&str, Prop)], rings: &[&[[f64; 2]]]) -> io::Result<()> {
        self.start(props);
        self.buf
            .push_str("\"geometry\":{\"type\":\"Polygon\",\"coordinates\":[");
        for (r, ring) in rings.iter().enumerate() {
            if r > 0 {
                self.buf.push(',');
            }
            self.buf.push('[');
            for (i, c) in ring.iter().enumerate() {
                if i > 0 {
                    self.buf.push(',');
                }
                push_position(&mut self.buf, *c);
            }
            self.buf.push(']');
        }
        self.buf.push_str("]}}");
        self.flush_feature()
    }

    /// Closes the collection and returns the inner writer.
    pub fn finish(mut self) -> io::Result<W> {
        self.w.write_all(b"\n]}\n")?;
        Ok(self.w)
    }

    fn start(&mut self, props: &[(&str, Prop)]) {
        self.buf.clear();
        if !self.first {
            self.buf.push_str(",\n");
        }
        self.first = false;
        self.buf.push_str("{\"type\":\"Feature\",\"properties\":{");
        for (i, (k, v)) in props.iter().enumerate() {
            if i > 0 {
                self.buf.push(',');
            }
            push_json_str(&mut self.buf, k);
            self.buf.push(':');
            push_prop(&mut self.buf, v);
        }
        self.buf.push_str("},");
    }

    fn flush_feature(&mut self) -> io::Result<()> {
        self.w.write_all(self.buf.as_bytes())
    }
}

fn push_prop(buf: &mut String, v: &Prop) {
    use std::fmt::Write as _;
    match v {
        Prop::Null => buf.push_str("null"),
        Prop::Int(i) => {
            if *i < 0 {
                buf.push('-');
            }
            push_digits(buf, i.unsigned_abs(), 1);
        }
        Prop::Fixed3(x) => push_decimal(buf, *x, 3, false),
        Prop::Num(x) => push_decimal(buf, *x, 6, true),
        Prop::Num7(x) => push_decimal(buf, *x, 7, true),
        Prop::Str(s) => push_json_str(buf, s),
        Prop::Bool(b) => buf.push_str(if *b { "true" } else { "false" }),
        Prop::Json(Value::String(s)) => push_json_str(buf, s),
        Prop::Json(Value::Number(n)) => {
            let _ = write!(buf, "{n}");
        }
        Prop::Json(v) => buf.push_str(&v.to_string()),
    }
}

fn push_json_str(buf: &mut String, s: &str) {
    if s.bytes().all(|b| b >= 0x20 && b != b'"' && b != b'\\') {
        buf.push('"');
        buf.push_str(s);
        buf.push('"');
    } else {
        buf.push_str(&Value::from(s).to_string());
    }
}

fn push_position(buf: &mut String, c: [f64; 2]) {
    buf.push('[');
    push_decimal(buf, c[0], 7, true);
    buf.push(',');
    push_decimal(buf, c[1], 7, true);
    buf.push(']');
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ingest::wrap::split_at_antimeridian;

    #[test]
    fn lines_across_the_antimeridian_are_split_there() {
        // RFC 7946 §3.1.9: a line from 170°E to 170°W is two parts meeting at ±180°.
        let parts = split_at_antimeridian(&[[170.0, 45.0], [-170.0, 55.0]]);
        assert_eq!(
            parts,
            vec![
                vec![[170.0, 45.0], [180.0, 50.0]],
                vec![[-180.0, 50.0], [-170.0, 55.0]]
            ]
        );
        let on = split_at_antimeridian(&[[180.0, 1.0], [-179.0, 1.0]]);
        assert_eq!(on, vec![vec![[-180.0, 1.0], [-179.0, 1.0]]]);
    }

    #[test]
    fn writes_valid_collection() {
        let mut w = GeoJsonWriter::new(Vec::new()).unwrap();
        w.line(
            &[
                ("a", Prop::Int(1)),
                ("b", Prop::Str("x\"y")),
                ("c", Prop::Fixed3(1.0)),
            ],
            &[[0.0, 0.0], [1.0, 1.0]],
        )
        .unwrap();
        w.point(&[("n", Prop::Null)], [5.0, 6.0]).unwrap();
        let out = String::from_utf8(w.finish().unwrap()).unwrap();
        let v: Value = serde_json::from_str(&out).unwrap();
        assert_eq!(v["features"].as_array().unwrap().len(), 2);
        assert_eq!(v["features"][0]["properties"]["b"], "x\"y");
        // The geojson crate, an independent reader, accepts it too.
        let gj: geojson::GeoJson = out.parse().unwrap();
        assert!(matches!(gj, geojson::GeoJson::FeatureCollection(_)));
    }
}
