//! Each site's status and, when it is not joined to the hub, the reason, derived from facts of the
//! network and the final plan: attachment, which part of the usable network it lies in, whether
//! only impassable roads or no roads at all lie between it and the hub, and what joining it costs.

use super::joined::SiteReach;
use super::notes::list;
use crate::ingest::attach::Attachment;
use crate::ingest::sites::SiteLayer;
use crate::network::cost_to_repair_metres;
use crate::solve::SolveError;
use crate::solve::components::Components;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::EdgeList;

/// Joined to the hub over intact roads and the plan.
pub const CONNECTED: &str = "connected";
/// No usable road within `--max-attach`.
pub const NOT_ATTACHED: &str = "not attached";
/// Could be joined to the hub, but not within `--budget`.
pub const LEFT_OUT: &str = "left out by budget";
/// No usable road leads from the site to the hub.
pub const UNREACHABLE: &str = "unreachable";

/// A site's status and, unless joined, why not.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SiteStatus {
    /// One of [`CONNECTED`], [`NOT_ATTACHED`], [`LEFT_OUT`], [`UNREACHABLE`].
    pub status: &'static str,
    /// Why the site is not joined to the hub (None when it is).
    pub reason: Option<String>,
}

/// What the reasons are derived from.
pub(super) struct Facts<'a> {
    pub graph: &'a EdgeList,
    pub comps: &'a Components,
    pub plan: &'a [u32],
    pub sites: &'a SiteLayer,
    pub attachments: &'a [Attachment],
    pub reach: &'a SiteReach,
    /// True when `--budget` cut the plan down.
    pub budget_applied: bool,
}

/// Every site's status. A site that shares the hub's part of the network yet is not joined,
/// without a budget to explain it, is an internal error.
pub(super) fn statuses(f: &Facts) -> Result<Vec<SiteStatus>, SolveError> {
    let g = f.graph;
    // Junction sets over every road, impassable ones included, and over intact roads plus the plan.
    let mut any_road = DisjointSets::new(g.vertices);
    let mut by_plan = DisjointSets::new(g.vertices);
    for e in 0..g.len() {
        let [a, b] = g.ends[e];
        any_road.union(a, b);
        if g.usable(e) && g.cost[e] == 0 {
            by_plan.union(a, b);
        }
    }
    for &e in f.plan {
        let [a, b] = g.ends[e as usize];
        by_plan.union(a, b);
    }
    let hj = f.reach.hub_junction;
    // The attached sites of each part of the usable network, in input order.
    let mut by_comp: std::collections::HashMap<u32, Vec<usize>> = Default::default();
    for (k, a) in f.attachments.iter().enumerate() {
        if let Some(j) = a.junction {
            by_comp.entry(f.comps.of[j as usize]).or_default().push(k);
        }
    }
    let mut out = Vec::with_capacity(f.attachments.len());
    for (i, a) in f.attachments.iter().enumerate() {
        let s = |status, reason: String| SiteStatus {
            status,
            reason: Some(reason),
        };
        let (Some(j), Some(hj)) = (a.junction, hj) else {
            let why = a.failure.clone().unwrap_or_else(|| "no hub".into());
            out.push(s(NOT_ATTACHED, why));
            continue;
        };
        if f.reach.joined[i] {
            out.push(SiteStatus {
                status: CONNECTED,
                reason: None,
            });
            continue;
        }
        let comp = f.comps.of[j as usize];
        if comp == f.comps.of[hj as usize] {
            match (f.budget_applied, f.reach.need[i]) {
                (true, Some(need)) => out.push(s(
                    LEFT_OUT,
                    format!(
                        "outside the budget: {:.3} more repair-metres would join it to the hub",
                        cost_to_repair_metres(need)
                    ),
                )),
                _ => {
                    return Err(SolveError::Verification {
                        what: "sites plan",
                        detail: format!(
                            "site {} shares the hub's part of the network but is not joined",
                            f.sites.sites[i].id
                        ),
                    });
                }
            }
            continue;
        }
        let why = if any_road.find(j) == any_road.find(hj) {
            "only impassable roads lead from its part of the network to the hub's"
        } else {
            "no road at all, passable or not, links its part of the network to the hub's"
        };
        let (mut with, mut without) = (Vec::new(), Vec::new());
        for &k in by_comp[&comp].iter().filter(|&&k| k != i) {
            let jk = f.attachments[k].junction.expect("grouped by junction");
            let id = f.sites.sites[k].id.as_str();
            if by_plan.find(jk) == by_plan.find(j) {
                with.push(id);
            } else {
                without.push(id);
            }
        }
        let mut group = Vec::new();
        if with.is_empty() && without.is_empty() {
            group.push("no other site shares its part of the network".to_string());
        }
        if !with.is_empty() {
            group.push(format!("the plan joins it with {}", list(with)));
        }
        if !without.is_empty() {
            if !f.budget_applied {
                return Err(SolveError::Verification {
                    what: "sites plan",
                    detail: format!(
                        "site {} is not joined with the other sites of its group",
                        f.sites.sites[i].id
                    ),
                });
            }
            group.push(format!(
                "joining it with {} is outside the budget",
                list(without)
            ));
        }
        out.push(s(UNREACHABLE, format!("{why}; {}", group.join("; "))));
    }
    Ok(out)
}
