//! The GeoPackage writer (OGC GeoPackage Encoding Standard 1.3): every layer of
//! an output set in one SQLite file, `layers.gpkg`.
//!
//! Each layer is a feature table with the GeoJSON layer's name and field names, in EPSG:4326
//! (the `gpkg_spatial_ref_sys` rows -1, 0 and 4326 the standard asks for), geometries as
//! GeoPackage Binary with an envelope ([`geom`]), a row in `gpkg_contents` (extent, and the
//! cautions as its description) and in `gpkg_geometry_columns`, and an R-tree spatial index
//! (extension `gpkg_rtree_index`, Annex F.3): the `rtree_<table>_geom` virtual table filled as
//! the rows are written, then the standard triggers. A `cautions` attributes table holds
//! [`crate::cautions::CAUTIONS`].
//!
//! The bytes depend on the outputs alone: one writer, one transaction, the tables in a fixed
//! order, `last_change` fixed at [`LAST_CHANGE`], so the file is the same run to run and
//! whatever the thread count.

pub mod geom;
pub mod table;

use super::sink::{GeomKind, LayerSink, LayerSpec};
use rusqlite::{Connection, OpenFlags, params};
use std::io;
use std::path::Path;

/// `last_change` of every table: fixed, so the file does not depend on the clock. When the run
/// was made is not part of a plan's outputs (`summary.json` records the inputs instead).
pub const LAST_CHANGE: &str = "1970-01-01T00:00:00.000Z";

/// SQLite's `application_id` for a GeoPackage: "GPKG" in ASCII (GeoPackage 1.3 §1.1.1.1.1).
const APPLICATION_ID: i64 = 0x4750_4B47;

/// SQLite's `user_version` for GeoPackage 1.3.0 (§1.1.1.1.1).
const USER_VERSION: i64 = 10300;

/// The WKT of EPSG:4326 in `gpkg_spatial_ref_sys`, as the EPSG registry defines WGS 84.
const WGS84_WKT: &str = "GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\",SPHEROID[\"WGS 84\",6378137,298.257223563,AUTHORITY[\"EPSG\",\"7030\"]],AUTHORITY[\"EPSG\",\"6326\"]],PRIMEM[\"Greenwich\",0,AUTHORITY[\"EPSG\",\"8901\"]],UNIT[\"degree\",0.0174532925199433,AUTHORITY[\"EPSG\",\"9122\"]],AXIS[\"Latitude\",NORTH],AXIS[\"Longitude\",EAST],AUTHORITY[\"EPSG\",\"4326\"]]";

/// The tables every GeoPackage has (GeoPackage 1.3 Annex C), and its three required CRS rows.
const CORE: &str = "
CREATE TABLE gpkg_spatial_ref_sys (srs_name TEXT NOT NULL, srs_id INTEGER NOT NULL PRIMARY KEY,
  organization TEXT NOT NULL, organization_coordsys_id INTEGER NOT NULL, definition TEXT NOT NULL,
  description TEXT);
CREATE TABLE gpkg_contents (table_name TEXT NOT NULL PRIMARY KEY, data_type TEXT NOT NULL,
  identifier TEXT UNIQUE, description TEXT DEFAULT '',
  last_change DATETIME NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
  min_x DOUBLE, min_y DOUBLE, max_x DOUBLE, max_y DOUBLE, srs_id INTEGER,
  CONSTRAINT fk_gc_r_srs_id FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys(srs_id));
CREATE TABLE gpkg_geometry_columns (table_name TEXT NOT NULL, column_name TEXT NOT NULL,
  geometry_type_name TEXT NOT NULL, srs_id INTEGER NOT NULL, z TINYINT NOT NULL, m TINYINT NOT NULL,
  CONSTRAINT pk_geom_cols PRIMARY KEY (table_name, column_name),
  CONSTRAINT uk_gc_table_name UNIQUE (table_name),
  CONSTRAINT fk_gc_tn FOREIGN KEY (table_name) REFERENCES gpkg_contents(table_name),
  CONSTRAINT fk_gc_srs FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys (srs_id));
CREATE TABLE gpkg_extensions (table_name TEXT, column_name TEXT, extension_name TEXT NOT NULL,
  definition TEXT NOT NULL, scope TEXT NOT NULL,
  CONSTRAINT ge_tce UNIQUE (table_name, column_name, extension_name));
INSERT INTO gpkg_spatial_ref_sys VALUES ('Undefined cartesian SRS', -1, 'NONE', -1, 'undefined',
  'undefined cartesian coordinate reference system');
INSERT INTO gpkg_spatial_ref_sys VALUES ('Undefined geographic SRS', 0, 'NONE', 0, 'undefined',
  'undefined geographic coordinate reference system');
";

/// The R-tree triggers of GeoPackage 1.3 Annex F.3 (`T` the table, `C` the geometry column, `I`
/// the id column, `R` the R-tree), for writers that keep the index up to date.
const TRIGGERS: &str = "
CREATE TRIGGER \"R_insert\" AFTER INSERT ON \"T\" WHEN (new.\"C\" NOT NULL AND NOT ST_IsEmpty(NEW.\"C\"))
BEGIN INSERT OR REPLACE INTO \"R\" VALUES (NEW.\"I\", ST_MinX(NEW.\"C\"), ST_MaxX(NEW.\"C\"), ST_MinY(NEW.\"C\"), ST_MaxY(NEW.\"C\")); END;
CREATE TRIGGER \"R_update1\" AFTER UPDATE OF \"C\" ON \"T\" WHEN OLD.\"I\" = NEW.\"I\" AND (NEW.\"C\" NOTNULL AND NOT ST_IsEmpty(NEW.\"C\"))
BEGIN INSERT OR REPLACE INTO \"R\" VALUES (NEW.\"I\", ST_MinX(NEW.\"C\"), ST_MaxX(NEW.\"C\"), ST_MinY(NEW.\"C\"), ST_MaxY(NEW.\"C\")); END;
CREATE TRIGGER \"R_update2\" AFTER UPDATE OF \"C\" ON \"T\" WHEN OLD.\"I\" = NEW.\"I\" AND (NEW.\"C\" ISNULL OR ST_IsEmpty(NEW.\"C\"))
BEGIN DELETE FROM \"R\" WHERE id = OLD.\"I\"; END;
CREATE TRIGGER \"R_update3\" AFTER UPDATE ON \"T\" WHEN OLD.\"I\" != NEW.\"I\" AND (NEW.\"C\" NOTNULL AND NOT ST_IsEmpty(NEW.\"C\"))
BEGIN DELETE FROM \"R\" WHERE id = OLD.\"I\"; INSERT OR REPLACE INTO \"R\" VALUES (NEW.\"I\", ST_MinX(NEW.\"C\"), ST_MaxX(NEW.\"C\"), ST_MinY(NEW.\"C\"), ST_MaxY(NEW.\"C\")); END;
CREATE TRIGGER \"R_update4\" AFTER UPDATE ON \"T\" WHEN OLD.\"I\" != NEW.\"I\" AND (NEW.\"C\" ISNULL OR ST_IsEmpty(NEW.\"C\"))
BEGIN DELETE FROM \"R\" WHERE id IN (OLD.\"I\", NEW.\"I\"); END;
CREATE TRIGGER \"R_delete\" AFTER DELETE ON \"T\" WHEN old.\"C\" NOT NULL
BEGIN DELETE FROM \"R\" WHERE id = OLD.\"I\"; END;
";

/// A database error as an I/O error of the file being written.
pub(crate) fn sql(e: rusqlite::Error) -> io::Error {
    io::Error::other(format!("GeoPackage: {e}"))
}

/// Quotes an SQL identifier.
pub(crate) fn quote(name: &str) -> String {
    format!("\"{}\"", name.replace('"', "\"\""))
}

/// A GeoPackage being written; nothing is complete before [`GpkgWriter::finish`].
pub struct GpkgWriter {
    conn: Connection,
    description: String,
}

impl GpkgWriter {
    /// Creates the file at `path` (which must not exist) with the core tables; every layer's
    /// description is the cautions' paragraph, then the attribution when the data asks for one.
    pub fn create(path: &Path, attribution: Option<&str>) -> io::Result<GpkgWriter> {
        let flags = OpenFlags::SQLITE_OPEN_READ_WRITE
            | OpenFlags::SQLITE_OPEN_CREATE
            | OpenFlags::SQLITE_OPEN_NO_MUTEX;
        let conn = Connection::open_with_flags(path, flags).map_err(sql)?;
        // No journal beside the file: it is written once, in a staging folder that is thrown
        // away whole if the run fails, and synced there with the other outputs.
        conn.execute_batch(&format!(
            "PRAGMA journal_mode = OFF; PRAGMA synchronous = OFF; PRAGMA page_size = 4096;
             PRAGMA cache_size = -65536; PRAGMA temp_store = MEMORY;
             PRAGMA application_id = {APPLICATION_ID}; PRAGMA user_version = {USER_VERSION};
             BEGIN; {CORE}"
        ))
        .map_err(sql)?;
        conn.execute(
            "INSERT INTO gpkg_spatial_ref_sys VALUES ('WGS 84 geodetic', 4326, 'EPSG', 4326, ?1,
             'longitude/latitude coordinates in decimal degrees on the WGS 84 spheroid')",
            [WGS84_WKT],
        )
        .map_err(sql)?;
        let mut description = crate::cautions::SHORT.to_string();
        if let Some(a) = attribution {
            description.push_str(" Data: ");
            description.push_str(a);
        }
        Ok(GpkgWriter { conn, description })
    }

    /// Writes one layer: its table, filled by `fill`, then its index and metadata rows.
    pub fn layer<F>(&mut self, spec: &LayerSpec, fill: F) -> io::Result<()>
    where
        F: FnOnce(&mut dyn LayerSink) -> io::Result<()>,
    {
        let t = spec.name;
        let names = table::column_names(&spec.fields);
        let cols = table::columns_sql(&spec.fields, &names);
        let nominal = match spec.geometry {
            GeomKind::Line => "LINESTRING",
            GeomKind::Point => "POINT",
            GeomKind::Mixed => "GEOMETRY",
        };
        let create = |ty: &str, name: &str| {
            format!(
                "CREATE TABLE {} (\"fid\" INTEGER PRIMARY KEY AUTOINCREMENT NOT NULL, \"geom\" {ty}{cols})",
                quote(name)
            )
        };
        let rtree = format!("rtree_{t}_geom");
        self.conn
            .execute_batch(&format!(
                "{}; CREATE VIRTUAL TABLE {} USING rtree(id, minx, maxx, miny, maxy);",
                create(nominal, t),
                quote(&rtree)
            ))
            .map_err(sql)?;
        let marks: String = (3..names.len() + 3).map(|i| format!(", ?{i}")).collect();
        let listed: String = names.iter().map(|n| format!(", {}", quote(n))).collect();
        let insert = self
            .conn
            .prepare(&format!(
                "INSERT INTO {} (\"fid\", \"geom\"{listed}) VALUES (?1, ?2{marks})",
                quote(t)
            ))
            .map_err(sql)?;
        let index = self
            .conn
            .prepare(&format!(
                "INSERT INTO {} VALUES (?1, ?2, ?3, ?4, ?5)",
                quote(&rtree)
            ))
            .map_err(sql)?;
        let mut table = table::Table::new(spec.fields.clone(), insert, index);
        fill(&mut table)?;
        let (extent, seen) = (table.extent, table.seen);
        table.index()?;
        let kinds = [
            (seen.point, "POINT"),
            (seen.line, "LINESTRING"),
            (seen.multi, "MULTILINESTRING"),
        ];
        let mut met = kinds.iter().filter(|k| k.0).map(|k| k.1);
        let ty = match (met.next(), met.next()) {
            (None, _) => nominal,
            (Some(one), None) => one,
            _ => "GEOMETRY",
        };
        if ty != nominal {
            // A line split at ±180° makes a MultiLineString: the column is declared again with
            // the type that holds every row (GeoPackage 1.3 Req. 32 and 33).
            let tmp = format!("{t}_declared_again");
            self.conn
                .execute_batch(&format!(
                    "{}; INSERT INTO {q2} SELECT * FROM {q}; DROP TABLE {q};
                     ALTER TABLE {q2} RENAME TO {q};",
                    create(ty, &tmp),
                    q = quote(t),
                    q2 = quote(&tmp),
                ))
                .map_err(sql)?;
        }
        let e = (!extent.is_empty()).then_some(extent.0);
        self.conn
            .execute(
                "INSERT INTO gpkg_contents VALUES (?1, 'features', ?1, ?2, ?3, ?4, ?5, ?6, ?7, 4326)",
                params![
                    t,
                    self.description,
                    LAST_CHANGE,
                    e.map(|e| e[0]),
                    e.map(|e| e[2]),
                    e.map(|e| e[1]),
                    e.map(|e| e[3])
                ],
            )
            .map_err(sql)?;
        self.conn
            .execute(
                "INSERT INTO gpkg_geometry_columns VALUES (?1, 'geom', ?2, 4326, 0, 0)",
                params![t, ty],
            )
            .map_err(sql)?;
        self.conn
            .execute(
                "INSERT INTO gpkg_extensions VALUES (?1, 'geom', 'gpkg_rtree_index',
                 'http://www.geopackage.org/spec/#extension_rtree', 'write-only')",
                [t],
            )
            .map_err(sql)?;
        let triggers = TRIGGERS
            .replace("\"R_", &format!("\"{}_", rtree.replace('"', "\"\"")))
            .replace("\"R\"", &quote(&rtree))
            .replace("\"T\"", &quote(t))
            .replace("\"C\"", "\"geom\"")
            .replace("\"I\"", "\"fid\"");
        self.conn.execute_batch(&triggers).map_err(sql)
    }

    /// Adds the `cautions` table and closes the file.
    pub fn finish(self) -> io::Result<()> {
        let c = &self.conn;
        c.execute_batch(
            "CREATE TABLE \"cautions\" (\"fid\" INTEGER PRIMARY KEY AUTOINCREMENT NOT NULL,
             \"caution\" TEXT NOT NULL)",
        )
        .map_err(sql)?;
        for (i, text) in crate::cautions::CAUTIONS.iter().enumerate() {
            c.execute(
                "INSERT INTO \"cautions\" VALUES (?1, ?2)",
                params![i as i64 + 1, text],
            )
            .map_err(sql)?;
        }
        c.execute(
            "INSERT INTO gpkg_contents (table_name, data_type, identifier, description, last_change)
             VALUES ('cautions', 'attributes', 'cautions', ?1, ?2)",
            params![self.description, LAST_CHANGE],
        )
        .map_err(sql)?;
        c.execute_batch("COMMIT").map_err(sql)?;
        self.conn.close().map_err(|(_, e)| sql(e))
    }
}
