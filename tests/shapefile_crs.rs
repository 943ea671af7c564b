//! Shapefiles and projected CRSs on real data, against the data's own attributes and pyproj.
//!
//! Data: tests/data/roads/geodanet-streets (GeoDa Center GeoDaNet sample, shipped with libpysal
//! 4.14.1, BSD-3-Clause): 293 streets in NAD83 / Arizona State Plane Central (US survey feet) with
//! the source's own `Length` per street, and 8 schools.

mod common;
use common::*;
use reknit::ingest::crs::Crs;
use reknit::ingest::roads::{RoadSettings, read_roads};
use reknit::ingest::source::Source;
use std::io::Write;
use std::process::{Command, Stdio};

const STREETS: &str = "roads/geodanet-streets/streets.shp";
const SCHOOLS: &str = "roads/geodanet-streets/schools.shp";

#[test]
fn street_lengths_match_the_source_attribute() {
    // Source: the `Length` attribute of the GeoDaNet streets (feet). The .dbf rows are not in the
    // same order as the shapes in this sample, so the sorted lists are compared.
    let shp = data(STREETS);
    external::ran("geodanet-street-lengths");
    let layer = read_roads(&Source::File(shp.clone()), &RoadSettings::default()).unwrap();
    assert_eq!(layer.stats.features_read, 293);
    assert!(!layer.native.is_empty(), "State Plane lengths are planar");
    let mut ours: Vec<f64> = vec![0.0; layer.features.len()];
    let mut start = 0;
    for (p, &end) in layer.part_ends.iter().enumerate() {
        let pts = &layer.native[start..end];
        ours[layer.part_feature[p] as usize] += pts
            .windows(2)
            .map(|w| (w[1][0] - w[0][0]).hypot(w[1][1] - w[0][1]))
            .sum::<f64>();
        start = end;
    }
    let mut dbf = reknit_dbase_lengths(&shp.with_extension("dbf"));
    assert_eq!(dbf.len(), ours.len());
    ours.sort_by(f64::total_cmp);
    dbf.sort_by(f64::total_cmp);
    let worst = ours
        .iter()
        .zip(&dbf)
        .map(|(a, b)| (a - b).abs())
        .fold(0.0, f64::max);
    assert!(worst <= 0.01, "worst difference {worst} ft");
}

/// The `Length` column of the .dbf, read with the dbase crate (as the shapefile crate exposes it).
fn reknit_dbase_lengths(dbf: &std::path::Path) -> Vec<f64> {
    let mut r = shapefile::dbase::Reader::from_path(dbf).unwrap();
    r.iter_records()
        .map(|rec| match rec.unwrap().get("Length") {
            Some(shapefile::dbase::FieldValue::Numeric(Some(x))) => *x,
            Some(shapefile::dbase::FieldValue::Double(x)) => *x,
            other => panic!("Length is {other:?}"),
        })
        .collect()
}

#[test]
fn conversions_agree_with_pyproj_to_a_centimetre() {
    // Reference: pyproj (PROJ) on points in UTM zone 33N (EPSG:32633, metres) and Arizona State
    // Plane Central (EPSG:2223, international feet).
    let Some(py) = external::python_with("pyproj-conversions", &["pyproj"]) else {
        return;
    };
    for (code, points) in [
        (
            32633u32,
            vec![
                [500_000.0, 5_200_000.0],
                [412_345.6, 4_987_654.3],
                [700_000.0, 5_600_000.0],
            ],
        ),
        (
            2223,
            vec![
                [700_000.0, 900_000.0],
                [650_000.0, 1_000_000.0],
                [760_000.0, 820_000.0],
            ],
        ),
    ] {
        let crs = Crs::from_epsg(code).unwrap();
        let mut child = Command::new(&py)
            .arg(script("peer_pyproj.py"))
            .arg(code.to_string())
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .spawn()
            .unwrap();
        {
            let mut stdin = child.stdin.take().unwrap();
            for p in &points {
                writeln!(stdin, "{} {}", p[0], p[1]).unwrap();
            }
        }
        let out = child.wait_with_output().unwrap();
        assert!(out.status.success());
        for (line, p) in String::from_utf8_lossy(&out.stdout).lines().zip(&points) {
            let v: Vec<f64> = line
                .split_whitespace()
                .map(|x| x.parse().unwrap())
                .collect();
            let ours = crs.to_lonlat(*p).unwrap();
            let d = reknit::ingest::geodesy::karney_distance_m(ours, [v[0], v[1]]);
            assert!(d <= 0.01, "EPSG:{code} {p:?}: {d} m from pyproj");
        }
    }
}

#[test]
fn shapefile_roads_and_schools_plan_end_to_end() {
    // Source: the GeoDaNet sample (8 schools in Arizona; its .prj: State Plane, US survey feet).
    let (streets, schools) = (data(STREETS), data(SCHOOLS));
    external::ran("geodanet-schools-plan");
    let d = tmp();
    let out = d.path().join("out");
    let o = run(&[
        "plan",
        "--roads",
        streets.to_str().unwrap(),
        "--sites",
        schools.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["sites"]["total"], 8);
    assert_eq!(s["sites"]["joined_to_hub"], 8);
    assert!(
        s["geodesy"]["length_method"]
            .as_str()
            .unwrap()
            .starts_with("planar")
    );
    assert!(
        s["geodesy"]["input_crs"]
            .as_str()
            .unwrap()
            .contains("US survey feet")
    );
    // Output coordinates are WGS84 lon/lat in Arizona.
    let net = read_fc(&out.join("network.geojson"));
    if let Some(geojson::GeometryValue::LineString { coordinates }) =
        net.features[0].geometry.as_ref().map(|g| &g.value)
    {
        assert!(
            (-113.0..-111.0).contains(&coordinates[0][0])
                && (32.5..34.0).contains(&coordinates[0][1]),
            "{:?}",
            coordinates[0]
        );
    } else {
        panic!("not a LineString");
    }
}

fn copy_streets(dir: &std::path::Path, skip: &[&str]) -> std::path::PathBuf {
    let shp = data(STREETS);
    for ext in ["shp", "shx", "dbf", "prj"] {
        if !skip.contains(&ext) {
            std::fs::copy(shp.with_extension(ext), dir.join(format!("streets.{ext}"))).unwrap();
        }
    }
    dir.join("streets.shp")
}

fn fails(args: &[&str], needles: &[&str]) {
    let o = run(args);
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{msg}");
    for n in needles {
        assert!(msg.contains(n), "message lacks {n:?}: {msg}");
    }
}

#[test]
fn broken_shapefile_sets_are_clear_errors() {
    let d = tmp();
    let out = d.path().join("out");
    let o = out.to_str().unwrap();
    let a = d.path().join("a");
    std::fs::create_dir(&a).unwrap();
    let p = copy_streets(&a, &["dbf"]);
    fails(
        &["plan", "--roads", p.to_str().unwrap(), "--out", o],
        &["streets.dbf", "missing"],
    );
    let b = d.path().join("b");
    std::fs::create_dir(&b).unwrap();
    let p = copy_streets(&b, &["prj"]);
    fails(
        &["plan", "--roads", p.to_str().unwrap(), "--out", o],
        &["streets.shp", ".prj", "--crs"],
    );
    // With --crs the same set works.
    let ok = run(&[
        "plan",
        "--roads",
        p.to_str().unwrap(),
        "--out",
        o,
        "--crs",
        "EPSG:2223",
        "-q",
    ]);
    assert!(ok.status.success(), "{}", stderr(&ok));
    std::fs::remove_dir_all(&out).unwrap();
    let c = d.path().join("c");
    std::fs::create_dir(&c).unwrap();
    let p = copy_streets(&c, &[]);
    std::fs::write(c.join("streets.prj"), "PROJCS[\"broken\",GEOGCS[").unwrap();
    fails(
        &["plan", "--roads", p.to_str().unwrap(), "--out", o],
        &["streets.prj", "--crs"],
    );
    let p = copy_streets(&c, &[]);
    fails(
        &[
            "plan",
            "--roads",
            p.to_str().unwrap(),
            "--out",
            o,
            "--damage-field",
            "DMG",
        ],
        &["streets.dbf", "\"DMG\"", "fields are", "Length"],
    );
    let e = d.path().join("e");
    std::fs::create_dir(&e).unwrap();
    let p = copy_streets(&e, &["shx"]);
    fails(
        &["plan", "--roads", p.to_str().unwrap(), "--out", o],
        &["streets.shx", "missing"],
    );
    assert!(!out.exists());
}

#[test]
fn shapefile_damage_zones_in_state_plane_feet() {
    // A polygon Shapefile written here in the streets' own CRS (copied .prj): a square over the
    // western half of the GeoDaNet streets with damage 0.5; roads themselves intact.
    let shp = data(STREETS);
    let layer = read_roads(&Source::File(shp.clone()), &RoadSettings::default()).unwrap();
    let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
    for p in &layer.native {
        lo = [lo[0].min(p[0]), lo[1].min(p[1])];
        hi = [hi[0].max(p[0]), hi[1].max(p[1])];
    }
    let mid = (lo[0] + hi[0]) / 2.0;
    let d = tmp();
    let zones = d.path().join("flood.shp");
    let table = shapefile::dbase::TableWriterBuilder::new().add_numeric_field(
        shapefile::dbase::FieldName::try_from("damage").unwrap(),
        10,
        3,
    );
    let mut w = shapefile::Writer::from_path(&zones, table).unwrap();
    // Outer rings run clockwise in Shapefiles.
    let ring = vec![
        shapefile::Point::new(lo[0] - 10.0, lo[1] - 10.0),
        shapefile::Point::new(lo[0] - 10.0, hi[1] + 10.0),
        shapefile::Point::new(mid, hi[1] + 10.0),
        shapefile::Point::new(mid, lo[1] - 10.0),
        shapefile::Point::new(lo[0] - 10.0, lo[1] - 10.0),
    ];
    let poly = shapefile::Polygon::new(shapefile::PolygonRing::Outer(ring));
    let mut rec = shapefile::dbase::Record::default();
    rec.insert(
        "damage".to_string(),
        shapefile::dbase::FieldValue::Numeric(Some(0.5)),
    );
    w.write_shape_and_record(&poly, &rec).unwrap();
    drop(w);
    std::fs::copy(shp.with_extension("prj"), zones.with_extension("prj")).unwrap();
    let out = d.path().join("out");
    let o = run(&[
        "plan",
        "--roads",
        shp.to_str().unwrap(),
        "--damage-zones",
        zones.to_str().unwrap(),
        "--default-damage",
        "0",
        "--whole-network",
        "--out",
        out.to_str().unwrap(),
        "-q",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["damage_zones"], 1);
    let touched = s["counts"]["edges_in_zones"].as_u64().unwrap();
    let edges = s["counts"]["edges"].as_u64().unwrap();
    assert!(
        touched > edges / 5 && touched < edges,
        "{touched} of {edges}"
    );
    assert!(s["total_cost"].as_f64().unwrap() > 0.0);
}
