//! Pieces of `report.html` that are not tables of work: the print-ready style sheet, the settings
//! as a readable table (with the raw JSON folded away), and the glossary of the terms the report
//! uses.

use super::text::html as esc;
use std::io::{self, Write};

/// The page's style: screen and print. Printed, the text column is at most 180 mm wide, which fits
/// both A4 (210 mm) and US Letter (216 mm) within 14 mm margins; tables repeat their header rows
/// on each page and rows are not split.
pub const STYLE: &str = "body{font-family:'DejaVu Sans',Arial,sans-serif;margin:24px auto;max-width:1100px;color:#111;line-height:1.35}\
table{border-collapse:collapse;margin:8px 0 20px}td,th{border:1px solid #bbb;padding:3px 7px;text-align:left;vertical-align:top}\
thead th{background:#f0f0f0}td.n{text-align:right;font-variant-numeric:tabular-nums}td code{white-space:nowrap}\
.caution{border:2px solid #8c2d04;background:#fff4ec;padding:8px 12px}img{max-width:100%;border:1px solid #ddd}\
pre{background:#f6f6f6;padding:8px;overflow:auto;white-space:pre-wrap}dt{font-weight:bold}dd{margin:0 0 6px 18px}\
@page{margin:14mm}\
@media print{body{margin:0;max-width:180mm;font-size:9.5pt}h1{font-size:16pt}h2{font-size:12.5pt;break-after:avoid}\
thead{display:table-header-group}tr,img,.caution{break-inside:avoid}details{display:block}a{color:inherit}}";

/// Writes the settings as a table (nested members as dotted names; lists joined by commas), then
/// the raw JSON in a folded `<details>`.
pub fn write_settings<W: Write>(w: &mut W, settings: &serde_json::Value) -> io::Result<()> {
    let mut rows: Vec<(String, String)> = Vec::new();
    flatten("", settings, &mut rows);
    writeln!(
        w,
        "<h2>Settings</h2><table><thead><tr><th>Setting</th><th>Value</th></tr></thead><tbody>"
    )?;
    for (k, v) in &rows {
        writeln!(
            w,
            "<tr><th>{}</th><td>{}</td></tr>",
            esc(&k.replace('_', " ")),
            esc(v)
        )?;
    }
    writeln!(w, "</tbody></table>")?;
    writeln!(
        w,
        "<details><summary>Settings as recorded in summary.json</summary><pre>{}</pre></details>",
        esc(&serde_json::to_string_pretty(settings).unwrap_or_default())
    )
}

fn flatten(prefix: &str, v: &serde_json::Value, rows: &mut Vec<(String, String)>) {
    use serde_json::Value;
    match v {
        Value::Object(m) if !m.is_empty() => {
            for (k, x) in m {
                let name = if prefix.is_empty() {
                    k.clone()
                } else {
                    format!("{prefix}.{k}")
                };
                flatten(&name, x, rows);
            }
        }
        Value::Array(a) if a.iter().all(|x| !x.is_object() && !x.is_array()) => {
            let items: Vec<String> = a.iter().map(plain).collect();
            rows.push((
                prefix.into(),
                if items.is_empty() {
                    "none".into()
                } else {
                    items.join(", ")
                },
            ));
        }
        other => rows.push((prefix.into(), plain(other))),
    }
}

fn plain(v: &serde_json::Value) -> String {
    match v {
        serde_json::Value::Null => "not set".into(),
        serde_json::Value::String(s) => s.clone(),
        other => other.to_string(),
    }
}

/// The glossary: every term of the trade or of reknit the report uses, in plain words.
pub const GLOSSARY: [(&str, &str); 13] = [
    (
        "Repair",
        "A piece of damaged road, between two junctions, that the plan asks crews to reopen.",
    ),
    (
        "Work order",
        "The key (WO-…) of one piece of road: the same piece keeps its key in every re-plan of the same road layer, so crews can report back against it (work-orders.csv).",
    ),
    (
        "Repair-metre",
        "The unit of cost: one metre of road at damage factor 1. It is relative repair effort, not money or time.",
    ),
    (
        "Damage factor",
        "How much effort a metre of a road needs, relative to the others; 0 is intact. Impassable roads cannot be used or repaired in this plan.",
    ),
    (
        "Intact road",
        "A road with damage factor 0: assumed passable, with any structures on it, until field-verified.",
    ),
    (
        "Hub",
        "The site everything is joined to (a depot, a hospital): a site counts as joined when a path of intact and repaired roads leads from it to the hub.",
    ),
    (
        "Day",
        "A group of repairs that fits one day's crew capacity (--crew-capacity), in repair order. Without a capacity the repairs are not scheduled by day.",
    ),
    (
        "Lower bound",
        "A cost no plan joining the same sites can go below; the gap between it and the plan's cost says how far from the best plan this one can be at most.",
    ),
    (
        "Road with no way round",
        "A road whose loss alone splits the usable network in two: traffic has no other route across.",
    ),
    (
        "Junction with no way round",
        "A junction whose loss alone splits the usable network.",
    ),
    (
        "Backup link",
        "Further repairs (--redundancy) that give a site a second way to the hub, so no single road failure cuts it off.",
    ),
    (
        "Damage zone, damage report",
        "A polygon (flood, landslide) raising the damage of the roads inside it; a field report is a point applied to the nearest road within a distance.",
    ),
    (
        "Structure",
        "A bridge, culvert or tunnel the data marks on a road: it needs inspection by a qualified engineer before use, repaired or not.",
    ),
];

/// Writes the glossary as a definition list.
pub fn write_glossary<W: Write>(w: &mut W) -> io::Result<()> {
    writeln!(w, "<h2>Terms used</h2><dl>")?;
    for (term, meaning) in GLOSSARY {
        writeln!(w, "<dt>{}</dt><dd>{}</dd>", esc(term), esc(meaning))?;
    }
    writeln!(w, "</dl>")
}
