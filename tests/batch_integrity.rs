//! The bad-input catalogue, batch part (docs/bad-inputs.md lists every case): manifests, output
//! folders that would hold inputs, batch summaries that would replace files reknit did not write,
//! shard counts, and shard summaries that do not belong together.

mod common;
use common::bad::*;
use common::batch::*;
use common::*;
use std::path::Path;

/// `reknit batch MANIFEST --out OUT` as arguments.
fn batch_args(manifest: &Path, out: &Path, extra: &[&str]) -> Vec<String> {
    let mut a = vec!["batch".into(), s(manifest), "--out".into(), s(out)];
    a.extend(extra.iter().map(|x| x.to_string()));
    a
}

/// A manifest `m.toml` in `d` with one district "Eastvane" on a road grid, plus `extra` lines in it
/// and `defaults` lines in [defaults].
fn vale(d: &Path, defaults: &str, extra: &str) -> std::path::PathBuf {
    grid_roads(d, "roads.geojson");
    manifest(
        d,
        "m.toml",
        &format!(
            "[defaults]\n{defaults}\n[[district]]\nname = \"Eastvane\"\nroads = \"roads.geojson\"\n{extra}\n"
        ),
    )
}

// ---- Manifests ----

case!(manifest_unknown_key_in_defaults, |d| {
    let m = vale(d, "damage_zone = \"z.geojson\"", "");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &["m.toml", "[defaults]", "unknown key \"damage_zone\""],
    );
});

case!(manifest_unknown_key_in_a_district, |d| {
    let m = vale(d, "", "colour = \"red\"");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &[
            "m.toml",
            "district 1 (\"Eastvane\")",
            "unknown key \"colour\"",
        ],
    );
});

case!(manifest_name_in_defaults, |d| {
    let m = vale(d, "name = \"All\"", "");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &["m.toml", "[defaults]", "\"name\" is given per district"],
    );
});

case!(manifest_setting_of_the_wrong_kind, |d| {
    let m = vale(d, "", "snap = \"wide\"");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &["m.toml", "\"Eastvane\"", "\"snap\"", "a number"],
    );
});

case!(manifest_setting_out_of_range_in_defaults, |d| {
    let m = vale(d, "budget = -5", "");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &[
            "m.toml",
            "\"Eastvane\"",
            "\"budget\" (from [defaults])",
            "-5",
        ],
    );
});

case!(manifest_cost_table_unreadable, |d| {
    let m = vale(d, "cost_table = \"costs.toml\"", "");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &[
            "\"Eastvane\"",
            "\"cost_table\"",
            "[defaults]",
            "costs.toml",
            "cannot read",
        ],
    );
});

case!(csv_manifest_unknown_column, |d| {
    grid_roads(d, "roads.geojson");
    let m = manifest(
        d,
        "m.csv",
        "name,roads,colour\nEastvane,roads.geojson,red\n",
    );
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &["m.csv", "unknown column \"colour\""],
    );
});

case!(csv_manifest_column_twice, |d| {
    grid_roads(d, "roads.geojson");
    let m = manifest(
        d,
        "m.csv",
        "name,roads,snap,snap\nEastvane,roads.geojson,1,2\n",
    );
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &["m.csv", "\"snap\" appears twice"],
    );
});

// ---- Output folders and inputs ----

case!(output_folder_holds_another_districts_input, |d| {
    // District "Eastvane" writes into out/Eastvane, where district "Westvane" reads its sites from.
    grid_roads(d, "roads.geojson");
    let out = d.join("out");
    std::fs::create_dir_all(out.join("Eastvane")).unwrap();
    let sites = corner_sites(&out.join("Eastvane"), "sites.geojson");
    let before = std::fs::read(&sites).unwrap();
    let m = manifest(
        d,
        "m.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"roads.geojson\"\n\n[[district]]\nname = \"Westvane\"\nroads = \"roads.geojson\"\nsites = \"out/Eastvane/sites.geojson\"\nhub = \"A\"\n",
    );
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &["--resume"]),
        &[
            "m.toml",
            "district \"Eastvane\"",
            "sites.geojson",
            "\"sites\" of district \"Westvane\"",
        ],
    );
    assert_eq!(listing(&out.join("Eastvane")), ["sites.geojson"]);
    assert_eq!(std::fs::read(&sites).unwrap(), before);
});

case!(output_folder_reaches_an_input_through_a_link, |d| {
    // out/Eastvane is a link to the folder holding the roads' Shapefile sidecars.
    let data = d.join("data");
    std::fs::create_dir(&data).unwrap();
    shapefile_roads(&data, "roads.shp", &two_roads());
    let out = d.join("out");
    std::fs::create_dir(&out).unwrap();
    std::os::unix::fs::symlink(&data, out.join("Eastvane")).unwrap();
    let m = manifest(
        d,
        "m.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"data/roads.shp\"\n",
    );
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &[
            "district \"Eastvane\"",
            "roads",
            "\"roads\" of district \"Eastvane\"",
        ],
    );
});

case!(manifest_inside_a_district_output_folder, |d| {
    grid_roads(d, "roads.geojson");
    let out = d.join("out");
    let m = manifest(
        &out.join("Eastvane"),
        "m.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"../../roads.geojson\"\n",
    );
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &["district \"Eastvane\"", "m.toml (the manifest)"],
    );
});

case!(csv_manifest_named_like_the_batch_summary, |d| {
    grid_roads(d, "roads.geojson");
    let out = d.join("out");
    let m = manifest(
        &out,
        "batch-summary.csv",
        "name,roads\nEastvane,../roads.geojson\n",
    );
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &[
            "batch-summary.csv (the manifest)",
            "a name the batch writes",
        ],
    );
    assert!(
        std::fs::read_to_string(&m)
            .unwrap()
            .starts_with("name,roads")
    );
});

case!(batch_summary_not_written_by_reknit, |d| {
    let m = vale(d, "", "");
    let out = d.join("out");
    std::fs::create_dir(&out).unwrap();
    std::fs::write(out.join("batch-summary.json"), "my own notes\n").unwrap();
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &[]),
        &["batch-summary.json", "not a batch summary reknit wrote"],
    );
    assert_eq!(
        std::fs::read_to_string(out.join("batch-summary.json")).unwrap(),
        "my own notes\n"
    );
});

case!(shard_count_too_large, |d| {
    let m = vale(d, "", "");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &batch_args(&m, &out, &["--shard", "1/100000000000"]),
        &["1/100000000000", "at most 100000"],
    );
});

// ---- Merging shard summaries ----

/// Runs shards 1/2 and 2/2 of a two-district manifest into `out`; returns the manifest.
fn two_shards(d: &Path, out: &Path) -> std::path::PathBuf {
    grid_roads(d, "roads.geojson");
    grid_roads(d, "roads-big.geojson");
    std::fs::write(
        d.join("roads-big.geojson"),
        std::fs::read_to_string(d.join("roads-big.geojson")).unwrap() + "\n\n\n",
    )
    .unwrap();
    let m = manifest(
        d,
        "m.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"roads.geojson\"\n\n[[district]]\nname = \"Westvane\"\nroads = \"roads-big.geojson\"\n",
    );
    for k in ["1/2", "2/2"] {
        let o = batch(&m, out, &["--shard", k]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    }
    m
}

/// `merge OUT` fails with the needles; the shard summaries stay as they were.
fn merge_fails(d: &Path, out: &Path, needles: &[&str]) {
    let before = snapshot(out, Path::new("/nonexistent"));
    fails_with(d, out, &["merge".to_string(), s(out)], needles);
    assert!(
        before == snapshot(out, Path::new("/nonexistent")),
        "a shard summary changed"
    );
}

case!(merge_of_shards_from_another_manifest, |d| {
    let out = d.join("out");
    let m = two_shards(d, &out);
    // Shard 2 run again from an edited manifest (another setting) into the same folder.
    let text = std::fs::read_to_string(&m)
        .unwrap()
        .replace("name = \"Westvane\"", "name = \"Westvane\"\nsnap = 2");
    std::fs::write(&m, text).unwrap();
    let o = batch(&m, &out, &["--shard", "2/2", "--force"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    merge_fails(
        d,
        &out,
        &[
            "batch-summary-1-of-2.json",
            "batch-summary-2-of-2.json",
            "different manifests",
        ],
    );
});

/// Moves (or copies) the first row of shard 1 into shard 2's summary.
fn edit_rows(out: &Path, keep_in_shard_1: bool) {
    let p1 = out.join("batch-summary-1-of-2.json");
    let p2 = out.join("batch-summary-2-of-2.json");
    let mut s1 = read_json(&p1);
    let mut s2 = read_json(&p2);
    let row = s1["rows"][0].clone();
    if !keep_in_shard_1 {
        s1["rows"].as_array_mut().unwrap().remove(0);
        std::fs::write(&p1, serde_json::to_string_pretty(&s1).unwrap()).unwrap();
    } else {
        s2["rows"].as_array_mut().unwrap().push(row);
        std::fs::write(&p2, serde_json::to_string_pretty(&s2).unwrap()).unwrap();
    }
}

case!(merge_with_a_district_in_two_shards, |d| {
    let out = d.join("out");
    two_shards(d, &out);
    edit_rows(&out, true);
    merge_fails(
        d,
        &out,
        &[
            "is in both",
            "batch-summary-1-of-2.json",
            "batch-summary-2-of-2.json",
        ],
    );
});

case!(merge_with_a_district_in_no_shard, |d| {
    let out = d.join("out");
    two_shards(d, &out);
    edit_rows(&out, false);
    merge_fails(d, &out, &["1 of 2 districts are in no shard summary"]);
});

case!(merge_beside_a_batch_summary_not_written_by_reknit, |d| {
    let out = d.join("out");
    two_shards(d, &out);
    std::fs::write(
        out.join("batch-summary.csv"),
        "district,owner\nEastvane,me\n",
    )
    .unwrap();
    merge_fails(
        d,
        &out,
        &["batch-summary.csv", "not a batch summary reknit wrote"],
    );
});

case!(merge_of_a_shard_stopped_after_a_district_changed, |d| {
    // A shard re-ran a district (new outputs) and was stopped before its summary was rewritten:
    // the summary's figures no longer match the district's outputs.
    let out = d.join("out");
    two_shards(d, &out);
    let vale = out.join("Eastvane");
    let o = run(&[
        "plan",
        "--roads",
        &s(&d.join("roads.geojson")),
        "--out",
        &s(&vale),
        "--force",
        "-q",
        "--drop-where",
        "damage=0.5",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    merge_fails(d, &out, &["Eastvane", "no longer hold", "--resume"]);
});

case!(merge_of_a_shard_no_batch_writes, |d| {
    // A summary named for shard 3 of 2 (or of 10^15 shards) was not written by any batch.
    let out = d.join("out");
    two_shards(d, &out);
    for bad in ["3-of-2", "1-of-1000000000000000"] {
        let forged = out.join(format!("batch-summary-{bad}.json"));
        std::fs::copy(out.join("batch-summary-1-of-2.json"), &forged).unwrap();
        merge_fails(
            d,
            &out,
            &[&format!("batch-summary-{bad}.json"), "1 ≤ K ≤ N"],
        );
        std::fs::remove_file(&forged).unwrap();
    }
});
