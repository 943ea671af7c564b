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
const WGS84: &str = r#"GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]"#;

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
    std::fs::write(p.with_extension("prj"), WGS84).unwrap();
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
    assert_eq!(s["sites"]["connected"], 2, "{}", s["sites"]);
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
});
