//! Ingest stage: reads input layers and turns road lines into a topological [`Network`].
//!
//! Reading ([`roads`]) streams features into a flat [`LineLayer`]; noding ([`noding`]) merges
//! vertices within the snapping tolerance, splits lines at shared vertices, drops zero-length pieces
//! and duplicates, and measures every edge on the ellipsoid. Nothing after this stage touches files.

pub mod attach;
pub mod attribution;
pub mod cleanup;
pub mod cluster;
pub mod coords;
pub mod cost_table;
pub mod crs;
pub mod csv_lines;
pub mod csv_points;
pub mod csv_rfc;
pub mod damage;
pub mod elsewhere;
pub mod geodesy;
pub mod geojson;
pub mod geojson_source;
pub mod gpkg;
pub mod kind;
pub mod layered;
pub mod layers;
pub mod limits;
pub mod members;
pub mod noding;
pub mod osm;
pub mod osm_sites;
pub mod outline;
pub mod points;
pub mod points_shp;
pub mod qa;
pub mod reader;
pub mod repair;
pub mod reports;
pub mod roads;
pub mod scan;
pub mod set_errors;
pub mod set_files;
pub mod shapefile;
pub mod shapeset;
pub mod sites;
pub mod sites_csv;
pub mod source;
pub mod structures;
pub mod valid;
pub mod value;
pub mod wkb;
pub mod wrap;
pub mod zipped;
pub mod zones;
pub mod zones_shp;

use crate::network::Network;
use std::path::PathBuf;

pub use noding::NodingStats;
pub use roads::{LineLayer, ReadStats, RoadSettings};

/// Largest snapping tolerance accepted, in metres; more would merge separate roads wholesale.
pub const MAX_SNAP_M: f64 = 1000.0;

/// Errors of the ingest stage; each names the file and, where it applies, the feature and field.
#[derive(Debug, thiserror::Error)]
pub enum IngestError {
    /// The file could not be opened or read.
    #[error("{path}: cannot read: {source}")]
    Io {
        /// The input file.
        path: PathBuf,
        /// The operating system's error.
        source: std::io::Error,
    },
    /// The file is not valid JSON (or not the expected JSON shape).
    #[error("{path}: {}not valid GeoJSON: {message}", feature.map(|f| format!("feature {f}: ")).unwrap_or_default())]
    Syntax {
        /// The input file.
        path: PathBuf,
        /// Index of the feature being read, when inside `features`.
        feature: Option<usize>,
        /// Parser message with line and column.
        message: String,
    },
    /// The JSON document is not a FeatureCollection.
    #[error("{path}: not a GeoJSON FeatureCollection: {message}")]
    NotCollection {
        /// The input file.
        path: PathBuf,
        /// What was found instead.
        message: String,
    },
    /// One feature holds a value that cannot be used.
    #[error("{path}: feature {feature}{}: {message}", field.as_ref().map(|f| format!(", field \"{f}\"")).unwrap_or_default())]
    Feature {
        /// The input file.
        path: PathBuf,
        /// 0-based index of the feature.
        feature: usize,
        /// The property or member concerned.
        field: Option<String>,
        /// What is wrong.
        message: String,
    },
    /// The layer names a coordinate reference system reknit does not support.
    #[error("{path}: {message}")]
    Crs {
        /// The input file.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
    /// The layer holds no usable road lines.
    #[error("{path}: no road lines found ({detail})")]
    Empty {
        /// The input file.
        path: PathBuf,
        /// What the layer held instead.
        detail: String,
    },
    /// The layer's figures cannot be represented exactly (costs too large to add up).
    #[error("{path}: {message}")]
    Unrepresentable {
        /// The input file.
        path: PathBuf,
        /// What is too large.
        message: String,
    },
    /// A setting is out of its valid range.
    #[error("invalid setting {name}: {message}")]
    Setting {
        /// The setting's flag name.
        name: &'static str,
        /// What is wrong.
        message: String,
    },
}

impl IngestError {
    /// The same error with its message (the words after the file, feature and field) passed
    /// through `f`: context known only to a caller is added once here, every variant alike.
    pub fn map_message(self, f: impl FnOnce(String) -> String) -> IngestError {
        use IngestError::*;
        match self {
            Io { path, source } => Io {
                path,
                source: std::io::Error::new(source.kind(), f(source.to_string())),
            },
            Syntax {
                path,
                feature,
                message,
            } => Syntax {
                path,
                feature,
                message: f(message),
            },
            NotCollection { path, message } => NotCollection {
                path,
                message: f(message),
            },
            Feature {
                path,
                feature,
                field,
                message,
            } => Feature {
                path,
                feature,
                field,
                message: f(message),
            },
            Crs { path, message } => Crs {
                path,
                message: f(message),
            },
            Empty { path, detail } => Empty {
                path,
                detail: f(detail),
            },
            Unrepresentable { path, message } => Unrepresentable {
                path,
                message: f(message),
            },
            Setting { name, message } => Setting {
                name,
                message: f(message),
            },
        }
    }

    /// The error for a failed GeoJSON read of `path` (the callback's own errors pass through).
    pub fn from_read(path: &std::path::Path, e: geojson::ReadFailure<IngestError>) -> IngestError {
        let path = path.to_path_buf();
        match e {
            geojson::ReadFailure::Syntax { message, feature } => IngestError::Syntax {
                path,
                feature,
                message: if message.contains("unicode") || message.contains("UTF-8") {
                    format!("{message} (the text is not UTF-8; GeoJSON must be, RFC 8259 §8.1)")
                } else {
                    message
                },
            },
            geojson::ReadFailure::NotCollection(message) => {
                IngestError::NotCollection { path, message }
            }
            geojson::ReadFailure::Io(source) => IngestError::Io { path, source },
            geojson::ReadFailure::Callback(e) => e,
        }
    }
}

/// Builds the network of a road layer; `report_crossings` also lists crossings left apart (slower).
pub fn build_network(
    layer: LineLayer,
    settings: &RoadSettings,
    report_crossings: bool,
) -> Result<(Network, NodingStats), IngestError> {
    settings.validate()?;
    let path = layer
        .input
        .as_ref()
        .map(|i| PathBuf::from(&i.path))
        .unwrap_or_default();
    let (net, stats) = noding::node_with(
        layer,
        noding::NodingOptions {
            snap_m: settings.snap_m,
            node_crossings: settings.node_crossings,
            report_crossings,
        },
    );
    if net.edges.is_empty() {
        // Lines were read, yet none is left: a tolerance or unit far too large for the data.
        return Err(IngestError::Empty {
            path,
            detail: format!(
                "all {} line part(s) collapsed to single points when vertices closer than --snap {} m were merged; \
                 check --snap, and the layer's CRS and units (--crs)",
                stats.zero_length_parts_dropped, settings.snap_m
            ),
        });
    }
    layers::check_layers_kept(&net, &stats, settings.snap_m)?;
    check_cost_total(&net, &path)?;
    Ok((net, stats))
}

/// Largest total repair cost of a network, milli-repair-metres: every sum a solver forms (paths,
/// trees, plans with backup links) stays far below `u64::MAX`, so no total can wrap.
pub const MAX_TOTAL_COST: u64 = 1 << 60;

/// Refuses a network whose edges' costs together exceed [`MAX_TOTAL_COST`].
pub fn check_cost_total(net: &Network, path: &std::path::Path) -> Result<(), IngestError> {
    let total: u128 = net
        .edges
        .iter()
        .filter(|e| e.usable())
        .map(|e| e.cost as u128)
        .sum();
    if total > MAX_TOTAL_COST as u128 {
        return Err(IngestError::Unrepresentable {
            path: path.to_path_buf(),
            message: format!(
                "the repair costs add up to {:.4e} repair-metres, more than reknit represents exactly ({:.4e}); \
                 check the layer's CRS and units (--crs) and the damage factors",
                total as f64 / 1000.0,
                MAX_TOTAL_COST as f64 / 1000.0
            ),
        });
    }
    Ok(())
}

#[cfg(test)]
mod message_tests {
    use super::IngestError;

    #[test]
    fn map_message_keeps_the_variant_file_and_feature() {
        let e = IngestError::Feature {
            path: "a.geojson".into(),
            feature: 3,
            field: Some("damage".into()),
            message: "is not a number".into(),
        }
        .map_message(|m| format!("{m} (more)"));
        assert_eq!(
            e.to_string(),
            "a.geojson: feature 3, field \"damage\": is not a number (more)"
        );
        let e = IngestError::Io {
            path: "b.zip".into(),
            source: std::io::Error::new(std::io::ErrorKind::NotFound, "gone"),
        }
        .map_message(|m| format!("{m}!"));
        assert!(
            matches!(&e, IngestError::Io { source, .. } if source.kind() == std::io::ErrorKind::NotFound)
        );
        assert_eq!(e.to_string(), "b.zip: cannot read: gone!");
    }
}
