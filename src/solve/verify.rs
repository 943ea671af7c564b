//! Checks that a set of edges is a spanning forest of the usable network.

use super::components::components;
use super::disjoint::DisjointSets;
use super::graph::EdgeList;

/// Verifies that `edges` is a spanning forest of `g`'s usable edges: only usable edges, no cycle, and
/// exactly (vertices − components) edges, which together mean every component is spanned by one tree.
pub fn check_spanning_forest(g: &EdgeList, edges: &[u32]) -> Result<(), String> {
    let mut ds = DisjointSets::new(g.vertices);
    for &e in edges {
        let e = e as usize;
        if e >= g.len() {
            return Err(format!("edge {e} does not exist"));
        }
        if !g.usable(e) {
            return Err(format!("edge {e} is closed or a loop"));
        }
        let [a, b] = g.ends[e];
        if !ds.union(a, b) {
            return Err(format!("edge {e} closes a cycle"));
        }
    }
    let comps = components(g).count;
    let want = g.vertices - comps;
    if edges.len() != want {
        return Err(format!(
            "{} edges for {} vertices in {} components (a spanning forest has {want})",
            edges.len(),
            g.vertices,
            comps
        ));
    }
    Ok(())
}
