//! Splitting a manifest into N shards of similar work, the same way on every machine.
//!
//! Work is estimated by input size (roads plus sites, bytes). Districts are taken largest first
//! (ties: manifest order) and each goes to the shard with the least work so far (ties: the lower
//! shard): the longest-processing-time rule, deterministic because every shard sees the same files.

use super::manifest::District;

/// A shard `K/N`, K counted from 1.
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
    let mut order: Vec<usize> = (0..works.len()).collect();
    order.sort_by(|&a, &b| works[b].cmp(&works[a]).then(a.cmp(&b)));
    let mut load = vec![0u64; count];
    let mut out = vec![0; works.len()];
    for i in order {
        let s = (0..count).min_by_key(|&s| (load[s], s)).unwrap_or(0);
        load[s] += works[i].max(1);
        out[i] = s;
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
