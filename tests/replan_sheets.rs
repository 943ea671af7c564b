//! `reknit replan` reading the sheet crews hand back: finished work lowers the cost, started
//! repairs stay, spreadsheet dialects are read, bad statuses and keys matching nothing are named.
//! Fixtures: the invented sample district.

mod common;
use common::replan::*;
use common::*;

/// The invariant of the issue: with nothing new but finished work and no budget, the new plan
/// costs at most the old one less what was finished (the previous plan is a starting answer).
#[test]
fn finished_work_lowers_the_cost_by_at_least_what_was_finished() {
    for whole in [false, true] {
        let d = District::planned(whole);
        let done = |i: usize| i.is_multiple_of(2);
        d.sheet(|i| if done(i) { "done" } else { "" });
        d.replan(&[]);
        let (old, new) = (summary(&d.join("r1")), summary(&d.join("r2")));
        let fin = finished_m(&d.join("r1"), done);
        assert!(fin > 0.0);
        let bound = old["total_cost"].as_f64().unwrap() - fin;
        let cost = new["total_cost"].as_f64().unwrap();
        assert!(cost <= bound + 1e-6, "whole {whole}: {cost} > {bound}");
        // No finished repair is still a repair.
        let (_, rows) = work_orders(&d.join("r1"));
        let now = repairs(&d.join("r2"));
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
        assert!(listing(&d.join("r2")).contains(&"changes.geojson".to_string()));
    }
}

/// A started repair stays in the plan at its full cost; a `;`-separated sheet with a byte-order
/// mark and CRLF line ends (a spreadsheet's "CSV UTF-8") is read, with yes/x for done.
#[test]
fn started_repair_is_kept_and_a_semicolon_sheet_with_a_bom_is_read() {
    let d = District::planned(false);
    let r1 = d.join("r1");
    let (_, rows) = work_orders(&r1);
    let last = rows.len() - 1;
    sheet(&d.join("back.csv"), &r1, b';', true, move |i| match i {
        0 => "Yes",
        1 => "x",
        i if i == last => "started",
        _ => "",
    });
    d.replan(&[]);
    let s = summary(&d.join("r2"));
    assert_eq!(s["replan"]["finished_repairs"], 2);
    let started = &rows[last]["work_order"];
    assert_eq!(s["replan"]["started_repairs"], serde_json::json!([started]));
    let now = repairs(&d.join("r2"));
    let cost: f64 = rows[last]["cost"].parse().unwrap();
    assert_eq!(now.get(started), Some(&cost), "started repair at full cost");
    let changes = read_json(&d.join("r2/changes.geojson"));
    let kept = changes["features"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| &f["properties"]["work_order"] == started)
        .unwrap();
    assert_eq!(kept["properties"]["change"], "repair_kept");
    assert_eq!(kept["properties"]["started"], true);
}

/// A status the sheet cannot mean stops the run with the file and line named, and writes nothing.
#[test]
fn a_bad_status_names_its_line() {
    let d = District::planned(false);
    d.sheet(|i| match i {
        0 => "done",
        1 => "half done",
        _ => "",
    });
    let o = d.run(&["replan", "r1", "--finished", "back.csv", "--out", "r2"]);
    assert!(!o.status.success());
    let e = stderr(&o);
    assert!(
        e.contains("back.csv") && e.contains("line 3") && e.contains("half done"),
        "{e}"
    );
    assert!(!d.join("r2").exists());
}

/// A road layer given anew is matched by work-order keys: the keys of a road taken out of it
/// and a started sheet line naming no work order of the previous plan are listed, never guessed
/// (a done line naming nothing is refused: tests/bad_replan.rs).
#[test]
fn keys_that_match_nothing_are_listed() {
    let d = District::planned(false);
    let (h, rows) = work_orders(&d.join("r1"));
    let gone = rows[0]["source_id"].clone();
    // The sheet: the first row done, and one line with a key the previous plan never had.
    d.sheet(|i| if i == 0 { "done" } else { "" });
    let mut text = std::fs::read_to_string(d.join("back.csv")).unwrap();
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
    std::fs::write(d.join("back.csv"), text).unwrap();
    let line = rows.len() + 2;
    // The new road layer: the sample without the first repair's road.
    let mut roads = read_json(&d.join("roads.geojson"));
    let fs = roads["features"].as_array_mut().unwrap();
    let n = fs.len();
    fs.retain(|f| {
        f["properties"]["id"].as_str() != Some(gone.as_str())
            && f["id"].as_str() != Some(gone.as_str())
    });
    assert_eq!(fs.len(), n - 1, "road {gone} not found in the sample");
    std::fs::write(d.join("roads-2.geojson"), roads.to_string()).unwrap();
    d.replan(&["--roads", "roads-2.geojson"]);
    let s = summary(&d.join("r2"));
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
