//! Minimum-cost arborescence (directed spanning tree out of a root): Edmonds' cycle contraction
//! with mergeable heaps of incoming arcs and a disjoint-set forest that can be rolled back to
//! recover the chosen arcs (Tarjan 1977; Gabow, Galil, Spencer & Tarjan 1986), O(m log m).
//!
//! Heaps are leftist heaps (right spines of logarithmic length) so merging recurses only
//! O(log m) deep.

/// A directed arc `from → to` with a non-negative cost.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Arc {
    /// Tail.
    pub from: u32,
    /// Head.
    pub to: u32,
    /// Cost.
    pub cost: i64,
}

const NIL: u32 = u32::MAX;

/// Leftist heap nodes in one arena; each node holds one arc, keyed by (reduced cost, arc id).
struct Heaps {
    key: Vec<i64>,
    arc: Vec<u32>,
    delta: Vec<i64>,
    left: Vec<u32>,
    right: Vec<u32>,
    rank: Vec<u32>,
}

impl Heaps {
    fn push_down(&mut self, a: u32) {
        let a = a as usize;
        let d = self.delta[a];
        if d != 0 {
            self.key[a] += d;
            for c in [self.left[a], self.right[a]] {
                if c != NIL {
                    self.delta[c as usize] += d;
                }
            }
            self.delta[a] = 0;
        }
    }

    fn rank_of(&self, a: u32) -> u32 {
        if a == NIL { 0 } else { self.rank[a as usize] }
    }

    fn merge(&mut self, a: u32, b: u32) -> u32 {
        if a == NIL {
            return b;
        }
        if b == NIL {
            return a;
        }
        self.push_down(a);
        self.push_down(b);
        let (a, b) = if (self.key[b as usize], self.arc[b as usize])
            < (self.key[a as usize], self.arc[a as usize])
        {
            (b, a)
        } else {
            (a, b)
        };
        let r = self.merge(self.right[a as usize], b);
        let ai = a as usize;
        self.right[ai] = r;
        if self.rank_of(self.left[ai]) < self.rank_of(self.right[ai]) {
            let (l, r) = (self.left[ai], self.right[ai]);
            self.left[ai] = r;
            self.right[ai] = l;
        }
        self.rank[ai] = self.rank_of(self.right[ai]) + 1;
        a
    }

    fn pop(&mut self, a: u32) -> u32 {
        self.push_down(a);
        self.merge(self.left[a as usize], self.right[a as usize])
    }
}

/// Disjoint sets without path compression, so unions can be undone in reverse order.
struct RollbackSets {
    parent: Vec<i64>,
    history: Vec<(usize, i64)>,
}

impl RollbackSets {
    fn find(&self, mut x: usize) -> usize {
        while self.parent[x] >= 0 {
            x = self.parent[x] as usize;
        }
        x
    }

    fn time(&self) -> usize {
        self.history.len()
    }

    fn rollback(&mut self, t: usize) {
        while self.history.len() > t {
            let (i, v) = self.history.pop().expect("history");
            self.parent[i] = v;
        }
    }

    fn join(&mut self, a: usize, b: usize) -> bool {
        let (mut a, mut b) = (self.find(a), self.find(b));
        if a == b {
            return false;
        }
        if self.parent[a] > self.parent[b] {
            std::mem::swap(&mut a, &mut b);
        }
        self.history.push((a, self.parent[a]));
        self.history.push((b, self.parent[b]));
        self.parent[a] += self.parent[b];
        self.parent[b] = a as i64;
        true
    }
}

/// The cheapest arborescence of `n` vertices rooted at `root`: its cost and, for every vertex, the
/// index of the arc entering it (`None` for the root). `None` when some vertex cannot be reached.
/// Ties are broken by arc index, so the result is deterministic.
pub fn min_arborescence(n: usize, root: u32, arcs: &[Arc]) -> Option<(i128, Vec<Option<u32>>)> {
    let m = arcs.len();
    let mut h = Heaps {
        key: arcs.iter().map(|a| a.cost).collect(),
        arc: (0..m as u32).collect(),
        delta: vec![0; m],
        left: vec![NIL; m],
        right: vec![NIL; m],
        rank: vec![1; m],
    };
    let mut heap = vec![NIL; n];
    for (i, a) in arcs.iter().enumerate() {
        if a.to != root && a.from != a.to {
            heap[a.to as usize] = h.merge(heap[a.to as usize], i as u32);
        }
    }
    let mut sets = RollbackSets {
        parent: vec![-1; n],
        history: Vec::new(),
    };
    let mut seen = vec![usize::MAX; n];
    seen[root as usize] = root as usize;
    let mut path = vec![0usize; n];
    let mut queue = vec![0u32; n];
    let mut chosen: Vec<Option<u32>> = vec![None; n];
    let mut total: i128 = 0;
    // Contracted cycles, most recent last: (super-vertex, union time, arcs on the cycle).
    let mut cycles: Vec<(usize, usize, Vec<u32>)> = Vec::new();
    for s in 0..n {
        let mut u = s;
        let mut qi = 0usize;
        while seen[u] == usize::MAX {
            let top = heap[u];
            if top == NIL {
                return None;
            }
            h.push_down(top);
            let (w, a) = (h.key[top as usize], h.arc[top as usize]);
            h.delta[top as usize] -= w;
            heap[u] = h.pop(top);
            queue[qi] = a;
            path[qi] = u;
            qi += 1;
            seen[u] = s;
            total += w as i128;
            u = sets.find(arcs[a as usize].from as usize);
            if seen[u] == s {
                // A cycle: contract it into one vertex whose heap holds all its incoming arcs.
                let mut merged = NIL;
                let end = qi;
                let time = sets.time();
                loop {
                    qi -= 1;
                    let w = path[qi];
                    merged = h.merge(merged, heap[w]);
                    if !sets.join(u, w) {
                        break;
                    }
                }
                u = sets.find(u);
                heap[u] = merged;
                seen[u] = usize::MAX;
                cycles.push((u, time, queue[qi..end].to_vec()));
            }
        }
        for &a in &queue[..qi] {
            chosen[sets.find(arcs[a as usize].to as usize)] = Some(a);
        }
    }
    // Expand the cycles, newest first: every cycle arc stays except the one into the vertex the
    // cycle was entered at.
    while let Some((u, time, comp)) = cycles.pop() {
        sets.rollback(time);
        let entering = chosen[u];
        for &a in &comp {
            chosen[sets.find(arcs[a as usize].to as usize)] = Some(a);
        }
        if let Some(a) = entering {
            chosen[sets.find(arcs[a as usize].to as usize)] = Some(a);
        }
    }
    chosen[root as usize] = None;
    Some((total, chosen))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rng::Rng;

    /// Every choice of one entering arc per non-root vertex that forms an arborescence.
    fn brute_force(n: usize, root: u32, arcs: &[Arc]) -> Option<i64> {
        let entering: Vec<Vec<usize>> = (0..n)
            .map(|v| {
                (0..arcs.len())
                    .filter(|&i| arcs[i].to == v as u32 && arcs[i].from != v as u32)
                    .collect()
            })
            .collect();
        let mut best: Option<i64> = None;
        let mut pick = vec![0usize; n];
        loop {
            // Evaluate the current pick.
            let mut ok = true;
            let mut cost = 0i64;
            let mut par = vec![u32::MAX; n];
            for v in 0..n {
                if v as u32 == root {
                    continue;
                }
                if entering[v].is_empty() {
                    return None;
                }
                let a = arcs[entering[v][pick[v]]];
                par[v] = a.from;
                cost += a.cost;
            }
            for v in 0..n {
                let mut x = v as u32;
                let mut steps = 0;
                while x != root && steps <= n {
                    x = par[x as usize];
                    steps += 1;
                }
                if x != root {
                    ok = false;
                    break;
                }
            }
            if ok && best.is_none_or(|b| cost < b) {
                best = Some(cost);
            }
            // Next pick (odometer).
            let mut v = 0;
            loop {
                if v == n {
                    return best;
                }
                if v as u32 != root && pick[v] + 1 < entering[v].len() {
                    pick[v] += 1;
                    break;
                }
                pick[v] = 0;
                v += 1;
            }
        }
    }

    #[test]
    fn matches_brute_force_on_small_digraphs() {
        let mut rng = Rng::new(7);
        let mut compared = 0;
        for _ in 0..400 {
            let n = 2 + rng.below(5) as usize;
            let m = rng.below(14) as usize + n;
            let arcs: Vec<Arc> = (0..m)
                .map(|_| Arc {
                    from: rng.below(n as u64) as u32,
                    to: rng.below(n as u64) as u32,
                    cost: rng.below(10) as i64,
                })
                .collect();
            let root = rng.below(n as u64) as u32;
            let want = brute_force(n, root, &arcs);
            let got = min_arborescence(n, root, &arcs);
            match (want, got) {
                (None, None) => {}
                (Some(w), Some((c, chosen))) => {
                    compared += 1;
                    assert_eq!(c, w as i128);
                    // The chosen arcs themselves form an arborescence of that cost.
                    let mut sum = 0i64;
                    for (v, c) in chosen.iter().enumerate() {
                        match *c {
                            None => assert_eq!(v as u32, root),
                            Some(a) => {
                                assert_eq!(arcs[a as usize].to, v as u32);
                                sum += arcs[a as usize].cost;
                            }
                        }
                    }
                    assert_eq!(sum, w);
                    for v in 0..n {
                        let mut x = v as u32;
                        for _ in 0..=n {
                            if x == root {
                                break;
                            }
                            x = arcs[chosen[x as usize].unwrap() as usize].from;
                        }
                        assert_eq!(x, root, "vertex {v} does not reach the root");
                    }
                }
                (w, g) => panic!("brute force {w:?}, solver {:?}", g.map(|g| g.0)),
            }
        }
        assert!(compared > 100, "only {compared} reachable cases");
    }
}
