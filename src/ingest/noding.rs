//! Noding: from loose line parts to a topological network.
//!
//! 1. Vertices are clustered: each vertex joins the nearest existing cluster centre within the
//!    snapping tolerance, or starts a new cluster (input order decides, so the result is deterministic
//!    and no vertex moves farther than the tolerance).
//! 2. A cluster is a junction when it ends a line or when the distinct segments meeting there are not
//!    exactly two (a crossing, a branch or a dead end).
//! 3. Lines are split at junctions into edges; exact duplicate edges and collapsed lines are dropped.
//! 4. Edge lengths are measured on the ellipsoid, in parallel.

use super::geodesy::{distance_m, metres_per_degree, polyline_length_m};
use super::qa::{QaKind, QaPoint};
use super::roads::LineLayer;
use crate::fxhash::FxHashMap;
use crate::network::{Edge, Network, cost_of};
use rayon::prelude::*;

/// What noding changed, for the summary and the analyst.
#[derive(Debug, Clone, Default, serde::Serialize)]
pub struct NodingStats {
    /// Snapping tolerance used, metres.
    pub snap_m: f64,
    /// Vertices moved onto a nearby cluster centre by snapping.
    pub vertices_moved: usize,
    /// Largest distance a vertex was moved, metres.
    pub max_move_m: f64,
    /// Line parts whose vertices all merged into one point (zero length), dropped.
    pub zero_length_parts_dropped: usize,
    /// Edges identical to an earlier edge (same vertices, either direction), dropped.
    pub duplicate_edges_dropped: usize,
    /// Dangling ends joined to a nearby line (undershoots).
    pub undershoots_joined: usize,
    /// Short dangling pieces past a junction removed (overshoots).
    pub overshoots_trimmed: usize,
    /// Edges within the tolerance of another between the same junctions, removed.
    pub near_duplicates_dropped: usize,
    /// Crossings without a shared vertex found (joined with `--node-crossings`).
    pub crossings: usize,
    /// QA points by kind.
    pub qa: std::collections::BTreeMap<String, usize>,
    /// The QA points themselves (written to qa.geojson).
    #[serde(skip)]
    pub qa_points: Vec<QaPoint>,
    /// Junctions in the network.
    pub junctions: usize,
    /// Edges in the network.
    pub edges: usize,
}

/// How lines are noded.
#[derive(Debug, Clone, Copy, Default)]
pub struct NodingOptions {
    /// Snapping tolerance in metres (0: identical coordinates only, no repairs).
    pub snap_m: f64,
    /// Join lines where they cross without a shared vertex.
    pub node_crossings: bool,
    /// Report crossings without a shared vertex even when they are not joined (slower).
    pub report_crossings: bool,
}

/// Builds the network from a line layer with the given snapping tolerance in metres.
pub fn node(layer: LineLayer, snap_m: f64) -> (Network, NodingStats) {
    node_with(
        layer,
        NodingOptions {
            snap_m,
            ..Default::default()
        },
    )
}

/// Builds the network with all options; QA points go into the stats.
pub fn node_with(mut layer: LineLayer, opts: NodingOptions) -> (Network, NodingStats) {
    let snap_m = opts.snap_m;
    let mut stats = NodingStats {
        snap_m,
        ..Default::default()
    };
    let mut qa: Vec<QaPoint> = Vec::new();
    let (cid, founders) = cluster(&layer.coords, snap_m);
    let mut centres: Vec<[f64; 2]> = founders.iter().map(|&f| layer.coords[f as usize]).collect();
    let mut centres_native: Vec<[f64; 2]> = if layer.native.is_empty() {
        Vec::new()
    } else {
        founders.iter().map(|&f| layer.native[f as usize]).collect()
    };
    let mut moved: std::collections::BTreeMap<u32, (f64, u32)> = Default::default();
    for (i, &c) in cid.iter().enumerate() {
        let centre = centres[c as usize];
        if centre != layer.coords[i] {
            stats.vertices_moved += 1;
            let d = distance_m(layer.coords[i], centre);
            stats.max_move_m = stats.max_move_m.max(d);
            let part = layer.part_ends.partition_point(|&e| e <= i);
            let f = layer.features[layer.part_feature[part] as usize].source_index;
            let m = moved.entry(c).or_insert((0.0, f));
            m.0 = m.0.max(d);
        }
    }
    for (c, (d, f)) in moved {
        qa.push(QaPoint {
            kind: QaKind::MergedVertices,
            pos: centres[c as usize],
            distance_m: d,
            feature: Some(f),
        });
    }

    // Cluster sequences per part, consecutive repeats removed.
    let mut seq: Vec<u32> = Vec::with_capacity(cid.len());
    let mut seq_ends: Vec<usize> = Vec::with_capacity(layer.part_ends.len());
    let mut seq_feature: Vec<u32> = Vec::with_capacity(layer.part_ends.len());
    let mut start = 0;
    for (p, &end) in layer.part_ends.iter().enumerate() {
        let before = seq.len();
        for &c in &cid[start..end] {
            if seq.len() == before || *seq.last().unwrap() != c {
                seq.push(c);
            }
        }
        start = end;
        if seq.len() - before < 2 {
            if let Some(&c) = seq.get(before) {
                qa.push(QaPoint {
                    kind: QaKind::RemovedZeroLength,
                    pos: centres[c as usize],
                    distance_m: 0.0,
                    feature: Some(layer.features[layer.part_feature[p] as usize].source_index),
                });
            }
            seq.truncate(before);
            stats.zero_length_parts_dropped += 1;
            continue;
        }
        seq_ends.push(seq.len());
        seq_feature.push(layer.part_feature[p]);
    }
    drop(cid);
    // From here on only cluster centres are used: free the input's vertices (the largest arrays).
    layer.coords = Vec::new();
    layer.native = Vec::new();
    layer.part_ends = Vec::new();

    // Repairs of digitising errors: undershoots joined, crossings joined or reported.
    {
        let mut parts = super::repair::Parts {
            seq: &mut seq,
            ends: &mut seq_ends,
            feature: &seq_feature,
            centres: &mut centres,
            native: &mut centres_native,
        };
        let joined = super::repair::join_undershoots(&mut parts, snap_m);
        stats.undershoots_joined = joined.len();
        qa.extend(joined);
        if opts.node_crossings || opts.report_crossings {
            let crossed = super::repair::crossings(&mut parts, opts.node_crossings);
            stats.crossings = crossed.len();
            qa.extend(crossed);
        }
    }

    // Junctions: line ends, and clusters where the distinct road segments meeting there are not
    // exactly two (so duplicated or overlapping lines do not turn their shared vertices into junctions).
    let (degree, is_end) = super::repair::segment_degrees(&seq, &seq_ends, centres.len());
    let mut junction_of = vec![u32::MAX; centres.len()];
    let mut junctions = Vec::new();
    for c in 0..centres.len() {
        if is_end[c] || degree[c] != 2 {
            junction_of[c] = junctions.len() as u32;
            junctions.push(centres[c]);
        }
    }
    drop(degree);
    drop(is_end);

    // Split at junctions into pieces (ranges of `seq`), dropping duplicates.
    // (start, end, feature) as u32: a third of the memory of usize ranges on big layers.
    let mut pieces: Vec<(u32, u32, u32)> = Vec::new();
    let mut seen: FxHashMap<u64, u32> = FxHashMap::default();
    let mut seen_exact: std::collections::HashMap<Vec<u32>, u32> = Default::default();
    let mut s0 = 0;
    for (k, &e) in seq_ends.iter().enumerate() {
        let mut a = s0;
        for i in s0 + 1..e {
            if junction_of[seq[i] as usize] != u32::MAX {
                let piece = &seq[a..=i];
                if is_new_piece(piece, &seq, &pieces, &mut seen, &mut seen_exact) {
                    pieces.push((a as u32, (i + 1) as u32, seq_feature[k]));
                } else {
                    stats.duplicate_edges_dropped += 1;
                    qa.push(QaPoint {
                        kind: QaKind::RemovedDuplicate,
                        pos: centres[piece[piece.len() / 2] as usize],
                        distance_m: 0.0,
                        feature: Some(layer.features[seq_feature[k] as usize].source_index),
                    });
                }
                a = i;
            }
        }
        s0 = e;
    }
    drop(seen);
    drop(seen_exact);
    drop((seq_ends, seq_feature));

    // Edges with geometry, lengths measured in parallel: planar × unit in the source's conformal
    // projection when it kept its native coordinates, geodesic otherwise.
    let native = &centres_native;
    let to_meter = layer.to_meter;
    let feats = &layer.features;
    let edges: Vec<Edge> = pieces
        .par_iter()
        .map(|&(a, b, f)| {
            let (a, b) = (a as usize, b as usize);
            let length_m = if native.is_empty() {
                polyline_length_m(seq[a..b].iter().map(|&c| centres[c as usize]))
            } else {
                seq[a..b]
                    .windows(2)
                    .map(|w| {
                        let (p, q) = (native[w[0] as usize], native[w[1] as usize]);
                        (q[0] - p[0]).hypot(q[1] - p[1])
                    })
                    .sum::<f64>()
                    * to_meter
            };
            let damage = feats[f as usize].damage;
            Edge {
                from: junction_of[seq[a] as usize],
                to: junction_of[seq[b - 1] as usize],
                length_m,
                damage,
                cost: cost_of(length_m, damage),
                feature: f,
            }
        })
        .collect();
    drop(junction_of);
    let mut geom_offsets = Vec::with_capacity(pieces.len() + 1);
    geom_offsets.push(0);
    let mut geom = Vec::with_capacity(pieces.iter().map(|p| (p.1 - p.0) as usize).sum());
    for &(a, b, _) in &pieces {
        geom.extend(
            seq[a as usize..b as usize]
                .iter()
                .map(|&c| centres[c as usize]),
        );
        geom_offsets.push(geom.len());
    }
    // The working arrays are not needed by the clean-up: free them before it allocates.
    drop((pieces, seq, centres, centres_native));
    let mut net = Network {
        junctions,
        edges,
        geom_offsets,
        geom,
        features: layer.features,
    };
    let (trimmed, near) = super::cleanup::clean(&mut net, snap_m, &mut qa);
    stats.overshoots_trimmed = trimmed;
    stats.near_duplicates_dropped = near;
    // Dead ends, as suspicions for the analyst.
    let mut degree = vec![0u32; net.junctions.len()];
    for e in &net.edges {
        degree[e.from as usize] += 1;
        degree[e.to as usize] += 1;
    }
    for (j, &d) in degree.iter().enumerate() {
        if d == 1 {
            qa.push(QaPoint {
                kind: QaKind::DanglingEnd,
                pos: net.junctions[j],
                distance_m: 0.0,
                feature: None,
            });
        }
    }
    stats.junctions = net.junctions.len();
    stats.edges = net.edges.len();
    for q in &qa {
        *stats.qa.entry(q.kind.label().to_string()).or_default() += 1;
    }
    stats.qa_points = qa;
    (net, stats)
}

/// Records `piece` and returns true unless an identical piece (either direction) was seen before.
fn is_new_piece(
    piece: &[u32],
    seq: &[u32],
    pieces: &[(u32, u32, u32)],
    seen: &mut FxHashMap<u64, u32>,
    seen_exact: &mut std::collections::HashMap<Vec<u32>, u32>,
) -> bool {
    let h = hash_canonical(piece);
    let id = pieces.len() as u32;
    match seen.get(&h) {
        None => {
            seen.insert(h, id);
            true
        }
        Some(&other) => {
            let (a, b, _) = pieces[other as usize];
            let (a, b) = (a as usize, b as usize);
            if same_piece(&seq[a..b], piece) {
                return false;
            }
            // A hash collision between different pieces: fall back to exact keys.
            let canon: Vec<u32> = if reversed_is_smaller(piece) {
                piece.iter().rev().copied().collect()
            } else {
                piece.to_vec()
            };
            match seen_exact.entry(canon) {
                std::collections::hash_map::Entry::Occupied(_) => false,
                std::collections::hash_map::Entry::Vacant(v) => {
                    v.insert(id);
                    true
                }
            }
        }
    }
}

/// True when the piece read backwards is lexicographically smaller than forwards.
fn reversed_is_smaller(piece: &[u32]) -> bool {
    piece.iter().rev().lt(piece.iter())
}

/// True when two pieces have the same vertices in the same or the opposite direction.
fn same_piece(a: &[u32], b: &[u32]) -> bool {
    a.len() == b.len() && (a == b || a.iter().eq(b.iter().rev()))
}

/// Hash of the piece in its direction-independent orientation, without allocating.
fn hash_canonical(piece: &[u32]) -> u64 {
    use std::hash::Hasher;
    let mut h = crate::fxhash::FxHasher::default();
    h.write_usize(piece.len());
    if reversed_is_smaller(piece) {
        piece.iter().rev().for_each(|&x| h.write_u32(x));
    } else {
        piece.iter().for_each(|&x| h.write_u32(x));
    }
    h.finish()
}

/// Assigns every vertex a cluster; returns (cluster per vertex, the vertex founding each cluster,
/// whose position is the cluster's centre).
///
/// With `snap_m == 0` only bit-identical coordinates share a cluster. Otherwise the result is that of
/// one pass in input order where each vertex joins the nearest existing centre within `snap_m` metres
/// (ties: the older cluster) or founds a new one, so centres are always more than `snap_m` apart and
/// no vertex moves farther than `snap_m`. Clusters are numbered in order of first appearance.
///
/// Most vertices have no other position within the tolerance; those are found in parallel on a sorted
/// grid, and only the rest ("contested" vertices) go through the sequential pass.
pub fn cluster(coords: &[[f64; 2]], snap_m: f64) -> (Vec<u32>, Vec<u32>) {
    let n = coords.len();
    let grid = Grid::new(coords, snap_m);
    let mut keyed: Vec<(u64, u32)> = coords
        .par_iter()
        .enumerate()
        .map(|(i, p)| (grid.key(*p), i as u32))
        .collect();
    keyed.par_sort_unstable();
    // Start of every run of equal cell keys.
    let mut starts: Vec<u32> = Vec::new();
    for i in 0..keyed.len() {
        if i == 0 || keyed[i].0 != keyed[i - 1].0 {
            starts.push(i as u32);
        }
    }
    starts.push(keyed.len() as u32);
    let cell_keys: Vec<u64> = starts[..starts.len() - 1]
        .iter()
        .map(|&s| keyed[s as usize].0)
        .collect();

    // Per cell: the first vertex at each exact position, and whether another position lies within
    // the tolerance (in this cell or a neighbouring one). Cells are taken in chunks to keep tasks
    // large; results go straight into per-vertex arrays (each vertex is written by one task only).
    use std::sync::atomic::{AtomicU32, Ordering::Relaxed};
    const CONTESTED: u32 = 1 << 31;
    let slots: Vec<AtomicU32> = (0..n).map(|_| AtomicU32::new(0)).collect();
    let cells = cell_keys.len();
    (0..cells.div_ceil(4096)).into_par_iter().for_each(|chunk| {
        let mut local: Vec<(u64, u64, u32)> = Vec::new();
        for ci in chunk * 4096..((chunk + 1) * 4096).min(cells) {
            let cell = &keyed[starts[ci] as usize..starts[ci + 1] as usize];
            let bits = |i: u32| {
                let p = coords[i as usize];
                ((p[0] + 0.0).to_bits(), (p[1] + 0.0).to_bits(), i)
            };
            local.clear();
            local.extend(cell.iter().map(|&(_, i)| bits(i)));
            if local.len() > 1 {
                local.sort_unstable();
            }
            let mut k = 0;
            while k < local.len() {
                let (x, y, first) = local[k];
                let contested = snap_m > 0.0
                    && grid.has_other_within(
                        coords,
                        coords[first as usize],
                        &cell_keys,
                        &starts,
                        &keyed,
                    );
                let value = first | if contested { CONTESTED } else { 0 };
                while k < local.len() && local[k].0 == x && local[k].1 == y {
                    slots[local[k].2 as usize].store(value, Relaxed);
                    k += 1;
                }
            }
        }
    });
    drop(keyed);
    drop(starts);
    drop(cell_keys);
    let mut contested = vec![false; n];
    let mut rep: Vec<u32> = slots
        .into_iter()
        .zip(contested.iter_mut())
        .map(|(v, c)| {
            let v = v.into_inner();
            *c = v & CONTESTED != 0;
            v & !CONTESTED
        })
        .collect();
    if snap_m > 0.0 {
        greedy_snap(coords, snap_m, &contested, &mut rep);
    }
    // Number clusters by first appearance: a representative always precedes its members.
    let mut cid = vec![0u32; n];
    let mut founders = Vec::new();
    for i in 0..n {
        let r = rep[i] as usize;
        if r == i {
            cid[i] = founders.len() as u32;
            founders.push(i as u32);
        } else {
            cid[i] = cid[r];
        }
    }
    (cid, founders)
}

/// Grid cells eight times the tolerance wide, in degrees, conservative over the data's latitudes.
///
/// Wide cells mean most points lie farther than the tolerance from every border, so usually one
/// cell, rarely up to four, is searched.
struct Grid {
    cell: [f64; 2],
    tol: [f64; 2],
    snap_m: f64,
}

impl Grid {
    fn new(coords: &[[f64; 2]], snap_m: f64) -> Grid {
        let max_lat = coords
            .iter()
            .fold(0.0f64, |m, p| m.max(p[1].abs()))
            .min(89.9);
        let (my_eq, _) = metres_per_degree(0.0);
        let (_, mx_min) = metres_per_degree(max_lat);
        let tol = [snap_m / mx_min, snap_m / my_eq];
        // Cells never finer than 2^-31 of the globe, so keys fit in 32 bits per axis.
        let floor = 360.0 / (1u64 << 31) as f64;
        Grid {
            cell: [(8.0 * tol[0]).max(floor), (8.0 * tol[1]).max(floor)],
            tol,
            snap_m,
        }
    }

    fn cell_of(&self, p: [f64; 2]) -> (i64, i64) {
        (
            (p[0] / self.cell[0]).floor() as i64,
            (p[1] / self.cell[1]).floor() as i64,
        )
    }

    fn pack(c: (i64, i64)) -> u64 {
        let bias = 1i64 << 31;
        (((c.0 + bias) as u64) << 32) | ((c.1 + bias) as u64 & 0xFFFF_FFFF)
    }

    fn key(&self, p: [f64; 2]) -> u64 {
        Self::pack(self.cell_of(p))
    }

    /// The cells to search around `p`: its own, plus neighbours whose border lies within tolerance.
    fn neighbourhood(&self, p: [f64; 2]) -> impl Iterator<Item = (i64, i64)> {
        let (cx, cy) = self.cell_of(p);
        let rx = p[0] - cx as f64 * self.cell[0];
        let ry = p[1] - cy as f64 * self.cell[1];
        let side = |r: f64, cell: f64, tol: f64| {
            if r < tol {
                -1
            } else if r > cell - tol {
                1
            } else {
                0
            }
        };
        let dx = side(rx, self.cell[0], self.tol[0]);
        let dy = side(ry, self.cell[1], self.tol[1]);
        let cells = [(0, 0), (dx, 0), (0, dy), (dx, dy)];
        let used = [true, dx != 0, dy != 0, dx != 0 && dy != 0];
        cells
            .into_iter()
            .zip(used)
            .filter(|(_, u)| *u)
            .map(move |((ox, oy), _)| (cx + ox, cy + oy))
    }

    /// True when some vertex at a different position lies within the tolerance of `p`.
    fn has_other_within(
        &self,
        coords: &[[f64; 2]],
        p: [f64; 2],
        cell_keys: &[u64],
        starts: &[u32],
        keyed: &[(u64, u32)],
    ) -> bool {
        let (my, mx) = metres_per_degree(p[1]);
        for c in self.neighbourhood(p) {
            let Ok(ci) = cell_keys.binary_search(&Self::pack(c)) else {
                continue;
            };
            for &(_, j) in &keyed[starts[ci] as usize..starts[ci + 1] as usize] {
                let q = coords[j as usize];
                if q != p && scaled_distance(p, q, my, mx) <= self.snap_m {
                    return true;
                }
            }
        }
        false
    }
}

/// Distance in metres for short steps with the scales (metres per degree) at one end's latitude:
/// within 1e-4 relative of the mid-latitude formula over a kilometre, far below any tolerance's
/// precision.
fn scaled_distance(p: [f64; 2], q: [f64; 2], my: f64, mx: f64) -> f64 {
    let mut dlon = q[0] - p[0];
    if dlon.abs() > 180.0 {
        dlon -= 360.0f64.copysign(dlon);
    }
    ((dlon * mx).powi(2) + ((q[1] - p[1]) * my).powi(2)).sqrt()
}

/// The sequential pass over contested vertices, in input order: each joins the nearest existing
/// centre within the tolerance (ties: the older centre) or founds a new one. Uncontested vertices
/// cannot be within the tolerance of any contested one, so they need no part in it.
fn greedy_snap(coords: &[[f64; 2]], snap_m: f64, contested: &[bool], rep: &mut [u32]) {
    let grid = Grid::new(coords, snap_m);
    let mut head: FxHashMap<(i64, i64), u32> = FxHashMap::default();
    let mut next: Vec<u32> = Vec::new();
    let mut founders: Vec<u32> = Vec::new();
    for (i, p) in coords.iter().enumerate() {
        if !contested[i] {
            continue;
        }
        let (my, mx) = metres_per_degree(p[1]);
        let mut best: Option<(f64, u32)> = None;
        for c in grid.neighbourhood(*p) {
            let mut k = head.get(&c).copied().unwrap_or(u32::MAX);
            while k != u32::MAX {
                let q = coords[founders[k as usize] as usize];
                let d = if q == *p {
                    0.0
                } else {
                    scaled_distance(*p, q, my, mx)
                };
                if d <= snap_m && best.is_none_or(|(bd, bk)| d < bd || (d == bd && k < bk)) {
                    best = Some((d, k));
                }
                k = next[k as usize];
            }
        }
        rep[i] = match best {
            Some((_, k)) => founders[k as usize],
            None => {
                let k = founders.len() as u32;
                founders.push(i as u32);
                let h = head.entry(grid.cell_of(*p)).or_insert(u32::MAX);
                next.push(*h);
                *h = k;
                i as u32
            }
        };
    }
}
