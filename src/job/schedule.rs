//! After the plan: the order of repairs and their repair days.

use super::PlanJob;
use crate::ingest::IngestError;
use crate::ingest::attach::Attachment;
use crate::ingest::sites::SiteLayer;
use crate::network::Cost;
use crate::solve::Plan;
use crate::solve::order::Target;
use crate::solve::site_plan::SitePlan;

/// Orders the plan's repairs (hub's group first) and groups them into repair days; refuses a
/// crew capacity that fits none of the plan's repairs.
#[allow(clippy::too_many_arguments)]
pub(super) fn schedule(
    job: &PlanJob,
    graph: &crate::solve::graph::EdgeList,
    net: &crate::network::Network,
    comps: &crate::solve::components::Components,
    plan: &Plan,
    sites: Option<&SiteLayer>,
    attachments: &[Attachment],
    hub: Option<usize>,
    site_plan: Option<&SitePlan>,
) -> Result<Vec<crate::solve::order::Step>, IngestError> {
    use crate::solve::order::{assign_days, order_whole_network};
    let mut steps = match (sites, site_plan) {
        (Some(sl), Some(sp)) => {
            let (roots, targets) = roots_and_targets(sl, attachments, hub, sp);
            crate::solve::order::order_for_targets(graph, &plan.edges, &roots, &targets)
        }
        _ => {
            let mut first = vec![u32::MAX; comps.count];
            for &e in &plan.edges {
                let v = graph.ends[e as usize][0];
                let c = comps.of[v as usize] as usize;
                first[c] = first[c].min(v);
            }
            // With sites, the hub's tree grows from the hub, so repairs reach sites from it.
            if let Some(j) = hub.and_then(|h| attachments[h].junction) {
                let c = comps.of[j as usize] as usize;
                if first[c] != u32::MAX {
                    first[c] = j;
                }
            }
            let roots: Vec<u32> = first.into_iter().filter(|&v| v != u32::MAX).collect();
            let lengths: Vec<f64> = net.edges.iter().map(|e| e.length_m).collect();
            order_whole_network(graph, &plan.edges, &roots, &lengths)
        }
    };
    let capacity = job.crew_capacity.map(|c| (c * 1000.0).round() as u64);
    check_capacity(job.crew_capacity, capacity, graph, &steps)?;
    assign_days(graph, &mut steps, capacity);
    Ok(steps)
}

/// A day's capacity must hold at least the smallest repair, or no repair day could be formed:
/// only here, with the plan's repairs known, can that be checked.
fn check_capacity(
    given: Option<f64>,
    capacity: Option<Cost>,
    graph: &crate::solve::graph::EdgeList,
    steps: &[crate::solve::order::Step],
) -> Result<(), IngestError> {
    let (Some(c), Some(cap)) = (given, capacity) else {
        return Ok(());
    };
    let smallest = steps
        .iter()
        .map(|st| graph.cost[st.edge as usize])
        .filter(|&x| x > 0)
        .min();
    match smallest.filter(|&m| m > cap) {
        Some(m) => Err(IngestError::Setting {
            name: "--crew-capacity",
            message: format!(
                "{c} repair-metres per day fits no repair of the plan (the smallest needs {} repair-metres)",
                crate::network::cost_to_repair_metres(m)
            ),
        }),
        None => Ok(()),
    }
}

/// The roots of a sites plan (the hub, then each other group's highest-priority site) and the
/// sites as targets weighted by priority (the hub above all).
pub(super) fn roots_and_targets(
    sl: &SiteLayer,
    attachments: &[Attachment],
    hub: Option<usize>,
    sp: &SitePlan,
) -> (Vec<u32>, Vec<Target>) {
    let mut roots = Vec::new();
    let hub_j = hub.and_then(|h| attachments[h].junction);
    if let Some(j) = hub_j {
        roots.push(j);
    }
    for g in &sp.groups {
        // The hub's group grows from the hub alone: a second root there would count sites as
        // joined that have no way to the hub yet.
        if hub_j.is_some_and(|j| g.sites.iter().any(|&i| attachments[i].junction == Some(j))) {
            continue;
        }
        // Each other group grows from its highest-priority site (first on ties).
        let best = g
            .sites
            .iter()
            .copied()
            .fold(None, |b: Option<usize>, i| match b {
                Some(k) if sl.sites[k].priority >= sl.sites[i].priority => Some(k),
                _ => Some(i),
            });
        if let Some(j) = best.and_then(|i| attachments[i].junction) {
            roots.push(j);
        }
    }
    let targets: Vec<Target> = (0..sl.sites.len())
        .filter_map(|i| target(sl, attachments, hub, i))
        .collect();
    (roots, targets)
}

/// Site `i` as a target of the repair order, weighted by its priority (the hub above all); None
/// when it is not attached.
pub(super) fn target(
    sl: &SiteLayer,
    attachments: &[Attachment],
    hub: Option<usize>,
    i: usize,
) -> Option<Target> {
    attachments[i].junction.map(|j| Target {
        junction: j,
        weight: sl.sites[i].priority.max(1e-6) * if Some(i) == hub { 1e6 } else { 1.0 },
        id: i,
    })
}
