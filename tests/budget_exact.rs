//! Budget-limited plans against the exact best choice of sites on small random graphs: every
//! subset of sites is priced by the exact Dreyfus–Wagner dynamic program (Networks 1, 1971).

mod common;
use common::exact::dreyfus_wagner;
use reknit::network::Cost;
use reknit::rng::Rng;
use reknit::solve::budget::within_budget;
use reknit::solve::graph::{EdgeList, UNUSABLE};
use reknit::solve::order::{Target, order_within};
use reknit::solve::steiner::{Effort, steiner_tree};

fn reach(g: &EdgeList, edges: &[u32], root: u32) -> Vec<bool> {
    let mut seen = vec![false; g.vertices];
    seen[root as usize] = true;
    let mut changed = true;
    while changed {
        changed = false;
        for &e in edges {
            let [a, b] = g.ends[e as usize];
            if seen[a as usize] != seen[b as usize] {
                seen[a as usize] = true;
                seen[b as usize] = true;
                changed = true;
            }
        }
    }
    seen
}

#[test]
fn within_budget_against_the_exact_best_choice_of_sites() {
    let mut rng = Rng::new(4242);
    let (mut cases, mut best_found) = (0, 0);
    let (mut ratio_sum, mut worst) = (0.0f64, 1.0f64);
    while cases < 150 {
        let n = 9 + rng.below(8) as usize;
        let mut ends = Vec::new();
        for v in 1..n as u32 {
            ends.push([rng.below(v as u64) as u32, v]);
        }
        for _ in 0..n {
            ends.push([rng.below(n as u64) as u32, rng.below(n as u64) as u32]);
        }
        let cost: Vec<Cost> = ends
            .iter()
            .map(|_| match rng.below(10) {
                0 => UNUSABLE,
                1 | 2 => 0,
                _ => 1 + rng.below(30),
            })
            .collect();
        let g = EdgeList {
            vertices: n,
            ends,
            cost,
        };
        let all: Vec<u32> = (0..g.len() as u32)
            .filter(|&e| g.usable(e as usize))
            .collect();
        let reachable = reach(&g, &all, 0);
        let mut sites: Vec<u32> = (1..n as u32).filter(|&v| reachable[v as usize]).collect();
        sites.retain(|_| rng.below(2) == 0);
        sites.truncate(9);
        if sites.len() < 2 {
            continue;
        }
        let targets: Vec<Target> = sites
            .iter()
            .enumerate()
            .map(|(i, &j)| Target {
                junction: j,
                weight: 1.0 + rng.below(5) as f64,
                id: i,
            })
            .collect();
        let mut terms = vec![0u32];
        terms.extend(&sites);
        let full = steiner_tree(&g, &terms, Effort::Normal).unwrap();
        if full.cost == 0 {
            continue;
        }
        let budget = full.cost * (1 + rng.below(9)) / 10;
        let ours = within_budget(&g, &full.edges, &[0], &targets, budget);
        // Never over the budget; the edges' repairs add up; every joined site reaches the hub.
        assert!(ours.cost <= budget, "{} > {budget}", ours.cost);
        assert_eq!(
            ours.cost,
            ours.edges.iter().map(|&e| g.cost[e as usize]).sum::<Cost>()
        );
        let seen = reach(&g, &ours.edges, 0);
        let mut weight = 0.0;
        for (k, t) in targets.iter().enumerate() {
            assert_eq!(ours.joined[k], seen[t.junction as usize], "site {k}");
            if ours.joined[k] {
                weight += t.weight;
            }
        }
        // A site left out names what joining it still costs: its cheapest path from what the plan
        // joins (intact roads and the plan's edges free), by Bellman–Ford here.
        let mut on = ours.edges.clone();
        on.extend((0..g.len() as u32).filter(|&e| g.cost[e as usize] == 0));
        let joined_part = reach(&g, &on, 0);
        let mut dist: Vec<Option<Cost>> = joined_part.iter().map(|&j| j.then_some(0)).collect();
        for _ in 0..g.vertices {
            for e in 0..g.len() {
                if !g.usable(e) {
                    continue;
                }
                let c = if ours.edges.contains(&(e as u32)) {
                    0
                } else {
                    g.cost[e]
                };
                let [a, b] = g.ends[e];
                for (x, y) in [(a, b), (b, a)] {
                    if let Some(dx) = dist[x as usize]
                        && dist[y as usize].is_none_or(|dy| dx + c < dy)
                    {
                        dist[y as usize] = Some(dx + c);
                    }
                }
            }
        }
        for &(k, need) in &ours.left_out {
            assert!(!ours.joined[k]);
            assert_eq!(need, dist[targets[k].junction as usize], "site {k}");
        }
        assert_eq!(
            ours.left_out.len(),
            ours.joined.iter().filter(|&&j| !j).count()
        );
        // At least as good as following the full plan's tree (the repair order's rule).
        let (steps, _) = order_within(&g, &full.edges, &[0], &targets, Some(budget));
        let along: Vec<u32> = steps.iter().map(|s| s.edge).collect();
        let mut on: Vec<u32> = along.clone();
        on.extend((0..g.len() as u32).filter(|&e| g.cost[e as usize] == 0));
        let seen_plan = reach(&g, &on, 0);
        let w_plan: f64 = targets
            .iter()
            .filter(|t| seen_plan[t.junction as usize])
            .map(|t| t.weight)
            .sum();
        assert!(weight >= w_plan - 1e-9, "{weight} < {w_plan}");
        // Exact: the heaviest subset of sites whose optimal tree fits in the budget.
        let mut opt = 0.0f64;
        for mask in 0u32..(1 << sites.len()) {
            let w: f64 = (0..sites.len())
                .filter(|i| mask >> i & 1 == 1)
                .map(|i| targets[i].weight)
                .sum();
            if w <= opt {
                continue;
            }
            let mut t = vec![0u32];
            t.extend(
                (0..sites.len())
                    .filter(|i| mask >> i & 1 == 1)
                    .map(|i| sites[i]),
            );
            if dreyfus_wagner(&g, &t) <= budget {
                opt = w;
            }
        }
        assert!(
            weight <= opt + 1e-9,
            "heuristic {weight} above the exact {opt}"
        );
        let ratio = if opt == 0.0 { 1.0 } else { weight / opt };
        ratio_sum += ratio;
        worst = worst.min(ratio);
        best_found += usize::from(ratio >= 1.0 - 1e-12);
        cases += 1;
    }
    eprintln!(
        "budget vs exact: {cases} cases, best choice in {best_found}, mean share of the best priority {:.4}, worst {worst:.4}",
        ratio_sum / cases as f64
    );
}
