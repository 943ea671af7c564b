//! A 4-ary min-heap of (distance, vertex) pairs for the Dijkstra-style searches.
//!
//! It pops in exactly the order of `BinaryHeap<Reverse<(u64, u32)>>` (pairs are totally ordered, so
//! any correct heap gives the same sequence) but is half as deep, and a node's four children sit
//! side by side in memory: the searches spend much of their time here.

/// Min-heap of `(distance, vertex)` pairs.
#[derive(Debug, Clone, Default)]
pub struct MinHeap {
    items: Vec<(u64, u32)>,
}

impl MinHeap {
    /// An empty heap.
    pub fn new() -> Self {
        MinHeap::default()
    }

    /// Number of pairs held.
    pub fn len(&self) -> usize {
        self.items.len()
    }

    /// True when no pair is held.
    pub fn is_empty(&self) -> bool {
        self.items.is_empty()
    }

    /// Removes every pair, keeping the memory.
    pub fn clear(&mut self) {
        self.items.clear();
    }

    /// Adds the pair `(d, v)`.
    #[inline]
    pub fn push(&mut self, d: u64, v: u32) {
        let x = (d, v);
        let mut hole = self.items.len();
        self.items.push(x);
        while hole > 0 {
            let parent = (hole - 1) / 4;
            if self.items[parent] <= x {
                break;
            }
            self.items[hole] = self.items[parent];
            hole = parent;
        }
        self.items[hole] = x;
    }

    /// Removes and returns the least pair.
    #[inline]
    pub fn pop(&mut self) -> Option<(u64, u32)> {
        let last = self.items.pop()?;
        let n = self.items.len();
        if n == 0 {
            return Some(last);
        }
        let top = self.items[0];
        // Move the hole down along least children to the bottom, then let `last` rise from there:
        // it usually belongs near the bottom, and the way down needs no comparison with it.
        let items = &mut self.items[..];
        let mut hole = 0;
        loop {
            let first = 4 * hole + 1;
            if first + 3 < n {
                let kids = &items[first..first + 4];
                let a = if kids[1] < kids[0] { 1 } else { 0 };
                let b = if kids[3] < kids[2] { 3 } else { 2 };
                let best = first + if kids[b] < kids[a] { b } else { a };
                items[hole] = items[best];
                hole = best;
            } else {
                if first < n {
                    let mut best = first;
                    for c in first + 1..n {
                        if items[c] < items[best] {
                            best = c;
                        }
                    }
                    items[hole] = items[best];
                    hole = best;
                }
                break;
            }
        }
        while hole > 0 {
            let parent = (hole - 1) / 4;
            if items[parent] <= last {
                break;
            }
            items[hole] = items[parent];
            hole = parent;
        }
        items[hole] = last;
        Some(top)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;
    use std::cmp::Reverse;
    use std::collections::BinaryHeap;

    proptest! {
        /// Same pops as the standard library's binary heap under any mix of pushes and pops.
        #[test]
        fn pops_like_the_standard_heap(ops in proptest::collection::vec((any::<bool>(), 0u64..50, 0u32..20), 0..400)) {
            let mut ours = MinHeap::new();
            let mut std_heap = BinaryHeap::new();
            for (push, d, v) in ops {
                if push {
                    ours.push(d, v);
                    std_heap.push(Reverse((d, v)));
                } else {
                    prop_assert_eq!(ours.pop(), std_heap.pop().map(|Reverse(x)| x));
                }
                prop_assert_eq!(ours.len(), std_heap.len());
            }
            while let Some(Reverse(x)) = std_heap.pop() {
                prop_assert_eq!(ours.pop(), Some(x));
            }
            prop_assert!(ours.is_empty());
        }
    }
}
