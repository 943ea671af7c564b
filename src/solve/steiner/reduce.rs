//! Exact reductions before the Steiner search, and expansion of a solution back to road edges.
//!
//! 1. Intact roads cost nothing, so each connected set of zero-cost edges becomes one vertex.
//! 2. Only the part of the graph connected to the terminals is kept; of parallel edges, the cheapest.
//! 3. Non-terminal vertices of degree 1 are removed, repeatedly (they never help a tree).
//! 4. Chains through non-terminal vertices of degree 2 become single edges with the summed cost.
//!
//! Each step keeps the optimal cost, so bounds and gaps computed on the reduced graph hold for the
//! original one.

use crate::solve::disjoint::DisjointSets;
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
    pub orig_offsets: Vec<u32>,
    /// Zero-cost component ("super vertex") of every original vertex.
    pub super_of: Vec<u32>,
    /// Zero-cost component each reduced vertex stands for.
    pub component: Vec<u32>,
}

impl Reduced {
    /// The original edges a reduced edge stands for.
    pub fn originals(&self, e: u32) -> &[u32] {
        &self.orig
            [self.orig_offsets[e as usize] as usize..self.orig_offsets[e as usize + 1] as usize]
    }
}

/// Reduces `g` for the terminal set `terminals` (original vertex ids, all mutually reachable).
///
/// The passes are laid out to touch little fresh memory (on large graphs first touches of new pages
/// cost as much as the work itself) and run on both cores where they can.
pub fn reduce(g: &EdgeList, terminals: &[u32]) -> Reduced {
    // 1. Zero-cost components; beside them, which vertices the terminals reach at all.
    let (zero, reached) = rayon::join(
        || crate::solve::components::components_where(g, |e| g.cost[e] == 0),
        || reached_by(g, terminals),
    );
    let super_of = zero.of;
    let ns = zero.count;
    let mut term = vec![false; ns];
    for &t in terminals {
        term[super_of[t as usize] as usize] = true;
    }

    // 2. Positive edges between distinct super vertices that the terminals reach; of parallel
    // edges the cheapest (ties to the lower id), in (lower end, upper end) order.
    let (sg_ends, sorig) = cheapest_super_edges(g, &super_of, ns, &reached);
    drop(reached);
    let cost_of = |e: u32| g.cost[sorig[e as usize] as usize];
    let csr = Csr::from_pairs(ns, sg_ends.len(), |e| Some(sg_ends[e]));

    // 3. Remove non-terminal leaves repeatedly.
    let mut deg: Vec<u32> = (0..ns as u32).map(|v| csr.range(v).len() as u32).collect();
    let mut alive_v: Vec<bool> = (0..ns).map(|v| term[v] || deg[v] > 0).collect();
    let mut alive_e = vec![true; sg_ends.len()];
    drop(sg_ends);
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
    let mut key_vertices: Vec<u32> = Vec::new();
    for v in 0..ns as u32 {
        if alive_v[v as usize] && key(v) {
            key_id[v as usize] = key_vertices.len() as u32;
            key_vertices.push(v);
        }
    }
    drop(alive_v);
    let keys = key_vertices.len();
    // Chains are walked from both ends in parallel and kept from the end with the lower id (loops
    // back to their start never help a tree). Parallel chains leave the same lower end, so each
    // key vertex keeps the cheapest of its own (ties to the lower first road edge) and the parts,
    // concatenated, list the chains in (lower end, upper end) order.
    let walk_from = |ks: &[u32]| {
        let mut out = Chains::default();
        let mut found: Vec<Found> = Vec::new();
        let mut walked: Vec<u32> = Vec::new();
        for &k in ks {
            found.clear();
            walked.clear();
            for (first_w, first_e) in csr.neighbours(k) {
                if !alive_e[first_e as usize] {
                    continue;
                }
                let start = walked.len();
                let mut cost = 0u64;
                let (mut cur, mut e) = (first_w, first_e);
                loop {
                    cost += cost_of(e);
                    walked.push(sorig[e as usize]);
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
                    found.push(Found {
                        other: key_id[cur as usize],
                        cost,
                        first: walked[start],
                        span: [start, walked.len()],
                    });
                } else {
                    walked.truncate(start);
                }
            }
            found.sort_unstable_by_key(|f| (f.other, f.cost, f.first));
            let mut last = u32::MAX;
            for f in &found {
                if f.other != last {
                    last = f.other;
                    out.ends.push([key_id[k as usize], f.other]);
                    out.cost.push(f.cost);
                    out.path.extend_from_slice(&walked[f.span[0]..f.span[1]]);
                    out.end.push(out.path.len() as u32);
                }
            }
        }
        out
    };
    let parts: Vec<Chains> = key_vertices.par_chunks(1024).map(walk_from).collect();
    let (graph, orig, orig_offsets) = join_parts(keys, &parts);
    let is_terminal: Vec<bool> = key_vertices.iter().map(|&s| term[s as usize]).collect();
    let rterms: Vec<u32> = (0..keys as u32)
        .filter(|&k| is_terminal[k as usize])
        .collect();
    Reduced {
        graph,
        terminals: rterms,
        is_terminal,
        orig,
        orig_offsets,
        super_of,
        component: key_vertices,
    }
}

/// The reduced graph and its map to road edges from the chains of all parts, copied in parallel
/// into fresh arrays (their first touches, page faults, are then shared by the threads too).
fn join_parts(keys: usize, parts: &[Chains]) -> (EdgeList, Vec<u32>, Vec<u32>) {
    let edges: usize = parts.iter().map(|p| p.ends.len()).sum();
    let paths: usize = parts.iter().map(|p| p.path.len()).sum();
    let mut ends = vec![[0u32; 2]; edges];
    let mut cost = vec![0u64; edges];
    let mut orig = vec![0u32; paths];
    let mut offsets = vec![0u32; edges + 1];
    let mut jobs = Vec::with_capacity(parts.len());
    let (mut e_rest, mut c_rest) = (&mut ends[..], &mut cost[..]);
    let (mut o_rest, mut f_rest) = (&mut orig[..], &mut offsets[1..]);
    let mut base = 0u32;
    for part in parts {
        let k = part.ends.len();
        let (e, e_tail) = std::mem::take(&mut e_rest).split_at_mut(k);
        let (c, c_tail) = std::mem::take(&mut c_rest).split_at_mut(k);
        let (f, f_tail) = std::mem::take(&mut f_rest).split_at_mut(k);
        let (o, o_tail) = std::mem::take(&mut o_rest).split_at_mut(part.path.len());
        (e_rest, c_rest, f_rest, o_rest) = (e_tail, c_tail, f_tail, o_tail);
        jobs.push((part, e, c, o, f, base));
        base += part.path.len() as u32;
    }
    jobs.into_par_iter().for_each(|(part, e, c, o, f, base)| {
        e.copy_from_slice(&part.ends);
        c.copy_from_slice(&part.cost);
        o.copy_from_slice(&part.path);
        for (x, &end) in f.iter_mut().zip(&part.end) {
            *x = base + end;
        }
    });
    let graph = EdgeList {
        vertices: keys,
        ends,
        cost,
    };
    (graph, orig, offsets)
}

/// Whether each vertex shares a component (over usable edges) with a terminal.
fn reached_by(g: &EdgeList, terminals: &[u32]) -> Vec<bool> {
    let mut ds = DisjointSets::new(g.vertices);
    for e in 0..g.len() {
        if g.usable(e) {
            let [a, b] = g.ends[e];
            ds.union(a, b);
        }
    }
    let mut hit = vec![false; g.vertices];
    for &t in terminals {
        hit[ds.find(t) as usize] = true;
    }
    (0..g.vertices as u32)
        .into_par_iter()
        .map(|v| hit[ds.root(v) as usize])
        .collect()
}

/// The edges of the super graph: for every pair of distinct super vertices joined by positive,
/// usable edges of reached vertices, the cheapest such edge (ties to the lower id). Returns the
/// pairs `[a, b]` (a < b) in ascending order and the original edge of each.
fn cheapest_super_edges(
    g: &EdgeList,
    super_of: &[u32],
    ns: usize,
    reached: &[bool],
) -> (Vec<[u32; 2]>, Vec<u32>) {
    // Candidates as [lower end, upper end, edge], in edge order, picked out in parallel runs of
    // edges. Which edges pass is as good as random, so the picking does not branch: every edge is
    // written and only a passing one advances the count.
    const RUN: usize = 1 << 16;
    let runs: Vec<Vec<[u32; 3]>> = g
        .ends
        .par_chunks(RUN)
        .enumerate()
        .map(|(r, ends)| {
            let mut out = vec![[0u32; 3]; ends.len()];
            let mut count = 0;
            for (i, &[a, b]) in ends.iter().enumerate() {
                let e = r * RUN + i;
                let c = g.cost[e];
                let (sa, sb) = (super_of[a as usize], super_of[b as usize]);
                out[count] = [sa.min(sb), sa.max(sb), e as u32];
                count += usize::from((c != 0) & (c != UNUSABLE) & (sa != sb) & reached[a as usize]);
            }
            out.truncate(count);
            out
        })
        .collect();
    // Group them by lower end with a counting sort; bucket a is `offsets[a]..offsets[a + 1]`.
    let mut offsets = vec![0u32; ns + 1];
    for &[lo, _, _] in runs.iter().flatten() {
        offsets[lo as usize + 1] += 1;
    }
    for v in 0..ns {
        offsets[v + 1] += offsets[v];
    }
    let total = offsets[ns] as usize;
    // Split the buckets into one range per thread of about equal size; each thread fills and
    // reduces its own part of the grouped array.
    let parts = rayon::current_num_threads().clamp(1, 8);
    let mut cuts = vec![0usize];
    for k in 1..parts {
        let want = (total * k / parts) as u32;
        cuts.push(
            offsets
                .partition_point(|&o| o < want)
                .min(ns)
                .max(cuts[k - 1]),
        );
    }
    cuts.push(ns);
    let mut grouped = vec![[0u32; 2]; total];
    let mut pieces = Vec::with_capacity(parts);
    let mut rest = &mut grouped[..];
    for k in 0..parts {
        let (lo, hi) = (cuts[k], cuts[k + 1]);
        let len = (offsets[hi] - offsets[lo]) as usize;
        let (head, tail) = rest.split_at_mut(len);
        pieces.push((lo, hi, head));
        rest = tail;
    }
    let chosen: Vec<(Vec<[u32; 2]>, Vec<u32>)> = pieces
        .into_par_iter()
        .map(|(lo, hi, part)| {
            let base = offsets[lo];
            let mut fill: Vec<u32> = offsets[lo..hi].iter().map(|&o| o - base).collect();
            for &[a, b, e] in runs.iter().flatten() {
                let a = a as usize;
                if (lo..hi).contains(&a) {
                    let slot = &mut fill[a - lo];
                    part[*slot as usize] = [b, e];
                    *slot += 1;
                }
            }
            // Per lower end, the cheapest edge to each upper end, upper ends ascending.
            let mut ends = Vec::with_capacity(part.len());
            let mut orig = Vec::with_capacity(part.len());
            for a in lo..hi {
                let bucket =
                    &mut part[(offsets[a] - base) as usize..(offsets[a + 1] - base) as usize];
                if bucket.len() > 1 {
                    bucket.sort_unstable_by_key(|&[b, e]| (b, g.cost[e as usize], e));
                }
                let mut last = u32::MAX;
                for &[b, e] in bucket.iter() {
                    if b != last {
                        last = b;
                        ends.push([a as u32, b]);
                        orig.push(e);
                    }
                }
            }
            (ends, orig)
        })
        .collect();
    drop(runs);
    let mut ends = Vec::with_capacity(chosen.iter().map(|c| c.0.len()).sum());
    let mut orig = Vec::with_capacity(ends.capacity());
    for (e, o) in chosen {
        ends.extend_from_slice(&e);
        orig.extend_from_slice(&o);
    }
    (ends, orig)
}

/// A chain found from a key vertex: its other end (key id), cost, first road edge, and where its
/// road edges sit in the walk buffer.
struct Found {
    other: u32,
    cost: u64,
    first: u32,
    span: [usize; 2],
}

/// Chains kept from a run of key vertices: key pairs, costs, and the original edges of chain `i`
/// ending at `path[end[i]]` (each starts where the previous one ended).
#[derive(Default)]
struct Chains {
    ends: Vec<[u32; 2]>,
    cost: Vec<u64>,
    end: Vec<u32>,
    path: Vec<u32>,
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
    // A BFS spanning forest over intact edges of the touched components. Picking those out means a
    // look at every road edge, the costly part here, so it runs in parallel (in id order).
    let intact: Vec<u32> = (0..g.len() as u32)
        .into_par_iter()
        .filter(|&e| {
            let [a, b] = g.ends[e as usize];
            g.cost[e as usize] == 0 && a != b && touched[red.super_of[a as usize] as usize]
        })
        .collect();
    let csr = Csr::from_pairs(n, intact.len(), |i| Some(g.ends[intact[i] as usize]));
    let mut seen = vec![false; n];
    let mut queue = std::collections::VecDeque::new();
    for s in 0..n as u32 {
        if seen[s as usize] || !need[s as usize] || !touched[red.super_of[s as usize] as usize] {
            continue;
        }
        seen[s as usize] = true;
        queue.push_back(s);
        while let Some(v) = queue.pop_front() {
            for (w, i) in csr.neighbours(v) {
                if !seen[w as usize] {
                    seen[w as usize] = true;
                    edges.push(intact[i as usize]);
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
    let verts = g.ends_of(edges);
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
        /// The grouped, linear-time choice equals filtering the candidates, sorting them by
        /// (lower end, upper end, cost, id) and keeping the first of each pair.
        #[test]
        fn cheapest_super_edges_equals_sort_and_dedup(
            edges in proptest::collection::vec((0u32..14, 0u32..14, 0u64..5), 0..200),
            supers in proptest::collection::vec(0u32..9, 14),
            reached in proptest::collection::vec(any::<bool>(), 14),
        ) {
            let g = EdgeList {
                vertices: 14,
                ends: edges.iter().map(|&(a, b, _)| [a, b]).collect(),
                cost: edges
                    .iter()
                    .map(|&(_, _, c)| if c == 4 { UNUSABLE } else { c })
                    .collect(),
            };
            // Split into one, two or three ranges of buckets, as by the thread count.
            let runs: Vec<(Vec<[u32; 2]>, Vec<u32>)> = [1, 2, 3]
                .iter()
                .map(|&t| {
                    let pool = rayon::ThreadPoolBuilder::new().num_threads(t).build().unwrap();
                    pool.install(|| cheapest_super_edges(&g, &supers, 9, &reached))
                })
                .collect();
            prop_assert_eq!(&runs[0], &runs[1]);
            prop_assert_eq!(&runs[0], &runs[2]);
            let (ends, orig) = runs[0].clone();
            let mut want: Vec<([u32; 2], u64, u32)> = (0..g.len())
                .filter(|&e| {
                    let [a, b] = g.ends[e];
                    let c = g.cost[e];
                    c != 0 && c != UNUSABLE && supers[a as usize] != supers[b as usize]
                        && reached[a as usize]
                })
                .map(|e| {
                    let [a, b] = g.ends[e];
                    let (sa, sb) = (supers[a as usize], supers[b as usize]);
                    ([sa.min(sb), sa.max(sb)], g.cost[e], e as u32)
                })
                .collect();
            want.sort_unstable();
            want.dedup_by_key(|w| w.0);
            prop_assert_eq!(ends, want.iter().map(|w| w.0).collect::<Vec<_>>());
            prop_assert_eq!(orig, want.iter().map(|w| w.2).collect::<Vec<_>>());
        }
    }
}
