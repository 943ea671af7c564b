//! One district's run from inputs to outputs: ingest → network → plan → layers.
//!
//! The command line and the batch runner make a [`PlanJob`] with [`settings::build`] (every
//! option checked once) and call [`run_plan`]; it owns the order of the stages, each in
//! `stages/`. [`summary`] turns the stages' results into `summary.json`.

mod budget;
pub mod check;
mod corridors;
pub mod fingerprint;
mod hub;
mod joined;
pub mod needs;
mod notes;
pub mod options;
pub mod record;
mod resilience;
mod rows;
mod schedule;
pub mod settings;
mod stages;
pub mod status;
pub mod summary;

pub use fingerprint::{fingerprint, job_fingerprint};
pub use joined::SiteReach;
pub use options::{Options, ReportOptions, RoadOptions};
pub use record::settings_json;
pub use settings::build;
pub use status::SiteStatus;

use crate::export::{self, ExportError, Summary};
use crate::ingest::attach::Attachment;
use crate::ingest::sites::{SiteLayer, SiteSettings};
use crate::ingest::source::Source;
use crate::ingest::{IngestError, RoadSettings};
use crate::progress::Progress;
use crate::solve::site_plan::SitePlan;
use crate::solve::steiner::Effort;
use crate::solve::{MstAlgorithm, SolveError};
use notes::Notes;
use std::path::PathBuf;

/// Largest attachment distance accepted, metres.
pub const MAX_ATTACH_LIMIT_M: f64 = 10_000.0;

/// Everything one planning run needs, checked and typed: made only by [`settings::build`].
#[derive(Debug, Clone)]
pub struct PlanJob {
    /// The road centerline layer.
    pub roads: Source,
    /// Further road layers, read into the same network (`--roads` given more than once).
    pub more_roads: Vec<Source>,
    /// The critical sites, when the plan should join sites rather than the whole network.
    pub sites: Option<Source>,
    /// Output folder.
    pub out: PathBuf,
    /// Replace outputs already in `out`.
    pub force: bool,
    /// Reading and noding settings.
    pub road_settings: RoadSettings,
    /// Reading settings for sites.
    pub site_settings: SiteSettings,
    /// Largest distance from a site to the road it attaches to, metres.
    pub max_attach_m: f64,
    /// The hub (depot) site's id; default the site with the highest priority.
    pub hub: Option<String>,
    /// Plan the whole network even when sites are given.
    pub whole_network: bool,
    /// Minimum spanning forest algorithm.
    pub mst: MstAlgorithm,
    /// Effort spent on the sites plan.
    pub effort: Effort,
    /// Wall-clock seconds the exact search may run (`--time-limit`), in place of its step budget:
    /// an explicit opt-out of deterministic plans.
    pub time_limit_s: Option<f64>,
    /// Damage zones (polygons with a damage each).
    pub zones: Option<Source>,
    /// How a zone's damage is read.
    pub zone_damage: crate::ingest::damage::DamageRule,
    /// The zones layer's CRS as EPSG:NNNN (default WGS84 lon/lat).
    pub zones_crs: Option<String>,
    /// The layer of a GeoPackage damage-zones file (`--zones-layer`).
    pub zones_layer: Option<String>,
    /// Field damage reports (points), each applied to the nearest road.
    pub reports: Option<Source>,
    /// How a field report's damage is read (`--damage-points-field`).
    pub report_damage: crate::ingest::damage::DamageRule,
    /// How the field reports layers are read (`--damage-points-crs`, `-delimiter`, `-layer`).
    pub report_settings: crate::ingest::reports::ReportSettings,
    /// Largest distance from a field report to the road it is matched to, metres.
    pub point_match_distance_m: f64,
    /// Repair-metres a crew completes per day; spreads the repairs over crews and days (none without it).
    pub crew_capacity: Option<f64>,
    /// Crews working side by side (1 without `--crews`).
    pub crews: u32,
    /// Corridors longer than this multiple of the undamaged trip are flagged and offered further
    /// repairs.
    pub max_detour: Option<f64>,
    /// The district's name (pictures and reports); default: the road file's name.
    pub name: Option<String>,
    /// Most repair-metres to spend: when the sites plan costs more, the sites giving the most
    /// priority per repair-metre are joined first, within the budget.
    pub budget: Option<f64>,
    /// Plan backup links so every site survives any single road failure (sites plans only).
    pub redundancy: bool,
    /// Damage points of earlier rounds of a re-plan, applied before the finished work; `reports`
    /// then holds only points given anew.
    pub earlier_reports: Vec<Source>,
    /// How each of `earlier_reports` is read (as its own round read it); empty: with
    /// `report_settings`.
    pub earlier_report_settings: Vec<crate::ingest::reports::ReportSettings>,
    /// What crews did since the previous plan (a re-plan only).
    pub field_work: Option<std::sync::Arc<crate::replan::FieldWork>>,
    /// The format of the map layers (`--output-format`).
    pub output_format: crate::export::sink::OutputFormat,
    /// Proof that [`settings::build`] made this job: no other code can.
    _checked: Checked,
}

/// A value only [`settings::build`] can make, so every [`PlanJob`] has passed its checks.
#[derive(Debug, Clone)]
struct Checked(());

impl PlanJob {
    /// Every road layer, the first one first.
    pub fn road_layers(&self) -> Vec<Source> {
        std::iter::once(self.roads.clone())
            .chain(self.more_roads.iter().cloned())
            .collect()
    }

    /// True when any damage points are read (given now or in an earlier round).
    pub fn has_reports(&self) -> bool {
        self.reports.is_some() || !self.earlier_reports.is_empty()
    }

    /// Every file the run reads, for the output guard: layers, sidecars' folders and the cost table.
    pub fn input_paths(&self) -> Vec<export::guard::InputPath<'_>> {
        std::iter::once(&self.roads)
            .chain(&self.more_roads)
            .chain(
                [&self.sites, &self.zones, &self.reports]
                    .into_iter()
                    .flatten()
                    .chain(&self.earlier_reports),
            )
            .chain(self.field_work.as_ref().map(|w| &w.finished_csv))
            .filter_map(|s| s.path())
            .chain(self.road_settings.cost_table_file.as_deref())
            .map(export::guard::InputPath::File)
            // The previous plan's folder is read as a whole and never written to.
            .chain(
                self.field_work
                    .as_ref()
                    .map(|w| export::guard::InputPath::Folder(&w.previous_dir)),
            )
            .collect()
    }
}

/// Any error of a run, by stage.
#[derive(Debug, thiserror::Error)]
pub enum JobError {
    /// Reading or noding failed.
    #[error(transparent)]
    Ingest(#[from] IngestError),
    /// Solving failed.
    #[error(transparent)]
    Solve(#[from] SolveError),
    /// Writing outputs failed.
    #[error(transparent)]
    Export(#[from] ExportError),
}

/// What the sites stage produced, for the summary and the sites layer.
pub struct SitesResult {
    /// The sites read.
    pub layer: SiteLayer,
    /// One attachment per site.
    pub attachments: Vec<Attachment>,
    /// Index of the hub site (None only when there are no sites).
    pub hub: Option<usize>,
    /// The sites plan (None for a whole-network plan).
    pub plan: Option<SitePlan>,
    /// What the final plan joins to the hub: the one definition of "joined" every output reads.
    pub reach: SiteReach,
    /// Each site's status and, when not joined to the hub, the reason.
    pub statuses: Vec<SiteStatus>,
    /// True when `--budget` cut the plan down: no bound applies to the plan then.
    pub budget_applied: bool,
}

/// Runs the whole pipeline and returns the summary that was written.
pub fn run_plan(job: &PlanJob, progress: &Progress) -> Result<Summary, JobError> {
    let out = export::guard::check_out(&job.out, &job.input_paths())?;
    export::staging::preflight(&out, job.force)?;
    let mut notes = Notes::default();
    let read = stages::ingest::read(job, progress, &mut notes)?;
    let built = stages::network::build(job, read.roads, read.sites.as_ref(), progress, &mut notes)?;
    let planned = stages::plan::plan(job, built, read.sites, progress, &mut notes)?;
    stages::layers::write(job, &out, read.record, planned, notes, progress)
}
