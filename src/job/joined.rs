//! Which sites the final plan joins to the hub: computed once, from the final edge set, and read by
//! every output (sites layer, summary, report, work orders, days, single-failure report).

use crate::ingest::attach::Attachment;
use crate::network::Cost;
use crate::solve::SolveError;
use crate::solve::components::Components;
use crate::solve::graph::EdgeList;
use crate::solve::joined::{cost_from, joining, reaching};
use crate::solve::order::Step;

/// Per site: joined to the hub or not, and what joining it would still cost.
#[derive(Debug, Clone, Default)]
pub struct SiteReach {
    /// The hub's junction (None without sites).
    pub hub_junction: Option<u32>,
    /// Per site: reaches the hub over intact roads and the plan's edges.
    pub joined: Vec<bool>,
    /// Per site: reaches the hub over intact roads alone, before any repair.
    pub before: Vec<bool>,
    /// Per site not joined but in the hub's part of the usable network: the cheapest further
    /// repairs (milli-repair-metres) that would join it, from everything the plan joins; None for
    /// every other site.
    pub need: Vec<Option<Cost>>,
}

impl SiteReach {
    /// How many sites are joined to the hub (the hub included).
    pub fn joined_count(&self) -> usize {
        self.joined.iter().filter(|&&j| j).count()
    }
}

/// Finds what `plan` joins to the hub and rewrites each repair's `completes` to the sites that
/// repair joins to the hub, replaying the order over the intact roads. The replay must end where
/// the plan does (every repair in the order, every site joined by some step or before): anything
/// else is an internal error, never an output.
pub(super) fn site_reach(
    graph: &EdgeList,
    comps: &Components,
    plan: &[u32],
    attachments: &[Attachment],
    hub: Option<usize>,
    steps: &mut [Step],
) -> Result<SiteReach, SolveError> {
    let fail = |detail: String| SolveError::Verification {
        what: "repair order",
        detail,
    };
    let repairs = plan.iter().filter(|&&e| graph.cost[e as usize] > 0).count();
    if repairs != steps.len() {
        return Err(fail(format!(
            "{} repairs ordered for a plan of {repairs}",
            steps.len()
        )));
    }
    let n = attachments.len();
    let Some(hj) = hub.and_then(|h| attachments[h].junction) else {
        for s in steps.iter_mut() {
            s.completes.clear();
        }
        return Ok(SiteReach {
            hub_junction: None,
            joined: vec![false; n],
            before: vec![false; n],
            need: vec![None; n],
        });
    };
    let reached = reaching(graph, plan, hj);
    let at: Vec<(usize, u32)> = attachments
        .iter()
        .enumerate()
        .filter_map(|(i, a)| a.junction.map(|j| (i, j)))
        .collect();
    let mut joined = vec![false; n];
    for &(i, j) in &at {
        joined[i] = reached[j as usize];
    }
    // What joining costs matters only for sites the hub could reach (a budget left them out);
    // the search over the whole network runs only when there are such sites.
    let hub_comp = comps.of[hj as usize];
    let reachable_left = |&(i, j): &(usize, u32)| !joined[i] && comps.of[j as usize] == hub_comp;
    let mut need = vec![None; n];
    if at.iter().any(reachable_left) {
        let dist = cost_from(graph, plan, &reached);
        for &(i, j) in at.iter().filter(|x| reachable_left(x)) {
            need[i] = (dist[j as usize] != Cost::MAX).then_some(dist[j as usize]);
        }
    }
    let order: Vec<u32> = steps.iter().map(|s| s.edge).collect();
    let junctions: Vec<u32> = at.iter().map(|&(_, j)| j).collect();
    let replay = joining(graph, &order, hj, &junctions);
    let mut before = vec![false; n];
    for (k, &(i, _)) in at.iter().enumerate() {
        before[i] = replay.before[k];
        if replay.after[k] != joined[i] {
            return Err(fail(format!(
                "site {i} is {} by the plan but {} by its repairs in order",
                if joined[i] { "joined" } else { "not joined" },
                if replay.after[k] {
                    "joined"
                } else {
                    "not joined"
                }
            )));
        }
    }
    for (s, done) in steps.iter_mut().zip(replay.per_step) {
        s.completes = done.into_iter().map(|k| at[k].0).collect();
    }
    Ok(SiteReach {
        hub_junction: Some(hj),
        joined,
        before,
        need,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::job::status::tests::layer;
    use crate::solve::components::components;

    fn step(edge: u32, order: u32) -> Step {
        Step {
            edge,
            order,
            crew: None,
            first_day: None,
            last_day: None,
            span: None,
            completes: vec![99],
        }
    }

    #[test]
    fn repairs_complete_the_sites_they_join_to_the_hub_and_nothing_else() {
        // Hub 0 —(0)— 1 —5— 2 —3— 3; site "mid" at 1 joined before any repair.
        let g = EdgeList {
            vertices: 4,
            ends: vec![[0, 1], [1, 2], [2, 3]],
            cost: vec![0, 5, 3],
        };
        let comps = components(&g);
        let (_, at) = layer(&[("hub", Some(0)), ("mid", Some(1)), ("end", Some(3))]);
        let mut steps = vec![step(1, 1), step(2, 2)];
        let r = site_reach(&g, &comps, &[0, 1, 2], &at, Some(0), &mut steps).unwrap();
        assert_eq!(r.joined, [true, true, true]);
        assert_eq!(r.before, [true, true, false]);
        assert_eq!(steps[0].completes, Vec::<usize>::new());
        assert_eq!(steps[1].completes, vec![2]);
        // An order that leaves out a repair of the plan is an internal error.
        let mut short = vec![step(1, 1)];
        assert!(site_reach(&g, &comps, &[0, 1, 2], &at, Some(0), &mut short).is_err());
        // A plan that stops short: what is left out gets the cost still needed.
        let mut steps = vec![step(1, 1)];
        let r = site_reach(&g, &comps, &[0, 1], &at, Some(0), &mut steps).unwrap();
        assert_eq!(r.joined, [true, true, false]);
        assert_eq!(r.need, [None, None, Some(3)]);
    }
}
