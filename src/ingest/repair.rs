//! Repairs of digitising errors on the clustered line sequences, before they are split into edges:
//!
//! - **undershoots**: a dangling line end within the tolerance of another line's interior is moved
//!   to the foot of the perpendicular and joined into that line;
//! - **crossings** (opt-in): lines that cross without a shared vertex get one there.
//!
//! Segments are found through a grid keyed by each segment's midpoint (cells wider than a short
//! segment plus the tolerance, sorted in parallel); the few long segments go to an R-tree.

use super::qa::{QaKind, QaPoint};
use super::wrap::{self, Frame};
use rayon::prelude::*;
use rstar::primitives::{GeomWithData, Line};
use rstar::{AABB, RTree};

/// Clustered line parts: `seq[seq_ends[p-1]..seq_ends[p]]` are part p's clusters.
pub struct Parts<'a> {
    /// Cluster ids of every part, concatenated.
    pub seq: &'a mut Vec<u32>,
    /// End offsets of the parts.
    pub ends: &'a mut Vec<usize>,
    /// The feature (index into the layer's features) of each part.
    pub feature: &'a [u32],
    /// Cluster positions, lon/lat.
    pub centres: &'a mut Vec<[f64; 2]>,
    /// Cluster positions in the native projected CRS (empty when lengths are geodesic).
    pub native: &'a mut Vec<[f64; 2]>,
}

/// A segment: (part, position in the part).
type SegRef = (u32, u32);

/// An R-tree of segments.
type SegTree = RTree<GeomWithData<Line<[f64; 2]>, SegRef>>;

/// A crossing: (part, position, fraction) of both segments and the point.
type Crossing = (u32, u32, f64, u32, u32, f64, [f64; 2]);

/// A join candidate: (distance m, part, position, fraction along, dangling cluster).
type Candidate = (f64, u32, u32, f64, u32);

/// Segment-degree (distinct neighbouring clusters, saturating) and line-end flag of every cluster.
pub fn segment_degrees(seq: &[u32], ends: &[usize], n: usize) -> (Vec<u8>, Vec<bool>) {
    let mut segs: Vec<u64> = Vec::with_capacity(seq.len());
    let mut is_end = vec![false; n];
    let mut s0 = 0;
    for &e in ends {
        for w in seq[s0..e].windows(2) {
            let (a, b) = (w[0].min(w[1]) as u64, w[0].max(w[1]) as u64);
            segs.push(a << 32 | b);
        }
        is_end[seq[s0] as usize] = true;
        is_end[seq[e - 1] as usize] = true;
        s0 = e;
    }
    segs.par_sort_unstable();
    segs.dedup();
    let mut degree = vec![0u8; n];
    for &k in &segs {
        for c in [k >> 32, k & 0xFFFF_FFFF] {
            degree[c as usize] = degree[c as usize].saturating_add(1);
        }
    }
    (degree, is_end)
}

/// A vertex to insert into part `part` after position `after` (within the part), ordered by `t`.
#[derive(Debug, Clone, Copy)]
struct Insert {
    part: usize,
    after: usize,
    t: f64,
    cluster: u32,
}

/// (part, position) of every segment, with its end clusters.
fn all_segments(seq: &[u32], ends: &[usize]) -> Vec<(u32, u32)> {
    let mut out = Vec::with_capacity(seq.len());
    let mut s0 = 0;
    for (p, &e) in ends.iter().enumerate() {
        for k in 0..(e - s0 - 1) {
            out.push((p as u32, k as u32));
        }
        s0 = e;
    }
    out
}

/// Joins dangling ends to lines within `snap_m`; returns QA points for every join.
pub fn join_undershoots(parts: &mut Parts, snap_m: f64) -> Vec<QaPoint> {
    if snap_m <= 0.0 {
        return Vec::new();
    }
    let n = parts.centres.len();
    let (degree, is_end) = segment_degrees(parts.seq, parts.ends, n);
    let dangling: Vec<u32> = (0..n as u32)
        .filter(|&c| is_end[c as usize] && degree[c as usize] == 1)
        .collect();
    if dangling.is_empty() {
        return Vec::new();
    }
    let seq = &*parts.seq;
    let ends = &*parts.ends;
    let centres = &*parts.centres;
    let starts: Vec<usize> = std::iter::once(0).chain(ends.iter().copied()).collect();
    let seg_clusters = |p: u32, k: u32| {
        let i = starts[p as usize] + k as usize;
        (seq[i], seq[i + 1])
    };
    // Segments by midpoint cell; long ones in an R-tree. Columns wrap at ±180° (`MidGrid`).
    let cell_m = (8.0 * snap_m).max(200.0);
    let grid = MidGrid::new(centres, cell_m);
    let key = |p: [f64; 2]| grid.key(p);
    // Only cells around dangling ends matter: index just the segments whose midpoint falls there.
    let mut wanted: crate::fxhash::FxHashMap<u64, ()> = Default::default();
    for &c in &dangling {
        for k in grid.around(centres[c as usize]) {
            wanted.insert(k, ());
        }
    }
    let segs = all_segments(seq, ends);
    // Upper bound of a segment's half-length from degree differences (a degree is at most 111.7 km
    // along a meridian and 111.4 km along the equator).
    let short_limit_m = cell_m / 2.0 - snap_m;
    let half_len = |pa: [f64; 2], pb: [f64; 2]| {
        let dlon = (wrap::near(pb[0], pa[0]) - pa[0]).abs();
        (dlon * 111_400.0).hypot((pa[1] - pb[1]).abs() * 111_700.0) / 2.0
    };
    let long: Vec<SegRef> = segs
        .par_iter()
        .copied()
        .filter(|&(p, k)| {
            let (a, b) = seg_clusters(p, k);
            half_len(centres[a as usize], centres[b as usize]) > short_limit_m
        })
        .collect();
    let mut keyed: Vec<(u64, u32, u32)> = segs
        .par_iter()
        .filter_map(|&(p, k)| {
            let (a, b) = seg_clusters(p, k);
            let (pa, pb) = (centres[a as usize], centres[b as usize]);
            if half_len(pa, pb) > short_limit_m {
                return None;
            }
            let kk = key(wrap::lerp(pa, pb, 0.5));
            wanted.contains_key(&kk).then_some((kk, p, k))
        })
        .collect();
    drop(segs);
    keyed.par_sort_unstable();
    let long_tree = seg_tree(long.iter().map(|&(p, k)| {
        let (a, b) = seg_clusters(p, k);
        (centres[a as usize], centres[b as usize], (p, k))
    }));
    // Nearest segment within the tolerance for every dangling end (not one touching it).
    let found: Vec<Option<Candidate>> = dangling
        .par_iter()
        .map(|&c| {
            let p = centres[c as usize];
            // Feet found in a frame at the end that wraps at ±180°; distances geodesic.
            let frame = Frame::at(p);
            let mut best: Option<Candidate> = None;
            let mut consider = |sp: u32, sk: u32| {
                let (a, b) = seg_clusters(sp, sk);
                if a == c || b == c {
                    return;
                }
                let (d, t) = frame.foot(centres[a as usize], centres[b as usize]);
                if d <= snap_m && best.is_none_or(|(bd, bp, bk, _, _)| (d, sp, sk) < (bd, bp, bk)) {
                    best = Some((d, sp, sk, t, c));
                }
            };
            for k in grid.around(p) {
                let lo = keyed.partition_point(|e| e.0 < k);
                for e in keyed[lo..].iter().take_while(|e| e.0 == k) {
                    consider(e.1, e.2);
                }
            }
            for s in near_segments(&long_tree, p, snap_m) {
                consider(s.0, s.1);
            }
            best
        })
        .collect();
    let resolved: Vec<(Candidate, u32, u32)> = found
        .into_iter()
        .flatten()
        .map(|cand| {
            let (a, b) = seg_clusters(cand.1, cand.2);
            (cand, a, b)
        })
        .collect();
    let mut inserts = Vec::new();
    let mut qa = Vec::new();
    for ((d, p, k, t, c), a, b) in resolved {
        let (pa, pb) = (parts.centres[a as usize], parts.centres[b as usize]);
        let f = round7_lonlat(wrap::lerp(pa, pb, t));
        qa.push(QaPoint {
            kind: QaKind::JoinedUndershoot,
            pos: f,
            distance_m: d,
            feature: None,
        });
        if t <= 1e-9 || t >= 1.0 - 1e-9 {
            // The nearest point is the segment's own end vertex: the end joins that vertex.
            let target = if t <= 1e-9 { a } else { b };
            for x in parts.seq.iter_mut() {
                if *x == c {
                    *x = target;
                }
            }
            continue;
        }
        parts.centres[c as usize] = f;
        if !parts.native.is_empty() {
            let (na, nb) = (parts.native[a as usize], parts.native[b as usize]);
            parts.native[c as usize] = [na[0] + t * (nb[0] - na[0]), na[1] + t * (nb[1] - na[1])];
        }
        inserts.push(Insert {
            part: p as usize,
            after: k as usize,
            t,
            cluster: c,
        });
    }
    apply(parts, inserts);
    qa
}

/// Joins lines where they cross without a shared vertex (`apply`), or only reports the crossings.
pub fn crossings(parts: &mut Parts, apply_them: bool) -> Vec<QaPoint> {
    let seq = &*parts.seq;
    let ends = &*parts.ends;
    let centres = &*parts.centres;
    let starts: Vec<usize> = std::iter::once(0).chain(ends.iter().copied()).collect();
    let seg_clusters = |p: u32, k: u32| {
        let i = starts[p as usize] + k as usize;
        (seq[i], seq[i + 1])
    };
    let segs = all_segments(seq, ends);
    let tree = seg_tree(segs.iter().map(|&(p, k)| {
        let (a, b) = seg_clusters(p, k);
        (centres[a as usize], centres[b as usize], (p, k))
    }));
    let data_lon = lon_span(&tree);
    let hits: Vec<Crossing> = segs
        .par_iter()
        .flat_map_iter(|&(p, k)| {
            let (a, b) = seg_clusters(p, k);
            let (pa, pb) = (centres[a as usize], centres[b as usize]);
            let ub = wrap::unwrap(pb, pa);
            let (lo, hi) = (
                [pa[0].min(ub[0]), pa[1].min(ub[1])],
                [pa[0].max(ub[0]), pa[1].max(ub[1])],
            );
            // Copies of the box a turn away may find one segment twice: each is taken once.
            let mut found: Vec<SegRef> = wrap::search_boxes(lo, hi, data_lon)
                .into_iter()
                .flat_map(|(l, h)| {
                    tree.locate_in_envelope_intersecting(&AABB::from_corners(l, h))
                        .map(|s| s.data)
                })
                .filter(|&s| s > (p, k))
                .collect();
            found.sort_unstable();
            found.dedup();
            let mut out = Vec::new();
            for (p2, k2) in found {
                let (c, d) = seg_clusters(p2, k2);
                if a == c || a == d || b == c || b == d {
                    continue;
                }
                if let Some((t, u, x)) = intersect(pa, pb, centres[c as usize], centres[d as usize])
                {
                    out.push((p, k, t, p2, k2, u, x));
                }
            }
            out
        })
        .collect();
    let kind = if apply_them {
        QaKind::NodedCrossing
    } else {
        QaKind::CrossingLeftApart
    };
    // k lines through one point cross pairwise k(k-1)/2 times at (nearly) the same spot: they make
    // one junction, so the points are grouped first.
    let (point_of, points) = group_points(&hits);
    let qa: Vec<QaPoint> = points
        .iter()
        .map(|&(pos, _)| QaPoint {
            kind,
            pos,
            distance_m: 0.0,
            feature: None,
        })
        .collect();
    if apply_them {
        let first = parts.centres.len() as u32;
        for &(x, h) in &points {
            parts.centres.push(x);
            if !parts.native.is_empty() {
                // The native position of the first crossing found there, on its first segment.
                let (p, k, t, ..) = hits[h];
                let starts2: Vec<usize> = std::iter::once(0)
                    .chain(parts.ends.iter().copied())
                    .collect();
                let i = starts2[p as usize] + k as usize;
                let (na, nb) = (
                    parts.native[parts.seq[i] as usize],
                    parts.native[parts.seq[i + 1] as usize],
                );
                parts
                    .native
                    .push([na[0] + t * (nb[0] - na[0]), na[1] + t * (nb[1] - na[1])]);
            }
        }
        let mut inserts = Vec::new();
        for (h, &(p, k, t, p2, k2, u, _)) in hits.iter().enumerate() {
            let c = first + point_of[h];
            inserts.push(Insert {
                part: p as usize,
                after: k as usize,
                t,
                cluster: c,
            });
            inserts.push(Insert {
                part: p2 as usize,
                after: k2 as usize,
                t: u,
                cluster: c,
            });
        }
        apply(parts, inserts);
    }
    qa
}

/// Crossing points closer than this many degrees (about 0.1 mm) are one point.
const SAME_POINT_DEG: f64 = 1e-9;

/// Groups the crossings' points: for each crossing, the index of its point; for each point, its
/// position and its first crossing. Sequential over the crossings in order, so deterministic.
fn group_points(hits: &[Crossing]) -> (Vec<u32>, Vec<([f64; 2], usize)>) {
    let cell = |x: f64| (x / SAME_POINT_DEG).floor() as i64;
    let mut grid: std::collections::HashMap<(i64, i64), u32> = Default::default();
    let mut points: Vec<([f64; 2], usize)> = Vec::new();
    let mut of = Vec::with_capacity(hits.len());
    for (h, hit) in hits.iter().enumerate() {
        let x = hit.6;
        // Cells by the longitude in [-180, 180); a point on the seam also looks a turn away.
        let lon = wrap::canonical_lon(x[0]);
        let (cx, cy) = (cell(lon), cell(x[1]));
        let seam = [lon + 360.0, lon - 360.0]
            .into_iter()
            .filter(|l| (-180.0 - SAME_POINT_DEG..=180.0 + SAME_POINT_DEG).contains(l))
            .map(cell);
        let near = std::iter::once(cx)
            .chain(seam)
            .flat_map(|c| (-1..=1).flat_map(move |dx| (-1..=1).map(move |dy| (c + dx, cy + dy))))
            .filter_map(|k| grid.get(&k).copied())
            .find(|&i| {
                let q = points[i as usize].0;
                (wrap::near(q[0], x[0]) - x[0]).abs() <= SAME_POINT_DEG
                    && (q[1] - x[1]).abs() <= SAME_POINT_DEG
            });
        let i = near.unwrap_or_else(|| {
            points.push((x, h));
            let i = (points.len() - 1) as u32;
            grid.insert((cx, cy), i);
            i
        });
        of.push(i);
    }
    (of, points)
}

/// Proper crossing of segments a–b and c–d (not at their ends): fractions along each and the
/// point, found in a frame at `a` that wraps at ±180° (affine in lon/lat, so lines through one
/// point still meet in one point).
fn intersect(a: [f64; 2], b: [f64; 2], c: [f64; 2], d: [f64; 2]) -> Option<(f64, f64, [f64; 2])> {
    let frame = Frame::at(a);
    let (b2, c2, d2) = (frame.xy(b), frame.xy(c), frame.xy(d));
    let r = b2;
    let s = [d2[0] - c2[0], d2[1] - c2[1]];
    let den = r[0] * s[1] - r[1] * s[0];
    if den.abs() < 1e-12 {
        return None;
    }
    let t = (c2[0] * s[1] - c2[1] * s[0]) / den;
    let u = (c2[0] * r[1] - c2[1] * r[0]) / den;
    const EPS: f64 = 1e-9;
    if t <= EPS || t >= 1.0 - EPS || u <= EPS || u >= 1.0 - EPS {
        return None;
    }
    Some((t, u, round7_lonlat(wrap::lerp(a, b, t))))
}

/// A position rounded to the output precision, longitude kept within ±180°.
fn round7_lonlat(p: [f64; 2]) -> [f64; 2] {
    let r = super::geodesy::round7(p);
    [wrap::fold(r[0]), r[1]]
}

/// An R-tree of segments, each held unwrapped (its second end within 180° of its first).
fn seg_tree(segs: impl Iterator<Item = ([f64; 2], [f64; 2], SegRef)>) -> SegTree {
    RTree::bulk_load(
        segs.map(|(a, b, r)| GeomWithData::new(Line::new(a, wrap::unwrap(b, a)), r))
            .collect(),
    )
}

/// The longitudes an R-tree's entries span (every longitude when it is empty).
fn lon_span<T: rstar::RTreeObject<Envelope = AABB<[f64; 2]>>>(tree: &RTree<T>) -> [f64; 2] {
    if tree.size() == 0 {
        return [-180.0, 180.0];
    }
    let e = tree.root().envelope();
    [e.lower()[0], e.upper()[0]]
}

/// The segments of `tree` whose boxes lie within `reach_m` metres of `p` (a superset; each once).
fn near_segments(tree: &SegTree, p: [f64; 2], reach_m: f64) -> Vec<SegRef> {
    let (dlon, dlat) = wrap::reach_deg(reach_m, p[1].abs());
    let dlon = dlon.unwrap_or(360.0);
    let mut out: Vec<SegRef> = wrap::search_boxes(
        [p[0] - dlon, p[1] - dlat],
        [p[0] + dlon, p[1] + dlat],
        lon_span(tree),
    )
    .into_iter()
    .flat_map(|(l, h)| {
        tree.locate_in_envelope_intersecting(&AABB::from_corners(l, h))
            .map(|s| s.data)
    })
    .collect();
    out.sort_unstable();
    out.dedup();
    out
}

/// Grid cells about `cell_m` metres wide keyed by segment midpoints; columns divide the whole turn
/// and wrap at ±180°, and where a cell's reach may go round a pole there is one column.
struct MidGrid {
    cols: i64,
    cell: [f64; 2],
}

impl MidGrid {
    fn new(centres: &[[f64; 2]], cell_m: f64) -> MidGrid {
        let max_lat = centres.iter().fold(0.0f64, |m, p| m.max(p[1].abs()));
        let (dlon, dlat) = wrap::reach_deg(cell_m, max_lat);
        let cols = dlon.map_or(1, |d| (360.0 / d).floor() as i64);
        let cols = if cols >= 3 { cols } else { 1 };
        MidGrid {
            cols,
            cell: [360.0 / cols as f64, dlat],
        }
    }

    fn cell_of(&self, p: [f64; 2]) -> (i64, i64) {
        let x = wrap::canonical_lon(p[0]) + 180.0;
        (
            ((x / self.cell[0]).floor() as i64).clamp(0, self.cols - 1),
            (p[1] / self.cell[1]).floor() as i64,
        )
    }

    fn pack(cx: i64, cy: i64) -> u64 {
        ((cx as u64) << 32) | ((cy + (1 << 31)) as u64 & 0xFFFF_FFFF)
    }

    fn key(&self, p: [f64; 2]) -> u64 {
        let (cx, cy) = self.cell_of(p);
        Self::pack(cx, cy)
    }

    /// The keys of the cell of `p` and of its neighbours (columns wrapping), each once.
    fn around(&self, p: [f64; 2]) -> Vec<u64> {
        let (cx, cy) = self.cell_of(p);
        let mut out: Vec<u64> = (-1..=1)
            .flat_map(|dx| (-1..=1).map(move |dy| (dx, dy)))
            .map(|(dx, dy)| Self::pack((cx + dx).rem_euclid(self.cols), cy + dy))
            .collect();
        out.sort_unstable();
        out.dedup();
        out
    }
}

/// Rebuilds the sequences with the insertions in place (ordered along each segment).
fn apply(parts: &mut Parts, mut inserts: Vec<Insert>) {
    if inserts.is_empty() {
        return;
    }
    inserts.sort_by(|x, y| {
        (x.part, x.after)
            .cmp(&(y.part, y.after))
            .then(x.t.total_cmp(&y.t))
    });
    let mut out = Vec::with_capacity(parts.seq.len() + inserts.len());
    let mut new_ends = Vec::with_capacity(parts.ends.len());
    let mut it = inserts.into_iter().peekable();
    let mut s0 = 0;
    for (p, &e) in parts.ends.iter().enumerate() {
        for (k, &c) in parts.seq[s0..e].iter().enumerate() {
            if out.last() != Some(&c) || out.len() == new_ends.last().copied().unwrap_or(0) {
                out.push(c);
            }
            while let Some(ins) = it.peek().filter(|i| i.part == p && i.after == k) {
                if out.last() != Some(&ins.cluster) {
                    out.push(ins.cluster);
                }
                it.next();
            }
        }
        new_ends.push(out.len());
        s0 = e;
    }
    *parts.seq = out;
    *parts.ends = new_ends;
}
