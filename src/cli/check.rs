//! `reknit check`: ingest only, to see every repair and suspicion before planning.

use super::common::{NetworkArgs, OutputArgs};
use clap::Args;
use reknit::ingest::source::Source;
use std::path::PathBuf;
use std::process::ExitCode;

/// Check a road layer's topology: writes qa.geojson (every change reknit makes to the geometry and
/// every suspicion: merged vertices, joined undershoots, trimmed overshoots, removed duplicates,
/// crossings left apart, dangling ends), network.geojson and summary.json (components with their
/// sizes, dangles, counts); with --output-format gpkg the two layers are tables of layers.gpkg.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// Road centerline layer, in any format `plan` reads. Give it again for more layers, checked
    /// as one network (each feature keeps its layer as `source_layer`).
    #[arg(long, value_name = "FILE", required = true)]
    roads: Vec<PathBuf>,

    /// Output folder (created if absent).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,

    #[command(flatten)]
    network: NetworkArgs,

    #[command(flatten)]
    output: OutputArgs,
}

pub fn run(a: CheckArgs) -> anyhow::Result<ExitCode> {
    let progress = a.output.progress();
    let r = reknit::job::check::run_check(
        &a.roads.into_iter().map(Source::File).collect::<Vec<_>>(),
        &reknit::job::settings::road_settings(&a.network.road_options())?,
        &a.out,
        a.output.force,
        a.output.format().unwrap_or_default(),
        &progress,
    )?;
    if !progress.quiet {
        reknit::say!(
            "{} junctions, {} edges in {} component(s); {} dangling ends",
            r.counts.junctions,
            r.counts.edges,
            r.component_count,
            r.dangles
        );
        for (kind, n) in &r.counts.qa {
            reknit::say!("  {n:>8}  {}", reknit::ingest::qa::QaKind::label_of(kind));
        }
        reknit::say!("outputs written to {}", a.out.display());
        super::common::print_cautions(r.attribution.as_deref());
    }
    Ok(ExitCode::SUCCESS)
}
