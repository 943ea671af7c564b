//! Resilience after the plan: single points of failure, and backup links that remove them.

use super::SitesResult;
use crate::export::backup::{BackupLayer, BackupRow};
use crate::export::single_failures::SingleFailureLayer;
use crate::solve::SolveError;
use crate::solve::graph::EdgeList;

/// The network after the plan (intact roads plus planned repairs) and its single points of failure
/// for the sites it joins to the hub (`sr.reach`); every one of them must be found reaching the
/// hub here too.
pub(super) fn single_failure_report(
    graph: &crate::solve::graph::EdgeList,
    repaired: &[u32],
    sr: &SitesResult,
) -> Result<SingleFailureLayer, SolveError> {
    let (sl, attachments, hub) = (&sr.layer, &sr.attachments, sr.hub);
    use crate::solve::graph::UNUSABLE;
    let mut in_plan = vec![false; graph.len()];
    for &e in repaired {
        in_plan[e as usize] = true;
    }
    let after = crate::solve::graph::EdgeList {
        vertices: graph.vertices,
        ends: graph.ends.clone(),
        cost: (0..graph.len())
            .map(|e| {
                let c = graph.cost[e];
                if c == UNUSABLE || (c > 0 && !in_plan[e]) {
                    UNUSABLE
                } else {
                    c
                }
            })
            .collect(),
    };
    let roots: Vec<u32> = hub
        .and_then(|h| attachments[h].junction)
        .into_iter()
        .collect();
    let f = crate::solve::fragility::fragility(&after, &roots);
    let mut cuts_off: Vec<Vec<usize>> = vec![Vec::new(); f.bridges.len()];
    let mut per_site: Vec<(usize, Vec<u32>)> = Vec::new();
    let mut checked = 0;
    for (i, a) in attachments.iter().enumerate() {
        let Some(j) = a.junction else { continue };
        // Only sites joined to the hub can be cut off from it.
        if Some(i) == hub || !sr.reach.joined[i] {
            continue;
        }
        checked += 1;
        let Some(cut) = f.cutting_off(&roots, j) else {
            return Err(SolveError::Verification {
                what: "single-failure report",
                detail: format!(
                    "site {} is joined but the search does not reach it",
                    sl.sites[i].id
                ),
            });
        };
        let mut failures = Vec::new();
        for b in cut {
            cuts_off[b].push(i);
            failures.push(f.bridges[b]);
        }
        if !failures.is_empty() {
            per_site.push((i, failures));
        }
    }
    Ok(SingleFailureLayer::new(&f, cuts_off, per_site, checked, sl))
}

/// Plans backup links for the sites joined to the hub, numbering the added repairs after the
/// plan's `planned` repairs, and reports the single failures left once they are made.
pub(super) fn backup_plan(
    graph: &EdgeList,
    repaired: &[u32],
    sr: &SitesResult,
    planned: usize,
) -> Result<BackupLayer, SolveError> {
    let (sl, attachments, hub) = (&sr.layer, &sr.attachments, sr.hub);
    let mut free = vec![false; graph.len()];
    for (e, f) in free.iter_mut().enumerate() {
        *f = graph.cost[e] == 0;
    }
    for &e in repaired {
        free[e as usize] = true;
    }
    let Some(root) = hub.and_then(|h| attachments[h].junction) else {
        return Ok(BackupLayer::default());
    };
    let sites: Vec<usize> = (0..attachments.len())
        .filter(|&i| Some(i) != hub && sr.reach.joined[i])
        .collect();
    let terminals: Vec<u32> = sites
        .iter()
        .map(|&i| attachments[i].junction.expect("attached"))
        .collect();
    let b = crate::solve::backup::backup_links(graph, &free, root, &terminals)?;
    let mut rows = Vec::new();
    let mut placed = std::collections::HashSet::new();
    for (k, link) in b.links.iter().enumerate() {
        let protects: Vec<String> = link
            .protects
            .iter()
            .map(|&t| sl.sites[sites[t]].id.clone())
            .collect();
        for &e in &link.edges {
            if placed.insert(e) {
                rows.push(BackupRow {
                    edge: e,
                    order: (planned + rows.len() + 1) as u32,
                    link: k as u32 + 1,
                    protects: protects.clone(),
                });
            }
        }
    }
    let mut all: Vec<u32> = repaired.to_vec();
    all.extend(b.edges.iter().copied());
    let after = single_failure_report(graph, &all, sr)?;
    Ok(BackupLayer::new(
        rows,
        &b,
        after.figures,
        b.no_backup
            .iter()
            .map(|(t, f)| (sl.sites[sites[*t]].id.clone(), f.clone()))
            .collect(),
    ))
}
