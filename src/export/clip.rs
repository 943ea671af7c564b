//! Damage zones on the picture: each outer ring in pixels, clipped to the map area
//! (Sutherland–Hodgman against each side of the rectangle), so a zone drawn for a whole region
//! stays inside the map; at the picture's resolution its vertices snap to the pixel grid.

/// A ring in pixels.
pub type Ring = Vec<(f64, f64)>;

/// Clips `ring` to the rectangle `[left, top, right, bottom]`; empty when nothing is inside.
pub fn clip(ring: &[(f64, f64)], r: [f64; 4]) -> Ring {
    let mut out: Ring = ring.to_vec();
    // Each side as (axis, bound, keep-below): points with coordinate on the kept side survive.
    for (axis, bound, below) in [
        (0, r[0], false),
        (0, r[2], true),
        (1, r[1], false),
        (1, r[3], true),
    ] {
        let inside = |p: &(f64, f64)| {
            let v = if axis == 0 { p.0 } else { p.1 };
            if below { v <= bound } else { v >= bound }
        };
        let cut = |a: (f64, f64), b: (f64, f64)| {
            let (va, vb) = if axis == 0 { (a.0, b.0) } else { (a.1, b.1) };
            let t = (bound - va) / (vb - va);
            (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1))
        };
        let input = std::mem::take(&mut out);
        for (i, &cur) in input.iter().enumerate() {
            let prev = input[(i + input.len() - 1) % input.len()];
            match (inside(&prev), inside(&cur)) {
                (true, true) => out.push(cur),
                (true, false) => out.push(cut(prev, cur)),
                (false, true) => {
                    out.push(cut(prev, cur));
                    out.push(cur);
                }
                (false, false) => {}
            }
        }
        if out.is_empty() {
            break;
        }
    }
    if out.len() < 3 { Ring::new() } else { out }
}

/// The zones' rings in pixels, clipped to the map area `r`; snapped to whole pixels (repeated
/// points dropped) when `snap`.
pub fn zone_rings(
    zones: &[Vec<[f64; 2]>],
    frame: &super::layout::Frame,
    r: [f64; 4],
    snap: bool,
) -> Vec<Ring> {
    zones
        .iter()
        .map(|z| {
            let mut ring: Ring = Vec::with_capacity(z.len());
            for p in z {
                let (x, y) = frame.px(*p);
                let q = if snap { (x.round(), y.round()) } else { (x, y) };
                if ring.last() != Some(&q) {
                    ring.push(q);
                }
            }
            clip(&ring, r)
        })
        .filter(|r| r.len() >= 3)
        .collect()
}

#[cfg(test)]
mod tests {
    #[test]
    fn a_square_larger_than_the_box_becomes_the_box() {
        let ring = [
            (-10.0, -10.0),
            (110.0, -10.0),
            (110.0, 110.0),
            (-10.0, 110.0),
        ];
        let c = super::clip(&ring, [0.0, 0.0, 100.0, 50.0]);
        for p in &c {
            assert!(
                (-1e-9..=100.0 + 1e-9).contains(&p.0) && (-1e-9..=50.0 + 1e-9).contains(&p.1),
                "{p:?}"
            );
        }
        // Shoelace area of the clipped ring: the whole box.
        let a: f64 = (0..c.len())
            .map(|i| {
                let (p, q) = (c[i], c[(i + 1) % c.len()]);
                p.0 * q.1 - q.0 * p.1
            })
            .sum();
        assert!((a.abs() / 2.0 - 5000.0).abs() < 1e-9);
        assert!(super::clip(&ring, [200.0, 200.0, 300.0, 300.0]).is_empty());
    }
}
