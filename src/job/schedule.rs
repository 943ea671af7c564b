//! After the plan: the order of repairs, and with `--crew-capacity` which crew makes each repair
//! on which days ([`crate::solve::crews`]).

use super::PlanJob;
use crate::ingest::IngestError;
use crate::ingest::attach::Attachment;
use crate::ingest::sites::SiteLayer;
use crate::solve::Plan;
use crate::solve::crews::{Sim, day_of, schedule_crews};
use crate::solve::order::{Step, Target};
use crate::solve::site_plan::SitePlan;

/// Work (relaxations) the neighbour swaps may spend: enough for thousands of repairs on a district,
/// a bounded cost on the largest networks (where list scheduling alone is used).
const SWAP_WORK: u64 = 200_000_000;

/// Orders the plan's repairs (hub's group first) and, with a crew capacity, spreads them over the
/// crews and days; the steps come out in the order the repairs are finished.
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
) -> Result<Vec<Step>, IngestError> {
    use crate::solve::order::{order_for_targets, order_whole_network};
    let (roots, targets, steps) = match (sites, site_plan) {
        (Some(sl), Some(sp)) => {
            let (roots, targets) = roots_and_targets(sl, attachments, hub, sp);
            let steps = order_for_targets(graph, &plan.edges, &roots, &targets);
            (roots, targets, steps)
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
            let steps = order_whole_network(graph, &plan.edges, &roots, &lengths);
            (roots, Vec::new(), steps)
        }
    };
    let Some(capacity) = job.crew_capacity.map(|c| (c * 1000.0).round() as u64) else {
        return Ok(steps);
    };
    let order: Vec<u32> = steps.iter().map(|s| s.edge).collect();
    let mut sim = Sim::new(graph, &order, &roots, &targets, capacity, job.crews);
    let mut slots = schedule_crews(&mut sim, &order, SWAP_WORK).slots;
    if slots.len() != order.len() {
        return Err(IngestError::Setting {
            name: "--crews",
            message: format!(
                "internal error (a bug): {} of {} repairs could be reached by a crew",
                slots.len(),
                order.len()
            ),
        });
    }
    // Finished order keeps every repair after those that opened the way to it.
    slots.sort_by_key(|s| (s.finish, s.start, s.crew, s.edge));
    Ok(slots
        .iter()
        .enumerate()
        .map(|(k, s)| Step {
            edge: s.edge,
            order: k as u32 + 1,
            crew: Some(s.crew),
            first_day: Some((s.start / capacity) as u32 + 1),
            last_day: Some(day_of(s.finish, capacity)),
            span: Some((s.start, s.finish)),
            completes: Vec::new(),
        })
        .collect())
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
