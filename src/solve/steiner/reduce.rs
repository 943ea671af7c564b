//! Exact reductions before the Steiner search, and expansion of a solution back to road edges.
//!
//! 1. Intact roads cost nothing, so each connected set of zero-cost edges becomes one vertex.
//! 2. Only the part of the graph connected to the terminals is kept; of parallel edges, the cheapest.
//! 3. Non-terminal vertices of degree 1 are removed, repeatedly (they never help a tree).
//! 4. Chains through non-terminal vertices of degree 2 become single edges with the summed cost.
//!
//! Each step keeps the optimal cost, so bounds and gaps computed on the reduced graph hold for the
//! original one.

use crate::solve::graph::{Csr, EdgeList, UNUSABLE};
use rayon::prelude::*;

/// The reduced graph and the maps back to the original.
#[derive(Debug, Clone)]
pub struct Reduced {
    /// Reduced graph (all costs positive, no loops, no parallel edges).
    pub graph: EdgeList,
    /// Reduced terminal vertices, ascending.
    pub terminals: Vec<u32>,
    /// Whether each reduced vertex is a terminal.
    pub is_terminal: Vec<bool>,
    /// Original edge ids of reduced edge `e`: `orig[orig_offsets[e]..orig_offsets[e + 1]]`.
    pub orig: Vec<u32>,
    /// Offsets into `orig`.
    pub orig_offsets: Vec<usize>,
    /// Zero-cost component ("super vertex") of every original vertex.
    pub super_of: Vec<u32>,
}

impl Reduced {
    /// The original edges a reduced edge stands for.
    pub fn originals(&self, e: u32) -> &[u32] {
        &self.orig[self.orig_offsets[e as usize]..self.orig_offsets[e as usize + 1]]
    }
}

/// Reduces `g` for the terminal set `terminals` (original vertex ids, all mutually reachable).
pub fn reduce(g: &EdgeList, terminals: &[u32]) -> Reduced {
    // 1. Zero-cost components.
    let zero = crate::solve::components::components_where(g, |e| g.cost[e] == 0);
    let super_of = zero.of;
    let ns = zero.count;
    let mut term = vec![false; ns];
    for &t in terminals {
        term[super_of[t as usize] as usize] = true;
    }

    // 2. Positive edges between distinct super vertices; cheapest of parallel edges.
    // Picked out without branching: which edges pass is as good as random.
    let mut cand = vec![0u32; g.len()];
    let mut cand_pair = vec![[0u32; 2]; g.len()];
    let mut count = 0;
    for ((&c, &[a, b]), e) in g.cost.iter().zip(&g.ends).zip(0u32..) {
        let (sa, sb) = (super_of[a as usize], super_of[b as usize]);
        cand[count] = e;
        cand_pair[count] = [sa.min(sb), sa.max(sb)];
        count += usize::from((c != 0) & (c != UNUSABLE) & (sa != sb));
    }
    cand.truncate(count);
    cand_pair.truncate(count);
    let kept = cheapest_per_pair(ns, &cand_pair, |i| (g.cost[cand[i] as usize], cand[i]));
    let sg = EdgeList {
        vertices: ns,
        ends: kept.iter().map(|&i| cand_pair[i as usize]).collect(),
        cost: kept
            .iter()
            .map(|&i| g.cost[cand[i as usize] as usize])
            .collect(),
    };
    let sorig: Vec<u32> = kept.iter().map(|&i| cand[i as usize]).collect();
    drop((cand, cand_pair, kept));
    let csr = Csr::from_edges(&sg);

    // Keep what the terminals reach.
    let mut alive_v = vec![false; ns];
    let mut stack: Vec<u32> = (0..ns as u32).filter(|&s| term[s as usize]).collect();
    for &s in &stack {
        alive_v[s as usize] = true;
    }
    while let Some(v) = stack.pop() {
        for (w, _) in csr.neighbours(v) {
            if !alive_v[w as usize] {
                alive_v[w as usize] = true;
                stack.push(w);
            }
        }
    }

    // 3. Remove non-terminal leaves repeatedly.
    let mut alive_e: Vec<bool> = sg.ends.iter().map(|&[a, _]| alive_v[a as usize]).collect();
    let mut deg = vec![0u32; ns];
    for (e, &[a, b]) in sg.ends.iter().enumerate() {
        if alive_e[e] {
            deg[a as usize] += 1;
            deg[b as usize] += 1;
        }
    }
    let mut queue: Vec<u32> = (0..ns as u32)
        .filter(|&v| alive_v[v as usize] && !term[v as usize] && deg[v as usize] <= 1)
        .collect();
    while let Some(v) = queue.pop() {
        if !alive_v[v as usize] {
            continue;
        }
        alive_v[v as usize] = false;
        for (w, e) in csr.neighbours(v) {
            if alive_e[e as usize] {
                alive_e[e as usize] = false;
                deg[v as usize] -= 1;
                deg[w as usize] -= 1;
                if !term[w as usize] && deg[w as usize] <= 1 {
                    queue.push(w);
                }
            }
        }
    }

    // 4. Contract degree-2 chains between key vertices (terminals and degree ≠ 2).
    let key = |v: u32| term[v as usize] || deg[v as usize] != 2;
    let mut key_id = vec![u32::MAX; ns];
    let mut keys = 0u32;
    for v in 0..ns as u32 {
        if alive_v[v as usize] && key(v) {
            key_id[v as usize] = keys;
            keys += 1;
        }
    }
    // Chains are walked from both ends in parallel and kept from the end with the lower id (loops
    // back to their start never help a tree); concatenated in that end's order, the list is the
    // same as a sequential walk would give.
    let key_vertices: Vec<u32> = (0..ns as u32)
        .filter(|&v| key_id[v as usize] != u32::MAX)
        .collect();
    let walk_from = |ks: &[u32]| {
        let mut out = Chains::default();
        for &k in ks {
            for (first_w, first_e) in csr.neighbours(k) {
                if !alive_e[first_e as usize] {
                    continue;
                }
                let start = out.path.len();
                let mut cost = 0u64;
                let (mut cur, mut e) = (first_w, first_e);
                loop {
                    cost += sg.cost[e as usize];
                    out.path.push(sorig[e as usize]);
                    if key_id[cur as usize] != u32::MAX || cur == k {
                        break;
                    }
                    // A degree-2 non-terminal: continue along its other live edge.
                    match csr
                        .neighbours(cur)
                        .find(|&(_, e2)| e2 != e && alive_e[e2 as usize])
                    {
                        Some((w2, e2)) => (cur, e) = (w2, e2),
                        None => break,
                    }
                }
                if key_id[cur as usize] != u32::MAX && cur > k {
                    out.pair.push([key_id[k as usize], key_id[cur as usize]]);
                    out.cost.push(cost);
                    out.end.push(out.path.len());
                } else {
                    out.path.truncate(start);
                }
            }
        }
        out
    };
    let parts: Vec<Chains> = key_vertices.par_chunks(1024).map(walk_from).collect();
    let chains: usize = parts.iter().map(|p| p.pair.len()).sum();
    let mut chain_pair: Vec<[u32; 2]> = Vec::with_capacity(chains);
    let mut chain_cost: Vec<u64> = Vec::with_capacity(chains);
    let mut chain_start: Vec<usize> = Vec::with_capacity(chains + 1);
    chain_start.push(0);
    let mut path: Vec<u32> = Vec::with_capacity(parts.iter().map(|p| p.path.len()).sum());
    for part in parts {
        let base = path.len();
        chain_pair.extend_from_slice(&part.pair);
        chain_cost.extend_from_slice(&part.cost);
        chain_start.extend(part.end.iter().map(|&e| base + e));
        path.extend_from_slice(&part.path);
    }
    // Of parallel chains, the cheapest (ties to the one whose first road edge has the lower id).
    let first = |i: usize| path[chain_start[i]];
    let kept = cheapest_per_pair(keys as usize, &chain_pair, |i| (chain_cost[i], first(i)));

    let mut graph = EdgeList {
        vertices: keys as usize,
        ends: Vec::with_capacity(kept.len()),
        cost: Vec::with_capacity(kept.len()),
    };
    let mut orig = Vec::new();
    let mut orig_offsets = Vec::with_capacity(kept.len() + 1);
    orig_offsets.push(0);
    for &i in &kept {
        let i = i as usize;
        graph.ends.push(chain_pair[i]);
        graph.cost.push(chain_cost[i]);
        orig.extend_from_slice(&path[chain_start[i]..chain_start[i + 1]]);
        orig_offsets.push(orig.len());
    }
    let mut is_terminal = vec![false; keys as usize];
    let mut rterms = Vec::new();
    for s in 0..ns {
        if term[s] && key_id[s] != u32::MAX {
            is_terminal[key_id[s] as usize] = true;
            rterms.push(key_id[s]);
        }
    }
    Reduced {
        graph,
        terminals: rterms,
        is_terminal,
        orig,
        orig_offsets,
        super_of,
    }
}

/// Chains walked from a run of key vertices: key pairs, costs, and the original edges of chain `i`
/// ending at `path[end[i]]` (each starts where the previous one ended).
#[derive(Default)]
struct Chains {
    pair: Vec<[u32; 2]>,
    cost: Vec<u64>,
    end: Vec<usize>,
    path: Vec<u32>,
}

/// Of the items with vertex pairs `pairs` (each `[a, b]` with a < b < n), the one of least `rank`
/// per pair, as item indices in (a, b) order: the result of sorting by (a, b, rank) and keeping the
/// first of each pair, in linear time plus a sort of each vertex's own few pairs.
fn cheapest_per_pair<R: Ord>(n: usize, pairs: &[[u32; 2]], rank: impl Fn(usize) -> R) -> Vec<u32> {
    let mut offsets = vec![0usize; n + 1];
    for &[a, _] in pairs {
        offsets[a as usize + 1] += 1;
    }
    for v in 0..n {
        offsets[v + 1] += offsets[v];
    }
    let mut fill = offsets.clone();
    let mut by_first = vec![0u32; pairs.len()];
    for (i, &[a, _]) in pairs.iter().enumerate() {
        by_first[fill[a as usize]] = i as u32;
        fill[a as usize] += 1;
    }
    drop(fill);
    let mut best = vec![u32::MAX; n];
    let mut seconds: Vec<u32> = Vec::new();
    let mut out = Vec::with_capacity(pairs.len());
    for a in 0..n {
        seconds.clear();
        for &i in &by_first[offsets[a]..offsets[a + 1]] {
            let b = pairs[i as usize][1] as usize;
            let cur = best[b];
            if cur == u32::MAX {
                best[b] = i;
                seconds.push(b as u32);
            } else if rank(i as usize) < rank(cur as usize) {
                best[b] = i;
            }
        }
        seconds.sort_unstable();
        for &b in &seconds {
            out.push(best[b as usize]);
            best[b as usize] = u32::MAX;
        }
    }
    out
}

/// Original edges of a solution: the road edges behind the chosen reduced edges, plus the intact
/// edges needed to join them and the terminals inside each zero-cost component (a spanning tree of
/// each touched component, pruned to what connects something).
pub fn expand(g: &EdgeList, red: &Reduced, chosen: &[u32], terminals: &[u32]) -> Vec<u32> {
    let n = g.vertices;
    let mut need = vec![false; n];
    for &t in terminals {
        need[t as usize] = true;
    }
    let mut edges: Vec<u32> = Vec::new();
    for &e in chosen {
        for &o in red.originals(e) {
            edges.push(o);
            let [a, b] = g.ends[o as usize];
            need[a as usize] = true;
            need[b as usize] = true;
        }
    }
    // Zero-cost components that hold something needed.
    let supers = red
        .super_of
        .iter()
        .copied()
        .max()
        .map_or(0, |m| m as usize + 1);
    let mut touched = vec![false; supers];
    for v in 0..n {
        if need[v] {
            touched[red.super_of[v] as usize] = true;
        }
    }
    // A BFS spanning forest over intact edges of the touched components.
    let csr = Csr::from_edges_where(g, |e| {
        g.cost[e] == 0 && touched[red.super_of[g.ends[e][0] as usize] as usize]
    });
    let mut seen = vec![false; n];
    let mut queue = std::collections::VecDeque::new();
    for s in 0..n as u32 {
        if seen[s as usize] || !need[s as usize] || !touched[red.super_of[s as usize] as usize] {
            continue;
        }
        seen[s as usize] = true;
        queue.push_back(s);
        while let Some(v) = queue.pop_front() {
            for (w, e) in csr.neighbours(v) {
                if !seen[w as usize] {
                    seen[w as usize] = true;
                    edges.push(e);
                    queue.push_back(w);
                }
            }
        }
    }
    prune_leaves(g, &mut edges, &need);
    edges.sort_unstable();
    edges
}

/// Removes, repeatedly, edges that end in a vertex of degree 1 that is not needed.
///
/// Works in time and memory proportional to the number of edges (vertices are renumbered locally),
/// so local search can call it on small trees inside a huge graph.
pub fn prune_leaves(g: &EdgeList, edges: &mut Vec<u32>, need: &[bool]) {
    let mut verts: Vec<u32> = edges.iter().flat_map(|&e| g.ends[e as usize]).collect();
    verts.sort_unstable();
    verts.dedup();
    let local = |v: u32| verts.binary_search(&v).unwrap_or(0);
    let k = verts.len();
    prune_leaves_local(g, edges, |v| need[verts[v] as usize], local, k);
}

/// [`prune_leaves`] with the caller's own local numbering `local` of the `k` vertices involved;
/// `need(local id)` tells which vertices must stay.
pub fn prune_leaves_local<N, L>(g: &EdgeList, edges: &mut Vec<u32>, need: N, local: L, k: usize)
where
    N: Fn(usize) -> bool,
    L: Fn(u32) -> usize,
{
    let mut deg = vec![0u32; k];
    let mut ends: Vec<[usize; 2]> = Vec::with_capacity(edges.len());
    for &e in edges.iter() {
        let [a, b] = g.ends[e as usize];
        let (la, lb) = (local(a), local(b));
        deg[la] += 1;
        deg[lb] += 1;
        ends.push([la, lb]);
    }
    // Incident edge lists in CSR form.
    let mut off = vec![0usize; k + 1];
    for &[a, b] in &ends {
        off[a + 1] += 1;
        off[b + 1] += 1;
    }
    for i in 0..k {
        off[i + 1] += off[i];
    }
    let mut fill = off.clone();
    let mut inc = vec![0u32; off[k]];
    for (i, &[a, b]) in ends.iter().enumerate() {
        inc[fill[a]] = i as u32;
        fill[a] += 1;
        inc[fill[b]] = i as u32;
        fill[b] += 1;
    }
    let mut alive = vec![true; edges.len()];
    let mut stack: Vec<usize> = (0..k).filter(|&v| deg[v] == 1 && !need(v)).collect();
    while let Some(v) = stack.pop() {
        if deg[v] != 1 {
            continue;
        }
        let Some(&i) = inc[off[v]..off[v + 1]].iter().find(|&&i| alive[i as usize]) else {
            continue;
        };
        alive[i as usize] = false;
        let [a, b] = ends[i as usize];
        let w = if a == v { b } else { a };
        deg[v] -= 1;
        deg[w] -= 1;
        if deg[w] == 1 && !need(w) {
            stack.push(w);
        }
    }
    let mut i = 0;
    edges.retain(|_| {
        let keep = alive[i];
        i += 1;
        keep
    });
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        /// The linear-time choice equals sorting by (a, b, rank) and keeping the first of each pair.
        #[test]
        fn cheapest_per_pair_equals_sort_and_dedup(
            items in proptest::collection::vec((0u32..12, 0u32..12, 0u64..5), 0..200)
        ) {
            let pairs: Vec<[u32; 2]> = items
                .iter()
                .map(|&(a, b, _)| [a.min(b), a.max(b) + 1])
                .collect();
            let rank = |i: usize| (items[i].2, i);
            let got = cheapest_per_pair(13, &pairs, rank);
            let mut want: Vec<usize> = (0..pairs.len()).collect();
            want.sort_by_key(|&i| (pairs[i], rank(i)));
            want.dedup_by_key(|i| pairs[*i]);
            let want: Vec<u32> = want.into_iter().map(|i| i as u32).collect();
            prop_assert_eq!(got, want);
        }
    }
}
