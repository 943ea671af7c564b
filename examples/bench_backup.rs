//! Single points of failure and backup links on a synthetic road-like lattice:
//! `bench_backup SIDE SITES INTACT_SHARE [EDGELIST_OUT]`.
//! Plans the sites (quick effort), then times the fragility search on the network after the plan
//! and the backup links; prints JSON. With EDGELIST_OUT, writes the network after the plan as
//! "u v" lines for a peer's bridge search (scripts/bench-backup.sh).

use reknit::solve::backup::backup_links;
use reknit::solve::fragility::fragility;
use reknit::solve::graph::{EdgeList, UNUSABLE};
use reknit::solve::steiner::{Effort, steiner_tree};
use reknit::synthetic::grid_graph;
use std::io::Write;
use std::time::Instant;

fn main() -> std::io::Result<()> {
    let a: Vec<String> = std::env::args().collect();
    if a.len() < 4 {
        eprintln!("usage: bench_backup SIDE SITES INTACT_SHARE [EDGELIST_OUT]");
        std::process::exit(2);
    }
    let side: usize = a[1].parse().expect("SIDE");
    let sites: usize = a[2].parse().expect("SITES");
    let intact: f64 = a[3].parse().expect("INTACT_SHARE");
    let g = grid_graph(side, intact, 42);
    let (terms, _, _) = reknit::synthetic::sites_on_largest_component(&g, sites);
    let t0 = Instant::now();
    let tree = steiner_tree(&g, &terms, Effort::Quick).expect("plan");
    let plan_s = t0.elapsed().as_secs_f64();
    let mut free: Vec<bool> = g.cost.iter().map(|&c| c == 0).collect();
    for &e in &tree.edges {
        free[e as usize] = true;
    }
    let after = EdgeList {
        vertices: g.vertices,
        ends: g.ends.clone(),
        cost: (0..g.len())
            .map(|e| if free[e] { 0 } else { UNUSABLE })
            .collect(),
    };
    let t1 = Instant::now();
    let f = fragility(&after, &terms[..1]);
    let frag_s = t1.elapsed().as_secs_f64();
    // The same search over every usable road of the lattice (the network before any plan).
    let t3 = Instant::now();
    let whole = fragility(&g, &terms[..1]);
    let whole_s = t3.elapsed().as_secs_f64();
    let t2 = Instant::now();
    let b = backup_links(&g, &free, terms[0], &terms[1..]).expect("backup");
    let backup_s = t2.elapsed().as_secs_f64();
    println!(
        "{{\"vertices\":{},\"edges\":{},\"usable_after_plan\":{},\"sites\":{sites},\"plan_seconds\":{plan_s:.3},\"fragility_seconds\":{frag_s:.3},\"bridges\":{},\"cut_vertices\":{},\"fragility_all_usable_seconds\":{whole_s:.3},\"bridges_all_usable\":{},\"usable\":{},\"backup_seconds\":{backup_s:.3},\"bridges_needing_backup\":{},\"backup_repairs\":{},\"backup_cost_milli\":{},\"plan_cost_milli\":{},\"sites_without_possible_backup\":{}}}",
        g.vertices,
        g.len(),
        free.iter().filter(|&&x| x).count(),
        f.bridges.len(),
        f.cut_vertices.len(),
        whole.bridges.len(),
        (0..g.len()).filter(|&e| g.usable(e)).count(),
        b.needed,
        b.edges.len(),
        b.cost,
        tree.cost,
        b.no_backup.len()
    );
    if let Some(path) = a.get(4) {
        let mut w = std::io::BufWriter::new(std::fs::File::create(path)?);
        for (e, &[a, b]) in after.ends.iter().enumerate() {
            if free[e] && a != b {
                writeln!(w, "{a} {b}")?;
            }
        }
    }
    Ok(())
}
