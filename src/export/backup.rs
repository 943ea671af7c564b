//! `backup.geojson` and the backup figures: the further repairs that keep every site joined to the
//! hub after any single road failure, numbered after the plan's repairs.

use super::geojson::Prop;
use super::single_failures::{SingleFailureFigures, SiteFailures};
use super::sink::LayerSink;
use crate::network::{Network, cost_to_repair_metres};
use crate::solve::backup::Backup;
use serde::Serialize;

/// One added repair.
#[derive(Debug, Clone)]
pub struct BackupRow {
    /// The edge to repair.
    pub edge: u32,
    /// Position in the repair order, after every repair of the plan.
    pub order: u32,
    /// The backup link (way round) it belongs to, 1-based.
    pub link: u32,
    /// Ids of the sites whose single points of failure that link removes (some or all of them).
    pub protects: Vec<String>,
}

/// Backup figures for summary.json.
#[derive(Debug, Clone, Serialize, Default)]
pub struct BackupFigures {
    /// Total cost of the added repairs, repair-metres.
    pub cost: f64,
    /// Number of added repairs (edges).
    pub repairs: usize,
    /// Number of ways round (links) they form.
    pub links: usize,
    /// Roads with no way round on a hub-to-site path before the backup (each needs one).
    pub roads_needing_a_way_round: usize,
    /// The single-failure figures once the plan and the backup are both repaired.
    pub single_failures_after: Option<SingleFailureFigures>,
    /// Sites still cut off by some single failure that no repair can avoid (one road in).
    pub sites_without_possible_backup: Vec<SiteFailures>,
}

/// The rows of `backup.geojson` and the figures.
#[derive(Debug, Clone, Default)]
pub struct BackupLayer {
    /// Added repairs in order.
    pub rows: Vec<BackupRow>,
    /// The figures.
    pub figures: BackupFigures,
}

impl BackupLayer {
    /// Builds the layer from the solver's result, the single failures left after it, and the sites (by id)
    /// with failures no backup can avoid.
    pub fn new(
        rows: Vec<BackupRow>,
        b: &Backup,
        after: SingleFailureFigures,
        no_backup: Vec<(String, Vec<u32>)>,
    ) -> Self {
        BackupLayer {
            figures: BackupFigures {
                cost: cost_to_repair_metres(b.cost),
                repairs: rows.len(),
                links: b.links.len(),
                roads_needing_a_way_round: b.needed,
                single_failures_after: Some(after),
                sites_without_possible_backup: no_backup
                    .into_iter()
                    .map(|(site, failures)| SiteFailures { site, failures })
                    .collect(),
            },
            rows,
        }
    }
}

/// Writes the added repairs as LineStrings in order: order, link, edge, road, length, damage,
/// cost and the sites the link protects.
pub fn write_backup<S: LayerSink + ?Sized>(
    gj: &mut S,
    net: &Network,
    layer: &BackupLayer,
    ids: &super::work_order_id::WorkOrderIds,
) -> std::io::Result<()> {
    for r in &layer.rows {
        let edge = &net.edges[r.edge as usize];
        let meta = &net.features[edge.feature as usize];
        let joined = r.protects.join(";");
        let [damage, impassable] = super::damage_props(edge);
        gj.line(
            &[
                ("order", Prop::Int(r.order as i64)),
                ("link", Prop::Int(r.link as i64)),
                ("edge", Prop::Int(r.edge as i64)),
                ("source_index", Prop::Int(meta.source_index as i64)),
                (
                    "source_layer",
                    net.source_layer(edge.feature).map_or(Prop::Null, Prop::Str),
                ),
                (
                    "source_id",
                    meta.source_id.as_ref().map_or(Prop::Null, Prop::Json),
                ),
                ("road", net.text(meta.label).map_or(Prop::Null, Prop::Str)),
                ("length_m", Prop::Fixed3(edge.length_m)),
                damage,
                impassable,
                ("cost", Prop::Fixed3(cost_to_repair_metres(edge.cost))),
                ("protects_sites", Prop::Str(&joined)),
                (
                    "structure",
                    net.text(meta.structure).map_or(Prop::Null, Prop::Str),
                ),
                ("work_order", Prop::Str(&ids.key(net, r.edge))),
            ],
            net.edge_geometry(r.edge as usize),
        )?;
    }
    Ok(())
}
