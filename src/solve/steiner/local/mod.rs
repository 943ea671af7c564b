//! Local search on a Steiner tree, in the spirit of Uchoa & Werneck (2010):
//!
//! - **key-path exchange**: remove a key path (a path whose inner vertices are non-terminals of tree
//!   degree 2), which splits the tree in two, and reconnect the halves by the cheapest path between
//!   them if that is cheaper;
//! - **key-vertex elimination**: remove a Steiner vertex of tree degree ≥ 3 with its key paths and
//!   reconnect the pieces by a minimum spanning tree of shortest paths between them, if cheaper.
//!
//! Which piece a tree vertex belongs to is answered in constant time from a depth-first numbering of
//! the tree (a piece is a subtree or the rest of the tree), so a move never has to label whole pieces.
//! Searches start from at most [`Reach::seeds`] vertices of a piece near the removed part and are
//! bounded by the cost removed, so each move only explores nearby.

mod ahead;
mod numbering;

use super::paths::{NONE, Workspace};
use super::reduce::prune_leaves;
use super::tree::cost;
use crate::solve::disjoint::DisjointSets;
use crate::solve::graph::{Csr, EdgeList};
use crate::solve::heap::MinHeap;
use ahead::exchange_pass;

/// How wide the moves search.
#[derive(Debug, Clone, Copy)]
pub struct Reach {
    /// Largest number of vertices of one piece used as search sources.
    pub seeds: usize,
    /// Whether key-vertex elimination is tried (key-path exchange always is).
    pub eliminate: bool,
}

#[derive(Clone)]
struct State<'a> {
    reach: Reach,
    g: &'a EdgeList,
    csr: &'a Csr,
    is_terminal: &'a [bool],
    in_tree: Vec<bool>,
    tdeg: Vec<u32>,
    edges: Vec<u32>,
    /// Depth-first entry number of each tree vertex and the largest number in its subtree.
    tin: Vec<u32>,
    tout: Vec<u32>,
    size: usize,
}

/// A path between key vertices through inner vertices of tree degree 2.
struct KeyPath {
    edges: Vec<u32>,
    inner: Vec<u32>,
    ends: [u32; 2],
    cost: u64,
}

/// A way to join a searched piece to another: its cost, the vertex where the search stopped (or the
/// bridging edge between two searched regions) and the two pieces.
struct Link {
    cost: u64,
    via: Via,
    from: u32,
    to: u32,
}

enum Via {
    Target(u32),
    Bridge(u32),
}

/// Improves `tree` by local search until no move helps or `rounds` passes are done.
pub fn improve(
    g: &EdgeList,
    csr: &Csr,
    is_terminal: &[bool],
    tree: Vec<u32>,
    ws: &mut Workspace,
    rounds: usize,
    reach: Reach,
) -> Vec<u32> {
    if tree.is_empty() {
        return tree;
    }
    let mut st = State::new(g, csr, is_terminal, reach);
    st.set(tree);
    for _ in 0..rounds {
        let mut improved = false;
        let steiner_keys: Vec<u32> = if reach.eliminate {
            st.vertices()
                .into_iter()
                .filter(|&v| !is_terminal[v as usize] && st.tdeg[v as usize] >= 3)
                .collect()
        } else {
            Vec::new()
        };
        for v in steiner_keys {
            if !is_terminal[v as usize] && st.tdeg[v as usize] >= 3 && st.eliminate(v, ws) {
                improved = true;
            }
        }
        let paths = st.key_paths();
        if exchange_pass(&mut st, &paths, ws) {
            improved = true;
        }
        if !improved {
            break;
        }
    }
    st.edges.sort_unstable();
    st.edges
}

/// What trying a key-path exchange found.
#[derive(Clone)]
enum Outcome {
    /// The path is no longer a key path of the tree.
    Skip,
    /// No cheaper reconnection.
    Same,
    /// The tree's edges after the exchange.
    Better(Vec<u32>),
}

impl<'a> State<'a> {
    /// A state holding no tree yet.
    fn new(g: &'a EdgeList, csr: &'a Csr, is_terminal: &'a [bool], reach: Reach) -> Self {
        State {
            reach,
            g,
            csr,
            is_terminal,
            in_tree: vec![false; g.len()],
            tdeg: vec![0; g.vertices],
            edges: Vec::new(),
            tin: vec![0; g.vertices],
            tout: vec![0; g.vertices],
            size: 0,
        }
    }
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
        self.renumber();
    }

    fn in_subtree(&self, root: u32, x: u32) -> bool {
        let t = self.tin[x as usize];
        self.tin[root as usize] <= t && t <= self.tout[root as usize]
    }

    fn subtree_size(&self, v: u32) -> usize {
        (self.tout[v as usize] - self.tin[v as usize] + 1) as usize
    }

    fn is_tree_vertex(&self, v: u32) -> bool {
        self.tdeg[v as usize] > 0 || self.is_terminal[v as usize]
    }

    fn vertices(&self) -> Vec<u32> {
        self.g.ends_of(&self.edges)
    }

    fn is_key(&self, v: u32) -> bool {
        self.is_terminal[v as usize] || self.tdeg[v as usize] >= 3
    }

    fn tree_neighbours(&self, v: u32) -> impl Iterator<Item = (u32, u32)> + '_ {
        self.csr
            .neighbours(v)
            .filter(move |&(_, e)| self.in_tree[e as usize])
    }

    /// Walks from key vertex `k` along tree edge `first` to the next key vertex.
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

    /// Vertices of the piece holding `start` within tree distance `reach` of it, at most `cap`,
    /// nearest in tree hops first. An improving link rarely starts far from the removed part.
    fn seeds(&self, start: u32, reach: u64, cap: usize) -> Vec<u32> {
        let mut list = vec![(start, 0u64, NONE)];
        let mut i = 0;
        while i < list.len() && list.len() < cap {
            let (v, d, parent) = list[i];
            i += 1;
            for (w, e) in self.tree_neighbours(v) {
                let dw = d + self.g.cost[e as usize];
                if w != parent && dw <= reach && list.len() < cap {
                    list.push((w, dw, v));
                }
            }
        }
        list.into_iter().map(|(v, _, _)| v).collect()
    }

    /// Multi-source search from labelled seeds, bounded by `bound`. A tree vertex of another piece
    /// (`piece_of`) ends a path there (a target); tree vertices of the seed's own piece are not
    /// crossed; freed vertices (removed inner vertices) are crossed like any other. With `first`, the
    /// search stops at the first target settled.
    fn search<P>(
        &self,
        ws: &mut Workspace,
        seeds: &[(u32, u32)],
        bound: u64,
        piece_of: P,
        first: bool,
    ) -> Vec<Link>
    where
        P: Fn(u32) -> Option<u32>,
    {
        ws.reset();
        let mut heap = MinHeap::new();
        for &(v, l) in seeds {
            ws.seed(v, l);
            heap.push(0, v);
        }
        let mut links = Vec::new();
        while let Some((d, u)) = heap.pop() {
            if d > ws.dist[u as usize] {
                continue;
            }
            if d >= bound {
                break;
            }
            let lu = ws.label[u as usize];
            if ws.pred[u as usize] != NONE && self.is_tree_vertex(u) {
                if let Some(j) = piece_of(u) {
                    links.push(Link {
                        cost: d,
                        via: Via::Target(u),
                        from: lu,
                        to: j,
                    });
                    if first {
                        break;
                    }
                }
                continue;
            }
            for (w, e) in self.csr.neighbours(u) {
                if self.in_tree[e as usize] {
                    continue;
                }
                let nd = d + self.g.cost[e as usize];
                if nd >= bound {
                    continue;
                }
                if self.is_tree_vertex(w) {
                    match piece_of(w) {
                        // The seed's own piece is never crossed.
                        Some(j) if j == lu => continue,
                        // A seed of another piece: the link ends here.
                        Some(j) if ws.label[w as usize] == j && ws.dist[w as usize] == 0 => {
                            links.push(Link {
                                cost: nd,
                                via: Via::Bridge(e),
                                from: lu,
                                to: j,
                            });
                            continue;
                        }
                        _ => {}
                    }
                }
                if nd < ws.dist[w as usize] {
                    if ws.dist[w as usize] == u64::MAX {
                        ws.touched.push(w);
                    }
                    ws.dist[w as usize] = nd;
                    ws.label[w as usize] = lu;
                    ws.pred[w as usize] = e;
                    heap.push(nd, w);
                }
            }
        }
        links
    }

    /// Edges between two searched regions of different pieces (neither end a tree vertex).
    fn region_bridges(&self, ws: &Workspace, bound: u64) -> Vec<Link> {
        let mut out = Vec::new();
        for &u in &ws.touched {
            if self.is_tree_vertex(u) {
                continue;
            }
            for (w, e) in self.csr.neighbours(u) {
                let (lu, lw) = (ws.label[u as usize], ws.label[w as usize]);
                if u < w
                    && lw != NONE
                    && lu != lw
                    && !self.in_tree[e as usize]
                    && !self.is_tree_vertex(w)
                {
                    let c = ws.dist[u as usize] + self.g.cost[e as usize] + ws.dist[w as usize];
                    if c < bound {
                        out.push(Link {
                            cost: c,
                            via: Via::Bridge(e),
                            from: lu,
                            to: lw,
                        });
                    }
                }
            }
        }
        out
    }

    fn link_edges(&self, ws: &Workspace, l: &Link, out: &mut Vec<u32>) {
        match l.via {
            Via::Target(v) => ws.path_to_source(self.g, v, out),
            Via::Bridge(e) => {
                out.push(e);
                let [u, w] = self.g.ends[e as usize];
                ws.path_to_source(self.g, u, out);
                ws.path_to_source(self.g, w, out);
            }
        }
    }

    /// Key-path exchange tried on `p`: whether it is still a key path and, if so, the tree's edges
    /// with `p` replaced by the cheapest path between its two pieces when that costs less. The tree
    /// itself is left as it was.
    fn try_exchange(&mut self, p: &KeyPath, ws: &mut Workspace) -> Outcome {
        if !self.still_key_path(p) {
            return Outcome::Skip;
        }
        let [a, b] = p.ends;
        let low = if self.in_subtree(a, b) { b } else { a };
        let high = if low == a { b } else { a };
        let low_size = self.subtree_size(low);
        let high_size = self.size - low_size - p.inner.len();
        self.detach(&p.edges);
        let (start, label) = if low_size <= high_size {
            (low, 0)
        } else {
            (high, 1)
        };
        let seeds: Vec<(u32, u32)> = self
            .seeds(start, p.cost, self.reach.seeds)
            .into_iter()
            .map(|v| (v, label))
            .collect();
        let piece_of = |x: u32| Some(if self.in_subtree(low, x) { 0 } else { 1 });
        let links = self.search(ws, &seeds, p.cost, piece_of, true);
        let outcome = match links.first() {
            Some(l) if l.cost < p.cost => {
                let mut add = Vec::new();
                self.link_edges(ws, l, &mut add);
                let mut gone = p.edges.clone();
                gone.sort_unstable();
                let mut edges: Vec<u32> = self
                    .edges
                    .iter()
                    .copied()
                    .filter(|e| gone.binary_search(e).is_err())
                    .collect();
                edges.extend(add.iter().copied());
                edges.sort_unstable();
                edges.dedup();
                Outcome::Better(edges)
            }
            _ => Outcome::Same,
        };
        self.attach(&p.edges);
        outcome
    }

    /// Key-vertex elimination: drop a Steiner vertex with its key paths and rejoin the pieces by a
    /// minimum spanning tree over the cheapest links found between them, when that costs less.
    fn eliminate(&mut self, v: u32, ws: &mut Workspace) -> bool {
        let paths: Vec<KeyPath> = self
            .tree_neighbours(v)
            .collect::<Vec<_>>()
            .into_iter()
            .map(|first| self.walk(v, first))
            .collect();
        let removed_cost: u64 = paths.iter().map(|p| p.cost).sum();
        let mut costs: Vec<u64> = paths.iter().map(|p| p.cost).collect();
        costs.sort_unstable_by(|x, y| y.cmp(x));
        let radius = (costs[0] + costs.get(1).copied().unwrap_or(0)).min(removed_cost);
        let far: Vec<u32> = paths.iter().map(|p| p.ends[1]).collect();
        let child: Vec<bool> = far.iter().map(|&f| self.in_subtree(v, f)).collect();
        let parent_piece = child.iter().position(|c| !c).map(|i| i as u32);
        let removed: Vec<u32> = paths.iter().flat_map(|p| p.edges.iter().copied()).collect();
        self.detach(&removed);
        let piece_of = |x: u32| -> Option<u32> {
            if !self.in_subtree(v, x) {
                return parent_piece;
            }
            (0..far.len())
                .find(|&i| child[i] && self.in_subtree(far[i], x))
                .map(|i| i as u32)
        };
        let seeds: Vec<(u32, u32)> = far
            .iter()
            .enumerate()
            .flat_map(|(i, &f)| {
                self.seeds(f, radius / 2, (self.reach.seeds / 8).max(8))
                    .into_iter()
                    .map(move |s| (s, i as u32))
            })
            .collect();
        let mut links = self.search(ws, &seeds, radius, piece_of, false);
        links.extend(self.region_bridges(ws, radius));
        links.sort_by_key(|l| l.cost);
        let mut ds = DisjointSets::new(paths.len());
        let mut add = Vec::new();
        let mut total = 0;
        let mut joined = 1;
        for l in &links {
            if ds.union(l.from, l.to) {
                total += l.cost;
                self.link_edges(ws, l, &mut add);
                joined += 1;
                if joined == paths.len() || total >= removed_cost {
                    break;
                }
            }
        }
        self.attach(&removed);
        if joined < paths.len() || total >= removed_cost {
            return false;
        }
        // Links found for different pairs may share vertices: rebuild a tree from the union.
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
        if cost(self.g, &tree) < cost(self.g, &self.edges) {
            self.set(tree);
            true
        } else {
            false
        }
    }

    /// Minimum spanning forest of the given edges, pruned of non-terminal leaves (vertices numbered
    /// locally, so the cost follows the tree's size, not the graph's).
    fn spanning_tree_of(&self, mut cand: Vec<u32>) -> Vec<u32> {
        let verts = self.g.ends_of(&cand);
        let local = |v: u32| verts.binary_search(&v).unwrap_or(0) as u32;
        cand.sort_by_key(|&e| (self.g.cost[e as usize], e));
        let mut ds = DisjointSets::new(verts.len());
        let mut out: Vec<u32> = cand
            .into_iter()
            .filter(|&e| {
                let [a, b] = self.g.ends[e as usize];
                ds.union(local(a), local(b))
            })
            .collect();
        prune_leaves(self.g, &mut out, self.is_terminal);
        out
    }
}

/// A road-like lattice reduced for random sites, and a shortest-path tree on it: the starting point
/// of the local-search tests.
#[cfg(test)]
struct Fixture {
    red: super::reduce::Reduced,
    csr: Csr,
    tree: Vec<u32>,
}

#[cfg(test)]
impl Fixture {
    fn new(side: usize, sites: usize, seed: u64) -> Self {
        let g = crate::synthetic::grid_graph(side, 0.3, seed);
        let (mut terms, _, _) = crate::synthetic::sites_on_largest_component(&g, sites);
        terms.sort_unstable();
        terms.dedup();
        let red = super::reduce::reduce(&g, &terms);
        let csr = Csr::from_edges(&red.graph);
        let mut ws = Workspace::new(red.graph.vertices);
        let (rg, it) = (&red.graph, &red.is_terminal);
        let tree = super::sph::sph(rg, &csr, &red.terminals, it, red.terminals[0], &mut ws);
        Fixture { red, csr, tree }
    }
}
