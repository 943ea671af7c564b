//! Noding: from loose line parts to a topological network.
//!
//! 1. Vertices are clustered: each vertex joins the nearest existing cluster centre within the
//!    snapping tolerance, or starts a new cluster (input order decides, so the result is deterministic
//!    and no vertex moves farther than the tolerance).
//! 2. A cluster is a junction when it ends a line or when the distinct segments meeting there are not
//!    exactly two (a crossing, a branch or a dead end).
//! 3. Lines are split at junctions into edges; exact duplicate edges and collapsed lines are dropped.
//! 4. Edge lengths are measured on the ellipsoid, in parallel.

use super::geodesy::{distance_m, polyline_length_m};
use super::qa::{QaKind, QaPoint};
use super::roads::LineLayer;
use super::wrap::same_place;
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
    crate::progress::mem_mark("noding: start (layer read)");
    let (cid, founders) = super::cluster::cluster(&layer.coords, snap_m);
    crate::progress::mem_mark("noding: cluster");
    let mut centres: Vec<[f64; 2]> = founders.iter().map(|&f| layer.coords[f as usize]).collect();
    let mut centres_native: Vec<[f64; 2]> = if layer.native.is_empty() {
        Vec::new()
    } else {
        founders.iter().map(|&f| layer.native[f as usize]).collect()
    };
    let mut moved: std::collections::BTreeMap<u32, (f64, u32)> = Default::default();
    for (i, &c) in cid.iter().enumerate() {
        let centre = centres[c as usize];
        if !same_place(centre, layer.coords[i]) {
            stats.vertices_moved += 1;
            let d = distance_m(layer.coords[i], centre);
            stats.max_move_m = stats.max_move_m.max(d);
            let part = layer.part_ends.partition_point(|&e| e <= i);
            let f = layer.part_feature[part];
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
                    feature: Some(layer.part_feature[p]),
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
    crate::progress::mem_mark("noding: sequences");

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
    // A cluster no remaining segment touches (a dropped zero-length part, a line collapsed by the
    // CRS or the tolerance, an end moved by a join) is no junction: it would be a phantom component.
    let (degree, is_end) = super::repair::segment_degrees(&seq, &seq_ends, centres.len());
    let mut junction_of = vec![u32::MAX; centres.len()];
    let mut junctions = Vec::new();
    for c in 0..centres.len() {
        if degree[c] > 0 && (is_end[c] || degree[c] != 2) {
            junction_of[c] = junctions.len() as u32;
            junctions.push(centres[c]);
        }
    }
    drop(degree);
    drop(is_end);
    crate::progress::mem_mark("noding: repairs+junctions");

    // Split at junctions into pieces (ranges of `seq`), dropping duplicates.
    // (start, end, feature) as u32: a third of the memory of usize ranges on big layers.
    let mut pieces: Vec<(u32, u32, u32)> = Vec::new();
    let mut seen: FxHashMap<u64, u32> = FxHashMap::default();
    let mut seen_exact: std::collections::HashMap<Vec<u32>, u32> = Default::default();
    // Pieces whose damage a dropped duplicate made worse (few: only where damage differed).
    let mut worse: FxHashMap<u32, crate::ingest::damage::Damage> = FxHashMap::default();
    let mut s0 = 0;
    for (k, &e) in seq_ends.iter().enumerate() {
        let mut a = s0;
        for i in s0 + 1..e {
            if junction_of[seq[i] as usize] != u32::MAX {
                let piece = &seq[a..=i];
                if let Some(kept) = earlier_piece(piece, &seq, &pieces, &mut seen, &mut seen_exact)
                {
                    stats.duplicate_edges_dropped += 1;
                    // The same road given twice keeps its worst damage, whichever came first.
                    let (mine, theirs) = (
                        feats_damage(&layer, seq_feature[k]),
                        worse
                            .get(&kept)
                            .copied()
                            .unwrap_or_else(|| feats_damage(&layer, pieces[kept as usize].2)),
                    );
                    let kind = if mine == theirs {
                        QaKind::RemovedDuplicate
                    } else {
                        worse.insert(kept, mine.worst(theirs));
                        QaKind::DuplicateDamageDiffered
                    };
                    qa.push(QaPoint {
                        kind,
                        pos: centres[piece[piece.len() / 2] as usize],
                        distance_m: 0.0,
                        feature: Some(seq_feature[k]),
                    });
                } else {
                    pieces.push((a as u32, (i + 1) as u32, seq_feature[k]));
                }
                a = i;
            }
        }
        s0 = e;
    }
    drop(seen);
    drop(seen_exact);
    drop((seq_ends, seq_feature));
    crate::progress::mem_mark("noding: pieces");

    // Geometry first, then the edges measured on it: the cluster centres and the sequences are
    // freed before the edge array is allocated (the largest arrays are never all held at once).
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
    crate::progress::mem_mark("noding: geom");
    drop(centres);
    // Lengths measured in parallel: planar × unit in the source's conformal projection when it
    // kept its native coordinates (the sequences index those), geodesic otherwise.
    let native = &centres_native;
    let to_meter = layer.to_meter;
    let feats = &layer.features;
    let (geom_ref, offsets_ref, seq_ref, jof) = (&geom, &geom_offsets, &seq, &junction_of);
    let edges: Vec<Edge> = pieces
        .par_iter()
        .enumerate()
        .map(|(k, &(a, b, f))| {
            let length_m = if native.is_empty() {
                polyline_length_m(geom_ref[offsets_ref[k]..offsets_ref[k + 1]].iter().copied())
            } else {
                seq_ref[a as usize..b as usize]
                    .windows(2)
                    .map(|w| {
                        let (p, q) = (native[w[0] as usize], native[w[1] as usize]);
                        (q[0] - p[0]).hypot(q[1] - p[1])
                    })
                    .sum::<f64>()
                    * to_meter
            };
            let damage = worse
                .get(&(k as u32))
                .copied()
                .unwrap_or(feats[f as usize].damage);
            Edge {
                from: jof[seq_ref[a as usize] as usize],
                to: jof[seq_ref[b as usize - 1] as usize],
                length_m,
                damage,
                cost: cost_of(length_m, damage),
                feature: f,
            }
        })
        .collect();
    // The working arrays are not needed by the clean-up: free them before it allocates.
    drop((pieces, seq, centres_native, junction_of));
    crate::progress::mem_mark("noding: edges+geom");
    let mut net = Network {
        junctions,
        edges,
        geom_offsets,
        geom,
        features: layer.features,
        texts: layer.texts,
        layers: layer.layers,
    };
    let (trimmed, near) = super::cleanup::clean(&mut net, snap_m, &mut qa);
    stats.overshoots_trimmed = trimmed;
    stats.near_duplicates_dropped = near;
    crate::progress::mem_mark("noding: cleanup");
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
        *stats.qa.entry(q.kind.code().to_string()).or_default() += 1;
    }
    stats.qa_points = qa;
    crate::progress::mem_mark("noding: end");
    (net, stats)
}

/// A feature's damage as read.
fn feats_damage(layer: &LineLayer, f: u32) -> crate::ingest::damage::Damage {
    layer.features[f as usize].damage
}

/// Records `piece` (as the next piece) and returns `None`, or the earlier identical piece (either
/// direction) when there is one.
fn earlier_piece(
    piece: &[u32],
    seq: &[u32],
    pieces: &[(u32, u32, u32)],
    seen: &mut FxHashMap<u64, u32>,
    seen_exact: &mut std::collections::HashMap<Vec<u32>, u32>,
) -> Option<u32> {
    let h = hash_canonical(piece);
    let id = pieces.len() as u32;
    match seen.get(&h) {
        None => {
            seen.insert(h, id);
            None
        }
        Some(&other) => {
            let (a, b, _) = pieces[other as usize];
            let (a, b) = (a as usize, b as usize);
            if same_piece(&seq[a..b], piece) {
                return Some(other);
            }
            // A hash collision between different pieces: fall back to exact keys.
            let canon: Vec<u32> = if reversed_is_smaller(piece) {
                piece.iter().rev().copied().collect()
            } else {
                piece.to_vec()
            };
            match seen_exact.entry(canon) {
                std::collections::hash_map::Entry::Occupied(o) => Some(*o.get()),
                std::collections::hash_map::Entry::Vacant(v) => {
                    v.insert(id);
                    None
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
