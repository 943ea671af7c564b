//! The bad-input catalogue, part 4 (docs/bad-inputs.md lists every case): inputs that are not
//! regular files, manifest values that must mean what the same flag means, and batch text
//! written out.

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

/// Runs reknit under `timeout` (coreutils), so an input that blocks fails the test instead of
/// hanging it: exit 124 means the run was stopped.
fn run_bounded(args: &[String]) -> std::process::Output {
    std::process::Command::new("timeout")
        .args(["--kill-after=5", "60"])
        .arg(env!("CARGO_BIN_EXE_reknit"))
        .args(args)
        .output()
        .expect("run timeout")
}

/// Makes a named pipe at `p` (coreutils `mkfifo`).
fn mkfifo(p: &Path) {
    let _ = std::fs::remove_file(p);
    let ok = std::process::Command::new("mkfifo")
        .arg(p)
        .status()
        .unwrap();
    assert!(ok.success(), "mkfifo {}", p.display());
}

/// Every input a run reads, as (file name, arguments reading the file at the path given).
fn inputs(d: &Path) -> Vec<(&'static str, Vec<String>)> {
    let roads = s(&roads_ok(d));
    let out = s(&d.join("out"));
    let plan = |flag: &str, p: &Path| {
        let mut a = vec!["plan".to_string(), "--out".into(), out.clone()];
        if flag != "--roads" {
            a.extend(["--roads".into(), roads.clone()]);
        }
        a.extend([flag.into(), s(p)]);
        a
    };
    let mut v = Vec::new();
    for (name, flag) in [
        ("r.geojson", "--roads"),
        ("s.geojson", "--sites"),
        ("s.csv", "--sites"),
        ("z.geojson", "--damage-zones"),
        ("p.geojson", "--damage-points"),
        ("c.toml", "--cost-table"),
    ] {
        v.push((name, plan(flag, &d.join(name))));
    }
    v.push((
        "m.toml",
        vec![
            "batch".into(),
            s(&d.join("m.toml")),
            "--out".into(),
            out.clone(),
        ],
    ));
    // A road layer named inside a manifest goes through the same opening.
    file(
        d,
        "pipe-roads.toml",
        "[[district]]\nname = \"Eastvane\"\nroads = \"mr.geojson\"\n",
    );
    v.push((
        "mr.geojson",
        vec![
            "batch".into(),
            s(&d.join("pipe-roads.toml")),
            "--out".into(),
            out,
        ],
    ));
    v
}

case!(pipes_and_devices_are_not_read, |d| {
    // A named pipe blocks an open until a writer comes; a device never ends: every input is
    // checked to be a regular file before it is opened.
    for (name, args) in inputs(d) {
        let p = d.join(name);
        for (kind, make) in [
            ("named pipe", &(|p: &Path| mkfifo(p)) as &dyn Fn(&Path)),
            ("character device", &|p: &Path| {
                let _ = std::fs::remove_file(p);
                std::os::unix::fs::symlink("/dev/null", p).unwrap();
            }),
            ("directory", &|p: &Path| {
                let _ = std::fs::remove_file(p);
                std::fs::create_dir(p).unwrap();
            }),
        ] {
            make(&p);
            let o = run_bounded(&args);
            let msg = stderr(&o);
            // A district's road layer fails that district (exit 1, recorded in the batch
            // summary); any other input stops the run before anything is written (exit 2).
            let in_district = name == "mr.geojson";
            let code = if in_district { 1 } else { 2 };
            assert_eq!(o.status.code(), Some(code), "{name} as a {kind}: {msg}");
            for n in [name, kind, "not a regular file"] {
                assert!(msg.contains(n), "{name} as a {kind}: lacks {n:?}: {msg}");
            }
            if in_district {
                std::fs::remove_dir_all(d.join("out")).unwrap();
            }
            assert!(!d.join("out").exists(), "{name}: output left behind");
            if p.is_dir() {
                std::fs::remove_dir(&p).unwrap();
            } else {
                std::fs::remove_file(&p).unwrap();
            }
        }
    }
});

case!(a_pipe_in_a_shapefile_set, |d| {
    // Each member of a Shapefile set (.shp, .shx, .dbf, .prj) is checked before any is opened.
    for ext in ["shp", "shx", "dbf", "prj"] {
        let shp = shapefile_roads(d, "roads.shp", &two_roads());
        let member = shp.with_extension(ext);
        mkfifo(&member);
        let args = ["plan", "--roads", &s(&shp), "--out", &s(&d.join("out"))].map(String::from);
        let o = run_bounded(&args);
        let msg = stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{ext}: {msg}");
        let file = format!("roads.{ext}");
        for n in [file.as_str(), "named pipe", "not a regular file"] {
            assert!(msg.contains(n), "{ext}: lacks {n:?}: {msg}");
        }
        std::fs::remove_file(&member).unwrap();
    }
});

case!(formula_names_are_neutralised_in_the_batch_summary, |d| {
    // OWASP "CSV Injection": a district or road name starting = + - @ is written with a leading
    // `'` in every CSV reknit writes; numeric columns (costs, negative longitudes) are not.
    use common::batch::{batch, manifest};
    let names = [
        "=HYPERLINK(\"http://example.invalid\",\"open\")",
        "+Westvane",
        "@Fen",
    ];
    // West of Greenwich, so every longitude written is negative; damaged so the plan costs.
    let road = |i: usize, name: &str| {
        let y = i as f64 * 0.001;
        line(
            &[[-1.002, y], [-1.001, y]],
            &format!(r#"{{"name":{name:?},"damage":0.5}}"#),
        )
    };
    write_collection(
        d,
        "roads.geojson",
        &[
            road(0, "-1 Lane"),
            road(1, "=SUM(1,2)"),
            road(2, "Plain Street"),
        ],
    );
    let mut text = String::new();
    for n in names {
        text.push_str(&format!(
            "[[district]]\nname = {n:?}\nroads = \"roads.geojson\"\nwhole_network = true\n\n"
        ));
    }
    // A district that fails: its error cell is written through the same rule.
    text.push_str("[[district]]\nname = \"-Gone\"\nroads = \"missing.geojson\"\n");
    let m = manifest(d, "m.toml", &text);
    let out = d.join("out");
    let o = batch(&m, &out, &[]);
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let json = read_json(&out.join("batch-summary.json"));
    let mut r = csv::Reader::from_path(out.join("batch-summary.csv")).unwrap();
    let head = r.headers().unwrap().clone();
    let col = |n: &str| head.iter().position(|h| h == n).unwrap();
    let rows: Vec<csv::StringRecord> = r.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 4);
    for (i, rec) in rows.iter().enumerate() {
        let want = json["rows"][i]["name"].as_str().unwrap();
        let cell = &rec[col("name")];
        assert!(cell.starts_with('\''), "{cell:?}");
        // Read back through the one function that removes the prefix: the name as given.
        assert_eq!(reknit::export::text::csv_text(cell), want);
        for n in ["total_cost", "lower_bound", "gap", "junctions", "edges"] {
            let c = &rec[col(n)];
            assert!(!c.starts_with('\''), "{n}: {c:?}");
            match json["rows"][i][n].as_f64() {
                Some(x) => assert_eq!(c.parse::<f64>().unwrap(), x, "{n}"),
                None => assert_eq!(c, "", "{n}"),
            }
        }
    }
    let error = &rows[3][col("error")];
    assert_eq!(
        reknit::export::text::csv_text(error),
        json["rows"][3]["error"].as_str().unwrap()
    );
    // The district's work orders: road names neutralised, longitudes negative and unchanged.
    let folder = json["rows"][0]["folder"].as_str().unwrap();
    let mut w = csv::Reader::from_path(out.join(folder).join("work-orders.csv")).unwrap();
    let head = w.headers().unwrap().clone();
    let col = |n: &str| head.iter().position(|h| h == n).unwrap();
    let mut roads_seen = Vec::new();
    for rec in w.records().map(Result::unwrap) {
        let lon = &rec[col("from_lon")];
        assert!(lon.starts_with("-1.00"), "{lon:?}");
        let road = &rec[col("road")];
        if road.starts_with(['=', '+', '-', '@']) {
            panic!("road cell not neutralised: {road:?}");
        }
        roads_seen.push(reknit::export::text::csv_text(road).to_string());
    }
    roads_seen.sort();
    assert_eq!(roads_seen, ["-1 Lane", "=SUM(1,2)", "Plain Street"]);
});

/// Whether `text` holds a number that is a negative zero ("-0", "-0.0", "-0.000"…).
fn negative_zero(text: &str) -> bool {
    text.match_indices("-0").any(|(i, _)| {
        let rest = &text[i + 2..];
        let digits = rest.strip_prefix('.').unwrap_or(rest);
        let zeros = digits.len() - digits.trim_start_matches('0').len();
        let after = digits[zeros..].chars().next();
        let before = text[..i].chars().next_back();
        !before.is_some_and(|c| c.is_ascii_alphanumeric())
            && !after.is_some_and(|c| c.is_ascii_digit())
            && (zeros > 0 || !rest.starts_with('.'))
    })
}

#[test]
fn no_negative_zero_from_negative_zero_damage_in_any_format() {
    // A damage of -0 (not negative, so not closed) makes every cost of its road -0; coordinates a
    // hair west and south of 0° make tiny negative picture and map figures. Nothing written shows
    // a negative zero, whichever format the roads and sites come in.
    assert!(negative_zero("[-0,1]") && negative_zero("x=\"-0.0\"") && !negative_zero("-0.01"));
    let h = -0.0000001;
    for (roads_ext, sites_ext) in [("geojson", "csv"), ("shp", "geojson")] {
        let d = tmp();
        let d = d.path();
        let lines = vec![vec![[h, h], [h, 0.001]], vec![[h, 0.001], [0.001, 0.001]]];
        let roads = if roads_ext == "geojson" {
            let f: Vec<String> = lines
                .iter()
                .map(|l| line(l, r#"{"damage":-0,"name":"Lane"}"#))
                .collect();
            write_collection(d, "roads.geojson", &f)
        } else {
            let p = shapefile_roads(d, "roads.shp", &lines);
            // A Numeric "damage" field holding -0: rebuild the .dbf with it.
            use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
            let dbf = p.with_extension("dbf");
            let mut w = TableWriterBuilder::new()
                .add_numeric_field(FieldName::try_from("damage").unwrap(), 6, 1)
                .build_with_file_dest(&dbf)
                .unwrap();
            for _ in &lines {
                let mut r = Record::default();
                r.insert("damage".into(), FieldValue::Numeric(Some(-0.0)));
                w.write_record(&r).unwrap();
            }
            drop(w);
            // Spell it exactly "-0.0" in each record, whatever the writer made of the double.
            let mut b = std::fs::read(&dbf).unwrap();
            let header = u16::from_le_bytes([b[8], b[9]]) as usize;
            for k in 0..lines.len() {
                let at = header + k * 7 + 1;
                b[at..at + 6].copy_from_slice(b"  -0.0");
            }
            std::fs::write(&dbf, b).unwrap();
            p
        };
        let sites = if sites_ext == "csv" {
            file(
                d,
                "sites.csv",
                format!("site_id,lon,lat\na,{h},{h}\nb,0.001,0.001\n"),
            )
        } else {
            file(
                d,
                "sites.geojson",
                fc(&[&site_feature("a", h, h), &site_feature("b", 0.001, 0.001)]),
            )
        };
        let out = d.join("out");
        let o = reknit()
            .args(["plan", "--roads", &s(&roads), "--sites", &s(&sites)])
            .args(["--out", &s(&out)])
            .output()
            .unwrap();
        assert!(o.status.success(), "{roads_ext}: {}", stderr(&o));
        assert!(!negative_zero(&stderr(&o)), "terminal: {}", stderr(&o));
        let sum = read_json(&out.join("summary.json"));
        assert_eq!(sum["total_cost"].as_f64(), Some(0.0), "{roads_ext}");
        for e in std::fs::read_dir(&out).unwrap() {
            let p = e.unwrap().path();
            if let Ok(text) = std::fs::read_to_string(&p) {
                assert!(!negative_zero(&text), "{roads_ext}: {}", p.display());
            }
        }
    }
}

#[test]
fn figures_are_formatted_through_one_function() {
    // Every figure with a fixed number of decimals goes through `Fixed`/`fixed`, which never
    // writes -0: no `{:.N}` format in the library outside its unit tests.
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut stack = vec![root];
    let mut found = Vec::new();
    while let Some(dir) = stack.pop() {
        for e in std::fs::read_dir(&dir).unwrap() {
            let p = e.unwrap().path();
            if p.is_dir() {
                stack.push(p);
            } else if p.extension().is_some_and(|x| x == "rs") {
                let text = std::fs::read_to_string(&p).unwrap();
                let code = text.split("#[cfg(test)]").next().unwrap();
                for (n, l) in code.lines().enumerate() {
                    let b = l.as_bytes();
                    let spec = b.windows(4).any(|w| {
                        w[0] == b':' && w[1] == b'.' && w[2].is_ascii_digit() && w[3] == b'}'
                    });
                    if spec && !l.trim_start().starts_with("//") {
                        found.push(format!("{}:{}", p.display(), n + 1));
                    }
                }
            }
        }
    }
    assert!(
        found.is_empty(),
        "precision formats outside `Fixed`: {found:?}"
    );
}

case!(hostile_names_in_a_shapefile_road_layer, |d| {
    // The text rules hold for names read from a dBASE table as for GeoJSON (tests/bad_streams.rs):
    // control characters replaced in SVG, HTML and CSV; formula cells neutralised (OWASP "CSV
    // Injection"); longitudes west of Greenwich written as they are.
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let names = ["=HYPERLINK(\"x\")", "-Main\u{1b}[31m", "@Fen"];
    let p = d.join("roads.shp");
    let table = TableWriterBuilder::new()
        .add_character_field(FieldName::try_from("name").unwrap(), 40)
        .add_numeric_field(FieldName::try_from("damage").unwrap(), 6, 1);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for (i, n) in names.iter().enumerate() {
        let x = -0.01 + i as f64 * 0.001;
        let pl = shapefile::Polyline::new(vec![
            shapefile::Point::new(x, 0.0),
            shapefile::Point::new(x + 0.001, 0.0),
        ]);
        let mut r = Record::default();
        r.insert("name".into(), FieldValue::Character(Some(n.to_string())));
        r.insert("damage".into(), FieldValue::Numeric(Some(0.5)));
        w.write_shape_and_record(&pl, &r).unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    let out = plan_ok(d, &["--roads", &s(&p), "--whole-network"]);
    for name in ["plan.svg", "report.html", "map.html", "work-orders.csv"] {
        let text = std::fs::read_to_string(out.join(name)).unwrap();
        let bad = text
            .chars()
            .find(|c| c.is_control() && !"\n\r\t".contains(*c));
        assert_eq!(bad, None, "{name} holds a control character");
    }
    let mut r = csv::Reader::from_path(out.join("work-orders.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let col = |n: &str| h.iter().position(|x| x == n).unwrap();
    let mut seen = Vec::new();
    for rec in r.records().map(Result::unwrap) {
        let road = &rec[col("road")];
        assert!(road.starts_with('\''), "{road:?}");
        seen.push(reknit::export::text::csv_text(road).to_string());
        assert!(
            rec[col("from_lon")].starts_with("-0.0"),
            "{:?}",
            &rec[col("from_lon")]
        );
    }
    seen.sort();
    assert_eq!(seen, ["-Main\u{FFFD}[31m", "=HYPERLINK(\"x\")", "@Fen"]);
});

#[test]
fn stderr_is_written_through_one_function() {
    // `eprintln!` and `println!` panic when the stream's reader has gone (exit 101): every line
    // for the terminal goes through `reknit::say!`, which ignores that.
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut stack = vec![root];
    let mut found = Vec::new();
    while let Some(dir) = stack.pop() {
        for e in std::fs::read_dir(&dir).unwrap() {
            let p = e.unwrap().path();
            let name = p.file_name().unwrap().to_string_lossy().into_owned();
            if p.is_dir() {
                stack.push(p);
            } else if name.ends_with(".rs") && !name.ends_with("_tests.rs") {
                let text = std::fs::read_to_string(&p).unwrap();
                let code = text.split("#[cfg(test)]").next().unwrap();
                for (n, l) in code.lines().enumerate() {
                    let l = l.trim_start();
                    let call = ["eprintln!(", "println!(", "eprint!(", "print!("]
                        .iter()
                        .any(|m| l.contains(m));
                    if call && !l.starts_with("//") {
                        found.push(format!("{}:{}", p.display(), n + 1));
                    }
                }
            }
        }
    }
    assert!(
        found.is_empty(),
        "printing macros that can panic: {found:?}"
    );
}

#[test]
fn a_closed_stderr_changes_no_exit_code() {
    // `reknit … 2>&1 | head -1`: stderr is a pipe whose reader has gone. A plan still exits 0
    // and a refused input still exits 2 (never 101, a panic).
    let d = tmp();
    let roads = one_damaged_road(d.path());
    let bad = file(
        d.path(),
        "bad.geojson",
        b"{\"type\":\"FeatureCollection\",\"features\":[",
    );
    for (input, out, code) in [(&roads, "ok", 0), (&bad, "refused", 2)] {
        let (reader, writer) = std::io::pipe().unwrap();
        drop(reader);
        let status = reknit()
            .args(["plan", "--roads", &s(input), "--whole-network", "--out"])
            .arg(d.path().join(out))
            .stderr(writer)
            .stdout(std::process::Stdio::null())
            .status()
            .unwrap();
        assert_eq!(status.code(), Some(code), "{out}");
    }
}
