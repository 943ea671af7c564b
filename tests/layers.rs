//! Several road layers in one run (`--roads` repeated, formats mixed): one network, each feature's
//! `source_layer`, work-order keys apart across layers, each layer's CRS, the inputs recorded and
//! found again by a re-plan, and the same bytes whatever the thread count. Fixtures are written
//! here (invented coordinates).

mod common;
use common::*;
use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

/// A GeoJSON layer of roads along the equator from `x0` degrees, one per step of 0.001°, with the
/// ids given (the same ids in two layers on purpose) and damage 0.5.
fn layer(d: &Path, name: &str, x0: f64, ids: &[&str]) -> PathBuf {
    let f: Vec<String> = ids
        .iter()
        .enumerate()
        .map(|(i, id)| {
            let x = x0 + i as f64 * 0.001;
            line(
                &[[x, 0.0], [x + 0.001, 0.0]],
                &format!(r#"{{"id":"{id}","damage":0.5}}"#),
            )
        })
        .collect();
    write_collection(d, name, &f)
}

/// Three layers that meet end to end: two GeoJSON files with the same ids and a zipped Shapefile.
fn three_layers(d: &Path) -> Vec<PathBuf> {
    let a = layer(d, "a.geojson", 0.0, &["r1", "r2"]);
    let b = layer(d, "b.geojson", 0.002, &["r1", "r2"]);
    let sub = d.join("set");
    std::fs::create_dir_all(&sub).unwrap();
    let lines = vec![
        vec![[0.004, 0.0], [0.005, 0.0]],
        vec![[0.005, 0.0], [0.006, 0.0]],
    ];
    let shp = common::bad::shapefile_roads(&sub, "lanes.shp", &lines);
    let c = common::zipped::zip_owned(d, "c.zip", &common::zipped::set_entries(&shp, ""));
    std::fs::remove_dir_all(&sub).unwrap();
    vec![a, b, c]
}

fn plan_layers(d: &Path, out: &str, layers: &[PathBuf], extra: &[&str]) -> PathBuf {
    let o = d.join(out);
    let mut args: Vec<String> = vec!["plan".into(), "-q".into(), "--out".into(), s(&o)];
    for l in layers {
        args.extend(["--roads".into(), s(l)]);
    }
    args.extend(extra.iter().map(|x| x.to_string()));
    let r = reknit().args(&args).output().unwrap();
    assert!(r.status.success(), "{}", stderr(&r));
    o
}

fn s(p: &Path) -> String {
    p.to_str().unwrap().to_string()
}

/// Work-order keys by (source_layer, source_index) from plan.geojson.
fn keys(out: &Path) -> Vec<(String, i64, String)> {
    let fc = read_fc(&out.join("plan.geojson"));
    let mut v: Vec<(String, i64, String)> = fc
        .features
        .iter()
        .map(|f| {
            (
                f.property("source_layer")
                    .unwrap()
                    .as_str()
                    .unwrap()
                    .to_string(),
                f.property("source_index").unwrap().as_i64().unwrap(),
                f.property("work_order")
                    .unwrap()
                    .as_str()
                    .unwrap()
                    .to_string(),
            )
        })
        .collect();
    v.sort();
    v
}

#[test]
fn three_layers_make_one_network_and_keep_their_layer() {
    let d = tmp();
    let layers = three_layers(d.path());
    let out = plan_layers(d.path(), "out", &layers, &[]);
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_read"], 6);
    assert_eq!(s["counts"]["components"], 1, "the layers meet end to end");
    let k = keys(&out);
    let labels: BTreeSet<&str> = k.iter().map(|x| x.0.as_str()).collect();
    assert_eq!(labels, BTreeSet::from(["a.geojson", "b.geojson", "c.zip"]));
    // Same ids in a.geojson and b.geojson: the keys name the layer, so they stay apart.
    let distinct: BTreeSet<&str> = k.iter().map(|x| x.2.as_str()).collect();
    assert_eq!(distinct.len(), k.len(), "{k:?}");
    assert!(
        k.iter().any(|x| x.2.starts_with("WO-a.geojson:r1-")),
        "{k:?}"
    );
    assert!(
        k.iter().any(|x| x.2.starts_with("WO-b.geojson:r1-")),
        "{k:?}"
    );
    // The work orders carry the layer too.
    let csv = std::fs::read_to_string(out.join("work-orders.csv")).unwrap();
    assert!(
        csv.lines()
            .next()
            .unwrap()
            .contains("source_index,source_layer,source_id")
    );
    // Each layer is an input with its own SHA-256 (FIPS 180-4, computed here with sha2).
    use sha2::{Digest, Sha256};
    let roads: Vec<&serde_json::Value> = s["inputs"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|i| i["role"] == "roads")
        .collect();
    assert_eq!(roads.len(), 3);
    for (rec, p) in roads.iter().zip(&layers) {
        let hex: String = Sha256::digest(std::fs::read(p).unwrap())
            .iter()
            .map(|b| format!("{b:02x}"))
            .collect();
        assert_eq!(rec["path"], p.display().to_string());
        assert_eq!(rec["sha256"], hex);
    }
}

#[test]
fn a_layers_keys_do_not_depend_on_the_other_layers() {
    let d = tmp();
    let l = three_layers(d.path());
    let all = keys(&plan_layers(d.path(), "abc", &l, &[]));
    let swapped = keys(&plan_layers(
        d.path(),
        "cba",
        &[l[2].clone(), l[1].clone(), l[0].clone()],
        &[],
    ));
    assert_eq!(all, swapped);
}

#[test]
fn crs_applies_to_layers_without_their_own() {
    // A GeoJSON layer in UTM zone 33N without a crs member, and a Shapefile with a WGS84 .prj;
    // --crs EPSG:32633 applies to the first only. UTM's central meridian of zone 33 is 15°E, and
    // on it at the equator easting 500000 m, northing 0 is (15°E, 0°) (common practice, no source).
    let d = tmp();
    let utm = write_collection(
        d.path(),
        "utm.geojson",
        &[line(
            &[[500000.0, 0.0], [500100.0, 0.0]],
            r#"{"damage":0.5}"#,
        )],
    );
    let shp =
        common::bad::shapefile_roads(d.path(), "lonlat.shp", &[vec![[15.0, 0.0], [15.0, 0.001]]]);
    let out = plan_layers(d.path(), "out", &[utm, shp], &["--crs", "EPSG:32633"]);
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["components"], 1, "the layers meet at 15°E");
    let crs = s["geodesy"]["input_crs"].as_str().unwrap();
    assert!(
        crs.contains("utm.geojson") && crs.contains("lonlat.shp"),
        "{crs}"
    );
    // 100 m of UTM grid near the central meridian (scale 0.9996) and 0.001° of latitude
    // (about 110.6 m at the equator, from memory).
    let len = s["counts"]["network_length_m"].as_f64().unwrap();
    assert!((len - 210.6).abs() < 1.0, "{len}");
}

#[test]
fn two_layers_are_the_same_bytes_on_one_or_two_threads() {
    let d = tmp();
    let l = three_layers(d.path());
    let mut seen = Vec::new();
    for threads in ["1", "2"] {
        let o = d.path().join(format!("t{threads}"));
        let r = reknit()
            .env("RAYON_NUM_THREADS", threads)
            .args(["plan", "-q", "--roads", &s(&l[0]), "--roads", &s(&l[2])])
            .args(["--out", &s(&o)])
            .output()
            .unwrap();
        assert!(r.status.success(), "{}", stderr(&r));
        let mut files = listing(&o);
        files.sort();
        let bytes: Vec<(String, Vec<u8>)> = files
            .into_iter()
            .map(|f| (f.clone(), std::fs::read(o.join(&f)).unwrap()))
            .collect();
        seen.push(bytes);
    }
    assert_eq!(seen[0], seen[1]);
}

#[test]
fn a_replan_finds_both_layers_again() {
    let d = tmp();
    let l = three_layers(d.path());
    let r1 = plan_layers(d.path(), "r1", &l[..2], &[]);
    // The crews' sheet: the work orders back, the first one done.
    let text = std::fs::read_to_string(r1.join("work-orders.csv")).unwrap();
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let h = r.headers().unwrap().clone();
    let status = h.iter().position(|c| c == "status").unwrap();
    let mut w = csv::Writer::from_path(d.path().join("back.csv")).unwrap();
    w.write_record(&h).unwrap();
    for (i, rec) in r.records().enumerate() {
        let rec = rec.unwrap();
        let cells: Vec<&str> = rec
            .iter()
            .enumerate()
            .map(|(j, c)| if j == status && i == 0 { "done" } else { c })
            .collect();
        w.write_record(&cells).unwrap();
    }
    w.flush().unwrap();
    let r2 = d.path().join("r2");
    let o = reknit()
        .args([
            "replan",
            &s(&r1),
            "--finished",
            &s(&d.path().join("back.csv")),
        ])
        .args(["--out", &s(&r2), "-q"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let s2 = read_json(&r2.join("summary.json"));
    let roads: Vec<&serde_json::Value> = s2["inputs"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|i| i["role"] == "roads")
        .collect();
    assert_eq!(roads.len(), 2);
    assert_eq!(s2["counts"]["features_read"], 4);
    assert_eq!(s2["replan"]["finished_repairs"], 1);
}

#[test]
fn a_manifest_lists_road_layers() {
    // TOML: an array of paths; CSV: paths separated by `;`. Both read as --roads repeated.
    let d = tmp();
    three_layers(d.path());
    let toml = common::batch::manifest(
        d.path(),
        "m.toml",
        "[[district]]\nname = \"D-1\"\nroads = [\"a.geojson\", \"b.geojson\"]\n",
    );
    let csv = common::batch::manifest(d.path(), "m.csv", "name,roads\nD-1,a.geojson;b.geojson\n");
    for (m, out) in [(toml, "bt"), (csv, "bc")] {
        let out = d.path().join(out);
        let o = common::batch::batch(&m, &out, &[]);
        assert!(o.status.success(), "{}", stderr(&o));
        let s = read_json(&out.join("batch-summary.json"));
        let row = &s["rows"][0];
        assert_eq!(row["status"], "ok", "{row}");
        let folder = out.join(row["folder"].as_str().unwrap());
        let sum = read_json(&folder.join("summary.json"));
        assert_eq!(sum["counts"]["features_read"], 4);
        assert_eq!(sum["counts"]["components"], 1);
    }
}

/// Layer `b.geojson` repeats its first road as its third feature: the QA point for the dropped
/// copy names that feature by its position in its own layer and by the layer.
fn layers_with_a_duplicate(d: &Path) -> Vec<PathBuf> {
    let a = layer(d, "a.geojson", 0.0, &["r1", "r2"]);
    let b = write_collection(
        d,
        "b.geojson",
        &[
            line(&[[0.002, 0.0], [0.003, 0.0]], r#"{"id":"q1"}"#),
            line(&[[0.003, 0.0], [0.004, 0.0]], r#"{"id":"q2"}"#),
            line(&[[0.002, 0.0], [0.003, 0.0]], r#"{"id":"q3"}"#),
        ],
    );
    vec![a, b]
}

/// The removed-duplicate QA points of `qa.geojson`: (source_layer, source_index).
fn duplicate_points(out: &Path) -> Vec<(String, i64)> {
    read_fc(&out.join("qa.geojson"))
        .features
        .iter()
        .filter(|f| f.property("kind").unwrap() == "removed_duplicate")
        .map(|f| {
            (
                f.property("source_layer")
                    .unwrap()
                    .as_str()
                    .unwrap()
                    .to_string(),
                f.property("source_index").unwrap().as_i64().unwrap(),
            )
        })
        .collect()
}

#[test]
fn qa_points_name_the_layer_and_the_position_in_it() {
    let d = tmp();
    let layers = layers_with_a_duplicate(d.path());
    let out = plan_layers(d.path(), "out", &layers, &[]);
    assert_eq!(duplicate_points(&out), vec![("b.geojson".to_string(), 2)]);
}

#[test]
fn check_takes_several_layers_as_plan_does() {
    let d = tmp();
    let layers = layers_with_a_duplicate(d.path());
    let o = d.path().join("checked");
    let mut args: Vec<String> = vec!["check".into(), "-q".into(), "--out".into(), s(&o)];
    for l in &layers {
        args.extend(["--roads".into(), s(l)]);
    }
    let r = reknit().args(&args).output().unwrap();
    assert!(r.status.success(), "{}", stderr(&r));
    assert_eq!(duplicate_points(&o), vec![("b.geojson".to_string(), 2)]);
    let s = read_json(&o.join("summary.json"));
    let roads = s["inputs"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|i| i["role"] == "roads")
        .count();
    assert_eq!(roads, 2, "both layers are recorded as inputs");
    let net = read_fc(&o.join("network.geojson"));
    let labels: BTreeSet<&str> = net
        .features
        .iter()
        .map(|f| f.property("source_layer").unwrap().as_str().unwrap())
        .collect();
    assert_eq!(labels, BTreeSet::from(["a.geojson", "b.geojson"]));
}

/// The same three roads in two layers: layer `intact.geojson` undamaged, layer `hit.geojson` at
/// damage 1 with its middle road closed. Each road keeps its worst damage whatever the order of
/// `--roads`: the same plan both ways, and QA points saying the damage differed.
#[test]
fn the_same_road_in_two_layers_keeps_its_worst_damage_in_either_order() {
    let d = tmp();
    let roads = |name: &str, props: [&str; 3]| {
        let f: Vec<String> = (0..3)
            .map(|i| {
                let x = i as f64 * 0.001;
                line(&[[x, 0.0], [x + 0.001, 0.0]], props[i])
            })
            .collect();
        write_collection(d.path(), name, &f)
    };
    let intact = roads("intact.geojson", [r#"{"damage":0}"#; 3]);
    let hit = roads(
        "hit.geojson",
        [
            r#"{"damage":1}"#,
            r#"{"damage":"closed"}"#,
            r#"{"damage":1}"#,
        ],
    );
    let mut seen = Vec::new();
    for (name, order) in [("ab", [&intact, &hit]), ("ba", [&hit, &intact])] {
        let out = plan_layers(
            d.path(),
            name,
            &[order[0].clone(), order[1].clone()],
            &["--whole-network"],
        );
        let sum = read_json(&out.join("summary.json"));
        let differed = read_fc(&out.join("qa.geojson"))
            .features
            .iter()
            .filter(|f| f.property("kind").unwrap() == "removed_duplicate_other_damage")
            .count();
        assert_eq!(differed, 3, "{name}");
        seen.push((
            sum["total_cost"].as_f64().unwrap(),
            sum["repair_length_m"].as_f64().unwrap(),
            sum["counts"]["components"].as_u64().unwrap(),
        ));
    }
    assert_eq!(seen[0], seen[1]);
    // The end roads are repaired at damage 1 (not left at the intact layer's 0), and the closed
    // middle road is repaired in neither order: 2 roads of 0.001° on the equator, 111.32 m each
    // (WGS84 equatorial radius 6378137 m × π / 180 000, from memory).
    assert!((seen[0].1 - 2.0 * 111.32).abs() < 0.1, "{seen:?}");
}
