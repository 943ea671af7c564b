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

// ---- GeoPackage ----

/// A GeoPackage written here with SQLite: the two required tables, and `sql` after them.
fn gpkg(d: &Path, name: &str, sql: &str) -> std::path::PathBuf {
    let p = d.join(name);
    let c = rusqlite::Connection::open(&p).unwrap();
    c.execute_batch(
        "CREATE TABLE gpkg_spatial_ref_sys (srs_name TEXT, srs_id INTEGER PRIMARY KEY, \
         organization TEXT, organization_coordsys_id INTEGER, definition TEXT, description TEXT);
         INSERT INTO gpkg_spatial_ref_sys VALUES ('WGS 84', 4326, 'EPSG', 4326, 'GEOGCS[\"WGS 84\"]', '');
         CREATE TABLE gpkg_contents (table_name TEXT PRIMARY KEY, data_type TEXT);",
    )
    .unwrap();
    c.execute_batch(sql).unwrap();
    p
}

/// A GeoPackage geometry blob (little-endian header, no envelope, srs 4326) around `wkb`.
fn blob(wkb: &[u8]) -> String {
    let mut b = b"GP\x00\x01".to_vec();
    b.extend_from_slice(&4326i32.to_le_bytes());
    b.extend_from_slice(wkb);
    b.iter().map(|x| format!("{x:02X}")).collect()
}

const GEOMETRY_COLUMNS: &str = "CREATE TABLE gpkg_geometry_columns (table_name TEXT, \
    column_name TEXT, geometry_type_name TEXT, srs_id INTEGER, z INTEGER, m INTEGER);";

case!(gpkg_without_geometry_column, |d| {
    // An attributes-only GeoPackage: no gpkg_geometry_columns table at all.
    let p = gpkg(
        d,
        "table.gpkg",
        "CREATE TABLE roads (fid INTEGER PRIMARY KEY, name TEXT);",
    );
    plan_fails(
        &p,
        &[],
        &["table.gpkg", "not a GeoPackage with a geometry column"],
    );
});

case!(gpkg_with_no_layer, |d| {
    let p = gpkg(d, "none.gpkg", GEOMETRY_COLUMNS);
    plan_fails(
        &p,
        &[],
        &["none.gpkg", "holds no layer with a geometry column"],
    );
});

case!(gpkg_layer_not_there, |d| {
    let bytes = std::fs::read(data("gpkg/streets.gpkg")).unwrap();
    let p = file(d, "county.gpkg", bytes);
    plan_fails(
        &p,
        &["--roads-layer", "bridges"],
        &["county.gpkg", "no layer \"bridges\"", "schools, streets"],
    );
});

case!(gpkg_layer_of_points, |d| {
    let bytes = std::fs::read(data("gpkg/streets.gpkg")).unwrap();
    let p = file(d, "county.gpkg", bytes);
    plan_fails(
        &p,
        &["--roads-layer", "schools"],
        &["county.gpkg", "no road lines found", "not a line (Point)"],
    );
});

case!(gpkg_that_is_text, |d| {
    let p = file(d, "roads.gpkg", fc(&[OK_LINE]));
    plan_fails(&p, &[], &["roads.gpkg", "GeoPackage"]);
});

case!(gpkg_truncated_geometry, |d| {
    // A LineString blob that declares two points and holds one and a half.
    let mut wkb = vec![1u8];
    wkb.extend_from_slice(&2u32.to_le_bytes());
    wkb.extend_from_slice(&2u32.to_le_bytes());
    wkb.extend_from_slice(&[0u8; 24]);
    let sql = format!(
        "{GEOMETRY_COLUMNS}
         INSERT INTO gpkg_geometry_columns VALUES ('roads', 'geom', 'LINESTRING', 4326, 0, 0);
         CREATE TABLE roads (fid INTEGER PRIMARY KEY, geom BLOB);
         INSERT INTO roads VALUES (1, X'{}');",
        blob(&wkb)
    );
    let p = gpkg(d, "cut.gpkg", &sql);
    plan_fails(
        &p,
        &[],
        &[
            "cut.gpkg",
            "feature 0",
            "field \"geom\"",
            "declares 2 points",
        ],
    );
});

case!(gpkg_text_not_utf8, |d| {
    let mut wkb = vec![1u8];
    wkb.extend_from_slice(&2u32.to_le_bytes());
    wkb.extend_from_slice(&2u32.to_le_bytes());
    for v in [0.0f64, 0.0, 0.001, 0.0] {
        wkb.extend_from_slice(&v.to_le_bytes());
    }
    let sql = format!(
        "{GEOMETRY_COLUMNS}
         INSERT INTO gpkg_geometry_columns VALUES ('roads', 'geom', 'LINESTRING', 4326, 0, 0);
         CREATE TABLE roads (fid INTEGER PRIMARY KEY, geom BLOB, name TEXT);
         INSERT INTO roads VALUES (1, X'{}', CAST(X'FF41' AS TEXT));",
        blob(&wkb)
    );
    let p = gpkg(d, "latin.gpkg", &sql);
    plan_fails(
        &p,
        &[],
        &["latin.gpkg", "feature 0", "field \"name\"", "not UTF-8"],
    );
});

case!(roads_layer_without_a_geopackage, |d| {
    plan_fails(
        &roads_ok(d),
        &["--roads-layer", "streets"],
        &["--roads-layer", "GeoPackage"],
    );
});

// ---- Zipped Shapefiles ----

/// A zip of the small two-road Shapefile set, each member named `folder` + its file name.
fn zipped_set(d: &Path, zip: &str, folder: &str, skip: &[&str]) -> std::path::PathBuf {
    use common::zipped::*;
    let sub = d.join("set");
    std::fs::create_dir_all(&sub).unwrap();
    let shp = shapefile_roads(&sub, "lanes.shp", &two_roads());
    let entries: Vec<(String, Vec<u8>)> = set_entries(&shp, folder)
        .into_iter()
        .filter(|(n, _)| !skip.iter().any(|s| n.ends_with(s)))
        .collect();
    let p = zip_owned(d, zip, &entries);
    std::fs::remove_dir_all(&sub).unwrap();
    p
}

case!(zip_with_two_shapefile_sets, |d| {
    use common::zipped::*;
    let sub = d.join("set");
    std::fs::create_dir_all(&sub).unwrap();
    let shp = shapefile_roads(&sub, "lanes.shp", &two_roads());
    let mut entries = set_entries(&shp, "east/");
    entries.extend(set_entries(&shp, "west/"));
    let p = zip_owned(d, "two.zip", &entries);
    std::fs::remove_dir_all(&sub).unwrap();
    plan_fails(
        &p,
        &[],
        &[
            "two.zip",
            "2 Shapefile sets",
            "east/lanes.shp",
            "west/lanes.shp",
            "--roads-layer",
        ],
    );
    // Both sets share a file name: only their path inside the archive tells them apart.
    plan_fails(
        &p,
        &["--roads-layer", "lanes"],
        &["two.zip", "path inside the archive"],
    );
});

case!(zip_with_no_shapefile, |d| {
    let p = common::zipped::zip_of(d, "notes.zip", &[("notes.txt", b"no layer here".to_vec())]);
    plan_fails(&p, &[], &["notes.zip", "no Shapefile set", "notes.txt"]);
});

case!(zip_layer_not_there, |d| {
    let p = zipped_set(d, "one.zip", "", &[]);
    plan_fails(
        &p,
        &["--roads-layer", "rivers"],
        &["one.zip", "no Shapefile set named \"rivers\"", "lanes.shp"],
    );
});

case!(zip_without_dbf, |d| {
    let p = zipped_set(d, "nodbf.zip", "roads/", &[".dbf"]);
    plan_fails(
        &p,
        &[],
        &["nodbf.zip", "roads/lanes.dbf", "attribute table"],
    );
});

case!(zip_without_shx, |d| {
    let p = zipped_set(d, "noshx.zip", "", &[".shx"]);
    plan_fails(&p, &[], &["noshx.zip", "lanes.shx", "index"]);
});

case!(zip_without_prj, |d| {
    let p = zipped_set(d, "noprj.zip", "", &[".prj"]);
    plan_fails(&p, &[], &["noprj.zip", "lanes.shp", ".prj", "--crs"]);
});

case!(zip_truncated, |d| {
    let p = zipped_set(d, "cut.zip", "", &[]);
    let bytes = std::fs::read(&p).unwrap();
    std::fs::write(&p, &bytes[..bytes.len() / 2]).unwrap();
    plan_fails(&p, &[], &["cut.zip", "not a readable zip archive"]);
});

case!(zip_member_corrupt, |d| {
    // The .dbf's deflated bytes overwritten in the middle: the inflater or the member's CRC-32
    // (APPNOTE 6.3 §4.4.7) refuses it.
    let p = zipped_set(d, "bad.zip", "", &[]);
    let mut bytes = std::fs::read(&p).unwrap();
    let at = bytes.windows(9).position(|w| w == b"lanes.dbf").unwrap() + 9;
    for b in &mut bytes[at + 4..at + 20] {
        *b ^= 0x5A;
    }
    std::fs::write(&p, bytes).unwrap();
    plan_fails(&p, &[], &["bad.zip", "lanes.dbf", "corrupt"]);
});

case!(zip_bomb_declared_size, |d| {
    // A member declaring 3 GiB once inflated: refused before anything is inflated.
    let p = zipped_set(d, "bomb.zip", "", &[]);
    common::zipped::declare_size(&p, "lanes.shp", 3 << 30);
    plan_fails(&p, &[], &["bomb.zip", "lanes.shp", "1024 MiB", "zip bomb"]);
});

case!(zip_bomb_inflates_beyond_its_header, |d| {
    // A member whose header declares 40 bytes but whose data inflates to more: reading stops
    // past the declared size (the zip reader's own check, or ours one byte later), so memory
    // stays bounded whatever the data holds.
    let p = zipped_set(d, "liar.zip", "", &[]);
    common::zipped::declare_size(&p, "lanes.shp", 40);
    plan_fails(
        &p,
        &[],
        &[
            "liar.zip",
            "lanes.shp",
            "corrupt",
            "larger than its declared",
        ],
    );
});

case!(same_road_layer_twice, |d| {
    let p = roads_ok(d);
    plan_fails(&p, &["--roads", &s(&p)], &["roads.geojson", "given twice"]);
});

// ---- Sites drawn as polygons ----

/// A sites layer of one Polygon with the given ring (JSON positions).
fn polygon_sites(d: &Path, ring: &str) -> std::path::PathBuf {
    file(
        d,
        "sites.geojson",
        fc(&[&format!(
            r#"{{"type":"Feature","properties":{{"site_id":"h"}},"geometry":{{"type":"Polygon","coordinates":[{ring}]}}}}"#
        )]),
    )
}

case!(polygon_site_without_area, |d| {
    // Every position on one line: no inside to place the site in, no outline to measure from.
    let p = polygon_sites(d, "[[0,0.0001],[0.0005,0.0001],[0.001,0.0001],[0,0.0001]]");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "sites.geojson",
            "feature 0",
            "field \"geometry\"",
            "has no area",
        ],
    );
});

case!(polygon_site_ring_not_closed, |d| {
    let p = polygon_sites(d, "[[0,0.0001],[0.0005,0.0001],[0.0005,0.0003],[0,0.0003]]");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "sites.geojson",
            "feature 0",
            "ring 0 is not closed",
            "RFC 7946",
        ],
    );
});

case!(polygon_site_crossing_itself, |d| {
    // A bow tie: its ring crosses itself, so it has no one inside.
    let p = polygon_sites(
        d,
        "[[0,0.0001],[0.0005,0.0003],[0.0005,0.0001],[0,0.0003],[0,0.0001]]",
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "sites.geojson",
            "feature 0",
            "is not valid",
            "give the site as a Point",
        ],
    );
});

// ---- CSV sites ----

case!(csv_sites_row_with_another_separator, |d| {
    let p = file(d, "sites.csv", "site_id;lon;lat\na;0;0\nb,0.001,0\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "sites.csv",
            "line 3 has 1 field(s) where the header has 3",
            "semicolon",
        ],
    );
});

case!(csv_sites_row_with_a_missing_field, |d| {
    let p = file(d, "sites.csv", "site_id,lon,lat\na,0,0\nb,0.001\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &["sites.csv", "line 3 has 2 field(s) where the header has 3"],
    );
});

case!(csv_sites_header_with_two_separators, |d| {
    let p = file(d, "sites.csv", "site_id,lon;lat\na,0;0\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "sites.csv",
            "line 1",
            "several separators (comma, semicolon)",
            "--sites-delimiter",
        ],
    );
});

case!(csv_sites_number_with_point_and_comma, |d| {
    // "1.000,5" may be a thousands point and a decimal comma, or a slip: refused, not guessed.
    let p = file(d, "sites.csv", "site_id;lon;lat\na;0;0\nb;1.000,5;0\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "sites.csv",
            "feature 1",
            "field \"lon\"",
            "line 3",
            "both a point and a comma",
        ],
    );
});

case!(csv_sites_decimal_comma_between_commas, |d| {
    let p = file(d, "sites.csv", "site_id,lon,lat\na,\"0,0005\",0\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "sites.csv",
            "field \"lon\"",
            "decimal comma is read only in files separated by a semicolon or a tab",
        ],
    );
});

case!(sites_delimiter_not_known, |d| {
    let p = file(d, "sites.csv", "site_id|lon|lat\na|0|0\n");
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p), "--sites-delimiter", "|"],
        &["--sites-delimiter", "not a CSV separator"],
    );
});

// ---- GeoPackage sites and zones ----

/// A GeoPackage of one layer `sites` (srs 4326) holding one feature with the given WKB geometry.
fn gpkg_layer(d: &Path, name: &str, kind: &str, wkb: &[u8]) -> std::path::PathBuf {
    let sql = format!(
        "{GEOMETRY_COLUMNS}
         INSERT INTO gpkg_geometry_columns VALUES ('sites', 'geom', '{kind}', 4326, 0, 0);
         CREATE TABLE sites (fid INTEGER PRIMARY KEY, geom BLOB, site_id TEXT);
         INSERT INTO sites VALUES (1, X'{}', 'h');",
        blob(wkb)
    );
    gpkg(d, name, &sql)
}

case!(gpkg_sites_of_lines, |d| {
    let mut wkb = vec![1u8];
    wkb.extend_from_slice(&2u32.to_le_bytes());
    wkb.extend_from_slice(&2u32.to_le_bytes());
    for v in [0.0f64, 0.0001, 0.001, 0.0001] {
        wkb.extend_from_slice(&v.to_le_bytes());
    }
    let p = gpkg_layer(d, "lines.gpkg", "LINESTRING", &wkb);
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "lines.gpkg",
            "feature 0",
            "field \"geometry\"",
            "found LineString",
        ],
    );
});

case!(gpkg_site_with_empty_geometry, |d| {
    // The header's empty flag (GeoPackage 1.3 §2.1.3): a site that is nowhere is refused.
    let sql = format!(
        "{GEOMETRY_COLUMNS}
         INSERT INTO gpkg_geometry_columns VALUES ('sites', 'geom', 'POINT', 4326, 0, 0);
         CREATE TABLE sites (fid INTEGER PRIMARY KEY, geom BLOB, site_id TEXT);
         INSERT INTO sites VALUES (1, X'4750001100000000', 'h');"
    );
    let p = gpkg(d, "empty.gpkg", &sql);
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "empty.gpkg",
            "feature 0, field \"geom\": the geometry is empty",
        ],
    );
});

case!(gpkg_sites_layer_not_there, |d| {
    let bytes = std::fs::read(data("gpkg/streets.gpkg")).unwrap();
    let p = file(d, "county.gpkg", bytes);
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p), "--sites-layer", "hospitals"],
        &["county.gpkg", "no layer \"hospitals\"", "schools, streets"],
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&p)],
        &[
            "county.gpkg",
            "several layers (schools, streets)",
            "--sites-layer",
        ],
    );
});

case!(gpkg_sites_and_zones_without_geometry_column, |d| {
    let p = gpkg(
        d,
        "table.gpkg",
        "CREATE TABLE sites (fid INTEGER PRIMARY KEY, name TEXT);",
    );
    for flag in ["--sites", "--damage-zones"] {
        plan_fails(
            &roads_ok(d),
            &[flag, &s(&p)],
            &["table.gpkg", "not a GeoPackage with a geometry column"],
        );
    }
});

case!(gpkg_zones_of_points, |d| {
    let mut wkb = vec![1u8];
    wkb.extend_from_slice(&1u32.to_le_bytes());
    for v in [0.0005f64, 0.0] {
        wkb.extend_from_slice(&v.to_le_bytes());
    }
    let p = gpkg_layer(d, "points.gpkg", "POINT", &wkb);
    plan_fails(
        &roads_ok(d),
        &["--damage-zones", &s(&p)],
        &[
            "points.gpkg",
            "feature 0",
            "damage zones must be Polygons, found Point",
        ],
    );
});

case!(layer_and_separator_options_without_their_input, |d| {
    let sites = s(&file(
        d,
        "sites.geojson",
        fc(&[&site_feature("a", 0.0, 0.0)]),
    ));
    let zones = s(&file(d, "zones.geojson", fc(&[])));
    for (extra, needle) in [
        (["--sites", &sites, "--sites-layer", "x"], "--sites-layer"),
        (
            ["--sites", &sites, "--sites-delimiter", ";"],
            "--sites-delimiter",
        ),
        (
            ["--damage-zones", &zones, "--zones-layer", "x"],
            "--zones-layer",
        ),
    ] {
        plan_fails(&roads_ok(d), &extra, &[needle]);
    }
});
