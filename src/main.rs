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
            reknit::say!(
                "reknit: error: {}",
                reknit::export::text::terminal(&message(&e))
            );
            ExitCode::from(2)
        }
    }
}

/// The error and its causes, each cause added only when the message does not already say it
/// (library errors embed their source's text, and the chain would repeat it).
fn message(e: &anyhow::Error) -> String {
    let mut out = String::new();
    for cause in e.chain() {
        let text = cause.to_string();
        if out.contains(&text) {
            continue;
        }
        if !out.is_empty() {
            out.push_str(": ");
        }
        out.push_str(&text);
    }
    out
}
