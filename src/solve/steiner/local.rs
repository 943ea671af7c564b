//! Local search on a Steiner tree, in the spirit of Uchoa & Werneck (2010):
//!
//! - **key-path exchange**: remove a key path (a path whose inner vertices are non-terminals of tree
//!   degree 2), which splits the tree in two, and reconnect the halves by the cheapest path between
//!   them if that is cheaper;
//! - **key-vertex elimination**: remove a Steiner vertex of tree degree ≥ 3 with its key paths and
//!   reconnect the pieces by a minimum spanning tree of shortest paths between them (Voronoi regions
//!   of the pieces), if cheaper.
//!
//! Each search from the pieces is bounded by the cost removed, so it only explores nearby.

use super::paths::{NONE, Workspace};
use super::reduce::prune_leaves;
use super::tree::cost;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::{Csr, EdgeList};

struct State<'a> {
    g: &'a EdgeList,
    csr: &'a Csr,
    is_terminal: &'a [bool],
    in_tree: Vec<bool>,
    tdeg: Vec<u32>,
    edges: Vec<u32>,
}

/// A path between key vertices through inner vertices of tree degree 2.
struct KeyPath {
    edges: Vec<u32>,
    inner: Vec<u32>,
    ends: [u32; 2],
    cost: u64,
}

/// Improves `tree` by local search until no move helps or `rounds` passes are done.
pub fn improve(
    g: &EdgeList,
    csr: &Csr,
    is_terminal: &[bool],
    tree: Vec<u32>,
    ws: &mut Workspace,
    rounds: usize,
) -> Vec<u32> {
    if tree.is_empty() {
        return tree;
    }
    let mut st = State {
        g,
        csr,
        is_terminal,
        in_tree: vec![false; g.len()],
        tdeg: vec![0; g.vertices],
        edges: Vec::new(),
    };
    st.set(tree);
    for _ in 0..rounds {
        let mut improved = false;
        let steiner_keys: Vec<u32> = st
            .vertices()
            .into_iter()
            .filter(|&v| !is_terminal[v as usize] && st.tdeg[v as usize] >= 3)
            .collect();
        for v in steiner_keys {
            if !is_terminal[v as usize] && st.tdeg[v as usize] >= 3 && st.eliminate(v, ws) {
                improved = true;
            }
        }
        for p in st.key_paths() {
            if st.still_key_path(&p) && st.exchange(&p, ws) {
                improved = true;
            }
        }
        if !improved {
            break;
        }
    }
    st.edges.sort_unstable();
    st.edges
}

impl State<'_> {
    fn set(&mut self, edges: Vec<u32>) {
        for &e in &self.edges {
            self.in_tree[e as usize] = false;
            for v in self.g.ends[e as usize] {
                self.tdeg[v as usize] = 0;
            }
        }
        for &e in &edges {
            self.in_tree[e as usize] = true;
            for v in self.g.ends[e as usize] {
                self.tdeg[v as usize] += 1;
            }
        }
        self.edges = edges;
    }

    fn vertices(&self) -> Vec<u32> {
        let mut v: Vec<u32> = self
            .edges
            .iter()
            .flat_map(|&e| self.g.ends[e as usize])
            .collect();
        v.sort_unstable();
        v.dedup();
        v
    }

    fn is_key(&self, v: u32) -> bool {
        self.is_terminal[v as usize] || self.tdeg[v as usize] >= 3
    }

    fn tree_neighbours(&self, v: u32) -> impl Iterator<Item = (u32, u32)> + '_ {
        self.csr
            .neighbours(v)
            .filter(move |&(_, e)| self.in_tree[e as usize])
    }

    /// Walks from key vertex `k` along tree edge `e` to the next key vertex.
    fn walk(&self, k: u32, first: (u32, u32)) -> KeyPath {
        let (mut cur, mut e) = first;
        let mut p = KeyPath {
            edges: vec![e],
            inner: Vec::new(),
            ends: [k, k],
            cost: self.g.cost[e as usize],
        };
        while !self.is_key(cur) && self.tdeg[cur as usize] == 2 {
            let Some(next) = self.tree_neighbours(cur).find(|&(_, e2)| e2 != e) else {
                break;
            };
            p.inner.push(cur);
            cur = next.0;
            e = next.1;
            p.edges.push(e);
            p.cost += self.g.cost[e as usize];
        }
        p.ends[1] = cur;
        p
    }

    fn key_paths(&self) -> Vec<KeyPath> {
        let mut out = Vec::new();
        for k in self.vertices() {
            if !self.is_key(k) {
                continue;
            }
            for first in self.tree_neighbours(k).collect::<Vec<_>>() {
                let p = self.walk(k, first);
                if p.ends[0] < p.ends[1] {
                    out.push(p);
                }
            }
        }
        out
    }

    /// True when the path is still in the tree with inner vertices of degree 2 and key ends, so that
    /// removing it splits the tree into exactly two pieces.
    fn still_key_path(&self, p: &KeyPath) -> bool {
        p.edges.iter().all(|&e| self.in_tree[e as usize])
            && p.inner
                .iter()
                .all(|&v| !self.is_key(v) && self.tdeg[v as usize] == 2)
            && p.ends.iter().all(|&v| self.is_key(v))
    }

    fn detach(&mut self, edges: &[u32]) {
        for &e in edges {
            self.in_tree[e as usize] = false;
            for v in self.g.ends[e as usize] {
                self.tdeg[v as usize] -= 1;
            }
        }
    }

    fn attach(&mut self, edges: &[u32]) {
        for &e in edges {
            if !self.in_tree[e as usize] {
                self.in_tree[e as usize] = true;
                for v in self.g.ends[e as usize] {
                    self.tdeg[v as usize] += 1;
                }
            }
        }
    }

    /// Seeds every vertex of the tree piece holding `start` with `label`.
    fn seed_piece(&self, start: u32, label: u32, ws: &mut Workspace) {
        if ws.label[start as usize] != NONE {
            return;
        }
        ws.seed(start, label);
        let mut stack = vec![start];
        while let Some(v) = stack.pop() {
            for (w, _) in self.tree_neighbours(v) {
                if ws.label[w as usize] == NONE {
                    ws.seed(w, label);
                    stack.push(w);
                }
            }
        }
    }

    /// Bridging edges between differently labelled regions, cheaper than `bound`, sorted.
    fn bridges(&self, ws: &Workspace, bound: u64) -> Vec<(u64, u32)> {
        let mut out = Vec::new();
        for &u in &ws.touched {
            for (w, e) in self.csr.neighbours(u) {
                let (lu, lw) = (ws.label[u as usize], ws.label[w as usize]);
                if u < w && lw != NONE && lu != lw && !self.in_tree[e as usize] {
                    let c = ws.dist[u as usize] + self.g.cost[e as usize] + ws.dist[w as usize];
                    if c < bound {
                        out.push((c, e));
                    }
                }
            }
        }
        out.sort_unstable();
        out
    }

    /// Key-path exchange: the cheapest path from the smaller piece to the rest of the tree replaces
    /// the key path when it costs less.
    fn exchange(&mut self, p: &KeyPath, ws: &mut Workspace) -> bool {
        self.detach(&p.edges);
        ws.reset();
        let small = self.smaller_piece(p.ends[0], p.ends[1]);
        for &v in &small {
            ws.seed(v, 0);
        }
        // Any tree vertex outside the small piece belongs to the other piece.
        let target = |ws: &Workspace, v: u32| {
            ws.label[v as usize] == NONE
                && (self.tdeg[v as usize] > 0 || self.is_terminal[v as usize])
        };
        let hit = ws.run_until(self.g, self.csr, p.cost, |ws, v| target(ws, v));
        match hit {
            Some(v) => {
                let mut add = Vec::new();
                ws.path_to_source(self.g, v, &mut add);
                self.attach(&add);
                let removed: std::collections::HashSet<u32> = p.edges.iter().copied().collect();
                let mut edges: Vec<u32> = self
                    .edges
                    .iter()
                    .copied()
                    .filter(|e| !removed.contains(e) || add.contains(e))
                    .collect();
                edges.extend(add.iter().copied().filter(|e| !removed.contains(e)));
                self.edges = edges;
                true
            }
            None => {
                self.attach(&p.edges);
                false
            }
        }
    }

    /// The vertices of the smaller of the two tree pieces holding `a` and `b`, found by searching
    /// both at once and stopping when one is exhausted.
    fn smaller_piece(&self, a: u32, b: u32) -> Vec<u32> {
        let mut seen: std::collections::HashSet<u32> = [a, b].into_iter().collect();
        let mut sides = [(vec![a], 0usize), (vec![b], 0usize)];
        loop {
            for (list, next) in sides.iter_mut() {
                if *next == list.len() {
                    return std::mem::take(list);
                }
                let v = list[*next];
                *next += 1;
                for (w, _) in self.tree_neighbours(v) {
                    if seen.insert(w) {
                        list.push(w);
                    }
                }
            }
        }
    }

    fn eliminate(&mut self, v: u32, ws: &mut Workspace) -> bool {
        let paths: Vec<KeyPath> = self
            .tree_neighbours(v)
            .collect::<Vec<_>>()
            .into_iter()
            .map(|first| self.walk(v, first))
            .collect();
        let removed_cost: u64 = paths.iter().map(|p| p.cost).sum();
        let removed: Vec<u32> = paths.iter().flat_map(|p| p.edges.iter().copied()).collect();
        self.detach(&removed);
        ws.reset();
        for (i, p) in paths.iter().enumerate() {
            self.seed_piece(p.ends[1], i as u32, ws);
        }
        ws.run(self.g, self.csr, removed_cost);
        let mut ds = DisjointSets::new(paths.len());
        let mut add = Vec::new();
        let mut total = 0;
        let mut joined = 1;
        for (c, e) in self.bridges(ws, removed_cost) {
            let [u, w] = self.g.ends[e as usize];
            if ds.union(ws.label[u as usize], ws.label[w as usize]) {
                total += c;
                add.push(e);
                ws.path_to_source(self.g, u, &mut add);
                ws.path_to_source(self.g, w, &mut add);
                joined += 1;
                if joined == paths.len() || total >= removed_cost {
                    break;
                }
            }
        }
        if joined < paths.len() || total >= removed_cost {
            self.attach(&removed);
            return false;
        }
        // Paths found for different pairs may share vertices: rebuild a tree from the union.
        let before = cost(self.g, &self.edges);
        let removed_set: std::collections::HashSet<u32> = removed.iter().copied().collect();
        let mut cand: Vec<u32> = self
            .edges
            .iter()
            .copied()
            .filter(|e| !removed_set.contains(e))
            .collect();
        cand.extend(add);
        cand.sort_unstable();
        cand.dedup();
        let tree = self.spanning_tree_of(cand);
        if cost(self.g, &tree) < before {
            self.attach(&removed);
            self.set(tree);
            true
        } else {
            self.attach(&removed);
            false
        }
    }

    /// Minimum spanning forest of the given edges, pruned of non-terminal leaves.
    fn spanning_tree_of(&self, mut cand: Vec<u32>) -> Vec<u32> {
        cand.sort_by_key(|&e| (self.g.cost[e as usize], e));
        let mut ds = DisjointSets::new(self.g.vertices);
        let mut out: Vec<u32> = cand
            .into_iter()
            .filter(|&e| {
                let [a, b] = self.g.ends[e as usize];
                ds.union(a, b)
            })
            .collect();
        prune_leaves(self.g, &mut out, self.is_terminal);
        out
    }
}
