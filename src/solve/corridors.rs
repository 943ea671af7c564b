//! Corridors: the route convoys drive from the hub to each site over the roads usable once the
//! plan is done, beside the same trip on the undamaged network; and, for a site whose corridor is
//! too long a detour, the cheapest further repairs that bring it under a length.
//!
//! Routes are shortest paths by ground length (Dijkstra). The further repairs come from a
//! resource-constrained shortest path: least repair cost subject to length ≤ a limit, by label
//! setting (labels taken in cost order, each kept only when shorter than every label already
//! settled at its junction, pruned by a lower bound on the length still to go). The search is
//! exact when it finishes within its label budget; when the budget runs out there is no offer. It
//! answers one site at a time: offers for two sites may share repairs, and the cheapest set serving
//! several sites together is not sought.

use super::graph::EdgeList;
use std::cmp::Reverse;
use std::collections::BinaryHeap;

const NONE: u32 = u32::MAX;

/// Shortest distances from one junction and the edge each junction is reached by.
#[derive(Debug, Clone)]
pub struct Tree {
    /// Metres from the source (`f64::INFINITY` when unreachable).
    pub dist: Vec<f64>,
    /// The edge by which each junction is reached (`u32::MAX` for the source and the unreachable).
    pub via: Vec<u32>,
}

/// Non-negative lengths order like their bit patterns, which gives the heap a total order.
fn key(x: f64) -> u64 {
    x.to_bits()
}

/// Dijkstra from `from` over the edges with `open[e]`, edge `e` being `length[e]` metres long.
pub fn shortest(graph: &EdgeList, open: &[bool], length: &[f64], from: u32) -> Tree {
    let adj = adjacency(graph, open);
    let mut dist = vec![f64::INFINITY; graph.vertices];
    let mut via = vec![NONE; graph.vertices];
    let mut heap = BinaryHeap::new();
    dist[from as usize] = 0.0;
    heap.push(Reverse((0, from)));
    while let Some(Reverse((d, v))) = heap.pop() {
        if d != key(dist[v as usize]) {
            continue;
        }
        for &(u, e) in &adj[v as usize] {
            let nd = dist[v as usize] + length[e as usize];
            // Ties go to the lower edge id, so the route does not depend on the heap.
            if nd < dist[u as usize] || (nd == dist[u as usize] && e < via[u as usize]) {
                let lowered = nd < dist[u as usize];
                dist[u as usize] = nd;
                via[u as usize] = e;
                if lowered {
                    heap.push(Reverse((key(nd), u)));
                }
            }
        }
    }
    Tree { dist, via }
}

fn adjacency(graph: &EdgeList, open: &[bool]) -> Vec<Vec<(u32, u32)>> {
    let mut adj = vec![Vec::new(); graph.vertices];
    for (e, &[a, b]) in graph.ends.iter().enumerate() {
        if open[e] && a != b {
            adj[a as usize].push((b, e as u32));
            adj[b as usize].push((a, e as u32));
        }
    }
    adj
}

/// The edges of the route from the tree's source to `to`, source first; None when unreachable.
pub fn route(graph: &EdgeList, tree: &Tree, to: u32) -> Option<Vec<u32>> {
    if !tree.dist[to as usize].is_finite() {
        return None;
    }
    let mut out = Vec::new();
    let mut v = to;
    while tree.via[v as usize] != NONE {
        let e = tree.via[v as usize];
        out.push(e);
        let [a, b] = graph.ends[e as usize];
        v = if a == v { b } else { a };
    }
    out.reverse();
    Some(out)
}

/// Further repairs that bring a route under a length: the edges to repair, their cost
/// (milli-repair-metres) and the route's length once they are made.
#[derive(Debug, Clone, PartialEq)]
pub struct Fix {
    /// Edges to repair, along the route from the hub.
    pub repairs: Vec<u32>,
    /// Their total cost.
    pub cost: u64,
    /// The route's length with them, metres.
    pub length_m: f64,
}

/// Why no fix is offered.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NoFix {
    /// No route over usable roads is that short, whatever is repaired.
    Impossible,
    /// The search used up its label budget before finding one.
    BudgetSpent,
}

/// The cheapest repairs giving a route from `from` to `to` of at most `limit_m`: edges with
/// `open[e]` cost nothing, other usable edges cost `graph.cost[e]`, closed edges are not used.
pub fn cheapest_fix(
    graph: &EdgeList,
    open: &[bool],
    length: &[f64],
    (from, to): (u32, u32),
    limit_m: f64,
    max_labels: usize,
) -> Result<Fix, NoFix> {
    let usable: Vec<bool> = (0..graph.len())
        .map(|e| open[e] || graph.usable(e))
        .collect();
    let to_go = shortest(graph, &usable, length, to).dist;
    if to_go[from as usize] > limit_m {
        return Err(NoFix::Impossible);
    }
    let adj = adjacency(graph, &usable);
    let price = |e: u32| {
        if open[e as usize] {
            0
        } else {
            graph.cost[e as usize]
        }
    };
    // Labels: (cost, length, junction, previous label, edge taken).
    let mut labels: Vec<(u64, f64, u32, u32, u32)> = vec![(0, 0.0, from, NONE, NONE)];
    let mut settled = vec![f64::INFINITY; graph.vertices];
    let mut heap = BinaryHeap::new();
    heap.push(Reverse((0u64, key(0.0), 0u32)));
    while let Some(Reverse((_, _, l))) = heap.pop() {
        let (c, len, v, _, _) = labels[l as usize];
        if len >= settled[v as usize] {
            continue;
        }
        settled[v as usize] = len;
        if v == to {
            let mut repairs = Vec::new();
            let mut k = l;
            while labels[k as usize].3 != NONE {
                let e = labels[k as usize].4;
                if price(e) > 0 {
                    repairs.push(e);
                }
                k = labels[k as usize].3;
            }
            repairs.reverse();
            return Ok(Fix {
                repairs,
                cost: c,
                length_m: len,
            });
        }
        for &(u, e) in &adj[v as usize] {
            let nl = len + length[e as usize];
            if nl + to_go[u as usize] > limit_m || nl >= settled[u as usize] {
                continue;
            }
            if labels.len() >= max_labels {
                return Err(NoFix::BudgetSpent);
            }
            labels.push((c + price(e), nl, u, l, e));
            heap.push(Reverse((c + price(e), key(nl), labels.len() as u32 - 1)));
        }
    }
    Err(NoFix::Impossible)
}

#[cfg(test)]
#[path = "corridors_tests.rs"]
mod tests;
