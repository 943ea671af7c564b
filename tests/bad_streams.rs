//! The bad-input catalogue, part 3 (docs/bad-inputs.md lists every case): JSON member names given
//! twice, endless or oversized inputs, byte-order marks, UTF-16 and files in other formats, each
//! run through every reader the rule applies to.

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

/// A Point site feature with an extra `name`.
const SITE: &str = r#"{"type":"Feature","properties":{"site_id":"a"},"geometry":{"type":"Point","coordinates":[0,0]}}"#;
const ZONE: &str = r#"{"type":"Feature","properties":{"damage":2},"geometry":{"type":"Polygon","coordinates":[[[0,-1],[1,-1],[1,1],[0,-1]]]}}"#;
const REPORT: &str = r#"{"type":"Feature","properties":{"damage":2},"geometry":{"type":"Point","coordinates":[0.0005,0]}}"#;

/// The GeoJSON readers: (role, the flag that reads it, a valid feature of it).
const GEOJSON_READERS: [(&str, &str, &str); 4] = [
    ("roads", "--roads", OK_LINE),
    ("sites", "--sites", SITE),
    ("zones", "--damage-zones", ZONE),
    ("reports", "--damage-points", REPORT),
];

/// `plan` arguments reading `path` in `role`, with a valid road layer for the other roles.
fn plan_args(d: &Path, flag: &str, path: &Path) -> Vec<String> {
    let mut a = vec!["plan".to_string(), "--out".into(), s(&d.join("out"))];
    if flag != "--roads" {
        a.extend(["--roads".into(), s(&roads_ok(d))]);
    }
    a.extend([flag.to_string(), s(path)]);
    a
}

/// A batch manifest's text with one district on a valid road layer (written into `d`).
fn manifest_text(d: &Path) -> String {
    roads_ok(d);
    "[[district]]\nname = \"Eastvane\"\nroads = \"roads.geojson\"\n".to_string()
}

/// Arguments that read the file at the path given.
type Args<'a> = Box<dyn Fn(&Path) -> Vec<String> + 'a>;

/// Every text reader, as (file name, valid content, arguments reading the file at the path given).
fn text_readers(d: &Path) -> Vec<(&'static str, String, Args<'_>)> {
    let mut v: Vec<(&'static str, String, Args<'_>)> = Vec::new();
    for (role, flag, feature) in GEOJSON_READERS {
        let name = match role {
            "roads" => "roads.geojson",
            "sites" => "sites.geojson",
            "zones" => "zones.geojson",
            _ => "reports.geojson",
        };
        v.push((
            name,
            fc(&[feature]),
            Box::new(move |p| plan_args(d, flag, p)),
        ));
    }
    v.push((
        "sites.csv",
        "site_id,lon,lat\na,0,0\n".into(),
        Box::new(move |p| plan_args(d, "--sites", p)),
    ));
    v.push((
        "costs.toml",
        "[categories]\n".into(),
        Box::new(move |p| plan_args(d, "--cost-table", p)),
    ));
    v.push((
        "m.toml",
        manifest_text(d),
        Box::new(move |p| vec!["batch".into(), s(p), "--out".into(), s(&d.join("out"))]),
    ));
    v
}

/// Runs reknit under an address-space limit of 1 GiB (util-linux `prlimit`).
fn bounded(args: &[String]) -> std::process::Output {
    std::process::Command::new("prlimit")
        .arg("--as=1073741824")
        .arg(env!("CARGO_BIN_EXE_reknit"))
        .args(args)
        .output()
        .expect("run prlimit")
}

// ---- Limits ----

case!(endless_zeros_in_every_reader, |d| {
    // 5 GiB of zero bytes (a sparse regular file: devices are refused before they are read) under
    // each reader's name: each stops at its documented limit within 1 GiB of address space.
    for (name, _, args) in text_readers(d) {
        let p = d.join(name);
        let _ = std::fs::remove_file(&p);
        std::fs::File::create(&p).unwrap().set_len(5 << 30).unwrap();
        let o = bounded(&args(&p));
        let msg = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{name}: {msg}");
        assert!(msg.contains(name) && msg.contains("limit"), "{name}: {msg}");
        assert!(
            !msg.contains("panicked") && !msg.contains("memory"),
            "{name}: {msg}"
        );
        std::fs::remove_file(&p).unwrap();
    }
});

case!(a_string_beyond_the_limit, |d| {
    // 65 MiB of name in one string: over the 64 MiB limit of a single string, refused by feature.
    let mut bytes =
        br#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":""#
            .to_vec();
    bytes.resize(bytes.len() + (65 << 20), b'x');
    bytes.extend_from_slice(br#""},"geometry":null}]}"#);
    let p = file(d, "roads.geojson", bytes);
    let o = bounded(&plan_args(d, "--roads", &p));
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{msg}");
    for n in ["roads.geojson", "feature 0", "64 MiB"] {
        assert!(msg.contains(n), "{n}: {msg}");
    }
});

case!(a_cost_table_beyond_the_limit, |d| {
    let mut text = "[damage]\n".to_string();
    text.push_str(&"# padding\n".repeat((17 << 20) / 10));
    let p = file(d, "costs.toml", text);
    plan_fails(
        &roads_ok(d),
        &["--cost-table", &s(&p)],
        &["costs.toml", "16 MiB"],
    );
});

// ---- Encodings and formats ----

case!(byte_order_mark_in_every_reader, |d| {
    // RFC 8259 §8.1: a parser may ignore a leading byte-order mark; spreadsheets write one.
    for (name, text, args) in text_readers(d) {
        let mut bytes = b"\xEF\xBB\xBF".to_vec();
        bytes.extend_from_slice(text.as_bytes());
        let p = file(d, name, bytes);
        let o = reknit().args(args(&p)).arg("-q").output().unwrap();
        assert!(o.status.success(), "{name}: {}", stderr(&o));
        std::fs::remove_dir_all(d.join("out")).unwrap();
    }
});

case!(utf16_in_every_reader, |d| {
    for (name, text, args) in text_readers(d) {
        for bom in [&b"\xFF\xFE"[..], b""] {
            let mut bytes = bom.to_vec();
            bytes.extend(text.encode_utf16().flat_map(u16::to_le_bytes));
            let p = file(d, name, bytes);
            fails_with(d, &d.join("out"), &args(&p), &[name, "UTF-16", "iconv"]);
        }
        file(d, name, text);
    }
});

case!(archives_and_extracts_are_named, |d| {
    // Magic numbers: ZIP (APPNOTE 4.3.7 local file header), gzip (RFC 1952 §2.3.1), and an
    // OpenStreetMap PBF file's first BlobHeader (type "OSMHeader").
    let mut pbf = vec![0, 0, 0, 14, 0x0a, 9];
    pbf.extend_from_slice(b"OSMHeader\x18\x80\x01");
    let cases: [(&str, Vec<u8>, &str); 3] = [
        (
            "roads.geojson",
            b"PK\x03\x04\x14\x00\x00\x00".to_vec(),
            "unzip",
        ),
        (
            "roads.geojson",
            b"\x1F\x8B\x08\x00\x00\x00".to_vec(),
            "gunzip",
        ),
        ("roads.geojson", pbf, "ogr2ogr -f GeoJSON"),
    ];
    for (name, bytes, needle) in cases {
        let p = file(d, name, bytes);
        plan_fails(&p, &[], &[name, needle]);
    }
});

case!(semicolon_separated_csv, |d| {
    // RFC 4180 §2: fields are separated by commas. Sites are read with `;` and tabs too (told from
    // the header line), but not with `|`; a manifest is comma-separated only.
    let sites = file(d, "sites.csv", "site_id|lon|lat\na|0|0\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&sites)],
        &[
            "sites.csv",
            "one column holding '|'",
            "a semicolon or a tab",
        ],
    );
    let m = file(d, "m.csv", "name;roads\nEastvane;roads.geojson\n");
    let out = d.join("out");
    fails_with(
        d,
        &out,
        &["batch".into(), s(&m), "--out".into(), s(&out)],
        &["m.csv", "comma-separated"],
    );
});

// ---- Member names given twice (RFC 8259 §4: names within an object should be unique) ----

/// `feature` with the property `k` given twice.
fn property_twice(feature: &str) -> String {
    let once = feature.replace(r#""properties":{}"#, r#""properties":{"k":1,"k":2}"#);
    if once != feature {
        return once;
    }
    feature.replace(r#""properties":{"#, r#""properties":{"k":1,"k":2,"#)
}

case!(a_member_given_twice_in_any_geojson_reader, |d| {
    // A Point geometry followed by a LineString one would join their positions into a phantom road;
    // a second `properties` would be merged key by key. Every such object is refused, by feature.
    for (role, flag, feature) in GEOJSON_READERS {
        let twice = [
            (
                "geometry",
                feature.replace(r#""geometry":"#, r#""geometry":null,"geometry":"#),
            ),
            (
                "coordinates",
                feature.replace(r#""coordinates":"#, r#""coordinates":[],"coordinates":"#),
            ),
            (
                "properties",
                feature.replace(r#""properties":"#, r#""properties":{"x":1},"properties":"#),
            ),
            (
                "type",
                feature.replace(
                    r#""type":"Feature""#,
                    r#""type":"Feature","type":"Feature""#,
                ),
            ),
            ("k", property_twice(feature)),
            // Nested: an object inside a property, inside the geometry, beside the features.
            (
                "n",
                feature.replace(r#""properties":{"#, r#""properties":{"o":[{"n":1,"n":2}],"#),
            ),
            (
                "m",
                feature.replace(r#""geometry":{"#, r#""geometry":{"x":{"m":1,"m":2},"#),
            ),
            (
                "f",
                feature.replace(
                    r#""type":"Feature""#,
                    r#""type":"Feature","y":{"f":{},"f":0}"#,
                ),
            ),
        ];
        for (member, text) in twice {
            assert_ne!(text, feature);
            let name = format!("{role}.geojson");
            let p = file(d, &name, fc(&[&text]));
            let needle = format!("\"{member}\" appears twice");
            fails_with(
                d,
                &d.join("out"),
                &plan_args(d, flag, &p),
                &[&name, "feature 0", &needle],
            );
        }
    }
});

case!(a_collection_member_given_twice, |d| {
    let text = format!(r#"{{"type":"FeatureCollection","features":[],"features":[{OK_LINE}]}}"#);
    plan_fails(
        &file(d, "roads.geojson", text),
        &[],
        &["roads.geojson", "\"features\" appears twice"],
    );
});

case!(a_point_then_a_line_as_one_geometry, |d| {
    // Read as one geometry, the two would become a line from the point to the line's far end.
    let f = r#"{"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[0,0],"type":"LineString","coordinates":[[1,1],[1.001,1]]}}"#;
    plan_fails(
        &file(d, "roads.geojson", fc(&[f])),
        &[],
        &["roads.geojson", "feature 0", "appears twice"],
    );
});

// ---- Text that leaves reknit ----

/// Road and site layers whose names and ids hold control characters and formula starts.
fn hostile_names(d: &Path, sites_name: &str) -> (std::path::PathBuf, std::path::PathBuf) {
    let roads = serde_json::json!({"type": "FeatureCollection", "features": [
        {"type": "Feature", "id": "+id\u{7}", "properties": {"name": "=HYPERLINK(\"x\")\u{1}"},
         "geometry": {"type": "LineString", "coordinates": [[-0.001, 0], [0, 0]]}},
        {"type": "Feature", "id": "@2", "properties": {"name": "-Main\u{1b}[31m"},
         "geometry": {"type": "LineString", "coordinates": [[0, 0], [0.001, 0]]}},
        {"type": "Feature", "properties": {"name": "\tTab road"},
         "geometry": {"type": "LineString", "coordinates": [[0.001, 0], [0.002, 0]]}}
    ]});
    let roads = file(d, "roads.geojson", roads.to_string());
    let sites = if sites_name.ends_with(".csv") {
        "site_id,name,lon,lat\n=a,\"Clinic\u{1} A\",-0.001,0\n-b\u{2},B,0.002,0\n".to_string()
    } else {
        serde_json::json!({"type": "FeatureCollection", "features": [
            {"type": "Feature", "properties": {"site_id": "=a", "name": "Clinic\u{1} A"},
             "geometry": {"type": "Point", "coordinates": [-0.001, 0]}},
            {"type": "Feature", "properties": {"site_id": "-b\u{2}", "name": "B"},
             "geometry": {"type": "Point", "coordinates": [0.002, 0]}}
        ]})
        .to_string()
    };
    (roads, file(d, sites_name, sites))
}

case!(control_characters_in_names_reach_no_output, |d| {
    // XML 1.0 §2.2 and the HTML parsing rules allow no C0 controls other than white space; a
    // spreadsheet or terminal would act on them. The run succeeds and every output is clean.
    for sites_name in ["sites.geojson", "sites.csv"] {
        let (roads, sites) = hostile_names(d, sites_name);
        let out = plan_ok(
            d,
            &["--roads", &s(&roads), "--sites", &s(&sites), "--force"],
        );
        for name in ["plan.svg", "report.html", "map.html", "work-orders.csv"] {
            let text = std::fs::read_to_string(out.join(name)).unwrap();
            let bad = text
                .chars()
                .find(|c| c.is_control() && !"\n\r\t".contains(*c));
            assert_eq!(bad, None, "{sites_name}: {name} holds a control character");
            assert!(
                text.contains('\u{FFFD}'),
                "{sites_name}: {name} lost the replaced names"
            );
        }
        assert!(out.join("plan.png").exists());
    }
    // On the terminal a control character is shown escaped: a duplicate id names itself.
    let dup = fc(&[
        &site_feature(r"a\u001b[2J", 0.0, 0.0),
        &site_feature(r"a\u001b[2J", 0.001, 0.0),
    ]);
    let p = file(d, "dup.geojson", dup);
    std::fs::remove_dir_all(d.join("out")).unwrap();
    let o = reknit().args(plan_args(d, "--sites", &p)).output().unwrap();
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{msg}");
    assert!(!msg.contains('\u{1b}') && msg.contains("\\u{1b}"), "{msg}");
    // So does a site reported as not connected in the run's own lines.
    let far = fc(&[
        &site_feature("near", 0.0, 0.0),
        &site_feature(r"far\u001b[2J", 10.0, 10.0),
    ]);
    let p = file(d, "far.geojson", far);
    let o = reknit().args(plan_args(d, "--sites", &p)).output().unwrap();
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(0), "{msg}");
    assert!(
        !msg.contains('\u{1b}') && msg.contains("far\\u{1b}[2J"),
        "{msg}"
    );
});

case!(formula_cells_are_neutralised_in_work_orders, |d| {
    // OWASP "CSV Injection": a free-text cell starting with = + - @ tab or CR gets a leading
    // apostrophe; numeric cells (negative longitudes) are never altered. RFC 4180 quoting applies.
    for sites_name in ["sites.geojson", "sites.csv"] {
        let (roads, sites) = hostile_names(d, sites_name);
        let out = plan_ok(
            d,
            &["--roads", &s(&roads), "--sites", &s(&sites), "--force"],
        );
        let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
        let h = r.headers().unwrap().clone();
        let col = |n: &str| h.iter().position(|x| x == n).unwrap();
        let mut roads_seen = Vec::new();
        for rec in r.records() {
            let rec = rec.unwrap();
            for n in ["source_id", "road", "category", "completes_sites"] {
                let v = &rec[col(n)];
                assert!(
                    !v.starts_with(['=', '+', '-', '@', '\t', '\r']),
                    "{n}: {v:?}"
                );
            }
            roads_seen.push(reknit::export::text::csv_text(&rec[col("road")]).to_string());
            if rec[col("source_id")].contains("+id") {
                assert_eq!(&rec[col("from_lon")], "-0.001");
            }
        }
        assert!(
            roads_seen.contains(&"-Main\u{FFFD}[31m".to_string()),
            "{roads_seen:?}"
        );
        assert!(
            roads_seen.contains(&"=HYPERLINK(\"x\")\u{FFFD}".to_string()),
            "{roads_seen:?}"
        );
    }
});

case!(no_negative_zero_in_any_output, |d| {
    // Figures that round to zero print as 0, never "-0" or "-0.000" (coordinates a hair west of
    // Greenwich and south of the equator).
    let line = r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[-0.00000001,-0.00000001],[-0.00000001,0.001]]}}"#;
    let roads = file(d, "roads.geojson", fc(&[line]));
    let sites = file(
        d,
        "sites.geojson",
        fc(&[
            &site_feature("a", -0.00000001, -0.00000001),
            &site_feature("b", -0.00000001, 0.001),
        ]),
    );
    let o = reknit()
        .args([
            "plan",
            "--roads",
            &s(&roads),
            "--sites",
            &s(&sites),
            "--out",
            &s(&d.join("out")),
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let negative_zero = regex_free_negative_zero;
    assert!(negative_zero("a -0.000 b") && negative_zero("[-0,1]") && negative_zero("-0.0%"));
    assert!(!negative_zero("-0.001") && !negative_zero("x-0") && !negative_zero("-0.5"));
    assert!(!negative_zero(&stderr(&o)), "terminal: {}", stderr(&o));
    for e in std::fs::read_dir(d.join("out")).unwrap() {
        let p = e.unwrap().path();
        if let Ok(text) = std::fs::read_to_string(&p) {
            assert!(!negative_zero(&text), "{}", p.display());
        }
    }
});

/// Whether `text` holds a number that is a negative zero ("-0", "-0.0", "-0.000"…).
fn regex_free_negative_zero(text: &str) -> bool {
    text.match_indices("-0").any(|(i, _)| {
        let rest = &text[i + 2..];
        let digits = rest.strip_prefix('.').map_or(rest, |r| r);
        let zeros = digits.len() - digits.trim_start_matches('0').len();
        let after = digits[zeros..].chars().next();
        let before = text[..i].chars().next_back();
        !before.is_some_and(|c| c.is_ascii_alphanumeric())
            && !after.is_some_and(|c| c.is_ascii_digit())
            && (zeros > 0 || !rest.starts_with('.'))
    })
}

// ---- Shard summaries read by `merge` ----

/// A two-district manifest run as two shards into `out`.
fn two_shards(d: &Path, out: &Path) {
    use common::batch::{batch, grid_roads, manifest};
    grid_roads(d, "roads.geojson");
    grid_roads(d, "roads-b.geojson");
    let m = manifest(
        d,
        "m.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"roads.geojson\"\n\n[[district]]\nname = \"Westvane\"\nroads = \"roads-b.geojson\"\n",
    );
    for k in ["1/2", "2/2"] {
        let o = batch(&m, out, &["--shard", k]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    }
}

case!(shard_summary_with_a_member_twice_or_endless, |d| {
    let out = d.join("out");
    two_shards(d, &out);
    let p = out.join("batch-summary-2-of-2.json");
    let text = std::fs::read_to_string(&p).unwrap();
    // A second "rows" member: which one counts would depend on the reader (RFC 8259 §4).
    let twice = text.replacen('{', "{\n  \"rows\": [],", 1);
    std::fs::write(&p, &twice).unwrap();
    let merge = ["merge".to_string(), s(&out)];
    fails_with(
        d,
        &out,
        &merge,
        &["batch-summary-2-of-2.json", "duplicate field `rows`"],
    );
    // A name twice inside an object within a row: no reader may pick one silently.
    let nested = text.replacen(
        "\"name\":",
        "\"note\": {\"k\": 1, \"k\": 2},\n      \"name\":",
        1,
    );
    assert_ne!(nested, text);
    std::fs::write(&p, &nested).unwrap();
    fails_with(
        d,
        &out,
        &merge,
        &["batch-summary-2-of-2.json", "\"k\" appears twice"],
    );
    std::fs::remove_file(&p).unwrap();
    std::os::unix::fs::symlink("/dev/zero", &p).unwrap();
    let o = bounded(&merge);
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{msg}");
    assert!(
        // A device is refused before it is read; a regular file past the cap would stop at it.
        msg.contains("batch-summary-2-of-2.json") && msg.contains("not a regular file"),
        "{msg}"
    );
    // With a byte-order mark the summary is read as it is.
    std::fs::remove_file(&p).unwrap();
    std::fs::write(&p, format!("\u{feff}{text}")).unwrap();
    let o = reknit().args(merge).output().unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
});
