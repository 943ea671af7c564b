//! The manifest keys: one table that `[defaults]`, every `[[district]]` table and every CSV column
//! go through, so a key is read, checked and applied the same way wherever it is given.
//!
//! Each key is the `reknit plan` flag of the same name with `-` written `_` (`--max-attach` is
//! `max_attach`); a test checks the table against `reknit plan --help`, so a new plan option must
//! be added here too.

use super::values::{Kind, Value};
use crate::ingest::cost_table::{CostTable, RoadFilter};
use crate::ingest::source::Source;
use crate::job::PlanJob;
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
    /// Applies a value of the right kind to a job; the error says what is wrong with the value.
    pub set: fn(&mut PlanJob, &Value) -> Result<(), String>,
}

const fn key(
    name: &'static str,
    kind: Kind,
    set: fn(&mut PlanJob, &Value) -> Result<(), String>,
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
    key("roads", Path, |j, v| {
        j.roads = Source::File(v.path()?);
        Ok(())
    }),
    key("sites", OptPath, |j, v| {
        j.sites = v.opt_path()?.map(Source::File);
        Ok(())
    }),
    key("snap", Number, |j, v| {
        j.road_settings.snap_m = v.number()?;
        Ok(())
    }),
    key("damage_field", Text, |j, v| {
        j.road_settings.damage.field = v.text()?;
        Ok(())
    }),
    key("default_damage", Number, |j, v| {
        j.road_settings.damage.default = v.number()?;
        Ok(())
    }),
    // As on the command line, the closed value applies to roads, zones and reports alike.
    key("closed_value", Text, |j, v| {
        j.road_settings.damage.closed_value = v.text()?;
        j.zone_damage.closed_value = v.text()?;
        Ok(())
    }),
    key("id_field", OptText, |j, v| {
        j.road_settings.id_field = v.opt_text()?;
        Ok(())
    }),
    key("crs", OptText, |j, v| {
        j.road_settings.crs = v.opt_text()?;
        Ok(())
    }),
    key("category_field", OptText, |j, v| {
        j.road_settings.category_field = v.opt_text()?;
        Ok(())
    }),
    key("cost_table", OptPath, |j, v| {
        let file = v.opt_path()?;
        j.road_settings.cost_table = CostTable::from_file(file.as_deref())?;
        j.road_settings.cost_table_file = file;
        Ok(())
    }),
    // Keep filters come before drop filters, as on the command line.
    key("keep_where", Filters, |j, v| {
        let mut keep = parse_filters(v, true)?;
        keep.extend(j.road_settings.filters.drain(..).filter(|f| !f.keep));
        j.road_settings.filters = keep;
        Ok(())
    }),
    key("drop_where", Filters, |j, v| {
        j.road_settings.filters.retain(|f| f.keep);
        j.road_settings.filters.extend(parse_filters(v, false)?);
        Ok(())
    }),
    key("damage_zones", OptPath, |j, v| {
        j.zones = v.opt_path()?.map(Source::File);
        Ok(())
    }),
    key("zone_damage_field", Text, |j, v| {
        j.zone_damage.field = v.text()?;
        Ok(())
    }),
    key("zones_crs", OptText, |j, v| {
        j.zones_crs = v.opt_text()?;
        Ok(())
    }),
    key("damage_points", OptPath, |j, v| {
        j.reports = v.opt_path()?.map(Source::File);
        Ok(())
    }),
    key("report_distance", Number, |j, v| {
        j.report_distance_m = v.number()?;
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
    key("node_crossings", Bool, |j, v| {
        j.road_settings.node_crossings = v.flag()?;
        Ok(())
    }),
    key("structure_field", OptText, |j, v| {
        j.road_settings.structure_field = v.opt_text()?;
        Ok(())
    }),
    key("attribution", OptText, |j, v| {
        j.road_settings.attribution = v.opt_text()?;
        Ok(())
    }),
    key("mst", Choice(&["kruskal", "prim"]), |j, v| {
        j.mst = match v.text()?.as_str() {
            "kruskal" => MstAlgorithm::Kruskal,
            "prim" => MstAlgorithm::Prim,
            o => return Err(format!("{o:?} is not an algorithm")),
        };
        Ok(())
    }),
    key("max_attach", Number, |j, v| {
        j.max_attach_m = v.number()?;
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
            j.effort = match v.text()?.as_str() {
                "quick" => Effort::Quick,
                "normal" => Effort::Normal,
                "thorough" => Effort::Thorough,
                o => return Err(format!("{o:?} is not an effort")),
            };
            Ok(())
        },
    ),
    key("site_id_field", OptText, |j, v| {
        j.site_settings.id_field = v.opt_text()?;
        Ok(())
    }),
    key("site_name_field", OptText, |j, v| {
        j.site_settings.name_field = v.opt_text()?;
        Ok(())
    }),
    key("priority_field", OptText, |j, v| {
        j.site_settings.priority_field = v.opt_text()?;
        Ok(())
    }),
    key("lon_column", OptText, |j, v| {
        j.site_settings.lon_column = v.opt_text()?;
        Ok(())
    }),
    key("lat_column", OptText, |j, v| {
        j.site_settings.lat_column = v.opt_text()?;
        Ok(())
    }),
    key("sites_crs", OptText, |j, v| {
        j.site_settings.crs = v.opt_text()?;
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

fn parse_filters(v: &Value, keep: bool) -> Result<Vec<RoadFilter>, String> {
    v.filters()?
        .iter()
        .map(|f| RoadFilter::parse(f, keep))
        .collect()
}
