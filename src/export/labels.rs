//! Label placement on the map: greedy, most important first. Each label tries a few positions
//! around its anchor (right, left, above, below, then the diagonals); it takes the first whose box
//! stays inside the map area and overlaps no symbol and no label placed before it; a label with no
//! free position is left out and counted, so the picture can say how many it could not show.

use super::metrics::text_width;

/// An axis-aligned box: left, top, right, bottom.
pub type Rect = [f64; 4];

fn overlaps(a: &Rect, b: &Rect) -> bool {
    a[0] < b[2] && b[0] < a[2] && a[1] < b[3] && b[1] < a[3]
}

/// The boxes taken so far, in a coarse grid of buckets for quick look-ups.
pub struct Placer {
    bounds: Rect,
    cell: f64,
    cols: usize,
    rows: usize,
    buckets: Vec<Vec<Rect>>,
}

/// Where a label went: its text's start (x, baseline y) and anchor (`start`, `middle`, `end`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Spot {
    /// x of the text anchor.
    pub x: f64,
    /// Baseline y.
    pub y: f64,
    /// SVG `text-anchor`.
    pub anchor: &'static str,
}

impl Placer {
    /// An empty placer for labels inside `bounds`.
    pub fn new(bounds: Rect) -> Self {
        let cell = 64.0;
        let cols = (((bounds[2] - bounds[0]) / cell).ceil() as usize).max(1);
        let rows = (((bounds[3] - bounds[1]) / cell).ceil() as usize).max(1);
        Placer {
            bounds,
            cell,
            cols,
            rows,
            buckets: vec![Vec::new(); cols * rows],
        }
    }

    fn cells(&self, r: &Rect) -> impl Iterator<Item = usize> + '_ {
        let c = |v: f64, lo: f64, n: usize| {
            (((v - lo) / self.cell).floor().max(0.0) as usize).min(n - 1)
        };
        let (c0, c1) = (
            c(r[0], self.bounds[0], self.cols),
            c(r[2], self.bounds[0], self.cols),
        );
        let (r0, r1) = (
            c(r[1], self.bounds[1], self.rows),
            c(r[3], self.bounds[1], self.rows),
        );
        (r0..=r1).flat_map(move |row| (c0..=c1).map(move |col| row * self.cols + col))
    }

    /// True when `r` lies inside the bounds and overlaps nothing taken.
    pub fn free(&self, r: &Rect) -> bool {
        let b = &self.bounds;
        r[0] >= b[0]
            && r[1] >= b[1]
            && r[2] <= b[2]
            && r[3] <= b[3]
            && self
                .cells(r)
                .all(|i| self.buckets[i].iter().all(|o| !overlaps(o, r)))
    }

    /// Marks `r` as taken (symbols are taken whether or not they are free).
    pub fn take(&mut self, r: Rect) {
        let cells: Vec<usize> = self.cells(&r).collect();
        for i in cells {
            self.buckets[i].push(r);
        }
    }

    /// Places `text` (font `size` px) near the point (x, y), clear of a symbol of radius `r`;
    /// None when every position is taken.
    pub fn place(
        &mut self,
        text: &str,
        size: f64,
        bold: bool,
        (x, y): (f64, f64),
        r: f64,
    ) -> Option<Spot> {
        let w = text_width(text, size, bold);
        // The box spans the ascent (0.76 em) and descent (0.24 em) of DejaVu Sans around the
        // baseline, with a pixel of halo.
        let (asc, desc) = (0.76 * size + 1.0, 0.24 * size + 1.0);
        let g = r + 3.0;
        let mid = y + 0.5 * (asc - desc);
        let spots = [
            (x + g, mid, "start"),
            (x - g, mid, "end"),
            (x, y - g - desc, "middle"),
            (x, y + g + asc, "middle"),
            (x + g * 0.7, y - g * 0.7 - desc, "start"),
            (x - g * 0.7, y - g * 0.7 - desc, "end"),
            (x + g * 0.7, y + g * 0.7 + asc, "start"),
            (x - g * 0.7, y + g * 0.7 + asc, "end"),
        ];
        for (sx, sy, anchor) in spots {
            let left = match anchor {
                "start" => sx,
                "end" => sx - w,
                _ => sx - w / 2.0,
            };
            let rect = [left - 1.0, sy - asc, left + w + 1.0, sy + desc];
            if self.free(&rect) {
                self.take(rect);
                return Some(Spot {
                    x: sx,
                    y: sy,
                    anchor,
                });
            }
        }
        None
    }

    /// Places `text` centred on (x, y) itself (a number on its road) or at the nearby positions
    /// [`Placer::place`] tries; None when all are taken.
    pub fn place_on(&mut self, text: &str, size: f64, (x, y): (f64, f64)) -> Option<Spot> {
        let w = text_width(text, size, true);
        let (asc, desc) = (0.76 * size + 1.0, 0.24 * size + 1.0);
        let base = y + 0.5 * (asc - desc);
        let rect = [
            x - w / 2.0 - 1.0,
            base - asc,
            x + w / 2.0 + 1.0,
            base + desc,
        ];
        if self.free(&rect) {
            self.take(rect);
            return Some(Spot {
                x,
                y: base,
                anchor: "middle",
            });
        }
        self.place(text, size, true, (x, y), 2.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_never_overlap_and_crowded_ones_are_left_out() {
        let mut p = Placer::new([0.0, 0.0, 400.0, 300.0]);
        let mut boxes: Vec<Rect> = Vec::new();
        let mut left_out = 0;
        // Forty labels on nearly the same point: a few fit around it, the rest are left out.
        for i in 0..40 {
            let t = format!("Site {i}");
            match p.place(&t, 13.0, false, (200.0 + f64::from(i % 3), 150.0), 5.0) {
                Some(s) => {
                    let w = text_width(&t, 13.0, false);
                    let l = match s.anchor {
                        "start" => s.x,
                        "end" => s.x - w,
                        _ => s.x - w / 2.0,
                    };
                    let r = [l, s.y - 9.9, l + w, s.y + 3.1];
                    assert!(boxes.iter().all(|b| !overlaps(b, &r)), "{t} overlaps");
                    boxes.push(r);
                }
                None => left_out += 1,
            }
        }
        assert!((4..=8).contains(&boxes.len()), "{} placed", boxes.len());
        assert_eq!(left_out + boxes.len(), 40);
        // Nothing goes outside the bounds.
        assert!(
            p.place("far", 13.0, false, (399.0, 299.0), 5.0)
                .is_some_and(|s| s.x <= 399.0)
        );
    }
}
