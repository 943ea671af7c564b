//! Work orders crews can hand back, structures flagged for inspection, and the data's
//! attribution, on real data.
//!
//! Data: tests/data/roads/liechtenstein (OpenStreetMap extract 2015-10-06, © OpenStreetMap
//! contributors, ODbL 1.0): one feature per OSM way, with its `osm_id` and its `bridge` and
//! `tunnel` tags.

mod common;
use common::*;
use serde_json::{Value, json};
use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::path::{Path, PathBuf};

const LI: &str = "roads/liechtenstein/liechtenstein_highways.geojson";
const OSM: &str = "© OpenStreetMap contributors (ODbL)";

fn plan(roads: &Path, out: &Path, extra: &[&str]) {
    let mut a = vec!["-q"];
    a.extend_from_slice(extra);
    let o = plan_cli(roads, out, &a);
    assert!(o.status.success(), "{}", stderr(&o));
}

fn features(p: &Path) -> Vec<Value> {
    read_json(p)["features"].as_array().unwrap().clone()
}

/// work-orders.csv as header → column maps.
fn work_orders(out: &Path) -> Vec<HashMap<String, String>> {
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let h: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            h.iter()
                .cloned()
                .zip(rec.iter().map(String::from))
                .collect()
        })
        .collect()
}

#[test]
fn work_order_columns_follow_the_existing_ones() {
    let d = tmp();
    let out = d.path().join("o");
    plan(&data(LI), &out, &[]);
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let h: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    let purpose = h.iter().position(|c| c == "purpose").unwrap();
    assert_eq!(
        h[purpose + 1..],
        [
            "work_order",
            "structure",
            "status",
            "verified_by",
            "verified_on",
            "caution"
        ]
    );
    for row in work_orders(&out) {
        assert!(row["work_order"].starts_with("WO-"));
        for blank in ["status", "verified_by", "verified_on"] {
            assert_eq!(row[blank], "", "crews fill {blank}");
        }
    }
}

#[test]
fn work_orders_are_unique_on_many_split_roads_and_match_the_map() {
    let d = tmp();
    let out = d.path().join("o");
    plan(&data(LI), &out, &[]);
    let net = features(&out.join("network.geojson"));
    // Many OSM ways are split at junctions into several pieces: the keys must still differ.
    let mut pieces: HashMap<String, usize> = HashMap::new();
    for f in &net {
        *pieces
            .entry(f["properties"]["source_id"].to_string())
            .or_default() += 1;
    }
    let split = pieces.values().filter(|&&n| n >= 2).count();
    assert!(split > 500, "only {split} split roads");
    let keys: Vec<&str> = net
        .iter()
        .map(|f| f["properties"]["work_order"].as_str().unwrap())
        .collect();
    let unique: BTreeSet<&&str> = keys.iter().collect();
    assert_eq!(unique.len(), keys.len(), "work-order keys repeat");
    // The plan layer and the work orders name each edge alike.
    let by_edge: HashMap<i64, &str> = net
        .iter()
        .map(|f| {
            (
                f["properties"]["edge"].as_i64().unwrap(),
                f["properties"]["work_order"].as_str().unwrap(),
            )
        })
        .collect();
    for f in features(&out.join("plan.geojson")) {
        let e = f["properties"]["edge"].as_i64().unwrap();
        assert_eq!(f["properties"]["work_order"].as_str().unwrap(), by_edge[&e]);
    }
    let rows = work_orders(&out);
    assert!(rows.len() > 1000);
    for row in rows {
        let e: i64 = row["edge"].parse().unwrap();
        assert_eq!(row["work_order"], by_edge[&e]);
        // The key names the OSM way the crews can look up.
        assert!(row["work_order"].starts_with(&format!("WO-{}-", row["source_id"])));
    }
}

/// Pieces keyed by their exact geometry: (work order, edge id).
fn keyed_pieces(out: &Path) -> HashMap<String, (String, i64)> {
    features(&out.join("network.geojson"))
        .into_iter()
        .map(|f| {
            (
                f["geometry"]["coordinates"].to_string(),
                (
                    f["properties"]["work_order"].as_str().unwrap().to_string(),
                    f["properties"]["edge"].as_i64().unwrap(),
                ),
            )
        })
        .collect()
}

#[test]
fn work_orders_survive_a_re_plan_with_other_roads_and_new_damage() {
    let d = tmp();
    let before = d.path().join("before");
    plan(&data(LI), &before, &[]);
    // The same layer, re-planned: a road added far from the rest at the start, every 40th road
    // removed, and damage given to every road.
    let mut layer = read_json(&data(LI));
    let fs = layer["features"].as_array_mut().unwrap();
    let mut kept: Vec<Value> = vec![json!({
        "type": "Feature",
        "properties": {"osm_id": 1, "highway": "track"},
        "geometry": {"type": "LineString", "coordinates": [[9.40, 47.00], [9.401, 47.001]]}
    })];
    for (i, f) in fs.iter_mut().enumerate() {
        if i % 40 == 7 {
            continue;
        }
        f["properties"]["damage"] =
            [json!("closed"), json!(0.0), json!(0.3), json!(1.0)][i % 4].clone();
        kept.push(f.clone());
    }
    *fs = kept;
    let changed: PathBuf = d.path().join("changed.geojson");
    std::fs::write(&changed, layer.to_string()).unwrap();
    let after = d.path().join("after");
    plan(&changed, &after, &[]);
    let (a, b) = (keyed_pieces(&before), keyed_pieces(&after));
    let mut same = 0;
    let mut renumbered = 0;
    for (geom, (key, edge)) in &a {
        if let Some((key2, edge2)) = b.get(geom) {
            assert_eq!(key, key2, "the same piece of road got another key");
            same += 1;
            renumbered += usize::from(edge != edge2);
        }
    }
    // Most pieces are untouched by the change, and their edge numbers moved: keys built from
    // edge numbers would fail here.
    assert!(same * 10 > a.len() * 8, "{same} of {}", a.len());
    assert!(renumbered * 2 > same, "{renumbered} of {same}");
}

#[test]
fn structures_are_flagged_from_osm_bridge_and_tunnel_tags() {
    // The tagged ways, counted straight from the data file (OpenStreetMap, ODbL).
    let mut tagged: BTreeMap<i64, &str> = BTreeMap::new();
    let source = read_json(&data(LI));
    for f in source["features"].as_array().unwrap() {
        let p = &f["properties"];
        let id = p["osm_id"].as_i64().unwrap();
        let yes = |k: &str| p[k].as_str().is_some_and(|v| v != "no");
        if yes("bridge") {
            tagged.insert(id, "bridge");
        } else if yes("tunnel") {
            tagged.insert(
                id,
                if p["tunnel"] == "culvert" {
                    "culvert"
                } else {
                    "tunnel"
                },
            );
        }
    }
    assert!(tagged.len() > 100, "{} tagged ways", tagged.len());
    let d = tmp();
    let out = d.path().join("o");
    plan(&data(LI), &out, &[]);
    let net = features(&out.join("network.geojson"));
    let mut flagged: BTreeMap<i64, String> = BTreeMap::new();
    let mut with_edges = BTreeSet::new();
    let mut flagged_edges = 0;
    for f in &net {
        let p = &f["properties"];
        let id = p["source_id"].as_i64().unwrap();
        with_edges.insert(id);
        if let Some(s) = p["structure"].as_str() {
            flagged.insert(id, s.to_string());
            flagged_edges += 1;
        } else {
            assert!(
                !tagged.contains_key(&id),
                "way {id} is tagged but a piece is not flagged"
            );
        }
    }
    let expected: BTreeMap<i64, String> = tagged
        .iter()
        .filter(|(id, _)| with_edges.contains(*id))
        .map(|(id, k)| (*id, k.to_string()))
        .collect();
    assert_eq!(flagged, expected);
    // Planned roads and repairs on structures: the plan layer, the work orders, the summary and
    // the report all agree.
    let planned: BTreeSet<i64> = features(&out.join("plan.geojson"))
        .iter()
        .filter(|f| {
            let id = f["properties"]["source_id"].as_i64().unwrap();
            let s = f["properties"]["structure"].as_str();
            assert_eq!(s, tagged.get(&id).copied());
            s.is_some()
        })
        .map(|f| f["properties"]["edge"].as_i64().unwrap())
        .collect();
    assert!(!planned.is_empty());
    let rows: BTreeSet<i64> = work_orders(&out)
        .iter()
        .filter(|r| !r["structure"].is_empty())
        .map(|r| r["edge"].parse().unwrap())
        .collect();
    let s = read_json(&out.join("summary.json"));
    let st = &s["structures"];
    assert_eq!(st["network_edges"], flagged_edges);
    assert_eq!(st["planned"], planned.len());
    let listed: BTreeSet<i64> = st["on_structures"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["edge"].as_i64().unwrap())
        .collect();
    assert_eq!(listed, planned);
    // Every repair on a structure has its work order; intact planned roads have none.
    let repairs: BTreeSet<i64> = st["on_structures"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|r| r["repair"] == true)
        .map(|r| r["edge"].as_i64().unwrap())
        .collect();
    assert_eq!(rows, repairs);
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(html.contains("Structures: inspect before use"));
    for r in st["on_structures"].as_array().unwrap() {
        assert!(html.contains(r["work_order"].as_str().unwrap()));
    }
}

#[test]
fn osm_derived_outputs_carry_the_osm_attribution() {
    let d = tmp();
    let out = d.path().join("o");
    plan(&data(LI), &out, &[]);
    assert_eq!(read_json(&out.join("summary.json"))["attribution"], OSM);
    for layer in ["network", "plan", "qa"] {
        let v = read_json(&out.join(format!("{layer}.geojson")));
        assert_eq!(v["attribution"], OSM, "{layer}");
    }
    let svg = std::fs::read_to_string(out.join("plan.svg")).unwrap();
    assert!(svg.contains(&format!(">{OSM}</text>")));
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(html.contains(OSM));
    // check reads the same fields.
    let chk = d.path().join("c");
    let o = run(&[
        "check",
        "--roads",
        data(LI).to_str().unwrap(),
        "--out",
        chk.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(read_json(&chk.join("summary.json"))["attribution"], OSM);
    assert_eq!(read_json(&chk.join("network.geojson"))["attribution"], OSM);
}

#[test]
fn other_sources_are_attributed_only_when_asked() {
    let d = tmp();
    let plain = d.path().join("plain");
    plan(&sample_roads(), &plain, &[]);
    assert_eq!(
        read_json(&plain.join("summary.json"))["attribution"],
        Value::Null
    );
    assert!(
        read_json(&plain.join("plan.geojson"))
            .get("attribution")
            .is_none()
    );
    let given = d.path().join("given");
    plan(
        &sample_roads(),
        &given,
        &["--attribution", "Eastvane County <GIS> & partners"],
    );
    let text = "Eastvane County <GIS> & partners";
    assert_eq!(read_json(&given.join("summary.json"))["attribution"], text);
    assert_eq!(
        read_json(&given.join("network.geojson"))["attribution"],
        text
    );
    let svg = std::fs::read_to_string(given.join("plan.svg")).unwrap();
    assert!(svg.contains("Eastvane County &lt;GIS&gt; &amp; partners"));
    // With OSM data, the given text comes first and OSM's licence line is kept.
    let both = d.path().join("both");
    plan(&data(LI), &both, &["--attribution", "Survey 2015"]);
    assert_eq!(
        read_json(&both.join("summary.json"))["attribution"],
        format!("Survey 2015; {OSM}")
    );
}

#[test]
fn a_named_structure_field_is_the_only_one_read() {
    let d = tmp();
    let roads = write_collection(
        d.path(),
        "r.geojson",
        &[
            line(
                &[[0.0, 0.0], [0.001, 0.0]],
                r#"{"kind":"Culvert","bridge":"yes","damage":0.5}"#,
            ),
            line(
                &[[0.001, 0.0], [0.002, 0.0]],
                r#"{"kind":"no","bridge":"yes","damage":0.5}"#,
            ),
        ],
    );
    let out = d.path().join("o");
    plan(&roads, &out, &["--structure-field", "kind"]);
    let s: Vec<Value> = features(&out.join("plan.geojson"))
        .iter()
        .map(|f| f["properties"]["structure"].clone())
        .collect();
    assert_eq!(s, [json!("culvert"), Value::Null]);
    // Without the option the common fields are read.
    let out2 = d.path().join("o2");
    plan(&roads, &out2, &[]);
    let s: Vec<Value> = features(&out2.join("plan.geojson"))
        .iter()
        .map(|f| f["properties"]["structure"].clone())
        .collect();
    assert_eq!(s, [json!("bridge"), json!("bridge")]);
    // A named field no road has is refused, naming it.
    let o = plan_cli(&roads, &d.path().join("o3"), &["--structure-field", "span"]);
    assert!(!o.status.success());
    assert!(stderr(&o).contains("span"), "{}", stderr(&o));
}
