//! The map page's side panel: what a click shows for each layer (sites with their status and
//! reason, geometry checks, roads with no way round, corridors; repairs show their work-order
//! row), the page's skeleton, and the legend: the picture's own, then the rows for the layers only
//! the page draws.

use super::Page;
use super::data::STATUSES;
use super::encode::Json;
use crate::decimal::fixed;
use crate::export::palette::{CORRIDOR, INK, PAPER, QA_POINT, SINGLE_FAILURE};
use crate::export::text::html;
use std::io::{self, Write};

/// Writes one info table: `{"fields":[…],"rows":[[…],…]}`.
fn table<'r>(j: &mut Json, fields: &[&str], rows: impl Iterator<Item = Vec<String>> + 'r) {
    j.raw("{")
        .key("fields")
        .strs(fields.iter().copied())
        .raw(",");
    j.key("rows").raw("[");
    for (i, r) in rows.enumerate() {
        if i > 0 {
            j.raw(",");
        }
        j.strs(r.iter().map(String::as_str));
    }
    j.raw("]}");
}

/// Writes the `"info"` object: per layer, the fields a click shows, one row per feature in the
/// layer's order.
pub fn write_info(j: &mut Json, p: &Page) {
    let net = p.scene.net;
    j.raw("{").key("sites");
    let sites = p.sites.iter().map(|s| {
        vec![
            s.id.clone(),
            s.name.clone().unwrap_or_default(),
            s.status.to_string(),
            s.status_label.to_string(),
            s.reason.clone().unwrap_or_default(),
            if s.hub { "yes" } else { "no" }.to_string(),
        ]
    });
    let fields = ["site_id", "name", "status", "status_label", "reason", "hub"];
    table(j, &fields, sites);
    j.raw(",").key("qa");
    let qa = p.qa.iter().map(|q| {
        vec![
            q.kind.code().to_string(),
            q.kind.label().to_string(),
            fixed(q.distance_m, 3),
            q.feature.map_or_else(String::new, |f| f.to_string()),
        ]
    });
    table(j, &["kind", "kind_label", "distance_m", "source_index"], qa);
    j.raw(",").key("single_failures");
    let cutting = p.single_failures.map_or(&[][..], |f| &f.cutting[..]);
    let sf = cutting.iter().map(|(e, sites)| {
        let edge = &net.edges[*e as usize];
        let meta = &net.features[edge.feature as usize];
        vec![
            net.text(meta.label).unwrap_or_default().to_string(),
            p.keys.key(net, *e),
            fixed(edge.length_m, 3),
            sites.join(";"),
        ]
    });
    let fields = ["road", "work_order", "length_m", "sites_cut_off"];
    table(j, &fields, sf);
    j.raw(",").key("corridors");
    let rows = p.corridors.map_or(&[][..], |c| &c.rows[..]);
    let cor = rows.iter().filter(|r| !r.edges.is_empty()).map(|r| {
        vec![
            r.site.clone(),
            fixed(r.length_m, 3),
            fixed(r.undamaged_m, 3),
            r.ratio.map_or_else(String::new, |x| fixed(x, 3)),
        ]
    });
    let fields = ["site", "length_m", "undamaged_length_m", "detour_ratio"];
    table(j, &fields, cor);
    j.raw("}");
}

/// The page between the header and the legend: the map with its zoom buttons, and the side
/// panel's layer switches and selection box.
pub const BODY: &str = r#"<main><div id="map-wrap"><canvas id="map" tabindex="0" aria-label="Map of the plan. Arrow keys pan; + and - zoom; 0 shows the whole district; N and P select the next and the previous repair; Enter selects what is under the centre."></canvas>
<div id="zoom"><button type="button" id="zoom-in" aria-label="Zoom in">+</button><button type="button" id="zoom-out" aria-label="Zoom out">&#8722;</button><button type="button" id="zoom-fit" aria-label="Show the whole district">&#8689;</button></div></div>
<aside><section><h2>Layers</h2><div id="toggles"></div></section>
<section aria-live="polite"><h2>Selected</h2><div id="info"><p>Click a repair to read its work order, or a site to read its status.</p></div></section>
<section><h2>Legend</h2>"#;

/// Writes the legend: the picture's, then the page's own rows.
pub fn write_legend<W: Write>(w: &mut W, p: &Page) -> io::Result<()> {
    let lg = &p.drawing.legend;
    writeln!(
        w,
        r#"<svg id="legend" width="{0}" height="{1}" viewBox="0 0 {0} {1}" font-family="DejaVu Sans, Arial, sans-serif">"#,
        lg.width + 1.0,
        lg.height + 1.0
    )?;
    crate::export::legend::write(w, lg, (0.5, 0.5))?;
    writeln!(w, "</svg><table id=\"legend-page\">")?;
    let row = |w: &mut W, symbol: &str, label: &str| {
        writeln!(
            w,
            r#"<tr><td><svg width="34" height="16">{symbol}</svg></td><td>{}</td></tr>"#,
            html(label)
        )
    };
    if p.single_failures.is_some_and(|f| !f.cutting.is_empty()) {
        let s = format!(
            r#"<line x1="2" y1="8" x2="32" y2="8" stroke="{SINGLE_FAILURE}" stroke-width="9"/>"#
        );
        row(w, &s, "road with no way round (its loss cuts sites off)")?;
    }
    if p.corridors
        .is_some_and(|c| c.rows.iter().any(|r| !r.edges.is_empty()))
    {
        let s = format!(
            r#"<line x1="2" y1="8" x2="32" y2="8" stroke="{CORRIDOR}" stroke-width="2.5" stroke-dasharray="2 3"/>"#
        );
        row(w, &s, "corridor from the hub")?;
    }
    if !p.qa.is_empty() {
        let s = format!(r#"<path d="M17 3 L22 8 L17 13 L12 8 Z" fill="{QA_POINT}"/>"#);
        row(w, &s, "geometry check (qa.geojson)")?;
    }
    for (k, code) in STATUSES.iter().enumerate().skip(1) {
        if let Some(s) = p.sites.iter().find(|s| !s.hub && s.status == *code) {
            row(w, &site_symbol(k), &format!("site {}", s.status_label))?;
        }
    }
    writeln!(w, "</table></section>")
}

/// The page's symbol of a site not joined, by status index (see `map.js`, which draws the same).
fn site_symbol(k: usize) -> String {
    let circle = |dash: &str| {
        format!(
            r#"<circle cx="17" cy="8" r="5" fill="{PAPER}" stroke="{INK}" stroke-width="1.5"{dash}/>"#
        )
    };
    match k {
        1 => circle(r#" stroke-dasharray="2 2""#),
        2 => circle("") + &format!(r#"<line x1="14" y1="8" x2="20" y2="8" stroke="{INK}"/>"#),
        _ => {
            circle("")
                + &format!(
                    r#"<path d="M14.5 5.5 L19.5 10.5 M19.5 5.5 L14.5 10.5" stroke="{INK}"/>"#
                )
        }
    }
}
