//! Flag definitions (their doc comments are the `--help` text) and dispatch to subcommands.

mod batch;
mod check;
mod common;
mod demo;
mod plan;

use clap::{Parser, Subcommand};
use std::process::ExitCode;

/// Plan which damaged road segments to repair first so that a district's roads reconnect at the
/// least repair effort. Costs are in repair-metres: one metre of road at damage factor 1.0.
///
/// Decision support only: field-verify every segment; bridges, culverts and slopes need inspection
/// by qualified engineers before reopening; local codes and licensed practice decide.
#[derive(Debug, Parser)]
#[command(name = "reknit", version, max_term_width = 100)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    Plan(Box<plan::PlanArgs>),
    Demo(Box<demo::DemoArgs>),
    Check(Box<check::CheckArgs>),
    Batch(Box<batch::BatchArgs>),
    Merge(batch::MergeArgs),
}

/// Runs the chosen subcommand.
pub fn run(cli: Cli) -> anyhow::Result<ExitCode> {
    match cli.command {
        Command::Plan(a) => plan::run(*a),
        Command::Demo(a) => demo::run(*a),
        Command::Check(a) => check::run(*a),
        Command::Batch(a) => batch::run(*a),
        Command::Merge(a) => batch::merge(a),
    }
}
