//! `map.html`, the offline interactive map: written with every plan, linked from report.html,
//! self-contained, deterministic, text from the inputs kept as text, and (in headless Chromium
//! driven by selenium through chromedriver, scripts/page_check.py) drawn with every feature of the
//! layers beside it, quiet in the console, requesting nothing but `file:` URLs, and showing the
//! work-order row of a clicked repair and the status of a clicked site.
//!
//! Data: the invented demo district, and tests/data/roads/liechtenstein (OpenStreetMap extract
//! 2015-10-06, © OpenStreetMap contributors, ODbL 1.0).

mod common;
use common::*;
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::Command;

const LI_GEOJSON: &str = "roads/liechtenstein/liechtenstein_highways.geojson";

/// The layer files the page draws, by the page's layer name.
const LAYER_FILES: [(&str, &str); 7] = [
    ("network", "network.geojson"),
    ("plan", "plan.geojson"),
    ("backup", "backup.geojson"),
    ("single_failures", "single-failures.geojson"),
    ("corridors", "corridors.geojson"),
    ("qa", "qa.geojson"),
    ("sites", "sites.geojson"),
];

fn demo(d: &Path, name: &str, extra: &[&str]) -> PathBuf {
    let out = d.join(name);
    let mut args = vec!["demo", "--out", out.to_str().unwrap(), "-q"];
    args.extend_from_slice(extra);
    let o = run(&args);
    assert!(o.status.success(), "{}", stderr(&o));
    out
}

/// The data element of a page, parsed.
fn page_data(html: &str) -> Value {
    let start = html
        .find(r#"<script type="application/json" id="map-data">"#)
        .unwrap();
    let body = &html[start..];
    let body = &body[body.find('>').unwrap() + 1..body.find("</script>").unwrap()];
    serde_json::from_str(body).unwrap()
}

#[test]
fn every_plan_writes_a_self_contained_page_linked_from_the_report() {
    let d = tmp();
    let out = demo(
        d.path(),
        "demo",
        &["--crew-capacity", "3000", "--redundancy"],
    );
    let html = std::fs::read_to_string(out.join("map.html")).unwrap();
    let report = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(
        report.contains(r#"<a href="map.html">"#),
        "report links the page"
    );
    // Nothing the browser would fetch: no source, link, import, url() or request call.
    for banned in [
        " src=",
        " href=",
        "@import",
        "url(",
        "http:",
        "https:",
        "fetch(",
        "XMLHttpRequest",
        "import(",
        "<link",
        "<iframe",
        "<img",
    ] {
        assert!(!html.contains(banned), "map.html contains {banned}");
    }
    // The caution band and the attribution travel with the page.
    assert!(html.contains(&reknit::cautions::SHORT.replace('&', "&amp;")));
    // Its data: one work-order row per line of work-orders.csv, the same columns.
    let data = page_data(&html);
    let csv = std::fs::read_to_string(out.join("work-orders.csv")).unwrap();
    let mut lines = csv.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    assert_eq!(data["header"], serde_json::json!(header));
    assert_eq!(data["rows"].as_array().unwrap().len(), lines.count());
    assert!(data["simplified"].is_null());
    // Every layer file has a page layer with as many features (none simplified here).
    for (layer, file) in LAYER_FILES {
        if !out.join(file).exists() {
            continue;
        }
        let n = read_fc(&out.join(file)).features.len();
        // A layer with no feature is left out of the page.
        let f = data["layers"][layer]["f"].as_array();
        assert_eq!(f.map_or(0, Vec::len), n, "{layer}");
    }
    // The summary lists the page among the outputs.
    let s = read_json(&out.join("summary.json"));
    assert!(
        s["outputs"]
            .as_array()
            .unwrap()
            .iter()
            .any(|v| v == "map.html")
    );
}

#[test]
fn the_page_is_byte_identical_with_one_or_two_threads() {
    let d = tmp();
    let mut pages = Vec::new();
    for threads in ["1", "2"] {
        let out = d.path().join(format!("t{threads}"));
        let o = reknit()
            .env("RAYON_NUM_THREADS", threads)
            .args(["demo", "--quiet", "--crew-capacity", "2000", "--out"])
            .arg(&out)
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", stderr(&o));
        pages.push(std::fs::read(out.join("map.html")).unwrap());
    }
    assert!(
        pages[0] == pages[1],
        "map.html differs between 1 and 2 threads"
    );
}

/// Roads whose names hold markup, quotes, a script end and a control character.
const HOSTILE: &str =
    "</script><script>document.title='pwned'</script> \\\"Quay\\\" 'Row' <!-- & \\u001b[2J";

fn hostile_plan(d: &Path) -> PathBuf {
    let name = format!(r#"{{"name":"{HOSTILE}","damage":0.5}}"#);
    let roads = write_collection(
        d,
        "roads.geojson",
        &[
            line(&[at_m(0.0, 0.0), at_m(400.0, 0.0)], &name),
            line(
                &[at_m(400.0, 0.0), at_m(400.0, 300.0)],
                r#"{"name":"Mill Lane","damage":0.3}"#,
            ),
            line(
                &[at_m(400.0, 300.0), at_m(0.0, 300.0)],
                r#"{"name":"Top","damage":0}"#,
            ),
            line(
                &[at_m(0.0, 300.0), at_m(0.0, 0.0)],
                r#"{"name":"Side","damage":0.8}"#,
            ),
        ],
    );
    plan_quiet(d, "hostile", &roads, &[])
}

#[test]
fn names_with_markup_stay_text_in_the_page() {
    let d = tmp();
    let out = hostile_plan(d.path());
    let html = std::fs::read_to_string(out.join("map.html")).unwrap();
    // Our own two script elements close; nothing from the inputs does.
    assert_eq!(html.matches("</script").count(), 2);
    assert!(!html.contains("<!--"));
    assert!(!html.contains('\u{1b}'));
    // The name reads back whole from the data (control character replaced, as in every output).
    let data = page_data(&html);
    let road = data["header"]
        .as_array()
        .unwrap()
        .iter()
        .position(|h| h == "road")
        .unwrap();
    let names: Vec<&str> = data["rows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r[road].as_str().unwrap())
        .collect();
    let expected =
        "</script><script>document.title='pwned'</script> \"Quay\" 'Row' <!-- & \u{FFFD}[2J";
    assert!(names.contains(&expected), "{names:?}");
}

/// Runs scripts/page_check.py on the page in `out`; `None` when a tool is missing (skipped).
fn browser(check: &str, out: &Path, shot: &str) -> Option<Value> {
    let py = external::python_with(check, &["selenium"])?;
    let driver = external::program(
        &format!("{check}-driver"),
        &["chromedriver"],
        "chromium-driver",
    )?;
    let chromium = external::program(
        &format!("{check}-chromium"),
        &["chromium", "chromium-browser"],
        "chromium",
    )?;
    let driver = which(driver);
    let chromium = which(chromium);
    let profile = tmp();
    let shots = Path::new(env!("CARGO_MANIFEST_DIR")).join("target/map-page-shots");
    std::fs::create_dir_all(&shots).unwrap();
    let o = Command::new(py)
        .arg(script("page_check.py"))
        .arg(driver)
        .arg(chromium)
        .arg(out)
        .arg(profile.path())
        .arg(shots.join(shot))
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "page_check.py: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    Some(serde_json::from_slice(&o.stdout).unwrap())
}

/// The full path of a program on PATH (selenium wants paths).
fn which(name: &str) -> PathBuf {
    std::env::var_os("PATH")
        .iter()
        .flat_map(std::env::split_paths)
        .map(|d| d.join(name))
        .find(|p| p.is_file())
        .unwrap_or_else(|| PathBuf::from(name))
}

/// The checks every page passes in the browser.
fn judge(out: &Path, r: &Value) {
    // No console error (Chrome DevTools log levels: SEVERE is an error).
    let console = r["console"].as_array().unwrap();
    assert!(
        console.iter().all(|e| e["level"] != "SEVERE"),
        "console: {console:?}"
    );
    // Every request and every resource the page touched is a file: URL.
    let urls: Vec<&Value> = r["requests"]
        .as_array()
        .unwrap()
        .iter()
        .chain(r["resources"].as_array().unwrap())
        .collect();
    assert!(
        !r["requests"].as_array().unwrap().is_empty(),
        "no request logged at all"
    );
    for u in urls {
        assert!(u.as_str().unwrap().starts_with("file:"), "request {u}");
    }
    // Drawn: every feature of every layer file (when the page is not simplified).
    let drawn = &r["drawn"];
    if r["simplified"].is_null() {
        for (layer, file) in LAYER_FILES {
            if out.join(file).exists() {
                let n = read_fc(&out.join(file)).features.len();
                assert_eq!(
                    drawn[layer].as_u64().unwrap_or(0),
                    n as u64,
                    "{layer} drawn"
                );
            }
        }
    }
    assert!(drawn["network"].as_u64().unwrap() > 0);
    // A switched-off layer draws nothing; the others are untouched.
    for (layer, after) in r["off"].as_object().unwrap() {
        for (other, n) in after.as_object().unwrap() {
            let want = if other == layer {
                &Value::from(0)
            } else {
                &drawn[other]
            };
            assert_eq!(n, want, "{other} with {layer} switched off");
        }
    }
    assert_eq!(r["drawn_after"], *drawn, "switched back on");
    // Clicking a repair shows its work-order row; clicking a site shows its status and reason.
    for c in r["repair_clicks"].as_array().unwrap() {
        assert_eq!(c["fields"]["work_order"], c["expected"], "{c}");
        assert_eq!(c["fields"]["order"], c["expected_order"].to_string(), "{c}");
    }
    for c in r["site_clicks"].as_array().unwrap() {
        let e = &c["expected"];
        assert_eq!(c["fields"]["site_id"], e["site_id"], "{c}");
        assert_eq!(c["fields"]["status"], e["status"], "{c}");
        assert_eq!(c["fields"]["status_label"], e["status_label"], "{c}");
        let reason = e["reason"].as_str().unwrap_or("");
        assert_eq!(c["fields"]["reason"], reason, "{c}");
    }
    assert_eq!(r["title"], r["title_after"]);
}

#[test]
fn demo_page_in_chromium() {
    let d = tmp();
    let out = demo(
        d.path(),
        "demo",
        &["--crew-capacity", "3000", "--redundancy"],
    );
    let Some(r) = browser("chromium-map-page-demo", &out, "demo.png") else {
        return;
    };
    judge(&out, &r);
    assert!(!r["repair_clicks"].as_array().unwrap().is_empty());
    assert!(!r["site_clicks"].as_array().unwrap().is_empty());
}

#[test]
fn liechtenstein_page_in_chromium() {
    let d = tmp();
    let roads = data(LI_GEOJSON);
    // Ten sites on road vertices spread through the extract (every road damaged at the default).
    let fc = read_json(&roads);
    let mut pts: Vec<[f64; 2]> = Vec::new();
    for f in fc["features"].as_array().unwrap() {
        if f["geometry"]["type"] == "LineString" {
            let c = &f["geometry"]["coordinates"][0];
            pts.push([c[0].as_f64().unwrap(), c[1].as_f64().unwrap()]);
        }
    }
    pts.sort_by(|a, b| a[0].total_cmp(&b[0]).then(a[1].total_cmp(&b[1])));
    let sites: Vec<String> = (0..10)
        .map(|i| point(pts[i * (pts.len() - 1) / 9], &format!(r#"{{"id":"S{i}"}}"#)))
        .collect();
    let sites = write_collection(d.path(), "sites.geojson", &sites);
    let out = plan_quiet(
        d.path(),
        "li",
        &roads,
        &[
            "--sites",
            sites.to_str().unwrap(),
            "--crew-capacity",
            "20000",
        ],
    );
    let Some(r) = browser("chromium-map-page-liechtenstein", &out, "liechtenstein.png") else {
        return;
    };
    judge(&out, &r);
}

#[test]
fn hostile_names_in_chromium() {
    let d = tmp();
    let out = hostile_plan(d.path());
    let Some(r) = browser("chromium-map-page-names", &out, "names.png") else {
        return;
    };
    judge(&out, &r);
    assert_eq!(r["title"], r["title_after"]);
    assert!(!r["title"].as_str().unwrap().contains("pwned"));
}
