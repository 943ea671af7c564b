//! Minimum spanning forest on road-like graphs (1,000 × 1,000 junction lattice, ~2 million edges, 1 %
//! closed) with half and with four fifths of the roads intact: reknit's Kruskal and Prim against
//! petgraph's `min_spanning_tree`, algorithm time only (graphs are built before timing).
//! Run: `cargo bench --bench forest` (`scripts/bench-forest.sh` adds the ratios).

use petgraph::graph::UnGraph;
use reknit::solve::graph::EdgeList;
use reknit::solve::{kruskal, prim};
use std::sync::LazyLock;

fn side() -> usize {
    std::env::var("REKNIT_BENCH_SIDE")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(1000)
}

const INTACT: [f64; 2] = [0.5, 0.8];

static GRAPHS: LazyLock<Vec<EdgeList>> = LazyLock::new(|| {
    INTACT
        .iter()
        .map(|&i| reknit::synthetic::grid_graph(side(), i, 7))
        .collect()
});

static PETGRAPHS: LazyLock<Vec<UnGraph<(), u64>>> =
    LazyLock::new(|| GRAPHS.iter().map(EdgeList::to_petgraph).collect());

fn main() {
    LazyLock::force(&PETGRAPHS);
    divan::main();
}

#[divan::bench(args = [0, 1], sample_count = 7)]
fn reknit_kruskal(i: usize) -> usize {
    kruskal::kruskal(&GRAPHS[i]).len()
}

#[divan::bench(args = [0, 1], sample_count = 5)]
fn reknit_prim(i: usize) -> usize {
    prim::prim(&GRAPHS[i]).len()
}

#[divan::bench(args = [0, 1], sample_count = 5)]
fn petgraph_min_spanning_tree(i: usize) -> usize {
    petgraph::algo::min_spanning_tree(&PETGRAPHS[i]).count()
}
