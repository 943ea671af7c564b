//! The picture's legend: only what the map draws, in drawing order (the road styles, the damage
//! zones, the repairs, the backup links, the repair numbers, the site symbols), each with its
//! label, in a box sized from the labels' measured widths ([`super::metrics`]) so it always holds
//! them.
//!
//! Up to [`DISTINCT_DAYS`] days each get a line in their own colour; more days are grouped into
//! bins of consecutive days, drawn as a ramp bar (one block per bin, darkest first, labelled with
//! its days) so the reader sees the order and which days share a colour. Without `--crew-capacity`
//! the repairs share one colour and the legend says they are not scheduled by day.

use super::metrics::text_width;
use super::palette::{
    self, BACKUP, DAMAGED, DISTINCT_DAYS, IMPASSABLE, INK, PAPER, PLAN_INTACT, ROAD,
};
use super::palette::{ZONE_EDGE, ZONE_FILL};
use super::scene::Scene;
use super::text::xml;
use crate::decimal::Fixed;
use std::io::{self, Write};

/// Font size of the legend's labels.
pub const FONT: f64 = 13.0;
/// Height of one block of the ramp bar.
const BLOCK: f64 = 18.0;
/// Height of a row.
const ROW: f64 = 20.0;
/// Padding inside the box, and the room the symbol takes before a label.
const PADDING: f64 = 10.0;
const SYMBOL: f64 = 40.0;
/// The note shown when the repairs have no days.
pub const UNSCHEDULED: &str = "repairs not scheduled by day (no --crew-capacity)";

/// One row of the legend.
enum Row {
    Line(String),
    Area(String),
    Ramp(u32),
    Number,
    Hub,
    Site(bool),
    Note,
}

/// The legend's rows and its size.
pub struct Legend {
    rows: Vec<(Row, String)>,
    /// Width of the box, pixels.
    pub width: f64,
    /// Height of the box, pixels.
    pub height: f64,
}

/// The legend for what `scene` draws; `numbered` is the count of repair numbers on the map.
pub fn build(scene: &Scene, numbered: usize) -> Legend {
    let net = scene.net;
    let planned = scene.planned();
    let any = |f: &dyn Fn(usize) -> bool| (0..net.edges.len()).any(f);
    let mut rows: Vec<(Row, String)> = Vec::new();
    let line = |colour: &str, width: f64, dash: bool| {
        format!(
            r#"stroke="{colour}" stroke-width="{width}"{}"#,
            if dash {
                r#" stroke-dasharray="4 3""#
            } else {
                ""
            }
        )
    };
    if !scene.zones.is_empty() {
        rows.push((Row::Area(ZONE_FILL.into()), "damage zone".into()));
    }
    if any(&|e| net.edges[e].usable() && net.edges[e].cost == 0 && !planned[e]) {
        rows.push((Row::Line(line(ROAD, 2.0, false)), "road, intact".into()));
    }
    if any(&|e| scene.damaged_outside(&planned, e)) {
        rows.push((
            Row::Line(line(DAMAGED, 2.5, false)),
            "road, damaged, not in the plan".into(),
        ));
    }
    if any(&|e| !net.edges[e].usable()) {
        rows.push((
            Row::Line(line(IMPASSABLE, 2.0, true)),
            "road, impassable".into(),
        ));
    }
    if scene
        .plan_edges
        .iter()
        .any(|&e| net.edges[e as usize].cost == 0)
    {
        rows.push((
            Row::Line(line(PLAN_INTACT, 3.0, false)),
            "intact road the plan uses".into(),
        ));
    }
    let days = scene.days();
    if !scene.steps.is_empty() {
        if !scene.scheduled {
            let style = line(&scene.day_colour(1), 5.0, false);
            rows.push((Row::Line(style), "repair".into()));
            rows.push((Row::Note, UNSCHEDULED.into()));
        } else if days > DISTINCT_DAYS {
            rows.push((Row::Ramp(days), format!("repairs by day ({days} days)")));
        } else {
            for d in 1..=days {
                let style = line(&palette::day_colour(d, days), 5.0, false);
                rows.push((Row::Line(style), format!("repair, day {d}")));
            }
        }
    }
    if !scene.backup_edges.is_empty() {
        rows.push((
            Row::Line(line(BACKUP, 3.5, true)),
            "backup link (a way round)".into(),
        ));
    }
    if numbered > 0 {
        rows.push((Row::Number, "repair number (order of work)".into()));
    }
    if scene.sites.iter().any(|s| s.hub) {
        rows.push((Row::Hub, "hub".into()));
    }
    for joined in [true, false] {
        if scene.sites.iter().any(|s| !s.hub && s.connected == joined) {
            let label = if joined {
                "site joined to the hub"
            } else {
                "site not joined to the hub"
            };
            rows.push((Row::Site(joined), label.into()));
        }
    }
    let mut width: f64 = 160.0;
    let mut height = 2.0 * PADDING;
    for (row, label) in &rows {
        let indent = if matches!(row, Row::Note) {
            0.0
        } else {
            SYMBOL
        };
        width = width.max(2.0 * PADDING + indent + text_width(label, FONT, false));
        height += row_height(row);
        if let Row::Ramp(_) = row {
            for k in 0..palette::bins(days) {
                width = width
                    .max(2.0 * PADDING + SYMBOL + text_width(&bin_label(k, days), FONT, false));
            }
        }
    }
    Legend {
        rows,
        width: width.ceil(),
        height: height.ceil(),
    }
}

fn row_height(row: &Row) -> f64 {
    match row {
        Row::Ramp(days) => 18.0 + BLOCK * f64::from(palette::bins(*days)) + 6.0,
        _ => ROW,
    }
}

fn bin_label(k: u32, days: u32) -> String {
    let (first, last) = palette::bin_days(k, days);
    if first == last {
        format!("day {first}")
    } else {
        format!("days {first}–{last}")
    }
}

/// Writes the legend (an SVG group with id `legend`) with its top-left corner at (`x`, `y`).
pub fn write<W: Write>(w: &mut W, lg: &Legend, (x, y): (f64, f64)) -> io::Result<()> {
    writeln!(
        w,
        r##"<g id="legend" font-size="{FONT}"><rect x="{}" y="{}" width="{}" height="{}" fill="{PAPER}" stroke="#888888"/>"##,
        Fixed(x, 1),
        Fixed(y, 1),
        Fixed(lg.width, 0),
        Fixed(lg.height, 0)
    )?;
    let lx = x + PADDING;
    let tx = lx + SYMBOL;
    // Row centre line.
    let mut cy = y + PADDING + ROW / 2.0;
    for (row, label) in &lg.rows {
        let text = |w: &mut W, x: f64, cy: f64| {
            writeln!(
                w,
                r#"<text x="{}" y="{}">{}</text>"#,
                Fixed(x, 1),
                Fixed(cy + 4.5, 1),
                xml(label)
            )
        };
        match row {
            Row::Line(style) => {
                write!(
                    w,
                    r#"<line x1="{}" y1="{1}" x2="{2}" y2="{1}" {style}/>"#,
                    Fixed(lx, 1),
                    Fixed(cy, 1),
                    Fixed(lx + 30.0, 1)
                )?;
                text(w, tx, cy)?;
            }
            Row::Area(fill) => {
                write!(
                    w,
                    r#"<rect x="{}" y="{}" width="30" height="12" fill="{fill}" stroke="{ZONE_EDGE}"/>"#,
                    Fixed(lx, 1),
                    Fixed(cy - 6.0, 1)
                )?;
                text(w, tx, cy)?;
            }
            Row::Number => {
                write!(
                    w,
                    r#"<text x="{}" y="{}" font-weight="bold" text-anchor="middle" font-size="11">12</text>"#,
                    Fixed(lx + 15.0, 1),
                    Fixed(cy + 4.0, 1)
                )?;
                text(w, tx, cy)?;
            }
            Row::Hub => {
                write!(
                    w,
                    r#"<rect x="{}" y="{}" width="12" height="12" fill="{INK}" stroke="{PAPER}"/>"#,
                    Fixed(lx + 9.0, 1),
                    Fixed(cy - 6.0, 1)
                )?;
                text(w, tx, cy)?;
            }
            Row::Site(joined) => {
                write!(
                    w,
                    r#"<circle cx="{}" cy="{}" r="5" fill="{}" stroke="{INK}" stroke-width="1.5"/>"#,
                    Fixed(lx + 15.0, 1),
                    Fixed(cy, 1),
                    if *joined { INK } else { PAPER }
                )?;
                text(w, tx, cy)?;
            }
            Row::Note => text(w, lx, cy)?,
            Row::Ramp(days) => {
                text(w, lx, cy)?;
                let top = cy - ROW / 2.0 + 18.0;
                writeln!(w, r#"<g id="day-ramp">"#)?;
                let bins = palette::bins(*days);
                for k in 0..bins {
                    let by = top + BLOCK * f64::from(k);
                    writeln!(
                        w,
                        r#"<rect x="{}" y="{}" width="30" height="{BLOCK}" fill="{}"/><text x="{}" y="{}">{}</text>"#,
                        Fixed(lx, 1),
                        Fixed(by, 1),
                        palette::bin_colour(k, bins),
                        Fixed(tx, 1),
                        Fixed(by + BLOCK / 2.0 + 4.5, 1),
                        bin_label(k, *days)
                    )?;
                }
                writeln!(w, "</g>")?;
            }
        }
        cy += row_height(row);
    }
    writeln!(w, "</g>")
}
