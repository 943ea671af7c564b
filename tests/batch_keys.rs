//! Manifest keys: every `reknit plan` option is one, each applies alike from `[defaults]`, a
//! district table or a CSV column, and a manifest gives the same outputs as the same flags.

mod common;
use common::bad::file;
use common::batch::manifest;
use common::*;
use reknit::batch::keys::KEYS;
use reknit::batch::manifest::read_manifest;
use std::collections::BTreeSet;
use std::path::Path;

/// Plan options that are not settings of a district: where and how a run writes and talks.
const NOT_PER_DISTRICT: &[&str] = &["out", "force", "quiet", "verbose", "help"];

/// A value for every key (TOML), each different from the default.
const EXAMPLES: &[(&str, &str)] = &[
    ("name", "\"Eastvane\""),
    ("roads", "\"roads.geojson\""),
    ("sites", "\"sites.csv\""),
    ("snap", "1.5"),
    ("damage_field", "\"dmg\""),
    ("default_damage", "0.7"),
    ("closed_value", "\"shut\""),
    ("id_field", "\"rid\""),
    ("crs", "\"EPSG:4326\""),
    ("roads_layer", "\"streets\""),
    ("category_field", "\"cat\""),
    ("cost_table", "\"costs.toml\""),
    ("keep_where", "\"hw=primary,secondary\""),
    ("drop_where", "\"hw=footway\""),
    ("damage_zones", "\"zones.geojson\""),
    ("zone_damage_field", "\"zdmg\""),
    ("zones_crs", "\"EPSG:4326\""),
    ("damage_points", "\"reports.geojson\""),
    ("damage_points_field", "\"pdmg\""),
    ("point_match_distance", "80"),
    ("budget", "100000"),
    ("redundancy", "true"),
    ("crew_capacity", "500"),
    ("crews", "3"),
    ("max_detour", "1.5"),
    ("node_crossings", "true"),
    ("structure_field", "\"kind\""),
    ("attribution", "\"County roads office\""),
    ("mst", "\"prim\""),
    ("max_attach", "300"),
    ("hub", "\"A\""),
    ("whole_network", "true"),
    ("effort", "\"quick\""),
    ("time_limit", "30"),
    ("site_id_field", "\"sid\""),
    ("site_name_field", "\"label\""),
    ("priority_field", "\"prio\""),
    ("site_tags", "\"amenity=hospital\""),
    ("lon_column", "\"x_lon\""),
    ("lat_column", "\"y_lat\""),
    ("sites_crs", "\"EPSG:4326\""),
    ("sites_delimiter", "\"comma\""),
    ("sites_layer", "\"hospitals\""),
    ("zones_layer", "\"floods\""),
    ("damage_points_crs", "\"EPSG:4326\""),
    ("damage_points_delimiter", "\"semicolon\""),
    ("damage_points_layer", "\"reports\""),
    ("damage_points_lon_column", "\"lon\""),
    ("damage_points_lat_column", "\"lat\""),
    ("output_format", "\"gpkg\""),
];

fn example(key: &str) -> &'static str {
    EXAMPLES
        .iter()
        .find(|(k, _)| *k == key)
        .unwrap_or_else(|| panic!("no example value for the key {key:?}: add one"))
        .1
}

/// The long options `reknit plan --help` lists.
fn plan_options() -> BTreeSet<String> {
    let o = run(&["plan", "--help"]);
    assert!(o.status.success());
    let help = String::from_utf8(o.stdout).unwrap();
    let mut opts = BTreeSet::new();
    for l in help.lines() {
        let t = l.trim_start();
        // Option lines are indented a little; wrapped descriptions far more.
        if l.len() - t.len() > 6 || !t.starts_with('-') {
            continue;
        }
        let long = t.split(", ").last().unwrap();
        if let Some(name) = long.strip_prefix("--") {
            opts.insert(name.split([' ', '=']).next().unwrap().to_string());
        }
    }
    assert!(opts.len() > 30, "too few options found: {opts:?}");
    opts
}

#[test]
fn every_plan_option_is_a_manifest_key() {
    let from_help: BTreeSet<String> = plan_options()
        .into_iter()
        .filter(|o| !NOT_PER_DISTRICT.contains(&o.as_str()))
        .map(|o| o.replace('-', "_"))
        .collect();
    let keys: BTreeSet<String> = KEYS.iter().map(|k| k.name.to_string()).collect();
    assert_eq!(
        from_help, keys,
        "plan options (left) and manifest keys (right) differ"
    );
}

#[test]
fn docs_list_every_key() {
    let docs = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/batch.md"))
        .unwrap();
    for k in KEYS {
        assert!(
            docs.contains(&format!("| `{}` |", k.name)),
            "docs/batch.md lacks a row for `{}`",
            k.name
        );
    }
}

/// The district's job as text (every setting and path), from a manifest written in `d`.
fn job_of(d: &Path, name: &str, text: &str) -> String {
    let m = manifest(d, name, text);
    let read = read_manifest(&m).unwrap_or_else(|e| panic!("{e}\n{text}"));
    format!("{:?}", read.districts[0].job)
}

/// The CSV cell for a TOML example value.
fn cell(v: &str) -> String {
    format!("\"{}\"", v.trim_matches('"'))
}

#[test]
fn every_key_applies_alike_wherever_it_is_given() {
    let d = tmp();
    // Classes only: [categories] mean something only with `category_field`.
    file(
        d.path(),
        "costs.toml",
        "[classes]\nfield = \"hw\"\nprimary = 2\n",
    );
    // Zones and reports in the base, so that the keys about them have something to apply to.
    let base = [
        ("name", "\"Eastvane\""),
        ("roads", "\"base.geojson\""),
        ("sites", "\"base.csv\""),
        ("damage_zones", "\"base-zones.geojson\""),
        ("damage_points", "\"base-reports.geojson\""),
    ];
    // `site_tags` chooses the sites of an OpenStreetMap extract only.
    let roads_for = |key: &str| {
        if key == "roads_layer" {
            "\"base.gpkg\""
        } else {
            "\"base.geojson\""
        }
    };
    let sites_for = |key: &str| match key {
        "site_tags" => "\"base.osm.pbf\"",
        "sites_layer" => "\"base.gpkg\"",
        _ => "\"base.csv\"",
    };
    // `zones_layer` chooses among the layers of a GeoPackage.
    let zones_for = |key: &str| {
        if key == "zones_layer" {
            "\"base-zones.gpkg\""
        } else {
            "\"base-zones.geojson\""
        }
    };
    // The separator and the layer options of field reports need a CSV file and a GeoPackage.
    let points_for = |key: &str| match key {
        "damage_points_delimiter" => "\"base-reports.csv\"",
        "damage_points_layer" => "\"base-reports.gpkg\"",
        "damage_points_lon_column" | "damage_points_lat_column" => "\"base-reports.csv\"",
        _ => "\"base-reports.geojson\"",
    };
    let lines = |skip: &str| -> String {
        let mut l: String = base
            .iter()
            .filter(|(k, _)| *k != skip)
            .map(|(k, v)| match *k {
                "sites" => format!("{k} = {}\n", sites_for(skip)),
                "roads" => format!("{k} = {}\n", roads_for(skip)),
                "damage_zones" => format!("{k} = {}\n", zones_for(skip)),
                "damage_points" => format!("{k} = {}\n", points_for(skip)),
                _ => format!("{k} = {v}\n"),
            })
            .collect();
        // `mst` is for the whole-network plan only; `crews` share out a crew capacity.
        if skip == "mst" {
            l.push_str("whole_network = true\n");
        }
        if skip == "crews" {
            l.push_str("crew_capacity = 500\n");
        }
        l
    };
    let absent = job_of(d.path(), "m.toml", &format!("[[district]]\n{}", lines("")));
    for k in KEYS.iter().filter(|k| !k.district_only) {
        let (key, v) = (k.name, example(k.name));
        let in_district = job_of(
            d.path(),
            "m.toml",
            &format!("[[district]]\n{}{key} = {v}\n", lines(key)),
        );
        let in_defaults = job_of(
            d.path(),
            "m.toml",
            &format!("[defaults]\n{key} = {v}\n\n[[district]]\n{}", lines(key)),
        );
        assert_eq!(
            in_defaults, in_district,
            "{key}: [defaults] and [[district]] differ"
        );
        assert_ne!(in_district, absent, "{key}: the key changes nothing");
        let mut header = vec!["name", "roads", "sites", "damage_zones", "damage_points"];
        let mut row: Vec<String> = base
            .iter()
            .map(|(k, v)| {
                cell(match *k {
                    "sites" => sites_for(key),
                    "roads" => roads_for(key),
                    "damage_zones" => zones_for(key),
                    "damage_points" => points_for(key),
                    _ => v,
                })
            })
            .collect();
        if key == "mst" {
            header.push("whole_network");
            row.push("true".into());
        }
        if key == "crews" {
            header.push("crew_capacity");
            row.push("500".into());
        }
        match header.iter().position(|h| *h == key) {
            Some(i) => row[i] = cell(v),
            None => {
                header.push(key);
                row.push(cell(v));
            }
        }
        let csv = job_of(
            d.path(),
            "m.csv",
            &format!("{}\n{}\n", header.join(","), row.join(",")),
        );
        assert_eq!(
            csv, in_district,
            "{key}: CSV column and [[district]] differ"
        );
    }
}

/// Layers using every setting: roads with ids, damage, categories and classes; sites in CSV with
/// their own column names; a zone and a report with damage in `zdmg`; a cost table.
fn fixture(d: &Path) {
    let mut f = Vec::new();
    for i in 0..3 {
        let c = i as f64 * 0.001;
        for (n, coords) in [
            ("h", [[0.0, c], [0.001, c], [0.002, c]]),
            ("v", [[c, 0.0], [c, 0.001], [c, 0.002]]),
        ] {
            let kind = if i == 0 { "bridge" } else { "no" };
            let props = format!(
                r#"{{"rid":"{n}{i}","dmg":0.5,"cat":"debris","hw":"primary","kind":"{kind}"}}"#
            );
            f.push(line(&coords, &props));
        }
    }
    write_collection(d, "roads.geojson", &f);
    file(
        d,
        "sites.csv",
        "sid,label,prio,x_lon,y_lat\nA,Alpha,2,0,0\nB,Beta,1,0.002,0.002\n",
    );
    let ring = "[[0.0005,0.0005],[0.0015,0.0005],[0.0015,0.0015],[0.0005,0.0015],[0.0005,0.0005]]";
    file(
        d,
        "zones.geojson",
        format!(
            r#"{{"type":"FeatureCollection","features":[{{"type":"Feature","properties":{{"zdmg":2}},"geometry":{{"type":"Polygon","coordinates":[{ring}]}}}}]}}"#
        ),
    );
    file(
        d,
        "reports.geojson",
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"zdmg":"shut"},"geometry":{"type":"Point","coordinates":[0.0015,0.002]}}]}"#,
    );
    file(
        d,
        "costs.toml",
        "[categories]\ndebris = 0.3\n[classes]\nfield = \"hw\"\nprimary = 2\n",
    );
}

#[test]
fn a_manifest_gives_the_outputs_of_the_same_flags() {
    let d = tmp();
    fixture(d.path());
    let abs = |v: &str| {
        let t = v.trim_matches('"');
        if v.starts_with('"') && d.path().join(t).exists() {
            d.path().join(t).to_str().unwrap().to_string()
        } else {
            t.to_string()
        }
    };
    // Every key but those of a whole-network plan (backup links need a sites plan), the damage
    // field (the damage comes from `category_field` here), the site tags (for sites from an
    // OpenStreetMap extract, tests/osm.rs) and the layers of GeoPackages (tests/gpkg.rs,
    // tests/sites_formats.rs), and the CSV separator and layer of field reports (the reports here
    // are GeoJSON; tests/damage_points_formats.rs; their CSV columns, tests/bad_points.rs).
    let used: Vec<(&str, &str)> = EXAMPLES
        .iter()
        .copied()
        .filter(|(k, _)| {
            ![
                "whole_network",
                "mst",
                "damage_field",
                "site_tags",
                "roads_layer",
                "sites_layer",
                "zones_layer",
                "damage_points_delimiter",
                "damage_points_layer",
                "damage_points_lon_column",
                "damage_points_lat_column",
            ]
            .contains(k)
        })
        .collect();
    let plan_out = d.path().join("plan-out");
    let mut args = vec![
        "plan".to_string(),
        "--out".into(),
        plan_out.to_str().unwrap().into(),
        "-q".into(),
    ];
    let mut toml = String::new();
    for (k, v) in &used {
        args.push(format!("--{}", k.replace('_', "-")));
        if *v != "true" {
            args.push(abs(v));
        }
        let value = if v.starts_with('"') {
            format!("{:?}", abs(v))
        } else {
            v.to_string()
        };
        toml.push_str(&format!("{k} = {value}\n"));
    }
    let o = reknit().args(&args).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let (name_line, rest): (Vec<&str>, Vec<&str>) =
        toml.lines().partition(|l| l.starts_with("name ="));
    for (label, text) in [
        ("district", format!("[[district]]\n{toml}")),
        (
            "defaults",
            format!(
                "[defaults]\n{}\n\n[[district]]\n{}\n",
                rest.join("\n"),
                name_line.join("\n")
            ),
        ),
    ] {
        let m = manifest(&d.path().join(label), "m.toml", &text);
        let out = d.path().join(format!("{label}-out"));
        let o = common::batch::batch(&m, &out, &[]);
        assert_eq!(o.status.code(), Some(0), "{label}: {}\n{text}", stderr(&o));
        let names = listing(&plan_out);
        assert_eq!(listing(&out.join("Eastvane")), names, "{label}");
        for n in names {
            assert!(
                std::fs::read(plan_out.join(&n)).unwrap()
                    == std::fs::read(out.join("Eastvane").join(&n)).unwrap(),
                "{label}: {n} differs from the plan's"
            );
        }
    }
}
