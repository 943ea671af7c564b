//! One step of the exact search: on a graph with some edges ruled out and some vertices made
//! terminals, alternate bound, heuristic and reductions until nothing more is ruled out.
//!
//! Each round reduces the graph ([`reduce`]), runs the dual ascent on what is left, grows a tree on
//! its saturated arcs and polishes it, then rules out edges by the reduced-cost and special-distance
//! tests ([`fixing`]) against the best tree held. Every tree cheaper than that best tree survives, so
//! the lower bound found holds for the whole subproblem.

use super::dual_ascent::{Bound, dual_ascent_from};
use super::paths::Workspace;
use super::{Effort, fixing, polish, reduce, sph, tree};
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::{Csr, EdgeList, UNUSABLE};
use rayon::prelude::*;

/// Rounds of bound and reduction per step (each shrinks the graph; later ones rarely pay).
const ROUNDS: usize = 4;

/// What one step found out about a subproblem.
pub struct Step {
    /// A lower bound on every tree of the subproblem cheaper than the best tree held (or `None`:
    /// none exists, the subproblem is closed).
    pub bound: Option<u64>,
    /// Edges still usable (ids of the step's graph), ascending.
    pub alive: Vec<u32>,
    /// A non-terminal vertex to branch on (a vertex of the step's graph), if any is left.
    pub branch: Option<u32>,
    /// Arc visits the dual ascents spent.
    pub work: u64,
}

/// The best tree held: edges of the base graph and their cost.
pub struct Incumbent {
    /// Edge ids of the base graph.
    pub edges: Vec<u32>,
    /// Their total cost.
    pub cost: u64,
}

impl Incumbent {
    /// Takes `edges` when they are a tree over `terminals` in `g` cheaper than the one held, and
    /// says whether it did. Whatever a heuristic hands back is checked first: one that found no
    /// tree (an ascent stopped at its budget grows none) hands back too few edges at too low a
    /// cost, and such a set must never become the plan.
    pub fn offer(&mut self, g: &EdgeList, terminals: &[u32], edges: Vec<u32>) -> bool {
        let cost = tree::cost(g, &edges);
        if cost >= self.cost || tree::check_steiner_tree(g, &edges, terminals).is_err() {
            return false;
        }
        self.edges = edges;
        self.cost = cost;
        true
    }
}

/// Runs one step on `g` (the base graph with ruled-out edges at [`UNUSABLE`]) for `terminals`,
/// improving `best` when a cheaper tree turns up; each round runs dual ascents from up to `roots`
/// terminals.
pub fn step(
    mut g: EdgeList,
    terminals: &[u32],
    best: &mut Incumbent,
    effort: Effort,
    roots: usize,
    ws: &mut Workspace,
) -> Step {
    let mut lb = 0u64;
    let mut work = 0u64;
    let mut closed = Step {
        bound: None,
        alive: Vec::new(),
        branch: None,
        work: 0,
    };
    for round in 0..ROUNDS {
        if !connected(&g, terminals) {
            closed.work = work;
            return closed;
        }
        let red = reduce::reduce(&g, terminals);
        let rg = &red.graph;
        let csr = Csr::from_edges(rg);
        let it = &red.is_terminal;
        let bounds = ascents(rg, &csr, &red.terminals, effort, roots);
        work += (2 * rg.len() * red.terminals.len() * bounds.len()) as u64;
        lb = lb.max(bounds.iter().map(|b| b.value).max().unwrap_or(0));
        let t = da_tree(rg, &csr, it, &red.terminals, &bounds, effort, ws);
        if let Some(t) = &t {
            best.offer(&g, terminals, reduce::expand(&g, &red, t, terminals));
        }
        if lb >= best.cost {
            closed.work = work;
            return closed;
        }
        let mut doomed = vec![false; rg.len()];
        if red.terminals.len() >= 2 {
            // Each ascent's test keeps every tree cheaper than the best one, so their union does.
            for b in &bounds {
                let rc = fixing::reduced_cost_doomed(rg, &csr, it, b.root, b, best.cost);
                for (d, r) in doomed.iter_mut().zip(rc) {
                    *d |= r;
                }
            }
            // The special-distance test looks only at costs, which later rounds do not change.
            if round == 0 {
                let sd = fixing::special_distance_doomed(rg, &csr, it);
                for (d, s) in doomed.iter_mut().zip(sd) {
                    *d |= s;
                }
            }
        }
        // Keep only what the reduced graph represents, less the doomed edges.
        let mut keep = vec![false; g.len()];
        for e in 0..rg.len() as u32 {
            if !doomed[e as usize] {
                for &o in red.originals(e) {
                    keep[o as usize] = true;
                }
            }
        }
        // Zero-cost edges inside merged vertices stay (the base graph has none, but a caller's may).
        for (e, c) in g.cost.iter_mut().enumerate() {
            if !keep[e] && *c != 0 {
                *c = UNUSABLE;
            }
        }
        let last = round + 1 == ROUNDS || !doomed.iter().any(|&d| d);
        if last {
            if !connected(&g, terminals) {
                closed.work = work;
                return closed;
            }
            let alive: Vec<u32> = (0..g.len() as u32)
                .filter(|&e| g.usable(e as usize))
                .collect();
            return Step {
                bound: Some(lb),
                alive,
                branch: branch_vertex(&g, &red, rg, t.as_deref().unwrap_or_default(), &doomed),
                work,
            };
        }
    }
    unreachable!("the last round returns")
}

/// Dual ascents (complete, or within `effort`'s budget) from up to `roots` terminals spread over
/// `terminals`, the first always among them; side by side on both cores, in a fixed order.
pub fn ascents(
    rg: &EdgeList,
    csr: &Csr,
    terminals: &[u32],
    effort: Effort,
    roots: usize,
) -> Vec<Bound> {
    let k = terminals.len();
    if k < 2 {
        return vec![Bound::zero(true)];
    }
    let r = roots.clamp(1, k);
    let budget = effort
        .bound_budget(rg.vertices + rg.len())
        .unwrap_or(u64::MAX);
    let picks: Vec<u32> = (0..r).map(|i| terminals[i * k / r]).collect();
    picks
        .par_iter()
        .map(|&root| dual_ascent_from(rg, csr, terminals, root, budget))
        .collect()
}

/// The cheapest tree grown on the saturated arcs of the ascents (each joins every terminal to its
/// root), polished; empty with fewer than two terminals, `None` when no ascent completed (an
/// ascent stopped at its budget has not saturated a path to every terminal).
pub fn da_tree(
    rg: &EdgeList,
    csr: &Csr,
    it: &[bool],
    terminals: &[u32],
    bounds: &[Bound],
    effort: Effort,
    ws: &mut Workspace,
) -> Option<Vec<u32>> {
    if terminals.len() < 2 {
        return Some(Vec::new());
    }
    let mut trees: Vec<(u64, Vec<u32>)> = bounds
        .iter()
        .filter(|b| b.complete && b.saturated.len() == rg.len())
        .map(|b| {
            let sat = super::da_heuristic::saturated(rg, b);
            let sat_csr = Csr::from_edges(&sat);
            let t = sph::sph(&sat, &sat_csr, terminals, it, b.root, ws);
            let t = tree::mst_prune(rg, csr, &t, it);
            (tree::cost(rg, &t), t)
        })
        .collect();
    trees.sort();
    trees.dedup();
    let mut best: Option<(u64, Vec<u32>)> = None;
    for (_, t) in trees.into_iter().take(2) {
        let t = polish(rg, csr, it, t, ws, effort);
        let c = tree::cost(rg, &t);
        if best.as_ref().is_none_or(|b| c < b.0) {
            best = Some((c, t));
        }
    }
    best.map(|b| b.1)
}

/// Whether all `terminals` share one component over usable edges.
pub fn connected(g: &EdgeList, terminals: &[u32]) -> bool {
    let mut ds = DisjointSets::new(g.vertices);
    for e in 0..g.len() {
        if g.usable(e) {
            let [a, b] = g.ends[e];
            ds.union(a, b);
        }
    }
    terminals.windows(2).all(|w| ds.find(w[0]) == ds.find(w[1]))
}

/// A non-terminal vertex to branch on: the one of highest degree in the step's tree (it most
/// shapes the tree), else of highest degree in the graph; ties to the lower id. Returned as a
/// vertex of `g`.
fn branch_vertex(
    g: &EdgeList,
    red: &reduce::Reduced,
    rg: &EdgeList,
    t: &[u32],
    doomed: &[bool],
) -> Option<u32> {
    let mut in_tree = vec![0u32; rg.vertices];
    for &e in t {
        for v in rg.ends[e as usize] {
            in_tree[v as usize] += 1;
        }
    }
    let mut degree = vec![0u32; rg.vertices];
    for (e, &[a, b]) in rg.ends.iter().enumerate() {
        if !doomed[e] {
            degree[a as usize] += 1;
            degree[b as usize] += 1;
        }
    }
    let pick = (0..rg.vertices as u32)
        .filter(|&v| !red.is_terminal[v as usize] && degree[v as usize] > 0)
        .max_by_key(|&v| {
            (
                in_tree[v as usize],
                degree[v as usize],
                std::cmp::Reverse(v),
            )
        })?;
    // Back to a vertex of g in the zero-cost component the reduced vertex stands for.
    let want = red.component[pick as usize];
    (0..g.vertices as u32).find(|&v| red.super_of[v as usize] == want)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::solve::steiner::mehlhorn::mehlhorn;

    /// A path 0 - 1 - 2 - 3 with a chord 0 - 2.
    fn path() -> EdgeList {
        EdgeList {
            vertices: 4,
            ends: vec![[0, 1], [1, 2], [2, 3], [0, 2]],
            cost: vec![5, 5, 5, 7],
        }
    }

    #[test]
    fn only_a_cheaper_tree_is_taken() {
        let g = path();
        let mut held = Incumbent {
            edges: vec![0, 1, 2],
            cost: 15,
        };
        // No edges, or edges that leave terminal 3 out, cost less but are no tree over the
        // terminals.
        assert!(!held.offer(&g, &[0, 3], vec![]));
        assert!(!held.offer(&g, &[0, 3], vec![0, 1]));
        assert!(!held.offer(&g, &[0, 3], vec![0, 1, 2, 3])); // a cycle, and dearer
        assert_eq!((held.edges.clone(), held.cost), (vec![0, 1, 2], 15));
        assert!(held.offer(&g, &[0, 3], vec![2, 3]));
        assert_eq!((held.edges.clone(), held.cost), (vec![2, 3], 12));
        assert!(!held.offer(&g, &[0, 3], vec![0, 1, 2]));
    }

    /// A step whose dual ascents all stop at their work budget grows no tree on saturated arcs;
    /// the best tree held must stay a real tree (an empty set once stood in for it, cost 0).
    #[test]
    fn a_step_whose_ascents_stop_early_keeps_a_real_tree() {
        let g = crate::synthetic::grid_graph(120, 0.0, 5);
        let mut ds = DisjointSets::new(g.vertices);
        for e in 0..g.len() {
            if g.usable(e) {
                ds.union(g.ends[e][0], g.ends[e][1]);
            }
        }
        let home = ds.find(0);
        let terminals: Vec<u32> = (0..g.vertices as u32)
            .step_by(97)
            .filter(|&v| ds.find(v) == home)
            .collect();
        let red = reduce::reduce(&g, &terminals);
        let rcsr = Csr::from_edges(&red.graph);
        let early = ascents(&red.graph, &rcsr, &red.terminals, Effort::Quick, 4);
        assert!(
            early.iter().all(|b| !b.complete),
            "the case under test needs ascents stopped by their budget"
        );
        let csr = Csr::from_edges(&g);
        let mut is_terminal = vec![false; g.vertices];
        for &t in &terminals {
            is_terminal[t as usize] = true;
        }
        let mut ws = Workspace::new(g.vertices);
        let m = mehlhorn(&g, &csr, &terminals, &is_terminal, &mut ws);
        let mut held = Incumbent {
            cost: tree::cost(&g, &m.edges),
            edges: m.edges,
        };
        let before = held.cost;
        step(g.clone(), &terminals, &mut held, Effort::Quick, 4, &mut ws);
        assert_eq!(
            tree::check_steiner_tree(&g, &held.edges, &terminals),
            Ok(())
        );
        assert!(held.cost <= before && held.cost > 0);
    }
}
