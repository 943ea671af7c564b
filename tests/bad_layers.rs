//! The bad-input catalogue, part for layers that would be read as something they are not
//! (docs/bad-inputs.md lists every case): GeoPackages with unmerged logs or binary fields, layers
//! with nothing in them, CSV headers naming a column twice.

mod common;
use common::bad::*;
use std::path::Path;

/// A GeoPackage written here with SQLite: the required tables, a WGS84 layer `table` of
/// `kind` (geometry type name) with the given extra column declarations, and `rows` inserted.
fn gpkg(
    d: &Path,
    name: &str,
    table: &str,
    kind: &str,
    columns: &str,
    rows: &str,
) -> std::path::PathBuf {
    let layer = GpkgLayer {
        table,
        kind,
        srs_id: 4326,
        columns,
    };
    gpkg_with(d, name, &[layer], rows)
}

/// A GeoPackage geometry blob (GeoPackage Encoding Standard 1.3 §2.1.3: little-endian header, no
/// envelope, srs 4326) around a little-endian WKB of `kind` (ISO 19125-1 §8.2.8) whose body is
/// `counts` (u32) then `xy` (f64).
fn geom(kind: u32, counts: &[u32], xy: &[f64]) -> String {
    let mut b = b"GP\x00\x01".to_vec();
    b.extend_from_slice(&4326i32.to_le_bytes());
    b.push(1);
    b.extend_from_slice(&kind.to_le_bytes());
    for c in counts {
        b.extend_from_slice(&c.to_le_bytes());
    }
    for v in xy {
        b.extend_from_slice(&v.to_le_bytes());
    }
    let hex: String = b.iter().map(|x| format!("{x:02X}")).collect();
    format!("X'{hex}'")
}

fn line_geom() -> String {
    geom(2, &[2], &[0.0, 0.0, 0.001, 0.0])
}

fn point_geom(lon: f64) -> String {
    geom(1, &[], &[lon, 0.0])
}

fn square_geom() -> String {
    geom(
        3,
        &[1, 4],
        &[0.0, -0.001, 0.001, -0.001, 0.001, 0.001, 0.0, -0.001],
    )
}

/// Writes `bytes` beside `p` as `p` + `suffix` (a SQLite `-wal` or `-journal` file).
fn beside(p: &Path, suffix: &str, bytes: &[u8]) {
    let mut s = p.as_os_str().to_owned();
    s.push(suffix);
    std::fs::write(std::path::PathBuf::from(s), bytes).unwrap();
}

case!(gpkg_with_unmerged_log, |d| {
    // A non-empty write-ahead log (SQLite file format, "WAL-mode file format": `NAME-wal`) holds
    // committed edits the file alone lacks; a rollback journal means a write was cut short.
    // Roads, sites and damage zones alike are refused before they are read.
    let roads = gpkg(
        d,
        "roads.gpkg",
        "roads",
        "LINESTRING",
        "",
        &format!("INSERT INTO roads VALUES (1, {});", line_geom()),
    );
    let sites = gpkg(
        d,
        "sites.gpkg",
        "sites",
        "POINT",
        ", site_id TEXT",
        &format!(
            "INSERT INTO sites VALUES (1, {}, 'a'), (2, {}, 'b');",
            point_geom(0.0),
            point_geom(0.001)
        ),
    );
    let zones = gpkg(
        d,
        "zones.gpkg",
        "zones",
        "POLYGON",
        ", damage REAL",
        &format!("INSERT INTO zones VALUES (1, {}, 0.5);", square_geom()),
    );
    // Each is read without a log first, so only the log makes the difference.
    let all = |extra: &[&str]| {
        let mut a = vec!["--roads", roads.to_str().unwrap()];
        a.extend_from_slice(extra);
        let out = plan_ok(d, &a);
        std::fs::remove_dir_all(out).unwrap();
    };
    all(&["--sites", &s(&sites), "--damage-zones", &s(&zones)]);
    for (p, suffix, args) in [
        (&roads, "-wal", vec![]),
        (&roads, "-journal", vec![]),
        (&sites, "-wal", vec!["--sites".to_string(), s(&sites)]),
        (
            &zones,
            "-wal",
            vec!["--damage-zones".to_string(), s(&zones)],
        ),
    ] {
        beside(p, suffix, &[7u8; 4096]);
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let name = format!("{}{suffix}", p.file_name().unwrap().to_string_lossy());
        plan_fails(&roads, &args, &[&name, "4096 bytes", "close the program"]);
        beside(p, suffix, b"");
    }
    // An empty log (what a checkpoint that truncates leaves) is no obstacle.
    all(&[]);
});

case!(gpkg_field_stored_as_binary, |d| {
    // A damage or a priority stored as a BLOB would read as "no value" and take the default.
    let roads = gpkg(
        d,
        "roads.gpkg",
        "roads",
        "LINESTRING",
        ", damage BLOB",
        &format!("INSERT INTO roads VALUES (1, {}, X'3130');", line_geom()),
    );
    plan_fails(
        &roads,
        &[],
        &["roads.gpkg", "feature 0", "\"damage\"", "binary data"],
    );
    let good = roads_ok(d);
    let sites = gpkg(
        d,
        "sites.gpkg",
        "sites",
        "POINT",
        ", site_id TEXT, priority BLOB",
        &format!(
            "INSERT INTO sites VALUES (1, {}, 'a', 2), (2, {}, 'b', X'02');",
            point_geom(0.0),
            point_geom(0.001)
        ),
    );
    plan_fails(
        &good,
        &["--sites", &s(&sites)],
        &["sites.gpkg", "feature 1", "\"priority\"", "binary data"],
    );
});

case!(layers_with_nothing_in_them, |d| {
    // Sites, damage zones and field reports with no features: a plan for nothing, or a plan
    // that treats every road as intact, would look like an answer; each is refused.
    let roads = roads_ok(d);
    let empty = file(d, "empty.geojson", fc(&[]));
    let header = file(d, "header.csv", "site_id,lon,lat\n");
    for (flag, p) in [
        ("--sites", &empty),
        ("--sites", &header),
        ("--damage-zones", &empty),
        ("--damage-points", &empty),
    ] {
        let name = p.file_name().unwrap().to_string_lossy().to_string();
        plan_fails(&roads, &[flag, &s(p)], &[&name, "holds no"]);
    }
    // Zones whose geometries are all empty: refused like a zone without a geometry.
    let zone = |coords: &str, kind: &str| {
        format!(
            r#"{{"type":"Feature","properties":{{"damage":0.5}},"geometry":{{"type":"{kind}","coordinates":{coords}}}}}"#
        )
    };
    for (name, z) in [
        ("polygon.geojson", zone("[]", "Polygon")),
        ("multi.geojson", zone("[]", "MultiPolygon")),
    ] {
        let p = file(d, name, fc(&[&z]));
        plan_fails(&roads, &["--damage-zones", &s(&p)], &[name, "feature 0"]);
    }
    let zones = gpkg(
        d,
        "zones.gpkg",
        "zones",
        "POLYGON",
        ", damage REAL",
        &format!("INSERT INTO zones VALUES (1, {}, 0.5);", geom(3, &[0], &[])),
    );
    plan_fails(
        &roads,
        &["--damage-zones", &s(&zones)],
        &["zones.gpkg", "empty"],
    );
    // A field report whose Point has no position.
    let r = file(
        d,
        "reports.geojson",
        fc(&[
            r#"{"type":"Feature","properties":{"damage":1},"geometry":{"type":"Point","coordinates":[]}}"#,
        ]),
    );
    plan_fails(
        &roads,
        &["--damage-points", &s(&r)],
        &["reports.geojson", "feature 0"],
    );
});

case!(csv_column_named_twice, |d| {
    // The position would come from the first `lon` and the attribute written from the second.
    let p = file(d, "sites.csv", "site_id,lon,lat,lon\na,0,0,99\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["sites.csv", "\"lon\" twice", "columns 2 and 4"],
    );
    // Spaces around a name do not make it another column.
    let p = file(d, "spaced.csv", "site_id, lat,lon,lat \na,0,0,0\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["spaced.csv", "\"lat\" twice"],
    );
});
