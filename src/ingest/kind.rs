//! What kind of layer an input is: the word for one of its features, its role in summaries and the
//! options that choose its CRS, layer and CSV separator.
//!
//! The readers shared by every kind (zip, Shapefile, GeoPackage, CSV) take a [`LayerKind`], so each
//! message names the options of the layer it is about when it is written, never by rewriting text
//! afterwards.

/// One kind of input layer and the options that apply to it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LayerKind {
    /// One feature, for messages: "road", "site", "damage report", "zone".
    pub noun: &'static str,
    /// The layer's role in summaries and messages: "roads", "sites", "damage reports",
    /// "damage zones".
    pub role: &'static str,
    /// The option naming the layer's CRS (`--sites-crs`).
    pub crs_flag: &'static str,
    /// The option choosing a GeoPackage layer or a zipped Shapefile set (`--sites-layer`).
    pub layer_flag: &'static str,
    /// The option naming a CSV file's separator (`--sites-delimiter`); empty for the kinds never
    /// read from CSV (roads, zones).
    pub delimiter_flag: &'static str,
}

/// Road layers (`--roads`).
pub const ROADS: LayerKind = LayerKind {
    noun: "road",
    role: "roads",
    crs_flag: "--crs",
    layer_flag: "--roads-layer",
    delimiter_flag: "",
};

/// The sites layer (`--sites`).
pub const SITES: LayerKind = LayerKind {
    noun: "site",
    role: "sites",
    crs_flag: "--sites-crs",
    layer_flag: "--sites-layer",
    delimiter_flag: "--sites-delimiter",
};

/// Field damage reports (`--damage-points`).
pub const DAMAGE_REPORTS: LayerKind = LayerKind {
    noun: "damage report",
    role: "damage reports",
    crs_flag: "--damage-points-crs",
    layer_flag: "--damage-points-layer",
    delimiter_flag: "--damage-points-delimiter",
};

/// Damage zones (`--damage-zones`).
pub const DAMAGE_ZONES: LayerKind = LayerKind {
    noun: "zone",
    role: "damage zones",
    crs_flag: "--zones-crs",
    layer_flag: "--zones-layer",
    delimiter_flag: "",
};

/// Every kind, roads first.
pub const ALL: [&LayerKind; 4] = [&ROADS, &SITES, &DAMAGE_REPORTS, &DAMAGE_ZONES];

impl LayerKind {
    /// The kind whose role (as inputs are named in summaries) is `role`; roads for any other.
    pub fn of_role(role: &str) -> &'static LayerKind {
        ALL.into_iter().find(|k| k.role == role).unwrap_or(&ROADS)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kinds_are_found_by_role() {
        for k in ALL {
            assert_eq!(LayerKind::of_role(k.role), k);
        }
        assert_eq!(LayerKind::of_role("anything else"), &ROADS);
    }
}
