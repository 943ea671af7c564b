//! The changes layer (`changes.geojson`): what a re-plan changed against the previous plan —
//! repairs added, dropped and kept, roads the previous plan used that are now closed, and sites
//! newly joined to the hub or newly cut off from it.

use super::carry::Carried;
use crate::export::geojson::Prop;
use crate::export::sink::LayerSink;
use crate::export::work_order_id::WorkOrderIds;
use crate::network::{Network, cost_to_repair_metres};
use std::collections::BTreeMap;

/// One kind of change, with its code (`change`) and plain words (`change_label`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Kind {
    /// A repair in the new plan that the previous plan did not have.
    RepairAdded,
    /// A repair of the previous plan, not finished, that the new plan no longer needs.
    RepairDropped,
    /// A repair in both plans (started ones among them).
    RepairKept,
    /// A road of the previous plan that is now impassable: left out of the new plan.
    RoadNewlyClosed,
    /// A site the new plan joins to the hub that the previous one did not.
    SiteNewlyJoined,
    /// A site the previous plan joined to the hub that the new one does not.
    SiteNewlyCutOff,
}

impl Kind {
    /// The code written in `change`.
    pub fn code(self) -> &'static str {
        match self {
            Kind::RepairAdded => "repair_added",
            Kind::RepairDropped => "repair_dropped",
            Kind::RepairKept => "repair_kept",
            Kind::RoadNewlyClosed => "road_newly_closed",
            Kind::SiteNewlyJoined => "site_newly_joined",
            Kind::SiteNewlyCutOff => "site_newly_cut_off",
        }
    }

    /// The words written in `change_label`.
    pub fn label(self) -> &'static str {
        match self {
            Kind::RepairAdded => "repair added",
            Kind::RepairDropped => "repair no longer needed",
            Kind::RepairKept => "repair kept",
            Kind::RoadNewlyClosed => "road now closed: left out of the plan",
            Kind::SiteNewlyJoined => "site newly joined to the hub",
            Kind::SiteNewlyCutOff => "site newly cut off from the hub",
        }
    }
}

/// What a change is about: an edge of the new network or a site (its index).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Target {
    /// An edge.
    Edge(u32),
    /// A site, by input index.
    Site(usize),
}

/// The sites as the changes layer needs them: id, position and whether joined now.
pub struct SitesNow<'a> {
    /// Ids in input order.
    pub ids: &'a [String],
    /// Positions, lon/lat.
    pub pos: Vec<[f64; 2]>,
    /// Joined to the hub by the new plan.
    pub joined: &'a [bool],
}

/// The changes, edges first (by edge id), then sites (in input order).
pub struct Changes<'a> {
    /// Each change and what it is about.
    pub rows: Vec<(Kind, Target)>,
    /// Started repairs (ascending), flagged in the layer.
    pub started: &'a [u32],
    /// The sites, when there are any.
    pub sites: Option<SitesNow<'a>>,
}

/// Compares the new plan (`plan`, its edges) with the previous one carried over.
pub fn find<'a>(
    net: &Network,
    plan: &[u32],
    c: &'a Carried,
    sites: Option<SitesNow<'a>>,
    before: &BTreeMap<String, bool>,
) -> Changes<'a> {
    let repairs: Vec<u32> = plan
        .iter()
        .copied()
        .filter(|&e| net.edges[e as usize].cost > 0)
        .collect();
    let closed: Vec<u32> = c
        .old_plan
        .iter()
        .copied()
        .filter(|&e| !net.edges[e as usize].usable())
        .collect();
    let mut all: Vec<u32> = repairs
        .iter()
        .chain(&c.old_repairs)
        .chain(&closed)
        .copied()
        .collect();
    all.sort_unstable();
    all.dedup();
    let has = |v: &[u32], e: u32| v.binary_search(&e).is_ok();
    let mut rows: Vec<(Kind, Target)> = all
        .into_iter()
        .map(|e| {
            let kind = match (has(&closed, e), has(&repairs, e), has(&c.old_repairs, e)) {
                (true, _, _) => Kind::RoadNewlyClosed,
                (_, true, true) => Kind::RepairKept,
                (_, true, false) => Kind::RepairAdded,
                _ => Kind::RepairDropped,
            };
            (kind, Target::Edge(e))
        })
        .collect();
    if let Some(s) = &sites {
        for (i, id) in s.ids.iter().enumerate() {
            let was = before.get(id).copied().unwrap_or(false);
            match (was, s.joined[i]) {
                (false, true) => rows.push((Kind::SiteNewlyJoined, Target::Site(i))),
                (true, false) => rows.push((Kind::SiteNewlyCutOff, Target::Site(i))),
                _ => {}
            }
        }
    }
    Changes {
        rows,
        started: &c.started,
        sites,
    }
}

impl Changes<'_> {
    /// How many changes of each kind, by code (every code listed, 0 included).
    pub fn counts(&self) -> BTreeMap<&'static str, usize> {
        let all = [
            Kind::RepairAdded,
            Kind::RepairDropped,
            Kind::RepairKept,
            Kind::RoadNewlyClosed,
            Kind::SiteNewlyJoined,
            Kind::SiteNewlyCutOff,
        ];
        all.into_iter()
            .map(|k| (k.code(), self.rows.iter().filter(|(r, _)| *r == k).count()))
            .collect()
    }

    /// Writes the layer: a LineString per road change, a Point per site change.
    pub fn write<S: LayerSink + ?Sized>(
        &self,
        gj: &mut S,
        net: &Network,
        ids: &WorkOrderIds,
    ) -> std::io::Result<()> {
        for &(kind, target) in &self.rows {
            match target {
                Target::Edge(e) => {
                    let edge = &net.edges[e as usize];
                    let key = ids.key(net, e);
                    let cost = match edge.usable() {
                        true => Prop::Fixed3(cost_to_repair_metres(edge.cost)),
                        false => Prop::Null,
                    };
                    let props = [
                        ("change", Prop::Str(kind.code())),
                        ("change_label", Prop::Str(kind.label())),
                        ("work_order", Prop::Str(&key)),
                        ("edge", Prop::Int(e as i64)),
                        ("site_id", Prop::Null),
                        ("length_m", Prop::Fixed3(edge.length_m)),
                        ("cost", cost),
                        (
                            "started",
                            Prop::Bool(self.started.binary_search(&e).is_ok()),
                        ),
                    ];
                    gj.line(&props, net.edge_geometry(e as usize))?;
                }
                Target::Site(i) => {
                    let Some(s) = &self.sites else { continue };
                    let props = [
                        ("change", Prop::Str(kind.code())),
                        ("change_label", Prop::Str(kind.label())),
                        ("work_order", Prop::Null),
                        ("edge", Prop::Null),
                        ("site_id", Prop::Str(&s.ids[i])),
                        ("length_m", Prop::Null),
                        ("cost", Prop::Null),
                        ("started", Prop::Bool(false)),
                    ];
                    gj.point(&props, s.pos[i])?;
                }
            }
        }
        Ok(())
    }
}
