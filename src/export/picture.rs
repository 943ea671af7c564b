//! `plan.svg`: a picture of the plan for coordinators without GIS software.
//!
//! A local equirectangular frame around the district's centre (x scaled by the cosine of the mean
//! latitude, so shapes and the scale bar hold), the network in light grey, impassable roads dashed,
//! repairs coloured by day-phase on the ramp of [`super::palette`] (darkest first, ordered in
//! lightness for colour-blind readers and grey-scale print), sites as symbols with labels (thinned
//! when many), a legend ([`super::legend`]), a scale bar, a north arrow, the district name and the
//! cautions band (see [`super::band`]). Line widths shrink as the network grows.

use super::palette::{self, IMPASSABLE, INK, PAPER, PLAN_INTACT, ROAD};
use super::text::xml;
use crate::decimal::Fixed;
use crate::network::Network;
use crate::solve::order::Step;
use std::io::{self, Write};

const W: f64 = 1600.0;
const H: f64 = 1200.0;
const MARGIN: f64 = 60.0;

/// A site to draw.
pub struct SiteMark<'a> {
    /// Position, lon/lat.
    pub pos: [f64; 2],
    /// Label.
    pub label: &'a str,
    /// True for the hub.
    pub hub: bool,
    /// True when the plan connects it.
    pub connected: bool,
    /// Priority (higher sites keep their label when labels are thinned).
    pub priority: f64,
}

/// Picture size in pixels.
pub const SIZE: (u32, u32) = (W as u32, H as u32);

/// The local frame: lon/lat to picture pixels, and line widths for the network's size.
pub struct Frame {
    /// Western longitudes drawn a turn east (+360°): set when the district straddles ±180°.
    east: bool,
    lo: [f64; 2],
    mx: f64,
    my: f64,
    scale: f64,
    /// Base line width in pixels.
    pub base: f64,
}

impl Frame {
    /// Pixel position of a lon/lat point.
    pub fn px(&self, p: [f64; 2]) -> (f64, f64) {
        let lon = if self.east && p[0] < 0.0 {
            p[0] + 360.0
        } else {
            p[0]
        };
        (
            MARGIN + (lon - self.lo[0]) * self.mx * self.scale,
            H - MARGIN - 40.0 - super::band::HEIGHT - (p[1] - self.lo[1]) * self.my * self.scale,
        )
    }
}

/// The frame that fits the network and the sites, leaving room for the legend.
pub fn frame(net: &Network, sites: &[SiteMark]) -> Frame {
    // The bounds as written and with western longitudes a turn east; a district across ±180° is
    // narrower the second way, and is drawn so (its edges may step from 179.99 to -179.99).
    let bounds = |east: bool| {
        let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
        for &p in net.geom.iter().chain(sites.iter().map(|s| &s.pos)) {
            let lon = if east && p[0] < 0.0 {
                p[0] + 360.0
            } else {
                p[0]
            };
            lo = [lo[0].min(lon), lo[1].min(p[1])];
            hi = [hi[0].max(lon), hi[1].max(p[1])];
        }
        (lo, hi)
    };
    let (plain, turned) = (bounds(false), bounds(true));
    let east = turned.1[0] - turned.0[0] < plain.1[0] - plain.0[0];
    let (mut lo, mut hi) = if east { turned } else { plain };
    if lo[0] > hi[0] {
        lo = [0.0, 0.0];
        hi = [1e-3, 1e-3];
    }
    let lat0 = 0.5 * (lo[1] + hi[1]);
    let (my, mx) = crate::ingest::geodesy::metres_per_degree(lat0);
    // Metres east/north of the lower-left corner, then one scale for both axes.
    let span = [
        ((hi[0] - lo[0]) * mx).max(1.0),
        ((hi[1] - lo[1]) * my).max(1.0),
    ];
    // The legend keeps the right-hand 280 px.
    let scale = ((W - 2.0 * MARGIN - 280.0) / span[0])
        .min((H - 2.0 * MARGIN - 80.0 - super::band::HEIGHT) / span[1]);
    let n = net.edges.len().max(1) as f64;
    Frame {
        east,
        lo,
        mx,
        my,
        scale,
        base: (2.0 / (1.0 + n.log10() / 2.0)).clamp(0.3, 1.6),
    }
}

/// Writes the picture; with `lines` false only the overlay (sites, labels, legend, scale bar,
/// north arrow, title, cautions band) on a transparent background, for the raster renderer.
#[allow(clippy::too_many_arguments)]
pub fn write_svg<W2: Write>(
    w: W2,
    title: &str,
    net: &Network,
    plan_edges: &[u32],
    steps: &[Step],
    sites: &[SiteMark],
    caution: &str,
    attribution: Option<&str>,
    lines: bool,
) -> io::Result<()> {
    let mut w = io::BufWriter::new(w);
    let fr = frame(net, sites);
    let px = |p: [f64; 2]| fr.px(p);
    let scale = fr.scale;
    let base = fr.base;
    writeln!(w, r#"<?xml version="1.0" encoding="UTF-8"?>"#)?;
    writeln!(
        w,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{W}" height="{H}" viewBox="0 0 {W} {H}" font-family="DejaVu Sans, Arial, sans-serif">"#
    )?;
    if lines {
        writeln!(w, r##"<rect width="100%" height="100%" fill="{PAPER}"/>"##)?;
    }
    let path = |w: &mut io::BufWriter<W2>, e: usize, style: &str| -> io::Result<()> {
        let mut d = String::with_capacity(64);
        for (i, p) in net.edge_geometry(e).iter().enumerate() {
            let (x, y) = px(*p);
            d.push_str(if i == 0 { "M" } else { " L" });
            crate::decimal::push_decimal(&mut d, x, 1, true);
            d.push(' ');
            crate::decimal::push_decimal(&mut d, y, 1, true);
        }
        writeln!(w, r#"<path d="{d}" {style}/>"#)
    };
    let empty: [u32; 0] = [];
    let (plan_edges, steps_drawn): (&[u32], &[Step]) = if lines {
        (plan_edges, steps)
    } else {
        (&empty, &[])
    };
    // The background network as a few long paths (one element per 5,000 edges), so a million
    // edges do not become a million elements.
    writeln!(
        w,
        r##"<g id="network" fill="none" stroke-linecap="round" stroke="{ROAD}" stroke-width="{}">"##,
        Fixed(base, 2)
    )?;
    let usable: Vec<usize> = if lines {
        (0..net.edges.len())
            .filter(|&e| net.edges[e].usable())
            .collect()
    } else {
        Vec::new()
    };
    for chunk in usable.chunks(5000) {
        write!(w, r#"<path d=""#)?;
        let mut d = String::with_capacity(64);
        for &e in chunk {
            d.clear();
            for (i, p) in net.edge_geometry(e).iter().enumerate() {
                let (x, y) = px(*p);
                d.push_str(if i == 0 { "M" } else { "L" });
                crate::decimal::push_decimal(&mut d, x, 1, true);
                d.push(' ');
                crate::decimal::push_decimal(&mut d, y, 1, true);
            }
            w.write_all(d.as_bytes())?;
        }
        writeln!(w, r#""/>"#)?;
    }
    writeln!(w, "</g>")?;
    writeln!(w, r#"<g id="impassable" fill="none">"#)?;
    for (e, edge) in net.edges.iter().enumerate() {
        if lines && !edge.usable() {
            path(
                &mut w,
                e,
                &format!(
                    r#"stroke="{IMPASSABLE}" stroke-width="{}" stroke-dasharray="4 3""#,
                    Fixed(base * 1.2, 2)
                ),
            )?;
        }
    }
    writeln!(w, "</g>")?;
    writeln!(
        w,
        r#"<g id="plan-intact" fill="none" stroke-linecap="round">"#
    )?;
    for &e in plan_edges {
        if net.edges[e as usize].cost == 0 {
            path(
                &mut w,
                e as usize,
                &format!(
                    r#"stroke="{PLAN_INTACT}" stroke-width="{}""#,
                    Fixed(base * 1.8, 2)
                ),
            )?;
        }
    }
    writeln!(w, "</g>")?;
    let phases = steps.iter().filter_map(|s| s.day).max().unwrap_or(1);
    let colour = |phase: u32| palette::day_colour(phase, phases);
    writeln!(w, r#"<g id="repairs" fill="none" stroke-linecap="round">"#)?;
    for s in steps_drawn {
        path(
            &mut w,
            s.edge as usize,
            &format!(
                r#"stroke="{}" stroke-width="{}""#,
                colour(s.day.unwrap_or(1)),
                Fixed(base * 3.0, 2)
            ),
        )?;
    }
    writeln!(w, "</g>")?;
    // Sites: labels thinned to the highest priorities when there are many.
    let mut order: Vec<usize> = (0..sites.len()).collect();
    order.sort_by(|&a, &b| {
        sites[b]
            .priority
            .total_cmp(&sites[a].priority)
            .then(a.cmp(&b))
    });
    let labelled: std::collections::HashSet<usize> = order.into_iter().take(60).collect();
    writeln!(w, r#"<g id="sites" font-size="13">"#)?;
    for (i, s) in sites.iter().enumerate() {
        let (x, y) = px(s.pos);
        let fill = if s.connected { INK } else { PAPER };
        if s.hub {
            writeln!(
                w,
                r##"<rect x="{}" y="{}" width="12" height="12" fill="{INK}" stroke="{PAPER}"/>"##,
                Fixed(x - 6.0, 1),
                Fixed(y - 6.0, 1)
            )?;
        } else {
            writeln!(
                w,
                r##"<circle cx="{}" cy="{}" r="5" fill="{fill}" stroke="{INK}" stroke-width="1.5"/>"##,
                Fixed(x, 1),
                Fixed(y, 1)
            )?;
        }
        if labelled.contains(&i) {
            writeln!(
                w,
                r##"<text x="{}" y="{}" stroke="{PAPER}" stroke-width="3" paint-order="stroke">{}</text>"##,
                Fixed(x + 8.0, 1),
                Fixed(y - 6.0, 1),
                xml(s.label)
            )?;
        }
    }
    writeln!(w, "</g>")?;
    // Title, legend, scale bar, north arrow, caution.
    writeln!(
        w,
        r#"<text id="title" x="{MARGIN}" y="38" font-size="24" font-weight="bold">{}</text>"#,
        xml(title)
    )?;
    super::legend::write(&mut w, phases)?;
    // Scale bar: a round length near a fifth of the width.
    let target_m = (W - 2.0 * MARGIN) / 5.0 / scale;
    let pow = 10f64.powf(target_m.log10().floor());
    let nice = [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|k| k * pow)
        .rfind(|&v| v <= target_m)
        .unwrap_or(pow);
    let bar = nice * scale;
    let (bx, by) = (MARGIN, H - 40.0 - super::band::HEIGHT);
    let label = if nice >= 1000.0 {
        format!("{} km", nice / 1000.0)
    } else {
        format!("{nice} m")
    };
    writeln!(
        w,
        r##"<g id="scale-bar"><rect x="{bx}" y="{}" width="{}" height="6" fill="{INK}"/><text x="{bx}" y="{}" font-size="13">0</text><text x="{}" y="{}" font-size="13">{label}</text></g>"##,
        by - 6.0,
        Fixed(bar, 1),
        by - 10.0,
        Fixed(bx + bar - 20.0, 1),
        by - 10.0
    )?;
    writeln!(
        w,
        r##"<g id="north-arrow"><path d="M {0} {1} L {2} {3} L {0} {4} L {5} {3} Z" fill="{INK}"/><text x="{6}" y="{7}" font-size="16" font-weight="bold">N</text></g>"##,
        W - 60.0,
        H - 110.0 - super::band::HEIGHT,
        W - 50.0,
        H - 70.0 - super::band::HEIGHT,
        H - 80.0 - super::band::HEIGHT,
        W - 70.0,
        W - 66.0,
        H - 116.0 - super::band::HEIGHT
    )?;
    super::band::write_band(
        &mut w,
        (20.0, H - 12.0 - super::band::HEIGHT, W - 40.0),
        caution,
        attribution,
    )?;
    writeln!(w, "</svg>")?;
    w.flush()
}
