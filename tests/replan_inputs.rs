//! `reknit replan` with inputs given anew: a changed input is asked for again, several road
//! layers are matched each in its own layer, and a file's settings stay with that file.
//! Fixtures: the invented sample district and small made-up layers.

mod common;
use common::replan::*;
use common::*;
use serde_json::Value;

/// An input changed since the previous plan stops the run and asks for it anew; given anew (a
/// road layer whose work orders still match), the run goes on.
#[test]
fn a_changed_input_is_asked_for_anew() {
    let d = District::planned(false);
    d.sheet(|i| if i == 0 { "done" } else { "" });
    std::fs::rename(d.join("roads.geojson"), d.join("roads-kept.geojson")).unwrap();
    let args = ["replan", "r1", "--finished", "back.csv", "--out", "r2"];
    let o = d.run(&args);
    assert!(!o.status.success());
    let e = stderr(&o);
    assert!(e.contains("roads") && e.contains("--roads"), "{e}");
    let text = std::fs::read_to_string(d.join("roads-kept.geojson")).unwrap();
    std::fs::write(d.join("roads.geojson"), text + " ").unwrap();
    let o = d.run(&args);
    assert!(
        !o.status.success(),
        "a file whose SHA-256 differs was taken"
    );
    d.replan(&["--roads", "roads-kept.geojson"]);
    let s = summary(&d.join("r2"));
    assert_eq!(s["replan"]["keys_matching_nothing"], serde_json::json!([]));
    assert_eq!(s["replan"]["finished_repairs"], 1);
}

/// A plan of two road layers re-planned with both layers given anew (`--roads` twice): every
/// finished repair is matched in its own layer and none is planned again.
#[test]
fn a_two_layer_plan_is_replanned_with_both_layers() {
    let d = District::empty();
    // Two layers of three damaged roads in a row each, joined end to end.
    let layer = |name: &str, x0: f64| {
        let lines: Vec<String> = (0..3)
            .map(|i| {
                let x = x0 + 100.0 * i as f64;
                line(
                    &[at_m(x, 0.0), at_m(x + 100.0, 0.0)],
                    &format!(r#"{{"id":"R{i}","damage":0.5}}"#),
                )
            })
            .collect();
        write_collection(d.path(), name, &lines);
    };
    layer("west.geojson", 0.0);
    layer("east.geojson", 300.0);
    let both = ["--roads", "west.geojson", "--roads", "east.geojson"];
    d.ok(&[&["plan"][..], &both, &["--out", "r1", "-q"]].concat());
    let (_, rows) = work_orders(&d.join("r1"));
    assert!(rows.len() >= 2, "{rows:?}");
    d.sheet(|_| "done");
    d.replan(&both);
    let s = summary(&d.join("r2"));
    assert_eq!(s["replan"]["finished_repairs"], rows.len());
    assert_eq!(s["replan"]["keys_matching_nothing"], serde_json::json!([]));
    assert!(repairs(&d.join("r2")).is_empty());
}

/// Settings that choose within an input file belong to it: a plan of `;`-separated CSV sites
/// re-planned with the sites given anew as GeoJSON drops `--sites-delimiter` instead of refusing
/// the new file for a setting replan cannot take.
#[test]
fn sites_given_anew_in_another_format_drop_the_old_files_settings() {
    let d = District::sample();
    let sites = read_json(&d.join("sites.geojson"));
    let mut csv = String::from("lon;lat\n");
    for f in sites["features"].as_array().unwrap() {
        let c = &f["geometry"]["coordinates"];
        csv.push_str(&format!("{};{}\n", c[0], c[1]));
    }
    std::fs::write(d.join("sites.csv"), csv).unwrap();
    d.ok(&[
        "plan",
        "--roads",
        "roads.geojson",
        "--sites",
        "sites.csv",
        "--sites-delimiter",
        ";",
        "--out",
        "r1",
        "-q",
    ]);
    d.sheet(|_| "");
    d.replan(&["--sites", "sites.geojson"]);
    let s = summary(&d.join("r2"));
    assert_eq!(s["settings"]["sites_delimiter"], Value::Null);
}

/// The field reports' own coordinate columns are recorded with the plan and read the earlier
/// reports again in the re-plan.
#[test]
fn report_coordinate_columns_are_restored() {
    let d = District::sample();
    let sites = read_json(&d.join("sites.geojson"));
    let mut csv = String::from("e_deg,n_deg,damage\n");
    for f in sites["features"].as_array().unwrap() {
        let c = &f["geometry"]["coordinates"];
        csv.push_str(&format!("{},{},2\n", c[0], c[1]));
    }
    std::fs::write(d.join("reports.csv"), csv).unwrap();
    d.ok(&[
        "plan",
        "--roads",
        "roads.geojson",
        "--damage-points",
        "reports.csv",
        "--damage-points-lon-column",
        "e_deg",
        "--damage-points-lat-column",
        "n_deg",
        "--out",
        "r1",
        "-q",
    ]);
    let s1 = summary(&d.join("r1"));
    assert_eq!(s1["settings"]["damage_points_lon_column"], "e_deg");
    assert_eq!(s1["settings"]["damage_points_lat_column"], "n_deg");
    d.sheet(|_| "");
    d.replan(&[]);
    let s2 = summary(&d.join("r2"));
    assert_eq!(s2["settings"]["damage_points_lon_column"], "e_deg");
    assert_eq!(s2["damage_reports"]["read"], s1["damage_reports"]["read"]);
}

/// Web Mercator (EPSG:3857) metres of a longitude/latitude on the sphere of radius 6378137 m
/// (EPSG Guidance Note 7-2, Popular Visualisation Pseudo-Mercator; formula from memory).
fn web_mercator(lon: f64, lat: f64) -> (f64, f64) {
    let r = 6_378_137.0;
    let (l, p) = (lon.to_radians(), lat.to_radians());
    (
        r * l,
        r * (std::f64::consts::FRAC_PI_4 + p / 2.0).tan().ln(),
    )
}

/// A re-plan takes the options of the reports it is given anew, and reads each earlier round's
/// reports as that round did: GeoJSON in longitude/latitude, then a `;` CSV in Web Mercator
/// metres with columns of its own names, then a third round reading both back.
#[test]
fn reports_given_anew_take_their_own_options() {
    let d = District::sample();
    let sites = read_json(&d.join("sites.geojson"));
    let at: Vec<(f64, f64)> = sites["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| {
            let c = &f["geometry"]["coordinates"];
            (c[0].as_f64().unwrap(), c[1].as_f64().unwrap())
        })
        .collect();
    let first: Vec<String> = at
        .iter()
        .take(2)
        .map(|&(x, y)| point([x, y], r#"{"damage":2}"#))
        .collect();
    write_collection(d.path(), "day1.geojson", &first);
    let mut csv = String::from("east;north;damage\n");
    for &(x, y) in at.iter().skip(2).take(2) {
        let (e, n) = web_mercator(x, y);
        csv.push_str(&format!(
            "{};{};3\n",
            e.to_string().replace('.', ","),
            n.to_string().replace('.', ",")
        ));
    }
    std::fs::write(d.join("day2.csv"), csv).unwrap();
    d.ok(&[
        "plan",
        "--roads",
        "roads.geojson",
        "--damage-points",
        "day1.geojson",
        "--point-match-distance",
        "1000",
        "--out",
        "r1",
        "-q",
    ]);
    d.sheet(|_| "");
    let day2 = [
        "--damage-points",
        "day2.csv",
        "--damage-points-crs",
        "EPSG:3857",
        "--damage-points-delimiter",
        ";",
        "--damage-points-lon-column",
        "east",
        "--damage-points-lat-column",
        "north",
    ];
    d.replan(&day2);
    let s2 = summary(&d.join("r2"));
    assert_eq!(s2["settings"]["damage_points_crs"], "EPSG:3857");
    assert_eq!(s2["settings"]["damage_points_delimiter"], "semicolon");
    let earlier = &s2["settings"]["damage_points_earlier"];
    assert_eq!(earlier.as_array().map(Vec::len), Some(1), "{earlier}");
    assert_eq!(earlier[0]["crs"], Value::Null);
    let (read, matched) = (
        &s2["damage_reports"]["read"],
        &s2["damage_reports"]["applied"],
    );
    assert_eq!(
        (read.as_u64(), matched.as_u64()),
        (Some(4), Some(4)),
        "{s2}"
    );
    // The third round reads both files back, each as its round did.
    sheet(&d.join("back2.csv"), &d.join("r2"), b',', false, |_| "");
    d.ok(&[
        "replan",
        "r2",
        "--finished",
        "back2.csv",
        "--out",
        "r3",
        "-q",
    ]);
    let s3 = summary(&d.join("r3"));
    assert_eq!(s3["damage_reports"]["applied"].as_u64(), Some(4), "{s3}");
    let earlier = &s3["settings"]["damage_points_earlier"];
    assert_eq!(earlier[1]["delimiter"], "semicolon", "{earlier}");
    // Options of the reports given anew, without them or meaning nothing for them, are refused.
    for (extra, needle) in [
        (
            &["--damage-points-crs", "EPSG:3857"][..],
            "give --damage-points",
        ),
        (
            &[
                "--damage-points",
                "day1.geojson",
                "--damage-points-delimiter",
                ";",
            ][..],
            "only a CSV damage reports file",
        ),
    ] {
        let mut a = vec!["replan", "r1", "--finished", "back.csv", "--out", "r4"];
        a.extend(extra);
        let o = d.run(&a);
        let e = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{e}");
        assert!(e.contains(extra[0]) && e.contains(needle), "{e}");
    }
}
