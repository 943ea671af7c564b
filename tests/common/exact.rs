//! Exact reference solvers for small instances.

use proptest::prelude::*;
use reknit::solve::graph::{EdgeList, UNUSABLE};

/// Exact optimum by Dreyfus–Wagner over all-pairs shortest paths (Floyd–Warshall).
pub fn dreyfus_wagner(g: &EdgeList, terminals: &[u32]) -> u64 {
    let n = g.vertices;
    const INF: u64 = u64::MAX / 4;
    let mut d = vec![vec![INF; n]; n];
    for (v, row) in d.iter_mut().enumerate() {
        row[v] = 0;
    }
    for e in 0..g.len() {
        if g.usable(e) {
            let [a, b] = g.ends[e];
            let (a, b) = (a as usize, b as usize);
            d[a][b] = d[a][b].min(g.cost[e]);
            d[b][a] = d[b][a].min(g.cost[e]);
        }
    }
    for k in 0..n {
        for i in 0..n {
            for j in 0..n {
                let via = d[i][k] + d[k][j];
                if via < d[i][j] {
                    d[i][j] = via;
                }
            }
        }
    }
    let k = terminals.len();
    if k <= 1 {
        return 0;
    }
    // dp[S][v]: cheapest tree spanning terminal subset S plus vertex v.
    let full = 1usize << k;
    let mut dp = vec![vec![INF; n]; full];
    for (i, &t) in terminals.iter().enumerate() {
        for v in 0..n {
            dp[1 << i][v] = d[t as usize][v];
        }
    }
    for s in 1..full {
        if s.count_ones() < 2 {
            continue;
        }
        let mut best = vec![INF; n];
        let mut sub = (s - 1) & s;
        while sub > 0 {
            {
                for (v, b) in best.iter_mut().enumerate() {
                    let c = dp[sub][v] + dp[s ^ sub][v];
                    if c < *b {
                        *b = c;
                    }
                }
            }
            sub = (sub - 1) & s;
        }
        for v in 0..n {
            dp[s][v] = (0..n).map(|u| best[u] + d[u][v]).min().unwrap();
        }
    }
    dp[full - 1][terminals[0] as usize]
}

/// Random connected instances: up to 21 vertices on a random spanning tree plus extra edges (zero-cost
/// and closed ones among them) and 2 to 8 terminals.
pub fn arb_instance() -> impl Strategy<Value = (EdgeList, Vec<u32>)> {
    (4usize..22, 2usize..9).prop_flat_map(|(n, k)| {
        let tree_parents = proptest::collection::vec(any::<proptest::sample::Index>(), n - 1);
        let extra =
            proptest::collection::vec((0..n as u32, 0..n as u32, 0u64..25, 0u8..10), 0..3 * n);
        let tree_costs = proptest::collection::vec(0u64..25, n - 1);
        let terms = proptest::sample::subsequence((0..n as u32).collect::<Vec<_>>(), k.min(n));
        (tree_parents, tree_costs, extra, terms).prop_map(move |(parents, costs, extra, terms)| {
            let mut g = EdgeList {
                vertices: n,
                ends: Vec::new(),
                cost: Vec::new(),
            };
            // A random spanning tree keeps every terminal reachable.
            for v in 1..n {
                let p = parents[v - 1].index(v) as u32;
                g.ends.push([p, v as u32]);
                g.cost.push(costs[v - 1]);
            }
            for (a, b, c, kind) in extra {
                g.ends.push([a, b]);
                g.cost.push(if kind == 0 { UNUSABLE } else { c });
            }
            (g, terms)
        })
    })
}
