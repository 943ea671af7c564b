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
