//! The bad-input catalogue, part 1 (docs/bad-inputs.md lists every case): road layers — their
//! structure, attributes, coordinate systems and Shapefile sets. A failing case must exit 2 with one
//! message naming the file (and feature and field where there is one), never panic, and leave no
//! output behind; every case checks that its inputs are unchanged. Part 2: tests/bad_input_more.rs.

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

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

case!(structure_field_in_no_feature, |d| {
    let f = r#"{"type":"Feature","properties":{"bridge":"yes"},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let p = file(d, "spans.geojson", fc(&[f]));
    plan_fails(
        &p,
        &["--structure-field", "span"],
        &[
            "spans.geojson",
            "\"span\"",
            "no feature has this property",
            "bridge",
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

#[test]
fn every_case_is_listed_in_the_docs() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let docs = std::fs::read_to_string(root.join("docs/bad-inputs.md")).unwrap();
    let mut names = Vec::new();
    for f in [
        "tests/bad_input.rs",
        "tests/bad_input_more.rs",
        "tests/bad_values.rs",
        "tests/output_guard.rs",
        "tests/plausibility.rs",
        "tests/settings_meaning.rs",
        "tests/batch_integrity.rs",
        "tests/bad_streams.rs",
        "tests/bad_files.rs",
        "tests/bad_typing.rs",
        "tests/bad_replan.rs",
        "tests/bad_formats.rs",
        "tests/bad_bounds.rs",
        "tests/bad_layers.rs",
        "tests/bad_points.rs",
        "tests/bad_point_places.rs",
        "tests/bad_low.rs",
        "tests/bad_low_files.rs",
    ] {
        names.extend(case_names(&std::fs::read_to_string(root.join(f)).unwrap()));
    }
    assert!(names.len() >= 40, "only {} cases", names.len());
    for n in names {
        assert!(
            docs.contains(&format!("`{n}`")),
            "docs/bad-inputs.md does not list `{n}`"
        );
    }
}
