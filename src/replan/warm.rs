//! A re-plan's solve: started repairs kept in the plan, the previous plan's remaining repairs
//! offered as a starting answer.
//!
//! The solver works on a copy of the network where started repairs cost 0, so it builds on them;
//! every started repair is then forced in (a cycle it closes is broken at a repair not started),
//! and the previous plan's edges, forced and pruned the same way, replace the solver's answer
//! wherever they join everything it joins at less cost. With nothing new but finished work the
//! previous plan still joins everything, so the new plan never costs more than the previous one
//! less what was finished. Costs are counted on the true network: started repairs at full cost.

use super::carry::Carried;
use crate::solve::Plan;
use crate::solve::components::Components;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::EdgeList;
use crate::solve::site_plan::SitePlan;
use crate::solve::steiner::reduce::prune_leaves;
use std::collections::BTreeMap;

/// The network the solver sees: started repairs at cost 0.
pub fn solving_graph(g: &EdgeList, c: &Carried) -> EdgeList {
    let mut s = g.clone();
    for &e in &c.started {
        s.cost[e as usize] = 0;
    }
    s
}

/// Junctions a sites plan must also reach: one end of each started repair whose part of the
/// network holds an attached site (elsewhere there is nothing for it to serve).
pub fn extra_terminals(
    g: &EdgeList,
    comps: &Components,
    junctions: &[Option<u32>],
    c: &Carried,
) -> Vec<u32> {
    let with_site: std::collections::BTreeSet<u32> = junctions
        .iter()
        .flatten()
        .map(|&j| comps.of[j as usize])
        .collect();
    c.started
        .iter()
        .map(|&e| g.ends[e as usize][0])
        .filter(|&v| with_site.contains(&comps.of[v as usize]))
        .collect()
}

/// Disjoint sets over the ends of some edges only, numbered locally, so the work stays in
/// proportion to those edges however large the network.
struct Local {
    verts: Vec<u32>,
    ds: DisjointSets,
}

impl Local {
    fn new(g: &EdgeList, edges: &[u32]) -> Local {
        let verts = g.ends_of(edges);
        let ds = DisjointSets::new(verts.len());
        Local { verts, ds }
    }

    /// The set holding `v`; a vertex no edge touches is a set of its own.
    fn set(&mut self, v: u32) -> u64 {
        match self.verts.binary_search(&v) {
            Ok(i) => self.ds.find(i as u32) as u64,
            Err(_) => (1 << 32) | v as u64,
        }
    }

    /// Joins the ends of `e`; false when they were joined already.
    fn union(&mut self, g: &EdgeList, e: u32) -> bool {
        let [a, b] = g.ends[e as usize];
        let at = |v: u32| self.verts.binary_search(&v).map_or(0, |i| i as u32);
        let (a, b) = (at(a), at(b));
        self.ds.union(a, b)
    }
}

/// `edges` with every started repair among `started` added; a cycle is broken at its costliest
/// edge not started (Kruskal over the union, started repairs first).
fn force(g: &EdgeList, edges: &[u32], started: &[u32]) -> Vec<u32> {
    let mut all: Vec<u32> = edges
        .iter()
        .chain(started)
        .copied()
        .filter(|&e| g.usable(e as usize))
        .collect();
    all.sort_unstable();
    all.dedup();
    let is_started = |e: u32| started.binary_search(&e).is_ok();
    all.sort_by_key(|&e| (!is_started(e), g.cost[e as usize], e));
    let mut sets = Local::new(g, &all);
    let mut out: Vec<u32> = all
        .into_iter()
        .filter(|&e| sets.union(g, e) || is_started(e))
        .collect();
    out.sort_unstable();
    out
}

/// True when `edges` join the two ends of every edge of `other` (so they join all it joins).
fn joins_all(g: &EdgeList, edges: &[u32], other: &[u32]) -> bool {
    let mut sets = Local::new(g, edges);
    for &e in edges {
        sets.union(g, e);
    }
    other.iter().all(|&e| {
        let [a, b] = g.ends[e as usize];
        sets.set(a) == sets.set(b)
    })
}

/// Settles a sites plan solved on [`solving_graph`] with [`extra_terminals`] appended to the sites'
/// junctions: drops the extra sites from the groups, forces the started repairs in, tries the
/// previous plan per group and counts costs on `g` (`n_sites` real sites).
pub fn settle_sites(
    g: &EdgeList,
    solve: &EdgeList,
    comps: &Components,
    sp: &mut SitePlan,
    junctions: &[Option<u32>],
    n_sites: usize,
    c: &Carried,
) {
    let mut need = vec![false; g.vertices];
    for &j in junctions.iter().flatten() {
        need[j as usize] = true;
    }
    for &e in &c.started {
        let [a, b] = g.ends[e as usize];
        need[a as usize] = true;
        need[b as usize] = true;
    }
    let old: Vec<u32> = c
        .old_plan
        .iter()
        .copied()
        .filter(|&e| g.usable(e as usize))
        .collect();
    // By part of the network, so each group looks at its own edges only.
    let by_comp = |edges: &[u32]| {
        let mut m: BTreeMap<u32, Vec<u32>> = BTreeMap::new();
        for &e in edges {
            m.entry(comps.of[g.ends[e as usize][0] as usize])
                .or_default()
                .push(e);
        }
        m
    };
    let (old, started_in) = (by_comp(&old), by_comp(&c.started));
    for group in &mut sp.groups {
        group.sites.retain(|&i| i < n_sites);
        let comp = group.component;
        let started = started_in.get(&comp).cloned().unwrap_or_default();
        let mut ours = force(solve, &group.tree.edges, &started);
        prune_leaves(solve, &mut ours, &need);
        let mut theirs = force(solve, old.get(&comp).map_or(&[][..], |v| &v[..]), &started);
        prune_leaves(solve, &mut theirs, &need);
        let terminals: Vec<u32> = group.sites.iter().filter_map(|&i| junctions[i]).collect();
        let spans = |edges: &[u32]| {
            let mut sets = Local::new(g, edges);
            for &e in edges {
                sets.union(g, e);
            }
            let root = terminals.first().map(|&t| sets.set(t));
            terminals.iter().all(|&t| Some(sets.set(t)) == root)
                && started
                    .iter()
                    .all(|&e| Some(sets.set(g.ends[e as usize][0])) == root)
        };
        if spans(&theirs) && solve.total(&theirs) < solve.total(&ours) {
            ours = theirs;
        }
        group.tree.cost = g.total(&ours);
        // Every plan holds the started repairs: their full cost adds to the solver's bound.
        group.tree.lower_bound += g.total(&started);
        group.tree.edges = ours;
    }
    sp.groups.retain(|gr| !gr.sites.is_empty());
    sp.edges = sp
        .groups
        .iter()
        .flat_map(|gr| gr.tree.edges.iter().copied())
        .collect();
    sp.edges.sort_unstable();
    sp.edges.dedup();
    sp.cost = sp.groups.iter().map(|gr| gr.tree.cost).sum();
    sp.lower_bound = sp.groups.iter().map(|gr| gr.tree.lower_bound).sum();
}

/// Settles a whole-network plan solved on [`solving_graph`]: started repairs forced in, the
/// previous plan taken when it spans as much at less cost, costs counted on `g`.
pub fn settle_forest(g: &EdgeList, solve: &EdgeList, plan: &mut Plan, c: &Carried) {
    let bound = solve.total(&plan.edges) + g.total(&c.started);
    let mut ours = force(solve, &plan.edges, &c.started);
    let theirs = force(solve, &c.old_plan, &c.started);
    if joins_all(g, &theirs, &ours) && solve.total(&theirs) < solve.total(&ours) {
        ours = theirs;
    }
    plan.total_cost = g.total(&ours);
    plan.lower_bound = bound.min(plan.total_cost);
    plan.edges = ours;
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A square 0-1-2-3-0 whose last side is dear.
    fn square() -> EdgeList {
        EdgeList {
            vertices: 4,
            ends: vec![[0, 1], [1, 2], [2, 3], [3, 0]],
            cost: vec![1, 1, 1, 5],
        }
    }

    #[test]
    fn a_started_repair_is_forced_in_and_its_cycle_broken_elsewhere() {
        let g = square();
        assert_eq!(force(&g, &[0, 1, 2], &[3]), [0, 1, 3]);
    }

    #[test]
    fn a_forest_keeps_started_repairs_at_full_cost_and_takes_a_cheaper_old_plan() {
        let g = square();
        let c = Carried {
            started: vec![3],
            old_plan: vec![0, 1, 3],
            ..Default::default()
        };
        let solve = solving_graph(&g, &c);
        let mut plan = crate::solve::minimum_spanning_forest(&solve, Default::default()).unwrap();
        settle_forest(&g, &solve, &mut plan, &c);
        assert!(plan.edges.contains(&3));
        assert_eq!(plan.edges.len(), 3);
        assert_eq!(plan.total_cost, 7);
        assert!(plan.lower_bound <= plan.total_cost);
    }
}
