//! The fingerprint of a run: the reknit version, the digest of every input file and every setting.
//!
//! `summary.json` records it; `batch --resume` recomputes it from the inputs alone (without
//! planning) to tell whether a district's outputs are still those its inputs and settings give.

use super::PlanJob;
use crate::ingest::IngestError;
use crate::ingest::source::{HashingReader, InputRecord, Source};

/// SHA-256 over the inputs' roles and digests and the settings: equal fingerprints mean equal
/// outputs, which is how `batch --resume` knows a district is up to date.
pub fn fingerprint(inputs: &[InputRecord], settings: &serde_json::Value) -> String {
    use sha2::{Digest, Sha256};
    let mut h = Sha256::new();
    h.update(env!("CARGO_PKG_VERSION").as_bytes());
    for i in inputs {
        h.update(format!("\n{}\t{}", i.role, i.sha256).as_bytes());
    }
    h.update(b"\n");
    h.update(settings.to_string().as_bytes());
    h.finalize().iter().map(|b| format!("{b:02x}")).collect()
}

/// The place of an input role in `summary.json`'s `inputs`: roads, damage zones, damage reports,
/// sites, cost table.
pub fn role_rank(role: &str) -> u8 {
    match role {
        "roads" => 0,
        "damage zones" => 1,
        "damage reports" => 2,
        "sites" => 3,
        "finished work" => 5,
        _ => 4,
    }
}

/// Every input of a job with its role, in the order `summary.json` records them.
pub fn job_inputs(job: &PlanJob) -> Vec<(&'static str, Source)> {
    let mut v: Vec<(&'static str, Source)> = job
        .road_layers()
        .into_iter()
        .map(|s| ("roads", s))
        .collect();
    v.extend(job.zones.clone().map(|s| ("damage zones", s)));
    v.extend(
        job.earlier_reports
            .iter()
            .map(|s| ("damage reports", s.clone())),
    );
    v.extend(job.reports.clone().map(|s| ("damage reports", s)));
    v.extend(job.sites.clone().map(|s| ("sites", s)));
    v.extend(
        job.road_settings
            .cost_table_file
            .clone()
            .map(|p| ("cost table", Source::File(p))),
    );
    v.extend(
        job.field_work
            .as_ref()
            .map(|w| ("finished work", w.finished_csv.clone())),
    );
    v
}

/// Path, size and digest of one input: a Shapefile's digest covers its sidecar files too.
pub fn input_record(role: &str, src: &Source) -> Result<InputRecord, IngestError> {
    if let Some(p) = src.path()
        && p.extension().is_some_and(|e| e.eq_ignore_ascii_case("shp"))
    {
        return crate::ingest::shapefile::fingerprint(p, role);
    }
    let path = src.display_path();
    let (sha256, bytes) =
        HashingReader::finish_buffered(src.open_binary()?).map_err(|source| IngestError::Io {
            path: path.clone(),
            source,
        })?;
    Ok(InputRecord {
        role: role.into(),
        path: path.display().to_string(),
        bytes,
        sha256,
        deleted_records: 0,
    })
}

/// The fingerprint a job would record, computed by reading (and hashing) its inputs only.
pub fn job_fingerprint(job: &PlanJob) -> Result<String, IngestError> {
    let inputs = job_inputs(job)
        .iter()
        .map(|(role, src)| input_record(role, src))
        .collect::<Result<Vec<_>, _>>()?;
    Ok(fingerprint(&inputs, &super::settings_json(job)))
}
