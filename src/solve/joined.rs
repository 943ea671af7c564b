//! What a plan joins to its hub: the one definition every output reads.
//!
//! A junction is joined when it reaches the hub over roads that are usable and either intact
//! (cost 0) or in the plan. The repair order, the sites layer, the summary, the work orders and
//! the single-failure report all take their "joined" from here, so none can disagree with another.

use super::disjoint::DisjointSets;
use super::graph::{Csr, EdgeList};
use crate::network::Cost;
use std::cmp::Reverse;
use std::collections::{BinaryHeap, HashMap};

/// Per vertex: true when it reaches `hub` over intact usable edges and the edges of `plan`.
pub fn reaching(g: &EdgeList, plan: &[u32], hub: u32) -> Vec<bool> {
    let mut ds = free_sets(g, plan);
    let h = ds.find(hub);
    (0..g.vertices as u32).map(|v| ds.find(v) == h).collect()
}

/// Union-find over the usable edges that cost nothing once `plan` is done.
fn free_sets(g: &EdgeList, plan: &[u32]) -> DisjointSets {
    let mut ds = DisjointSets::new(g.vertices);
    for e in 0..g.len() {
        if g.usable(e) && g.cost[e] == 0 {
            let [a, b] = g.ends[e];
            ds.union(a, b);
        }
    }
    for &e in plan {
        if g.usable(e as usize) {
            let [a, b] = g.ends[e as usize];
            ds.union(a, b);
        }
    }
    ds
}

/// Cheapest further repair cost from the `joined` vertices to every vertex (intact and `plan`
/// edges free), by one multi-source shortest-path search; `Cost::MAX` where no usable road leads.
pub fn cost_from(g: &EdgeList, plan: &[u32], joined: &[bool]) -> Vec<Cost> {
    let mut in_plan = vec![false; g.len()];
    for &e in plan {
        in_plan[e as usize] = true;
    }
    let csr = Csr::from_edges(g);
    let mut dist = vec![Cost::MAX; g.vertices];
    let mut heap = BinaryHeap::new();
    for (v, &j) in joined.iter().enumerate() {
        if j {
            dist[v] = 0;
            heap.push(Reverse((0, v as u32)));
        }
    }
    while let Some(Reverse((d, v))) = heap.pop() {
        if d > dist[v as usize] {
            continue;
        }
        for (w, e) in csr.neighbours(v) {
            let c = if in_plan[e as usize] {
                0
            } else {
                g.cost[e as usize]
            };
            let nd = d.saturating_add(c);
            if nd < dist[w as usize] {
                dist[w as usize] = nd;
                heap.push(Reverse((nd, w)));
            }
        }
    }
    dist
}

/// When each target is joined to the hub as the repairs of `order` are made one by one (after the
/// intact roads): whether it is joined before any repair, and, per repair, the targets (indices
/// into `targets`, ascending) that it joins.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Joining {
    /// Per target: joined over intact roads alone.
    pub before: Vec<bool>,
    /// Per repair in order: the targets it joins.
    pub per_step: Vec<Vec<usize>>,
    /// Per target: joined once every repair in `order` is made.
    pub after: Vec<bool>,
}

/// Replays `order` (edge ids) over the intact roads with union-find; targets wait in their set's
/// list and move to the hub's when their set merges with it (small lists into large ones).
pub fn joining(g: &EdgeList, order: &[u32], hub: u32, targets: &[u32]) -> Joining {
    let mut ds = free_sets(g, &[]);
    let mut pending: HashMap<u32, Vec<usize>> = HashMap::new();
    let mut before = vec![false; targets.len()];
    let h = ds.find(hub);
    for (i, &t) in targets.iter().enumerate() {
        let r = ds.find(t);
        if r == h {
            before[i] = true;
        } else {
            pending.entry(r).or_default().push(i);
        }
    }
    let mut after = before.clone();
    let mut per_step = Vec::with_capacity(order.len());
    for &e in order {
        let mut done = Vec::new();
        if g.usable(e as usize) {
            let [a, b] = g.ends[e as usize];
            let (ra, rb) = (ds.find(a), ds.find(b));
            if ra != rb {
                let h = ds.find(hub);
                let mut la = pending.remove(&ra).unwrap_or_default();
                let mut lb = pending.remove(&rb).unwrap_or_default();
                ds.union(a, b);
                if ra == h {
                    done = lb;
                } else if rb == h {
                    done = la;
                } else {
                    if la.len() < lb.len() {
                        std::mem::swap(&mut la, &mut lb);
                    }
                    la.extend(lb);
                    if !la.is_empty() {
                        pending.insert(ds.find(a), la);
                    }
                }
            }
        }
        done.sort_unstable();
        for &i in &done {
            after[i] = true;
        }
        per_step.push(done);
    }
    Joining {
        before,
        per_step,
        after,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::solve::graph::UNUSABLE;

    /// Hub 0; 0-1 intact; 1-2 damaged (5); 2-3 intact; 0-4 closed; 4-5 damaged (3); 3-5 damaged (9).
    fn g() -> EdgeList {
        EdgeList {
            vertices: 6,
            ends: vec![[0, 1], [1, 2], [2, 3], [0, 4], [4, 5], [3, 5]],
            cost: vec![0, 5, 0, UNUSABLE, 3, 9],
        }
    }

    #[test]
    fn reach_counts_intact_roads_and_the_plan_only() {
        let g = g();
        assert_eq!(
            reaching(&g, &[], 0),
            [true, true, false, false, false, false]
        );
        assert_eq!(
            reaching(&g, &[1], 0),
            [true, true, true, true, false, false]
        );
        // A plan edge beyond a gap joins nothing to the hub.
        assert_eq!(
            reaching(&g, &[4], 0),
            [true, true, false, false, false, false]
        );
        // A closed edge never joins, even listed in a plan.
        assert_eq!(
            reaching(&g, &[3], 0),
            [true, true, false, false, false, false]
        );
    }

    #[test]
    fn cost_from_the_joined_part_takes_plan_edges_free() {
        let g = g();
        let joined = reaching(&g, &[1], 0);
        assert_eq!(cost_from(&g, &[1], &joined), [0, 0, 0, 0, 12, 9]);
        let joined = reaching(&g, &[], 0);
        assert_eq!(cost_from(&g, &[], &joined), [0, 0, 5, 5, 17, 14]);
    }

    #[test]
    fn joining_replays_repairs_and_agrees_with_reach() {
        let g = g();
        // Targets at 5, 3, 1: 1 before any repair; 4-5 joins nothing yet; 1-2 joins 3;
        // 3-5 then joins 5.
        let j = joining(&g, &[4, 1, 5], 0, &[5, 3, 1]);
        assert_eq!(j.before, [false, false, true]);
        assert_eq!(j.per_step, vec![vec![], vec![1], vec![0]]);
        assert_eq!(j.after, [true, true, true]);
        let r = reaching(&g, &[4, 1, 5], 0);
        assert!(j.after.iter().zip([5, 3, 1]).all(|(&a, t)| a == r[t]));
    }
}
