//! The bad-input catalogue, part for the formats read beside GeoJSON and Shapefiles
//! (docs/bad-inputs.md lists every case): OpenStreetMap `.osm.pbf` extracts.

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

/// The invented extract (scripts/make-osm-fixture.py) copied into the case folder.
fn invented(d: &Path, name: &str) -> std::path::PathBuf {
    let bytes = std::fs::read(data("osm/invented.osm.pbf")).unwrap();
    file(d, name, bytes)
}

case!(truncated_pbf_block, |d| {
    // The real extract cut in the middle of a block: refused by name, never read as a smaller map.
    let bytes =
        std::fs::read(data("roads/liechtenstein/liechtenstein-2015-10-06.osm.pbf")).unwrap();
    let p = file(d, "cut.osm.pbf", &bytes[..bytes.len() / 2]);
    plan_fails(
        &p,
        &[],
        &["cut.osm.pbf", "not a readable OpenStreetMap PBF extract"],
    );
});

case!(pbf_that_is_text, |d| {
    let p = file(d, "roads.osm.pbf", fc(&[OK_LINE]));
    plan_fails(
        &p,
        &[],
        &["roads.osm.pbf", "not a readable OpenStreetMap PBF extract"],
    );
});

case!(empty_pbf, |d| {
    let p = file(d, "empty.osm.pbf", b"");
    plan_fails(&p, &[], &["empty.osm.pbf", "no road lines found"]);
});

case!(pbf_with_a_projected_crs, |d| {
    let p = invented(d, "x.osm.pbf");
    plan_fails(
        &p,
        &["--crs", "EPSG:2056"],
        &["x.osm.pbf", "always WGS84", "EPSG:2056"],
    );
});

case!(pbf_with_no_site_tag, |d| {
    let p = invented(d, "x.osm.pbf");
    plan_fails(
        &p,
        &["--sites", &s(&p), "--site-tags", "amenity=library"],
        &[
            "x.osm.pbf",
            "no node or closed way carries a site tag",
            "amenity=library",
        ],
    );
});

case!(site_tags_without_an_extract, |d| {
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("a", 0.0, 0.0)]));
    plan_fails(
        &roads,
        &["--sites", &s(&sites), "--site-tags", "amenity=hospital"],
        &["--site-tags", "OpenStreetMap extract"],
    );
});

case!(site_tags_without_a_value, |d| {
    let p = invented(d, "x.osm.pbf");
    plan_fails(
        &p,
        &["--sites", &s(&p), "--site-tags", "amenity"],
        &["--site-tags", "not FIELD=value1,value2"],
    );
});
