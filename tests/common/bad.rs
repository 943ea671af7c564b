//! Shared harness of the bad-input catalogue (tests/bad_input.rs, tests/bad_input_more.rs):
//! each case runs reknit end to end and checks exit code, message, no panic, no output left behind
//! and inputs unchanged (content and modification time).

use super::*;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

pub const OK_LINE: &str = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;

pub fn fc(features: &[&str]) -> String {
    format!(
        r#"{{"type":"FeatureCollection","features":[{}]}}"#,
        features.join(",")
    )
}

pub fn file(d: &Path, name: &str, bytes: impl AsRef<[u8]>) -> PathBuf {
    let p = d.join(name);
    std::fs::write(&p, bytes).unwrap();
    p
}

pub fn s(p: &Path) -> String {
    p.to_str().unwrap().to_string()
}

/// One entry of a snapshot: a file's bytes, modification time and mode, a folder's mode, or a
/// link's target.
#[derive(Debug, PartialEq)]
pub enum Entry {
    File(Vec<u8>, std::time::SystemTime, u32),
    Folder(u32),
    Link(PathBuf),
    Other,
}

/// Every entry under `d` (files, folders, links) except the folder `skip`: what reknit must leave
/// exactly as it found it.
pub fn snapshot(d: &Path, skip: &Path) -> BTreeMap<PathBuf, Entry> {
    use std::os::unix::fs::PermissionsExt;
    let mut out = BTreeMap::new();
    let mut stack = vec![d.to_path_buf()];
    while let Some(x) = stack.pop() {
        let Ok(rd) = std::fs::read_dir(&x) else {
            continue;
        };
        for e in rd.flatten() {
            let p = e.path();
            if p == skip {
                continue;
            }
            let m = std::fs::symlink_metadata(&p).unwrap();
            let mode = m.permissions().mode();
            let entry = if m.is_dir() {
                stack.push(p.clone());
                Entry::Folder(mode)
            } else if m.is_file() {
                Entry::File(std::fs::read(&p).unwrap(), m.modified().unwrap(), mode)
            } else if m.file_type().is_symlink() {
                Entry::Link(std::fs::read_link(&p).unwrap())
            } else {
                Entry::Other
            };
            out.insert(p, entry);
        }
    }
    out
}

/// Asserts that two snapshots agree, naming the first entry that differs.
pub fn assert_same(before: &BTreeMap<PathBuf, Entry>, after: &BTreeMap<PathBuf, Entry>) {
    for (p, e) in before {
        match after.get(p) {
            None => panic!("{} was removed", p.display()),
            Some(a) => assert!(a == e, "{} was changed", p.display()),
        }
    }
    for p in after.keys() {
        assert!(
            before.contains_key(p),
            "{} appeared outside the output folder",
            p.display()
        );
    }
}

/// Runs reknit with `args` in the case folder `d` (output folder `out`) and checks: exit code 2,
/// every needle in the message, no panic, no output folder left (or, when `out` existed before,
/// the same entries as before), inputs unchanged.
pub fn fails_with(d: &Path, out: &Path, args: &[String], needles: &[&str]) {
    let before_out = out.exists().then(|| listing(out));
    let before = snapshot(d, out);
    let o = reknit().args(args).output().expect("run reknit");
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "exit code; stderr: {msg}");
    assert!(!msg.contains("panicked"), "{msg}");
    for n in needles {
        assert!(msg.contains(n), "message lacks {n:?}: {msg}");
    }
    match before_out {
        None => assert!(!out.exists(), "output left behind: {:?}", listing(out)),
        Some(l) => assert_eq!(listing(out), l, "output folder changed"),
    }
    assert_same(&before, &snapshot(d, out));
}

/// `plan --roads ROADS --out OUT EXTRA…` fails with the needles.
pub fn plan_fails(roads: &Path, extra: &[&str], needles: &[&str]) {
    let d = roads.parent().unwrap();
    let out = d.join("out");
    let mut args = vec![
        "plan".into(),
        "--roads".into(),
        s(roads),
        "--out".into(),
        s(&out),
    ];
    args.extend(extra.iter().map(|x| x.to_string()));
    fails_with(d, &out, &args, needles);
}

/// Runs `plan` expecting success; returns the output folder.
pub fn plan_ok(d: &Path, args: &[&str]) -> PathBuf {
    let out = d.join("out");
    let before = snapshot(d, &out);
    let mut all = vec!["plan", "--out", out.to_str().unwrap(), "-q"];
    all.extend_from_slice(args);
    let o = run(&all);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_same(&before, &snapshot(d, &out));
    out
}

pub fn roads_ok(d: &Path) -> PathBuf {
    file(d, "roads.geojson", fc(&[OK_LINE]))
}

pub fn site_feature(id: &str, lon: f64, lat: f64) -> String {
    format!(
        r#"{{"type":"Feature","properties":{{"site_id":"{id}","priority":1}},"geometry":{{"type":"Point","coordinates":[{lon},{lat}]}}}}"#
    )
}

/// A polyline Shapefile set (WGS84 .prj) with a `name` field.
pub fn shapefile_roads(d: &Path, name: &str, lines: &[Vec<[f64; 2]>]) -> PathBuf {
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let p = d.join(name);
    let table =
        TableWriterBuilder::new().add_character_field(FieldName::try_from("name").unwrap(), 20);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for (i, l) in lines.iter().enumerate() {
        let pl = shapefile::Polyline::new(
            l.iter()
                .map(|c| shapefile::Point::new(c[0], c[1]))
                .collect(),
        );
        let mut r = Record::default();
        r.insert(
            "name".into(),
            FieldValue::Character(Some(format!("Road {i}"))),
        );
        w.write_shape_and_record(&pl, &r).unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    p
}

pub fn two_roads() -> Vec<Vec<[f64; 2]>> {
    vec![
        vec![[0.0, 0.0], [0.001, 0.0]],
        vec![[0.001, 0.0], [0.002, 0.0]],
    ]
}

#[macro_export]
macro_rules! case {
    ($name:ident, |$d:ident| $body:block) => {
        #[test]
        fn $name() {
            let tmp = $crate::common::tmp();
            let $d: &Path = tmp.path();
            $body
        }
    };
}

/// Every case name declared with `case!` in a test file, for the docs check.
pub fn case_names(source: &str) -> Vec<String> {
    source
        .lines()
        .filter_map(|l| l.strip_prefix("case!("))
        .map(|l| l.split(',').next().unwrap().to_string())
        .collect()
}

/// One layer of a test GeoPackage: its table, `geometry_type_name`, `srs_id` and the column
/// declarations after `fid` and `geom` (e.g. `", damage REAL"`).
pub struct GpkgLayer<'a> {
    pub table: &'a str,
    pub kind: &'a str,
    pub srs_id: i64,
    pub columns: &'a str,
}

/// A GeoPackage `d/name` with the tables every reader looks at (OGC GeoPackage Encoding Standard
/// 1.3 §1.1.2 `gpkg_spatial_ref_sys` holding WGS 84, §1.1.3 `gpkg_contents`, §2.1.5
/// `gpkg_geometry_columns`), one table per layer, then `sql` run (rows to insert).
pub fn gpkg_with(d: &Path, name: &str, layers: &[GpkgLayer], sql: &str) -> PathBuf {
    let p = d.join(name);
    let mut script = String::from(
        "CREATE TABLE gpkg_spatial_ref_sys (srs_name TEXT, srs_id INTEGER PRIMARY KEY, \
         organization TEXT, organization_coordsys_id INTEGER, definition TEXT, description TEXT);
         INSERT INTO gpkg_spatial_ref_sys VALUES ('WGS 84', 4326, 'EPSG', 4326, 'GEOGCS[\"WGS 84\"]', '');
         CREATE TABLE gpkg_contents (table_name TEXT PRIMARY KEY, data_type TEXT);
         CREATE TABLE gpkg_geometry_columns (table_name TEXT, column_name TEXT, \
         geometry_type_name TEXT, srs_id INTEGER, z INTEGER, m INTEGER);\n",
    );
    for l in layers {
        script.push_str(&format!(
            "INSERT INTO gpkg_geometry_columns VALUES ('{}', 'geom', '{}', {}, 0, 0);
             CREATE TABLE {} (fid INTEGER PRIMARY KEY, geom BLOB{});\n",
            l.table, l.kind, l.srs_id, l.table, l.columns
        ));
    }
    script.push_str(sql);
    let c = rusqlite::Connection::open(&p).unwrap();
    c.execute_batch(&script).unwrap();
    p
}
