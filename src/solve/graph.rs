//! Compact graph arrays for the solvers: an edge list with integer costs and a CSR adjacency.

use crate::network::Cost;

/// Cost marking an edge that no plan may use (closed road).
pub const UNUSABLE: Cost = Cost::MAX;

/// Undirected multigraph as parallel arrays; edge ids are positions.
#[derive(Debug, Clone, Default)]
pub struct EdgeList {
    /// Number of vertices (ids `0..vertices`).
    pub vertices: usize,
    /// End vertices of each edge.
    pub ends: Vec<[u32; 2]>,
    /// Cost of each edge; [`UNUSABLE`] for edges a plan may not use.
    pub cost: Vec<Cost>,
}

impl EdgeList {
    /// True when edge `e` may be used by a plan and is not a self-loop.
    #[inline]
    pub fn usable(&self, e: usize) -> bool {
        self.cost[e] != UNUSABLE && self.ends[e][0] != self.ends[e][1]
    }

    /// Number of edges.
    pub fn len(&self) -> usize {
        self.ends.len()
    }

    /// True when there are no edges.
    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    /// The distinct end vertices of the given edges, ascending: the vertex set of a tree or path,
    /// for numbering its vertices locally.
    pub fn ends_of(&self, edges: &[u32]) -> Vec<u32> {
        let mut verts: Vec<u32> = edges.iter().flat_map(|&e| self.ends[e as usize]).collect();
        verts.sort_unstable();
        verts.dedup();
        verts
    }

    /// Sum of the costs of the given edges.
    pub fn total(&self, edges: &[u32]) -> Cost {
        edges.iter().map(|&e| self.cost[e as usize]).sum()
    }

    /// The usable, non-loop edges as a petgraph graph with the same vertex ids (for cross-checks and
    /// benchmarks against petgraph's algorithms).
    pub fn to_petgraph(&self) -> petgraph::graph::UnGraph<(), Cost> {
        let mut pg = petgraph::graph::UnGraph::with_capacity(self.vertices, self.len());
        for _ in 0..self.vertices {
            pg.add_node(());
        }
        for e in 0..self.len() {
            if self.usable(e) {
                let [a, b] = self.ends[e];
                pg.add_edge(a.into(), b.into(), self.cost[e]);
            }
        }
        pg
    }
}

/// Compressed sparse row adjacency over the usable edges of an [`EdgeList`].
#[derive(Debug, Clone, Default)]
pub struct Csr {
    /// `offsets[v]..offsets[v + 1]` indexes `v`'s neighbours.
    pub offsets: Vec<u32>,
    /// Neighbour vertex of each adjacency entry.
    pub target: Vec<u32>,
    /// Edge id of each adjacency entry.
    pub edge: Vec<u32>,
}

impl Csr {
    /// Builds the adjacency of the usable, non-loop edges, each neighbour list in edge-id order.
    pub fn from_edges(g: &EdgeList) -> Csr {
        Self::from_edges_where(g, |_| true)
    }

    /// Builds the adjacency of the usable, non-loop edges for which `keep(edge id)` holds.
    pub fn from_edges_where<F: Fn(usize) -> bool>(g: &EdgeList, keep: F) -> Csr {
        Self::from_pairs(g.vertices, g.len(), |e| {
            (g.usable(e) && keep(e)).then(|| g.ends[e])
        })
    }

    /// Builds the adjacency of `n` vertices from edges `0..m`, where `ends(e)` gives an edge's two
    /// distinct ends or `None` to leave it out; each neighbour list comes in edge-id order.
    pub fn from_pairs<F: Fn(usize) -> Option<[u32; 2]>>(n: usize, m: usize, ends: F) -> Csr {
        // Degrees are counted two places up, so that after the prefix sum `offsets[v + 1]` is where
        // v's list starts; filling advances it to where v's list ends, which is where v + 1's starts.
        // No other per-vertex array is needed (fresh memory costs page faults).
        let mut offsets = vec![0u32; n + 2];
        for e in 0..m {
            if let Some([a, b]) = ends(e) {
                offsets[a as usize + 2] += 1;
                offsets[b as usize + 2] += 1;
            }
        }
        for v in 2..n + 2 {
            offsets[v] += offsets[v - 1];
        }
        let m2 = offsets[n + 1] as usize;
        let mut target = vec![0u32; m2];
        let mut edge = vec![0u32; m2];
        for e in 0..m {
            if let Some([a, b]) = ends(e) {
                for (u, w) in [(a, b), (b, a)] {
                    let slot = &mut offsets[u as usize + 1];
                    target[*slot as usize] = w;
                    edge[*slot as usize] = e as u32;
                    *slot += 1;
                }
            }
        }
        offsets.truncate(n + 1);
        Csr {
            offsets,
            target,
            edge,
        }
    }

    /// Positions of `v`'s entries in `target` and `edge`.
    #[inline]
    pub fn range(&self, v: u32) -> std::ops::Range<usize> {
        self.offsets[v as usize] as usize..self.offsets[v as usize + 1] as usize
    }

    /// Neighbours of `v` as (neighbour, edge id) pairs.
    #[inline]
    pub fn neighbours(&self, v: u32) -> impl Iterator<Item = (u32, u32)> + '_ {
        let r = self.range(v);
        self.target[r.clone()]
            .iter()
            .copied()
            .zip(self.edge[r].iter().copied())
    }
}
