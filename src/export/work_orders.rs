//! `work-orders.csv`: one row per repair in order, for crews (RFC 4180 CSV, opens in any
//! spreadsheet): the plan's repairs, then any backup links' repairs. Free-text cells go through
//! [`csv_cell`] (formula characters neutralised); numeric cells are written as they are.

use super::backup::BackupRow;
use super::text::csv_cell;
use crate::network::{Network, cost_to_repair_metres};
use crate::solve::order::Step;
use std::io::Write;

/// The columns of `work-orders.csv`, in order.
pub const HEADER: [&str; 25] = [
    "order",
    "crew",
    "first_day",
    "last_day",
    "edge",
    "source_index",
    "source_layer",
    "source_id",
    "road",
    "length_m",
    "damage",
    "category",
    "cost",
    "from_lon",
    "from_lat",
    "to_lon",
    "to_lat",
    "completes_sites",
    "purpose",
    "work_order",
    "structure",
    "status",
    "verified_by",
    "verified_on",
    "caution",
];

/// A text cell on its way out: [`csv_cell`] for the CSV, [`super::text::plain`] for the map page.
pub type Cell = fn(&str) -> std::borrow::Cow<'_, str>;

/// What the work-order rows are made of: the network, the plan's repairs in order, the backup
/// links' and detour offers' repairs, the site ids and the work-order keys.
#[derive(Clone, Copy)]
pub struct Sheet<'a> {
    /// The road network.
    pub net: &'a Network,
    /// The plan's repairs in order.
    pub steps: &'a [Step],
    /// The backup links' repairs.
    pub backup: &'a [BackupRow],
    /// The optional repairs that shorten corridors (edges).
    pub detour: &'a [u32],
    /// Site ids, by site number.
    pub site_ids: &'a [String],
    /// The work-order keys.
    pub ids: &'a super::work_order_id::WorkOrderIds,
}

/// The work-order rows, one per repair in order (the columns of [`HEADER`]): the plan's repairs,
/// then the backup links' and the detour offers'; free text passes through `cell`. Each reader
/// (the CSV, the map page) makes its own pass: holding the rows of a national plan would cost
/// far more memory than making them twice.
pub fn rows<'a>(sheet: Sheet<'a>, cell: Cell) -> impl Iterator<Item = [String; 25]> + 'a {
    let Sheet {
        net,
        steps,
        backup,
        detour,
        site_ids,
        ids,
    } = sheet;
    let rows = steps
        .iter()
        .map(move |s| {
            let completes: Vec<&str> = s
                .completes
                .iter()
                .filter_map(|&i| site_ids.get(i).map(String::as_str))
                .collect();
            let text = |x: Option<u32>| x.map_or_else(String::new, |d| d.to_string());
            (
                s.edge,
                s.order,
                [text(s.crew), text(s.first_day), text(s.last_day)],
                completes.join(";"),
                "plan",
            )
        })
        .chain(
            backup
                .iter()
                .map(|b| (b.edge, b.order, Default::default(), String::new(), "backup")),
        )
        .chain({
            let after = steps.len() + backup.len();
            detour.iter().enumerate().map(move |(k, &e)| {
                let order = (after + k + 1) as u32;
                (e, order, Default::default(), String::new(), "detour")
            })
        });
    rows.map(
        move |(edge, order, [crew, first_day, last_day], completes, purpose)| {
            let e = &net.edges[edge as usize];
            let meta = &net.features[e.feature as usize];
            let g = net.edge_geometry(edge as usize);
            let (a, b) = (g[0], g[g.len() - 1]);
            let f7 = |x: f64| crate::decimal::trimmed(x, 7);
            let id = match &meta.source_id {
                Some(serde_json::Value::String(s)) => s.clone(),
                Some(v) => v.to_string(),
                None => String::new(),
            };
            [
                order.to_string(),
                crew,
                first_day,
                last_day,
                edge.to_string(),
                meta.source_index.to_string(),
                cell(net.source_layer(e.feature).unwrap_or_default()).into_owned(),
                cell(&id).into_owned(),
                cell(net.text(meta.label).unwrap_or_default()).into_owned(),
                crate::decimal::fixed(e.length_m, 3),
                // Numeric, or empty for an impassable road (never repaired, so never written here).
                e.damage
                    .factor()
                    .map_or(String::new(), |f| crate::decimal::trimmed(f, 6)),
                cell(net.text(meta.category).unwrap_or_default()).into_owned(),
                crate::decimal::fixed(cost_to_repair_metres(e.cost), 3),
                f7(a[0]),
                f7(a[1]),
                f7(b[0]),
                f7(b[1]),
                cell(&completes).into_owned(),
                purpose.to_string(),
                cell(&ids.key(net, edge)).into_owned(),
                cell(net.text(meta.structure).unwrap_or_default()).into_owned(),
                String::new(),
                String::new(),
                String::new(),
                crate::cautions::WORK_ORDER.to_string(),
            ]
        },
    )
}

/// Writes the work orders (the rows of [`rows`]): order, crew, first and last day (empty without `--crew-capacity`), edge, source feature, road, length, damage, cost, ends,
/// the sites each repair completes, its purpose (`plan`; `backup` for backup links and `detour` for
/// the optional repairs that shorten corridors, neither of which has a crew or days), then the columns crews hand back: the work-order key (stable across re-plans,
/// see [`super::work_order_id`]), the structure the road lies on, blank `status`, `verified_by`
/// and `verified_on`, and the fixed caution sentence.
pub fn write_work_orders<W: Write>(w: W, sheet: Sheet<'_>) -> std::io::Result<()> {
    let mut c = csv::Writer::from_writer(w);
    let io = |e: csv::Error| std::io::Error::other(e.to_string());
    c.write_record(HEADER).map_err(io)?;
    // Crews hand the sheet back by key, so a key on two rows would mark the wrong road finished:
    // keys are unique by construction, and a repeat is a bug that stops the run.
    let key_col = HEADER.iter().position(|h| *h == "work_order").unwrap_or(0);
    let mut seen = std::collections::HashSet::new();
    for row in rows(sheet, csv_cell) {
        if !seen.insert(row[key_col].clone()) {
            return Err(std::io::Error::other(format!(
                "internal error (a bug): work-order key {} is on two rows",
                row[key_col]
            )));
        }
        c.write_record(row).map_err(io)?;
    }
    c.flush()
}
