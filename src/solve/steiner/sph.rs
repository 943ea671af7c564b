//! The shortest-path heuristic (Takahashi & Matsuyama 1980): grow a tree from a root terminal by
//! repeatedly adding the cheapest path to the nearest terminal not yet in it. One Dijkstra serves the
//! whole run: vertices joining the tree become sources at distance 0 and the search continues.

use super::paths::Workspace;
use super::tree::mst_prune;
use crate::solve::graph::{Csr, EdgeList};
use crate::solve::heap::MinHeap;

/// Steiner tree edges (ascending) grown from `root`.
pub fn sph(
    g: &EdgeList,
    csr: &Csr,
    terminals: &[u32],
    is_terminal: &[bool],
    root: u32,
    ws: &mut Workspace,
) -> Vec<u32> {
    if terminals.len() < 2 {
        return Vec::new();
    }
    ws.reset();
    let mut in_tree = vec![false; g.vertices];
    let mut edges = Vec::new();
    let mut heap = MinHeap::new();
    ws.seed(root, 0);
    in_tree[root as usize] = true;
    heap.push(0, root);
    let mut count = 1;
    let mut path = Vec::new();
    while let Some((d, v)) = heap.pop() {
        if d > ws.dist[v as usize] {
            continue;
        }
        if is_terminal[v as usize] && !in_tree[v as usize] {
            path.clear();
            let mut x = v;
            while !in_tree[x as usize] {
                in_tree[x as usize] = true;
                let e = ws.pred[x as usize];
                path.push(e);
                ws.dist[x as usize] = 0;
                ws.pred[x as usize] = super::paths::NONE;
                heap.push(0, x);
                let [a, b] = g.ends[e as usize];
                x = if a == x { b } else { a };
            }
            edges.extend_from_slice(&path);
            count += 1;
            if count == terminals.len() {
                break;
            }
            continue;
        }
        for (w, e) in csr.neighbours(v) {
            let nd = d + g.cost[e as usize];
            if nd < ws.dist[w as usize] {
                if ws.dist[w as usize] == u64::MAX {
                    ws.touched.push(w);
                }
                ws.dist[w as usize] = nd;
                ws.pred[w as usize] = e;
                heap.push(nd, w);
            }
        }
    }
    mst_prune(g, csr, &edges, is_terminal)
}
