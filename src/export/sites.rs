//! The sites layer: every site with its attributes, where it joined the network, and its status.

use super::geojson::Prop;
use super::sink::LayerSink;
use serde_json::{Map, Value};

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

/// The name an input attribute is written under: its own, or prefixed with `input_` when it is
/// one of reknit's.
pub fn output_name(k: &str) -> String {
    match OWN.contains(&k) {
        true => format!("input_{k}"),
        false => k.to_string(),
    }
}

/// Writes the sites as Point features; reknit's own properties first, the input's after them
/// (an input property with the same name as one of reknit's is prefixed with `input_`).
pub fn write_sites<S: LayerSink + ?Sized>(gj: &mut S, rows: &[SiteRow]) -> std::io::Result<()> {
    for r in rows {
        let renamed: Vec<(String, &Value)> = r
            .attributes
            .iter()
            .map(|(k, v)| (output_name(k), v))
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
            props.push((k.as_str(), Prop::Json(v)));
        }
        gj.point(&props, r.pos)?;
    }
    Ok(())
}
