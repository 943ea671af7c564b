//! `single-failures.geojson` and its figures: which single road failures would cut sites off the
//! hub (roads with no way round, in the graph sense defined in docs/algorithms.md).

use super::geojson::Prop;
use super::sink::LayerSink;
use crate::ingest::sites::SiteLayer;
use crate::network::Network;
use crate::solve::fragility::Fragility;
use serde::Serialize;

/// One site's single points of failure.
#[derive(Debug, Clone, Serialize)]
pub struct SiteFailures {
    /// The site's id.
    pub site: String,
    /// Edges (roads) whose loss alone would cut it off from the hub.
    pub failures: Vec<u32>,
}

/// Single-failure figures for summary.json.
#[derive(Debug, Clone, Serialize)]
pub struct SingleFailureFigures {
    /// Roads with no way round in the network after the plan: losing one splits the network.
    pub roads_with_no_way_round: usize,
    /// Junctions with no way round: losing one (with its roads) splits the network.
    pub junctions_with_no_way_round: usize,
    /// Roads with no way round that would cut at least one site off the hub.
    pub roads_cutting_off_sites: usize,
    /// Sites checked: those joined to the hub by the plan, the hub excepted. Sites not joined
    /// are not counted here; they are listed with their reason under `sites.not_joined`.
    pub sites_checked: usize,
    /// Sites that a single road failure would cut off.
    pub sites_with_a_single_failure: usize,
    /// Per such site, the failures that would cut it off.
    pub per_site: Vec<SiteFailures>,
}

/// The roads cutting sites off, with the sites each would cut off, and the figures.
#[derive(Debug, Clone)]
pub struct SingleFailureLayer {
    /// (edge, ids of the sites its loss cuts off), for roads cutting off at least one site.
    pub cutting: Vec<(u32, Vec<String>)>,
    /// The figures.
    pub figures: SingleFailureFigures,
}

impl SingleFailureLayer {
    /// Builds the layer from the search result and the sites each road with no way round
    /// would cut off.
    pub fn new(
        f: &Fragility,
        cuts_off: Vec<Vec<usize>>,
        per_site: Vec<(usize, Vec<u32>)>,
        sites_checked: usize,
        sl: &SiteLayer,
    ) -> Self {
        let cutting: Vec<(u32, Vec<String>)> = f
            .bridges
            .iter()
            .zip(cuts_off)
            .filter(|(_, p)| !p.is_empty())
            .map(|(&e, p)| (e, p.into_iter().map(|i| sl.sites[i].id.clone()).collect()))
            .collect();
        SingleFailureLayer {
            figures: SingleFailureFigures {
                roads_with_no_way_round: f.bridges.len(),
                junctions_with_no_way_round: f.cut_vertices.len(),
                roads_cutting_off_sites: cutting.len(),
                sites_checked,
                sites_with_a_single_failure: per_site.len(),
                per_site: per_site
                    .into_iter()
                    .map(|(i, failures)| SiteFailures {
                        site: sl.sites[i].id.clone(),
                        failures,
                    })
                    .collect(),
            },
            cutting,
        }
    }
}

/// Writes the roads cutting sites off as LineStrings: edge id, road, work-order key, length,
/// and the sites its loss would cut off (ids, and how many).
pub fn write_single_failures<S: LayerSink + ?Sized>(
    gj: &mut S,
    net: &Network,
    layer: &SingleFailureLayer,
    ids: &super::work_order_id::WorkOrderIds,
) -> std::io::Result<()> {
    for (e, sites) in &layer.cutting {
        let edge = &net.edges[*e as usize];
        let meta = &net.features[edge.feature as usize];
        let joined = sites.join(";");
        gj.line(
            &[
                ("edge", Prop::Int(*e as i64)),
                ("road", net.text(meta.label).map_or(Prop::Null, Prop::Str)),
                ("work_order", Prop::Str(&ids.key(net, *e))),
                ("length_m", Prop::Fixed3(edge.length_m)),
                ("sites_cut_off", Prop::Str(&joined)),
                ("sites_cut_off_count", Prop::Int(sites.len() as i64)),
            ],
            net.edge_geometry(*e as usize),
        )?;
    }
    Ok(())
}
