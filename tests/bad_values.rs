//! Shapefile integrity and attribute typing, end to end (harness in tests/common/bad.rs).
//!
//! Byte layouts: ESRI Shapefile Technical Description (1998) for .shp/.shx; dBASE III file format,
//! common practice, no source, for the .dbf deletion flag (`*` as a record's first byte).

mod common;
use common::bad::*;
use common::*;
use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
use std::path::{Path, PathBuf};

const M: f64 = 1.0 / 111_320.0;

/// A Shapefile set of `shapes` with one numeric field `v` (value i+1) and a text field `id`.
fn write_set<S: shapefile::record::EsriShape>(d: &Path, name: &str, shapes: &[S]) -> PathBuf {
    let p = d.join(name);
    let table = TableWriterBuilder::new()
        .add_character_field(FieldName::try_from("id").unwrap(), 10)
        .add_numeric_field(FieldName::try_from("v").unwrap(), 8, 2);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for (i, sh) in shapes.iter().enumerate() {
        let mut r = Record::default();
        r.insert("id".into(), FieldValue::Character(Some(format!("s{i}"))));
        r.insert("v".into(), FieldValue::Numeric(Some(i as f64 + 1.0)));
        w.write_shape_and_record(sh, &r).unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    p
}

/// Flags record `k` of the set's .dbf deleted.
fn delete_record(shp: &Path, k: usize) {
    let dbf = shp.with_extension("dbf");
    let mut b = std::fs::read(&dbf).unwrap();
    let header = u16::from_le_bytes([b[8], b[9]]) as usize;
    let record = u16::from_le_bytes([b[10], b[11]]) as usize;
    b[header + k * record] = b'*';
    std::fs::write(&dbf, b).unwrap();
}

/// Three 100 m roads in a row along the equator, with gaps of 50 m between them.
fn three_roads(d: &Path) -> PathBuf {
    let l = |x: f64| {
        shapefile::Polyline::new(vec![
            shapefile::Point::new(x * M, 0.0),
            shapefile::Point::new((x + 100.0) * M, 0.0),
        ])
    };
    write_set(d, "roads.shp", &[l(0.0), l(150.0), l(300.0)])
}

fn square(x: f64, size: f64) -> shapefile::Polygon {
    let p = |a: f64, b: f64| shapefile::Point::new(a * M, b * M);
    shapefile::Polygon::new(shapefile::PolygonRing::Outer(vec![
        p(x, -size),
        p(x, size),
        p(x + size, size),
        p(x + size, -size),
        p(x, -size),
    ]))
}

case!(dbf_record_flagged_deleted_in_roads, |d| {
    let p = three_roads(d);
    delete_record(&p, 1);
    let out = plan_ok(
        d,
        &["--roads", &s(&p), "--whole-network", "--damage-field", "v"],
    );
    let s = read_json(&out.join("summary.json"));
    assert_eq!(
        s["counts"]["features_skipped"]["flagged deleted in the .dbf"],
        1
    );
    assert_eq!(s["inputs"][0]["deleted_records"], 1);
    let net = read_json(&out.join("network.geojson"));
    let mut got: Vec<(i64, f64)> = net["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| {
            let p = &f["properties"];
            (
                p["source_index"].as_i64().unwrap(),
                p["damage"].as_f64().unwrap(),
            )
        })
        .collect();
    got.sort_by(|a, b| a.partial_cmp(b).unwrap());
    // The third road keeps its own factor (3), and is not lost.
    assert_eq!(got, vec![(0, 1.0), (2, 3.0)]);
});

case!(dbf_record_flagged_deleted_in_sites, |d| {
    let r = three_roads(d);
    let pt = |x: f64| shapefile::Point::new(x * M, 0.0);
    let sites = write_set(d, "sites.shp", &[pt(0.0), pt(999_999.0), pt(100.0)]);
    delete_record(&sites, 1);
    let out = plan_ok(
        d,
        &[
            "--roads",
            &s(&r),
            "--sites",
            &s(&sites),
            "--site-id-field",
            "id",
        ],
    );
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["sites"]["total"], 2, "{}", s["sites"]);
    let sites_in = s["inputs"]
        .as_array()
        .unwrap()
        .iter()
        .find(|i| i["role"] == "sites");
    assert_eq!(sites_in.unwrap()["deleted_records"], 1);
    assert_eq!(s["sites"]["joined_to_hub"], 2, "{}", s["sites"]);
});

case!(dbf_record_flagged_deleted_in_zones, |d| {
    let r = three_roads(d);
    // The deleted zone (v = 1) lies far away; the kept one (v = 2) covers the first road.
    let z = write_set(
        d,
        "zones.shp",
        &[square(5000.0, 10.0), square(-10.0, 120.0)],
    );
    delete_record(&z, 0);
    let out = plan_ok(
        d,
        &[
            "--roads",
            &s(&r),
            "--damage-zones",
            &s(&z),
            "--zone-damage-field",
            "v",
            "--whole-network",
        ],
    );
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["damage_zones"], 1);
    assert_eq!(s["inputs"][1]["deleted_records"], 1);
    assert_eq!(s["counts"]["edges_in_zones"], 1);
});

case!(shx_offsets_disagree_with_the_shp, |d| {
    let p = three_roads(d);
    // Point every index entry at the first record.
    let shx = p.with_extension("shx");
    let mut b = std::fs::read(&shx).unwrap();
    let first: [u8; 8] = b[100..108].try_into().unwrap();
    for k in 1..3 {
        b[100 + 8 * k..108 + 8 * k].copy_from_slice(&first);
    }
    std::fs::write(&shx, b).unwrap();
    plan_fails(&p, &[], &["roads.shx", "feature 1", "rebuild"]);
    // Sites and zones are read through the same set reader: the same index is refused there.
    let r = d.join("ok");
    std::fs::create_dir(&r).unwrap();
    let roads = three_roads(&r);
    let pt = |x: f64| shapefile::Point::new(x * M, 0.0);
    let sites = write_set(d, "sites.shp", &[pt(0.0), pt(50.0), pt(100.0)]);
    let zones = write_set(
        d,
        "zones.shp",
        &[square(0.0, 5.0), square(20.0, 5.0), square(40.0, 5.0)],
    );
    for (flag, layer) in [("--sites", sites), ("--damage-zones", zones)] {
        let shx = layer.with_extension("shx");
        let mut b = std::fs::read(&shx).unwrap();
        let first: [u8; 8] = b[100..108].try_into().unwrap();
        b[116..124].copy_from_slice(&first);
        std::fs::write(&shx, b).unwrap();
        let name = shx.file_name().unwrap().to_str().unwrap().to_string();
        plan_fails(&roads, &[flag, &s(&layer)], &[&name, "rebuild"]);
    }
});

#[test]
fn closed_value_matches_zones_in_every_format() {
    // `--closed-value 2` marks a zone impassable whether its factor is the GeoJSON number 2.0 or
    // the dBASE Numeric text "2.00".
    for ext in ["geojson", "shp"] {
        let d = tmp();
        let d = d.path();
        let r = three_roads(d);
        // Zone 1 (factor 2) covers the first road; zone 0 (factor 1) lies far away.
        let zones = if ext == "shp" {
            write_set(
                d,
                "zones.shp",
                &[square(5000.0, 10.0), square(-10.0, 120.0)],
            )
        } else {
            let ring = |x: f64, size: f64| {
                let c = [
                    [x, -size],
                    [x, size],
                    [x + size, size],
                    [x + size, -size],
                    [x, -size],
                ];
                let c: Vec<String> = c
                    .iter()
                    .map(|p| format!("[{},{}]", p[0] * M, p[1] * M))
                    .collect();
                c.join(",")
            };
            let z = |x: f64, size: f64, v: &str| {
                format!(
                    r#"{{"type":"Feature","properties":{{"v":{v}}},"geometry":{{"type":"Polygon","coordinates":[[{}]]}}}}"#,
                    ring(x, size)
                )
            };
            file(
                d,
                "zones.geojson",
                fc(&[&z(5000.0, 10.0, "1"), &z(-10.0, 120.0, "2.0")]),
            )
        };
        let closed = |extra: &[&str]| {
            let mut a = vec!["--roads", r.to_str().unwrap(), "--damage-zones"];
            a.extend([
                zones.to_str().unwrap(),
                "--zone-damage-field",
                "v",
                "--whole-network",
            ]);
            a.extend_from_slice(extra);
            let out = plan_ok(d, &a);
            let n = read_json(&out.join("summary.json"))["counts"]["edges_closed"].clone();
            std::fs::remove_dir_all(&out).unwrap();
            n
        };
        assert_eq!(closed(&[]), 0, "{ext}");
        assert_eq!(closed(&["--closed-value", "2"]), 1, "{ext}");
    }
}

/// The formats a road rule applies to.
#[derive(Clone, Copy, Debug)]
enum Format {
    GeoJson,
    Shapefile,
}

/// Three 100 m roads in a row with `func_class` and `dmg` written as given (GeoJSON number tokens;
/// in a Shapefile, dBASE Numeric fields).
fn class_roads(d: &Path, f: Format, values: &[(&str, &str)]) -> PathBuf {
    let at = |i: usize| {
        [
            [i as f64 * 150.0 * M, 0.0],
            [(i as f64 * 150.0 + 100.0) * M, 0.0],
        ]
    };
    match f {
        Format::GeoJson => {
            let feats: Vec<String> = values
                .iter()
                .enumerate()
                .map(|(i, (c, v))| line(&at(i), &format!(r#"{{"func_class":{c},"dmg":{v}}}"#)))
                .collect();
            write_collection(d, "roads.geojson", &feats)
        }
        Format::Shapefile => {
            let p = d.join("roads.shp");
            let table = TableWriterBuilder::new()
                .add_numeric_field(FieldName::try_from("func_class").unwrap(), 20, 0)
                .add_numeric_field(FieldName::try_from("dmg").unwrap(), 8, 2);
            let mut w = shapefile::Writer::from_path(&p, table).unwrap();
            for (i, (c, v)) in values.iter().enumerate() {
                let pts = at(i).map(|q| shapefile::Point::new(q[0], q[1])).to_vec();
                let mut r = Record::default();
                r.insert("func_class".into(), FieldValue::Numeric(c.parse().ok()));
                r.insert("dmg".into(), FieldValue::Numeric(v.parse().ok()));
                w.write_shape_and_record(&shapefile::Polyline::new(pts), &r)
                    .unwrap();
            }
            drop(w);
            write_wgs84_prj(&p);
            p
        }
    }
}

/// `plan` on the roads; the damage of each used feature by source index ("closed" as -1).
fn damages(d: &Path, roads: &Path, extra: &[&str]) -> Vec<(i64, f64)> {
    let mut args = vec!["--roads", roads.to_str().unwrap(), "--whole-network"];
    args.extend_from_slice(extra);
    let out = plan_ok(d, &args);
    let net = read_json(&out.join("network.geojson"));
    std::fs::remove_dir_all(&out).unwrap();
    let mut v: Vec<(i64, f64)> = net["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|f| {
            let p = &f["properties"];
            (
                p["source_index"].as_i64().unwrap(),
                p["damage"].as_f64().unwrap_or(-1.0),
            )
        })
        .collect();
    v.sort_by(|a, b| a.partial_cmp(b).unwrap());
    v.dedup();
    v
}

#[test]
fn numeric_fields_match_what_the_user_types_in_every_format() {
    for f in [Format::GeoJson, Format::Shapefile] {
        let d = tmp();
        let d = d.path();
        let r = class_roads(d, f, &[("1", "1"), ("3.0", "1"), ("2", "99")]);
        let dmg = ["--damage-field", "dmg"];
        let keep = damages(
            d,
            &r,
            &[&dmg[..], &["--keep-where", "func_class=3"]].concat(),
        );
        assert_eq!(keep, vec![(1, 1.0)], "{f:?} keep");
        let drop = damages(
            d,
            &r,
            &[&dmg[..], &["--drop-where", "func_class=1"]].concat(),
        );
        assert_eq!(drop, vec![(1, 1.0), (2, 99.0)], "{f:?} drop");
        let closed = damages(d, &r, &[&dmg[..], &["--closed-value", "99"]].concat());
        assert_eq!(
            closed,
            vec![(0, 1.0), (1, 1.0), (2, -1.0)],
            "{f:?} closed value"
        );
        let table = file(
            d,
            "costs.toml",
            "[classes]\nfield = \"func_class\"\n3 = 2.5\n",
        );
        let rated = damages(d, &r, &[&dmg[..], &["--cost-table", &s(&table)]].concat());
        assert_eq!(
            rated,
            vec![(0, 1.0), (1, 2.5), (2, 99.0)],
            "{f:?} class rate"
        );
    }
}

#[test]
fn site_ids_stay_as_written_in_every_format() {
    let ids = ["007", "7", "+1", "12345678901234567"];
    for ext in ["csv", "geojson", "shp"] {
        let d = tmp();
        let d = d.path();
        let r = three_roads(d);
        let x = |i: usize| i as f64 * 30.0 * M;
        let sites = match ext {
            "csv" => {
                let rows: Vec<String> = ids
                    .iter()
                    .enumerate()
                    .map(|(i, id)| format!("{id},{},0", x(i)))
                    .collect();
                file(
                    d,
                    "sites.csv",
                    format!("site_id,lon,lat\n{}\n", rows.join("\n")),
                )
            }
            "geojson" => {
                // The 17-digit id as a JSON number: it must not be rounded.
                let feats: Vec<String> = ids
                    .iter()
                    .enumerate()
                    .map(|(i, id)| {
                        let v = if i == 3 { id.to_string() } else { format!("\"{id}\"") };
                        format!(r#"{{"type":"Feature","properties":{{"site_id":{v}}},"geometry":{{"type":"Point","coordinates":[{},0]}}}}"#, x(i))
                    })
                    .collect();
                file(
                    d,
                    "sites.geojson",
                    fc(&feats.iter().map(String::as_str).collect::<Vec<_>>()),
                )
            }
            _ => {
                let p = d.join("sites.shp");
                let table = TableWriterBuilder::new()
                    .add_character_field(FieldName::try_from("site_id").unwrap(), 20);
                let mut w = shapefile::Writer::from_path(&p, table).unwrap();
                for (i, id) in ids.iter().enumerate() {
                    let mut rec = Record::default();
                    rec.insert(
                        "site_id".into(),
                        FieldValue::Character(Some(id.to_string())),
                    );
                    w.write_shape_and_record(&shapefile::Point::new(x(i), 0.0), &rec)
                        .unwrap();
                }
                drop(w);
                write_wgs84_prj(&p);
                p
            }
        };
        let out = plan_ok(d, &["--roads", &s(&r), "--sites", &s(&sites)]);
        let layer = read_json(&out.join("sites.geojson"));
        let got: Vec<String> = layer["features"]
            .as_array()
            .unwrap()
            .iter()
            .map(|f| f["properties"]["site_id"].as_str().unwrap().to_string())
            .collect();
        assert_eq!(got, ids, "{ext}");
    }
}

case!(dbf_numeric_overflow_marker, |d| {
    let p = class_roads(d, Format::Shapefile, &[("1", "1"), ("2", "1")]);
    // Record 1's dmg field (after the flag byte and the 20-byte func_class) becomes all '*'.
    let dbf = p.with_extension("dbf");
    let mut b = std::fs::read(&dbf).unwrap();
    let header = u16::from_le_bytes([b[8], b[9]]) as usize;
    let record = u16::from_le_bytes([b[10], b[11]]) as usize;
    let at = header + record + 1 + 20;
    b[at..at + 8].copy_from_slice(b"********");
    std::fs::write(&dbf, b).unwrap();
    plan_fails(
        &p,
        &["--damage-field", "dmg"],
        &["roads.dbf", "feature 1", "\"dmg\"", "overflow"],
    );
    // Sites (as priorities) and zones (as factors) are read through the same rule.
    let r = d.join("ok");
    std::fs::create_dir(&r).unwrap();
    let roads = three_roads(&r);
    let pt = |x: f64| shapefile::Point::new(x * M, 0.0);
    let sites = write_set(d, "sites.shp", &[pt(0.0), pt(100.0)]);
    let zones = write_set(d, "zones.shp", &[square(0.0, 5.0), square(40.0, 5.0)]);
    for (layer, flags) in [
        (
            sites,
            ["--sites", "--priority-field", "--site-id-field", "id"],
        ),
        (
            zones,
            [
                "--damage-zones",
                "--zone-damage-field",
                "--zones-crs",
                "EPSG:4326",
            ],
        ),
    ] {
        // Record 1's v (after the flag byte and the 10-byte id) becomes all '*'.
        let dbf = layer.with_extension("dbf");
        let mut b = std::fs::read(&dbf).unwrap();
        let header = u16::from_le_bytes([b[8], b[9]]) as usize;
        let record = u16::from_le_bytes([b[10], b[11]]) as usize;
        let at = header + record + 1 + 10;
        b[at..at + 8].copy_from_slice(b"********");
        std::fs::write(&dbf, b).unwrap();
        let name = dbf.file_name().unwrap().to_str().unwrap().to_string();
        plan_fails(
            &roads,
            &[flags[0], &s(&layer), flags[1], "v", flags[2], flags[3]],
            &[&name, "feature 1", "\"v\"", "overflow"],
        );
    }
});

case!(categories_differing_only_in_case, |d| {
    let r = write_collection(
        d,
        "roads.geojson",
        &[line(&[[0.0, 0.0], [0.001, 0.0]], r#"{"state":"debris"}"#)],
    );
    let t = file(
        d,
        "costs.toml",
        "[categories]\nDebris = 0.3\ndebris = 0.9\n",
    );
    plan_fails(
        &r,
        &["--category-field", "state", "--cost-table", &s(&t)],
        &["costs.toml", "debris", "twice"],
    );
});

case!(class_rates_differing_only_in_case, |d| {
    let r = write_collection(
        d,
        "roads.geojson",
        &[line(&[[0.0, 0.0], [0.001, 0.0]], r#"{"kind":"track"}"#)],
    );
    let t = file(
        d,
        "costs.toml",
        "[classes]\nfield = \"kind\"\nTrack = 0.5\ntrack = 2\n",
    );
    plan_fails(
        &r,
        &["--cost-table", &s(&t)],
        &["costs.toml", "track", "twice"],
    );
});

#[test]
fn long_numeric_road_ids_are_not_rounded_in_any_format() {
    let id = "12345678901234567";
    for f in [Format::GeoJson, Format::Shapefile] {
        let d = tmp();
        let d = d.path();
        // func_class serves as the id field: a number in GeoJSON, a dBASE Numeric field.
        let r = class_roads(d, f, &[(id, "1"), ("7", "1")]);
        if let Format::Shapefile = f {
            // The table writer rounds through a double: put the exact digits in record 0.
            let dbf = r.with_extension("dbf");
            let mut b = std::fs::read(&dbf).unwrap();
            let at = u16::from_le_bytes([b[8], b[9]]) as usize + 1;
            b[at..at + 20].copy_from_slice(format!("{id:>20}").as_bytes());
            std::fs::write(&dbf, b).unwrap();
        }
        let out = plan_ok(
            d,
            &[
                "--roads",
                &s(&r),
                "--whole-network",
                "--id-field",
                "func_class",
            ],
        );
        let net = read_json(&out.join("network.geojson"));
        let mut got: Vec<String> = net["features"]
            .as_array()
            .unwrap()
            .iter()
            .map(|x| x["properties"]["source_id"].to_string())
            .collect();
        got.sort();
        got.dedup();
        assert_eq!(got, vec![id.to_string(), "7".to_string()], "{f:?}");
    }
}

#[test]
fn geojson_numbers_keep_their_spelling_as_ids() {
    // RFC 8259 §6 numbers: 1.50 and 1e2 are valid spellings; a double would print 1.5 and 100.0.
    let d = tmp();
    let d = d.path();
    let ids = ["1.50", "1e2", "123456789012345678901", "7"];
    let feats: Vec<String> = ids
        .iter()
        .enumerate()
        .map(|(i, id)| {
            let x = i as f64 * 150.0 * M;
            line(
                &[[x, 0.0], [x + 100.0 * M, 0.0]],
                &format!(r#"{{"rid":{id}}}"#),
            )
        })
        .collect();
    let r = write_collection(d, "roads.geojson", &feats);
    let out = plan_ok(
        d,
        &["--roads", &s(&r), "--whole-network", "--id-field", "rid"],
    );
    let net = read_json(&out.join("network.geojson"));
    let mut got: Vec<String> = net["features"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| match &x["properties"]["source_id"] {
            serde_json::Value::String(t) => t.clone(),
            other => other.to_string(),
        })
        .collect();
    got.sort();
    got.dedup();
    let mut want: Vec<String> = ids.iter().map(|x| x.to_string()).collect();
    want.sort();
    assert_eq!(got, want);
}
