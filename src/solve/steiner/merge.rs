//! Solution merging: the union of several good trees, searched exactly.
//!
//! Trees from different starts agree on most edges and differ where the choice is hard. Their
//! union is a small graph that holds every one of them, so a branch-and-bound search on it (a
//! fixed number of steps) finds the best tree the union holds, often cheaper than any of the
//! trees it came from.

use super::branch::{self, Limits};
use super::exact::Incumbent;
use super::tree;
use crate::solve::graph::EdgeList;

/// The cheapest tree the union of the `trees` cheapest distinct trees of `pool` holds, found within
/// `steps` search steps, as edge ids of `g`; `None` when it is no cheaper than the best of them.
/// Each tree of `pool` must join all of `terminals` (vertices of `g`).
pub fn merged(
    g: &EdgeList,
    terminals: &[u32],
    mut pool: Vec<(u64, Vec<u32>)>,
    trees: usize,
    steps: u64,
) -> Option<Vec<u32>> {
    pool.sort();
    pool.dedup();
    pool.truncate(trees);
    if pool.len() < 2 || steps == 0 {
        return None;
    }
    // The union, renumbered compactly: the search then costs what the union costs, not the graph.
    let mut edges: Vec<u32> = pool.iter().flat_map(|(_, t)| t.iter().copied()).collect();
    edges.sort_unstable();
    edges.dedup();
    let mut local = vec![u32::MAX; g.vertices];
    let mut n = 0u32;
    let mut ends = Vec::with_capacity(edges.len());
    for &e in &edges {
        let mut pair = [0u32; 2];
        for (p, &v) in pair.iter_mut().zip(&g.ends[e as usize]) {
            if local[v as usize] == u32::MAX {
                local[v as usize] = n;
                n += 1;
            }
            *p = local[v as usize];
        }
        ends.push(pair);
    }
    let union = EdgeList {
        vertices: n as usize,
        ends,
        cost: edges.iter().map(|&e| g.cost[e as usize]).collect(),
    };
    let mut terms: Vec<u32> = terminals.iter().map(|&t| local[t as usize]).collect();
    if terms.contains(&u32::MAX) {
        return None;
    }
    terms.sort_unstable();
    // The best tree of the pool, in the union's edge ids, is the incumbent to beat.
    let (best_cost, best) = &pool[0];
    let held = Incumbent {
        edges: best
            .iter()
            .map(|e| edges.binary_search(e).expect("in the union") as u32)
            .collect(),
        cost: *best_cost,
    };
    let limits = Limits {
        nodes: steps,
        deadline: None,
    };
    let out = branch::search(&union, &terms, held, 0, limits, &mut |_, _| {});
    if out.best.cost >= *best_cost {
        return None;
    }
    let mut t: Vec<u32> = out.best.edges.iter().map(|&e| edges[e as usize]).collect();
    t.sort_unstable();
    debug_assert_eq!(tree::cost(g, &t), out.best.cost);
    Some(t)
}
