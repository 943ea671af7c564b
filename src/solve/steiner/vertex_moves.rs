//! Vertex-based local search: a Steiner tree is determined by its vertex set (take the minimum
//! spanning tree of the subgraph it induces, then drop non-terminal leaves), so try
//!
//! - **Steiner vertex insertion**: add one outside vertex adjacent to the tree;
//! - **Steiner vertex elimination**: remove one non-terminal tree vertex;
//!
//! and keep any change that lowers the cost. Insertion needs only the current tree's edges plus the
//! new vertex's edges into the tree, merged in cost order (the new tree is their minimum spanning
//! tree); elimination re-runs Kruskal on the induced edges without the vertex.

use super::reduce::prune_leaves_local;
use super::tree::cost;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::{Csr, EdgeList};

/// Improves `tree` by vertex insertions and eliminations for at most `rounds` passes.
pub fn improve(
    g: &EdgeList,
    csr: &Csr,
    is_terminal: &[bool],
    mut tree: Vec<u32>,
    rounds: usize,
) -> Vec<u32> {
    if tree.is_empty() {
        return tree;
    }
    let mut local = vec![u32::MAX; g.vertices];
    let mut ds = DisjointSets::new(0);
    for _ in 0..rounds {
        let mut improved = false;
        // Vertex set and the induced edges, in (cost, id) order.
        let verts = g.ends_of(&tree);
        for (i, &v) in verts.iter().enumerate() {
            local[v as usize] = i as u32;
        }
        let key = |e: u32| (g.cost[e as usize], e);
        let mut induced: Vec<u32> = Vec::new();
        for &v in &verts {
            for (w, e) in csr.neighbours(v) {
                if v < w && local[w as usize] != u32::MAX {
                    induced.push(e);
                }
            }
        }
        induced.sort_unstable_by_key(|&e| key(e));
        let mut sorted_tree = tree.clone();
        sorted_tree.sort_unstable_by_key(|&e| key(e));
        let current = cost(g, &tree);
        let mut best: Option<(u64, Vec<u32>)> = None;

        // Insertion candidates: outside vertices with at least two edges into the tree.
        let mut cands: Vec<u32> = Vec::new();
        for &v in &verts {
            for (w, _) in csr.neighbours(v) {
                if local[w as usize] == u32::MAX {
                    cands.push(w);
                }
            }
        }
        cands.sort_unstable();
        let mut runs: Vec<(u32, usize)> = Vec::new();
        for c in cands {
            match runs.last_mut() {
                Some((w, n)) if *w == c => *n += 1,
                _ => runs.push((c, 1)),
            }
        }
        let n_local = verts.len();
        for (v, deg_in) in runs {
            if deg_in < 2 {
                continue;
            }
            let mut extra: Vec<u32> = csr
                .neighbours(v)
                .filter(|&(w, _)| local[w as usize] != u32::MAX)
                .map(|(_, e)| e)
                .collect();
            extra.sort_unstable_by_key(|&e| key(e));
            let id = |x: u32| {
                if x == v {
                    n_local
                } else {
                    local[x as usize] as usize
                }
            };
            ds.reset(n_local + 1);
            let mut out = Vec::with_capacity(n_local);
            let (mut i, mut j) = (0, 0);
            while i < sorted_tree.len() || j < extra.len() {
                let take_tree = j == extra.len()
                    || (i < sorted_tree.len() && key(sorted_tree[i]) < key(extra[j]));
                let e = if take_tree {
                    i += 1;
                    sorted_tree[i - 1]
                } else {
                    j += 1;
                    extra[j - 1]
                };
                let [a, b] = g.ends[e as usize];
                if ds.union(id(a) as u32, id(b) as u32) {
                    out.push(e);
                }
            }
            let need = |l: usize| {
                if l == n_local {
                    is_terminal[v as usize]
                } else {
                    is_terminal[verts[l] as usize]
                }
            };
            consider(g, out, need, id, n_local + 1, current, &mut best);
        }

        // Elimination candidates: non-terminal tree vertices.
        for &v in &verts {
            if is_terminal[v as usize] {
                continue;
            }
            ds.reset(n_local);
            let mut out = Vec::with_capacity(n_local);
            for &e in &induced {
                let [a, b] = g.ends[e as usize];
                if a != v && b != v && ds.union(local[a as usize], local[b as usize]) {
                    out.push(e);
                }
            }
            if out.len() + 2 == n_local {
                let need = |l: usize| is_terminal[verts[l] as usize];
                let id = |x: u32| local[x as usize] as usize;
                consider(g, out, need, id, n_local, current, &mut best);
            }
        }
        for &v in &verts {
            local[v as usize] = u32::MAX;
        }
        if let Some((_, t)) = best {
            tree = t;
            improved = true;
        }
        if !improved {
            break;
        }
    }
    tree.sort_unstable();
    tree
}

/// Prunes a candidate and keeps it when it beats both the current tree and the best candidate.
fn consider<N, L>(
    g: &EdgeList,
    mut t: Vec<u32>,
    need: N,
    local: L,
    k: usize,
    current: u64,
    best: &mut Option<(u64, Vec<u32>)>,
) where
    N: Fn(usize) -> bool,
    L: Fn(u32) -> usize,
{
    prune_leaves_local(g, &mut t, need, local, k);
    let c = cost(g, &t);
    if c < current && best.as_ref().is_none_or(|(bc, _)| c < *bc) {
        *best = Some((c, t));
    }
}
