//! Same-run comparisons with the Rust peers, for `scripts/bench`:
//! `bench_peers forest SIDE INTACT EDGES_OUT` — minimum spanning forest of a SIDE × SIDE road-like
//! lattice: reknit's Kruskal (the algorithm alone) against petgraph's `min_spanning_tree` (graph built before timing,
//! medians of several runs), on the lattice's own costs and on costs + 1 (no free roads, the form
//! scipy needs); writes the costs + 1 edge list as "u v w" lines for the Python peers.
//! `bench_peers steiner SIDE SITES` — petgraph's `steiner_tree` (Kou et al.) against reknit's
//! quick and normal efforts on the same lattice and sites: time and cost.
//! Prints one JSON object per line.

use petgraph::graph::{NodeIndex, UnGraph};
use reknit::solve::graph::EdgeList;
use reknit::solve::steiner::{Effort, steiner_tree};
use reknit::solve::{MstAlgorithm, kruskal, minimum_spanning_forest};
use reknit::synthetic::grid_graph;
use std::io::Write;
use std::time::Instant;

fn median<F: FnMut() -> u64>(runs: usize, mut f: F) -> (f64, u64) {
    let mut times = Vec::new();
    let mut out = 0;
    for _ in 0..runs {
        let t = Instant::now();
        out = f();
        times.push(t.elapsed().as_secs_f64());
    }
    times.sort_by(f64::total_cmp);
    (times[runs / 2], out)
}

fn forest(side: usize, intact: f64, out: &str) -> std::io::Result<()> {
    let g = grid_graph(side, intact, 7);
    let plus_one = EdgeList {
        vertices: g.vertices,
        ends: g.ends.clone(),
        cost: g
            .cost
            .iter()
            .map(|&c| {
                if c == reknit::solve::graph::UNUSABLE {
                    c
                } else {
                    c + 1
                }
            })
            .collect(),
    };
    for (name, graph) in [("own costs", &g), ("costs + 1", &plus_one)] {
        // Algorithm time on both sides: Kruskal itself (the plan's verification is not timed).
        let (ours, total) = median(5, || graph.total(&kruskal::kruskal(graph)));
        let checked = minimum_spanning_forest(graph, MstAlgorithm::Kruskal)
            .expect("forest")
            .total_cost;
        assert_eq!(total, checked);
        let pg = graph.to_petgraph();
        let (theirs, ptotal) = median(3, || {
            petgraph::algo::min_spanning_tree(&pg)
                .filter_map(|el| match el {
                    petgraph::data::Element::Edge { weight, .. } => Some(weight),
                    _ => None,
                })
                .sum()
        });
        assert_eq!(total, ptotal, "petgraph's forest total differs");
        println!(
            "{{\"bench\":\"forest\",\"weights\":\"{name}\",\"edges\":{},\"reknit_s\":{ours:.4},\"petgraph_s\":{theirs:.4},\"total\":{total}}}",
            (0..graph.len()).filter(|&e| graph.usable(e)).count()
        );
    }
    let mut w = std::io::BufWriter::new(std::fs::File::create(out)?);
    for e in 0..plus_one.len() {
        if plus_one.usable(e) {
            let [a, b] = plus_one.ends[e];
            writeln!(w, "{a} {b} {}", plus_one.cost[e])?;
        }
    }
    Ok(())
}

fn steiner(side: usize, sites: usize) {
    let g = grid_graph(side, 0.3, 42);
    let (terms, comps, big) = reknit::synthetic::sites_on_largest_component(&g, sites);
    // petgraph's steiner_tree needs one connected graph: the largest component, renumbered.
    let mut id = vec![u32::MAX; g.vertices];
    let mut pg: UnGraph<(), u64> = UnGraph::default();
    for (v, slot) in id.iter_mut().enumerate() {
        if comps.of[v] == big {
            *slot = pg.add_node(()).index() as u32;
        }
    }
    for e in 0..g.len() {
        let [a, b] = g.ends[e];
        if g.usable(e) && comps.of[a as usize] == big {
            pg.add_edge(
                NodeIndex::new(id[a as usize] as usize),
                NodeIndex::new(id[b as usize] as usize),
                g.cost[e],
            );
        }
    }
    let pterms: Vec<NodeIndex> = terms
        .iter()
        .map(|&t| NodeIndex::new(id[t as usize] as usize))
        .collect();
    let t = Instant::now();
    let tree = petgraph::algo::steiner_tree::steiner_tree(&pg, &pterms);
    let p_s = t.elapsed().as_secs_f64();
    let p_cost: u64 = tree.edge_weights().sum();
    for effort in [Effort::Quick, Effort::Normal] {
        let t = Instant::now();
        let ours = steiner_tree(&g, &terms, effort).expect("steiner");
        let s = t.elapsed().as_secs_f64();
        println!(
            "{{\"bench\":\"steiner\",\"vertices\":{},\"edges\":{},\"sites\":{sites},\"effort\":\"{}\",\"reknit_s\":{s:.4},\"reknit_cost\":{},\"petgraph_s\":{p_s:.4},\"petgraph_cost\":{p_cost}}}",
            pg.node_count(),
            pg.edge_count(),
            effort.name(),
            ours.cost
        );
    }
}

fn main() -> std::io::Result<()> {
    let a: Vec<String> = std::env::args().collect();
    match a.get(1).map(String::as_str) {
        Some("forest") if a.len() == 5 => forest(
            a[2].parse().expect("SIDE"),
            a[3].parse().expect("INTACT"),
            &a[4],
        ),
        Some("steiner") if a.len() == 4 => {
            steiner(a[2].parse().expect("SIDE"), a[3].parse().expect("SITES"));
            Ok(())
        }
        _ => {
            eprintln!("usage: bench_peers forest SIDE INTACT EDGES_OUT | steiner SIDE SITES");
            std::process::exit(2)
        }
    }
}
