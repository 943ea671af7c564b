//! `reknit replan`: the next round of an operation, from a previous plan's folder, the
//! work-order sheet crews handed back and any damage, zones, sites or roads given anew.
//!
//! [`prepare`] turns the previous folder ([`previous`]) and the sheet ([`finished`]) into the
//! options of an ordinary run ([`restore`]) plus the [`FieldWork`] the stages read: the network
//! stage marks finished repairs intact ([`carry`]), the plan stage keeps started repairs and
//! starts from the previous plan ([`warm`]), the layers stage writes the [`changes`] and the
//! [`history`]. The previous folder is only read.

pub mod carry;
pub mod changes;
pub mod finished;
pub mod history;
pub mod previous;
pub mod restore;
pub mod warm;

use crate::ingest::source::Source;
use crate::job::{JobError, Options, PlanJob};
use crate::progress::Progress;
use previous::OldPiece;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet};
use std::path::PathBuf;
use std::sync::Arc;

/// Any error of a re-plan.
#[derive(Debug, thiserror::Error)]
pub enum ReplanError {
    /// The previous folder is missing something or holds what reknit did not write.
    #[error("{path}: {message}")]
    Previous {
        /// The file concerned.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
    /// A line of the finished-work sheet cannot be used.
    #[error("{path}: line {line}: {message}")]
    Finished {
        /// The sheet.
        path: PathBuf,
        /// Its line (the header is 1).
        line: usize,
        /// What is wrong.
        message: String,
    },
    /// An input of the previous run cannot be found as it was.
    #[error("the previous plan's {role} input {path}: {message}")]
    Input {
        /// Its role.
        role: String,
        /// Its path as recorded.
        path: String,
        /// What is wrong and what to do.
        message: String,
    },
    /// The options of the new round were refused.
    #[error(transparent)]
    Setting(#[from] crate::ingest::IngestError),
    /// The run itself failed.
    #[error(transparent)]
    Job(#[from] JobError),
}

impl previous::Previous {
    /// An error about this folder's `summary.json`.
    pub fn broken(&self, message: String) -> ReplanError {
        ReplanError::Previous {
            path: self.dir.join("summary.json"),
            message,
        }
    }
}

/// What the user asks of a re-plan.
#[derive(Debug, Clone)]
pub struct Request {
    /// The previous plan's folder.
    pub previous: PathBuf,
    /// The work-order sheet crews handed back.
    pub finished: PathBuf,
    /// The new output folder.
    pub out: PathBuf,
    /// Replace outputs already in `out`.
    pub force: bool,
    /// A road layer given anew.
    pub roads: Option<Source>,
    /// Damage points found since, added to the earlier ones.
    pub damage_points: Option<Source>,
    /// Damage zones given anew, replacing the earlier ones.
    pub damage_zones: Option<Source>,
    /// Sites given anew, replacing the earlier ones.
    pub sites: Option<Source>,
    /// The round's label (a date, a shift), written in the history.
    pub label: Option<String>,
}

/// A CSV line whose work order names no piece of the previous plan or its backup links.
#[derive(Debug, Clone, Serialize)]
pub struct UnmatchedRow {
    /// Its line in the sheet (the header is 1).
    pub line: usize,
    /// The key written there.
    pub work_order: String,
}

/// What crews did since the previous plan, and that plan: what the stages of a re-plan read.
#[derive(Debug, Clone)]
pub struct FieldWork {
    /// The previous folder (read, never written).
    pub previous_dir: PathBuf,
    /// The previous summary's fingerprint.
    pub previous_fingerprint: String,
    /// The sheet read.
    pub finished_csv: Source,
    /// Keys of the repairs finished to date (this round's and every earlier round's).
    pub finished: BTreeSet<String>,
    /// How many of them this round's sheet reports.
    pub finished_this_round: usize,
    /// Keys of the started repairs.
    pub started: BTreeSet<String>,
    /// The previous plan's pieces.
    pub old_plan: Vec<OldPiece>,
    /// The previous plan's sites: joined to the hub or not.
    pub old_sites: BTreeMap<String, bool>,
    /// Rounds so far.
    pub history: Vec<history::Round>,
    /// This round's label.
    pub label: Option<String>,
    /// Repair-metres finished, at the previous plan's costs.
    pub finished_repair_m: f64,
    /// Sheet lines naming nothing in the previous plan: listed, never guessed.
    pub rows_matching_nothing: Vec<UnmatchedRow>,
}

/// `summary.json` `replan`: what this round took from the previous one.
#[derive(Debug, Clone, Serialize)]
pub struct ReplanFigures {
    /// The previous folder as given.
    pub previous_folder: String,
    /// The previous summary's fingerprint.
    pub previous_fingerprint: String,
    /// This round's number.
    pub round: u32,
    /// Repairs this round's sheet reports finished.
    pub finished_repairs: usize,
    /// Their repair-metres at the previous plan's costs.
    pub finished_repair_m: f64,
    /// Keys of the started repairs kept in the plan at full cost.
    pub started_repairs: Vec<String>,
    /// Finished repairs now damaged again (a point given anew on them, or closed): not intact.
    pub finished_damaged_again: Vec<String>,
    /// Sheet lines whose work order names nothing in the previous plan.
    pub rows_matching_nothing: Vec<UnmatchedRow>,
    /// Keys of the previous plan or of the sheet that name no piece of the new network (a road
    /// layer given anew): listed, never guessed.
    pub keys_matching_nothing: Vec<String>,
    /// Keys of every repair finished to date, sorted: the next round keeps them intact.
    pub finished_to_date: Vec<String>,
    /// Changes by code, as in `changes.geojson`.
    pub changes: BTreeMap<&'static str, usize>,
}

/// Reads the previous folder and the sheet and builds the round's job.
pub fn prepare(req: &Request) -> Result<PlanJob, ReplanError> {
    let prev = previous::read(&req.previous)?;
    let text = crate::ingest::limits::read_small_text(&req.finished).map_err(|e| ReplanError::Finished {
        path: req.finished.clone(),
        line: 0,
        message: format!("cannot read: {e} (save the sheet as CSV UTF-8)"),
    })?;
    let rows = finished::read(&req.finished, &text)?;
    let cost_of: BTreeMap<&str, f64> = prev.plan.iter().chain(&prev.backup).map(|p| (p.key.as_str(), p.cost_m)).collect();
    let (mut done, mut started, mut unmatched) = (BTreeSet::new(), BTreeSet::new(), Vec::new());
    let mut finished_m = 0.0;
    for r in rows {
        match cost_of.get(r.work_order.as_str()) {
            None => unmatched.push(UnmatchedRow { line: r.line, work_order: r.work_order }),
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
    let mut had_roads = false;
    let had_sites = prev.inputs.iter().any(|i| i.role == "sites");
    for rec in &prev.inputs {
        let anew = match rec.role.as_str() {
            "roads" => req.roads.is_some(),
            "damage zones" => req.damage_zones.is_some(),
            "sites" => req.sites.is_some(),
            "damage reports" | "cost table" => false,
            "finished work" => true,
            other => return Err(prev.broken(format!("input role `{other}` is not known to this version of reknit"))),
        };
        had_roads |= rec.role == "roads";
        if anew {
            continue;
        }
        let src = restore::input(&prev, rec)?;
        match rec.role.as_str() {
            "roads" => o.roads = src,
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
