//! The manifest keys: one table that `[defaults]`, every `[[district]]` table and every CSV column
//! go through, so a key is read, checked and applied the same way wherever it is given.
//!
//! Each key is the `reknit plan` flag of the same name with `-` written `_` (`--max-attach` is
//! `max_attach`); a test checks the table against `reknit plan --help`, so a new plan option must
//! be added here too.

use super::values::{Kind, Value};
use crate::ingest::source::Source;
use crate::job::Options;
use crate::solve::MstAlgorithm;
use crate::solve::steiner::Effort;

/// One manifest key: its name, the kind of value it takes and how it changes a district's job.
pub struct Key {
    /// The key as written in a manifest.
    pub name: &'static str,
    /// The value it takes.
    pub kind: Kind,
    /// Only in a district (`name`): refused in `[defaults]`.
    pub district_only: bool,
    /// Applies a value of the right kind to a district's options; the error says what is wrong with
    /// the value. Every check of the option itself is `job::settings::build`'s, as for the flag.
    pub set: fn(&mut Options, &Value) -> Result<(), String>,
}

const fn key(
    name: &'static str,
    kind: Kind,
    set: fn(&mut Options, &Value) -> Result<(), String>,
) -> Key {
    Key {
        name,
        kind,
        district_only: false,
        set,
    }
}

use Kind::*;

/// Every manifest key, in the order they are applied.
pub const KEYS: &[Key] = &[
    Key {
        name: "name",
        kind: Text,
        district_only: true,
        set: |j, v| {
            j.name = Some(v.text()?);
            Ok(())
        },
    },
    key("roads", Paths, |j, v| {
        let mut ps = v.paths()?.into_iter().map(Source::File);
        j.roads = ps.next().ok_or_else(|| "must be a path".to_string())?;
        j.more_roads = ps.collect();
        Ok(())
    }),
    key("sites", OptPath, |j, v| {
        j.sites = v.opt_path()?.map(Source::File);
        Ok(())
    }),
    key("snap", Number, |j, v| {
        j.road.snap_m = v.number()?;
        Ok(())
    }),
    key("damage_field", Text, |j, v| {
        j.road.damage_field = v.text()?;
        Ok(())
    }),
    key("default_damage", Number, |j, v| {
        j.road.default_damage = v.number()?;
        Ok(())
    }),
    // As on the command line, the closed value applies to roads, zones and reports alike.
    key("closed_value", Text, |j, v| {
        j.road.closed_value = v.text()?;
        Ok(())
    }),
    key("id_field", OptText, |j, v| {
        j.road.id_field = v.opt_text()?;
        Ok(())
    }),
    key("crs", OptText, |j, v| {
        j.road.crs = v.opt_text()?;
        Ok(())
    }),
    key("roads_layer", OptText, |j, v| {
        j.road.roads_layer = v.opt_text()?;
        Ok(())
    }),
    key("category_field", OptText, |j, v| {
        j.road.category_field = v.opt_text()?;
        Ok(())
    }),
    key("cost_table", OptPath, |j, v| {
        j.road.cost_table = v.opt_path()?;
        Ok(())
    }),
    key("keep_where", Filters, |j, v| {
        j.road.keep_where = v.filters()?;
        Ok(())
    }),
    key("drop_where", Filters, |j, v| {
        j.road.drop_where = v.filters()?;
        Ok(())
    }),
    key("damage_zones", OptPath, |j, v| {
        j.damage_zones = v.opt_path()?.map(Source::File);
        Ok(())
    }),
    key("zone_damage_field", Text, |j, v| {
        j.zone_damage_field = Some(v.text()?);
        Ok(())
    }),
    key("zones_layer", OptText, |j, v| {
        j.zones_layer = v.opt_text()?;
        Ok(())
    }),
    key("zones_crs", OptText, |j, v| {
        j.zones_crs = v.opt_text()?;
        Ok(())
    }),
    key("damage_points", OptPath, |j, v| {
        j.damage_points = v.opt_path()?.map(Source::File);
        Ok(())
    }),
    key("damage_points_field", Text, |j, v| {
        j.damage_points_field = Some(v.text()?);
        Ok(())
    }),
    key("point_match_distance", Number, |j, v| {
        j.point_match_distance_m = Some(v.number()?);
        Ok(())
    }),
    key("budget", Number, |j, v| {
        j.budget = Some(v.number()?);
        Ok(())
    }),
    key("redundancy", Bool, |j, v| {
        j.redundancy = v.flag()?;
        Ok(())
    }),
    key("crew_capacity", Number, |j, v| {
        j.crew_capacity = Some(v.number()?);
        Ok(())
    }),
    key("crews", Number, |j, v| {
        let n = v.number()?;
        if !(n.fract() == 0.0 && (1.0..=u32::MAX as f64).contains(&n)) {
            return Err(format!("{n} is not a whole number of crews ≥ 1"));
        }
        j.crews = Some(n as u32);
        Ok(())
    }),
    key("max_detour", Number, |j, v| {
        j.max_detour = Some(v.number()?);
        Ok(())
    }),
    key("node_crossings", Bool, |j, v| {
        j.road.node_crossings = v.flag()?;
        Ok(())
    }),
    key("structure_field", OptText, |j, v| {
        j.road.structure_field = v.opt_text()?;
        Ok(())
    }),
    key("attribution", OptText, |j, v| {
        j.road.attribution = v.opt_text()?;
        Ok(())
    }),
    key("mst", Choice(&["kruskal", "prim"]), |j, v| {
        j.mst = Some(match v.text()?.as_str() {
            "kruskal" => MstAlgorithm::Kruskal,
            "prim" => MstAlgorithm::Prim,
            o => return Err(format!("{o:?} is not an algorithm")),
        });
        Ok(())
    }),
    key("max_attach", Number, |j, v| {
        j.max_attach_m = Some(v.number()?);
        Ok(())
    }),
    key("hub", OptText, |j, v| {
        j.hub = v.opt_text()?;
        Ok(())
    }),
    key("whole_network", Bool, |j, v| {
        j.whole_network = v.flag()?;
        Ok(())
    }),
    key(
        "effort",
        Choice(&["quick", "normal", "thorough"]),
        |j, v| {
            j.effort = Some(match v.text()?.as_str() {
                "quick" => Effort::Quick,
                "normal" => Effort::Normal,
                "thorough" => Effort::Thorough,
                o => return Err(format!("{o:?} is not an effort")),
            });
            Ok(())
        },
    ),
    key("time_limit", Number, |j, v| {
        j.time_limit_s = Some(v.number()?);
        Ok(())
    }),
    key("site_id_field", OptText, |j, v| {
        j.site_id_field = v.opt_text()?;
        Ok(())
    }),
    key("site_name_field", OptText, |j, v| {
        j.site_name_field = v.opt_text()?;
        Ok(())
    }),
    key("site_tags", Filters, |j, v| {
        j.site_tags = v.filters()?;
        Ok(())
    }),
    key("priority_field", OptText, |j, v| {
        j.priority_field = v.opt_text()?;
        Ok(())
    }),
    key("lon_column", OptText, |j, v| {
        j.lon_column = v.opt_text()?;
        Ok(())
    }),
    key("lat_column", OptText, |j, v| {
        j.lat_column = v.opt_text()?;
        Ok(())
    }),
    key("sites_delimiter", OptText, |j, v| {
        j.sites_delimiter = v.opt_text()?;
        Ok(())
    }),
    key("sites_layer", OptText, |j, v| {
        j.sites_layer = v.opt_text()?;
        Ok(())
    }),
    key("sites_crs", OptText, |j, v| {
        j.sites_crs = v.opt_text()?;
        Ok(())
    }),
    key("damage_points_crs", OptText, |j, v| {
        j.damage_points_crs = v.opt_text()?;
        Ok(())
    }),
    key("damage_points_delimiter", OptText, |j, v| {
        j.damage_points_delimiter = v.opt_text()?;
        Ok(())
    }),
    key("damage_points_layer", OptText, |j, v| {
        j.damage_points_layer = v.opt_text()?;
        Ok(())
    }),
    key("damage_points_lon_column", OptText, |j, v| {
        j.damage_points_lon_column = v.opt_text()?;
        Ok(())
    }),
    key("damage_points_lat_column", OptText, |j, v| {
        j.damage_points_lat_column = v.opt_text()?;
        Ok(())
    }),
    key("output_format", Choice(&["geojson", "gpkg"]), |j, v| {
        let t = v.text()?;
        j.output_format = crate::export::sink::OutputFormat::from_name(&t)
            .ok_or_else(|| format!("{t:?} is not an output format"))?;
        Ok(())
    }),
];

/// The key of that name.
pub fn find(name: &str) -> Option<&'static Key> {
    KEYS.iter().find(|k| k.name == name)
}

/// Every key name, comma-separated, for messages.
pub fn known() -> String {
    KEYS.iter().map(|k| k.name).collect::<Vec<_>>().join(", ")
}
