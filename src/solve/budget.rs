//! Plans within a budget: which sites to join when joining all of them costs more than there is.
//!
//! A budgeted prize-collecting Steiner heuristic. Two greedy constructions compete:
//! - along the full plan's tree, the site with the most priority per repair-metre still needed
//!   first (the repair order's rule, [`order_within`]);
//! - along shortest paths to the growing tree: the site with the most priority per repair-metre of
//!   its cheapest path from everything joined so far (intact roads are free), distances kept by an
//!   incremental multi-source shortest-path search.
//!
//! The second also runs once with each of the few heaviest sites joined first.
//!
//! Local improvement: the sites joined are re-planned as a Steiner tree; when that is cheaper the
//! savings go to joining more sites, and this repeats while it helps. The result with the most
//! priority joined wins (then the cheaper).

use super::graph::{Csr, EdgeList};
use super::order::{Target, order_within};
use super::steiner::Effort;
use crate::network::Cost;
use std::cmp::Reverse;
use std::collections::BinaryHeap;

const NONE: u32 = u32::MAX;

/// How many of the heaviest sites each get a start of their own.
const HEAVY_STARTS: usize = 4;

/// The chosen part of the plan within the budget.
#[derive(Debug, Clone, PartialEq)]
pub struct BudgetPlan {
    /// Edges of the plan: repairs plus the intact roads joining them to the roots, ascending.
    pub edges: Vec<u32>,
    /// Total repair cost (never more than the budget).
    pub cost: Cost,
    /// Per target (index into the caller's list): joined or not.
    pub joined: Vec<bool>,
    /// Per target left out: the cheapest further repair cost that would join it (None when no
    /// usable road reaches it from the roots).
    pub left_out: Vec<(usize, Option<Cost>)>,
}

/// Growing tree with shortest-path distances from it to every vertex.
struct Growth<'a> {
    g: &'a EdgeList,
    csr: &'a Csr,
    in_tree: Vec<bool>,
    dist: Vec<Cost>,
    via: Vec<u32>,
    repaired: Vec<bool>,
}

impl Growth<'_> {
    /// Adds vertices (and everything free-connected to them) to the tree and updates distances.
    fn absorb(&mut self, from: &[u32]) {
        let mut stack: Vec<u32> = from
            .iter()
            .copied()
            .filter(|&v| !self.in_tree[v as usize])
            .collect();
        for &v in &stack {
            self.in_tree[v as usize] = true;
        }
        let mut heap = BinaryHeap::new();
        while let Some(v) = stack.pop() {
            self.dist[v as usize] = 0;
            self.via[v as usize] = NONE;
            heap.push(Reverse((0, v)));
            for (w, e) in self.csr.neighbours(v) {
                let free = self.g.cost[e as usize] == 0 || self.repaired[e as usize];
                if free && !self.in_tree[w as usize] {
                    self.in_tree[w as usize] = true;
                    stack.push(w);
                }
            }
        }
        // Distances only fall when the tree grows: relax from the new tree vertices.
        while let Some(Reverse((d, v))) = heap.pop() {
            if d > self.dist[v as usize] {
                continue;
            }
            for (w, e) in self.csr.neighbours(v) {
                let c = if self.repaired[e as usize] {
                    0
                } else {
                    self.g.cost[e as usize]
                };
                let nd = d + c;
                if nd < self.dist[w as usize] {
                    self.dist[w as usize] = nd;
                    self.via[w as usize] = e;
                    heap.push(Reverse((nd, w)));
                }
            }
        }
    }

    /// Repairs the cheapest path from the tree to `v`; returns its cost.
    fn join(&mut self, v: u32) -> Cost {
        let mut cost = 0;
        let mut path = Vec::new();
        let mut x = v;
        while !self.in_tree[x as usize] {
            let e = self.via[x as usize];
            if !self.repaired[e as usize] && self.g.cost[e as usize] > 0 {
                self.repaired[e as usize] = true;
                cost += self.g.cost[e as usize];
            }
            path.push(x);
            let [a, b] = self.g.ends[e as usize];
            x = if a == x { b } else { a };
        }
        self.absorb(&path);
        cost
    }
}

/// Greedy growth from the roots with `start` repairs already made, within `budget`: joins the
/// target with the most weight per repair-metre of its cheapest path, while one fits. Returns the
/// growth and the repair cost spent.
fn grow<'a>(
    g: &'a EdgeList,
    csr: &'a Csr,
    roots: &[u32],
    targets: &[Target],
    start: &[u32],
    budget: Cost,
    first: Option<usize>,
) -> (Growth<'a>, Cost) {
    let mut gr = Growth {
        g,
        csr,
        in_tree: vec![false; g.vertices],
        dist: vec![Cost::MAX; g.vertices],
        via: vec![NONE; g.vertices],
        repaired: vec![false; g.len()],
    };
    let mut spent: Cost = 0;
    for &e in start {
        if !gr.repaired[e as usize] && g.cost[e as usize] > 0 {
            gr.repaired[e as usize] = true;
            spent += g.cost[e as usize];
        }
    }
    gr.absorb(roots);
    if let Some(i) = first {
        let j = targets[i].junction as usize;
        if !gr.in_tree[j] && gr.dist[j] != Cost::MAX && spent + gr.dist[j] <= budget {
            spent += gr.join(targets[i].junction);
        }
    }
    loop {
        let mut best: Option<(f64, usize)> = None;
        for (i, t) in targets.iter().enumerate() {
            let j = t.junction as usize;
            let d = gr.dist[j];
            if gr.in_tree[j] || d == Cost::MAX || spent + d > budget {
                continue;
            }
            let score = t.weight.max(1e-9) / d.max(1) as f64;
            if best.is_none_or(|(s, k)| score > s || (score == s && i < k)) {
                best = Some((score, i));
            }
        }
        let Some((_, i)) = best else { break };
        spent += gr.join(targets[i].junction);
    }
    (gr, spent)
}

/// A finished candidate: the plan edges (root paths of the joined targets), their repair cost,
/// which targets are joined, and their total weight.
struct Candidate {
    edges: Vec<u32>,
    cost: Cost,
    joined: Vec<bool>,
    weight: f64,
    left_out: Vec<(usize, Option<Cost>)>,
}

fn finish(g: &EdgeList, csr: &Csr, roots: &[u32], targets: &[Target], gr: &Growth) -> Candidate {
    // Breadth-first tree over free roads and repairs from the roots; keep the joined targets'
    // paths back to their root.
    let n = g.vertices;
    let mut parent_edge = vec![NONE; n];
    let mut seen = vec![false; n];
    let mut queue: Vec<u32> = Vec::new();
    for &r in roots {
        if !seen[r as usize] {
            seen[r as usize] = true;
            queue.push(r);
        }
    }
    let mut i = 0;
    while i < queue.len() {
        let v = queue[i];
        i += 1;
        for (w, e) in csr.neighbours(v) {
            if !seen[w as usize] && (g.cost[e as usize] == 0 || gr.repaired[e as usize]) {
                seen[w as usize] = true;
                parent_edge[w as usize] = e;
                queue.push(w);
            }
        }
    }
    let mut keep = vec![false; g.len()];
    let mut joined = vec![false; targets.len()];
    let mut weight = 0.0;
    for (k, t) in targets.iter().enumerate() {
        let mut x = t.junction;
        if !seen[x as usize] {
            continue;
        }
        joined[k] = true;
        weight += t.weight;
        while parent_edge[x as usize] != NONE && !keep[parent_edge[x as usize] as usize] {
            let e = parent_edge[x as usize];
            keep[e as usize] = true;
            let [a, b] = g.ends[e as usize];
            x = if a == x { b } else { a };
        }
    }
    let edges: Vec<u32> = (0..g.len() as u32).filter(|&e| keep[e as usize]).collect();
    let cost = edges.iter().map(|&e| g.cost[e as usize]).sum();
    // What the left-out targets would still cost is measured from the kept edges, not from the
    // growth: repairs that joined no target were dropped above.
    let mut reached = vec![false; n];
    let mut stack: Vec<u32> = roots.to_vec();
    for &r in roots {
        reached[r as usize] = true;
    }
    while let Some(v) = stack.pop() {
        for (w, e) in csr.neighbours(v) {
            if !reached[w as usize] && (g.cost[e as usize] == 0 || keep[e as usize]) {
                reached[w as usize] = true;
                stack.push(w);
            }
        }
    }
    let dist = super::joined::cost_from(g, &edges, &reached);
    let left_out = targets
        .iter()
        .enumerate()
        .filter(|&(k, _)| !joined[k])
        .map(|(k, t)| {
            let d = dist[t.junction as usize];
            (k, (d != Cost::MAX).then_some(d))
        })
        .collect();
    Candidate {
        edges,
        cost,
        joined,
        weight,
        left_out,
    }
}

fn better(a: &Candidate, b: &Candidate) -> bool {
    // More weight joined (beyond rounding), then cheaper.
    let eps = 1e-9 * a.weight.abs().max(b.weight.abs()).max(1.0);
    a.weight > b.weight + eps || (a.weight >= b.weight - eps && a.cost < b.cost)
}

/// Chooses what to join within `budget` (milli-repair-metres): `plan` is the full sites plan,
/// `roots` the hub (and each other group's root), `targets` the sites with their priorities.
pub fn within_budget(
    g: &EdgeList,
    plan: &[u32],
    roots: &[u32],
    targets: &[Target],
    budget: Cost,
) -> BudgetPlan {
    let csr = Csr::from_edges(g);
    let comps = super::components::components(g);
    let (steps, _) = order_within(g, plan, roots, targets, Some(budget));
    let along_plan: Vec<u32> = steps.iter().map(|s| s.edge).collect();
    // Starts: along the plan's tree; from the roots alone; and from the roots with one of the
    // heaviest sites joined first (a heavy, dear site can be worth more than many light ones).
    let mut heaviest: Vec<usize> = (0..targets.len()).collect();
    heaviest.sort_by(|&a, &b| {
        targets[b]
            .weight
            .total_cmp(&targets[a].weight)
            .then(a.cmp(&b))
    });
    heaviest.truncate(HEAVY_STARTS);
    let mut starts: Vec<(Vec<u32>, Option<usize>)> = vec![(along_plan, None), (Vec::new(), None)];
    starts.extend(heaviest.into_iter().map(|i| (Vec::new(), Some(i))));
    let mut best: Option<Candidate> = None;
    for (start, first) in starts {
        let (gr, _) = grow(g, &csr, roots, targets, &start, budget, first);
        let mut cand = finish(g, &csr, roots, targets, &gr);
        // Local improvement: re-plan the joined sites as a Steiner tree, spend the savings.
        for _ in 0..4 {
            let mut junctions: Vec<Option<u32>> = roots.iter().map(|&r| Some(r)).collect();
            junctions.extend(
                targets
                    .iter()
                    .zip(&cand.joined)
                    .map(|(t, &j)| j.then_some(t.junction)),
            );
            let Ok(sp) = super::site_plan::plan_sites(g, &comps, &junctions, Effort::Quick) else {
                break;
            };
            if sp.cost >= cand.cost {
                break;
            }
            let (gr, _) = grow(g, &csr, roots, targets, &sp.edges, budget, None);
            let next = finish(g, &csr, roots, targets, &gr);
            if next.cost > budget || !better(&next, &cand) {
                break;
            }
            cand = next;
        }
        if best.as_ref().is_none_or(|b| better(&cand, b)) {
            best = Some(cand);
        }
    }
    let b = best.expect("two candidates");
    BudgetPlan {
        edges: b.edges,
        cost: b.cost,
        joined: b.joined,
        left_out: b.left_out,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(junction: u32, weight: f64, id: usize) -> Target {
        Target {
            junction,
            weight,
            id,
        }
    }

    #[test]
    fn a_cheaper_way_than_the_plan_tree_is_taken() {
        // Root 0. The full plan joins 1 (via 0-1, cost 10) and 2 (via 1-2, cost 10). A direct
        // road 0-2 costs 12. With budget 12 the plan tree joins one site only at 10; shortest
        // paths join site 2 at 12 — same count, but site 2 has the higher priority.
        let g = EdgeList {
            vertices: 3,
            ends: vec![[0, 1], [1, 2], [0, 2]],
            cost: vec![10, 10, 12],
        };
        let targets = [t(1, 1.0, 0), t(2, 5.0, 1)];
        let b = within_budget(&g, &[0, 1], &[0], &targets, 12);
        assert_eq!(b.edges, vec![2]);
        assert_eq!(b.cost, 12);
        assert_eq!(b.joined, vec![false, true]);
        assert_eq!(b.left_out, vec![(0, Some(10))]);
    }

    #[test]
    fn never_exceeds_the_budget_and_intact_roads_are_free() {
        let g = EdgeList {
            vertices: 5,
            ends: vec![[0, 1], [1, 2], [2, 3], [3, 4]],
            cost: vec![0, 7, 0, 7],
        };
        let targets = [t(2, 1.0, 0), t(3, 1.0, 1), t(4, 1.0, 2)];
        for budget in 0..20 {
            let b = within_budget(&g, &[0, 1, 2, 3], &[0], &targets, budget);
            assert!(b.cost <= budget);
            let joined = b.joined.iter().filter(|&&j| j).count();
            assert_eq!(
                joined,
                if budget >= 14 {
                    3
                } else if budget >= 7 {
                    2
                } else {
                    0
                }
            );
        }
    }
}
