//! The dual-ascent heuristic: shortest-path trees grown only on the edges the dual ascent saturated
//! (an arc of reduced cost 0), from many roots.
//!
//! When the ascent completes, its saturated arcs join every terminal to the root, and the trees
//! they hold are priced close to the lower bound: the reduced costs say which edges a cheap tree
//! uses. The saturated graph is sparse, so a shortest-path tree there costs little and many roots
//! are affordable; each root gives a different tree.

use super::dual_ascent::Bound;
use super::paths::Workspace;
use super::{sph, tree};
use crate::solve::graph::{Csr, EdgeList, UNUSABLE};

/// The graph `rg` with only the edges that have a saturated arc of `bound`.
pub fn saturated(rg: &EdgeList, bound: &Bound) -> EdgeList {
    EdgeList {
        vertices: rg.vertices,
        ends: rg.ends.clone(),
        cost: rg
            .cost
            .iter()
            .enumerate()
            .map(|(e, &c)| match bound.saturated.get(e) {
                Some(true) => c,
                _ => UNUSABLE,
            })
            .collect(),
    }
}

/// Distinct trees (edge ids of `rg`, pruned by [`tree::mst_prune`]) grown on the saturated edges of
/// `bound` from up to `roots` terminals spread over the list (the ascent's own root first),
/// cheapest first. Empty when the ascent did not complete (its saturated arcs may not join the
/// terminals).
pub fn trees(
    rg: &EdgeList,
    csr: &Csr,
    is_terminal: &[bool],
    terminals: &[u32],
    bound: &Bound,
    roots: usize,
    ws: &mut Workspace,
) -> Vec<(u64, Vec<u32>)> {
    let k = terminals.len();
    if k < 2 || !bound.complete || bound.saturated.len() != rg.len() {
        return Vec::new();
    }
    let sat = saturated(rg, bound);
    let sat_csr = Csr::from_edges(&sat);
    let r = roots.clamp(1, k);
    let mut picks: Vec<u32> = vec![bound.root];
    picks.extend((0..r).map(|i| terminals[i * k / r]));
    picks.dedup();
    let mut out: Vec<(u64, Vec<u32>)> = picks
        .into_iter()
        .map(|root| {
            let t = sph::sph(&sat, &sat_csr, terminals, is_terminal, root, ws);
            tree::mst_prune(rg, csr, &t, is_terminal)
        })
        // The saturated edges join every terminal to the ascent's root; the check only guards.
        .filter(|t| tree::check_steiner_tree(rg, t, terminals).is_ok())
        .map(|t| (tree::cost(rg, &t), t))
        .collect();
    out.sort();
    out.dedup();
    out
}
