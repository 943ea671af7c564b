//! `--output-format gpkg`: every layer in one GeoPackage (OGC GeoPackage Encoding Standard 1.3),
//! read back by GDAL through pyogrio (a PyPI package whose wheel ships GDAL) and compared with the
//! GeoJSON layers of the same run, value by value; the file's bytes run to run and across thread
//! counts; a re-plan from a GeoPackage plan; `check` in both formats.
//!
//! Data: the invented sample district (sample-maps/ombrevane); tests/data/gpkg/streets.gpkg
//! (GeoDa Center sample via libpysal, BSD-3-Clause, converted by GDAL; README beside it).

mod common;
use common::*;
use serde_json::Value;
use std::collections::BTreeSet;
use std::path::Path;

/// GDAL's view of a GeoPackage through pyogrio: per layer its geometry type, CRS, feature count,
/// fields, description, whether it has a spatial index (`HasSpatialIndex`, a function GDAL's
/// GeoPackage driver provides, and the layer's fast-spatial-filter capability), every feature's
/// values and coordinates; and the `cautions` table's rows.
const GDAL_DUMP: &str = r#"
import json, math, struct, sys
import pyogrio
from pyogrio import raw

def coords(b, o=0):
    f = '<' if b[o] == 1 else '>'
    t = struct.unpack_from(f + 'I', b, o + 1)[0]
    o += 5
    if t == 1:
        return list(struct.unpack_from(f + 'dd', b, o)), o + 16
    n = struct.unpack_from(f + 'I', b, o)[0]
    o += 4
    if t == 2:
        return [list(struct.unpack_from(f + 'dd', b, o + 16 * i)) for i in range(n)], o + 16 * n
    if t == 5:
        parts = []
        for _ in range(n):
            p, o = coords(b, o)
            parts.append(p)
        return parts, o
    raise ValueError('geometry type %d' % t)

def plain(v):
    if v is None:
        return None
    if hasattr(v, 'item'):
        v = v.item()
    if isinstance(v, float) and math.isnan(v):
        return None
    return v

path = sys.argv[1]
out = {'layers': {}}
for name, gtype in pyogrio.list_layers(path):
    name = str(name)
    if name == 'cautions':
        meta, _, _, data = raw.read(path, layer=name, read_geometry=False)
        out['cautions'] = [plain(v) for v in data[list(meta['fields']).index('caution')]]
        out['cautions_type'] = gtype
        continue
    info = pyogrio.read_info(path, layer=name)
    meta, _, geom, data = raw.read(path, layer=name)
    idx = raw.read(path, sql="SELECT HasSpatialIndex('%s', 'geom')" % name, read_geometry=False)
    fields = [str(f) for f in meta['fields']]
    out['layers'][name] = {
        'geometry_type': gtype,
        'crs': info['crs'],
        'features': int(info['features']),
        'fields': fields,
        'description': (info.get('layer_metadata') or {}).get('DESCRIPTION'),
        'fast_spatial_filter': bool(info.get('capabilities', {}).get('fast_spatial_filter')),
        'has_spatial_index': int(plain(idx[3][0][0])),
        'rows': [{f: plain(data[i][k]) for i, f in enumerate(fields)} for k in range(len(geom))],
        'coords': [coords(bytes(g))[0] for g in geom],
    }
print(json.dumps(out))
"#;

/// Runs the dump on `gpkg` with the Python that has pyogrio (`None` after a recorded skip).
fn gdal_dump(check: &str, gpkg: &Path) -> Option<Value> {
    let py = common::external::python_with(check, &["pyogrio"])?;
    let o = std::process::Command::new(py)
        .args(["-c", GDAL_DUMP])
        .arg(gpkg)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    Some(serde_json::from_slice(&o.stdout).unwrap())
}

/// Runs reknit from `dir` with `args`, expecting success.
fn ok(dir: &Path, args: &[&str]) {
    let o = reknit().current_dir(dir).args(args).output().unwrap();
    assert!(o.status.success(), "{args:?}: {}", stderr(&o));
}

/// A folder with the sample district's roads and sites, planned with every layer a first plan
/// can have (sites, backup links, corridors, days) into `geojson/` and `gpkg/`.
fn sample_both(extra: &[&str]) -> tempfile::TempDir {
    let d = tmp();
    std::fs::copy(sample_roads(), d.path().join("roads.geojson")).unwrap();
    std::fs::copy(sample_sites(), d.path().join("sites.geojson")).unwrap();
    for (out, format) in [("geojson", "geojson"), ("gpkg", "gpkg")] {
        let mut a = vec![
            "plan",
            "--roads",
            "roads.geojson",
            "--sites",
            "sites.geojson",
            "--redundancy",
            "--max-detour",
            "1.2",
            "--crew-capacity",
            "800",
            "-q",
            "--out",
            out,
            "--output-format",
            format,
        ];
        a.extend_from_slice(extra);
        ok(d.path(), &a);
    }
    d
}

/// Property names of a GeoJSON layer's features, and the features.
fn geojson_layer(p: &Path) -> (BTreeSet<String>, Vec<Value>) {
    let v = read_json(p);
    let features = v["features"].as_array().unwrap().clone();
    let names = features
        .iter()
        .flat_map(|f| f["properties"].as_object().unwrap().keys().cloned())
        .collect();
    (names, features)
}

/// The GeoJSON geometry's coordinates as GDAL's WKB gives them (a Point's pair, a line's
/// positions, a MultiLineString's lines).
fn coordinates(f: &Value) -> Value {
    f["geometry"]["coordinates"].clone()
}

/// Checks GDAL's view of `gpkg` against the GeoJSON layers in `geojson_dir`: the same layers,
/// each in EPSG:4326 with a spatial index and the cautions, the same fields, and every feature's
/// values and coordinates equal.
fn agrees_with_geojson(gdal: &Value, geojson_dir: &Path) {
    let layers = gdal["layers"].as_object().unwrap();
    let files: BTreeSet<String> = listing(geojson_dir)
        .into_iter()
        .filter_map(|n| n.strip_suffix(".geojson").map(String::from))
        .collect();
    let names: BTreeSet<String> = layers.keys().cloned().collect();
    assert_eq!(
        names, files,
        "the GeoPackage's layers are the GeoJSON files"
    );
    for (name, l) in layers {
        // Source: GDAL (through pyogrio) reading the GeoPackage.
        assert_eq!(l["crs"], "EPSG:4326", "{name}");
        assert_eq!(l["has_spatial_index"], 1, "{name}: HasSpatialIndex");
        assert_eq!(l["fast_spatial_filter"], true, "{name}: spatial filter");
        let desc = l["description"].as_str().unwrap_or_default();
        assert!(desc.starts_with(reknit::cautions::SHORT), "{name}: {desc}");
        let (props, features) = geojson_layer(&geojson_dir.join(format!("{name}.geojson")));
        assert_eq!(l["features"], features.len(), "{name}: feature count");
        let fields: BTreeSet<String> = l["fields"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| f.as_str().unwrap().to_string())
            .collect();
        assert_eq!(fields, props, "{name}: field names");
        for (k, f) in features.iter().enumerate() {
            let row = &l["rows"][k];
            for (p, v) in f["properties"].as_object().unwrap() {
                let g = &row[p];
                let same = match (v, g) {
                    (Value::Number(a), Value::Number(b)) => a.as_f64() == b.as_f64(),
                    _ => v == g,
                };
                assert!(same, "{name} feature {k} `{p}`: GeoJSON {v}, GDAL {g}");
            }
            assert_eq!(coordinates(f), l["coords"][k], "{name} feature {k}");
        }
    }
    assert_eq!(gdal["cautions_type"], Value::Null);
    let cautions: Vec<&str> = gdal["cautions"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c.as_str().unwrap())
        .collect();
    assert_eq!(cautions, reknit::cautions::CAUTIONS);
}

#[test]
fn gdal_reads_every_layer_as_the_geojson_layers_say() {
    let d = sample_both(&[]);
    let Some(gdal) = gdal_dump(
        "pyogrio_reads_every_plan_layer",
        &d.path().join("gpkg/layers.gpkg"),
    ) else {
        return;
    };
    for l in ["sites", "single-failures", "backup", "corridors", "plan"] {
        assert!(gdal["layers"].get(l).is_some(), "{l} is not in the fixture");
    }
    agrees_with_geojson(&gdal, &d.path().join("geojson"));
    let gj = read_json(&d.path().join("geojson/summary.json"));
    let gp = read_json(&d.path().join("gpkg/summary.json"));
    assert_eq!(
        gp["outputs"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|o| o.as_str().unwrap().ends_with(".geojson"))
            .count(),
        0
    );
    assert!(
        gp["outputs"]
            .as_array()
            .unwrap()
            .contains(&Value::from("layers.gpkg"))
    );
    assert_eq!(gp["total_cost"], gj["total_cost"]);
    assert_eq!(gp["settings"]["output_format"], "gpkg");
    assert_eq!(gj["settings"]["output_format"], "geojson");
    // Everything but the layers is the same file in both formats.
    for f in ["work-orders.csv", "plan.svg"] {
        assert_eq!(
            std::fs::read(d.path().join("gpkg").join(f)).unwrap(),
            std::fs::read(d.path().join("geojson").join(f)).unwrap(),
            "{f}"
        );
    }
}

/// Runs the sample plan into `out` with the given rayon thread count; returns layers.gpkg's bytes.
fn gpkg_bytes(d: &Path, out: &str, threads: &str) -> Vec<u8> {
    let o = reknit()
        .current_dir(d)
        .env("RAYON_NUM_THREADS", threads)
        .args([
            "plan",
            "--roads",
            "roads.geojson",
            "--sites",
            "sites.geojson",
            "--redundancy",
            "--output-format",
            "gpkg",
            "-q",
            "--out",
            out,
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    std::fs::read(d.join(out).join("layers.gpkg")).unwrap()
}

#[test]
fn the_file_is_the_same_run_to_run_and_with_one_or_two_threads() {
    let d = tmp();
    std::fs::copy(sample_roads(), d.path().join("roads.geojson")).unwrap();
    std::fs::copy(sample_sites(), d.path().join("sites.geojson")).unwrap();
    let one = gpkg_bytes(d.path(), "a", "1");
    assert_eq!(one, gpkg_bytes(d.path(), "b", "2"), "1 and 2 threads");
    assert_eq!(one, gpkg_bytes(d.path(), "c", "2"), "run to run");
    // GeoPackage 1.3 §1.1.1.1.1: SQLite header, application_id "GPKG" at offset 68 and
    // user_version 10300 at offset 60 (both big-endian, SQLite file format §1.3).
    assert_eq!(&one[..16], b"SQLite format 3\0");
    assert_eq!(&one[68..72], b"GPKG");
    assert_eq!(u32::from_be_bytes(one[60..64].try_into().unwrap()), 10300);
    let c = rusqlite::Connection::open(d.path().join("a/layers.gpkg")).unwrap();
    let q = |sql: &str| -> Vec<String> {
        let mut st = c.prepare(sql).unwrap();
        st.query_map([], |r| {
            Ok(match r.get_ref(0)? {
                rusqlite::types::ValueRef::Integer(i) => i.to_string(),
                v => v.as_str()?.to_string(),
            })
        })
        .unwrap()
        .map(Result::unwrap)
        .collect()
    };
    assert_eq!(
        q("SELECT DISTINCT last_change FROM gpkg_contents"),
        ["1970-01-01T00:00:00.000Z"]
    );
    assert_eq!(
        q("SELECT srs_id FROM gpkg_spatial_ref_sys ORDER BY srs_id"),
        ["-1", "0", "4326"]
    );
    assert_eq!(
        q("SELECT DISTINCT data_type FROM gpkg_contents WHERE table_name = 'cautions'"),
        ["attributes"]
    );
    // Every feature table is indexed, one R-tree row per feature, and has the six triggers.
    for t in q("SELECT table_name FROM gpkg_geometry_columns") {
        let n = |sql: String| q(&sql)[0].parse::<i64>().unwrap();
        let rows = n(format!("SELECT count(*) FROM \"{t}\""));
        assert_eq!(
            n(format!("SELECT count(*) FROM \"rtree_{t}_geom\"")),
            rows,
            "{t}"
        );
        assert_eq!(
            n(format!(
                "SELECT count(*) FROM gpkg_extensions WHERE table_name = '{t}' AND extension_name = 'gpkg_rtree_index'"
            )),
            1
        );
        assert_eq!(
            n(format!(
                "SELECT count(*) FROM sqlite_master WHERE type = 'trigger' AND name LIKE 'rtree_{t}_geom_%'"
            )),
            6,
            "{t}"
        );
    }
    assert!(
        !listing(&d.path().join("a"))
            .iter()
            .any(|f| f.ends_with(".geojson") || f.contains("journal"))
    );
}

#[test]
fn a_geopackage_road_file_round_trips_with_the_same_total_cost() {
    let d = tmp();
    let roads = data("gpkg/streets.gpkg");
    let r = roads.to_str().unwrap();
    for (out, format) in [("geojson", "geojson"), ("gpkg", "gpkg")] {
        ok(
            d.path(),
            &[
                "plan",
                "--roads",
                r,
                "--roads-layer",
                "streets",
                "--output-format",
                format,
                "-q",
                "--out",
                out,
            ],
        );
    }
    let Some(gdal) = gdal_dump(
        "pyogrio_reads_the_streets_plan",
        &d.path().join("gpkg/layers.gpkg"),
    ) else {
        return;
    };
    agrees_with_geojson(&gdal, &d.path().join("geojson"));
    // Source: GDAL reading the plan layer's costs back; the GeoJSON run's own plan layer and total.
    let gdal_sum: f64 = gdal["layers"]["plan"]["rows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["cost"].as_f64().unwrap())
        .sum();
    let (_, features) = geojson_layer(&d.path().join("geojson/plan.geojson"));
    let geojson_sum: f64 = features
        .iter()
        .map(|f| f["properties"]["cost"].as_f64().unwrap())
        .sum();
    assert_eq!(gdal_sum, geojson_sum);
    let total = read_json(&d.path().join("geojson/summary.json"))["total_cost"]
        .as_f64()
        .unwrap();
    assert!(total > 0.0);
    assert!(
        (gdal_sum - total).abs() <= 0.0005 * features.len() as f64,
        "{gdal_sum} vs {total}"
    );
}

/// The previous plan's work orders with the first `done` marked done.
fn sheet(prev: &Path, done: usize) -> String {
    let mut r = csv::Reader::from_path(prev.join("work-orders.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let k = h.iter().position(|c| c == "work_order").unwrap();
    let mut s = String::from("work_order,status\n");
    for rec in r.records().take(done) {
        let key = reknit::export::text::csv_text(&rec.unwrap()[k]).to_string();
        s.push_str(&format!("{key},done\n"));
    }
    s
}

#[test]
fn a_replan_reads_a_geopackage_plan_and_keeps_its_format() {
    let d = sample_both(&[]);
    let p = d.path();
    std::fs::write(p.join("back.csv"), sheet(&p.join("geojson"), 3)).unwrap();
    ok(
        p,
        &[
            "replan",
            "geojson",
            "--finished",
            "back.csv",
            "--out",
            "r2-geojson",
            "-q",
        ],
    );
    ok(
        p,
        &[
            "replan",
            "gpkg",
            "--finished",
            "back.csv",
            "--out",
            "r2-gpkg",
            "-q",
        ],
    );
    ok(
        p,
        &[
            "replan",
            "gpkg",
            "--finished",
            "back.csv",
            "--out",
            "r2-back",
            "-q",
            "--output-format",
            "geojson",
        ],
    );
    let a = read_json(&p.join("r2-geojson/summary.json"));
    let b = read_json(&p.join("r2-gpkg/summary.json"));
    let c = read_json(&p.join("r2-back/summary.json"));
    assert_eq!(b["settings"]["output_format"], "gpkg", "restored");
    assert_eq!(c["settings"]["output_format"], "geojson", "given anew");
    for s in [&b, &c] {
        assert_eq!(s["total_cost"], a["total_cost"]);
        assert_eq!(s["replan"]["changes"], a["replan"]["changes"]);
        assert_eq!(s["replan"]["finished_repairs"], 3);
    }
    assert!(listing(&p.join("r2-gpkg")).contains(&"layers.gpkg".to_string()));
    assert!(listing(&p.join("r2-back")).contains(&"changes.geojson".to_string()));
    let Some(gdal) = gdal_dump(
        "pyogrio_reads_the_replan_layers",
        &p.join("r2-gpkg/layers.gpkg"),
    ) else {
        return;
    };
    assert!(gdal["layers"].get("changes").is_some());
    agrees_with_geojson(&gdal, &p.join("r2-geojson"));
}

#[test]
fn check_writes_its_two_layers_in_either_format() {
    let d = tmp();
    let r = sample_roads();
    for (out, format) in [("geojson", "geojson"), ("gpkg", "gpkg")] {
        ok(
            d.path(),
            &[
                "check",
                "--roads",
                r.to_str().unwrap(),
                "--output-format",
                format,
                "-q",
                "--out",
                out,
            ],
        );
    }
    let listed = listing(&d.path().join("gpkg"));
    assert!(listed.contains(&"layers.gpkg".to_string()), "{listed:?}");
    assert!(
        !listed.iter().any(|f| f.ends_with(".geojson")),
        "{listed:?}"
    );
    let c = rusqlite::Connection::open(d.path().join("gpkg/layers.gpkg")).unwrap();
    for t in ["network", "qa"] {
        let n: i64 = c
            .query_row(&format!("SELECT count(*) FROM \"{t}\""), [], |r| r.get(0))
            .unwrap();
        let (_, f) = geojson_layer(&d.path().join("geojson").join(format!("{t}.geojson")));
        assert_eq!(n as usize, f.len(), "{t}");
    }
}

#[test]
fn input_attributes_keep_their_names_and_take_one_type_each() {
    let d = tmp();
    let sites = r#"{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{"site_id":"S1","Group":"north","group":"a","beds":4,"mixed":1,"flag":true},"geometry":{"type":"Point","coordinates":[-34.9996057,14.000229]}},
{"type":"Feature","properties":{"site_id":"S2","Group":"south","group":"b","beds":2.5,"mixed":"x","flag":false},"geometry":{"type":"Point","coordinates":[-34.9393559,14.0228159]}}]}"#;
    std::fs::write(d.path().join("sites.geojson"), sites).unwrap();
    let r = sample_roads();
    ok(
        d.path(),
        &[
            "plan",
            "--roads",
            r.to_str().unwrap(),
            "--sites",
            "sites.geojson",
            "--output-format",
            "gpkg",
            "-q",
            "--out",
            "o",
        ],
    );
    let c = rusqlite::Connection::open(d.path().join("o/layers.gpkg")).unwrap();
    let mut st = c
        .prepare("SELECT name, type FROM pragma_table_info('sites')")
        .unwrap();
    let cols: Vec<(String, String)> = st
        .query_map([], |r| Ok((r.get(0)?, r.get(1)?)))
        .unwrap()
        .map(Result::unwrap)
        .collect();
    let ty = |n: &str| cols.iter().find(|c| c.0 == n).map(|c| c.1.as_str());
    // reknit's `group` first; the input's `group` is `input_group` (as in GeoJSON); `Group`
    // differs from `group` only by case, which SQLite does not tell apart: `Group_2`.
    assert_eq!(ty("group"), Some("INTEGER"));
    assert_eq!(ty("input_group"), Some("TEXT"));
    assert_eq!(ty("Group_2"), Some("TEXT"));
    assert_eq!(ty("beds"), Some("REAL"));
    assert_eq!(ty("mixed"), Some("TEXT"));
    assert_eq!(ty("flag"), Some("BOOLEAN"));
    let mixed: Vec<String> = c
        .prepare("SELECT mixed FROM sites ORDER BY fid")
        .unwrap()
        .query_map([], |r| r.get(0))
        .unwrap()
        .map(Result::unwrap)
        .collect();
    assert_eq!(mixed, ["1", "x"]);
}
