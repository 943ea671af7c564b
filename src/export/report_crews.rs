//! The report's days, crews and corridors: an HTML fragment `report.rs` includes in one line.

use super::summary::Summary;
use super::text::html as esc;
use crate::decimal::fixed;
use std::io::{self, Write};

/// Writes the per-crew timeline (one row a day, one column a crew), the day each site joins the
/// hub, and the corridors table.
pub fn write<W: Write>(w: &mut W, s: &Summary) -> io::Result<()> {
    writeln!(w, "<h2>Days and crews</h2>")?;
    match &s.days {
        None => writeln!(
            w,
            "<p>Repairs not scheduled by day (no --crew-capacity).</p>"
        )?,
        Some(days) => {
            let crews = days
                .iter()
                .flat_map(|d| d.crews.iter().map(|c| c.crew))
                .max()
                .unwrap_or(0);
            write!(w, "<table><tr><th>Day</th>")?;
            for c in 1..=crews {
                write!(w, "<th>Crew {c}</th>")?;
            }
            writeln!(
                w,
                "<th>Sites joined to the hub</th><th>Share of sites joined</th></tr>"
            )?;
            for d in days {
                write!(w, "<tr><td>{}</td>", d.day)?;
                for c in 1..=crews {
                    let cell = d.crews.iter().find(|x| x.crew == c).map_or_else(
                        || "—".to_string(),
                        |x| {
                            let mut parts: Vec<String> = x
                                .finishes
                                .iter()
                                .map(|k| format!("finishes {}", esc(k)))
                                .collect();
                            if let Some(k) = &x.continues {
                                parts.push(format!("works on {}", esc(k)));
                            }
                            format!(
                                "{} ({} repair-metres)",
                                parts.join("; "),
                                fixed(x.repair_metres, 3)
                            )
                        },
                    );
                    write!(w, "<td>{cell}</td>")?;
                }
                writeln!(
                    w,
                    "<td>{}</td><td>{}</td></tr>",
                    esc(&d.sites_joined.join(", ")),
                    d.cumulative_share_of_sites
                        .map_or("—".to_string(), |x| format!("{} %", fixed(100.0 * x, 0)))
                )?;
            }
            writeln!(w, "</table>")?;
            let joins: Vec<(u32, &String)> = days
                .iter()
                .flat_map(|d| d.sites_joined.iter().map(move |id| (d.day, id)))
                .collect();
            if !joins.is_empty() {
                writeln!(
                    w,
                    "<h3>Day each site joins the hub</h3><table><tr><th>Site</th><th>Day</th></tr>"
                )?;
                for (day, id) in joins {
                    writeln!(w, "<tr><td>{}</td><td>{day}</td></tr>", esc(id))?;
                }
                writeln!(
                    w,
                    "</table><p>Sites not listed were joined over intact roads before any repair, \
                     or are not joined.</p>"
                )?;
            }
        }
    }
    let Some(c) = &s.corridors else {
        return Ok(());
    };
    writeln!(w, "<h2>Corridors</h2>")?;
    writeln!(
        w,
        "<p>{} corridors from the hub; longest detour ratio {}{}.</p>",
        c.sites,
        c.longest_detour_ratio
            .map_or("—".to_string(), |x| fixed(x, 2)),
        c.max_detour.map_or(String::new(), |r| format!(
            "; at most {} allowed",
            fixed(r, 2)
        ))
    )?;
    if c.flagged.is_empty() {
        return Ok(());
    }
    writeln!(
        w,
        "<table><tr><th>Site</th><th>Detour ratio</th><th>Optional repairs (work orders)</th>\
         <th>Cost (repair-metres)</th><th>Corridor with them (m)</th></tr>"
    )?;
    for f in &c.flagged {
        let (orders, cost, len) = match &f.fix {
            Some(x) => (
                esc(&x.work_orders.join(", ")),
                fixed(x.cost, 3),
                fixed(x.length_m, 0),
            ),
            None => (esc(f.note.unwrap_or("")), "—".into(), "—".into()),
        };
        writeln!(
            w,
            "<tr><td>{}</td><td>{}</td><td>{orders}</td><td>{cost}</td><td>{len}</td></tr>",
            esc(&f.site),
            fixed(f.detour_ratio, 2)
        )?;
    }
    writeln!(w, "</table>")
}
