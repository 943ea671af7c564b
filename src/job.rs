//! One district's run from inputs to outputs: ingest → network → plan → layers.
//!
//! The command line and (later) the batch runner both call [`run_plan`]; it owns the order of the
//! stages and the contents of the summary.

use crate::export::summary::{Counts, Geodesy, PlanFigures, Summary, Tool, round3};
use crate::export::{self, ExportError};
use crate::ingest::source::Source;
use crate::ingest::{self, IngestError, RoadSettings};
use crate::network::cost_to_repair_metres;
use crate::progress::Progress;
use crate::solve::{self, MstAlgorithm, SolveError};
use std::path::PathBuf;

/// Everything one planning run needs.
#[derive(Debug, Clone)]
pub struct PlanJob {
    /// The road centerline layer.
    pub roads: Source,
    /// Output folder.
    pub out: PathBuf,
    /// Replace outputs already in `out`.
    pub force: bool,
    /// Reading and noding settings.
    pub road_settings: RoadSettings,
    /// Minimum spanning forest algorithm.
    pub mst: MstAlgorithm,
}

/// Any error of a run, by stage.
#[derive(Debug, thiserror::Error)]
pub enum JobError {
    /// Reading or noding failed.
    #[error(transparent)]
    Ingest(#[from] IngestError),
    /// Solving failed.
    #[error(transparent)]
    Solve(#[from] SolveError),
    /// Writing outputs failed.
    #[error(transparent)]
    Export(#[from] ExportError),
}

/// Runs the whole pipeline and returns the summary that was written.
pub fn run_plan(job: &PlanJob, progress: &Progress) -> Result<Summary, JobError> {
    export::staging::preflight(&job.out, job.force)?;
    job.road_settings.validate()?;

    let layer = {
        let _s = progress.stage("reading roads");
        ingest::roads::read_geojson_roads(&job.roads, &job.road_settings)?
    };
    for (reason, n) in &layer.stats.features_skipped {
        progress.note(&format!(
            "{}: skipped {n} feature(s): {reason}",
            job.roads.display_path().display()
        ));
    }
    let read_stats = layer.stats.clone();
    let input = layer.input.clone();

    let (net, noding) = {
        let _s = progress.stage("noding");
        ingest::build_network(layer, &job.road_settings)?
    };
    let graph = net.weighted_edges();
    let (plan, comps) = {
        let _s = progress.stage("solving");
        let plan = solve::minimum_spanning_forest(&graph, job.mst)?;
        (plan, solve::components::components(&graph))
    };

    let mut counts = Counts {
        features_read: read_stats.features_read,
        features_used: read_stats.features_used,
        features_skipped: read_stats.features_skipped,
        line_parts: read_stats.line_parts,
        vertices: read_stats.vertices,
        vertices_moved: noding.vertices_moved,
        max_move_m: round3(noding.max_move_m),
        zero_length_parts_dropped: noding.zero_length_parts_dropped,
        duplicate_edges_dropped: noding.duplicate_edges_dropped,
        junctions: net.junctions.len(),
        edges: net.edges.len(),
        components: comps.count,
        ..Default::default()
    };
    let mut network_length = 0.0;
    for e in &net.edges {
        network_length += e.length_m;
        match e.damage.factor() {
            None => counts.edges_closed += 1,
            Some(0.0) => counts.edges_intact += 1,
            Some(_) => counts.edges_damaged += 1,
        }
    }
    counts.network_length_m = round3(network_length);
    let repair_length: f64 = plan
        .edges
        .iter()
        .map(|&e| &net.edges[e as usize])
        .filter(|e| e.cost > 0)
        .map(|e| e.length_m)
        .sum();
    let s = &job.road_settings;
    let summary = Summary {
        tool: Tool::default(),
        inputs: input.into_iter().collect(),
        settings: serde_json::json!({
            "snap_m": s.snap_m,
            "damage_field": s.damage.field,
            "default_damage": s.damage.default,
            "closed_value": s.damage.closed_value,
            "id_field": s.id_field,
            "mst": job.mst.name(),
        }),
        geodesy: Geodesy {
            input_crs: "EPSG:4326 (WGS84 longitude/latitude, RFC 7946)".into(),
            length_method: "geodesic on the WGS84 ellipsoid (Karney; mid-latitude formula for steps under 1 km, within 0.1 mm of it)".into(),
            output_crs: "EPSG:4326 (WGS84 longitude/latitude, RFC 7946)".into(),
            length_unit: "metre",
        },
        counts,
        plan: PlanFigures {
            kind: plan.kind.describe(),
            algorithm: job.mst.name(),
            trees: plan.trees,
            repair_edges: plan
                .edges
                .iter()
                .filter(|&&e| net.edges[e as usize].cost > 0)
                .count(),
        },
        total_cost: cost_to_repair_metres(plan.total_cost),
        cost_unit: "repair-metre",
        repair_length_m: round3(repair_length),
        plan_edges: plan.edges.len(),
        cautions: crate::cautions::CAUTIONS.to_vec(),
    };
    {
        let _s = progress.stage("writing outputs");
        export::write_outputs(&job.out, job.force, &net, &comps, &plan, &summary)?;
    }
    Ok(summary)
}
