//! `fragility.geojson` and the fragility figures: which single road failures would cut sites off.

use super::geojson::{GeoJsonWriter, Prop};
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

/// Fragility figures for summary.json.
#[derive(Debug, Clone, Serialize)]
pub struct FragilityFigures {
    /// Bridges of the network after the plan (edges whose loss disconnects something).
    pub bridges: usize,
    /// Cut vertices (junctions whose loss disconnects something).
    pub cut_vertices: usize,
    /// Bridges that would cut at least one site off the hub.
    pub critical_edges: usize,
    /// Sites checked: those joined to the hub by the plan, the hub excepted. Sites not joined
    /// are not counted here; they are listed with their reason under `sites.unconnected`.
    pub sites_checked: usize,
    /// Sites that a single road failure would cut off.
    pub sites_with_single_points_of_failure: usize,
    /// Per such site, the failures that would cut it off.
    pub per_site: Vec<SiteFailures>,
}

/// The critical edges with the sites each protects, and the figures.
#[derive(Debug, Clone)]
pub struct FragilityLayer {
    /// (edge, ids of the sites it protects), for bridges protecting at least one site.
    pub critical: Vec<(u32, Vec<String>)>,
    /// The figures.
    pub figures: FragilityFigures,
}

impl FragilityLayer {
    /// Builds the layer from the search result and the sites each bridge protects.
    pub fn new(
        f: &Fragility,
        protects: Vec<Vec<usize>>,
        per_site: Vec<(usize, Vec<u32>)>,
        sites_checked: usize,
        sl: &SiteLayer,
    ) -> Self {
        let critical: Vec<(u32, Vec<String>)> = f
            .bridges
            .iter()
            .zip(protects)
            .filter(|(_, p)| !p.is_empty())
            .map(|(&e, p)| (e, p.into_iter().map(|i| sl.sites[i].id.clone()).collect()))
            .collect();
        FragilityLayer {
            figures: FragilityFigures {
                bridges: f.bridges.len(),
                cut_vertices: f.cut_vertices.len(),
                critical_edges: critical.len(),
                sites_checked,
                sites_with_single_points_of_failure: per_site.len(),
                per_site: per_site
                    .into_iter()
                    .map(|(i, failures)| SiteFailures {
                        site: sl.sites[i].id.clone(),
                        failures,
                    })
                    .collect(),
            },
            critical,
        }
    }
}

/// Writes the critical edges as LineStrings: edge id, how many sites, and which, each protects.
pub fn write_fragility<W: std::io::Write>(
    w: W,
    net: &Network,
    layer: &FragilityLayer,
    attribution: Option<&str>,
) -> std::io::Result<()> {
    let mut gj = GeoJsonWriter::layer(w, attribution)?;
    for (e, sites) in &layer.critical {
        let joined = sites.join(";");
        gj.line(
            &[
                ("edge", Prop::Int(*e as i64)),
                ("sites_protected", Prop::Int(sites.len() as i64)),
                ("sites", Prop::Str(&joined)),
                ("length_m", Prop::Fixed3(net.edges[*e as usize].length_m)),
            ],
            net.edge_geometry(*e as usize),
        )?;
    }
    gj.finish()?;
    Ok(())
}
