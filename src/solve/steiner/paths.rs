//! Multi-source shortest paths with labels (Voronoi regions), reusable without full resets.

use crate::solve::graph::{Csr, EdgeList};
use crate::solve::heap::MinHeap;

/// Marks "no predecessor" (a source) and "no label".
pub const NONE: u32 = u32::MAX;

/// Distance, label (nearest source's label) and predecessor edge per vertex, with a list of the
/// vertices touched since the last reset so a search costs only what it explores.
pub struct Workspace {
    /// Distance from the nearest source (`u64::MAX` when unreached).
    pub dist: Vec<u64>,
    /// Label of the nearest source.
    pub label: Vec<u32>,
    /// Edge by which the vertex was reached ([`NONE`] for sources).
    pub pred: Vec<u32>,
    /// Vertices with a finite distance.
    pub touched: Vec<u32>,
    heap: MinHeap,
}

impl Workspace {
    /// A workspace for graphs of `n` vertices.
    pub fn new(n: usize) -> Self {
        Workspace {
            dist: vec![u64::MAX; n],
            label: vec![NONE; n],
            pred: vec![NONE; n],
            touched: Vec::new(),
            heap: MinHeap::new(),
        }
    }

    /// Forgets the last search.
    pub fn reset(&mut self) {
        for &v in &self.touched {
            self.dist[v as usize] = u64::MAX;
            self.label[v as usize] = NONE;
            self.pred[v as usize] = NONE;
        }
        self.touched.clear();
        self.heap.clear();
    }

    /// Makes `v` a source with `label`.
    pub fn seed(&mut self, v: u32, label: u32) {
        if self.dist[v as usize] == u64::MAX {
            self.touched.push(v);
        }
        self.dist[v as usize] = 0;
        self.label[v as usize] = label;
        self.pred[v as usize] = NONE;
        self.heap.push(0, v);
    }

    /// Dijkstra from the seeds, settling vertices closer than `bound`. Ties go to the lower vertex id.
    pub fn run(&mut self, g: &EdgeList, csr: &Csr, bound: u64) {
        while let Some((d, v)) = self.heap.pop() {
            if d > self.dist[v as usize] {
                continue;
            }
            if d >= bound {
                break;
            }
            for (w, e) in csr.neighbours(v) {
                let nd = d + g.cost[e as usize];
                if nd < self.dist[w as usize] && nd < bound {
                    if self.dist[w as usize] == u64::MAX {
                        self.touched.push(w);
                    }
                    self.dist[w as usize] = nd;
                    self.label[w as usize] = self.label[v as usize];
                    self.pred[w as usize] = e;
                    self.heap.push(nd, w);
                }
            }
        }
        self.heap.clear();
    }

    /// Dijkstra from the seeds that stops at the first settled vertex for which `stop` holds (and
    /// returns it), or when distances reach `bound`.
    pub fn run_until<F>(&mut self, g: &EdgeList, csr: &Csr, bound: u64, stop: F) -> Option<u32>
    where
        F: Fn(&Workspace, u32) -> bool,
    {
        while let Some((d, v)) = self.heap.pop() {
            if d > self.dist[v as usize] {
                continue;
            }
            if d >= bound {
                break;
            }
            if stop(self, v) {
                self.heap.clear();
                return Some(v);
            }
            for (w, e) in csr.neighbours(v) {
                let nd = d + g.cost[e as usize];
                if nd < self.dist[w as usize] && nd < bound {
                    if self.dist[w as usize] == u64::MAX {
                        self.touched.push(w);
                    }
                    self.dist[w as usize] = nd;
                    self.label[w as usize] = self.label[v as usize];
                    self.pred[w as usize] = e;
                    self.heap.push(nd, w);
                }
            }
        }
        self.heap.clear();
        None
    }

    /// Appends the edges from `v` back to its source.
    pub fn path_to_source(&self, g: &EdgeList, mut v: u32, out: &mut Vec<u32>) {
        while self.pred[v as usize] != NONE {
            let e = self.pred[v as usize];
            out.push(e);
            let [a, b] = g.ends[e as usize];
            v = if a == v { b } else { a };
        }
    }
}
