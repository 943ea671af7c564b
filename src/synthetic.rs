//! Synthetic road-like data for benchmarks and scale tests (never for real plans).
//!
//! A jittered street grid: junctions on a square lattice with small random offsets, streets along
//! rows and columns, some streets missing, random damage. Deterministic for a given seed.

pub use crate::rng::Rng;
use crate::solve::graph::EdgeList;

/// A road-like graph on a `side × side` lattice: each junction links to its right and lower
/// neighbours (about 2 edges per junction), costs are block lengths (80–120 m, in milli-repair-metres)
/// times a damage factor; `intact` is the share of roads left intact (cost 0) and 1 % are closed.
pub fn grid_graph(side: usize, intact: f64, seed: u64) -> EdgeList {
    let mut rng = Rng::new(seed);
    let n = side * side;
    let mut g = EdgeList {
        vertices: n,
        ends: Vec::with_capacity(2 * n),
        cost: Vec::with_capacity(2 * n),
    };
    for y in 0..side {
        for x in 0..side {
            let v = (y * side + x) as u32;
            let mut add = |w: u32, rng: &mut Rng| {
                let length_mm = 80_000 + rng.below(40_000);
                let r = rng.unit();
                let cost = if r < 0.01 {
                    crate::solve::graph::UNUSABLE
                } else if r < 0.01 + intact {
                    0
                } else {
                    length_mm * (1 + rng.below(1000)) / 1000
                };
                g.ends.push([v, w]);
                g.cost.push(cost);
            };
            if x + 1 < side {
                add(v + 1, &mut rng);
            }
            if y + 1 < side {
                add(v + side as u32, &mut rng);
            }
        }
    }
    g
}

/// Writes a synthetic road layer of `features` LineStrings of 8 vertices each as GeoJSON lon/lat.
///
/// Streets run along the rows and columns of a lattice with 100 m blocks; each feature covers two
/// blocks (3 lattice junctions plus 5 gently curved shape vertices), so it splits into about two edges
/// as real street layers do. 5 % of streets are missing, 2 % closed, 53 % intact, the rest damaged.
pub fn write_grid_layer<W: std::io::Write>(
    w: W,
    features: usize,
    seed: u64,
) -> std::io::Result<usize> {
    use crate::export::geojson::{GeoJsonWriter, Prop};
    // Each lattice line carries side / 2 features, in rows and in columns, minus the missing 5 %.
    let side = (((features as f64) * 1.06).sqrt().ceil() as usize + 2).max(3);
    let mut rng = Rng::new(seed);
    let (lon0, lat0) = (10.0, 45.0);
    let (my, mx) = crate::ingest::geodesy::metres_per_degree(lat0);
    let jitter: Vec<[f64; 2]> = (0..side * side)
        .map(|_| [rng.unit() * 12.0 - 6.0, rng.unit() * 12.0 - 6.0])
        .collect();
    let at = |x: usize, y: usize| {
        let j = jitter[y * side + x];
        [x as f64 * 100.0 + j[0], y as f64 * 100.0 + j[1]]
    };
    let lonlat = |p: [f64; 2]| [lon0 + p[0] / mx, lat0 + p[1] / my];
    let mut gj = GeoJsonWriter::new(w)?;
    let mut written = 0;
    let mut coords = Vec::with_capacity(8);
    'outer: for dir in 0..2 {
        for line in 0..side {
            let mut start = 0;
            while start + 2 < side {
                if written >= features {
                    break 'outer;
                }
                let node = |k: usize| if dir == 0 { at(k, line) } else { at(line, k) };
                coords.clear();
                for (block, shape) in [(start, 3usize), (start + 1, 2)] {
                    let (a, b) = (node(block), node(block + 1));
                    coords.push(lonlat(a));
                    for s in 1..=shape {
                        let t = s as f64 / (shape + 1) as f64;
                        let bend = 3.0 * (t * std::f64::consts::PI).sin();
                        let (dx, dy) = (b[0] - a[0], b[1] - a[1]);
                        let len = dx.hypot(dy);
                        coords.push(lonlat([
                            a[0] + t * dx - bend * dy / len,
                            a[1] + t * dy + bend * dx / len,
                        ]));
                    }
                }
                coords.push(lonlat(node(start + 2)));
                start += 2;
                let r = rng.unit();
                if r < 0.05 {
                    continue; // a missing street
                }
                let damage = if r < 0.07 {
                    Prop::Str("closed")
                } else if r < 0.6 {
                    Prop::Int(0)
                } else {
                    Prop::Num((rng.unit() * 100.0).round() / 100.0)
                };
                gj.line(
                    &[("id", Prop::Int(written as i64)), ("damage", damage)],
                    &coords,
                )?;
                written += 1;
            }
        }
    }
    gj.finish()?;
    Ok(written)
}

/// `count` site positions near junctions of the layer [`write_grid_layer`] makes for `features`
/// (lon/lat, within a few metres of a junction), deterministic for a given seed.
pub fn grid_layer_sites(features: usize, count: usize, seed: u64) -> Vec<[f64; 2]> {
    let side = (((features as f64) * 1.06).sqrt().ceil() as usize + 2).max(3);
    let rows = (features / (side / 2).max(1)).clamp(1, side);
    let mut rng = Rng::new(seed ^ 0xA5A5);
    let (lon0, lat0) = (10.0, 45.0);
    let (my, mx) = crate::ingest::geodesy::metres_per_degree(lat0);
    (0..count)
        .map(|_| {
            // Rows are laid out first, so stay within the rows that hold streets.
            let x = rng.below(side as u64 - 1) as f64;
            let y = rng.below(rows as u64) as f64;
            [lon0 + x * 100.0 / mx, lat0 + y * 100.0 / my]
        })
        .collect()
}

/// Writes `count` square damage zones (100–800 m across, factor 0.2–1.0, one in twenty closed)
/// scattered over the area of the layer [`write_grid_layer`] makes for `features`.
pub fn write_grid_zones<W: std::io::Write>(
    w: W,
    count: usize,
    features: usize,
    seed: u64,
) -> std::io::Result<()> {
    use crate::export::geojson::{GeoJsonWriter, Prop};
    let side = (((features as f64) * 1.06).sqrt().ceil() as usize + 2).max(3);
    let rows = (features / (side / 2).max(1)).clamp(1, side) as f64;
    let mut rng = Rng::new(seed ^ 0x2011E5);
    let (lon0, lat0) = (10.0, 45.0);
    let (my, mx) = crate::ingest::geodesy::metres_per_degree(lat0);
    let mut gj = GeoJsonWriter::new(w)?;
    for _ in 0..count {
        let x = rng.unit() * side as f64 * 100.0;
        let y = rng.unit() * rows * 100.0;
        let s = 100.0 + rng.unit() * 700.0;
        let p = |dx: f64, dy: f64| [lon0 + (x + dx) / mx, lat0 + (y + dy) / my];
        let ring = [p(0.0, 0.0), p(s, 0.0), p(s, s), p(0.0, s), p(0.0, 0.0)];
        let damage = if rng.unit() < 0.05 {
            Prop::Str("closed")
        } else {
            Prop::Num((0.2 + rng.unit() * 0.8 * 100.0).round() / 100.0)
        };
        gj.polygon(&[("damage", damage)], &[&ring])?;
    }
    gj.finish()?;
    Ok(())
}

/// `count` distinct random junctions (fixed seed 7) on the largest component of `g`, for benchmark
/// sites; also returns the components and the largest one's label.
pub fn sites_on_largest_component(
    g: &EdgeList,
    count: usize,
) -> (Vec<u32>, crate::solve::components::Components, u32) {
    let comps = crate::solve::components::components(g);
    let mut size = vec![0usize; comps.count];
    for &c in &comps.of {
        size[c as usize] += 1;
    }
    let big = (0..comps.count).max_by_key(|&c| size[c]).unwrap_or(0) as u32;
    let count = count.min(size.get(big as usize).copied().unwrap_or(0));
    let mut rng = Rng::new(7);
    let mut terms: Vec<u32> = Vec::new();
    let mut taken = std::collections::HashSet::new();
    while terms.len() < count {
        let v = rng.below(g.vertices as u64) as u32;
        if comps.of[v as usize] == big && taken.insert(v) {
            terms.push(v);
        }
    }
    (terms, comps, big)
}
