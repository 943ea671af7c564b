//! The rows of `sites.geojson` and the site marks of the picture, both read from the sites'
//! statuses.

use super::SitesResult;
use super::status::JOINED;
use crate::export::picture::SiteMark;
use crate::export::sites::SiteRow;

/// The rows of `sites.geojson`.
pub(super) fn site_rows(r: &SitesResult) -> Vec<SiteRow> {
    let group_of = group_index(r);
    r.layer
        .sites
        .iter()
        .zip(&r.attachments)
        .zip(&r.statuses)
        .enumerate()
        .map(|(i, ((s, a), st))| SiteRow {
            id: s.id.clone(),
            name: s.name.clone(),
            priority: s.priority,
            pos: s.pos,
            attributes: s.attributes.clone(),
            hub: r.hub == Some(i),
            junction: a.junction,
            attach_point: a.point,
            attach_distance_m: a.distance_m,
            status: st.status,
            status_label: super::status::status_label(st.status),
            joined_to_hub: st.status == JOINED,
            reason: st.reason.clone(),
            group: group_of[i],
        })
        .collect()
}

/// The sites as the picture draws them: filled when joined to the hub.
pub(super) fn marks(rows: &[SiteRow]) -> Vec<SiteMark<'_>> {
    rows.iter()
        .map(|r| SiteMark {
            pos: r.pos,
            label: r.name.as_deref().unwrap_or(&r.id),
            hub: r.hub,
            connected: r.joined_to_hub,
            priority: r.priority,
        })
        .collect()
}

/// Group index of every site (None when not attached, or for a whole-network plan).
pub fn group_index(r: &SitesResult) -> Vec<Option<usize>> {
    let mut g = vec![None; r.layer.sites.len()];
    if let Some(p) = &r.plan {
        for (gi, group) in p.groups.iter().enumerate() {
            for &s in &group.sites {
                g[s] = Some(gi);
            }
        }
    }
    g
}
