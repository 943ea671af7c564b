//! Reductions by bounds and by bottleneck distances: edges no tree worth having can use.
//!
//! - Reduced-cost tests (Duin & Volgenant 1989; Polzin & Vahdati Daneshmand 2001): after a dual
//!   ascent with bound L and arc reduced costs r, any tree rooted at the ascent's root that uses the
//!   arc v→w costs at least L + d(root, v) + r(v→w) + d(w, T), where d are shortest distances in
//!   reduced costs and T the terminals other than the root (w's subtree holds one). A non-terminal
//!   vertex v likewise costs at least L + d(root, v) + d(v, T). When that reaches `limit`, the edge
//!   or vertex is useless to a search for trees cheaper than `limit`.
//! - Special-distance test (Duin & Volgenant 1989): an edge longer than the bottleneck Steiner
//!   distance between its ends (a path whose pieces between terminals are each shorter) is in no
//!   minimum tree, since swapping it for the longest piece gives a cheaper one.

use super::dual_ascent::Bound;
use crate::solve::graph::{Csr, EdgeList};
use crate::solve::heap::MinHeap;

/// How many labels the special-distance search of one edge may settle before giving up on it (a
/// fixed amount of work, so the outcome never depends on timing).
const SD_LABELS: usize = 64;

/// Edges of `g` whose use, by the reduced-cost tests, makes every tree cost at least `limit`
/// (`doomed[e]`). Non-terminal vertices failing the vertex test lose all their edges. `root` is
/// the ascent's root (its first terminal); `bound` must be the ascent run on `g` with `csr`.
pub fn reduced_cost_doomed(
    g: &EdgeList,
    csr: &Csr,
    is_terminal: &[bool],
    root: u32,
    bound: &Bound,
    limit: u64,
) -> Vec<bool> {
    let mut doomed = vec![false; g.len()];
    let rc = &bound.reduced;
    if rc.len() != csr.target.len() {
        return doomed;
    }
    let mirror = mirrors(csr);
    // From the root along arcs u→w: the arc's reduced cost sits at w's entry, the mirror of u's.
    let from_root = dijkstra(g.vertices, &[root], |u, out: &mut Vec<(u32, u64)>| {
        for k in csr.range(u) {
            out.push((csr.target[k], rc[mirror[k]]));
        }
    });
    // Backwards from the other terminals: arc u→w is entry k of w, whose target is u.
    let sources: Vec<u32> = (0..g.vertices as u32)
        .filter(|&v| is_terminal[v as usize] && v != root)
        .collect();
    let to_term = dijkstra(g.vertices, &sources, |w, out: &mut Vec<(u32, u64)>| {
        for k in csr.range(w) {
            out.push((csr.target[k], rc[k]));
        }
    });
    let price = |x: u64, y: u64, z: u64| {
        bound
            .value
            .saturating_add(x)
            .saturating_add(y)
            .saturating_add(z)
    };
    let vertex_out = |v: u32| {
        !is_terminal[v as usize] && price(from_root[v as usize], 0, to_term[v as usize]) >= limit
    };
    for v in 0..g.vertices as u32 {
        for k in csr.range(v) {
            let w = csr.target[k];
            if w < v {
                continue;
            }
            // Entry k of v holds the arc w→v; its mirror at w holds v→w.
            let forward = price(from_root[v as usize], rc[mirror[k]], to_term[w as usize]);
            let backward = price(from_root[w as usize], rc[k], to_term[v as usize]);
            if forward.min(backward) >= limit || vertex_out(v) || vertex_out(w) {
                doomed[csr.edge[k] as usize] = true;
            }
        }
    }
    doomed
}

/// Edges longer than the bottleneck Steiner distance between their ends (found by a bounded search
/// per edge; an edge whose search runs out of labels is kept).
pub fn special_distance_doomed(g: &EdgeList, csr: &Csr, is_terminal: &[bool]) -> Vec<bool> {
    let mut doomed = vec![false; g.len()];
    let mut best = vec![u64::MAX; g.vertices];
    let mut touched: Vec<u32> = Vec::new();
    let mut heap = MinHeap::new();
    for (e, gone) in doomed.iter_mut().enumerate() {
        if !g.usable(e) {
            continue;
        }
        let [v, w] = g.ends[e];
        let c = g.cost[e];
        // Label-correcting search from v on the length of the current piece, which restarts at 0
        // on a terminal; labels at or above c are useless.
        heap.clear();
        heap.push(0, v);
        best[v as usize] = 0;
        touched.push(v);
        let mut settled = 0;
        while let Some((d, x)) = heap.pop() {
            if d > best[x as usize] {
                continue;
            }
            if x == w {
                *gone = true;
                break;
            }
            settled += 1;
            if settled > SD_LABELS {
                break;
            }
            for (y, f) in csr.neighbours(x) {
                if f as usize == e {
                    continue;
                }
                let nd = d + g.cost[f as usize];
                if nd >= c {
                    continue;
                }
                let label = if is_terminal[y as usize] && y != w {
                    0
                } else {
                    nd
                };
                if label < best[y as usize] {
                    if best[y as usize] == u64::MAX {
                        touched.push(y);
                    }
                    best[y as usize] = label;
                    heap.push(label, y);
                }
            }
        }
        for &x in &touched {
            best[x as usize] = u64::MAX;
        }
        touched.clear();
    }
    doomed
}

/// For each adjacency entry, the entry of the same edge at its other end.
fn mirrors(csr: &Csr) -> Vec<usize> {
    let mut first = vec![usize::MAX; csr.edge.iter().map(|&e| e as usize + 1).max().unwrap_or(0)];
    let mut mirror = vec![0usize; csr.edge.len()];
    for (k, &e) in csr.edge.iter().enumerate() {
        let f = &mut first[e as usize];
        if *f == usize::MAX {
            *f = k;
        } else {
            mirror[k] = *f;
            mirror[*f] = k;
        }
    }
    mirror
}

/// Shortest distances from `sources` over the arcs `arcs(u)` lists (target, length).
fn dijkstra<F>(n: usize, sources: &[u32], arcs: F) -> Vec<u64>
where
    F: Fn(u32, &mut Vec<(u32, u64)>),
{
    let mut dist = vec![u64::MAX; n];
    let mut heap = MinHeap::new();
    for &s in sources {
        dist[s as usize] = 0;
        heap.push(0, s);
    }
    let mut out = Vec::new();
    while let Some((d, u)) = heap.pop() {
        if d > dist[u as usize] {
            continue;
        }
        out.clear();
        arcs(u, &mut out);
        for &(w, len) in &out {
            let nd = d.saturating_add(len);
            if nd < dist[w as usize] {
                dist[w as usize] = nd;
                heap.push(nd, w);
            }
        }
    }
    dist
}
