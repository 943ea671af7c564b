//! The picture's legend: the road styles, the repair days and the site symbols.
//!
//! Up to [`DISTINCT_DAYS`] days each get a line in their own colour; more days are grouped into
//! bins of consecutive days, drawn as a ramp bar (one block per bin, darkest first, labelled with
//! its days) so the reader sees the order and which days share a colour.

use super::palette::{self, DISTINCT_DAYS, IMPASSABLE, INK, PAPER, PLAN_INTACT, ROAD};
use crate::decimal::Fixed;
use std::io::{self, Write};

/// Left edge of the legend box, and its width.
const LEFT: f64 = super::picture::SIZE.0 as f64 - 290.0;
const WIDTH: f64 = 230.0;
/// Height of one block of the ramp bar.
const BLOCK: f64 = 18.0;

/// Writes the legend (an SVG group with id `legend`) for a plan of `days` repair days.
pub fn write<W: Write>(w: &mut W, days: u32) -> io::Result<()> {
    let days = days.max(1);
    let bins = palette::bins(days);
    let binned = days > DISTINCT_DAYS;
    // Three road lines, the days (one line each, or a title line and the bar), three site symbols.
    let body = if binned {
        20.0 + BLOCK * f64::from(bins) + 6.0
    } else {
        20.0 * f64::from(days)
    };
    writeln!(
        w,
        r##"<g id="legend" font-size="13"><rect x="{}" y="60" width="{}" height="{}" fill="{PAPER}" stroke="#888888"/>"##,
        Fixed(LEFT, 0),
        Fixed(WIDTH, 0),
        Fixed(140.0 + body, 0)
    )?;
    let lx = LEFT + 10.0;
    let mut ly = 82.0;
    let line = |w: &mut W, ly: &mut f64, label: &str, style: &str| -> io::Result<()> {
        writeln!(
            w,
            r#"<line x1="{lx}" y1="{ly}" x2="{}" y2="{ly}" {style}/><text x="{}" y="{}">{label}</text>"#,
            lx + 30.0,
            lx + 40.0,
            *ly + 4.0
        )?;
        *ly += 20.0;
        Ok(())
    };
    line(
        w,
        &mut ly,
        "road (usable)",
        &format!(r#"stroke="{ROAD}" stroke-width="2""#),
    )?;
    let dashed = format!(r#"stroke="{IMPASSABLE}" stroke-width="2" stroke-dasharray="4 3""#);
    line(w, &mut ly, "road impassable", &dashed)?;
    let intact = format!(r#"stroke="{PLAN_INTACT}" stroke-width="3""#);
    line(w, &mut ly, "intact road in plan", &intact)?;
    if binned {
        writeln!(
            w,
            r#"<text x="{lx}" y="{}">repairs by day ({days} days)</text>"#,
            ly + 4.0
        )?;
        ly += 14.0;
        writeln!(w, r#"<g id="day-ramp">"#)?;
        for k in 0..bins {
            let (first, last) = palette::bin_days(k, days);
            let label = if first == last {
                format!("day {first}")
            } else {
                format!("days {first}–{last}")
            };
            let y = ly + BLOCK * f64::from(k);
            writeln!(
                w,
                r#"<rect x="{lx}" y="{y}" width="30" height="{BLOCK}" fill="{}"/><text x="{}" y="{}">{label}</text>"#,
                palette::bin_colour(k, bins),
                lx + 40.0,
                y + BLOCK / 2.0 + 4.5
            )?;
        }
        writeln!(w, "</g>")?;
        ly += BLOCK * f64::from(bins) + 12.0;
    } else {
        for d in 1..=days {
            let style = format!(
                r#"stroke="{}" stroke-width="5""#,
                palette::day_colour(d, days)
            );
            line(w, &mut ly, &format!("repair, day {d}"), &style)?;
        }
    }
    // The site symbols as the map draws them, one per row.
    let (sx, tx) = (lx + 15.0, lx + 40.0);
    writeln!(
        w,
        r#"<rect x="{}" y="{}" width="12" height="12" fill="{INK}" stroke="{PAPER}"/><text x="{tx}" y="{}">hub</text>"#,
        sx - 6.0,
        ly - 6.0,
        ly + 4.0
    )?;
    for (fill, label) in [(INK, "site joined"), (PAPER, "site not joined")] {
        ly += 20.0;
        writeln!(
            w,
            r#"<circle cx="{sx}" cy="{ly}" r="5" fill="{fill}" stroke="{INK}" stroke-width="1.5"/><text x="{tx}" y="{}">{label}</text>"#,
            ly + 4.0
        )?;
    }
    writeln!(w, "</g>")
}
