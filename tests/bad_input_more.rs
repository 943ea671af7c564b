//! The bad-input catalogue, part 2 (docs/bad-inputs.md lists every case): settings, sites, damage
//! zones and reports, output folders, and hostile but valid inputs (the antimeridian, the poles, a
//! 10-million-vertex line), which must succeed with correct results. Part 1: tests/bad_input.rs.

mod common;
use common::bad::*;
use common::*;
use std::collections::BTreeMap;
use std::path::Path;

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

case!(budget_without_sites, |d| {
    plan_fails(
        &roads_ok(d),
        &["--budget", "100", "--whole-network"],
        &["--budget", "--sites"],
    );
});

case!(hub_without_sites, |d| {
    plan_fails(&roads_ok(d), &["--hub", "a"], &["--hub", "--sites"]);
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

case!(hub_off_the_road_network, |d| {
    // The road runs from (0, 0) to (0.001, 0); the named hub lies about 1.1 km north of it.
    let p = file(
        d,
        "sites.geojson",
        fc(&[
            &site_feature("a", 0.0, 0.0),
            &site_feature("far", 0.0005, 0.01),
        ]),
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p), "--hub", "far"],
        &[
            "--hub",
            "\"far\" is not on the road network",
            "no road within 250 m",
        ],
    );
});

case!(no_site_near_a_usable_road, |d| {
    let p = file(
        d,
        "sites.geojson",
        fc(&[
            &site_feature("x", 0.0, 0.01),
            &site_feature("y", 0.0, -0.01),
        ]),
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "no site lies within --max-attach",
            "no hub to plan from",
            "x: no road within",
        ],
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

case!(zone_ring_round_a_pole, |d| {
    // Each ring edge runs the short way round (RFC 7946 §3.1.1), so this ring's longitudes wrap a
    // whole turn: it circles the pole, which one lon/lat ring cannot say without edges on ±180°.
    zone_fails(
        d,
        "[[0,80],[90,80],[180,80],[-90,80],[0,80]]",
        &["goes round a pole", "RFC 7946"],
    );
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
    let o = run(&["plan", "--roads", &s(&roads), "--out", &s(&out), "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
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
    // Folders the run creates on the way are removed with its staging folder.
    let out = mnt.join("new/deeper/out");
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
    assert!(left.is_empty(), "left behind: {left:?}");
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
    assert_eq!(status["east"], "joined");
    assert_eq!(status["west"], "joined");
    assert_ne!(status["north"], "joined");
    assert_ne!(status["south"], "joined");
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

case!(crs_collapses_one_of_several_layers, |d| {
    // A longitude/latitude layer without a `crs` member beside a UTM zone 31N layer without
    // one: `--crs EPSG:32631` applies to both, and reads the first's degrees as metres, so its
    // 100 m roads shrink to a millimetre and collapse when vertices are merged.
    let lonlat: Vec<String> = (0..3)
        .map(|i| {
            let x = 100.0 * i as f64;
            line(&[at_m(x, 0.0), at_m(x + 100.0, 0.0)], r#"{"damage":0.5}"#)
        })
        .collect();
    let p = write_collection(d, "lonlat.geojson", &lonlat);
    let utm: Vec<String> = (0..3)
        .map(|i| {
            let x = 500_000.0 + 100.0 * i as f64;
            line(&[[x, 10_000.0], [x + 100.0, 10_000.0]], r#"{"damage":0.5}"#)
        })
        .collect();
    let q = write_collection(d, "utm.geojson", &utm);
    plan_fails(
        &p,
        &["--roads", &s(&q), "--crs", "EPSG:32631", "--whole-network"],
        &[
            "lonlat.geojson",
            "3 of its 3",
            "collapsed",
            "CRS is probably wrong",
            "--crs",
        ],
    );
});
