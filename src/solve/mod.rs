//! Solve stage: sees only compact graph arrays and returns a [`Plan`].
//!
//! - [`kruskal`](kruskal::kruskal) and [`prim`](prim::prim): minimum spanning forest of the whole
//!   usable network, two independent implementations that must agree on total cost.
//! - [`components`](components::components): which junctions can reach each other at all.

pub mod arborescence;
pub mod backup;
pub mod budget;
pub mod components;
pub mod corridors;
pub mod crews;
pub mod disjoint;
pub mod fragility;
pub mod graph;
pub mod heap;
pub mod joined;
pub mod kruskal;
pub mod order;
pub mod prim;
pub mod radix;
pub mod site_plan;
pub mod steiner;
pub mod stp;
pub mod verify;

use crate::network::Cost;
use graph::EdgeList;

/// Errors of the solve stage.
#[derive(Debug, thiserror::Error)]
pub enum SolveError {
    /// A solver produced a result that fails its own verification (a bug; never written out).
    #[error("internal check failed: the {what} is not valid ({detail}); no output was written")]
    Verification {
        /// Which result failed.
        what: &'static str,
        /// The violated property.
        detail: String,
    },
}

/// Which minimum spanning forest algorithm to run.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum MstAlgorithm {
    /// Kruskal: parallel sort plus disjoint sets (default, fastest).
    #[default]
    Kruskal,
    /// Prim: binary heap per component.
    Prim,
}

impl MstAlgorithm {
    /// The name used in settings and summaries.
    pub fn name(self) -> &'static str {
        match self {
            MstAlgorithm::Kruskal => "kruskal",
            MstAlgorithm::Prim => "prim",
        }
    }
}

/// What a plan connects.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PlanKind {
    /// Every junction to every other junction of its component (minimum spanning forest).
    WholeNetwork,
    /// The critical sites of each group to each other (Steiner trees).
    Sites,
}

impl PlanKind {
    /// Plain description used in summaries.
    pub fn describe(self) -> &'static str {
        match self {
            PlanKind::WholeNetwork => "minimum spanning forest of the whole usable network",
            PlanKind::Sites => "Steiner tree joining the critical sites of each reachable group",
        }
    }
}

/// The chosen edges, their total cost and a lower bound on the best possible cost.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Plan {
    /// What the plan connects.
    pub kind: PlanKind,
    /// Chosen edge ids, ascending.
    pub edges: Vec<u32>,
    /// Sum of the chosen edges' costs, milli-repair-metres.
    pub total_cost: Cost,
    /// Number of trees with at least one edge.
    pub trees: usize,
    /// A proven lower bound on the cost of any plan connecting the same things.
    pub lower_bound: Cost,
    /// False when the bound computation stopped at its work budget.
    pub bound_complete: bool,
}

/// Minimum spanning forest of the usable edges, verified before it is returned.
pub fn minimum_spanning_forest(g: &EdgeList, alg: MstAlgorithm) -> Result<Plan, SolveError> {
    let edges = match alg {
        MstAlgorithm::Kruskal => kruskal::kruskal(g),
        MstAlgorithm::Prim => prim::prim(g),
    };
    verify::check_spanning_forest(g, &edges).map_err(|detail| SolveError::Verification {
        what: "spanning forest",
        detail,
    })?;
    let comps = components::components(g);
    let mut size = vec![0u32; comps.count];
    for &c in &comps.of {
        size[c as usize] += 1;
    }
    let total_cost = g.total(&edges);
    Ok(Plan {
        kind: PlanKind::WholeNetwork,
        total_cost,
        trees: size.iter().filter(|&&s| s > 1).count(),
        edges,
        // A minimum spanning forest is optimal: its own cost is the bound.
        lower_bound: total_cost,
        bound_complete: true,
    })
}

#[cfg(test)]
mod tests {
    use super::graph::UNUSABLE;
    use super::*;
    use proptest::prelude::*;

    fn graph(n: usize, edges: &[(u32, u32, u64)]) -> EdgeList {
        EdgeList {
            vertices: n,
            ends: edges.iter().map(|&(a, b, _)| [a, b]).collect(),
            cost: edges.iter().map(|&(_, _, c)| c).collect(),
        }
    }

    #[test]
    fn small_forest_by_hand() {
        // Two components: a triangle 0-1-2 and an edge 3-4; vertex 5 isolated; edge 6 closed.
        let g = graph(
            6,
            &[
                (0, 1, 5),
                (1, 2, 3),
                (0, 2, 4),
                (3, 4, 0),
                (2, 3, UNUSABLE),
                (4, 4, 1),
            ],
        );
        for alg in [MstAlgorithm::Kruskal, MstAlgorithm::Prim] {
            let p = minimum_spanning_forest(&g, alg).unwrap();
            assert_eq!(p.edges, vec![1, 2, 3], "{alg:?}");
            assert_eq!(p.total_cost, 7);
            assert_eq!(p.trees, 2);
        }
    }

    #[test]
    fn ties_go_to_lower_edge_id() {
        let g = graph(3, &[(0, 1, 1), (1, 2, 1), (0, 2, 1)]);
        assert_eq!(kruskal::kruskal(&g), vec![0, 1]);
    }

    fn arb_graph() -> impl Strategy<Value = EdgeList> {
        (1usize..40).prop_flat_map(|n| {
            let edge = (
                0..n as u32,
                0..n as u32,
                prop_oneof![4 => 0u64..20, 1 => Just(UNUSABLE)],
            );
            proptest::collection::vec(edge, 0..120).prop_map(move |es| graph(n, &es))
        })
    }

    proptest! {
        /// Tree invariants (common practice, no source): per component, vertices − 1 edges, no cycle,
        /// all vertices connected; and Kruskal and Prim agree on the total.
        #[test]
        fn kruskal_and_prim_agree(g in arb_graph()) {
            let k = minimum_spanning_forest(&g, MstAlgorithm::Kruskal).unwrap();
            let p = minimum_spanning_forest(&g, MstAlgorithm::Prim).unwrap();
            prop_assert_eq!(k.total_cost, p.total_cost);
            prop_assert_eq!(k.edges.len(), p.edges.len());
            // Cross-check against petgraph's own implementation on the same edges.
            let pg = g.to_petgraph();
            let total: u64 = petgraph::algo::min_spanning_tree(&pg)
                .filter_map(|el| match el {
                    petgraph::data::Element::Edge { weight, .. } => Some(weight),
                    _ => None,
                })
                .sum();
            prop_assert_eq!(k.total_cost, total);
        }
    }
}
