//! `plan.svg`: a picture of the plan for coordinators without GIS software.
//!
//! The map ([`super::layout`]: it takes the district's shape) holds the damage zones, the network
//! in light grey, damaged roads outside the plan in ochre, impassable roads dashed, the intact roads
//! the plan uses, the backup links dashed green, the repairs coloured by day on the ramp of
//! [`super::palette`] (one colour when they are not scheduled by day) and numbered in order, and
//! the sites with labels placed clear of each other ([`super::labels`]). Beside it the legend
//! ([`super::legend`]); below it a scale bar, a north arrow, notes on what was simplified or left
//! out, and the cautions band ([`super::band`]). Line widths shrink as the network grows.

use super::drawing::{self, Drawing, LABEL_FONT, NOTE_H, NUMBER_FONT};
use super::layout::{MARGIN, SCALE_ROW};
use super::palette::{
    BACKUP, DAMAGED, IMPASSABLE, INK, PAPER, PLAN_INTACT, ROAD, ZONE_EDGE, ZONE_FILL,
};
use super::scene::Scene;
use super::strokes::path_data;
use super::text::xml;
use crate::decimal::Fixed;
use std::io::{self, Write};

/// A site to draw.
pub struct SiteMark<'a> {
    /// Position, lon/lat.
    pub pos: [f64; 2],
    /// Label.
    pub label: &'a str,
    /// True for the hub.
    pub hub: bool,
    /// True when the plan joins it to the hub.
    pub connected: bool,
    /// Priority (higher sites get their label placed first).
    pub priority: f64,
}

/// Path elements hold at most this many lines, so no element grows without bound.
const LINES_PER_PATH: usize = 5000;

fn lines_group<W: Write>(
    w: &mut W,
    id: &str,
    style: &str,
    lines: &super::strokes::Lines,
) -> io::Result<()> {
    writeln!(
        w,
        r#"<g id="{id}" fill="none" stroke-linecap="round" stroke-linejoin="round" {style}>"#
    )?;
    let mut rest = lines.iter().peekable();
    while rest.peek().is_some() {
        let chunk = rest.by_ref().take(LINES_PER_PATH);
        writeln!(w, r#"<path d="{}"/>"#, path_data(chunk))?;
    }
    writeln!(w, "</g>")
}

/// Writes the picture; with `lines` false only the overlay (sites, labels, numbers, legend, scale
/// bar, north arrow, title, notes, cautions band) on a transparent background, for the raster
/// renderer.
pub fn write_svg<W2: Write>(w: W2, scene: &Scene, lines: bool) -> io::Result<()> {
    write_drawing(w, scene, &drawing::prepare(scene), lines)
}

/// Writes a prepared drawing (see [`write_svg`]).
pub fn write_drawing<W2: Write>(w: W2, scene: &Scene, d: &Drawing, lines: bool) -> io::Result<()> {
    let mut w = io::BufWriter::new(w);
    let fr = &d.frame;
    let (width, height) = (fr.width, d.height);
    let base = fr.base;
    writeln!(w, r#"<?xml version="1.0" encoding="UTF-8"?>"#)?;
    writeln!(
        w,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" viewBox="0 0 {width} {height}" font-family="DejaVu Sans, Arial, sans-serif">"#
    )?;
    let (mx, my, mw, mh) = fr.map;
    if lines {
        writeln!(w, r##"<rect width="100%" height="100%" fill="{PAPER}"/>"##)?;
        write!(
            w,
            r#"<g id="damage-zones" fill="{ZONE_FILL}" stroke="{ZONE_EDGE}" stroke-width="1">"#
        )?;
        for ring in &d.zones {
            writeln!(w, r#"<path d="{}Z"/>"#, path_data([ring]))?;
        }
        writeln!(w, "</g>")?;
        let b = |k: f64| Fixed(base * k, 2);
        lines_group(
            &mut w,
            "network",
            &format!(r#"stroke="{ROAD}" stroke-width="{}""#, b(1.0)),
            &d.roads,
        )?;
        lines_group(
            &mut w,
            "damaged",
            &format!(r#"stroke="{DAMAGED}" stroke-width="{}""#, b(1.4)),
            &d.damaged,
        )?;
        let dash = format!(
            r#"stroke="{IMPASSABLE}" stroke-width="{}" stroke-dasharray="4 3""#,
            b(1.2)
        );
        lines_group(&mut w, "impassable", &dash, &d.impassable)?;
        lines_group(
            &mut w,
            "plan-intact",
            &format!(r#"stroke="{PLAN_INTACT}" stroke-width="{}""#, b(1.8)),
            &d.plan_intact,
        )?;
        let dash = format!(
            r#"stroke="{BACKUP}" stroke-width="{}" stroke-dasharray="7 4""#,
            b(2.4)
        );
        lines_group(&mut w, "backup-links", &dash, &d.backup)?;
        writeln!(
            w,
            r#"<g id="repairs" fill="none" stroke-linecap="round" stroke-linejoin="round" stroke-width="{}">"#,
            b(3.0)
        )?;
        for (colour, l) in &d.repairs {
            writeln!(w, r#"<path d="{}" stroke="{colour}"/>"#, path_data(l))?;
        }
        writeln!(w, "</g>")?;
    }
    writeln!(
        w,
        r##"<rect id="map-frame" x="{mx}" y="{my}" width="{mw}" height="{mh}" fill="none" stroke="#b0b0b0"/>"##
    )?;
    write_sites(&mut w, scene, d)?;
    writeln!(
        w,
        r#"<text id="title" x="{MARGIN}" y="38" font-size="24" font-weight="bold">{}</text>"#,
        xml(scene.title)
    )?;
    super::legend::write(&mut w, &d.legend, (fr.legend_x, my))?;
    write_scale(&mut w, d)?;
    writeln!(w, r#"<g id="notes" font-size="13" fill="{INK}">"#)?;
    let top = fr.map_bottom() + SCALE_ROW;
    for (i, n) in d.notes.iter().enumerate() {
        writeln!(
            w,
            r#"<text x="{MARGIN}" y="{}">{}</text>"#,
            Fixed(top + NOTE_H * (i as f64 + 0.7), 1),
            xml(n)
        )?;
    }
    writeln!(w, "</g>")?;
    super::band::write_band(
        &mut w,
        (
            MARGIN,
            top + NOTE_H * d.notes.len() as f64 + 8.0,
            fr.width - 2.0 * MARGIN,
        ),
        scene.caution,
        scene.attribution,
    )?;
    writeln!(w, "</svg>")?;
    w.flush()
}

/// The site symbols, their labels and the repair numbers.
fn write_sites<W: Write>(w: &mut W, scene: &Scene, d: &Drawing) -> io::Result<()> {
    let fr = &d.frame;
    writeln!(w, r#"<g id="sites" font-size="{LABEL_FONT}">"#)?;
    for s in scene.sites {
        let (x, y) = fr.px(s.pos);
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
                r##"<circle cx="{}" cy="{}" r="5" fill="{}" stroke="{INK}" stroke-width="1.5"/>"##,
                Fixed(x, 1),
                Fixed(y, 1),
                if s.connected { INK } else { PAPER }
            )?;
        }
    }
    writeln!(w, "</g>")?;
    let text = |w: &mut W, spot: &super::labels::Spot, body: &str, extra: &str| {
        writeln!(
            w,
            r#"<text x="{}" y="{}" text-anchor="{}"{extra}>{body}</text>"#,
            Fixed(spot.x, 1),
            Fixed(spot.y, 1),
            spot.anchor
        )
    };
    writeln!(
        w,
        r#"<g id="site-labels" font-size="{LABEL_FONT}" stroke="{PAPER}" stroke-width="3" paint-order="stroke" fill="{INK}">"#
    )?;
    for (i, spot) in &d.labels {
        text(w, spot, &xml(scene.sites[*i].label), "")?;
    }
    writeln!(w, "</g>")?;
    writeln!(
        w,
        r#"<g id="repair-numbers" font-size="{NUMBER_FONT}" font-weight="bold" stroke="{PAPER}" stroke-width="3" paint-order="stroke" fill="{INK}">"#
    )?;
    for (n, spot) in &d.numbers {
        text(w, spot, &n.to_string(), "")?;
    }
    writeln!(w, "</g>")
}

/// The scale bar (a round length near a fifth of the map's width) and the north arrow, in the
/// row under the map.
fn write_scale<W: Write>(w: &mut W, d: &Drawing) -> io::Result<()> {
    let fr = &d.frame;
    let (mx, _, mw, _) = fr.map;
    let target_m = mw / 5.0 / fr.scale;
    let pow = 10f64.powf(target_m.log10().floor());
    let nice = [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|k| k * pow)
        .rfind(|&v| v <= target_m)
        .unwrap_or(pow);
    let bar = nice * fr.scale;
    let (bx, by) = (mx, fr.map_bottom() + 30.0);
    let label = if nice >= 1000.0 {
        format!("{} km", nice / 1000.0)
    } else {
        format!("{nice} m")
    };
    writeln!(
        w,
        r##"<g id="scale-bar" font-size="13"><rect x="{bx}" y="{}" width="{}" height="6" fill="{INK}"/><text x="{bx}" y="{}">0</text><text x="{}" y="{}" text-anchor="end">{label}</text></g>"##,
        Fixed(by, 1),
        Fixed(bar, 1),
        Fixed(by - 4.0, 1),
        Fixed(bx + bar, 1),
        Fixed(by - 4.0, 1)
    )?;
    let (ax, ay) = (mx + mw - 14.0, fr.map_bottom() + 8.0);
    writeln!(
        w,
        r##"<g id="north-arrow"><path d="M {ax} {ay} L {} {} L {ax} {} L {} {} Z" fill="{INK}"/><text x="{}" y="{}" font-size="14" font-weight="bold" text-anchor="end">N</text></g>"##,
        ax + 8.0,
        ay + 30.0,
        ay + 24.0,
        ax - 8.0,
        ay + 30.0,
        ax - 12.0,
        ay + 16.0
    )
}
