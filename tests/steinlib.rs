//! Steiner plans on every SteinLib instance of series B, C and D (tests/data/steinlib).
//!
//! Source of the optima: SteinLib (Koch, Martin & Voß, ZIB-Report 00-37, 2001), from Beasley's
//! OR-Library (Networks 19, 1989); the values are in optima.tsv beside the instances.
//! Checks per instance: the plan is a tree spanning all terminals, optimum ≤ cost ≤ 2 × optimum, and
//! the lower bound ≤ optimum. Mean and worst gaps per series are printed (run with --nocapture).

mod common;
use reknit::solve::steiner::{Effort, steiner_tree, tree::check_steiner_tree};
use reknit::solve::stp;

fn optima() -> Vec<(String, u64)> {
    let text = std::fs::read_to_string(common::data("steinlib/optima.tsv")).unwrap();
    text.lines()
        .skip(1)
        .filter_map(|l| {
            let mut it = l.split('\t');
            Some((it.next()?.to_string(), it.next()?.trim().parse().ok()?))
        })
        .collect()
}

fn run_series(series: &str, effort: Effort) -> (f64, f64, f64) {
    let optima = optima();
    common::external::ran(&format!(
        "steinlib-{}-{}",
        series.trim_end_matches('/'),
        effort.name()
    ));
    let mut gaps = Vec::new();
    let mut certified = Vec::new();
    for (name, opt) in optima.iter().filter(|(n, _)| n.starts_with(series)) {
        let path = common::data(&format!("steinlib/{name}.stp"));
        let inst = stp::parse(&std::fs::read_to_string(path).unwrap()).unwrap();
        let t = steiner_tree(&inst.graph, &inst.terminals, effort).unwrap();
        check_steiner_tree(&inst.graph, &t.edges, &inst.terminals).unwrap();
        assert!(
            t.cost >= *opt,
            "{name}: cost {} below the published optimum {opt}",
            t.cost
        );
        assert!(
            t.cost <= 2 * opt,
            "{name}: cost {} above twice the optimum {opt}",
            t.cost
        );
        assert!(
            t.lower_bound <= *opt,
            "{name}: bound {} above the optimum {opt}",
            t.lower_bound
        );
        gaps.push((t.cost - opt) as f64 / *opt as f64);
        certified.push((t.cost - t.lower_bound) as f64 / t.lower_bound.max(1) as f64);
        if t.cost > *opt {
            eprintln!(
                "{name} ({}): cost {} optimum {opt} bound {}",
                effort.name(),
                t.cost,
                t.lower_bound
            );
        }
    }
    assert!(
        !gaps.is_empty(),
        "no instances of series {series} in optima.tsv"
    );
    let mean = gaps.iter().sum::<f64>() / gaps.len() as f64;
    let worst = gaps.iter().cloned().fold(0.0, f64::max);
    let cert = certified.iter().sum::<f64>() / certified.len() as f64;
    eprintln!(
        "series {series} ({}): {} instances, mean gap to optimum {:.3} %, worst {:.3} %, mean certified gap {:.3} %",
        effort.name(),
        gaps.len(),
        100.0 * mean,
        100.0 * worst,
        100.0 * cert
    );
    (mean, worst, cert)
}

#[test]
fn series_b_normal() {
    let (mean, worst, _) = run_series("B/", Effort::Normal);
    assert!(mean <= 0.01 && worst <= 0.05, "mean {mean}, worst {worst}");
}

#[test]
fn series_c_normal() {
    let (mean, worst, _) = run_series("C/", Effort::Normal);
    assert!(mean <= 0.001 && worst <= 0.05, "mean {mean}, worst {worst}");
}

#[test]
fn series_d_normal() {
    let (mean, worst, _) = run_series("D/", Effort::Normal);
    // Normal effort's target on C and D: a mean gap of at most 0.1 %.
    assert!(mean <= 0.001 && worst <= 0.05, "mean {mean}, worst {worst}");
}

#[test]
fn series_b_quick_is_still_a_two_approximation() {
    run_series("B/", Effort::Quick);
}

/// Thorough effort on series C and D: slower, so run on request (`cargo test --release --test
/// steinlib -- --ignored --nocapture`); the figures go to docs/benchmarks.md.
#[test]
#[ignore]
fn series_c_and_d_thorough() {
    for series in ["B/", "C/", "D/"] {
        let (mean, _, _) = run_series(series, Effort::Thorough);
        assert!(mean <= 0.01, "{series}: mean {mean}");
    }
}
