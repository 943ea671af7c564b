//! Checks against real open data and general-purpose reference tools.
//!
//! Data: tests/data/roads/liechtenstein (OpenStreetMap extract 2015-10-06, © OpenStreetMap
//! contributors, ODbL 1.0). Peers: networkx, pyosmium, geographiclib (PyPI), GDAL's ogrinfo.
//! Each peer check records whether it ran (tests/common/external.rs); scripts/test requires them all.

mod common;
use common::*;
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::process::Command;

const LI_GEOJSON: &str = "roads/liechtenstein/liechtenstein_highways.geojson";
const LI_PBF: &str = "roads/liechtenstein/liechtenstein-2015-10-06.osm.pbf";

/// Plans the Liechtenstein layer into a temporary folder with extra flags.
fn plan_liechtenstein(d: &Path, name: &str, extra: &[&str]) -> PathBuf {
    let roads = data(LI_GEOJSON);
    plan_quiet(d, name, &roads, extra)
}

fn python_json(py: &Path, script_name: &str, arg: &Path) -> serde_json::Value {
    let o = Command::new(py)
        .arg(script(script_name))
        .arg(arg)
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "{script_name}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    serde_json::from_slice(&o.stdout).unwrap()
}

fn milli(v: &serde_json::Value) -> u64 {
    (v.as_f64().unwrap() * 1000.0).round() as u64
}

#[test]
fn forest_total_matches_networkx_and_prim_on_liechtenstein() {
    let d = tmp();
    let out = plan_liechtenstein(d.path(), "k", &[]);
    let s = read_json(&out.join("summary.json"));
    let ours = milli(&s["total_cost"]);
    // Independent implementation in the same binary.
    let prim = plan_liechtenstein(d.path(), "p", &["--mst", "prim"]);
    assert_eq!(
        milli(&read_json(&prim.join("summary.json"))["total_cost"]),
        ours
    );
    // Reference library: networkx minimum_spanning_tree (Kruskal) on the same edge list.
    let Some(py) = external::python_with("networkx-msf-liechtenstein", &["networkx"]) else {
        return;
    };
    let nx = python_json(&py, "peer_msf_networkx.py", &out.join("network.geojson"));
    assert_eq!(nx["total_milli"].as_u64().unwrap(), ours, "networkx total");
    assert_eq!(
        nx["edges"].as_u64().unwrap(),
        s["plan_edges"].as_u64().unwrap()
    );
}

#[test]
fn noding_matches_osm_node_topology() {
    // OSM ways share junctions by node id; pyosmium reads the original .osm.pbf independently.
    let d = tmp();
    let pbf = data(LI_PBF);
    let out = plan_liechtenstein(d.path(), "s0", &["--snap", "0"]);
    let Some(py) = external::python_with("pyosmium-topology-liechtenstein", &["osmium"]) else {
        return;
    };
    let osm = python_json(&py, "peer_osm_topology.py", &pbf);
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_read"], osm["ways"]);
    assert_eq!(s["counts"]["edges"], osm["edges"]);
    assert_eq!(s["counts"]["junctions"], osm["junctions"]);
    let net = read_fc(&out.join("network.geojson"));
    let mut degree: HashMap<i64, usize> = HashMap::new();
    for f in &net.features {
        for k in ["from", "to"] {
            *degree
                .entry(f.property(k).unwrap().as_i64().unwrap())
                .or_default() += 1;
        }
    }
    let junctions = s["counts"]["junctions"].as_i64().unwrap();
    let not2 = (0..junctions)
        .filter(|j| degree.get(j).copied().unwrap_or(0) != 2)
        .count();
    assert_eq!(not2 as u64, osm["junctions_degree_not_2"].as_u64().unwrap());
    // The default snap merges the extract's near-coincident vertices, so it changes the graph.
    let def = plan_liechtenstein(d.path(), "s05", &[]);
    let sd = read_json(&def.join("summary.json"));
    assert!(sd["counts"]["vertices_moved"].as_u64().unwrap() > 0);
}

#[test]
fn edge_lengths_match_geographiclib_within_a_millimetre() {
    // Reference: geographiclib (Karney's geodesic algorithms, PyPI) on every edge of a real network.
    let d = tmp();
    let out = plan_liechtenstein(d.path(), "g", &[]);
    let Some(py) = external::python_with("geographiclib-lengths-liechtenstein", &["geographiclib"])
    else {
        return;
    };
    let o = Command::new(&py)
        .arg(script("peer_geodesic_lengths.py"))
        .arg(out.join("network.geojson"))
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let reference: HashMap<i64, f64> = String::from_utf8_lossy(&o.stdout)
        .lines()
        .map(|l| {
            let mut it = l.split_whitespace();
            (
                it.next().unwrap().parse().unwrap(),
                it.next().unwrap().parse().unwrap(),
            )
        })
        .collect();
    let net = read_fc(&out.join("network.geojson"));
    assert_eq!(reference.len(), net.features.len());
    let mut worst: f64 = 0.0;
    for f in &net.features {
        let e = f.property("edge").unwrap().as_i64().unwrap();
        let ours = f.property("length_m").unwrap().as_f64().unwrap();
        worst = worst.max((ours - reference[&e]).abs());
    }
    // length_m is printed to the millimetre, so rounding alone may account for 0.5 mm.
    assert!(worst <= 0.001, "worst difference {worst} m");
}

#[test]
fn demo_layers_open_in_ogrinfo() {
    // Reference reader: GDAL's ogrinfo (Debian package gdal-bin).
    if external::program("ogrinfo-demo-layers", &["ogrinfo"], "gdal-bin").is_none() {
        return;
    }
    let d = tmp();
    let out = d.path().join("demo");
    assert!(
        run(&["demo", "--out", out.to_str().unwrap(), "-q"])
            .status
            .success()
    );
    let s = read_json(&out.join("summary.json"));
    let qa: u64 = s["counts"]["qa"]
        .as_object()
        .unwrap()
        .values()
        .map(|v| v.as_u64().unwrap())
        .sum();
    for (file, count, geometry) in [
        (
            "network.geojson",
            s["counts"]["edges"].as_u64().unwrap(),
            "Line String",
        ),
        (
            "plan.geojson",
            s["plan_edges"].as_u64().unwrap(),
            "Line String",
        ),
        (
            "sites.geojson",
            s["sites"]["total"].as_u64().unwrap(),
            "Point",
        ),
        ("qa.geojson", qa, "Point"),
    ] {
        let o = Command::new("ogrinfo")
            .args(["-ro", "-so", "-al"])
            .arg(out.join(file))
            .output()
            .unwrap();
        let text = String::from_utf8_lossy(&o.stdout);
        assert!(
            o.status.success(),
            "{file}: {}",
            String::from_utf8_lossy(&o.stderr)
        );
        assert!(
            text.contains(&format!("Feature Count: {count}")),
            "{file}: {text}"
        );
        assert!(
            text.contains(&format!("Geometry: {geometry}")),
            "{file}: {text}"
        );
        assert!(text.contains("WGS 84"), "{file}: {text}");
    }
}

/// Random junctions of the largest component of the Liechtenstein network as sites (fixed seed).
fn random_sites(d: &Path, net: &Path, count: usize, seed: u64) -> PathBuf {
    let fc = read_fc(net);
    let mut size: HashMap<i64, usize> = HashMap::new();
    for f in &fc.features {
        if let Some(c) = f.property("component").and_then(|c| c.as_i64()) {
            *size.entry(c).or_default() += 1;
        }
    }
    let biggest = size
        .iter()
        .max_by_key(|(c, n)| (**n, -**c))
        .map(|(c, _)| *c)
        .unwrap();
    let mut points: Vec<[f64; 2]> = Vec::new();
    for f in &fc.features {
        if f.property("component").and_then(|c| c.as_i64()) == Some(biggest)
            && let Some(geojson::GeometryValue::LineString { coordinates }) =
                f.geometry.as_ref().map(|g| &g.value)
        {
            points.push([coordinates[0][0], coordinates[0][1]]);
        }
    }
    points.sort_by(|a, b| a.partial_cmp(b).unwrap());
    points.dedup();
    let mut rng = reknit::synthetic::Rng::new(seed);
    let mut chosen = Vec::new();
    while chosen.len() < count {
        let p = points[rng.below(points.len() as u64) as usize];
        if !chosen.contains(&p) {
            chosen.push(p);
        }
    }
    let feats: Vec<String> = chosen
        .iter()
        .enumerate()
        .map(|(i, p)| {
            format!(
                r#"{{"type":"Feature","properties":{{"site_id":"r{i}"}},"geometry":{{"type":"Point","coordinates":[{},{}]}}}}"#,
                p[0], p[1]
            )
        })
        .collect();
    write_collection(d, &format!("sites-{count}.geojson"), &feats)
}

#[test]
fn steiner_cost_at_most_networkx_mehlhorn_on_liechtenstein() {
    // Reference library: networkx.algorithms.approximation.steiner_tree (method "mehlhorn").
    let d = tmp();
    let whole = plan_liechtenstein(d.path(), "whole", &["--whole-network"]);
    let Some(py) = external::python_with("networkx-steiner-liechtenstein", &["networkx"]) else {
        return;
    };
    for (count, seed) in [(10, 11), (50, 12), (200, 13)] {
        let sites = random_sites(d.path(), &whole.join("network.geojson"), count, seed);
        let name = format!("sites-{count}");
        let out = plan_liechtenstein(d.path(), &name, &["--sites", sites.to_str().unwrap()]);
        let s = read_json(&out.join("summary.json"));
        assert_eq!(s["sites"]["joined_to_hub"].as_u64().unwrap(), count as u64);
        let ours = milli(&s["total_cost"]);
        let o = Command::new(&py)
            .arg(script("peer_steiner_networkx.py"))
            .arg(out.join("network.geojson"))
            .arg(out.join("sites.geojson"))
            .arg("mehlhorn")
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        let nx: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
        let theirs = nx["cost_milli"].as_u64().unwrap();
        eprintln!("{count} sites: reknit {ours}, networkx mehlhorn {theirs} (milli-repair-metres)");
        assert!(
            ours <= theirs,
            "{count} sites: ours {ours} > networkx {theirs}"
        );
        assert!(milli(&s["lower_bound"]) <= ours);
    }
}

/// Our bridges and cut vertices of `g` equal networkx's bridges() and articulation_points().
fn compare_bridges(py: &std::path::Path, g: &reknit::solve::graph::EdgeList, what: &str) {
    let f = reknit::solve::fragility::fragility(g, &[]);
    let d = tmp();
    let list = d.path().join("edges.txt");
    let text: String = (0..g.len())
        .filter(|&e| g.usable(e) || g.ends[e][0] == g.ends[e][1])
        .map(|e| format!("{} {}\n", g.ends[e][0], g.ends[e][1]))
        .collect();
    std::fs::write(&list, text).unwrap();
    let out = python_json(py, "peer_bridges_networkx.py", &list);
    let mut ours: Vec<[u32; 2]> = f
        .bridges
        .iter()
        .map(|&e| {
            let [a, b] = g.ends[e as usize];
            [a.min(b), a.max(b)]
        })
        .collect();
    ours.sort();
    let theirs: Vec<[u32; 2]> = serde_json::from_value(out["bridges"].clone()).unwrap();
    assert_eq!(ours.len(), theirs.len(), "{what}: bridge count");
    assert_eq!(ours, theirs, "{what}");
    let cuts: Vec<u32> = serde_json::from_value(out["articulation_points"].clone()).unwrap();
    assert_eq!(f.cut_vertices, cuts, "{what}");
    eprintln!(
        "{what}: {} bridges, {} cut vertices, equal to networkx",
        ours.len(),
        cuts.len()
    );
}

#[test]
fn bridges_and_cut_vertices_match_networkx_on_real_and_random_networks() {
    // Reference library: networkx bridges() and articulation_points(), on the noded Liechtenstein
    // network and the GeoDaNet streets (open data, licences beside them in tests/data) with every
    // road usable, and on random sparse multigraphs with closed edges.
    use reknit::ingest::roads::{RoadSettings, read_roads};
    use reknit::ingest::source::Source;
    let Some(py) = external::python_with("networkx-bridges", &["networkx"]) else {
        return;
    };
    for rel in [LI_GEOJSON, "roads/geodanet-streets/streets.shp"] {
        let roads = data(rel);
        let layer = read_roads(&Source::File(roads), &RoadSettings::default()).unwrap();
        let (net, _) =
            reknit::ingest::build_network(layer, &RoadSettings::default(), false).unwrap();
        compare_bridges(&py, &net.weighted_edges(), rel);
    }
    let mut rng = reknit::rng::Rng::new(31);
    for k in 0..6 {
        let n = 500 + 500 * k;
        let mut ends = Vec::new();
        for _ in 0..(n * 6 / 5) {
            ends.push([rng.below(n as u64) as u32, rng.below(n as u64) as u32]);
        }
        let cost = ends
            .iter()
            .map(|_| {
                if rng.below(8) == 0 {
                    reknit::solve::graph::UNUSABLE
                } else {
                    rng.below(3)
                }
            })
            .collect();
        let g = reknit::solve::graph::EdgeList {
            vertices: n,
            ends,
            cost,
        };
        compare_bridges(&py, &g, &format!("random multigraph {k} ({n} vertices)"));
    }
}
