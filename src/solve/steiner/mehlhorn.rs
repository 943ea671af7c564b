//! Mehlhorn's 2-approximation (Inf. Proc. Letters 27, 1988): one multi-source Dijkstra from all
//! terminals splits the graph into Voronoi regions; the minimum spanning tree of the edges bridging
//! regions (weighted by the full terminal-to-terminal path cost) is expanded into paths, then the
//! subgraph's minimum spanning tree is pruned. O(m log n).

use super::paths::Workspace;
use super::tree::mst_prune;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::{Csr, EdgeList};

/// Steiner tree edges (ascending) connecting `terminals`, which must be mutually reachable.
pub fn mehlhorn(
    g: &EdgeList,
    csr: &Csr,
    terminals: &[u32],
    is_terminal: &[bool],
    ws: &mut Workspace,
) -> Vec<u32> {
    if terminals.len() < 2 {
        return Vec::new();
    }
    ws.reset();
    for (i, &t) in terminals.iter().enumerate() {
        ws.seed(t, i as u32);
    }
    ws.run(g, csr, u64::MAX);
    let mut bridges: Vec<(u64, u32)> = (0..g.len())
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
    for (_, e) in bridges {
        let [u, v] = g.ends[e as usize];
        if ds.union(ws.label[u as usize], ws.label[v as usize]) {
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
    mst_prune(g, csr, &edges, is_terminal)
}
