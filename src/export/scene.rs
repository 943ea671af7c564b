//! What the picture draws, gathered in one place: the network, the plan, its repairs in order, the
//! backup links, the damage zones and the sites, with the text that goes around them. The SVG
//! writer ([`super::picture`]) and the PNG renderer ([`super::raster`]) both draw a [`Scene`].

use super::picture::SiteMark;
use crate::network::Network;
use crate::solve::order::Step;

/// Everything one picture shows.
pub struct Scene<'a> {
    /// The district's name, the picture's title.
    pub title: &'a str,
    /// The network.
    pub net: &'a Network,
    /// The plan's edges (intact and repaired).
    pub plan_edges: &'a [u32],
    /// The plan's repairs in order, with their days.
    pub steps: &'a [Step],
    /// Edges of the backup links (with `--redundancy`), in their repair order.
    pub backup_edges: &'a [u32],
    /// Outer rings of the damage zones, lon/lat (holes are not drawn).
    pub zones: &'a [Vec<[f64; 2]>],
    /// The sites.
    pub sites: &'a [SiteMark<'a>],
    /// True when `--crew-capacity` grouped the repairs into days; false draws every repair in one
    /// colour and says the repairs are not scheduled by day.
    pub scheduled: bool,
    /// The short caution paragraph for the band.
    pub caution: &'a str,
    /// The data's attribution, when its licence asks for one.
    pub attribution: Option<&'a str>,
}

impl Scene<'_> {
    /// Number of repair days drawn: the last day of the order, or 1 when the repairs are not
    /// scheduled by day.
    pub fn days(&self) -> u32 {
        if self.scheduled {
            self.steps
                .iter()
                .filter_map(|s| s.last_day)
                .max()
                .unwrap_or(1)
        } else {
            1
        }
    }

    /// The colour of a repair on `day`.
    pub fn day_colour(&self, day: u32) -> String {
        let days = self.days();
        super::palette::day_colour(if self.scheduled { day } else { 1 }, days)
    }

    /// True when a usable edge is damaged (cost above 0) and neither the plan nor a backup link
    /// repairs it: drawn apart from the intact roads.
    pub fn damaged_outside(&self, in_plan: &[bool], e: usize) -> bool {
        let edge = &self.net.edges[e];
        edge.usable() && edge.cost > 0 && !in_plan[e]
    }

    /// A flag per edge: in the plan or in a backup link.
    pub fn planned(&self) -> Vec<bool> {
        let mut v = vec![false; self.net.edges.len()];
        for &e in self.plan_edges.iter().chain(self.backup_edges) {
            v[e as usize] = true;
        }
        v
    }
}
