//! `reknit plan`: one district from a road layer to the plan and its map layers.

use super::common::{NetworkArgs, OutputArgs, print_result};
use clap::Args;
use reknit::ingest::source::Source;
use reknit::{PlanJob, run_plan};
use std::path::PathBuf;
use std::process::ExitCode;

/// Build the road network and the least-cost repair plan that reconnects it.
///
/// Writes network.geojson (every edge), plan.geojson (the chosen edges) and summary.json into the
/// output folder; nothing is written when the run fails.
#[derive(Debug, Args)]
pub struct PlanArgs {
    /// Road centerline layer: GeoJSON FeatureCollection of LineString/MultiLineString in lon/lat.
    #[arg(long, value_name = "FILE")]
    roads: PathBuf,

    /// Output folder (created if absent).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,

    #[command(flatten)]
    network: NetworkArgs,

    #[command(flatten)]
    output: OutputArgs,
}

pub fn run(a: PlanArgs) -> anyhow::Result<ExitCode> {
    let progress = a.output.progress();
    let job = PlanJob {
        roads: Source::File(a.roads),
        out: a.out,
        force: a.output.force,
        road_settings: a.network.road_settings(),
        mst: a.network.mst(),
    };
    let summary = run_plan(&job, &progress)?;
    print_result(&summary, &job.out, &progress);
    Ok(ExitCode::SUCCESS)
}
