//! Attaching sites to the road network: each site joins the nearest point of a usable road within a
//! maximum distance, splitting that edge at the foot of the perpendicular into two edges that share
//! the cost in proportion to their lengths.

use super::geodesy::polyline_length_m;
use super::sites::Site;
use super::wrap::{self, Frame};
use crate::network::{Edge, Network};
use rstar::primitives::{GeomWithData, Line};
use rstar::{AABB, RTree};
use std::collections::BTreeMap;

/// Where a site joined the network, or why it could not.
#[derive(Debug, Clone, PartialEq)]
pub struct Attachment {
    /// Junction the site is attached to.
    pub junction: Option<u32>,
    /// Distance from the site to the attachment point (or to the nearest road when not attached), m.
    pub distance_m: Option<f64>,
    /// The attachment point on the road, lon/lat.
    pub point: Option<[f64; 2]>,
    /// Why the site is not attached.
    pub failure: Option<String>,
}

/// Positions closer than this along a road (metres) are the same point.
const SAME_POINT_M: f64 = 0.01;

type Seg = GeomWithData<Line<[f64; 2]>, (u32, u32)>;

/// A cut point: distance along the edge, the vertex it falls on (if any), its coordinate, and the
/// sites attached there.
type CutPoint = (f64, Option<usize>, [f64; 2], Vec<usize>);

/// One cut of an edge: segment index and fraction along it.
#[derive(Debug, Clone, Copy)]
struct Cut {
    seg: usize,
    t: f64,
    site: usize,
}

/// Attaches every site, splitting edges as needed; returns one attachment per site, in order.
pub fn attach_sites(net: &mut Network, sites: &[Site], max_attach_m: f64) -> Vec<Attachment> {
    let segs: Vec<Seg> = (0..net.edges.len())
        .flat_map(|e| {
            let g = net.edge_geometry(e);
            // Each segment held unwrapped: its second end within 180° of its first.
            (0..g.len() - 1).map(move |k| {
                GeomWithData::new(
                    Line::new(g[k], wrap::unwrap(g[k + 1], g[k])),
                    (e as u32, k as u32),
                )
            })
        })
        .collect();
    let tree = RTree::bulk_load(segs);
    let data_lon = if tree.size() == 0 {
        [-180.0, 180.0]
    } else {
        let e = tree.root().envelope();
        [e.lower()[0], e.upper()[0]]
    };
    let mut out = Vec::with_capacity(sites.len());
    let mut cuts: BTreeMap<u32, Vec<Cut>> = BTreeMap::new();
    for (si, site) in sites.iter().enumerate() {
        let p = site.pos;
        // Feet found in a frame at the site that wraps at ±180°; distances geodesic (true metres near
        // the poles too). A polygon site is measured from its outline (ties: nearest its point).
        let frame = Frame::at(p);
        let placed = site.outline.as_ref().map(|o| o.placed(frame));
        let reach = |a: [f64; 2], b: [f64; 2]| match &placed {
            Some(o) => o.reach(a, b),
            None => {
                let (d, t) = frame.foot(a, b);
                (d, 0.0, t)
            }
        };
        let (lo, hi) = site.outline.as_ref().map_or((p, p), |o| o.bbox());
        let (dlon, dlat) = wrap::reach_deg(max_attach_m, lo[1].abs().max(hi[1].abs()));
        let dlon = dlon.unwrap_or(360.0);
        let boxes = wrap::search_boxes(
            [lo[0] - dlon, lo[1] - dlat],
            [hi[0] + dlon, hi[1] + dlat],
            data_lon,
        );
        let mut best: Option<(f64, f64, u32, u32, f64)> = None;
        let mut closed: Option<f64> = None;
        for s in boxes.iter().flat_map(|(lo, hi)| {
            tree.locate_in_envelope_intersecting(&AABB::from_corners(*lo, *hi))
        }) {
            let (e, k) = s.data;
            let (d, tie, t) = reach(s.geom().from, s.geom().to);
            if d > max_attach_m {
                continue;
            }
            if net.edges[e as usize].usable() {
                if best.is_none_or(|(bd, bt, be, bk, _)| (d, tie, e, k) < (bd, bt, be, bk)) {
                    best = Some((d, tie, e, k, t));
                }
            } else if closed.is_none_or(|c| d < c) {
                closed = Some(d);
            }
        }
        match best {
            Some((d, _, e, k, t)) => {
                cuts.entry(e).or_default().push(Cut {
                    seg: k as usize,
                    t,
                    site: si,
                });
                let g = net.edge_geometry(e as usize);
                let (a, b) = (g[k as usize], g[k as usize + 1]);
                out.push(Attachment {
                    junction: None,
                    distance_m: Some(d),
                    point: Some(wrap::lerp(a, b, t)),
                    failure: None,
                });
            }
            None => {
                // The nearest segment by degrees, looked for on both sides of ±180°.
                let nearest = [0.0, -360.0, 360.0]
                    .into_iter()
                    .filter_map(|k| tree.nearest_neighbor(&[p[0] + k, p[1]]))
                    .map(|s| reach(s.geom().from, s.geom().to).0)
                    .min_by(f64::total_cmp);
                let failure = match closed {
                    Some(c) => format!(
                        "only impassable roads within {max_attach_m} m (nearest at {} m)",
                        crate::decimal::Fixed(c, 1)
                    ),
                    None => match nearest {
                        Some(n) => {
                            format!(
                                "no road within {max_attach_m} m (nearest about {} m away)",
                                crate::decimal::Fixed(n, 1)
                            )
                        }
                        None => format!("no road within {max_attach_m} m"),
                    },
                };
                out.push(Attachment {
                    junction: None,
                    distance_m: closed.or(nearest),
                    point: None,
                    failure: Some(failure),
                });
            }
        }
    }
    split_edges(net, cuts, &mut out);
    out
}

/// Splits the cut edges in place (pieces take the edge's position, later ids shift) and records
/// each site's junction.
fn split_edges(net: &mut Network, cuts: BTreeMap<u32, Vec<Cut>>, out: &mut [Attachment]) {
    if cuts.is_empty() {
        return;
    }
    let old_edges = std::mem::take(&mut net.edges);
    let old_offsets = std::mem::take(&mut net.geom_offsets);
    let old_geom = std::mem::take(&mut net.geom);
    net.geom_offsets.push(0);
    for (e, edge) in old_edges.into_iter().enumerate() {
        let g = &old_geom[old_offsets[e]..old_offsets[e + 1]];
        let Some(list) = cuts.get(&(e as u32)) else {
            net.geom.extend_from_slice(g);
            net.geom_offsets.push(net.geom.len());
            net.edges.push(edge);
            continue;
        };
        // Distance along the edge of every vertex, to place cuts and merge near-identical ones.
        let mut along = vec![0.0];
        for w in g.windows(2) {
            along.push(along.last().unwrap() + polyline_length_m([w[0], w[1]]));
        }
        let total = *along.last().unwrap();
        let mut cs: Vec<(f64, Cut)> = list
            .iter()
            .map(|c| (along[c.seg] + c.t * (along[c.seg + 1] - along[c.seg]), *c))
            .collect();
        cs.sort_by(|x, y| x.0.total_cmp(&y.0).then(x.1.site.cmp(&y.1.site)));
        // Cut points: (distance along, vertex index if it falls on one, coordinate).
        let mut points: Vec<CutPoint> = Vec::new();
        for (s, c) in cs {
            if let Some(last) = points.last_mut()
                && s - last.0 < SAME_POINT_M
            {
                last.3.push(c.site);
                continue;
            }
            let at_vertex = (0..g.len()).find(|&i| (along[i] - s).abs() < SAME_POINT_M);
            let coord = match at_vertex {
                Some(i) => g[i],
                None => {
                    let (a, b) = (g[c.seg], g[c.seg + 1]);
                    let r = super::geodesy::round7(wrap::lerp(a, b, c.t));
                    [wrap::fold(r[0]), r[1]]
                }
            };
            points.push((s, at_vertex, coord, vec![c.site]));
        }
        // Junction for every cut point: the edge's own ends, or a new junction.
        let mut pieces_geom: Vec<Vec<[f64; 2]>> = Vec::new();
        let mut piece_ends: Vec<u32> = vec![edge.from];
        let mut current: Vec<[f64; 2]> = vec![g[0]];
        let mut next_vertex = 1;
        for (s, at_vertex, coord, site_list) in &points {
            let junction = if *s < SAME_POINT_M {
                edge.from
            } else if total - s < SAME_POINT_M {
                edge.to
            } else {
                let j = net.junctions.len() as u32;
                net.junctions.push(*coord);
                // Close the current piece at the cut.
                let upto = at_vertex.unwrap_or(usize::MAX);
                while next_vertex < g.len() && along[next_vertex] < *s && next_vertex != upto {
                    current.push(g[next_vertex]);
                    next_vertex += 1;
                }
                if at_vertex.is_some() {
                    next_vertex = upto + 1;
                }
                current.push(*coord);
                pieces_geom.push(std::mem::replace(&mut current, vec![*coord]));
                piece_ends.push(j);
                j
            };
            for &si in site_list {
                out[si].junction = Some(junction);
                out[si].point = Some(*coord);
            }
        }
        current.extend_from_slice(&g[next_vertex.min(g.len())..]);
        pieces_geom.push(current);
        piece_ends.push(edge.to);
        // Pieces share the edge's length and cost in proportion to their ground lengths, so they
        // keep the edge's own length method (planar in a national grid) and add up to it; the
        // last takes the remainder of the cost.
        let mut lengths: Vec<f64> = pieces_geom
            .iter()
            .map(|p| polyline_length_m(p.iter().copied()))
            .collect();
        let sum: f64 = lengths.iter().sum();
        if sum > 0.0 {
            lengths
                .iter_mut()
                .for_each(|l| *l = edge.length_m * *l / sum);
        }
        let mut cost_left = edge.cost;
        for (i, piece) in pieces_geom.into_iter().enumerate() {
            let last = i + 1 == lengths.len();
            let cost = if last {
                cost_left
            } else {
                let c =
                    ((edge.cost as f64) * lengths[i] / sum.max(f64::MIN_POSITIVE)).round() as u64;
                c.min(cost_left)
            };
            cost_left -= cost;
            net.geom.extend_from_slice(&piece);
            net.geom_offsets.push(net.geom.len());
            net.edges.push(Edge {
                from: piece_ends[i],
                to: piece_ends[i + 1],
                length_m: lengths[i],
                damage: edge.damage,
                cost,
                feature: edge.feature,
            });
        }
    }
}
