//! Input files: opened read-only, fingerprinted with SHA-256 while they are read.

use super::IngestError;
use sha2::{Digest, Sha256};
use std::fs::File;
use std::io::{BufRead, BufReader, Read};
use std::path::{Path, PathBuf};

/// Where a layer comes from: a file on disk, or data bundled in the binary (the demo).
#[derive(Debug, Clone)]
pub enum Source {
    /// A file path.
    File(PathBuf),
    /// Bytes compiled into the program, with the name shown in messages and summaries.
    Bundled {
        /// Display name.
        name: String,
        /// The content.
        bytes: &'static [u8],
    },
    /// Bytes held in memory (fuzzing, embedding), with the name shown in messages.
    Memory {
        /// Display name (its extension chooses the format where that matters).
        name: String,
        /// The content.
        bytes: std::sync::Arc<[u8]>,
    },
}

impl Source {
    /// The path or name shown in messages and summaries.
    pub fn display_path(&self) -> PathBuf {
        match self {
            Source::File(p) => p.clone(),
            Source::Bundled { name, .. } | Source::Memory { name, .. } => PathBuf::from(name),
        }
    }

    /// Opens a text source (GeoJSON, CSV) through a SHA-256 fingerprinting reader: a UTF-8
    /// byte-order mark is skipped (the digest still covers it) and other formats are refused by name.
    pub fn open(&self) -> Result<BufReader<HashingReader<Box<dyn Read>>>, IngestError> {
        let mut r = self.open_binary()?;
        let path = self.display_path();
        let head = r.fill_buf().map_err(|source| IngestError::Io {
            path: path.clone(),
            source,
        })?;
        let skip =
            super::limits::sniff(&head[..head.len().min(64)]).map_err(|m| IngestError::Io {
                path,
                source: std::io::Error::other(m),
            })?;
        r.consume(skip);
        Ok(r)
    }

    /// Opens the source for buffered reading through a SHA-256 fingerprinting reader, as it is.
    pub fn open_binary(&self) -> Result<BufReader<HashingReader<Box<dyn Read>>>, IngestError> {
        let inner: Box<dyn Read> = match self {
            Source::File(p) => {
                let io = |source| IngestError::Io {
                    path: p.clone(),
                    source,
                };
                super::limits::regular_file(p).map_err(io)?;
                Box::new(File::open(p).map_err(io)?)
            }
            Source::Bundled { bytes, .. } => Box::new(*bytes),
            Source::Memory { bytes, .. } => Box::new(std::io::Cursor::new(bytes.clone())),
        };
        // Hash whole buffer refills, not the single bytes a parser asks for.
        Ok(BufReader::with_capacity(
            1 << 20,
            HashingReader {
                inner,
                hasher: Sha256::new(),
                bytes: 0,
            },
        ))
    }

    /// The file path when the source is a file.
    pub fn path(&self) -> Option<&Path> {
        match self {
            Source::File(p) => Some(p),
            Source::Bundled { .. } | Source::Memory { .. } => None,
        }
    }
}

/// A reader that computes the SHA-256 and byte count of everything read through it.
pub struct HashingReader<R> {
    inner: R,
    hasher: Sha256,
    bytes: u64,
}

impl<R: Read> HashingReader<R> {
    /// Reads whatever is left (so the digest covers the whole input) and returns (hex digest, bytes).
    pub fn finish_buffered(reader: BufReader<Self>) -> std::io::Result<(String, u64)> {
        // Bytes still in the buffer were hashed when they were read from the file.
        reader.into_inner().finish()
    }

    /// Reads whatever is left (so the digest covers the whole input) and returns (hex digest, bytes).
    pub fn finish(mut self) -> std::io::Result<(String, u64)> {
        std::io::copy(&mut self, &mut std::io::sink())?;
        let digest = self.hasher.finalize();
        let hex = digest.iter().map(|b| format!("{b:02x}")).collect();
        Ok((hex, self.bytes))
    }
}

impl<R: Read> Read for HashingReader<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.hasher.update(&buf[..n]);
        self.bytes += n as u64;
        Ok(n)
    }
}

/// Path, size and SHA-256 of an input, as recorded in summaries.
#[derive(Debug, Clone, serde::Serialize)]
pub struct InputRecord {
    /// What the layer is used for (roads, sites, …).
    pub role: String,
    /// The path as given.
    pub path: String,
    /// Size in bytes.
    pub bytes: u64,
    /// SHA-256 of the content, hex.
    pub sha256: String,
    /// Records a Shapefile's .dbf flags deleted, skipped with their shapes (omitted when none).
    #[serde(skip_serializing_if = "is_zero")]
    pub deleted_records: usize,
}

fn is_zero(n: &usize) -> bool {
    *n == 0
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sha256_of_abc() {
        // FIPS 180-2, Appendix B.1: SHA-256("abc").
        let s = Source::Bundled {
            name: "abc".into(),
            bytes: b"abc",
        };
        let (hex, n) = HashingReader::finish_buffered(s.open().unwrap()).unwrap();
        assert_eq!(n, 3);
        assert_eq!(
            hex,
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }
}
