//! The bad-input catalogue, part for file formats' corners (docs/bad-inputs.md lists every case):
//! foreign readers' errors as plain messages, zip compression methods, long lists, GeoPackage
//! blobs, and CRS hints that name the option of the layer's kind.
//!
//! Layouts: ESRI Shapefile Technical Description (1998); APPNOTE.TXT 6.3 (zip headers); OGC
//! GeoPackage Encoding Standard 1.3 §2.1.3 (geometry blobs); ISO 19125-1 §8.2 and ISO/IEC
//! 13249-3 (WKB type codes).

mod common;
use common::bad::*;
use common::zipped::*;
use common::*;
use std::path::{Path, PathBuf};

/// A GeoPackage with a WGS84 layer `sites` of points (`site_id` TEXT) holding `rows` (SQL values).
fn gpkg_sites(d: &Path, name: &str, rows: &[String]) -> PathBuf {
    let values: Vec<String> = rows
        .iter()
        .enumerate()
        .map(|(i, g)| format!("({}, {g}, 'S{i}')", i + 1))
        .collect();
    let layer = GpkgLayer {
        table: "sites",
        kind: "GEOMETRY",
        srs_id: 4326,
        columns: ", site_id TEXT",
    };
    let rows = format!("INSERT INTO sites VALUES {};", values.join(", "));
    gpkg_with(d, name, &[layer], &rows)
}

/// A geometry blob: GeoPackage header (little-endian, no envelope, srs 4326), then a
/// little-endian WKB of type `code` with `body` after its type code.
fn blob(code: u32, body: &[u8]) -> String {
    let mut b = b"GP\x00\x01".to_vec();
    b.extend_from_slice(&4326i32.to_le_bytes());
    b.push(1);
    b.extend_from_slice(&code.to_le_bytes());
    b.extend_from_slice(body);
    format!(
        "X'{}'",
        b.iter().map(|x| format!("{x:02X}")).collect::<String>()
    )
}

fn xy(x: f64, y: f64) -> Vec<u8> {
    [x.to_le_bytes(), y.to_le_bytes()].concat()
}

/// Sets the compression method of every member of `zip` (APPNOTE.TXT 6.3 §4.4.5: 2 bytes at
/// offset 8 of a local header, 10 of a central directory header).
fn set_method(zip: &Path, method: u16) {
    let mut b = std::fs::read(zip).unwrap();
    for (sig, at) in [(b"PK\x03\x04", 8), (b"PK\x01\x02", 10)] {
        let mut i = 0;
        while let Some(k) = b[i..].windows(4).position(|w| w == sig) {
            let p = i + k;
            b[p + at..p + at + 2].copy_from_slice(&method.to_le_bytes());
            i = p + 4;
        }
    }
    std::fs::write(zip, b).unwrap();
}

case!(dbf_numeric_field_holding_text, |d| {
    // A Numeric field whose value is text: the field is named, no reader's dump.
    let roads = shapefile_roads(d, "roads.shp", &two_roads());
    let dbf = roads.with_extension("dbf");
    let mut b = std::fs::read(&dbf).unwrap();
    // Retype the field `name` (first descriptor at 32; its type byte at 11) as Numeric.
    b[32 + 11] = b'N';
    std::fs::write(&dbf, b).unwrap();
    plan_fails(
        &roads,
        &["--whole-network"],
        &[
            "roads.dbf",
            "feature 0",
            "field \"name\"",
            "\"Road 0\"",
            "not a number",
        ],
    );
    let o = run(&["plan", "--roads", &s(&roads), "--out", &s(&d.join("o"))]);
    let m = stderr(&o);
    assert!(
        !m.contains("Error {") && !m.contains("ParseFloatError") && !m.contains("kind:"),
        "{m}"
    );
});

case!(shapefile_members_empty_or_truncated, |d| {
    // An empty .shx, .shp or .dbf is named, with its size, never "failed to fill whole buffer".
    // Each variant spoils its own copy of the two roads, in a folder of its own.
    let roads_in = |folder: &str| {
        let sub = d.join(folder);
        std::fs::create_dir(&sub).unwrap();
        shapefile_roads(&sub, "roads.shp", &two_roads())
    };
    for (ext, keep) in [("shx", 0usize), ("shp", 50), ("dbf", 10)] {
        let roads = roads_in(ext);
        let member = roads.with_extension(ext);
        let b = std::fs::read(&member).unwrap();
        std::fs::write(&member, &b[..keep]).unwrap();
        plan_fails(
            &roads,
            &[],
            &[
                &format!("roads.{ext}"),
                &format!("holds {keep} byte(s)"),
                "empty or truncated",
            ],
        );
    }
    // A .shx of its header alone, whose header declares the index that should follow.
    let roads = roads_in("header_only");
    let shx = roads.with_extension("shx");
    let b = std::fs::read(&shx).unwrap();
    std::fs::write(&shx, &b[..100]).unwrap();
    plan_fails(
        &roads,
        &[],
        &["roads.shx", "declares 116 bytes", "holds 100", "truncated"],
    );
});

case!(zip_member_packed_with_bzip2, |d| {
    // Method 12 (bzip2), 14 (LZMA): named, with how to re-zip, never "corrupt".
    let roads = shapefile_roads(d, "roads.shp", &two_roads());
    for (method, name) in [(12u16, "Bzip2"), (14, "Lzma")] {
        let z = zip_owned(d, &format!("m{method}.zip"), &set_entries(&roads, ""));
        set_method(&z, method);
        plan_fails(
            &z,
            &[],
            &[
                &format!("m{method}.zip"),
                name,
                &format!("zip method {method}"),
                "re-zip",
            ],
        );
    }
});

case!(zip_of_many_sets_gives_one_short_line, |d| {
    // 3,000 sets: the message lists 20 and says how many more.
    let entries: Vec<(String, Vec<u8>)> = (0..3000)
        .map(|i| (format!("s{i}.shp"), Vec::new()))
        .collect();
    let z = zip_owned(d, "many.zip", &entries);
    let o = run(&["check", "--roads", &s(&z), "--out", &s(&d.join("o"))]);
    let m = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{m}");
    assert!(
        m.contains("holds 3000 Shapefile sets") && m.contains("and 2980 more"),
        "{m}"
    );
    assert!(m.len() < 1000, "{} bytes", m.len());
});

case!(gpkg_site_point_of_nan, |d| {
    // NaN ordinates are GeoPackage's empty point (§2.1.3.1.2): the feature is named.
    let p = gpkg_sites(
        d,
        "nan.gpkg",
        &[blob(1, &xy(0.0, 0.0)), blob(1, &xy(f64::NAN, f64::NAN))],
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["nan.gpkg", "feature 1", "field \"geom\"", "empty"],
    );
});

case!(gpkg_curve_polygon, |d| {
    // ISO/IEC 13249-3 type 10: named as a CurvePolygon, with the advice to linearise it.
    let p = gpkg_sites(d, "curve.gpkg", &[blob(10, &0u32.to_le_bytes())]);
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["curve.gpkg", "feature 0", "CurvePolygon", "linearise"],
    );
});

case!(gpkg_bytes_after_the_geometry, |d| {
    let mut body = xy(0.0005, 0.0001);
    body.extend_from_slice(&[0xAB; 5]);
    let p = gpkg_sites(d, "extra.gpkg", &[blob(1, &xy(0.0, 0.0)), blob(1, &body)]);
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "extra.gpkg",
            "feature 1",
            "field \"geom\"",
            "5 byte(s) follow the end of the Point",
        ],
    );
});

case!(huge_coordinate_in_a_message_stays_short, |d| {
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 1e308, 0.0)]));
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&sites)],
        &["sites.geojson", "feature 0", "(1e308, 0)", "--sites-crs"],
    );
});

case!(crs_hints_name_the_option_of_the_layer_kind, |d| {
    // A sites Shapefile without .prj asks for --sites-crs, a zones one for --zones-crs; each
    // option then reads the layer.
    let roads = roads_ok(d);
    let pts = shapefile_roads(d, "lines.shp", &two_roads());
    std::fs::remove_file(pts.with_extension("prj")).unwrap();
    plan_fails(
        &roads,
        &["--sites", &s(&pts)],
        &["lines.shp", "--sites-crs EPSG:NNNN"],
    );
    plan_fails(
        &roads,
        &["--damage-zones", &s(&pts)],
        &["lines.shp", "--zones-crs EPSG:NNNN"],
    );
    // A .prj of a local grid beside the second of two road layers: the hint names --crs, and
    // --crs then reads that layer.
    let second = shapefile_roads(d, "east.shp", &[vec![[0.002, 0.0], [0.003, 0.0]]]);
    std::fs::write(second.with_extension("prj"), "LOCAL_CS[\"my grid\"]").unwrap();
    plan_fails(
        &roads,
        &["--roads", &s(&second)],
        &["east.prj", "my grid", "--crs EPSG:NNNN"],
    );
    let out = plan_ok(
        d,
        &[
            "--roads",
            &s(&roads),
            "--roads",
            &s(&second),
            "--crs",
            "EPSG:4326",
            "--whole-network",
        ],
    );
    assert_eq!(read_json(&out.join("summary.json"))["counts"]["edges"], 2);
});

case!(crs_member_of_sites_and_zones, |d| {
    // A sites or zones GeoJSON in UTM with its crs member is read in that CRS (as a road layer's
    // is); a member naming no EPSG code asks for the layer kind's option. The UTM position is
    // pyproj 3.7.2's (Transformer EPSG:4326 → EPSG:32631) for (0.0005°, 0.0001°): (166077.157,
    // 11.068); the road runs from x 166021.4 to 166132.9 at y 0.
    let roads = roads_ok(d);
    let utm = |props: &str, kind: &str, coords: &str, crs: &str| {
        format!(
            r#"{{"type":"FeatureCollection","crs":{crs},"features":[{{"type":"Feature","properties":{props},"geometry":{{"type":"{kind}","coordinates":{coords}}}}}]}}"#
        )
    };
    let named = r#"{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::32631"}}"#;
    let sites = file(
        d,
        "sites.geojson",
        utm(r#"{"site_id":"A"}"#, "Point", "[166077.157, 11.068]", named),
    );
    let out = plan_ok(d, &["--roads", &s(&roads), "--sites", &s(&sites)]);
    let p = read_json(&out.join("sites.geojson"))["features"][0]["geometry"]["coordinates"].clone();
    std::fs::remove_dir_all(&out).unwrap();
    let (lon, lat) = (p[0].as_f64().unwrap(), p[1].as_f64().unwrap());
    assert!(
        (lon - 0.0005).abs() < 2e-8 && (lat - 0.0001).abs() < 2e-8,
        "{p}"
    );
    let local = r#"{"type":"name","properties":{"name":"my grid"}}"#;
    let bad = file(
        d,
        "grid.geojson",
        utm(r#"{"site_id":"A"}"#, "Point", "[1, 1]", local),
    );
    plan_fails(
        &roads,
        &["--sites", &s(&bad)],
        &["grid.geojson", "my grid", "--sites-crs EPSG:NNNN"],
    );
    let zone =
        "[[[165000, -1000], [168000, -1000], [168000, 1000], [165000, 1000], [165000, -1000]]]";
    let zones = file(
        d,
        "zones.geojson",
        utm(r#"{"damage":1}"#, "Polygon", zone, named),
    );
    let out = plan_ok(
        d,
        &[
            "--roads",
            &s(&roads),
            "--damage-zones",
            &s(&zones),
            "--whole-network",
        ],
    );
    assert!(
        read_json(&out.join("summary.json"))["total_cost"]
            .as_f64()
            .unwrap()
            > 0.0
    );
    std::fs::remove_dir_all(&out).unwrap();
    let zones = file(
        d,
        "gz.geojson",
        utm(r#"{"damage":1}"#, "Polygon", zone, local),
    );
    plan_fails(
        &roads,
        &["--damage-zones", &s(&zones)],
        &["gz.geojson", "--zones-crs EPSG:NNNN"],
    );
});

case!(crs_member_as_a_string, |d| {
    // "crs": "EPSG:4326" names its code plainly: read as EPSG:4326, not "names no EPSG code".
    let roads = file(
        d,
        "roads.geojson",
        format!(r#"{{"type":"FeatureCollection","crs":"EPSG:4326","features":[{OK_LINE}]}}"#),
    );
    let out = plan_ok(d, &["--roads", &s(&roads), "--whole-network"]);
    assert_eq!(read_json(&out.join("summary.json"))["counts"]["edges"], 1);
});

case!(roads_layer_picks_where_several, |d| {
    // With several --roads, --roads-layer chooses within inputs holding several layers; a zip
    // of one set is read whole. A name that chooses within no input is refused.
    let roads = shapefile_roads(d, "roads.shp", &two_roads());
    let zip = zip_owned(d, "roads.zip", &set_entries(&roads, ""));
    let line = |x: f64| {
        let mut body = 2u32.to_le_bytes().to_vec();
        body.extend(xy(x, 0.0));
        body.extend(xy(x + 0.001, 0.0));
        blob(2, &body)
    };
    let roads_layer = |table| GpkgLayer {
        table,
        kind: "LINESTRING",
        srs_id: 4326,
        columns: "",
    };
    let gpkg = gpkg_with(
        d,
        "two.gpkg",
        &[roads_layer("Roads1"), roads_layer("Roads2")],
        &format!(
            "INSERT INTO Roads1 VALUES (1, {});
             INSERT INTO Roads2 VALUES (1, {}), (2, {});",
            line(0.01),
            line(0.002),
            line(0.003)
        ),
    );
    let out = plan_ok(
        d,
        &[
            "--roads",
            &s(&zip),
            "--roads",
            &s(&gpkg),
            "--roads-layer",
            "Roads2",
            "--whole-network",
        ],
    );
    // Two roads from the zip, two from Roads2, none from Roads1.
    assert_eq!(read_json(&out.join("summary.json"))["counts"]["edges"], 4);
    std::fs::remove_dir_all(&out).unwrap();
    let other = shapefile_roads(d, "other.shp", &[vec![[0.004, 0.0], [0.005, 0.0]]]);
    plan_fails(
        &zip,
        &["--roads", &s(&other), "--roads-layer", "Roads2"],
        &["--roads-layer", "\"Roads2\" chose no layer"],
    );
});
