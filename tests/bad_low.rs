//! The bad-input catalogue, part for readers' corners (docs/bad-inputs.md lists every case):
//! lines that vanish in clean-up, polygon rings in any order, JSON grammar, foreign errors turned
//! into messages, CRS hints that name the option that applies.
//!
//! Ring orientation: ESRI Shapefile Technical Description (1998), outer rings clockwise, holes
//! counter-clockwise, ring order not significant.

mod common;
use common::bad::*;
use common::*;
use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
use std::path::{Path, PathBuf};

/// A polygon Shapefile set (WGS84 .prj), one record per polygon, fields `site_id`, `priority`
/// (1) and `v` (damage 3: above the roads' default factor 1, so a zone raises the cost).
fn polygon_set(d: &Path, name: &str, polygons: &[shapefile::Polygon]) -> PathBuf {
    let p = d.join(name);
    let table = TableWriterBuilder::new()
        .add_character_field(FieldName::try_from("site_id").unwrap(), 10)
        .add_numeric_field(FieldName::try_from("priority").unwrap(), 8, 0)
        .add_numeric_field(FieldName::try_from("v").unwrap(), 8, 2);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for (i, sh) in polygons.iter().enumerate() {
        let mut r = Record::default();
        r.insert(
            "site_id".into(),
            FieldValue::Character(Some(format!("S{i}"))),
        );
        r.insert("priority".into(), FieldValue::Numeric(Some(1.0)));
        r.insert("v".into(), FieldValue::Numeric(Some(3.0)));
        w.write_shape_and_record(sh, &r).unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    p
}

/// A square ring `half` metres either side of (`x`, 0): clockwise (an outer ring) or not (a hole).
fn ring(x: f64, half: f64, outer: bool) -> shapefile::PolygonRing<shapefile::Point> {
    let p = |a: f64, b: f64| {
        let c = at_m(a, b);
        shapefile::Point::new(c[0], c[1])
    };
    let mut pts = vec![
        p(x - half, -half),
        p(x + half, -half),
        p(x + half, half),
        p(x - half, half),
        p(x - half, -half),
    ];
    if outer {
        pts.reverse();
        shapefile::PolygonRing::Outer(pts)
    } else {
        shapefile::PolygonRing::Inner(pts)
    }
}

/// The site points of a plan's sites.geojson.
fn site_points(out: &Path) -> Vec<serde_json::Value> {
    read_json(&out.join("sites.geojson"))["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| f["geometry"]["coordinates"].clone())
        .collect()
}

case!(zero_length_road_leaves_no_phantom_component, |d| {
    // A road, and far from it a line whose two positions are the same point: the line is removed,
    // and nothing of it may remain (it used to stay as a junction of its own, a second component).
    let roads = file(
        d,
        "roads.geojson",
        fc(&[
            OK_LINE,
            &line(&[at_m(900.0, 900.0), at_m(900.0, 900.0)], "{}"),
        ]),
    );
    let o = run(&[
        "check",
        "--roads",
        &s(&roads),
        "--snap",
        "0",
        "--out",
        &s(&d.join("o")),
    ]);
    let out = String::from_utf8_lossy(&o.stdout).to_string() + &stderr(&o);
    assert!(o.status.success(), "{out}");
    assert!(
        out.contains("2 junctions, 1 edges in 1 component(s)"),
        "{out}"
    );
    assert!(out.contains("removed zero-length line"), "{out}");
});

case!(zone_hole_listed_before_its_shell, |d| {
    // A road inside a zone's hole is outside the zone, whichever ring the record lists first.
    let roads = file(
        d,
        "roads.geojson",
        fc(&[&line(&[at_m(-50.0, 0.0), at_m(50.0, 0.0)], "{}")]),
    );
    let holed = |first_hole: bool| {
        let mut rings = vec![ring(0.0, 500.0, true), ring(0.0, 200.0, false)];
        if first_hole {
            rings.reverse();
        }
        shapefile::Polygon::with_rings(rings)
    };
    let solid = shapefile::Polygon::with_rings(vec![ring(0.0, 500.0, true)]);
    let cost = |name: &str, poly: shapefile::Polygon| {
        let z = polygon_set(d, &format!("{name}.shp"), &[poly]);
        let args = [
            "--damage-zones",
            &s(&z),
            "--zone-damage-field",
            "v",
            "--whole-network",
        ];
        read_json(&plan_quiet(d, name, &roads, &args).join("summary.json"))["total_cost"]
            .as_f64()
            .unwrap()
    };
    let (shell_first, hole_first, no_hole) = (
        cost("shell_first", holed(false)),
        cost("hole_first", holed(true)),
        cost("no_hole", solid),
    );
    assert_eq!(shell_first, hole_first, "ring order changed the damage");
    assert!(
        no_hole > hole_first,
        "{no_hole} vs {hole_first}: the hole keeps the road intact"
    );
});

case!(site_polygon_hole_listed_before_its_shell, |d| {
    // A courtyard building: the site's point lies in the building, never in the courtyard, in
    // whichever order the rings come; a hole inside no outer ring is refused.
    let roads = file(
        d,
        "roads.geojson",
        fc(&[&line(&[at_m(-400.0, 0.0), at_m(400.0, 0.0)], "{}")]),
    );
    let building = |first_hole: bool| {
        let mut rings = vec![ring(0.0, 60.0, true), ring(0.0, 40.0, false)];
        if first_hole {
            rings.reverse();
        }
        shapefile::Polygon::with_rings(rings)
    };
    let mut points = Vec::new();
    for (name, first_hole) in [("a", false), ("b", true)] {
        let sites = polygon_set(d, &format!("{name}.shp"), &[building(first_hole)]);
        points.push(site_points(&plan_quiet(
            d,
            name,
            &roads,
            &["--sites", &s(&sites)],
        )));
    }
    assert_eq!(points[0], points[1], "ring order moved the site's point");
    let p = points[0][0].as_array().unwrap();
    let (x, y) = (
        p[0].as_f64().unwrap() / at_m(1.0, 0.0)[0],
        p[1].as_f64().unwrap() / at_m(1.0, 0.0)[0],
    );
    assert!(
        x.abs().max(y.abs()) > 39.0,
        "({x}, {y}) m lies in the courtyard"
    );
    let stray = polygon_set(
        d,
        "stray.shp",
        &[shapefile::Polygon::with_rings(vec![
            ring(0.0, 60.0, true),
            ring(300.0, 20.0, false),
        ])],
    );
    plan_fails(
        &roads,
        &["--sites", &s(&stray)],
        &["stray.shp", "feature 0", "geometry", "ring 1 is a hole"],
    );
});

case!(trailing_comma_in_features_array, |d| {
    // RFC 8259 §5: no comma before ']' (nor before '}' at the top level); line and column given.
    let roads = file(
        d,
        "roads.geojson",
        format!("{{\"type\":\"FeatureCollection\",\"features\":[\n{OK_LINE},\n]}}"),
    );
    plan_fails(
        &roads,
        &[],
        &["roads.geojson", "trailing comma", "line 3 column 1"],
    );
    let top = file(
        d,
        "top.geojson",
        format!("{{\"type\":\"FeatureCollection\",\"features\":[{OK_LINE}],}}"),
    );
    plan_fails(&top, &[], &["top.geojson", "trailing comma"]);
});

case!(multipolygon_parts_that_overlap, |d| {
    // OGC Simple Features: a MultiPolygon's parts do not overlap. A zone's overlap would count its
    // ground twice, a site's is no outline: refused in GeoJSON and Shapefile alike.
    let roads = roads_ok(d);
    let sq = |x: f64, half: f64| {
        let c = |a: f64, b: f64| {
            let p = at_m(a, b);
            format!("[{},{}]", p[0], p[1])
        };
        format!(
            "[[{},{},{},{},{}]]",
            c(x - half, -half),
            c(x + half, -half),
            c(x + half, half),
            c(x - half, half),
            c(x - half, -half)
        )
    };
    let multi = |props: &str, a: &str, b: &str| {
        format!(
            r#"{{"type":"Feature","properties":{props},"geometry":{{"type":"MultiPolygon","coordinates":[{a},{b}]}}}}"#
        )
    };
    let zones = file(
        d,
        "zones.geojson",
        fc(&[&multi(r#"{"damage":1}"#, &sq(50.0, 30.0), &sq(70.0, 30.0))]),
    );
    plan_fails(
        &roads,
        &["--damage-zones", &s(&zones)],
        &[
            "zones.geojson",
            "feature 0",
            "geometry",
            "parts 0 and 1",
            "overlap",
        ],
    );
    let sites = file(
        d,
        "sites.geojson",
        fc(&[&multi(
            r#"{"site_id":"A"}"#,
            &sq(50.0, 30.0),
            &sq(70.0, 30.0),
        )]),
    );
    plan_fails(
        &roads,
        &["--sites", &s(&sites)],
        &[
            "sites.geojson",
            "feature 0",
            "geometry",
            "polygons 0 and 1",
            "overlap",
        ],
    );
    // Parts that only share an edge cover no ground twice: accepted.
    let apart = file(
        d,
        "apart.geojson",
        fc(&[&multi(r#"{"damage":1}"#, &sq(50.0, 10.0), &sq(70.0, 10.0))]),
    );
    plan_ok(d, &["--roads", &s(&roads), "--damage-zones", &s(&apart)]);
    std::fs::remove_dir_all(d.join("out")).unwrap();
    // A Shapefile record of two outer rings that overlap.
    let shp = polygon_set(
        d,
        "rings.shp",
        &[shapefile::Polygon::with_rings(vec![
            ring(50.0, 30.0, true),
            ring(70.0, 30.0, true),
        ])],
    );
    plan_fails(
        &roads,
        &["--damage-zones", &s(&shp), "--zone-damage-field", "v"],
        &["rings.shp", "feature 0", "parts 0 and 1"],
    );
    plan_fails(
        &roads,
        &["--sites", &s(&shp)],
        &["rings.shp", "feature 0", "polygons 0 and 1"],
    );
});

#[test]
fn replan_names_its_own_options() {
    // Every option `reknit replan --help` lists is in the library's list, and no other: a message
    // of a re-plan that names another option says it belongs to reknit plan.
    let o = run(&["replan", "--help"]);
    let help = String::from_utf8_lossy(&o.stdout).to_string();
    let mut listed: Vec<String> = help
        .lines()
        .filter(|l| l.trim_start().starts_with('-'))
        .filter_map(|l| {
            l.trim_start()
                .split([' ', ','])
                .find(|w| w.starts_with("--"))
                .map(str::to_string)
        })
        .collect();
    listed.sort();
    listed.dedup();
    let mut known: Vec<String> = reknit::replan::OPTIONS
        .iter()
        .map(|s| s.to_string())
        .collect();
    known.sort();
    assert_eq!(listed, known, "{help}");
}
