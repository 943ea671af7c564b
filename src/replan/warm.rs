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
    let mut ds = DisjointSets::new(g.vertices);
    let mut out: Vec<u32> = all
        .into_iter()
        .filter(|&e| {
            let [a, b] = g.ends[e as usize];
            ds.union(a, b) || is_started(e)
        })
        .collect();
    out.sort_unstable();
    out
}

/// True when `edges` join the two ends of every edge of `other` (so they join all it joins).
fn joins_all(g: &EdgeList, edges: &[u32], other: &[u32]) -> bool {
    let mut ds = DisjointSets::new(g.vertices);
    for &e in edges {
        let [a, b] = g.ends[e as usize];
        ds.union(a, b);
    }
    other.iter().all(|&e| {
        let [a, b] = g.ends[e as usize];
        ds.find(a) == ds.find(b)
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
    for group in &mut sp.groups {
        group.sites.retain(|&i| i < n_sites);
        let comp = group.component;
        let inside = |e: &u32| comps.of[g.ends[*e as usize][0] as usize] == comp;
        let started: Vec<u32> = c.started.iter().copied().filter(inside).collect();
        let mut ours = force(solve, &group.tree.edges, &started);
        prune_leaves(solve, &mut ours, &need);
        let mut theirs = force(
            solve,
            &old.iter().copied().filter(inside).collect::<Vec<_>>(),
            &started,
        );
        prune_leaves(solve, &mut theirs, &need);
        let terminals: Vec<u32> = group.sites.iter().filter_map(|&i| junctions[i]).collect();
        let spans = |edges: &[u32]| {
            let mut ds = DisjointSets::new(g.vertices);
            edges.iter().for_each(|&e| {
                ds.union(g.ends[e as usize][0], g.ends[e as usize][1]);
            });
            let root = terminals.first().map(|&t| ds.find(t));
            terminals.iter().all(|&t| Some(ds.find(t)) == root)
                && started
                    .iter()
                    .all(|&e| Some(ds.find(g.ends[e as usize][0])) == root)
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
