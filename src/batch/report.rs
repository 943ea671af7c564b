//! The batch summaries (`batch-summary.csv` and `.json`), per shard and merged.

use super::BatchError;
use serde::{Deserialize, Serialize};
use std::path::Path;

/// One district's line in the batch summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Row {
    /// Position in the manifest (0-based).
    pub index: usize,
    /// District name.
    pub name: String,
    /// Output folder under the batch folder.
    pub folder: String,
    /// `ok`, `unchanged` (resumed: outputs already up to date) or `failed`.
    pub status: String,
    /// Junctions in the network.
    pub junctions: Option<u64>,
    /// Edges in the network.
    pub edges: Option<u64>,
    /// Sites read.
    pub sites: Option<u64>,
    /// Sites connected by the plan.
    pub sites_connected: Option<u64>,
    /// Edges in the plan.
    pub plan_edges: Option<u64>,
    /// Total repair cost, repair-metres.
    pub total_cost: Option<f64>,
    /// Lower bound, repair-metres.
    pub lower_bound: Option<f64>,
    /// Relative gap.
    pub gap: Option<f64>,
    /// The error message when the district failed.
    pub error: Option<String>,
}

impl Row {
    /// A row from a district's `summary.json`.
    pub fn from_summary(
        index: usize,
        name: &str,
        folder: &str,
        status: &str,
        s: &serde_json::Value,
    ) -> Row {
        let u = |p: &str| s.pointer(p).and_then(|v| v.as_u64());
        let f = |p: &str| s.pointer(p).and_then(|v| v.as_f64());
        Row {
            index,
            name: name.into(),
            folder: folder.into(),
            status: status.into(),
            junctions: u("/counts/junctions"),
            edges: u("/counts/edges"),
            sites: u("/sites/total"),
            sites_connected: u("/sites/connected"),
            plan_edges: u("/plan_edges"),
            total_cost: f("/total_cost"),
            lower_bound: f("/lower_bound"),
            gap: f("/gap"),
            error: None,
        }
    }
}

/// The whole batch summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BatchSummary {
    /// Districts in the manifest.
    pub districts: usize,
    /// `K/N` for one shard's summary, null for a whole batch (or a merge of all shards).
    pub shard: Option<String>,
    /// Districts that failed.
    pub failed: usize,
    /// One row per district run, in manifest order.
    pub rows: Vec<Row>,
}

/// Writes `<stem>.json` and `<stem>.csv` into `dir`, each through a temporary file and a rename.
pub fn write(dir: &Path, stem: &str, s: &BatchSummary) -> Result<(), BatchError> {
    let json = serde_json::to_string_pretty(s).unwrap_or_default() + "\n";
    let mut w = csv::Writer::from_writer(Vec::new());
    let io = |e: std::io::Error| BatchError::Output {
        path: dir.join(stem),
        message: e.to_string(),
    };
    w.write_record([
        "index",
        "name",
        "folder",
        "status",
        "junctions",
        "edges",
        "sites",
        "sites_connected",
        "plan_edges",
        "total_cost",
        "lower_bound",
        "gap",
        "error",
    ])
    .map_err(|e| io(e.into()))?;
    let opt_u = |v: Option<u64>| v.map(|x| x.to_string()).unwrap_or_default();
    let opt_f = |v: Option<f64>| v.map(|x| x.to_string()).unwrap_or_default();
    for r in &s.rows {
        w.write_record([
            r.index.to_string(),
            r.name.clone(),
            r.folder.clone(),
            r.status.clone(),
            opt_u(r.junctions),
            opt_u(r.edges),
            opt_u(r.sites),
            opt_u(r.sites_connected),
            opt_u(r.plan_edges),
            opt_f(r.total_cost),
            opt_f(r.lower_bound),
            opt_f(r.gap),
            r.error.clone().unwrap_or_default(),
        ])
        .map_err(|e| io(e.into()))?;
    }
    let csv_bytes = w
        .into_inner()
        .map_err(|e| io(std::io::Error::other(e.to_string())))?;
    for (ext, bytes) in [("json", json.into_bytes()), ("csv", csv_bytes)] {
        let target = dir.join(format!("{stem}.{ext}"));
        let tmp = dir.join(format!(".{stem}.{ext}.tmp"));
        std::fs::write(&tmp, bytes).map_err(io)?;
        std::fs::rename(&tmp, &target).map_err(io)?;
    }
    Ok(())
}

/// Joins every `batch-summary-K-of-N.json` in `dir` into `batch-summary.{json,csv}`.
pub fn merge(dir: &Path) -> Result<BatchSummary, BatchError> {
    let err = |message: String| BatchError::Output {
        path: dir.to_path_buf(),
        message,
    };
    let mut parts: Vec<(usize, usize, BatchSummary)> = Vec::new();
    let rd = std::fs::read_dir(dir).map_err(|e| err(format!("cannot read the folder: {e}")))?;
    for entry in rd.flatten() {
        let name = entry.file_name().to_string_lossy().into_owned();
        let Some(mid) = name
            .strip_prefix("batch-summary-")
            .and_then(|n| n.strip_suffix(".json"))
        else {
            continue;
        };
        let Some((k, n)) = mid.split_once("-of-") else {
            continue;
        };
        let (Ok(k), Ok(n)) = (k.parse::<usize>(), n.parse::<usize>()) else {
            continue;
        };
        let text =
            std::fs::read_to_string(entry.path()).map_err(|e| err(format!("{name}: {e}")))?;
        let s: BatchSummary =
            serde_json::from_str(&text).map_err(|e| err(format!("{name}: {e}")))?;
        parts.push((k, n, s));
    }
    if parts.is_empty() {
        return Err(err("no batch-summary-K-of-N.json files to merge".into()));
    }
    let n = parts[0].1;
    if parts.iter().any(|p| p.1 != n) {
        return Err(err(
            "shard summaries of different shard counts are mixed".into()
        ));
    }
    let missing: Vec<String> = (1..=n)
        .filter(|k| !parts.iter().any(|p| p.0 == *k))
        .map(|k| format!("{k}/{n}"))
        .collect();
    if !missing.is_empty() {
        return Err(err(format!(
            "shards not yet finished: {}",
            missing.join(", ")
        )));
    }
    let districts = parts[0].2.districts;
    let mut rows: Vec<Row> = parts.into_iter().flat_map(|p| p.2.rows).collect();
    rows.sort_by_key(|r| r.index);
    let merged = BatchSummary {
        districts,
        shard: None,
        failed: rows.iter().filter(|r| r.status == "failed").count(),
        rows,
    };
    write(dir, "batch-summary", &merged)?;
    Ok(merged)
}
