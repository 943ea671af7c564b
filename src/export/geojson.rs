//! Streaming GeoJSON writer (RFC 7946: WGS84 lon/lat, no `crs` member, at most 7 decimals).

use crate::decimal::{push_decimal, push_digits};
use rayon::prelude::*;
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
        push_line_geometry(&mut self.buf, coords);
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
        push_feature_start(&mut self.buf, props);
    }

    fn flush_feature(&mut self) -> io::Result<()> {
        self.w.write_all(self.buf.as_bytes())
    }
}

/// Features per block that one thread formats; blocks are written in order.
const BLOCK: usize = 2048;

/// One feature's text, made on any thread for [`GeoJsonWriter::features_in_parallel`].
pub struct FeatureText<'b> {
    buf: &'b mut String,
}

impl FeatureText<'_> {
    /// Adds a LineString feature, as [`GeoJsonWriter::line`] writes it.
    pub fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) {
        self.buf.push_str(",\n");
        push_feature_start(self.buf, props);
        push_line_geometry(self.buf, coords);
    }
}

impl<W: Write + Send> GeoJsonWriter<W> {
    /// Writes the features `make` adds for each of `0..n`, in that order, formatting blocks of
    /// them on every thread while the previous blocks are written: the bytes are exactly those of
    /// writing them one by one, whatever the thread count. `make` also gets a scratch string of
    /// its thread (for text a property borrows).
    pub fn features_in_parallel<F>(&mut self, n: usize, make: F) -> io::Result<()>
    where
        F: Fn(usize, &mut FeatureText, &mut String) + Sync,
    {
        let blocks = 2 * rayon::current_num_threads().max(1);
        let fill = |bufs: &mut [(String, String)], from: usize| {
            bufs.par_iter_mut()
                .enumerate()
                .for_each(|(k, (buf, scratch))| {
                    buf.clear();
                    let lo = (from + k * BLOCK).min(n);
                    let mut t = FeatureText { buf };
                    for i in lo..(lo + BLOCK).min(n) {
                        make(i, &mut t, scratch);
                    }
                });
        };
        let mut ready = vec![(String::new(), String::new()); blocks];
        let mut spare = ready.clone();
        let mut from = 0;
        fill(&mut ready, from);
        loop {
            from += blocks * BLOCK;
            if from >= n {
                return self.write_blocks(&ready);
            }
            let (written, ()) =
                rayon::join(|| self.write_blocks(&ready), || fill(&mut spare, from));
            written?;
            std::mem::swap(&mut ready, &mut spare);
        }
    }

    /// Writes formatted blocks (each feature led by `,\n`), dropping the separator before the
    /// collection's first feature.
    fn write_blocks(&mut self, bufs: &[(String, String)]) -> io::Result<()> {
        for (buf, _) in bufs {
            let mut bytes = buf.as_bytes();
            if self.first && !bytes.is_empty() {
                bytes = &bytes[2..];
                self.first = false;
            }
            self.w.write_all(bytes)?;
        }
        Ok(())
    }
}

/// A feature's opening and its properties, up to the geometry.
fn push_feature_start(buf: &mut String, props: &[(&str, Prop)]) {
    buf.push_str("{\"type\":\"Feature\",\"properties\":{");
    for (i, (k, v)) in props.iter().enumerate() {
        if i > 0 {
            buf.push(',');
        }
        push_json_str(buf, k);
        buf.push(':');
        push_prop(buf, v);
    }
    buf.push_str("},");
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

/// The `geometry` member of a line and the feature's closing braces; no allocation unless the line
/// crosses the ±180° meridian.
fn push_line_geometry(buf: &mut String, coords: &[[f64; 2]]) {
    let crosses = coords.windows(2).any(|w| (w[1][0] - w[0][0]).abs() > 180.0);
    let parts = if crosses {
        crate::ingest::wrap::split_at_antimeridian(coords)
    } else {
        Vec::new()
    };
    buf.push_str("\"geometry\":{\"type\":\"");
    if parts.len() > 1 {
        buf.push_str("MultiLineString\",\"coordinates\":[");
        for (k, line) in parts.iter().enumerate() {
            if k > 0 {
                buf.push(',');
            }
            push_positions(buf, line);
        }
        buf.push(']');
    } else {
        buf.push_str("LineString\",\"coordinates\":");
        push_positions(buf, parts.first().map_or(coords, Vec::as_slice));
    }
    buf.push_str("}}");
}

/// A JSON array of positions.
fn push_positions(buf: &mut String, line: &[[f64; 2]]) {
    buf.push('[');
    for (i, c) in line.iter().enumerate() {
        if i > 0 {
            buf.push(',');
        }
        push_position(buf, *c);
    }
    buf.push(']');
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

    /// Lines of several shapes and properties, some crossing ±180° and some skipped, written
    /// one by one and in parallel blocks under 1, 2 and 3 threads: the bytes must be the same.
    #[test]
    fn parallel_blocks_write_the_same_bytes_whatever_the_thread_count() {
        let n = 3 * BLOCK * 4 + 17; // several rounds of blocks, the last one partial
        let coords = |i: usize| -> Vec<[f64; 2]> {
            let x = if i.is_multiple_of(97) {
                179.9
            } else {
                (i as f64) * 1e-4 - 50.0
            };
            (0..2 + i % 5)
                .map(|k| [x + k as f64 * 0.0013, 45.0 - (i * k) as f64 * 1e-7])
                .collect()
        };
        fn props(i: usize, key: &str) -> [(&'static str, Prop<'_>); 3] {
            [
                ("i", Prop::Int(i as i64 - 5)),
                ("x", Prop::Num7(i as f64 / 7.0)),
                ("k", Prop::Str(key)),
            ]
        }
        let mut one = GeoJsonWriter::layer(Vec::new(), Some("test")).unwrap();
        for i in (0..n).filter(|i| i % 11 != 3) {
            let key = format!("WO-{i}");
            one.line(&props(i, &key), &coords(i)).unwrap();
        }
        let one = one.finish().unwrap();
        for threads in [1, 2, 3] {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            let par = pool.install(|| {
                let mut w = GeoJsonWriter::layer(Vec::new(), Some("test")).unwrap();
                w.features_in_parallel(n, |i, out, key| {
                    if i % 11 != 3 {
                        key.clear();
                        key.push_str(&format!("WO-{i}"));
                        out.line(&props(i, key), &coords(i));
                    }
                })
                .unwrap();
                w.finish().unwrap()
            });
            assert!(par == one, "{threads} threads");
        }
        let v: Value = serde_json::from_slice(&one).unwrap();
        assert_eq!(v["features"].as_array().unwrap().len(), n - n.div_ceil(11));
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
