//! The one interface every map layer is written through ([`LayerSink`]), with the GeoJSON writer
//! and the GeoPackage writer behind it, and the output format that chooses between them.
//!
//! A layer is declared once ([`LayerSpec`]: its name, geometry and typed fields) and then filled
//! feature by feature. GeoJSON needs no declaration (each feature carries its own properties);
//! a GeoPackage table does, so the spec is what both formats agree on: the same layer names and
//! the same field names.

use super::geojson::{GeoJsonWriter, Prop};
use std::io::{self, Write};

/// Receives the features of one layer.
pub trait LayerSink {
    /// One LineString feature (lon/lat).
    fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) -> io::Result<()>;
    /// One Point feature (lon/lat).
    fn point(&mut self, props: &[(&str, Prop)], c: [f64; 2]) -> io::Result<()>;

    /// The LineString features `make` gives for each of `0..n`, in that order; `make` also gets
    /// a scratch string for text a property borrows. A sink may format them on several threads
    /// (the bytes are those of one by one); by default they go through [`LayerSink::line`].
    fn lines_each(&mut self, n: usize, make: &LineMaker) -> io::Result<()> {
        let mut seq = OneByOne {
            sink: self,
            failed: None,
        };
        let mut scratch = String::new();
        for i in 0..n {
            make(i, &mut seq, &mut scratch);
            if let Some(e) = seq.failed.take() {
                return Err(e);
            }
        }
        Ok(())
    }
}

/// What [`LayerSink::lines_each`] calls for each feature.
pub type LineMaker<'m> = dyn Fn(usize, &mut dyn LineOut, &mut String) + Sync + 'm;

/// Takes the LineString features made for [`LayerSink::lines_each`].
pub trait LineOut {
    /// One LineString feature (lon/lat).
    fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]);
}

/// Passes features to a sink one by one, keeping the first error.
struct OneByOne<'s, S: ?Sized> {
    sink: &'s mut S,
    failed: Option<io::Error>,
}

impl<S: LayerSink + ?Sized> LineOut for OneByOne<'_, S> {
    fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) {
        if self.failed.is_none()
            && let Err(e) = self.sink.line(props, coords)
        {
            self.failed = Some(e);
        }
    }
}

impl LineOut for super::geojson::FeatureText<'_> {
    fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) {
        super::geojson::FeatureText::line(self, props, coords)
    }
}

impl<W: Write + Send> LayerSink for GeoJsonWriter<W> {
    fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) -> io::Result<()> {
        GeoJsonWriter::line(self, props, coords)
    }

    fn point(&mut self, props: &[(&str, Prop)], c: [f64; 2]) -> io::Result<()> {
        GeoJsonWriter::point(self, props, c)
    }

    fn lines_each(&mut self, n: usize, make: &LineMaker) -> io::Result<()> {
        self.features_in_parallel(n, |i, out, scratch| make(i, out, scratch))
    }
}

/// What a field holds, for formats with typed columns.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FieldKind {
    /// Whole numbers.
    Integer,
    /// Numbers.
    Real,
    /// Text (also any input value of mixed or nested type, as its JSON text).
    Text,
    /// True or false.
    Boolean,
}

/// The geometry a layer holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GeomKind {
    /// Lines.
    Line,
    /// Points.
    Point,
    /// Lines and points together (the changes layer).
    Mixed,
}

/// One field of a layer.
#[derive(Debug, Clone, PartialEq)]
pub struct Field {
    /// Its name, as in the GeoJSON properties.
    pub name: String,
    /// What it holds.
    pub kind: FieldKind,
}

/// A layer's name, geometry and fields, in the order the features give them.
#[derive(Debug, Clone)]
pub struct LayerSpec {
    /// The layer's name: the GeoJSON file's stem and the GeoPackage table's name.
    pub name: &'static str,
    /// Its geometry.
    pub geometry: GeomKind,
    /// Its fields.
    pub fields: Vec<Field>,
}

impl LayerSpec {
    /// A spec from `(name, kind)` pairs.
    pub fn new(name: &'static str, geometry: GeomKind, fields: &[(&str, FieldKind)]) -> Self {
        LayerSpec {
            name,
            geometry,
            fields: fields
                .iter()
                .map(|&(n, kind)| Field {
                    name: n.to_string(),
                    kind,
                })
                .collect(),
        }
    }

    /// The GeoJSON file this layer is written to.
    pub fn file_name(&self) -> String {
        format!("{}.geojson", self.name)
    }
}

/// The kind of field that holds every one of `values` (JSON values from an input): booleans,
/// whole numbers, numbers or text; anything else, or a mix, is kept as text.
pub fn kind_of_values<'a>(values: impl IntoIterator<Item = &'a serde_json::Value>) -> FieldKind {
    use serde_json::Value;
    let mut kind: Option<FieldKind> = None;
    for v in values {
        let k = match v {
            Value::Null => continue,
            Value::Bool(_) => FieldKind::Boolean,
            Value::Number(n) if n.is_i64() => FieldKind::Integer,
            Value::Number(_) => FieldKind::Real,
            _ => FieldKind::Text,
        };
        kind = Some(match (kind, k) {
            (None, k) => k,
            (Some(a), b) if a == b => a,
            (Some(FieldKind::Integer), FieldKind::Real)
            | (Some(FieldKind::Real), FieldKind::Integer) => FieldKind::Real,
            _ => return FieldKind::Text,
        });
    }
    kind.unwrap_or(FieldKind::Text)
}

/// The format of the map layers (`--output-format`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum OutputFormat {
    /// One RFC 7946 GeoJSON file per layer.
    #[default]
    GeoJson,
    /// Every layer in one GeoPackage, `layers.gpkg`.
    GeoPackage,
}

impl OutputFormat {
    /// Every format, in the order `--help` lists them.
    pub const ALL: [OutputFormat; 2] = [OutputFormat::GeoJson, OutputFormat::GeoPackage];

    /// The name given to `--output-format` and recorded in `summary.json`.
    pub fn name(self) -> &'static str {
        match self {
            OutputFormat::GeoJson => "geojson",
            OutputFormat::GeoPackage => "gpkg",
        }
    }

    /// The format of that name.
    pub fn from_name(name: &str) -> Option<OutputFormat> {
        Self::ALL.into_iter().find(|f| f.name() == name)
    }
}

/// The one GeoPackage file that holds every layer with `--output-format gpkg`.
pub const GPKG_FILE: &str = "layers.gpkg";

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn input_values_get_the_narrowest_kind_that_holds_them_all() {
        let k = |v: serde_json::Value| kind_of_values(v.as_array().unwrap());
        assert_eq!(k(json!([1, null, 2])), FieldKind::Integer);
        assert_eq!(k(json!([1, 2.5])), FieldKind::Real);
        assert_eq!(k(json!([true, false])), FieldKind::Boolean);
        assert_eq!(k(json!(["a", 1])), FieldKind::Text);
        assert_eq!(k(json!([true, 1])), FieldKind::Text);
        assert_eq!(k(json!([{"a": 1}])), FieldKind::Text);
        assert_eq!(k(json!([null])), FieldKind::Text);
        for f in OutputFormat::ALL {
            assert_eq!(OutputFormat::from_name(f.name()), Some(f));
        }
    }
}
