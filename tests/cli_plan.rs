//! End-to-end runs of `reknit plan` and `reknit demo`: outputs, determinism, replacing outputs.

mod common;
use common::*;
use std::fs;

#[test]
fn demo_joins_the_sites_and_reports_them() {
    let d = tmp();
    let out = d.path().join("demo");
    let o = run(&["demo", "--out", out.to_str().unwrap(), "--quiet"]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(o.stderr.is_empty(), "--quiet printed: {}", stderr(&o));
    assert_eq!(
        listing(&out),
        [
            ".reknit-outputs",
            "corridors.geojson",
            "map.html",
            "network.geojson",
            "plan.geojson",
            "plan.png",
            "plan.svg",
            "qa.geojson",
            "report.html",
            "single-failures.geojson",
            "sites.geojson",
            "summary.json",
            "work-orders.csv"
        ],
        "no staging folder may remain"
    );
    let record = fs::read_to_string(out.join(".reknit-outputs")).unwrap();
    let recorded: Vec<&str> = record
        .lines()
        .skip(1)
        .filter(|l| !l.starts_with('#'))
        .collect();
    let mut visible = listing(&out);
    visible.retain(|n| !n.starts_with('.'));
    visible.sort_by_key(|n| (n == "summary.json", n.clone()));
    assert_eq!(recorded, visible, "the record lists every output written");
    let s = read_json(&out.join("summary.json"));
    let sites = read_fc(&out.join("sites.geojson"));
    assert_eq!(
        sites.features.len() as u64,
        s["sites"]["total"].as_u64().unwrap()
    );
    assert_eq!(s["sites"]["hub"], "S3");
    let cost = s["total_cost"].as_f64().unwrap();
    let bound = s["lower_bound"].as_f64().unwrap();
    assert!(bound <= cost + 1e-9);
    let connected = sites
        .features
        .iter()
        .filter(|f| f.property("joined_to_hub").unwrap().as_bool().unwrap())
        .count();
    assert_eq!(
        connected as u64,
        s["sites"]["joined_to_hub"].as_u64().unwrap()
    );
    for f in &sites.features {
        if f.property("status").unwrap() == "not_attached" {
            assert!(f.property("reason").unwrap().is_string());
        }
    }
}

#[test]
fn whole_network_demo_writes_a_complete_consistent_set() {
    let d = tmp();
    let out = d.path().join("demo");
    let o = run(&[
        "demo",
        "--whole-network",
        "--out",
        out.to_str().unwrap(),
        "--quiet",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        listing(&out),
        [
            ".reknit-outputs",
            "map.html",
            "network.geojson",
            "plan.geojson",
            "plan.png",
            "plan.svg",
            "qa.geojson",
            "report.html",
            "summary.json",
            "work-orders.csv"
        ],
        "no staging folder may remain"
    );
    let net = read_fc(&out.join("network.geojson"));
    let plan = read_fc(&out.join("plan.geojson"));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(
        net.features.len() as u64,
        s["counts"]["edges"].as_u64().unwrap()
    );
    assert_eq!(
        plan.features.len() as u64,
        s["plan_edges"].as_u64().unwrap()
    );
    // Forest size (common practice, no source): junctions − components edges.
    assert_eq!(
        s["plan_edges"].as_u64().unwrap(),
        s["counts"]["junctions"].as_u64().unwrap() - s["counts"]["components"].as_u64().unwrap()
    );
    let total: f64 = plan
        .features
        .iter()
        .map(|f| f.property("cost").unwrap().as_f64().unwrap())
        .sum();
    assert!((total - s["total_cost"].as_f64().unwrap()).abs() < 1e-6);
    assert_eq!(s["cost_unit"], "repair-metre");
    assert_eq!(
        s["cautions"].as_array().unwrap().len(),
        reknit::cautions::CAUTIONS.len()
    );
    for f in &net.features {
        for key in [
            "edge",
            "from",
            "to",
            "length_m",
            "damage",
            "cost",
            "component",
            "source_index",
            "source_id",
        ] {
            assert!(f.contains_property(key), "missing {key}");
        }
        // RFC 7946 §3.1.4 and §4: LineStrings of lon/lat positions.
        match &f.geometry.as_ref().unwrap().value {
            geojson::GeometryValue::LineString { coordinates: c } => {
                assert!(c.len() >= 2);
                for p in c {
                    assert!(p[0].abs() <= 180.0 && p[1].abs() <= 90.0);
                }
            }
            other => panic!("{other:?}"),
        }
    }
    for f in &plan.features {
        let repair = f.property("repair").unwrap().as_bool().unwrap();
        let cost = f.property("cost").unwrap().as_f64().unwrap();
        assert_eq!(repair, cost > 0.0);
    }
}

#[test]
fn outputs_are_byte_identical_across_runs_and_thread_counts() {
    let d = tmp();
    let mut sets = Vec::new();
    for threads in ["1", "2", "2"] {
        let out = d.path().join(format!("t{}", sets.len()));
        let o = reknit()
            .env("RAYON_NUM_THREADS", threads)
            .args(["demo", "--out"])
            .arg(&out)
            .arg("--quiet")
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", stderr(&o));
        let files: Vec<Vec<u8>> = [
            "network.geojson",
            "plan.geojson",
            "qa.geojson",
            "sites.geojson",
            "summary.json",
        ]
        .iter()
        .map(|n| fs::read(out.join(n)).unwrap())
        .collect();
        sets.push(files);
    }
    assert_eq!(sets[0], sets[1], "1 thread vs 2 threads");
    assert_eq!(sets[1], sets[2], "run vs rerun");
}

#[test]
fn prim_and_kruskal_give_the_same_total() {
    let d = tmp();
    let mut totals = Vec::new();
    for alg in ["kruskal", "prim"] {
        let out = d.path().join(alg);
        let o = run(&[
            "demo",
            "--out",
            out.to_str().unwrap(),
            "--quiet",
            "--whole-network",
            "--mst",
            alg,
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        totals.push(
            read_json(&out.join("summary.json"))["total_cost"]
                .as_f64()
                .unwrap(),
        );
    }
    assert_eq!(totals[0], totals[1]);
}

#[test]
fn existing_outputs_need_force() {
    let d = tmp();
    let out = d.path().join("o");
    let out_s = out.to_str().unwrap();
    assert!(run(&["demo", "--out", out_s, "-q"]).status.success());
    let before = fs::read(out.join("summary.json")).unwrap();
    assert_eq!(listing(&out).len(), 13);
    let o = run(&["demo", "--out", out_s, "-q", "--snap", "1"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("--force"), "{}", stderr(&o));
    assert_eq!(
        fs::read(out.join("summary.json")).unwrap(),
        before,
        "left untouched"
    );
    // Replacing with a whole-network plan must not leave the old sites layer behind.
    let o = run(&[
        "demo",
        "--out",
        out_s,
        "-q",
        "--snap",
        "1",
        "--force",
        "--whole-network",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["settings"]["snap_m"], 1.0);
    assert_eq!(
        listing(&out),
        [
            ".reknit-outputs",
            "map.html",
            "network.geojson",
            "plan.geojson",
            "plan.png",
            "plan.svg",
            "qa.geojson",
            "report.html",
            "summary.json",
            "work-orders.csv"
        ]
    );
}

#[test]
fn summary_records_input_fingerprint() {
    let d = tmp();
    let out = d.path().join("o");
    let roads = sample_roads();
    let o = run(&[
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    let input = &s["inputs"][0];
    assert_eq!(
        input["bytes"].as_u64().unwrap(),
        fs::metadata(&roads).unwrap().len()
    );
    // Independent digest: the sha256sum tool (GNU coreutils).
    if let Some(tool) = external::program("sha256sum-input-digest", &["sha256sum"], "coreutils") {
        let o = std::process::Command::new(tool)
            .arg(&roads)
            .output()
            .unwrap();
        assert!(o.status.success());
        let text = String::from_utf8_lossy(&o.stdout);
        assert_eq!(
            input["sha256"].as_str().unwrap(),
            text.split_whitespace().next().unwrap()
        );
    }
}

#[test]
fn help_explains_every_flag() {
    let o = run(&["help", "plan"]);
    let text = String::from_utf8_lossy(&o.stdout);
    for flag in [
        "--roads",
        "--out",
        "--snap",
        "--damage-field",
        "--default-damage",
        "--closed-value",
        "--id-field",
        "--mst",
        "--force",
        "--quiet",
        "--verbose",
    ] {
        assert!(text.contains(flag), "help lacks {flag}");
    }
    assert!(run(&["--help"]).status.success());
    assert!(run(&["demo", "--help"]).status.success());
}

#[test]
fn readme_carries_the_cautions() {
    let readme = fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md")).unwrap();
    for c in reknit::cautions::CAUTIONS {
        assert!(readme.contains(c), "README lacks caution: {c}");
    }
}

#[test]
fn check_reports_topology_and_every_repair() {
    let d = tmp();
    let out = d.path().join("check");
    let o = run(&[
        "check",
        "--roads",
        sample_roads().to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        listing(&out),
        [
            ".reknit-outputs",
            "network.geojson",
            "qa.geojson",
            "summary.json"
        ]
    );
    let s = read_json(&out.join("summary.json"));
    let comps = s["components"].as_array().unwrap();
    assert_eq!(
        comps.len() as u64,
        s["component_count"].as_u64().unwrap().min(100)
    );
    let qa = read_fc(&out.join("qa.geojson"));
    let counted: u64 = s["counts"]["qa"]
        .as_object()
        .unwrap()
        .values()
        .map(|v| v.as_u64().unwrap())
        .sum();
    assert_eq!(qa.features.len() as u64, counted);
    // The sample map has digitised gaps at junctions and an overpass: both are on record.
    assert!(s["counts"]["qa"]["merged_vertices"].as_u64().unwrap_or(0) >= 1);
    assert!(
        s["counts"]["qa"]["crossing_left_apart"]
            .as_u64()
            .unwrap_or(0)
            >= 1
    );
    assert_eq!(
        s["dangles"].as_u64().unwrap(),
        s["counts"]["qa"]["dangling_end"].as_u64().unwrap()
    );
}
