//! The bad-input catalogue, part for point layers in every format (docs/bad-inputs.md lists every
//! case): CSV quoting (RFC 4180) and decimal marks for every CSV input, and field reports read as
//! CSV, Shapefile, zipped Shapefile or GeoPackage naming their own options.

mod common;
use common::bad::*;
use std::path::Path;

/// Field reports near the fixture roads, as CSV text after `header`.
fn points_csv(d: &Path, name: &str, text: &str) -> String {
    s(&file(d, name, text))
}

case!(csv_unterminated_quote, |d| {
    // RFC 4180 §2.5–2.7: the quote opened on line 2 never closes. A lenient reader takes the rest
    // of the file as one field and then counts fields; the message must say what is wrong.
    let sites = file(
        d,
        "sites.csv",
        "id,name,lon,lat\nA,\"oops,0.0001,0.0001\nB,x,0.0005,0.0001\n",
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&sites)],
        &["sites.csv", "line 2", "never closed"],
    );
    let reports = points_csv(d, "p.csv", "lon,lat,damage\n0.0001,0.0001,\"2\n");
    plan_fails(
        &roads_ok(d),
        &["--damage-points", &reports],
        &["p.csv", "line 2", "never closed"],
    );
});

case!(csv_text_after_a_closing_quote, |d| {
    // `"North"gate`: the text after the closing quote would be glued to the field.
    let sites = file(
        d,
        "sites.csv",
        "id,name,lon,lat\nA,\"North\"gate,0.0001,0.0001\n",
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&sites)],
        &["sites.csv", "line 2", "after the closing quote"],
    );
});

case!(csv_quote_inside_an_unquoted_field, |d| {
    let reports = points_csv(d, "p.csv", "lon;lat;note\n0,0001;0,0001;12\" pipe\n");
    plan_fails(
        &roads_ok(d),
        &["--damage-points", &reports],
        &["p.csv", "line 2", "does not start with one"],
    );
});

case!(csv_point_and_comma_as_decimal_marks, |d| {
    // In a semicolon file `10.000` may be ten thousand (a thousands point) or ten: with a decimal
    // comma elsewhere in the file it is refused, naming both cells, never read as 10.
    let sites = file(
        d,
        "sites.csv",
        "id;lon;lat\nA;0.000;0,0001\nB;0,0005;0,0001\n",
    );
    plan_fails(
        &roads_ok(d),
        &["--sites", &s(&sites)],
        &[
            "sites.csv",
            "line 2",
            "\"0.000\"",
            "\"0,0001\"",
            "same decimal mark",
        ],
    );
    let reports = points_csv(d, "p.csv", "lon;lat;damage\n0,0001;0,0001;2.500\n");
    plan_fails(
        &roads_ok(d),
        &["--damage-points", &reports],
        &["p.csv", "\"2.500\"", "same decimal mark"],
    );
});

case!(csv_separator_option_names_the_right_one, |d| {
    // A semicolon file read with `--sites-delimiter tab`: reknit reads semicolons, so the advice
    // is the option's right value, not to save the file again.
    let sites = file(d, "sites.csv", "id;lon;lat\nA;0,0001;0,0001\n");
    let o = plan_cli_err(
        d,
        &["--sites", &s(&sites), "--sites-delimiter", "tab"],
        &["sites.csv", "--sites-delimiter ;", "semicolon"],
    );
    assert!(!o.contains("save it again"), "{o}");
    let reports = points_csv(d, "p.csv", "lon;lat\n0,0001;0,0001\n");
    plan_cli_err(
        d,
        &[
            "--damage-points",
            &reports,
            "--damage-points-delimiter",
            "tab",
        ],
        &["p.csv", "--damage-points-delimiter ;"],
    );
});

/// Runs a plan on the fixture roads that must fail with every needle; returns the message.
fn plan_cli_err(d: &Path, extra: &[&str], needles: &[&str]) -> String {
    let out = d.join("out");
    let o = common::plan_cli(&roads_ok(d), &out, extra);
    let e = common::stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{e}");
    for n in needles {
        assert!(e.contains(n), "missing {n:?} in: {e}");
    }
    assert!(!out.exists());
    e
}

case!(points_shapefile_without_prj, |d| {
    let shp = shapefile_points(d, "p.shp", &[[0.0001, 0.0001]], "Point");
    std::fs::remove_file(shp.with_extension("prj")).unwrap();
    plan_cli_err(
        d,
        &["--damage-points", &s(&shp)],
        &["p.shp", "no .prj", "--damage-points-crs"],
    );
});

case!(points_of_the_wrong_geometry, |d| {
    // A report is a Point: a polygon (a damage zone given as a report) is refused by name in
    // every format, not placed at its first vertex.
    let shp = shapefile_points(d, "p.shp", &[[0.0001, 0.0001]], "Polygon");
    plan_cli_err(
        d,
        &["--damage-points", &s(&shp)],
        &[
            "p.shp",
            "feature 0",
            "damage reports must be Points",
            "Polygon",
        ],
    );
    let gj = file(
        d,
        "p.geojson",
        fc(&[
            r#"{"type":"Feature","properties":{},"geometry":{"type":"LineString","coordinates":[[0,0],[0.001,0]]}}"#,
        ]),
    );
    plan_cli_err(
        d,
        &["--damage-points", &s(&gj)],
        &[
            "p.geojson",
            "feature 0",
            "damage reports must be Points, found LineString",
        ],
    );
});

/// A zip of two point Shapefile sets (`a` and `b`) at `d/name`.
fn two_sets_zipped(d: &Path, name: &str) -> std::path::PathBuf {
    let a = shapefile_points(d, "a.shp", &[[0.0001, 0.0001]], "Point");
    let b = shapefile_points(d, "b.shp", &[[0.0002, 0.0001]], "Point");
    let mut entries = common::zipped::set_entries(&a, "");
    entries.extend(common::zipped::set_entries(&b, ""));
    common::zipped::zip_owned(d, name, &entries)
}

case!(points_zip_or_gpkg_with_several_layers, |d| {
    let z = two_sets_zipped(d, "p.zip");
    plan_cli_err(
        d,
        &["--damage-points", &s(&z)],
        &["p.zip", "2 Shapefile sets", "--damage-points-layer"],
    );
    // The option chooses one; given a name the archive lacks, the sets are listed.
    plan_cli_err(
        d,
        &["--damage-points", &s(&z), "--damage-points-layer", "c"],
        &["p.zip", "no Shapefile set named \"c\""],
    );
    let day = |table| GpkgLayer {
        table,
        kind: "POINT",
        srs_id: 0,
        columns: "",
    };
    let g = gpkg_with(d, "p.gpkg", &[day("day1"), day("day2")], "");
    plan_cli_err(
        d,
        &["--damage-points", &s(&g)],
        &["p.gpkg", "day1, day2", "--damage-points-layer"],
    );
});

case!(layer_messages_name_the_kinds_own_options, |d| {
    // The zip and GeoPackage readers are shared by roads, sites, reports and zones: each message
    // names the options of the layer it is about, never the roads' ones.
    let z = two_sets_zipped(d, "s.zip");
    let e = plan_cli_err(
        d,
        &["--sites", &s(&z)],
        &[
            "s.zip",
            "2 Shapefile sets",
            "choose one with --sites-layer NAME",
        ],
    );
    assert!(!e.contains("--roads-layer"), "{e}");
    // A GeoPackage layer whose srs_id is not in gpkg_spatial_ref_sys: the advice is the CRS option
    // of the layer's kind.
    for (input, option) in [
        ("--sites", "--sites-crs"),
        ("--damage-points", "--damage-points-crs"),
        ("--damage-zones", "--zones-crs"),
    ] {
        let layer = GpkgLayer {
            table: "layer1",
            kind: "GEOMETRY",
            srs_id: 99,
            columns: "",
        };
        let g = gpkg_with(d, &format!("{}.gpkg", &input[2..]), &[layer], "");
        let e = plan_cli_err(
            d,
            &[input, &s(&g)],
            &[
                "srs_id 99",
                &format!("give the layer's CRS with {option} EPSG:NNNN"),
            ],
        );
        assert!(!e.contains("--crs "), "{e}");
    }
});

case!(points_options_without_their_input, |d| {
    let gj = file(d, "p.geojson", fc(&[&site_feature("a", 0.0001, 0.0001)]));
    plan_cli_err(
        d,
        &["--damage-points", &s(&gj), "--damage-points-delimiter", ";"],
        &[
            "--damage-points-delimiter",
            "only a CSV damage reports file",
        ],
    );
    plan_cli_err(
        d,
        &["--damage-points", &s(&gj), "--damage-points-layer", "x"],
        &["--damage-points-layer", "GeoPackage or zipped Shapefile"],
    );
    plan_cli_err(
        d,
        &["--damage-points-crs", "EPSG:3857"],
        &["--damage-points-crs", "give --damage-points"],
    );
    let csv = points_csv(d, "p.csv", "lon|lat\n0.0001|0.0001\n");
    plan_cli_err(
        d,
        &["--damage-points", &csv, "--damage-points-delimiter", "|"],
        &["--damage-points-delimiter", "not a CSV separator"],
    );
});

case!(points_csv_empty_or_without_coordinates, |d| {
    let empty = points_csv(d, "p.csv", "lon,lat,damage\n");
    plan_cli_err(
        d,
        &["--damage-points", &empty],
        &["p.csv", "holds no reports"],
    );
    let no_lon = points_csv(d, "q.csv", "east,north,damage\n1,2,3\n");
    plan_cli_err(
        d,
        &["--damage-points", &no_lon],
        &["q.csv", "no longitude (or x) column", "east, north, damage"],
    );
    let bad_damage = points_csv(d, "r.csv", "lon,lat,damage\n0.0001,0.0001,\"2,5\"\n");
    plan_cli_err(
        d,
        &["--damage-points", &bad_damage],
        &["r.csv", "feature 0", "\"damage\"", "not a number"],
    );
});

/// A Shapefile set (WGS84 .prj) of `kind` shapes ("Point", or "Polygon": a small square round
/// each position) with a `damage` field of 2.
fn shapefile_points(d: &Path, name: &str, at: &[[f64; 2]], kind: &str) -> std::path::PathBuf {
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let p = d.join(name);
    let table =
        TableWriterBuilder::new().add_numeric_field(FieldName::try_from("damage").unwrap(), 8, 2);
    let mut r = Record::default();
    r.insert("damage".into(), FieldValue::Numeric(Some(2.0)));
    if kind == "Point" {
        let mut w = shapefile::Writer::from_path(&p, table).unwrap();
        for q in at {
            w.write_shape_and_record(&shapefile::Point::new(q[0], q[1]), &r)
                .unwrap();
        }
    } else {
        let mut w = shapefile::Writer::from_path(&p, table).unwrap();
        for q in at {
            let e = 0.00001;
            let ring = [[0.0, 0.0], [0.0, e], [e, e], [e, 0.0], [0.0, 0.0]]
                .iter()
                .map(|o| shapefile::Point::new(q[0] + o[0], q[1] + o[1]))
                .collect();
            let poly = shapefile::Polygon::new(shapefile::PolygonRing::Outer(ring));
            w.write_shape_and_record(&poly, &r).unwrap();
        }
    }
    common::write_wgs84_prj(&p);
    p
}
