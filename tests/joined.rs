//! Every site an output calls joined reaches the hub over intact and planned roads, checked from
//! the written layers alone (tests/common/joined.rs), on the demo (plain, within budgets, with
//! backup links, the whole network) and on random small districts (fixed seeds).

mod common;
use common::joined::check_joined;
use common::*;
use reknit::rng::Rng;

fn demo(out: &std::path::Path, extra: &[&str]) {
    let mut args = vec!["demo", "--out", out.to_str().unwrap(), "-q"];
    args.extend_from_slice(extra);
    let o = run(&args);
    assert!(o.status.success(), "{}", stderr(&o));
}

#[test]
fn demo_plain_and_with_backup_links() {
    let d = tmp();
    for (name, extra) in [("plain", &[][..]), ("backup", &["--redundancy"][..])] {
        let out = d.path().join(name);
        demo(&out, extra);
        let (joined, total) = check_joined(&out);
        assert_eq!(joined, total, "{name}: the full plan joins every demo site");
    }
}

#[test]
fn demo_within_budgets_joins_only_what_reaches_the_hub() {
    let d = tmp();
    let mut last = 0;
    for budget in ["0", "1000", "4000", "9000", "12000", "100000"] {
        let out = d.path().join(budget);
        demo(&out, &["--budget", budget, "--redundancy"]);
        let (joined, _) = check_joined(&out);
        let s = read_json(&out.join("summary.json"));
        assert!(s["total_cost"].as_f64().unwrap() <= budget.parse::<f64>().unwrap());
        // The hub's single-failure report covers the sites the budget joins.
        assert_eq!(
            s["single_failures"]["sites_checked"].as_u64().unwrap() as usize,
            joined - 1
        );
        assert!(
            joined >= last,
            "budget {budget}: fewer sites than a smaller one"
        );
        last = joined;
    }
}

#[test]
fn the_whole_network_joins_every_site_of_the_hubs_part() {
    let d = tmp();
    let out = d.path().join("whole");
    let o = plan_cli(
        &sample_roads(),
        &out,
        &[
            "--sites",
            sample_sites().to_str().unwrap(),
            "--hub",
            "S3",
            "--whole-network",
            "-q",
        ],
    );
    assert!(o.status.success(), "{}", stderr(&o));
    let (joined, total) = check_joined(&out);
    assert_eq!(
        joined, total,
        "the forest spans the hub's part, where every site lies"
    );
}

/// A random district: a grid of roads 200 m apart with random damage (some closed, some
/// missing), and sites near random junctions (a few far from every road).
fn district(rng: &mut Rng, dir: &std::path::Path) -> (std::path::PathBuf, std::path::PathBuf) {
    let (nx, ny) = (2 + rng.below(4) as i32, 2 + rng.below(3) as i32);
    let mut roads = Vec::new();
    let mut push = |a: [f64; 2], b: [f64; 2], rng: &mut Rng| {
        let damage = match rng.below(10) {
            0 => return,
            1 => r#""closed""#.to_string(),
            2 | 3 => "0".to_string(),
            _ => format!("{:.2}", 0.1 + rng.unit()),
        };
        roads.push(line(&[a, b], &format!(r#"{{"damage":{damage}}}"#)));
    };
    for x in 0..=nx {
        for y in 0..=ny {
            let p = at_m(200.0 * x as f64, 200.0 * y as f64);
            if x < nx {
                push(p, at_m(200.0 * (x + 1) as f64, 200.0 * y as f64), rng);
            }
            if y < ny {
                push(p, at_m(200.0 * x as f64, 200.0 * (y + 1) as f64), rng);
            }
        }
    }
    if roads.is_empty() {
        roads.push(line(&[at_m(0., 0.), at_m(200., 0.)], r#"{"damage":1}"#));
    }
    let n_sites = 2 + rng.below(6);
    let sites: Vec<String> = (0..n_sites)
        .map(|i| {
            let (x, y) = (rng.below(nx as u64 + 1), rng.below(ny as u64 + 1));
            let off = if rng.below(8) == 0 { 900.0 } else { 20.0 };
            point(
                at_m(200.0 * x as f64 + 37.0, 200.0 * y as f64 + off),
                &format!(r#"{{"site_id":"s{i}","priority":{}}}"#, 1 + rng.below(4)),
            )
        })
        .collect();
    (
        write_collection(dir, "roads.geojson", &roads),
        write_collection(dir, "sites.geojson", &sites),
    )
}

#[test]
fn random_districts_call_joined_only_what_reaches_the_hub() {
    let mut rng = Rng::new(20_240_611);
    let (mut runs, mut partial) = (0, 0);
    for case in 0..40 {
        let d = tmp();
        let (roads, sites) = district(&mut rng, d.path());
        let budget = format!("{}", rng.below(1500));
        let mut extra = vec!["--sites", sites.to_str().unwrap(), "-q"];
        match case % 4 {
            0 => {}
            1 => extra.extend(["--budget", budget.as_str()]),
            2 => extra.extend(["--budget", budget.as_str(), "--redundancy"]),
            _ => extra.push("--whole-network"),
        }
        let out = d.path().join("out");
        let o = plan_cli(&roads, &out, &extra);
        if !o.status.success() {
            // Only a district with no site near a usable road may be refused.
            assert!(
                stderr(&o).contains("no hub to plan from"),
                "case {case}: {}",
                stderr(&o)
            );
            continue;
        }
        let (joined, total) = check_joined(&out);
        runs += 1;
        partial += usize::from(joined < total);
    }
    eprintln!("{runs} random districts checked, {partial} with sites not joined");
    assert!(
        runs >= 30 && partial >= 5,
        "the fixtures exercise both outcomes"
    );
}
