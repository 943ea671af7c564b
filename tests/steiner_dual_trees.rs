//! The dual-ascent heuristic (trees grown on the saturated edges from many roots) and the local
//! search that polishes its trees, against an exact Dreyfus–Wagner dynamic program (Networks 1,
//! 1971) on small random graphs with up to 8 terminals, zero-cost and closed edges included.

mod common;
use common::exact::{arb_instance, dreyfus_wagner};
use proptest::prelude::*;
use reknit::solve::graph::Csr;
use reknit::solve::steiner::paths::Workspace;
use reknit::solve::steiner::tree::{check_steiner_tree, cost};
use reknit::solve::steiner::{da_heuristic, dual_ascent, local, reduce, vertex_moves};

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Every tree grown on the saturated edges spans all terminals, costs no less than the optimum
    /// (Dreyfus–Wagner) nor less than the ascent's bound, and is listed once, cheapest first, with
    /// its true cost; a completed ascent always yields one. Polishing a tree by key-path exchange,
    /// key-vertex elimination and vertex insertion and elimination keeps it a tree over all
    /// terminals and never raises its cost.
    #[test]
    fn dual_ascent_trees_span_the_terminals((g, terms) in arb_instance()) {
        let mut terms = terms;
        terms.sort_unstable();
        let opt = dreyfus_wagner(&g, &terms);
        let red = reduce::reduce(&g, &terms);
        prop_assume!(red.terminals.len() >= 2);
        let rg = &red.graph;
        let csr = Csr::from_edges(rg);
        let it = &red.is_terminal;
        let mut ws = Workspace::new(rg.vertices);
        let bound = dual_ascent::dual_ascent(rg, &csr, &red.terminals, u64::MAX);
        prop_assert!(bound.complete);
        let k = red.terminals.len();
        let trees = da_heuristic::trees(rg, &csr, it, &red.terminals, &bound, k, &mut ws);
        prop_assert!(!trees.is_empty(), "a completed ascent gave no tree");
        prop_assert!(trees.windows(2).all(|w| w[0] < w[1]), "not distinct and ascending");
        for (c, t) in &trees {
            check_steiner_tree(rg, t, &red.terminals).map_err(TestCaseError::fail)?;
            prop_assert_eq!(*c, cost(rg, t));
            prop_assert!(*c >= opt, "tree {} below the optimum {}", c, opt);
            prop_assert!(*c >= bound.value, "tree {} below the bound {}", c, bound.value);
            let reach = local::Reach { seeds: 512, eliminate: true };
            let p = local::improve(rg, &csr, it, t.clone(), &mut ws, 25, reach);
            check_steiner_tree(rg, &p, &red.terminals).map_err(TestCaseError::fail)?;
            prop_assert!(cost(rg, &p) <= *c, "key-path moves raised {} to {}", c, cost(rg, &p));
            let q = vertex_moves::improve(rg, &csr, it, p.clone(), 25);
            check_steiner_tree(rg, &q, &red.terminals).map_err(TestCaseError::fail)?;
            prop_assert!(cost(rg, &q) <= cost(rg, &p));
            prop_assert!(cost(rg, &q) >= opt);
        }
    }
}

/// An ascent stopped by its budget may leave terminals unjoined by saturated edges: no tree then.
#[test]
fn an_unfinished_ascent_gives_no_trees() {
    let g = reknit::synthetic::grid_graph(30, 0.3, 7);
    let (mut terms, _, _) = reknit::synthetic::sites_on_largest_component(&g, 20);
    terms.sort_unstable();
    terms.dedup();
    let red = reduce::reduce(&g, &terms);
    let rg = &red.graph;
    let csr = Csr::from_edges(rg);
    let bound = dual_ascent::dual_ascent(rg, &csr, &red.terminals, 10);
    assert!(!bound.complete);
    let mut ws = Workspace::new(rg.vertices);
    let it = &red.is_terminal;
    assert!(da_heuristic::trees(rg, &csr, it, &red.terminals, &bound, 8, &mut ws).is_empty());
}
