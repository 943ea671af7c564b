//! Backup links against the exact optimum found by trying every subset of the candidate repairs
//! (brute force, ≤ 12 candidates), and checked 2-edge-connected by removing each road in turn.

use reknit::network::Cost;
use reknit::rng::Rng;
use reknit::solve::backup::backup_links;
use reknit::solve::graph::{EdgeList, UNUSABLE};

/// True when `t` reaches `root` over the edges in `on`, leaving out edge `skip`.
fn joined(g: &EdgeList, on: &[bool], skip: usize, root: u32, t: u32) -> bool {
    let mut seen = vec![false; g.vertices];
    let mut stack = vec![root];
    seen[root as usize] = true;
    while let Some(v) = stack.pop() {
        if v == t {
            return true;
        }
        for (e, &[a, b]) in g.ends.iter().enumerate() {
            if e == skip || !on[e] {
                continue;
            }
            let w = if a == v {
                b
            } else if b == v {
                a
            } else {
                continue;
            };
            if !seen[w as usize] {
                seen[w as usize] = true;
                stack.push(w);
            }
        }
    }
    false
}

/// Every terminal joined to the root survives every single failure that some repair set could
/// survive (a failure that cuts it off even with every usable road open is unavoidable).
fn survives(g: &EdgeList, on: &[bool], root: u32, terminals: &[u32]) -> bool {
    let usable: Vec<bool> = (0..g.len()).map(|e| g.cost[e] != UNUSABLE).collect();
    terminals.iter().all(|&t| {
        (0..g.len()).all(|e| !on[e] || joined(g, on, e, root, t) || !joined(g, &usable, e, root, t))
    })
}

struct Instance {
    g: EdgeList,
    free: Vec<bool>,
    terminals: Vec<u32>,
}

fn instance(rng: &mut Rng, max_candidates: usize) -> Option<Instance> {
    let n = 5 + rng.below(6) as usize;
    let mut ends = Vec::new();
    for v in 1..n as u32 {
        ends.push([rng.below(v as u64) as u32, v]);
    }
    for _ in 0..(3 + rng.below(8)) {
        let a = rng.below(n as u64) as u32;
        let b = rng.below(n as u64) as u32;
        if a != b {
            ends.push([a, b]);
        }
    }
    let mut cost = Vec::new();
    let mut free = Vec::new();
    let mut candidates = 0;
    for _ in &ends {
        let r = rng.below(100);
        if r < 40 || candidates == max_candidates {
            free.push(r < 70);
            cost.push(if r < 70 { 0 } else { UNUSABLE });
        } else if r < 48 {
            free.push(false);
            cost.push(UNUSABLE);
        } else {
            candidates += 1;
            free.push(false);
            cost.push(1 + rng.below(20) as Cost);
        }
    }
    let g = EdgeList {
        vertices: n,
        ends,
        cost,
    };
    let terminals: Vec<u32> = (1..n as u32)
        .filter(|&v| rng.below(3) == 0 && joined(&g, &free, usize::MAX, 0, v))
        .collect();
    (!terminals.is_empty()).then_some(Instance { g, free, terminals })
}

fn optimum(inst: &Instance) -> Cost {
    let cands: Vec<usize> = (0..inst.g.len())
        .filter(|&e| !inst.free[e] && inst.g.cost[e] != UNUSABLE)
        .collect();
    let mut best = Cost::MAX;
    for mask in 0u32..(1 << cands.len()) {
        let mut on = inst.free.clone();
        let mut c = 0;
        for (i, &e) in cands.iter().enumerate() {
            if mask >> i & 1 == 1 {
                on[e] = true;
                c += inst.g.cost[e];
            }
        }
        if c < best && survives(&inst.g, &on, 0, &inst.terminals) {
            best = c;
        }
    }
    best
}

#[test]
fn within_twice_the_exact_optimum_on_tiny_instances() {
    // Exact optimum by exhaustive search over every subset of ≤ 12 candidate repairs; the
    // Frederickson–JáJá arborescence bound is 2 (links chosen from every pair's cheapest way round).
    let mut rng = Rng::new(20261201);
    let (mut compared, mut optimal, mut worst) = (0, 0, 1.0f64);
    let mut total_ratio = 0.0;
    while compared < 400 {
        let Some(inst) = instance(&mut rng, 12) else {
            continue;
        };
        let b = backup_links(&inst.g, &inst.free, 0, &inst.terminals).expect("backup");
        let mut on = inst.free.clone();
        for &e in &b.edges {
            assert!(!inst.free[e as usize] && inst.g.cost[e as usize] != UNUSABLE);
            on[e as usize] = true;
        }
        assert!(
            survives(&inst.g, &on, 0, &inst.terminals),
            "backup leaves an avoidable single failure: {:?}",
            inst.g
        );
        assert_eq!(
            b.cost,
            b.edges
                .iter()
                .map(|&e| inst.g.cost[e as usize])
                .sum::<Cost>()
        );
        let opt = optimum(&inst);
        assert!(b.cost >= opt);
        let ratio = if opt == 0 {
            1.0
        } else {
            b.cost as f64 / opt as f64
        };
        assert!(ratio <= 2.0, "ratio {ratio} on {:?}", inst.g);
        worst = worst.max(ratio);
        total_ratio += ratio;
        optimal += usize::from(b.cost == opt);
        compared += 1;
    }
    eprintln!(
        "backup vs exhaustive optimum: {compared} instances, {optimal} optimal, mean ratio {:.4}, worst {worst:.4}",
        total_ratio / compared as f64
    );
}

#[test]
fn larger_random_networks_survive_every_single_failure() {
    // Brute force: every road removed in turn (common practice, no source).
    let mut rng = Rng::new(99);
    for _ in 0..40 {
        let n = 40 + rng.below(40) as usize;
        let mut ends = Vec::new();
        for v in 1..n as u32 {
            ends.push([rng.below(v as u64) as u32, v]);
        }
        for _ in 0..n {
            let a = rng.below(n as u64) as u32;
            let b = rng.below(n as u64) as u32;
            ends.push([a, b]);
        }
        let free: Vec<bool> = (0..ends.len())
            .map(|e| e < n - 1 || rng.below(5) == 0)
            .collect();
        let cost: Vec<Cost> = (0..ends.len())
            .map(|e| {
                if free[e] {
                    0
                } else if rng.below(10) == 0 {
                    UNUSABLE
                } else {
                    1 + rng.below(1000) as Cost
                }
            })
            .collect();
        let g = EdgeList {
            vertices: n,
            ends,
            cost,
        };
        let terminals: Vec<u32> = (1..n as u32).filter(|_| rng.below(6) == 0).collect();
        let b = backup_links(&g, &free, 0, &terminals).expect("backup");
        let mut on = free.clone();
        for &e in &b.edges {
            on[e as usize] = true;
        }
        assert!(survives(&g, &on, 0, &terminals));
        // Every site listed without a backup really has an unavoidable single failure.
        let usable: Vec<bool> = (0..g.len()).map(|e| g.cost[e] != UNUSABLE).collect();
        for (t, fails) in &b.no_backup {
            for &e in fails {
                assert!(!joined(&g, &usable, e as usize, 0, terminals[*t]));
            }
        }
    }
}
