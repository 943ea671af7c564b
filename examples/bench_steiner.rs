//! Steiner plan on a synthetic road-like lattice:
//! `bench_steiner SIDE SITES EFFORT INTACT_SHARE [EDGELIST_OUT]`.
//! Prints time (median of five runs at quick effort), cost, bound and gap as JSON; with
//! EDGELIST_OUT also writes "u v w" lines and a "terminals" line for the Python peers
//! (scripts/bench-steiner.sh).

use reknit::solve::steiner::{Effort, steiner_tree};
use reknit::synthetic::grid_graph;
use std::io::Write;
use std::time::Instant;

fn main() -> std::io::Result<()> {
    let a: Vec<String> = std::env::args().collect();
    if a.len() < 5 {
        eprintln!(
            "usage: bench_steiner SIDE SITES quick|normal|thorough INTACT_SHARE [EDGELIST_OUT]"
        );
        std::process::exit(2);
    }
    let side: usize = a[1].parse().expect("SIDE");
    let sites: usize = a[2].parse().expect("SITES");
    let effort = match a[3].as_str() {
        "quick" => Effort::Quick,
        "thorough" => Effort::Thorough,
        _ => Effort::Normal,
    };
    let intact: f64 = a[4].parse().expect("INTACT_SHARE");
    let g = grid_graph(side, intact, 42);
    // Sites on the lattice's largest component (it is connected except for closed edges).
    let (terms, _, _) = reknit::synthetic::sites_on_largest_component(&g, sites);
    // Short runs are noisy on a shared machine: quick effort reports the median of five.
    let runs = if effort == Effort::Quick { 5 } else { 1 };
    let mut times = Vec::new();
    let mut t = None;
    for _ in 0..runs {
        let t0 = Instant::now();
        t = Some(steiner_tree(&g, &terms, effort).expect("solve"));
        times.push(t0.elapsed().as_secs_f64());
    }
    times.sort_by(f64::total_cmp);
    let secs = times[runs / 2];
    let t = t.expect("one run");
    println!(
        "{{\"vertices\":{},\"edges\":{},\"sites\":{},\"effort\":\"{}\",\"seconds\":{secs:.3},\"cost_milli\":{},\"bound_milli\":{},\"bound_complete\":{},\"reduced\":[{},{}]}}",
        g.vertices,
        g.len(),
        sites,
        effort.name(),
        t.cost,
        t.lower_bound,
        t.bound_complete,
        t.reduced_size.0,
        t.reduced_size.1
    );
    if let Some(path) = a.get(5) {
        let mut w = std::io::BufWriter::new(std::fs::File::create(path)?);
        for e in 0..g.len() {
            if g.usable(e) {
                writeln!(w, "{} {} {}", g.ends[e][0], g.ends[e][1], g.cost[e])?;
            }
        }
        let ts: Vec<String> = terms.iter().map(|t| t.to_string()).collect();
        writeln!(w, "terminals {}", ts.join(" "))?;
    }
    Ok(())
}
