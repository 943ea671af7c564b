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
    // Vertices are numbered locally, so the check costs what the tree costs, not the graph.
    if let Some(e) = edges
        .iter()
        .find(|&&e| e as usize >= g.len() || !g.usable(e as usize))
    {
        return Err(format!("edge {e} is not usable"));
    }
    let verts = g.ends_of(edges);
    // Position of `v` among the tree's vertices (or where it would be).
    let local = |v: u32| verts.partition_point(|&x| x < v);
    let mut ds = DisjointSets::new(verts.len());
    for &e in edges {
        let [a, b] = g.ends[e as usize];
        if !ds.union(local(a) as u32, local(b) as u32) {
            return Err(format!("edge {e} closes a cycle"));
        }
    }
    if edges.len() + 1 != verts.len() {
        return Err("the edges do not form one tree".into());
    }
    let l0 = local(terminals[0]);
    if verts.get(l0) != Some(&terminals[0]) {
        return Err(format!("terminal {} is not connected", terminals[0]));
    }
    let r = ds.find(l0 as u32);
    for &t in terminals {
        let l = local(t);
        if verts.get(l) != Some(&t) || ds.find(l as u32) != r {
            return Err(format!("terminal {t} is not connected"));
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn path4() -> EdgeList {
        // 0 - 1 - 2 - 3, a chord 0 - 2, and a separate edge 4 - 5.
        EdgeList {
            vertices: 6,
            ends: vec![[0, 1], [1, 2], [2, 3], [0, 2], [4, 5]],
            cost: vec![1, 1, 1, 1, 1],
        }
    }

    #[test]
    fn check_accepts_trees_and_names_what_is_wrong() {
        let g = path4();
        assert_eq!(check_steiner_tree(&g, &[0, 1, 2], &[0, 3]), Ok(()));
        assert_eq!(check_steiner_tree(&g, &[1, 2], &[1, 3]), Ok(()));
        let cycle = check_steiner_tree(&g, &[0, 1, 3, 2], &[0, 3]).unwrap_err();
        assert!(cycle.contains("closes a cycle"), "{cycle}");
        let apart = check_steiner_tree(&g, &[0, 4], &[0, 5]).unwrap_err();
        assert!(apart.contains("one tree"), "{apart}");
        let missing = check_steiner_tree(&g, &[0, 1], &[0, 3]).unwrap_err();
        assert!(missing.contains("terminal 3"), "{missing}");
        let first_missing = check_steiner_tree(&g, &[1, 2], &[0, 3]).unwrap_err();
        assert!(first_missing.contains("terminal 0"), "{first_missing}");
        assert!(check_steiner_tree(&g, &[9], &[0, 3]).is_err());
    }
}
