//! Many districts by the same rules: in parallel on one machine, or split into shards for array-job
//! schedulers (Slurm job arrays, Kubernetes indexed Jobs), then merged.
//!
//! A district's failure never stops the others; each writes its own all-or-nothing output set into
//! its own folder, and the batch summary lists every district with its status.

pub mod keys;
pub mod manifest;
pub mod merge;
pub mod names;
pub mod preflight;
pub mod report;
pub mod resume;
pub mod shard;
pub mod values;

use crate::job::run_plan;
use crate::progress::Progress;
use manifest::District;
use report::{BatchSummary, Row};
use std::path::PathBuf;
use std::sync::Mutex;
use std::sync::atomic::{AtomicUsize, Ordering};

/// Most districts planned at once (`--jobs`).
pub const MAX_JOBS: usize = 1024;

/// Errors that stop a whole batch (a district's own failure is a row, not an error).
#[derive(Debug, thiserror::Error)]
pub enum BatchError {
    /// The manifest cannot be used.
    #[error("{path}: {message}")]
    Manifest {
        /// The manifest.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
    /// A batch summary could not be written or read.
    #[error("{path}: {message}")]
    Output {
        /// The file or folder.
        path: PathBuf,
        /// What went wrong.
        message: String,
    },
}

/// How a batch runs.
#[derive(Debug, Clone)]
pub struct BatchOptions {
    /// The manifest (TOML, or CSV by extension).
    pub manifest: PathBuf,
    /// The batch output folder; each district writes into a folder of its own inside it.
    pub out: PathBuf,
    /// Districts run at once (and threads in all).
    pub jobs: usize,
    /// Run only this shard of the districts.
    pub shard: Option<shard::Shard>,
    /// Skip districts whose outputs are complete and whose inputs and settings are unchanged.
    pub resume: bool,
    /// Replace districts' existing outputs.
    pub force: bool,
    /// Terminal reporting.
    pub progress: Progress,
}

/// Runs the batch; returns the summary that was written (rows of this shard only when sharded).
pub fn run_batch(opts: &BatchOptions) -> Result<BatchSummary, BatchError> {
    let manifest = manifest::read_manifest(&opts.manifest)?;
    let districts = manifest.districts;
    let total = districts.len();
    let stem = match opts.shard {
        Some(s) => format!("batch-summary-{}-of-{}", s.index, s.count),
        None => "batch-summary".to_string(),
    };
    // Every check that can refuse the batch comes before anything is written.
    preflight::check(&opts.manifest, &opts.out, &districts)?;
    report::check_replaceable(&opts.out, &stem)?;
    let mine: Vec<District> = match opts.shard {
        Some(s) => {
            let works: Vec<u64> = districts.iter().map(shard::work).collect();
            let of = shard::assign(&works, s.count);
            districts
                .into_iter()
                .filter(|d| of[d.index] == s.index - 1)
                .collect()
        }
        None => districts,
    };
    if opts.jobs > MAX_JOBS {
        return Err(BatchError::Output {
            path: opts.out.clone(),
            message: format!(
                "--jobs {} is more than the {MAX_JOBS} districts reknit plans at once",
                opts.jobs
            ),
        });
    }
    let jobs = opts.jobs.max(1);
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(jobs)
        .build()
        .map_err(|e| BatchError::Output {
            path: opts.out.clone(),
            message: format!("cannot start {jobs} threads: {e}"),
        })?;
    // Made only once the batch can run: a refused batch leaves nothing behind.
    std::fs::create_dir_all(&opts.out).map_err(|e| BatchError::Output {
        path: opts.out.clone(),
        message: format!("cannot create the output folder: {e}"),
    })?;
    let bar = overall_bar(&opts.progress, mine.len());
    let next = AtomicUsize::new(0);
    let rows: Mutex<Vec<Row>> = Mutex::new(Vec::with_capacity(mine.len()));
    // One OS thread per concurrent district pulls work; each district runs inside the shared pool,
    // so its own parallel steps use idle threads without oversubscribing, and at most `jobs`
    // districts are in memory at once.
    std::thread::scope(|scope| {
        for _ in 0..jobs.min(mine.len().max(1)) {
            scope.spawn(|| {
                loop {
                    let i = next.fetch_add(1, Ordering::SeqCst);
                    let Some(d) = mine.get(i) else { break };
                    let row = pool.install(|| run_district(d, opts));
                    if opts.progress.verbose && !opts.progress.quiet {
                        bar.suspend(|| {
                            crate::say!(
                                "{}: {}{}",
                                d.name,
                                row.status,
                                row.error
                                    .as_ref()
                                    .map(|e| format!(" — {e}"))
                                    .unwrap_or_default()
                            )
                        });
                    }
                    bar.inc(1);
                    rows.lock().unwrap_or_else(|p| p.into_inner()).push(row);
                }
            });
        }
    });
    bar.finish_and_clear();
    let mut rows = rows.into_inner().unwrap_or_else(|p| p.into_inner());
    rows.sort_by_key(|r| r.index);
    let summary = BatchSummary {
        districts: total,
        cautions: report::cautions(),
        batch_id: manifest.id,
        shard: opts.shard.map(|s| format!("{}/{}", s.index, s.count)),
        failed: rows.iter().filter(|r| r.status == "failed").count(),
        rows,
    };
    report::write(&opts.out, &stem, &summary)?;
    Ok(summary)
}

fn overall_bar(p: &Progress, n: usize) -> indicatif::ProgressBar {
    if p.quiet {
        return indicatif::ProgressBar::hidden();
    }
    let b = indicatif::ProgressBar::with_draw_target(
        Some(n as u64),
        indicatif::ProgressDrawTarget::stderr(),
    );
    b.set_style(
        indicatif::ProgressStyle::with_template("{bar:40} {pos}/{len} districts, {eta} left")
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
    );
    b
}

/// Runs one district, never panicking out: every outcome is a row.
fn run_district(d: &District, opts: &BatchOptions) -> Row {
    let out = opts.out.join(&d.folder);
    let mut job = d.job.clone();
    job.out = out.clone();
    job.name = Some(d.name.clone());
    job.force = opts.force || opts.resume;
    let failed = |message: String| Row {
        index: d.index,
        name: d.name.clone(),
        folder: d.folder.clone(),
        status: "failed".into(),
        junctions: None,
        edges: None,
        sites: None,
        sites_joined_to_hub: None,
        plan_edges: None,
        total_cost: None,
        lower_bound: None,
        gap: None,
        error: Some(message),
        attribution: None,
    };
    if opts.resume
        && let Some(existing) = resume::up_to_date(&out, &job)
    {
        crate::export::staging::remove_stale(&out);
        return Row::from_summary(d.index, &d.name, &d.folder, "unchanged", &existing);
    }
    let quiet = Progress {
        quiet: true,
        verbose: false,
    };
    let result = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| run_plan(&job, &quiet)));
    match result {
        Ok(Ok(summary)) => {
            let v = serde_json::to_value(&summary).unwrap_or_default();
            Row::from_summary(d.index, &d.name, &d.folder, "ok", &v)
        }
        Ok(Err(e)) => failed(e.to_string()),
        Err(_) => {
            failed("internal error (a bug): the district was abandoned, nothing written".into())
        }
    }
}
