//! Stage 4, layers: `summary.json` assembled from every stage's results, and all outputs written
//! at once.

use super::ingest::ReadRecord;
use super::plan::Planned;
use crate::export::guard::CheckedOut;
use crate::export::summary::round3;
use crate::export::{self, Summary};
use crate::ingest::source::Source;
use crate::job::notes::Notes;
use crate::job::{JobError, PlanJob, fingerprint, rows, summary};
use crate::progress::Progress;
use crate::replan::{ReplanFigures, changes, history};

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
    if let Some(w) = &job.field_work {
        inputs.push(fingerprint::input_record("finished work", &w.finished_csv)?);
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
    summary.days = summary::days(net, &p.built.keys, &p.steps, sites, job.crew_capacity);
    summary.corridors = p.corridors.as_ref().map(|c| c.figures.clone());
    summary.single_failures = p.single_failures.as_ref().map(|f| f.figures.clone());
    summary.backup = p.backup.as_ref().map(|b| b.figures.clone());
    summary.counts.damage_zones = p.built.zone_figures.0;
    summary.counts.edges_in_zones = p.built.zone_figures.1;
    summary.damage_reports = p.built.report_figures.clone();
    summary.notes = notes.into_vec();
    summary.attribution =
        crate::ingest::attribution::attribution(job.road_settings.attribution.as_deref(), read.osm);
    summary.structures = Some(export::structures::figures(
        net,
        &p.built.keys,
        &p.plan.edges,
        &p.backup
            .as_ref()
            .map_or_else(Vec::new, |b| b.rows.iter().map(|r| r.edge).collect()),
        job.road_settings.structure_field.as_deref(),
    ));
    let rows = sites.map(rows::site_rows);
    summary.outputs = export::output_names(
        job.output_format,
        rows.is_some(),
        p.single_failures.is_some(),
        p.backup.is_some(),
        p.corridors.is_some(),
    );
    let site_ids: Vec<String> = sites
        .map(|r| r.layer.sites.iter().map(|s| s.id.clone()).collect())
        .unwrap_or_default();
    let changes = replan_round(job, &p, &site_ids, &mut summary);
    let title = job.name.clone().unwrap_or_else(|| {
        job.roads
            .display_path()
            .file_stem()
            .map(|s| s.to_string_lossy().into_owned())
            .unwrap_or_default()
    });
    let marks = rows::marks(rows.as_deref().unwrap_or_default());
    {
        let _s = progress.stage("writing outputs");
        export::write_outputs(
            out,
            job.force,
            &export::Outputs {
                net,
                keys: &p.built.keys,
                comps: &p.comps,
                plan: &p.plan,
                sites: rows.as_deref(),
                qa: &p.built.noding.qa_points,
                steps: &p.steps,
                single_failures: p.single_failures.as_ref(),
                backup: p.backup.as_ref(),
                corridors: p.corridors.as_ref(),
                changes: changes.as_ref(),
                title: &title,
                marks: &marks,
                zones: &p.built.zone_rings,
                scheduled: job.crew_capacity.is_some(),
                budget: job.budget,
                site_ids: &site_ids,
                summary: &summary,
                format: job.output_format,
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

/// A re-plan's part of the outputs: the history (round 1 alone for a first plan), and for a
/// re-plan the changes layer and `summary.json` `replan`.
fn replan_round<'a>(
    job: &PlanJob,
    p: &'a Planned,
    site_ids: &'a [String],
    summary: &mut Summary,
) -> Option<changes::Changes<'a>> {
    let total = summary.total_cost;
    let (Some(w), Some(c)) = (job.field_work.as_deref(), p.built.carried.as_ref()) else {
        summary.history = history::first(total);
        return None;
    };
    summary.history = history::next(&w.history, w.label.as_deref(), w.finished_repair_m, total);
    let sites = p.sites.as_ref().map(|r| changes::SitesNow {
        ids: site_ids,
        pos: r.layer.sites.iter().map(|s| s.pos).collect(),
        joined: &r.reach.joined,
    });
    let found = changes::find(&p.built.net, &p.plan.edges, c, sites, &w.old_sites);
    let net = &p.built.net;
    let ids = &p.built.keys;
    let keys = |edges: &[u32]| edges.iter().map(|&e| ids.key(net, e)).collect::<Vec<_>>();
    let mut missing = c.missing.clone();
    missing.retain(|k| !w.rows_matching_nothing.iter().any(|r| &r.work_order == k));
    summary.replan = Some(ReplanFigures {
        previous_folder: w.previous_dir.display().to_string(),
        previous_fingerprint: w.previous_fingerprint.clone(),
        round: summary.history.last().map_or(1, |r| r.round),
        finished_repairs: w.finished_this_round,
        finished_repair_m: round3(w.finished_repair_m),
        started_repairs: keys(&c.started),
        finished_damaged_again: keys(&c.damaged_again),
        rows_matching_nothing: w.rows_matching_nothing.clone(),
        keys_matching_nothing: missing,
        finished_to_date: w.finished.iter().cloned().collect(),
        changes: found.counts(),
    });
    // The changes layer is a file of its own in GeoJSON, a table of layers.gpkg otherwise.
    let geojson = job.output_format == export::sink::OutputFormat::GeoJson;
    let listed = std::mem::take(&mut summary.outputs);
    summary.outputs = export::staging::OUTPUT_NAMES
        .iter()
        .copied()
        .filter(|n| (*n == "changes.geojson" && geojson) || listed.contains(n))
        .collect();
    Some(found)
}
