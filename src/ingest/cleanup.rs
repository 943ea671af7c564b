//! Edge-level clean-up after splitting: trimming overshoots and removing near-duplicates.

use super::qa::{QaKind, QaPoint};
use super::wrap::Frame;
use crate::network::Network;

/// Removes short dangling pieces past a junction and edges that run within `snap_m` of another edge
/// between the same junctions; renumbers junctions and edges in their original order.
pub fn clean(net: &mut Network, snap_m: f64, qa: &mut Vec<QaPoint>) -> (usize, usize) {
    if snap_m <= 0.0 || net.edges.is_empty() {
        return (0, 0);
    }
    let n = net.junctions.len();
    let mut degree = vec![0u32; n];
    for e in &net.edges {
        degree[e.from as usize] += 1;
        degree[e.to as usize] += 1;
    }
    let mut keep = vec![true; net.edges.len()];
    let mut trimmed = 0;
    for (i, e) in net.edges.iter().enumerate() {
        if e.length_m >= snap_m || e.from == e.to {
            continue;
        }
        let (df, dt) = (degree[e.from as usize], degree[e.to as usize]);
        if (df == 1 && dt >= 3) || (dt == 1 && df >= 3) {
            keep[i] = false;
            trimmed += 1;
            let tip = if df == 1 { e.from } else { e.to };
            qa.push(QaPoint {
                kind: QaKind::TrimmedOvershoot,
                pos: net.junctions[tip as usize],
                distance_m: e.length_m,
                feature: Some(e.feature),
            });
        }
    }
    // Near-duplicates: edges between the same two junctions, each within the tolerance of the other.
    let mut pairs: Vec<(u32, u32, usize)> = net
        .edges
        .iter()
        .enumerate()
        .filter(|(i, e)| keep[*i] && e.from != e.to)
        .map(|(i, e)| (e.from.min(e.to), e.from.max(e.to), i))
        .collect();
    pairs.sort_unstable();
    let mut near = 0;
    let mut g = 0;
    while g < pairs.len() {
        let mut h = g + 1;
        while h < pairs.len() && pairs[h].0 == pairs[g].0 && pairs[h].1 == pairs[g].1 {
            h += 1;
        }
        for x in g..h {
            if !keep[pairs[x].2] {
                continue;
            }
            for y in x + 1..h {
                let (a, b) = (pairs[x].2, pairs[y].2);
                if keep[b] && within(net.edge_geometry(a), net.edge_geometry(b), snap_m) {
                    keep[b] = false;
                    near += 1;
                    // The same road given twice keeps its worst damage, whichever came first.
                    let (da, db) = (net.edges[a].damage, net.edges[b].damage);
                    let kind = if da == db {
                        QaKind::RemovedNearDuplicate
                    } else {
                        let e = &mut net.edges[a];
                        e.damage = da.worst(db);
                        e.cost = crate::network::cost_of(e.length_m, e.damage);
                        QaKind::DuplicateDamageDiffered
                    };
                    let gb = net.edge_geometry(b);
                    qa.push(QaPoint {
                        kind,
                        pos: gb[gb.len() / 2],
                        distance_m: 0.0,
                        feature: Some(net.edges[b].feature),
                    });
                }
            }
        }
        g = h;
    }
    if trimmed + near > 0 {
        compact(net, &keep);
    }
    (trimmed, near)
}

/// True when every vertex of each polyline lies within `tol` metres of the other.
fn within(a: &[[f64; 2]], b: &[[f64; 2]], tol: f64) -> bool {
    // Feet found in a frame at each vertex that wraps at ±180°; distances geodesic.
    let near = |p: [f64; 2], line: &[[f64; 2]]| {
        let frame = Frame::at(p);
        line.windows(2).any(|w| frame.foot(w[0], w[1]).0 <= tol)
    };
    a.iter().all(|&p| near(p, b)) && b.iter().all(|&p| near(p, a))
}

/// Keeps the flagged edges and the junctions they use, renumbered in order.
///
/// Done in place (kept items only ever move towards the front), so the clean-up never holds a
/// second copy of the network's largest arrays.
fn compact(net: &mut Network, keep: &[bool]) {
    let mut used = vec![false; net.junctions.len()];
    for (i, e) in net.edges.iter().enumerate() {
        if keep[i] {
            used[e.from as usize] = true;
            used[e.to as usize] = true;
        }
    }
    let mut new_id = vec![u32::MAX; net.junctions.len()];
    let mut kept_junctions = 0;
    for (j, &u) in used.iter().enumerate() {
        if u {
            new_id[j] = kept_junctions as u32;
            net.junctions[kept_junctions] = net.junctions[j];
            kept_junctions += 1;
        }
    }
    net.junctions.truncate(kept_junctions);
    let (mut kept, mut end) = (0, 0);
    for (i, _) in keep.iter().enumerate().filter(|(_, k)| **k) {
        let (a, b) = (net.geom_offsets[i], net.geom_offsets[i + 1]);
        net.geom.copy_within(a..b, end);
        let mut e = net.edges[i].clone();
        e.from = new_id[e.from as usize];
        e.to = new_id[e.to as usize];
        net.edges[kept] = e;
        // Offset `kept` is read no more (its edge `i >= kept` was read above): the new start.
        net.geom_offsets[kept] = end;
        end += b - a;
        kept += 1;
    }
    net.edges.truncate(kept);
    net.edges.shrink_to_fit();
    net.geom.truncate(end);
    net.geom.shrink_to_fit();
    net.geom_offsets.truncate(kept);
    net.geom_offsets.push(end);
    net.geom_offsets.shrink_to_fit();
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ingest::damage::Damage;
    use crate::network::{Edge, FeatureMeta};

    fn edge(from: u32, to: u32, feature: u32) -> Edge {
        Edge {
            from,
            to,
            length_m: 1.0 + f64::from(feature),
            damage: Damage::Factor(1.0),
            cost: 1000,
            feature,
        }
    }

    /// Compacting in place gives what copying the kept edges into fresh arrays gives.
    #[test]
    fn compact_in_place_keeps_flagged_edges_and_their_junctions() {
        let j = |x: f64| [x, 0.0];
        let mut net = Network {
            junctions: vec![j(0.0), j(1.0), j(2.0), j(3.0), j(4.0)],
            edges: vec![edge(0, 1, 0), edge(1, 2, 1), edge(2, 3, 2), edge(3, 4, 3)],
            geom_offsets: vec![0, 2, 5, 7, 10],
            geom: vec![
                j(0.0),
                j(1.0),
                j(1.0),
                j(1.5),
                j(2.0),
                j(2.0),
                j(3.0),
                j(3.0),
                j(3.5),
                j(4.0),
            ],
            features: (0..4)
                .map(|i| FeatureMeta {
                    source_index: i,
                    source_id: None,
                    damage: Damage::Factor(1.0),
                    category: None,
                    label: None,
                    structure: None,
                })
                .collect(),
            texts: Default::default(),
            layers: Vec::new(),
        };
        net.validate().unwrap();
        // Dropping the first and the third edge leaves junctions 1..=4 minus junction 0.
        compact(&mut net, &[false, true, false, true]);
        net.validate().unwrap();
        assert_eq!(net.junctions, vec![j(1.0), j(2.0), j(3.0), j(4.0)]);
        assert_eq!(net.edges, vec![edge(0, 1, 1), edge(2, 3, 3)]);
        assert_eq!(net.geom_offsets, vec![0, 3, 6]);
        assert_eq!(net.edge_geometry(0), &[j(1.0), j(1.5), j(2.0)]);
        assert_eq!(net.edge_geometry(1), &[j(3.0), j(3.5), j(4.0)]);
        assert_eq!(net.geom.capacity(), 6, "the freed tail is given back");
    }
}
