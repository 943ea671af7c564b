//! Sites: attachment on hand-made fixtures, grouping, reporting, and bad site inputs.

mod common;
use common::*;
use reknit::ingest::attach::attach_sites;
use reknit::ingest::damage::Damage;
use reknit::ingest::noding::node;
use reknit::ingest::roads::LineLayer;
use reknit::ingest::sites::Site;
use reknit::network::{FeatureMeta, Network};

/// A point x metres east and y metres north of (0, 0), using the WGS84 degree lengths at the equator.
fn pt(x: f64, y: f64) -> [f64; 2] {
    let (my, mx) = reknit::ingest::geodesy::metres_per_degree(0.0);
    [x / mx, y / my]
}

fn network(lines: &[(Vec<[f64; 2]>, Damage)]) -> Network {
    let mut l = LineLayer::default();
    for (i, (line, damage)) in lines.iter().enumerate() {
        l.coords.extend_from_slice(line);
        l.part_ends.push(l.coords.len());
        l.part_feature.push(i as u32);
        l.features.push(FeatureMeta {
            source_index: i as u32,
            source_id: None,
            damage: *damage,
            category: None,
            label: None,
            structure: None,
        });
    }
    node(l, 0.0).0
}

fn site(i: usize, p: [f64; 2]) -> Site {
    Site {
        index: i,
        id: format!("s{i}"),
        name: None,
        priority: 1.0,
        pos: p,
        outline: None,
        attributes: Default::default(),
    }
}

#[test]
fn site_beside_the_middle_splits_the_edge_and_keeps_the_cost() {
    let mut net = network(&[(vec![pt(0., 0.), pt(200., 0.)], Damage::Factor(0.5))]);
    let cost = net.edges[0].cost;
    let a = attach_sites(&mut net, &[site(0, pt(100., 30.))], 250.0);
    net.validate().unwrap();
    assert_eq!(net.edges.len(), 2);
    assert_eq!(net.junctions.len(), 3);
    assert_eq!(a[0].junction, Some(2));
    assert!(
        (a[0].distance_m.unwrap() - 30.0).abs() < 0.05,
        "{:?}",
        a[0].distance_m
    );
    assert_eq!(
        net.edges[0].cost + net.edges[1].cost,
        cost,
        "halves share the cost exactly"
    );
    assert!((net.edges[0].length_m - 100.0).abs() < 0.1);
    assert!((net.edges[0].length_m + net.edges[1].length_m - 200.0).abs() < 0.05);
}

#[test]
fn site_beyond_the_limit_is_reported_with_the_distance() {
    let mut net = network(&[(vec![pt(0., 0.), pt(200., 0.)], Damage::Factor(1.0))]);
    let a = attach_sites(&mut net, &[site(0, pt(100., 400.))], 250.0);
    assert_eq!(a[0].junction, None);
    let f = a[0].failure.as_ref().unwrap();
    assert!(f.contains("no road within 250 m"), "{f}");
    assert!((a[0].distance_m.unwrap() - 400.0).abs() < 0.5);
    assert_eq!(net.edges.len(), 1, "nothing split");
}

#[test]
fn site_on_a_junction_uses_it_without_splitting() {
    let mut net = network(&[
        (vec![pt(0., 0.), pt(200., 0.)], Damage::Factor(1.0)),
        (vec![pt(200., 0.), pt(400., 0.)], Damage::Factor(1.0)),
    ]);
    let j = net.edges[0].to;
    let a = attach_sites(&mut net, &[site(0, pt(200., 0.))], 250.0);
    assert_eq!(a[0].junction, Some(j));
    assert_eq!(net.edges.len(), 2);
    assert!(a[0].distance_m.unwrap() < 1e-6);
}

#[test]
fn two_sites_on_one_edge_cut_it_in_three() {
    let mut net = network(&[(
        vec![pt(0., 0.), pt(100., 0.), pt(300., 0.)],
        Damage::Factor(1.0),
    )]);
    let cost = net.edges[0].cost;
    let a = attach_sites(
        &mut net,
        &[site(0, pt(250., -20.)), site(1, pt(50., 10.))],
        250.0,
    );
    net.validate().unwrap();
    assert_eq!(net.edges.len(), 3);
    assert_ne!(a[0].junction, a[1].junction);
    assert_eq!(net.edges.iter().map(|e| e.cost).sum::<u64>(), cost);
    let lengths: Vec<f64> = net.edges.iter().map(|e| e.length_m).collect();
    assert!(
        (lengths[0] - 50.0).abs() < 0.1 && (lengths[1] - 200.0).abs() < 0.1,
        "{lengths:?}"
    );
}

#[test]
fn only_impassable_roads_nearby_is_its_own_reason() {
    let mut net = network(&[
        (vec![pt(0., 0.), pt(200., 0.)], Damage::Closed),
        (vec![pt(0., 1000.), pt(200., 1000.)], Damage::Factor(1.0)),
    ]);
    let a = attach_sites(&mut net, &[site(0, pt(100., 20.))], 250.0);
    assert_eq!(a[0].junction, None);
    assert!(
        a[0].failure.as_ref().unwrap().contains("only impassable"),
        "{:?}",
        a[0].failure
    );
}

fn sites_fc(
    d: &std::path::Path,
    name: &str,
    points: &[(&str, [f64; 2], f64)],
) -> std::path::PathBuf {
    let f: Vec<String> = points
        .iter()
        .map(|(id, p, prio)| {
            format!(
                r#"{{"type":"Feature","properties":{{"site_id":"{id}","priority":{prio}}},"geometry":{{"type":"Point","coordinates":[{},{}]}}}}"#,
                p[0], p[1]
            )
        })
        .collect();
    write_collection(d, name, &f)
}

/// Two towns joined by a closed bridge: sites on either side form separate groups.
fn two_towns(d: &std::path::Path) -> std::path::PathBuf {
    let lines = vec![
        line(&[pt(0., 0.), pt(500., 0.)], r#"{"damage":0.5}"#),
        line(&[pt(500., 0.), pt(600., 0.)], r#"{"damage":"closed"}"#),
        line(&[pt(600., 0.), pt(1100., 0.)], r#"{"damage":1}"#),
        line(&[pt(1100., 0.), pt(1100., 400.)], r#"{"damage":0}"#),
    ];
    write_collection(d, "roads.geojson", &lines)
}

#[test]
fn groups_unreachable_and_far_sites_are_reported_not_fatal() {
    let d = tmp();
    let roads = two_towns(d.path());
    let sites = sites_fc(
        d.path(),
        "sites.geojson",
        &[
            ("west", pt(10., 10.), 1.),
            ("east", pt(700., 5.), 5.),
            ("north", pt(1100., 390.), 2.),
            ("far", pt(5000., 5000.), 1.),
        ],
    );
    let out = d.path().join("out");
    let o = run(&[
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--sites",
        sites.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(
        s["sites"]["hub"], "east",
        "highest priority is the default hub"
    );
    assert_eq!(s["sites"]["joined_to_hub"], 2);
    let groups = s["sites"]["groups"].as_array().unwrap();
    assert_eq!(groups.len(), 2);
    assert_eq!(groups[0]["sites"], serde_json::json!(["west"]));
    assert_eq!(groups[1]["sites"], serde_json::json!(["east", "north"]));
    // east → north: from x=700 to x=1100 at factor 1 (400 m) then intact: 400 repair-metres.
    assert!(
        (s["total_cost"].as_f64().unwrap() - 400.0).abs() < 0.5,
        "{}",
        s["total_cost"]
    );
    assert_eq!(s["gap"], 0.0);
    assert_eq!(s["optimal"], true);
    let reasons: Vec<String> = s["sites"]["not_joined"]
        .as_array()
        .unwrap()
        .iter()
        .map(|u| {
            format!(
                "{}: {}",
                u["id"].as_str().unwrap(),
                u["reason"].as_str().unwrap()
            )
        })
        .collect();
    assert_eq!(reasons.len(), 2, "{reasons:?}");
    // West lies beyond the closed bridge, alone on its side.
    assert_eq!(
        reasons[0],
        "west: only impassable roads lead from its part of the network to the hub's; \
         no other site shares its part of the network"
    );
    assert!(
        reasons[1].starts_with("far: no road within 250 m"),
        "{reasons:?}"
    );
    let layer = read_fc(&out.join("sites.geojson"));
    let status: Vec<&str> = layer
        .features
        .iter()
        .map(|f| f.property("status").unwrap().as_str().unwrap())
        .collect();
    assert_eq!(status, ["unreachable", "joined", "joined", "not_attached"]);
}

#[test]
fn csv_sites_with_named_columns_and_an_explicit_hub() {
    let d = tmp();
    let roads = two_towns(d.path());
    let csv = d.path().join("sites.csv");
    let (a, b) = (pt(700., 5.), pt(1100., 390.));
    std::fs::write(
        &csv,
        format!(
            "code,X_DEG,Y_DEG\nA,{},{}\nB,{},{}\n",
            a[0], a[1], b[0], b[1]
        ),
    )
    .unwrap();
    let out = d.path().join("out");
    let o = run(&[
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--sites",
        csv.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--lon-column",
        "X_DEG",
        "--lat-column",
        "Y_DEG",
        "--site-id-field",
        "code",
        "--hub",
        "B",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["sites"]["hub"], "B");
    assert_eq!(s["sites"]["joined_to_hub"], 2);
}

#[test]
fn one_site_is_a_trivial_plan_and_no_sites_are_refused() {
    let d = tmp();
    let roads = two_towns(d.path());
    // No sites: nothing to connect, refused rather than written as an empty plan.
    let none = sites_fc(d.path(), "none.geojson", &[]);
    let o = run(&[
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--sites",
        none.to_str().unwrap(),
        "--out",
        d.path().join("out-none").to_str().unwrap(),
    ]);
    assert!(!o.status.success());
    assert!(stderr(&o).contains("holds no sites"), "{}", stderr(&o));
    assert!(!d.path().join("out-none").exists());
    let (name, pts) = ("one.geojson", vec![("only", pt(10., 10.), 1.)]);
    {
        let sites = sites_fc(d.path(), name, &pts);
        let out = d.path().join(format!("out-{name}"));
        let o = run(&[
            "plan",
            "--roads",
            roads.to_str().unwrap(),
            "--sites",
            sites.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        let s = read_json(&out.join("summary.json"));
        assert_eq!(s["plan_edges"], 0);
        assert_eq!(s["total_cost"], 0.0);
        assert!(
            s["sites"]["note"]
                .as_str()
                .unwrap()
                .contains("nothing to connect")
        );
    }
}

/// A site holding both `name` (one of reknit's own properties) and `input_name`: the input `name`
/// steps round the input `input_name` to `input_name_2`, and no property is written twice in
/// `sites.geojson` (RFC 8259 §4: names within an object should be unique).
#[test]
fn an_input_attribute_never_takes_a_name_written_already() {
    let d = tmp();
    let roads = one_damaged_road(d.path());
    let props = |i: usize| {
        format!(r#"{{"site_id":"S{i}","name":"Clinic {i}","input_name":"user value {i}"}}"#)
    };
    let sites = write_collection(
        d.path(),
        "sites.geojson",
        &[
            point(at_m(0.0, 0.0), &props(0)),
            point(at_m(200.0, 0.0), &props(1)),
        ],
    );
    let out = d.path().join("out");
    let o = plan_cli(&roads, &out, &["--sites", sites.to_str().unwrap(), "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = std::fs::read_to_string(out.join("sites.geojson")).unwrap();
    for (name, times) in [
        ("\"input_name\":", 2),
        ("\"input_name_2\":", 2),
        ("\"input_site_id\":", 2),
    ] {
        assert_eq!(text.matches(name).count(), times, "{name} in {text}");
    }
    let fc = read_json(&out.join("sites.geojson"));
    let p = &fc["features"][0]["properties"];
    assert_eq!(p["input_name"], "user value 0");
    assert_eq!(p["input_name_2"], "Clinic 0");
}
