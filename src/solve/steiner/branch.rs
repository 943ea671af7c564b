//! Branch-and-bound over vertices: a subproblem either takes a vertex as a terminal or leaves it out.
//!
//! Each subproblem gets one [`exact::step`] (reductions, dual ascent, a heuristic tree on the
//! saturated arcs); it is closed when its bound reaches the best tree's cost. Open subproblems are
//! taken lowest bound first (deeper first among equal bounds, then in creation order), so the least
//! open bound is a lower bound for the whole problem at any moment. The search stops when no
//! subproblem is open (the best tree is optimal) or after a fixed number of steps: no clocks, so the
//! same input always gives the same tree and bound.

use super::Effort;
use super::exact::{self, Incumbent};
use super::paths::Workspace;
use crate::solve::graph::{EdgeList, UNUSABLE};
use std::cmp::Reverse;
use std::collections::BinaryHeap;
use std::sync::Arc;
use std::time::Instant;

/// The outcome of a search.
pub struct Outcome {
    /// The best tree found (base graph edge ids) and its cost.
    pub best: Incumbent,
    /// A lower bound on the optimum (equal to the best cost when proven optimal).
    pub lower_bound: u64,
    /// Steps taken.
    pub nodes: u64,
}

/// An open subproblem: the edges still usable, the vertices made terminals, the one left out.
struct Open {
    bound: u64,
    depth: u32,
    seq: u64,
    alive: Arc<Vec<u32>>,
    include: Vec<u32>,
    exclude: Option<u32>,
}

impl Open {
    fn key(&self) -> (Reverse<u64>, u32, Reverse<u64>) {
        (Reverse(self.bound), self.depth, Reverse(self.seq))
    }
}
impl PartialEq for Open {
    fn eq(&self, o: &Self) -> bool {
        self.key() == o.key()
    }
}
impl Eq for Open {}
impl PartialOrd for Open {
    fn partial_cmp(&self, o: &Self) -> Option<std::cmp::Ordering> {
        Some(self.cmp(o))
    }
}
impl Ord for Open {
    fn cmp(&self, o: &Self) -> std::cmp::Ordering {
        self.key().cmp(&o.key())
    }
}

/// Where a search stops when it has not proven the best tree optimal.
#[derive(Debug, Clone, Copy)]
pub struct Limits {
    /// Steps that always run (the deterministic budget); without a deadline, the most.
    pub nodes: u64,
    /// A wall-clock limit, checked between steps once the budgeted steps are spent (an explicit
    /// opt-out of determinism).
    pub deadline: Option<Instant>,
}

/// Dual ascents per round of a step below the root (one: more cost about their share of time per
/// step and closed no more subproblems on SteinLib D).
pub const NODE_ASCENTS: usize = 1;

/// Searches `g` (positive costs) for a tree over `terminals` cheaper than `best` within `limits`,
/// starting from the lower bound `bound`. `report(best cost, bound)` hears of every improvement of
/// either.
pub fn search(
    g: &EdgeList,
    terminals: &[u32],
    best: Incumbent,
    bound: u64,
    limits: Limits,
    report: &mut dyn FnMut(u64, u64),
) -> Outcome {
    let mut best = best;
    let mut ws = Workspace::new(g.vertices);
    let mut queue = BinaryHeap::new();
    let all: Vec<u32> = (0..g.len() as u32)
        .filter(|&e| g.usable(e as usize))
        .collect();
    queue.push(Open {
        bound,
        depth: 0,
        seq: 0,
        alive: Arc::new(all),
        include: Vec::new(),
        exclude: None,
    });
    let (mut seq, mut nodes, mut shown) = (1u64, 0u64, (best.cost, bound));
    while let Some(open) = queue.peek() {
        if open.bound >= best.cost {
            // The least bound reaches the best tree: nothing open can beat it.
            queue.clear();
            break;
        }
        if nodes >= limits.nodes && limits.deadline.is_none_or(|d| Instant::now() >= d) {
            break;
        }
        let open = queue.pop().expect("peeked");
        nodes += 1;
        let mut sub = EdgeList {
            vertices: g.vertices,
            ends: g.ends.clone(),
            cost: vec![UNUSABLE; g.len()],
        };
        for &e in open.alive.iter() {
            sub.cost[e as usize] = g.cost[e as usize];
        }
        if let Some(x) = open.exclude {
            for (e, ends) in g.ends.iter().enumerate() {
                if ends.contains(&x) {
                    sub.cost[e] = UNUSABLE;
                }
            }
        }
        let mut terms: Vec<u32> = terminals.iter().chain(&open.include).copied().collect();
        terms.sort_unstable();
        terms.dedup();
        let s = exact::step(
            sub,
            &terms,
            &mut best,
            Effort::Normal,
            NODE_ASCENTS,
            &mut ws,
        );
        if let Some(b) = s.bound {
            let b = b.max(open.bound);
            if let (true, Some(v)) = (b < best.cost, s.branch) {
                let alive = Arc::new(s.alive);
                let mut include = open.include.clone();
                include.push(v);
                for (include, exclude) in [(include, None), (open.include.clone(), Some(v))] {
                    queue.push(Open {
                        bound: b,
                        depth: open.depth + 1,
                        seq,
                        alive: Arc::clone(&alive),
                        include,
                        exclude,
                    });
                    seq += 1;
                }
            }
        }
        let low = queue.peek().map_or(best.cost, |o| o.bound.min(best.cost));
        if (best.cost, low) != shown {
            shown = (best.cost, low);
            report(best.cost, low);
        }
    }
    let lower_bound = queue
        .peek()
        .map_or(best.cost, |o| o.bound.min(best.cost))
        .max(bound.min(best.cost));
    Outcome {
        best,
        lower_bound,
        nodes,
    }
}
