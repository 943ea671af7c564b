//! Ingest stage: reads input layers and turns road lines into a topological [`Network`].
//!
//! Reading ([`roads`]) streams features into a flat [`LineLayer`]; noding ([`noding`]) merges
//! vertices within the snapping tolerance, splits lines at shared vertices, drops zero-length pieces
//! and duplicates, and measures every edge on the ellipsoid. Nothing after this stage touches files.

pub mod attach;
pub mod cleanup;
pub mod coords;
pub mod cost_table;
pub mod crs;
pub mod damage;
pub mod geodesy;
pub mod geojson;
pub mod noding;
pub mod qa;
pub mod repair;
pub mod reports;
pub mod roads;
pub mod scan;
pub mod shapefile;
pub mod sites;
pub mod source;
pub mod zones;

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
    Ok(noding::node_with(
        layer,
        noding::NodingOptions {
            snap_m: settings.snap_m,
            node_crossings: settings.node_crossings,
            report_crossings,
        },
    ))
}
