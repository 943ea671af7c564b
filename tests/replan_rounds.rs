//! `reknit replan` over rounds: new damage closing a planned road, a re-plan of a re-plan with
//! its history, the previous folder left as it was and outputs the same whatever the thread count.
//! Fixtures: the invented sample district.

mod common;
use common::replan::*;
use common::*;
use serde_json::Value;

/// A road the previous plan travelled, reported closed by a new damage point, is left out of the
/// new plan and listed in the changes layer; the new point adds to none before it.
#[test]
fn a_road_newly_closed_is_left_out_and_listed() {
    let d = District::planned(false);
    let plan = read_json(&d.join("r1/plan.geojson"));
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
    d.sheet(|_| "");
    d.replan(&["--damage-points", "new-points.geojson"]);
    let r2 = d.join("r2");
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
    let d = District::planned(false);
    sheet(&d.join("b1.csv"), &d.join("r1"), b',', false, |i| {
        if i == 0 { "done" } else { "" }
    });
    d.ok(&[
        "replan",
        "r1",
        "--finished",
        "b1.csv",
        "--out",
        "r2",
        "--label",
        "day 2",
        "-q",
    ]);
    sheet(&d.join("b2.csv"), &d.join("r2"), b'\t', false, |i| {
        if i < 2 { "DONE" } else { "" }
    });
    let sub = d.join("elsewhere");
    std::fs::create_dir(&sub).unwrap();
    ok(d.run_in(
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
    let s = summary(&d.join("r3"));
    // The repair finished in round 2 stays finished in round 3.
    let (_, rows) = work_orders(&d.join("r1"));
    assert!(!repairs(&d.join("r3")).contains_key(&rows[0]["work_order"]));
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

/// The previous folder is never modified, even when it is named as the output; the outputs are
/// the same bytes whatever the thread count.
#[test]
fn the_previous_folder_is_left_as_it_was_and_outputs_are_deterministic() {
    let d = District::planned(false);
    let r1 = d.join("r1");
    d.sheet(|i| {
        if i.is_multiple_of(3) {
            "done"
        } else if i == 1 {
            "started"
        } else {
            ""
        }
    });
    let before = hashes(&r1);
    let o = d.run(&[
        "replan",
        "r1",
        "--finished",
        "back.csv",
        "--out",
        "r1",
        "--force",
        "-q",
    ]);
    assert!(
        !o.status.success(),
        "writing over the previous folder was accepted"
    );
    let mut runs = Vec::new();
    for threads in ["1", "2"] {
        d.replan_env(&[("RAYON_NUM_THREADS", threads)], &[]);
        runs.push(hashes(&d.join("r2")).into_values().collect::<Vec<_>>());
        std::fs::remove_dir_all(d.join("r2")).unwrap();
    }
    assert_eq!(runs[0], runs[1]);
    assert_eq!(hashes(&r1), before, "the previous folder changed");
}
