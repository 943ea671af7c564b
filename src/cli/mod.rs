//! Flag definitions (their doc comments are the `--help` text) and dispatch to subcommands.

mod batch;
mod check;
mod common;
mod demo;
mod plan;
mod replan;

use clap::{Parser, Subcommand};
use std::process::ExitCode;

/// Plan which damaged road segments to repair first so that a district's roads reconnect at the
/// least repair effort. Costs are in repair-metres: one metre of road at damage factor 1.0.
#[derive(Debug, Parser)]
#[command(
    name = "reknit",
    version,
    max_term_width = 100,
    after_help = reknit::cautions::SHORT
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
// Every subcommand's help ends with the cautions paragraph, from the library's one copy.
enum Command {
    #[command(after_help = reknit::cautions::SHORT)]
    Plan(Box<plan::PlanArgs>),
    #[command(after_help = reknit::cautions::SHORT)]
    Replan(Box<replan::ReplanArgs>),
    #[command(after_help = reknit::cautions::SHORT)]
    Demo(Box<demo::DemoArgs>),
    #[command(after_help = reknit::cautions::SHORT)]
    Check(Box<check::CheckArgs>),
    #[command(after_help = reknit::cautions::SHORT)]
    Batch(Box<batch::BatchArgs>),
    #[command(after_help = reknit::cautions::SHORT)]
    Merge(batch::MergeArgs),
}

/// Runs the chosen subcommand.
pub fn run(cli: Cli) -> anyhow::Result<ExitCode> {
    match cli.command {
        Command::Plan(a) => plan::run(*a),
        Command::Replan(a) => replan::run_replan(*a),
        Command::Demo(a) => demo::run(*a),
        Command::Check(a) => check::run(*a),
        Command::Batch(a) => batch::run(*a),
        Command::Merge(a) => batch::merge(a),
    }
}
