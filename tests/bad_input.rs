//! The bad-input catalogue (docs/bad-inputs.md lists every case): malformed and hostile inputs, each
//! run end to end. A failing case must exit 2 with one message naming the file (and feature and
//! field where there is one), never panic, and leave no output behind; every case checks that its
//! inputs are unchanged (content and modification time). Cases that are hostile but valid (the
//! antimeridian, the poles, a 10-million-vertex line) must succeed with correct results.

mod common;
use common::*;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

const OK_LINE: &str = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;

fn fc(features: &[&str]) -> String {
    format!(
        r#"{{"type":"FeatureCollection","features":[{}]}}"#,
        features.join(",")
    )
}

fn file(d: &Path, name: &str, bytes: impl AsRef<[u8]>) -> PathBuf {
    let p = d.join(name);
    std::fs::write(&p, bytes).unwrap();
    p
}

fn s(p: &Path) -> String {
    p.to_str().unwrap().to_string()
}

/// Content and modification time of every file under `d` except the folder `skip`.
fn snapshot(d: &Path, skip: &Path) -> BTreeMap<PathBuf, (Vec<u8>, std::time::SystemTime)> {
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
            if m.is_dir() {
                stack.push(p);
            } else if m.is_file() {
                out.insert(
                    p.clone(),
                    (std::fs::read(&p).unwrap(), m.modified().unwrap()),
                );
            }
        }
    }
    out
}

/// Runs reknit with `args` in the case folder `d` (output folder `out`) and checks: exit code 2,
/// every needle in the message, no panic, no output folder left (or, when `out` existed before,
/// the same entries as before), inputs unchanged.
fn fails_with(d: &Path, out: &Path, args: &[String], needles: &[&str]) {
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
    assert!(before == snapshot(d, out), "an input was modified");
}

/// `plan --roads ROADS --out OUT EXTRA…` fails with the needles.
fn plan_fails(roads: &Path, extra: &[&str], needles: &[&str]) {
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
fn plan_ok(d: &Path, args: &[&str]) -> PathBuf {
    let out = d.join("out");
    let before = snapshot(d, &out);
    let mut all = vec!["plan", "--out", out.to_str().unwrap(), "-q"];
    all.extend_from_slice(args);
    let o = run(&all);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(before == snapshot(d, &out), "an input was modified");
    out
}

fn roads_ok(d: &Path) -> PathBuf {
    file(d, "roads.geojson", fc(&[OK_LINE]))
}

fn site_feature(id: &str, lon: f64, lat: f64) -> String {
    format!(
        r#"{{"type":"Feature","properties":{{"site_id":"{id}","priority":1}},"geometry":{{"type":"Point","coordinates":[{lon},{lat}]}}}}"#
    )
}

/// A polyline Shapefile set (WGS84 .prj) with a `name` field.
fn shapefile_roads(d: &Path, name: &str, lines: &[Vec<[f64; 2]>]) -> PathBuf {
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
    std::fs::write(
        p.with_extension("prj"),
        r#"GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]"#,
    )
    .unwrap();
    p
}

fn two_roads() -> Vec<Vec<[f64; 2]>> {
    vec![
        vec![[0.0, 0.0], [0.001, 0.0]],
        vec![[0.001, 0.0], [0.002, 0.0]],
    ]
}

macro_rules! case {
    ($name:ident, |$d:ident| $body:block) => {
        #[test]
        fn $name() {
            let tmp = tmp();
            let $d: &Path = tmp.path();
            $body
        }
    };
}

// ---- Road layers: structure ----

case!(not_json, |d| {
    plan_fails(
        &file(d, "roads.geojson", "this is not json"),
        &[],
        &["roads.geojson", "not valid GeoJSON", "line 1"],
    );
});

case!(empty_file, |d| {
    plan_fails(&file(d, "roads.geojson", ""), &[], &["roads.geojson"]);
});

case!(binary_garbage, |d| {
    let bytes: Vec<u8> = (0..4096u32)
        .map(|i| (i.wrapping_mul(2654435761) >> 13) as u8)
        .collect();
    plan_fails(
        &file(d, "roads.geojson", bytes),
        &[],
        &["roads.geojson", "not valid GeoJSON"],
    );
});

case!(truncated_mid_feature, |d| {
    let full = fc(&[OK_LINE, OK_LINE]);
    let p = file(d, "cut.geojson", &full[..full.len() - 20]);
    plan_fails(&p, &[], &["cut.geojson", "feature 1", "not valid GeoJSON"]);
});

case!(a_single_feature_not_a_collection, |d| {
    let p = file(d, "single.geojson", OK_LINE);
    plan_fails(
        &p,
        &[],
        &[
            "single.geojson",
            "not a GeoJSON FeatureCollection",
            "\"Feature\"",
        ],
    );
});

case!(a_json_array, |d| {
    let p = file(d, "array.geojson", "[1, 2, 3]");
    plan_fails(
        &p,
        &[],
        &["array.geojson", "not a GeoJSON FeatureCollection", "array"],
    );
});

case!(no_type_member, |d| {
    let p = file(d, "notype.geojson", r#"{"features":[]}"#);
    plan_fails(&p, &[], &["notype.geojson", "no \"type\""]);
});

case!(deeply_nested_json, |d| {
    // 200,000 nested arrays as coordinates: refused without recursion (no stack overflow).
    let deep = format!(
        r#"{{"type":"Feature","properties":{{}},"geometry":{{"type":"LineString","coordinates":{}{}}}}}"#,
        "[".repeat(200_000),
        "]".repeat(200_000)
    );
    let p = file(d, "deep.geojson", fc(&[&deep]));
    plan_fails(&p, &[], &["deep.geojson", "feature 0", "nested"]);
});

case!(deeply_nested_property_is_skipped, |d| {
    // The same depth inside a property nobody asked for is skipped by the scanner, not parsed.
    let deep = format!(
        r#"{{"type":"Feature","properties":{{"x":{}{}}},"geometry":{{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}}}"#,
        "[".repeat(200_000),
        "]".repeat(200_000)
    );
    let p = file(d, "deep.geojson", fc(&[&deep]));
    let out = plan_ok(d, &["--roads", &s(&p), "--whole-network"]);
    assert_eq!(read_json(&out.join("summary.json"))["counts"]["edges"], 1);
});

case!(nan_coordinate, |d| {
    // NaN is not a JSON number (RFC 8259 §6), so the file is not GeoJSON.
    let nan = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[NaN,1]]}}"#;
    plan_fails(
        &file(d, "nan.geojson", fc(&[OK_LINE, nan])),
        &[],
        &["nan.geojson", "feature 1"],
    );
});

case!(number_too_large_for_a_double, |d| {
    let huge = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[1e400,1]]}}"#;
    plan_fails(
        &file(d, "huge.geojson", fc(&[huge])),
        &[],
        &["huge.geojson", "feature 0", "out of range"],
    );
});

case!(longitude_out_of_range, |d| {
    let bad = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[400,1]]}}"#;
    let p = file(d, "range.geojson", fc(&[OK_LINE, OK_LINE, bad]));
    plan_fails(
        &p,
        &[],
        &[
            "range.geojson",
            "feature 2",
            "\"geometry\"",
            "400",
            "longitude/latitude",
        ],
    );
});

case!(latitude_out_of_range, |d| {
    let bad = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[1,-91]]}}"#;
    plan_fails(
        &file(d, "lat.geojson", fc(&[bad])),
        &[],
        &["lat.geojson", "feature 0", "-91"],
    );
});

case!(coordinates_as_text, |d| {
    let bad = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[["0","0"],["1","1"]]}}"#;
    plan_fails(
        &file(d, "text.geojson", fc(&[bad])),
        &[],
        &["text.geojson", "feature 0"],
    );
});

case!(line_with_one_position, |d| {
    // RFC 7946 §3.1.4: a LineString has two or more positions.
    let one = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0]]}}"#;
    let p = file(d, "one.geojson", fc(&[OK_LINE, one]));
    plan_fails(
        &p,
        &[],
        &["one.geojson", "feature 1", "1 position", "at least 2"],
    );
});

case!(line_with_no_positions, |d| {
    let empty =
        r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[]}}"#;
    let p = file(d, "empty.geojson", fc(&[empty, OK_LINE]));
    plan_fails(&p, &[], &["empty.geojson", "feature 0", "no positions"]);
});

case!(multiline_part_with_one_position, |d| {
    let multi = r#"{"type":"Feature","properties":{},"geometry":{"type":"MultiLineString","coordinates":[[[0,0],[1,1]],[[2,2]]]}}"#;
    plan_fails(
        &file(d, "multi.geojson", fc(&[multi])),
        &[],
        &["multi.geojson", "feature 0", "line 1"],
    );
});

case!(unknown_geometry_type, |d| {
    let odd = r#"{"type":"Feature","properties":{},"geometry":{"type":"Curve","coordinates":[[0,0],[1,1]]}}"#;
    plan_fails(
        &file(d, "odd.geojson", fc(&[odd])),
        &[],
        &["odd.geojson", "feature 0", "Curve"],
    );
});

case!(no_features, |d| {
    plan_fails(
        &file(d, "none.geojson", fc(&[])),
        &[],
        &["none.geojson", "no road lines", "empty"],
    );
});

case!(only_points, |d| {
    let pt =
        r#"{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0]}}"#;
    let p = file(d, "points.geojson", fc(&[pt, pt]));
    plan_fails(
        &p,
        &[],
        &["points.geojson", "no road lines", "2 × not a line (Point)"],
    );
});

case!(non_utf8_text_field, |d| {
    // RFC 8259 §8.1: JSON text is UTF-8; a Latin-1 byte in a road name is refused by feature.
    let named = fc(&[
        OK_LINE,
        r#"{"type":"Feature","properties":{"name":"Rue de la For@t"},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#,
    ]);
    let bytes: Vec<u8> = named
        .bytes()
        .map(|b| if b == b'@' { 0xEA } else { b })
        .collect();
    plan_fails(
        &file(d, "latin1.geojson", bytes),
        &[],
        &["latin1.geojson", "feature 1", "UTF-8"],
    );
});

case!(unterminated_100_mb_single_line, |d| {
    // One line of 100 MB: a road name that never ends. Read in bounded chunks, refused by feature.
    let mut bytes =
        br#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":""#
            .to_vec();
    bytes.resize(bytes.len() + 100 * 1024 * 1024, b'x');
    plan_fails(
        &file(d, "long.geojson", bytes),
        &[],
        &["long.geojson", "feature 0"],
    );
});

case!(missing_file, |d| {
    let out = d.join("out");
    let args = [
        "plan",
        "--roads",
        &s(&d.join("missing.geojson")),
        "--out",
        &s(&out),
    ]
    .map(String::from);
    fails_with(d, &out, &args, &["missing.geojson", "cannot read"]);
});

case!(a_folder_as_the_road_layer, |d| {
    let dir = d.join("roads.geojson");
    std::fs::create_dir(&dir).unwrap();
    let out = d.join("out");
    let args = ["plan", "--roads", &s(&dir), "--out", &s(&out)].map(String::from);
    fails_with(d, &out, &args, &["cannot read", "directory"]);
});

// ---- Road layers: attributes and coordinate systems ----

case!(damage_as_text, |d| {
    let bad = r#"{"type":"Feature","properties":{"dmg":"heavy"},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let p = file(d, "dmg.geojson", fc(&[OK_LINE, bad]));
    plan_fails(
        &p,
        &["--damage-field", "dmg"],
        &[
            "dmg.geojson",
            "feature 1",
            "field \"dmg\"",
            "heavy",
            "not a number",
        ],
    );
});

case!(damage_as_boolean, |d| {
    let bad = r#"{"type":"Feature","properties":{"damage":true},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    plan_fails(
        &file(d, "bool.geojson", fc(&[bad])),
        &[],
        &["bool.geojson", "feature 0", "field \"damage\"", "true"],
    );
});

case!(damage_too_large, |d| {
    let bad = r#"{"type":"Feature","properties":{"damage":5000},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    plan_fails(
        &file(d, "big.geojson", fc(&[bad])),
        &[],
        &["big.geojson", "feature 0", "5000", "largest"],
    );
});

case!(named_field_in_no_feature, |d| {
    let f = r#"{"type":"Feature","properties":{"state":"debris","highway":"primary"},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let p = file(d, "fields.geojson", fc(&[f]));
    plan_fails(
        &p,
        &["--damage-field", "dmg"],
        &[
            "fields.geojson",
            "\"dmg\"",
            "no feature has this property",
            "state, highway",
        ],
    );
});

case!(crs_member_without_epsg_code, |d| {
    let p = file(
        d,
        "crs.geojson",
        format!(
            r#"{{"type":"FeatureCollection","crs":{{"type":"name","properties":{{"name":"LOCAL_GRID_7"}}}},"features":[{OK_LINE}]}}"#
        ),
    );
    plan_fails(
        &p,
        &[],
        &["crs.geojson", "LOCAL_GRID_7", "no EPSG code", "--crs"],
    );
});

case!(unknown_epsg_code, |d| {
    plan_fails(&roads_ok(d), &["--crs", "EPSG:99999"], &["EPSG:99999"]);
});

case!(projected_coordinates_read_as_degrees, |d| {
    let proj = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[530000,180000],[530100,180000]]}}"#;
    let p = file(d, "projected.geojson", fc(&[proj]));
    plan_fails(
        &p,
        &[],
        &["projected.geojson", "feature 0", "530000", "--crs"],
    );
});

case!(cost_table_not_toml, |d| {
    let t = file(d, "costs.toml", "[categories\ndebris = ");
    plan_fails(&roads_ok(d), &["--cost-table", &s(&t)], &["costs.toml"]);
});

case!(cost_table_value_not_a_factor, |d| {
    let t = file(d, "costs.toml", "[categories]\ndebris = \"maybe\"\n");
    plan_fails(
        &roads_ok(d),
        &["--cost-table", &s(&t)],
        &["costs.toml", "debris", "maybe"],
    );
});

// ---- Settings ----

case!(negative_snap, |d| {
    plan_fails(&roads_ok(d), &["--snap=-1"], &["--snap", "-1"]);
});

case!(snap_too_large, |d| {
    plan_fails(&roads_ok(d), &["--snap", "5000"], &["--snap", "5000"]);
});

case!(infinite_default_damage, |d| {
    plan_fails(
        &roads_ok(d),
        &["--default-damage", "inf"],
        &["--default-damage"],
    );
});

case!(negative_budget, |d| {
    let sites = file(d, "sites.geojson", fc(&[&site_feature("a", 0.0, 0.0)]));
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&sites), "--budget=-5"],
        &["--budget", "-5"],
    );
});

case!(zero_crew_capacity, |d| {
    plan_fails(
        &roads_ok(d),
        &["--crew-capacity", "0"],
        &["--crew-capacity"],
    );
});

case!(backup_links_without_sites, |d| {
    plan_fails(
        &roads_ok(d),
        &["--redundancy"],
        &["--redundancy", "--sites"],
    );
});

// ---- Sites ----

case!(duplicate_site_ids, |d| {
    let p = file(
        d,
        "dup.geojson",
        fc(&[&site_feature("a", 0.0, 0.0), &site_feature("a", 0.001, 0.0)]),
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["dup.geojson", "feature 1", "\"a\"", "twice"],
    );
});

case!(hub_not_among_the_sites, |d| {
    let p = file(d, "sites.geojson", fc(&[&site_feature("a", 0.0, 0.0)]));
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p), "--hub", "nope"],
        &["--hub", "nope", "site ids: a"],
    );
});

case!(sites_as_lines, |d| {
    let p = file(d, "lines.geojson", fc(&[OK_LINE]));
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["lines.geojson", "feature 0", "Points", "LineString"],
    );
});

case!(sites_csv_without_coordinate_columns, |d| {
    let p = file(d, "nocols.csv", "name,east,north\nx,1,2\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["nocols.csv", "longitude", "name, east, north"],
    );
});

case!(sites_csv_coordinate_as_text, |d| {
    let p = file(d, "text.csv", "id,lon,lat\nx,abc,2\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["text.csv", "feature 0", "\"lon\"", "abc"],
    );
});

case!(sites_csv_not_utf8, |d| {
    let p = file(d, "latin1.csv", b"id,name,lon,lat\nx,Caf\xe9,0,0\n");
    plan_fails(&roads_ok(d), &["--sites", &s(&p)], &["latin1.csv", "UTF-8"]);
});

case!(empty_sites_file, |d| {
    let p = file(d, "sites.csv", "");
    plan_fails(&roads_ok(d), &["--sites", &s(&p)], &["sites.csv"]);
});

case!(site_longitude_out_of_range, |d| {
    let p = file(d, "far.geojson", fc(&[&site_feature("a", 200.0, 0.0)]));
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["far.geojson", "feature 0", "200"],
    );
});

case!(attachment_distance_too_large, |d| {
    let p = file(d, "sites.geojson", fc(&[&site_feature("a", 0.0, 0.0)]));
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p), "--max-attach", "1e9"],
        &["--max-attach"],
    );
});

// ---- Damage zones and field reports ----

fn zone_fails(d: &Path, ring: &str, needles: &[&str]) {
    let z = file(
        d,
        "zones.geojson",
        fc(&[&format!(
            r#"{{"type":"Feature","properties":{{"damage":0.5}},"geometry":{{"type":"Polygon","coordinates":[{ring}]}}}}"#
        )]),
    );
    let mut all = vec!["zones.geojson", "feature 0"];
    all.extend_from_slice(needles);
    plan_fails(&roads_ok(d), &["--damage-zones", &s(&z)], &all);
}

case!(zero_area_zone, |d| {
    zone_fails(d, "[[0,0],[0.001,0],[0.002,0],[0,0]]", &["zero area"]);
});

case!(unclosed_zone_ring, |d| {
    zone_fails(
        d,
        "[[0,0],[0.001,0],[0.001,0.001],[0,0.001]]",
        &["not closed"],
    );
});

case!(self_intersecting_zone, |d| {
    zone_fails(
        d,
        "[[0,0],[0.001,0.001],[0.001,0],[0,0.001],[0,0]]",
        &["not valid"],
    );
});

case!(zone_damage_as_text, |d| {
    let z = file(
        d,
        "zones.geojson",
        fc(&[
            r#"{"type":"Feature","properties":{"damage":"wet"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[0.001,0],[0.001,0.001],[0,0]]]}}"#,
        ]),
    );
    plan_fails(
        &roads_ok(d),
        &["--damage-zones", &s(&z)],
        &["zones.geojson", "feature 0", "wet"],
    );
});

case!(damage_report_not_a_point, |d| {
    let r = file(d, "reports.geojson", fc(&[OK_LINE]));
    plan_fails(
        &roads_ok(d),
        &["--damage-points", &s(&r)],
        &["reports.geojson", "feature 0"],
    );
});

// ---- Shapefile sets ----

case!(dbf_record_count_differs_from_shp, |d| {
    let p = shapefile_roads(d, "roads.shp", &two_roads());
    let one = d.join("one");
    std::fs::create_dir(&one).unwrap();
    let q = shapefile_roads(&one, "roads.shp", &two_roads()[..1]);
    std::fs::copy(q.with_extension("dbf"), p.with_extension("dbf")).unwrap();
    std::fs::remove_dir_all(&one).unwrap();
    plan_fails(&p, &[], &["roads", "record"]);
});

case!(truncated_shp, |d| {
    let p = shapefile_roads(d, "roads.shp", &two_roads());
    let bytes = std::fs::read(&p).unwrap();
    std::fs::write(&p, &bytes[..bytes.len() - 30]).unwrap();
    plan_fails(&p, &[], &["roads.shp"]);
});

case!(shapefile_of_points, |d| {
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let p = d.join("points.shp");
    let table =
        TableWriterBuilder::new().add_numeric_field(FieldName::try_from("v").unwrap(), 5, 1);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    let mut r = Record::default();
    r.insert("v".into(), FieldValue::Numeric(Some(1.0)));
    w.write_shape_and_record(&shapefile::Point::new(0.0, 0.0), &r)
        .unwrap();
    drop(w);
    std::fs::write(
        p.with_extension("prj"),
        std::fs::read(shapefile_roads(d, "x.shp", &two_roads()).with_extension("prj")).unwrap(),
    )
    .unwrap();
    plan_fails(&p, &[], &["points.shp", "Point"]);
});

case!(shapefile_without_dbf, |d| {
    let p = shapefile_roads(d, "roads.shp", &two_roads());
    std::fs::remove_file(p.with_extension("dbf")).unwrap();
    plan_fails(&p, &[], &["roads.dbf", "missing"]);
});

case!(non_utf8_text_in_dbf, |d| {
    // dBASE text is bytes in the file's code page; a Latin-1 name must not stop the plan.
    let p = shapefile_roads(d, "roads.shp", &two_roads());
    let mut dbf = std::fs::read(p.with_extension("dbf")).unwrap();
    let at = dbf.windows(6).position(|w| w == b"Road 0").unwrap();
    dbf[at + 1] = 0xF6;
    std::fs::write(p.with_extension("dbf"), dbf).unwrap();
    let out = plan_ok(d, &["--roads", &s(&p), "--whole-network"]);
    assert!(out.join("summary.json").exists());
});

// ---- Output folders ----

case!(output_path_is_a_file, |d| {
    let roads = roads_ok(d);
    let blocker = file(d, "a-file", "x");
    let args = ["plan", "--roads", &s(&roads), "--out", &s(&blocker)].map(String::from);
    fails_with(d, &d.join("none"), &args, &["a-file", "not a folder"]);
});

case!(output_path_inside_a_file, |d| {
    let roads = roads_ok(d);
    let blocker = file(d, "a-file", "x");
    let inside = blocker.join("out");
    let args = ["plan", "--roads", &s(&roads), "--out", &s(&inside)].map(String::from);
    fails_with(d, &inside, &args, &["cannot write"]);
});

case!(output_folder_holds_outputs_without_force, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    std::fs::create_dir(&out).unwrap();
    std::fs::write(out.join("summary.json"), "{}").unwrap();
    let args = ["plan", "--roads", &s(&roads), "--out", &s(&out)].map(String::from);
    fails_with(d, &out, &args, &["already holds outputs", "--force"]);
});

case!(output_folder_is_a_symbolic_link, |d| {
    let roads = roads_ok(d);
    let real = d.join("real");
    std::fs::create_dir(&real).unwrap();
    let link = d.join("out");
    std::os::unix::fs::symlink(&real, &link).unwrap();
    let args = ["plan", "--roads", &s(&roads), "--out", &s(&link)].map(String::from);
    fails_with(d, &link, &args, &["out", "symbolic link"]);
    assert!(listing(&real).is_empty());
});

case!(output_folder_is_the_input_folder, |d| {
    let data = d.join("data");
    std::fs::create_dir(&data).unwrap();
    let roads = file(&data, "roads.geojson", fc(&[OK_LINE]));
    let args = ["plan", "--roads", &s(&roads), "--out", &s(&data), "--force"].map(String::from);
    fails_with(d, &data, &args, &["--out", "roads.geojson", "input"]);
});

case!(output_folder_above_an_input, |d| {
    let data = d.join("data");
    std::fs::create_dir_all(data.join("layers")).unwrap();
    let roads = file(&data.join("layers"), "roads.geojson", fc(&[OK_LINE]));
    let args = ["plan", "--roads", &s(&roads), "--out", &s(&data)].map(String::from);
    fails_with(d, &data, &args, &["--out", "roads.geojson", "input"]);
});

case!(disk_full, |d| {
    // A 256 KiB tmpfs where the machine allows mounting one; the demo's outputs need more.
    let mnt = d.join("small");
    std::fs::create_dir(&mnt).unwrap();
    let m = std::process::Command::new("mount")
        .args([
            "-t",
            "tmpfs",
            "-o",
            "size=256k",
            "tmpfs",
            mnt.to_str().unwrap(),
        ])
        .output();
    if !m.as_ref().is_ok_and(|o| o.status.success()) {
        eprintln!("SKIP: cannot mount a small tmpfs here (not root, or not allowed)");
        return;
    }
    let out = mnt.join("out");
    let o = run(&["demo", "--out", out.to_str().unwrap(), "-q"]);
    let msg = stderr(&o);
    let left = listing(&mnt);
    let _ = std::process::Command::new("umount").arg(&mnt).status();
    assert_eq!(o.status.code(), Some(2), "{msg}");
    assert!(!msg.contains("panicked"), "{msg}");
    assert!(
        msg.contains("cannot write") && msg.contains("space"),
        "{msg}"
    );
    assert!(left.iter().all(|n| n == "out"), "left behind: {left:?}");
});

// ---- Hostile but valid: must succeed with correct results ----

case!(network_crossing_the_antimeridian, |d| {
    // Two roads meeting on the 180° meridian: one network, lengths the short way round
    // (geodesic over 0.002° of longitude at the equator, ≈ 222.6 m; from memory: 1° ≈ 111.32 km).
    let a = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[179.999,0],[180,0]]}}"#;
    let b = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[-180,0],[-179.999,0]]}}"#;
    let c = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[179.9995,0.0005],[-179.9995,0.0005]]}}"#;
    let p = file(d, "dateline.geojson", fc(&[a, b, c]));
    let out = plan_ok(d, &["--roads", &s(&p), "--whole-network"]);
    let net = read_fc(&out.join("network.geojson"));
    let total: f64 = net
        .features
        .iter()
        .map(|f| f.property("length_m").unwrap().as_f64().unwrap())
        .sum();
    assert!((total - 3.0 * 111.3195).abs() < 1.0, "total {total} m");
});

case!(sites_at_the_antimeridian_and_the_poles, |d| {
    let a = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[179.999,0],[-179.999,0]]}}"#;
    let p = file(d, "roads.geojson", fc(&[a]));
    let sites = file(
        d,
        "sites.geojson",
        fc(&[
            &site_feature("east", 180.0, 0.0001),
            &site_feature("west", -179.9995, -0.0001),
            &site_feature("north", 0.0, 90.0),
            &site_feature("south", 45.0, -90.0),
        ]),
    );
    let out = plan_ok(
        d,
        &["--roads", &s(&p), "--sites", &s(&sites), "--hub", "east"],
    );
    let rows = read_fc(&out.join("sites.geojson"));
    let status: BTreeMap<String, String> = rows
        .features
        .iter()
        .map(|f| {
            (
                f.property("site_id").unwrap().as_str().unwrap().into(),
                f.property("status").unwrap().as_str().unwrap().into(),
            )
        })
        .collect();
    assert_eq!(status["east"], "connected");
    assert_eq!(status["west"], "connected");
    assert_ne!(status["north"], "connected");
    assert_ne!(status["south"], "connected");
});

case!(duplicate_road_ids_are_kept_apart, |d| {
    let a = r#"{"type":"Feature","id":"R1","properties":{"damage":0.5},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let b = r#"{"type":"Feature","id":"R1","properties":{"damage":0.5},"geometry":{"type":"LineString","coordinates":[[0.001,0],[0.002,0]]}}"#;
    let p = file(d, "dup.geojson", fc(&[a, b]));
    let out = plan_ok(d, &["--roads", &s(&p), "--whole-network"]);
    let net = read_fc(&out.join("network.geojson"));
    let mut idx: Vec<i64> = net
        .features
        .iter()
        .map(|f| f.property("source_index").unwrap().as_i64().unwrap())
        .collect();
    idx.sort();
    assert_eq!(idx, vec![0, 1]);
});

case!(ten_million_vertex_line, |d| {
    // One LineString of 10,000,000 positions (about 240 MB of text) along the equator.
    use std::io::Write;
    let p = d.join("long.geojson");
    let mut w = std::io::BufWriter::new(std::fs::File::create(&p).unwrap());
    write!(w, r#"{{"type":"FeatureCollection","features":[{{"type":"Feature","properties":{{"damage":1}},"geometry":{{"type":"LineString","coordinates":["#).unwrap();
    let n = 10_000_000u64;
    for i in 0..n {
        let sep = if i == 0 { "" } else { "," };
        write!(w, "{sep}[{}.{:07},0]", i / 10_000_000, i % 10_000_000).unwrap();
    }
    write!(w, "]}}}}]}}").unwrap();
    drop(w);
    let out = plan_ok(d, &["--roads", &s(&p), "--whole-network", "--snap", "0"]);
    let summary = read_json(&out.join("summary.json"));
    let len = summary["repair_length_m"].as_f64().unwrap();
    // 0.9999999° of longitude on the equator: 111,319.49 m × 0.9999999 (from memory).
    assert!((len - 111_319.38).abs() < 5.0, "{len}");
});

#[test]
fn every_case_is_listed_in_the_docs() {
    let me = std::fs::read_to_string(file!()).unwrap();
    let docs =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/bad-inputs.md"))
            .unwrap();
    let names: Vec<&str> = me
        .lines()
        .filter_map(|l| l.strip_prefix("case!("))
        .map(|l| l.split(',').next().unwrap())
        .collect();
    assert!(names.len() >= 40, "only {} cases", names.len());
    for n in names {
        assert!(
            docs.contains(&format!("`{n}`")),
            "docs/bad-inputs.md does not list `{n}`"
        );
    }
}
