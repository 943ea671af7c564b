//! `corridors.geojson` and the corridor figures: per joined site, the route convoys drive from the
//! hub once the plan (and any backup links) is done, against the same trip on the undamaged
//! network, and the further repairs offered where the detour is longer than `--max-detour`.

use super::geojson::Prop;
use super::sink::LayerSink;
use crate::network::Network;
use serde::Serialize;

/// One site's corridor.
#[derive(Debug, Clone)]
pub struct CorridorRow {
    /// The site's id.
    pub site: String,
    /// The hub's junction and the site's.
    pub junctions: [u32; 2],
    /// The route's edges, hub first.
    pub edges: Vec<u32>,
    /// The route's length, metres.
    pub length_m: f64,
    /// The shortest trip between the same junctions with every road whole, metres.
    pub undamaged_m: f64,
    /// `length_m / undamaged_m`; None when the site is on the hub's junction.
    pub ratio: Option<f64>,
    /// Longer than `--max-detour` allows (None without it).
    pub over: Option<bool>,
    /// The offer for a flagged site: its repairs' work-order keys, cost and the route's length.
    pub fix: Option<FixOffer>,
    /// Why a flagged site has no offer.
    pub no_fix: Option<&'static str>,
}

/// Further repairs offered to shorten one corridor (optional work orders, purpose `detour`).
#[derive(Debug, Clone, Serialize)]
pub struct FixOffer {
    /// Work-order keys of the repairs.
    pub work_orders: Vec<String>,
    /// Their cost, repair-metres.
    pub cost: f64,
    /// The corridor's length with them, metres.
    pub length_m: f64,
}

/// One flagged site in `summary.json`.
#[derive(Debug, Clone, Serialize)]
pub struct FlaggedSite {
    /// The site's id.
    pub site: String,
    /// Its detour ratio.
    pub detour_ratio: f64,
    /// The offer, or null with `note` saying why there is none.
    pub fix: Option<FixOffer>,
    /// Why there is no offer.
    pub note: Option<&'static str>,
}

/// Corridor figures for `summary.json`.
#[derive(Debug, Clone, Serialize)]
pub struct CorridorFigures {
    /// Joined sites with a corridor (the hub and sites on its junction excepted).
    pub sites: usize,
    /// Largest detour ratio among them (null when none).
    pub longest_detour_ratio: Option<f64>,
    /// `--max-detour`, or null.
    pub max_detour: Option<f64>,
    /// Sites whose corridor is longer than `--max-detour` allows, each with its offer.
    pub flagged: Vec<FlaggedSite>,
    /// Cost of the optional repairs of every offer together (each counted once), repair-metres.
    pub optional_cost: f64,
}

/// The corridors layer, the optional repairs and the figures.
#[derive(Debug, Clone)]
pub struct CorridorLayer {
    /// One row per joined site with a route.
    pub rows: Vec<CorridorRow>,
    /// Every offered repair once, by edge id ascending (the optional work orders).
    pub detour_repairs: Vec<u32>,
    /// The figures.
    pub figures: CorridorFigures,
}

/// The route's points from the hub, each edge's geometry turned to run onward.
pub(crate) fn route_points(net: &Network, from: u32, edges: &[u32]) -> Vec<[f64; 2]> {
    let mut pts: Vec<[f64; 2]> = Vec::new();
    let mut at = from;
    for &e in edges {
        let edge = &net.edges[e as usize];
        let g = net.edge_geometry(e as usize);
        let start = pts.len().min(1);
        if edge.from == at {
            pts.extend_from_slice(&g[start.min(g.len())..]);
            at = edge.to;
        } else {
            pts.extend(g.iter().rev().skip(start));
            at = edge.from;
        }
    }
    pts
}

/// Writes one LineString per corridor (sites on the hub's junction have none).
pub fn write_corridors<S: LayerSink + ?Sized>(
    gj: &mut S,
    net: &Network,
    c: &CorridorLayer,
) -> std::io::Result<()> {
    for r in c.rows.iter().filter(|r| !r.edges.is_empty()) {
        let keys = r.fix.as_ref().map(|f| f.work_orders.join(";"));
        let num = |x: Option<f64>| x.map_or(Prop::Null, Prop::Num);
        gj.line(
            &[
                ("site", Prop::Str(&r.site)),
                ("from_junction", Prop::Int(r.junctions[0] as i64)),
                ("to_junction", Prop::Int(r.junctions[1] as i64)),
                ("length_m", Prop::Fixed3(r.length_m)),
                ("undamaged_length_m", Prop::Fixed3(r.undamaged_m)),
                ("detour_ratio", num(r.ratio)),
                ("over_max_detour", r.over.map_or(Prop::Null, Prop::Bool)),
                (
                    "fix_cost",
                    r.fix.as_ref().map_or(Prop::Null, |f| Prop::Fixed3(f.cost)),
                ),
                (
                    "fix_length_m",
                    r.fix
                        .as_ref()
                        .map_or(Prop::Null, |f| Prop::Fixed3(f.length_m)),
                ),
                (
                    "fix_work_orders",
                    keys.as_deref().map_or(Prop::Null, Prop::Str),
                ),
                ("fix_note", r.no_fix.map_or(Prop::Null, Prop::Str)),
            ],
            &route_points(net, r.junctions[0], &r.edges),
        )?;
    }
    Ok(())
}
