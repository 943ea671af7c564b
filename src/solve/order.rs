//! Order of repairs: crews work over days, so the plan's repairs are ordered for the sites (or the
//! road length) they bring back to the hub soonest; [`super::crews`] spreads them over crews and
//! days.
//!
//! An edge helps only once its path back to the root (the hub) is complete, so repairs are always
//! taken as whole paths from the connected part outward. Sites plans: repeatedly repair the path to
//! the unconnected site with the most priority per repair-metre still needed (sites reached on the way
//! count when their own path is complete). Whole-network plans: grow each tree from its root,
//! cheapest repair per metre of road reconnected first (Prim-like, O(n log n)).

use super::graph::EdgeList;
use std::cmp::Reverse;
use std::collections::BinaryHeap;

/// One repair in order.
#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    /// The edge repaired.
    pub edge: u32,
    /// 1-based position in the order.
    pub order: u32,
    /// The crew making it (1-based); None without `--crew-capacity` (no days).
    pub crew: Option<u32>,
    /// The day (1-based) the crew starts it; None without days.
    pub first_day: Option<u32>,
    /// The day the crew finishes it (later than `first_day` when it is longer than what is left
    /// of the day); None without days.
    pub last_day: Option<u32>,
    /// Work time (milli-repair-metres of its crew's days) the repair starts and ends; None
    /// without days.
    pub span: Option<(u64, u64)>,
    /// Targets (sites) joined to their root by this repair.
    pub completes: Vec<usize>,
}

/// A thing to reconnect: its junction, its weight (priority), and the caller's index.
#[derive(Debug, Clone, Copy)]
pub struct Target {
    /// Junction.
    pub junction: u32,
    /// Weight (site priority, or length reconnected).
    pub weight: f64,
    /// The caller's index (site index).
    pub id: usize,
}

/// The rooted trees of a plan: parent edge of every vertex reached from the roots.
struct Rooted {
    parent_edge: Vec<u32>,
    parent: Vec<u32>,
}

const NONE: u32 = u32::MAX;

fn root_trees(g: &EdgeList, plan: &[u32], roots: &[u32]) -> Rooted {
    let n = g.vertices;
    // Neighbours along the plan as flat arrays (v's are adj[first[v]..first[v + 1]], in plan
    // order), not a list per vertex.
    let mut first = vec![0u32; n + 1];
    for &e in plan {
        for v in g.ends[e as usize] {
            first[v as usize + 1] += 1;
        }
    }
    for v in 1..first.len() {
        first[v] += first[v - 1];
    }
    let mut next = first.clone();
    let mut adj = vec![(0u32, 0u32); 2 * plan.len()];
    for &e in plan {
        let [a, b] = g.ends[e as usize];
        for (v, w) in [(a, b), (b, a)] {
            adj[next[v as usize] as usize] = (w, e);
            next[v as usize] += 1;
        }
    }
    let mut parent_edge = vec![NONE; n];
    let mut parent = vec![NONE; n];
    let mut seen = vec![false; n];
    for &r in roots {
        if seen[r as usize] {
            continue;
        }
        seen[r as usize] = true;
        let mut stack = vec![r];
        while let Some(v) = stack.pop() {
            for &(w, e) in &adj[first[v as usize] as usize..first[v as usize + 1] as usize] {
                if !seen[w as usize] {
                    seen[w as usize] = true;
                    parent[w as usize] = v;
                    parent_edge[w as usize] = e;
                    stack.push(w);
                }
            }
        }
    }
    Rooted {
        parent_edge,
        parent,
    }
}

/// Orders the repairs (cost > 0) of a sites plan from the roots (hub first) outward.
pub fn order_for_targets(
    g: &EdgeList,
    plan: &[u32],
    roots: &[u32],
    targets: &[Target],
) -> Vec<Step> {
    order_within(g, plan, roots, targets, None).0
}

/// The greedy order, but only for targets whose remaining path fits in what is left of `budget`
/// (milli-repair-metres): the repairs never exceed it. Returns the steps and, for each target left
/// out, the cost still needed to join it along the plan.
pub fn order_within(
    g: &EdgeList,
    plan: &[u32],
    roots: &[u32],
    targets: &[Target],
    budget: Option<u64>,
) -> (Vec<Step>, Vec<(usize, u64)>) {
    let t = root_trees(g, plan, roots);
    let mut repaired = vec![false; g.len()];
    let mut connected = vec![false; targets.len()];
    let path = |v: u32| {
        let mut out = Vec::new();
        let mut x = v;
        while t.parent_edge[x as usize] != NONE {
            out.push(t.parent_edge[x as usize]);
            x = t.parent[x as usize];
        }
        out
    };
    let paths: Vec<Vec<u32>> = targets.iter().map(|tg| path(tg.junction)).collect();
    let mut steps: Vec<Step> = Vec::new();
    let mark_connected = |repaired: &Vec<bool>, connected: &mut Vec<bool>| -> Vec<usize> {
        let mut done = Vec::new();
        for (i, p) in paths.iter().enumerate() {
            if !connected[i]
                && p.iter()
                    .all(|&e| repaired[e as usize] || g.cost[e as usize] == 0)
            {
                connected[i] = true;
                done.push(targets[i].id);
            }
        }
        done
    };
    mark_connected(&repaired, &mut connected);
    let mut spent = 0u64;
    let need_of = |p: &Vec<u32>, repaired: &Vec<bool>| -> u64 {
        p.iter()
            .filter(|&&e| !repaired[e as usize])
            .map(|&e| g.cost[e as usize])
            .sum()
    };
    loop {
        // The unconnected target with the most weight per repair-metre still needed (that fits).
        let mut best: Option<(f64, usize)> = None;
        for (i, p) in paths.iter().enumerate() {
            if connected[i] {
                continue;
            }
            let need: u64 = need_of(p, &repaired);
            if budget.is_some_and(|b| spent + need > b) {
                continue;
            }
            let score = targets[i].weight.max(1e-9) / (need.max(1) as f64);
            if best.is_none_or(|(s, j)| score > s || (score == s && i < j)) {
                best = Some((score, i));
            }
        }
        let Some((_, i)) = best else { break };
        // Repair its path from the root outward.
        for &e in paths[i].iter().rev() {
            if repaired[e as usize] || g.cost[e as usize] == 0 {
                continue;
            }
            repaired[e as usize] = true;
            spent += g.cost[e as usize];
            let completes = mark_connected(&repaired, &mut connected);
            steps.push(Step {
                edge: e,
                order: steps.len() as u32 + 1,
                crew: None,
                first_day: None,
                last_day: None,
                span: None,
                completes,
            });
        }
        // A target whose path needs nothing more but was not marked (cannot happen) ends the loop.
        connected[i] = true;
    }
    let left: Vec<(usize, u64)> = paths
        .iter()
        .enumerate()
        .filter(|(i, p)| {
            !p.iter()
                .all(|&e| repaired[e as usize] || g.cost[e as usize] == 0)
                && !connected_by_root(*i, targets, roots)
        })
        .map(|(i, p)| (targets[i].id, need_of(p, &repaired)))
        .collect();
    (steps, left)
}

/// Roots themselves are joined from the start.
fn connected_by_root(i: usize, targets: &[Target], roots: &[u32]) -> bool {
    roots.contains(&targets[i].junction)
}

/// Orders the repairs of a whole-network plan: each tree grows from its root, the repair with the
/// least cost per metre of road it reconnects first.
pub fn order_whole_network(
    g: &EdgeList,
    plan: &[u32],
    roots: &[u32],
    length_m: &[f64],
) -> Vec<Step> {
    let t = root_trees(g, plan, roots);
    // Children of every vertex in the rooted forest, as flat arrays (vertex v's children are
    // kids[first[v]..first[v + 1]], in plan order): no map and no list per vertex.
    let parent_child = |e: u32| {
        let [a, b] = g.ends[e as usize];
        if t.parent[b as usize] == a && t.parent_edge[b as usize] == e {
            (a, b)
        } else {
            (b, a)
        }
    };
    let mut first = vec![0u32; g.vertices + 1];
    for &e in plan {
        first[parent_child(e).0 as usize + 1] += 1;
    }
    for v in 1..first.len() {
        first[v] += first[v - 1];
    }
    let mut next = first.clone();
    let mut kids = vec![(0u32, 0u32); plan.len()];
    for &e in plan {
        let (p, c) = parent_child(e);
        kids[next[p as usize] as usize] = (c, e);
        next[p as usize] += 1;
    }
    let children = |v: u32| &kids[first[v as usize] as usize..first[v as usize + 1] as usize];
    let key = |e: u32| {
        let c = g.cost[e as usize] as f64;
        let l = length_m[e as usize].max(1e-3);
        (c / l * 1e6) as u64
    };
    let mut heap: BinaryHeap<Reverse<(u64, u32, u32)>> = BinaryHeap::new();
    let mut steps = Vec::new();
    for &r in roots {
        for &(c, e) in children(r) {
            heap.push(Reverse((key(e), e, c)));
        }
    }
    while let Some(Reverse((_, e, c))) = heap.pop() {
        if g.cost[e as usize] > 0 {
            steps.push(Step {
                edge: e,
                order: steps.len() as u32 + 1,
                crew: None,
                first_day: None,
                last_day: None,
                span: None,
                completes: Vec::new(),
            });
        }
        for &(c2, e2) in children(c) {
            heap.push(Reverse((key(e2), e2, c2)));
        }
    }
    steps
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A star: hub 0; a cheap edge to site A (1), an expensive one to site B (2) through 3.
    fn star() -> (EdgeList, Vec<u32>) {
        let g = EdgeList {
            vertices: 4,
            ends: vec![[0, 1], [0, 3], [3, 2]],
            cost: vec![10, 100, 0],
        };
        (g, vec![0, 1, 2])
    }

    #[test]
    fn cheap_high_value_first_and_prefixes_connected() {
        let (g, plan) = star();
        let targets = [
            Target {
                junction: 1,
                weight: 1.0,
                id: 0,
            },
            Target {
                junction: 2,
                weight: 1.0,
                id: 1,
            },
        ];
        let steps = order_for_targets(&g, &plan, &[0], &targets);
        assert_eq!(steps.iter().map(|s| s.edge).collect::<Vec<_>>(), vec![0, 1]);
        assert_eq!(steps[0].completes, vec![0]);
        assert_eq!(
            steps[1].completes,
            vec![1],
            "the intact edge beyond completes site B"
        );
    }

    #[test]
    fn priority_changes_the_order() {
        let (g, plan) = star();
        let targets = [
            Target {
                junction: 1,
                weight: 1.0,
                id: 0,
            },
            Target {
                junction: 2,
                weight: 100.0,
                id: 1,
            },
        ];
        let steps = order_for_targets(&g, &plan, &[0], &targets);
        assert_eq!(steps[0].edge, 1);
    }
}
