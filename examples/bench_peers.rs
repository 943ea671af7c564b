//! Same-run comparisons with the Rust peers, for `scripts/bench`:
//! `bench_peers forest SIDE INTACT EDGES_OUT [PAIRS]` — minimum spanning forest of a SIDE × SIDE
//! road-like lattice: reknit's Kruskal (the algorithm alone) against petgraph's `min_spanning_tree`
//! (graphs built before timing; a warm-up call each, then PAIRS interleaved pairs, default 7; wall
//! and CPU medians and the median per-pair ratios), on the lattice's own costs and on costs + 1 (no
//! free roads, the form scipy needs); writes the costs + 1 edge list as "u v w" lines for the
//! Python peers.
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

/// CPU time used so far, in seconds, from the scheduler's per-thread counters (nanoseconds):
/// every thread of the process (`all`), or the calling thread alone. Linux only; 0 elsewhere.
fn cpu_s(all: bool) -> f64 {
    let read = |p: &std::path::Path| -> u64 {
        std::fs::read_to_string(p)
            .ok()
            .and_then(|s| s.split_whitespace().next()?.parse().ok())
            .unwrap_or(0)
    };
    let ns: u64 = if all {
        std::fs::read_dir("/proc/self/task")
            .map(|d| d.flatten().map(|t| read(&t.path().join("schedstat"))).sum())
            .unwrap_or(0)
    } else {
        read(std::path::Path::new("/proc/thread-self/schedstat"))
    };
    ns as f64 * 1e-9
}

/// The load average over the last minute (other work on the machine), for the record.
fn load() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .ok()
        .and_then(|s| s.split_whitespace().next().map(str::to_string))
        .unwrap_or_else(|| "null".into())
}

/// One timed call: wall seconds, CPU seconds (all threads when `all`), result.
fn timed<F: FnMut() -> u64>(all: bool, f: &mut F) -> (f64, f64, u64) {
    let (c, t) = (cpu_s(all), Instant::now());
    let out = std::hint::black_box(f());
    (t.elapsed().as_secs_f64(), cpu_s(all) - c, out)
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

/// The one forest method (also behind `scripts/bench-forest.sh`): one untimed warm-up call each,
/// then `pairs` paired calls, interleaved and alternating which side goes first, so both sides see
/// the same load and the same process state. Returns, per side, median wall and CPU seconds, and
/// the median of the per-pair ratios peer / reknit (wall, CPU) with the result.
fn paired<A: FnMut() -> u64, B: FnMut() -> u64>(
    pairs: usize,
    mut ours: A,
    mut theirs: B,
) -> [f64; 6] {
    let (_, _, a) = timed(true, &mut ours);
    let (_, _, b) = timed(false, &mut theirs);
    assert_eq!(a, b, "the forest totals differ");
    let mut s: [Vec<f64>; 6] = Default::default();
    for i in 0..pairs {
        let (o, t) = if i % 2 == 0 {
            let o = timed(true, &mut ours);
            (o, timed(false, &mut theirs))
        } else {
            let t = timed(false, &mut theirs);
            (timed(true, &mut ours), t)
        };
        assert_eq!((o.2, t.2), (a, a), "a forest total changed between calls");
        for (k, x) in [o.0, o.1, t.0, t.1, t.0 / o.0, t.1 / o.1]
            .into_iter()
            .enumerate()
        {
            s[k].push(x);
        }
    }
    s.map(median)
}

fn forest(side: usize, intact: f64, out: &str, pairs: usize) -> std::io::Result<()> {
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
        let checked = minimum_spanning_forest(graph, MstAlgorithm::Kruskal)
            .expect("forest")
            .total_cost;
        // Algorithm time on both sides, graphs built before timing: Kruskal itself (the plan's
        // verification is not timed) against petgraph's whole iterator, drained.
        let pg = graph.to_petgraph();
        let before = load();
        let [ours, ours_cpu, theirs, theirs_cpu, ratio, ratio_cpu] = paired(
            pairs,
            || graph.total(&kruskal::kruskal(graph)),
            || {
                petgraph::algo::min_spanning_tree(&pg)
                    .filter_map(|el| match el {
                        petgraph::data::Element::Edge { weight, .. } => Some(weight),
                        _ => None,
                    })
                    .sum()
            },
        );
        println!(
            "{{\"bench\":\"forest\",\"weights\":\"{name}\",\"intact\":{intact},\"edges\":{},\"pairs\":{pairs},\"reknit_s\":{ours:.4},\"petgraph_s\":{theirs:.4},\"ratio\":{ratio:.2},\"reknit_cpu_s\":{ours_cpu:.4},\"petgraph_cpu_s\":{theirs_cpu:.4},\"ratio_cpu\":{ratio_cpu:.2},\"load_before\":{before},\"load_after\":{},\"total\":{checked}}}",
            (0..graph.len()).filter(|&e| graph.usable(e)).count(),
            load()
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
        Some("forest") if (5..=6).contains(&a.len()) => forest(
            a[2].parse().expect("SIDE"),
            a[3].parse().expect("INTACT"),
            &a[4],
            a.get(5)
                .map_or(7, |p| p.parse::<usize>().expect("PAIRS").max(1)),
        ),
        Some("steiner") if a.len() == 4 => {
            steiner(a[2].parse().expect("SIDE"), a[3].parse().expect("SITES"));
            Ok(())
        }
        _ => {
            eprintln!(
                "usage: bench_peers forest SIDE INTACT EDGES_OUT [PAIRS] | steiner SIDE SITES"
            );
            std::process::exit(2)
        }
    }
}
