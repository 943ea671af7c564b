//! The sites layer: every site with its attributes, where it joined the network, and its status.

use super::geojson::Prop;
use super::sink::LayerSink;
use serde_json::{Map, Value};
use std::collections::{BTreeMap, BTreeSet};

/// One site as written to `sites.geojson`.
#[derive(Debug, Clone)]
pub struct SiteRow {
    /// The site's id.
    pub id: String,
    /// Display name.
    pub name: Option<String>,
    /// Priority.
    pub priority: f64,
    /// Site position, lon/lat.
    pub pos: [f64; 2],
    /// The input attributes.
    pub attributes: Map<String, Value>,
    /// True for the hub (depot).
    pub hub: bool,
    /// Junction it joined.
    pub junction: Option<u32>,
    /// Point on the road where it joined, lon/lat.
    pub attach_point: Option<[f64; 2]>,
    /// Distance from the site to that point (or to the nearest road), metres.
    pub attach_distance_m: Option<f64>,
    /// Status code (`joined`, `not_attached`, `left_out_by_budget`, `unreachable`).
    pub status: &'static str,
    /// The status in words.
    pub status_label: &'static str,
    /// Why it is not joined to the hub.
    pub reason: Option<String>,
    /// True when the site is joined to the hub (status `joined`).
    pub joined_to_hub: bool,
    /// Index of its group in summary.json.
    pub group: Option<usize>,
}

/// reknit's own properties of the sites layer.
const OWN: [&str; 13] = [
    "site_id",
    "name",
    "priority",
    "hub",
    "status",
    "status_label",
    "joined_to_hub",
    "reason",
    "group",
    "junction",
    "attach_distance_m",
    "attach_lon",
    "attach_lat",
];

/// The names the input attributes `keys` (every key any site holds) are written under, by both
/// the GeoJSON and the GeoPackage writer: its own, or `input_<key>` when it is one of reknit's,
/// with the first free `_2`, `_3`, … when that is taken too (by reknit's or by another input
/// attribute, such as an input `input_name` beside an input `name`), so no name is written twice.
pub fn output_names<'a>(keys: impl IntoIterator<Item = &'a String>) -> BTreeMap<String, String> {
    let keys: BTreeSet<&String> = keys.into_iter().collect();
    let mut used: BTreeSet<String> = OWN.iter().map(|k| k.to_string()).collect();
    let mut out = BTreeMap::new();
    // Attributes that keep their names are placed first, so a renamed one steps round them.
    for k in keys.iter().filter(|k| !OWN.contains(&k.as_str())) {
        used.insert(k.to_string());
        out.insert(k.to_string(), k.to_string());
    }
    for k in keys.iter().filter(|k| OWN.contains(&k.as_str())) {
        let base = format!("input_{k}");
        let mut name = base.clone();
        let mut n = 2;
        while used.contains(&name) {
            name = format!("{base}_{n}");
            n += 1;
        }
        used.insert(name.clone());
        out.insert(k.to_string(), name);
    }
    out
}

/// Writes the sites as Point features; reknit's own properties first, the input's after them
/// (renamed by [`output_names`] where one would repeat a name).
pub fn write_sites<S: LayerSink + ?Sized>(gj: &mut S, rows: &[SiteRow]) -> std::io::Result<()> {
    let names = output_names(rows.iter().flat_map(|r| r.attributes.keys()));
    for r in rows {
        let renamed: Vec<(&str, &Value)> = r
            .attributes
            .iter()
            .map(|(k, v)| (names.get(k).map_or(k.as_str(), String::as_str), v))
            .collect();
        let mut props: Vec<(&str, Prop)> = vec![
            ("site_id", Prop::Str(&r.id)),
            ("name", r.name.as_deref().map_or(Prop::Null, Prop::Str)),
            ("priority", Prop::Num(r.priority)),
            ("hub", Prop::Bool(r.hub)),
            ("status", Prop::Str(r.status)),
            ("status_label", Prop::Str(r.status_label)),
            ("joined_to_hub", Prop::Bool(r.joined_to_hub)),
            ("reason", r.reason.as_deref().map_or(Prop::Null, Prop::Str)),
            ("group", r.group.map_or(Prop::Null, |g| Prop::Int(g as i64))),
            (
                "junction",
                r.junction.map_or(Prop::Null, |j| Prop::Int(j as i64)),
            ),
            (
                "attach_distance_m",
                r.attach_distance_m.map_or(Prop::Null, Prop::Fixed3),
            ),
            (
                "attach_lon",
                r.attach_point.map_or(Prop::Null, |p| Prop::Num7(p[0])),
            ),
            (
                "attach_lat",
                r.attach_point.map_or(Prop::Null, |p| Prop::Num7(p[1])),
            ),
        ];
        for (k, v) in &renamed {
            props.push((k, Prop::Json(v)));
        }
        gj.point(&props, r.pos)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Renamed attributes step round every name already taken, own or input.
    #[test]
    fn output_names_never_repeat() {
        let keys: Vec<String> = ["name", "input_name", "input_name_2", "group", "Group"]
            .map(String::from)
            .to_vec();
        let names = output_names(&keys);
        assert_eq!(names["input_name"], "input_name");
        assert_eq!(names["input_name_2"], "input_name_2");
        assert_eq!(names["name"], "input_name_3");
        assert_eq!(names["group"], "input_group");
        assert_eq!(names["Group"], "Group");
        let all: BTreeSet<&String> = names.values().collect();
        assert_eq!(all.len(), keys.len());
        assert!(all.iter().all(|n| !OWN.contains(&n.as_str())));
    }
}
