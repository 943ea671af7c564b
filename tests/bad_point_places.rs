//! The bad-input catalogue, part for where point layers lie and how their rows are read
//! (docs/bad-inputs.md lists every case): a sites or reports layer lying wholly away from the
//! roads (a projected layer read as longitude/latitude), the field reports' own coordinate
//! columns, and CSV line numbers whatever the line ends.

mod common;
use common::bad::*;
use std::path::Path;

/// Two roads of a small district near 9.5°E 47.1°N, about 1.5 km across.
fn district_roads(d: &Path) -> std::path::PathBuf {
    let line = |a: [f64; 2], b: [f64; 2]| {
        format!(
            r#"{{"type":"Feature","properties":{{"damage":1}},"geometry":{{"type":"LineString","coordinates":[[{},{}],[{},{}]]}}}}"#,
            a[0], a[1], b[0], b[1]
        )
    };
    file(
        d,
        "roads.geojson",
        fc(&[
            &line([9.50, 47.10], [9.51, 47.10]),
            &line([9.51, 47.10], [9.51, 47.11]),
        ]),
    )
}

/// A Shapefile of points with a WGS84 `.prj` and a `damage` field of 2.
fn shapefile_points(d: &Path, name: &str, at: &[[f64; 2]]) -> std::path::PathBuf {
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let p = d.join(name);
    let table =
        TableWriterBuilder::new().add_numeric_field(FieldName::try_from("damage").unwrap(), 8, 2);
    let mut r = Record::default();
    r.insert("damage".into(), FieldValue::Numeric(Some(2.0)));
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for q in at {
        w.write_shape_and_record(&shapefile::Point::new(q[0], q[1]), &r)
            .unwrap();
    }
    drop(w);
    common::write_wgs84_prj(&p);
    p
}

case!(point_layer_wholly_away_from_the_roads, |d| {
    // The district's sites in metres of a local grid whose origin is its south-west corner: every
    // figure lies within ±180/±90, so each passes as a longitude/latitude near 0°, 0°.
    let roads = district_roads(d);
    let sites = file(d, "sites.csv", "id,x,y\nA,35.5,12.25\nB,88,40.5\n");
    plan_fails(
        &roads,
        &["--sites", &s(&sites)],
        &[
            "sites.csv",
            "the sites layer lies wholly away from the roads",
            "longitude 35.5 to 88, latitude 12.25 to 40.5",
            "longitude 9.5 to 9.51, latitude 47.1 to 47.11",
            "as no CRS was given or declared",
            "--sites-crs EPSG:NNNN",
        ],
    );
    // Field reports alike, GeoJSON without a `crs` member.
    let reports = file(d, "reports.geojson", fc(&[&site_feature("r1", 60.0, 30.0)]));
    plan_fails(
        &roads,
        &["--damage-points", &s(&reports)],
        &[
            "reports.geojson",
            "the damage reports layer lies wholly away",
            "--damage-points-crs EPSG:NNNN",
        ],
    );
    // A Shapefile whose `.prj` says WGS84 while its figures are grid metres: the message names
    // the CRS it was read in.
    let shp = shapefile_points(d, "reports.shp", &[[60.0, 30.0]]);
    plan_fails(
        &roads,
        &["--damage-points", &s(&shp)],
        &[
            "reports.shp",
            "lies wholly away",
            "converted from",
            "--damage-points-crs EPSG:NNNN",
        ],
    );
});

case!(point_layer_partly_beyond_the_roads_is_kept, |d| {
    // A site 5 km beyond the roads' extent and a report 20 km away are listed one by one (not
    // joined, not matched), never refused as a layer.
    let roads = district_roads(d);
    let sites = file(
        d,
        "sites.csv",
        "id,lon,lat\nA,9.505,47.1001\nB,9.51,47.105\nfar,9.58,47.10\n",
    );
    let reports = file(
        d,
        "reports.geojson",
        fc(&[&site_feature("r1", 9.77, 47.10)]),
    );
    let out = plan_ok(
        d,
        &[
            "--roads",
            &s(&roads),
            "--sites",
            &s(&sites),
            "--damage-points",
            &s(&reports),
        ],
    );
    let summary = common::read_json(&out.join("summary.json"));
    assert_eq!(summary["damage_reports"]["applied"], 0, "{summary}");
    let notes = summary["notes"].to_string();
    assert!(
        notes.contains("damage_reports_unmatched") && notes.contains("sites_not_attached"),
        "{notes}"
    );
});

case!(report_coordinate_columns, |d| {
    // Field reports with columns of their own names: without the options the message names
    // them; with GeoJSON reports the options are refused (read by geometry).
    let roads = roads_ok(d);
    let csv = file(d, "p.csv", "e_deg,n_deg,damage\n0.0005,0.00001,2\n");
    plan_fails(
        &roads,
        &["--damage-points", &s(&csv)],
        &[
            "p.csv",
            "no longitude (or x) column",
            "--damage-points-lon-column/--damage-points-lat-column",
            "e_deg, n_deg, damage",
        ],
    );
    plan_fails(
        &roads,
        &[
            "--damage-points",
            &s(&csv),
            "--damage-points-lon-column",
            "e_deg",
            "--damage-points-lat-column",
            "north",
        ],
        &["p.csv", "no latitude (or y) column", "north"],
    );
    let gj = file(d, "p.geojson", fc(&[&site_feature("a", 0.0005, 0.0)]));
    plan_fails(
        &roads,
        &[
            "--damage-points",
            &s(&gj),
            "--damage-points-lat-column",
            "y",
        ],
        &[
            "--damage-points-lat-column",
            "only a CSV damage reports file",
        ],
    );
});

case!(csv_old_mac_line_ends, |d| {
    // Line ends of CR alone (old Mac software): a CSV reader splits the rows there, so the lines
    // a message names are counted there too, for sites and field reports alike.
    let roads = roads_ok(d);
    let sites = file(
        d,
        "sites.csv",
        "id,lon,lat\rA,0.0001,0.0001\rB,east,0.0001\r",
    );
    plan_fails(
        &roads,
        &["--sites", &s(&sites)],
        &["sites.csv", "line 3", "\"east\" is not a number"],
    );
    let reports = file(
        d,
        "p.csv",
        "lon,lat,damage\r0.0001,0.0001,2\r0.0002,0.0001\r",
    );
    plan_fails(
        &roads,
        &["--damage-points", &s(&reports)],
        &["p.csv", "line 3 has 2 field(s)"],
    );
    let quoted = file(
        d,
        "q.csv",
        "lon,lat,note\r0.0001,0.0001,\"ok\"\r0.0002,0.0001,\"open\r",
    );
    plan_fails(
        &roads,
        &["--damage-points", &s(&quoted)],
        &["q.csv", "line 3", "never closed"],
    );
});

case!(numbers_in_messages_are_short, |d| {
    // A figure typed with hundreds of digits is shown in scientific notation in the message that
    // refuses it (RFC 8259 numbers need no such length; neither does a message).
    let roads = roads_ok(d);
    let huge = format!("1{}", "0".repeat(300));
    let tiny = format!("0.{}1", "0".repeat(300));
    for (flag, value, shown) in [
        ("--snap", &huge, "1e300 m is outside"),
        ("--crew-capacity", &tiny, "1e-301 repair-metres per day"),
        ("--default-damage", &huge, "1e300 is not a factor"),
    ] {
        let o = common::plan_cli(&roads, &d.join("out"), &[flag, value]);
        let e = common::stderr(&o);
        assert_eq!(o.status.code(), Some(2), "{e}");
        assert!(e.contains(shown) && e.len() < 600, "{flag}: {e}");
    }
    // A damage value in the data is shown alike.
    let reports = file(
        d,
        "p.geojson",
        fc(&[&format!(
            r#"{{"type":"Feature","properties":{{"damage":{huge}}},"geometry":{{"type":"Point","coordinates":[0.0001,0]}}}}"#
        )]),
    );
    plan_fails(
        &roads,
        &["--damage-points", &s(&reports)],
        &["p.geojson", "value 1e300 exceeds"],
    );
});
