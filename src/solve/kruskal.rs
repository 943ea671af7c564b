//! Minimum spanning forest by Kruskal's algorithm over a compact edge list.
//!
//! Edges are sorted by (cost, id) in parallel, then scanned once with disjoint sets. The (cost, id)
//! key makes the forest unique: ties always go to the lower edge id, whatever the thread count.
//! Time O(m log m), memory 12 bytes per edge beyond the input.

use super::disjoint::DisjointSets;
use super::graph::EdgeList;
use rayon::prelude::*;

/// Edge ids of the minimum spanning forest of the usable edges, in ascending id order.
pub fn kruskal(g: &EdgeList) -> Vec<u32> {
    let mut order: Vec<(u64, u32)> = (0..g.len())
        .into_par_iter()
        .filter(|&e| g.usable(e))
        .map(|e| (g.cost[e], e as u32))
        .collect();
    order.par_sort_unstable();
    let mut ds = DisjointSets::new(g.vertices);
    let limit = g.vertices.saturating_sub(1);
    let mut chosen = Vec::with_capacity(limit.min(order.len()));
    for &(_, e) in &order {
        let [a, b] = g.ends[e as usize];
        if ds.union(a, b) {
            chosen.push(e);
            if chosen.len() == limit {
                break;
            }
        }
    }
    chosen.par_sort_unstable();
    chosen
}
