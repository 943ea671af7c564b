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
mod previous_gpkg;
mod reports_read;
pub mod restore;
mod round;
pub mod warm;

pub use round::{prepare, run};

use crate::ingest::source::Source;
use crate::job::JobError;
use previous::OldPiece;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet};
use std::path::PathBuf;

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
    /// A message of the run that names options only `reknit plan` has, with what that means here.
    #[error("{0}")]
    PlanOptions(String),
}

/// The options of `reknit replan` (src/cli/replan.rs and its output options; tests/bad_low.rs
/// checks the list against `reknit replan --help`).
pub const OPTIONS: &[&str] = &[
    "--finished",
    "--out",
    "--damage-points",
    "--damage-points-crs",
    "--damage-points-delimiter",
    "--damage-points-layer",
    "--damage-points-lon-column",
    "--damage-points-lat-column",
    "--damage-zones",
    "--sites",
    "--roads",
    "--label",
    "--force",
    "--quiet",
    "--verbose",
    "--output-format",
    "--help",
];

/// Messages from the stages a re-plan shares with `reknit plan` advise plan's options; a re-plan
/// reads its settings from the previous folder, so such a message says so and how to change them.
fn own_options(e: ReplanError) -> ReplanError {
    if !matches!(e, ReplanError::Setting(_) | ReplanError::Job(_)) {
        return e;
    }
    let message = e.to_string();
    let mut foreign: Vec<&str> = Vec::new();
    let mut rest = message.as_str();
    while let Some(at) = rest.find("--") {
        let tail = &rest[at..];
        let end = 2 + tail[2..]
            .find(|c: char| !(c.is_ascii_lowercase() || c == '-'))
            .unwrap_or(tail.len() - 2);
        let option = tail[..end].trim_end_matches('-');
        if option.len() > 2 && !OPTIONS.contains(&option) && !foreign.contains(&option) {
            foreign.push(option);
        }
        rest = &tail[end.max(2)..];
    }
    if foreign.is_empty() {
        return e;
    }
    ReplanError::PlanOptions(format!(
        "{message} ({} {} of reknit plan: a re-plan keeps the settings recorded in the \
         previous plan's summary.json; to change them, run reknit plan again)",
        foreign.join(", "),
        if foreign.len() == 1 {
            "is an option"
        } else {
            "are options"
        },
    ))
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
    /// The road layers given anew (none: the recorded ones); as many as the previous plan read.
    pub roads: Vec<Source>,
    /// Damage points found since, added to the earlier ones.
    pub damage_points: Option<Source>,
    /// How `damage_points` is read (`--damage-points-crs`, `-delimiter`, `-layer`,
    /// `-lon-column`, `-lat-column` given anew); an option not given keeps the recorded one.
    pub damage_points_read: crate::job::ReportOptions,
    /// Damage zones given anew, replacing the earlier ones.
    pub damage_zones: Option<Source>,
    /// Sites given anew, replacing the earlier ones.
    pub sites: Option<Source>,
    /// The round's label (a date, a shift), written in the history.
    pub label: Option<String>,
    /// The format of the map layers; `None` keeps the previous plan's.
    pub output_format: Option<crate::export::sink::OutputFormat>,
}

/// A CSV line whose work order names no piece of the previous plan or its backup links (a line
/// marked done that names nothing is refused; a started one is listed).
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
    /// Sheet lines marked started whose work order names nothing in the previous plan (a line
    /// marked done that names nothing stops the run).
    pub rows_matching_nothing: Vec<UnmatchedRow>,
    /// Keys of the previous plan or of the sheet that name no piece of the new network (a road
    /// layer given anew): listed, never guessed.
    pub keys_matching_nothing: Vec<String>,
    /// Keys of every repair finished to date, sorted: the next round keeps them intact.
    pub finished_to_date: Vec<String>,
    /// Changes by code, as in `changes.geojson`.
    pub changes: BTreeMap<&'static str, usize>,
}

#[cfg(test)]
mod own_options_tests {
    use super::*;

    #[test]
    fn plan_options_in_a_message_are_explained() {
        let e = ReplanError::Setting(crate::ingest::IngestError::Crs {
            path: "roads.shp".into(),
            message: "has no .prj file beside it: give the layer's CRS with --crs EPSG:NNNN; \
                      or --sites and --crs again"
                .into(),
        });
        let m = own_options(e).to_string();
        assert!(m.contains("(--crs is an option of reknit plan"), "{m}");
        assert!(!m.contains("--sites is"), "{m}");
        let ok = ReplanError::Setting(crate::ingest::IngestError::Crs {
            path: "z".into(),
            message: "give --damage-zones anew".into(),
        });
        assert!(matches!(own_options(ok), ReplanError::Setting(_)));
    }
}
