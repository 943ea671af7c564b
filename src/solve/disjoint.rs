//! Disjoint sets (union-find) over u32 ids, with path halving and union by size.
//!
//! One array: a non-negative entry is the parent, a negative entry marks a root and holds minus the
//! set's size, so a lookup touches one cache line per step.

use rayon::prelude::*;

/// A partition of `0..n` into disjoint sets.
#[derive(Debug, Clone)]
pub struct DisjointSets {
    link: Vec<i32>,
}

impl DisjointSets {
    /// `n` singleton sets (n must fit in i32).
    pub fn new(n: usize) -> Self {
        assert!(
            n <= i32::MAX as usize,
            "too many elements for disjoint sets"
        );
        DisjointSets { link: vec![-1; n] }
    }

    /// Makes `0..n` singletons again, reusing the memory.
    pub fn reset(&mut self, n: usize) {
        self.link.clear();
        self.link.resize(n, -1);
    }

    /// Representative of `x`'s set.
    #[inline]
    pub fn find(&mut self, mut x: u32) -> u32 {
        loop {
            let p = self.link[x as usize];
            if p < 0 {
                return x;
            }
            let gp = self.link[p as usize];
            if gp < 0 {
                return p as u32;
            }
            self.link[x as usize] = gp;
            x = gp as u32;
        }
    }

    /// Writes every element's representative into `out`, in parallel (the sets are only read).
    pub fn roots_into(&self, out: &mut Vec<u32>) {
        out.clear();
        out.par_extend(
            (0..self.link.len() as u32)
                .into_par_iter()
                .map(|x| self.root(x)),
        );
    }

    /// Points every element straight at its representative, given all of them (from
    /// [`roots_into`](Self::roots_into)), so later lookups take one step.
    pub fn flatten_to(&mut self, roots: &[u32]) {
        for (link, &r) in self.link.iter_mut().zip(roots) {
            *link = if *link >= 0 { r as i32 } else { *link };
        }
    }

    /// Representative of `x`'s set without compressing paths (safe to call from many threads).
    #[inline]
    pub fn root(&self, mut x: u32) -> u32 {
        while self.link[x as usize] >= 0 {
            x = self.link[x as usize] as u32;
        }
        x
    }

    /// The raw entry of `x` (parent, or minus the set size): reading it early warms the cache.
    #[inline]
    pub fn peek(&self, x: u32) -> i32 {
        self.link[x as usize]
    }

    /// Joins the sets of `a` and `b`; false when they were already one set.
    #[inline]
    pub fn union(&mut self, a: u32, b: u32) -> bool {
        let (mut ra, mut rb) = (self.find(a), self.find(b));
        if ra == rb {
            return false;
        }
        if self.link[ra as usize] > self.link[rb as usize] {
            std::mem::swap(&mut ra, &mut rb);
        }
        self.link[ra as usize] += self.link[rb as usize];
        self.link[rb as usize] = ra as i32;
        true
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unions_and_finds() {
        let mut d = DisjointSets::new(5);
        assert!(d.union(0, 1));
        assert!(d.union(3, 4));
        assert!(!d.union(1, 0));
        assert_eq!(d.find(0), d.find(1));
        assert_ne!(d.find(0), d.find(3));
        assert!(d.union(1, 4));
        assert_eq!(d.find(0), d.find(3));
        let mut roots = Vec::new();
        d.roots_into(&mut roots);
        let want: Vec<u32> = (0..5).map(|x| d.find(x)).collect();
        assert_eq!(roots, want);
        d.flatten_to(&roots);
        assert!((0..5).all(|x| d.peek(x) < 0 || d.peek(x) as u32 == want[x as usize]));
    }
}
