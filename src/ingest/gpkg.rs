//! GeoPackage road layers (OGC GeoPackage Encoding Standard 1.3): an SQLite file whose
//! `gpkg_geometry_columns` names each layer's table and geometry column, and whose
//! `gpkg_spatial_ref_sys` gives each layer's CRS.
//!
//! The file is opened read-only and immutable (no lock, journal or index is written beside it).
//! A file with several layers needs `--roads-layer NAME`; the message lists them. The CRS comes
//! from the layer's `srs_id`: an EPSG code through the project's CRS table, else the stored WKT
//! definition; the undefined systems (`srs_id` 0 and -1) leave it to `--crs` (WGS84 without).
//! Attributes are the table's other columns: integers and reals as numbers, text as written.

use super::IngestError;
use super::crs::Crs;
use super::geojson::RawFeature;
use super::kind::LayerKind;
use super::reader::{DeclaredFields, FeatureSource, SourceInfo};
use super::source::Source;
use super::wkb::{Decoded, decode};
use rusqlite::types::ValueRef;
use rusqlite::{Connection, OpenFlags};
use serde_json::Value;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// One layer of a GeoPackage: its table, geometry column and CRS id.
#[derive(Debug, Clone)]
pub struct Layer {
    /// The table holding the features.
    pub table: String,
    /// The column holding each feature's geometry blob.
    pub column: String,
    /// The `srs_id` of the layer's CRS.
    pub srs_id: i64,
}

/// An open GeoPackage layer as a source of features.
pub struct GpkgSource {
    source: Source,
    path: PathBuf,
    conn: Connection,
    layer: Layer,
    /// The table's columns and whether each is part of the primary key.
    columns: Vec<(String, bool)>,
    /// Every simple geometry decoded in GeoJSON's layout (sites, zones), not only lines (roads).
    any_geometry: bool,
    /// The kind of layer read: its role in summaries, its options in messages.
    kind: &'static LayerKind,
    /// The layer was chosen by its name.
    named: bool,
}

fn refuse(path: &Path, message: String) -> IngestError {
    IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(message),
    }
}

/// Quotes an SQL identifier (a table or column name from the file itself).
fn quote(name: &str) -> String {
    format!("\"{}\"", name.replace('"', "\"\""))
}

/// Opens an SQLite file read-only and immutable (`immutable=1`: read as a file that cannot
/// change, so no lock, journal or index is written beside it).
pub fn open_immutable(p: &Path) -> rusqlite::Result<Connection> {
    let mut uri = String::from("file:");
    for c in p.to_string_lossy().chars() {
        match c {
            '%' | '?' | '#' => uri.push_str(&format!("%{:02X}", c as u32)),
            _ => uri.push(c),
        }
    }
    uri.push_str("?immutable=1");
    Connection::open_with_flags(
        &uri,
        OpenFlags::SQLITE_OPEN_READ_ONLY | OpenFlags::SQLITE_OPEN_URI,
    )
}

/// Refuses a GeoPackage with a non-empty write-ahead log (`NAME-wal`) or rollback journal
/// (`NAME-journal`) beside it: the file is read as one that cannot change, so committed edits
/// still in the log would be missed (and a journal means a write was cut short).
pub fn unmerged_log(p: &Path) -> Result<(), String> {
    for (suffix, what) in [
        (
            "-wal",
            "a write-ahead log holding edits not yet merged into it",
        ),
        (
            "-journal",
            "a rollback journal (a write to it was cut short or is under way)",
        ),
    ] {
        let mut log = p.as_os_str().to_owned();
        log.push(suffix);
        let log = std::path::PathBuf::from(log);
        if let Ok(m) = std::fs::metadata(&log)
            && m.len() > 0
        {
            return Err(format!(
                "{} lies beside it, {what} ({} bytes); reknit reads the GeoPackage as a file that \
                 does not change and would miss them: close the program that has it open, or \
                 merge the log (sqlite3 FILE 'PRAGMA wal_checkpoint(TRUNCATE)'), then run again",
                log.display(),
                m.len()
            ));
        }
    }
    Ok(())
}

impl GpkgSource {
    /// Opens `source` and chooses its road layer: by name, or the only one.
    pub fn open(source: &Source, pick: super::reader::Pick) -> Result<GpkgSource, IngestError> {
        let mut s = Self::open_pick(source, pick)?;
        s.any_geometry = false;
        Ok(s)
    }

    /// Opens `source` as an input of another kind (sites, zones): `layer` chooses among several
    /// layers, and geometries of every simple type are decoded.
    pub fn open_layer(
        source: &Source,
        layer: Option<&str>,
        kind: &'static LayerKind,
    ) -> Result<GpkgSource, IngestError> {
        Self::open_pick(source, super::reader::Pick::always(layer, kind))
    }

    fn open_pick(source: &Source, pick: super::reader::Pick) -> Result<GpkgSource, IngestError> {
        let flag = pick.kind.layer_flag;
        let path = source.display_path();
        let Some(p) = source.path() else {
            return Err(refuse(
                &path,
                "a GeoPackage is read from a file only".into(),
            ));
        };
        super::limits::regular_file(p).map_err(|e| IngestError::Io {
            path: path.clone(),
            source: e,
        })?;
        let sql = |e: rusqlite::Error| {
            refuse(
                &path,
                format!("not a readable GeoPackage (SQLite) file: {e}"),
            )
        };
        unmerged_log(p).map_err(|m| refuse(&path, m))?;
        let conn = open_immutable(p).map_err(sql)?;
        let layers = layers(&conn).map_err(|e| {
            refuse(
                &path,
                format!(
                    "not a GeoPackage with a geometry column: its gpkg_geometry_columns table cannot be read ({e})"
                ),
            )
        })?;
        let names =
            || super::limits::listed(&layers.iter().map(|l| l.table.as_str()).collect::<Vec<_>>());
        let layer = match (pick.name, layers.as_slice()) {
            (Some(_), [_]) if pick.where_several => None,
            (name, _) => name,
        };
        let chosen = match layer {
            Some(name) => layers.iter().find(|l| l.table == name).ok_or_else(|| {
                refuse(
                    &path,
                    format!("has no layer \"{name}\"; its layers are: {}", names()),
                )
            })?,
            None => match layers.as_slice() {
                [] => {
                    return Err(refuse(
                        &path,
                        "holds no layer with a geometry column (gpkg_geometry_columns is empty)"
                            .into(),
                    ));
                }
                [one] => one,
                _ => {
                    return Err(refuse(
                        &path,
                        format!(
                            "holds several layers ({}); choose one with {flag} NAME",
                            names()
                        ),
                    ));
                }
            },
        }
        .clone();
        let columns = table_columns(&conn, &chosen.table)
            .map_err(|e| refuse(&path, format!("layer \"{}\": {e}", chosen.table)))?;
        Ok(GpkgSource {
            source: source.clone(),
            path,
            conn,
            layer: chosen,
            columns,
            any_geometry: true,
            kind: pick.kind,
            named: layer.is_some(),
        })
    }
}

/// The columns of `table` and whether each is part of its primary key, in table order.
fn table_columns(conn: &Connection, table: &str) -> rusqlite::Result<Vec<(String, bool)>> {
    let mut st = conn.prepare(&format!("PRAGMA table_info({})", quote(table)))?;
    st.query_map([], |r| {
        Ok((r.get::<_, String>(1)?, r.get::<_, i64>(5)? > 0))
    })?
    .collect()
}

/// The layers a GeoPackage declares, by table name.
pub fn layers(conn: &Connection) -> rusqlite::Result<Vec<Layer>> {
    let mut st = conn.prepare(
        "SELECT table_name, column_name, srs_id FROM gpkg_geometry_columns ORDER BY table_name",
    )?;
    st.query_map([], |r| {
        Ok(Layer {
            table: r.get(0)?,
            column: r.get(1)?,
            srs_id: r.get(2)?,
        })
    })?
    .collect()
}

impl FeatureSource for GpkgSource {
    fn path(&self) -> &Path {
        &self.path
    }

    fn declared_crs(&self) -> Result<Option<Crs>, IngestError> {
        let id = self.layer.srs_id;
        if id == 0 || id == -1 {
            return Ok(None);
        }
        let row: Option<(String, i64, String)> = self
            .conn
            .query_row(
                "SELECT organization, organization_coordsys_id, definition FROM gpkg_spatial_ref_sys WHERE srs_id = ?1",
                [id],
                |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?)),
            )
            .ok();
        let hint = super::crs::hint(self.kind.crs_flag);
        let crs_err = |message: String| IngestError::Crs {
            path: self.path.clone(),
            message: format!("layer \"{}\": {message}; {hint}", self.layer.table),
        };
        let Some((org, code, wkt)) = row else {
            return Err(crs_err(format!(
                "srs_id {id} is not in gpkg_spatial_ref_sys"
            )));
        };
        if org.eq_ignore_ascii_case("EPSG")
            && let Ok(code) = u32::try_from(code)
            && let Ok(crs) = Crs::from_epsg(code)
        {
            return Ok(Some(crs));
        }
        Crs::from_wkt(&wkt).map(Some).map_err(crs_err)
    }

    fn layer_name(&self) -> Option<String> {
        Some(self.layer.table.clone())
    }

    fn chosen_by_name(&self) -> bool {
        self.named
    }

    fn declared_fields(&self) -> Option<DeclaredFields> {
        Some(DeclaredFields {
            file: self.path.clone(),
            noun: "column",
            names: self
                .columns
                .iter()
                .map(|(c, _)| c.clone())
                .filter(|c| *c != self.layer.column)
                .collect(),
        })
    }

    fn features(
        &mut self,
        wanted: &[String],
        sink: &mut dyn FnMut(usize, RawFeature) -> Result<(), IngestError>,
    ) -> Result<SourceInfo, IngestError> {
        let path = self.path.clone();
        let sql =
            |e: rusqlite::Error| refuse(&path, format!("layer \"{}\": {e}", self.layer.table));
        let table = quote(&self.layer.table);
        let columns = &self.columns;
        let geom = columns
            .iter()
            .position(|(c, _)| *c == self.layer.column)
            .ok_or_else(|| {
                refuse(
                    &path,
                    format!(
                        "layer \"{}\": its geometry column \"{}\" is not in the table",
                        self.layer.table, self.layer.column
                    ),
                )
            })?;
        let order = columns
            .iter()
            .find(|(_, pk)| *pk)
            .map(|(c, _)| quote(c))
            .unwrap_or_else(|| "rowid".into());
        let list: Vec<String> = columns.iter().map(|(c, _)| quote(c)).collect();
        let mut st = self
            .conn
            .prepare(&format!(
                "SELECT {} FROM {table} ORDER BY {order}",
                list.join(", ")
            ))
            .map_err(sql)?;
        let mut rows = st.query([]).map_err(sql)?;
        let mut skipped: BTreeMap<String, usize> = BTreeMap::new();
        let mut index = 0usize;
        while let Some(row) = rows.next().map_err(sql)? {
            let fail = |field: &str, message: String| IngestError::Feature {
                path: path.clone(),
                feature: index,
                field: Some(field.into()),
                message,
            };
            let mut f = RawFeature {
                has_properties: true,
                ..Default::default()
            };
            for (i, (name, _)) in columns.iter().enumerate() {
                let v = row.get_ref(i).map_err(sql)?;
                if i == geom {
                    match v {
                        ValueRef::Null => {}
                        ValueRef::Blob(b) if self.any_geometry => {
                            match super::wkb::decode_feature(b).map_err(|m| fail(name, m))? {
                                Some((kind, c)) => {
                                    f.geometry_type = Some(kind.into());
                                    f.coords = c;
                                }
                                None => f.geometry_type = Some("empty".into()),
                            }
                        }
                        ValueRef::Blob(b) => match decode(b).map_err(|m| fail(name, m))? {
                            Decoded::Lines(c) => {
                                f.geometry_type = Some("MultiLineString".into());
                                f.coords = c;
                            }
                            Decoded::Empty => f.geometry_type = Some("empty".into()),
                            Decoded::Other(k) => f.geometry_type = Some(k.into()),
                        },
                        _ => return Err(fail(name, "the geometry is not a blob".into())),
                    }
                    continue;
                }
                if !wanted
                    .iter()
                    .any(|w| w == name || w == super::geojson::ALL_PROPERTIES)
                {
                    continue;
                }
                let value = match v {
                    ValueRef::Null => Value::Null,
                    ValueRef::Integer(n) => Value::from(n),
                    ValueRef::Real(x) => serde_json::Number::from_f64(x)
                        .map(Value::Number)
                        .ok_or_else(|| fail(name, format!("{x} is not a finite number")))?,
                    ValueRef::Text(t) => Value::from(
                        std::str::from_utf8(t)
                            .map_err(|_| {
                                fail(
                                    name,
                                    "the text is not UTF-8 (GeoPackage text is, §1.1.1.1.1)".into(),
                                )
                            })?
                            .trim(),
                    ),
                    // Binary data is neither a number nor text: read as "no value" it would
                    // silently default a damage, a priority or an id, so it is refused.
                    ValueRef::Blob(b) => {
                        return Err(fail(
                            name,
                            format!(
                                "binary data (a BLOB of {} bytes), not a number or text; store \
                                 the field as INTEGER, REAL or TEXT",
                                b.len()
                            ),
                        ));
                    }
                };
                f.props.push((name.clone(), value));
            }
            if f.geometry_type.as_deref() == Some("empty") && self.any_geometry {
                // Each site and each zone needs its geometry: refused, naming the feature.
                return Err(fail(
                    &columns[geom].0,
                    format!(
                        "the geometry is empty (a Point of NaN ordinates is GeoPackage's empty \
                         point, §2.1.3.1.2); each feature of the {} layer needs a geometry",
                        self.kind.role
                    ),
                ));
            }
            if f.geometry_type.as_deref() == Some("empty") {
                *skipped.entry("empty geometry".into()).or_default() += 1;
            } else {
                sink(index, f)?;
            }
            index += 1;
        }
        Ok(SourceInfo {
            features: index,
            skipped,
            input: super::osm::fingerprint(&self.source, self.kind.role)?,
            osm: false,
            features_cut_at_edge: 0,
        })
    }
}
