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
