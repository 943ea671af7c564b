//! The declared fields of every map layer, in the order its writer gives them: what a typed
//! format (the GeoPackage) needs before the first feature. The GeoPackage writer refuses a
//! property that is not declared here, or of another kind, so the two cannot drift apart
//! unnoticed (tests/gpkg_out.rs writes every layer).

use super::sink::FieldKind::{self, Boolean as B, Integer as I, Real as R, Text as T};
use super::sink::{Field, GeomKind, LayerSpec, kind_of_values};
use crate::network::Network;

/// The kind of `source_id`: the input ids as they were typed.
fn source_id_kind(net: &Network) -> FieldKind {
    kind_of_values(net.features.iter().filter_map(|f| f.source_id.as_ref()))
}

/// `network` (every edge) or `plan` (the chosen edges, with their order, crew and days).
pub fn edges(name: &'static str, net: &Network, plan: bool) -> LayerSpec {
    let mut s = LayerSpec::new(
        name,
        GeomKind::Line,
        &[
            ("edge", I),
            ("from", I),
            ("to", I),
            ("length_m", R),
            ("damage", R),
            ("impassable", B),
            ("cost", R),
            ("component", I),
            ("source_index", I),
            ("source_layer", T),
            ("source_id", source_id_kind(net)),
            ("category", T),
            ("structure", T),
            ("work_order", T),
        ],
    );
    if plan {
        s.fields.extend(
            LayerSpec::new(
                name,
                GeomKind::Line,
                &[
                    ("repair", B),
                    ("order", I),
                    ("crew", I),
                    ("first_day", I),
                    ("last_day", I),
                ],
            )
            .fields,
        );
    }
    s
}

/// `qa`: what the reading and noding changed or suspect.
pub fn qa() -> LayerSpec {
    LayerSpec::new(
        "qa",
        GeomKind::Point,
        &[
            ("kind", T),
            ("kind_label", T),
            ("distance_m", R),
            ("source_index", I),
            ("source_layer", T),
        ],
    )
}

/// `sites`: reknit's own fields, then the input attributes (as the sites writer renames them),
/// each typed by the values the sites hold.
pub fn sites(rows: &[super::sites::SiteRow]) -> LayerSpec {
    let mut s = LayerSpec::new(
        "sites",
        GeomKind::Point,
        &[
            ("site_id", T),
            ("name", T),
            ("priority", R),
            ("hub", B),
            ("status", T),
            ("status_label", T),
            ("joined_to_hub", B),
            ("reason", T),
            ("group", I),
            ("junction", I),
            ("attach_distance_m", R),
            ("attach_lon", R),
            ("attach_lat", R),
        ],
    );
    let names = super::sites::output_names(rows.iter().flat_map(|r| r.attributes.keys()));
    for (k, name) in names {
        let kind = kind_of_values(rows.iter().filter_map(|r| r.attributes.get(&k)));
        s.fields.push(Field { name, kind });
    }
    s
}

/// `single-failures`: roads whose loss alone cuts sites off the hub.
pub fn single_failures() -> LayerSpec {
    LayerSpec::new(
        "single-failures",
        GeomKind::Line,
        &[
            ("edge", I),
            ("road", T),
            ("work_order", T),
            ("length_m", R),
            ("sites_cut_off", T),
            ("sites_cut_off_count", I),
        ],
    )
}

/// `backup`: the further repairs of the ways round.
pub fn backup(net: &Network) -> LayerSpec {
    LayerSpec::new(
        "backup",
        GeomKind::Line,
        &[
            ("order", I),
            ("link", I),
            ("edge", I),
            ("source_index", I),
            ("source_layer", T),
            ("source_id", source_id_kind(net)),
            ("road", T),
            ("length_m", R),
            ("damage", R),
            ("impassable", B),
            ("cost", R),
            ("protects_sites", T),
            ("structure", T),
            ("work_order", T),
        ],
    )
}

/// `corridors`: the route from the hub to each joined site.
pub fn corridors() -> LayerSpec {
    LayerSpec::new(
        "corridors",
        GeomKind::Line,
        &[
            ("site", T),
            ("from_junction", I),
            ("to_junction", I),
            ("length_m", R),
            ("undamaged_length_m", R),
            ("detour_ratio", R),
            ("over_max_detour", B),
            ("fix_cost", R),
            ("fix_length_m", R),
            ("fix_work_orders", T),
            ("fix_note", T),
        ],
    )
}

/// `changes`: what a re-plan changed (lines for roads, points for sites).
pub fn changes() -> LayerSpec {
    LayerSpec::new(
        "changes",
        GeomKind::Mixed,
        &[
            ("change", T),
            ("change_label", T),
            ("work_order", T),
            ("edge", I),
            ("site_id", T),
            ("length_m", R),
            ("cost", R),
            ("started", B),
        ],
    )
}
