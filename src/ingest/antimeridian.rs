//! The ±180° meridian is one line: vertices on either side of it within the snapping tolerance
//! (or exactly on it, at ±180°, even without snapping) join one junction. Lines split there as
//! RFC 7946 §3.1.9 recommends therefore form one network.

use super::geodesy::{distance_m, metres_per_degree};

/// Widest band either side of the meridian searched for partners, degrees of longitude.
const MAX_BAND_DEG: f64 = 1.0;

/// Merges clusters across the meridian: `cid` maps vertices to clusters numbered by first
/// appearance, `founders` each cluster's first vertex. Returns how many clusters were merged.
pub fn join_across(
    coords: &[[f64; 2]],
    snap_m: f64,
    cid: &mut [u32],
    founders: &mut Vec<u32>,
) -> usize {
    let at = |c: usize| coords[founders[c] as usize];
    let band = |lat: f64| {
        if snap_m == 0.0 {
            0.0
        } else {
            let (_, mx) = metres_per_degree(lat.abs().min(89.9));
            (snap_m / mx).min(MAX_BAND_DEG)
        }
    };
    let near = |c: usize| {
        let p = at(c);
        p[0].abs() >= 180.0 - band(p[1])
    };
    let (mut east, mut west): (Vec<usize>, Vec<usize>) = (Vec::new(), Vec::new());
    for c in (0..founders.len()).filter(|&c| near(c)) {
        if at(c)[0] > 0.0 {
            east.push(c);
        } else {
            west.push(c);
        }
    }
    if east.is_empty() || west.is_empty() {
        return 0;
    }
    west.sort_by(|&a, &b| at(a)[1].total_cmp(&at(b)[1]).then(a.cmp(&b)));
    let dlat = snap_m / metres_per_degree(0.0).0 * 1.01 + 1e-12;
    let mut parent: Vec<usize> = (0..founders.len()).collect();
    fn root(parent: &mut [usize], mut x: usize) -> usize {
        while parent[x] != x {
            parent[x] = parent[parent[x]];
            x = parent[x];
        }
        x
    }
    let mut merged = 0;
    for &e in &east {
        let p = at(e);
        let lo = west.partition_point(|&w| at(w)[1] < p[1] - dlat);
        let best = west[lo..]
            .iter()
            .take_while(|&&w| at(w)[1] <= p[1] + dlat)
            .map(|&w| {
                let q = at(w);
                let same_meridian = p[0] == 180.0 && q[0] == -180.0 && p[1] == q[1];
                (if same_meridian { 0.0 } else { distance_m(p, q) }, w)
            })
            .filter(|&(d, _)| d <= snap_m)
            .min_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        if let Some((_, w)) = best {
            let (a, b) = (root(&mut parent, e), root(&mut parent, w));
            if a != b {
                // The earlier cluster stays: numbering by first appearance is kept.
                parent[a.max(b)] = a.min(b);
                merged += 1;
            }
        }
    }
    if merged == 0 {
        return 0;
    }
    let roots: Vec<usize> = (0..founders.len()).map(|c| root(&mut parent, c)).collect();
    let mut new_id = vec![u32::MAX; founders.len()];
    let mut kept = Vec::with_capacity(founders.len() - merged);
    for c in 0..founders.len() {
        if roots[c] == c {
            new_id[c] = kept.len() as u32;
            kept.push(founders[c]);
        }
    }
    for x in cid.iter_mut() {
        *x = new_id[roots[*x as usize]];
    }
    *founders = kept;
    merged
}

#[cfg(test)]
mod tests {
    use super::*;

    fn singletons(n: usize) -> (Vec<u32>, Vec<u32>) {
        ((0..n as u32).collect(), (0..n as u32).collect())
    }

    #[test]
    fn plus_and_minus_180_are_one_meridian_even_without_snapping() {
        let coords = [[179.9, 1.0], [180.0, 1.0], [-180.0, 1.0], [-179.9, 1.0]];
        let (mut cid, mut f) = singletons(4);
        assert_eq!(join_across(&coords, 0.0, &mut cid, &mut f), 1);
        assert_eq!(cid, vec![0, 1, 1, 2]);
        assert_eq!(f, vec![0, 1, 3]);
    }

    #[test]
    fn snapping_reaches_across_and_only_within_the_tolerance() {
        // 1e-6° of longitude at the equator is about 0.11 m (from memory: 1° ≈ 111.32 km).
        let coords = [
            [179.9999995, 0.0],
            [-179.9999995, 0.0],
            [179.99999, 5.0],
            [-179.99999, 5.0],
        ];
        let (mut cid, mut f) = singletons(4);
        assert_eq!(join_across(&coords, 0.5, &mut cid, &mut f), 1);
        assert_eq!(cid, vec![0, 0, 1, 2], "2.2 m apart stays apart at 0.5 m");
    }
}
