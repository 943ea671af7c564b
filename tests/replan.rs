//! `reknit replan`: finished work, started repairs, new damage, the changes layer, the history,
//! and the previous folder left as it was. Fixtures: the invented sample district.

mod common;
use common::*;
use reknit::export::text::csv_text;
use serde_json::Value;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::Output;

/// A folder holding a copy of the sample district's roads and sites.
fn district() -> tempfile::TempDir {
    let d = tmp();
    std::fs::copy(sample_roads(), d.path().join("roads.geojson")).unwrap();
    std::fs::copy(sample_sites(), d.path().join("sites.geojson")).unwrap();
    d
}

/// Runs reknit from `dir` (relative paths as a user would give them).
fn at(dir: &Path, args: &[&str]) -> Output {
    reknit().current_dir(dir).args(args).output().unwrap()
}

fn ok(o: Output) -> Output {
    assert!(o.status.success(), "{}", stderr(&o));
    o
}

/// The first plan, with sites unless `whole` is set.
fn first_plan(dir: &Path, whole: bool) {
    let mut a = vec!["plan", "--roads", "roads.geojson", "--out", "r1", "-q"];
    if !whole {
        a.extend(["--sites", "sites.geojson"]);
    }
    ok(at(dir, &a));
}

/// The previous plan's work orders (the `plan` rows), each as header → cell (prefix removed).
fn work_orders(out: &Path) -> (Vec<String>, Vec<BTreeMap<String, String>>) {
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let h: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    let rows = r
        .records()
        .map(|rec| {
            let rec = rec.unwrap();
            h.iter()
                .cloned()
                .zip(rec.iter().map(|c| csv_text(c).to_string()))
                .collect()
        })
        .filter(|m: &BTreeMap<String, String>| m["purpose"] == "plan")
        .collect();
    (h, rows)
}

/// Writes the sheet as a spreadsheet saves it: `sep`-separated, CRLF, with a byte-order mark
/// when `bom`; `status(i)` fills row i's status.
fn sheet(path: &Path, prev: &Path, sep: u8, bom: bool, status: impl Fn(usize) -> &'static str) {
    let (h, rows) = work_orders(prev);
    let mut buf = Vec::new();
    if bom {
        buf.extend_from_slice("\u{feff}".as_bytes());
    }
    {
        let mut w = csv::WriterBuilder::new()
            .delimiter(sep)
            .terminator(csv::Terminator::CRLF)
            .from_writer(&mut buf);
        w.write_record(&h).unwrap();
        for (i, r) in rows.iter().enumerate() {
            let cells: Vec<&str> = h
                .iter()
                .map(|c| {
                    if c == "status" {
                        status(i)
                    } else {
                        r[c].as_str()
                    }
                })
                .collect();
            w.write_record(&cells).unwrap();
        }
    }
    std::fs::write(path, buf).unwrap();
}

fn summary(out: &Path) -> Value {
    read_json(&out.join("summary.json"))
}

/// Keys of the plan's repairs with their costs.
fn repairs(out: &Path) -> BTreeMap<String, f64> {
    read_json(&out.join("plan.geojson"))["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| &f["properties"])
        .filter(|p| p["repair"] == true)
        .map(|p| {
            (
                p["work_order"].as_str().unwrap().to_string(),
                p["cost"].as_f64().unwrap(),
            )
        })
        .collect()
}

/// Finished repair-metres: the previous plan's costs of the rows `done` marks.
fn finished_m(prev: &Path, done: impl Fn(usize) -> bool) -> f64 {
    let (_, rows) = work_orders(prev);
    rows.iter()
        .enumerate()
        .filter(|(i, _)| done(*i))
        .map(|(_, r)| r["cost"].parse::<f64>().unwrap())
        .sum()
}

/// The invariant of the issue: with nothing new but finished work and no budget, the new plan
/// costs at most the old one less what was finished (the previous plan is a starting answer).
#[test]
fn finished_work_lowers_the_cost_by_at_least_what_was_finished() {
    for whole in [false, true] {
        let d = district();
        first_plan(d.path(), whole);
        let done = |i: usize| i.is_multiple_of(2);
        sheet(
            &d.path().join("back.csv"),
            &d.path().join("r1"),
            b',',
            false,
            |i| {
                if done(i) { "done" } else { "" }
            },
        );
        ok(at(
            d.path(),
            &[
                "replan",
                "r1",
                "--finished",
                "back.csv",
                "--out",
                "r2",
                "-q",
            ],
        ));
        let (old, new) = (summary(&d.path().join("r1")), summary(&d.path().join("r2")));
        let fin = finished_m(&d.path().join("r1"), done);
        assert!(fin > 0.0);
        let bound = old["total_cost"].as_f64().unwrap() - fin;
        let cost = new["total_cost"].as_f64().unwrap();
        assert!(cost <= bound + 1e-6, "whole {whole}: {cost} > {bound}");
        // No finished repair is still a repair.
        let (_, rows) = work_orders(&d.path().join("r1"));
        let now = repairs(&d.path().join("r2"));
        for (i, r) in rows.iter().enumerate() {
            assert!(
                !done(i) || !now.contains_key(&r["work_order"]),
                "{}",
                r["work_order"]
            );
        }
        let h = new["history"].as_array().unwrap();
        assert_eq!(h.len(), 2);
        assert_eq!(h[0]["remaining_repair_m"], old["total_cost"]);
        assert!((h[1]["finished_repair_m"].as_f64().unwrap() - fin).abs() < 1e-6);
        assert_eq!(h[1]["remaining_repair_m"], new["total_cost"]);
        assert!(listing(&d.path().join("r2")).contains(&"changes.geojson".to_string()));
    }
}

/// A started repair stays in the plan at its full cost; a `;`-separated sheet with a byte-order
/// mark and CRLF line ends (a spreadsheet's "CSV UTF-8") is read, with yes/x for done.
#[test]
fn started_repair_is_kept_and_a_semicolon_sheet_with_a_bom_is_read() {
    let d = district();
    first_plan(d.path(), false);
    let r1 = d.path().join("r1");
    let (_, rows) = work_orders(&r1);
    let last = rows.len() - 1;
    sheet(
        &d.path().join("back.csv"),
        &r1,
        b';',
        true,
        move |i| match i {
            0 => "Yes",
            1 => "x",
            i if i == last => "started",
            _ => "",
        },
    );
    ok(at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--out",
            "r2",
            "-q",
        ],
    ));
    let s = summary(&d.path().join("r2"));
    assert_eq!(s["replan"]["finished_repairs"], 2);
    let started = &rows[last]["work_order"];
    assert_eq!(s["replan"]["started_repairs"], serde_json::json!([started]));
    let now = repairs(&d.path().join("r2"));
    let cost: f64 = rows[last]["cost"].parse().unwrap();
    assert_eq!(now.get(started), Some(&cost), "started repair at full cost");
    let changes = read_json(&d.path().join("r2/changes.geojson"));
    let kept = changes["features"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| &f["properties"]["work_order"] == started)
        .unwrap();
    assert_eq!(kept["properties"]["change"], "repair_kept");
    assert_eq!(kept["properties"]["started"], true);
}

/// A midpoint of a LineString feature's coordinates (a vertex in its middle, or halfway along
/// its only segment).
fn middle(f: &Value) -> [f64; 2] {
    let c = f["geometry"]["coordinates"].as_array().unwrap();
    let p = |v: &Value| [v[0].as_f64().unwrap(), v[1].as_f64().unwrap()];
    if c.len() > 2 {
        p(&c[c.len() / 2])
    } else {
        let (a, b) = (p(&c[0]), p(&c[1]));
        [(a[0] + b[0]) / 2.0, (a[1] + b[1]) / 2.0]
    }
}

/// A road the previous plan travelled, reported closed by a new damage point, is left out of the
/// new plan and listed in the changes layer; the new point adds to none before it.
#[test]
fn a_road_newly_closed_is_left_out_and_listed() {
    let d = district();
    first_plan(d.path(), false);
    let r1 = d.path().join("r1");
    let plan = read_json(&r1.join("plan.geojson"));
    let victim = plan["features"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| {
            f["properties"]["repair"] == true
                && f["geometry"]["coordinates"].as_array().unwrap().len() > 2
        })
        .unwrap()
        .clone();
    let key = victim["properties"]["work_order"]
        .as_str()
        .unwrap()
        .to_string();
    write_collection(
        d.path(),
        "new-points.geojson",
        &[point(middle(&victim), r#"{"damage":"closed"}"#)],
    );
    sheet(&d.path().join("back.csv"), &r1, b',', false, |_| "");
    ok(at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--damage-points",
            "new-points.geojson",
            "--out",
            "r2",
            "-q",
        ],
    ));
    let r2 = d.path().join("r2");
    let in_plan = read_json(&r2.join("plan.geojson"))["features"]
        .as_array()
        .unwrap()
        .iter()
        .any(|f| f["properties"]["work_order"] == key.as_str());
    assert!(!in_plan, "{key} is closed but still planned");
    let changes = read_json(&r2.join("changes.geojson"));
    let listed: Vec<&Value> = changes["features"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|f| f["properties"]["change"] == "road_newly_closed")
        .collect();
    assert!(
        listed
            .iter()
            .any(|f| f["properties"]["work_order"] == key.as_str()),
        "{changes}"
    );
    assert_eq!(summary(&r2)["damage_reports"]["read"], 1);
}

/// A re-plan of a re-plan: three rounds, finished work adding up, the labels kept, the inputs
/// found again though the third round runs from another folder.
#[test]
fn a_replan_of_a_replan_continues_the_history() {
    let d = district();
    first_plan(d.path(), false);
    sheet(
        &d.path().join("b1.csv"),
        &d.path().join("r1"),
        b',',
        false,
        |i| if i == 0 { "done" } else { "" },
    );
    ok(at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "b1.csv",
            "--out",
            "r2",
            "--label",
            "day 2",
            "-q",
        ],
    ));
    sheet(
        &d.path().join("b2.csv"),
        &d.path().join("r2"),
        b'\t',
        false,
        |i| if i < 2 { "DONE" } else { "" },
    );
    let sub = d.path().join("elsewhere");
    std::fs::create_dir(&sub).unwrap();
    ok(at(
        &sub,
        &[
            "replan",
            "../r2",
            "--finished",
            "../b2.csv",
            "--out",
            "../r3",
            "-q",
        ],
    ));
    let s = summary(&d.path().join("r3"));
    // The repair finished in round 2 stays finished in round 3.
    let (_, rows) = work_orders(&d.path().join("r1"));
    assert!(!repairs(&d.path().join("r3")).contains_key(&rows[0]["work_order"]));
    assert_eq!(s["replan"]["finished_to_date"].as_array().unwrap().len(), 3);
    let h = s["history"].as_array().unwrap();
    assert_eq!(
        h.iter()
            .map(|r| r["round"].as_u64().unwrap())
            .collect::<Vec<_>>(),
        [1, 2, 3]
    );
    assert_eq!(h[1]["label"], "day 2");
    assert_eq!(h[2]["label"], Value::Null);
    let sum =
        h[1]["finished_repair_m"].as_f64().unwrap() + h[2]["finished_repair_m"].as_f64().unwrap();
    assert!((h[2]["finished_to_date_m"].as_f64().unwrap() - sum).abs() < 1e-6);
    assert!(
        h[2]["remaining_repair_m"].as_f64().unwrap()
            <= h[1]["remaining_repair_m"].as_f64().unwrap()
                - h[2]["finished_repair_m"].as_f64().unwrap()
                + 1e-6
    );
}

/// Every file of a folder with its SHA-256 (FIPS 180-4, through the sha2 crate).
fn hashes(dir: &Path) -> BTreeMap<PathBuf, String> {
    use sha2::{Digest, Sha256};
    let mut out = BTreeMap::new();
    for e in std::fs::read_dir(dir).unwrap().flatten() {
        let bytes = std::fs::read(e.path()).unwrap();
        out.insert(e.path(), format!("{:x}", Sha256::digest(&bytes)));
    }
    out
}

/// The previous folder is never modified, even when it is named as the output; the outputs are
/// the same bytes whatever the thread count.
#[test]
fn the_previous_folder_is_left_as_it_was_and_outputs_are_deterministic() {
    let d = district();
    first_plan(d.path(), false);
    let r1 = d.path().join("r1");
    sheet(&d.path().join("back.csv"), &r1, b',', false, |i| {
        if i.is_multiple_of(3) {
            "done"
        } else if i == 1 {
            "started"
        } else {
            ""
        }
    });
    let before = hashes(&r1);
    let o = at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--out",
            "r1",
            "--force",
            "-q",
        ],
    );
    assert!(
        !o.status.success(),
        "writing over the previous folder was accepted"
    );
    let mut runs = Vec::new();
    for threads in ["1", "2"] {
        let o = reknit()
            .current_dir(d.path())
            .env("RAYON_NUM_THREADS", threads)
            .args([
                "replan",
                "r1",
                "--finished",
                "back.csv",
                "--out",
                "r2",
                "-q",
            ])
            .output()
            .unwrap();
        ok(o);
        runs.push(
            hashes(&d.path().join("r2"))
                .into_values()
                .collect::<Vec<_>>(),
        );
        std::fs::remove_dir_all(d.path().join("r2")).unwrap();
    }
    assert_eq!(runs[0], runs[1]);
    assert_eq!(hashes(&r1), before, "the previous folder changed");
}

/// A status the sheet cannot mean stops the run with the file and line named, and writes nothing.
#[test]
fn a_bad_status_names_its_line() {
    let d = district();
    first_plan(d.path(), false);
    sheet(
        &d.path().join("back.csv"),
        &d.path().join("r1"),
        b',',
        false,
        |i| match i {
            0 => "done",
            1 => "half done",
            _ => "",
        },
    );
    let o = at(
        d.path(),
        &["replan", "r1", "--finished", "back.csv", "--out", "r2"],
    );
    assert!(!o.status.success());
    let e = stderr(&o);
    assert!(
        e.contains("back.csv") && e.contains("line 3") && e.contains("half done"),
        "{e}"
    );
    assert!(!d.path().join("r2").exists());
}

/// An input changed since the previous plan stops the run and asks for it anew; given anew (a
/// road layer whose work orders still match), the run goes on.
#[test]
fn a_changed_input_is_asked_for_anew() {
    let d = district();
    first_plan(d.path(), false);
    sheet(
        &d.path().join("back.csv"),
        &d.path().join("r1"),
        b',',
        false,
        |i| if i == 0 { "done" } else { "" },
    );
    std::fs::rename(
        d.path().join("roads.geojson"),
        d.path().join("roads-kept.geojson"),
    )
    .unwrap();
    let o = at(
        d.path(),
        &["replan", "r1", "--finished", "back.csv", "--out", "r2"],
    );
    assert!(!o.status.success());
    let e = stderr(&o);
    assert!(e.contains("roads") && e.contains("--roads"), "{e}");
    let text = std::fs::read_to_string(d.path().join("roads-kept.geojson")).unwrap();
    std::fs::write(d.path().join("roads.geojson"), text + " ").unwrap();
    let o = at(
        d.path(),
        &["replan", "r1", "--finished", "back.csv", "--out", "r2"],
    );
    assert!(
        !o.status.success(),
        "a file whose SHA-256 differs was taken"
    );
    ok(at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--roads",
            "roads-kept.geojson",
            "--out",
            "r2",
            "-q",
        ],
    ));
    let s = summary(&d.path().join("r2"));
    assert_eq!(s["replan"]["keys_matching_nothing"], serde_json::json!([]));
    assert_eq!(s["replan"]["finished_repairs"], 1);
}

/// A road layer given anew is matched by work-order keys: the keys of a road taken out of it
/// and a started sheet line naming no work order of the previous plan are listed, never guessed
/// (a done line naming nothing is refused: tests/bad_replan.rs).
#[test]
fn keys_that_match_nothing_are_listed() {
    let d = district();
    first_plan(d.path(), false);
    let r1 = d.path().join("r1");
    let (h, rows) = work_orders(&r1);
    let gone = rows[0]["source_id"].clone();
    // The sheet: the first row done, and one line with a key the previous plan never had.
    sheet(&d.path().join("back.csv"), &r1, b',', false, |i| {
        if i == 0 { "done" } else { "" }
    });
    let mut text = std::fs::read_to_string(d.path().join("back.csv")).unwrap();
    let cells: Vec<&str> = h
        .iter()
        .map(|c| match c.as_str() {
            "work_order" => "WO-NOWHERE-0-1",
            "status" => "started",
            _ => "",
        })
        .collect();
    text.push_str(&cells.join(","));
    text.push_str("\r\n");
    std::fs::write(d.path().join("back.csv"), text).unwrap();
    let line = rows.len() + 2;
    // The new road layer: the sample without the first repair's road.
    let mut roads = read_json(&d.path().join("roads.geojson"));
    let fs = roads["features"].as_array_mut().unwrap();
    let n = fs.len();
    fs.retain(|f| {
        f["properties"]["id"].as_str() != Some(gone.as_str())
            && f["id"].as_str() != Some(gone.as_str())
    });
    assert_eq!(fs.len(), n - 1, "road {gone} not found in the sample");
    std::fs::write(d.path().join("roads-2.geojson"), roads.to_string()).unwrap();
    ok(at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--roads",
            "roads-2.geojson",
            "--out",
            "r2",
            "-q",
        ],
    ));
    let s = summary(&d.path().join("r2"));
    let rows_listed = &s["replan"]["rows_matching_nothing"];
    assert_eq!(
        rows_listed,
        &serde_json::json!([{"line": line, "work_order": "WO-NOWHERE-0-1"}])
    );
    let keys: Vec<&str> = s["replan"]["keys_matching_nothing"]
        .as_array()
        .unwrap()
        .iter()
        .map(|k| k.as_str().unwrap())
        .collect();
    assert!(keys.contains(&rows[0]["work_order"].as_str()), "{keys:?}");
    assert!(
        keys.iter().all(|k| k.starts_with(&format!("WO-{gone}-"))),
        "{keys:?}"
    );
    // The work was done all the same: it counts in the history, though its road is gone.
    assert_eq!(s["replan"]["finished_repairs"], 1);
    assert_eq!(
        s["history"][1]["finished_repair_m"].as_f64().unwrap(),
        rows[0]["cost"].parse::<f64>().unwrap()
    );
}

/// A plan of two road layers re-planned with both layers given anew (`--roads` twice): every
/// finished repair is matched in its own layer and none is planned again.
#[test]
fn a_two_layer_plan_is_replanned_with_both_layers() {
    let d = tmp();
    // Two layers of three damaged roads in a row each, joined end to end.
    let layer = |name: &str, x0: f64| {
        let lines: Vec<String> = (0..3)
            .map(|i| {
                let x = x0 + 100.0 * i as f64;
                line(
                    &[at_m(x, 0.0), at_m(x + 100.0, 0.0)],
                    &format!(r#"{{"id":"R{i}","damage":0.5}}"#),
                )
            })
            .collect();
        write_collection(d.path(), name, &lines);
    };
    layer("west.geojson", 0.0);
    layer("east.geojson", 300.0);
    ok(at(
        d.path(),
        &[
            "plan",
            "--roads",
            "west.geojson",
            "--roads",
            "east.geojson",
            "--out",
            "r1",
            "-q",
        ],
    ));
    let r1 = d.path().join("r1");
    let (_, rows) = work_orders(&r1);
    assert!(rows.len() >= 2, "{rows:?}");
    sheet(&d.path().join("back.csv"), &r1, b',', false, |_| "done");
    ok(at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--roads",
            "west.geojson",
            "--roads",
            "east.geojson",
            "--out",
            "r2",
            "-q",
        ],
    ));
    let s = summary(&d.path().join("r2"));
    assert_eq!(s["replan"]["finished_repairs"], rows.len());
    assert_eq!(s["replan"]["keys_matching_nothing"], serde_json::json!([]));
    assert!(repairs(&d.path().join("r2")).is_empty());
}

/// Settings that choose within an input file belong to it: a plan of `;`-separated CSV sites
/// re-planned with the sites given anew as GeoJSON drops `--sites-delimiter` instead of refusing
/// the new file for a setting replan cannot take.
#[test]
fn sites_given_anew_in_another_format_drop_the_old_files_settings() {
    let d = district();
    let sites = read_json(&d.path().join("sites.geojson"));
    let mut csv = String::from("lon;lat\n");
    for f in sites["features"].as_array().unwrap() {
        let c = &f["geometry"]["coordinates"];
        csv.push_str(&format!("{};{}\n", c[0], c[1]));
    }
    std::fs::write(d.path().join("sites.csv"), csv).unwrap();
    ok(at(
        d.path(),
        &[
            "plan",
            "--roads",
            "roads.geojson",
            "--sites",
            "sites.csv",
            "--sites-delimiter",
            ";",
            "--out",
            "r1",
            "-q",
        ],
    ));
    sheet(
        &d.path().join("back.csv"),
        &d.path().join("r1"),
        b',',
        false,
        |_| "",
    );
    ok(at(
        d.path(),
        &[
            "replan",
            "r1",
            "--finished",
            "back.csv",
            "--sites",
            "sites.geojson",
            "--out",
            "r2",
            "-q",
        ],
    ));
    let s = summary(&d.path().join("r2"));
    assert_eq!(s["settings"]["sites_delimiter"], Value::Null);
}
