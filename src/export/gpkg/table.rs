//! One feature table of the GeoPackage, filled through [`LayerSink`]: each feature's properties
//! go into the columns of the same name, its geometry into `geom` (GeoPackage Binary), and its
//! envelope into the layer's R-tree, row by row.

use super::geom::{self, Envelope};
use super::{quote, sql};
use crate::export::geojson::Prop;
use crate::export::sink::{Field, FieldKind, LayerSink};
use rusqlite::Statement;
use rusqlite::types::Null;
use serde_json::Value;
use std::io;

/// The geometry kinds met while filling a table.
#[derive(Debug, Default, Clone, Copy)]
pub struct Seen {
    /// Points.
    pub point: bool,
    /// Single lines.
    pub line: bool,
    /// Lines split at the antimeridian (MultiLineString).
    pub multi: bool,
}

/// SQL column names for the fields: SQLite compares names without regard to ASCII case, so a
/// name equal, in that sense, to an earlier one (or to `fid` or `geom`) gets the first free
/// suffix `_2`, `_3`, …; an empty name becomes `field`, a NUL character U+FFFD.
pub fn column_names(fields: &[Field]) -> Vec<String> {
    let mut used: Vec<String> = vec!["fid".into(), "geom".into()];
    let mut out = Vec::with_capacity(fields.len());
    for f in fields {
        let base = match f.name.is_empty() {
            true => "field".to_string(),
            false => f.name.replace('\0', "\u{FFFD}"),
        };
        let mut name = base.clone();
        let mut k = 2;
        while used.contains(&name.to_ascii_lowercase()) {
            name = format!("{base}_{k}");
            k += 1;
        }
        used.push(name.to_ascii_lowercase());
        out.push(name);
    }
    out
}

/// The SQL type of a field (GeoPackage 1.3 §1.1.1.1.3: BOOLEAN is stored as 0 or 1).
pub fn sql_type(k: FieldKind) -> &'static str {
    match k {
        FieldKind::Integer => "INTEGER",
        FieldKind::Real => "REAL",
        FieldKind::Text => "TEXT",
        FieldKind::Boolean => "BOOLEAN",
    }
}

/// A table being filled.
pub struct Table<'c> {
    pub(super) fields: Vec<Field>,
    pub(super) insert: Statement<'c>,
    pub(super) rtree: Statement<'c>,
    pub(super) fid: i64,
    pub(super) extent: Envelope,
    pub(super) seen: Seen,
    /// Each row's envelope, put into the R-tree by [`Table::index`].
    boxes: Vec<(i64, Envelope)>,
    slot: Vec<Option<usize>>,
    blob: Vec<u8>,
}

impl<'c> Table<'c> {
    /// Starts filling with the two prepared inserts (feature row, R-tree row).
    pub fn new(fields: Vec<Field>, insert: Statement<'c>, rtree: Statement<'c>) -> Self {
        Table {
            slot: vec![None; fields.len()],
            fields,
            insert,
            rtree,
            fid: 0,
            extent: Envelope::EMPTY,
            seen: Seen::default(),
            boxes: Vec::new(),
            blob: Vec::with_capacity(1024),
        }
    }

    /// Inserts one feature whose geometry is already in `self.blob`.
    fn row(&mut self, props: &[(&str, Prop)], env: Envelope) -> io::Result<()> {
        self.slot.iter_mut().for_each(|s| *s = None);
        for (j, (name, _)) in props.iter().enumerate() {
            // Properties come in the declared order as a rule: try that place first.
            let at = match self.fields.get(j) {
                Some(f) if f.name == *name && self.slot[j].is_none() => Some(j),
                _ => (0..self.fields.len())
                    .find(|&i| self.fields[i].name == *name && self.slot[i].is_none()),
            };
            let Some(i) = at else {
                return Err(io::Error::other(format!(
                    "internal error (a bug): property `{name}` is not a declared field"
                )));
            };
            self.slot[i] = Some(j);
        }
        self.fid += 1;
        let s = &mut self.insert;
        s.raw_bind_parameter(1, self.fid).map_err(sql)?;
        s.raw_bind_parameter(2, &self.blob[..]).map_err(sql)?;
        for (i, f) in self.fields.iter().enumerate() {
            let p = self.slot[i].map(|j| &props[j].1);
            bind(s, i + 3, f, p)?;
        }
        s.raw_execute().map_err(sql)?;
        self.boxes.push((self.fid, env));
        self.extent.join(&env);
        Ok(())
    }

    /// Fills the R-tree, the rows in the order of their centres along a Z-order curve: row by
    /// row in feature order, each insert touched pages all over the tree (three quarters of the
    /// writing time at 200,000 features, docs/benchmarks.md); neighbours one after the other
    /// keep the pages it works on in the cache. The tree holds the same boxes either way.
    pub fn index(mut self) -> io::Result<()> {
        let e = self.extent.0;
        let cell = |v: f64, lo: f64, hi: f64| {
            let t = if hi > lo { (v - lo) / (hi - lo) } else { 0.0 };
            (t.clamp(0.0, 1.0) * 65535.0) as u32
        };
        let spread = |mut v: u32| {
            v = (v | (v << 8)) & 0x00FF_00FF;
            v = (v | (v << 4)) & 0x0F0F_0F0F;
            v = (v | (v << 2)) & 0x3333_3333;
            (v | (v << 1)) & 0x5555_5555
        };
        let mut keyed: Vec<(u32, i64, Envelope)> = self
            .boxes
            .iter()
            .map(|&(fid, b)| {
                let x = cell((b.0[0] + b.0[1]) / 2.0, e[0], e[1]);
                let y = cell((b.0[2] + b.0[3]) / 2.0, e[2], e[3]);
                (spread(x) | (spread(y) << 1), fid, b)
            })
            .collect();
        keyed.sort_unstable_by_key(|k| (k.0, k.1));
        let r = &mut self.rtree;
        for (_, fid, env) in keyed {
            r.raw_bind_parameter(1, fid).map_err(sql)?;
            for (k, v) in env.0.iter().enumerate() {
                r.raw_bind_parameter(k + 2, *v).map_err(sql)?;
            }
            r.raw_execute().map_err(sql)?;
        }
        Ok(())
    }
}

/// Binds one property to parameter `i` as its field's kind asks; numbers are rounded as the
/// GeoJSON text rounds them, so both formats hold the same values.
fn bind(s: &mut Statement, i: usize, f: &Field, p: Option<&Prop>) -> io::Result<()> {
    use FieldKind::*;
    let real = |s: &mut Statement, x: f64| match x.is_finite() {
        true => s.raw_bind_parameter(i, x),
        false => s.raw_bind_parameter(i, Null),
    };
    let r = match (p, f.kind) {
        (None | Some(Prop::Null | Prop::Json(Value::Null)), _) => s.raw_bind_parameter(i, Null),
        (Some(Prop::Int(v)), Integer) => s.raw_bind_parameter(i, *v),
        (Some(Prop::Int(v)), Real) => s.raw_bind_parameter(i, *v as f64),
        (Some(Prop::Fixed3(x)), Real) => real(s, geom::round(*x, 3)),
        (Some(Prop::Num(x)), Real) => real(s, geom::round(*x, 6)),
        (Some(Prop::Num7(x)), Real) => real(s, geom::round(*x, 7)),
        (Some(Prop::Str(t)), Text) => s.raw_bind_parameter(i, *t),
        (Some(Prop::Bool(b) | Prop::Json(Value::Bool(b))), Boolean) => {
            s.raw_bind_parameter(i, *b as i64)
        }
        (Some(Prop::Json(Value::Number(n))), Integer) if n.is_i64() => {
            s.raw_bind_parameter(i, n.as_i64())
        }
        (Some(Prop::Json(Value::Number(n))), Real) => real(s, n.as_f64().unwrap_or(f64::NAN)),
        (Some(Prop::Json(Value::String(t))), Text) => s.raw_bind_parameter(i, t.as_str()),
        (Some(Prop::Json(v)), Text) => s.raw_bind_parameter(i, v.to_string()),
        (Some(p), k) => {
            return Err(io::Error::other(format!(
                "internal error (a bug): field `{}` is declared {k:?} but holds {p:?}",
                f.name
            )));
        }
    };
    r.map_err(sql)
}

impl LayerSink for Table<'_> {
    fn line(&mut self, props: &[(&str, Prop)], coords: &[[f64; 2]]) -> io::Result<()> {
        // Split where it crosses ±180°, as the GeoJSON layer is (RFC 7946 §3.1.9).
        let crosses = coords.windows(2).any(|w| (w[1][0] - w[0][0]).abs() > 180.0);
        let split = match crosses {
            true => crate::ingest::wrap::split_at_antimeridian(coords),
            false => Vec::new(),
        };
        let parts: Vec<&[[f64; 2]]> = match split.is_empty() {
            true => vec![coords],
            false => split.iter().map(Vec::as_slice).collect(),
        };
        match parts.len() > 1 {
            true => self.seen.multi = true,
            false => self.seen.line = true,
        }
        let env = geom::lines(&mut self.blob, &parts);
        self.row(props, env)
    }

    fn point(&mut self, props: &[(&str, Prop)], c: [f64; 2]) -> io::Result<()> {
        self.seen.point = true;
        let env = geom::point(&mut self.blob, c);
        self.row(props, env)
    }
}

/// The quoted column list of a feature table's `CREATE TABLE`, after `fid` and `geom`.
pub fn columns_sql(fields: &[Field], names: &[String]) -> String {
    fields
        .iter()
        .zip(names)
        .map(|(f, n)| format!(", {} {}", quote(n), sql_type(f.kind)))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_equal_but_for_case_get_a_suffix() {
        let f = |n: &str| Field {
            name: n.into(),
            kind: FieldKind::Text,
        };
        let names = column_names(&[f("name"), f("Name"), f("NAME"), f("FID"), f(""), f("a\0b")]);
        assert_eq!(
            names,
            ["name", "Name_2", "NAME_3", "FID_2", "field", "a\u{FFFD}b"]
        );
    }
}
