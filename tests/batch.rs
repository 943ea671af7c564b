//! Batch runs: failures isolated, shards merged equal to one run, resume, safe folder names.

mod common;
use common::*;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

/// Writes `n` small synthetic districts and a manifest; `broken` lists districts to break.
fn region(dir: &Path, n: usize, broken: bool) -> PathBuf {
    region_sized(dir, n, broken, 150)
}

fn region_sized(dir: &Path, n: usize, broken: bool, base_features: usize) -> PathBuf {
    let mut m = String::from("[defaults]\nsnap = 0.5\neffort = \"quick\"\nhub = \"P1\"\n\n");
    for i in 0..n {
        let folder = dir.join(format!("d{i:02}"));
        std::fs::create_dir_all(&folder).unwrap();
        let features = base_features + 10 * i;
        let f = std::fs::File::create(folder.join("roads.geojson")).unwrap();
        let written = reknit::synthetic::write_grid_layer(
            std::io::BufWriter::new(f),
            features,
            100 + i as u64,
        )
        .unwrap();
        let mut csv = String::from("site_id,lon,lat\n");
        for (k, p) in reknit::synthetic::grid_layer_sites(written, 5, i as u64)
            .iter()
            .enumerate()
        {
            writeln!(csv, "P{},{},{}", k + 1, p[0], p[1]).unwrap();
        }
        std::fs::write(folder.join("sites.csv"), csv).unwrap();
        let mut entry = format!(
            "[[district]]\nname = \"District {i:02}\"\nroads = \"d{i:02}/roads.geojson\"\nsites = \"d{i:02}/sites.csv\"\n"
        );
        if broken {
            match i {
                5 => std::fs::write(folder.join("roads.geojson"), "{ not json").unwrap(),
                17 => entry = entry.replace("d17/roads.geojson", "d17/missing.geojson"),
                29 => entry.push_str("hub = \"NOPE\"\n"),
                _ => {}
            }
        }
        m.push_str(&entry);
        m.push('\n');
    }
    let p = dir.join("manifest.toml");
    std::fs::write(&p, m).unwrap();
    p
}

fn batch(args: &[&str]) -> std::process::Output {
    let mut a = vec!["batch"];
    a.extend_from_slice(args);
    run(&a)
}

#[test]
fn failures_are_isolated_and_listed() {
    let d = tmp();
    let manifest = region(d.path(), 40, true);
    let out = d.path().join("out");
    let o = batch(&[
        manifest.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--jobs",
        "2",
    ]);
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let s = read_json(&out.join("batch-summary.json"));
    assert_eq!(s["districts"], 40);
    assert_eq!(s["failed"], 3);
    let rows = s["rows"].as_array().unwrap();
    let failed: Vec<(&str, &str)> = rows
        .iter()
        .filter(|r| r["status"] == "failed")
        .map(|r| (r["name"].as_str().unwrap(), r["error"].as_str().unwrap()))
        .collect();
    assert_eq!(failed.len(), 3);
    assert_eq!(failed[0].0, "District 05");
    assert!(failed[0].1.contains("not valid GeoJSON"), "{}", failed[0].1);
    assert!(
        failed[1].1.contains("missing.geojson") && failed[1].1.contains("cannot read"),
        "{}",
        failed[1].1
    );
    assert!(
        failed[2].1.contains("--hub") && failed[2].1.contains("NOPE"),
        "{}",
        failed[2].1
    );
    for r in rows.iter().filter(|r| r["status"] == "ok") {
        let folder = out.join(r["folder"].as_str().unwrap());
        assert!(folder.join("summary.json").exists());
    }
    assert!(
        !out.join("District-05").exists(),
        "a failed district leaves no folder"
    );
    let csv = std::fs::read_to_string(out.join("batch-summary.csv")).unwrap();
    assert_eq!(csv.lines().count(), 41);
    assert!(stderr(&o).contains("failed: District 17"), "{}", stderr(&o));
}

fn files_of(dir: &Path) -> Vec<(String, Vec<u8>)> {
    let mut v = Vec::new();
    for folder in listing(dir) {
        let p = dir.join(&folder);
        if p.is_dir() {
            for f in listing(&p) {
                v.push((format!("{folder}/{f}"), std::fs::read(p.join(&f)).unwrap()));
            }
        }
    }
    v
}

#[test]
fn shards_merged_equal_one_run() {
    let d = tmp();
    let manifest = region(d.path(), 12, false);
    let whole = d.path().join("whole");
    let o = batch(&[
        manifest.to_str().unwrap(),
        "--out",
        whole.to_str().unwrap(),
        "-q",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let sharded = d.path().join("sharded");
    for k in 1..=4 {
        let shard = format!("{k}/4");
        let o = batch(&[
            manifest.to_str().unwrap(),
            "--out",
            sharded.to_str().unwrap(),
            "--shard",
            &shard,
            "-q",
            "--jobs",
            "1",
        ]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        assert!(
            sharded
                .join(format!("batch-summary-{k}-of-4.json"))
                .exists()
        );
    }
    let o = run(&["merge", sharded.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    for f in ["batch-summary.json", "batch-summary.csv"] {
        assert_eq!(
            std::fs::read(whole.join(f)).unwrap(),
            std::fs::read(sharded.join(f)).unwrap(),
            "{f}"
        );
    }
    assert_eq!(files_of(&whole), files_of(&sharded), "per-district outputs");
}

#[test]
fn merge_refuses_missing_shards() {
    let d = tmp();
    let manifest = region(d.path(), 4, false);
    let out = d.path().join("out");
    assert_eq!(
        batch(&[
            manifest.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--shard",
            "1/3",
            "-q"
        ])
        .status
        .code(),
        Some(0)
    );
    let o = run(&["merge", out.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("2/3, 3/3"), "{}", stderr(&o));
}

#[test]
fn resume_after_a_kill_finishes_only_the_rest() {
    let d = tmp();
    // Districts big enough (tens of milliseconds each) that the kill lands midway.
    let manifest = region_sized(d.path(), 10, false, 6000);
    let clean = d.path().join("clean");
    assert_eq!(
        batch(&[
            manifest.to_str().unwrap(),
            "--out",
            clean.to_str().unwrap(),
            "-q"
        ])
        .status
        .code(),
        Some(0)
    );
    let out = d.path().join("out");
    let mut child = reknit()
        .args([
            "batch",
            manifest.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "-q",
            "--jobs",
            "1",
        ])
        .spawn()
        .unwrap();
    // Kill once a few districts are complete.
    let start = std::time::Instant::now();
    loop {
        // Staging folders (hidden, beside the districts) hold a summary.json before the swap.
        let done = listing(&out)
            .iter()
            .filter(|f| !f.starts_with('.') && out.join(f).join("summary.json").exists())
            .count();
        if done >= 3 || start.elapsed().as_secs() > 60 {
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    child.kill().unwrap();
    child.wait().unwrap();
    let done = listing(&out)
        .iter()
        .filter(|f| !f.starts_with('.') && out.join(f).join("summary.json").exists())
        .count();
    assert!(
        done < 10,
        "the batch finished before it could be interrupted"
    );
    // A district interrupted mid-write is only a hidden staging folder: every visible district
    // folder holds a complete set.
    for f in listing(&out) {
        let p = out.join(&f);
        if p.is_dir() && !f.starts_with('.') {
            assert!(p.join("summary.json").exists(), "{f} is incomplete");
        }
    }
    let o = batch(&[
        manifest.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--resume",
        "-q",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let s = read_json(&out.join("batch-summary.json"));
    let unchanged = s["rows"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|r| r["status"] == "unchanged")
        .count();
    assert!(unchanged >= 3, "{unchanged} districts resumed");
    assert_eq!(
        files_of(&clean),
        files_of(&out),
        "same final outputs as an uninterrupted run"
    );
    // Without --resume or --force, existing outputs are not replaced.
    let o = batch(&[
        manifest.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert_eq!(o.status.code(), Some(1));
}

#[test]
fn hostile_district_names_stay_inside_the_output_folder() {
    let d = tmp();
    let roads = sample_roads();
    let m = format!(
        "[[district]]\nname = \"../outside\"\nroads = \"{0}\"\n\n[[district]]\nname = \"/abs/path\"\nroads = \"{0}\"\n",
        roads.display()
    );
    let manifest = d.path().join("m.toml");
    std::fs::write(&manifest, m).unwrap();
    let out = d.path().join("out");
    let o = batch(&[
        manifest.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(!d.path().join("outside").exists());
    let mut names = listing(&out);
    names.retain(|n| !n.starts_with("batch-summary"));
    assert_eq!(names, ["___outside", "_abs_path"]);
    // Names that collide once made safe are refused before anything runs.
    let m = format!(
        "[[district]]\nname = \"a/b\"\nroads = \"{0}\"\n\n[[district]]\nname = \"a:b\"\nroads = \"{0}\"\n",
        roads.display()
    );
    std::fs::write(&manifest, m).unwrap();
    let out2 = d.path().join("out2");
    let o = batch(&[manifest.to_str().unwrap(), "--out", out2.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("collides"), "{}", stderr(&o));
    assert!(!out2.exists());
}

#[test]
fn unusable_manifests_exit_2() {
    let d = tmp();
    for (text, needle) in [
        ("not toml [", "not valid TOML"),
        ("[[district]]\nroads = \"x\"\n", "has no \"name\""),
        (
            "[[district]]\nname = \"a\"\nroads = \"x\"\ncolour = \"red\"\n",
            "unknown key \"colour\"",
        ),
        (
            "[defaults]\neffort = \"max\"\n[[district]]\nname = \"a\"\nroads = \"x\"\n",
            "effort",
        ),
        ("", "no districts"),
    ] {
        let manifest = d.path().join("m.toml");
        std::fs::write(&manifest, text).unwrap();
        let o = batch(&[
            manifest.to_str().unwrap(),
            "--out",
            d.path().join("o").to_str().unwrap(),
        ]);
        assert_eq!(o.status.code(), Some(2), "{text}");
        assert!(stderr(&o).contains(needle), "{needle}: {}", stderr(&o));
    }
}

#[test]
fn csv_manifest_works_like_toml() {
    let d = tmp();
    let roads = sample_roads();
    let manifest = d.path().join("m.csv");
    std::fs::write(
        &manifest,
        // No sites: `effort` would be refused here as `--effort` is (it would be ignored).
        format!(
            "name,roads,snap,default_damage\nEastvane,{},1,0.8\n",
            roads.display()
        ),
    )
    .unwrap();
    let out = d.path().join("out");
    let o = batch(&[
        manifest.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let s = read_json(&out.join("Eastvane/summary.json"));
    assert_eq!(s["settings"]["snap_m"], 1.0);
    assert_eq!(s["settings"]["default_damage"], 0.8);
}
