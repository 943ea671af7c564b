//! Tree utilities: total cost, the minimum spanning tree of the subgraph a solution spans, pruning
//! of non-terminal leaves, and verification.

use super::reduce::prune_leaves;
use crate::network::Cost;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::{Csr, EdgeList};

/// Total cost of `edges`.
pub fn cost(g: &EdgeList, edges: &[u32]) -> Cost {
    edges.iter().map(|&e| g.cost[e as usize]).sum()
}

/// Replaces a connected solution by the minimum spanning tree of the subgraph induced by its
/// vertices, then removes non-terminal leaves (never costs more).
pub fn mst_prune(g: &EdgeList, csr: &Csr, edges: &[u32], is_terminal: &[bool]) -> Vec<u32> {
    let n = g.vertices;
    let mut member = vec![false; n];
    let mut verts = Vec::new();
    for &e in edges {
        for v in g.ends[e as usize] {
            if !member[v as usize] {
                member[v as usize] = true;
                verts.push(v);
            }
        }
    }
    let mut cand: Vec<(u64, u32)> = Vec::new();
    for &v in &verts {
        for (w, e) in csr.neighbours(v) {
            if v < w && member[w as usize] {
                cand.push((g.cost[e as usize], e));
            }
        }
    }
    cand.sort_unstable();
    let mut ds = DisjointSets::new(n);
    let mut out: Vec<u32> = Vec::with_capacity(verts.len());
    for (_, e) in cand {
        let [a, b] = g.ends[e as usize];
        if ds.union(a, b) {
            out.push(e);
        }
    }
    prune_leaves(g, &mut out, is_terminal);
    out.sort_unstable();
    out
}

/// Checks that `edges` form a tree (no cycle, connected) containing every terminal.
pub fn check_steiner_tree(g: &EdgeList, edges: &[u32], terminals: &[u32]) -> Result<(), String> {
    if terminals.len() <= 1 {
        return if edges.is_empty() {
            Ok(())
        } else {
            Err("a single terminal needs no edges".into())
        };
    }
    let mut ds = DisjointSets::new(g.vertices);
    let mut verts = std::collections::BTreeSet::new();
    for &e in edges {
        if e as usize >= g.len() || !g.usable(e as usize) {
            return Err(format!("edge {e} is not usable"));
        }
        let [a, b] = g.ends[e as usize];
        verts.insert(a);
        verts.insert(b);
        if !ds.union(a, b) {
            return Err(format!("edge {e} closes a cycle"));
        }
    }
    if edges.len() + 1 != verts.len() {
        return Err("the edges are not connected".into());
    }
    let r = ds.find(terminals[0]);
    for &t in terminals {
        if !verts.contains(&t) || ds.find(t) != r {
            return Err(format!("terminal {t} is not connected"));
        }
    }
    Ok(())
}
