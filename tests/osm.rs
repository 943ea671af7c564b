//! OpenStreetMap `.osm.pbf` extracts read directly: roads from `highway` ways, sites by tag.
//!
//! Data: tests/data/roads/liechtenstein (OpenStreetMap extract 2015-10-06, © OpenStreetMap
//! contributors, ODbL 1.0) and tests/data/osm/invented.osm.pbf (invented, written by
//! scripts/make-osm-fixture.py). Peer: pyosmium (PyPI `osmium`), reading the same files
//! independently through scripts/peer_osm_topology.py.

mod common;
use common::*;
use std::path::{Path, PathBuf};
use std::process::Command;

const LI_PBF: &str = "roads/liechtenstein/liechtenstein-2015-10-06.osm.pbf";
const LI_GEOJSON: &str = "roads/liechtenstein/liechtenstein_highways.geojson";
const INVENTED: &str = "osm/invented.osm.pbf";

fn plan(d: &Path, name: &str, roads: &Path, extra: &[&str]) -> PathBuf {
    plan_quiet(d, name, roads, extra)
}

/// pyosmium's reading of `pbf`, leaving out the `highway` values listed.
fn pyosmium(check: &str, pbf: &Path, not_roads: &str) -> Option<serde_json::Value> {
    let py = external::python_with(check, &["osmium"])?;
    let o = Command::new(py)
        .arg(script("peer_osm_topology.py"))
        .arg(pbf)
        .args(["--not-roads", not_roads])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    Some(serde_json::from_slice(&o.stdout).unwrap())
}

/// The default list as the documentation gives it (docs/architecture.md), written out here so a
/// change to the code's list shows up as a difference from the peer.
const DOCUMENTED_NOT_ROADS: &str = "proposed,planned,construction,abandoned,disused,razed,demolished,dismantled,platform,rest_area,services,bus_stop,elevator";

fn check_against_peer(s: &serde_json::Value, peer: &serde_json::Value) {
    let c = &s["counts"];
    assert_eq!(c["features_used"], peer["ways"], "ways used");
    assert_eq!(c["edges"], peer["edges"], "edges");
    assert_eq!(c["junctions"], peer["junctions"], "junctions");
    let cut = c["features_cut_at_edge"].as_u64().unwrap_or(0);
    assert_eq!(cut, peer["ways_cut_at_edge"].as_u64().unwrap(), "cut ways");
    for (value, n) in peer["left_out"].as_object().unwrap() {
        let reason = c["features_skipped"]
            .as_object()
            .unwrap()
            .iter()
            .find(|(k, _)| k.starts_with(&format!("highway={value} ")))
            .unwrap_or_else(|| panic!("highway={value} not counted: {}", c["features_skipped"]));
        assert_eq!(reason.1, n, "highway={value}");
    }
}

#[test]
fn extract_network_matches_pyosmium_on_liechtenstein() {
    // Node-id topology (pyosmium) against coordinate noding at --snap 0 on the real extract, and
    // the same network as the GeoJSON conversion of the same extract shipped beside it.
    let d = tmp();
    let out = plan(d.path(), "pbf", &data(LI_PBF), &["--snap", "0"]);
    let s = read_json(&out.join("summary.json"));
    assert!(
        s["attribution"]
            .as_str()
            .unwrap()
            .contains("OpenStreetMap contributors"),
        "{}",
        s["attribution"]
    );
    let gj = plan(d.path(), "gj", &data(LI_GEOJSON), &["--snap", "0"]);
    let g = read_json(&gj.join("summary.json"));
    for k in ["edges", "junctions", "components"] {
        assert_eq!(
            s["counts"][k], g["counts"][k],
            "{k} against the GeoJSON layer"
        );
    }
    let Some(peer) = pyosmium(
        "pyosmium-pbf-reader-liechtenstein",
        &data(LI_PBF),
        DOCUMENTED_NOT_ROADS,
    ) else {
        return;
    };
    check_against_peer(&s, &peer);
}

#[test]
fn left_out_values_cut_ways_names_and_structures() {
    let d = tmp();
    let pbf = data(INVENTED);
    let out = plan(d.path(), "o", &pbf, &["--snap", "0"]);
    let s = read_json(&out.join("summary.json"));
    let skipped = s["counts"]["features_skipped"].as_object().unwrap();
    let n = |prefix: &str| {
        skipped
            .iter()
            .find(|(k, _)| k.starts_with(prefix))
            .map(|(_, v)| v.as_u64().unwrap())
    };
    assert_eq!(n("highway=construction "), Some(1));
    assert_eq!(n("highway=proposed "), Some(1));
    assert_eq!(n("area=yes"), Some(1));
    assert_eq!(n("a way with fewer than two"), Some(1));
    assert_eq!(s["counts"]["features_cut_at_edge"], 1);
    let net = read_fc(&out.join("network.geojson"));
    let structure = |id: i64| {
        net.features
            .iter()
            .filter(|f| f.property("source_id").and_then(|v| v.as_i64()) == Some(id))
            .map(|f| f.property("structure").cloned().unwrap())
            .collect::<Vec<_>>()
    };
    assert!(structure(104).iter().all(|v| v == "bridge"));
    assert!(structure(105).iter().all(|v| v == "tunnel"));
    assert!(structure(100).iter().all(|v| v.is_null()));
    // The track cut at node 999 keeps both runs (3–7 and 11–15): two edges.
    assert_eq!(structure(106).len(), 2);
    let orders = std::fs::read_to_string(out.join("work-orders.csv")).unwrap();
    assert!(orders.contains("Talstrasse (28)"), "{orders}");
    if let Some(peer) = pyosmium("pyosmium-pbf-reader-invented", &pbf, DOCUMENTED_NOT_ROADS) {
        check_against_peer(&s, &peer);
    }
}

#[test]
fn keep_where_replaces_the_default_list() {
    let d = tmp();
    let out = plan(
        d.path(),
        "k",
        &data(INVENTED),
        &["--keep-where", "highway=construction,primary"],
    );
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_used"], 2);
    let skipped = s["counts"]["features_skipped"].as_object().unwrap();
    assert!(
        !skipped
            .keys()
            .any(|k| k.starts_with("highway=construction")),
        "{skipped:?}"
    );
}

#[test]
fn sites_by_tag_from_the_extract() {
    let d = tmp();
    let pbf = data(INVENTED);
    let p = pbf.to_str().unwrap();
    let out = plan(d.path(), "s", &pbf, &["--sites", p]);
    let sites = read_fc(&out.join("sites.geojson"));
    let mut ids: Vec<String> = sites
        .features
        .iter()
        .map(|f| f.property("site_id").unwrap().as_str().unwrap().to_string())
        .collect();
    ids.sort();
    // Default tags: the hospital and fuel nodes and the school drawn as a closed way; not the
    // bench, and not amenity=shelter (a bus or picnic shelter as often as a refuge).
    assert_eq!(ids, ["node/20", "node/21", "way/200"]);
    let raw = read_json(&out.join("sites.geojson"));
    let school = raw["features"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["properties"]["site_id"] == "way/200")
        .unwrap();
    let pt = &school["geometry"]["coordinates"];
    let (lon, lat) = (pt[0].as_f64().unwrap(), pt[1].as_f64().unwrap());
    assert!((9.5011..9.5019).contains(&lon) && (47.1011..47.1019).contains(&lat));
    let out = plan(
        d.path(),
        "t",
        &pbf,
        &["--sites", p, "--site-tags", "amenity=shelter"],
    );
    let sites = read_fc(&out.join("sites.geojson"));
    assert_eq!(sites.features.len(), 1);
    assert_eq!(sites.features[0].property("site_id").unwrap(), "node/22");
}
