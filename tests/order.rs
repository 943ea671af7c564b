//! Repair order, repair days and work orders on the demo district (invariants: common practice, no source).

mod common;
use common::*;
use std::collections::HashMap;

fn find(p: &mut HashMap<i64, i64>, x: i64) -> i64 {
    let mut r = x;
    while let Some(&q) = p.get(&r) {
        if q == r {
            break;
        }
        r = q;
    }
    r
}

#[test]
fn every_prefix_of_the_order_reaches_the_hub_and_days_respect_capacity() {
    let d = tmp();
    let out = d.path().join("o");
    let o = run(&[
        "demo",
        "--out",
        out.to_str().unwrap(),
        "-q",
        "--crew-capacity",
        "2500",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    let plan = read_fc(&out.join("plan.geojson"));
    let sites = read_fc(&out.join("sites.geojson"));
    let hub = sites
        .features
        .iter()
        .find(|f| f.property("hub").unwrap().as_bool().unwrap())
        .and_then(|f| f.property("junction").unwrap().as_i64())
        .unwrap();
    // Edges: (from, to, cost, order).
    let edges: Vec<(i64, i64, f64, Option<i64>)> = plan
        .features
        .iter()
        .map(|f| {
            (
                f.property("from").unwrap().as_i64().unwrap(),
                f.property("to").unwrap().as_i64().unwrap(),
                f.property("cost").unwrap().as_f64().unwrap(),
                f.property("order").unwrap().as_i64(),
            )
        })
        .collect();
    // Components of the plan's intact edges plus repairs done so far; the hub's grows one repair at
    // a time, and every repair in it touches what is already joined to the hub.
    let mut parent: HashMap<i64, i64> = HashMap::new();
    let union = |p: &mut HashMap<i64, i64>, a: i64, b: i64| {
        let (ra, rb) = (find(p, a), find(p, b));
        p.insert(ra, rb);
        p.entry(rb).or_insert(rb);
    };
    for &(a, b, _, _) in &edges {
        parent.entry(a).or_insert(a);
        parent.entry(b).or_insert(b);
    }
    // A crew reaches a repair over any intact road, in the plan or not.
    for f in &read_fc(&out.join("network.geojson")).features {
        let p = |k: &str| f.property(k).unwrap().clone();
        if p("cost").as_f64() == Some(0.0) {
            let (a, b) = (p("from").as_i64().unwrap(), p("to").as_i64().unwrap());
            parent.entry(a).or_insert(a);
            parent.entry(b).or_insert(b);
            union(&mut parent, a, b);
        }
    }
    let mut ordered: Vec<&(i64, i64, f64, Option<i64>)> =
        edges.iter().filter(|e| e.3.is_some()).collect();
    ordered.sort_by_key(|e| e.3);
    let mut hub_total = 0;
    // The whole plan's component of the hub, to know which repairs belong to the hub's tree.
    let mut full = parent.clone();
    for &(a, b, _, _) in &edges {
        union(&mut full, a, b);
    }
    let hub_root = find(&mut full, hub);
    for (k, &&(a, b, _, order)) in ordered.iter().enumerate() {
        assert_eq!(order, Some(k as i64 + 1), "orders are 1, 2, …");
        if find(&mut full, a) == hub_root {
            hub_total += 1;
            let h = find(&mut parent, hub);
            assert!(
                find(&mut parent, a) == h || find(&mut parent, b) == h,
                "repair {k} is not joined to the hub yet"
            );
        }
        union(&mut parent, a, b);
    }
    assert!(hub_total > 0);
    // Days: the work adds up to the plan, no crew works more than its capacity in a day.
    let days = s["days"].as_array().unwrap();
    let mut sum = 0.0;
    for d in days {
        for c in d["crews"].as_array().unwrap() {
            let m = c["repair_metres"].as_f64().unwrap();
            assert!(m <= 2500.0 + 1e-9, "{m}");
            sum += m;
        }
    }
    assert!(
        (sum - s["total_cost"].as_f64().unwrap()).abs() < 0.05,
        "{sum}"
    );
    assert_eq!(days.last().unwrap()["cumulative_share_of_sites"], 1.0);
    // Work orders parse as CSV (csv crate) and their total equals the summary's.
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let cost_col = r
        .headers()
        .unwrap()
        .iter()
        .position(|h| h == "cost")
        .unwrap();
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(rows.len(), ordered.len());
    let total: f64 = rows
        .iter()
        .map(|x| x[cost_col].parse::<f64>().unwrap())
        .sum();
    assert!((total - s["total_cost"].as_f64().unwrap()).abs() < 0.01);
}

#[test]
fn budget_is_never_exceeded_and_a_large_one_changes_nothing() {
    let d = tmp();
    let full = d.path().join("full");
    assert!(
        run(&["demo", "--out", full.to_str().unwrap(), "-q"])
            .status
            .success()
    );
    let s = read_json(&full.join("summary.json"));
    let full_cost = s["total_cost"].as_f64().unwrap();
    for budget in [0.0, 1000.0, 5000.0, 9000.0] {
        let out = d.path().join(format!("b{budget}"));
        let o = run(&[
            "demo",
            "--out",
            out.to_str().unwrap(),
            "-q",
            "--budget",
            &budget.to_string(),
        ]);
        assert!(o.status.success(), "{}", stderr(&o));
        let b = read_json(&out.join("summary.json"));
        let cost = b["total_cost"].as_f64().unwrap();
        assert!(cost <= budget + 1e-6, "budget {budget}: spent {cost}");
        let plan = read_fc(&out.join("plan.geojson"));
        let sum: f64 = plan
            .features
            .iter()
            .map(|f| f.property("cost").unwrap().as_f64().unwrap())
            .sum();
        assert!((sum - cost).abs() < 0.01);
        if cost < full_cost {
            let left: Vec<_> = b["sites"]["not_joined"]
                .as_array()
                .unwrap()
                .iter()
                .filter(|u| u["reason"].as_str().unwrap().contains("budget"))
                .collect();
            assert!(
                !left.is_empty(),
                "budget {budget}: sites left out are listed"
            );
        }
    }
    let out = d.path().join("big");
    let o = run(&[
        "demo",
        "--out",
        out.to_str().unwrap(),
        "-q",
        "--budget",
        &(full_cost + 1.0).to_string(),
    ]);
    assert!(o.status.success());
    let b = read_json(&out.join("summary.json"));
    assert_eq!(b["sites"]["joined_to_hub"], s["sites"]["joined_to_hub"]);
    assert!(b["total_cost"].as_f64().unwrap() <= full_cost + 1e-6);
}

#[test]
fn picture_is_well_formed_svg_with_legend_scale_bar_and_caution() {
    let d = tmp();
    let out = d.path().join("o");
    assert!(
        run(&[
            "demo",
            "--out",
            out.to_str().unwrap(),
            "-q",
            "--crew-capacity",
            "3000"
        ])
        .status
        .success()
    );
    let text = std::fs::read_to_string(out.join("plan.svg")).unwrap();
    // Well-formed XML: parsed by roxmltree, a general-purpose XML parser.
    let doc = roxmltree::Document::parse(&text).unwrap();
    let ids: Vec<&str> = doc
        .descendants()
        .filter_map(|n| n.attribute("id"))
        .collect();
    for id in [
        "network",
        "repairs",
        "sites",
        "legend",
        "scale-bar",
        "north-arrow",
        "title",
        "caution",
    ] {
        assert!(ids.contains(&id), "no element {id}");
    }
    let repairs = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("repairs"))
        .unwrap();
    let s = read_json(&out.join("summary.json"));
    assert_eq!(
        repairs.children().filter(|c| c.is_element()).count() as u64,
        s["plan"]["repair_edges"].as_u64().unwrap()
    );
    assert!(text.contains(reknit::sample::DISTRICT));
    // The PNG (PNG signature, IHDR width and height, ISO/IEC 15948) has the picture's size.
    let png = std::fs::read(out.join("plan.png")).unwrap();
    assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
    assert_eq!(&png[12..16], b"IHDR");
    let dim = |i: usize| u32::from_be_bytes([png[i], png[i + 1], png[i + 2], png[i + 3]]);
    let size = |a: &str| {
        doc.root_element()
            .attribute(a)
            .unwrap()
            .parse::<f64>()
            .unwrap() as u32
    };
    assert_eq!((dim(16), dim(20)), (size("width"), size("height")));
}

#[test]
fn report_is_self_contained_and_carries_the_figures() {
    let d = tmp();
    let out = d.path().join("o");
    assert!(
        run(&[
            "demo",
            "--out",
            out.to_str().unwrap(),
            "-q",
            "--crew-capacity",
            "3000"
        ])
        .status
        .success()
    );
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    for c in reknit::cautions::CAUTIONS {
        assert!(html.contains(&c.replace('&', "&amp;")), "lacks caution {c}");
    }
    for needle in [
        "data:image/png;base64,iVBORw0KGgo",
        "Days and crews",
        "Corridors",
        "Repairs in order",
        "Total repair cost",
        "Geometry checks",
        "SHA-256",
    ] {
        assert!(html.contains(needle), "lacks {needle}");
    }
    // Self-contained: no scripts, no external resources (the picture is a data URI); its one link
    // is to the interactive map beside it.
    assert_eq!(html.matches(" href=").count(), 1);
    assert!(html.contains(r#" href="map.html""#));
    for banned in ["<script", "@import", "url(", "src=\"http", "src=\"file"] {
        assert!(!html.contains(banned), "contains {banned}");
    }
    assert_eq!(
        html.matches(" src=").count(),
        html.matches(" src=\"data:").count()
    );
    // In headless Chromium (Debian package chromium): it loads without console errors and renders
    // a screenshot.
    let Some(chromium) = external::program(
        "chromium-report-page",
        &["chromium", "chromium-browser"],
        "chromium",
    ) else {
        return;
    };
    let shot = d.path().join("shot.png");
    let profile = d.path().join("profile");
    let o = std::process::Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--enable-logging=stderr",
            "--v=0",
            "--window-size=1200,1600",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .arg(format!("--screenshot={}", shot.display()))
        .arg(format!("file://{}", out.join("report.html").display()))
        .output()
        .unwrap();
    let log = String::from_utf8_lossy(&o.stderr);
    assert!(
        !log.lines()
            .any(|l| l.contains("CONSOLE") && l.to_lowercase().contains("error")),
        "{log}"
    );
    let png = std::fs::read(&shot).unwrap_or_default();
    assert!(png.starts_with(b"\x89PNG"), "no screenshot: {log}");
    assert!(
        png.len() > 20_000,
        "the screenshot looks blank ({} bytes)",
        png.len()
    );
}
