//! Stage 2, network: the roads noded into a network, damage zones and reports applied, and the
//! sites attached to their nearest usable roads.

use crate::export::work_order_id::WorkOrderIds;
use crate::ingest::attach::{Attachment, attach_sites};
use crate::ingest::elsewhere::{Extent, LayerOrigin, check_near};
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
    /// The previous plan and the finished work matched to this network (a re-plan only).
    pub carried: Option<crate::replan::carry::Carried>,
    /// The work-order keys of this network's pieces, made once for every output that names them.
    pub keys: WorkOrderIds,
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
    // A layer lying wholly away from the roads is refused before any of it is applied.
    let roads_extent = Extent::of(net.geom.iter().copied());
    let near = |origin: Option<&LayerOrigin>, points: &[[f64; 2]]| match (origin, &roads_extent) {
        (Some(o), Some(e)) => check_near(o, points, e),
        _ => Ok(()),
    };
    if let Some(sl) = sites {
        let points: Vec<[f64; 2]> = sl.sites.iter().map(|s| s.pos).collect();
        near(sl.origin.as_ref(), &points)?;
    }
    let mut inputs = Vec::new();
    let mut zone_figures = (0usize, 0usize);
    let mut zone_rings = Vec::new();
    if let Some(src) = &job.zones {
        let _s = progress.stage("applying damage zones");
        let zl = read_zones(
            src,
            &job.zone_damage,
            job.zones_crs.as_deref(),
            job.zones_layer.as_deref(),
        )?;
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
    // Earlier rounds' points first, then the finished work (marked below, after attachment, on
    // every piece no new point touched), then the points given anew.
    let mut report_figures: Option<ReportFigures> = None;
    let mut touched = Vec::new();
    // Each earlier file is read as its own round read it.
    let earlier = job.earlier_reports.iter().enumerate().map(|(i, s)| {
        let read = job.earlier_report_settings.get(i);
        (s, read.unwrap_or(&job.report_settings))
    });
    let batches = [
        (earlier.collect::<Vec<_>>(), false),
        (
            job.reports
                .iter()
                .map(|s| (s, &job.report_settings))
                .collect(),
            true,
        ),
    ];
    for (sources, new) in batches {
        if sources.is_empty() {
            continue;
        }
        let _s = progress.stage("applying damage reports");
        let mut reports = Vec::new();
        for (src, settings) in sources {
            let read = read_reports(src, &job.report_damage, settings)?;
            let points: Vec<[f64; 2]> = read.reports.iter().map(|r| r.pos).collect();
            near(Some(&read.origin), &points)?;
            let (mut more, rec) = (read.reports, read.input);
            // Feature indices count on through the layers of one batch, in round order.
            let offset = reports.len() + report_figures.as_ref().map_or(0, |f| f.read);
            more.iter_mut().for_each(|r| r.index += offset);
            reports.extend(more);
            inputs.push(rec);
        }
        let mut fig = apply_reports(&mut net, &reports, job.point_match_distance_m);
        notes::layer_defaults(
            notes,
            "report_damage_defaulted",
            ("damage report", "damage reports"),
            reports.iter().filter(|r| r.defaulted).count(),
            reports.len(),
            &job.report_damage,
        );
        if new && job.field_work.is_some() {
            touched = crate::replan::carry::spans_of(&net, &fig.touched);
        }
        if let Some(before) = report_figures.take() {
            fig.read += before.read;
            fig.applied += before.applied;
            let mut unmatched = before.unmatched;
            unmatched.append(&mut fig.unmatched);
            fig.unmatched = unmatched;
            let mut matched = before.matched;
            matched.append(&mut fig.matched);
            fig.matched = matched;
        }
        report_figures = Some(fig);
    }
    if let Some(fig) = &report_figures {
        notes::reports(notes, fig, job.point_match_distance_m);
    }
    if job.zones.is_some() || job.has_reports() {
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
    // Work-order keys hold only once the sites have split their roads: they are made once here
    // (damage never changes them), and the finished work and the previous plan are matched to
    // this network by them.
    let keys = WorkOrderIds::new(&net);
    let carried = job
        .field_work
        .as_ref()
        .map(|w| crate::replan::carry::carry(&mut net, &keys, w, &touched));
    Ok(Built {
        carried,
        keys,
        net,
        noding,
        zone_figures,
        zone_rings,
        report_figures,
        attachments,
        inputs,
    })
}
