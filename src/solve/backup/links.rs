//! Links: ways round between tree nodes through damaged roads and off-tree regions, with their
//! cost and the roads they repair.

use super::NONE;
use super::tree::Tree;
use crate::network::Cost;
use crate::solve::graph::{Csr, EdgeList, UNUSABLE};
use std::cmp::Reverse;
use std::collections::{BinaryHeap, HashMap};

/// Trees with at most this many nodes get every node pair's cheapest link.
const ALL_PAIRS_NODES: usize = 40;

/// A candidate link between tree nodes `a` and `b`.
#[derive(Debug, Clone)]
pub(super) struct Link {
    pub(super) a: u32,
    pub(super) b: u32,
    pub(super) cost: Cost,
    pub(super) edges: Vec<u32>,
}

/// Region adjacency over the candidate roads (damaged, usable, not free) between regions.
struct RegionGraph {
    csr: Csr,
}

impl RegionGraph {
    fn new(g: &EdgeList, free: &[bool], tree: &Tree) -> RegionGraph {
        let rg = EdgeList {
            vertices: tree.regions,
            ends: g
                .ends
                .iter()
                .map(|&[a, b]| [tree.region[a as usize], tree.region[b as usize]])
                .collect(),
            cost: (0..g.len())
                .map(|e| {
                    if free[e] || !g.usable(e) {
                        UNUSABLE
                    } else {
                        g.cost[e]
                    }
                })
                .collect(),
        };
        RegionGraph {
            csr: Csr::from_edges(&rg),
        }
    }
}

/// Shortest paths from `sources` (tree nodes, at distance 0) that pass only through regions off
/// the tree. Returns distance, nearest source and the edge each region was reached by.
fn search(
    g: &EdgeList,
    tree: &Tree,
    rg: &RegionGraph,
    sources: &[u32],
    k: usize,
) -> (Vec<Cost>, Vec<u32>, Vec<u32>) {
    let r = tree.regions;
    let mut dist = vec![Cost::MAX; r];
    let mut label = vec![NONE; r];
    let mut via = vec![NONE; r];
    let mut heap = BinaryHeap::new();
    for &s in sources {
        dist[s as usize] = 0;
        label[s as usize] = s;
        heap.push(Reverse((0, s)));
    }
    while let Some(Reverse((d, x))) = heap.pop() {
        if d > dist[x as usize] {
            continue;
        }
        for (y, e) in rg.csr.neighbours(x) {
            if (y as usize) < k {
                continue;
            }
            let nd = d + g.cost[e as usize];
            if nd < dist[y as usize] {
                dist[y as usize] = nd;
                label[y as usize] = label[x as usize];
                via[y as usize] = e;
                heap.push(Reverse((nd, y)));
            }
        }
    }
    (dist, label, via)
}

/// The edges from region `x` back to its search source, nearest the source first.
fn path_back(g: &EdgeList, tree: &Tree, via: &[u32], mut x: u32) -> Vec<u32> {
    let mut out = Vec::new();
    while via[x as usize] != NONE {
        let e = via[x as usize];
        out.push(e);
        let [a, b] = g.ends[e as usize];
        let (ra, rb) = (tree.region[a as usize], tree.region[b as usize]);
        x = if ra == x { rb } else { ra };
    }
    out.reverse();
    out
}

pub(super) fn links(g: &EdgeList, free: &[bool], tree: &Tree) -> Vec<Link> {
    let k = tree.parent.len();
    let rg = RegionGraph::new(g, free, tree);
    let mut best: HashMap<(u32, u32), Link> = HashMap::new();
    let offer = |best: &mut HashMap<(u32, u32), Link>, l: Link| {
        let key = (l.a.min(l.b), l.a.max(l.b));
        match best.get(&key) {
            Some(old) if (old.cost, &old.edges) <= (l.cost, &l.edges) => {}
            _ => {
                best.insert(key, l);
            }
        }
    };
    let mut candidates: Vec<u32> = (0..g.len() as u32)
        .filter(|&e| !free[e as usize] && g.usable(e as usize))
        .collect();
    candidates.retain(|&e| {
        let [a, b] = g.ends[e as usize];
        tree.region[a as usize] != tree.region[b as usize]
    });
    if k <= ALL_PAIRS_NODES {
        for s in 0..k as u32 {
            let (dist, _, via) = search(g, tree, &rg, &[s], k);
            for &e in &candidates {
                let [a, b] = g.ends[e as usize];
                let (ra, rb) = (tree.region[a as usize], tree.region[b as usize]);
                for (x, y) in [(ra, rb), (rb, ra)] {
                    if (y as usize) < k && y != s && dist[x as usize] != Cost::MAX {
                        let mut edges = path_back(g, tree, &via, x);
                        edges.push(e);
                        offer(
                            &mut best,
                            Link {
                                a: s,
                                b: y,
                                cost: dist[x as usize] + g.cost[e as usize],
                                edges,
                            },
                        );
                    }
                }
            }
        }
    } else {
        let sources: Vec<u32> = (0..k as u32).collect();
        let (dist, label, via) = search(g, tree, &rg, &sources, k);
        for &e in &candidates {
            let [a, b] = g.ends[e as usize];
            let (ra, rb) = (tree.region[a as usize], tree.region[b as usize]);
            let (la, lb) = (label[ra as usize], label[rb as usize]);
            if la == NONE || lb == NONE || la == lb {
                continue;
            }
            let mut edges = path_back(g, tree, &via, ra);
            edges.push(e);
            let mut tail = path_back(g, tree, &via, rb);
            tail.reverse();
            edges.extend(tail);
            offer(
                &mut best,
                Link {
                    a: la,
                    b: lb,
                    cost: dist[ra as usize] + g.cost[e as usize] + dist[rb as usize],
                    edges,
                },
            );
        }
    }
    let mut out: Vec<Link> = best.into_values().collect();
    out.sort_by_key(|x| (x.a.min(x.b), x.a.max(x.b)));
    out
}
