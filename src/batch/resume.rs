//! `--resume`: which districts already hold the outputs their inputs and settings give.

use crate::export::staging::{COMPLETE_MARKER, OUTPUT_NAMES};
use crate::job::{PlanJob, job_fingerprint};
use std::path::Path;

/// The existing summary when the district's output set is complete (every file its `summary.json`
/// lists is there) and was made from the same inputs (every file, a Shapefile's sidecars too) and
/// settings; `None` means the district runs again.
pub fn up_to_date(out: &Path, job: &PlanJob) -> Option<serde_json::Value> {
    let text = crate::ingest::limits::read_small_text(&out.join(COMPLETE_MARKER)).ok()?;
    let v: serde_json::Value = serde_json::from_str(&text).ok()?;
    let listed = v.get("outputs")?.as_array()?;
    let complete = !listed.is_empty()
        && listed.iter().all(|n| {
            n.as_str().is_some_and(|n| {
                OUTPUT_NAMES.contains(&n)
                    && std::fs::symlink_metadata(out.join(n)).is_ok_and(|m| m.is_file())
            })
        });
    let recorded = v.get("fingerprint")?.as_str()?;
    (complete && job_fingerprint(job).ok()? == recorded).then_some(v)
}
