//! `report.html`: one self-contained page (no scripts, no network, prints on A4 and Letter; its one
//! link is to `map.html` beside it) for
//! coordinators without GIS software: the cautions, the map, the figures, the repairs in order
//! with their work orders, the sites, the budget, the damage reports, the single failures, the
//! geometry checks, the inputs, the settings and a glossary of the terms it uses.

use super::backup::BackupLayer;
use super::single_failures::SingleFailureLayer;
use super::sites::SiteRow;
use super::summary::Summary;
use super::work_order_id::WorkOrderIds;
use crate::network::Network;
use crate::solve::order::Step;
use std::io::{self, Write};

use super::text::html as esc;
use crate::decimal::fixed;
/// Standard base64 (RFC 4648 §4) of `data`.
fn base64(data: &[u8]) -> String {
    const T: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(data.len().div_ceil(3) * 4);
    for c in data.chunks(3) {
        let n = (c[0] as u32) << 16
            | (*c.get(1).unwrap_or(&0) as u32) << 8
            | *c.get(2).unwrap_or(&0) as u32;
        out.push(T[(n >> 18) as usize & 63] as char);
        out.push(T[(n >> 12) as usize & 63] as char);
        out.push(if c.len() > 1 {
            T[(n >> 6) as usize & 63] as char
        } else {
            '='
        });
        out.push(if c.len() > 2 {
            T[n as usize & 63] as char
        } else {
            '='
        });
    }
    out
}

/// What the report is written from.
pub struct Context<'a> {
    /// The district's name.
    pub title: &'a str,
    /// The drawn picture, PNG.
    pub png: &'a [u8],
    /// The summary.
    pub summary: &'a Summary,
    /// The network.
    pub net: &'a Network,
    /// The repairs in order.
    pub steps: &'a [Step],
    /// Work-order keys.
    pub keys: &'a WorkOrderIds,
    /// The sites' rows (empty without sites).
    pub sites: &'a [SiteRow],
    /// Site ids by index.
    pub site_ids: &'a [String],
    /// The single failures, with sites.
    pub single_failures: Option<&'a SingleFailureLayer>,
    /// The backup links, with `--redundancy`.
    pub backup: Option<&'a BackupLayer>,
    /// The budget given (`--budget`), repair-metres.
    pub budget: Option<f64>,
    /// True when `--crew-capacity` grouped the repairs into days.
    pub scheduled: bool,
}

/// Writes the report (the picture embedded as a data URI so the page needs nothing else).
pub fn write_report<W: Write>(mut w: W, c: &Context) -> io::Result<()> {
    let (s, title) = (c.summary, c.title);
    writeln!(
        w,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
    )?;
    writeln!(
        w,
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
    )?;
    writeln!(w, "<title>{} — repair plan</title>", esc(title))?;
    writeln!(
        w,
        "<style>{}</style></head><body>",
        super::report_parts::STYLE
    )?;
    writeln!(w, "<h1>{} — repair plan</h1>", esc(title))?;
    writeln!(w, "<div class=\"caution\"><strong>Cautions</strong><ul>")?;
    for caution in &s.cautions {
        writeln!(w, "<li>{}</li>", esc(caution))?;
    }
    writeln!(w, "</ul></div>")?;
    if let Some(a) = &s.attribution {
        writeln!(w, "<p class=\"attribution\">Data: {}</p>", esc(a))?;
    }
    if !s.notes.is_empty() {
        writeln!(
            w,
            "<h2>Notes</h2><p>Defaults and choices of this run that change the answer:</p><ul>"
        )?;
        for n in &s.notes {
            writeln!(
                w,
                "<li>{} <small>({})</small></li>",
                esc(&n.message),
                esc(n.code)
            )?;
        }
        writeln!(w, "</ul>")?;
    }
    writeln!(
        w,
        "<h2>Map</h2><p class=\"map-link\"><a href=\"map.html\">Open the interactive map (map.html)</a>: pan, zoom, switch layers, click a repair for its work order; it works offline from this folder.</p><img alt=\"map of the plan\" src=\"data:image/png;base64,{}\">",
        base64(c.png)
    )?;
    write_figures(&mut w, c)?;
    super::report_tables::write_repairs(&mut w, c)?;
    if let Some(st) = &s.structures {
        super::structures::write_html(&mut w, st)?;
    }
    write_days(&mut w, c)?;
    super::report_tables::write_sites(&mut w, c)?;
    write_budget(&mut w, c)?;
    super::report_tables::write_damage_reports(&mut w, c)?;
    write_single_failures(&mut w, c)?;
    writeln!(w, "<h2>Geometry checks (qa.geojson)</h2><table>")?;
    for (k, v) in &s.counts.qa {
        writeln!(w, "<tr><th>{}</th><td class=\"n\">{v}</td></tr>", esc(k))?;
    }
    writeln!(w, "</table>")?;
    writeln!(
        w,
        "<h2>Inputs</h2><table><thead><tr><th>Role</th><th>Path</th><th>SHA-256</th></tr></thead><tbody>"
    )?;
    for i in &s.inputs {
        writeln!(
            w,
            "<tr><td>{}</td><td>{}</td><td><code>{}</code></td></tr>",
            esc(&i.role),
            esc(&i.path),
            esc(&i.sha256)
        )?;
    }
    writeln!(w, "</tbody></table>")?;
    super::report_parts::write_settings(&mut w, &s.settings)?;
    super::report_parts::write_glossary(&mut w)?;
    writeln!(
        w,
        "<p>{} {}</p></body></html>",
        esc(s.tool.name),
        esc(s.tool.version)
    )?;
    Ok(())
}

/// The plan's figures in plain words.
fn write_figures<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    let s = c.summary;
    writeln!(w, "<h2>Figures</h2><table>")?;
    let gap = match s.gap {
        Some(g) => format!(
            "{} %{}",
            fixed(100.0 * g, 2),
            if s.optimal { " (proven optimal)" } else { "" }
        ),
        None if s.within_budget() => "not available (a plan within a budget has no bound)".into(),
        None => "not available (the bound is 0)".into(),
    };
    let intact = s.plan_edges.saturating_sub(s.plan.repair_edges);
    let rows = [
        ("Plan", s.plan.kind.to_string()),
        (
            "Total repair cost",
            format!("{} repair-metres", fixed(s.total_cost, 1)),
        ),
        (
            "Lower bound on any plan",
            format!("{} repair-metres", fixed(s.lower_bound, 1)),
        ),
        ("At most above the best plan", gap),
        (
            "Road to repair",
            format!(
                "{} m in {} repairs",
                fixed(s.repair_length_m, 1),
                s.plan.repair_edges
            ),
        ),
        ("Intact road pieces the plan uses", intact.to_string()),
        (
            "Road network",
            format!(
                "{} junctions, {} road pieces ({} damaged, {} impassable), {} separate parts",
                s.counts.junctions,
                s.counts.edges,
                s.counts.edges_damaged,
                s.counts.edges_closed,
                s.counts.components
            ),
        ),
        (
            "Coordinates",
            format!(
                "{}; lengths {}",
                s.geodesy.input_crs, s.geodesy.length_method
            ),
        ),
    ];
    for (k, v) in rows {
        writeln!(w, "<tr><th>{}</th><td>{}</td></tr>", esc(k), esc(&v))?;
    }
    if let Some(st) = &s.sites {
        writeln!(
            w,
            "<tr><th>Sites</th><td>{} of {} joined to the hub {} (the hub included)</td></tr>",
            st.joined_to_hub,
            st.total,
            st.hub.as_deref().map_or("none".to_string(), |h| {
                match c.sites.iter().position(|r| r.id == h) {
                    Some(i) => super::report_tables::site_text(c, i),
                    None => esc(h),
                }
            })
        )?;
    }
    writeln!(w, "</table>")
}

/// The days by crew, the day each site joins and the corridors (`report_crews`).
fn write_days<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    super::report_crews::write(w, c.summary)
}

/// The budget when one was given: what the plan spends and which sites it left out.
fn write_budget<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    let Some(b) = c.budget else { return Ok(()) };
    writeln!(
        w,
        "<h2 id=\"budget\">Budget</h2><p>Budget given: {} repair-metres; the plan spends {}.</p>",
        fixed(b, 1),
        fixed(c.summary.total_cost, 1)
    )?;
    let left: Vec<usize> = (0..c.sites.len())
        .filter(|&i| c.sites[i].status == crate::job::status::LEFT_OUT)
        .collect();
    if left.is_empty() {
        return writeln!(w, "<p>The budget left no site out.</p>");
    }
    writeln!(
        w,
        "<p>Sites the budget left out (they need more repairs than it allows):</p><ul>"
    )?;
    for i in left {
        writeln!(w, "<li>{}</li>", super::report_tables::site_text(c, i))?;
    }
    writeln!(w, "</ul>")
}

/// How the joined sites stand if one road fails, before and after any backup links.
fn write_single_failures<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    let s = c.summary;
    let Some(f) = &s.single_failures else {
        return Ok(());
    };
    writeln!(w, "<h2 id=\"single-failures\">Single road failures</h2>")?;
    if f.sites_checked == 0 {
        writeln!(
            w,
            "<p><strong>No site other than the hub is joined to it, so these figures say nothing about how safe any site is.</strong></p>"
        )?;
    }
    writeln!(w, "<table>")?;
    let after = s
        .backup
        .as_ref()
        .and_then(|b| b.single_failures_after.as_ref());
    if after.is_some() {
        writeln!(
            w,
            "<tr><th></th><th>After the plan</th><th>With backup links</th></tr>"
        )?;
    }
    for (label, b, a) in [
        (
            "Sites checked (joined to the hub, the hub excepted)",
            f.sites_checked,
            after.map(|a| a.sites_checked),
        ),
        (
            "Roads whose loss cuts a site off",
            f.roads_cutting_off_sites,
            after.map(|a| a.roads_cutting_off_sites),
        ),
        (
            "Sites a single road failure cuts off",
            f.sites_with_a_single_failure,
            after.map(|a| a.sites_with_a_single_failure),
        ),
        (
            "Roads with no way round (anywhere)",
            f.roads_with_no_way_round,
            after.map(|a| a.roads_with_no_way_round),
        ),
        (
            "Junctions with no way round",
            f.junctions_with_no_way_round,
            after.map(|a| a.junctions_with_no_way_round),
        ),
    ] {
        writeln!(
            w,
            "<tr><th>{}</th><td class=\"n\">{b}</td>{}</tr>",
            esc(label),
            a.map_or(String::new(), |a| format!("<td class=\"n\">{a}</td>"))
        )?;
    }
    writeln!(w, "</table>")?;
    if let Some(b) = &s.backup {
        writeln!(
            w,
            "<p>Backup links (backup.geojson; work orders after the plan's): {} repairs in {} ways round, {} repair-metres.</p>",
            b.repairs,
            b.links,
            fixed(b.cost, 1)
        )?;
    }
    super::report_tables::write_failures(w, c)
}

#[cfg(test)]
mod tests {
    #[test]
    fn base64_matches_rfc_4648_test_vectors() {
        // RFC 4648 §10 test vectors.
        for (i, o) in [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ] {
            assert_eq!(super::base64(i.as_bytes()), o);
        }
    }
}
