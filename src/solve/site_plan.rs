//! The sites-only plan: one Steiner tree per group of sites that can reach each other at all.

use super::SolveError;
use super::components::Components;
use super::graph::EdgeList;
use super::steiner::{Effort, SteinerTree, Watch, steiner_tree_watched};
use crate::network::Cost;
use rayon::prelude::*;

/// Sites in one connected component of the usable network, and the tree that joins them.
#[derive(Debug, Clone)]
pub struct SiteGroup {
    /// Indices of the sites (into the caller's site list), ascending.
    pub sites: Vec<usize>,
    /// The component they share.
    pub component: u32,
    /// The tree joining them (empty when the group has one site or all sit on intact roads).
    pub tree: SteinerTree,
}

/// Groups of attached sites and their trees; unattached sites take no part.
#[derive(Debug, Clone)]
pub struct SitePlan {
    /// Groups, ordered by their first site.
    pub groups: Vec<SiteGroup>,
    /// Union of the groups' edges, ascending.
    pub edges: Vec<u32>,
    /// Total cost.
    pub cost: Cost,
    /// Sum of the groups' lower bounds.
    pub lower_bound: Cost,
    /// False when some group's bound stopped at its work budget.
    pub bound_complete: bool,
}

/// Plans every group of sites; `junction_of[i]` is site i's junction, `None` when not attached.
pub fn plan_sites(
    g: &EdgeList,
    comps: &Components,
    junction_of: &[Option<u32>],
    effort: Effort,
) -> Result<SitePlan, SolveError> {
    plan_sites_watched(g, comps, junction_of, effort, Watch::default())
}

/// [`plan_sites`] with every group's search watched by `watch` (progress, an optional clock).
pub fn plan_sites_watched(
    g: &EdgeList,
    comps: &Components,
    junction_of: &[Option<u32>],
    effort: Effort,
    watch: Watch,
) -> Result<SitePlan, SolveError> {
    let mut by_comp: std::collections::BTreeMap<u32, Vec<usize>> = Default::default();
    for (i, j) in junction_of.iter().enumerate() {
        if let Some(j) = j {
            by_comp.entry(comps.of[*j as usize]).or_default().push(i);
        }
    }
    let mut groups: Vec<(u32, Vec<usize>)> = by_comp.into_iter().collect();
    groups.sort_by_key(|(_, s)| s[0]);
    let solved: Vec<Result<SiteGroup, SolveError>> = groups
        .into_par_iter()
        .map(|(component, sites)| {
            let terminals: Vec<u32> = sites.iter().filter_map(|&i| junction_of[i]).collect();
            let tree = steiner_tree_watched(g, &terminals, effort, watch)?;
            Ok(SiteGroup {
                sites,
                component,
                tree,
            })
        })
        .collect();
    let groups: Vec<SiteGroup> = solved.into_iter().collect::<Result<_, _>>()?;
    let mut edges: Vec<u32> = groups
        .iter()
        .flat_map(|gr| gr.tree.edges.iter().copied())
        .collect();
    edges.sort_unstable();
    Ok(SitePlan {
        cost: groups.iter().map(|gr| gr.tree.cost).sum(),
        lower_bound: groups.iter().map(|gr| gr.tree.lower_bound).sum(),
        bound_complete: groups.iter().all(|gr| gr.tree.bound_complete),
        edges,
        groups,
    })
}

/// Relative gap (cost − bound) / bound: 0 when both are 0, `None` when only the bound is 0.
pub fn gap(cost: Cost, bound: Cost) -> Option<f64> {
    match (cost, bound) {
        (0, 0) => Some(0.0),
        (_, 0) => None,
        (c, b) => Some((c.saturating_sub(b)) as f64 / b as f64),
    }
}
