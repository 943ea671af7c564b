//! One harness for the end-to-end tests: runs the binary, makes fixtures, finds the real test data;
//! external checks (peers, tools) record themselves through `external`.
#![allow(dead_code)]

pub mod bad;
pub mod batch;
pub mod exact;
pub mod external;
pub mod joined;
pub mod replan;
pub mod zipped;

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// Writes the WGS84 longitude/latitude `.prj` beside the Shapefile `shp` (ESRI WKT).
pub fn write_wgs84_prj(shp: &Path) {
    std::fs::write(shp.with_extension("prj"), WGS84_PRJ).unwrap();
}

/// The `.prj` text of WGS84 longitude/latitude, as ESRI software writes it.
pub const WGS84_PRJ: &str = r#"GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]"#;

/// The reknit binary under test.
pub fn reknit() -> Command {
    let mut c = Command::new(env!("CARGO_BIN_EXE_reknit"));
    c.env_remove("RAYON_NUM_THREADS");
    c
}

/// Runs reknit with `args`.
pub fn run(args: &[&str]) -> Output {
    reknit().args(args).output().expect("run reknit")
}

/// Stderr as text.
pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// A fresh temporary folder.
pub fn tmp() -> tempfile::TempDir {
    tempfile::tempdir().expect("tempdir")
}

/// Path to a file of the real test data in tests/data (licence and attribution beside each copy).
/// The data belongs to the repository, so a missing file fails the test rather than skipping it.
pub fn data(rel: &str) -> PathBuf {
    let p = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/data")
        .join(rel);
    assert!(
        p.exists(),
        "test data {} is missing; it is part of the repository (see tests/data/README.md)",
        p.display()
    );
    p
}

/// A project script's path.
pub fn script(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("scripts")
        .join(name)
}

/// The bundled sample road layer.
pub fn sample_roads() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-maps/ombrevane/roads.geojson")
}

/// A LineString feature with the given coordinates and properties (JSON text).
pub fn line(coords: &[[f64; 2]], props: &str) -> String {
    let c: Vec<String> = coords
        .iter()
        .map(|p| format!("[{},{}]", p[0], p[1]))
        .collect();
    format!(
        r#"{{"type":"Feature","properties":{props},"geometry":{{"type":"LineString","coordinates":[{}]}}}}"#,
        c.join(",")
    )
}

/// Writes a FeatureCollection of the given feature texts to `dir/name`.
pub fn write_collection(dir: &Path, name: &str, features: &[String]) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(
        &p,
        format!(
            r#"{{"type":"FeatureCollection","features":[{}]}}"#,
            features.join(",")
        ),
    )
    .unwrap();
    p
}

/// Parses a GeoJSON file with the geojson crate (an independent reader) into a FeatureCollection.
pub fn read_fc(p: &Path) -> geojson::FeatureCollection {
    let text = std::fs::read_to_string(p).unwrap();
    match text.parse::<geojson::GeoJson>().unwrap() {
        geojson::GeoJson::FeatureCollection(fc) => fc,
        other => panic!("{}: not a FeatureCollection: {other:?}", p.display()),
    }
}

/// Parses a JSON file.
pub fn read_json(p: &Path) -> serde_json::Value {
    serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
}

/// Names of the entries of a folder, sorted (empty when it does not exist).
pub fn listing(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .map(|rd| {
            rd.flatten()
                .map(|e| e.file_name().to_string_lossy().into_owned())
                .collect()
        })
        .unwrap_or_default();
    v.sort();
    v
}

/// Metres per degree at latitude 0 (rough, for placing fixtures a few metres apart).
pub const DEG_PER_M: f64 = 1.0 / 111_320.0;

/// The bundled sample sites layer.
pub fn sample_sites() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-maps/ombrevane/sites.geojson")
}

/// A point `x` metres east and `y` metres north of (0, 0), near enough for fixtures.
pub fn at_m(x: f64, y: f64) -> [f64; 2] {
    [x * DEG_PER_M, y * DEG_PER_M]
}

/// `dir/roads.geojson`: one road 200 m east from (0, 0), damage 0.5.
pub fn one_damaged_road(dir: &Path) -> PathBuf {
    write_collection(
        dir,
        "roads.geojson",
        &[line(
            &[at_m(0.0, 0.0), at_m(200.0, 0.0)],
            r#"{"damage":0.5}"#,
        )],
    )
}

/// A Point feature with the given properties (JSON text).
pub fn point(p: [f64; 2], props: &str) -> String {
    format!(
        r#"{{"type":"Feature","properties":{props},"geometry":{{"type":"Point","coordinates":[{},{}]}}}}"#,
        p[0], p[1]
    )
}

/// Runs `reknit plan -q` on `roads` into `dir/name`, asserts it succeeded and returns the folder.
pub fn plan_quiet(dir: &Path, name: &str, roads: &Path, extra: &[&str]) -> std::path::PathBuf {
    let out = dir.join(name);
    let mut args = vec!["-q"];
    args.extend_from_slice(extra);
    let o = plan_cli(roads, &out, &args);
    assert!(o.status.success(), "{}", stderr(&o));
    out
}

/// Runs `plan --roads ROADS --out OUT EXTRA…` and returns the output (success not checked).
pub fn plan_cli(roads: &Path, out: &Path, extra: &[&str]) -> Output {
    let mut args = vec![
        "plan",
        "--roads",
        roads.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ];
    args.extend_from_slice(extra);
    run(&args)
}
