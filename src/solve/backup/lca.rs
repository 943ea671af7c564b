//! Lowest common ancestors on the (small) tree by binary lifting, and tree paths.

use super::NONE;

/// Parent pointers with depths and binary lifting for lowest common ancestors.
pub(super) struct Lca {
    pub(super) depth: Vec<u32>,
    up: Vec<Vec<u32>>,
}

impl Lca {
    /// `parent` lists parents before children, root 0 (its parent NONE).
    pub(super) fn new(parent: &[u32]) -> Lca {
        let k = parent.len();
        let mut depth = vec![0u32; k];
        for x in 1..k {
            depth[x] = depth[parent[x] as usize] + 1;
        }
        let mut up = vec![
            parent
                .iter()
                .map(|&p| if p == NONE { 0 } else { p })
                .collect::<Vec<_>>(),
        ];
        let mut span = 1usize;
        while span < k {
            let prev = up.last().expect("level");
            let next: Vec<u32> = (0..k).map(|x| prev[prev[x] as usize]).collect();
            up.push(next);
            span *= 2;
        }
        Lca { depth, up }
    }

    pub(super) fn lca(&self, mut a: u32, mut b: u32) -> u32 {
        if self.depth[a as usize] < self.depth[b as usize] {
            std::mem::swap(&mut a, &mut b);
        }
        let mut diff = self.depth[a as usize] - self.depth[b as usize];
        let mut j = 0;
        while diff > 0 {
            if diff & 1 == 1 {
                a = self.up[j][a as usize];
            }
            diff >>= 1;
            j += 1;
        }
        if a == b {
            return a;
        }
        for j in (0..self.up.len()).rev() {
            let (x, y) = (self.up[j][a as usize], self.up[j][b as usize]);
            if x != y {
                a = x;
                b = y;
            }
        }
        self.up[0][a as usize]
    }
}

/// Tree nodes (standing for the edge to their parent) on the tree path between `a` and `b`.
pub(super) fn path_nodes(parent: &[u32], lca: &Lca, a: u32, b: u32) -> Vec<u32> {
    let w = lca.lca(a, b);
    let mut out = Vec::new();
    for mut x in [a, b] {
        while x != w {
            out.push(x);
            x = parent[x as usize];
        }
    }
    out
}
