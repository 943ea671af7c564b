//! Single points of failure of the network after the plan (intact roads plus planned repairs):
//! bridges (edges whose loss disconnects something) and cut vertices, found by one iterative
//! depth-first search with low links (Tarjan 1974) in linear time, without recursion.

use super::graph::{Csr, EdgeList};

/// Bridges, cut vertices and the depth-first numbering that tells which side of each bridge a
/// vertex lies on.
#[derive(Debug, Clone)]
pub struct Fragility {
    /// Bridge edge ids, ascending.
    pub bridges: Vec<u32>,
    /// Cut vertices, ascending.
    pub cut_vertices: Vec<u32>,
    /// Depth-first entry number of each vertex (u32::MAX when unreached).
    pub tin: Vec<u32>,
    /// Largest entry number in each vertex's subtree.
    pub tout: Vec<u32>,
    /// For each bridge, the vertex on its far side from the search root (its subtree is cut off).
    pub bridge_child: Vec<u32>,
}

/// Finds bridges and cut vertices of the usable edges of `g`, searching from `roots` first (so the
/// far side of each bridge is the side away from them), then from every other vertex.
pub fn fragility(g: &EdgeList, roots: &[u32]) -> Fragility {
    let n = g.vertices;
    let csr = Csr::from_edges(g);
    const UN: u32 = u32::MAX;
    let mut tin = vec![UN; n];
    let mut tout = vec![0u32; n];
    let mut low = vec![0u32; n];
    let mut is_cut = vec![false; n];
    let mut bridges: Vec<(u32, u32)> = Vec::new();
    let mut timer = 0u32;
    // Stack frames: (vertex, edge it was entered by, next adjacency index, children count).
    let mut stack: Vec<(u32, u32, usize, u32)> = Vec::new();
    let starts = roots.iter().copied().chain(0..n as u32);
    for s in starts {
        if tin[s as usize] != UN {
            continue;
        }
        tin[s as usize] = timer;
        low[s as usize] = timer;
        timer += 1;
        stack.push((s, UN, csr.offsets[s as usize] as usize, 0));
        while let Some(&mut (v, via, ref mut next, ref mut kids)) = stack.last_mut() {
            let end = csr.offsets[v as usize + 1] as usize;
            if *next < end {
                let k = *next;
                *next += 1;
                let (w, e) = (csr.target[k], csr.edge[k]);
                if e == via {
                    continue;
                }
                if tin[w as usize] == UN {
                    *kids += 1;
                    tin[w as usize] = timer;
                    low[w as usize] = timer;
                    timer += 1;
                    stack.push((w, e, csr.offsets[w as usize] as usize, 0));
                } else {
                    low[v as usize] = low[v as usize].min(tin[w as usize]);
                }
            } else {
                let (v, via, _, kids) = stack.pop().expect("frame");
                tout[v as usize] = timer - 1;
                if let Some(&(p, _, _, _)) = stack.last() {
                    low[p as usize] = low[p as usize].min(low[v as usize]);
                    if low[v as usize] > tin[p as usize] {
                        bridges.push((via, v));
                    }
                    // p is a cut vertex when a child cannot reach above it (the root is handled
                    // below by its child count).
                    if low[v as usize] >= tin[p as usize] && stack.len() > 1 {
                        is_cut[p as usize] = true;
                    }
                } else if kids >= 2 {
                    is_cut[v as usize] = true;
                }
            }
        }
    }
    bridges.sort_unstable();
    Fragility {
        bridge_child: bridges.iter().map(|b| b.1).collect(),
        bridges: bridges.iter().map(|b| b.0).collect(),
        cut_vertices: (0..n as u32).filter(|&v| is_cut[v as usize]).collect(),
        tin,
        tout,
    }
}

impl Fragility {
    /// True when `x` lies in the depth-first subtree of `v` (the far side of a bridge into `v`).
    pub fn in_subtree(&self, v: u32, x: u32) -> bool {
        let t = self.tin[x as usize];
        t != u32::MAX && self.tin[v as usize] <= t && t <= self.tout[v as usize]
    }

    /// Positions (into [`bridges`](Self::bridges)) of the bridges whose loss cuts `x` off from
    /// every one of `roots` (the search's first roots); `None` when `x` reaches none of them.
    pub fn cutting_off(&self, roots: &[u32], x: u32) -> Option<Vec<usize>> {
        if !roots.iter().any(|&r| self.in_subtree(r, x)) {
            return None;
        }
        Some(
            (0..self.bridges.len())
                .filter(|&b| {
                    let c = self.bridge_child[b];
                    self.in_subtree(c, x) && roots.iter().all(|&r| !self.in_subtree(c, r))
                })
                .collect(),
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::solve::graph::EdgeList;

    #[test]
    fn triangle_with_a_tail() {
        // 0-1-2-0 triangle, 2-3 tail, 3-4 tail; 4-5 doubled (two parallel edges: not a bridge).
        let g = EdgeList {
            vertices: 6,
            ends: vec![[0, 1], [1, 2], [2, 0], [2, 3], [3, 4], [4, 5], [4, 5]],
            cost: vec![0; 7],
        };
        let f = fragility(&g, &[0]);
        assert_eq!(f.bridges, vec![3, 4]);
        assert_eq!(f.cut_vertices, vec![2, 3, 4]);
        // Bridge 3 (2–3): the far side from the root holds 3, 4 and 5.
        let child = f.bridge_child[0];
        assert!(f.in_subtree(child, 5) && !f.in_subtree(child, 1));
    }
}
