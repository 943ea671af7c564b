//! Damage categories, cost tables, road-class rates and road filters, end to end.

mod common;
use common::*;

const M: f64 = 1.0 / 111_320.0;

fn roads(d: &std::path::Path) -> std::path::PathBuf {
    // Three 100 m roads in a row (along the equator), with categories and classes.
    let l = |x0: f64, props: &str| line(&[[x0 * M, 0.0], [(x0 + 100.0) * M, 0.0]], props);
    write_collection(
        d,
        "roads.geojson",
        &[
            l(0.0, r#"{"state":"debris","kind":"primary"}"#),
            l(100.0, r#"{"state":"washed-out","kind":"track"}"#),
            l(200.0, r#"{"state":"intact","kind":"footway"}"#),
        ],
    )
}

fn plan(d: &std::path::Path, extra: &[&str]) -> (std::process::Output, std::path::PathBuf) {
    let r = roads(d);
    let out = d.join(format!("out-{}", extra.join("-").replace(['/', '='], "_")));
    let mut args = vec![
        "plan",
        "--roads",
        r.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--whole-network",
        "-q",
    ];
    args.extend_from_slice(extra);
    (run(&args), out)
}

#[test]
fn categories_from_the_default_table_and_class_rates() {
    let d = tmp();
    // Default table (docs/outputs.md): debris 0.3, washed-out 1.0, intact 0.
    let (o, out) = plan(d.path(), &["--category-field", "state"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    let total = s["total_cost"].as_f64().unwrap();
    assert!((total - 130.0).abs() < 0.2, "{total}");
    let net = read_fc(&out.join("network.geojson"));
    assert_eq!(net.features[0].property("category").unwrap(), "debris");
    // A cost table with class rates: primary × 2, track × 0.5.
    let table = d.path().join("costs.toml");
    std::fs::write(&table, "[categories]\ndebris = 0.5\nwashed-out = 1\nintact = 0\n[classes]\nfield = \"kind\"\nprimary = 2\ntrack = 0.5\n").unwrap();
    let (o, out) = plan(
        d.path(),
        &[
            "--category-field",
            "state",
            "--cost-table",
            table.to_str().unwrap(),
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let total = read_json(&out.join("summary.json"))["total_cost"]
        .as_f64()
        .unwrap();
    // 100 × 0.5 × 2 + 100 × 1 × 0.5 + 0 = 150.
    assert!((total - 150.0).abs() < 0.2, "{total}");
}

#[test]
fn unknown_category_lists_the_known_ones() {
    let d = tmp();
    let table = d.path().join("costs.toml");
    std::fs::write(&table, "[categories]\ndebris = 0.5\n").unwrap();
    let (o, out) = plan(
        d.path(),
        &[
            "--category-field",
            "state",
            "--cost-table",
            table.to_str().unwrap(),
        ],
    );
    assert_eq!(o.status.code(), Some(2));
    let msg = stderr(&o);
    assert!(
        msg.contains("feature 1")
            && msg.contains("washed-out")
            && msg.contains("known categories: debris"),
        "{msg}"
    );
    assert!(!out.exists());
}

#[test]
fn road_filters_drop_and_keep() {
    let d = tmp();
    let (o, out) = plan(d.path(), &["--drop-where", "kind=footway,path"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_used"], 2);
    assert_eq!(
        s["counts"]["features_skipped"]["dropped by kind=footway,path"],
        1
    );
    let (o, out) = plan(d.path(), &["--keep-where", "kind=primary"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        read_json(&out.join("summary.json"))["counts"]["features_used"],
        1
    );
    let (o, _) = plan(d.path(), &["--drop-where", "nonsense"]);
    assert_eq!(o.status.code(), Some(2));
}

fn zone(d: &std::path::Path, name: &str, ring: &[[f64; 2]], props: &str) -> std::path::PathBuf {
    let c: Vec<String> = ring
        .iter()
        .map(|p| format!("[{},{}]", p[0], p[1]))
        .collect();
    let f = format!(
        r#"{{"type":"Feature","properties":{props},"geometry":{{"type":"Polygon","coordinates":[[{}]]}}}}"#,
        c.join(",")
    );
    write_collection(d, name, &[f])
}

#[test]
fn damage_zones_cost_the_pieces_inside_them() {
    let d = tmp();
    // One intact 100 m road; a flood zone covers its second half with factor 0.8 (by hand: 40).
    let r = write_collection(
        d.path(),
        "r.geojson",
        &[line(&[[0.0, 0.0], [100.0 * M, 0.0]], r#"{"damage":0}"#)],
    );
    let z = zone(
        d.path(),
        "z.geojson",
        &[
            [50.0 * M, -0.001],
            [0.01, -0.001],
            [0.01, 0.001],
            [50.0 * M, 0.001],
            [50.0 * M, -0.001],
        ],
        r#"{"damage":0.8}"#,
    );
    let out = d.path().join("o1");
    let o = run(&[
        "plan",
        "--roads",
        r.to_str().unwrap(),
        "--damage-zones",
        z.to_str().unwrap(),
        "--whole-network",
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert!(
        (s["total_cost"].as_f64().unwrap() - 40.0).abs() < 0.05,
        "{}",
        s["total_cost"]
    );
    assert_eq!(s["counts"]["edges_in_zones"], 1);
    assert_eq!(s["inputs"][1]["role"], "damage zones");
    // A closed zone makes the road impassable.
    let z = zone(
        d.path(),
        "closed.geojson",
        &[
            [50.0 * M, -0.001],
            [0.01, -0.001],
            [0.01, 0.001],
            [50.0 * M, 0.001],
            [50.0 * M, -0.001],
        ],
        r#"{"damage":"closed"}"#,
    );
    let out = d.path().join("o2");
    let o = run(&[
        "plan",
        "--roads",
        r.to_str().unwrap(),
        "--damage-zones",
        z.to_str().unwrap(),
        "--whole-network",
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["edges_closed"], 1);
}

#[test]
fn field_reports_apply_to_the_nearest_road_and_unmatched_are_listed() {
    let d = tmp();
    let r = write_collection(
        d.path(),
        "r.geojson",
        &[
            line(&[[0.0, 0.0], [100.0 * M, 0.0]], r#"{"damage":0}"#),
            line(&[[100.0 * M, 0.0], [200.0 * M, 0.0]], r#"{"damage":0}"#),
        ],
    );
    let pt = |x: f64, y: f64, props: &str| {
        format!(
            r#"{{"type":"Feature","properties":{props},"geometry":{{"type":"Point","coordinates":[{},{}]}}}}"#,
            x * M,
            y * M
        )
    };
    let reports = write_collection(
        d.path(),
        "reports.geojson",
        &[
            pt(50.0, 10.0, r#"{"damage":0.7}"#),
            pt(50.0, -5.0, r#"{"damage":0.2}"#),
            pt(150.0, 900.0, r#"{"damage":1}"#),
        ],
    );
    let out = d.path().join("o");
    let o = run(&[
        "plan",
        "--roads",
        r.to_str().unwrap(),
        "--damage-points",
        reports.to_str().unwrap(),
        "--whole-network",
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    // The worst report on the first road wins: 100 m × 0.7 = 70 repair-metres.
    assert!(
        (s["total_cost"].as_f64().unwrap() - 70.0).abs() < 0.1,
        "{}",
        s["total_cost"]
    );
    assert_eq!(s["damage_reports"]["applied"], 2);
    assert_eq!(s["damage_reports"]["unmatched"][0][0], 2);
}
