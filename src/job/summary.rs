//! Builds `summary.json` from the results of the stages.

use super::status::{JOINED, status_label};
use super::{PlanJob, SitesResult};
use crate::export::summary::*;
use crate::ingest::NodingStats;
use crate::ingest::ReadStats;
use crate::ingest::source::InputRecord;
use crate::network::{Network, cost_to_repair_metres};
use crate::solve::components::Components;
use crate::solve::site_plan::gap;
use crate::solve::{Plan, PlanKind};

/// Collects every figure of the run.
#[allow(clippy::too_many_arguments)]
pub fn build(
    job: &PlanJob,
    inputs: Vec<InputRecord>,
    geodesy: Geodesy,
    read: &ReadStats,
    noding: &NodingStats,
    net: &Network,
    comps: &Components,
    plan: &Plan,
    sites: Option<&SitesResult>,
) -> Summary {
    let mut counts = Counts {
        features_read: read.features_read,
        features_used: read.features_used,
        features_skipped: read.features_skipped.clone(),
        features_cut_at_edge: read.features_cut_at_edge,
        line_parts: read.line_parts,
        vertices: read.vertices,
        vertices_moved: noding.vertices_moved,
        max_move_m: round3(noding.max_move_m),
        zero_length_parts_dropped: noding.zero_length_parts_dropped,
        duplicate_edges_dropped: noding.duplicate_edges_dropped,
        undershoots_joined: noding.undershoots_joined,
        overshoots_trimmed: noding.overshoots_trimmed,
        near_duplicates_dropped: noding.near_duplicates_dropped,
        crossings: noding.crossings,
        qa: noding.qa.clone(),
        junctions: net.junctions.len(),
        edges: net.edges.len(),
        components: comps.count,
        ..Default::default()
    };
    let mut network_length = 0.0;
    for e in &net.edges {
        network_length += e.length_m;
        match e.damage.factor() {
            None => counts.edges_closed += 1,
            Some(0.0) => counts.edges_intact += 1,
            Some(_) => counts.edges_damaged += 1,
        }
    }
    counts.network_length_m = round3(network_length);
    let repair: Vec<&crate::network::Edge> = plan
        .edges
        .iter()
        .map(|&e| &net.edges[e as usize])
        .filter(|e| e.cost > 0)
        .collect();
    let fingerprint = super::fingerprint(&inputs, &super::settings_json(job));
    // Within a budget the plan answers another question (the most priority for the money), to
    // which the Steiner bound does not apply: no gap, never "optimal".
    let within_budget = sites.is_some_and(|s| s.budget_applied);
    let g = match within_budget {
        true => None,
        false => gap(plan.total_cost, plan.lower_bound),
    };
    Summary {
        tool: Tool::default(),
        cautions: crate::cautions::CAUTIONS.to_vec(),
        attribution: None,
        inputs,
        fingerprint,
        settings: super::settings_json(job),
        deterministic: job.time_limit_s.is_none(),
        outputs: Vec::new(),
        geodesy,
        counts,
        plan: PlanFigures {
            kind: match within_budget {
                true => {
                    "Steiner trees joining the sites chosen within the budget, the hub's group first"
                }
                false => plan.kind.describe(),
            },
            algorithm: match (plan.kind, within_budget) {
                (PlanKind::WholeNetwork, _) => job.mst.name(),
                (PlanKind::Sites, false) => {
                    "reductions, Mehlhorn, shortest-path multistart, local search; Wong dual ascent bound"
                }
                (PlanKind::Sites, true) => {
                    "reductions, Mehlhorn, shortest-path multistart, local search; budgeted greedy choice of sites from the hub"
                }
            },
            trees: plan.trees,
            repair_edges: repair.len(),
            bound_complete: plan.bound_complete,
        },
        damage_reports: None,
        days: None,
        corridors: None,
        single_failures: None,
        backup: None,
        sites: sites.map(|r| sites_figures(r, net, comps, plan)),
        total_cost: cost_to_repair_metres(plan.total_cost),
        lower_bound: cost_to_repair_metres(plan.lower_bound),
        gap: g.map(|x| (x * 1e6).round() / 1e6 + 0.0),
        optimal: g == Some(0.0),
        cost_unit: "repair-metre",
        repair_length_m: round3(repair.iter().map(|e| e.length_m).sum()),
        plan_edges: plan.edges.len(),
        notes: Vec::new(),
        structures: None,
        history: Vec::new(),
        replan: None,
    }
}

fn sites_figures(r: &SitesResult, net: &Network, comps: &Components, plan: &Plan) -> SitesFigures {
    let sites = &r.layer.sites;
    let mut not_joined = Vec::new();
    let mut joined_to_hub = 0;
    for (i, s) in sites.iter().enumerate() {
        let st = &r.statuses[i];
        if st.status == JOINED {
            joined_to_hub += 1;
        } else {
            not_joined.push(NotJoinedSite {
                id: s.id.clone(),
                name: s.name.clone(),
                status: st.status,
                status_label: status_label(st.status),
                reason: st.reason.clone().unwrap_or_default(),
                distance_m: r.attachments[i].distance_m.map(round3),
            });
        }
    }
    // Repair cost of the plan in each component, for the groups' `cost_in_plan`.
    let mut in_plan: std::collections::HashMap<u32, u64> = Default::default();
    for &e in &plan.edges {
        let edge = &net.edges[e as usize];
        *in_plan.entry(comps.of[edge.from as usize]).or_default() += edge.cost;
    }
    let hub_comp = r.reach.hub_junction.map(|j| comps.of[j as usize]);
    let groups = r
        .plan
        .as_ref()
        .map(|p| {
            p.groups
                .iter()
                .map(|g| GroupFigures {
                    sites: g.sites.iter().map(|&i| sites[i].id.clone()).collect(),
                    hub: Some(g.component) == hub_comp,
                    cost: cost_to_repair_metres(g.tree.cost),
                    cost_in_plan: cost_to_repair_metres(
                        in_plan.get(&g.component).copied().unwrap_or(0),
                    ),
                    lower_bound: cost_to_repair_metres(g.tree.lower_bound),
                    gap: gap(g.tree.cost, g.tree.lower_bound)
                        .map(|x| (x * 1e6).round() / 1e6 + 0.0),
                    reduced_graph: [g.tree.reduced_size.0, g.tree.reduced_size.1],
                })
                .collect()
        })
        .unwrap_or_default();
    let note = match sites.len() {
        0 => Some("the sites layer holds no sites: there is nothing to connect".to_string()),
        1 => Some("the sites layer holds one site: there is nothing to connect it to".to_string()),
        _ => None,
    };
    SitesFigures {
        total: sites.len(),
        attached: r
            .attachments
            .iter()
            .filter(|a| a.junction.is_some())
            .count(),
        joined_to_hub,
        hub: r.hub.map(|h| sites[h].id.clone()),
        groups,
        not_joined,
        note,
    }
}

/// Per day (with `--crew-capacity`): what each crew finishes and works, and the sites joined to
/// the hub that day; None without days.
pub fn days(
    net: &Network,
    ids: &crate::export::work_order_id::WorkOrderIds,
    steps: &[crate::solve::order::Step],
    sites: Option<&SitesResult>,
    capacity: Option<f64>,
) -> Option<Vec<DayFigures>> {
    let cap = (capacity? * 1000.0).round() as u64;
    let last = steps.iter().filter_map(|s| s.last_day).max().unwrap_or(0);
    let total_sites = sites.map_or(0, |s| s.layer.sites.len());
    // Sites joined before any repair: the hub, and sites it reaches over intact roads.
    let mut cumulative = sites.map_or(0, |r| r.reach.before.iter().filter(|&&b| b).count());
    let crews = steps.iter().filter_map(|s| s.crew).max().unwrap_or(0);
    let mut out = Vec::new();
    for day in 1..=last {
        let (from, to) = ((day as u64 - 1) * cap, day as u64 * cap);
        let mut sites_joined = Vec::new();
        let mut per_crew = Vec::new();
        for crew in 1..=crews {
            let mut cd = CrewDay {
                crew,
                finishes: Vec::new(),
                continues: None,
                repair_metres: 0.0,
            };
            for s in steps.iter().filter(|s| s.crew == Some(crew)) {
                let Some((a, b)) = s.span else { continue };
                let worked = b.min(to).saturating_sub(a.max(from));
                if worked == 0 {
                    continue;
                }
                cd.repair_metres += cost_to_repair_metres(worked);
                match s.last_day == Some(day) {
                    true => cd.finishes.push(ids.key(net, s.edge)),
                    false => cd.continues = Some(ids.key(net, s.edge)),
                }
            }
            if cd.repair_metres > 0.0 {
                cd.repair_metres = round3(cd.repair_metres);
                per_crew.push(cd);
            }
        }
        for s in steps.iter().filter(|s| s.last_day == Some(day)) {
            if let Some(sr) = sites {
                sites_joined.extend(s.completes.iter().map(|&i| sr.layer.sites[i].id.clone()));
                cumulative += s.completes.len();
            }
        }
        out.push(DayFigures {
            day,
            crews: per_crew,
            sites_joined,
            cumulative_share_of_sites: sites
                .map(|_| round3(cumulative as f64 / total_sites.max(1) as f64)),
        });
    }
    Some(out)
}
