//! The hub (depot): the site every other is joined to. It must lie on the road network.

use super::notes::{Notes, list};
use crate::ingest::IngestError;
use crate::ingest::attach::Attachment;
use crate::ingest::sites::SiteLayer;
use crate::ingest::source::Source;
use crate::solve::components::Components;

/// Checks, before any heavy work, that a hub named with `--hub` is among the sites.
pub(super) fn check_named(
    sl: &SiteLayer,
    named: Option<&str>,
    src: &Option<Source>,
) -> Result<(), IngestError> {
    let Some(id) = named else { return Ok(()) };
    if sl.sites.iter().any(|s| s.id == id) {
        return Ok(());
    }
    Err(IngestError::Setting {
        name: "--hub",
        message: format!(
            "no site with id {id:?} in {} (site ids: {})",
            src.as_ref()
                .map(|s| s.display_path().display().to_string())
                .unwrap_or_default(),
            list(sl.sites.iter().map(|s| s.id.as_str()))
        ),
    })
}

/// The hub once the sites are attached: the named site, which must reach a usable road; or the
/// site with the highest priority among those that do, with a note when that choice was not
/// obvious. On ties, the site whose part of the usable network (`comps`) holds the most sites
/// wins, then the first in the file: a hub on a stray fragment of road could join nothing.
/// `None` only when there are no sites.
pub(super) fn choose(
    sl: &SiteLayer,
    attachments: &[Attachment],
    named: Option<&str>,
    comps: &Components,
    notes: &mut Notes,
) -> Result<Option<usize>, IngestError> {
    if let Some(id) = named {
        let i = sl
            .sites
            .iter()
            .position(|s| s.id == id)
            .expect("checked by check_named");
        if let Some(why) = &attachments[i].failure {
            return Err(IngestError::Setting {
                name: "--hub",
                message: format!(
                    "the hub {id:?} is not on the road network ({why}): every plan is made from \
                     the hub; raise --max-attach or name another hub"
                ),
            });
        }
        return Ok(Some(i));
    }
    if sl.sites.is_empty() {
        return Ok(None);
    }
    let on_road: Vec<usize> = (0..sl.sites.len())
        .filter(|&i| attachments[i].junction.is_some())
        .collect();
    let Some(top) = on_road
        .iter()
        .map(|&i| sl.sites[i].priority)
        .max_by(f64::total_cmp)
    else {
        return Err(IngestError::Setting {
            name: "--sites",
            message: format!(
                "no site lies within --max-attach of a usable road, so there is no hub to plan \
                 from ({}: {})",
                sl.sites[0].id,
                attachments[0].failure.as_deref().unwrap_or("not attached")
            ),
        });
    };
    let tied: Vec<usize> = on_road
        .iter()
        .copied()
        .filter(|&i| sl.sites[i].priority == top)
        .collect();
    let comp = |i: usize| comps.of[attachments[i].junction.expect("on the roads") as usize];
    let sharing = |i: usize| on_road.iter().filter(|&&k| comp(k) == comp(i)).count();
    let most = tied.iter().map(|&i| sharing(i)).max().unwrap_or(0);
    let hub = *tied
        .iter()
        .find(|&&i| sharing(i) == most)
        .expect("tied is not empty");
    let id = |i: usize| sl.sites[i].id.as_str();
    let higher: Vec<usize> = (0..sl.sites.len())
        .filter(|&i| attachments[i].junction.is_none() && sl.sites[i].priority > top)
        .collect();
    if !higher.is_empty() {
        notes.push(
            "hub_not_on_roads",
            format!(
                "{} a higher priority than any site on the road network but no usable road \
                 within --max-attach, so the hub is {}, the highest-priority site that has one; \
                 name the hub with --hub",
                match higher.len() {
                    1 => format!("{} has", id(higher[0])),
                    _ => format!("{} have", list(higher.iter().map(|&i| id(i)))),
                },
                id(hub)
            ),
        );
    }
    if tied.len() > 1 {
        let how = if tied.iter().all(|&i| sharing(i) == most) {
            "the first of them in the file".to_string()
        } else {
            format!(
                "the first of them in the file whose part of the road network holds the most \
                 sites ({most})"
            )
        };
        notes.push(
            "hub_tie",
            format!(
                "{} share the highest priority ({top}); the hub is {}, {how}; name another with \
                 --hub",
                list(tied.iter().map(|&i| id(i))),
                id(hub)
            ),
        );
    }
    Ok(Some(hub))
}

/// A note when no other site shares the hub's part of the usable network: nothing can be joined
/// to the hub, whatever the plan.
pub(super) fn alone_note(
    notes: &mut Notes,
    sl: &SiteLayer,
    attachments: &[Attachment],
    hub: Option<usize>,
    comps: &crate::solve::components::Components,
) {
    let Some(h) = hub else { return };
    let Some(hj) = attachments[h].junction else {
        return;
    };
    let others: Vec<u32> = (0..attachments.len())
        .filter(|&i| i != h)
        .filter_map(|i| attachments[i].junction)
        .collect();
    let c = comps.of[hj as usize];
    if !others.is_empty() && others.iter().all(|&j| comps.of[j as usize] != c) {
        notes.push(
            "hub_alone",
            format!(
                "no other site shares the hub {}'s part of the usable road network: no site can \
                 be joined to it (see each site's reason)",
                sl.sites[h].id
            ),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::job::status::tests::layer;
    use crate::solve::components::components;
    use crate::solve::graph::EdgeList;

    /// Junctions 0–1 joined, 2 alone.
    fn comps() -> Components {
        components(&EdgeList {
            vertices: 3,
            ends: vec![[0, 1]],
            cost: vec![4],
        })
    }

    #[test]
    fn a_named_hub_off_the_roads_is_refused() {
        let (sl, at) = layer(&[("a", Some(0)), ("off", None)]);
        let e = choose(&sl, &at, Some("off"), &comps(), &mut Notes::default()).unwrap_err();
        assert!(
            e.to_string().contains("\"off\" is not on the road network"),
            "{e}"
        );
        let mut n = Notes::default();
        assert_eq!(
            choose(&sl, &at, Some("a"), &comps(), &mut n).unwrap(),
            Some(0)
        );
        assert!(n.into_vec().is_empty());
    }

    #[test]
    fn the_default_hub_is_on_the_roads_where_most_sites_can_join_it() {
        let (mut sl, at) = layer(&[
            ("top", None),
            ("stray", Some(2)),
            ("b", Some(0)),
            ("c", Some(1)),
        ]);
        sl.sites[0].priority = 9.0;
        sl.sites[1].priority = 3.0;
        sl.sites[2].priority = 3.0;
        let mut n = Notes::default();
        assert_eq!(choose(&sl, &at, None, &comps(), &mut n).unwrap(), Some(2));
        let codes: Vec<&str> = n.into_vec().iter().map(|x| x.code).collect();
        assert_eq!(codes, ["hub_not_on_roads", "hub_tie"]);
        // With no site on the roads there is no hub to plan from.
        let (sl, at) = layer(&[("x", None), ("y", None)]);
        assert!(choose(&sl, &at, None, &comps(), &mut Notes::default()).is_err());
        let (sl, at) = layer(&[]);
        assert_eq!(
            choose(&sl, &at, None, &comps(), &mut Notes::default()).unwrap(),
            None
        );
    }
}
