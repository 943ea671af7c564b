//! The bridge tree of the network after the plan, cut down to the hub-to-site paths, and the
//! search region of every vertex.

use super::NONE;
use crate::solve::components::components_where;
use crate::solve::fragility::fragility;
use crate::solve::graph::{EdgeList, UNUSABLE};

/// The bridge tree nodes that matter (ancestor-closed, parents before children) and how every
/// vertex maps to a search region.
pub(super) struct Tree {
    /// Parent of each tree node (NONE for the root, node 0).
    pub(super) parent: Vec<u32>,
    /// Region of each vertex: tree node ids first, then one region per piece off the tree.
    pub(super) region: Vec<u32>,
    /// Number of regions.
    pub(super) regions: usize,
    /// Tree node of each terminal (NONE when not joined to the root).
    pub(super) terminal_node: Vec<u32>,
}

pub(super) fn build_tree(g: &EdgeList, free: &[bool], root: u32, terminals: &[u32]) -> Tree {
    let n = g.vertices;
    let h0 = EdgeList {
        vertices: n,
        ends: g.ends.clone(),
        cost: (0..g.len())
            .map(|e| if free[e] { 0 } else { UNUSABLE })
            .collect(),
    };
    let f = fragility(&h0, &[root]);
    let mut is_bridge = vec![false; g.len()];
    for &b in &f.bridges {
        is_bridge[b as usize] = true;
    }
    let pieces = components_where(&h0, |e| !is_bridge[e]);
    let joined = components_where(&h0, |_| true);
    let hub_comp = joined.of[root as usize];
    // Bridge tree over the pieces of the hub's component, searched breadth-first from the hub.
    let mut adj: Vec<Vec<(u32, u32)>> = vec![Vec::new(); pieces.count];
    for &b in &f.bridges {
        let [a, c] = g.ends[b as usize];
        if joined.of[a as usize] == hub_comp {
            let (pa, pc) = (pieces.of[a as usize], pieces.of[c as usize]);
            adj[pa as usize].push((pc, b));
            adj[pc as usize].push((pa, b));
        }
    }
    let start = pieces.of[root as usize];
    let mut par = vec![NONE; pieces.count];
    let mut seen = vec![false; pieces.count];
    let mut bfs = vec![start];
    seen[start as usize] = true;
    let mut i = 0;
    while i < bfs.len() {
        let x = bfs[i];
        i += 1;
        for &(y, _) in &adj[x as usize] {
            if !seen[y as usize] {
                seen[y as usize] = true;
                par[y as usize] = x;
                bfs.push(y);
            }
        }
    }
    // Nodes on some hub-to-terminal path.
    let mut marked = vec![false; pieces.count];
    marked[start as usize] = true;
    for &t in terminals {
        let mut x = pieces.of[t as usize];
        if !seen[x as usize] {
            continue;
        }
        while !marked[x as usize] {
            marked[x as usize] = true;
            x = par[x as usize];
        }
    }
    // Tree ids in breadth-first order; other pieces of the hub's component join the nearest
    // marked ancestor (they hang off the tree on roads that need no backup).
    let mut tree_id = vec![NONE; pieces.count];
    let mut parent = Vec::new();
    for &x in &bfs {
        let xi = x as usize;
        if marked[xi] {
            tree_id[xi] = parent.len() as u32;
            if x == start {
                parent.push(NONE);
            } else {
                parent.push(tree_id[par[xi] as usize]);
            }
        } else {
            tree_id[xi] = tree_id[par[xi] as usize];
        }
    }
    let k = parent.len();
    // Off the hub's component, each piece joined by free roads is one region.
    let mut off_id = vec![NONE; joined.count];
    let mut regions = k;
    let region: Vec<u32> = (0..n)
        .map(|v| {
            let p = pieces.of[v] as usize;
            if seen[p] {
                tree_id[p]
            } else {
                let c = joined.of[v] as usize;
                if off_id[c] == NONE {
                    off_id[c] = regions as u32;
                    regions += 1;
                }
                off_id[c]
            }
        })
        .collect();
    let terminal_node = terminals
        .iter()
        .map(|&t| {
            let p = pieces.of[t as usize] as usize;
            if seen[p] { tree_id[p] } else { NONE }
        })
        .collect();
    Tree {
        parent,
        region,
        regions,
        terminal_node,
    }
}
