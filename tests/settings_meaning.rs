//! Settings that would be accepted and ignored, or mean something other than they say, are refused
//! or honoured. Refused settings are `case!`s listed in docs/bad-inputs.md.

mod common;
use common::bad::*;
use common::*;
use std::path::Path;

case!(check_refuses_planning_options, |d| {
    // `check` builds the network only: options of planning would be silently ignored.
    let roads = roads_ok(d);
    let out = d.join("out");
    for extra in [
        &["--budget", "100"][..],
        &["--redundancy"],
        &["--crew-capacity", "500"],
        &["--mst", "prim"],
        &["--damage-zones", "zones.geojson"],
    ] {
        let mut args = vec![
            "check".to_string(),
            "--roads".into(),
            s(&roads),
            "--out".into(),
            s(&out),
        ];
        args.extend(extra.iter().map(|x| x.to_string()));
        fails_with(d, &out, &args, &[extra[0]]);
    }
});

case!(budget_without_sites, |d| {
    plan_fails(&roads_ok(d), &["--budget", "100"], &["--budget", "--sites"]);
});

case!(budget_with_whole_network, |d| {
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 0.0, 0.0)]));
    plan_fails(
        &roads,
        &["--sites", &s(&sites), "--whole-network", "--budget", "100"],
        &["--budget", "--whole-network"],
    );
});

case!(crew_capacity_below_the_counting_unit, |d| {
    plan_fails(
        &roads_ok(d),
        &["--crew-capacity", "0.0001"],
        &["--crew-capacity", "0.001"],
    );
});

case!(crews_without_crew_capacity, |d| {
    plan_fails(
        &roads_ok(d),
        &["--crews", "2"],
        &["--crews", "--crew-capacity"],
    );
});

case!(no_crews, |d| {
    plan_fails(
        &roads_ok(d),
        &["--crew-capacity", "100", "--crews", "0"],
        &["--crews", "outside 1 to 1000"],
    );
});

case!(max_detour_without_sites, |d| {
    plan_fails(
        &roads_ok(d),
        &["--max-detour", "1.5"],
        &["--max-detour", "--sites"],
    );
});

case!(max_detour_below_one, |d| {
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 0.0, 0.0)]));
    plan_fails(
        &roads,
        &["--sites", &s(&sites), "--max-detour", "0.5"],
        &["--max-detour", "≥ 1"],
    );
});

#[test]
fn negative_default_damage_means_impassable() {
    // A negative factor marks a road impassable in the data; as the default it means the same.
    let t = tmp();
    let d: &Path = t.path();
    let roads = write_collection(
        d,
        "roads.geojson",
        &[
            line(&[[0.0, 0.0], [0.001, 0.0]], "{}"),
            line(&[[0.001, 0.0], [0.002, 0.0]], r#"{"damage":0.5}"#),
        ],
    );
    let out = plan_ok(d, &["--roads", &s(&roads), "--default-damage", "-1"]);
    let net = read_fc(&out.join("network.geojson"));
    let damage: Vec<String> = net
        .features
        .iter()
        .map(|f| f.property("damage").unwrap().to_string())
        .collect();
    assert_eq!(damage, ["null", "0.5"]);
    let impassable: Vec<bool> = net
        .features
        .iter()
        .map(|f| f.property("impassable").unwrap().as_bool().unwrap())
        .collect();
    assert_eq!(impassable, [true, false]);
    let plan = read_fc(&out.join("plan.geojson"));
    assert_eq!(plan.features.len(), 1, "the closed road is never planned");
}

case!(options_without_the_input_they_are_about, |d| {
    // Each would be accepted, recorded in summary.json's settings and have no effect.
    let roads = roads_ok(d);
    for (extra, needles) in [
        (
            &["--max-attach", "100"][..],
            &["--max-attach", "--sites"][..],
        ),
        (
            &["--site-id-field", "code"],
            &["--site-id-field", "--sites"],
        ),
        (
            &["--site-name-field", "label"],
            &["--site-name-field", "--sites"],
        ),
        (
            &["--priority-field", "rank"],
            &["--priority-field", "--sites"],
        ),
        (&["--sites-crs", "EPSG:32633"], &["--sites-crs", "--sites"]),
        (&["--lon-column", "x"], &["--lon-column", "CSV"]),
        (&["--effort", "thorough"], &["--effort", "--sites"]),
        (
            &["--zones-crs", "EPSG:32633"],
            &["--zones-crs", "--damage-zones"],
        ),
        (
            &["--point-match-distance", "10"],
            &["--point-match-distance", "--damage-points"],
        ),
        (
            &["--damage-points-field", "p"],
            &["--damage-points-field", "--damage-points"],
        ),
        (
            &["--zone-damage-field", "z"],
            &["--zone-damage-field", "--damage-zones"],
        ),
    ] {
        plan_fails(&roads, extra, needles);
    }
    // Field reports have a field option of their own: the zones' one means nothing to them.
    let points = d.join("points.geojson");
    std::fs::write(
        &points,
        r#"{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"damage":0.5},"geometry":{"type":"Point","coordinates":[0.0005,0.0]}}]}"#,
    )
    .unwrap();
    plan_fails(
        &roads,
        &["--damage-points", &s(&points), "--zone-damage-field", "z"],
        &[
            "--zone-damage-field",
            "--damage-zones",
            "--damage-points-field",
        ],
    );
});

case!(mst_with_a_sites_plan, |d| {
    // A sites plan is a Steiner tree: the spanning-forest algorithm would not be used.
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 0.0, 0.0)]));
    plan_fails(
        &roads,
        &["--sites", &s(&sites), "--mst", "prim"],
        &["--mst", "--whole-network"],
    );
});

case!(effort_with_whole_network, |d| {
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 0.0, 0.0)]));
    plan_fails(
        &roads,
        &[
            "--sites",
            &s(&sites),
            "--whole-network",
            "--effort",
            "quick",
        ],
        &["--effort", "--whole-network"],
    );
});

case!(time_limit_out_of_range, |d| {
    // A limit of no time, a negative one or one past a week is a mistake, not a plan.
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 0.0, 0.0)]));
    for bad in ["0", "-5", "NaN", "1e9"] {
        plan_fails(
            &roads,
            &["--sites", &s(&sites), &format!("--time-limit={bad}")],
            &["--time-limit", "seconds"],
        );
    }
});

case!(time_limit_with_whole_network, |d| {
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 0.0, 0.0)]));
    plan_fails(
        &roads,
        &[
            "--sites",
            &s(&sites),
            "--whole-network",
            "--time-limit",
            "10",
        ],
        &["--time-limit", "--whole-network"],
    );
});

case!(coordinate_columns_with_geojson_sites, |d| {
    // GeoJSON sites are read by their geometry: the columns would be ignored.
    let roads = roads_ok(d);
    let sites = file(d, "sites.geojson", fc(&[&site_feature("A", 0.0, 0.0)]));
    plan_fails(
        &roads,
        &["--sites", &s(&sites), "--lat-column", "y"],
        &["--lat-column", "CSV"],
    );
});

case!(damage_field_with_category_field, |d| {
    // With a category field the damage field is never read.
    let roads = file(
        d,
        "roads.geojson",
        fc(&[&line(
            &[[0.0, 0.0], [0.001, 0.0]],
            r#"{"cat":"debris","dmg":0.2}"#,
        )]),
    );
    plan_fails(
        &roads,
        &["--category-field", "cat", "--damage-field", "dmg"],
        &["--damage-field", "--category-field"],
    );
    plan_fails(
        &roads,
        &["--category-field", "cat", "--closed-value", "shut"],
        &["--closed-value", "--category-field"],
    );
});

case!(cost_table_categories_without_category_field, |d| {
    // The categories would be listed in summary.json and never looked up.
    let roads = roads_ok(d);
    let t = file(d, "costs.toml", "[categories]\ndebris = 0.2\n");
    plan_fails(
        &roads,
        &["--cost-table", &s(&t)],
        &["--cost-table", "[categories]", "--category-field"],
    );
});

case!(unknown_crs_code_of_an_unread_layer_yet, |d| {
    // A wrong code is refused before any input is read, naming its option.
    let roads = roads_ok(d);
    let z = file(d, "zones.geojson", fc(&[]));
    plan_fails(
        &roads,
        &["--damage-zones", &s(&z), "--zones-crs", "EPSG:0"],
        &["--zones-crs"],
    );
});

case!(check_refuses_options_it_would_ignore, |d| {
    let roads = roads_ok(d);
    let out = d.join("out");
    let args: Vec<String> = [
        "check",
        "--roads",
        &s(&roads),
        "--out",
        &s(&out),
        "--category-field",
        "cat",
        "--closed-value",
        "shut",
    ]
    .iter()
    .map(|x| x.to_string())
    .collect();
    fails_with(d, &out, &args, &["--closed-value"]);
});

#[test]
fn a_manifest_default_applies_only_where_it_means_something() {
    // `[defaults] effort` is for the districts with sites; a whole-network district runs without
    // it, while the same key written in that district itself is refused.
    let t = tmp();
    let d: &Path = t.path();
    for sub in ["m1", "m2"] {
        std::fs::create_dir_all(d.join(sub)).unwrap();
        roads_ok(&d.join(sub));
        file(
            &d.join(sub),
            "sites.geojson",
            fc(&[&site_feature("A", 0.0, 0.0)]),
        );
    }
    let with_default = "[defaults]\neffort = \"quick\"\n\n[[district]]\nname = \"a\"\n\
                        roads = \"roads.geojson\"\nsites = \"sites.geojson\"\n\n[[district]]\n\
                        name = \"b\"\nroads = \"roads.geojson\"\n";
    let m = common::batch::manifest(&d.join("m1"), "m.toml", with_default);
    let read = reknit::batch::manifest::read_manifest(&m).unwrap();
    assert_eq!(read.districts[0].job.effort.name(), "quick");
    assert_eq!(read.districts[1].job.effort.name(), "normal");
    let in_district = "[[district]]\nname = \"b\"\nroads = \"roads.geojson\"\neffort = \"quick\"\n";
    let m = common::batch::manifest(&d.join("m2"), "m.toml", in_district);
    let e = reknit::batch::manifest::read_manifest(&m)
        .unwrap_err()
        .to_string();
    assert!(e.contains("\"effort\"") && e.contains("--sites"), "{e}");
}

#[test]
fn the_settings_record_names_only_settings_in_force() {
    // summary.json `settings` lists what shaped the answer: a setting the run had no use for is
    // null rather than a default that played no part.
    let t = tmp();
    let d: &Path = t.path();
    let settings = |extra: &[&str]| {
        let out = d.join(format!("demo{}", extra.len()));
        let mut args = vec!["demo", "--out", out.to_str().unwrap(), "-q"];
        args.extend_from_slice(extra);
        let o = run(&args);
        assert!(o.status.success(), "{}", stderr(&o));
        read_json(&out.join("summary.json"))["settings"].clone()
    };
    let sites = settings(&[]);
    assert_eq!(
        sites["mst"],
        serde_json::Value::Null,
        "a sites plan uses no spanning forest"
    );
    assert_eq!(sites["effort"], "normal");
    assert_eq!(sites["max_attach_m"], 250.0);
    assert_eq!(sites["point_match_distance_m"], serde_json::Value::Null);
    assert_eq!(sites["damage_points_field"], serde_json::Value::Null);
    assert_eq!(sites["zone_damage_field"], serde_json::Value::Null);
    assert_eq!(sites["cost_table"]["categories"], serde_json::Value::Null);
    let whole = settings(&["--whole-network"]);
    assert_eq!(whole["mst"], "kruskal");
    assert_eq!(whole["effort"], serde_json::Value::Null);
    assert_eq!(whole["max_attach_m"], serde_json::Value::Null);
}
