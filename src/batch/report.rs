//! The batch summaries (`batch-summary.csv` and `.json`), per shard and merged.

use super::BatchError;
use crate::export::text::csv_cell;
use serde::{Deserialize, Serialize};
use std::path::Path;
use std::sync::atomic::{AtomicU64, Ordering};

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
    /// Sites joined to the hub by the plan, the hub included.
    pub sites_joined_to_hub: Option<u64>,
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
    /// The attribution the district's data asks for (its summary's `attribution`).
    #[serde(default)]
    pub attribution: Option<String>,
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
            sites_joined_to_hub: u("/sites/joined_to_hub"),
            plan_edges: u("/plan_edges"),
            total_cost: f("/total_cost"),
            lower_bound: f("/lower_bound"),
            gap: f("/gap"),
            error: None,
            attribution: s
                .pointer("/attribution")
                .and_then(|v| v.as_str())
                .map(str::to_string),
        }
    }
}

/// The whole batch summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct BatchSummary {
    /// Districts in the manifest.
    pub districts: usize,
    /// The cautions that go with every plan (second, as in each district's summary.json).
    #[serde(default = "cautions")]
    pub cautions: Vec<String>,
    /// The manifest's identity ([`super::manifest::Manifest::id`]): equal in every shard of a batch.
    pub batch_id: String,
    /// `K/N` for one shard's summary, null for a whole batch (or a merge of all shards).
    pub shard: Option<String>,
    /// Districts that failed.
    pub failed: usize,
    /// One row per district run, in manifest order.
    pub rows: Vec<Row>,
}

/// The library's cautions, owned (a batch summary is also read back when shards are merged).
pub fn cautions() -> Vec<String> {
    crate::cautions::CAUTIONS
        .iter()
        .map(|c| c.to_string())
        .collect()
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
        "sites_joined_to_hub",
        "plan_edges",
        "total_cost",
        "lower_bound",
        "gap",
        "error",
        "attribution",
        "caution",
    ])
    .map_err(|e| io(e.into()))?;
    let opt_u = |v: Option<u64>| v.map(|x| x.to_string()).unwrap_or_default();
    // A negative zero is written as 0, never "-0".
    let opt_f = |v: Option<f64>| v.map(|x| (x + 0.0).to_string()).unwrap_or_default();
    for r in &s.rows {
        w.write_record([
            r.index.to_string(),
            csv_cell(&r.name).into_owned(),
            csv_cell(&r.folder).into_owned(),
            r.status.clone(),
            opt_u(r.junctions),
            opt_u(r.edges),
            opt_u(r.sites),
            opt_u(r.sites_joined_to_hub),
            opt_u(r.plan_edges),
            opt_f(r.total_cost),
            opt_f(r.lower_bound),
            opt_f(r.gap),
            csv_cell(r.error.as_deref().unwrap_or_default()).into_owned(),
            csv_cell(r.attribution.as_deref().unwrap_or_default()).into_owned(),
            // The cautions ride on every row, so the CSV stays one table (no comment or footer
            // line a CSV reader would take for data) and a row copied or filtered alone keeps them.
            crate::cautions::SHORT.to_string(),
        ])
        .map_err(|e| io(e.into()))?;
    }
    let csv_bytes = w
        .into_inner()
        .map_err(|e| io(std::io::Error::other(e.to_string())))?;
    for (ext, bytes) in [("json", json.into_bytes()), ("csv", csv_bytes)] {
        let target = dir.join(format!("{stem}.{ext}"));
        // A name no other process (a concurrent shard) and no other write of this one uses.
        let tmp = dir.join(format!(
            ".{stem}.{ext}.{}-{}.tmp",
            std::process::id(),
            TMP_COUNT.fetch_add(1, Ordering::Relaxed)
        ));
        let done = std::fs::write(&tmp, bytes).and_then(|()| std::fs::rename(&tmp, &target));
        if let Err(e) = done {
            let _ = std::fs::remove_file(&tmp);
            return Err(io(e));
        }
    }
    Ok(())
}

static TMP_COUNT: AtomicU64 = AtomicU64::new(0);

/// The CSV header of a batch summary.
const CSV_HEADER: &str = "index,name,folder,status,";

/// Refuses to write `<stem>.json` or `<stem>.csv` into `dir` when either exists and is not a batch
/// summary (a file reknit did not write is never replaced).
pub fn check_replaceable(dir: &Path, stem: &str) -> Result<(), BatchError> {
    for ext in ["json", "csv"] {
        let p = dir.join(format!("{stem}.{ext}"));
        let meta = match std::fs::symlink_metadata(&p) {
            Ok(m) => m,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => continue,
            Err(e) => {
                return Err(BatchError::Output {
                    path: p,
                    message: e.to_string(),
                });
            }
        };
        let text = if meta.is_file() {
            crate::ingest::limits::read_small_text(&p)
                .ok()
                .map(String::into_bytes)
        } else {
            None
        };
        let ours = text.is_some_and(|t| match ext {
            "json" => serde_json::from_slice::<serde_json::Value>(&t).is_ok_and(|v| {
                v.get("districts").is_some_and(|d| d.is_u64())
                    && v.get("rows").is_some_and(|r| r.is_array())
            }),
            _ => t.starts_with(CSV_HEADER.as_bytes()),
        });
        if !ours {
            return Err(BatchError::Output {
                path: p,
                message: "exists and is not a batch summary reknit wrote; it is left as it is: \
                          move it away or choose another folder"
                    .into(),
            });
        }
    }
    Ok(())
}
