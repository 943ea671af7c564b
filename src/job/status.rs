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

/// Status code: joined to the hub over intact roads and the plan.
pub const JOINED: &str = "joined";
/// Status code: no usable road within `--max-attach`.
pub const NOT_ATTACHED: &str = "not_attached";
/// Status code: could be joined to the hub, but not within `--budget`.
pub const LEFT_OUT: &str = "left_out_by_budget";
/// Status code: no usable road leads from the site to the hub.
pub const UNREACHABLE: &str = "unreachable";
/// Every status code with its label for people, in the order docs/outputs.md lists them.
pub const STATUSES: [(&str, &str); 4] = [
    (JOINED, "joined to the hub"),
    (NOT_ATTACHED, "not attached to a road"),
    (LEFT_OUT, "left out by the budget"),
    (UNREACHABLE, "cannot reach the hub"),
];

/// The label for people of a status code (`status_label` beside `status` in the outputs).
pub fn status_label(code: &str) -> &'static str {
    STATUSES
        .iter()
        .find(|(c, _)| *c == code)
        .map_or("unknown status", |(_, l)| l)
}

/// A site's status and, unless joined, why not.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SiteStatus {
    /// One of [`JOINED`], [`NOT_ATTACHED`], [`LEFT_OUT`], [`UNREACHABLE`].
    pub status: &'static str,
    /// Why the site is not joined to the hub (None when it is).
    pub reason: Option<String>,
}

/// What the reasons are derived from.
pub(super) struct Facts<'a> {
    /// The network's edges with their costs (closed ones unusable).
    pub graph: &'a EdgeList,
    /// Parts of the usable network.
    pub comps: &'a Components,
    /// The final plan's edges.
    pub plan: &'a [u32],
    /// The sites.
    pub sites: &'a SiteLayer,
    /// Where each site joined the network.
    pub attachments: &'a [Attachment],
    /// What the plan joins to the hub.
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
                status: JOINED,
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
                        "outside the budget: {} more repair-metres would join it to the hub",
                        crate::decimal::Fixed(cost_to_repair_metres(need), 3)
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

#[cfg(test)]
pub(super) mod tests {
    use super::*;
    use crate::ingest::sites::Site;
    use crate::solve::components::components;
    use crate::solve::graph::UNUSABLE;

    /// Sites named by id, each attached at the given junction (None: not attached).
    pub(in crate::job) fn layer(at: &[(&str, Option<u32>)]) -> (SiteLayer, Vec<Attachment>) {
        let sites = at
            .iter()
            .enumerate()
            .map(|(i, (id, _))| Site {
                index: i,
                id: id.to_string(),
                name: None,
                priority: 1.0,
                pos: [0.0, 0.0],
                outline: None,
                attributes: Default::default(),
            })
            .collect();
        let attachments = at
            .iter()
            .map(|&(_, j)| Attachment {
                junction: j,
                distance_m: Some(1.0),
                point: None,
                failure: j.is_none().then(|| "no road within 250 m".to_string()),
            })
            .collect();
        let input = crate::ingest::source::InputRecord {
            role: "sites".into(),
            path: "sites.geojson".into(),
            bytes: 0,
            sha256: String::new(),
            deleted_records: 0,
        };
        let sl = SiteLayer {
            sites,
            input,
            defaults: Default::default(),
            origin: None,
        };
        (sl, attachments)
    }

    /// Hub at 0; 0–1 damaged; 1–2 closed; 2–3 damaged; 4–5 damaged (an island).
    fn graph() -> EdgeList {
        EdgeList {
            vertices: 6,
            ends: vec![[0, 1], [1, 2], [2, 3], [4, 5]],
            cost: vec![5, UNUSABLE, 7, 3],
        }
    }

    fn run(plan: &[u32], budget_applied: bool) -> Result<Vec<SiteStatus>, SolveError> {
        let g = graph();
        let comps = components(&g);
        let (sl, at) = layer(&[
            ("hub", Some(0)),
            ("one", Some(1)),
            ("two", Some(2)),
            ("three", Some(3)),
            ("isle", Some(4)),
            ("far", None),
        ]);
        let reached = crate::solve::joined::reaching(&g, plan, 0);
        let reach = SiteReach {
            hub_junction: Some(0),
            joined: at
                .iter()
                .map(|a| a.junction.is_some_and(|j| reached[j as usize]))
                .collect(),
            before: vec![false; 6],
            need: vec![None, Some(5), None, None, None, None],
        };
        statuses(&Facts {
            graph: &g,
            comps: &comps,
            plan,
            sites: &sl,
            attachments: &at,
            reach: &reach,
            budget_applied,
        })
    }

    #[test]
    fn each_reason_follows_from_the_network_and_the_plan() {
        let st = run(&[0, 2], false).unwrap();
        let s: Vec<&str> = st.iter().map(|s| s.status).collect();
        assert_eq!(
            s,
            [
                JOINED,
                JOINED,
                UNREACHABLE,
                UNREACHABLE,
                UNREACHABLE,
                NOT_ATTACHED
            ]
        );
        let r = |i: usize| st[i].reason.as_deref().unwrap();
        assert_eq!(
            r(2),
            "only impassable roads lead from its part of the network to the hub's; the plan joins \
             it with three"
        );
        assert_eq!(
            r(4),
            "no road at all, passable or not, links its part of the network to the hub's; no \
             other site shares its part of the network"
        );
        assert_eq!(r(5), "no road within 250 m");
    }

    #[test]
    fn a_budget_explains_what_is_left_out_and_nothing_else_may() {
        let st = run(&[], true).unwrap();
        assert_eq!(st[1].status, LEFT_OUT);
        assert_eq!(
            st[1].reason.as_deref().unwrap(),
            "outside the budget: 0.005 more repair-metres would join it to the hub"
        );
        assert_eq!(
            st[2].reason.as_deref().unwrap(),
            "only impassable roads lead from its part of the network to the hub's; joining it \
             with three is outside the budget"
        );
        // Without a budget, a site the hub could reach but the plan does not join is a bug.
        assert!(run(&[2], false).is_err());
        assert!(run(&[0], false).is_err());
    }
}
