//! The tables of work in `report.html`: the repairs in order, the backup links, the sites, the
//! damage reports, the roads with no way round and the sites no backup can protect. Roads are
//! named by their road name and work-order key, never by internal edge numbers.

use super::report::Context;
use super::text::html as esc;
use crate::decimal::fixed;
use crate::network::cost_to_repair_metres;
use std::io::{self, Write};

/// The most rows a repairs table shows; the rest are in work-orders.csv.
pub const MAX_ROWS: usize = 2000;

/// Road name and work-order key of an edge, as table cells.
fn road_cells(c: &Context, e: u32) -> String {
    let meta = &c.net.features[c.net.edges[e as usize].feature as usize];
    format!(
        "<td><code>{}</code></td><td>{}</td>",
        esc(&c.keys.key(c.net, e)),
        esc(c.net.text(meta.label).unwrap_or("(no name)"))
    )
}

/// Length, cost and structure cells of an edge.
fn figure_cells(c: &Context, e: u32) -> String {
    let edge = &c.net.edges[e as usize];
    let meta = &c.net.features[edge.feature as usize];
    format!(
        "<td class=\"n\">{}</td><td class=\"n\">{}</td><td>{}</td>",
        fixed(edge.length_m, 1),
        fixed(cost_to_repair_metres(edge.cost), 1),
        c.net
            .text(meta.structure)
            .map_or(String::new(), |s| format!("{} — inspect", esc(s)))
    )
}

/// A site's name and id, for a table cell.
pub fn site_text(c: &Context, i: usize) -> String {
    match c.sites.get(i) {
        Some(r) => match &r.name {
            Some(n) => format!("{} ({})", esc(n), esc(&r.id)),
            None => esc(&r.id),
        },
        None => c.site_ids.get(i).map_or(String::new(), |s| esc(s)),
    }
}

/// A site's name and id by its id.
fn site_by_id(c: &Context, id: &str) -> String {
    match c.sites.iter().position(|r| r.id == id) {
        Some(i) => site_text(c, i),
        None => esc(id),
    }
}

/// The repairs in order.
pub fn write_repairs<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    writeln!(w, "<h2 id=\"repairs\">Repairs in order</h2>")?;
    if c.steps.is_empty() {
        return writeln!(
            w,
            "<p>The plan needs no repair: intact roads already join what it joins.</p>"
        );
    }
    if !c.scheduled {
        writeln!(
            w,
            "<p>The repairs are not scheduled by day (no --crew-capacity): the order is the order of work.</p>"
        )?;
    }
    writeln!(
        w,
        "<table><thead><tr><th>Order</th><th>Work order</th><th>Road</th><th>Length (m)</th><th>Cost (repair-metres)</th><th>Structure</th><th>Days (crew)</th><th>Sites joined to the hub by it</th></tr></thead><tbody>"
    )?;
    for s in c.steps.iter().take(MAX_ROWS) {
        // Days and crew: "3" or "3–4" (a repair longer than the day's capacity), then the crew.
        let day = match (c.scheduled, s.first_day, s.last_day, s.crew) {
            (true, Some(a), Some(b), crew) => {
                let days = if a == b {
                    a.to_string()
                } else {
                    format!("{a}–{b}")
                };
                match crew {
                    Some(k) => format!("{days} (crew {k})"),
                    None => days,
                }
            }
            _ => "—".into(),
        };
        let sites: Vec<String> = s.completes.iter().map(|&i| site_text(c, i)).collect();
        writeln!(
            w,
            "<tr><td class=\"n\">{}</td>{}{}<td>{day}</td><td>{}</td></tr>",
            s.order,
            road_cells(c, s.edge),
            figure_cells(c, s.edge),
            sites.join(", ")
        )?;
    }
    writeln!(w, "</tbody></table>")?;
    if c.steps.len() > MAX_ROWS {
        writeln!(
            w,
            "<p>The first {MAX_ROWS} of {} repairs; work-orders.csv lists them all.</p>",
            c.steps.len()
        )?;
    }
    if let Some(b) = c.backup.filter(|b| !b.rows.is_empty()) {
        writeln!(
            w,
            "<h3>Backup links (after the plan's repairs)</h3><table><thead><tr><th>Order</th><th>Work order</th><th>Road</th><th>Length (m)</th><th>Cost (repair-metres)</th><th>Structure</th><th>Link</th><th>Protects</th></tr></thead><tbody>"
        )?;
        for r in b.rows.iter().take(MAX_ROWS) {
            let prot: Vec<String> = r.protects.iter().map(|id| site_by_id(c, id)).collect();
            writeln!(
                w,
                "<tr><td class=\"n\">{}</td>{}{}<td class=\"n\">{}</td><td>{}</td></tr>",
                r.order,
                road_cells(c, r.edge),
                figure_cells(c, r.edge),
                r.link,
                prot.join(", ")
            )?;
        }
        writeln!(w, "</tbody></table>")?;
    }
    Ok(())
}

/// Every site: name and id, whether it is joined to the hub, by which repair, and why not.
pub fn write_sites<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    if c.sites.is_empty() {
        return Ok(());
    }
    let mut joined_by = vec![None; c.sites.len()];
    for s in c.steps {
        for &i in &s.completes {
            if let Some(j) = joined_by.get_mut(i) {
                *j = Some((s.order, s.last_day.unwrap_or(1)));
            }
        }
    }
    writeln!(
        w,
        "<h2 id=\"sites\">Sites</h2><table><thead><tr><th>Site</th><th>Status</th><th>Joined by</th><th>Why not joined</th></tr></thead><tbody>"
    )?;
    for (i, r) in c.sites.iter().enumerate() {
        let by = match (r.hub, joined_by[i]) {
            (true, _) => "the hub".to_string(),
            (_, Some((o, d))) if c.scheduled => format!("repair {o} (day {d})"),
            (_, Some((o, _))) => format!("repair {o}"),
            (_, None) if r.status == crate::job::status::JOINED => "intact roads".into(),
            _ => String::new(),
        };
        writeln!(
            w,
            "<tr><td>{}</td><td>{}</td><td>{by}</td><td>{}</td></tr>",
            site_text(c, i),
            esc(crate::job::status::status_label(r.status)),
            esc(r.reason.as_deref().unwrap_or(""))
        )?;
    }
    writeln!(w, "</tbody></table>")
}

/// The damage reports: each one matched to a road (which road, how far, what damage), and each one
/// that found no road near enough, with its distance.
pub fn write_damage_reports<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    let Some(f) = &c.summary.damage_reports else {
        return Ok(());
    };
    writeln!(
        w,
        "<h2 id=\"damage-reports\">Damage reports</h2><p>{} field reports read; {} matched a road and set its damage; {} found no road near enough and changed nothing.</p>",
        f.read,
        f.applied,
        f.unmatched.len()
    )?;
    if !f.matched.is_empty() {
        writeln!(
            w,
            "<h3>Matched to a road</h3><table id=\"reports-matched\"><thead><tr><th>Report (position in its file, from 0)</th><th>Road</th><th>Distance to it (m)</th><th>Damage reported</th></tr></thead><tbody>"
        )?;
        for (i, feature, d, damage) in f.matched.iter().take(MAX_ROWS) {
            let meta = &c.net.features[*feature as usize];
            let road = match (c.net.text(meta.label), &meta.source_id) {
                (Some(l), _) => esc(l),
                (None, Some(id)) => esc(&id.to_string()),
                (None, None) => format!("road #{}", meta.source_index),
            };
            writeln!(
                w,
                "<tr><td class=\"n\">{i}</td><td>{road}</td><td class=\"n\">{}</td><td>{}</td></tr>",
                fixed(*d, 1),
                damage
                    .factor()
                    .map_or("closed".to_string(), |x| fixed(x, 2))
            )?;
        }
        writeln!(w, "</tbody></table>")?;
        if f.matched.len() > MAX_ROWS {
            writeln!(
                w,
                "<p>The first {MAX_ROWS} of {} are listed.</p>",
                f.matched.len()
            )?;
        }
    }
    if !f.unmatched.is_empty() {
        writeln!(
            w,
            "<h3>No road near enough</h3><table id=\"reports-unmatched\"><thead><tr><th>Report (position in its file, from 0)</th><th>Nearest road (m)</th></tr></thead><tbody>"
        )?;
        for (i, d) in &f.unmatched {
            writeln!(
                w,
                "<tr><td class=\"n\">{i}</td><td class=\"n\">{}</td></tr>",
                d.map_or("no usable road".to_string(), |d| fixed(d, 1))
            )?;
        }
        writeln!(w, "</tbody></table>")?;
    }
    Ok(())
}

/// The roads with no way round whose loss cuts sites off, and the sites no backup can protect.
pub fn write_failures<W: Write>(w: &mut W, c: &Context) -> io::Result<()> {
    if let Some(f) = c.single_failures.filter(|f| !f.cutting.is_empty()) {
        writeln!(
            w,
            "<h3>Roads with no way round that cut sites off</h3><table><thead><tr><th>Work order</th><th>Road</th><th>Length (m)</th><th>Sites cut off if it fails</th></tr></thead><tbody>"
        )?;
        for (e, sites) in f.cutting.iter().take(MAX_ROWS) {
            let names: Vec<String> = sites.iter().map(|id| site_by_id(c, id)).collect();
            writeln!(
                w,
                "<tr>{}<td class=\"n\">{}</td><td>{}</td></tr>",
                road_cells(c, *e),
                fixed(c.net.edges[*e as usize].length_m, 1),
                names.join(", ")
            )?;
        }
        writeln!(w, "</tbody></table>")?;
    }
    if let Some(b) = c
        .backup
        .filter(|b| !b.figures.sites_without_possible_backup.is_empty())
    {
        writeln!(
            w,
            "<h3>Sites no backup can protect</h3><p>Each has a single road in: no repair gives it a way round.</p><table><thead><tr><th>Site</th><th>Roads with no way round (work order, road)</th></tr></thead><tbody>"
        )?;
        for sf in &b.figures.sites_without_possible_backup {
            let roads: Vec<String> = sf
                .failures
                .iter()
                .map(|&e| {
                    let meta = &c.net.features[c.net.edges[e as usize].feature as usize];
                    format!(
                        "{} {}",
                        esc(&c.keys.key(c.net, e)),
                        esc(c.net.text(meta.label).unwrap_or("(no name)"))
                    )
                })
                .collect();
            writeln!(
                w,
                "<tr><td>{}</td><td>{}</td></tr>",
                site_by_id(c, &sf.site),
                roads.join("; ")
            )?;
        }
        writeln!(w, "</tbody></table>")?;
    }
    Ok(())
}
