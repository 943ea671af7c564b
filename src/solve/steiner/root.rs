//! The root of the exact search: one step of reductions by bound, with dual ascents from several
//! root terminals, then the heuristics again on the smaller graph the reductions leave.
//!
//! The reductions keep every tree cheaper than the best one held, so what is left holds an optimal
//! tree whenever the best one is not optimal; the heuristics, run there, make fewer wrong choices
//! (the edges no good tree uses are gone), a common practice of reduce-then-solve codes.

use super::exact::{self, Incumbent};
use super::paths::Workspace;
use super::{Effort, heuristics, reduce};
use crate::solve::graph::{Csr, EdgeList, UNUSABLE};

/// Dual ascents per round of the root step (from terminals spread over the list, the first among
/// them): each root gives other reduced costs, and their tests' union rules out more.
pub const ROOT_ASCENTS: usize = 4;

/// What the root step leaves.
pub struct Rest {
    /// A lower bound on every tree cheaper than the best one held (`None`: none exists, the best
    /// tree is optimal).
    pub bound: Option<u64>,
    /// The graph with every ruled-out edge at [`UNUSABLE`] (`None` when closed).
    pub graph: Option<EdgeList>,
}

/// Runs the root step on `g` (the reduced graph, positive costs) for `terminals`, improving `best`
/// by the step's own trees and by the heuristics on what the step leaves.
pub fn root_step(
    g: &EdgeList,
    terminals: &[u32],
    best: &mut Incumbent,
    effort: Effort,
    ws: &mut Workspace,
) -> Rest {
    let s = exact::step(g.clone(), terminals, best, Effort::Normal, ROOT_ASCENTS, ws);
    let Some(bound) = s.bound else {
        return Rest {
            bound: None,
            graph: None,
        };
    };
    let mut sub = EdgeList {
        vertices: g.vertices,
        ends: g.ends.clone(),
        cost: vec![UNUSABLE; g.len()],
    };
    for &e in &s.alive {
        sub.cost[e as usize] = g.cost[e as usize];
    }
    let red = reduce::reduce(&sub, terminals);
    if red.terminals.len() >= 2 {
        let csr = Csr::from_edges(&red.graph);
        let mut ws = Workspace::new(red.graph.vertices);
        let t = heuristics(&red.graph, &csr, &red, effort, &mut ws);
        best.offer(g, terminals, reduce::expand(&sub, &red, &t, terminals));
    }
    if bound >= best.cost {
        return Rest {
            bound: None,
            graph: None,
        };
    }
    Rest {
        bound: Some(bound),
        graph: Some(sub),
    }
}
