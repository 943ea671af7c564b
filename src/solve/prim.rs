//! Minimum spanning forest by Prim's algorithm, an independent second implementation.
//!
//! Grows one tree per component from its smallest vertex with a binary heap keyed by (cost, edge id).
//! Time O(m log m). Used to cross-check Kruskal and selectable by the user.

use super::graph::{Csr, EdgeList};
use std::cmp::Reverse;
use std::collections::BinaryHeap;

/// Edge ids of the minimum spanning forest of the usable edges, in ascending id order.
pub fn prim(g: &EdgeList) -> Vec<u32> {
    let csr = Csr::from_edges(g);
    let n = g.vertices;
    let mut in_tree = vec![false; n];
    let mut chosen = Vec::with_capacity(n.saturating_sub(1));
    let mut heap: BinaryHeap<Reverse<(u64, u32, u32)>> = BinaryHeap::new();
    for root in 0..n as u32 {
        if in_tree[root as usize] {
            continue;
        }
        in_tree[root as usize] = true;
        push_neighbours(&csr, g, root, &in_tree, &mut heap);
        while let Some(Reverse((_, e, v))) = heap.pop() {
            if in_tree[v as usize] {
                continue;
            }
            in_tree[v as usize] = true;
            chosen.push(e);
            push_neighbours(&csr, g, v, &in_tree, &mut heap);
        }
    }
    chosen.sort_unstable();
    chosen
}

fn push_neighbours(
    csr: &Csr,
    g: &EdgeList,
    v: u32,
    in_tree: &[bool],
    heap: &mut BinaryHeap<Reverse<(u64, u32, u32)>>,
) {
    for (w, e) in csr.neighbours(v) {
        if !in_tree[w as usize] {
            heap.push(Reverse((g.cost[e as usize], e, w)));
        }
    }
}
