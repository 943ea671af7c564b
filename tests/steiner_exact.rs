//! The Steiner solver against an exact Dreyfus–Wagner dynamic program (Networks 1, 1971) on small
//! random graphs with up to 8 terminals, zero-cost and closed edges included.

mod common;
use common::exact::{arb_instance, dreyfus_wagner};
use proptest::prelude::*;
use proptest::strategy::ValueTree;
use reknit::solve::graph::Csr;
use reknit::solve::graph::EdgeList;
use reknit::solve::steiner::mehlhorn::mehlhorn;
use reknit::solve::steiner::paths::Workspace;
use reknit::solve::steiner::reduce::reduce;
use reknit::solve::steiner::{Effort, steiner_tree, tree::check_steiner_tree};

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

/// An instance with a second, separate piece of network (a cycle with a chord, zero-cost edges
/// and a pendant road) that no terminal reaches.
fn arb_instance_with_stray_piece() -> impl Strategy<Value = (EdgeList, Vec<u32>)> {
    (arb_instance(), proptest::collection::vec(0u64..6, 7)).prop_map(|((mut g, terms), c)| {
        let b = g.vertices as u32;
        g.vertices += 5;
        for (i, [x, y]) in [[0, 1], [1, 2], [2, 3], [3, 0], [0, 2], [3, 4], [4, 4]]
            .into_iter()
            .enumerate()
        {
            g.ends.push([b + x, b + y]);
            g.cost.push(c[i]);
        }
        (g, terms)
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// The reductions keep the optimum (Dreyfus–Wagner on the original and on the reduced graph),
    /// each reduced edge stands for a path of road edges of the same total cost between the
    /// zero-cost components of its ends, and pieces no terminal reaches are gone.
    #[test]
    fn reductions_keep_the_optimum((g, terms) in arb_instance_with_stray_piece()) {
        let mut sorted = terms.clone();
        sorted.sort_unstable();
        let red = reduce(&g, &sorted);
        let rg = &red.graph;
        prop_assert_eq!(red.terminals.len(), {
            let mut s: Vec<u32> = sorted.iter().map(|&t| red.super_of[t as usize]).collect();
            s.sort_unstable();
            s.dedup();
            s.len()
        });
        let opt = dreyfus_wagner(&g, &sorted);
        let ropt = if red.terminals.len() < 2 { 0 } else { dreyfus_wagner(rg, &red.terminals) };
        prop_assert_eq!(ropt, opt);
        for e in 0..rg.len() as u32 {
            let orig = red.originals(e);
            prop_assert!(!orig.is_empty());
            prop_assert_eq!(g.total(orig), rg.cost[e as usize]);
            prop_assert!(rg.cost[e as usize] > 0);
            // The road edges form a walk from one end's component to the other's.
            let ends = rg.ends[e as usize];
            let stray = g.vertices as u32 - 5;
            let mut counts = std::collections::BTreeMap::new();
            for &o in orig {
                prop_assert!(g.ends[o as usize][0] < stray, "edge {} of the stray piece kept", o);
                for v in g.ends[o as usize] {
                    *counts.entry(red.super_of[v as usize]).or_insert(0u32) += 1;
                }
            }
            let odd: Vec<u32> = counts.iter().filter(|&(_, &c)| c % 2 == 1).map(|(&s, _)| s).collect();
            prop_assert_eq!(odd.len(), 2, "reduced edge {:?} is not a path", ends);
        }
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
