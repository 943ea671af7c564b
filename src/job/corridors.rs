//! Corridors for a plan with a hub: each joined site's route from the hub over the roads usable
//! once the plan and any backup links are done ([`crate::solve::corridors`]), and with
//! `--max-detour` the offers of further repairs for sites whose detour is too long.

use super::SitesResult;
use crate::export::corridors::*;
use crate::export::work_order_id::WorkOrderIds;
use crate::network::{Network, cost_to_repair_metres};
use crate::solve::corridors::{NoFix, cheapest_fix, route, shortest};
use crate::solve::graph::EdgeList;

/// Labels the detour search may make per flagged site (about 40 bytes each).
const MAX_LABELS: usize = 2_000_000;

/// Builds the corridors; None when there is no hub on the roads.
pub(super) fn corridors(
    net: &Network,
    ids: &WorkOrderIds,
    graph: &EdgeList,
    done: &[u32],
    sr: &SitesResult,
    max_detour: Option<f64>,
) -> Option<CorridorLayer> {
    let hub = sr.reach.hub_junction?;
    let mut open: Vec<bool> = (0..graph.len())
        .map(|e| graph.usable(e) && graph.cost[e] == 0)
        .collect();
    for &e in done {
        open[e as usize] = true;
    }
    let length: Vec<f64> = net.edges.iter().map(|e| e.length_m).collect();
    let now = shortest(graph, &open, &length, hub);
    // The undamaged network: every road whole, closed ones too.
    let whole = shortest(graph, &vec![true; graph.len()], &length, hub);
    let mut rows = Vec::new();
    let mut flagged = Vec::new();
    let mut detour: Vec<u32> = Vec::new();
    for (i, site) in sr.layer.sites.iter().enumerate() {
        let Some(j) = sr.attachments[i].junction else {
            continue;
        };
        if !sr.reach.joined[i] || Some(i) == sr.hub || j == hub {
            continue;
        }
        let Some(edges) = route(graph, &now, j) else {
            continue;
        };
        let (len, base) = (now.dist[j as usize], whole.dist[j as usize]);
        let ratio = (base > 0.0).then(|| len / base);
        let over = max_detour.map(|r| ratio.is_some_and(|x| x > r));
        let (mut fix, mut no_fix) = (None, None);
        if over == Some(true) {
            let limit = max_detour.unwrap_or(1.0) * base;
            match cheapest_fix(graph, &open, &length, (hub, j), limit, MAX_LABELS) {
                Ok(f) => {
                    detour.extend(&f.repairs);
                    fix = Some(FixOffer {
                        work_orders: f.repairs.iter().map(|&e| ids.key(net, e)).collect(),
                        cost: cost_to_repair_metres(f.cost),
                        length_m: (f.length_m * 1000.0).round() / 1000.0,
                    });
                }
                Err(NoFix::Impossible) => {
                    no_fix = Some("no route over usable roads is that short, whatever is repaired")
                }
                Err(NoFix::BudgetSpent) => {
                    no_fix = Some("the search for further repairs reached its size limit")
                }
            }
            flagged.push(FlaggedSite {
                site: site.id.clone(),
                detour_ratio: round6(ratio.unwrap_or(0.0)),
                fix: fix.clone(),
                note: no_fix,
            });
        }
        rows.push(CorridorRow {
            site: site.id.clone(),
            junctions: [hub, j],
            edges,
            length_m: len,
            undamaged_m: base,
            ratio,
            over,
            fix,
            no_fix,
        });
    }
    detour.sort_unstable();
    detour.dedup();
    let figures = CorridorFigures {
        sites: rows.len(),
        longest_detour_ratio: rows
            .iter()
            .filter_map(|r| r.ratio)
            .reduce(f64::max)
            .map(round6),
        max_detour,
        flagged,
        optional_cost: cost_to_repair_metres(detour.iter().map(|&e| graph.cost[e as usize]).sum()),
    };
    Some(CorridorLayer {
        rows,
        detour_repairs: detour,
        figures,
    })
}

fn round6(x: f64) -> f64 {
    (x * 1e6).round() / 1e6 + 0.0
}
