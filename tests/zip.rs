//! Zipped Shapefiles: a `.zip` holding one Shapefile set reads as the set on disk does.
//!
//! Data: tests/data/roads/geodanet-streets (GeoDa Center sample via libpysal, BSD-3-Clause): 293
//! lines with fields `ID` and `Length`, in Arizona State Plane (US survey feet); the archives are
//! made here from it.

mod common;
use common::zipped::*;
use common::*;
use std::path::Path;

const SHP: &str = "roads/geodanet-streets/streets.shp";

/// The streets set zipped in folder `county/`, beside a text file, a folder entry and the
/// resource-fork copies some archivers add (not data).
fn county_zip(d: &Path) -> std::path::PathBuf {
    let mut entries = vec![
        ("county/".to_string(), Vec::new()),
        ("README.txt".to_string(), b"invented notes".to_vec()),
        ("__MACOSX/county/._streets.shp".to_string(), vec![0; 40]),
    ];
    entries.extend(set_entries(&data(SHP), "county/"));
    zip_owned(d, "county.zip", &entries)
}

#[test]
fn zipped_set_reads_as_the_set_on_disk() {
    let d = tmp();
    let z = county_zip(d.path());
    let a = plan_quiet(d.path(), "zip", &z, &[]);
    let b = plan_quiet(d.path(), "shp", &data(SHP), &[]);
    let (sa, sb) = (
        read_json(&a.join("summary.json")),
        read_json(&b.join("summary.json")),
    );
    assert_eq!(sa["counts"], sb["counts"]);
    assert_eq!(sa["total_cost"], sb["total_cost"]);
    assert_eq!(sa["geodesy"], sb["geodesy"]);
    // The same bytes but for the layer's label (`source_layer`: the file given).
    for (layer, zip, shp) in [
        ("plan.geojson", "\"county.zip\"", "\"streets.shp\""),
        ("work-orders.csv", ",county.zip,", ",streets.shp,"),
    ] {
        let text = std::fs::read_to_string(a.join(layer)).unwrap();
        assert!(text.contains(zip), "{layer}");
        assert_eq!(
            text.replace(zip, shp),
            std::fs::read_to_string(b.join(layer)).unwrap(),
            "{layer}"
        );
    }
    // The archive is the input: its size and SHA-256 (FIPS 180-4) as sha2 computes them here.
    use sha2::{Digest, Sha256};
    let bytes = std::fs::read(&z).unwrap();
    let hex: String = Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    let input = &sa["inputs"][0];
    assert_eq!(input["path"], z.display().to_string());
    assert_eq!(input["sha256"], hex);
    assert_eq!(input["bytes"], bytes.len());
}

#[test]
fn gdal_reads_the_zip_as_reknit_does() {
    // GDAL's /vsizip/ reader (ogrinfo, from gdal-bin) on the same archive: the feature count, and
    // the ID attribute of the first feature against the source_id reknit carries for it.
    let Some(ogrinfo) = common::external::program("zip-ogrinfo", &["ogrinfo"], "gdal-bin") else {
        return;
    };
    let d = tmp();
    let z = county_zip(d.path());
    let vsi = format!("/vsizip/{}/county/streets.shp", z.display());
    let o = std::process::Command::new(ogrinfo)
        .args(["-ro", "-al", "-q", "-fid", "0", &vsi])
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&o.stdout).to_string();
    assert!(o.status.success(), "{}", stderr(&o));
    let id: f64 = text
        .lines()
        .find_map(|l| l.trim().strip_prefix("ID (Real) = "))
        .unwrap_or_else(|| panic!("no ID in {text}"))
        .trim()
        .parse()
        .unwrap();
    let o = std::process::Command::new(ogrinfo)
        .args(["-ro", "-so", "-al", &vsi])
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&o.stdout).to_string();
    let count: u64 = text
        .lines()
        .find_map(|l| l.strip_prefix("Feature Count: "))
        .unwrap_or_else(|| panic!("no count in {text}"))
        .trim()
        .parse()
        .unwrap();
    let out = plan_quiet(d.path(), "zip", &z, &[]);
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_read"], count);
    let fc = read_fc(&out.join("plan.geojson"));
    let first = fc
        .features
        .iter()
        .find(|f| f.property("source_index").and_then(|v| v.as_i64()) == Some(0))
        .expect("feature 0 in plan.geojson");
    let carried = first.property("source_id").unwrap();
    assert_eq!(carried.as_f64(), Some(id), "{carried}");
}

#[test]
fn one_of_two_sets_is_picked_by_name() {
    let d = tmp();
    let small = common::bad::shapefile_roads(d.path(), "lanes.shp", &common::bad::two_roads());
    let mut entries = set_entries(&data(SHP), "a/");
    entries.extend(set_entries(&small, "b/"));
    let z = zip_owned(d.path(), "two.zip", &entries);
    let out = plan_quiet(d.path(), "lanes", &z, &["--roads-layer", "lanes"]);
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_read"], 2);
    let out = plan_quiet(d.path(), "streets", &z, &["--roads-layer", "a/streets.shp"]);
    let s = read_json(&out.join("summary.json"));
    assert_eq!(s["counts"]["features_read"], 293);
}
