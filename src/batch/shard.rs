//! Splitting a manifest into N shards of similar work, the same way on every machine.
//!
//! Work is estimated by input size (roads plus sites, bytes). Districts are taken largest first
//! (ties: manifest order) and each goes to the shard with the least work so far (ties: the lower
//! shard): the longest-processing-time rule, deterministic because every shard sees the same files.

use super::manifest::District;

/// The largest shard count accepted: array jobs are far smaller, and a larger count is a typing
/// mistake that would only give empty shards.
pub const MAX_SHARDS: usize = 100_000;

/// A shard `K/N`, K counted from 1, N at most [`MAX_SHARDS`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// This shard, 1..=count.
    pub index: usize,
    /// Number of shards.
    pub count: usize,
}

impl std::str::FromStr for Shard {
    type Err = String;
    fn from_str(s: &str) -> Result<Shard, String> {
        let bad = || format!("{s:?} is not K/N with 1 ≤ K ≤ N (for example 3/8)");
        let (k, n) = s.split_once('/').ok_or_else(bad)?;
        let k: usize = k.trim().parse().map_err(|_| bad())?;
        let n: usize = n.trim().parse().map_err(|_| bad())?;
        if k == 0 || n == 0 || k > n {
            return Err(bad());
        }
        if n > MAX_SHARDS {
            return Err(format!(
                "{s:?}: at most {MAX_SHARDS} shards (N); a shard count above the number of \
                 districts only gives empty shards"
            ));
        }
        Ok(Shard { index: k, count: n })
    }
}

/// Bytes of a district's inputs (0 for unreadable ones: they fail fast anyway).
pub fn work(d: &District) -> u64 {
    let size = |s: &crate::ingest::source::Source| {
        s.path()
            .and_then(|p| std::fs::metadata(p).ok())
            .map_or(0, |m| m.len())
    };
    size(&d.job.roads) + d.job.sites.as_ref().map_or(0, size)
}

/// Which shard (0-based) each district belongs to, given its work.
pub fn assign(works: &[u64], count: usize) -> Vec<usize> {
    use std::cmp::Reverse;
    let mut order: Vec<usize> = (0..works.len()).collect();
    order.sort_by(|&a, &b| works[b].cmp(&works[a]).then(a.cmp(&b)));
    // Only shards that can receive a district need a place in the heap of (load, shard).
    let used = count.min(works.len()).max(1);
    let mut heap: std::collections::BinaryHeap<Reverse<(u64, usize)>> =
        (0..used).map(|s| Reverse((0, s))).collect();
    let mut out = vec![0; works.len()];
    for i in order {
        let Some(Reverse((load, s))) = heap.pop() else {
            break;
        };
        out[i] = s;
        heap.push(Reverse((load + works[i].max(1), s)));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_and_balances() {
        assert_eq!(
            "2/4".parse::<Shard>().unwrap(),
            Shard { index: 2, count: 4 }
        );
        assert!("0/4".parse::<Shard>().is_err());
        assert!("5/4".parse::<Shard>().is_err());
        assert!("x".parse::<Shard>().is_err());
        assert!("1/100000".parse::<Shard>().is_ok());
        let e = "1/100000000000".parse::<Shard>().unwrap_err();
        assert!(e.contains("at most 100000"), "{e}");
        assert_eq!(
            assign(&[3, 2], 100_000),
            [0, 1],
            "more shards than districts"
        );
        let a = assign(&[10, 1, 1, 8, 1, 1], 2);
        let load = |s| {
            (0..6)
                .filter(|&i| a[i] == s)
                .map(|i| [10, 1, 1, 8, 1, 1][i])
                .sum::<u64>()
        };
        assert_eq!(load(0), 11);
        assert_eq!(load(1), 11);
        assert_eq!(a, assign(&[10, 1, 1, 8, 1, 1], 2), "deterministic");
    }
}
