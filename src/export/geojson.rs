//! Streaming GeoJSON writer (RFC 7946: WGS84 lon/lat, no `crs` member, at most 7 decimals).

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
    /// A number printed with up to 6 significant decimals, trailing zeros trimmed.
    Num(f64),
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
    /// Starts the collection.
    pub fn new(mut w: W) -> io::Result<Self> {
        w.write_all(b"{\"type\":\"FeatureCollection\",\"features\":[\n")?;
        Ok(GeoJsonWriter {
            w,
            first: true,
            buf: String::with_capacity(4096),
        })
    }

    /// Writes a LineString feature.
    pub fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) -> io::Result<()> {
        self.start(props);
        self.buf
            .push_str("\"geometry\":{\"type\":\"LineString\",\"coordinates\":[");
        for (i, c) in coords.iter().enumerate() {
            if i > 0 {
                self.buf.push(',');
            }
            push_position(&mut self.buf, *c);
        }
        self.buf.push_str("]}}");
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
            let _ = write!(buf, "{i}");
        }
        Prop::Fixed3(x) if x.is_finite() => buf.push_str(&fixed(*x, 3)),
        Prop::Num(x) if x.is_finite() => buf.push_str(&trimmed(*x, 6)),
        Prop::Fixed3(_) | Prop::Num(_) => buf.push_str("null"),
        Prop::Str(s) => push_json_str(buf, s),
        Prop::Bool(b) => buf.push_str(if *b { "true" } else { "false" }),
        Prop::Json(v) => buf.push_str(&v.to_string()),
    }
}

fn push_json_str(buf: &mut String, s: &str) {
    buf.push_str(&Value::from(s).to_string());
}

fn push_position(buf: &mut String, c: [f64; 2]) {
    buf.push('[');
    buf.push_str(&trimmed(c[0], 7));
    buf.push(',');
    buf.push_str(&trimmed(c[1], 7));
    buf.push(']');
}

/// `x` with exactly `decimals` decimals; negative zero prints as zero.
pub fn fixed(x: f64, decimals: usize) -> String {
    let s = format!("{:.*}", decimals, x);
    if s.starts_with('-') && s[1..].bytes().all(|b| b == b'0' || b == b'.') {
        s[1..].to_string()
    } else {
        s
    }
}

/// `x` rounded to `decimals` decimals with trailing zeros (and a bare point) removed.
pub fn trimmed(x: f64, decimals: usize) -> String {
    let mut s = fixed(x, decimals);
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formats_numbers() {
        assert_eq!(trimmed(1.5, 7), "1.5");
        assert_eq!(trimmed(-0.00000001, 7), "0");
        assert_eq!(trimmed(9.123456789, 7), "9.1234568");
        assert_eq!(trimmed(10.0, 7), "10");
        assert_eq!(fixed(2.0, 3), "2.000");
        assert_eq!(fixed(-0.0001, 3), "0.000");
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
