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
    let mut done_unmatched: Vec<(usize, String)> = Vec::new();
    for r in rows {
        match cost_of.get(r.work_order.as_str()) {
            // Finished work that names nothing would be planned again at full cost: refused below.
            None if r.done => done_unmatched.push((r.line, r.work_order)),
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
    if let Some(&(first, _)) = done_unmatched.first() {
        let listed: Vec<String> = done_unmatched
            .iter()
            .take(20)
            .map(|(l, k)| format!("line {l} `{}`", crate::ingest::limits::excerpt(k)))
            .collect();
        let more = match done_unmatched.len() > 20 {
            true => format!(" and {} more", done_unmatched.len() - 20),
            false => String::new(),
        };
        return Err(ReplanError::Finished {
            path: req.finished.clone(),
            line: first,
            message: format!(
                "{} work order(s) marked done name no work order of the previous plan {} ({}{more}): \
                 finished work that matches nothing would be planned again; correct the keys \
                 against its work-orders.csv or clear their status",
                done_unmatched.len(),
                req.previous.display(),
                listed.join(", ")
            ),
        });
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
            "roads" => !req.roads.is_empty(),
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
    if !had_roads && req.roads.is_empty() {
        return Err(prev.broken("no roads input recorded: give --roads".into()));
    }
    // Work-order keys name their layer when there are several, so a different number of layers
    // would match nothing and plan finished work again: refused.
    let recorded_roads = prev.inputs.iter().filter(|i| i.role == "roads").count();
    if !req.roads.is_empty() && req.roads.len() != recorded_roads {
        return Err(prev.broken(format!(
            "the previous plan read {recorded_roads} road layer(s) and {} were given with \
                 --roads: give --roads once per layer, in the previous plan's order, so its \
                 work-order keys match",
            req.roads.len()
        )));
    }
    if let Some((first, rest)) = req.roads.split_first() {
        o.roads = first.clone();
        o.more_roads = rest.to_vec();
    }
    forget_choices_of_other_files(req, &prev, &mut o);
    o.damage_zones = req.damage_zones.clone().or(o.damage_zones);
    super::reports_read::choose(req, &prev, &mut o)?;
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

/// Settings that choose within an input file (a GeoPackage's or a zip's layer, a CSV's separator
/// and columns) belong to that file: an input given anew keeps them only when it is the same file
/// again (the same file names, in order); else they are dropped, as replan cannot take them anew,
/// and a new file in another format would be refused for a setting it cannot use.
fn forget_choices_of_other_files(req: &Request, prev: &previous::Previous, o: &mut Options) {
    let name = |p: &std::path::Path| p.file_name().map(|n| n.to_os_string());
    let same = |role: &str, given: &[Source]| {
        let recorded = prev
            .inputs
            .iter()
            .filter(|i| i.role == role)
            .map(|i| name(std::path::Path::new(&i.path)));
        given.iter().map(|s| name(&s.display_path())).eq(recorded)
    };
    if !req.roads.is_empty() && !same("roads", &req.roads) {
        o.road.roads_layer = None;
    }
    if let Some(s) = &req.sites
        && !same("sites", std::slice::from_ref(s))
    {
        o.sites_layer = None;
        if !crate::ingest::sites::reads_as_csv(s) {
            o.sites_delimiter = None;
            o.lon_column = None;
            o.lat_column = None;
        }
    }
    if let Some(z) = &req.damage_zones
        && !same("damage zones", std::slice::from_ref(z))
    {
        o.zones_layer = None;
    }
}

/// Runs the round: [`prepare`], then the ordinary stages.
pub fn run(req: &Request, progress: &Progress) -> Result<crate::export::Summary, ReplanError> {
    let job = prepare(req).map_err(super::own_options)?;
    crate::job::run_plan(&job, progress).map_err(|e| super::own_options(e.into()))
}
