//! GeoJSON road layers (RFC 7946 FeatureCollections) as a [`FeatureSource`]: the streaming reader
//! ([`super::geojson::read_collection`]) hands each feature on, and the legacy `crs` member (GeoJSON
//! 2008), wherever it sits among the members, gives the CRS.

use super::IngestError;
use super::crs::Crs;
use super::geojson::{RawFeature, read_collection};
use super::reader::{FeatureSource, SourceInfo};
use super::source::{HashingReader, InputRecord, Source};
use std::path::{Path, PathBuf};

/// A GeoJSON file or in-memory text, read once by [`FeatureSource::features`].
pub struct GeoJsonSource {
    source: Source,
    path: PathBuf,
    /// The `crs` member, once read.
    crs: Option<serde_json::Value>,
}

impl GeoJsonSource {
    /// A source over `source` (nothing is opened until its features are read).
    pub fn new(source: &Source) -> GeoJsonSource {
        GeoJsonSource {
            path: source.display_path(),
            source: source.clone(),
            crs: None,
        }
    }
}

impl FeatureSource for GeoJsonSource {
    fn path(&self) -> &Path {
        &self.path
    }

    fn declared_crs(&self) -> Result<Option<Crs>, IngestError> {
        // No crs member: the file declares nothing, and RFC 7946 §4 makes that WGS84.
        match self.crs.as_ref().filter(|c| !c.is_null()) {
            None => Ok(None),
            Some(c) => super::crs::crs_member(&self.path, Some(c), "--crs").map(Some),
        }
    }

    fn features(
        &mut self,
        wanted: &[String],
        sink: &mut dyn FnMut(usize, RawFeature) -> Result<(), IngestError>,
    ) -> Result<SourceInfo, IngestError> {
        let mut reader = self.source.open()?;
        let info = read_collection(&mut reader, wanted, sink)
            .map_err(|e| IngestError::from_read(&self.path, e))?;
        self.crs = info.crs;
        let (sha256, bytes) =
            HashingReader::finish_buffered(reader).map_err(|source| IngestError::Io {
                path: self.path.clone(),
                source,
            })?;
        Ok(SourceInfo {
            features: info.features,
            skipped: Default::default(),
            input: InputRecord {
                role: "roads".into(),
                path: self.path.display().to_string(),
                bytes,
                sha256,
                deleted_records: 0,
            },
            osm: false,
            features_cut_at_edge: 0,
        })
    }
}
