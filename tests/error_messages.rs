//! Every error message says each cause once: for errors from each layer (the file system, the
//! JSON, TOML and dBASE readers, the settings, the manifest), no clause of the message repeats.

mod common;
use common::*;
use std::path::Path;

/// The error line of a failed run, after checking the run failed with exit code 2.
fn error_line(args: &[String]) -> String {
    let a: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = run(&a);
    assert_eq!(
        o.status.code(),
        Some(2),
        "{args:?} should fail: {}",
        stderr(&o)
    );
    let e = stderr(&o);
    e.lines()
        .find(|l| l.starts_with("reknit: error: "))
        .unwrap_or_else(|| panic!("no error line for {args:?}: {e}"))
        .to_string()
}

/// Fails when any clause (text between ": " separators) of 12 or more characters appears more
/// than once in the message.
fn assert_no_repeat(msg: &str) {
    for clause in msg.split(": ").map(str::trim).filter(|c| c.len() >= 12) {
        assert_eq!(
            msg.matches(clause).count(),
            1,
            "the clause {clause:?} repeats in: {msg}"
        );
    }
}

fn path_text(p: &Path) -> String {
    p.display().to_string()
}

#[test]
fn no_error_message_repeats_its_cause() {
    let d = tmp();
    let dir = d.path();
    let roads = write_collection(
        dir,
        "roads.geojson",
        &[line(&[[0.0, 0.0], [0.001, 0.0]], "{}")],
    );
    let out = path_text(&dir.join("out"));
    let bad_json = dir.join("bad.geojson");
    std::fs::write(
        &bad_json,
        "{\"type\":\"FeatureCollection\",\"features\":[{\"type\":",
    )
    .unwrap();
    let utf16 = dir.join("utf16.geojson");
    std::fs::write(&utf16, [0xFF, 0xFE, b'{', 0, b'}', 0]).unwrap();
    let bad_toml = dir.join("costs.toml");
    std::fs::write(&bad_toml, "[classes\nfield = ").unwrap();
    let bad_manifest = dir.join("districts.toml");
    std::fs::write(&bad_manifest, "[[district]]\nname = \"A\"\nroads = 3\n").unwrap();
    let shp = dir.join("roads.shp");
    std::fs::write(&shp, b"not a shapefile at all, not even its header").unwrap();
    let plan = |extra: &[String]| {
        let mut a = vec!["plan".to_string(), "--out".into(), out.clone()];
        a.extend_from_slice(extra);
        a
    };
    let cases = [
        plan(&["--roads".into(), path_text(&dir.join("missing.geojson"))]),
        plan(&["--roads".into(), path_text(&bad_json)]),
        plan(&["--roads".into(), path_text(&utf16)]),
        plan(&["--roads".into(), path_text(dir)]),
        plan(&["--roads".into(), path_text(&shp)]),
        plan(&[
            "--roads".into(),
            path_text(&roads),
            "--cost-table".into(),
            path_text(&bad_toml),
        ]),
        plan(&[
            "--roads".into(),
            path_text(&roads),
            "--crs".into(),
            "EPSG:1".into(),
        ]),
        plan(&[
            "--roads".into(),
            path_text(&roads),
            "--sites".into(),
            path_text(&bad_json),
        ]),
        vec![
            "batch".into(),
            path_text(&bad_manifest),
            "--out".into(),
            path_text(&dir.join("b")),
        ],
    ];
    for args in &cases {
        let msg = error_line(args);
        assert_no_repeat(&msg);
    }
}

#[test]
fn the_repeat_check_catches_a_repeat() {
    let r = std::panic::catch_unwind(|| {
        assert_no_repeat("reknit: error: cannot read roads.geojson: cannot read roads.geojson")
    });
    assert!(r.is_err());
}
