//! Wong's dual ascent (Math. Programming 28, 1984) on the bidirected cut formulation: a lower bound
//! on the cost of any Steiner tree.
//!
//! Every edge becomes two arcs with reduced cost equal to its cost. Pick a root terminal. For another
//! terminal t, let W be the vertices that reach t over arcs of reduced cost 0; while W misses the
//! root, some arc into W must be in any tree, so raise the bound by the least reduced cost Δ among
//! arcs entering W and lower all of them by Δ. Terminals with the smallest W go first (Wong's
//! rule). The bound is valid at every step, so a work budget can stop it early.

use crate::solve::graph::{Csr, EdgeList};
use std::cmp::Reverse;
use std::collections::BinaryHeap;

/// A lower bound and whether the ascent ran to completion.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Bound {
    /// The lower bound.
    pub value: u64,
    /// False when the work budget stopped the ascent early (the bound is still valid).
    pub complete: bool,
    /// Edges with a saturated arc (reduced cost 0) in either direction: when the ascent completed,
    /// they join every terminal to the root and hold good trees.
    pub saturated: Vec<bool>,
    /// Reduced cost of every arc, indexed by adjacency entry: entry `k` of vertex `w` (neighbour
    /// `u`) holds the arc u→w. Empty when no ascent ran. With `value` it prices any tree rooted at
    /// `root`: its cost is at least `value` plus the reduced costs of its arcs.
    pub reduced: Vec<u64>,
    /// The terminal the ascent's arcs point away from.
    pub root: u32,
}

impl Bound {
    /// The trivial bound 0, from no ascent (`complete` says whether that is all there is).
    pub fn zero(complete: bool) -> Bound {
        Bound {
            value: 0,
            complete,
            saturated: Vec::new(),
            reduced: Vec::new(),
            root: 0,
        }
    }
}

/// Runs the dual ascent rooted at the first terminal with at most about `budget` arc visits.
pub fn dual_ascent(g: &EdgeList, csr: &Csr, terminals: &[u32], budget: u64) -> Bound {
    match terminals.first() {
        Some(&root) => dual_ascent_from(g, csr, terminals, root, budget),
        None => dual_ascent_from(g, csr, terminals, 0, budget),
    }
}

/// Runs the dual ascent rooted at `root` (one of `terminals`) with at most about `budget` arc
/// visits. Each root gives its own bound and reduced costs; none is best for every graph.
pub fn dual_ascent_from(
    g: &EdgeList,
    csr: &Csr,
    terminals: &[u32],
    root: u32,
    budget: u64,
) -> Bound {
    if terminals.len() < 2 {
        return Bound {
            saturated: vec![false; g.len()],
            ..Bound::zero(true)
        };
    }
    let n = g.vertices;
    // Reduced cost of arc u→w for adjacency entry i of u is kept on the mirrored entry of w, so the
    // arcs entering w are w's own adjacency entries: rc_in[i] for entry i of w means arc target→w.
    let mut rc_in: Vec<u64> = csr.edge.iter().map(|&e| g.cost[e as usize]).collect();
    let mut stamp = vec![0u32; n];
    let mut round = 0u32;
    let mut lb = 0u64;
    let mut work = 0u64;
    let mut heap: BinaryHeap<Reverse<(usize, u32)>> = terminals
        .iter()
        .filter(|&&t| t != root)
        .map(|&t| Reverse((1, t)))
        .collect();
    let mut w_set: Vec<u32> = Vec::new();
    let mut cut: Vec<usize> = Vec::new();
    while let Some(Reverse((size, t))) = heap.pop() {
        // W: vertices reaching t over saturated arcs (reverse search over arcs entering W).
        round += 1;
        w_set.clear();
        w_set.push(t);
        stamp[t as usize] = round;
        let mut reached_root = false;
        let mut i = 0;
        while i < w_set.len() {
            let w = w_set[i];
            i += 1;
            let r = csr.range(w);
            work += r.len() as u64;
            for k in r {
                if rc_in[k] == 0 {
                    let u = csr.target[k];
                    if stamp[u as usize] != round {
                        stamp[u as usize] = round;
                        if u == root {
                            reached_root = true;
                        }
                        w_set.push(u);
                    }
                }
            }
        }
        if reached_root {
            continue;
        }
        if w_set.len() > size
            && heap
                .peek()
                .is_some_and(|&Reverse((next, _))| next < w_set.len())
        {
            // Grown since it was queued and no longer the smallest: requeue by its true size.
            heap.push(Reverse((w_set.len(), t)));
            continue;
        }
        cut.clear();
        let mut delta = u64::MAX;
        for &w in &w_set {
            for k in csr.range(w) {
                if stamp[csr.target[k] as usize] != round {
                    cut.push(k);
                    delta = delta.min(rc_in[k]);
                }
            }
        }
        if cut.is_empty() {
            // t cannot reach the root at all: nothing more to bound.
            continue;
        }
        lb += delta;
        for &k in &cut {
            rc_in[k] -= delta;
        }
        heap.push(Reverse((w_set.len(), t)));
        if work > budget {
            return Bound {
                value: lb,
                complete: false,
                saturated: saturated(g, csr, &rc_in),
                reduced: rc_in,
                root,
            };
        }
    }
    Bound {
        value: lb,
        complete: true,
        saturated: saturated(g, csr, &rc_in),
        reduced: rc_in,
        root,
    }
}

fn saturated(g: &EdgeList, csr: &Csr, rc_in: &[u64]) -> Vec<bool> {
    let mut s = vec![false; g.len()];
    for (k, &e) in csr.edge.iter().enumerate() {
        if rc_in[k] == 0 {
            s[e as usize] = true;
        }
    }
    s
}
