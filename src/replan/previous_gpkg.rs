//! The previous plan's layers when it wrote them into `layers.gpkg` (`--output-format gpkg`):
//! each table's rows as property maps, as the GeoJSON layer's features give them (a BOOLEAN
//! column's 0 and 1 as false and true).

use crate::export::gpkg::quote;
use rusqlite::types::ValueRef;
use serde_json::{Map, Value};
use std::path::Path;

/// The properties of every feature of the layer `table`, in feature order; `None` when the file
/// holds no such layer. The error says what is wrong with the file.
pub fn layer(path: &Path, table: &str) -> Result<Option<Vec<Map<String, Value>>>, String> {
    crate::ingest::limits::regular_file(path).map_err(|e| e.to_string())?;
    let conn = crate::ingest::gpkg::open_immutable(path)
        .map_err(|e| format!("not a GeoPackage reknit wrote: {e}"))?;
    let err = |e: rusqlite::Error| format!("not a GeoPackage reknit wrote: {e}");
    let listed: i64 = conn
        .query_row(
            "SELECT count(*) FROM gpkg_contents WHERE table_name = ?1 AND data_type = 'features'",
            [table],
            |r| r.get(0),
        )
        .map_err(err)?;
    if listed == 0 {
        return Ok(None);
    }
    // (name, declared BOOLEAN) of every column but the id and the geometry.
    let mut cols: Vec<(String, bool)> = Vec::new();
    let mut info = conn
        .prepare(&format!("PRAGMA table_info({})", quote(table)))
        .map_err(err)?;
    let mut rows = info.query([]).map_err(err)?;
    while let Some(r) = rows.next().map_err(err)? {
        let name: String = r.get(1).map_err(err)?;
        let ty: String = r.get(2).map_err(err)?;
        if name != "fid" && name != "geom" {
            cols.push((name, ty.eq_ignore_ascii_case("BOOLEAN")));
        }
    }
    drop(rows);
    let listed: String = cols
        .iter()
        .map(|(n, _)| quote(n))
        .collect::<Vec<_>>()
        .join(", ");
    let select = match cols.is_empty() {
        true => format!("SELECT fid FROM {} ORDER BY fid", quote(table)),
        false => format!("SELECT {listed} FROM {} ORDER BY fid", quote(table)),
    };
    let mut st = conn.prepare(&select).map_err(err)?;
    let mut rows = st.query([]).map_err(err)?;
    let mut out = Vec::new();
    while let Some(r) = rows.next().map_err(err)? {
        let mut m = Map::new();
        for (i, (name, boolean)) in cols.iter().enumerate() {
            let v = match r.get_ref(i).map_err(err)? {
                ValueRef::Null => Value::Null,
                ValueRef::Integer(n) if *boolean => Value::Bool(n != 0),
                ValueRef::Integer(n) => Value::from(n),
                ValueRef::Real(x) => Value::from(x),
                ValueRef::Text(t) => Value::String(String::from_utf8_lossy(t).into_owned()),
                ValueRef::Blob(_) => {
                    return Err(format!("layer {table}: field `{name}` holds binary data"));
                }
            };
            m.insert(name.clone(), v);
        }
        out.push(m);
    }
    Ok(Some(out))
}
