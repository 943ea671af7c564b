//! Stage 3, plan: the hub chosen, the plan solved (sites or whole network) and cut to the
//! budget, the repairs ordered, what reaches the hub, and the single points of failure.

use super::network::Built;
use crate::export::backup::BackupLayer;
use crate::export::single_failures::SingleFailureLayer;
use crate::ingest::sites::SiteLayer;
use crate::job::notes::Notes;
use crate::job::resilience::{backup_plan, single_failure_report};
use crate::job::schedule::schedule;
use crate::job::{JobError, PlanJob, SitesResult, budget, hub, joined, status};
use crate::network::cost_to_repair_metres;
use crate::progress::Progress;
use crate::replan::warm;
use crate::solve::components::{Components, components};
use crate::solve::order::Step;
use crate::solve::site_plan::{SitePlan, plan_sites_watched};
use crate::solve::steiner::Watch;
use crate::solve::{Plan, PlanKind, minimum_spanning_forest};
use std::time::{Duration, Instant};

/// The plan and everything decided about it.
pub(in crate::job) struct Planned {
    /// The network stage's results.
    pub built: Built,
    /// Its connected components (usable edges).
    pub comps: Components,
    /// The edges to repair.
    pub plan: Plan,
    /// The repairs in order, with their repair days (with --crew-capacity).
    pub steps: Vec<Step>,
    /// The sites' attachments, hub, plan, reach and statuses, when sites were given.
    pub sites: Option<SitesResult>,
    /// Single points of failure after the plan (sites joined to a hub).
    pub single_failures: Option<SingleFailureLayer>,
    /// Backup links (`--redundancy`).
    pub backup: Option<BackupLayer>,
    /// Corridors from the hub to the joined sites.
    pub corridors: Option<crate::export::corridors::CorridorLayer>,
}

/// Solves the plan on the built network and decides what it joins.
pub(in crate::job) fn plan(
    job: &PlanJob,
    mut built: Built,
    site_layer: Option<SiteLayer>,
    progress: &Progress,
    notes: &mut Notes,
) -> Result<Planned, JobError> {
    let graph = built.net.weighted_edges();
    let comps = components(&graph);
    let attachments = std::mem::take(&mut built.attachments);
    let hub = match &site_layer {
        Some(sl) => hub::choose(sl, &attachments, job.hub.as_deref(), &comps, notes)?,
        None => None,
    };
    let (mut plan, site_plan) = {
        let stage = progress.stage("solving");
        // A re-plan solves with its started repairs free, then settles (replan::warm).
        let carried = built.carried.as_ref();
        let solve = carried.map(|c| warm::solving_graph(&graph, c));
        let solve_on = solve.as_ref().unwrap_or(&graph);
        match &site_layer {
            Some(_) if !job.whole_network => {
                let mut junctions: Vec<Option<u32>> =
                    attachments.iter().map(|a| a.junction).collect();
                let n = junctions.len();
                if let Some(c) = carried {
                    let extra = warm::extra_terminals(&graph, &comps, &junctions, c);
                    junctions.extend(extra.into_iter().map(Some));
                }
                let report = |cost: u64, bound: u64| stage.set_message(search_line(cost, bound));
                let watch = Watch {
                    report: Some(&report),
                    deadline: job
                        .time_limit_s
                        .map(|t| Instant::now() + Duration::from_secs_f64(t)),
                };
                let mut sp = plan_sites_watched(solve_on, &comps, &junctions, job.effort, watch)?;
                if let Some(c) = carried {
                    warm::settle_sites(&graph, solve_on, &comps, &mut sp, &junctions, n, c);
                }
                (sites_plan(&sp), Some(sp))
            }
            _ => {
                let mut plan = minimum_spanning_forest(solve_on, job.mst)?;
                if let Some(c) = carried {
                    warm::settle_forest(&graph, solve_on, &mut plan, c);
                }
                (plan, None)
            }
        }
    };
    // Within a budget smaller than the plan, choose which sites to join.
    let mut budget_applied = false;
    if let (Some(b), Some(sl), Some(sp)) = (job.budget, &site_layer, &site_plan) {
        let _s = progress.stage("choosing sites within the budget");
        if let Some(cut) = budget::apply(b, &graph, &comps, &mut plan, sl, &attachments, hub, sp)? {
            budget_applied = true;
            notes.push(
                "budget_limits_plan",
                format!(
                    "the full plan would cost {} repair-metres, more than the budget of {}: \
                     the plan spends {} on the sites giving the most priority per \
                     repair-metre, joined to the hub first",
                    crate::decimal::Fixed(cost_to_repair_metres(cut.full_cost), 3),
                    crate::decimal::shown(b),
                    crate::decimal::Fixed(cost_to_repair_metres(plan.total_cost), 3)
                ),
            );
        }
    }
    let mut steps = {
        let _s = progress.stage("ordering repairs");
        schedule(
            job,
            &graph,
            &built.net,
            &comps,
            &plan,
            site_layer.as_ref(),
            &attachments,
            hub,
            site_plan.as_ref(),
        )?
    };
    let sites = match site_layer {
        Some(layer) => {
            built.inputs.push(layer.input.clone());
            let reach =
                joined::site_reach(&graph, &comps, &plan.edges, &attachments, hub, &mut steps)?;
            let statuses = status::statuses(&status::Facts {
                graph: &graph,
                comps: &comps,
                plan: &plan.edges,
                sites: &layer,
                attachments: &attachments,
                reach: &reach,
                budget_applied,
            })?;
            hub::alone_note(notes, &layer, &attachments, hub, &comps);
            Some(SitesResult {
                layer,
                attachments,
                hub,
                plan: site_plan,
                reach,
                statuses,
                budget_applied,
            })
        }
        None => None,
    };
    let joined_to_hub = sites.as_ref().filter(|sr| sr.reach.hub_junction.is_some());
    let single_failures = match joined_to_hub {
        Some(sr) => {
            let _s = progress.stage("finding roads with no way round");
            Some(single_failure_report(&graph, &plan.edges, sr)?)
        }
        None => None,
    };
    let backup = match joined_to_hub {
        Some(sr) if job.redundancy => {
            let _s = progress.stage("planning backup links");
            Some(backup_plan(&graph, &plan.edges, sr, steps.len())?)
        }
        _ => None,
    };
    let corridors = joined_to_hub.and_then(|sr| {
        let _s = progress.stage("finding corridors");
        let mut done = plan.edges.clone();
        done.extend(backup.iter().flat_map(|b| b.rows.iter().map(|r| r.edge)));
        crate::job::corridors::corridors(&built.net, &built.keys, &graph, &done, sr, job.max_detour)
    });
    Ok(Planned {
        built,
        comps,
        plan,
        steps,
        sites,
        single_failures,
        backup,
        corridors,
    })
}

/// The sites plan as a plan: its edges, cost, trees and bound.
fn sites_plan(sp: &SitePlan) -> Plan {
    Plan {
        kind: PlanKind::Sites,
        edges: sp.edges.clone(),
        total_cost: sp.cost,
        trees: sp
            .groups
            .iter()
            .filter(|g| !g.tree.edges.is_empty())
            .count(),
        lower_bound: sp.lower_bound,
        bound_complete: sp.bound_complete,
    }
}

/// The progress line while a sites plan is searched: the best plan so far and the lower bound,
/// in repair-metres, and how far apart they are (one group of sites at a time).
fn search_line(cost: u64, bound: u64) -> String {
    let (c, b) = (cost_to_repair_metres(cost), cost_to_repair_metres(bound));
    let gap = match crate::solve::site_plan::gap(cost, bound) {
        Some(g) if g > 0.0 => format!(
            "at most {} % above optimal",
            crate::decimal::Fixed(100.0 * g, 2)
        ),
        Some(_) => "proven optimal".to_string(),
        None => "no bound yet".to_string(),
    };
    format!(
        "solving: best plan {} repair-metres, bound {} ({gap})",
        crate::decimal::Fixed(c, 3),
        crate::decimal::Fixed(b, 3)
    )
}
