//! Small fixtures for batch tests: a road grid, sites, manifests, and `reknit batch` itself.

use super::*;
use std::path::{Path, PathBuf};

/// A 3 × 3 grid of streets 0.001° apart (about 111 m) as GeoJSON, half of them damaged.
pub fn grid_roads(dir: &Path, name: &str) -> PathBuf {
    let mut f = Vec::new();
    for i in 0..3 {
        let c = i as f64 * 0.001;
        let props = format!(r#"{{"damage":{}}}"#, if i % 2 == 0 { 0.5 } else { 0.0 });
        f.push(line(&[[0.0, c], [0.001, c], [0.002, c]], &props));
        f.push(line(
            &[[c, 0.0], [c, 0.001], [c, 0.002]],
            r#"{"damage":1.0}"#,
        ));
    }
    write_collection(dir, name, &f)
}

/// Two sites, A and B, at opposite corners of [`grid_roads`].
pub fn corner_sites(dir: &Path, name: &str) -> PathBuf {
    let f = [
        super::bad::site_feature("A", 0.0, 0.0),
        super::bad::site_feature("B", 0.002, 0.002),
    ];
    super::bad::file(
        dir,
        name,
        super::bad::fc(&f.iter().map(String::as_str).collect::<Vec<_>>()),
    )
}

/// Writes `text` as a manifest named `name` in `dir`.
pub fn manifest(dir: &Path, name: &str, text: &str) -> PathBuf {
    std::fs::create_dir_all(dir).unwrap();
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// Runs `reknit batch MANIFEST --out OUT -q EXTRA…`.
pub fn batch(manifest: &Path, out: &Path, extra: &[&str]) -> std::process::Output {
    let mut a = vec![
        "batch",
        manifest.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "-q",
    ];
    a.extend_from_slice(extra);
    run(&a)
}

/// The batch summary's status of each district, in manifest order.
pub fn statuses(out: &Path, stem: &str) -> Vec<String> {
    let s = read_json(&out.join(format!("{stem}.json")));
    s["rows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| r["status"].as_str().unwrap().to_string())
        .collect()
}

/// Writes a Shapefile set (WGS84 .prj) of `shapes` with a `site_id` and a `damage` field.
fn shapefile_of<S: shapefile::record::EsriShape>(
    dir: &Path,
    name: &str,
    shapes: Vec<(S, &str)>,
) -> PathBuf {
    use shapefile::dbase::{FieldName, FieldValue, Record, TableWriterBuilder};
    let p = dir.join(name);
    let table = TableWriterBuilder::new()
        .add_character_field(FieldName::try_from("site_id").unwrap(), 10)
        .add_numeric_field(FieldName::try_from("damage").unwrap(), 8, 2);
    let mut w = shapefile::Writer::from_path(&p, table).unwrap();
    for (shape, id) in shapes {
        let mut r = Record::default();
        r.insert("site_id".into(), FieldValue::Character(Some(id.into())));
        r.insert("damage".into(), FieldValue::Numeric(Some(2.0)));
        w.write_shape_and_record(&shape, &r).unwrap();
    }
    drop(w);
    write_wgs84_prj(&p);
    p
}

/// Sites A and B of [`corner_sites`] as a point Shapefile.
pub fn shapefile_sites(dir: &Path, name: &str) -> PathBuf {
    let pts = vec![
        (shapefile::Point::new(0.0, 0.0), "A"),
        (shapefile::Point::new(0.002, 0.002), "B"),
    ];
    shapefile_of(dir, name, pts)
}

/// A square damage zone (damage 2) around the centre of [`grid_roads`] as a polygon Shapefile.
pub fn shapefile_zones(dir: &Path, name: &str) -> PathBuf {
    let ring: Vec<shapefile::Point> = [
        [0.0005, 0.0005],
        [0.0005, 0.0015],
        [0.0015, 0.0015],
        [0.0015, 0.0005],
        [0.0005, 0.0005],
    ]
    .iter()
    .map(|c| shapefile::Point::new(c[0], c[1]))
    .collect();
    let zone = shapefile::Polygon::new(shapefile::PolygonRing::Outer(ring));
    shapefile_of(dir, name, vec![(zone, "Z")])
}
