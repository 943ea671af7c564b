//! Batch integrity that must succeed: resume sees every input file and every output file, defaults
//! apply every key with paths relative to the manifest, merge only adds its own files.

mod common;
use common::bad::{file, shapefile_roads, snapshot, two_roads};
use common::batch::*;
use common::*;
use std::path::Path;

/// A closed square zone around the grid's centre, damage 2.
fn zones(d: &Path) -> std::path::PathBuf {
    let ring = "[[0.0005,0.0005],[0.0015,0.0005],[0.0015,0.0015],[0.0005,0.0015],[0.0005,0.0005]]";
    file(
        d,
        "zones.geojson",
        format!(
            r#"{{"type":"FeatureCollection","features":[{{"type":"Feature","properties":{{"damage":2}},"geometry":{{"type":"Polygon","coordinates":[{ring}]}}}}]}}"#
        ),
    )
}

/// One field report of a closed road at the grid's corner.
fn reports(d: &Path) -> std::path::PathBuf {
    file(
        d,
        "reports.geojson",
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"damage":"closed"},"geometry":{"type":"Point","coordinates":[0.0015,0.002]}}]}"#,
    )
}

#[test]
fn resume_reruns_a_district_whose_layers_were_deleted() {
    let d = tmp();
    grid_roads(d.path(), "roads.geojson");
    corner_sites(d.path(), "sites.geojson");
    let m = manifest(
        d.path(),
        "m.toml",
        "[defaults]\nroads = \"roads.geojson\"\n\n[[district]]\nname = \"Eastvane\"\nsites = \"sites.geojson\"\n\n[[district]]\nname = \"Westvane\"\n",
    );
    let out = d.path().join("out");
    assert_eq!(batch(&m, &out, &[]).status.code(), Some(0));
    let plan = std::fs::read(out.join("Eastvane/plan.geojson")).unwrap();
    for gone in ["plan.geojson", "sites.geojson"] {
        std::fs::remove_file(out.join("Eastvane").join(gone)).unwrap();
        let o = batch(&m, &out, &["--resume"]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        assert_eq!(
            statuses(&out, "batch-summary"),
            ["ok", "unchanged"],
            "{gone} deleted"
        );
        assert!(
            out.join("Eastvane").join(gone).exists(),
            "{gone} written again"
        );
    }
    assert_eq!(
        std::fs::read(out.join("Eastvane/plan.geojson")).unwrap(),
        plan
    );
    let o = batch(&m, &out, &["--resume"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert_eq!(statuses(&out, "batch-summary"), ["unchanged", "unchanged"]);
}

/// A sidecar's extension and a change to make to it.
type Edit = (&'static str, fn(&Path));

#[test]
fn resume_fingerprints_every_file_of_a_shapefile() {
    let d = tmp();
    let shp = shapefile_roads(d.path(), "roads.shp", &two_roads());
    // A second district reads its sites and zones from Shapefiles.
    grid_roads(d.path(), "grid.geojson");
    shapefile_sites(d.path(), "sites.shp");
    shapefile_zones(d.path(), "zones.shp");
    let m = manifest(
        d.path(),
        "m.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"roads.shp\"\n\n[[district]]\nname = \"Westvane\"\nroads = \"grid.geojson\"\nsites = \"sites.shp\"\ndamage_zones = \"zones.shp\"\n",
    );
    let out = d.path().join("out");
    assert_eq!(batch(&m, &out, &[]).status.code(), Some(0));
    let resume = || {
        let o = batch(&m, &out, &["--resume"]);
        assert_ne!(o.status.code(), Some(2), "{}", stderr(&o));
        statuses(&out, "batch-summary").remove(0)
    };
    assert_eq!(
        resume(),
        "unchanged",
        "an unchanged Shapefile district is skipped"
    );
    assert_eq!(
        statuses(&out, "batch-summary")[1],
        "unchanged",
        "Shapefile sites and zones"
    );
    let westvane = read_json(&out.join("Westvane/summary.json"));
    assert_eq!(westvane["counts"]["damage_zones"], 1);
    assert_eq!(westvane["sites"]["joined_to_hub"], 2);
    let edits: [Edit; 4] = [
        ("prj", |p| {
            let t = std::fs::read_to_string(p).unwrap();
            std::fs::write(p, t + "\n").unwrap();
        }),
        ("cpg", |p| std::fs::write(p, "UTF-8").unwrap()),
        ("dbf", |p| {
            let mut b = std::fs::read(p).unwrap();
            let at = b.windows(6).position(|w| w == b"Road 0").unwrap();
            b[at + 5] = b'X';
            std::fs::write(p, b).unwrap();
        }),
        ("shx", |p| {
            let mut b = std::fs::read(p).unwrap();
            b.extend_from_slice(&[0; 8]);
            std::fs::write(p, b).unwrap();
        }),
    ];
    for (ext, edit) in edits {
        edit(&shp.with_extension(ext));
        assert_ne!(resume(), "unchanged", "the .{ext} changed");
        if ext != "shx" {
            assert_eq!(resume(), "unchanged", "after the .{ext} change was planned");
        }
    }
}

#[test]
fn resume_fingerprints_zones_reports_and_the_cost_table() {
    let d = tmp();
    grid_roads(d.path(), "roads.geojson");
    zones(d.path());
    reports(d.path());
    // Class rates (read from the damage field's values here): categories would need a category
    // field, and a table that changes nothing is refused.
    let costs = file(
        d.path(),
        "costs.toml",
        "[classes]\nfield = \"damage\"\ndefault = 1\n",
    );
    let m = manifest(
        d.path(),
        "m.toml",
        "[defaults]\ndamage_zones = \"zones.geojson\"\ndamage_points = \"reports.geojson\"\ncost_table = \"costs.toml\"\n\n[[district]]\nname = \"Eastvane\"\nroads = \"roads.geojson\"\n",
    );
    let out = d.path().join("out");
    assert_eq!(batch(&m, &out, &[]).status.code(), Some(0));
    let s = read_json(&out.join("Eastvane/summary.json"));
    let roles: Vec<&str> = s["inputs"]
        .as_array()
        .unwrap()
        .iter()
        .map(|i| i["role"].as_str().unwrap())
        .collect();
    assert_eq!(
        roles,
        ["roads", "damage zones", "damage reports", "cost table"]
    );
    assert_eq!(batch(&m, &out, &["--resume"]).status.code(), Some(0));
    assert_eq!(statuses(&out, "batch-summary"), ["unchanged"]);
    for changed in [
        costs,
        d.path().join("zones.geojson"),
        d.path().join("reports.geojson"),
    ] {
        // Same meaning, other bytes: the content decides, not the settings read from it.
        let t = std::fs::read_to_string(&changed).unwrap();
        std::fs::write(
            &changed,
            if t.starts_with('[') {
                t + "# edited\n"
            } else {
                t + "\n"
            },
        )
        .unwrap();
        assert_eq!(batch(&m, &out, &["--resume"]).status.code(), Some(0));
        assert_eq!(
            statuses(&out, "batch-summary"),
            ["ok"],
            "{}",
            changed.display()
        );
    }
}

#[test]
fn defaults_paths_are_relative_to_the_manifest() {
    let d = tmp();
    let shared = d.path().join("region/shared");
    std::fs::create_dir_all(&shared).unwrap();
    grid_roads(&shared, "roads.geojson");
    corner_sites(&shared, "sites.geojson");
    zones(&shared);
    reports(&shared);
    file(
        &shared,
        "costs.toml",
        "[classes]\nfield = \"damage\"\ndefault = 1\n",
    );
    manifest(
        &d.path().join("region"),
        "m.toml",
        "[defaults]\nroads = \"shared/roads.geojson\"\nsites = \"shared/sites.geojson\"\ndamage_zones = \"shared/zones.geojson\"\ndamage_points = \"shared/reports.geojson\"\ncost_table = \"shared/costs.toml\"\nhub = \"A\"\n\n[[district]]\nname = \"Eastvane\"\n",
    );
    // Run from the folder above the manifest's, with the manifest's path relative to it.
    let o = reknit()
        .current_dir(d.path())
        .args(["batch", "region/m.toml", "--out", "out", "-q"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let s = read_json(&d.path().join("out/Eastvane/summary.json"));
    let inputs = s["inputs"].as_array().unwrap();
    assert_eq!(inputs.len(), 5, "{inputs:?}");
    assert_eq!(
        s["counts"]["damage_zones"], 1,
        "zones from [defaults] applied"
    );
    assert_eq!(
        s["damage_reports"]["applied"], 1,
        "reports from [defaults] applied"
    );
    assert_eq!(s["sites"]["hub"], "A");
}

#[test]
fn summary_lists_every_output_file() {
    let d = tmp();
    let roads = grid_roads(d.path(), "roads.geojson");
    let sites = corner_sites(d.path(), "sites.geojson");
    for (name, extra) in [
        ("whole", vec![]),
        (
            "sites",
            vec!["--sites", sites.to_str().unwrap(), "--redundancy"],
        ),
    ] {
        let out = d.path().join(name);
        let mut args = vec![
            "plan",
            "--roads",
            roads.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "-q",
        ];
        args.extend(extra);
        let o = run(&args);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        let s = read_json(&out.join("summary.json"));
        let mut listed: Vec<String> = s["outputs"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_str().unwrap().to_string())
            .collect();
        assert_eq!(listed.last().map(String::as_str), Some("summary.json"));
        listed.sort();
        let mut visible = listing(&out);
        visible.retain(|n| n != ".reknit-outputs");
        assert_eq!(listed, visible, "{name}");
    }
}

/// Shards 1/2 and 2/2 of a two-district manifest written into `out`.
fn two_shards(d: &Path, out: &Path) {
    grid_roads(d, "a.geojson");
    let big = grid_roads(d, "b.geojson");
    std::fs::write(&big, std::fs::read_to_string(&big).unwrap() + "\n\n").unwrap();
    let m = manifest(
        d,
        "m.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"a.geojson\"\n\n[[district]]\nname = \"Westvane\"\nroads = \"b.geojson\"\n",
    );
    for k in ["1/2", "2/2"] {
        assert_eq!(batch(&m, out, &["--shard", k]).status.code(), Some(0));
    }
}

#[test]
fn merge_only_adds_its_own_files() {
    let d = tmp();
    let out = d.path().join("out");
    two_shards(d.path(), &out);
    let before = snapshot(&out, Path::new("/nonexistent"));
    let o = run(&["merge", out.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let after = snapshot(&out, Path::new("/nonexistent"));
    for (p, v) in &before {
        assert!(after.get(p) == Some(v), "{} changed", p.display());
    }
    let added: Vec<String> = after
        .keys()
        .filter(|p| !before.contains_key(*p))
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(added, ["batch-summary.csv", "batch-summary.json"]);
}

#[test]
fn summaries_never_share_a_temporary_file() {
    let d = tmp();
    let out = d.path().join("out");
    two_shards(d.path(), &out);
    // Another writer's temporary file under the name a fixed scheme would use is left alone.
    let theirs = out.join(".batch-summary.json.tmp");
    std::fs::write(&theirs, "another writer").unwrap();
    // Merges at once into one folder all succeed with the same result.
    let children: Vec<_> = (0..6)
        .map(|_| {
            reknit()
                .args(["merge", out.to_str().unwrap()])
                .stderr(std::process::Stdio::piped())
                .spawn()
                .unwrap()
        })
        .collect();
    for c in children {
        let o = c.wait_with_output().unwrap();
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    }
    assert_eq!(std::fs::read_to_string(&theirs).unwrap(), "another writer");
    let s = read_json(&out.join("batch-summary.json"));
    assert_eq!(s["rows"].as_array().unwrap().len(), 2);
    let left: Vec<String> = listing(&out)
        .into_iter()
        .filter(|n| n.ends_with(".tmp"))
        .collect();
    assert_eq!(
        left,
        [".batch-summary.json.tmp"],
        "no temporary file of reknit's left"
    );
}
