//! `reknit demo`: the whole job on the bundled sample district.

use super::common::{NetworkArgs, OutputArgs, PlanningArgs, print_result};
use clap::Args;
use reknit::ingest::source::Source;
use reknit::job::Options;
use reknit::{run_plan, sample};
use std::path::PathBuf;
use std::process::ExitCode;

/// Run the plan on the bundled sample district (Ombrevane, invented) to see every output.
#[derive(Debug, Args)]
pub struct DemoArgs {
    /// Output folder (created if absent).
    #[arg(long, value_name = "DIR", default_value = "reknit-demo")]
    out: PathBuf,

    /// Plan the whole network instead of joining the demo's critical sites.
    #[arg(long)]
    whole_network: bool,

    #[command(flatten)]
    network: NetworkArgs,

    #[command(flatten)]
    planning: PlanningArgs,

    #[command(flatten)]
    output: OutputArgs,
}

pub fn run(a: DemoArgs) -> anyhow::Result<ExitCode> {
    let progress = a.output.progress();
    progress.note(&format!(
        "demo: {} (an invented district with synthetic roads)",
        sample::DISTRICT
    ));
    let roads = Source::Bundled {
        name: sample::ROADS_NAME.into(),
        bytes: sample::ROADS,
    };
    let mut o = Options::new(roads, a.out);
    o.force = a.output.force;
    o.output_format = a.output.format().unwrap_or_default();
    o.road = a.network.road_options();
    a.planning.apply(&mut o);
    o.whole_network = a.whole_network;
    o.name = Some(format!("{} (invented demo district)", sample::DISTRICT));
    if !a.whole_network {
        o.sites = Some(Source::Bundled {
            name: sample::SITES_NAME.into(),
            bytes: sample::SITES,
        });
        o.hub = Some(sample::HUB.into());
    }
    let job = reknit::job::build(&o)?;
    let summary = run_plan(&job, &progress)?;
    print_result(&summary, &job.out, &progress);
    Ok(ExitCode::SUCCESS)
}
