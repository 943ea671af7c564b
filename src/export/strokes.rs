//! Road lines as the picture draws them: polylines in pixels. A large network is drawn at the
//! picture's resolution: every vertex snaps to the pixel grid, repeated points go, a piece that
//! falls within one pixel vanishes (its neighbours, snapped to the same pixel, keep the line
//! unbroken) and a pixel step already drawn is not drawn again, so the SVG holds about as many
//! steps as the picture has pixels of road, however many roads the district has.

use super::layout::Frame;
use crate::network::Network;

/// Above this many geometry points the network is drawn at the picture's resolution (a few
/// hundred thousand points already make an SVG of megabytes with detail no screen shows).
pub const SIMPLIFY_ABOVE: usize = 150_000;

/// Polylines in pixels.
pub type Lines = Vec<Vec<(f64, f64)>>;

/// Snaps lines to the pixel grid, or keeps them exact.
pub struct Stroker<'a> {
    net: &'a Network,
    frame: &'a Frame,
    /// True when lines snap to the pixel grid.
    pub simplify: bool,
}

impl<'a> Stroker<'a> {
    /// A stroker for the network in the frame; it snaps when the network is large.
    pub fn new(net: &'a Network, frame: &'a Frame) -> Self {
        Stroker {
            net,
            frame,
            simplify: net.geom.len() > SIMPLIFY_ABOVE,
        }
    }

    /// The polyline of one edge, exact (or snapped, when simplifying; then possibly empty).
    pub fn edge(&self, e: usize) -> Vec<(f64, f64)> {
        let g = self.net.edge_geometry(e);
        let mut out: Vec<(f64, f64)> = Vec::with_capacity(g.len());
        for p in g {
            let (x, y) = self.frame.px(*p);
            let q = if self.simplify {
                (x.round(), y.round())
            } else {
                (x, y)
            };
            if out.last() != Some(&q) {
                out.push(q);
            }
        }
        if self.simplify && out.len() < 2 {
            out.clear();
        }
        out
    }

    /// The polylines of many edges; when simplifying, steps already drawn are left out (a line
    /// breaks where it meets one) and the lines are as few as the drawing allows.
    pub fn edges(&self, edges: impl Iterator<Item = usize>) -> Lines {
        let mut lines = Lines::new();
        self.each_line(edges, |l| lines.push(l));
        lines
    }

    /// The lines of [`Stroker::edges`], handed to `out` one by one in the same order, so that a
    /// caller writing them out never holds them all (one line waits: the next may continue it).
    pub fn each_line(
        &self,
        edges: impl Iterator<Item = usize>,
        mut out: impl FnMut(Vec<(f64, f64)>),
    ) {
        if !self.simplify {
            edges
                .map(|e| self.edge(e))
                .filter(|l| l.len() >= 2)
                .for_each(out);
            return;
        }
        let key = |a: (f64, f64), b: (f64, f64)| {
            let (a, b) = ((a.0 as i32, a.1 as i32), (b.0 as i32, b.1 as i32));
            if a <= b { (a, b) } else { (b, a) }
        };
        // Millions of steps on a national layer: a fast hash (membership only, so the order of
        // the output does not depend on it).
        let mut seen: crate::fxhash::FxHashSet<((i32, i32), (i32, i32))> = Default::default();
        let mut last: Option<Vec<(f64, f64)>> = None;
        let mut push = |line: Vec<(f64, f64)>, last: &mut Option<Vec<(f64, f64)>>| {
            if let Some(done) = last.replace(line) {
                out(done);
            }
        };
        for e in edges {
            let pts = self.edge(e);
            let mut cur: Vec<(f64, f64)> = Vec::new();
            for w in pts.windows(2) {
                if seen.insert(key(w[0], w[1])) {
                    if cur.is_empty() {
                        cur.push(w[0]);
                    }
                    extend_straight(&mut cur, w[1]);
                } else if cur.len() >= 2 {
                    push(std::mem::take(&mut cur), &mut last);
                } else {
                    cur.clear();
                }
            }
            if cur.len() >= 2 {
                // Continue the previous line when this one starts where it ended.
                match last.as_mut() {
                    Some(prev) if prev.last() == cur.first() => {
                        for &p in &cur[1..] {
                            extend_straight(prev, p);
                        }
                    }
                    _ => push(cur, &mut last),
                }
            }
        }
        drop(seen);
        if let Some(done) = last {
            out(done);
        }
    }
}

/// Adds `p` to a snapped line, moving its last point instead when the line runs straight on in
/// the same direction: the drawing is the same, with one point for a run of pixel steps.
fn extend_straight(line: &mut Vec<(f64, f64)>, p: (f64, f64)) {
    if let [.., a, b] = line[..] {
        let (dx1, dy1, dx2, dy2) = (b.0 - a.0, b.1 - a.1, p.0 - b.0, p.1 - b.1);
        if dx1 * dy2 == dy1 * dx2 && dx1 * dx2 + dy1 * dy2 > 0.0 {
            if let Some(last) = line.last_mut() {
                *last = p;
            }
            return;
        }
    }
    line.push(p);
}

/// SVG path data for polylines (one decimal; whole pixels print without one).
pub fn path_data(lines: &[Vec<(f64, f64)>]) -> String {
    let mut d = String::with_capacity(lines.len() * 24);
    for l in lines {
        for (i, &(x, y)) in l.iter().enumerate() {
            d.push(if i == 0 { 'M' } else { 'L' });
            crate::decimal::push_decimal(&mut d, x, 1, true);
            d.push(' ');
            crate::decimal::push_decimal(&mut d, y, 1, true);
        }
    }
    d
}

/// The point halfway along a polyline, by length.
pub fn midpoint(l: &[(f64, f64)]) -> Option<(f64, f64)> {
    let seg = |w: &[(f64, f64)]| (w[1].0 - w[0].0).hypot(w[1].1 - w[0].1);
    let total: f64 = l.windows(2).map(seg).sum();
    let mut left = total / 2.0;
    for w in l.windows(2) {
        let s = seg(w);
        if s >= left && s > 0.0 {
            let t = left / s;
            return Some((
                w[0].0 + t * (w[1].0 - w[0].0),
                w[0].1 + t * (w[1].1 - w[0].1),
            ));
        }
        left -= s;
    }
    l.first().copied()
}
