//! `reknit merge`: the shard summaries of one batch joined into `batch-summary.{json,csv}`.
//!
//! Shard summaries are only read. The merge is refused, with nothing written, unless every shard
//! `K/N` of one shard count is there, all come from the same manifest (the same batch id), and
//! their rows hold every district of the manifest exactly once.

use super::BatchError;
use super::report::{BatchSummary, Row, check_replaceable, write};
use std::collections::BTreeMap;
use std::path::Path;

/// A shard summary file: its name, its shard from the name, and its content.
struct Part {
    file: String,
    k: usize,
    n: usize,
    summary: BatchSummary,
}

/// Joins every `batch-summary-K-of-N.json` in `dir` into `batch-summary.{json,csv}`.
pub fn merge(dir: &Path) -> Result<BatchSummary, BatchError> {
    let err = |message: String| BatchError::Output {
        path: dir.to_path_buf(),
        message,
    };
    let parts = read_parts(dir)?;
    let first = &parts[0];
    let mixed: Vec<&str> = parts
        .iter()
        .filter(|p| p.n != first.n)
        .map(|p| p.file.as_str())
        .collect();
    if !mixed.is_empty() {
        return Err(err(format!(
            "shard summaries of different shard counts are mixed: {} is one of {}, but {} are not; \
             remove those of the other run",
            first.file,
            first.n,
            crate::ingest::limits::listed(&mixed)
        )));
    }
    for p in &parts {
        if p.summary.batch_id != first.summary.batch_id
            || p.summary.districts != first.summary.districts
        {
            return Err(err(format!(
                "{} and {} come from different manifests or settings (batch ids {} and {}); \
                 run every shard from the same manifest",
                first.file, p.file, first.summary.batch_id, p.summary.batch_id
            )));
        }
    }
    let missing: Vec<String> = (1..=first.n)
        .filter(|k| !parts.iter().any(|p| p.k == *k))
        .map(|k| format!("{k}/{}", first.n))
        .collect();
    if !missing.is_empty() {
        return Err(err(format!(
            "shards not yet finished: {}",
            crate::ingest::limits::listed(&missing)
        )));
    }
    let districts = first.summary.districts;
    let batch_id = first.summary.batch_id.clone();
    let mut by_index: BTreeMap<usize, &str> = BTreeMap::new();
    for p in &parts {
        for r in &p.summary.rows {
            if r.index >= districts {
                return Err(err(format!(
                    "{}: district index {} is outside the manifest's {districts} districts",
                    p.file, r.index
                )));
            }
            if let Some(other) = by_index.insert(r.index, &p.file) {
                return Err(err(format!(
                    "district {} ({:?}) is in both {other} and {}; each district belongs to one shard",
                    r.index, r.name, p.file
                )));
            }
        }
    }
    let absent: Vec<String> = (0..districts)
        .filter(|i| !by_index.contains_key(i))
        .map(|i| i.to_string())
        .collect();
    if !absent.is_empty() {
        let shown = absent
            .iter()
            .take(20)
            .cloned()
            .collect::<Vec<_>>()
            .join(", ");
        return Err(err(format!(
            "{} of {districts} districts are in no shard summary (indices {shown}{}); were the shards \
             split from the same input files?",
            absent.len(),
            if absent.len() > 20 { ", …" } else { "" }
        )));
    }
    for p in &parts {
        for r in p.summary.rows.iter().filter(|r| r.status != "failed") {
            check_on_disk(dir, &p.file, r).map_err(err)?;
        }
    }
    check_replaceable(dir, "batch-summary")?;
    let mut rows: Vec<Row> = parts.into_iter().flat_map(|p| p.summary.rows).collect();
    rows.sort_by_key(|r| r.index);
    let merged = BatchSummary {
        districts,
        cautions: super::report::cautions(),
        batch_id,
        shard: None,
        failed: rows.iter().filter(|r| r.status == "failed").count(),
        rows,
    };
    write(dir, "batch-summary", &merged)?;
    Ok(merged)
}

/// Every shard summary in `dir`, sorted by file name; each must record the shard its name says.
fn read_parts(dir: &Path) -> Result<Vec<Part>, BatchError> {
    let err = |message: String| BatchError::Output {
        path: dir.to_path_buf(),
        message,
    };
    let rd = std::fs::read_dir(dir).map_err(|e| err(format!("cannot read the folder: {e}")))?;
    let mut parts = Vec::new();
    for entry in rd.flatten() {
        let file = entry.file_name().to_string_lossy().into_owned();
        let Some((k, n)) = shard_of_name(&file) else {
            continue;
        };
        check_shard(&file, k, n).map_err(err)?;
        let text = crate::ingest::limits::read_small_text(&entry.path())
            .map_err(|e| err(format!("{file}: {e}")))?;
        let summary: BatchSummary = serde_json::from_str(&text).map_err(|e| {
            err(format!(
                "{file}: not a batch summary of this reknit version: {e}"
            ))
        })?;
        // Valid JSON by now: a name twice in a row's object would be merged silently.
        crate::ingest::members::unique(&text).map_err(|m| err(format!("{file}: {m}")))?;
        if summary.shard.as_deref() != Some(format!("{k}/{n}").as_str()) {
            return Err(err(format!(
                "{file}: records shard {} rather than the {k}/{n} of its name",
                summary.shard.as_deref().unwrap_or("none")
            )));
        }
        parts.push(Part {
            file,
            k,
            n,
            summary,
        });
    }
    if parts.is_empty() {
        return Err(err("no batch-summary-K-of-N.json files to merge".into()));
    }
    parts.sort_by(|a, b| (a.n, a.k, &a.file).cmp(&(b.n, b.k, &b.file)));
    Ok(parts)
}

/// `(K, N)` of a `batch-summary-K-of-N.json` file name.
fn shard_of_name(name: &str) -> Option<(usize, usize)> {
    let mid = name.strip_prefix("batch-summary-")?.strip_suffix(".json")?;
    let (k, n) = mid.split_once("-of-")?;
    Some((k.parse().ok()?, n.parse().ok()?))
}

/// Refuses a shard `K/N` no batch can have written: K outside 1..=N, or N beyond the bound.
fn check_shard(file: &str, k: usize, n: usize) -> Result<(), String> {
    if n == 0 || n > super::shard::MAX_SHARDS || k == 0 || k > n {
        return Err(format!(
            "{file}: shard {k}/{n} is not one a batch writes (1 ≤ K ≤ N ≤ {})",
            super::shard::MAX_SHARDS
        ));
    }
    Ok(())
}

/// Checks that a district's outputs on disk are the ones its shard summary reports: a shard
/// stopped after a district was written but before its summary was would otherwise be merged
/// with stale figures.
fn check_on_disk(dir: &Path, file: &str, r: &Row) -> Result<(), String> {
    let path = dir
        .join(&r.folder)
        .join(crate::export::staging::COMPLETE_MARKER);
    let stale = || {
        format!(
            "{file}: district {:?} reports figures that its outputs in {} no longer hold; \
             run that shard again (with --resume) before merging",
            r.name,
            dir.join(&r.folder).display()
        )
    };
    let text = std::fs::read_to_string(&path).map_err(|_| stale())?;
    let v: serde_json::Value = serde_json::from_str(&text).map_err(|_| stale())?;
    let disk = Row::from_summary(r.index, &r.name, &r.folder, &r.status, &v);
    if disk != *r {
        return Err(stale());
    }
    Ok(())
}
