//! Answers that mean what they say: crossings of many lines at one point, costs that cannot wrap,
//! networks that ingest leaves empty. Refused inputs are `case!`s listed in docs/bad-inputs.md.

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

/// `check --node-crossings` on a star of `k` lines through (0, 0); returns (junctions, edges).
fn star(d: &Path, k: usize) -> (u64, u64) {
    let lines: Vec<String> = (0..k)
        .map(|i| {
            let a = std::f64::consts::PI * i as f64 / k as f64;
            let (x, y) = (0.1 * a.cos(), 0.1 * a.sin());
            line(&[[-x, -y], [x, y]], "{}")
        })
        .collect();
    let roads = write_collection(d, &format!("star{k}.geojson"), &lines);
    let out = d.join(format!("out{k}"));
    let o = run(&[
        "check",
        "--roads",
        &s(&roads),
        "--node-crossings",
        "--out",
        &s(&out),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let sum = read_json(&out.join("summary.json"));
    let c = &sum["counts"];
    (
        c["junctions"].as_u64().unwrap(),
        c["edges"].as_u64().unwrap(),
    )
}

#[test]
fn lines_through_one_point_make_one_junction() {
    // k lines crossing at one point: one junction there, 2k ends, 2k edges (a graph fact).
    let t = tmp();
    assert_eq!(star(t.path(), 2), (5, 4));
    assert_eq!(star(t.path(), 3), (7, 6));
    assert_eq!(star(t.path(), 1000), (2001, 2000));
}

case!(class_rate_times_factor_beyond_the_cap, |d| {
    // Factor 800 within the cap, rate 5 within its range: 4,000 per metre is not.
    let roads = file(
        d,
        "roads.geojson",
        fc(&[&line(
            &[[0.0, 0.0], [0.001, 0.0]],
            r#"{"damage":800,"kind":"bridge"}"#,
        )]),
    );
    let table = file(d, "costs.toml", "[classes]\nfield = \"kind\"\nbridge = 5\n");
    plan_fails(
        &roads,
        &["--cost-table", &s(&table)],
        &["roads.geojson", "feature 0", "kind", "4000", "1000"],
    );
});

case!(costs_too_large_to_add_up, |d| {
    // 100,000 segments of about 19,800 km each at factor 1000: about 2e15 repair-metres in all,
    // beyond what the sums are allowed to reach (2^60 milli-repair-metres, about 1.15e15).
    let coords: Vec<[f64; 2]> = (0..100_001)
        .map(|i| [if i % 2 == 0 { 0.0 } else { 179.0 }, i as f64 * 1e-4])
        .collect();
    let roads = write_collection(d, "far.geojson", &[line(&coords, r#"{"damage":1000}"#)]);
    plan_fails(
        &roads,
        &["--snap", "0"],
        &[
            "far.geojson",
            "repair-metres",
            "more than reknit represents exactly",
            "--crs",
        ],
    );
});

case!(every_line_collapses_under_the_snap_tolerance, |d| {
    // Lines of about 11 m with --snap 50: nothing is left to plan.
    let roads = file(
        d,
        "short.geojson",
        fc(&[
            &line(&[[0.0, 0.0], [0.0001, 0.0]], "{}"),
            &line(&[[1.0, 0.0], [1.0001, 0.0]], "{}"),
        ]),
    );
    plan_fails(
        &roads,
        &["--snap", "50"],
        &["short.geojson", "collapsed", "--snap 50", "--crs"],
    );
});

case!(web_mercator_far_beyond_the_globe, |d| {
    // y = 1e9 m lies far beyond the Web Mercator square (±20,037,508 m, EPSG:3857 from memory):
    // its inverse lands on a pole and does not come back.
    let roads = file(
        d,
        "mercator.geojson",
        fc(&[
            &line(&[[0.0, 0.0], [1000.0, 0.0]], "{}"),
            &line(&[[0.0, 1e9], [1000.0, 1e9]], "{}"),
        ]),
    );
    plan_fails(
        &roads,
        &["--crs", "EPSG:3857"],
        &["mercator.geojson", "feature 1", "implausible", "EPSG:3857"],
    );
});

case!(utm_far_outside_its_zone, |d| {
    // 30,000 km east of zone 33's central meridian: a grid that far out means nothing.
    let roads = file(
        d,
        "utm.geojson",
        fc(&[&line(
            &[[3e7, 5_000_000.0], [3e7 + 1000.0, 5_000_000.0]],
            "{}",
        )]),
    );
    plan_fails(
        &roads,
        &["--crs", "EPSG:32633"],
        &[
            "utm.geojson",
            "feature 0",
            "implausible",
            "EPSG:32633",
            "--crs",
        ],
    );
});

#[test]
fn pieces_of_a_projected_road_add_up_to_the_road() {
    // A straight 1,000 m road in UTM zone 33 (EPSG:32633): lengths there are planar × unit. A site
    // joining it mid-way splits it; the two pieces must still add up to 1,000 m.
    let t = tmp();
    let d = t.path();
    let roads = write_collection(
        d,
        "grid.geojson",
        &[line(
            &[[500_000.0, 5_000_000.0], [501_000.0, 5_000_000.0]],
            "{}",
        )],
    );
    let sites = file(
        d,
        "sites.geojson",
        fc(&[
            &site_feature("A", 500_000.0, 5_000_005.0),
            &site_feature("B", 500_400.0, 5_000_005.0),
            &site_feature("C", 501_000.0, 5_000_005.0),
        ]),
    );
    let out = d.join("out");
    let o = run(&[
        "plan",
        "--roads",
        &s(&roads),
        "--crs",
        "EPSG:32633",
        "--sites",
        &s(&sites),
        "--sites-crs",
        "EPSG:32633",
        "--out",
        &s(&out),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let net = read_fc(&out.join("network.geojson"));
    assert!(net.features.len() >= 2, "the site split the road");
    let total: f64 = net
        .features
        .iter()
        .map(|f| f.property("length_m").unwrap().as_f64().unwrap())
        .sum();
    assert!((total - 1000.0).abs() < 0.002, "pieces add up to {total} m");
}

#[test]
fn a_road_across_the_antimeridian_is_written_split_there() {
    // RFC 7946 §3.1.9: a line crossing ±180° should be written as a MultiLineString split there;
    // the road from 179.9995°E to 179.9995°W is about 111 m long the short way round (from
    // memory: 1° of longitude ≈ 111.32 km at the equator).
    let t = tmp();
    let d = t.path();
    let roads = file(
        d,
        "pacific.geojson",
        fc(&[&line(&[[179.9995, 0.0], [-179.9995, 0.0]], "{}")]),
    );
    let out = d.join("out");
    let o = run(&["check", "--roads", &s(&roads), "--out", &s(&out), "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let net = read_fc(&out.join("network.geojson"));
    assert_eq!(net.features.len(), 1);
    let f = &net.features[0];
    let len = f.property("length_m").unwrap().as_f64().unwrap();
    assert!((len - 111.32).abs() < 0.1, "{len} m");
    match &f.geometry.as_ref().unwrap().value {
        geojson::GeometryValue::MultiLineString { coordinates: m } => {
            assert_eq!(m.len(), 2);
            for l in m {
                assert!(l.len() >= 2);
                assert!(l.windows(2).all(|w| (w[1][0] - w[0][0]).abs() <= 180.0));
            }
        }
        other => panic!("{other:?}"),
    }
}
