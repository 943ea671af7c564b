//! The outputs speak in their own plain words: one JSON type per property name across every
//! layer, codes beside labels, no days without a crew capacity, and the old names gone (not kept
//! as aliases). The rules are reknit's own (docs/outputs.md); RFC 8259 §3 names the JSON types.

mod common;
use common::*;
use reknit::ingest::qa::QaKind;
use reknit::job::status::STATUSES;
use serde_json::Value;
use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

/// The JSON type of a value (RFC 8259 §3); None for null, which any property may be.
fn json_type(v: &Value) -> Option<&'static str> {
    match v {
        Value::Null => None,
        Value::Bool(_) => Some("boolean"),
        Value::Number(_) => Some("number"),
        Value::String(_) => Some("string"),
        Value::Array(_) => Some("array"),
        Value::Object(_) => Some("object"),
    }
}

/// The GeoJSON layers of an output folder, by file name.
fn layers(out: &Path) -> BTreeMap<String, Value> {
    listing(out)
        .into_iter()
        .filter(|n| n.ends_with(".geojson"))
        .map(|n| (n.clone(), read_json(&out.join(&n))))
        .collect()
}

/// Road midpoints of the demo's network layer (the middle vertex of each of the first edges).
fn midpoints(out: &Path, n: usize) -> Vec<[f64; 2]> {
    read_json(&out.join("network.geojson"))["features"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|f| f["geometry"]["type"] == "LineString")
        .step_by(7)
        .take(n)
        .map(|f| {
            let c = f["geometry"]["coordinates"].as_array().unwrap();
            let p = &c[c.len() / 2];
            [p[0].as_f64().unwrap(), p[1].as_f64().unwrap()]
        })
        .collect()
}

/// A square polygon feature of half-side `h` degrees around `c`.
fn square(c: [f64; 2], h: f64, props: &str) -> String {
    let r = [
        [c[0] - h, c[1] - h],
        [c[0] + h, c[1] - h],
        [c[0] + h, c[1] + h],
        [c[0] - h, c[1] + h],
        [c[0] - h, c[1] - h],
    ];
    let ring: Vec<String> = r.iter().map(|p| format!("[{},{}]", p[0], p[1])).collect();
    format!(
        r#"{{"type":"Feature","properties":{props},"geometry":{{"type":"Polygon","coordinates":[[{}]]}}}}"#,
        ring.join(",")
    )
}

/// Runs the plain demo, and a sites plan of the demo's layers with backup links, damage zones,
/// field reports (in a field of their own) and a crew capacity; returns both output folders.
fn two_runs(d: &Path) -> (std::path::PathBuf, std::path::PathBuf) {
    let plain = d.join("plain");
    let o = run(&["demo", "--out", plain.to_str().unwrap(), "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let mids = midpoints(&plain, 6);
    let zones = write_collection(
        d,
        "zones.geojson",
        &[
            square(mids[0], 0.0008, r#"{"damage":0.9}"#),
            square(mids[1], 0.0002, r#"{"damage":"closed"}"#),
        ],
    );
    let points = write_collection(
        d,
        "points.geojson",
        &[
            point(mids[2], r#"{"sev":0.7}"#),
            point(mids[3], r#"{"sev":"closed"}"#),
            point(mids[4], r#"{"sev":0.4}"#),
        ],
    );
    let full = d.join("full");
    let o = plan_cli(
        &sample_roads(),
        &full,
        &[
            "-q",
            "--sites",
            sample_sites().to_str().unwrap(),
            "--redundancy",
            "--crew-capacity",
            "2500",
            "--damage-zones",
            zones.to_str().unwrap(),
            "--damage-points",
            points.to_str().unwrap(),
            "--damage-points-field",
            "sev",
            "--point-match-distance",
            "30",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    (plain, full)
}

#[test]
fn every_property_name_has_one_type_in_every_layer() {
    let d = tmp();
    let (plain, full) = two_runs(d.path());
    // Property name → (JSON type → where first seen).
    let mut seen: BTreeMap<String, BTreeMap<&'static str, String>> = BTreeMap::new();
    let mut files = BTreeSet::new();
    for out in [&plain, &full] {
        for (name, layer) in layers(out) {
            files.insert(name.clone());
            for (i, f) in layer["features"].as_array().unwrap().iter().enumerate() {
                for (k, v) in f["properties"].as_object().unwrap() {
                    if let Some(t) = json_type(v) {
                        seen.entry(k.clone())
                            .or_default()
                            .entry(t)
                            .or_insert_with(|| format!("{name} feature {i}"));
                    }
                }
            }
        }
    }
    // The check covers every kind of layer, the optional ones included.
    for f in [
        "network.geojson",
        "plan.geojson",
        "sites.geojson",
        "qa.geojson",
        "single-failures.geojson",
        "backup.geojson",
    ] {
        assert!(files.contains(f), "{f} not written: {files:?}");
    }
    let mixed: Vec<_> = seen.iter().filter(|(_, t)| t.len() > 1).collect();
    assert!(mixed.is_empty(), "names with several types: {mixed:?}");
    // The properties this rule was written for are there with the types docs/outputs.md gives.
    for (k, t) in [
        ("damage", "number"),
        ("impassable", "boolean"),
        ("joined_to_hub", "boolean"),
        ("protects_sites", "string"),
        ("sites_cut_off", "string"),
        ("sites_cut_off_count", "number"),
        ("crew", "number"),
        ("first_day", "number"),
        ("last_day", "number"),
        ("status", "string"),
        ("status_label", "string"),
        ("kind", "string"),
        ("kind_label", "string"),
    ] {
        let types: Vec<_> = seen
            .get(k)
            .map(|m| m.keys().copied().collect())
            .unwrap_or_default();
        assert_eq!(types, [t], "{k}");
    }
    // Impassable roads are there, with damage null beside them.
    let net = read_json(&full.join("network.geojson"));
    let closed: Vec<&Value> = net["features"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|f| f["properties"]["impassable"] == true)
        .collect();
    assert!(!closed.is_empty(), "no impassable road to check");
    for f in &net["features"].as_array().unwrap()[..] {
        let p = &f["properties"];
        assert_eq!(p["impassable"] == true, p["damage"].is_null(), "{p}");
        assert_eq!(p["damage"].is_null(), p["cost"].is_null(), "{p}");
    }
}

#[test]
fn old_names_are_gone_not_aliased() {
    // Refused by the command-line parser itself (clap exits with 2 on an unknown argument).
    let d = tmp();
    let o = plan_cli(
        &sample_roads(),
        &d.path().join("o"),
        &["--report-distance", "10"],
    );
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("--report-distance"), "{}", stderr(&o));
    assert!(!d.path().join("o").exists());
    let (plain, full) = two_runs(d.path());
    const OLD: [&str; 6] = [
        "connected",
        "phase",
        "sites_protected",
        "fragility",
        "sites",
        "bridges",
    ];
    for out in [&plain, &full] {
        assert!(!out.join("fragility.geojson").exists());
        for (name, layer) in layers(out) {
            for f in layer["features"].as_array().unwrap() {
                let p = f["properties"].as_object().unwrap();
                for k in OLD {
                    // `sites` was the single-failure layer's list; a site's input may not carry it.
                    if k == "sites" && name == "sites.geojson" {
                        continue;
                    }
                    assert!(!p.contains_key(k), "{name}: {k}");
                }
            }
        }
        // summary.json: no old key at any depth.
        let s = read_json(&out.join("summary.json"));
        let mut stack = vec![&s];
        while let Some(v) = stack.pop() {
            match v {
                Value::Object(m) => {
                    for (k, v) in m {
                        for old in [
                            "fragility",
                            "fragility_after",
                            "bridges",
                            "cut_vertices",
                            "critical_edges",
                            "sites_with_single_points_of_failure",
                            "bridges_needing_backup",
                            "connected",
                            "unconnected",
                            "phases",
                            "phase",
                            "sites_connected",
                            "report_distance_m",
                        ] {
                            assert_ne!(k, old, "summary.json still has {old}");
                        }
                        stack.push(v);
                    }
                }
                Value::Array(a) => stack.extend(a),
                _ => {}
            }
        }
    }
}

#[test]
fn without_a_crew_capacity_there_are_no_days() {
    let d = tmp();
    let (plain, full) = two_runs(d.path());
    let days_in = |out: &Path| -> Vec<Value> {
        read_json(&out.join("plan.geojson"))["features"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|f| f["properties"]["repair"] == true)
            .map(|f| f["properties"]["last_day"].clone())
            .collect()
    };
    let csv_days = |out: &Path| -> Vec<String> {
        let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
        let h = r.headers().unwrap().clone();
        assert_eq!((&h[1], &h[2], &h[3]), ("crew", "first_day", "last_day"));
        let purpose = h.iter().position(|c| c == "purpose").unwrap();
        r.records()
            .map(|x| x.unwrap())
            .filter(|x| &x[purpose] == "plan")
            .map(|x| x[3].to_string())
            .collect()
    };
    let plain_days = days_in(&plain);
    assert!(!plain_days.is_empty());
    assert!(plain_days.iter().all(Value::is_null), "{plain_days:?}");
    assert!(csv_days(&plain).iter().all(String::is_empty));
    let s = read_json(&plain.join("summary.json"));
    assert!(s["days"].is_null(), "{}", s["days"]);
    assert!(s["settings"]["crew_capacity"].is_null());
    // With a capacity every repair has a day, the same in the layer, the sheet and the summary.
    let full_days = days_in(&full);
    assert!(full_days.iter().all(Value::is_u64), "{full_days:?}");
    let sheet: Vec<u64> = csv_days(&full).iter().map(|x| x.parse().unwrap()).collect();
    let summary = read_json(&full.join("summary.json"));
    let listed = summary["days"].as_array().unwrap();
    // Every repair is finished by exactly one crew on exactly one day.
    let finished: usize = listed
        .iter()
        .flat_map(|x| x["crews"].as_array().unwrap())
        .map(|c| c["finishes"].as_array().unwrap().len())
        .sum();
    assert_eq!(finished, sheet.len());
    assert_eq!(listed.last().unwrap()["day"], *sheet.iter().max().unwrap());
    assert!(listed.iter().all(|x| x["sites_joined"].is_array()));
}

#[test]
fn statuses_and_kinds_are_codes_with_labels_and_documented() {
    let d = tmp();
    let (plain, full) = two_runs(d.path());
    let docs =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/outputs.md"))
            .unwrap();
    let snake = |c: &str| c.chars().all(|x| x.is_ascii_lowercase() || x == '_');
    for (code, label) in STATUSES {
        assert!(snake(code), "{code}");
        assert!(
            docs.contains(&format!("`{code}`")),
            "docs lack status {code}"
        );
        assert!(docs.contains(label), "docs lack label {label}");
    }
    for k in QaKind::ALL {
        assert!(snake(k.code()), "{}", k.code());
        assert!(
            docs.contains(&format!("`{}`", k.code())),
            "docs lack {}",
            k.code()
        );
        assert!(docs.contains(k.label()), "docs lack label {}", k.label());
    }
    let mut statuses = BTreeSet::new();
    for out in [&plain, &full] {
        for f in read_json(&out.join("sites.geojson"))["features"]
            .as_array()
            .unwrap()
        {
            let p = &f["properties"];
            let code = p["status"].as_str().unwrap();
            let (_, label) = STATUSES.iter().find(|(c, _)| *c == code).unwrap();
            assert_eq!(p["status_label"], *label);
            assert_eq!(p["joined_to_hub"], code == "joined");
            statuses.insert(code.to_string());
        }
        let s = read_json(&out.join("summary.json"));
        for u in s["sites"]["not_joined"].as_array().unwrap() {
            assert_ne!(u["status"], "joined");
            assert!(u["status_label"].is_string());
        }
        for f in read_json(&out.join("qa.geojson"))["features"]
            .as_array()
            .unwrap()
        {
            let p = &f["properties"];
            let k = QaKind::ALL
                .into_iter()
                .find(|k| k.code() == p["kind"])
                .unwrap_or_else(|| panic!("unknown kind {}", p["kind"]));
            assert_eq!(p["kind_label"], k.label());
        }
        for k in s["counts"]["qa"].as_object().unwrap().keys() {
            assert!(QaKind::ALL.iter().any(|q| q.code() == k), "{k}");
        }
    }
    assert!(statuses.contains("joined"), "{statuses:?}");
}

#[test]
fn the_run_speaks_of_roads_with_no_way_round() {
    // The line printed at the end of a run names the single failures in plain words; "bridge"
    // there would read as a structure.
    let d = tmp();
    let out = d.path().join("o");
    let o = run(&["demo", "--out", out.to_str().unwrap(), "--redundancy"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let err = stderr(&o);
    let s = read_json(&out.join("summary.json"));
    let f = &s["single_failures"];
    let line = err
        .lines()
        .find(|l| l.starts_with("single failures:"))
        .unwrap_or_else(|| panic!("{err}"));
    assert!(line.contains(&format!(
        "{} road(s) with no way round",
        f["roads_cutting_off_sites"]
    )));
    assert!(line.contains(&format!(
        "with the backup links, {}",
        s["backup"]["single_failures_after"]["sites_with_a_single_failure"]
    )));
    assert!(!line.to_lowercase().contains("bridge"), "{line}");
}

#[test]
fn field_reports_read_their_own_field() {
    // The zones' field option is not the reports': a report's value comes from
    // --damage-points-field, and summary.json records each only where it was used.
    let d = tmp();
    let (_, full) = two_runs(d.path());
    let s = read_json(&full.join("summary.json"));
    assert_eq!(s["settings"]["damage_points_field"], "sev");
    assert_eq!(s["settings"]["zone_damage_field"], "damage");
    assert_eq!(s["settings"]["point_match_distance_m"], 30.0);
    assert_eq!(s["damage_reports"]["read"], 3);
    assert!(s["damage_reports"]["applied"].as_u64().unwrap() >= 1);
    // No report lacked a value in its field, so none was counted at the default.
    let notes: Vec<&str> = s["notes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n["code"].as_str().unwrap())
        .collect();
    assert!(!notes.contains(&"report_damage_defaulted"), "{notes:?}");
}
