//! The bad-input catalogue, part for values and archives that strain the readers' buffers and
//! bounds (docs/bad-inputs.md lists every case): long strings straddling the GeoJSON scanner's
//! refills, zip members named twice, sets too large to inflate, members that are not what their
//! name says.

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

/// A string of `n` bytes holding a quote, backslashes and several-byte characters.
fn long_text(n: usize) -> String {
    let unit = "Rue \\\"é\\\\ ";
    unit.repeat(n / unit.len() + 1)
}

case!(long_strings_across_refills, |d| {
    // Two features per layer, each with a property of about 1.5 MiB: the GeoJSON scanner reads
    // 1 MiB at a time, so every string starts in one buffer and ends in a later one.
    let t = long_text(1_500_000);
    let props = |extra: &str| format!(r#"{{"note":"{t}","other":"{t}"{extra}}}"#);
    let roads = file(
        d,
        "roads.geojson",
        fc(&[
            &line(&[[0.0, 0.0], [0.001, 0.0]], &props(r#","damage":0"#)),
            &line(&[[0.001, 0.0], [0.002, 0.0]], &props(r#","damage":0"#)),
        ]),
    );
    let site = |id: &str, lon: f64| {
        format!(
            r#"{{"type":"Feature","properties":{{"site_id":"{id}","name":"{t}","priority":1}},"geometry":{{"type":"Point","coordinates":[{lon},0]}}}}"#
        )
    };
    let sites = file(
        d,
        "sites.geojson",
        fc(&[&site("a", 0.0), &site("b", 0.002)]),
    );
    let zone = format!(
        r#"{{"type":"Feature","properties":{{"damage":0.5,"note":"{t}"}},"geometry":{{"type":"Polygon","coordinates":[[[0.0004,-0.001],[0.0006,-0.001],[0.0006,0.001],[0.0004,-0.001]]]}}}}"#
    );
    let zones = file(d, "zones.geojson", fc(&[&zone, &zone]));
    let report = |lon: f64| {
        format!(
            r#"{{"type":"Feature","properties":{{"damage":1,"note":"{t}"}},"geometry":{{"type":"Point","coordinates":[{lon},0]}}}}"#
        )
    };
    let reports = file(
        d,
        "reports.geojson",
        fc(&[&report(0.0015), &report(0.0016)]),
    );
    let out = plan_ok(
        d,
        &[
            "--roads",
            &s(&roads),
            "--sites",
            &s(&sites),
            "--damage-zones",
            &s(&zones),
            "--damage-points",
            &s(&reports),
        ],
    );
    // The long site name is carried whole into the sites layer.
    let name: String = serde_json::from_str(&format!("\"{t}\"")).unwrap();
    let sites_out = read_json(&out.join("sites.geojson"));
    let names: Vec<&str> = sites_out["features"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|f| f["properties"]["name"].as_str())
        .collect();
    // Names are read trimmed (the text ends with a space).
    assert_eq!(names, [name.trim(), name.trim()], "site names cut or lost");
    std::fs::remove_dir_all(out).unwrap();
});

/// A zip of the two-road Shapefile set twice, under `a/` and `b/`, with every `b/` name then
/// rewritten to `a/` (same length, in the local and central headers): two members per name.
fn zip_with_twins(d: &Path) -> std::path::PathBuf {
    use common::zipped::*;
    let sub = d.join("set");
    std::fs::create_dir_all(&sub).unwrap();
    let shp = shapefile_roads(&sub, "lanes.shp", &two_roads());
    let mut entries = set_entries(&shp, "a/");
    entries.extend(set_entries(&shp, "b/"));
    let p = zip_owned(d, "twins.zip", &entries);
    std::fs::remove_dir_all(&sub).unwrap();
    let mut b = std::fs::read(&p).unwrap();
    let mut i = 0;
    while let Some(k) = b[i..].windows(7).position(|w| w == b"b/lanes") {
        b[i + k] = b'a';
        i += k + 7;
    }
    std::fs::write(&p, b).unwrap();
    p
}

case!(zip_member_named_twice, |d| {
    let p = zip_with_twins(d);
    plan_fails(
        &p,
        &[],
        &[
            "twins.zip",
            "two members with the same name",
            "\"a/lanes.shp\"",
        ],
    );
});

case!(zip_set_too_large_together, |d| {
    // Each of the .shp and .dbf declares 600 MiB, under the 1 GiB a member may take, but the set
    // together is over the 1 GiB bound: refused before anything is inflated.
    use common::zipped::*;
    let sub = d.join("set");
    std::fs::create_dir_all(&sub).unwrap();
    let shp = shapefile_roads(&sub, "lanes.shp", &two_roads());
    let p = zip_owned(d, "big.zip", &set_entries(&shp, ""));
    std::fs::remove_dir_all(&sub).unwrap();
    declare_size(&p, "lanes.shp", 600 << 20);
    declare_size(&p, "lanes.dbf", 600 << 20);
    plan_fails(&p, &[], &["big.zip", "1024 MiB", "unzip"]);
});

case!(zip_member_not_what_its_name_says, |d| {
    // A .shp of zeros (file code 0, not 9994: ESRI Shapefile Technical Description, 1998,
    // table 1) and a .dbf of zeros: refused from their first bytes.
    use common::zipped::*;
    let sub = d.join("set");
    std::fs::create_dir_all(&sub).unwrap();
    let shp = shapefile_roads(&sub, "lanes.shp", &two_roads());
    let good = set_entries(&shp, "");
    std::fs::remove_dir_all(&sub).unwrap();
    for (bad, needle) in [(".shp", "file code is 0"), (".dbf", "not a dBASE table")] {
        let entries: Vec<(String, Vec<u8>)> = good
            .iter()
            .map(|(n, b)| match n.ends_with(bad) {
                true => (n.clone(), vec![0u8; 100_000]),
                false => (n.clone(), b.clone()),
            })
            .collect();
        let p = zip_owned(d, "zeros.zip", &entries);
        plan_fails(&p, &[], &["zeros.zip", &format!("lanes{bad}"), needle]);
        std::fs::remove_file(p).unwrap();
    }
});
