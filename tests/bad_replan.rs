//! The bad-input catalogue for `reknit replan` (docs/bad-inputs.md lists every case): the
//! crews' sheet, the previous folder and its recorded inputs. Each refusal exits with code 2,
//! names the file (and the line of the sheet), writes nothing and leaves the inputs as they were.

mod common;
use common::bad::*;
use common::*;
use std::path::{Path, PathBuf};

/// A first plan of a small road layer (absolute paths); returns the previous folder.
fn first(d: &Path) -> PathBuf {
    // Three damaged roads in a row: three repairs.
    let lines: Vec<String> = (0..3)
        .map(|i| {
            line(
                &[
                    at_m(100.0 * i as f64, 0.0),
                    at_m(100.0 * (i + 1) as f64, 0.0),
                ],
                &format!(r#"{{"id":"R{i}","damage":0.5}}"#),
            )
        })
        .collect();
    let roads = write_collection(d, "roads.geojson", &lines);
    let r1 = d.join("r1");
    let o = plan_cli(&roads, &r1, &["-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
    r1
}

/// The previous plan's work-order keys.
fn keys(r1: &Path) -> Vec<String> {
    let mut r = csv::Reader::from_path(r1.join("work-orders.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let k = h.iter().position(|c| c == "work_order").unwrap();
    r.records().map(|x| x.unwrap()[k].to_string()).collect()
}

/// Runs `replan r1 --finished SHEET --out d/r2 EXTRA…` expecting the needles.
fn replan_fails(d: &Path, sheet: &[u8], extra: &[&str], needles: &[&str]) {
    let r1 = d.join("r1");
    let f = file(d, "back.csv", sheet);
    let out = d.join("r2");
    let mut args = vec![
        "replan".into(),
        s(&r1),
        "--finished".into(),
        s(&f),
        "--out".into(),
        s(&out),
    ];
    args.extend(extra.iter().map(|x| x.to_string()));
    fails_with(d, &out, &args, needles);
}

case!(replan_status_not_understood, |d| {
    let k = keys(&first(d));
    let sheet = format!("work_order,status\n{},done\n{},half\n", k[0], k[1]);
    replan_fails(
        d,
        sheet.as_bytes(),
        &[],
        &["back.csv", "line 3", "\"half\""],
    );
});

case!(replan_status_without_work_order, |d| {
    first(d);
    replan_fails(
        d,
        b"work_order;status\n;done\n",
        &[],
        &["back.csv", "line 2", "work_order"],
    );
});

case!(replan_one_key_twice_with_two_statuses, |d| {
    let k = keys(&first(d));
    let sheet = format!("work_order\tstatus\n{0}\tdone\n{0}\tstarted\n", k[0]);
    replan_fails(d, sheet.as_bytes(), &[], &["back.csv", "line 3", "line 2"]);
});

case!(replan_sheet_without_status_column, |d| {
    let k = keys(&first(d));
    let sheet = format!("work_order,state\n{},done\n", k[0]);
    replan_fails(d, sheet.as_bytes(), &[], &["back.csv", "line 1", "status"]);
});

case!(replan_sheet_not_utf8, |d| {
    let k = keys(&first(d));
    let mut sheet = format!("work_order,status,verified_by\n{},done,", k[0]).into_bytes();
    sheet.extend_from_slice(b"Jos\xe9\n");
    replan_fails(d, &sheet, &[], &["back.csv", "UTF-8"]);
});

case!(replan_input_changed_since, |d| {
    let k = keys(&first(d));
    let roads = d.join("roads.geojson");
    let mut text = std::fs::read(&roads).unwrap();
    text.push(b'\n');
    std::fs::write(&roads, text).unwrap();
    let sheet = format!("work_order,status\n{},done\n", k[0]);
    replan_fails(d, sheet.as_bytes(), &[], &["roads", "changed", "--roads"]);
});

case!(replan_previous_folder_not_a_plan, |d| {
    std::fs::create_dir(d.join("r1")).unwrap();
    replan_fails(d, b"work_order,status\n", &[], &["summary.json", "reknit"]);
});

case!(replan_previous_setting_unknown, |d| {
    let r1 = first(d);
    let p = r1.join("summary.json");
    let text = std::fs::read_to_string(&p).unwrap();
    std::fs::write(
        &p,
        text.replacen(
            "\"settings\": {",
            "\"settings\": {\n    \"frobnicate\": 1,",
            1,
        ),
    )
    .unwrap();
    replan_fails(
        d,
        b"work_order,status\n",
        &[],
        &["summary.json", "frobnicate"],
    );
});

/// A first plan written as a GeoPackage (`--output-format gpkg`).
fn first_gpkg(d: &Path) -> PathBuf {
    let roads = write_collection(
        d,
        "roads.geojson",
        &[line(
            &[at_m(0.0, 0.0), at_m(100.0, 0.0)],
            r#"{"damage":0.5}"#,
        )],
    );
    let r1 = d.join("r1");
    let o = plan_cli(&roads, &r1, &["-q", "--output-format", "gpkg"]);
    assert!(o.status.success(), "{}", stderr(&o));
    r1
}

case!(replan_previous_geopackage_missing, |d| {
    let r1 = first_gpkg(d);
    std::fs::remove_file(r1.join("layers.gpkg")).unwrap();
    replan_fails(
        d,
        b"work_order,status\n",
        &[],
        &["layers.gpkg", "missing", "GeoPackage"],
    );
});

case!(replan_previous_geopackage_not_sqlite, |d| {
    let r1 = first_gpkg(d);
    std::fs::write(r1.join("layers.gpkg"), b"not a database at all, just text").unwrap();
    replan_fails(
        d,
        b"work_order,status\n",
        &[],
        &["layers.gpkg", "not a GeoPackage reknit wrote"],
    );
});

case!(replan_into_the_previous_folder, |d| {
    let r1 = first(d);
    let f = file(d, "back.csv", b"work_order,status\n");
    let args: Vec<String> = [
        "replan".into(),
        s(&r1),
        "--finished".into(),
        s(&f),
        "--out".into(),
        s(&r1),
        "--force".into(),
    ]
    .into();
    fails_with(d, &r1, &args, &["r1"]);
});

case!(replan_done_line_names_no_work_order, |d| {
    let k = keys(&first(d));
    let sheet = format!("work_order,status\n{},done\nWO-NOWHERE-0-1,done\n", k[0]);
    replan_fails(
        d,
        sheet.as_bytes(),
        &[],
        &[
            "back.csv",
            "line 3",
            "WO-NOWHERE-0-1",
            "done",
            "planned again",
        ],
    );
});

case!(replan_fewer_road_layers_than_the_previous_plan, |d| {
    // A first plan of two layers, re-planned with one of them.
    let r1 = first(d);
    let east = write_collection(
        d,
        "east.geojson",
        &[line(
            &[at_m(300.0, 0.0), at_m(400.0, 0.0)],
            r#"{"id":"E0","damage":0.5}"#,
        )],
    );
    let roads = d.join("roads.geojson");
    std::fs::remove_dir_all(&r1).unwrap();
    let o = reknit()
        .args([
            "plan",
            "--roads",
            &s(&roads),
            "--roads",
            &s(&east),
            "--out",
            &s(&r1),
            "-q",
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let sheet = format!("work_order,status\n{},done\n", keys(&r1)[0]);
    replan_fails(
        d,
        sheet.as_bytes(),
        &["--roads", &s(&roads)],
        &["summary.json", "2 road layer(s)", "1 were given", "--roads"],
    );
});
