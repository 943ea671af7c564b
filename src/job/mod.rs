//! One district's run from inputs to outputs: ingest → network → plan → layers.
//!
//! The command line (and the batch runner) call [`run_plan`]; it owns the order of the stages.
//! [`summary`] turns the stages' results into `summary.json`.

mod budget;
pub mod check;
pub mod fingerprint;
mod hub;
mod joined;
mod notes;
mod resilience;
mod rows;
mod schedule;
pub mod settings;
pub mod status;
pub mod summary;

pub use fingerprint::{fingerprint, job_fingerprint};
pub use joined::SiteReach;
pub use settings::{settings_json, validate};
pub use status::SiteStatus;

use notes::Notes;
use resilience::{backup_plan, fragility_report};
use schedule::schedule;

use crate::export::{self, ExportError, Summary};
use crate::ingest::attach::{Attachment, attach_sites};
use crate::ingest::sites::{SiteLayer, SiteSettings, read_sites};
use crate::ingest::source::Source;
use crate::ingest::{self, IngestError, RoadSettings};
use crate::network::cost_to_repair_metres;
use crate::progress::Progress;
use crate::solve::site_plan::{SitePlan, plan_sites};
use crate::solve::steiner::Effort;
use crate::solve::{self, MstAlgorithm, Plan, PlanKind, SolveError};
use std::path::PathBuf;

/// Largest attachment distance accepted, metres.
pub const MAX_ATTACH_LIMIT_M: f64 = 10_000.0;

/// Everything one planning run needs.
#[derive(Debug, Clone)]
pub struct PlanJob {
    /// The road centerline layer.
    pub roads: Source,
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
    /// Damage zones (polygons with a damage each).
    pub zones: Option<Source>,
    /// How a zone's damage is read.
    pub zone_damage: crate::ingest::damage::DamageRule,
    /// The zones layer's CRS as EPSG:NNNN (default WGS84 lon/lat).
    pub zones_crs: Option<String>,
    /// Field damage reports (points), each applied to the nearest road.
    pub reports: Option<Source>,
    /// Largest distance from a report to its road, metres.
    pub report_distance_m: f64,
    /// Repair-metres a crew completes per day; groups the ordered repairs into day-phases.
    pub crew_capacity: Option<f64>,
    /// The district's name (pictures and reports); default: the road file's name.
    pub name: Option<String>,
    /// Most repair-metres to spend: when the sites plan costs more, the sites giving the most
    /// priority per repair-metre are joined first, within the budget.
    pub budget: Option<f64>,
    /// Plan backup links so every site survives any single road failure (sites plans only).
    pub redundancy: bool,
}

impl PlanJob {
    /// A job with default settings for the given roads and output folder.
    pub fn new(roads: Source, out: PathBuf) -> PlanJob {
        PlanJob {
            roads,
            sites: None,
            out,
            force: false,
            road_settings: RoadSettings::default(),
            site_settings: SiteSettings::default(),
            max_attach_m: 250.0,
            hub: None,
            whole_network: false,
            mst: MstAlgorithm::Kruskal,
            effort: Effort::Normal,
            zones: None,
            zone_damage: Default::default(),
            zones_crs: None,
            reports: None,
            report_distance_m: 50.0,
            crew_capacity: None,
            budget: None,
            redundancy: false,
            name: None,
        }
    }
}

impl PlanJob {
    /// Every file the run reads, for the output guard: layers, sidecars' folders and the cost table.
    pub fn input_paths(&self) -> Vec<export::guard::InputPath<'_>> {
        std::iter::once(&self.roads)
            .chain(
                [&self.sites, &self.zones, &self.reports]
                    .into_iter()
                    .flatten(),
            )
            .filter_map(|s| s.path())
            .chain(self.road_settings.cost_table_file.as_deref())
            .map(export::guard::InputPath::File)
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
    settings::validate(job)?;
    let mut notes = Notes::default();
    let layer = {
        let _s = progress.stage("reading roads");
        ingest::roads::read_roads(&job.roads, &job.road_settings)?
    };
    let site_layer = match &job.sites {
        Some(src) => {
            let _s = progress.stage("reading sites");
            let sl = read_sites(src, &job.site_settings)?;
            hub::check_named(&sl, job.hub.as_deref(), &job.sites)?;
            Some(sl)
        }
        None => None,
    };
    for (reason, n) in &layer.stats.features_skipped {
        progress.note(&format!(
            "{}: skipped {n} feature(s): {reason}",
            job.roads.display_path().display()
        ));
    }
    notes::damage(
        &mut notes,
        &layer.stats,
        &job.road_settings,
        job.zones.is_some() || job.reports.is_some(),
    );
    if let Some(sl) = &site_layer {
        notes::site_defaults(&mut notes, sl, &job.site_settings);
    }
    let read_stats = layer.stats.clone();
    let geodesy = crate::export::summary::Geodesy {
        input_crs: layer.crs_name.clone(),
        length_method: layer.length_method.clone(),
        output_crs: "EPSG:4326 (WGS84 longitude/latitude, RFC 7946)".into(),
        length_unit: "metre",
        note: layer.crs_note.clone(),
    };
    let mut inputs: Vec<_> = layer.input.clone().into_iter().collect();

    let mut zone_figures = (0usize, 0usize);
    let (mut net, noding) = {
        let _s = progress.stage("noding");
        ingest::build_network(layer, &job.road_settings, false)?
    };
    if let Some(src) = &job.zones {
        let _s = progress.stage("applying damage zones");
        let zl = crate::ingest::zones::read_zones(src, &job.zone_damage, job.zones_crs.as_deref())?;
        zone_figures = (
            zl.zones.len(),
            crate::ingest::zones::apply_zones(&mut net, &zl),
        );
        notes::layer_defaults(
            &mut notes,
            "zone_damage_defaulted",
            ("damage zone feature", "damage zone features"),
            zl.defaulted,
            zl.zones
                .iter()
                .map(|z| z.feature)
                .collect::<std::collections::BTreeSet<_>>()
                .len(),
            &job.zone_damage,
        );
        notes::zones_unused(&mut notes, zone_figures.0, zone_figures.1);
        inputs.push(zl.input);
    }
    let mut report_figures = None;
    if let Some(src) = &job.reports {
        let _s = progress.stage("applying damage reports");
        let (reports, rec) = crate::ingest::reports::read_reports(src, &job.zone_damage)?;
        let fig = crate::ingest::reports::apply_reports(&mut net, &reports, job.report_distance_m);
        notes::layer_defaults(
            &mut notes,
            "report_damage_defaulted",
            ("damage report", "damage reports"),
            reports.iter().filter(|r| r.defaulted).count(),
            reports.len(),
            &job.zone_damage,
        );
        notes::reports(&mut notes, &fig, job.report_distance_m);
        report_figures = Some(fig);
        inputs.push(rec);
    }
    if job.zones.is_some() || job.reports.is_some() {
        ingest::check_cost_total(&net, &job.roads.display_path())?;
    }
    let attachments = match &site_layer {
        Some(sl) => {
            let _s = progress.stage("attaching sites");
            let a = attach_sites(&mut net, &sl.sites, job.max_attach_m);
            notes::unattached(&mut notes, sl, &a, job.max_attach_m);
            a
        }
        None => Vec::new(),
    };
    let graph = net.weighted_edges();
    let comps = solve::components::components(&graph);
    let hub = match &site_layer {
        Some(sl) => hub::choose(sl, &attachments, job.hub.as_deref(), &comps, &mut notes)?,
        None => None,
    };
    let (mut plan, site_plan) = {
        let _s = progress.stage("solving");
        match &site_layer {
            Some(_) if !job.whole_network => {
                let junctions: Vec<Option<u32>> = attachments.iter().map(|a| a.junction).collect();
                let sp = plan_sites(&graph, &comps, &junctions, job.effort)?;
                let plan = Plan {
                    kind: PlanKind::Sites,
                    edges: sp.edges.clone(),
                    total_cost: sp.cost,
                    trees: sp
                        .groups
                        .iter()
                        .filter(|g| !g.tree.edges.is_empty())
                        .count(),
                    lower_bound: sp.lower_bound,
                    bound_complete: sp.bound_complete,
                };
                (plan, Some(sp))
            }
            _ => (solve::minimum_spanning_forest(&graph, job.mst)?, None),
        }
    };
    // Within a budget smaller than the plan, choose which sites to join.
    let mut budget_applied = false;
    if let (Some(b), Some(sl), Some(sp)) = (job.budget, &site_layer, &site_plan) {
        let _s = progress.stage("choosing sites within the budget");
        if let Some(cut) = budget::apply(b, &graph, &comps, &mut plan, sl, &attachments, hub, sp)? {
            budget_applied = true;
            notes.push(
                "budget_limits_plan",
                format!(
                    "the full plan would cost {} repair-metres, more than the budget of {b}: \
                     the plan spends {} on the sites giving the most priority per \
                     repair-metre, joined to the hub first",
                    crate::export::geojson::Fixed(cost_to_repair_metres(cut.full_cost), 3),
                    crate::export::geojson::Fixed(cost_to_repair_metres(plan.total_cost), 3)
                ),
            );
        }
    }
    let mut steps = {
        let _s = progress.stage("ordering repairs");
        schedule(
            job,
            &graph,
            &net,
            &comps,
            &plan,
            site_layer.as_ref(),
            &attachments,
            hub,
            site_plan.as_ref(),
        )
    };
    if let Some(c) = job.crew_capacity {
        let cap = (c * 1000.0).round() as u64;
        let smallest = steps
            .iter()
            .map(|st| graph.cost[st.edge as usize])
            .filter(|&x| x > 0)
            .min();
        if let Some(m) = smallest.filter(|&m| m > cap) {
            return Err(IngestError::Setting {
                name: "--crew-capacity",
                message: format!(
                    "{c} repair-metres per day fits no repair of the plan (the smallest needs {} repair-metres)",
                    crate::network::cost_to_repair_metres(m)
                ),
            }
            .into());
        }
    }
    let sites = match site_layer {
        Some(layer) => {
            inputs.push(layer.input.clone());
            let reach =
                joined::site_reach(&graph, &comps, &plan.edges, &attachments, hub, &mut steps)?;
            let statuses = status::statuses(&status::Facts {
                graph: &graph,
                comps: &comps,
                plan: &plan.edges,
                sites: &layer,
                attachments: &attachments,
                reach: &reach,
                budget_applied,
            })?;
            hub::alone_note(&mut notes, &layer, &attachments, hub, &comps);
            Some(SitesResult {
                layer,
                attachments,
                hub,
                plan: site_plan,
                reach,
                statuses,
                budget_applied,
            })
        }
        None => None,
    };
    let fragile = match &sites {
        Some(sr) if sr.reach.hub_junction.is_some() => {
            let _s = progress.stage("finding single points of failure");
            Some(fragility_report(&graph, &plan.edges, sr)?)
        }
        _ => None,
    };
    let backup = match &sites {
        Some(sr) if job.redundancy && sr.reach.hub_junction.is_some() => {
            let _s = progress.stage("planning backup links");
            Some(backup_plan(&graph, &plan.edges, sr, steps.len())?)
        }
        _ => None,
    };
    let rows = sites.as_ref().map(rows::site_rows);
    if let Some(p) = &job.road_settings.cost_table_file {
        inputs.push(fingerprint::input_record(
            "cost table",
            &Source::File(p.clone()),
        )?);
    }
    // Inputs are recorded in one order (roads, zones, reports, sites, cost table).
    inputs.sort_by_key(|i| fingerprint::role_rank(&i.role));
    let mut summary = summary::build(
        job,
        inputs,
        geodesy,
        &read_stats,
        &noding,
        &net,
        &comps,
        &plan,
        sites.as_ref(),
    );
    summary.phases = summary::phases(&graph, &steps, sites.as_ref());
    summary.fragility = fragile.as_ref().map(|f| f.figures.clone());
    summary.backup = backup.as_ref().map(|b| b.figures.clone());
    summary.counts.damage_zones = zone_figures.0;
    summary.counts.edges_in_zones = zone_figures.1;
    summary.damage_reports = report_figures;
    summary.notes = notes.into_vec();
    summary.outputs = export::output_names(rows.is_some(), fragile.is_some(), backup.is_some());
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
            &out,
            job.force,
            &export::Outputs {
                net: &net,
                comps: &comps,
                plan: &plan,
                sites: rows.as_deref(),
                qa: &noding.qa_points,
                steps: &steps,
                fragility: fragile.as_ref(),
                backup: backup.as_ref(),
                title: &title,
                marks: &marks,
                site_ids: &sites
                    .as_ref()
                    .map(|r| {
                        r.layer
                            .sites
                            .iter()
                            .map(|s| s.id.clone())
                            .collect::<Vec<_>>()
                    })
                    .unwrap_or_default(),
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
