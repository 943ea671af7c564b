//! Depth-first numbering of the tree, which answers in O(1) which piece a vertex is in.

use super::State;
use crate::solve::steiner::paths::NONE;

impl State<'_> {
    /// Depth-first numbering of the tree from the smallest first end of its edges (iterative),
    /// children in edge-id order.
    ///
    /// Runs after every applied move, so it works on the tree's own edges: its vertices get local
    /// ids (kept in `tout` until the walk is done, checked against the list of vertices so no
    /// clearing is needed) and a small adjacency, instead of filtering the graph's neighbour lists.
    pub(super) fn renumber(&mut self) {
        let Some(root) = self.edges.iter().map(|&e| self.g.ends[e as usize][0]).min() else {
            self.size = 0;
            return;
        };
        let mut by_id = std::borrow::Cow::Borrowed(&self.edges[..]);
        if !by_id.is_sorted() {
            by_id.to_mut().sort_unstable();
        }
        let mut verts: Vec<u32> = Vec::with_capacity(by_id.len() + 1);
        let mut local = |v: u32, tout: &mut [u32]| {
            let i = tout[v as usize] as usize;
            if i < verts.len() && verts[i] == v {
                i
            } else {
                tout[v as usize] = verts.len() as u32;
                verts.push(v);
                verts.len() - 1
            }
        };
        let ends: Vec<[usize; 2]> = by_id
            .iter()
            .map(|&e| {
                let [a, b] = self.g.ends[e as usize];
                [local(a, &mut self.tout), local(b, &mut self.tout)]
            })
            .collect();
        let k = verts.len();
        let mut off = vec![0usize; k + 2];
        for &[a, b] in &ends {
            off[a + 2] += 1;
            off[b + 2] += 1;
        }
        for i in 2..k + 2 {
            off[i] += off[i - 1];
        }
        let mut adj = vec![0u32; 2 * ends.len()];
        for &[a, b] in &ends {
            adj[off[a + 1]] = b as u32;
            off[a + 1] += 1;
            adj[off[b + 1]] = a as u32;
            off[b + 1] += 1;
        }
        // Every end got a local id above, the root's among them.
        let root = self.tout[root as usize];
        let (mut tin, mut tout) = (vec![0u32; k], vec![0u32; k]);
        let mut counter = 0u32;
        let mut stack: Vec<(u32, u32, bool)> = vec![(root, NONE, false)];
        while let Some((v, parent, done)) = stack.pop() {
            if done {
                tout[v as usize] = counter - 1;
                continue;
            }
            tin[v as usize] = counter;
            counter += 1;
            stack.push((v, parent, true));
            for &w in &adj[off[v as usize]..off[v as usize + 1]] {
                if w != parent {
                    stack.push((w, v, false));
                }
            }
        }
        for (i, &v) in verts.iter().enumerate() {
            self.tin[v as usize] = tin[i];
            self.tout[v as usize] = tout[i];
        }
        self.size = counter as usize;
    }

    /// The numbering of [`renumber`](Self::renumber) found by filtering the graph's neighbour
    /// lists: the reference it is tested against.
    #[cfg(test)]
    fn renumber_by_scan(&mut self) {
        let Some(root) = self.edges.iter().map(|&e| self.g.ends[e as usize][0]).min() else {
            self.size = 0;
            return;
        };
        let mut counter = 0u32;
        let mut stack: Vec<(u32, u32, bool)> = vec![(root, NONE, false)];
        while let Some((v, parent, done)) = stack.pop() {
            if done {
                self.tout[v as usize] = counter - 1;
                continue;
            }
            self.tin[v as usize] = counter;
            counter += 1;
            stack.push((v, parent, true));
            for (w, _) in self.tree_neighbours(v) {
                if w != parent {
                    stack.push((w, v, false));
                }
            }
        }
        self.size = counter as usize;
    }
}

#[cfg(test)]
mod tests {
    use super::super::{Fixture, Reach};
    use super::*;

    /// The numbering from the tree's own adjacency equals the one found by scanning the graph's
    /// neighbour lists, for trees given in edge order or not, and after moves.
    #[test]
    fn renumbering_equals_the_scan() {
        for seed in 0..6 {
            let f = Fixture::new(40, 12, seed);
            let (rg, tree) = (&f.red.graph, &f.tree);
            let reach = Reach {
                seeds: 64,
                eliminate: true,
            };
            let mut st = State::new(rg, &f.csr, &f.red.is_terminal, reach);
            let mut shuffled = tree.clone();
            shuffled.reverse();
            for edges in [tree.clone(), shuffled] {
                st.set(edges);
                let got = (st.tin.clone(), st.tout.clone(), st.size);
                st.renumber_by_scan();
                let verts = st.vertices();
                assert!(verts.len() > 10);
                assert_eq!(got.2, st.size);
                for v in verts {
                    let v = v as usize;
                    assert_eq!((got.0[v], got.1[v]), (st.tin[v], st.tout[v]), "seed {seed}");
                }
            }
        }
    }
}
