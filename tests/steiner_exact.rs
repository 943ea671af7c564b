//! The Steiner solver against an exact Dreyfus–Wagner dynamic program (Networks 1, 1971) on small
//! random graphs with up to 8 terminals, zero-cost and closed edges included.

mod common;
use common::exact::dreyfus_wagner;
use proptest::prelude::*;
use proptest::strategy::ValueTree;
use reknit::solve::graph::Csr;
use reknit::solve::graph::{EdgeList, UNUSABLE};
use reknit::solve::steiner::mehlhorn::mehlhorn;
use reknit::solve::steiner::paths::Workspace;
use reknit::solve::steiner::{Effort, steiner_tree, tree::check_steiner_tree};

fn arb_instance() -> impl Strategy<Value = (EdgeList, Vec<u32>)> {
    (4usize..22, 2usize..9).prop_flat_map(|(n, k)| {
        let tree_parents = proptest::collection::vec(any::<proptest::sample::Index>(), n - 1);
        let extra =
            proptest::collection::vec((0..n as u32, 0..n as u32, 0u64..25, 0u8..10), 0..3 * n);
        let tree_costs = proptest::collection::vec(0u64..25, n - 1);
        let terms = proptest::sample::subsequence((0..n as u32).collect::<Vec<_>>(), k.min(n));
        (tree_parents, tree_costs, extra, terms).prop_map(move |(parents, costs, extra, terms)| {
            let mut g = EdgeList {
                vertices: n,
                ends: Vec::new(),
                cost: Vec::new(),
            };
            // A random spanning tree keeps every terminal reachable.
            for v in 1..n {
                let p = parents[v - 1].index(v) as u32;
                g.ends.push([p, v as u32]);
                g.cost.push(costs[v - 1]);
            }
            for (a, b, c, kind) in extra {
                g.ends.push([a, b]);
                g.cost.push(if kind == 0 { UNUSABLE } else { c });
            }
            (g, terms)
        })
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Exact check (Dreyfus–Wagner): the plan is a tree over the terminals, never below the optimum,
    /// at most twice it, and the bound never above it.
    #[test]
    fn matches_the_exact_optimum_closely((g, terms) in arb_instance()) {
        let opt = dreyfus_wagner(&g, &terms);
        for effort in [Effort::Quick, Effort::Normal] {
            let t = steiner_tree(&g, &terms, effort).unwrap();
            check_steiner_tree(&g, &t.edges, &terms).map_err(TestCaseError::fail)?;
            prop_assert!(t.cost >= opt, "cost {} below optimum {opt}", t.cost);
            prop_assert!(t.cost <= 2 * opt, "cost {} above 2 × {opt}", t.cost);
            prop_assert!(t.lower_bound <= opt, "bound {} above optimum {opt}", t.lower_bound);
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Mehlhorn's tree against the exact optimum (Dreyfus–Wagner): a tree over the terminals of cost
    /// at most 2(1 − 1/k) times the optimum (Kou, Markowsky & Berman 1981), and the lower bound drawn
    /// from that guarantee never above the optimum.
    #[test]
    fn mehlhorn_keeps_its_guarantee_and_its_bound_holds((g, terms) in arb_instance()) {
        let opt = dreyfus_wagner(&g, &terms);
        let csr = Csr::from_edges(&g);
        let mut is_terminal = vec![false; g.vertices];
        for &t in &terms {
            is_terminal[t as usize] = true;
        }
        let mut ws = Workspace::new(g.vertices);
        let m = mehlhorn(&g, &csr, &terms, &is_terminal, &mut ws);
        check_steiner_tree(&g, &m.edges, &terms).map_err(TestCaseError::fail)?;
        let k = terms.len() as u64;
        let cost = g.total(&m.edges);
        prop_assert!(cost * k <= 2 * (k - 1) * opt, "cost {cost} above 2(1 - 1/{k}) × {opt}");
        prop_assert!(m.lower_bound <= opt, "bound {} above optimum {opt}", m.lower_bound);
    }
}

/// Over many small instances, report how often `normal` finds the exact optimum.
#[test]
fn normal_effort_is_usually_optimal_on_small_graphs() {
    let mut runner = proptest::test_runner::TestRunner::deterministic();
    let strategy = arb_instance();
    let (mut optimal, mut total) = (0, 0);
    for _ in 0..300 {
        let (g, terms) = strategy.new_tree(&mut runner).unwrap().current();
        let opt = dreyfus_wagner(&g, &terms);
        let t = steiner_tree(&g, &terms, Effort::Normal).unwrap();
        total += 1;
        if t.cost == opt {
            optimal += 1;
        }
    }
    eprintln!("normal effort optimal on {optimal} of {total} small instances");
    assert!(
        optimal * 100 >= total * 95,
        "only {optimal} of {total} optimal"
    );
}
