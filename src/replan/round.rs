//! One round of a re-plan: the previous folder and the crews' sheet turned into the job.

use super::{FieldWork, ReplanError, Request, UnmatchedRow, finished, previous, restore};
use crate::ingest::source::Source;
use crate::job::{Options, PlanJob};
use crate::progress::Progress;
use std::collections::{BTreeMap, BTreeSet};
use std::path::PathBuf;
use std::sync::Arc;

/// Reads the previous folder and the sheet and builds the round's job.
pub fn prepare(req: &Request) -> Result<PlanJob, ReplanError> {
    let prev = previous::read(&req.previous)?;
    let text = crate::ingest::limits::read_small_text(&req.finished).map_err(|e| {
        ReplanError::Finished {
            path: req.finished.clone(),
            line: 0,
            message: format!("cannot read: {e} (save the sheet as CSV UTF-8)"),
        }
    })?;
    let rows = finished::read(&req.finished, &text)?;
    let cost_of: BTreeMap<&str, f64> = prev
        .plan
        .iter()
        .chain(&prev.backup)
        .map(|p| (p.key.as_str(), p.cost_m))
        .collect();
    let (mut done, mut started, mut unmatched) = (BTreeSet::new(), BTreeSet::new(), Vec::new());
    let mut finished_m = 0.0;
    for r in rows {
        match cost_of.get(r.work_order.as_str()) {
            None => unmatched.push(UnmatchedRow {
                line: r.line,
                work_order: r.work_order,
            }),
            Some(c) if r.done => {
                finished_m += c;
                done.insert(r.work_order);
            }
            Some(_) => {
                started.insert(r.work_order);
            }
        }
    }
    let finished_this_round = done.len();
    done.extend(prev.finished_to_date.iter().cloned());
    let mut o = Options::new(Source::File(PathBuf::new()), req.out.clone());
    restore::settings(&prev, &mut o)?;
    if let Some(f) = req.output_format {
        o.output_format = f;
    }
    let mut had_roads = false;
    let mut roads_seen = false;
    let had_sites = prev.inputs.iter().any(|i| i.role == "sites");
    for rec in &prev.inputs {
        let anew = match rec.role.as_str() {
            "roads" => req.roads.is_some(),
            "damage zones" => req.damage_zones.is_some(),
            "sites" => req.sites.is_some(),
            "damage reports" | "cost table" => false,
            "finished work" => true,
            other => {
                return Err(prev.broken(format!(
                    "input role `{other}` is not known to this version of reknit"
                )));
            }
        };
        had_roads |= rec.role == "roads";
        if anew {
            continue;
        }
        let src = restore::input(&prev, rec)?;
        match rec.role.as_str() {
            // The first roads input recorded is the first layer; any more are the others.
            "roads" if !roads_seen => {
                roads_seen = true;
                o.roads = src
            }
            "roads" => o.more_roads.push(src),
            "damage zones" => o.damage_zones = Some(src),
            "sites" => o.sites = Some(src),
            "damage reports" => o.earlier_damage_points.push(src),
            _ => o.road.cost_table = src.path().map(PathBuf::from),
        }
    }
    if !had_roads && req.roads.is_none() {
        return Err(prev.broken("no roads input recorded: give --roads".into()));
    }
    if let Some(r) = &req.roads {
        o.roads = r.clone();
        o.more_roads.clear();
    }
    o.damage_zones = req.damage_zones.clone().or(o.damage_zones);
    o.damage_points = req.damage_points.clone();
    if req.sites.is_some() {
        o.sites = req.sites.clone();
        // The previous whole-network plan's algorithm means nothing to a sites plan.
        if !had_sites && !o.whole_network {
            o.mst = None;
        }
    }
    o.force = req.force;
    o.field_work = Some(Arc::new(FieldWork {
        previous_dir: req.previous.clone(),
        previous_fingerprint: prev.fingerprint.clone(),
        finished_csv: Source::File(req.finished.clone()),
        finished: done,
        finished_this_round,
        started,
        old_plan: prev.plan.clone(),
        old_sites: prev.sites.clone(),
        history: prev.history.clone(),
        label: req.label.clone(),
        finished_repair_m: finished_m,
        rows_matching_nothing: unmatched,
    }));
    Ok(crate::job::build(&o)?)
}

/// Runs the round: [`prepare`], then the ordinary stages.
pub fn run(req: &Request, progress: &Progress) -> Result<crate::export::Summary, ReplanError> {
    let job = prepare(req)?;
    Ok(crate::job::run_plan(&job, progress)?)
}
