//! The `reknit` command line: parses flags, calls the library, maps errors to exit codes.
//!
//! Exit codes: 0 success (unconnected parts are a reported result, not an error); 2 an error that
//! stopped the run, with nothing written.

mod cli;

use clap::Parser;
use std::process::ExitCode;

fn main() -> ExitCode {
    let args = cli::Cli::parse();
    match cli::run(args) {
        Ok(code) => code,
        Err(e) => {
            eprintln!("reknit: error: {e:#}");
            ExitCode::from(2)
        }
    }
}
