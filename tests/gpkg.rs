//! GeoPackage road layers, checked against the same layer as a Shapefile.
//!
//! Data: tests/data/gpkg/streets.gpkg, written by GDAL 3.6 (`ogr2ogr -f GPKG -lco
//! SPATIAL_INDEX=NO`) from tests/data/roads/geodanet-streets (GeoDa Center sample via libpysal,
//! BSD-3-Clause): layer `streets` (293 lines) and layer `schools` (8 points), in the sample's
//! Arizona State Plane CRS (feet), which GDAL stores as ESRI:102649 with its WKT definition.

mod common;
use common::*;
use std::path::{Path, PathBuf};

const GPKG: &str = "gpkg/streets.gpkg";
const SHP: &str = "roads/geodanet-streets/streets.shp";

fn plan(d: &Path, name: &str, roads: &Path, extra: &[&str]) -> PathBuf {
    plan_quiet(d, name, roads, extra)
}

#[test]
fn gdal_conversion_reads_as_the_shapefile_does() {
    // GDAL's conversion of the Shapefile (geometry, attributes and CRS) must give the same network.
    let d = tmp();
    let g = read_json(
        &plan(d.path(), "g", &data(GPKG), &["--roads-layer", "streets"]).join("summary.json"),
    );
    let s = read_json(&plan(d.path(), "s", &data(SHP), &[]).join("summary.json"));
    for k in [
        "features_read",
        "features_used",
        "vertices",
        "edges",
        "junctions",
        "components",
        "network_length_m",
    ] {
        assert_eq!(g["counts"][k], s["counts"][k], "{k}");
    }
    assert_eq!(g["total_cost"], s["total_cost"]);
    assert_eq!(g["counts"]["features_read"], 293);
    // Ids are typed by each format (a dBASE numeric with decimals, a GeoPackage column as GDAL
    // chose it): compare every edge's geometry, length and cost.
    let edges = |dir: &str| {
        read_fc(&d.path().join(dir).join("network.geojson"))
            .features
            .iter()
            .map(|f| {
                (
                    f.geometry.as_ref().map(|g| g.value.to_string()),
                    f.property("length_m").cloned(),
                    f.property("cost").cloned(),
                )
            })
            .collect::<Vec<_>>()
    };
    assert_eq!(edges("g"), edges("s"), "network layers differ");
}

#[test]
fn several_layers_need_a_choice() {
    let d = tmp();
    let out = d.path().join("o");
    let o = run(&[
        "plan",
        "--roads",
        data(GPKG).to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{msg}");
    for n in [
        "streets.gpkg",
        "several layers",
        "schools, streets",
        "--roads-layer",
    ] {
        assert!(msg.contains(n), "{n}: {msg}");
    }
    assert!(!out.exists());
}
