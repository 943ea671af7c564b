//! `reknit batch` and `reknit merge`: many districts from a manifest, on one machine or in shards.

use clap::Args;
use reknit::batch::shard::Shard;
use reknit::batch::{BatchOptions, merge as merge_shards, run_batch};
use reknit::progress::Progress;
use std::path::PathBuf;
use std::process::ExitCode;

/// Plan every district of a manifest, in parallel; one failed district never stops the others.
///
/// The manifest is TOML ([defaults] and one [[district]] table each, with name, roads and any
/// `plan` option as a key: --max-attach is max_attach) or CSV with the keys as columns; paths are
/// relative to the manifest. Each district writes into OUT/<name>/; OUT/batch-summary.csv and .json
/// list every district. Exit code 0 when all succeed, 1 when some failed (listed), 2 when the batch
/// cannot run (an unusable manifest, an output folder that would hold an input): nothing is written.
#[derive(Debug, Args)]
pub struct BatchArgs {
    /// The manifest (TOML, or CSV by extension).
    manifest: PathBuf,

    /// Output folder; each district gets a folder of its own inside it.
    #[arg(long, value_name = "DIR")]
    out: PathBuf,

    /// Districts planned at once (and threads used in all); default: all cores.
    #[arg(long, value_name = "N")]
    jobs: Option<usize>,

    /// Run only shard K of N (K from 1, N at most 100000), splitting the districts by input size the
    /// same way on every machine; each shard writes batch-summary-K-of-N.*; join them with
    /// `reknit merge`.
    #[arg(long, value_name = "K/N")]
    shard: Option<Shard>,

    /// Skip districts whose outputs are complete (every file their summary.json lists) and whose
    /// input files (Shapefile sidecars too) and settings are unchanged; run the others.
    #[arg(long)]
    resume: bool,

    /// Replace districts' existing outputs.
    #[arg(long)]
    force: bool,

    /// Print nothing but errors.
    #[arg(long, short)]
    quiet: bool,

    /// Print a line per district as it finishes.
    #[arg(long, short)]
    verbose: bool,
}

/// Join the batch-summary-K-of-N files of sharded runs into one batch-summary.csv and .json.
///
/// Refused, with nothing written, unless every shard of one batch (same manifest, same shard count)
/// is there and every district is in exactly one shard summary; the shard summaries are only read.
#[derive(Debug, Args)]
pub struct MergeArgs {
    /// The shared output folder of the shards.
    dir: PathBuf,
}

pub fn run(a: BatchArgs) -> anyhow::Result<ExitCode> {
    let progress = Progress {
        quiet: a.quiet,
        verbose: a.verbose,
    };
    let opts = BatchOptions {
        manifest: a.manifest,
        out: a.out,
        jobs: a
            .jobs
            .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, |n| n.get())),
        shard: a.shard,
        resume: a.resume,
        force: a.force,
        progress,
    };
    let s = run_batch(&opts)?;
    if !a.quiet {
        let unchanged = s.rows.iter().filter(|r| r.status == "unchanged").count();
        reknit::say!(
            "{} of {} district(s) run{}: {} ok, {} unchanged, {} failed",
            s.rows.len(),
            s.districts,
            s.shard
                .as_ref()
                .map(|k| format!(" (shard {k})"))
                .unwrap_or_default(),
            s.rows.len() - unchanged - s.failed,
            unchanged,
            s.failed
        );
        for r in s.rows.iter().filter(|r| r.status == "failed") {
            reknit::say!(
                "  failed: {}: {}",
                reknit::export::text::terminal(&r.name),
                reknit::export::text::terminal(r.error.as_deref().unwrap_or(""))
            );
        }
        super::common::print_cautions(None);
    }
    Ok(if s.failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

pub fn merge(a: MergeArgs) -> anyhow::Result<ExitCode> {
    let s = merge_shards::merge(&a.dir)?;
    reknit::say!(
        "merged {} district(s) into {}: {} failed",
        s.rows.len(),
        a.dir.join("batch-summary.csv").display(),
        s.failed
    );
    super::common::print_cautions(None);
    Ok(if s.failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}
