//! `--redundancy` end to end on the demo district: every site survives every single road failure
//! that some repair could guard against, checked by brute force on the written layers (remove each
//! road in turn; common practice, no source).

mod common;
use common::*;
use std::collections::{BTreeSet, HashMap, HashSet};

struct Edges {
    ends: HashMap<i64, (i64, i64)>,
    usable: HashSet<i64>,
    intact: HashSet<i64>,
}

fn network(out: &std::path::Path) -> Edges {
    let fc = read_fc(&out.join("network.geojson"));
    let mut e = Edges {
        ends: HashMap::new(),
        usable: HashSet::new(),
        intact: HashSet::new(),
    };
    for f in &fc.features {
        let id = f.property("edge").unwrap().as_i64().unwrap();
        let a = f.property("from").unwrap().as_i64().unwrap();
        let b = f.property("to").unwrap().as_i64().unwrap();
        e.ends.insert(id, (a, b));
        if let Some(c) = f.property("cost").unwrap().as_f64() {
            e.usable.insert(id);
            if c == 0.0 {
                e.intact.insert(id);
            }
        }
    }
    e
}

fn joined(e: &Edges, on: &HashSet<i64>, skip: i64, from: i64, to: i64) -> bool {
    let mut adj: HashMap<i64, Vec<i64>> = HashMap::new();
    for &id in on {
        if id != skip {
            let (a, b) = e.ends[&id];
            adj.entry(a).or_default().push(b);
            adj.entry(b).or_default().push(a);
        }
    }
    let mut seen = HashSet::from([from]);
    let mut stack = vec![from];
    while let Some(v) = stack.pop() {
        if v == to {
            return true;
        }
        for &w in adj.get(&v).map(|x| &x[..]).unwrap_or(&[]) {
            if seen.insert(w) {
                stack.push(w);
            }
        }
    }
    false
}

fn edge_ids(p: &std::path::Path) -> Vec<i64> {
    read_fc(p)
        .features
        .iter()
        .map(|f| f.property("edge").unwrap().as_i64().unwrap())
        .collect()
}

#[test]
fn demo_with_backup_links_survives_every_avoidable_single_failure() {
    let d = tmp();
    let out = d.path().join("o");
    let o = run(&["demo", "--out", out.to_str().unwrap(), "-q", "--redundancy"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    let net = network(&out);
    let plan = edge_ids(&out.join("plan.geojson"));
    let backup_fc = read_fc(&out.join("backup.geojson"));
    let backup = edge_ids(&out.join("backup.geojson"));
    assert!(!backup.is_empty(), "the demo has sites worth a backup");

    // Added repairs are damaged roads outside the plan, numbered after the plan's repairs.
    let plan_set: HashSet<i64> = plan.iter().copied().collect();
    let last_plan_order = read_fc(&out.join("plan.geojson"))
        .features
        .iter()
        .filter_map(|f| f.property("order").and_then(|o| o.as_i64()))
        .max()
        .unwrap();
    for (i, f) in backup_fc.features.iter().enumerate() {
        let e = backup[i];
        assert!(net.usable.contains(&e) && !net.intact.contains(&e) && !plan_set.contains(&e));
        assert_eq!(
            f.property("order").unwrap().as_i64().unwrap(),
            last_plan_order + 1 + i as i64
        );
    }
    let b = &s["backup"];
    assert_eq!(b["repairs"].as_u64().unwrap() as usize, backup.len());
    let cost: f64 = backup_fc
        .features
        .iter()
        .map(|f| f.property("cost").unwrap().as_f64().unwrap())
        .sum();
    assert!((cost - b["cost"].as_f64().unwrap()).abs() < 0.01);

    // Brute force: remove each road of the network after plan + backup in turn.
    let mut on: HashSet<i64> = net.intact.clone();
    on.extend(plan.iter().copied());
    on.extend(backup.iter().copied());
    let sites = read_fc(&out.join("sites.geojson"));
    let junction = |f: &geojson::Feature| f.property("junction").and_then(|j| j.as_i64());
    let hub = sites
        .features
        .iter()
        .find(|f| f.property("hub").unwrap().as_bool().unwrap())
        .and_then(junction)
        .unwrap();
    let no_backup: HashMap<String, BTreeSet<i64>> = b["sites_without_possible_backup"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| {
            (
                x["site"].as_str().unwrap().to_string(),
                x["failures"]
                    .as_array()
                    .unwrap()
                    .iter()
                    .map(|e| e.as_i64().unwrap())
                    .collect(),
            )
        })
        .collect();
    let mut checked = 0;
    for f in &sites.features {
        let Some(j) = junction(f) else { continue };
        let id = f.property("site_id").unwrap().as_str().unwrap().to_string();
        if j == hub || !joined(&net, &on, -1, hub, j) {
            continue;
        }
        let mut cut_by = BTreeSet::new();
        for &e in &on {
            if !joined(&net, &on, e, hub, j) {
                // No repair at all could give a way round this road.
                assert!(
                    !joined(&net, &net.usable, e, hub, j),
                    "site {id}: road {e} has a way round that the backup did not repair"
                );
                cut_by.insert(e);
            }
        }
        assert_eq!(
            no_backup.get(&id).cloned().unwrap_or_default(),
            cut_by,
            "site {id}"
        );
        checked += 1;
    }
    assert!(checked >= 5, "only {checked} sites checked");
    let before = s["single_failures"]["roads_cutting_off_sites"]
        .as_u64()
        .unwrap();
    let after = b["single_failures_after"]["roads_cutting_off_sites"]
        .as_u64()
        .unwrap();
    assert!(after < before, "{after} ≥ {before}");

    // Work orders: the plan's rows, then the backup's, in one order.
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let col = |n: &str| h.iter().position(|x| x == n).unwrap();
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    let purposes: Vec<&str> = rows.iter().map(|x| &x[col("purpose")]).collect();
    let first_backup = purposes.iter().position(|p| *p == "backup").unwrap();
    assert!(purposes[..first_backup].iter().all(|p| *p == "plan"));
    assert!(purposes[first_backup..].iter().all(|p| *p == "backup"));
    assert_eq!(rows.len() - first_backup, backup.len());
    let report = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(report.contains("With backup links"));
}

#[test]
fn redundancy_needs_sites() {
    let d = tmp();
    let out = d.path().join("o");
    let o = run(&[
        "demo",
        "--out",
        out.to_str().unwrap(),
        "-q",
        "--redundancy",
        "--whole-network",
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("--redundancy"), "{}", stderr(&o));
    assert!(!out.exists());
}
