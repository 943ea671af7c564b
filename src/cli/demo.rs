//! `reknit demo`: the whole job on the bundled sample district.

use super::common::{NetworkArgs, OutputArgs, print_result};
use clap::Args;
use reknit::ingest::source::Source;
use reknit::{PlanJob, run_plan, sample};
use std::path::PathBuf;
use std::process::ExitCode;

/// Run the plan on the bundled sample district (Kestrel Vale, invented) to see every output.
#[derive(Debug, Args)]
pub struct DemoArgs {
    /// Output folder (created if absent).
    #[arg(long, value_name = "DIR", default_value = "reknit-demo")]
    out: PathBuf,

    #[command(flatten)]
    network: NetworkArgs,

    #[command(flatten)]
    output: OutputArgs,
}

pub fn run(a: DemoArgs) -> anyhow::Result<ExitCode> {
    let progress = a.output.progress();
    progress.note(&format!(
        "demo: {} (an invented district with synthetic roads)",
        sample::DISTRICT
    ));
    let job = PlanJob {
        roads: Source::Bundled {
            name: sample::ROADS_NAME.into(),
            bytes: sample::ROADS,
        },
        out: a.out,
        force: a.output.force,
        road_settings: a.network.road_settings(),
        mst: a.network.mst(),
    };
    let summary = run_plan(&job, &progress)?;
    print_result(&summary, &job.out, &progress);
    Ok(ExitCode::SUCCESS)
}
