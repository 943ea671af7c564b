//! Crews over days: which crew makes which repair, from when to when, so that the sites join the
//! hub early (the sum over sites of priority × the day the site joins, smallest first).
//!
//! Time is work time in milli-repair-metres per crew; a crew does `capacity` a day, so a repair
//! starting at `s` and ending at `f` runs from day `s / capacity + 1` to day `⌈f / capacity⌉` (a
//! repair longer than a day spans days). A crew may start a repair only once one of its ends (its
//! hub-side end) is reachable from a root over intact roads and finished repairs: repairs open the
//! way outward. Schedules are made by serial generation from a list ([`Sim::run`]): each repair in
//! list order (the first one whose end is reachable) goes to the crew whose free time lies latest
//! at or before the repair's release, else the earliest free crew. Every schedule without idle time
//! that could be avoided is the result of some list, so trying every list ([`exhaustive`]) finds the
//! optimum on small cases.

use super::graph::EdgeList;
use super::order::Target;
use std::cmp::Reverse;
use std::collections::BinaryHeap;

const NEVER: u64 = u64::MAX;

/// One repair placed: its crew (1-based) and its start and finish in work time.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Slot {
    /// The edge repaired.
    pub edge: u32,
    /// The crew, 1-based.
    pub crew: u32,
    /// Work time it starts (milli-repair-metres since the first morning).
    pub start: u64,
    /// Work time it ends.
    pub finish: u64,
}

/// A whole schedule and what it is worth.
#[derive(Debug, Clone)]
pub struct Schedule {
    /// Every repair placed, in list order.
    pub slots: Vec<Slot>,
    /// Per target: the work time it joins its root (0 before any repair; `u64::MAX` never).
    pub joins: Vec<u64>,
    /// Σ priority × join day, then Σ priority × join time, then Σ finish times (whole-network plans
    /// without targets still prefer repairs done early); smaller is better.
    pub score: (f64, f64, u64),
}

/// The day (1-based) on which work time `t` falls; 0 for `t = 0` (before any work).
pub fn day_of(t: u64, capacity: u64) -> u32 {
    t.div_ceil(capacity.max(1)) as u32
}

/// The fixed facts of one scheduling problem and buffers for simulating it.
pub struct Sim<'a> {
    graph: &'a EdgeList,
    roots: &'a [u32],
    targets: &'a [Target],
    capacity: u64,
    crews: u32,
    /// CSR adjacency over intact roads and the repairs to schedule.
    start: Vec<u32>,
    adj: Vec<(u32, u32)>,
    /// Work time each repair ends (`NEVER` while unscheduled); intact roads 0.
    finish: Vec<u64>,
}

impl<'a> Sim<'a> {
    /// Sets up the problem: the repairs `repairs` (cost > 0) on `graph`, grown from `roots`, with
    /// `crews` crews of `capacity` milli-repair-metres a day each.
    pub fn new(
        graph: &'a EdgeList,
        repairs: &[u32],
        roots: &'a [u32],
        targets: &'a [Target],
        capacity: u64,
        crews: u32,
    ) -> Sim<'a> {
        let mut keep: Vec<bool> = (0..graph.len())
            .map(|e| graph.usable(e) && graph.cost[e] == 0)
            .collect();
        for &r in repairs {
            keep[r as usize] = true;
        }
        let mut deg = vec![0u32; graph.vertices + 1];
        for (e, [a, b]) in graph.ends.iter().enumerate() {
            if keep[e] {
                deg[*a as usize + 1] += 1;
                deg[*b as usize + 1] += 1;
            }
        }
        for v in 0..graph.vertices {
            deg[v + 1] += deg[v];
        }
        let mut fill = deg.clone();
        let mut adj = vec![(0, 0); deg[graph.vertices] as usize];
        for (e, &[a, b]) in graph.ends.iter().enumerate() {
            if keep[e] {
                adj[fill[a as usize] as usize] = (b, e as u32);
                fill[a as usize] += 1;
                adj[fill[b as usize] as usize] = (a, e as u32);
                fill[b as usize] += 1;
            }
        }
        let finish = (0..graph.len())
            .map(|e| if graph.cost[e] == 0 { 0 } else { NEVER })
            .collect();
        Sim {
            graph,
            roots,
            targets,
            capacity: capacity.max(1),
            crews: crews.max(1),
            start: deg,
            adj,
            finish,
        }
    }

    /// Lowers reach times from the heap's entries outward (a bottleneck Dijkstra: a vertex is
    /// reached at the latest finish along its best path).
    fn spread(&self, reach: &mut [u64], heap: &mut BinaryHeap<Reverse<(u64, u32)>>) {
        while let Some(Reverse((t, v))) = heap.pop() {
            if t > reach[v as usize] {
                continue;
            }
            let (lo, hi) = (self.start[v as usize], self.start[v as usize + 1]);
            for &(u, e) in &self.adj[lo as usize..hi as usize] {
                let w = self.finish[e as usize];
                if w == NEVER {
                    continue;
                }
                let c = t.max(w);
                if c < reach[u as usize] {
                    reach[u as usize] = c;
                    heap.push(Reverse((c, u)));
                }
            }
        }
    }

    /// The schedule made from `list` by serial generation (see the module notes).
    pub fn run(&mut self, list: &[u32]) -> Schedule {
        for &e in list {
            self.finish[e as usize] = NEVER;
        }
        let mut reach = vec![NEVER; self.graph.vertices];
        let mut heap = BinaryHeap::new();
        for &r in self.roots {
            reach[r as usize] = 0;
            heap.push(Reverse((0, r)));
        }
        self.spread(&mut reach, &mut heap);
        let mut free = vec![0u64; self.crews as usize];
        // Repairs taken so far, and the first list position not taken (lists from the one-crew
        // order are taken nearly in order, so the scan stays short).
        let mut taken = vec![false; list.len()];
        let mut first = 0;
        let mut slots = Vec::with_capacity(list.len());
        let mut finishes = 0u64;
        loop {
            while first < list.len() && taken[first] {
                first += 1;
            }
            let release = |e: u32| {
                let [a, b] = self.graph.ends[e as usize];
                reach[a as usize].min(reach[b as usize])
            };
            // A list whose repair cannot be reached yet takes the first that can.
            let Some(k) = (first..list.len()).find(|&k| !taken[k] && release(list[k]) != NEVER)
            else {
                break;
            };
            taken[k] = true;
            let e = list[k];
            let r = release(e);
            let c = (0..free.len())
                .filter(|&c| free[c] <= r)
                .max_by_key(|&c| (free[c], Reverse(c)))
                .unwrap_or_else(|| (0..free.len()).min_by_key(|&c| (free[c], c)).unwrap_or(0));
            let s = r.max(free[c]);
            let f = s + self.graph.cost[e as usize];
            free[c] = f;
            finishes += f;
            self.finish[e as usize] = f;
            slots.push(Slot {
                edge: e,
                crew: c as u32 + 1,
                start: s,
                finish: f,
            });
            for v in self.graph.ends[e as usize] {
                heap.push(Reverse((reach[v as usize], v)));
            }
            self.spread(&mut reach, &mut heap);
        }
        let joins: Vec<u64> = self
            .targets
            .iter()
            .map(|t| reach[t.junction as usize])
            .collect();
        let (mut days, mut time) = (0.0, 0.0);
        for (t, &j) in self.targets.iter().zip(&joins) {
            if j != NEVER {
                days += t.weight * day_of(j, self.capacity) as f64;
                time += t.weight * j as f64;
            }
        }
        Schedule {
            slots,
            joins,
            score: (days, time, finishes),
        }
    }
}

/// True when `a` is strictly better than `b`.
pub fn better(a: &Schedule, b: &Schedule) -> bool {
    a.score.0 < b.score.0
        || (a.score.0 == b.score.0
            && (a.score.1 < b.score.1 || (a.score.1 == b.score.1 && a.score.2 < b.score.2)))
}

/// Schedules `order` (the one-crew order, hub outward) over the crews: list scheduling from that
/// order, then swaps of neighbours in the list kept while they help, within a work budget of about
/// `budget` relaxations. Never worse than the one-crew order itself, which it falls back to.
pub fn schedule_crews(sim: &mut Sim, order: &[u32], budget: u64) -> Schedule {
    let crews = sim.crews;
    sim.crews = 1;
    let alone = sim.run(order);
    sim.crews = crews;
    let mut list = order.to_vec();
    let mut best = sim.run(&list);
    let per_run = (sim.adj.len() + sim.graph.vertices + list.len()) as u64 + 1;
    let mut runs_left = budget / per_run;
    let mut improved = true;
    while improved && runs_left > 0 {
        improved = false;
        for i in 0..list.len().saturating_sub(1) {
            if runs_left == 0 {
                break;
            }
            runs_left -= 1;
            list.swap(i, i + 1);
            let s = sim.run(&list);
            if better(&s, &best) {
                best = s;
                improved = true;
            } else {
                list.swap(i, i + 1);
            }
        }
    }
    if better(&alone, &best) { alone } else { best }
}

/// The best schedule over every list of `repairs` (n! of them): the exact optimum, for checking
/// the heuristic on small cases only.
pub fn exhaustive(sim: &mut Sim, repairs: &[u32]) -> Schedule {
    let mut list = repairs.to_vec();
    let mut best = sim.run(&list);
    // Heap's algorithm, iterative.
    let n = list.len();
    let mut c = vec![0usize; n];
    let mut i = 0;
    while i < n {
        if c[i] < i {
            list.swap(if i % 2 == 0 { 0 } else { c[i] }, i);
            let s = sim.run(&list);
            if better(&s, &best) {
                best = s;
            }
            c[i] += 1;
            i = 0;
        } else {
            c[i] = 0;
            i += 1;
        }
    }
    best
}

#[cfg(test)]
#[path = "crews_tests.rs"]
mod tests;
