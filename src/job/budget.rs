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
