//! Sites and zones in more formats: polygon sites (a building outline) in GeoJSON, Shapefile and
//! GeoPackage; CSV sites separated by commas, semicolons or tabs; GeoPackage sites and zones with
//! their layer options.
//!
//! Peers: GDAL 3.6's ogrinfo with its SQLite dialect (SpatiaLite `ST_Distance(a, b, 1)`: the
//! distance on the WGS84 ellipsoid, `ST_Within`) for distances and containment, and ogr2ogr
//! (Debian package gdal-bin) as an independent writer of Shapefiles and GeoPackages.

mod common;
use common::bad::file;
use common::*;
use std::path::{Path, PathBuf};
use std::process::Command;

/// The road lines of the fixture, in metres east and north of (0, 0): a road along the equator
/// and one going north from it.
fn roads_m() -> Vec<Vec<[f64; 2]>> {
    vec![
        vec![[0.0, 0.0], [200.0, 0.0], [400.0, 0.0]],
        vec![[200.0, 0.0], [200.0, 300.0]],
    ]
}

fn rect(x0: f64, y0: f64, x1: f64, y1: f64) -> Vec<[f64; 2]> {
    vec![[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]]
}

/// Polygon sites (id, polygons of rings in metres) and where each lies.
/// Polygons of rings of positions.
type Polygons = Vec<Vec<Vec<[f64; 2]>>>;

fn polygon_sites() -> Vec<(&'static str, Polygons)> {
    vec![
        // Crossed by the east–west road: distance 0.
        ("crossed", vec![vec![rect(80.0, -20.0, 120.0, 20.0)]]),
        // 30 m north of the east–west road.
        ("beside", vec![vec![rect(280.0, 30.0, 320.0, 70.0)]]),
        // An L whose vertex mean lies in its notch, 20 m east of the north road.
        (
            "ell",
            vec![vec![vec![
                [220.0, 100.0],
                [300.0, 100.0],
                [300.0, 120.0],
                [240.0, 120.0],
                [240.0, 180.0],
                [220.0, 180.0],
                [220.0, 100.0],
            ]]],
        ),
        // A courtyard building: its centroid lies in the courtyard.
        (
            "yard",
            vec![vec![
                rect(50.0, 150.0, 110.0, 210.0),
                rect(70.0, 170.0, 90.0, 190.0),
            ]],
        ),
        // Two buildings: one far, one 40 m south of the east–west road.
        (
            "multi",
            vec![
                vec![rect(600.0, 600.0, 620.0, 620.0)],
                vec![rect(350.0, -60.0, 370.0, -40.0)],
            ],
        ),
    ]
}

fn ring_json(ring: &[[f64; 2]]) -> String {
    let c: Vec<String> = ring
        .iter()
        .map(|&[x, y]| {
            let p = at_m(x, y);
            format!("[{},{}]", p[0], p[1])
        })
        .collect();
    format!("[{}]", c.join(","))
}

fn polygon_feature(id: &str, polygons: &[Vec<Vec<[f64; 2]>>], extra: &str) -> String {
    let polys: Vec<String> = polygons
        .iter()
        .map(|rings| {
            let r: Vec<String> = rings.iter().map(|r| ring_json(r)).collect();
            format!("[{}]", r.join(","))
        })
        .collect();
    format!(
        r#"{{"type":"Feature","properties":{{"site_id":"{id}"{extra}}},"geometry":{{"type":"MultiPolygon","coordinates":[{}]}}}}"#,
        polys.join(",")
    )
}

/// Writes the roads and the polygon sites (plus one point site) as GeoJSON.
fn fixture(d: &Path) -> (PathBuf, PathBuf) {
    let roads: Vec<String> = roads_m()
        .iter()
        .enumerate()
        .map(|(i, l)| {
            let c: Vec<[f64; 2]> = l.iter().map(|&[x, y]| at_m(x, y)).collect();
            line(&c, &format!(r#"{{"name":"r{i}","kind":"road"}}"#))
        })
        .collect();
    let mut sites: Vec<String> = polygon_sites()
        .iter()
        .map(|(id, p)| polygon_feature(id, p, r#","kind":"site""#))
        .collect();
    sites.push(point(
        at_m(10.0, 20.0),
        r#"{"site_id":"point","kind":"site"}"#,
    ));
    (
        write_collection(d, "roads.geojson", &roads),
        write_collection(d, "sites.geojson", &sites),
    )
}

/// The rows of an ogrinfo SQL answer: each feature's fields by name, as text.
fn ogr_sql(file: &Path, sql: &str) -> Vec<std::collections::BTreeMap<String, String>> {
    let o = Command::new("ogrinfo")
        .args(["-ro", "-q", "-dialect", "SQLite", "-sql", sql])
        .arg(file)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let mut rows: Vec<std::collections::BTreeMap<String, String>> = Vec::new();
    for l in String::from_utf8_lossy(&o.stdout).lines() {
        if l.starts_with("OGRFeature") {
            rows.push(Default::default());
        } else if let Some((k, v)) = l.trim().split_once(" = ")
            && let Some(row) = rows.last_mut()
        {
            let k = k.split(' ').next().unwrap().to_string();
            row.insert(k, v.to_string());
        }
    }
    rows
}

#[test]
fn polygon_sites_attach_at_the_distance_gdal_measures() {
    // Peer: GDAL's ogrinfo, SpatiaLite ST_Distance(a, b, 1) on the WGS84 ellipsoid and ST_Within.
    if external::program("ogrinfo-polygon-sites", &["ogrinfo"], "gdal-bin").is_none() {
        return;
    }
    let d = tmp();
    let (roads, sites) = fixture(d.path());
    let out = plan_quiet(d.path(), "o", &roads, &["--sites", sites.to_str().unwrap()]);
    let written = read_json(&out.join("sites.geojson"));
    let written = written["features"].as_array().unwrap();
    // One file for the peer: the input roads and polygons, and reknit's points beside them.
    let mut check: Vec<String> = Vec::new();
    for f in [&roads, &sites] {
        for feat in read_fc(f).features {
            check.push(feat.to_string());
        }
    }
    for f in written {
        let id = f["properties"]["site_id"].as_str().unwrap();
        assert_eq!(f["geometry"]["type"], "Point", "{id}");
        let p = &f["geometry"]["coordinates"];
        check.push(point(
            [p[0].as_f64().unwrap(), p[1].as_f64().unwrap()],
            &format!(r#"{{"site_id":"{id}","kind":"point"}}"#),
        ));
        let a = [
            f["properties"]["attach_lon"].as_f64().unwrap(),
            f["properties"]["attach_lat"].as_f64().unwrap(),
        ];
        check.push(point(
            a,
            &format!(r#"{{"site_id":"{id}","kind":"attach"}}"#),
        ));
    }
    let peer = write_collection(d.path(), "check.geojson", &check);
    let nearest = ogr_sql(
        &peer,
        "SELECT s.site_id AS id, MIN(ST_Distance(s.geometry, r.geometry, 1)) AS d \
         FROM \"check\" s, \"check\" r WHERE s.kind = 'site' AND r.kind = 'road' \
         GROUP BY s.site_id ORDER BY s.site_id",
    );
    let placed = ogr_sql(
        &peer,
        "SELECT s.site_id AS id, ST_Within(p.geometry, s.geometry) AS inside, \
         ST_Distance(a.geometry, s.geometry, 1) AS from_site, \
         (SELECT MIN(ST_Distance(a.geometry, r.geometry, 1)) FROM \"check\" r WHERE r.kind = 'road') AS off_road \
         FROM \"check\" s, \"check\" p, \"check\" a WHERE s.kind = 'site' AND p.kind = 'point' \
         AND a.kind = 'attach' AND p.site_id = s.site_id AND a.site_id = s.site_id ORDER BY s.site_id",
    );
    assert_eq!(nearest.len(), 6, "{nearest:?}");
    assert_eq!(placed.len(), 6, "{placed:?}");
    let ours = |id: &str| {
        written
            .iter()
            .find(|f| f["properties"]["site_id"] == id)
            .unwrap()["properties"]["attach_distance_m"]
            .as_f64()
            .unwrap()
    };
    for (n, p) in nearest.iter().zip(&placed) {
        let id = &n["id"];
        let gdal: f64 = n["d"].parse().unwrap();
        // Our nearest pair is found in a local plane and measured on the ellipsoid: within 1 cm
        // (plus 0.05 %) of the ellipsoidal distance.
        assert!(
            (ours(id) - gdal).abs() <= 0.01 + 5e-4 * gdal,
            "{id}: reknit {} m, GDAL {gdal} m",
            ours(id)
        );
        // The site's point lies inside its polygon (a point site is its own point).
        if id != "point" {
            assert_eq!(
                p["inside"], "1",
                "{id}: the site's point is outside its polygon"
            );
        }
        // The attachment point lies on a road (its coordinates are written to 1e-7°, about 1 cm)
        // and as far from the site as the distance reported.
        let off: f64 = p["off_road"].parse().unwrap();
        let from_site: f64 = p["from_site"].parse().unwrap();
        assert!(off < 0.02, "{id}: attachment point {off} m off the road");
        assert!(
            (from_site - gdal).abs() < 0.02 + 5e-4 * gdal,
            "{id}: attachment point {from_site} m from the site, nearest road {gdal} m"
        );
    }
    // By construction (common practice, no source): the road through "crossed" is at 0 m.
    assert_eq!(ours("crossed"), 0.0);
}

#[test]
fn polygon_sites_read_alike_from_geojson_shapefile_and_a_projected_geopackage() {
    // Peer: GDAL's ogr2ogr writes the Shapefile and a GeoPackage in UTM zone 31N (EPSG:32631).
    let Some(ogr) = external::program("ogr2ogr-polygon-sites", &["ogr2ogr"], "gdal-bin") else {
        return;
    };
    let d = tmp();
    let (roads, sites) = fixture(d.path());
    let shp = d.path().join("sites.shp");
    let gpkg = d.path().join("county.gpkg");
    for args in [
        // A Shapefile holds one geometry type: the polygons only.
        vec![
            "-f",
            "ESRI Shapefile",
            "-where",
            "site_id <> 'point'",
            shp.to_str().unwrap(),
            sites.to_str().unwrap(),
        ],
        vec![
            "-f",
            "GPKG",
            "-t_srs",
            "EPSG:32631",
            "-nln",
            "hospitals",
            gpkg.to_str().unwrap(),
            sites.to_str().unwrap(),
        ],
        vec![
            "-update",
            "-f",
            "GPKG",
            "-nln",
            "roads",
            gpkg.to_str().unwrap(),
            roads.to_str().unwrap(),
        ],
    ] {
        let o = Command::new(ogr).args(&args).output().unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }
    let attach = |dir: &Path| -> Vec<(String, f64, [f64; 2])> {
        read_fc(&dir.join("sites.geojson"))
            .features
            .iter()
            .map(|f| {
                let n = |k: &str| f.property(k).unwrap().as_f64().unwrap();
                (
                    f.property("site_id").unwrap().as_str().unwrap().to_string(),
                    n("attach_distance_m"),
                    [n("attach_lon"), n("attach_lat")],
                )
            })
            .collect()
    };
    let s = |p: &Path| p.to_str().unwrap().to_string();
    let from_geojson = attach(&plan_quiet(d.path(), "g", &roads, &["--sites", &s(&sites)]));
    let from_shp = attach(&plan_quiet(d.path(), "s", &roads, &["--sites", &s(&shp)]));
    let from_gpkg = attach(&plan_quiet(
        d.path(),
        "p",
        &gpkg,
        &[
            "--roads-layer",
            "roads",
            "--sites",
            &s(&gpkg),
            "--sites-layer",
            "hospitals",
        ],
    ));
    assert_eq!(from_geojson.len(), 6);
    let polygons: Vec<_> = from_geojson
        .iter()
        .filter(|s| s.0 != "point")
        .cloned()
        .collect();
    assert_eq!(from_shp, polygons, "Shapefile and GeoJSON differ");
    // Through UTM and back the positions move by far less than a millimetre.
    for (a, b) in from_gpkg.iter().zip(&from_geojson) {
        assert_eq!(a.0, b.0);
        assert!((a.1 - b.1).abs() < 0.002, "{a:?} vs {b:?}");
        assert!(
            (a.2[0] - b.2[0]).abs() < 2e-7 && (a.2[1] - b.2[1]).abs() < 2e-7,
            "{a:?} vs {b:?}"
        );
    }
    // The layer is recorded as a setting, and replan would give it back.
    let summary = read_json(&d.path().join("p").join("summary.json"));
    assert_eq!(summary["settings"]["sites_layer"], "hospitals");
}

#[test]
fn geopackage_zones_cost_as_the_geojson_zones_do() {
    // Peer: GDAL's ogr2ogr writes the zones into a GeoPackage of two layers, one in EPSG:32631.
    let Some(ogr) = external::program("ogr2ogr-gpkg-zones", &["ogr2ogr"], "gdal-bin") else {
        return;
    };
    let d = tmp();
    let (roads, _) = fixture(d.path());
    let zone = polygon_feature(
        "z",
        &[vec![rect(150.0, -50.0, 250.0, 50.0)]],
        r#","damage":3"#,
    );
    let other = polygon_feature("o", &[vec![rect(0.0, 0.0, 1.0, 1.0)]], r#","damage":9"#);
    let zones = write_collection(d.path(), "zones.geojson", &[zone]);
    let decoy = write_collection(d.path(), "decoy.geojson", &[other]);
    let gpkg = d.path().join("zones.gpkg");
    for args in [
        vec![
            "-f",
            "GPKG",
            "-t_srs",
            "EPSG:32631",
            "-nln",
            "floods",
            gpkg.to_str().unwrap(),
            zones.to_str().unwrap(),
        ],
        vec![
            "-update",
            "-f",
            "GPKG",
            "-nln",
            "decoy",
            gpkg.to_str().unwrap(),
            decoy.to_str().unwrap(),
        ],
    ] {
        let o = Command::new(ogr).args(&args).output().unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }
    let total = |name: &str, z: &Path, extra: &[&str]| {
        let mut args = vec!["--damage-zones", z.to_str().unwrap()];
        args.extend_from_slice(extra);
        read_json(&plan_quiet(d.path(), name, &roads, &args).join("summary.json"))["total_cost"]
            .as_f64()
            .unwrap()
    };
    let plain =
        read_json(&plan_quiet(d.path(), "n", &roads, &[]).join("summary.json"))["total_cost"]
            .as_f64()
            .unwrap();
    let g = total("g", &zones, &[]);
    let p = total("p", &gpkg, &["--zones-layer", "floods"]);
    assert!(g > plain, "the zone raises the cost: {g} vs {plain}");
    assert!((g - p).abs() <= 1e-3 * g, "GeoJSON {g}, GeoPackage {p}");
    // Without the layer option the file's two layers are named.
    let o = plan_cli(
        &roads,
        &d.path().join("x"),
        &["-q", "--damage-zones", gpkg.to_str().unwrap()],
    );
    let msg = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{msg}");
    assert!(
        msg.contains("decoy, floods") && msg.contains("--zones-layer"),
        "{msg}"
    );
}

/// Four sites in CSV text with the separator and decimal mark given.
fn sites_csv(sep: &str, comma_decimals: bool) -> String {
    let num = |x: f64| {
        let t = format!("{x}");
        if comma_decimals {
            t.replace('.', ",")
        } else {
            t
        }
    };
    let mut t = format!("site_id{sep}name{sep}priority{sep}lon{sep}lat\n");
    for (i, (x, y)) in [(10.0, 20.0), (150.0, -30.0), (210.0, 120.0), (390.0, 5.0)]
        .into_iter()
        .enumerate()
    {
        let p = at_m(x, y);
        // A quoted name holding every separator and a quote.
        let name = format!("\"Post {i}; north,\teast \"\"A\"\"\"");
        let prio = if i == 0 { num(2.5) } else { "1".into() };
        t.push_str(&format!(
            "S{i}{sep}{name}{sep}{prio}{sep}{}{sep}{}\n",
            num(p[0]),
            num(p[1])
        ));
    }
    t
}

#[test]
fn csv_sites_read_alike_with_commas_semicolons_and_tabs() {
    let d = tmp();
    let (roads, _) = fixture(d.path());
    let comma = file(d.path(), "comma.csv", sites_csv(",", false));
    // A spreadsheet export: byte-order mark, semicolons, decimal commas, CRLF line ends.
    let semi = format!("\u{feff}{}", sites_csv(";", true).replace('\n', "\r\n"));
    let semi = file(d.path(), "semi.csv", semi);
    let tab = file(d.path(), "tab.txt", sites_csv("\t", true));
    let layer = |name: &str, p: &Path, extra: &[&str]| {
        let mut args = vec!["--sites", p.to_str().unwrap()];
        args.extend_from_slice(extra);
        std::fs::read(plan_quiet(d.path(), name, &roads, &args).join("sites.geojson")).unwrap()
    };
    let a = layer("a", &comma, &[]);
    assert_eq!(layer("b", &semi, &[]), a, "semicolons differ from commas");
    assert_eq!(layer("c", &tab, &[]), a, "tabs differ from commas");
    assert_eq!(layer("d", &semi, &["--sites-delimiter", ";"]), a);
    let text = String::from_utf8(a).unwrap();
    assert!(
        text.contains(r#""name":"Post 0; north,\teast \"A\"""#),
        "{text}"
    );
    assert!(text.contains(r#""priority":2.5"#), "{text}");
    // A header holding a comma inside a column name and semicolons between: told by the option.
    let mixed = file(
        d.path(),
        "mixed.csv",
        sites_csv(";", true).replacen("name", "name,short", 1),
    );
    let o = plan_cli(
        &roads,
        &d.path().join("x"),
        &["-q", "--sites", mixed.to_str().unwrap()],
    );
    assert!(stderr(&o).contains("--sites-delimiter"), "{}", stderr(&o));
    let out = plan_quiet(
        d.path(),
        "e",
        &roads,
        &[
            "--sites",
            mixed.to_str().unwrap(),
            "--sites-delimiter",
            "semicolon",
        ],
    );
    assert_eq!(
        read_json(&out.join("summary.json"))["settings"]["sites_delimiter"],
        "semicolon"
    );
}
