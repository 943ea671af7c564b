//! The attribution the road data's licence asks of everything made from it.
//!
//! OpenStreetMap data (ODbL 1.0) is recognised by the file (an `.osm.pbf`, read by
//! `ingest::osm`) or by the fields OpenStreetMap exports carry (`osm_id`, `@id`);
//! `--attribution TEXT` names any other source. Both together are joined, OpenStreetMap's last.

use crate::cautions::OSM_ATTRIBUTION;
use crate::ingest::source::Source;

/// Fields whose presence marks a layer as exported from OpenStreetMap.
pub const OSM_FIELDS: &[&str] = &["osm_id", "@id"];

/// True when the road source is an OpenStreetMap file by its name (`.osm.pbf`, `.osm`).
pub fn osm_file(source: &Source) -> bool {
    source.path().and_then(|p| p.file_name()).is_some_and(|n| {
        let n = n.to_string_lossy().to_lowercase();
        n.ends_with(".osm.pbf") || n.ends_with(".osm")
    })
}

/// The attribution outputs carry: the given text and, for OpenStreetMap data, its licence's
/// line (once, even when the given text already names OpenStreetMap); `None` when neither applies.
pub fn attribution(given: Option<&str>, osm: bool) -> Option<String> {
    let given = given.map(str::trim).filter(|t| !t.is_empty());
    match (given, osm) {
        (Some(t), true) if !t.contains("OpenStreetMap") => Some(format!("{t}; {OSM_ATTRIBUTION}")),
        (Some(t), _) => Some(t.to_string()),
        (None, true) => Some(OSM_ATTRIBUTION.to_string()),
        (None, false) => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn osm_data_is_always_attributed() {
        assert_eq!(attribution(None, true).as_deref(), Some(OSM_ATTRIBUTION));
        assert_eq!(
            attribution(Some("County GIS"), true).unwrap(),
            format!("County GIS; {OSM_ATTRIBUTION}")
        );
        assert_eq!(
            attribution(Some("© OpenStreetMap contributors"), true).as_deref(),
            Some("© OpenStreetMap contributors")
        );
        assert_eq!(attribution(Some("  "), false), None);
        assert_eq!(attribution(None, false), None);
        let pbf = Source::File("x/li.osm.pbf".into());
        assert!(osm_file(&pbf));
        assert!(!osm_file(&Source::File("x/roads.geojson".into())));
    }
}
