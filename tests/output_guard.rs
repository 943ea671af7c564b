//! The output guard, end to end: every command refuses an output folder that would mix with or
//! replace what it reads, `--force` replaces only files reknit recorded writing, and runs into
//! neighbouring folders never touch each other's staging. Every case snapshots the whole tree
//! around its inputs and checks that nothing reknit did not create has changed. Cases are listed in
//! docs/bad-inputs.md ("Output folders").

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

/// Runs reknit expecting success; everything outside `out` must be exactly as before.
fn runs_ok(d: &Path, out: &Path, args: &[String]) {
    let before = snapshot(d, out);
    let o = reknit().args(args).output().expect("run reknit");
    assert!(o.status.success(), "{}", stderr(&o));
    assert_same(&before, &snapshot(d, out));
}

fn strings(a: &[&str]) -> Vec<String> {
    a.iter().map(|x| x.to_string()).collect()
}

/// A small valid plan into `out` (a set reknit wrote, with its record).
fn earlier_set(roads: &Path, out: &Path) {
    let o = run(&["plan", "--roads", &s(roads), "--out", &s(out), "-q"]);
    assert!(o.status.success(), "{}", stderr(&o));
}

case!(check_into_the_input_folder_with_force, |d| {
    let data = d.join("data");
    std::fs::create_dir(&data).unwrap();
    let roads = file(&data, "roads.geojson", fc(&[OK_LINE]));
    let args = strings(&[
        "check",
        "--roads",
        &s(&roads),
        "--out",
        &s(&data),
        "--force",
    ]);
    fails_with(
        d,
        &data,
        &args,
        &["--out", "roads.geojson", "folder holding"],
    );
});

case!(output_through_a_missing_folder_and_dot_dot, |d| {
    // `data/new/..` is `data`, the folder of the input, although `data/new` does not exist.
    let data = d.join("data");
    std::fs::create_dir(&data).unwrap();
    let roads = file(&data, "network.geojson", fc(&[OK_LINE]));
    let out = data.join("new/..");
    for cmd in ["plan", "check"] {
        let args = strings(&[cmd, "--roads", &s(&roads), "--out", &s(&out), "--force"]);
        fails_with(d, &data, &args, &["network.geojson", "folder holding"]);
        assert!(!data.join("new").exists(), "{cmd} created a folder");
    }
});

case!(demo_into_the_folder_of_its_damage_zones, |d| {
    let zones = file(
        d,
        "zones.geojson",
        r#"{"type":"FeatureCollection","features":[]}"#,
    );
    let args = strings(&[
        "demo",
        "--damage-zones",
        &s(&zones),
        "--out",
        &s(d),
        "--force",
    ]);
    fails_with(d, d, &args, &["zones.geojson", "folder holding"]);
});

case!(cost_table_inside_the_output_folder, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    earlier_set(&roads, &out);
    let table = file(
        &out,
        "costs.toml",
        "[classes]\nfield = \"damage\"\ndefault = 1\n",
    );
    let args = strings(&[
        "plan",
        "--roads",
        &s(&roads),
        "--cost-table",
        &s(&table),
        "--out",
        &s(&out),
        "--force",
    ]);
    fails_with(d, &out, &args, &["costs.toml", "folder holding"]);
});

case!(sites_in_a_subfolder_of_the_output, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    std::fs::create_dir_all(out.join("field")).unwrap();
    let sites = file(
        &out.join("field"),
        "sites.geojson",
        fc(&[&site_feature("A", 0.0, 0.0)]),
    );
    let args = strings(&[
        "plan",
        "--roads",
        &s(&roads),
        "--sites",
        &s(&sites),
        "--out",
        &s(&out),
        "--force",
    ]);
    fails_with(d, &out, &args, &["sites.geojson", "contains the input"]);
});

case!(input_reached_through_a_link_into_the_output, |d| {
    // The roads are given through a link; the file itself lies in the output folder.
    let out = d.join("out");
    std::fs::create_dir(&out).unwrap();
    file(&out, "roads.geojson", fc(&[OK_LINE]));
    let link = d.join("roads-link.geojson");
    std::os::unix::fs::symlink(out.join("roads.geojson"), &link).unwrap();
    let args = strings(&["plan", "--roads", &s(&link), "--out", &s(&out), "--force"]);
    fails_with(d, &out, &args, &["roads-link.geojson", "folder holding"]);
});

case!(force_keeps_a_folder_named_like_an_output, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    earlier_set(&roads, &out);
    let foreign = out.join("backup.geojson");
    std::fs::create_dir(&foreign).unwrap();
    file(&foreign, "keep.txt", "field notes");
    let args = strings(&["plan", "--roads", &s(&roads), "--out", &s(&out), "--force"]);
    fails_with(
        d,
        &out,
        &args,
        &["backup.geojson", "is a folder", "--force"],
    );
    assert_eq!(
        std::fs::read(foreign.join("keep.txt")).unwrap(),
        b"field notes"
    );
});

case!(force_keeps_a_file_reknit_did_not_write, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    std::fs::create_dir(&out).unwrap();
    file(&out, "plan.svg", "<svg>the analyst's own drawing</svg>");
    let args = strings(&["plan", "--roads", &s(&roads), "--out", &s(&out), "--force"]);
    fails_with(d, &out, &args, &["plan.svg", "no record of writing"]);
});

case!(force_keeps_a_link_named_like_an_output, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    earlier_set(&roads, &out);
    std::fs::remove_file(out.join("report.html")).unwrap();
    std::os::unix::fs::symlink(&roads, out.join("report.html")).unwrap();
    let args = strings(&["plan", "--roads", &s(&roads), "--out", &s(&out), "--force"]);
    fails_with(d, &out, &args, &["report.html", "symbolic link"]);
});

case!(forged_record_names_nothing, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    std::fs::create_dir(&out).unwrap();
    file(&out, ".reknit-outputs", "network.geojson\n");
    file(&out, "network.geojson", "the analyst's layer");
    let args = strings(&["check", "--roads", &s(&roads), "--out", &s(&out), "--force"]);
    fails_with(
        d,
        &out,
        &args,
        &[".reknit-outputs", "not a record reknit wrote"],
    );
});

#[test]
fn force_replaces_its_own_outputs_and_keeps_the_users_files() {
    let t = tmp();
    let d = t.path();
    let roads = roads_ok(d);
    let out = d.join("out");
    earlier_set(&roads, &out);
    file(&out, "notes.txt", "the coordinator's notes");
    let before_summary = std::fs::read(out.join("summary.json")).unwrap();
    // A second plan with other settings: a different set, written among the user's files.
    let args = strings(&[
        "plan",
        "--roads",
        &s(&roads),
        "--out",
        &s(&out),
        "--force",
        "-q",
        "--default-damage",
        "0.5",
    ]);
    let notes = out.join("notes.txt");
    let kept = (
        std::fs::read(&notes).unwrap(),
        std::fs::metadata(&notes).unwrap().modified().unwrap(),
    );
    runs_ok(d, &out, &args);
    assert_ne!(
        std::fs::read(out.join("summary.json")).unwrap(),
        before_summary
    );
    assert_eq!(
        (
            std::fs::read(&notes).unwrap(),
            std::fs::metadata(&notes).unwrap().modified().unwrap()
        ),
        kept
    );
    // And once more: the record written among the user's files makes the set replaceable again.
    runs_ok(d, &out, &args);
    let names = listing(&out);
    assert!(names.contains(&".reknit-outputs".to_string()), "{names:?}");
    assert!(
        !names.iter().any(|n| n.starts_with(".reknit-staging")),
        "{names:?}"
    );
}

#[test]
fn neighbouring_outputs_run_at_once() {
    // `north` and `north-vale`, `cc` and `cc-2`: each run cleans up only its own abandoned
    // staging, so all four succeed together, again and again.
    let t = tmp();
    let d = t.path();
    let roads = d.join("roads.geojson");
    std::fs::copy(sample_roads(), &roads).unwrap();
    let names = ["north", "north-vale", "cc", "cc-2"];
    for round in 0..3 {
        let children: Vec<_> = names
            .iter()
            .map(|n| {
                reknit()
                    .args(["plan", "--roads", &s(&roads), "--force", "-q", "--out"])
                    .arg(d.join(n))
                    .stderr(std::process::Stdio::piped())
                    .spawn()
                    .unwrap()
            })
            .collect();
        for (n, c) in names.iter().zip(children) {
            let o = c.wait_with_output().unwrap();
            assert!(o.status.success(), "round {round}, {n}: {}", stderr(&o));
            assert!(d.join(n).join("summary.json").exists());
        }
    }
    let left: Vec<String> = listing(d)
        .into_iter()
        .filter(|n| n.starts_with('.'))
        .collect();
    assert!(left.is_empty(), "left behind: {left:?}");
}

#[test]
fn every_command_changes_nothing_it_did_not_create() {
    // The whole tree around the inputs is compared before and after each command, first into new
    // folders, then replacing with --force; only the command's own output folder may differ.
    use common::batch::{corner_sites, grid_roads, manifest};
    let t = tmp();
    let d = t.path();
    let data = d.join("data");
    std::fs::create_dir(&data).unwrap();
    let roads = grid_roads(&data, "roads.geojson");
    let sites = corner_sites(&data, "sites.geojson");
    let table = file(
        &data,
        "costs.toml",
        "[classes]\nfield = \"damage\"\ndefault = 1\n",
    );
    file(&data, "notes.txt", "the analyst's notes");
    let m = manifest(
        &d.join("region"),
        "region.toml",
        "[defaults]\ncost_table = \"../data/costs.toml\"\n\n[[district]]\nname = \"north\"\nroads = \"../data/roads.geojson\"\nsites = \"../data/sites.geojson\"\n\n[[district]]\nname = \"south\"\nroads = \"../data/roads.geojson\"\n",
    );
    let plan = |out: &Path| {
        strings(&[
            "plan",
            "--roads",
            &s(&roads),
            "--sites",
            &s(&sites),
            "--cost-table",
            &s(&table),
            "--out",
            &s(out),
            "-q",
        ])
    };
    let check = |out: &Path| strings(&["check", "--roads", &s(&roads), "--out", &s(out), "-q"]);
    let demo = |out: &Path| strings(&["demo", "--out", &s(out), "-q"]);
    let batch = |out: &Path| strings(&["batch", &s(&m), "--out", &s(out), "-q"]);
    type Cmd<'a> = (&'a str, Box<dyn Fn(&Path) -> Vec<String> + 'a>);
    let commands: Vec<Cmd> = vec![
        ("plan", Box::new(plan)),
        ("check", Box::new(check)),
        ("demo", Box::new(demo)),
        ("batch", Box::new(batch)),
    ];
    for force in [false, true] {
        for (name, args) in &commands {
            let out = d.join(format!("{name}-out"));
            let mut a = args(&out);
            if force {
                a.push("--force".into());
            }
            runs_ok(d, &out, &a);
        }
    }
    // Shards into one folder, then merge: merge may add only its own two files there.
    let shared = d.join("shared");
    for k in ["1/2", "2/2"] {
        runs_ok(
            d,
            &shared,
            &strings(&["batch", &s(&m), "--out", &s(&shared), "-q", "--shard", k]),
        );
    }
    let before = snapshot(d, Path::new("/nonexistent"));
    let o = run(&["merge", &s(&shared)]);
    assert!(o.status.success(), "{}", stderr(&o));
    let mut after = snapshot(d, Path::new("/nonexistent"));
    for own in ["batch-summary.json", "batch-summary.csv"] {
        assert!(
            after.remove(&shared.join(own)).is_some(),
            "merge wrote {own}"
        );
    }
    assert_same(&before, &after);
}

/// Inode and permission bits of a folder.
fn identity(p: &Path) -> (u64, u32) {
    use std::os::unix::fs::MetadataExt;
    let m = std::fs::metadata(p).unwrap();
    (m.ino(), m.mode())
}

#[test]
fn a_folder_the_user_made_is_never_replaced_as_a_whole() {
    // The user's own folder (its inode, mode and setgid bit) survives every --force run; only the
    // files reknit recorded are replaced inside it. The same holds for `--out .`.
    use std::os::unix::fs::PermissionsExt;
    let t = tmp();
    let d = t.path();
    let roads = roads_ok(d);
    let out = d.join("shared");
    std::fs::create_dir(&out).unwrap();
    std::fs::set_permissions(&out, std::fs::Permissions::from_mode(0o2770)).unwrap();
    let before = identity(&out);
    for extra in [
        &[][..],
        &["--force"],
        &["--force", "--default-damage", "0.5"],
    ] {
        let mut a = vec!["plan", "--roads", &s(&roads), "--out", &s(&out), "-q"]
            .into_iter()
            .map(String::from)
            .collect::<Vec<_>>();
        a.extend(extra.iter().map(|x| x.to_string()));
        runs_ok(d, &out, &a);
        assert_eq!(identity(&out), before);
    }
    // A folder reknit made is its own, but not while it is the working folder of the run.
    let made = d.join("made");
    earlier_set(&roads, &made);
    let inode = identity(&made);
    let o = reknit()
        .current_dir(&made)
        .args(["plan", "--roads", &s(&roads), "--out", ".", "--force", "-q"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(
        identity(&made),
        inode,
        "the working folder was swapped away"
    );
}

#[test]
fn two_runs_into_one_new_folder_never_both_claim_it() {
    // Without --force, the second of two runs into the same folder must fail, however they
    // interleave: its outputs would silently replace the first's.
    let t = tmp();
    let d = t.path();
    let roads = d.join("roads.geojson");
    std::fs::copy(sample_roads(), &roads).unwrap();
    for round in 0..3 {
        let out = d.join(format!("out{round}"));
        let children: Vec<_> = (0..2)
            .map(|_| {
                reknit()
                    .args([
                        "plan",
                        "--roads",
                        &s(&roads),
                        "--whole-network",
                        "-q",
                        "--out",
                    ])
                    .arg(&out)
                    .stderr(std::process::Stdio::piped())
                    .spawn()
                    .unwrap()
            })
            .collect();
        let ok = children
            .into_iter()
            .map(|c| c.wait_with_output().unwrap())
            .filter(|o| o.status.success())
            .count();
        assert_eq!(ok, 1, "round {round}: exactly one run may write the set");
    }
}

case!(an_abandoned_set_put_back_still_needs_force, |d| {
    // A run killed between its two renames leaves the earlier set aside; the next run puts it
    // back and, without --force, refuses to replace it.
    let roads = roads_ok(d);
    let out = d.join("out");
    earlier_set(&roads, &out);
    let aside = d.join(".reknit-retired-out-1-2");
    std::fs::rename(&out, &aside).unwrap();
    let args = strings(&["plan", "--roads", &s(&roads), "--out", &s(&out)]);
    let o = reknit().args(&args).output().unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("--force"), "{}", stderr(&o));
    assert!(out.join("summary.json").exists(), "the earlier set is back");
    assert!(!aside.exists());
});

case!(input_linked_from_the_output_folder, |d| {
    // The roads are read through a link that sits in --out (its sidecars would be looked for
    // there): the folder holding the link counts as the input's folder too.
    let store = d.join("store");
    std::fs::create_dir(&store).unwrap();
    let real = file(&store, "roads.geojson", fc(&[OK_LINE]));
    let data = d.join("data");
    std::fs::create_dir(&data).unwrap();
    std::os::unix::fs::symlink(&real, data.join("roads.geojson")).unwrap();
    let args = strings(&[
        "plan",
        "--roads",
        &s(&data.join("roads.geojson")),
        "--out",
        &s(&data),
        "--force",
    ]);
    fails_with(d, &data, &args, &["roads.geojson", "folder holding"]);
});

case!(output_link_with_a_trailing_slash, |d| {
    let roads = roads_ok(d);
    let real = d.join("real");
    std::fs::create_dir(&real).unwrap();
    let link = d.join("out");
    std::os::unix::fs::symlink(&real, &link).unwrap();
    let args = strings(&[
        "plan",
        "--roads",
        &s(&roads),
        "--out",
        &format!("{}/", s(&link)),
    ]);
    fails_with(d, &link, &args, &["symbolic link"]);
    assert!(listing(&real).is_empty());
});
