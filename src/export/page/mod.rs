//! `map.html`: an interactive map of the plan that works offline, written with every plan and
//! linked from `report.html`.
//!
//! One file holds everything: the data as JSON in a `<script type="application/json">` element
//! ([`data`], [`encode`]), the drawing code (`map.js`, our own canvas code: pan by dragging, zoom by
//! the wheel, the buttons or the keyboard, click a repair or a site to read its row) and the style
//! (`map.css`). It makes no request of any kind. The look is the picture's: the same scene, colours
//! and legend ([`crate::export::palette`], [`crate::export::legend`]), plus the layers the picture
//! leaves out (roads with no way round, corridors, geometry checks, sites by status). The caution
//! band and the data's attribution stay in view. Large networks are simplified ([`data`]).

pub mod data;
pub mod encode;
mod info;

use super::backup::BackupLayer;
use super::corridors::CorridorLayer;
use super::drawing::Drawing;
use super::palette;
use super::scene::Scene;
use super::single_failures::SingleFailureLayer;
use super::sites::SiteRow;
use super::text::html;
use crate::ingest::qa::QaPoint;
use encode::Json;
use std::io::{self, Write};

const CSS: &str = include_str!("map.css");
const SCRIPT: &str = include_str!("map.js");
const SCRIPT_UI: &str = include_str!("ui.js");

/// Everything the page shows.
pub struct Page<'a> {
    /// The picture's scene (network, plan, repairs by day, backup edges, zones, text).
    pub scene: &'a Scene<'a>,
    /// The picture as prepared (frame, legend, clipped zones).
    pub drawing: &'a Drawing,
    /// The sites' rows (empty without sites).
    pub sites: &'a [SiteRow],
    /// Geometry-check points.
    pub qa: &'a [QaPoint],
    /// Roads with no way round that cut sites off.
    pub single_failures: Option<&'a SingleFailureLayer>,
    /// Backup links.
    pub backup: Option<&'a BackupLayer>,
    /// Corridors from the hub.
    pub corridors: Option<&'a CorridorLayer>,
    /// The work-order rows, as in `work-orders.csv` (plan repairs first, then backup links).
    /// Given a function, calls it on each row in turn: rows are made one at a time, never all held
    /// at once (on a national network they would outweigh the page itself).
    pub rows: &'a EachRow<'a>,
    /// The work-order keys of the network's pieces.
    pub keys: &'a super::work_order_id::WorkOrderIds,
}

impl Page<'_> {
    /// The distinct repair colours, in order of first use.
    fn colours(&self) -> Vec<String> {
        let mut v: Vec<String> = Vec::new();
        for s in self.scene.steps {
            let c = self.scene.day_colour(s.last_day.unwrap_or(1));
            if !v.contains(&c) {
                v.push(c);
            }
        }
        v
    }

    /// The index of the colour of `day` in `colours` (from [`Page::colours`]: at most
    /// [`palette::DISTINCT_DAYS`] entries).
    fn colour_index(&self, colours: &[String], day: u32) -> i64 {
        let c = self.scene.day_colour(day);
        colours.iter().position(|x| *x == c).map_or(0, |i| i as i64)
    }
}

/// Calls the function it is given on each work-order row in turn.
pub type EachRow<'a> = dyn Fn(&mut dyn FnMut(&[String; 25])) + 'a;

/// Writes the page.
pub fn write_page<W: Write>(w: W, p: &Page) -> io::Result<()> {
    let mut w = io::BufWriter::new(w);
    let scene = p.scene;
    let simplified = data::grid_m(p);
    let title = html(scene.title);
    writeln!(
        w,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
    )?;
    writeln!(w, "<title>{title} — map of the plan</title>")?;
    writeln!(w, "<style>{CSS}</style></head><body>")?;
    writeln!(w, "<header><h1>{title} — map of the plan</h1>")?;
    let note = simplified.map_or_else(String::new, |g| simplified_note(p, g));
    writeln!(w, "<p id=\"page-note\">{}</p></header>", html(&note))?;
    writeln!(w, "{}", info::BODY)?;
    info::write_legend(&mut w, p)?;
    writeln!(w, "</aside></main>")?;
    writeln!(
        w,
        "<footer id=\"band\"><p id=\"caution\">{}</p>",
        html(scene.caution)
    )?;
    if let Some(a) = scene.attribution {
        writeln!(w, "<p id=\"attribution\">Data: {}</p>", html(a))?;
    }
    writeln!(w, "</footer>")?;
    writeln!(
        w,
        "<noscript><p>This map needs JavaScript; report.html and the layers hold the same plan.</p></noscript>"
    )?;
    write!(w, "<script type=\"application/json\" id=\"map-data\">")?;
    write_data(&mut w, p, simplified)?;
    writeln!(w, "</script>")?;
    writeln!(
        w,
        "<script>\n{SCRIPT}\n{SCRIPT_UI}</script>\n</body></html>"
    )?;
    w.flush()
}

/// Writes the page's data (the JSON text inside its script element) as it is made.
fn write_data(w: &mut dyn Write, p: &Page, simplified: Option<f64>) -> io::Result<()> {
    let scene = p.scene;
    let mut j = Json::streaming(w);
    let (east, lo, mx, my) = p.drawing.frame.projection();
    j.raw("{").key("res").num(encode::RESOLUTION_M, 3).raw(",");
    j.key("proj").raw("[").int(i64::from(east)).raw(",");
    j.num(lo[0], 9).raw(",").num(lo[1], 9).raw(",");
    j.num(mx, 6).raw(",").num(my, 6).raw("],");
    j.key("base").num(p.drawing.frame.base, 3).raw(",");
    j.key("scheduled")
        .raw(if scene.scheduled { "true" } else { "false" });
    j.raw(",").key("colours").raw("{");
    for (i, (k, v)) in [
        ("road", palette::ROAD),
        ("damaged", palette::DAMAGED),
        ("impassable", palette::IMPASSABLE),
        ("planIntact", palette::PLAN_INTACT),
        ("backup", palette::BACKUP),
        ("zoneFill", palette::ZONE_FILL),
        ("zoneEdge", palette::ZONE_EDGE),
        ("ink", palette::INK),
        ("paper", palette::PAPER),
        ("singleFailure", palette::SINGLE_FAILURE),
        ("corridor", palette::CORRIDOR),
        ("qa", palette::QA_POINT),
    ]
    .into_iter()
    .enumerate()
    {
        if i > 0 {
            j.raw(",");
        }
        j.key(k).str(v);
    }
    j.raw("},").key("dayColours");
    let colours = p.colours();
    j.strs(colours.iter().map(String::as_str)).raw(",");
    j.key("header").strs(super::work_orders::HEADER).raw(",");
    // The last column (the caution) is the same sentence on every row: written once.
    j.key("rowCaution")
        .str(crate::cautions::WORK_ORDER)
        .raw(",");
    j.key("rows").raw("[");
    let mut first = true;
    (p.rows)(&mut |r| {
        if !first {
            j.raw(",");
        }
        first = false;
        debug_assert_eq!(r[24], crate::cautions::WORK_ORDER);
        j.strs(r[..24].iter().map(String::as_str));
    });
    j.raw("],").key("info");
    info::write_info(&mut j, p);
    j.raw(",").key("layers");
    data::write_layers(&mut j, p);
    j.raw(",").key("simplified");
    match simplified {
        Some(g) => j.num(g, 1),
        None => j.raw("null"),
    };
    j.raw("}");
    j.end()
}

/// The sentence the page shows when it draws a simplified network.
fn simplified_note(p: &Page, grid_m: f64) -> String {
    let net = p.scene.net;
    format!(
        "Simplified: this network has {} roads and {} geometry points, more than the page draws road by road ({}). Roads are drawn on a grid of about {} m (pieces shorter than a step merged); each repair, backup link and road with no way round keeps its own line. The layers hold every road.",
        net.edges.len(),
        net.geom.len(),
        data::SIMPLIFY_ABOVE,
        crate::decimal::trimmed(grid_m, 1)
    )
}
