//! Crews, days and corridors end to end: work orders by crew and day, several crews never worse
//! than one, corridor lengths against networkx, and a detour fixed on a hand-made district.

mod common;
use common::*;
use std::collections::{HashMap, HashSet};
use std::path::{Path, PathBuf};

fn demo(out: &Path, extra: &[&str]) {
    let mut args = vec!["demo", "--out", out.to_str().unwrap(), "-q"];
    args.extend_from_slice(extra);
    let o = run(&args);
    assert!(o.status.success(), "{}", stderr(&o));
}

/// Σ priority × the day each site joins the hub (read from summary.json and sites.geojson).
fn weighted_days(out: &Path) -> f64 {
    let sites = read_fc(&out.join("sites.geojson"));
    let priority: HashMap<String, f64> = sites
        .features
        .iter()
        .map(|f| {
            let p = f.properties.as_ref().unwrap();
            (
                p["site_id"].as_str().unwrap().to_string(),
                p["priority"].as_f64().unwrap(),
            )
        })
        .collect();
    let s = read_json(&out.join("summary.json"));
    let mut total = 0.0;
    for d in s["days"].as_array().unwrap() {
        for id in d["sites_joined"].as_array().unwrap() {
            total += priority[id.as_str().unwrap()] * d["day"].as_f64().unwrap();
        }
    }
    total
}

fn work_orders(out: &Path) -> Vec<HashMap<String, String>> {
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let head: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    r.records()
        .map(|x| {
            head.iter()
                .cloned()
                .zip(x.unwrap().iter().map(String::from))
                .collect()
        })
        .collect()
}

#[test]
fn two_crews_split_the_work_and_never_do_worse_than_one() {
    let d = tmp();
    let (one, two) = (d.path().join("one"), d.path().join("two"));
    demo(&one, &["--crew-capacity", "2500"]);
    demo(&two, &["--crew-capacity", "2500", "--crews", "2"]);
    // Objective: Σ priority × join day, the one-crew order as the bound (common practice, no source).
    let (w1, w2) = (weighted_days(&one), weighted_days(&two));
    assert!(w2 <= w1, "two crews {w2} > one crew {w1}");
    let rows = work_orders(&two);
    let crews: HashSet<&str> = rows.iter().map(|r| r["crew"].as_str()).collect();
    assert_eq!(crews, HashSet::from(["1", "2"]));
    let s = read_json(&two.join("summary.json"));
    let mut worked = 0.0;
    for d in s["days"].as_array().unwrap() {
        for c in d["crews"].as_array().unwrap() {
            let m = c["repair_metres"].as_f64().unwrap();
            assert!(m <= 2500.0 + 1e-9, "a crew works {m} in a day");
            worked += m;
        }
    }
    assert!(
        (worked - s["total_cost"].as_f64().unwrap()).abs() < 0.05,
        "{worked}"
    );
    // Repairs longer than a day span days; each finishes on its last day.
    for r in &rows {
        let (a, b): (u32, u32) = (
            r["first_day"].parse().unwrap(),
            r["last_day"].parse().unwrap(),
        );
        assert!(a <= b);
        if r["cost"].parse::<f64>().unwrap() > 2500.0 {
            assert!(b > a, "{r:?}");
        }
    }
    // Without a capacity there are no days.
    let none = d.path().join("none");
    demo(&none, &[]);
    assert!(read_json(&none.join("summary.json"))["days"].is_null());
    assert!(
        work_orders(&none)
            .iter()
            .all(|r| r["crew"].is_empty() && r["last_day"].is_empty())
    );
}

#[test]
fn corridor_lengths_match_networkx() {
    let d = tmp();
    let out = d.path().join("o");
    demo(&out, &["--redundancy"]);
    let Some(py) = external::python_with("networkx-corridors", &["networkx"]) else {
        return;
    };
    // Shortest paths by networkx's Dijkstra (networkx.shortest_path_length, weight "length") over
    // the usable roads after the plan and backup links, and over every road.
    let script = r#"
import json, sys, networkx as nx
out = sys.argv[1]
def fc(n): return json.load(open(f"{out}/{n}"))["features"]
done = {f["properties"]["edge"] for f in fc("plan.geojson")}
done |= {f["properties"]["edge"] for f in fc("backup.geojson")}
now, whole = nx.Graph(), nx.Graph()
def add(g, a, b, l):
    if not g.has_edge(a, b) or g[a][b]["length"] > l: g.add_edge(a, b, length=l)
for f in fc("network.geojson"):
    p = f["properties"]
    a, b, l = p["from"], p["to"], p["length_m"]
    if a == b: continue
    add(whole, a, b, l)
    if p["cost"] is not None and (p["cost"] == 0 or p["edge"] in done): add(now, a, b, l)
for f in fc("corridors.geojson"):
    p = f["properties"]
    s, t = p["from_junction"], p["to_junction"]
    print(p["site"], nx.shortest_path_length(now, s, t, weight="length"), nx.shortest_path_length(whole, s, t, weight="length"))
"#;
    let o = std::process::Command::new(&py)
        .args(["-c", script, out.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let ours: HashMap<String, (f64, f64)> = read_fc(&out.join("corridors.geojson"))
        .features
        .iter()
        .map(|f| {
            let p = f.properties.as_ref().unwrap();
            let num = |k: &str| p[k].as_f64().unwrap();
            (
                p["site"].as_str().unwrap().to_string(),
                (num("length_m"), num("undamaged_length_m")),
            )
        })
        .collect();
    let text = String::from_utf8_lossy(&o.stdout).into_owned();
    assert_eq!(text.lines().count(), ours.len());
    assert!(!ours.is_empty());
    for l in text.lines() {
        let v: Vec<&str> = l.split_whitespace().collect();
        let (now, whole): (f64, f64) = (v[1].parse().unwrap(), v[2].parse().unwrap());
        let (a, b) = ours[v[0]];
        // Layer lengths are printed to the millimetre, so sums of rounded pieces differ slightly.
        assert!(
            (a - now).abs() < 0.05 && (b - whole).abs() < 0.05,
            "{l}: ours {a} {b}"
        );
    }
}

/// Hub A and site B 0.01° apart on the equator: an intact way round (three sides of a square,
/// about 3.3 km) and a damaged direct road (about 1.1 km).
fn square(d: &Path) -> (PathBuf, PathBuf) {
    let road = |c: &str, damage: f64| {
        format!(
            r#"{{"type":"Feature","properties":{{"damage":{damage}}},"geometry":{{"type":"LineString","coordinates":{c}}}}}"#
        )
    };
    let roads = write_collection(
        d,
        "roads.geojson",
        &[
            road("[[0,0],[0,0.01]]", 0.0),
            road("[[0,0.01],[0.01,0.01]]", 0.0),
            road("[[0.01,0.01],[0.01,0]]", 0.0),
            road("[[0,0],[0.01,0]]", 0.5),
        ],
    );
    let site = |id: &str, lon: f64, p: u32| {
        format!(
            r#"{{"type":"Feature","properties":{{"site_id":"{id}","priority":{p}}},"geometry":{{"type":"Point","coordinates":[{lon},0]}}}}"#
        )
    };
    let sites = write_collection(
        d,
        "sites.geojson",
        &[site("A", 0.0, 10), site("B", 0.01, 1)],
    );
    (roads, sites)
}

#[test]
fn a_long_detour_is_flagged_and_the_direct_repair_offered() {
    let d = tmp();
    let (roads, sites) = square(d.path());
    let out = d.path().join("o");
    let o = run(&[
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--sites",
        sites.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
        "--max-detour",
        "1.5",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    // B is joined over the intact way round: nothing to repair, a detour ratio of about 3.
    let c = read_fc(&out.join("corridors.geojson"));
    assert_eq!(c.features.len(), 1);
    let p = c.features[0].properties.as_ref().unwrap();
    let ratio = p["detour_ratio"].as_f64().unwrap();
    // Not quite 3: a degree of latitude is shorter than one of longitude on the equator (WGS84).
    assert!((2.95..3.0).contains(&ratio), "{ratio}");
    let len = |k: &str| p[k].as_f64().unwrap();
    assert!((ratio - len("length_m") / len("undamaged_length_m")).abs() < 1e-5);
    assert_eq!(p["over_max_detour"], true);
    // The offer: the direct road, half its length in repair-metres, bringing the trip to 1.1 km.
    let len = p["undamaged_length_m"].as_f64().unwrap();
    assert!((p["fix_cost"].as_f64().unwrap() - len * 0.5).abs() < 0.01);
    assert!((p["fix_length_m"].as_f64().unwrap() - len).abs() < 0.01);
    let rows = work_orders(&out);
    assert_eq!(rows.len(), 1);
    assert_eq!(rows[0]["purpose"], "detour");
    assert_eq!(
        rows[0]["work_order"],
        p["fix_work_orders"].as_str().unwrap()
    );
    // A looser limit flags nothing and offers nothing.
    let out2 = d.path().join("o2");
    let o = run(&[
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--sites",
        sites.to_str().unwrap(),
        "--out",
        out2.to_str().unwrap(),
        "-q",
        "--max-detour",
        "3.5",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(work_orders(&out2).is_empty());
    let s = read_json(&out2.join("summary.json"));
    assert_eq!(s["corridors"]["flagged"].as_array().unwrap().len(), 0);
}
