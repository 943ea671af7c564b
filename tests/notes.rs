//! Defaults and choices that change the answer are announced: on stderr (unless --quiet), in
//! summary.json `notes` and in report.html. Also the hub: it must lie on the road network.

mod common;
use common::joined::check_joined;
use common::*;
use std::path::{Path, PathBuf};

/// Writes roads and sites (full feature texts) and runs `plan` without --quiet.
fn run_notes(d: &Path, roads: &[String], sites: &[String], extra: &[&str]) -> (PathBuf, String) {
    let r = write_collection(d, "roads.geojson", roads);
    let s = write_collection(d, "sites.geojson", sites);
    let out = d.join("out");
    let mut args = vec!["--sites", s.to_str().unwrap()];
    args.extend_from_slice(extra);
    let o = plan_cli(&r, &out, &args);
    assert!(o.status.success(), "{}", stderr(&o));
    check_joined(&out);
    (out, stderr(&o))
}

/// The note with `code`: its message, checked to be on stderr and in the report too.
fn note(out: &Path, err: &str, code: &str) -> String {
    let s = read_json(&out.join("summary.json"));
    let n = s["notes"]
        .as_array()
        .unwrap()
        .iter()
        .find(|n| n["code"] == code)
        .unwrap_or_else(|| panic!("no note {code}: {}", s["notes"]));
    let msg = n["message"].as_str().unwrap().to_string();
    assert!(
        err.contains(&format!("note: {msg}")),
        "{code} not on stderr: {err}"
    );
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    // HTML text escaping (common practice, no source): & < > " and ' as entities.
    let esc = msg
        .replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
        .replace('\'', "&#39;");
    assert!(html.contains(&esc), "{code} not in the report");
    msg
}

fn codes(out: &Path) -> Vec<String> {
    read_json(&out.join("summary.json"))["notes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n["code"].as_str().unwrap().to_string())
        .collect()
}

fn site(id: Option<&str>, p: [f64; 2], prio: Option<u32>) -> String {
    let mut props = Vec::new();
    if let Some(id) = id {
        props.push(format!(r#""site_id":"{id}""#));
    }
    if let Some(p) = prio {
        props.push(format!(r#""priority":{p}"#));
    }
    point(p, &format!("{{{}}}", props.join(",")))
}

#[test]
fn roads_without_damage_values_are_announced() {
    let d = tmp();
    let roads = [
        line(&[at_m(0., 0.), at_m(300., 0.)], "{}"),
        line(&[at_m(300., 0.), at_m(600., 0.)], "{}"),
    ];
    let sites = [
        site(Some("a"), at_m(0., 5.), Some(2)),
        site(Some("b"), at_m(600., 5.), Some(1)),
    ];
    let (out, err) = run_notes(d.path(), &roads, &sites, &[]);
    let m = note(&out, &err, "no_damage_values");
    assert!(
        m.contains("`damage`") && m.contains("full reconstruction"),
        "{m}"
    );
    // One road with a value: the others are counted.
    let d = tmp();
    let roads = [
        line(&[at_m(0., 0.), at_m(300., 0.)], r#"{"damage":0.2}"#),
        line(&[at_m(300., 0.), at_m(600., 0.)], "{}"),
    ];
    let (out, err) = run_notes(d.path(), &roads, &sites, &[]);
    let m = note(&out, &err, "damage_defaulted");
    assert!(m.starts_with("1 road of 2 has no value"), "{m}");
}

#[test]
fn missing_site_ids_and_priorities_are_announced() {
    let d = tmp();
    let roads = [line(&[at_m(0., 0.), at_m(600., 0.)], r#"{"damage":1}"#)];
    let sites = [
        site(None, at_m(0., 5.), None),
        site(Some("b"), at_m(600., 5.), None),
    ];
    let (out, err) = run_notes(d.path(), &roads, &sites, &[]);
    let m = note(&out, &err, "site_ids_generated");
    assert!(
        m.starts_with("1 site of 2 has no id") && m.contains("site-N"),
        "{m}"
    );
    let m = note(&out, &err, "site_priority_default");
    assert!(
        m.starts_with("no site has a value in the priority field `priority`"),
        "{m}"
    );
    // Both have priority 1: the hub is the first, and the tie is said.
    let m = note(&out, &err, "hub_tie");
    assert!(
        m.starts_with("site-1, b share the highest priority (1); the hub is site-1"),
        "{m}"
    );
    assert_eq!(
        read_json(&out.join("summary.json"))["sites"]["hub"],
        "site-1"
    );
}

#[test]
fn unmatched_damage_reports_and_far_sites_are_announced() {
    let d = tmp();
    let roads = [line(&[at_m(0., 0.), at_m(600., 0.)], r#"{"damage":1}"#)];
    let reports = write_collection(
        d.path(),
        "reports.geojson",
        &[
            point(at_m(300., 10.), r#"{"damage":0.3}"#),
            point(at_m(300., 2000.), r#"{"damage":0.3}"#),
        ],
    );
    let sites = [
        site(Some("a"), at_m(0., 5.), Some(1)),
        site(Some("b"), at_m(600., 5.), Some(1)),
        site(Some("far"), at_m(300., 1000.), Some(1)),
    ];
    let (out, err) = run_notes(
        d.path(),
        &roads,
        &sites,
        &["--damage-points", reports.to_str().unwrap(), "--hub", "a"],
    );
    let m = note(&out, &err, "damage_reports_unmatched");
    assert!(
        m.starts_with("1 damage report of 2 lies farther than 50 m"),
        "{m}"
    );
    let m = note(&out, &err, "sites_not_attached");
    assert!(
        m.starts_with("1 site has no usable road within --max-attach 250 m")
            && m.ends_with(": far")
    );
    assert!(
        !codes(&out).contains(&"hub_tie".to_string()),
        "a named hub is no tie"
    );
}

#[test]
fn quiet_keeps_stderr_clean_but_the_notes_stay_in_the_summary() {
    let d = tmp();
    let r = write_collection(
        d.path(),
        "roads.geojson",
        &[line(&[at_m(0., 0.), at_m(600., 0.)], "{}")],
    );
    let out = d.path().join("out");
    let o = plan_cli(&r, &out, &["-q", "--whole-network"]);
    assert!(o.status.success());
    assert_eq!(stderr(&o), "");
    assert_eq!(codes(&out), ["no_damage_values"]);
}

#[test]
fn a_budget_that_cuts_the_plan_is_announced() {
    let d = tmp();
    let roads = [line(&[at_m(0., 0.), at_m(600., 0.)], r#"{"damage":1}"#)];
    let sites = [
        site(Some("a"), at_m(0., 5.), Some(2)),
        site(Some("b"), at_m(600., 5.), Some(1)),
    ];
    let (out, err) = run_notes(d.path(), &roads, &sites, &["--budget", "100"]);
    let m = note(&out, &err, "budget_limits_plan");
    assert!(m.contains("more than the budget of 100"), "{m}");
    // No bound covers a choice within a budget: never called optimal.
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["lower_bound"], 0.0);
    assert!(s["gap"].is_null());
    assert_eq!(s["optimal"], false);
    assert_eq!(
        s["plan"]["kind"],
        "Steiner trees joining the sites chosen within the budget, the hub's group first"
    );
    assert!(err.contains("a plan within a budget has no bound"), "{err}");
    let d = tmp();
    let (out, _) = run_notes(d.path(), &roads, &sites, &["--budget", "100000"]);
    assert!(!codes(&out).contains(&"budget_limits_plan".to_string()));
}

#[test]
fn a_hub_off_the_roads_gives_way_to_the_next_site_on_them() {
    let d = tmp();
    let roads = [
        line(&[at_m(0., 0.), at_m(300., 0.)], r#"{"damage":1}"#),
        line(&[at_m(300., 0.), at_m(600., 0.)], r#"{"damage":1}"#),
    ];
    let sites = [
        site(Some("top"), at_m(300., 2000.), Some(9)),
        site(Some("a"), at_m(0., 5.), Some(3)),
        site(Some("b"), at_m(600., 5.), Some(1)),
    ];
    let (out, err) = run_notes(d.path(), &roads, &sites, &[]);
    let m = note(&out, &err, "hub_not_on_roads");
    assert!(
        m.starts_with("top has a higher priority") && m.contains("the hub is a"),
        "{m}"
    );
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["sites"]["hub"], "a");
    // The single-failure report is made from that hub and covers b.
    assert_eq!(s["single_failures"]["sites_checked"], 1);
    assert_eq!(s["single_failures"]["sites_with_a_single_failure"], 1);
}

#[test]
fn a_hub_alone_on_its_roads_is_announced_and_checks_no_site() {
    let d = tmp();
    let roads = [
        line(&[at_m(0., 0.), at_m(300., 0.)], r#"{"damage":1}"#),
        line(&[at_m(0., 3000.), at_m(300., 3000.)], r#"{"damage":1}"#),
    ];
    let sites = [
        site(Some("hub"), at_m(0., 5.), Some(3)),
        site(Some("a"), at_m(0., 3005.), Some(1)),
        site(Some("b"), at_m(300., 3005.), Some(1)),
    ];
    let (out, err) = run_notes(d.path(), &roads, &sites, &[]);
    note(&out, &err, "hub_alone");
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["sites"]["joined_to_hub"], 1);
    assert_eq!(s["single_failures"]["sites_checked"], 0);
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(
        html.contains("Sites checked (joined to the hub, the hub excepted)</th><td class=\"n\">0<")
    );
    assert!(html.contains("these figures say nothing about how safe any site is"));
}

/// A square polygon feature of side `s` metres with its south-west corner at (x, y).
fn zone(x: f64, y: f64, s: f64, props: &str) -> String {
    let c = [
        at_m(x, y),
        at_m(x + s, y),
        at_m(x + s, y + s),
        at_m(x, y + s),
        at_m(x, y),
    ];
    let ring: Vec<String> = c.iter().map(|p| format!("[{},{}]", p[0], p[1])).collect();
    format!(
        r#"{{"type":"Feature","properties":{props},"geometry":{{"type":"Polygon","coordinates":[[{}]]}}}}"#,
        ring.join(",")
    )
}

#[test]
fn zones_and_reports_without_values_and_zones_over_no_road_are_announced() {
    let d = tmp();
    let roads = [line(&[at_m(0., 0.), at_m(600., 0.)], r#"{"damage":0.1}"#)];
    let sites = [
        site(Some("a"), at_m(0., 5.), Some(2)),
        site(Some("b"), at_m(600., 5.), Some(1)),
    ];
    let zones = write_collection(
        d.path(),
        "zones.geojson",
        &[
            zone(100., -50., 100., "{}"),
            zone(100., -50., 100., r#"{"damage":0.5}"#),
        ],
    );
    let reports = write_collection(d.path(), "reports.geojson", &[point(at_m(400., 5.), "{}")]);
    let (out, err) = run_notes(
        d.path(),
        &roads,
        &sites,
        &[
            "--damage-zones",
            zones.to_str().unwrap(),
            "--damage-points",
            reports.to_str().unwrap(),
        ],
    );
    let m = note(&out, &err, "zone_damage_defaulted");
    assert!(m.starts_with("1 damage zone feature of 2 has no value in the damage field `damage`"));
    assert!(m.ends_with("factor 1 (full reconstruction)"), "{m}");
    let m = note(&out, &err, "report_damage_defaulted");
    assert!(m.starts_with("1 damage report of 1 has no value"), "{m}");
    assert!(!codes(&out).contains(&"damage_zones_changed_nothing".to_string()));
    // Zones far from every road change nothing, and the run says so.
    let d = tmp();
    let zones = write_collection(
        d.path(),
        "zones.geojson",
        &[zone(5000., 5000., 100., r#"{"damage":0.9}"#)],
    );
    let (out, err) = run_notes(
        d.path(),
        &roads,
        &sites,
        &["--damage-zones", zones.to_str().unwrap()],
    );
    let m = note(&out, &err, "damage_zones_changed_nothing");
    assert!(
        m.starts_with("the damage zone changed the cost of no road"),
        "{m}"
    );
}

#[test]
fn among_tied_sites_the_hub_is_where_the_most_sites_can_join_it() {
    let d = tmp();
    let roads = [
        line(&[at_m(0., 3000.), at_m(100., 3000.)], r#"{"damage":1}"#),
        line(&[at_m(0., 0.), at_m(600., 0.)], r#"{"damage":1}"#),
    ];
    let sites = [
        site(Some("stray"), at_m(50., 3005.), Some(4)),
        site(Some("main"), at_m(0., 5.), Some(4)),
        site(Some("c"), at_m(600., 5.), Some(1)),
    ];
    let (out, err) = run_notes(d.path(), &roads, &sites, &[]);
    let m = note(&out, &err, "hub_tie");
    assert_eq!(
        m,
        "stray, main share the highest priority (4); the hub is main, the first of them in the \
         file whose part of the road network holds the most sites (2); name another with --hub"
    );
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["sites"]["hub"], "main");
    assert_eq!(s["sites"]["joined_to_hub"], 2);
}
