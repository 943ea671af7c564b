//! ±180° is one meridian: lines cut there (RFC 7946 §3.1.9) join into one network, snapping and
//! undershoot repairs reach across it, a plan there costs what the same roads cost elsewhere, and
//! damage zones across it cover only their own side of the world.

mod common;
use common::*;
use serde_json::Value;
use std::path::{Path, PathBuf};

/// A feature with any geometry (JSON text) and properties.
fn feature(geometry: &str, props: &str) -> String {
    format!(r#"{{"type":"Feature","properties":{props},"geometry":{geometry}}}"#)
}

fn coords(line: &[[f64; 2]]) -> String {
    let c: Vec<String> = line
        .iter()
        .map(|p| format!("[{},{}]", p[0], p[1]))
        .collect();
    format!("[{}]", c.join(","))
}

/// A LineString, or a MultiLineString when given several parts.
fn lines(parts: &[Vec<[f64; 2]>], props: &str) -> String {
    if parts.len() == 1 {
        return feature(
            &format!(
                r#"{{"type":"LineString","coordinates":{}}}"#,
                coords(&parts[0])
            ),
            props,
        );
    }
    let c: Vec<String> = parts.iter().map(|p| coords(p)).collect();
    feature(
        &format!(
            r#"{{"type":"MultiLineString","coordinates":[{}]}}"#,
            c.join(",")
        ),
        props,
    )
}

/// `plan` with the given roads and options; the summary (the run must succeed).
fn plan(dir: &Path, name: &str, roads: &[String], extra: &[&str]) -> (PathBuf, Value) {
    let r = write_collection(dir, &format!("{name}.geojson"), roads);
    let out = dir.join(format!("out-{name}"));
    let o = plan_cli(&r, &out, &[&["-q"], extra].concat());
    assert!(o.status.success(), "{name}: {}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    (out, s)
}

/// Every number in the path data of the plan's picture, in order.
fn drawn(out: &Path) -> Vec<f64> {
    let svg = std::fs::read_to_string(out.join("plan.svg")).unwrap();
    svg.split(" d=\"")
        .skip(1)
        .flat_map(|rest| {
            let d = &rest[..rest.find('"').unwrap()];
            d.split(['M', 'L', 'Z', ' '])
                .filter(|t| !t.is_empty())
                .map(|t| t.parse::<f64>().unwrap())
                .collect::<Vec<_>>()
        })
        .collect()
}

/// The figures two equivalent networks must share.
fn figures(s: &Value) -> (u64, u64, u64, f64) {
    let c = &s["counts"];
    (
        c["junctions"].as_u64().unwrap(),
        c["edges"].as_u64().unwrap(),
        c["components"].as_u64().unwrap(),
        s["total_cost"].as_f64().unwrap(),
    )
}

#[test]
fn rfc_multilinestring_example_is_one_network() {
    // RFC 7946 §3.1.9's example: a line from 170°E to 170°W at 45°N written as a MultiLineString
    // of two parts meeting at ±180°. The same roads 180° further west (meeting at 0°) are the
    // reference: one component, 3 junctions, 2 edges, the same cost.
    let d = tmp();
    let across = [
        vec![[170.0, 45.0], [180.0, 45.0]],
        vec![[-180.0, 45.0], [-170.0, 45.0]],
    ];
    let (_, s) = plan(
        d.path(),
        "rfc",
        &[lines(&across, r#"{"damage":1}"#)],
        &["--whole-network"],
    );
    let shifted = [
        vec![[-10.0, 45.0], [0.0, 45.0]],
        vec![[0.0, 45.0], [10.0, 45.0]],
    ];
    let (_, reference) = plan(
        d.path(),
        "shifted",
        &[lines(&shifted, r#"{"damage":1}"#)],
        &["--whole-network"],
    );
    assert_eq!(figures(&s).2, 1, "{s}");
    assert_eq!(figures(&s), figures(&reference));
    assert_eq!((figures(&s).0, figures(&s).1), (3, 2));
    // Two LineString features, one ending at 180 and one starting at -180, meet at one junction.
    let (_, two) = plan(
        d.path(),
        "two",
        &[
            lines(&[vec![[179.99, -30.0], [180.0, -30.0]]], "{}"),
            lines(&[vec![[-180.0, -30.0], [-179.99, -30.0]]], "{}"),
        ],
        &["--whole-network"],
    );
    let (j, e, c, _) = figures(&two);
    assert_eq!((j, e, c), (3, 2, 1), "{two}");
}

/// A lattice of 6 × 6 junctions (0.003° by 0.0025°, about 310 m by 275 m at 20°S) with roads of
/// assorted damage (some intact), and the roads of the middle row of cells cut at longitude `cut`
/// into two parts, `gap` degrees apart. `place` maps each part's positions (knowing whether the
/// part lies west of the cut) to the positions written.
fn lattice(cut: f64, gap: f64, place: &dyn Fn([f64; 2], bool) -> [f64; 2]) -> Vec<String> {
    let at = |i: usize, j: usize| [i as f64 * 0.003, -20.0 + j as f64 * 0.0025];
    let mut out = Vec::new();
    let props = |k: usize| format!(r#"{{"damage":{}}}"#, (k * 7 % 5) as f64 * 0.25);
    for j in 0..6 {
        for i in 0..6 {
            let k = out.len();
            if i + 1 < 6 {
                let (a, b) = (at(i, j), at(i + 1, j));
                let parts = if a[0] < cut && b[0] > cut {
                    let m = [cut, a[1]];
                    vec![
                        vec![place(a, true), place([m[0] - gap / 2.0, m[1]], true)],
                        vec![place([m[0] + gap / 2.0, m[1]], false), place(b, false)],
                    ]
                } else {
                    let west = b[0] <= cut;
                    vec![vec![place(a, west), place(b, west)]]
                };
                out.push(lines(&parts, &props(k)));
            }
            if j + 1 < 6 {
                let west = at(i, j)[0] < cut;
                let (a, b) = (place(at(i, j), west), place(at(i, j + 1), west));
                out.push(lines(&[vec![a, b]], &props(k + 1)));
            }
        }
    }
    out
}

/// Sites at five lattice junctions, placed like the roads.
fn lattice_sites(
    dir: &Path,
    name: &str,
    cut: f64,
    place: &dyn Fn([f64; 2], bool) -> [f64; 2],
) -> PathBuf {
    let pts: Vec<String> = [(0, 0), (5, 5), (1, 4), (4, 1), (5, 0)]
        .iter()
        .enumerate()
        .map(|(k, &(i, j))| {
            let p = [i as f64 * 0.003, -20.0 + j as f64 * 0.0025];
            point(place(p, p[0] < cut), &format!(r#"{{"id":"s{k}"}}"#))
        })
        .collect();
    write_collection(dir, &format!("{name}-sites.geojson"), &pts)
}

#[test]
fn a_network_moved_across_the_meridian_plans_the_same() {
    // Differential test: the lattice where it is, and the same lattice turned about the polar
    // axis so that its cut lies on ±180° (parts west of the cut end at 180, parts east of it start
    // at -180, as RFC 7946 §3.1.9 writes them). Rotation about the axis changes no distance, so
    // junctions, edges, components and costs must agree; with the parts a little apart (2.2 m)
    // and --snap 5 they must join across the meridian just as they join elsewhere.
    let d = tmp();
    let cut = 0.0075;
    let here = |p: [f64; 2], _west: bool| p;
    let there = |p: [f64; 2], west: bool| {
        let lon = p[0] - cut + 180.0;
        [if west { lon } else { lon - 360.0 }, p[1]]
    };
    for (gap, snap) in [(0.0, "0"), (0.00002, "5")] {
        let tag = snap;
        let a = lattice(cut, gap, &here);
        let b = lattice(cut, gap, &there);
        let (oa, sa) = plan(
            d.path(),
            &format!("here{tag}"),
            &a,
            &["--whole-network", "--snap", snap],
        );
        let (ob, sb) = plan(
            d.path(),
            &format!("there{tag}"),
            &b,
            &["--whole-network", "--snap", snap],
        );
        let (fa, fb) = (figures(&sa), figures(&sb));
        assert_eq!(fa.2, 1, "one component: {sa}");
        assert_eq!((fa.0, fa.1, fa.2), (fb.0, fb.1, fb.2), "snap {snap}");
        // Costs are rounded to the millimetre per edge.
        assert!(
            (fa.3 - fb.3).abs() <= 0.001 * fa.1 as f64,
            "{} vs {}",
            fa.3,
            fb.3
        );
        // The picture draws the district across ±180° as it draws it elsewhere: every path the
        // same, to the pixel's tenth that the SVG keeps (not spread over the whole globe).
        let (da, db) = (drawn(&oa), drawn(&ob));
        assert!(da.len() > 100, "{} path numbers", da.len());
        assert_eq!(da.len(), db.len(), "snap {snap}");
        for (x, y) in da.iter().zip(&db) {
            assert!((x - y).abs() <= 0.11, "snap {snap}: {x} vs {y}");
        }
        let la = sa["counts"]["network_length_m"].as_f64().unwrap();
        let lb = sb["counts"]["network_length_m"].as_f64().unwrap();
        assert!((la - lb).abs() < 0.01, "{la} vs {lb}");
        // A sites plan (a Steiner tree from the hub) costs the same too.
        let (sites_a, sites_b) = (
            lattice_sites(d.path(), &format!("here{tag}"), cut, &here),
            lattice_sites(d.path(), &format!("there{tag}"), cut, &there),
        );
        let (_, pa) = plan(
            d.path(),
            &format!("here-s{tag}"),
            &a,
            &["--sites", sites_a.to_str().unwrap(), "--snap", snap],
        );
        let (_, pb) = plan(
            d.path(),
            &format!("there-s{tag}"),
            &b,
            &["--sites", sites_b.to_str().unwrap(), "--snap", snap],
        );
        assert_eq!(pa["sites"]["joined_to_hub"], 5, "{pa}");
        assert_eq!(pb["sites"]["joined_to_hub"], 5, "{pb}");
        let (ca, cb) = (
            pa["total_cost"].as_f64().unwrap(),
            pb["total_cost"].as_f64().unwrap(),
        );
        assert!((ca - cb).abs() <= 0.001 * fa.1 as f64, "{ca} vs {cb}");
    }
}

#[test]
fn snapping_and_undershoots_reach_across_the_meridian() {
    // Ends at 179.99999° and -179.99999° on 10°N are 0.00002° apart, about 2.19 m (a degree of
    // longitude there is about 109.6 km; from memory).
    let d = tmp();
    let roads = [
        lines(&[vec![[179.99, 10.0], [179.99999, 10.0]]], "{}"),
        lines(&[vec![[-179.99999, 10.0], [-179.99, 10.0]]], "{}"),
    ];
    let (_, joined) = plan(
        d.path(),
        "snap3",
        &roads,
        &["--whole-network", "--snap", "3"],
    );
    assert_eq!(figures(&joined).2, 1, "{joined}");
    let (_, apart) = plan(
        d.path(),
        "snap1",
        &roads,
        &["--whole-network", "--snap", "1"],
    );
    assert_eq!(figures(&apart).2, 2, "{apart}");
    // A dangling end 0.00003° (about 3.3 m) west of ±180° and a road running north–south
    // 0.00001° east of it (on the other side): the undershoot is joined into that road.
    let roads = [
        lines(&[vec![[179.99999, 10.0], [179.99999, 10.01]]], "{}"),
        lines(&[vec![[-179.99, 10.005], [-179.99998, 10.005]]], "{}"),
    ];
    let (_, s) = plan(
        d.path(),
        "under",
        &roads,
        &["--whole-network", "--snap", "5"],
    );
    assert_eq!(s["counts"]["undershoots_joined"], 1, "{s}");
    assert_eq!(figures(&s).2, 1, "{s}");
}

/// Damage per road (by source index) in network.geojson.
fn damage_by_road(out: &Path) -> std::collections::BTreeMap<i64, Value> {
    read_fc(&out.join("network.geojson"))
        .features
        .iter()
        .map(|f| {
            (
                f.property("source_index").unwrap().as_i64().unwrap(),
                f.property("damage").unwrap().clone(),
            )
        })
        .collect()
}

#[test]
fn a_zone_across_the_meridian_covers_only_its_own_side() {
    // A closed zone from 179°E to 179°W, 1°S to 1°N, written two ways: as one ring that steps
    // from 179 to -179 (each ring edge the shortest line, RFC 7946 §3.1.1), and cut at ±180° into
    // a MultiPolygon (RFC 7946 §3.1.9). Either way it closes the roads at 179.5°E, across ±180°
    // and at 179.5°W, and leaves alone the roads at 0° (inside only if read the long way round),
    // at 178.5°E and at 178.5°W.
    let d = tmp();
    let road = |a: [f64; 2], b: [f64; 2]| lines(&[vec![a, b]], r#"{"damage":1}"#);
    let roads = [
        road([179.5, 0.0], [179.5, 0.01]),
        road([179.999, 0.5], [-179.999, 0.5]),
        road([-179.5, 0.0], [-179.5, 0.01]),
        road([0.0, 0.0], [0.0, 0.01]),
        road([178.5, 0.0], [178.5, 0.01]),
        road([-178.5, 0.0], [-178.5, 0.01]),
    ];
    let ring =
        r#"{"type":"Polygon","coordinates":[[[179,-1],[-179,-1],[-179,1],[179,1],[179,-1]]]}"#;
    let cut = r#"{"type":"MultiPolygon","coordinates":[[[[179,-1],[180,-1],[180,1],[179,1],[179,-1]]],[[[-180,-1],[-179,-1],[-179,1],[-180,1],[-180,-1]]]]}"#;
    for (name, geometry) in [("ring", ring), ("cut", cut)] {
        let z = write_collection(
            d.path(),
            &format!("zone-{name}.geojson"),
            &[feature(geometry, r#"{"damage":"closed"}"#)],
        );
        let (out, s) = plan(
            d.path(),
            name,
            &roads,
            &["--whole-network", "--damage-zones", z.to_str().unwrap()],
        );
        assert_eq!(s["counts"]["edges_closed"], 3, "{name}: {s}");
        let damage = damage_by_road(&out);
        for (road, closed) in [
            (0, true),
            (1, true),
            (2, true),
            (3, false),
            (4, false),
            (5, false),
        ] {
            assert_eq!(
                damage[&road].is_null(),
                closed,
                "{name}: road {road}: {}",
                damage[&road]
            );
        }
    }
}

#[test]
fn snapping_near_the_poles_uses_geodesic_metres() {
    // Reference: geographiclib (Karney's geodesic algorithms, PyPI): positions at a known geodesic
    // distance on WGS84. At 85°N two line ends 999.8 m apart join with --snap 1000 and ends
    // 1000.2 m apart do not (north-east of each other, where degree-based scales stretch); two ends
    // at 89.9999°N on opposite meridians (across the pole) join when --snap exceeds their geodesic
    // distance by 0.5 m and stay apart when it falls 0.5 m short.
    let Some(py) = external::python_with("geographiclib-snap-near-poles", &["geographiclib"])
    else {
        return;
    };
    let script = r#"
from geographiclib.geodesic import Geodesic
g = Geodesic.WGS84
for lon0, s in ((10.0, 999.8), (20.0, 1000.2)):
    b = g.Direct(85.0, lon0, 45.0, s)
    print(repr(lon0), 85.0, repr(b['lon2']), repr(b['lat2']))
print(repr(g.Inverse(89.9999, 0.0, 89.9999, 180.0)['s12']))
"#;
    let o = std::process::Command::new(&py)
        .args(["-c", script])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = String::from_utf8_lossy(&o.stdout).into_owned();
    let rows: Vec<Vec<f64>> = text
        .lines()
        .map(|l| l.split_whitespace().map(|x| x.parse().unwrap()).collect())
        .collect();
    let d = tmp();
    // Lines lead away from their ends (south-west of A, north-east of B), 3 km long.
    for (k, want) in [(0, 1), (1, 2)] {
        let r = &rows[k];
        let (a, b) = ([r[0], r[1]], [r[2], r[3]]);
        let roads = [
            lines(&[vec![[a[0] - 0.3, a[1] - 0.02], a]], "{}"),
            lines(&[vec![b, [b[0] + 0.3, b[1] + 0.02]]], "{}"),
        ];
        let (_, s) = plan(
            d.path(),
            &format!("at85-{k}"),
            &roads,
            &["--whole-network", "--snap", "1000"],
        );
        assert_eq!(
            figures(&s).2,
            want,
            "{:.1} m apart: {s}",
            [999.8, 1000.2][k]
        );
    }
    let s12 = rows[2][0];
    let roads = [
        lines(&[vec![[0.0, 89.99], [0.0, 89.9999]]], "{}"),
        lines(&[vec![[180.0, 89.9999], [180.0, 89.99]]], "{}"),
    ];
    for (snap, want) in [(s12 + 0.5, 1), (s12 - 0.5, 2)] {
        let (_, s) = plan(
            d.path(),
            &format!("pole-{want}"),
            &roads,
            &["--whole-network", "--snap", &format!("{snap}")],
        );
        assert_eq!(
            figures(&s).2,
            want,
            "snap {snap} m, ends {s12} m apart: {s}"
        );
    }
}

#[test]
fn sites_and_field_reports_reach_across_the_meridian() {
    // A road just west of ±180° (179.9999°W to 179.999°W on 5°N) and one 111 m east of the
    // meridian. A site and a field report at 179.99999°E lie about 12 m from the western road's
    // end across the meridian and about 110 m from the eastern road: both belong to the western
    // road (distances from memory: 0.0001° of longitude ≈ 11.1 m there).
    let d = tmp();
    let roads = write_collection(
        d.path(),
        "roads.geojson",
        &[
            lines(
                &[vec![[-179.9999, 5.0], [-179.999, 5.0]]],
                r#"{"damage":0}"#,
            ),
            lines(&[vec![[179.99, 5.0], [179.999, 5.0]]], r#"{"damage":0}"#),
        ],
    );
    let sites = write_collection(
        d.path(),
        "sites.geojson",
        &[
            point([-179.9991, 5.00001], r#"{"id":"west"}"#),
            point([179.99999, 4.99999], r#"{"id":"across"}"#),
        ],
    );
    let reports = write_collection(
        d.path(),
        "reports.geojson",
        &[point([179.99999, 5.00001], r#"{"damage":0.5}"#)],
    );
    let out = d.path().join("out");
    let o = plan_cli(
        &roads,
        &out,
        &[
            "-q",
            "--sites",
            sites.to_str().unwrap(),
            "--hub",
            "west",
            "--damage-points",
            reports.to_str().unwrap(),
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["damage_reports"]["applied"], 1, "{s}");
    let damage = damage_by_road(&out);
    assert_eq!(damage[&0], 0.5, "{damage:?}");
    assert_eq!(damage[&1], 0.0, "{damage:?}");
    assert_eq!(s["sites"]["joined_to_hub"], 2, "{s}");
    let rows = read_fc(&out.join("sites.geojson"));
    for f in &rows.features {
        let dist = f.property("attach_distance_m").and_then(|v| v.as_f64());
        let lon = f.property("attach_lon").and_then(|v| v.as_f64());
        assert!(dist.is_some_and(|x| x < 15.0), "{:?}", f.properties);
        assert!(
            lon.is_some_and(|x| (-180.0..-179.99).contains(&x)),
            "{:?}",
            f.properties
        );
    }
}

#[test]
fn crossings_on_the_meridian_make_one_junction() {
    // Three lines through (180°, 0°), each crossing the meridian without a vertex there: with
    // --node-crossings they meet at one junction on the meridian (7 junctions, 6 edges), and no
    // position of the network strays from the meridian's neighbourhood (read the long way round,
    // each line would run through 0°).
    let d = tmp();
    let roads = [
        lines(&[vec![[179.999, -0.001], [-179.999, 0.001]]], "{}"),
        lines(&[vec![[179.999, 0.001], [-179.999, -0.001]]], "{}"),
        lines(&[vec![[179.999, 0.0], [-179.999, 0.0]]], "{}"),
    ];
    let (out, s) = plan(
        d.path(),
        "cross",
        &roads,
        &["--whole-network", "--node-crossings"],
    );
    let (j, e, c, _) = figures(&s);
    assert_eq!((j, e, c), (7, 6, 1), "{s}");
    let text = std::fs::read_to_string(out.join("network.geojson")).unwrap();
    let net: Value = serde_json::from_str(&text).unwrap();
    let mut lons = Vec::new();
    fn collect(v: &Value, out: &mut Vec<f64>) {
        match v {
            Value::Array(a) if a.len() == 2 && a[0].is_number() => out.push(a[0].as_f64().unwrap()),
            Value::Array(a) => a.iter().for_each(|x| collect(x, out)),
            _ => {}
        }
    }
    for f in net["features"].as_array().unwrap() {
        collect(&f["geometry"]["coordinates"], &mut lons);
    }
    assert!(lons.iter().all(|l| l.abs() >= 179.999), "{lons:?}");
}
