//! Connected components of the usable network.

use super::disjoint::DisjointSets;
use super::graph::EdgeList;

/// Component label of every vertex, numbered 0, 1, … in order of each component's smallest vertex.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Components {
    /// Component of each vertex.
    pub of: Vec<u32>,
    /// Number of components (isolated vertices count as their own).
    pub count: usize,
}

/// Labels the connected components formed by the usable edges of `g`.
pub fn components(g: &EdgeList) -> Components {
    components_where(g, |_| true)
}

/// Labels the connected components formed by the usable edges of `g` for which `keep(edge)` holds.
pub fn components_where<F: Fn(usize) -> bool>(g: &EdgeList, keep: F) -> Components {
    let mut ds = DisjointSets::new(g.vertices);
    for e in 0..g.len() {
        if g.usable(e) && keep(e) {
            let [a, b] = g.ends[e];
            ds.union(a, b);
        }
    }
    let mut label = vec![u32::MAX; g.vertices];
    let mut of = vec![0u32; g.vertices];
    let mut count = 0u32;
    for v in 0..g.vertices as u32 {
        let r = ds.find(v) as usize;
        if label[r] == u32::MAX {
            label[r] = count;
            count += 1;
        }
        of[v as usize] = label[r];
    }
    Components {
        of,
        count: count as usize,
    }
}
