//! Bad input: one clear message naming the file (and feature and field), exit code 2, nothing written.

mod common;
use common::*;
use std::path::Path;

/// Runs `plan` on `roads` and asserts failure with every `needles` in the message and no output.
fn fails(roads: &Path, extra: &[&str], needles: &[&str]) {
    let d = tmp();
    let out = d.path().join("out");
    let mut args = vec![
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ];
    args.extend_from_slice(extra);
    let o = run(&args);
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "exit code; stderr: {msg}");
    assert!(!msg.contains("panicked"), "{msg}");
    for n in needles {
        assert!(msg.contains(n), "message lacks {n:?}: {msg}");
    }
    assert!(
        !out.exists(),
        "output folder was created: {:?}",
        listing(&out)
    );
}

fn file(d: &Path, name: &str, text: &str) -> std::path::PathBuf {
    let p = d.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

const OK_LINE: &str = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;

fn fc(features: &[&str]) -> String {
    format!(
        r#"{{"type":"FeatureCollection","features":[{}]}}"#,
        features.join(",")
    )
}

#[test]
fn not_json() {
    let d = tmp();
    let p = file(d.path(), "roads.geojson", "this is not json");
    fails(&p, &[], &["roads.geojson", "not valid GeoJSON", "line 1"]);
}

#[test]
fn truncated_file() {
    let d = tmp();
    let full = fc(&[OK_LINE, OK_LINE]);
    let p = file(d.path(), "cut.geojson", &full[..full.len() - 20]);
    fails(&p, &[], &["cut.geojson", "feature 1", "not valid GeoJSON"]);
}

#[test]
fn not_a_feature_collection() {
    let d = tmp();
    let p = file(d.path(), "single.geojson", OK_LINE);
    fails(
        &p,
        &[],
        &[
            "single.geojson",
            "not a GeoJSON FeatureCollection",
            "\"Feature\"",
        ],
    );
    let p = file(d.path(), "array.geojson", "[1, 2, 3]");
    fails(
        &p,
        &[],
        &["array.geojson", "not a GeoJSON FeatureCollection", "array"],
    );
    let p = file(d.path(), "notype.geojson", r#"{"features":[]}"#);
    fails(&p, &[], &["notype.geojson", "no \"type\""]);
}

#[test]
fn nan_and_huge_numbers() {
    let d = tmp();
    // NaN is not a JSON number (RFC 8259 §6), so the file is not GeoJSON.
    let nan = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[NaN,1]]}}"#;
    let p = file(d.path(), "nan.geojson", &fc(&[OK_LINE, nan]));
    fails(&p, &[], &["nan.geojson", "feature 1"]);
    let huge = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[1e400,1]]}}"#;
    let p = file(d.path(), "huge.geojson", &fc(&[huge]));
    fails(&p, &[], &["huge.geojson", "feature 0", "out of range"]);
}

#[test]
fn coordinates_out_of_range() {
    let d = tmp();
    let bad = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[400,1]]}}"#;
    let p = file(d.path(), "range.geojson", &fc(&[OK_LINE, OK_LINE, bad]));
    fails(
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
    let bad = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[1,-91]]}}"#;
    let p = file(d.path(), "lat.geojson", &fc(&[bad]));
    fails(&p, &[], &["lat.geojson", "feature 0", "-91"]);
}

#[test]
fn one_point_and_empty_lines() {
    let d = tmp();
    // RFC 7946 §3.1.4: a LineString has two or more positions.
    let one = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0]]}}"#;
    let p = file(d.path(), "one.geojson", &fc(&[OK_LINE, one]));
    fails(
        &p,
        &[],
        &["one.geojson", "feature 1", "1 position", "at least 2"],
    );
    let empty =
        r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[]}}"#;
    let p = file(d.path(), "empty.geojson", &fc(&[empty, OK_LINE]));
    fails(&p, &[], &["empty.geojson", "feature 0", "no positions"]);
    let multi = r#"{"type":"Feature","properties":{},"geometry":{"type":"MultiLineString","coordinates":[[[0,0],[1,1]],[[2,2]]]}}"#;
    let p = file(d.path(), "multi.geojson", &fc(&[multi]));
    fails(&p, &[], &["multi.geojson", "feature 0", "line 1"]);
}

#[test]
fn non_numeric_damage() {
    let d = tmp();
    let bad = r#"{"type":"Feature","properties":{"dmg":"heavy"},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let p = file(d.path(), "dmg.geojson", &fc(&[OK_LINE, bad]));
    fails(
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
    let bad = r#"{"type":"Feature","properties":{"damage":true},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let p = file(d.path(), "bool.geojson", &fc(&[bad]));
    fails(
        &p,
        &[],
        &["bool.geojson", "feature 0", "field \"damage\"", "true"],
    );
    let bad = r#"{"type":"Feature","properties":{"damage":5000},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let p = file(d.path(), "big.geojson", &fc(&[bad]));
    fails(&p, &[], &["big.geojson", "feature 0", "5000", "largest"]);
}

#[test]
fn unreadable_inputs() {
    let d = tmp();
    fails(
        &d.path().join("missing.geojson"),
        &[],
        &["missing.geojson", "cannot read"],
    );
    fails(d.path(), &[], &["cannot read", "directory"]);
}

#[test]
fn empty_layers() {
    let d = tmp();
    let p = file(d.path(), "none.geojson", &fc(&[]));
    fails(&p, &[], &["none.geojson", "no road lines", "empty"]);
    let pt =
        r#"{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0]}}"#;
    let p = file(d.path(), "points.geojson", &fc(&[pt, pt]));
    fails(
        &p,
        &[],
        &["points.geojson", "no road lines", "2 × not a line (Point)"],
    );
}

#[test]
fn unknown_geometry_and_crs() {
    let d = tmp();
    let odd = r#"{"type":"Feature","properties":{},"geometry":{"type":"Curve","coordinates":[[0,0],[1,1]]}}"#;
    let p = file(d.path(), "odd.geojson", &fc(&[odd]));
    fails(&p, &[], &["odd.geojson", "feature 0", "Curve"]);
    let p = file(
        d.path(),
        "crs.geojson",
        &format!(
            r#"{{"type":"FeatureCollection","crs":{{"type":"name","properties":{{"name":"LOCAL_GRID_7"}}}},"features":[{OK_LINE}]}}"#
        ),
    );
    fails(
        &p,
        &[],
        &["crs.geojson", "LOCAL_GRID_7", "no EPSG code", "--crs"],
    );
    fails(&p, &["--crs", "EPSG:99999"], &["EPSG:99999"]);
    // A projected layer read as longitude/latitude: the message suggests --crs.
    let proj = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[530000,180000],[530100,180000]]}}"#;
    let p = file(d.path(), "projected.geojson", &fc(&[proj]));
    fails(
        &p,
        &[],
        &["projected.geojson", "feature 0", "530000", "--crs"],
    );
}

#[test]
fn settings_out_of_range() {
    let d = tmp();
    let p = file(d.path(), "ok.geojson", &fc(&[OK_LINE]));
    fails(&p, &["--snap=-1"], &["--snap", "-1"]);
    fails(&p, &["--snap", "5000"], &["--snap", "5000"]);
    fails(&p, &["--default-damage", "inf"], &["--default-damage"]);
}

#[test]
fn output_folder_cannot_be_written() {
    let d = tmp();
    let p = file(d.path(), "ok.geojson", &fc(&[OK_LINE]));
    let blocker = file(d.path(), "a-file", "x");
    let o = run(&[
        "plan",
        "--roads",
        p.to_str().unwrap(),
        "--out",
        blocker.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("not a folder"), "{}", stderr(&o));
    let inside = blocker.join("out");
    let o = run(&[
        "plan",
        "--roads",
        p.to_str().unwrap(),
        "--out",
        inside.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("cannot write"), "{}", stderr(&o));
    assert_eq!(std::fs::read(&blocker).unwrap(), b"x");
}

#[test]
fn skippable_oddities_are_counted_not_fatal() {
    let d = tmp();
    let pt =
        r#"{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0]}}"#;
    let null = r#"{"type":"Feature","properties":null,"geometry":null}"#;
    let p = file(d.path(), "mixed.geojson", &fc(&[OK_LINE, pt, null]));
    let out = d.path().join("out");
    let o = run(&[
        "plan",
        "--roads",
        p.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("skipped 1 feature(s): not a line (Point)"),
        "{}",
        stderr(&o)
    );
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_read"], 3);
    assert_eq!(s["counts"]["features_skipped"]["not a line (Point)"], 1);
    assert_eq!(s["counts"]["features_skipped"]["null geometry"], 1);
}

#[test]
fn named_field_missing_lists_the_fields() {
    let d = tmp();
    let f = r#"{"type":"Feature","properties":{"state":"debris","highway":"primary"},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#;
    let p = file(d.path(), "fields.geojson", &fc(&[f]));
    fails(
        &p,
        &["--damage-field", "dmg"],
        &[
            "fields.geojson",
            "\"dmg\"",
            "no feature has this property",
            "state, highway",
        ],
    );
    fails(
        &p,
        &["--drop-where", "kind=path"],
        &["\"kind\"", "state, highway"],
    );
}
