//! Noding: from loose line parts to a topological network.
//!
//! 1. Vertices are clustered: each vertex joins the nearest existing cluster centre within the
//!    snapping tolerance, or starts a new cluster (input order decides, so the result is deterministic
//!    and no vertex moves farther than the tolerance).
//! 2. A cluster is a junction when it ends a line or when the distinct segments meeting there are not
//!    exactly two (a crossing, a branch or a dead end).
//! 3. Lines are split at junctions into edges; exact duplicate edges and collapsed lines are dropped.
//! 4. Edge lengths are measured on the ellipsoid, in parallel.

use super::geodesy::{distance_m, local_distance_m, metres_per_degree, polyline_length_m};
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
    /// Junctions in the network.
    pub junctions: usize,
    /// Edges in the network.
    pub edges: usize,
}

/// Builds the network from a line layer with the given snapping tolerance in metres.
pub fn node(layer: LineLayer, snap_m: f64) -> (Network, NodingStats) {
    let mut stats = NodingStats {
        snap_m,
        ..Default::default()
    };
    let (cid, centres) = cluster(&layer.coords, snap_m);
    for (i, &c) in cid.iter().enumerate() {
        let centre = centres[c as usize];
        if centre != layer.coords[i] {
            stats.vertices_moved += 1;
            stats.max_move_m = stats.max_move_m.max(distance_m(layer.coords[i], centre));
        }
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
            seq.truncate(before);
            stats.zero_length_parts_dropped += 1;
            continue;
        }
        seq_ends.push(seq.len());
        seq_feature.push(layer.part_feature[p]);
    }
    drop(cid);

    // Junctions: line ends, and clusters where the distinct road segments meeting there are not
    // exactly two (so duplicated or overlapping lines do not turn their shared vertices into junctions).
    let mut segs: Vec<u64> = Vec::with_capacity(seq.len());
    let mut is_end = vec![false; centres.len()];
    let mut s0 = 0;
    for &e in &seq_ends {
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
    let mut degree = vec![0u8; centres.len()];
    for &k in &segs {
        for c in [k >> 32, k & 0xFFFF_FFFF] {
            degree[c as usize] = degree[c as usize].saturating_add(1);
        }
    }
    drop(segs);
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
    let mut pieces: Vec<(usize, usize, u32)> = Vec::new();
    let mut seen: FxHashMap<u64, u32> = FxHashMap::default();
    let mut seen_exact: std::collections::HashMap<Vec<u32>, u32> = Default::default();
    let mut s0 = 0;
    for (k, &e) in seq_ends.iter().enumerate() {
        let mut a = s0;
        for i in s0 + 1..e {
            if junction_of[seq[i] as usize] != u32::MAX {
                let piece = &seq[a..=i];
                if is_new_piece(piece, &seq, &pieces, &mut seen, &mut seen_exact) {
                    pieces.push((a, i + 1, seq_feature[k]));
                } else {
                    stats.duplicate_edges_dropped += 1;
                }
                a = i;
            }
        }
        s0 = e;
    }
    drop(seen);
    drop(seen_exact);

    // Edges with geometry, lengths measured in parallel.
    let lengths: Vec<f64> = pieces
        .par_iter()
        .map(|&(a, b, _)| polyline_length_m(seq[a..b].iter().map(|&c| centres[c as usize])))
        .collect();
    let mut geom_offsets = Vec::with_capacity(pieces.len() + 1);
    geom_offsets.push(0);
    let mut geom = Vec::with_capacity(pieces.iter().map(|p| p.1 - p.0).sum());
    let mut edges = Vec::with_capacity(pieces.len());
    for (&(a, b, f), &length_m) in pieces.iter().zip(&lengths) {
        geom.extend(seq[a..b].iter().map(|&c| centres[c as usize]));
        geom_offsets.push(geom.len());
        let damage = layer.features[f as usize].damage;
        edges.push(Edge {
            from: junction_of[seq[a] as usize],
            to: junction_of[seq[b - 1] as usize],
            length_m,
            damage,
            cost: cost_of(length_m, damage),
            feature: f,
        });
    }
    stats.junctions = junctions.len();
    stats.edges = edges.len();
    let net = Network {
        junctions,
        edges,
        geom_offsets,
        geom,
        features: layer.features,
    };
    (net, stats)
}

/// Records `piece` and returns true unless an identical piece (either direction) was seen before.
fn is_new_piece(
    piece: &[u32],
    seq: &[u32],
    pieces: &[(usize, usize, u32)],
    seen: &mut FxHashMap<u64, u32>,
    seen_exact: &mut std::collections::HashMap<Vec<u32>, u32>,
) -> bool {
    let canon = canonical(piece);
    let h = hash_seq(&canon);
    let id = pieces.len() as u32;
    match seen.get(&h) {
        None => {
            seen.insert(h, id);
            true
        }
        Some(&other) => {
            let (a, b, _) = pieces[other as usize];
            if canonical(&seq[a..b]) == canon {
                return false;
            }
            // A hash collision between different pieces: fall back to exact keys.
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

/// The piece in a direction-independent orientation.
fn canonical(piece: &[u32]) -> Vec<u32> {
    let rev: Vec<u32> = piece.iter().rev().copied().collect();
    if rev.as_slice() < piece {
        rev
    } else {
        piece.to_vec()
    }
}

fn hash_seq(s: &[u32]) -> u64 {
    use std::hash::Hasher;
    let mut h = crate::fxhash::FxHasher::default();
    h.write_usize(s.len());
    for &x in s {
        h.write_u32(x);
    }
    h.finish()
}

/// Assigns every vertex a cluster; returns (cluster per vertex, cluster centres).
///
/// With `snap_m == 0` only bit-identical coordinates share a cluster. Otherwise a vertex joins the
/// nearest existing centre within `snap_m` metres (ties: the older cluster), else founds a new one, so
/// centres are always more than `snap_m` apart.
pub fn cluster(coords: &[[f64; 2]], snap_m: f64) -> (Vec<u32>, Vec<[f64; 2]>) {
    let mut cid = Vec::with_capacity(coords.len());
    let mut centres: Vec<[f64; 2]> = Vec::new();
    if snap_m <= 0.0 {
        let mut map: FxHashMap<(u64, u64), u32> = FxHashMap::default();
        map.reserve(coords.len() / 2);
        for p in coords {
            let key = ((p[0] + 0.0).to_bits(), (p[1] + 0.0).to_bits());
            let next = centres.len() as u32;
            let c = *map.entry(key).or_insert_with(|| {
                centres.push(*p);
                next
            });
            cid.push(c);
        }
        return (cid, centres);
    }
    // Tolerance in degrees, conservative over the data's latitude range.
    let max_lat = coords
        .iter()
        .fold(0.0f64, |m, p| m.max(p[1].abs()))
        .min(89.9);
    let (my_eq, _) = metres_per_degree(0.0);
    let (_, mx_min) = metres_per_degree(max_lat);
    let tol = [snap_m / mx_min, snap_m / my_eq];
    let cell = [2.0 * tol[0], 2.0 * tol[1]];
    let mut head: FxHashMap<(i64, i64), u32> = FxHashMap::default();
    head.reserve(coords.len() / 2);
    let mut next: Vec<u32> = Vec::new();
    for p in coords {
        let fx = p[0] / cell[0];
        let fy = p[1] / cell[1];
        let (cx, cy) = (fx.floor() as i64, fy.floor() as i64);
        // Neighbouring cells only where the point lies within the tolerance of the shared border.
        let rx = (fx - cx as f64) * cell[0];
        let ry = (fy - cy as f64) * cell[1];
        let dx = if rx < tol[0] {
            -1
        } else if rx > cell[0] - tol[0] {
            1
        } else {
            0
        };
        let dy = if ry < tol[1] {
            -1
        } else if ry > cell[1] - tol[1] {
            1
        } else {
            0
        };
        let mut best: Option<(f64, u32)> = None;
        let cells = [(0, 0), (dx, 0), (0, dy), (dx, dy)];
        let used = [true, dx != 0, dy != 0, dx != 0 && dy != 0];
        for (&(ox, oy), _) in cells.iter().zip(used).filter(|(_, u)| *u) {
            let mut c = head.get(&(cx + ox, cy + oy)).copied().unwrap_or(u32::MAX);
            while c != u32::MAX {
                let d = local_distance_m(*p, centres[c as usize]);
                if d <= snap_m && best.is_none_or(|(bd, bc)| d < bd || (d == bd && c < bc)) {
                    best = Some((d, c));
                }
                c = next[c as usize];
            }
        }
        let c = match best {
            Some((_, c)) => c,
            None => {
                let c = centres.len() as u32;
                centres.push(*p);
                let h = head.entry((cx, cy)).or_insert(u32::MAX);
                next.push(*h);
                *h = c;
                c
            }
        };
        cid.push(c);
    }
    (cid, centres)
}
