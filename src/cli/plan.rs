//! `reknit plan`: one district from a road layer to the plan and its map layers.

use super::common::{NetworkArgs, OutputArgs, PlanningArgs, SiteArgs, print_result};
use clap::Args;
use reknit::ingest::source::Source;
use reknit::job::Options;
use reknit::run_plan;
use std::path::PathBuf;
use std::process::ExitCode;

/// Build the road network and the least-cost repair plan that reconnects it, or that joins the
/// critical sites given with --sites.
///
/// Writes network.geojson (every edge), plan.geojson (the chosen edges), sites.geojson (with
/// --sites) and summary.json into the output folder (with --output-format gpkg the layers are
/// tables of one layers.gpkg); nothing is written when the run fails.
#[derive(Debug, Args)]
pub struct PlanArgs {
    /// Road centerline layer: GeoJSON (LineString/MultiLineString, WGS84 lon/lat unless --crs or a
    /// crs member says otherwise), an ESRI Shapefile (.shp with .shx, .dbf and .prj) or a .zip
    /// holding one, an OpenStreetMap .osm.pbf extract or a GeoPackage (.gpkg). Give it again for
    /// more layers, of any of these formats, read into one network: each feature keeps its layer
    /// as `source_layer`; --crs then applies only to layers without a CRS of their own, and
    /// --roads-layer to every GeoPackage or .zip given.
    #[arg(long, value_name = "FILE", required = true)]
    roads: Vec<PathBuf>,

    /// Output folder (created if absent).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,

    /// The district's name, shown on the picture (default: the road file's name).
    #[arg(long, value_name = "TEXT")]
    name: Option<String>,

    #[command(flatten)]
    network: NetworkArgs,

    #[command(flatten)]
    planning: PlanningArgs,

    #[command(flatten)]
    sites: SiteArgs,

    #[command(flatten)]
    output: OutputArgs,
}

pub fn run(a: PlanArgs) -> anyhow::Result<ExitCode> {
    let progress = a.output.progress();
    let mut roads = a.roads.into_iter().map(Source::File);
    let first = roads.next().expect("clap requires --roads");
    let mut o = Options::new(first, a.out);
    o.more_roads = roads.collect();
    o.force = a.output.force;
    o.output_format = a.output.format().unwrap_or_default();
    o.name = a.name.clone();
    o.road = a.network.road_options();
    a.planning.apply(&mut o);
    a.sites.apply(&mut o);
    let job = reknit::job::build(&o)?;
    let summary = run_plan(&job, &progress)?;
    print_result(&summary, &job.out, &progress);
    Ok(ExitCode::SUCCESS)
}
