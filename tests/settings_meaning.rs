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

case!(crew_capacity_that_fits_no_repair, |d| {
    // The only road, about 111 m at factor 1.0, needs about 111 repair-metres; a day holds 1.
    plan_fails(
        &roads_ok(d),
        &["--crew-capacity", "1"],
        &["--crew-capacity", "fits no repair", "111."],
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
    assert_eq!(damage, ["\"closed\"", "0.5"]);
    let plan = read_fc(&out.join("plan.geojson"));
    assert_eq!(plan.features.len(), 1, "the closed road is never planned");
}
