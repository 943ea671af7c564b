//! `report.html`: one self-contained page (no scripts, no network) with the picture, the figures,
//! the phases, the unconnected sites and why, the QA counts, the inputs and settings, and the
//! cautions, for coordinators without GIS software.

use super::summary::Summary;
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

/// Writes the report around the drawn picture (PNG, embedded as a data URI so the page needs
/// nothing else).
pub fn write_report<W: Write>(mut w: W, title: &str, png: &[u8], s: &Summary) -> io::Result<()> {
    let svg = format!(
        r#"<img alt="map of the plan" style="max-width:100%;border:1px solid #ddd" src="data:image/png;base64,{}">"#,
        base64(png)
    );
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
        "<style>body{{font-family:'DejaVu Sans',Arial,sans-serif;margin:24px;color:#111}}\
         table{{border-collapse:collapse;margin:8px 0 20px}}td,th{{border:1px solid #bbb;padding:4px 8px;text-align:left}}\
         .caution{{border:2px solid #8c2d04;background:#fff4ec;padding:8px 12px}}svg{{max-width:100%;height:auto;border:1px solid #ddd}}\
         pre{{background:#f6f6f6;padding:8px;overflow:auto}}</style></head><body>"
    )?;
    writeln!(w, "<h1>{} — repair plan</h1>", esc(title))?;
    writeln!(w, "<div class=\"caution\"><strong>Cautions</strong><ul>")?;
    for c in &s.cautions {
        writeln!(w, "<li>{}</li>", esc(c))?;
    }
    writeln!(w, "</ul></div>")?;
    if let Some(a) = &s.attribution {
        writeln!(w, "<p class=\"attribution\">Data: {}</p>", esc(a))?;
    }
    if let Some(st) = &s.structures {
        super::structures::write_html(&mut w, st)?;
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
    writeln!(w, "<h2>Map</h2>{svg}")?;
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
    let rows = [
        ("Plan", s.plan.kind.to_string()),
        (
            "Total repair cost",
            format!("{} repair-metres", fixed(s.total_cost, 3)),
        ),
        (
            "Lower bound on any plan",
            format!("{} repair-metres", fixed(s.lower_bound, 3)),
        ),
        ("At most above optimal", gap),
        (
            "Road to repair",
            format!(
                "{} m in {} repairs",
                fixed(s.repair_length_m, 3),
                s.plan.repair_edges
            ),
        ),
        ("Plan edges", s.plan_edges.to_string()),
        (
            "Network",
            format!(
                "{} junctions, {} edges, {} components",
                s.counts.junctions, s.counts.edges, s.counts.components
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
            esc(st.hub.as_deref().unwrap_or("none"))
        )?;
    }
    writeln!(w, "</table>")?;
    rounds(&mut w, s)?;
    writeln!(
        w,
        "<h2>Phases</h2><table><tr><th>Day</th><th>Repairs</th><th>Cost (repair-metres)</th><th>Sites joined to the hub</th><th>Share of sites joined</th></tr>"
    )?;
    for p in s.days.iter().flatten() {
        writeln!(
            w,
            "<tr><td>{}{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            p.day,
            if p.over_capacity {
                " (over capacity)"
            } else {
                ""
            },
            p.repairs,
            fixed(p.cost, 3),
            esc(&p.sites_joined.join(", ")),
            p.cumulative_share_of_sites
                .map_or("—".to_string(), |x| format!("{} %", fixed(100.0 * x, 0)))
        )?;
    }
    writeln!(w, "</table>")?;
    if let Some(st) = &s.sites {
        writeln!(w, "<h2>Sites not joined to the hub</h2>")?;
        if st.not_joined.is_empty() {
            writeln!(w, "<p>Every site is joined to the hub.</p>")?;
        } else {
            writeln!(
                w,
                "<table><tr><th>Site</th><th>Name</th><th>Status</th><th>Why</th></tr>"
            )?;
            for u in &st.not_joined {
                writeln!(
                    w,
                    "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                    esc(&u.id),
                    esc(u.name.as_deref().unwrap_or("")),
                    esc(u.status_label),
                    esc(&u.reason)
                )?;
            }
            writeln!(w, "</table>")?;
        }
    }
    if let Some(f) = &s.single_failures {
        writeln!(w, "<h2>Single road failures</h2>")?;
        if f.sites_checked == 0 {
            writeln!(
                w,
                "<p><strong>No site other than the hub is joined to it, so these figures say \
                 nothing about how safe any site is.</strong></p>"
            )?;
        }
        writeln!(w, "<table>")?;
        let after = s
            .backup
            .as_ref()
            .and_then(|b| b.single_failures_after.as_ref());
        let row = |label: &str, before: usize, after: Option<usize>| {
            format!(
                "<tr><th>{}</th><td>{before}</td>{}</tr>",
                esc(label),
                after.map_or(String::new(), |a| format!("<td>{a}</td>"))
            )
        };
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
                "Bridges (any)",
                f.roads_with_no_way_round,
                after.map(|a| a.roads_with_no_way_round),
            ),
            (
                "Cut junctions",
                f.junctions_with_no_way_round,
                after.map(|a| a.junctions_with_no_way_round),
            ),
        ] {
            writeln!(w, "{}", row(label, b, a))?;
        }
        writeln!(w, "</table>")?;
        if let Some(b) = &s.backup {
            writeln!(
                w,
                "<p>Backup links (backup.geojson, work orders after the plan's): {} repairs in {} \
                 ways round, {} repair-metres.</p>",
                b.repairs,
                b.links,
                fixed(b.cost, 3)
            )?;
            if !b.sites_without_possible_backup.is_empty() {
                writeln!(
                    w,
                    "<table><tr><th>Site with no possible backup</th><th>Roads (edges) with no way round</th></tr>"
                )?;
                for sf in &b.sites_without_possible_backup {
                    let list: Vec<String> = sf.failures.iter().map(|e| e.to_string()).collect();
                    writeln!(
                        w,
                        "<tr><td>{}</td><td>{}</td></tr>",
                        esc(&sf.site),
                        list.join(", ")
                    )?;
                }
                writeln!(w, "</table>")?;
            }
        }
    }
    writeln!(w, "<h2>Geometry checks (qa.geojson)</h2><table>")?;
    for (k, v) in &s.counts.qa {
        let label = crate::ingest::qa::QaKind::label_of(k);
        writeln!(w, "<tr><th>{}</th><td>{v}</td></tr>", esc(label))?;
    }
    writeln!(w, "</table>")?;
    writeln!(
        w,
        "<h2>Inputs</h2><table><tr><th>Role</th><th>Path</th><th>SHA-256</th></tr>"
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
    writeln!(
        w,
        "</table><h2>Settings</h2><pre>{}</pre>",
        esc(&serde_json::to_string_pretty(&s.settings).unwrap_or_default())
    )?;
    writeln!(
        w,
        "<p>{} {}</p></body></html>",
        esc(s.tool.name),
        esc(s.tool.version)
    )?;
    Ok(())
}

/// The rounds of a re-plan (a first plan has one round: nothing to show) and what changed.
fn rounds<W: Write>(w: &mut W, s: &Summary) -> io::Result<()> {
    let Some(r) = &s.replan else { return Ok(()) };
    writeln!(
        w,
        "<h2>Rounds</h2><table><tr><th>Round</th><th>Label</th><th>Finished (repair-metres)</th>\
         <th>Finished to date</th><th>Remaining</th></tr>"
    )?;
    for h in &s.history {
        writeln!(
            w,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            h.round,
            esc(h.label.as_deref().unwrap_or("")),
            fixed(h.finished_repair_m, 3),
            fixed(h.finished_to_date_m, 3),
            fixed(h.remaining_repair_m, 3)
        )?;
    }
    writeln!(
        w,
        "</table><p>Changes against the previous plan (changes.geojson):</p><ul>"
    )?;
    for (code, n) in &r.changes {
        writeln!(w, "<li>{}: {n}</li>", esc(&code.replace('_', " ")))?;
    }
    writeln!(
        w,
        "</ul><p>Started repairs stay in the plan at their full cost ({}).</p>",
        r.started_repairs.len()
    )?;
    if !r.rows_matching_nothing.is_empty() || !r.keys_matching_nothing.is_empty() {
        writeln!(
            w,
            "<p>Work orders that match nothing (listed in summary.json, never guessed): {} \
             sheet line(s), {} key(s).</p>",
            r.rows_matching_nothing.len(),
            r.keys_matching_nothing.len()
        )?;
    }
    Ok(())
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
