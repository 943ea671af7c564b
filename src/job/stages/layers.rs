//! Stage 4, layers: `summary.json` assembled from every stage's results, and all outputs written
//! at once.

use super::ingest::ReadRecord;
use super::plan::Planned;
use crate::export::guard::CheckedOut;
use crate::export::{self, Summary};
use crate::ingest::source::Source;
use crate::job::notes::Notes;
use crate::job::{JobError, PlanJob, fingerprint, rows, summary};
use crate::progress::Progress;

/// Builds the summary, writes every output into `out`, and prints the notes.
pub(in crate::job) fn write(
    job: &PlanJob,
    out: &CheckedOut,
    read: ReadRecord,
    p: Planned,
    notes: Notes,
    progress: &Progress,
) -> Result<Summary, JobError> {
    let mut inputs = read.inputs;
    inputs.extend(p.built.inputs.iter().cloned());
    if let Some(f) = &job.road_settings.cost_table_file {
        inputs.push(fingerprint::input_record(
            "cost table",
            &Source::File(f.clone()),
        )?);
    }
    // Inputs are recorded in one order (roads, zones, reports, sites, cost table).
    inputs.sort_by_key(|i| fingerprint::role_rank(&i.role));
    let net = &p.built.net;
    let sites = p.sites.as_ref();
    let mut summary = summary::build(
        job,
        inputs,
        read.geodesy,
        &read.stats,
        &p.built.noding,
        net,
        &p.comps,
        &p.plan,
        sites,
    );
    summary.phases = summary::phases(&p.graph, &p.steps, sites);
    summary.fragility = p.fragile.as_ref().map(|f| f.figures.clone());
    summary.backup = p.backup.as_ref().map(|b| b.figures.clone());
    summary.counts.damage_zones = p.built.zone_figures.0;
    summary.counts.edges_in_zones = p.built.zone_figures.1;
    summary.damage_reports = p.built.report_figures.clone();
    summary.notes = notes.into_vec();
    summary.attribution =
        crate::ingest::attribution::attribution(job.road_settings.attribution.as_deref(), read.osm);
    summary.structures = Some(export::structures::figures(
        net,
        &p.plan.edges,
        &p.backup
            .as_ref()
            .map_or_else(Vec::new, |b| b.rows.iter().map(|r| r.edge).collect()),
        job.road_settings.structure_field.as_deref(),
    ));
    let rows = sites.map(rows::site_rows);
    summary.outputs = export::output_names(rows.is_some(), p.fragile.is_some(), p.backup.is_some());
    let title = job.name.clone().unwrap_or_else(|| {
        job.roads
            .display_path()
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default()
    });
    let marks = rows::marks(rows.as_deref().unwrap_or_default());
    let site_ids: Vec<String> = sites
        .map(|r| r.layer.sites.iter().map(|s| s.id.clone()).collect())
        .unwrap_or_default();
    {
        let _s = progress.stage("writing outputs");
        export::write_outputs(
            out,
            job.force,
            &export::Outputs {
                net,
                comps: &p.comps,
                plan: &p.plan,
                sites: rows.as_deref(),
                qa: &p.built.noding.qa_points,
                steps: &p.steps,
                fragility: p.fragile.as_ref(),
                backup: p.backup.as_ref(),
                title: &title,
                marks: &marks,
                zones: &p.built.zone_rings,
                scheduled: job.crew_capacity.is_some(),
                budget: job.budget,
                site_ids: &site_ids,
                summary: &summary,
            },
        )?;
    }
    for n in &summary.notes {
        progress.note(&format!(
            "note: {}",
            crate::export::text::terminal(&n.message)
        ));
    }
    Ok(summary)
}
