//! The picture and the report a coordinator works from: backup links, damage zones and repair
//! numbers drawn; the legend listing only what is drawn and holding its text; the map filling its
//! frame for tall and wide districts; large networks drawn at the picture's resolution; the
//! report's tables of work. SVG is read with roxmltree, a general-purpose XML parser.

mod common;
use common::*;
use reknit::export::metrics::text_width;
use std::path::Path;

/// The SVG text of an output folder.
fn svg(out: &Path) -> String {
    std::fs::read_to_string(out.join("plan.svg")).unwrap()
}

fn by_id<'a>(doc: &'a roxmltree::Document, id: &str) -> roxmltree::Node<'a, 'a> {
    doc.descendants()
        .find(|n| n.attribute("id") == Some(id))
        .unwrap_or_else(|| panic!("no element {id}"))
}

fn num(n: &roxmltree::Node, a: &str) -> f64 {
    n.attribute(a)
        .unwrap_or_else(|| panic!("no {a}"))
        .parse()
        .unwrap()
}

/// Every coordinate pair of the path data under `g`.
fn points(g: roxmltree::Node) -> Vec<(f64, f64)> {
    let mut out = Vec::new();
    for p in g.descendants().filter(|n| n.has_tag_name("path")) {
        let d = p.attribute("d").unwrap();
        let nums: Vec<f64> = d
            .split(['M', 'L', ' ', 'Z'])
            .filter(|s| !s.is_empty())
            .map(|s| s.parse().unwrap())
            .collect();
        out.extend(nums.chunks(2).map(|c| (c[0], c[1])));
    }
    out
}

/// Every vertex of the sample roads (LineStrings), lon/lat.
fn road_points() -> Vec<[f64; 2]> {
    let v = read_json(&sample_roads());
    let mut out = Vec::new();
    for f in v["features"].as_array().unwrap() {
        for p in f["geometry"]["coordinates"]
            .as_array()
            .into_iter()
            .flatten()
        {
            if let (Some(x), Some(y)) = (p[0].as_f64(), p[1].as_f64()) {
                out.push([x, y]);
            }
        }
    }
    out
}

/// A damage zone over the middle of the sample district (a quarter of its extent each way).
fn middle_zone(dir: &Path) -> std::path::PathBuf {
    let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
    for p in road_points() {
        lo = [lo[0].min(p[0]), lo[1].min(p[1])];
        hi = [hi[0].max(p[0]), hi[1].max(p[1])];
    }
    let at = |u: f64, v: f64| {
        format!(
            "[{},{}]",
            lo[0] + u * (hi[0] - lo[0]),
            lo[1] + v * (hi[1] - lo[1])
        )
    };
    let ring = [
        at(0.3, 0.3),
        at(0.6, 0.3),
        at(0.6, 0.6),
        at(0.3, 0.6),
        at(0.3, 0.3),
    ]
    .join(",");
    let f = format!(
        r#"{{"type":"Feature","properties":{{"damage":1.5}},"geometry":{{"type":"Polygon","coordinates":[[{ring}]]}}}}"#
    );
    write_collection(dir, "zones.geojson", &[f])
}

/// The sample district with sites, backup links, a damage zone and days.
fn full_run(dir: &Path) -> std::path::PathBuf {
    let out = dir.join("full");
    let zones = middle_zone(dir);
    let o = plan_cli(
        &sample_roads(),
        &out,
        &[
            "-q",
            "--sites",
            sample_sites().to_str().unwrap(),
            "--redundancy",
            "--crew-capacity",
            "3000",
            "--damage-zones",
            zones.to_str().unwrap(),
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    out
}

#[test]
fn backup_links_zones_and_repair_numbers_are_drawn() {
    let d = tmp();
    let out = full_run(d.path());
    let text = svg(&out);
    let doc = roxmltree::Document::parse(&text).unwrap();
    // One line per backup repair (backup.geojson's features, read by the geojson crate).
    let backup = read_fc(&out.join("backup.geojson")).features.len();
    assert!(backup > 0, "the sample needs backup links");
    let d_attr: String = by_id(&doc, "backup-links")
        .descendants()
        .filter_map(|n| n.attribute("d"))
        .collect();
    assert_eq!(d_attr.matches('M').count(), backup);
    assert_eq!(
        by_id(&doc, "damage-zones")
            .children()
            .filter(|n| n.has_tag_name("path"))
            .count(),
        1
    );
    // Repair numbers: distinct orders of the plan's repairs; every repair numbered or the notes say
    // how many were left out.
    let repairs = read_json(&out.join("summary.json"))["plan"]["repair_edges"]
        .as_u64()
        .unwrap() as usize;
    let numbers: Vec<usize> = by_id(&doc, "repair-numbers")
        .children()
        .filter(|n| n.is_element())
        .filter_map(|n| n.text())
        .map(|t| t.parse().unwrap())
        .collect();
    assert!(
        numbers.len() >= repairs / 2,
        "{} of {repairs} numbered",
        numbers.len()
    );
    let mut sorted = numbers.clone();
    sorted.sort_unstable();
    sorted.dedup();
    assert_eq!(sorted.len(), numbers.len());
    assert!(sorted.iter().all(|&n| (1..=repairs).contains(&n)));
    let notes: String = by_id(&doc, "notes")
        .descendants()
        .filter_map(|n| n.text())
        .collect();
    if numbers.len() < repairs {
        assert!(
            notes.contains(&format!(
                "{} repair numbers left out",
                repairs - numbers.len()
            )),
            "{notes}"
        );
    }
    let legend: String = by_id(&doc, "legend")
        .descendants()
        .filter_map(|n| n.text())
        .collect();
    for item in [
        "damage zone",
        "backup link",
        "repair number",
        "repair, day 1",
    ] {
        assert!(legend.contains(item), "legend lacks {item}: {legend}");
    }
}

/// Checks that every text of the legend lies inside its box, measured with the font's advance
/// widths (the fonts the PNG is drawn with; reknit::export::metrics).
fn legend_holds_its_text(svg: &str) {
    let doc = roxmltree::Document::parse(svg).unwrap();
    let lg = by_id(&doc, "legend");
    let rect = lg.children().find(|n| n.has_tag_name("rect")).unwrap();
    let (x, y, w, h) = (
        num(&rect, "x"),
        num(&rect, "y"),
        num(&rect, "width"),
        num(&rect, "height"),
    );
    let mut texts = 0;
    for t in lg.descendants().filter(|n| n.has_tag_name("text")) {
        let s = t.text().unwrap();
        let size = t
            .attribute("font-size")
            .map_or(13.0, |v| v.parse().unwrap());
        let width = text_width(s, size, t.attribute("font-weight") == Some("bold"));
        let tx = num(&t, "x");
        let left = match t.attribute("text-anchor") {
            Some("middle") => tx - width / 2.0,
            Some("end") => tx - width,
            _ => tx,
        };
        let base = num(&t, "y");
        assert!(
            left >= x && left + width <= x + w,
            "{s:?} ({left}..{}) outside {x}..{}",
            left + width,
            x + w
        );
        assert!(
            base - 0.76 * size >= y && base + 0.24 * size <= y + h,
            "{s:?} outside the box vertically"
        );
        texts += 1;
    }
    assert!(texts >= 4);
}

#[test]
fn the_legend_box_holds_its_text_and_lists_only_what_is_drawn() {
    let d = tmp();
    legend_holds_its_text(&svg(&full_run(d.path())));
    for extra in [&[][..], &["--crew-capacity", "300"][..]] {
        let out = d.path().join(format!("demo{}", extra.len()));
        let mut args = vec!["demo", "--out", out.to_str().unwrap(), "-q"];
        args.extend_from_slice(extra);
        let o = run(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        let text = svg(&out);
        legend_holds_its_text(&text);
        let doc = roxmltree::Document::parse(&text).unwrap();
        let legend: String = by_id(&doc, "legend")
            .descendants()
            .filter_map(|n| n.text())
            .collect();
        // The demo has no zones and no backup links: the legend does not mention them.
        assert!(
            !legend.contains("damage zone") && !legend.contains("backup"),
            "{legend}"
        );
        assert!(
            by_id(&doc, "backup-links")
                .descendants()
                .all(|n| n.attribute("d").is_none())
        );
        if extra.is_empty() {
            // No --crew-capacity: no days; every repair in one colour.
            assert!(
                legend.contains(reknit::export::legend::UNSCHEDULED),
                "{legend}"
            );
            assert!(!legend.contains("day 1"), "{legend}");
            let colours: std::collections::BTreeSet<&str> = by_id(&doc, "repairs")
                .children()
                .filter_map(|n| n.attribute("stroke"))
                .collect();
            assert_eq!(colours.len(), 1, "{colours:?}");
        }
    }
}

/// A lattice of `nx` × `ny` blocks 100 m square near 45° N, every other street damaged.
fn lattice(dir: &Path, name: &str, nx: usize, ny: usize) -> std::path::PathBuf {
    // Degrees per 100 m at 45° N (from memory: 1° of latitude ≈ 111.1 km, of longitude ≈ 78.8 km).
    let (dx, dy) = (100.0 / 78_850.0, 100.0 / 111_130.0);
    let at = |i: usize, j: usize| [10.0 + i as f64 * dx, 45.0 + j as f64 * dy];
    let mut f = Vec::new();
    for i in 0..=nx {
        for j in 0..=ny {
            let damage = if (i + j) % 2 == 0 { "0" } else { "0.5" };
            let props = format!(r#"{{"damage":{damage}}}"#);
            if i < nx {
                f.push(line(&[at(i, j), at(i + 1, j)], &props));
            }
            if j < ny {
                f.push(line(&[at(i, j), at(i, j + 1)], &props));
            }
        }
    }
    write_collection(dir, name, &f)
}

#[test]
fn the_map_fills_its_frame_for_tall_and_wide_districts() {
    let d = tmp();
    for (name, nx, ny) in [("tall", 4, 14), ("wide", 14, 4), ("square", 6, 6)] {
        let roads = lattice(d.path(), &format!("{name}.geojson"), nx, ny);
        let out = d.path().join(name);
        let o = plan_cli(&roads, &out, &["-q"]);
        assert!(o.status.success(), "{}", stderr(&o));
        let text = svg(&out);
        let doc = roxmltree::Document::parse(&text).unwrap();
        let frame = by_id(&doc, "map-frame");
        let (fx, fy, fw, fh) = (
            num(&frame, "x"),
            num(&frame, "y"),
            num(&frame, "width"),
            num(&frame, "height"),
        );
        let pts = points(by_id(&doc, "network"));
        let (x0, x1) = pts
            .iter()
            .fold((f64::MAX, f64::MIN), |a, p| (a.0.min(p.0), a.1.max(p.0)));
        let (y0, y1) = pts
            .iter()
            .fold((f64::MAX, f64::MIN), |a, p| (a.0.min(p.1), a.1.max(p.1)));
        // Inside the frame, and filling at least 90 % of it on both axes (the frame takes the
        // district's shape; a small padding keeps symbols inside).
        assert!(
            x0 >= fx && x1 <= fx + fw && y0 >= fy && y1 <= fy + fh,
            "{name}: outside the frame"
        );
        assert!(
            (x1 - x0) >= 0.9 * fw,
            "{name}: drawn width {} of {fw}",
            x1 - x0
        );
        assert!(
            (y1 - y0) >= 0.9 * fh,
            "{name}: drawn height {} of {fh}",
            y1 - y0
        );
        // The frame's long side follows the district's.
        if nx != ny {
            assert_eq!(fh > fw, ny > nx, "{name}: frame {fw}×{fh}");
        }
        // The picture is not much wider than the map and its legend.
        let lg = by_id(&doc, "legend")
            .children()
            .find(|n| n.has_tag_name("rect"))
            .unwrap();
        let width: f64 = doc
            .root_element()
            .attribute("width")
            .unwrap()
            .parse()
            .unwrap();
        assert!(width <= num(&lg, "x") + num(&lg, "width") + 40.0);
    }
}

#[test]
fn large_networks_are_drawn_at_the_pictures_resolution() {
    let d = tmp();
    let roads = d.path().join("big.geojson");
    let features = 25_000;
    reknit::synthetic::write_grid_layer(std::fs::File::create(&roads).unwrap(), features, 7)
        .unwrap();
    let out = d.path().join("o");
    let o = plan_cli(&roads, &out, &["-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = svg(&out);
    let doc = roxmltree::Document::parse(&text).unwrap();
    let notes: String = by_id(&doc, "notes")
        .descendants()
        .filter_map(|n| n.text())
        .collect();
    assert!(notes.contains("Simplified"), "{notes}");
    // Whole pixels only, fewer points than the input has vertices (8 a feature), no pixel step
    // drawn twice, and a few path elements, not one per road.
    let pts = points(by_id(&doc, "network"));
    assert!(pts.iter().all(|p| p.0.fract() == 0.0 && p.1.fract() == 0.0));
    assert!(pts.len() < features * 8, "{} points", pts.len());
    let mut steps = std::collections::HashSet::new();
    for p in by_id(&doc, "network")
        .descendants()
        .filter_map(|n| n.attribute("d"))
    {
        for part in p.split('M').filter(|s| !s.is_empty()) {
            let xy: Vec<(i64, i64)> = part
                .split('L')
                .map(|q| {
                    let (x, y) = q.trim().split_once(' ').unwrap();
                    (x.parse().unwrap(), y.parse().unwrap())
                })
                .collect();
            for w in xy.windows(2) {
                let key = if w[0] <= w[1] {
                    (w[0], w[1])
                } else {
                    (w[1], w[0])
                };
                assert!(steps.insert(key), "step {key:?} drawn twice");
            }
        }
    }
    let paths = doc.descendants().filter(|n| n.has_tag_name("path")).count();
    assert!(paths < 200, "{paths} path elements");
}

#[test]
fn the_report_holds_the_tables_a_coordinator_works_from() {
    let d = tmp();
    let out = full_run(d.path());
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    let section = |id: &str| {
        let start = html
            .find(&format!("<h2 id=\"{id}\">"))
            .unwrap_or_else(|| panic!("no section {id}"));
        let rest = &html[start + 4..];
        &rest[..rest.find("<h2").unwrap_or(rest.len())]
    };
    let repairs = section("repairs");
    for head in [
        "Order",
        "Work order",
        "Road",
        "Length (m)",
        "Cost (repair-metres)",
        "Structure",
        "Days (crew)",
        "Sites joined to the hub by it",
    ] {
        assert!(
            repairs.contains(&format!("<th>{head}</th>")),
            "repairs table lacks {head}"
        );
    }
    // Every work order of work-orders.csv (read with the csv crate) is in the report.
    let mut csv = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let col = csv
        .headers()
        .unwrap()
        .iter()
        .position(|h| h == "work_order")
        .unwrap();
    let mut rows = 0;
    for r in csv.records() {
        let key = r.unwrap()[col].to_string();
        assert!(
            repairs.contains(&format!("<code>{key}</code>")),
            "{key} missing"
        );
        rows += 1;
    }
    assert!(rows > 0);
    // Sites by name and id.
    let sites = section("sites");
    for f in read_fc(&sample_sites()).features {
        let name = f
            .property("name")
            .and_then(|v| v.as_str())
            .unwrap()
            .to_string();
        assert!(sites.contains(&name), "{name} missing from the sites table");
    }
    let failures = section("single-failures");
    assert!(failures.contains("Roads with no way round that cut sites off"));
    for gone in ["Plan edges", "Bridges (any)", "Cut junctions", "(edges)"] {
        assert!(!html.contains(gone), "jargon left: {gone}");
    }
    for piece in [
        "<details><summary>Settings",
        "<h2>Settings</h2><table>",
        "<h2>Terms used</h2>",
        "@media print",
        "@page",
    ] {
        assert!(html.contains(piece), "lacks {piece}");
    }
    assert!(!html.contains("<script"));
}

#[test]
fn the_report_shows_the_budget_and_the_damage_reports() {
    let d = tmp();
    // Two reports: one on the road nearest the first site's road, one far out at sea.
    let first = road_points()[0];
    let reports = write_collection(
        d.path(),
        "reports.geojson",
        &[
            point(first, r#"{"damage":2}"#),
            point([first[0] + 0.5, first[1] + 0.5], r#"{"damage":2}"#),
        ],
    );
    let out = d.path().join("o");
    let o = plan_cli(
        &sample_roads(),
        &out,
        &[
            "-q",
            "--sites",
            sample_sites().to_str().unwrap(),
            "--budget",
            "4000",
            "--damage-points",
            reports.to_str().unwrap(),
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    let budget = &html[html.find("<h2 id=\"budget\">").expect("no budget section")..];
    assert!(
        budget.contains("Budget given: 4000.0 repair-metres"),
        "{}",
        &budget[..300]
    );
    let damage = &html[html
        .find("<h2 id=\"damage-reports\">")
        .expect("no damage reports")..];
    assert!(
        damage.contains("2 field reports read; 1 matched"),
        "{}",
        &damage[..300]
    );
    let matched = &damage[damage
        .find("id=\"reports-matched\"")
        .expect("no table of matched reports")..];
    let matched = &matched[..matched.find("</table>").unwrap()];
    // The report lies on a vertex of a road: it is listed with that road at distance 0.
    assert!(
        matched.contains("<tr><td class=\"n\">0</td><td>")
            && matched.contains("<td class=\"n\">0.0</td><td>2.00</td>"),
        "{matched}"
    );
    let unmatched = &damage[damage
        .find("id=\"reports-unmatched\"")
        .expect("no table of unmatched reports")..];
    assert!(
        unmatched.contains("<tr><td class=\"n\">1</td>"),
        "the far report is listed"
    );
}
