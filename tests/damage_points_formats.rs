//! Field damage reports in every format relief teams hold: the same reports as GeoJSON, CSV
//! (comma-separated, and semicolon-separated with decimal commas), a Shapefile, a zipped
//! Shapefile and a GeoPackage give byte-identical plans; so do reports in a projected CRS with
//! `--damage-points-crs`, and CSV sites read through the same reader.
//!
//! Peer: GDAL 3.x through pyogrio (a PyPI package whose wheel ships GDAL) reads the same files
//! (the zip through `/vsizip/`, the CSV through the CSV driver) for feature counts and positions.

mod common;
use common::*;
use std::path::{Path, PathBuf};

/// The road lines, metres east and north of (0, 0): one along the equator, one going north.
fn roads(d: &Path) -> PathBuf {
    let lines: Vec<String> = [
        vec![[0.0, 0.0], [200.0, 0.0], [400.0, 0.0]],
        vec![[200.0, 0.0], [200.0, 300.0]],
        vec![[0.0, 0.0], [0.0, 300.0], [200.0, 300.0]],
    ]
    .iter()
    .enumerate()
    .map(|(i, l)| {
        let c: Vec<[f64; 2]> = l.iter().map(|&[x, y]| at_m(x, y)).collect();
        line(&c, &format!(r#"{{"name":"r{i}","damage":1.2}}"#))
    })
    .collect();
    write_collection(d, "roads.geojson", &lines)
}

/// The reports: id, position (metres), damage as written (empty: none).
const REPORTS: &[(&str, [f64; 2], &str)] = &[
    ("n1", [100.0, 10.0], "3"),
    ("n2", [300.0, -5.0], "closed"),
    ("n3", [205.0, 150.0], "2.5"),
    ("n4", [-8.0, 120.0], ""),
    ("n5", [1000.0, 1000.0], "4"),
];

fn positions() -> Vec<[f64; 2]> {
    REPORTS.iter().map(|(_, p, _)| at_m(p[0], p[1])).collect()
}

fn geojson(d: &Path) -> PathBuf {
    let features: Vec<String> = REPORTS
        .iter()
        .zip(positions())
        .map(|((id, _, dmg), p)| {
            let damage = match *dmg {
                "" => String::new(),
                "closed" => r#","damage":"closed""#.into(),
                n => format!(r#","damage":{n}"#),
            };
            point(p, &format!(r#"{{"report":"{id}"{damage}}}"#))
        })
        .collect();
    write_collection(d, "reports.geojson", &features)
}

/// CSV rows with `sep`; `comma_decimal` writes every number with a decimal comma.
fn csv(d: &Path, name: &str, sep: &str, comma_decimal: bool) -> PathBuf {
    let num = |x: f64| {
        let t = x.to_string();
        if comma_decimal {
            t.replace('.', ",")
        } else {
            t
        }
    };
    let mut text = format!("report{sep}lon{sep}lat{sep}damage\r\n");
    for ((id, _, dmg), p) in REPORTS.iter().zip(positions()) {
        let dmg = if comma_decimal {
            dmg.replace('.', ",")
        } else {
            dmg.to_string()
        };
        // A quoted id, as spreadsheets write text (RFC 4180 §2.5).
        text += &format!("\"{id}\"{sep}{}{sep}{}{sep}{dmg}\r\n", num(p[0]), num(p[1]));
    }
    let p = d.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn shapefile(d: &Path) -> PathBuf {
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let p = d.join("reports.shp");
    let table = TableWriterBuilder::new()
        .add_character_field(FieldName::try_from("report").unwrap(), 10)
        .add_character_field(FieldName::try_from("damage").unwrap(), 10);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for ((id, _, dmg), q) in REPORTS.iter().zip(positions()) {
        let mut r = Record::default();
        r.insert("report".into(), FieldValue::Character(Some(id.to_string())));
        let dmg = (!dmg.is_empty()).then(|| dmg.to_string());
        r.insert("damage".into(), FieldValue::Character(dmg));
        w.write_shape_and_record(&shapefile::Point::new(q[0], q[1]), &r)
            .unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    p
}

fn zipped(d: &Path, shp: &Path) -> PathBuf {
    let entries = common::zipped::set_entries(shp, "field/");
    common::zipped::zip_owned(d, "reports.zip", &entries)
}

/// A GeoPackage (OGC 12-128r18) written with SQLite: one WGS84 layer of Point blobs (§2.1.3
/// header, then ISO 19125-1 WKB), the damage column untyped so numbers stay numbers.
fn geopackage(d: &Path) -> PathBuf {
    let p = d.join("reports.gpkg");
    let c = rusqlite::Connection::open(&p).unwrap();
    c.execute_batch(
        "CREATE TABLE gpkg_spatial_ref_sys (srs_name TEXT, srs_id INTEGER PRIMARY KEY, \
         organization TEXT, organization_coordsys_id INTEGER, definition TEXT, description TEXT);
         INSERT INTO gpkg_spatial_ref_sys VALUES ('WGS 84', 4326, 'EPSG', 4326, 'GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\",SPHEROID[\"WGS 84\",6378137,298.257223563]],PRIMEM[\"Greenwich\",0],UNIT[\"degree\",0.0174532925199433]]', '');
         CREATE TABLE gpkg_contents (table_name TEXT PRIMARY KEY, data_type TEXT, identifier TEXT, \
         description TEXT, last_change TEXT, min_x REAL, min_y REAL, max_x REAL, max_y REAL, srs_id INTEGER);
         INSERT INTO gpkg_contents VALUES ('reports', 'features', 'reports', '', '2026-01-01T00:00:00Z', NULL, NULL, NULL, NULL, 4326);
         CREATE TABLE gpkg_geometry_columns (table_name TEXT, column_name TEXT, \
         geometry_type_name TEXT, srs_id INTEGER, z INTEGER, m INTEGER);
         INSERT INTO gpkg_geometry_columns VALUES ('reports', 'geom', 'POINT', 4326, 0, 0);
         CREATE TABLE reports (fid INTEGER PRIMARY KEY, geom BLOB, report TEXT, damage);",
    )
    .unwrap();
    for (i, ((id, _, dmg), q)) in REPORTS.iter().zip(positions()).enumerate() {
        let mut b = b"GP\x00\x01".to_vec();
        b.extend_from_slice(&4326i32.to_le_bytes());
        b.push(1);
        b.extend_from_slice(&1u32.to_le_bytes());
        b.extend_from_slice(&q[0].to_le_bytes());
        b.extend_from_slice(&q[1].to_le_bytes());
        let damage: rusqlite::types::Value = match *dmg {
            "" => rusqlite::types::Value::Null,
            "closed" => rusqlite::types::Value::Text("closed".into()),
            n => rusqlite::types::Value::Real(n.parse().unwrap()),
        };
        c.execute(
            "INSERT INTO reports VALUES (?1, ?2, ?3, ?4)",
            rusqlite::params![i as i64 + 1, b, id, damage],
        )
        .unwrap();
    }
    p
}

/// The plan's outputs that the reports shape, and summary.json's account of the reports.
fn outputs(d: &Path, name: &str, roads: &Path, extra: &[&str]) -> Vec<(String, Vec<u8>)> {
    let out = plan_quiet(d, name, roads, extra);
    let summary = read_json(&out.join("summary.json"));
    let mut v: Vec<(String, Vec<u8>)> = ["work-orders.csv", "plan.geojson"]
        .iter()
        .map(|f| (f.to_string(), std::fs::read(out.join(f)).unwrap()))
        .collect();
    v.push((
        "damage_reports".into(),
        summary["damage_reports"].to_string().into_bytes(),
    ));
    v
}

#[test]
fn the_same_reports_plan_alike_in_every_format() {
    let t = tmp();
    let d = t.path();
    let roads = roads(d);
    let shp = shapefile(d);
    let files = [
        geojson(d),
        csv(d, "reports.csv", ",", false),
        csv(d, "reports-semicolon.csv", ";", true),
        csv(d, "reports-tab.txt", "\t", false),
        shp.clone(),
        zipped(d, &shp),
        geopackage(d),
    ];
    let mut first: Option<Vec<(String, Vec<u8>)>> = None;
    for (i, f) in files.iter().enumerate() {
        let o = outputs(
            d,
            &format!("out{i}"),
            &roads,
            &["--damage-points", f.to_str().unwrap()],
        );
        // The reports change the plan: read as nothing, they would leave every road at 1.2.
        let summary = String::from_utf8_lossy(&o[2].1).to_string();
        assert!(summary.contains("\"read\":5"), "{}: {summary}", f.display());
        assert!(
            summary.contains("\"applied\":4"),
            "{}: {summary}",
            f.display()
        );
        match &first {
            None => first = Some(o),
            Some(a) => {
                for ((name, x), (_, y)) in a.iter().zip(&o) {
                    assert!(x == y, "{name} differs for {}", f.display());
                }
            }
        }
    }
}

/// Web Mercator (EPSG:3857) from longitude/latitude: x = Rλ, y = R ln tan(π/4 + φ/2) with
/// R = 6378137 (source: IOGP Guidance Note 7-2, method 1024, "Popular Visualisation Pseudo
/// Mercator").
fn web_mercator(p: [f64; 2]) -> [f64; 2] {
    let r = 6_378_137.0;
    let (lon, lat) = (p[0].to_radians(), p[1].to_radians());
    [
        r * lon,
        r * (std::f64::consts::FRAC_PI_4 + lat / 2.0).tan().ln(),
    ]
}

#[test]
fn reports_in_a_projected_crs_read_alike() {
    let t = tmp();
    let d = t.path();
    let roads = roads(d);
    let mut text = String::from("report;x;y;damage\n");
    for ((id, _, dmg), p) in REPORTS.iter().zip(positions()) {
        let [x, y] = web_mercator(p);
        text += &format!(
            "{id};{};{};{}\n",
            x.to_string().replace('.', ","),
            y.to_string().replace('.', ","),
            dmg.replace('.', ",")
        );
    }
    let projected = d.join("reports-3857.csv");
    std::fs::write(&projected, text).unwrap();
    let a = outputs(
        d,
        "a",
        &roads,
        &["--damage-points", geojson(d).to_str().unwrap()],
    );
    let b = outputs(
        d,
        "b",
        &roads,
        &[
            "--damage-points",
            projected.to_str().unwrap(),
            "--damage-points-crs",
            "EPSG:3857",
        ],
    );
    assert!(a[0].1 == b[0].1 && a[1].1 == b[1].1, "plans differ");
    // Without the option the metres are refused as longitudes, naming the option to give (the
    // first report, 100 m east and 10 m north, is a plausible longitude/latitude; the second,
    // 300 m east, is not).
    let o = plan_cli(
        &roads,
        &d.join("c"),
        &["-q", "--damage-points", projected.to_str().unwrap()],
    );
    assert!(!o.status.success());
    let e = stderr(&o);
    assert!(
        e.contains("reports-3857.csv") && e.contains("feature 1"),
        "{e}"
    );
    assert!(e.contains("--damage-points-crs"), "{e}");
    let summary = read_json(&d.join("b/summary.json"));
    assert_eq!(summary["settings"]["damage_points_crs"], "EPSG:3857");
}

/// GDAL's view of a layer through pyogrio: feature count and each Point's position.
const GDAL_POINTS: &str = r#"
import json, struct, sys
from pyogrio import raw
out = []
for path in sys.argv[1:]:
    opts = {"X_POSSIBLE_NAMES": "lon", "Y_POSSIBLE_NAMES": "lat"} if path.endswith(".csv") else {}
    meta, fids, geoms, fields = raw.read(path, **opts)
    pts = []
    for g in geoms:
        order = "<" if g[0] == 1 else ">"
        kind = struct.unpack(order + "I", g[1:5])[0]
        x, y = struct.unpack(order + "dd", g[5:21])
        pts.append([kind % 1000, x, y])
    out.append(pts)
print(json.dumps(out))
"#;

#[test]
fn gdal_reads_the_same_reports_in_every_format() {
    let Some(py) = common::external::python_with("damage-points-pyogrio", &["pyogrio"]) else {
        return;
    };
    let t = tmp();
    let d = t.path();
    let shp = shapefile(d);
    let zip = zipped(d, &shp);
    let files = [
        csv(d, "reports.csv", ",", false),
        shp.clone(),
        zip.clone(),
        geopackage(d),
    ];
    let mut args: Vec<String> = vec!["-c".into(), GDAL_POINTS.into()];
    for f in &files {
        if f == &zip {
            args.push(format!("/vsizip/{}/field/reports.shp", f.display()));
        } else {
            args.push(f.display().to_string());
        }
    }
    let o = std::process::Command::new(py).args(&args).output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let seen: Vec<Vec<[f64; 3]>> = serde_json::from_slice(&o.stdout).unwrap();
    let want = positions();
    for (f, pts) in files.iter().zip(&seen) {
        // Source: GDAL (through pyogrio) reading each file: 5 Points (WKB type 1) at the positions
        // written, so the formats hold the same reports the plans above read alike.
        assert_eq!(pts.len(), REPORTS.len(), "{}", f.display());
        for (p, w) in pts.iter().zip(&want) {
            assert_eq!(p[0], 1.0, "{}", f.display());
            assert!(
                (p[1] - w[0]).abs() < 1e-12 && (p[2] - w[1]).abs() < 1e-12,
                "{}: {p:?} vs {w:?}",
                f.display()
            );
        }
    }
}

#[test]
fn sites_read_from_a_zipped_shapefile_as_from_the_set() {
    // Sites go through the same reader: a zipped set plans as the set on disk does.
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let t = tmp();
    let d = t.path();
    let roads = roads(d);
    let p = d.join("sites.shp");
    let table =
        TableWriterBuilder::new().add_character_field(FieldName::try_from("site_id").unwrap(), 10);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for (id, [x, y]) in [
        ("a", [10.0, 20.0]),
        ("b", [390.0, 10.0]),
        ("c", [190.0, 290.0]),
    ] {
        let mut r = Record::default();
        r.insert("site_id".into(), FieldValue::Character(Some(id.into())));
        let q = at_m(x, y);
        w.write_shape_and_record(&shapefile::Point::new(q[0], q[1]), &r)
            .unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    let z = common::zipped::zip_owned(d, "sites.zip", &common::zipped::set_entries(&p, ""));
    let a = plan_quiet(
        d,
        "a",
        &roads,
        &["--sites", p.to_str().unwrap(), "--hub", "a"],
    );
    let b = plan_quiet(
        d,
        "b",
        &roads,
        &["--sites", z.to_str().unwrap(), "--hub", "a"],
    );
    for f in ["work-orders.csv", "plan.geojson"] {
        assert_eq!(
            std::fs::read(a.join(f)).unwrap(),
            std::fs::read(b.join(f)).unwrap(),
            "{f}"
        );
    }
}
