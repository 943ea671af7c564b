//! `check`: ingest only, for analysts cleaning data before a crisis: every repair and suspicion in
//! `qa.geojson`, the noded network, and a topology report (components and their sizes, dangles).

use super::JobError;
use crate::export::{self, staging};
use crate::ingest::source::Source;
use crate::ingest::{self, RoadSettings};
use crate::progress::Progress;
use crate::solve::components::components;
use serde::Serialize;
use std::path::Path;

/// One connected component of the usable network.
#[derive(Debug, Clone, Serialize)]
pub struct ComponentFigures {
    /// Component id (as in network.geojson).
    pub component: u32,
    /// Junctions in it.
    pub junctions: usize,
    /// Usable edges in it.
    pub edges: usize,
    /// Their total length, metres.
    pub length_m: f64,
}

/// The topology report written as `summary.json` by `check`.
#[derive(Debug, Clone, Serialize)]
pub struct CheckReport {
    /// Program name and version.
    pub tool: crate::export::summary::Tool,
    /// Cautions (second, as in the plan's summary).
    pub cautions: Vec<&'static str>,
    /// The attribution the road data asks for (OpenStreetMap's, or `--attribution`), if any.
    pub attribution: Option<String>,
    /// The road layer.
    pub inputs: Vec<crate::ingest::source::InputRecord>,
    /// Settings in force.
    pub settings: serde_json::Value,
    /// Coordinate handling.
    pub geodesy: crate::export::summary::Geodesy,
    /// Reading and noding counts (QA counts by kind included).
    pub counts: crate::ingest::NodingStats,
    /// Features read, used and skipped.
    pub read: crate::ingest::ReadStats,
    /// Components of the usable network, largest first (at most 100 listed).
    pub components: Vec<ComponentFigures>,
    /// Number of components.
    pub component_count: usize,
    /// Junctions with one edge, closed or not (dead ends).
    pub dangles: usize,
}

/// Reads and nodes the road layers (one or more, made into one network as `plan` does), reporting
/// crossings left apart too, and writes the check outputs (the layers in `format`).
pub fn run_check(
    roads: &[Source],
    settings: &RoadSettings,
    out: &Path,
    force: bool,
    format: export::sink::OutputFormat,
    progress: &Progress,
) -> Result<CheckReport, JobError> {
    let inputs: Vec<_> = roads
        .iter()
        .filter_map(Source::path)
        .chain(settings.cost_table_file.as_deref())
        .map(crate::export::guard::InputPath::File)
        .collect();
    let out = crate::export::guard::check_out(out, &inputs)?;
    staging::preflight(&out, force)?;
    let layer = {
        let _s = progress.stage("reading roads");
        ingest::layers::read_layers(roads, settings)?
    };
    let read = layer.stats.clone();
    let attribution = ingest::attribution::attribution(
        settings.attribution.as_deref(),
        layer.osm_fields || roads.iter().any(ingest::attribution::osm_file),
    );
    let inputs: Vec<_> = layer
        .input
        .iter()
        .chain(&layer.more_inputs)
        .cloned()
        .collect();
    let geodesy = crate::export::summary::Geodesy {
        input_crs: layer.crs_name.clone(),
        length_method: layer.length_method.clone(),
        output_crs: "EPSG:4326 (WGS84 longitude/latitude, RFC 7946)".into(),
        length_unit: "metre",
        note: layer.crs_note.clone(),
    };
    let (net, noding) = {
        let _s = progress.stage("noding and checking");
        ingest::build_network(layer, settings, true)?
    };
    let g = net.weighted_edges();
    let comps = components(&g);
    let mut figs: Vec<ComponentFigures> = (0..comps.count as u32)
        .map(|c| ComponentFigures {
            component: c,
            junctions: 0,
            edges: 0,
            length_m: 0.0,
        })
        .collect();
    for &c in &comps.of {
        figs[c as usize].junctions += 1;
    }
    let mut degree = vec![0u32; net.junctions.len()];
    for e in &net.edges {
        degree[e.from as usize] += 1;
        degree[e.to as usize] += 1;
        if e.usable() {
            let f = &mut figs[comps.of[e.from as usize] as usize];
            f.edges += 1;
            f.length_m += e.length_m;
        }
    }
    figs.iter_mut()
        .for_each(|f| f.length_m = crate::export::summary::round3(f.length_m));
    figs.sort_by(|a, b| {
        b.length_m
            .total_cmp(&a.length_m)
            .then(a.component.cmp(&b.component))
    });
    let report = CheckReport {
        tool: Default::default(),
        cautions: crate::cautions::CAUTIONS.to_vec(),
        attribution,
        inputs,
        settings: serde_json::json!({
            "snap_m": settings.snap_m,
            "node_crossings": settings.node_crossings,
            "damage_field": settings.damage.field,
            "crs": settings.crs,
            "output_format": format.name(),
        }),
        geodesy,
        component_count: comps.count,
        components: figs.into_iter().take(100).collect(),
        dangles: degree.iter().filter(|&&d| d == 1).count(),
        counts: noding.clone(),
        read,
    };
    {
        let _s = progress.stage("writing outputs");
        let st = staging::Staging::begin(&out, force)?;
        let ids = export::work_order_id::WorkOrderIds::new(&net);
        let layers = export::check_layers(&net, &comps, &ids, &noding.qa_points);
        export::layer_set::write(&st, format, &layers, report.attribution.as_deref())?;
        st.write("summary.json", |w| {
            serde_json::to_writer_pretty(&mut *w, &report)?;
            std::io::Write::write_all(w, b"\n")
        })?;
        st.commit()?;
    }
    Ok(report)
}
