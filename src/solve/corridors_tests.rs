use super::*;
use proptest::prelude::*;

/// Hub 0, site 3. Open: a long way round 0–4–3 (5 000 m). Damaged: 0–1 (100 m, cost 100),
/// 1–3 (100 m, cost 900), 1–2 (80 m, cost 50), 2–3 (90 m, cost 60).
fn detour() -> (EdgeList, Vec<f64>, Vec<bool>) {
    let g = EdgeList {
        vertices: 5,
        ends: vec![[0, 4], [4, 3], [0, 1], [1, 3], [1, 2], [2, 3]],
        cost: vec![0, 0, 100, 900, 50, 60],
    };
    let length = vec![2500.0, 2500.0, 100.0, 100.0, 80.0, 90.0];
    let open = vec![true, true, false, false, false, false];
    (g, length, open)
}

#[test]
fn corridor_takes_the_long_way_until_a_detour_is_fixed() {
    let (g, length, open) = detour();
    let t = shortest(&g, &open, &length, 0);
    assert_eq!(t.dist[3], 5000.0);
    assert_eq!(route(&g, &t, 3), Some(vec![0, 1]));
    let all = vec![true; g.len()];
    assert_eq!(shortest(&g, &all, &length, 0).dist[3], 200.0);
    // Within 1.5 × 200 m: 0–1–2–3 (270 m, cost 210) is cheaper than 0–1–3 (200 m, cost 1 000).
    let fix = cheapest_fix(&g, &open, &length, (0, 3), 300.0, 10_000).unwrap();
    assert_eq!(fix.repairs, vec![2, 4, 5]);
    assert_eq!((fix.cost, fix.length_m), (210, 270.0));
    // Within 1.2 × 200 m only the direct repair will do.
    let fix = cheapest_fix(&g, &open, &length, (0, 3), 240.0, 10_000).unwrap();
    assert_eq!((fix.repairs, fix.cost), (vec![2, 3], 1000));
    assert_eq!(
        cheapest_fix(&g, &open, &length, (0, 3), 150.0, 10_000),
        Err(NoFix::Impossible)
    );
    assert_eq!(
        cheapest_fix(&g, &open, &length, (0, 3), 300.0, 2),
        Err(NoFix::BudgetSpent)
    );
}

fn small() -> impl Strategy<Value = (EdgeList, Vec<f64>, Vec<bool>, f64)> {
    (3usize..7, any::<u64>(), 1.0f64..3.0).prop_map(|(n, seed, r)| {
        let mut rng = crate::rng::Rng::new(seed);
        let (mut ends, mut cost, mut length, mut open) = (vec![], vec![], vec![], vec![]);
        for _ in 0..(n + rng.below(n as u64) as usize) {
            ends.push([rng.below(n as u64) as u32, rng.below(n as u64) as u32]);
            let closed = rng.below(6) == 0;
            cost.push(if closed {
                crate::solve::graph::UNUSABLE
            } else {
                1 + rng.below(50)
            });
            length.push(1.0 + rng.below(100) as f64);
            open.push(!closed && rng.below(3) == 0);
        }
        (
            EdgeList {
                vertices: n,
                ends,
                cost,
            },
            length,
            open,
            r,
        )
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]
    /// The label search against every subset of repairable edges (brute force).
    #[test]
    fn cheapest_fix_matches_brute_force((g, length, open, r) in small()) {
        let all: Vec<bool> = (0..g.len()).map(|e| g.usable(e)).collect();
        let best_len = shortest(&g, &all, &length, 0).dist[1];
        prop_assume!(best_len.is_finite());
        let limit = best_len * r;
        let spare: Vec<usize> = (0..g.len()).filter(|&e| all[e] && !open[e]).collect();
        let mut best: Option<u64> = None;
        for mask in 0u32..(1 << spare.len()) {
            let mut o = open.clone();
            let mut c = 0;
            for (k, &e) in spare.iter().enumerate() {
                if mask >> k & 1 == 1 {
                    o[e] = true;
                    c += g.cost[e];
                }
            }
            if shortest(&g, &o, &length, 0).dist[1] <= limit && best.is_none_or(|b| c < b) {
                best = Some(c);
            }
        }
        let got = cheapest_fix(&g, &open, &length, (0, 1), limit, 1_000_000).unwrap();
        prop_assert_eq!(Some(got.cost), best);
        prop_assert!(got.length_m <= limit);
        prop_assert_eq!(got.repairs.iter().map(|&e| g.cost[e as usize]).sum::<u64>(), got.cost);
    }
}
