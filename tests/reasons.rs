//! Every reason given for a site not joined to the hub is true: one end-to-end run per reason on a
//! tiny invented district, checked against the written layers.

mod common;
use common::joined::{check_joined, reach, written};
use common::*;
use std::collections::{BTreeMap, HashSet};
use std::path::{Path, PathBuf};

/// Runs `plan` on the roads and sites (id, position, priority) with `extra` flags; returns the
/// output folder after checking the joined sites from the layers.
fn run_case(
    d: &Path,
    roads: &[String],
    sites: &[(&str, [f64; 2], u32)],
    extra: &[&str],
) -> PathBuf {
    let r = write_collection(d, "roads.geojson", roads);
    let feats: Vec<String> = sites
        .iter()
        .map(|(id, p, prio)| point(*p, &format!(r#"{{"site_id":"{id}","priority":{prio}}}"#)))
        .collect();
    let s = write_collection(d, "sites.geojson", &feats);
    let out = d.join("out");
    let mut args = vec!["--sites", s.to_str().unwrap(), "-q"];
    args.extend_from_slice(extra);
    let o = plan_cli(&r, &out, &args);
    assert!(o.status.success(), "{}", stderr(&o));
    check_joined(&out);
    out
}

/// Site id → (status, reason) from sites.geojson, checked against summary.json's list.
fn statuses(out: &Path) -> BTreeMap<String, (String, Option<String>)> {
    let m: BTreeMap<String, (String, Option<String>)> = read_fc(&out.join("sites.geojson"))
        .features
        .iter()
        .map(|f| {
            let p = |k: &str| f.property(k).unwrap().clone();
            (
                p("site_id").as_str().unwrap().to_string(),
                (
                    p("status").as_str().unwrap().to_string(),
                    p("reason").as_str().map(str::to_string),
                ),
            )
        })
        .collect();
    let s = read_json(&out.join("summary.json"));
    for u in s["sites"]["not_joined"].as_array().unwrap() {
        let (status, reason) = &m[u["id"].as_str().unwrap()];
        assert_eq!(u["status"], status.as_str());
        assert_eq!(u["reason"], reason.as_deref().unwrap());
    }
    m
}

fn road(a: [f64; 2], b: [f64; 2], damage: &str) -> String {
    line(&[a, b], &format!(r#"{{"damage":{damage}}}"#))
}

#[test]
fn a_site_far_from_every_road_or_near_closed_ones_only_is_not_attached() {
    let d = tmp();
    let roads = [
        road(at_m(0., 0.), at_m(400., 0.), "1"),
        road(at_m(0., 2000.), at_m(400., 2000.), r#""closed""#),
    ];
    let out = run_case(
        d.path(),
        &roads,
        &[
            ("hub", at_m(0., 10.), 2),
            ("far", at_m(200., 900.), 1),
            ("closed", at_m(200., 2030.), 1),
        ],
        &[],
    );
    let st = statuses(&out);
    assert_eq!(st["far"].0, "not_attached");
    let far = st["far"].1.as_deref().unwrap();
    assert!(
        far.starts_with("no road within 250 m (nearest about"),
        "{far}"
    );
    assert_eq!(st["closed"].0, "not_attached");
    let closed = st["closed"].1.as_deref().unwrap();
    assert!(
        closed.starts_with("only impassable roads within 250 m"),
        "{closed}"
    );
}

#[test]
fn beyond_a_closed_bridge_the_reason_names_impassable_roads() {
    let d = tmp();
    // hub — (damaged) — x — closed — y — (damaged) — east1, east2.
    let roads = [
        road(at_m(0., 0.), at_m(500., 0.), "0.5"),
        road(at_m(500., 0.), at_m(600., 0.), r#""closed""#),
        road(at_m(600., 0.), at_m(1100., 0.), "1"),
    ];
    let sites = [
        ("hub", at_m(0., 10.), 1),
        ("east1", at_m(700., 10.), 1),
        ("east2", at_m(1100., 10.), 1),
    ];
    let out = run_case(d.path(), &roads, &sites, &["--hub", "hub"]);
    let st = statuses(&out);
    for (me, other) in [("east1", "east2"), ("east2", "east1")] {
        assert_eq!(st[me].0, "unreachable");
        assert_eq!(
            st[me].1.as_deref().unwrap(),
            format!(
                "only impassable roads lead from its part of the network to the hub's; the plan \
                 joins it with {other}"
            )
        );
    }
    // The plan does join the two east sites with each other, as the reason says.
    let w = written(&out);
    let free: HashSet<i64> = w.intact.union(&w.plan).copied().collect();
    let j = |id: &str| {
        read_fc(&out.join("sites.geojson"))
            .features
            .iter()
            .find(|f| f.property("site_id").unwrap() == id)
            .and_then(|f| f.property("junction").unwrap().as_i64())
            .unwrap()
    };
    assert!(reach(&w, &free, j("east1")).contains(&j("east2")));
}

#[test]
fn an_island_no_road_reaches_is_not_said_to_be_cut_off_by_impassable_roads() {
    let d = tmp();
    let roads = [
        road(at_m(0., 0.), at_m(400., 0.), "1"),
        // Two islands 3 km away, one with two sites, one with a lone site; no road links them.
        road(at_m(3000., 0.), at_m(3400., 0.), "0.4"),
        road(at_m(0., 3000.), at_m(400., 3000.), "0.4"),
    ];
    let sites = [
        ("hub", at_m(0., 10.), 3),
        ("near", at_m(400., 10.), 1),
        ("isle1", at_m(3000., 10.), 1),
        ("isle2", at_m(3400., 10.), 1),
        ("lone", at_m(200., 3010.), 1),
    ];
    let out = run_case(d.path(), &roads, &sites, &[]);
    let st = statuses(&out);
    assert_eq!(st["near"].0, "joined");
    let island = "no road at all, passable or not, links its part of the network to the hub's";
    assert_eq!(
        st["isle1"].1.as_deref().unwrap(),
        format!("{island}; the plan joins it with isle2")
    );
    assert_eq!(
        st["lone"].1.as_deref().unwrap(),
        format!("{island}; no other site shares its part of the network")
    );
    for id in ["isle1", "isle2", "lone"] {
        assert_eq!(st[id].0, "unreachable");
        assert!(!st[id].1.as_deref().unwrap().contains("impassable"));
    }
}

#[test]
fn left_out_by_budget_names_the_cost_still_needed_to_reach_the_hub() {
    let d = tmp();
    // hub —(1)— a —(1)— b, each stretch 300 m; a budget of 400 joins a only. An island pair
    // (100 m at factor 1 between them) is worth the leftover only if it fits.
    let roads = [
        road(at_m(0., 0.), at_m(300., 0.), "1"),
        road(at_m(300., 0.), at_m(600., 0.), "1"),
        road(at_m(0., 3000.), at_m(150., 3000.), "1"),
    ];
    let sites = [
        ("hub", at_m(0., 10.), 5),
        ("a", at_m(300., 10.), 2),
        ("b", at_m(600., 10.), 2),
        ("isle1", at_m(0., 3010.), 1),
        ("isle2", at_m(150., 3010.), 1),
    ];
    let out = run_case(d.path(), &roads, &sites, &["--budget", "400"]);
    let st = statuses(&out);
    assert_eq!(st["a"].0, "joined");
    assert_eq!(st["b"].0, "left_out_by_budget");
    // The cost still needed is the stretch a–b as written in network.geojson.
    let net = read_fc(&out.join("network.geojson"));
    let ab: f64 = net
        .features
        .iter()
        .filter(|f| f.property("source_index").unwrap() == 1)
        .map(|f| f.property("cost").unwrap().as_f64().unwrap())
        .sum();
    assert_eq!(
        st["b"].1.as_deref().unwrap(),
        format!("outside the budget: {ab:.3} more repair-metres would join it to the hub")
    );
    // The island pair costs about 150; 400 − 300 leaves about 100: not enough.
    let isle = st["isle1"].1.as_deref().unwrap();
    assert!(
        isle.ends_with("; joining it with isle2 is outside the budget"),
        "{isle}"
    );
    // With a little more, the leftover joins the island pair to each other (not to the hub).
    let d2 = tmp();
    let out = run_case(d2.path(), &roads, &sites, &["--budget", "460"]);
    let st = statuses(&out);
    assert_eq!(st["b"].0, "left_out_by_budget");
    assert!(
        st["isle1"]
            .1
            .as_deref()
            .unwrap()
            .ends_with("the plan joins it with isle2")
    );
}

#[test]
fn whole_network_with_sites_reports_which_sites_the_forest_joins() {
    let d = tmp();
    let roads = [
        road(at_m(0., 0.), at_m(400., 0.), "1"),
        road(at_m(400., 0.), at_m(800., 0.), "0"),
        road(at_m(800., 0.), at_m(900., 0.), r#""closed""#),
        road(at_m(900., 0.), at_m(1300., 0.), "1"),
    ];
    let sites = [
        ("hub", at_m(0., 10.), 1),
        ("mid", at_m(800., 10.), 1),
        ("beyond", at_m(1300., 10.), 1),
    ];
    let out = run_case(
        d.path(),
        &roads,
        &sites,
        &["--whole-network", "--hub", "hub"],
    );
    let st = statuses(&out);
    assert_eq!(st["hub"].0, "joined");
    assert_eq!(st["mid"].0, "joined");
    assert_eq!(st["beyond"].0, "unreachable");
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["sites"]["joined_to_hub"], 2);
    // The forest is rooted at the hub: its first repair joins `mid`.
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let col = r
        .headers()
        .unwrap()
        .iter()
        .position(|h| h == "completes_sites");
    let first = r.records().next().unwrap().unwrap();
    assert_eq!(&first[col.unwrap()], "mid");
}
