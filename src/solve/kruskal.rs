//! Minimum spanning forest by Kruskal's algorithm over a compact edge list.
//!
//! Intact (zero-cost) edges need no sorting: they come first, in id order, and so do the edges of
//! the cheapest positive cost when they are many (intact roads weighed 1, say). The rest are taken
//! in rounds, after the filtering scheme of Filter-Kruskal (Osipov, Sanders & Singler 2009): each round
//! takes the edges up to a sampled median key that still join two trees (the check runs in parallel
//! against the forest so far), sorts them and scans them with disjoint sets. On road networks most
//! heavier edges close a cycle by the time their round comes and are never sorted. Keys pack
//! (cost, id) into one u64; collected in id order, they need only their cost bits radix-sorted (the
//! sort is stable). The (cost, id) order makes the forest unique: ties always go to the lower edge id,
//! whatever the thread count. Time O(m log m); the round buffers are reused, since first touches of
//! fresh memory cost as much as the sort on large graphs.

use super::disjoint::DisjointSets;
use super::graph::{EdgeList, UNUSABLE};
use super::radix::sort_parts_by_bits;
use crate::network::Cost;
use rayon::prelude::*;

/// Below this many estimated remaining edges one last round takes them all.
const LAST_ROUND_BELOW: usize = 1 << 15;

/// How many edges ahead the scan starts loading disjoint-set entries.
const LOOK_AHEAD: usize = 8;

/// The cheapest positive cost gets its own unsorted pass when at least one edge in this many has it.
const MANY_CHEAPEST: usize = 16;

/// How many edges the pivot sample aims to look at.
const SAMPLE: usize = 4096;

/// Edge ids of the minimum spanning forest of the usable edges, in ascending id order.
pub fn kruskal(g: &EdgeList) -> Vec<u32> {
    let mut ds = DisjointSets::new(g.vertices);
    let mut forest = Chosen::new(g.len(), g.vertices.saturating_sub(1));
    // Intact edges are picked out without branching (a branch taken at random half the time costs
    // more than the memory traffic here); `vec!` of zeros touches only the pages written.
    let mut intact = vec![0u32; g.len()];
    let mut count = 0;
    for ((&c, &[a, b]), e) in g.cost.iter().zip(&g.ends).zip(0u32..) {
        intact[count] = e;
        count += usize::from((c == 0) & (a != b));
    }
    for &e in &intact[..count] {
        if forest.take(g, &mut ds, e) {
            return forest.ids();
        }
    }
    let spread = g
        .cost
        .par_iter()
        .fold(Spread::default, |s, &c| s.with(c))
        .reduce(Spread::default, Spread::merge);
    let id_bits = 64 - (g.len() as u64).leading_zeros();
    let cost_bits = 64 - spread.max.leading_zeros();
    if id_bits + cost_bits > 64 {
        wide_costs(g, &mut ds, &mut forest);
        return forest.ids();
    }
    let mut done = 0; // keys up to here have had their round (every key is above 0)
    // When many edges share the cheapest positive cost (all intact roads at cost 1, say), they too
    // come next in id order with no sorting: in (cost, id) order nothing else comes between.
    if spread.at_min > 0 && spread.at_min >= g.len() / MANY_CHEAPEST {
        count = 0;
        for ((&c, &[a, b]), e) in g.cost.iter().zip(&g.ends).zip(0u32..) {
            intact[count] = e;
            count += usize::from((c == spread.min) & (a != b));
        }
        for &e in &intact[..count] {
            if forest.take(g, &mut ds, e) {
                return forest.ids();
            }
        }
        done = (spread.min << id_bits) | ((1u64 << id_bits) - 1);
    }
    drop(intact);
    let id_of = |k: u64| (k & ((1u64 << id_bits) - 1)) as u32;
    let half = g.len() / 2;
    let (mut first, mut second, mut sorted, mut scratch) = (vec![], vec![], vec![], vec![]);
    let mut roots = Vec::new();
    loop {
        // A snapshot of every junction's tree, taken in parallel: the scans below then compare two
        // nearby entries per edge instead of walking the trees.
        ds.roots_into(&mut roots);
        ds.flatten_to(&roots);
        let roots = &roots[..];
        let upto = next_pivot(g.len(), |e| {
            let (k, keep) = round_key(
                roots,
                g.cost[e],
                g.ends[e],
                e as u64,
                id_bits,
                done,
                u64::MAX,
            );
            keep.then_some(k)
        });
        // This round's edges in id order: two halves side by side, each into its own reused
        // buffer (the sort reads them as one sequence).
        let fill = |buf: &mut Vec<u64>, range: std::ops::Range<usize>| -> usize {
            if buf.len() < range.len() {
                *buf = vec![0; range.len()]; // pages are touched only as far as they are written
            }
            let ids = range.start as u64..range.end as u64;
            let mut count = 0;
            for ((&c, &ends), e) in g.cost[range.clone()].iter().zip(&g.ends[range]).zip(ids) {
                let (k, keep) = round_key(roots, c, ends, e, id_bits, done, upto);
                buf[count] = k;
                count += usize::from(keep);
            }
            count
        };
        let (n1, n2) = rayon::join(
            || fill(&mut first, 0..half),
            || fill(&mut second, half..g.len()),
        );
        sort_parts_by_bits(
            &[&first[..n1], &second[..n2]],
            id_bits,
            id_bits + cost_bits,
            &mut sorted,
            &mut scratch,
        );
        // Endpoints gathered in parallel (independent random reads overlap), so the sequential
        // scan below waits only on the disjoint sets; it reads a few edges ahead to start those
        // loads early.
        scratch.clear();
        scratch.par_extend(sorted.par_iter().map(|&k| {
            let [a, b] = g.ends[id_of(k) as usize];
            (u64::from(a) << 32) | u64::from(b)
        }));
        let mut ahead = 0i32;
        for (i, (&k, &ab)) in sorted.iter().zip(&scratch).enumerate() {
            if let Some(&next) = scratch.get(i + LOOK_AHEAD) {
                ahead ^= ds.peek((next >> 32) as u32) ^ ds.peek(next as u32);
            }
            if forest.take_pair(&mut ds, id_of(k), (ab >> 32) as u32, ab as u32) {
                break;
            }
        }
        std::hint::black_box(ahead);
        if upto == u64::MAX || forest.count == forest.limit {
            return forest.ids();
        }
        done = upto;
    }
}

/// The cheapest positive usable cost, how many edges have it, and the largest usable cost.
#[derive(Clone, Copy)]
struct Spread {
    min: Cost,
    at_min: usize,
    max: Cost,
}

impl Default for Spread {
    fn default() -> Self {
        Spread {
            min: UNUSABLE,
            at_min: 0,
            max: 0,
        }
    }
}

impl Spread {
    #[inline]
    fn with(mut self, c: Cost) -> Self {
        if c != 0 && c != UNUSABLE {
            if c < self.min {
                self.min = c;
                self.at_min = 0;
            }
            self.at_min += usize::from(c == self.min);
            self.max = self.max.max(c);
        }
        self
    }

    fn merge(a: Self, b: Self) -> Self {
        let at_min = match a.min.cmp(&b.min) {
            std::cmp::Ordering::Less => a.at_min,
            std::cmp::Ordering::Greater => b.at_min,
            std::cmp::Ordering::Equal => a.at_min + b.at_min,
        };
        Spread {
            min: a.min.min(b.min),
            at_min,
            max: a.max.max(b.max),
        }
    }
}

/// The key (cost, id) of edge `e` (cost `c`, ends `a`, `b`), and whether it takes part in the
/// round `(above, upto]`: a positive usable cost, a key in that range, ends in two different trees
/// (`roots` gives each junction's tree). Computed without branches: the round's scans test every
/// edge, and which ones pass is as good as random.
#[inline]
fn round_key(
    roots: &[u32],
    c: Cost,
    [a, b]: [u32; 2],
    e: u64,
    id_bits: u32,
    above: u64,
    upto: u64,
) -> (u64, bool) {
    let k = c.wrapping_shl(id_bits) | e;
    // Zero costs (taken before the rounds) and unusable ones fail the first comparison.
    let keep = (c.wrapping_sub(1) < UNUSABLE - 1)
        & (k > above)
        & (k <= upto)
        & (roots[a as usize] != roots[b as usize]);
    (k, keep)
}

/// The key that splits the remaining candidates about in half, from an evenly spaced sample of the
/// edges (deterministic); `u64::MAX` (take them all) once few are estimated to remain.
fn next_pivot(m: usize, key: impl Fn(usize) -> Option<u64>) -> u64 {
    let step = (m / SAMPLE).max(1);
    let mut sample: Vec<u64> = (0..m).step_by(step).filter_map(key).collect();
    if sample.len() * step < LAST_ROUND_BELOW {
        return u64::MAX;
    }
    let mid = sample.len() / 2;
    *sample.select_nth_unstable(mid).1
}

/// Costs too wide to pack with ids: a plain parallel sort of (cost, id) pairs.
fn wide_costs(g: &EdgeList, ds: &mut DisjointSets, forest: &mut Chosen) {
    let ds_ref = &*ds;
    let mut keys: Vec<(u64, u32)> = (0..g.len())
        .into_par_iter()
        .filter(|&e| {
            let [a, b] = g.ends[e];
            g.cost[e] != 0 && g.usable(e) && ds_ref.root(a) != ds_ref.root(b)
        })
        .map(|e| (g.cost[e], e as u32))
        .collect();
    keys.par_sort_unstable();
    for (_, e) in keys {
        if forest.take(g, ds, e) {
            return;
        }
    }
}

/// The forest's edges as a bitmap over edge ids, with a count to stop once the forest is complete.
struct Chosen {
    mark: Vec<u64>,
    count: usize,
    limit: usize,
}

impl Chosen {
    fn new(edges: usize, limit: usize) -> Self {
        Chosen {
            mark: vec![0; edges.div_ceil(64)],
            count: 0,
            limit,
        }
    }

    /// Adds edge `e` when it joins two trees; true once the forest is a spanning tree.
    #[inline]
    fn take(&mut self, g: &EdgeList, ds: &mut DisjointSets, e: u32) -> bool {
        let [a, b] = g.ends[e as usize];
        self.take_pair(ds, e, a, b)
    }

    /// Adds edge `e` with ends `a`, `b` when it joins two trees; true once the forest is a spanning tree.
    #[inline]
    fn take_pair(&mut self, ds: &mut DisjointSets, e: u32, a: u32, b: u32) -> bool {
        if ds.union(a, b) {
            self.mark[e as usize / 64] |= 1 << (e % 64);
            self.count += 1;
        }
        self.count == self.limit
    }

    /// The chosen ids in ascending order.
    fn ids(&self) -> Vec<u32> {
        let mut out = Vec::with_capacity(self.count);
        for (w, &bits) in self.mark.iter().enumerate() {
            let mut b = bits;
            while b != 0 {
                out.push((w * 64) as u32 + b.trailing_zeros());
                b &= b - 1;
            }
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rng::Rng;

    #[test]
    fn large_costs_take_the_wide_path() {
        let g = EdgeList {
            vertices: 3,
            ends: vec![[0, 1], [1, 2], [0, 2]],
            cost: vec![1 << 40, 5, (1 << 40) + 1],
        };
        assert_eq!(kruskal(&g), vec![0, 1]);
    }

    /// A random road-like lattice of `side` × `side` junctions with extra random chords, loops
    /// and closed roads; `cost` draws each edge's cost.
    fn lattice(side: u32, seed: u64, mut cost: impl FnMut(&mut Rng) -> Cost) -> EdgeList {
        let mut rng = Rng::new(seed);
        let n = side * side;
        let mut g = EdgeList {
            vertices: n as usize,
            ..EdgeList::default()
        };
        for v in 0..n {
            for w in [v + 1, v + side, rng.below(u64::from(n)) as u32, v] {
                if w < n && (w != v || rng.below(50) == 0) {
                    g.ends.push([v, w]);
                    let c = if rng.below(100) == 0 {
                        UNUSABLE
                    } else {
                        cost(&mut rng)
                    };
                    g.cost.push(c);
                }
            }
        }
        g
    }

    /// The rounds (taken only on large graphs) give exactly the forest of Prim's algorithm, which
    /// keys its heap by the same (cost, id) order: the forest is unique, so edge lists must match.
    #[test]
    fn rounds_match_prim_edge_for_edge() {
        type Draw = fn(&mut Rng) -> Cost;
        let draws: [(&str, Draw); 5] = [
            ("wide", |r| 1 + r.below(1 << 20)),
            ("ties", |r| 1 + r.below(3)),
            ("half intact", |r| {
                if r.below(2) == 0 {
                    0
                } else {
                    1 + r.below(5000)
                }
            }),
            ("mostly intact", |r| {
                if r.below(10) < 9 { 0 } else { 1 + r.below(100) }
            }),
            // Many edges at the cheapest positive cost take their own unsorted pass, after the
            // free ones.
            ("mostly cost 7", |r| match r.below(10) {
                0 => 0,
                1 | 2 => 7 + r.below(5000),
                _ => 7,
            }),
        ];
        for (i, (name, draw)) in draws.into_iter().enumerate() {
            let g = lattice(180, i as u64, draw);
            assert!(g.len() > 60_000, "{name}: too small to take rounds");
            let k = kruskal(&g);
            assert_eq!(k, super::super::prim::prim(&g), "{name}");
        }
    }

    /// A graph made of many small pieces: the forest stops short of a spanning tree and every
    /// round runs to the end.
    #[test]
    fn rounds_on_a_scattered_graph() {
        let mut rng = Rng::new(9);
        let n = 200_000u32;
        let mut g = EdgeList {
            vertices: n as usize,
            ..EdgeList::default()
        };
        for v in 0..n - 1 {
            if v % 7 != 6 {
                g.ends.push([v, v + 1]);
                g.cost.push(1 + rng.below(1000));
            }
        }
        let k = kruskal(&g);
        assert_eq!(k, super::super::prim::prim(&g));
        assert_eq!(k.len(), g.len()); // a forest of paths takes every edge
    }
}
