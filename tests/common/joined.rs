//! "Joined" checked from the written layers alone: network.geojson, plan.geojson and sites.geojson
//! are read with the geojson crate (an independent reader), and a site counts as joined when a
//! path of intact (cost 0) or planned edges leads from it to the hub's junction. Every output that
//! speaks of joined sites (the sites layer, summary.json, work-orders.csv, single failures) must agree.

use super::*;
use std::collections::{BTreeSet, HashMap, HashSet};

/// The edges a run wrote: ends, usable or not, intact or not, in the plan or not.
pub struct Written {
    /// Edge id → (from, to).
    pub ends: HashMap<i64, (i64, i64)>,
    /// Usable edges of cost 0.
    pub intact: HashSet<i64>,
    /// Usable edges.
    pub usable: HashSet<i64>,
    /// Edges of plan.geojson.
    pub plan: HashSet<i64>,
}

/// Reads network.geojson and plan.geojson.
pub fn written(out: &Path) -> Written {
    let mut w = Written {
        ends: HashMap::new(),
        intact: HashSet::new(),
        usable: HashSet::new(),
        plan: HashSet::new(),
    };
    for f in read_fc(&out.join("network.geojson")).features {
        let id = f.property("edge").unwrap().as_i64().unwrap();
        let a = f.property("from").unwrap().as_i64().unwrap();
        let b = f.property("to").unwrap().as_i64().unwrap();
        w.ends.insert(id, (a, b));
        if let Some(c) = f.property("cost").unwrap().as_f64() {
            w.usable.insert(id);
            if c == 0.0 {
                w.intact.insert(id);
            }
        }
    }
    for f in read_fc(&out.join("plan.geojson")).features {
        let id = f.property("edge").unwrap().as_i64().unwrap();
        assert!(w.usable.contains(&id), "plan edge {id} is not usable");
        w.plan.insert(id);
    }
    w
}

/// Junctions reached from `from` over the given edges.
pub fn reach(w: &Written, edges: &HashSet<i64>, from: i64) -> HashSet<i64> {
    let mut adj: HashMap<i64, Vec<i64>> = HashMap::new();
    for id in edges {
        let (a, b) = w.ends[id];
        adj.entry(a).or_default().push(b);
        adj.entry(b).or_default().push(a);
    }
    let mut seen = HashSet::from([from]);
    let mut stack = vec![from];
    while let Some(v) = stack.pop() {
        for &x in adj.get(&v).map(|x| &x[..]).unwrap_or(&[]) {
            if seen.insert(x) {
                stack.push(x);
            }
        }
    }
    seen
}

/// Checks every output of the run in `out` against the joined sites found from the layers alone;
/// returns (sites joined to the hub, sites in all).
pub fn check_joined(out: &Path) -> (usize, usize) {
    let w = written(out);
    let s = read_json(&out.join("summary.json"));
    let sites = read_fc(&out.join("sites.geojson"));
    let prop = |f: &geojson::Feature, k: &str| f.property(k).unwrap().clone();
    let Some(hub) = sites
        .features
        .iter()
        .find(|f| prop(f, "hub") == true)
        .map(|f| {
            prop(f, "junction")
                .as_i64()
                .expect("the hub lies on the network")
        })
    else {
        assert!(sites.features.is_empty(), "sites without a hub");
        return (0, 0);
    };
    let free: HashSet<i64> = w.intact.union(&w.plan).copied().collect();
    let reached = reach(&w, &free, hub);
    let before = reach(&w, &w.intact, hub);
    let mut joined = BTreeSet::new();
    let mut joined_before = BTreeSet::new();
    for f in &sites.features {
        let id = prop(f, "site_id").as_str().unwrap().to_string();
        let j = prop(f, "junction").as_i64();
        let is = j.is_some_and(|j| reached.contains(&j));
        assert_eq!(
            prop(f, "joined_to_hub"),
            is,
            "site {id}: `joined_to_hub` against the layers"
        );
        assert_eq!(prop(f, "status") == "joined", is, "site {id}: status");
        if is {
            joined.insert(id.clone());
            if before.contains(&j.unwrap()) {
                joined_before.insert(id);
            }
        } else {
            assert!(prop(f, "reason").is_string(), "site {id} has no reason");
        }
    }
    let st = &s["sites"];
    assert_eq!(st["joined_to_hub"].as_u64().unwrap() as usize, joined.len());
    let not_joined: BTreeSet<String> = st["not_joined"]
        .as_array()
        .unwrap()
        .iter()
        .map(|u| u["id"].as_str().unwrap().to_string())
        .collect();
    assert_eq!(not_joined.len() + joined.len(), sites.features.len());
    assert!(not_joined.is_disjoint(&joined));
    check_orders(out, &w, hub, &joined, &joined_before);
    // Days end at the share of sites joined.
    if let Some(last) = s["days"].as_array().and_then(|d| d.last()) {
        let share = joined.len() as f64 / sites.features.len() as f64;
        let got = last["cumulative_share_of_sites"].as_f64().unwrap();
        assert!(
            (got - share).abs() < 1e-3,
            "days end at {got}, {share} joined"
        );
    }
    // The single-failure report speaks of joined sites only, and of all of them.
    if let Some(f) = s["single_failures"].as_object() {
        assert_eq!(
            f["sites_checked"].as_u64().unwrap() as usize,
            joined.len() - 1
        );
        for p in f["per_site"].as_array().unwrap() {
            assert!(joined.contains(p["site"].as_str().unwrap()), "{p}");
        }
    }
    (joined.len(), sites.features.len())
}

/// Work orders: each plan repair, made in order, joins exactly the sites it lists; those and the
/// sites joined before any repair are the joined sites.
fn check_orders(
    out: &Path,
    w: &Written,
    hub: i64,
    joined: &BTreeSet<String>,
    before: &BTreeSet<String>,
) {
    let sites = read_fc(&out.join("sites.geojson"));
    let junction: HashMap<String, i64> = sites
        .features
        .iter()
        .filter_map(|f| {
            let j = f.property("junction").unwrap().as_i64()?;
            Some((f.property("site_id").unwrap().as_str()?.to_string(), j))
        })
        .collect();
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let col = |name: &str| h.iter().position(|x| x == name).unwrap();
    let (edge, completes, purpose) = (col("edge"), col("completes_sites"), col("purpose"));
    let mut done: HashSet<i64> = w.intact.clone();
    let mut seen: BTreeSet<String> = before.clone();
    for rec in r.records().map(|x| x.unwrap()) {
        if &rec[purpose] != "plan" {
            continue;
        }
        done.insert(rec[edge].parse().unwrap());
        let now = reach(w, &done, hub);
        let listed: BTreeSet<String> = rec[completes]
            .split(';')
            .filter(|x| !x.is_empty())
            .map(str::to_string)
            .collect();
        let newly: BTreeSet<String> = junction
            .iter()
            .filter(|(id, j)| now.contains(j) && !seen.contains(*id))
            .map(|(id, _)| id.clone())
            .collect();
        assert_eq!(listed, newly, "repair of edge {} completes", &rec[edge]);
        seen.extend(newly);
    }
    assert_eq!(&seen, joined, "work orders and the joined sites");
}
