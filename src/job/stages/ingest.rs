//! Stage 1, ingest: the road and site layers read, with the notes on the defaults they took.

use crate::export::summary::Geodesy;
use crate::ingest::layers::read_layers;
use crate::ingest::roads::{LineLayer, ReadStats};
use crate::ingest::sites::{SiteLayer, read_sites};
use crate::ingest::source::InputRecord;
use crate::job::notes::{self, Notes};
use crate::job::{JobError, PlanJob, hub};
use crate::progress::Progress;

/// What reading the inputs gave.
pub(in crate::job) struct Read {
    /// The road lines, for noding.
    pub roads: LineLayer,
    /// The sites, when given.
    pub sites: Option<SiteLayer>,
    /// What the summary records of the reading.
    pub record: ReadRecord,
}

/// The reading's figures for `summary.json`, kept while the layers themselves move on.
pub(in crate::job) struct ReadRecord {
    /// Counts of the road layer.
    pub stats: ReadStats,
    /// The CRS and length method.
    pub geodesy: Geodesy,
    /// The road layer's input record (the others are added by later stages).
    pub inputs: Vec<InputRecord>,
    /// Whether the roads come from OpenStreetMap (its fields or its file), for the attribution.
    pub osm: bool,
}

/// Reads the roads and the sites (checking that a named hub is among them).
pub(in crate::job) fn read(
    job: &PlanJob,
    progress: &Progress,
    notes: &mut Notes,
) -> Result<Read, JobError> {
    let roads = {
        let _s = progress.stage("reading roads");
        read_layers(&job.road_layers(), &job.road_settings)?
    };
    let sites = match &job.sites {
        Some(src) => {
            let _s = progress.stage("reading sites");
            let sl = read_sites(src, &job.site_settings)?;
            hub::check_named(&sl, job.hub.as_deref(), &job.sites)?;
            Some(sl)
        }
        None => None,
    };
    for (reason, n) in &roads.stats.features_skipped {
        progress.note(&format!(
            "{}: skipped {n} feature(s): {reason}",
            job.roads.display_path().display()
        ));
    }
    notes::damage(
        notes,
        &roads.stats,
        &job.road_settings,
        job.zones.is_some() || job.has_reports(),
    );
    if let Some(sl) = &sites {
        notes::site_defaults(notes, sl, &job.site_settings);
    }
    let record = ReadRecord {
        stats: roads.stats.clone(),
        geodesy: Geodesy {
            input_crs: roads.crs_name.clone(),
            length_method: roads.length_method.clone(),
            output_crs: "EPSG:4326 (WGS84 longitude/latitude, RFC 7946)".into(),
            length_unit: "metre",
            note: roads.crs_note.clone(),
        },
        inputs: roads
            .input
            .iter()
            .chain(&roads.more_inputs)
            .cloned()
            .collect(),
        osm: roads.osm_fields
            || job
                .road_layers()
                .iter()
                .any(crate::ingest::attribution::osm_file),
    };
    Ok(Read {
        roads,
        sites,
        record,
    })
}
