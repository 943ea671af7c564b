//! Road lines as the picture draws them: polylines in pixels. A large network is drawn at the
//! picture's resolution: every vertex snaps to the pixel grid, repeated points go, a piece that
//! falls within one pixel vanishes (its neighbours, snapped to the same pixel, keep the line
//! unbroken) and a pixel step already drawn is not drawn again, so the SVG holds about as many
//! steps as the picture has pixels of road, however many roads the district has.

use super::layout::Frame;
use crate::network::Network;
use std::hash::{BuildHasherDefault, Hasher};

/// Above this many geometry points the network is drawn at the picture's resolution (a few
/// hundred thousand points already make an SVG of megabytes with detail no screen shows).
pub const SIMPLIFY_ABOVE: usize = 150_000;

/// Polylines in pixels, their points in one array: a national layer draws millions of lines, and
/// a `Vec` per line would cost a header and an allocation each (more than its points).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Lines {
    points: Vec<(f64, f64)>,
    /// `ends[i]`: one past the last point of line `i` in `points`.
    ends: Vec<usize>,
}

impl Lines {
    /// No lines.
    pub fn new() -> Lines {
        Lines::default()
    }

    /// Adds a line at the end.
    pub fn push(&mut self, line: &[(f64, f64)]) {
        self.points.extend_from_slice(line);
        self.ends.push(self.points.len());
    }

    /// How many lines.
    pub fn len(&self) -> usize {
        self.ends.len()
    }

    /// True when there is no line.
    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    /// The lines in order.
    pub fn iter(&self) -> impl Iterator<Item = &[(f64, f64)]> + '_ {
        let starts = std::iter::once(0).chain(self.ends.iter().copied());
        starts
            .zip(self.ends.iter().copied())
            .map(|(a, b)| &self.points[a..b])
    }

    /// Gives back the room the arrays grew beyond their contents.
    fn shrink_to_fit(&mut self) {
        self.points.shrink_to_fit();
        self.ends.shrink_to_fit();
    }
}

impl<'a> IntoIterator for &'a Lines {
    type Item = &'a [(f64, f64)];
    type IntoIter = Box<dyn Iterator<Item = &'a [(f64, f64)]> + 'a>;

    fn into_iter(self) -> Self::IntoIter {
        Box::new(self.iter())
    }
}

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
        let mut out = Vec::new();
        self.edge_into(e, &mut out);
        out
    }

    /// [`Stroker::edge`] into a reused buffer (cleared first).
    fn edge_into(&self, e: usize, out: &mut Vec<(f64, f64)>) {
        out.clear();
        let g = self.net.edge_geometry(e);
        out.reserve(g.len());
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
    }

    /// The polylines of many edges; when simplifying, steps already drawn are left out (a line
    /// breaks where it meets one) and the lines are as few as the drawing allows.
    pub fn edges(&self, edges: impl Iterator<Item = usize>) -> Lines {
        let mut lines = Lines::new();
        self.each_line(edges, |l| lines.push(&l));
        lines.shrink_to_fit();
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
        // Millions of pixel steps on a national layer: steps between neighbouring pixels (nearly
        // all) are bits in a grid over the drawn extent, others go to a hash set.
        let edges: Vec<u32> = edges.map(|e| e as u32).collect();
        let mut pts = Vec::new();
        let (mut lo, mut hi) = ((i32::MAX, i32::MAX), (i32::MIN, i32::MIN));
        for &e in &edges {
            self.edge_into(e as usize, &mut pts);
            for &(x, y) in &pts {
                let (x, y) = (x as i32, y as i32);
                lo = (lo.0.min(x), lo.1.min(y));
                hi = (hi.0.max(x), hi.1.max(y));
            }
        }
        let mut seen = Steps::new(lo, hi);
        let key =
            |a: (f64, f64), b: (f64, f64)| ((a.0 as i32, a.1 as i32), (b.0 as i32, b.1 as i32));
        let mut last: Option<Vec<(f64, f64)>> = None;
        let mut push = |line: Vec<(f64, f64)>, last: &mut Option<Vec<(f64, f64)>>| {
            if let Some(done) = last.replace(line) {
                out(done);
            }
        };
        for e in edges {
            self.edge_into(e as usize, &mut pts);
            let mut cur: Vec<(f64, f64)> = Vec::new();
            for w in pts.windows(2) {
                let (a, b) = key(w[0], w[1]);
                if seen.insert(a, b) {
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

/// The pixel steps drawn so far (a step and its reverse are one step): a step between pixels
/// that touch (side or corner) is one bit of a grid over the extent, four bits per pixel (the
/// directions east, south-west, south, south-east to a pixel after it in row order); any other
/// step, or any when the grid would be large, goes to a hash set. A grid bit costs one memory
/// touch where a hash table of millions of steps misses the cache twice.
pub(crate) struct Steps {
    lo: (i32, i32),
    /// Grid width and height in pixels (0 when there is no grid).
    size: (i64, i64),
    bits: Vec<u64>,
    other: std::collections::HashSet<(u64, u64), BuildHasherDefault<StepHasher>>,
}

/// The largest grid, in bits (32 MiB).
const MAX_GRID_BITS: i64 = 1 << 28;

impl Steps {
    /// Steps between pixels within `lo..=hi` (both corners included).
    pub(crate) fn new(lo: (i32, i32), hi: (i32, i32)) -> Steps {
        let (w, h) = (
            i64::from(hi.0) - i64::from(lo.0) + 1,
            i64::from(hi.1) - i64::from(lo.1) + 1,
        );
        let size = if w > 0 && h > 0 && w.saturating_mul(h).saturating_mul(4) <= MAX_GRID_BITS {
            (w, h)
        } else {
            (0, 0)
        };
        Steps {
            lo,
            size,
            // Zeroed pages are touched only where a bit is set.
            bits: vec![0; ((size.0 * size.1 * 4) as usize).div_ceil(64)],
            other: Default::default(),
        }
    }

    /// Records the step from `a` to `b`; false when it (either way round) was already there.
    pub(crate) fn insert(&mut self, a: (i32, i32), b: (i32, i32)) -> bool {
        // Order the ends by row, then column: the step then points east or into the next row.
        let (a, b) = if (a.1, a.0) <= (b.1, b.0) {
            (a, b)
        } else {
            (b, a)
        };
        let dir = match (b.0 - a.0, b.1 - a.1) {
            (1, 0) => Some(0),
            (-1, 1) => Some(1),
            (0, 1) => Some(2),
            (1, 1) => Some(3),
            _ => None,
        };
        let (x, y) = (
            i64::from(a.0) - i64::from(self.lo.0),
            i64::from(a.1) - i64::from(self.lo.1),
        );
        match dir {
            Some(d) if (0..self.size.0).contains(&x) && (0..self.size.1).contains(&y) => {
                let bit = ((y * self.size.0 + x) * 4 + d) as usize;
                let (word, mask) = (bit / 64, 1u64 << (bit % 64));
                let fresh = self.bits[word] & mask == 0;
                self.bits[word] |= mask;
                fresh
            }
            _ => {
                let pixel = |p: (i32, i32)| (u64::from(p.0 as u32) << 32) | u64::from(p.1 as u32);
                self.other.insert((pixel(a), pixel(b)))
            }
        }
    }
}

/// Hashes the two words of a pixel step with a folded 128-bit multiply, so that every bit of
/// both pixels reaches the low bits the table indexes by (a plain multiply leaves the row of a
/// step, the high word, almost out of them: a row of steps would pile into a few buckets).
#[derive(Default)]
struct StepHasher(u64);

impl Hasher for StepHasher {
    fn write(&mut self, bytes: &[u8]) {
        for b in bytes {
            self.write_u64(u64::from(*b));
        }
    }
    #[inline]
    fn write_u64(&mut self, i: u64) {
        let m = u128::from(self.0 ^ i) * 0x9e37_79b9_7f4a_7c15;
        self.0 = (m as u64) ^ ((m >> 64) as u64);
    }
    #[inline]
    fn finish(&self) -> u64 {
        self.0
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
pub fn path_data<L: AsRef<[(f64, f64)]>>(lines: impl IntoIterator<Item = L>) -> String {
    let mut d = String::new();
    for l in lines {
        let l = l.as_ref();
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

#[cfg(test)]
mod tests {
    use super::*;

    /// The grid and the hash set together answer as one plain set of unordered steps would, for
    /// steps inside and outside the grid, short and long, both ways round, and with no grid.
    #[test]
    fn steps_remember_like_a_plain_set() {
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut next = |n: i32| {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state % n as u64) as i32 - 2
        };
        for (lo, hi) in [((0, 0), (9, 7)), ((0, 0), (1 << 20, 1 << 20))] {
            let mut steps = Steps::new(lo, hi);
            let mut plain = std::collections::HashSet::new();
            for _ in 0..20_000 {
                let a = (next(14), next(12));
                let b = if next(5) == 0 {
                    (next(14), next(12))
                } else {
                    (a.0 + next(3) + 1, a.1 + next(3) + 1)
                };
                let key = if a <= b { (a, b) } else { (b, a) };
                assert_eq!(steps.insert(a, b), plain.insert(key), "{a:?} {b:?}");
            }
            assert!(plain.len() > 100);
        }
    }
}
