//! Mehlhorn's 2-approximation (Inf. Proc. Letters 27, 1988): one multi-source Dijkstra from all
//! terminals splits the graph into Voronoi regions; the minimum spanning tree of the edges bridging
//! regions (weighted by the full terminal-to-terminal path cost) is expanded into paths, then the
//! subgraph's minimum spanning tree is pruned. O(m log n).
//!
//! The weight of that bridging tree is the weight of a minimum spanning tree of the terminals'
//! distance network (Mehlhorn's theorem), which is at most 2(1 − 1/k) times the optimum for k
//! terminals (Kou, Markowsky & Berman 1981): so it also yields a lower bound.

use super::paths::Workspace;
use super::tree::mst_prune;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::{Csr, EdgeList};

/// Mehlhorn's tree and the lower bound that comes with it.
#[derive(Debug, Clone)]
pub struct Approximation {
    /// Steiner tree edges, ascending.
    pub edges: Vec<u32>,
    /// A lower bound on the optimum: the distance network's spanning tree weight divided by
    /// 2(1 − 1/k), rounded up.
    pub lower_bound: u64,
}

/// Steiner tree edges (ascending) connecting `terminals`, which must be mutually reachable, with
/// the lower bound its construction proves.
pub fn mehlhorn(
    g: &EdgeList,
    csr: &Csr,
    terminals: &[u32],
    is_terminal: &[bool],
    ws: &mut Workspace,
) -> Approximation {
    let k = terminals.len() as u128;
    if k < 2 {
        return Approximation {
            edges: Vec::new(),
            lower_bound: 0,
        };
    }
    ws.reset();
    for (i, &t) in terminals.iter().enumerate() {
        ws.seed(t, i as u32);
    }
    ws.run(g, csr, u64::MAX);
    let mut bridges: Vec<(u64, u32)> = (0..g.len())
        .filter(|&e| g.usable(e))
        .filter_map(|e| {
            let [u, v] = g.ends[e];
            let (lu, lv) = (ws.label[u as usize], ws.label[v as usize]);
            (lu != lv && lu != super::paths::NONE && lv != super::paths::NONE).then(|| {
                (
                    ws.dist[u as usize] + g.cost[e] + ws.dist[v as usize],
                    e as u32,
                )
            })
        })
        .collect();
    bridges.sort_unstable();
    let mut ds = DisjointSets::new(terminals.len());
    let mut edges = Vec::new();
    let mut joined = 1;
    let mut weight = 0u128;
    for (w, e) in bridges {
        let [u, v] = g.ends[e as usize];
        if ds.union(ws.label[u as usize], ws.label[v as usize]) {
            weight += u128::from(w);
            edges.push(e);
            ws.path_to_source(g, u, &mut edges);
            ws.path_to_source(g, v, &mut edges);
            joined += 1;
            if joined == terminals.len() {
                break;
            }
        }
    }
    edges.sort_unstable();
    edges.dedup();
    // weight ≤ 2(1 − 1/k)·OPT, so OPT ≥ weight·k / (2(k − 1)).
    let lower_bound = (weight * k).div_ceil(2 * (k - 1));
    Approximation {
        edges: mst_prune(g, csr, &edges, is_terminal),
        lower_bound: u64::try_from(lower_bound).unwrap_or(u64::MAX),
    }
}
