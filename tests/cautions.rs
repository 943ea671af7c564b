//! The cautions wherever someone reads: summary.json (second key), every GeoJSON layer (a
//! top-level member), the picture's band, the report, the work orders, every `--help`, the
//! terminal, the README and the batch summaries, all from the library's one copy.

mod common;
use common::batch::{batch, corner_sites, grid_roads, manifest};
use common::*;
use reknit::cautions::{CAUTIONS, SHORT, WORK_ORDER};
use std::path::Path;

/// Whitespace runs made single spaces (help text is wrapped to the terminal).
fn squeeze(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// The top-level member names of a pretty-printed JSON object, in the order written.
fn top_keys(text: &str) -> Vec<String> {
    text.lines()
        .filter(|l| l.starts_with("  \"") && !l.starts_with("   "))
        .filter_map(|l| {
            l.trim()
                .strip_prefix('"')?
                .split('"')
                .next()
                .map(String::from)
        })
        .collect()
}

/// Every `.geojson` in `dir` carries the cautions as a top-level member of its FeatureCollection:
/// RFC 7946 §6.1 allows such foreign members, and an independent reader (the geojson crate) still
/// reads the layer.
fn layers_carry_cautions(dir: &Path) -> usize {
    let mut n = 0;
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.extension().is_some_and(|x| x == "geojson") {
            let v = read_json(&p);
            assert_eq!(v["type"], "FeatureCollection", "{}", p.display());
            let got: Vec<&str> = v["cautions"]
                .as_array()
                .unwrap_or_else(|| panic!("{} lacks cautions", p.display()))
                .iter()
                .map(|c| c.as_str().unwrap())
                .collect();
            assert_eq!(got, CAUTIONS, "{}", p.display());
            let fc = read_fc(&p);
            assert!(
                fc.foreign_members
                    .is_some_and(|m| m.contains_key("cautions"))
            );
            n += 1;
        }
    }
    n
}

#[test]
fn a_plan_carries_the_cautions_in_every_output() {
    let d = tmp();
    let out = d.path().join("demo");
    let o = run(&[
        "demo",
        "--out",
        out.to_str().unwrap(),
        "--redundancy",
        "--crew-capacity",
        "3000",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    // The line printed at the end of a run is the short paragraph.
    assert!(stderr(&o).lines().any(|l| l == SHORT), "{}", stderr(&o));
    let summary = std::fs::read_to_string(out.join("summary.json")).unwrap();
    assert_eq!(top_keys(&summary)[..2], ["tool", "cautions"]);
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["cautions"].as_array().unwrap().len(), CAUTIONS.len());
    // network, plan, qa, sites, single-failures, backup and corridors layers.
    assert_eq!(layers_carry_cautions(&out), 7);
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    for c in CAUTIONS {
        assert!(html.contains(&c.replace('&', "&amp;")), "report lacks {c}");
    }
    let mut csv = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let col = csv.headers().unwrap().iter().position(|h| h == "caution");
    let col = col.expect("caution column");
    let mut rows = 0;
    for r in csv.records() {
        assert_eq!(&r.unwrap()[col], WORK_ORDER);
        rows += 1;
    }
    assert!(rows > 0);
}

#[test]
fn the_picture_carries_the_short_paragraph_in_a_framed_band_below_the_map() {
    let d = tmp();
    let out = d.path().join("demo");
    assert!(
        run(&["demo", "--out", out.to_str().unwrap(), "-q"])
            .status
            .success()
    );
    let svg = std::fs::read_to_string(out.join("plan.svg")).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let by_id = |id: &str| {
        doc.descendants()
            .find(|n| n.attribute("id") == Some(id))
            .unwrap_or_else(|| panic!("no {id}"))
    };
    let text: Vec<&str> = by_id("caution")
        .descendants()
        .filter(|n| n.is_text())
        .filter_map(|n| n.text())
        .collect();
    assert_eq!(text.join(" "), SHORT);
    let band = by_id("cautions-band");
    let rect = band.children().find(|n| n.has_tag_name("rect")).unwrap();
    let num = |a: &str| rect.attribute(a).unwrap().parse::<f64>().unwrap();
    let (x, y, w, h) = (num("x"), num("y"), num("width"), num("height"));
    assert!(rect.attribute("stroke").is_some(), "the band is framed");
    let root = doc.root_element();
    let (pw, ph): (f64, f64) = (
        root.attribute("width").unwrap().parse().unwrap(),
        root.attribute("height").unwrap().parse().unwrap(),
    );
    assert!(
        x > 0.0 && y > 0.0 && x + w < pw && y + h < ph,
        "inside the picture"
    );
    // The PNG draws the same band: its frame colour on the top edge, its fill inside.
    let png = resvg::tiny_skia::Pixmap::load_png(out.join("plan.png")).unwrap();
    let px = |x: f64, y: f64| {
        let p = png.pixel(x as u32, y as u32).unwrap();
        [p.red(), p.green(), p.blue()]
    };
    assert_eq!(
        px(x + w / 2.0, y),
        [0x8c, 0x2d, 0x04],
        "band frame in the PNG"
    );
    assert_eq!(
        px(x + w - 20.0, y + h - 8.0),
        [0xff, 0xf4, 0xec],
        "band fill in the PNG"
    );
    // No road is drawn under the band.
    for id in ["network", "repairs", "plan-intact"] {
        for p in by_id(id).descendants().filter_map(|n| n.attribute("d")) {
            for pair in p.split(['M', 'L']).filter(|t| !t.trim().is_empty()) {
                let py: f64 = pair.split_whitespace().nth(1).unwrap().parse().unwrap();
                assert!(py < y, "a road at y {py} runs under the band at {y}");
            }
        }
    }
}

#[test]
fn every_subcommand_help_ends_with_the_cautions() {
    for cmd in [
        &[][..],
        &["plan"],
        &["demo"],
        &["check"],
        &["replan"],
        &["batch"],
        &["merge"],
    ] {
        let mut args = cmd.to_vec();
        args.push("--help");
        let o = run(&args);
        assert!(o.status.success());
        let help = squeeze(&String::from_utf8_lossy(&o.stdout));
        assert!(help.contains(SHORT), "{cmd:?} --help lacks the cautions");
    }
}

#[test]
fn readme_carries_the_cautions_right_after_the_job() {
    let readme =
        std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md")).unwrap();
    // The title, then the job paragraph; the cautions section follows it directly.
    let after_job = readme.split("\n\n").nth(2).unwrap();
    assert_eq!(after_job, "## Cautions");
    let section = readme.split("## Cautions").nth(1).unwrap();
    let section = section.split("\n## ").next().unwrap();
    for c in CAUTIONS {
        assert!(section.contains(&format!("- {c}\n")), "README lacks: {c}");
    }
}

#[test]
fn check_outputs_carry_the_cautions() {
    let d = tmp();
    let out = d.path().join("check");
    let o = run(&[
        "check",
        "--roads",
        sample_roads().to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stderr(&o).lines().any(|l| l == SHORT));
    let summary = std::fs::read_to_string(out.join("summary.json")).unwrap();
    assert_eq!(top_keys(&summary)[..2], ["tool", "cautions"]);
    assert_eq!(layers_carry_cautions(&out), 2);
}

#[test]
fn batch_summaries_carry_the_cautions_and_the_csv_stays_one_table() {
    let d = tmp();
    let roads = grid_roads(d.path(), "roads.geojson");
    let sites = corner_sites(d.path(), "sites.geojson");
    let m = manifest(
        d.path(),
        "m.toml",
        &format!(
            "[defaults]\nattribution = \"Eastvane County GIS\"\n\n[[district]]\nname = \"North\"\nroads = {:?}\nsites = {:?}\n\n[[district]]\nname = \"South\"\nroads = {:?}\n",
            roads, sites, roads
        ),
    );
    let out = d.path().join("out");
    let o = batch(&m, &out, &[]);
    assert!(o.status.success(), "{}", stderr(&o));
    let text = std::fs::read_to_string(out.join("batch-summary.json")).unwrap();
    assert_eq!(top_keys(&text)[..2], ["districts", "cautions"]);
    let s = read_json(&out.join("batch-summary.json"));
    assert_eq!(s["cautions"].as_array().unwrap().len(), CAUTIONS.len());
    // The manifest's attribution reaches each district's outputs and the batch rows.
    for row in s["rows"].as_array().unwrap() {
        assert_eq!(row["attribution"], "Eastvane County GIS");
        let folder = out.join(row["folder"].as_str().unwrap());
        assert_eq!(
            read_json(&folder.join("summary.json"))["attribution"],
            "Eastvane County GIS"
        );
    }
    // A CSV reader sees one table: every record as wide as the header, the caution in its column.
    let path = out.join("batch-summary.csv");
    let mut r = csv::Reader::from_path(&path).unwrap();
    let header: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    assert_eq!(header.last().unwrap(), "caution");
    let records: Vec<csv::StringRecord> = r.records().map(Result::unwrap).collect();
    assert_eq!(records.len(), 2);
    for rec in &records {
        assert_eq!(rec.len(), header.len());
        assert_eq!(rec.get(header.len() - 1).unwrap(), SHORT);
    }
    // Python's csv module (an independent reader) agrees.
    let Some(py) = common::external::python_with("batch-csv-one-table", &["csv"]) else {
        return;
    };
    let o = std::process::Command::new(py)
        .args([
            "-c",
            "import csv,sys; rows=list(csv.DictReader(open(sys.argv[1], newline='', encoding='utf-8')));\
             assert len(rows)==2 and all(None not in r and r['caution'] for r in rows), rows; print(rows[0]['caution'])",
            path.to_str().unwrap(),
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    assert_eq!(String::from_utf8_lossy(&o.stdout).trim(), SHORT);
}
