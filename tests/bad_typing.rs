//! Attribute typing, part 2 (docs/bad-inputs.md lists every case): numeric ids as written in a
//! dBASE table, logical fields and booleans, and manifest values that mean what the same flag
//! means, each in every format the rule applies to.
//!
//! dBASE layouts (field descriptors, right-aligned Numeric text, one-byte Logical values
//! T/t/Y/y, F/f/N/n, `?`): dBASE III file format, common practice, no source.

mod common;
use common::bad::*;
use common::*;
use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
use std::path::{Path, PathBuf};

const M: f64 = 1.0 / 111_320.0;

/// The formats a road rule applies to.
#[derive(Clone, Copy, Debug)]
enum Format {
    GeoJson,
    Shapefile,
}

/// One road's attributes as written: `rid` (a dBASE Numeric(6,0) field, or the JSON token),
/// `fc` (Numeric(4,0) or JSON token), `ok` (a dBASE Logical byte, or a JSON token).
struct Attrs<'a> {
    rid: &'a str,
    fc: &'a str,
    ok: &'a str,
}

/// Roads of 100 m in a row (50 m gaps) with the attributes as written.
fn roads(d: &Path, f: Format, rows: &[Attrs]) -> PathBuf {
    let at = |i: usize| {
        [
            [i as f64 * 150.0 * M, 0.0],
            [(i as f64 * 150.0 + 100.0) * M, 0.0],
        ]
    };
    match f {
        Format::GeoJson => {
            let feats: Vec<String> = rows
                .iter()
                .enumerate()
                .map(|(i, a)| {
                    line(
                        &at(i),
                        &format!(r#"{{"rid":{},"fc":{},"ok":{}}}"#, a.rid, a.fc, a.ok),
                    )
                })
                .collect();
            write_collection(d, "roads.geojson", &feats)
        }
        Format::Shapefile => {
            let p = d.join("roads.shp");
            let table = TableWriterBuilder::new()
                .add_numeric_field(FieldName::try_from("rid").unwrap(), 6, 0)
                .add_numeric_field(FieldName::try_from("fc").unwrap(), 4, 0)
                .add_logical_field(FieldName::try_from("ok").unwrap());
            let mut w = shapefile::Writer::from_path(&p, table).unwrap();
            for i in 0..rows.len() {
                let pts = at(i).map(|q| shapefile::Point::new(q[0], q[1])).to_vec();
                let mut r = Record::default();
                r.insert("rid".into(), FieldValue::Numeric(Some(1.0)));
                r.insert("fc".into(), FieldValue::Numeric(Some(1.0)));
                r.insert("ok".into(), FieldValue::Logical(Some(true)));
                w.write_shape_and_record(&shapefile::Polyline::new(pts), &r)
                    .unwrap();
            }
            drop(w);
            write_wgs84_prj(&p);
            // The table writer goes through doubles: put the text as written into each record.
            let dbf = p.with_extension("dbf");
            let mut b = std::fs::read(&dbf).unwrap();
            let header = u16::from_le_bytes([b[8], b[9]]) as usize;
            let record = u16::from_le_bytes([b[10], b[11]]) as usize;
            for (i, a) in rows.iter().enumerate() {
                let r = header + i * record;
                b[r + 1..r + 7].copy_from_slice(format!("{:>6}", a.rid).as_bytes());
                b[r + 7..r + 11].copy_from_slice(format!("{:>4}", a.fc).as_bytes());
                b[r + 11] = a.ok.as_bytes()[0];
            }
            std::fs::write(&dbf, b).unwrap();
            p
        }
    }
}

/// `plan --whole-network` on the roads: the source ids of the features used, sorted, as text.
fn used_ids(d: &Path, roads: &Path, extra: &[&str]) -> Vec<String> {
    let mut args = vec![
        "--roads",
        roads.to_str().unwrap(),
        "--whole-network",
        "--id-field",
        "rid",
    ];
    args.extend_from_slice(extra);
    let out = plan_ok(d, &args);
    let net = read_json(&out.join("network.geojson"));
    std::fs::remove_dir_all(&out).unwrap();
    let mut v: Vec<String> = net["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| match &f["properties"]["source_id"] {
            serde_json::Value::String(t) => t.clone(),
            other => other.to_string(),
        })
        .collect();
    v.sort();
    v.dedup();
    v
}

#[test]
fn numeric_ids_stay_as_written_and_compare_by_value_in_every_format() {
    for f in [Format::GeoJson, Format::Shapefile] {
        let d = tmp();
        let d = d.path();
        // GeoJSON has no number spelled 007 (RFC 8259 §6): there it is a string.
        let (zeros, plus, three) = match f {
            Format::GeoJson => (r#""007""#, r#""+1""#, "3.0"),
            Format::Shapefile => ("007", "+1", "003"),
        };
        let (t, u) = match f {
            Format::GeoJson => ("true", "false"),
            Format::Shapefile => ("T", "N"),
        };
        let r = roads(
            d,
            f,
            &[
                Attrs {
                    rid: zeros,
                    fc: three,
                    ok: t,
                },
                Attrs {
                    rid: "7",
                    fc: "1",
                    ok: u,
                },
                Attrs {
                    rid: plus,
                    fc: "3",
                    ok: t,
                },
            ],
        );
        // "007", "7" and "+1" are three ids: none collides or changes.
        assert_eq!(used_ids(d, &r, &[]), ["+1", "007", "7"], "{f:?}");
        // By value: 003, 3.0 and 3 are all func class 3.
        assert_eq!(
            used_ids(d, &r, &["--keep-where", "fc=3"]),
            ["+1", "007"],
            "{f:?}"
        );
        assert_eq!(
            used_ids(d, &r, &["--drop-where", "fc=3.00"]),
            ["7"],
            "{f:?}"
        );
    }
}

#[test]
fn logical_fields_and_booleans_match_every_spelling_in_every_format() {
    for f in [Format::GeoJson, Format::Shapefile] {
        let d = tmp();
        let d = d.path();
        // Stored: true, false, true, unknown. dBASE spells them T, n, y, ?; GeoJSON true, false, true, null.
        let oks: [&str; 4] = match f {
            Format::GeoJson => ["true", "false", "true", "null"],
            Format::Shapefile => ["T", "n", "y", "?"],
        };
        let rows: Vec<Attrs> = ["1", "2", "3", "4"]
            .iter()
            .zip(oks)
            .map(|(rid, ok)| Attrs { rid, fc: "1", ok })
            .collect();
        let r = roads(d, f, &rows);
        for yes in ["true", "TRUE", "yes", "Y", "t", "1"] {
            let keep = format!("ok={yes}");
            assert_eq!(
                used_ids(d, &r, &["--keep-where", &keep]),
                ["1", "3"],
                "{f:?} {yes}"
            );
        }
        for no in ["false", "No", "n", "F", "0"] {
            let keep = format!("ok={no}");
            assert_eq!(
                used_ids(d, &r, &["--keep-where", &keep]),
                ["2"],
                "{f:?} {no}"
            );
            // Unknown is missing: dropping the false ones keeps it.
            let drop = format!("ok={no}");
            assert_eq!(
                used_ids(d, &r, &["--drop-where", &drop]),
                ["1", "3", "4"],
                "{f:?}"
            );
        }
        // A word that names no switch matches no stored true or false.
        let all = used_ids(d, &r, &["--drop-where", "ok=maybe"]);
        assert_eq!(all, ["1", "2", "3", "4"], "{f:?}");
    }
}

case!(dbf_logical_field_with_an_unknown_letter, |d| {
    let rows = [
        Attrs {
            rid: "1",
            fc: "1",
            ok: "T",
        },
        Attrs {
            rid: "2",
            fc: "1",
            ok: "X",
        },
    ];
    let r = roads(d, Format::Shapefile, &rows);
    plan_fails(
        &r,
        &["--keep-where", "ok=true"],
        &["roads.dbf", "feature 1", "\"ok\"", "\"X\"", "logical"],
    );
});

/// The figures and settings of a plan that must not depend on where its options were written.
fn meaning(summary: &serde_json::Value) -> serde_json::Value {
    let st = &summary["settings"];
    serde_json::json!({
        "counts": summary["counts"],
        "total_cost": summary["total_cost"],
        "plan_edges": summary["plan_edges"],
        "closed_value": st["closed_value"],
        "filters": st["filters"],
        "class_rates": st["cost_table"]["class_rates"],
        "damage_field": st["damage_field"],
    })
}

/// Runs a one-district batch manifest and returns the meaning of its district's summary.
fn batch_summary(d: &Path, manifest: &Path) -> serde_json::Value {
    let out = d.join("batch-out");
    let o = reknit()
        .args(["batch", &s(manifest), "--out", &s(&out), "-q"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}: {}", manifest.display(), stderr(&o));
    let sum = read_json(&out.join("Eastvane").join("summary.json"));
    std::fs::remove_dir_all(&out).unwrap();
    meaning(&sum)
}

#[test]
fn manifest_values_mean_what_the_same_flags_mean_in_every_format() {
    for f in [Format::GeoJson, Format::Shapefile] {
        let d = tmp();
        let d = d.path();
        let (t, u) = match f {
            Format::GeoJson => ("true", "false"),
            Format::Shapefile => ("T", "N"),
        };
        let three = match f {
            Format::GeoJson => "3.0",
            Format::Shapefile => "003",
        };
        let r = roads(
            d,
            f,
            &[
                Attrs {
                    rid: "1",
                    fc: three,
                    ok: t,
                },
                Attrs {
                    rid: "2",
                    fc: "1",
                    ok: u,
                },
                Attrs {
                    rid: "99",
                    fc: "3",
                    ok: t,
                },
                Attrs {
                    rid: "4",
                    fc: "2",
                    ok: t,
                },
            ],
        );
        let roads_name = r.file_name().unwrap().to_str().unwrap().to_string();
        file(d, "c.toml", "[classes]\nfield = \"fc\"\n3 = 2.5\n");
        let out = d.join("cli-out");
        let o = reknit()
            .args(["plan", "--roads", &s(&r), "--out", &s(&out), "-q"])
            .args([
                "--whole-network",
                "--damage-field",
                "rid",
                "--closed-value",
                "99",
            ])
            .args(["--keep-where", "fc=1,3", "--drop-where", "ok=false"])
            .args(["--cost-table", &s(&d.join("c.toml"))])
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", stderr(&o));
        let cli = meaning(&read_json(&out.join("summary.json")));
        // The flags did what they say: road 4 (class 2) and road 2 (not ok) left out, road 99
        // closed, road 1 rated 2.5.
        assert_eq!(cli["counts"]["features_used"], 2, "{f:?}: {cli}");
        assert_eq!(cli["counts"]["edges_closed"], 1, "{f:?}: {cli}");
        assert_eq!(cli["class_rates"]["3"], 2.5, "{f:?}: {cli}");
        // The same options written as TOML integers, floats and strings, and as CSV cells.
        let common = format!(
            "roads = \"{roads_name}\"\nwhole_network = true\ndamage_field = \"rid\"\ncost_table = \"c.toml\"\n"
        );
        for closed in ["99", "99.0", "\"99\""] {
            for filters in [
                "keep_where = \"fc=1,3\"\ndrop_where = \"ok=false\"\n",
                "keep_where = [\"fc=1,3\"]\ndrop_where = [\"ok=false\"]\n",
            ] {
                let m = file(
                    d,
                    "m.toml",
                    format!(
                        "[defaults]\nclosed_value = {closed}\n{filters}\n[[district]]\nname = \"Eastvane\"\n{common}"
                    ),
                );
                assert_eq!(
                    batch_summary(d, &m),
                    cli,
                    "{f:?}: closed_value = {closed}, {filters}"
                );
            }
        }
        let m = file(
            d,
            "m.csv",
            format!(
                "name,roads,whole_network,damage_field,cost_table,closed_value,keep_where,drop_where\n\
                 Eastvane,{roads_name},true,rid,c.toml,99,\"fc=1,3\",ok=false\n"
            ),
        );
        assert_eq!(batch_summary(d, &m), cli, "{f:?}: CSV manifest");
    }
}

/// A point Shapefile set of two sites by the two test roads, `site_id` and `name` fields (WGS84
/// .prj); `name` of the first is `Cafe` (patched by the caller).
fn cafe_sites(d: &Path) -> PathBuf {
    let p = d.join("cafes.shp");
    let table = TableWriterBuilder::new()
        .add_character_field(FieldName::try_from("site_id").unwrap(), 8)
        .add_character_field(FieldName::try_from("name").unwrap(), 8);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for (id, name, lon) in [("a", "Cafe", 0.0), ("b", "Bar", 0.001)] {
        let mut r = Record::default();
        r.insert("site_id".into(), FieldValue::Character(Some(id.into())));
        r.insert("name".into(), FieldValue::Character(Some(name.into())));
        w.write_shape_and_record(&shapefile::Point::new(lon, 0.0), &r)
            .unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    p
}

case!(dbf_code_page_from_language_driver, |d| {
    // No .cpg: the language driver byte (dBASE header byte 29) 0x57 says Windows-1252 (ESRI's
    // code page list, from memory), so the byte 0xE9 is "é", not a replacement character.
    let sites = cafe_sites(d);
    let dbf = sites.with_extension("dbf");
    let mut b = std::fs::read(&dbf).unwrap();
    b[29] = 0x57;
    let at = b.windows(4).position(|w| w == b"Cafe").unwrap();
    b[at + 3] = 0xE9;
    std::fs::write(&dbf, b).unwrap();
    let out = plan_ok(d, &["--roads", &s(&roads_ok(d)), "--sites", &s(&sites)]);
    let text = std::fs::read_to_string(out.join("sites.geojson")).unwrap();
    assert!(text.contains("Café"), "{text}");
    std::fs::remove_dir_all(out).unwrap();
    // A .cpg naming a code page no decoder knows: refused, not read as UTF-8.
    std::fs::write(sites.with_extension("cpg"), "KLINGON-1").unwrap();
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&sites)],
        &["cafes.cpg", "KLINGON-1", "cannot decode"],
    );
});
