//! `--budget`: when the sites plan costs more than the budget, choose what to join within it.
//!
//! The hub's group comes first and is planned from the hub alone, so every site counted as joined
//! has its whole path to the hub within the money spent. Groups that no usable road links to the
//! hub can never be joined to it; what budget is left joins their sites to each other, whole
//! trees only, the most priority per repair-metre first.

use super::schedule::target;
use crate::ingest::attach::Attachment;
use crate::ingest::sites::SiteLayer;
use crate::network::Cost;
use crate::solve::Plan;
use crate::solve::SolveError;
use crate::solve::budget::within_budget;
use crate::solve::components::Components;
use crate::solve::graph::EdgeList;
use crate::solve::site_plan::SitePlan;

/// What the budget changed: the full plan's cost, for the note.
pub(super) struct BudgetCut {
    /// Cost of the full plan before the budget, milli-repair-metres.
    pub full_cost: Cost,
}

/// Cuts `plan` down to `budget_m` repair-metres; `None` when the full plan fits.
#[allow(clippy::too_many_arguments)]
pub(super) fn apply(
    budget_m: f64,
    graph: &EdgeList,
    comps: &Components,
    plan: &mut Plan,
    sl: &SiteLayer,
    attachments: &[Attachment],
    hub: Option<usize>,
    sp: &SitePlan,
) -> Result<Option<BudgetCut>, SolveError> {
    let budget = (budget_m * 1000.0).round() as Cost;
    if plan.total_cost <= budget {
        return Ok(None);
    }
    let full_cost = plan.total_cost;
    let hub_j = hub.and_then(|h| attachments[h].junction);
    let hub_comp = hub_j.map(|j| comps.of[j as usize]);
    let mut edges: Vec<u32> = Vec::new();
    let mut spent: Cost = 0;
    if let (Some(hj), Some(group)) = (
        hub_j,
        sp.groups.iter().find(|g| Some(g.component) == hub_comp),
    ) {
        if group.tree.cost <= budget {
            edges.extend(&group.tree.edges);
            spent = group.tree.cost;
        } else {
            let targets: Vec<_> = group
                .sites
                .iter()
                .filter_map(|&i| target(sl, attachments, hub, i))
                .collect();
            let bp = within_budget(graph, &group.tree.edges, &[hj], &targets, budget);
            edges.extend(&bp.edges);
            spent = bp.cost;
        }
    }
    let mut others: Vec<(f64, usize)> = sp
        .groups
        .iter()
        .enumerate()
        .filter(|(_, g)| Some(g.component) != hub_comp)
        .map(|(k, g)| {
            let weight: f64 = g.sites.iter().map(|&i| sl.sites[i].priority).sum();
            (weight / g.tree.cost.max(1) as f64, k)
        })
        .collect();
    others.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
    for (_, k) in others {
        let t = &sp.groups[k].tree;
        if spent + t.cost <= budget {
            edges.extend(&t.edges);
            spent += t.cost;
        }
    }
    edges.sort_unstable();
    edges.dedup();
    if graph.total(&edges) != spent || spent > budget {
        return Err(SolveError::Verification {
            what: "plan within the budget",
            detail: format!(
                "{spent} spent of {budget}, edges add up to {}",
                graph.total(&edges)
            ),
        });
    }
    let mut trees: Vec<u32> = edges
        .iter()
        .map(|&e| comps.of[graph.ends[e as usize][0] as usize])
        .collect();
    trees.sort_unstable();
    trees.dedup();
    plan.edges = edges;
    plan.total_cost = spent;
    plan.trees = trees.len();
    // The Steiner bound covers the full set of sites only.
    plan.lower_bound = 0;
    plan.bound_complete = false;
    Ok(Some(BudgetCut { full_cost }))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::job::status::tests::layer;
    use crate::solve::PlanKind;
    use crate::solve::components::components;
    use crate::solve::site_plan::plan_sites;
    use crate::solve::steiner::Effort;

    #[test]
    fn the_hubs_group_first_then_whole_trees_of_the_others_that_fit() {
        // Hub 0 —10— 1 —10— 2; island 3 —4— 4.
        let g = EdgeList {
            vertices: 5,
            ends: vec![[0, 1], [1, 2], [3, 4]],
            cost: vec![10, 10, 4],
        };
        let comps = components(&g);
        let (sl, at) = layer(&[
            ("hub", Some(0)),
            ("a", Some(1)),
            ("b", Some(2)),
            ("c", Some(3)),
            ("d", Some(4)),
        ]);
        let junctions: Vec<Option<u32>> = at.iter().map(|a| a.junction).collect();
        let sp = plan_sites(&g, &comps, &junctions, Effort::Quick).unwrap();
        let full = || Plan {
            kind: PlanKind::Sites,
            edges: sp.edges.clone(),
            total_cost: sp.cost,
            trees: 2,
            lower_bound: sp.lower_bound,
            bound_complete: true,
        };
        for (budget, edges) in [
            (0.013, vec![0]),
            (0.014, vec![0, 2]),
            (0.020, vec![0, 1]),
            (0.023, vec![0, 1]),
        ] {
            let mut plan = full();
            let cut = apply(budget, &g, &comps, &mut plan, &sl, &at, Some(0), &sp).unwrap();
            assert_eq!(cut.unwrap().full_cost, 24);
            assert_eq!(plan.edges, edges, "budget {budget}");
            assert!(plan.total_cost as f64 <= budget * 1000.0);
            assert_eq!(plan.lower_bound, 0);
        }
        let mut plan = full();
        assert!(
            apply(0.024, &g, &comps, &mut plan, &sl, &at, Some(0), &sp)
                .unwrap()
                .is_none()
        );
        assert_eq!(plan.edges, vec![0, 1, 2]);
    }
}
