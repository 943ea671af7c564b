//! The exact search: reductions by bound and by special distance never lose an optimal tree, and
//! thorough effort proves optimality. References: an exact Dreyfus–Wagner dynamic program (Networks
//! 1, 1971) on small random graphs, and the published optima of SteinLib (Koch, Martin & Voß,
//! ZIB-Report 00-37, 2001; tests/data/steinlib/optima.tsv).

mod common;
use common::exact::{arb_instance, dreyfus_wagner};
use proptest::prelude::*;
use reknit::solve::graph::{Csr, EdgeList, UNUSABLE};
use reknit::solve::steiner::dual_ascent::{dual_ascent, dual_ascent_from};
use reknit::solve::steiner::exact::connected;
use reknit::solve::steiner::fixing::{reduced_cost_doomed, special_distance_doomed};
use reknit::solve::steiner::paths::Workspace;
use reknit::solve::steiner::reduce::reduce;
use reknit::solve::steiner::{Effort, mehlhorn::mehlhorn, steiner_tree};
use reknit::solve::stp;

/// The optimum over what `doomed` leaves, or `None` when the terminals fall apart.
fn optimum_without(g: &EdgeList, terms: &[u32], doomed: &[bool]) -> Option<u64> {
    let mut rest = g.clone();
    for (c, &d) in rest.cost.iter_mut().zip(doomed) {
        if d {
            *c = UNUSABLE;
        }
    }
    connected(&rest, terms).then(|| dreyfus_wagner(&rest, terms))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// On the reduced graph the solver searches: with a real tree's cost U (Mehlhorn's), the
    /// reduced-cost tests at limit U + 1 keep the optimum (Dreyfus–Wagner) exactly; at limit U every
    /// tree cheaper than U survives, so the optimum is what is left or U itself; the special-distance
    /// test keeps the optimum.
    #[test]
    fn reductions_by_bound_keep_an_optimum((g, terms) in arb_instance()) {
        let mut terms = terms;
        terms.sort_unstable();
        let red = reduce(&g, &terms);
        prop_assume!(red.terminals.len() >= 2);
        let (rg, rt, it) = (&red.graph, &red.terminals, &red.is_terminal);
        let csr = Csr::from_edges(rg);
        let opt = dreyfus_wagner(rg, rt);
        let b = dual_ascent(rg, &csr, rt, u64::MAX);
        let upper = rg.total(&mehlhorn(rg, &csr, rt, it, &mut Workspace::new(rg.vertices)).edges);
        let keep = reduced_cost_doomed(rg, &csr, it, rt[0], &b, upper + 1);
        prop_assert_eq!(optimum_without(rg, rt, &keep), Some(opt));
        let strict = reduced_cost_doomed(rg, &csr, it, rt[0], &b, upper);
        let left = optimum_without(rg, rt, &strict).unwrap_or(u64::MAX);
        prop_assert_eq!(left.min(upper), opt);
        let sd = special_distance_doomed(rg, &csr, it);
        prop_assert_eq!(optimum_without(rg, rt, &sd), Some(opt));
    }

    /// Dual ascents from every terminal as root: each bound stays at or below the optimum
    /// (Dreyfus–Wagner), and the union of their reduced-cost tests at limit U + 1 (U a real tree's
    /// cost) still keeps the optimum, as does the union of the tests at limit U, up to U itself.
    #[test]
    fn ascents_from_every_root_keep_an_optimum((g, terms) in arb_instance()) {
        let mut terms = terms;
        terms.sort_unstable();
        let red = reduce(&g, &terms);
        prop_assume!(red.terminals.len() >= 2);
        let (rg, rt, it) = (&red.graph, &red.terminals, &red.is_terminal);
        let csr = Csr::from_edges(rg);
        let opt = dreyfus_wagner(rg, rt);
        let upper = rg.total(&mehlhorn(rg, &csr, rt, it, &mut Workspace::new(rg.vertices)).edges);
        let mut keep = vec![false; rg.len()];
        let mut strict = vec![false; rg.len()];
        for &root in rt {
            let b = dual_ascent_from(rg, &csr, rt, root, u64::MAX);
            prop_assert!(b.complete && b.value <= opt, "root {}: bound {} > {}", root, b.value, opt);
            prop_assert_eq!(b.root, root);
            let k = reduced_cost_doomed(rg, &csr, it, root, &b, upper + 1);
            let s = reduced_cost_doomed(rg, &csr, it, root, &b, upper);
            for (d, x) in keep.iter_mut().zip(k) {
                *d |= x;
            }
            for (d, x) in strict.iter_mut().zip(s) {
                *d |= x;
            }
        }
        prop_assert_eq!(optimum_without(rg, rt, &keep), Some(opt));
        let left = optimum_without(rg, rt, &strict).unwrap_or(u64::MAX);
        prop_assert_eq!(left.min(upper), opt);
    }

    /// One exact step with ascents from several roots, started from a real tree: the bound it
    /// reports never exceeds the optimum (Dreyfus–Wagner) unless the held tree is already optimal,
    /// the held tree never gets dearer, and the edges left still hold an optimal tree whenever the
    /// held one is not optimal.
    #[test]
    fn a_step_with_many_roots_keeps_an_optimum((g, terms) in arb_instance(), roots in 1usize..5) {
        use reknit::solve::steiner::exact::{Incumbent, step};
        let mut terms = terms;
        terms.sort_unstable();
        let red = reduce(&g, &terms);
        prop_assume!(red.terminals.len() >= 2);
        let (rg, rt, it) = (&red.graph, &red.terminals, &red.is_terminal);
        let csr = Csr::from_edges(rg);
        let opt = dreyfus_wagner(rg, rt);
        let start = mehlhorn(rg, &csr, rt, it, &mut Workspace::new(rg.vertices)).edges;
        let mut best = Incumbent { cost: rg.total(&start), edges: start };
        let mut ws = Workspace::new(rg.vertices);
        let s = step(rg.clone(), rt, &mut best, Effort::Normal, roots, &mut ws);
        prop_assert!(best.cost >= opt);
        prop_assert_eq!(rg.total(&best.edges), best.cost);
        match s.bound {
            None => prop_assert_eq!(best.cost, opt, "closed, so the held tree is optimal"),
            Some(b) => {
                prop_assert!(b <= opt, "bound {} above the optimum {}", b, opt);
                let mut gone = vec![true; rg.len()];
                for &e in &s.alive {
                    gone[e as usize] = false;
                }
                let left = optimum_without(rg, rt, &gone).unwrap_or(u64::MAX);
                prop_assert_eq!(left.min(best.cost), opt);
            }
        }
    }

    /// Merging shortest-path trees from every terminal: a merged tree is a tree over the terminals
    /// of the reduced graph, cheaper than every tree merged and never below the optimum
    /// (Dreyfus–Wagner); with steps enough to finish, the union's search returns the union's best
    /// tree, so merging a pool that holds an optimal tree never returns anything.
    #[test]
    fn merging_trees_keeps_a_valid_tree((g, terms) in arb_instance()) {
        use reknit::solve::steiner::{merge::merged, sph::sph, tree::check_steiner_tree};
        let mut terms = terms;
        terms.sort_unstable();
        let red = reduce(&g, &terms);
        prop_assume!(red.terminals.len() >= 2);
        let (rg, rt, it) = (&red.graph, &red.terminals, &red.is_terminal);
        let csr = Csr::from_edges(rg);
        let mut ws = Workspace::new(rg.vertices);
        let pool: Vec<(u64, Vec<u32>)> = rt
            .iter()
            .map(|&r| {
                let t = sph(rg, &csr, rt, it, r, &mut ws);
                (rg.total(&t), t)
            })
            .collect();
        let cheapest = pool.iter().map(|p| p.0).min().unwrap();
        let opt = dreyfus_wagner(rg, rt);
        if let Some(t) = merged(rg, rt, pool.clone(), 8, 1_000) {
            check_steiner_tree(rg, &t, rt).map_err(TestCaseError::fail)?;
            prop_assert!(rg.total(&t) < cheapest);
            prop_assert!(rg.total(&t) >= opt);
        }
        let best = steiner_tree(rg, rt, Effort::Thorough).unwrap();
        prop_assume!(best.cost == opt && best.edges.iter().all(|&e| rg.cost[e as usize] > 0));
        let mut with_opt = pool;
        with_opt.push((opt, best.edges));
        prop_assert!(merged(rg, rt, with_opt, 8, 1_000).is_none());
    }

    /// Thorough effort finds and proves the optimum of small graphs (Dreyfus–Wagner).
    #[test]
    fn thorough_proves_the_optimum((g, terms) in arb_instance()) {
        let opt = dreyfus_wagner(&g, &terms);
        let t = steiner_tree(&g, &terms, Effort::Thorough).unwrap();
        prop_assert_eq!(t.cost, opt);
        prop_assert_eq!(t.lower_bound, opt);
    }
}

fn instance(name: &str) -> stp::Instance {
    let path = common::data(&format!("steinlib/{name}.stp"));
    stp::parse(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn published(name: &str) -> u64 {
    let text = std::fs::read_to_string(common::data("steinlib/optima.tsv")).unwrap();
    let line = text.lines().find(|l| l.starts_with(&format!("{name}\t")));
    line.and_then(|l| l.split('\t').nth(1)?.trim().parse().ok())
        .unwrap_or_else(|| panic!("{name} not in optima.tsv"))
}

/// Proven-optimal plans equal the published optima: SteinLib (Koch, Martin & Voß 2001), all of
/// series B and the quicker instances of series C.
#[test]
fn proven_plans_equal_the_published_optima() {
    common::external::ran("steinlib-proven-optima");
    let names = (1..=18).map(|i| format!("B/b{i:02}"));
    let names = names.chain(["C/c01", "C/c02", "C/c06", "C/c11", "C/c16"].map(String::from));
    for name in names {
        let inst = instance(&name);
        let t = steiner_tree(&inst.graph, &inst.terminals, Effort::Thorough).unwrap();
        assert_eq!(t.lower_bound, t.cost, "{name}: not proven");
        // Published optimum: SteinLib, Koch, Martin & Voß 2001 (optima.tsv).
        assert_eq!(
            t.cost,
            published(&name),
            "{name}: proven cost differs from SteinLib's"
        );
    }
}

/// The same plan and bound every time, whatever the thread count (1 or 2 worker threads).
#[test]
fn thorough_is_deterministic() {
    for name in ["B/b17", "C/c07"] {
        let inst = instance(name);
        let runs: Vec<_> = [1, 2, 2, 1]
            .iter()
            .map(|&n| {
                let pool = rayon::ThreadPoolBuilder::new()
                    .num_threads(n)
                    .build()
                    .unwrap();
                pool.install(|| steiner_tree(&inst.graph, &inst.terminals, Effort::Thorough))
                    .unwrap()
            })
            .collect();
        for r in &runs[1..] {
            assert_eq!(r, &runs[0], "{name}");
        }
    }
}

/// The progress hook hears a best cost that only falls and a bound that only rises, never above
/// the best cost, ending at the plan's own figures; with a clock far off instead of the step
/// budget, c07 is proven (SteinLib, Koch, Martin & Voß 2001, optima.tsv).
#[test]
fn progress_reports_track_the_search_to_its_end() {
    use reknit::solve::steiner::{Watch, steiner_tree_watched};
    use std::sync::Mutex;
    let inst = instance("C/c07");
    let heard = Mutex::new(Vec::new());
    let report = |c: u64, b: u64| heard.lock().unwrap().push((c, b));
    let deadline = std::time::Instant::now() + std::time::Duration::from_secs(3600);
    let watch = Watch {
        report: Some(&report),
        deadline: Some(deadline),
    };
    let t = steiner_tree_watched(&inst.graph, &inst.terminals, Effort::Normal, watch).unwrap();
    let heard = heard.into_inner().unwrap();
    assert!(!heard.is_empty());
    for w in heard.windows(2) {
        assert!(w[1].0 <= w[0].0 && w[1].1 >= w[0].1, "{w:?}");
    }
    assert!(heard.iter().all(|&(c, b)| b <= c));
    assert_eq!(*heard.last().unwrap(), (t.cost, t.lower_bound));
    assert_eq!(
        t.cost, t.lower_bound,
        "run to the end, the search proves c07"
    );
    assert_eq!(t.cost, published("C/c07"));
}
