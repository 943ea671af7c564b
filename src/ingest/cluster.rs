//! Clustering of vertices within the snapping tolerance (the first step of noding).
//!
//! The result is that of one pass in input order where each vertex joins the nearest existing
//! cluster centre within the tolerance (ties: the older centre) or founds a new one. Distances are
//! geodesic on WGS84, and longitudes 180 and -180 are one meridian: both give one key, and the grid
//! of cells wraps there.

use super::geodesy::distance_m;
use super::wrap::{canonical_lon, same_place};
use crate::fxhash::FxHashMap;
use rayon::prelude::*;

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
    // Cell key and vertex as three u32 (12 bytes, not the 16 of a padded (u64, u32)): sorted
    // lexicographically they are in (key, vertex) order. This array sets noding's peak memory.
    let mut keyed: Vec<Keyed> = coords
        .par_iter()
        .enumerate()
        .map(|(i, p)| {
            let k = grid.key(*p);
            [(k >> 32) as u32, k as u32, i as u32]
        })
        .collect();
    keyed.par_sort_unstable();
    crate::progress::mem_mark("cluster: keyed+sorted");
    // Start of every run of equal cell keys (counted first: the array is exactly as long as needed).
    let new_cell = |i: usize| i == 0 || keyed[i][..2] != keyed[i - 1][..2];
    let cells = (0..keyed.len()).filter(|&i| new_cell(i)).count();
    let mut starts: Vec<u32> = Vec::with_capacity(cells + 1);
    starts.extend((0..keyed.len()).filter(|&i| new_cell(i)).map(|i| i as u32));
    starts.push(keyed.len() as u32);

    // Per cell: the first vertex at each exact position, and whether another position lies within
    // the tolerance (in this cell or a neighbouring one). Cells are taken in chunks to keep tasks
    // large; results go straight into per-vertex arrays (each vertex is written by one task only).
    use std::sync::atomic::{AtomicU32, Ordering::Relaxed};
    const CONTESTED: u32 = 1 << 31;
    let slots: Vec<AtomicU32> = (0..n).map(|_| AtomicU32::new(0)).collect();
    (0..cells.div_ceil(4096)).into_par_iter().for_each(|chunk| {
        let mut local: Vec<(u64, u64, u32)> = Vec::new();
        for ci in chunk * 4096..((chunk + 1) * 4096).min(cells) {
            let cell = &keyed[starts[ci] as usize..starts[ci + 1] as usize];
            let bits = |i: u32| {
                let p = coords[i as usize];
                (canonical_lon(p[0]).to_bits(), (p[1] + 0.0).to_bits(), i)
            };
            local.clear();
            local.extend(cell.iter().map(|k| bits(k[2])));
            if local.len() > 1 {
                local.sort_unstable();
            }
            let mut k = 0;
            while k < local.len() {
                let (x, y, first) = local[k];
                let contested = snap_m > 0.0
                    && grid.has_other_within(coords, coords[first as usize], &starts, &keyed);
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
    crate::progress::mem_mark("cluster: cells scanned");
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
    drop(contested);
    // Number clusters by first appearance, in place: a representative always precedes its
    // members, so its entry already holds its cluster when a member reads it.
    let mut cid = rep;
    let mut founders = Vec::new();
    for i in 0..n {
        let r = cid[i] as usize;
        if r == i {
            cid[i] = founders.len() as u32;
            founders.push(i as u32);
        } else {
            cid[i] = cid[r];
        }
    }
    founders.shrink_to_fit();
    (cid, founders)
}

/// A vertex keyed by its grid cell: the key's high and low halves, then the vertex.
type Keyed = [u32; 3];

/// Grid cells about eight times the tolerance wide, in degrees, conservative over the data's
/// latitudes. Columns divide the whole turn of longitude evenly and wrap at ±180° (the last column's
/// neighbour is the first), so vertices on either side of the meridian are searched together; where
/// the tolerance may reach round a pole there is one column, holding every longitude.
///
/// Wide cells mean most points lie farther than the tolerance from every border, so usually one
/// cell, rarely up to four, is searched.
struct Grid {
    cols: i64,
    cell: [f64; 2],
    tol: [f64; 2],
    snap_m: f64,
}

impl Grid {
    fn new(coords: &[[f64; 2]], snap_m: f64) -> Grid {
        let max_lat = coords.iter().fold(0.0f64, |m, p| m.max(p[1].abs()));
        let (dlon, dlat) = super::wrap::reach_deg(snap_m, max_lat);
        // Cells never finer than 2^-31 of the globe, so keys fit in 32 bits per axis.
        let floor = 360.0 / (1u64 << 31) as f64;
        let cols = dlon.map_or(1.0, |d| (360.0 / (8.0 * d).max(floor)).floor()) as i64;
        let (cols, tol_lon) = match dlon {
            Some(d) if cols >= 3 => (cols, d),
            _ => (1, f64::INFINITY),
        };
        Grid {
            cols,
            cell: [360.0 / cols as f64, (8.0 * dlat).max(floor)],
            tol: [tol_lon, dlat],
            snap_m,
        }
    }

    /// Column and row of `p`; its longitude is taken in [-180, 180) so ±180° share a column.
    fn cell_of(&self, p: [f64; 2]) -> (i64, i64) {
        let x = super::wrap::canonical_lon(p[0]) + 180.0;
        (
            ((x / self.cell[0]).floor() as i64).clamp(0, self.cols - 1),
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
        let rx = super::wrap::canonical_lon(p[0]) + 180.0 - cx as f64 * self.cell[0];
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
        let dx = if self.cols == 1 {
            0
        } else {
            side(rx, self.cell[0], self.tol[0])
        };
        let dy = side(ry, self.cell[1], self.tol[1]);
        let cells = [(0, 0), (dx, 0), (0, dy), (dx, dy)];
        let used = [true, dx != 0, dy != 0, dx != 0 && dy != 0];
        let cols = self.cols;
        cells
            .into_iter()
            .zip(used)
            .filter(|(_, u)| *u)
            .map(move |((ox, oy), _)| ((cx + ox).rem_euclid(cols), cy + oy))
    }

    /// The distance (m) from `p` to `q` when it is within the tolerance: quick rejections by the
    /// degree spans, then the geodesic distance on WGS84 (true metres at any latitude and across
    /// ±180°; planar scales in degrees stretch near the poles).
    fn within(&self, p: [f64; 2], q: [f64; 2]) -> Option<f64> {
        if (q[1] - p[1]).abs() > self.tol[1]
            || (super::wrap::near(q[0], p[0]) - p[0]).abs() > self.tol[0]
        {
            return None;
        }
        let d = distance_m(p, q);
        (d <= self.snap_m).then_some(d)
    }

    /// True when some vertex at a different position lies within the tolerance of `p`.
    fn has_other_within(
        &self,
        coords: &[[f64; 2]],
        p: [f64; 2],
        starts: &[u32],
        keyed: &[Keyed],
    ) -> bool {
        let cells = &starts[..starts.len() - 1];
        let key_at = |s: &u32| {
            let k = keyed[*s as usize];
            (u64::from(k[0]) << 32) | u64::from(k[1])
        };
        for c in self.neighbourhood(p) {
            let Ok(ci) = cells.binary_search_by_key(&Self::pack(c), key_at) else {
                continue;
            };
            for k in &keyed[starts[ci] as usize..starts[ci + 1] as usize] {
                let q = coords[k[2] as usize];
                if !same_place(q, p) && self.within(p, q).is_some() {
                    return true;
                }
            }
        }
        false
    }
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
        let mut best: Option<(f64, u32)> = None;
        for c in grid.neighbourhood(*p) {
            let mut k = head.get(&c).copied().unwrap_or(u32::MAX);
            while k != u32::MAX {
                let q = coords[founders[k as usize] as usize];
                let d = if same_place(q, *p) {
                    Some(0.0)
                } else {
                    grid.within(*p, q)
                };
                if let Some(d) = d
                    && best.is_none_or(|(bd, bk)| d < bd || (d == bd && k < bk))
                {
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ingest::geodesy::karney_distance_m;

    #[test]
    fn one_meridian_one_cluster() {
        let pts = [
            [180.0, 10.0],
            [-180.0, 10.0],
            [179.99999, 20.0],
            [-179.99999, 20.0],
        ];
        let (cid, founders) = cluster(&pts, 0.0);
        assert_eq!(cid[0], cid[1]);
        assert_ne!(cid[2], cid[3]);
        assert_eq!(founders.len(), 3);
        // 0.00002° of longitude at 20° is about 2.09 m (Karney's geodesic, geo crate).
        let d = karney_distance_m(pts[2], pts[3]);
        assert!((2.0..2.2).contains(&d), "{d}");
        let (cid, _) = cluster(&pts, d + 0.01);
        assert_eq!(cid[2], cid[3]);
        let (cid, _) = cluster(&pts, d - 0.01);
        assert_ne!(cid[2], cid[3]);
    }

    #[test]
    fn across_a_pole_by_geodesic_distance() {
        let pts = [
            [0.0, 89.9999],
            [180.0, 89.9999],
            [90.0, -89.99995],
            [-90.0, -89.99995],
        ];
        for (a, b) in [(0, 1), (2, 3)] {
            let d = karney_distance_m(pts[a], pts[b]);
            let (cid, _) = cluster(&pts, d + 0.01);
            assert_eq!(cid[a], cid[b], "{d}");
            let (cid, _) = cluster(&pts, d - 0.01);
            assert_ne!(cid[a], cid[b], "{d}");
        }
    }
}
