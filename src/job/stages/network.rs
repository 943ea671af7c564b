//! Stage 2, network: the roads noded into a network, damage zones and reports applied, and the
//! sites attached to their nearest usable roads.

use crate::ingest::attach::{Attachment, attach_sites};
use crate::ingest::noding::NodingStats;
use crate::ingest::reports::{ReportFigures, apply_reports, read_reports};
use crate::ingest::roads::LineLayer;
use crate::ingest::sites::SiteLayer;
use crate::ingest::source::InputRecord;
use crate::ingest::zones::{apply_zones, read_zones};
use crate::ingest::{build_network, check_cost_total};
use crate::job::notes::{self, Notes};
use crate::job::{JobError, PlanJob};
use crate::network::Network;
use crate::progress::Progress;
use std::collections::BTreeSet;

/// The network with every piece of damage evidence applied and the sites attached.
pub(in crate::job) struct Built {
    /// Junctions and edges, with their costs.
    pub net: Network,
    /// Figures and QA points of noding.
    pub noding: NodingStats,
    /// Damage zones read and edges whose cost they changed.
    pub zone_figures: (usize, usize),
    /// The zones' outer rings, lon/lat, for the picture.
    pub zone_rings: Vec<Vec<[f64; 2]>>,
    /// What the damage reports did, when given.
    pub report_figures: Option<ReportFigures>,
    /// One attachment per site (empty without sites).
    pub attachments: Vec<Attachment>,
    /// Input records of the zones and reports.
    pub inputs: Vec<InputRecord>,
}

/// Nodes the roads, applies zones and reports, and attaches the sites.
pub(in crate::job) fn build(
    job: &PlanJob,
    roads: LineLayer,
    sites: Option<&SiteLayer>,
    progress: &Progress,
    notes: &mut Notes,
) -> Result<Built, JobError> {
    let (mut net, noding) = {
        let _s = progress.stage("noding");
        build_network(roads, &job.road_settings, false)?
    };
    let mut inputs = Vec::new();
    let mut zone_figures = (0usize, 0usize);
    let mut zone_rings = Vec::new();
    if let Some(src) = &job.zones {
        let _s = progress.stage("applying damage zones");
        let zl = read_zones(src, &job.zone_damage, job.zones_crs.as_deref())?;
        zone_figures = (zl.zones.len(), apply_zones(&mut net, &zl));
        zone_rings = zl
            .zones
            .iter()
            .map(|z| z.polygon.exterior().coords().map(|c| [c.x, c.y]).collect())
            .collect();
        notes::layer_defaults(
            notes,
            "zone_damage_defaulted",
            ("damage zone feature", "damage zone features"),
            zl.defaulted,
            zl.zones
                .iter()
                .map(|z| z.feature)
                .collect::<BTreeSet<_>>()
                .len(),
            &job.zone_damage,
        );
        notes::zones_unused(notes, zone_figures.0, zone_figures.1);
        inputs.push(zl.input);
    }
    let mut report_figures = None;
    if let Some(src) = &job.reports {
        let _s = progress.stage("applying damage reports");
        let (reports, rec) = read_reports(src, &job.zone_damage)?;
        let fig = apply_reports(&mut net, &reports, job.report_distance_m);
        notes::layer_defaults(
            notes,
            "report_damage_defaulted",
            ("damage report", "damage reports"),
            reports.iter().filter(|r| r.defaulted).count(),
            reports.len(),
            &job.zone_damage,
        );
        notes::reports(notes, &fig, job.report_distance_m);
        report_figures = Some(fig);
        inputs.push(rec);
    }
    if job.zones.is_some() || job.reports.is_some() {
        check_cost_total(&net, &job.roads.display_path())?;
    }
    let attachments = match sites {
        Some(sl) => {
            let _s = progress.stage("attaching sites");
            let a = attach_sites(&mut net, &sl.sites, job.max_attach_m);
            notes::unattached(notes, sl, &a, job.max_attach_m);
            a
        }
        None => Vec::new(),
    };
    Ok(Built {
        net,
        noding,
        zone_figures,
        zone_rings,
        report_figures,
        attachments,
        inputs,
    })
}
