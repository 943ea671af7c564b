//! The files of a Shapefile set held in memory, whether they lie beside a `.shp` on disk or inside
//! a zip archive ([`super::zipped`]), and the set opened for reading: shapes through the checked
//! `.shx`, records from the `.dbf` decoded by their declared code page.

use super::IngestError;
use super::shapeset::{NumericText, check_index, scan_table};
use shapefile::Shape;
use std::io::Cursor;
use std::path::{Path, PathBuf};
use std::sync::Arc;

/// One file of a set: the path shown in messages and its bytes.
#[derive(Debug, Clone)]
pub struct Member {
    /// The path shown in messages (inside a zip: the archive's path, then the member's name).
    pub path: PathBuf,
    /// The whole content.
    pub bytes: Shared,
}

/// A file's content, shared without copying: a `Vec` moved in as read (turning it into an
/// `Arc<[u8]>` would copy it, briefly doubling the memory a large `.shp` or `.dbf` takes).
#[derive(Debug, Clone, Default)]
pub struct Shared(Arc<Vec<u8>>);

impl std::ops::Deref for Shared {
    type Target = [u8];
    fn deref(&self) -> &[u8] {
        &self.0
    }
}

impl AsRef<[u8]> for Shared {
    fn as_ref(&self) -> &[u8] {
        &self.0
    }
}

impl From<Vec<u8>> for Shared {
    fn from(v: Vec<u8>) -> Self {
        Shared(Arc::new(v))
    }
}

impl From<&[u8]> for Shared {
    fn from(v: &[u8]) -> Self {
        Shared(Arc::new(v.to_vec()))
    }
}

/// A small text sidecar (`.prj`, `.cpg`): its path and its text, or why it cannot be read (kept
/// until needed: a `.prj` that `--crs` overrides is never an error).
#[derive(Debug, Clone)]
pub struct Sidecar {
    /// The path shown in messages.
    pub path: PathBuf,
    /// The text, or the reason it cannot be read.
    pub text: Result<String, String>,
}

/// A Shapefile set in memory: the three files it needs and the sidecars it may have.
#[derive(Debug, Clone)]
pub struct SetFiles {
    /// The shapes.
    pub shp: Member,
    /// The index of the shapes.
    pub shx: Member,
    /// The attribute table.
    pub dbf: Member,
    /// The CRS, as WKT.
    pub prj: Option<Sidecar>,
    /// The `.dbf`'s code page label.
    pub cpg: Option<Sidecar>,
}

/// The file with extension `ext` beside `path`, in either letter case.
pub fn sibling(path: &Path, ext: &str) -> PathBuf {
    let lower = path.with_extension(ext);
    let upper = path.with_extension(ext.to_uppercase());
    if !lower.exists() && upper.exists() {
        upper
    } else {
        lower
    }
}

fn refuse(path: &Path, message: String) -> IngestError {
    IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(message),
    }
}

impl SetFiles {
    /// Reads the set beside `path` (a `.shp`). A set without its index or attributes is
    /// incomplete (and may be truncated); every member is checked to be a regular file before any
    /// is opened, as a named pipe would block the open.
    pub fn from_disk(path: &Path) -> Result<SetFiles, IngestError> {
        for (ext, what) in [("shx", "index"), ("dbf", "attribute table")] {
            if !sibling(path, ext).exists() {
                return Err(refuse(
                    path,
                    format!(
                        "the {what} file {} of the Shapefile set is missing",
                        path.with_extension(ext).display()
                    ),
                ));
            }
        }
        let (shx, dbf) = (sibling(path, "shx"), sibling(path, "dbf"));
        for p in [path, &shx, &dbf] {
            super::limits::regular_file(p).map_err(|source| IngestError::Io {
                path: p.to_path_buf(),
                source,
            })?;
        }
        let read = |p: PathBuf| match std::fs::read(&p) {
            Ok(b) => Ok(Member {
                path: p,
                bytes: b.into(),
            }),
            Err(source) => Err(IngestError::Io { path: p, source }),
        };
        let sidecar = |ext: &str| {
            let p = sibling(path, ext);
            p.exists().then(|| Sidecar {
                text: super::limits::read_small_text(&p).map_err(|e| e.to_string()),
                path: p,
            })
        };
        Ok(SetFiles {
            shp: read(path.to_path_buf())?,
            shx: read(shx)?,
            dbf: read(dbf)?,
            prj: sidecar("prj"),
            cpg: sidecar("cpg"),
        })
    }
}

type Bytes = Cursor<Shared>;

/// An open Shapefile set: shapes from the .shp (through its checked .shx), records from the .dbf,
/// and which records the .dbf flags deleted.
pub struct ShapeSet {
    shapes: shapefile::ShapeReader<Bytes>,
    table: shapefile::dbase::Reader<Bytes>,
    deleted: Vec<bool>,
    overflow: NumericText,
}

/// One record of a set: its shape and attributes, or the error reading them.
pub type SetItem = Result<(Shape, shapefile::dbase::Record), shapefile::Error>;

impl ShapeSet {
    /// How many records the .dbf flags deleted (skipped with their shapes).
    pub fn deleted(&self) -> usize {
        self.deleted.iter().filter(|&&d| d).count()
    }

    /// What the .dbf's numeric fields hold beyond the table reader's values (overflow markers, long numbers).
    pub fn numeric_text(&self) -> NumericText {
        self.overflow.clone()
    }

    /// How many records the set holds, deleted ones included.
    pub fn record_count(&self) -> usize {
        self.deleted.len()
    }

    /// The names of the attribute table's fields, in table order.
    pub fn fields(&self) -> Vec<String> {
        self.table
            .fields()
            .iter()
            .map(|f| f.name().to_string())
            .collect()
    }

    /// The records not flagged deleted, each with its 0-based record number in the files.
    pub fn records(&mut self) -> impl Iterator<Item = (usize, SetItem)> + '_ {
        let deleted = &self.deleted;
        let mut rows = self.table.iter_records();
        self.shapes
            .iter_shapes()
            .enumerate()
            .filter(|(i, _)| !deleted.get(*i).copied().unwrap_or(false))
            .map(move |(i, shape)| {
                let row = match rows.next() {
                    Some(r) => r.map_err(shapefile::Error::DbaseError),
                    None => Err(shapefile::Error::MissingDbf),
                };
                (i, shape.and_then(|s| row.map(|r| (s, r))))
            })
    }
}

/// Opens the Shapefile set beside `path` for reading ([`open_files`]).
pub fn open_set(path: &Path) -> Result<ShapeSet, IngestError> {
    open_files(&SetFiles::from_disk(path)?)
}

/// The code page a dBASE language driver byte (header byte 29) names, when the text decoder
/// knows it; `None` leaves the table to the reader's default (UTF-8, read lossily). The table is
/// the language driver IDs that Shapefile writers use (from memory: ESRI's code page list; the
/// dBASE IV/V ones such as 0x03, 0x64 and 0xC8 agree with the table reader's own).
fn driver_code_page(byte: u8) -> Option<shapefile::dbase::encoding::DynEncoding> {
    let name = match byte {
        0x03 | 0x57 | 0x58 | 0x59 => "1252",
        0x13 | 0x7B => "932",
        0x4D | 0x7A => "936",
        0x4E | 0x79 => "949",
        0x4F | 0x78 => "BIG5",
        0x50 | 0x7C => "874",
        0x26 | 0x65 => "866",
        0x7D => "1255",
        0x7E => "1256",
        0xC8 => "1250",
        0xC9 => "1251",
        0xCA => "1254",
        0xCB => "1253",
        _ => return None,
    };
    shapefile::dbase::encoding::DynEncoding::from_name(name)
}

/// Opens a set held in memory. The .dbf text is decoded by its declared code page (a .cpg, else
/// the dBASE language driver byte); a table declared or assumed UTF-8 is read lossily (undecodable
/// bytes become U+FFFD) rather than refused. A .dbf whose record count differs from the number of
/// shapes is refused: rows would pair with the wrong roads or be lost. A .shx that disagrees with
/// the .shp is refused; records the .dbf flags deleted are skipped together with their shapes by
/// [`ShapeSet::records`].
pub fn open_files(files: &SetFiles) -> Result<ShapeSet, IngestError> {
    use shapefile::dbase;
    let (shp, dbf) = (&files.shp.path, &files.dbf.path);
    let cursor = |m: &Member| Cursor::new(m.bytes.clone());
    // Headers: 100 bytes for .shp and .shx (ESRI Shapefile Technical Description, 1998), 32
    // for .dbf (dBASE III, common practice, no source); a shorter file is named before any
    // reader stumbles on it.
    for (m, header) in [(&files.shp, 100), (&files.shx, 100), (&files.dbf, 32)] {
        if m.bytes.len() < header {
            return Err(refuse(
                &m.path,
                format!(
                    "the file holds {} byte(s), fewer than its {header}-byte header: it is empty \
                     or truncated",
                    m.bytes.len()
                ),
            ));
        }
    }
    // The .shp and .shx headers declare their file's length in 16-bit words (bytes 24 to 27,
    // big-endian): a file shorter than it says is truncated, and is named before a reader
    // runs out of bytes inside it.
    for m in [&files.shp, &files.shx] {
        let words = i32::from_be_bytes([m.bytes[24], m.bytes[25], m.bytes[26], m.bytes[27]]);
        let declared = i64::from(words) * 2;
        if declared > m.bytes.len() as i64 {
            return Err(refuse(
                &m.path,
                format!(
                    "its header declares {declared} bytes but the file holds {}: it is truncated",
                    m.bytes.len()
                ),
            ));
        }
    }
    let shapes = shapefile::ShapeReader::with_shx(cursor(&files.shp), cursor(&files.shx))
        .map_err(|e| refuse(shp, shapefile_error(shp, e)))?;
    let declared = match files.cpg.as_ref().map(|c| (c, c.text.as_ref())) {
        Some((c, Ok(label))) if !label.trim().is_empty() => Some(
            dbase::encoding::DynEncoding::from_name(label).ok_or_else(|| {
                refuse(
                    &c.path,
                    format!(
                        "names the code page {:?}, which reknit cannot decode: the table's text \
                         would be read wrongly; write a code page name it knows (UTF-8, 1252, \
                         ISO-8859-1, 1251, 936…) into it, or remove it if the table is UTF-8",
                        label.trim()
                    ),
                )
            })?,
        ),
        _ => files.dbf.bytes.get(29).and_then(|&b| driver_code_page(b)),
    };
    let dbf_fail = |e: dbase::Error| refuse(dbf, super::set_errors::dbf_table(&e));
    let table = match declared {
        Some(enc) => dbase::ReaderBuilder::new()
            .with_encoding(enc)
            .build(cursor(&files.dbf))
            .map_err(dbf_fail)?,
        None => {
            let t = dbase::Reader::new(cursor(&files.dbf)).map_err(dbf_fail)?;
            if t.header().code_page_mark == dbase::CodePageMark::Utf8 {
                dbase::ReaderBuilder::new()
                    .with_encoding(dbase::UnicodeLossy)
                    .build(cursor(&files.dbf))
                    .map_err(dbf_fail)?
            } else {
                t
            }
        }
    };
    let rows = table.header().num_records as usize;
    let count = shapes
        .shape_count()
        .map_err(|e| refuse(shp, shapefile_error(shp, e)))?;
    if rows != count {
        return Err(refuse(
            dbf,
            format!(
                "the attribute table has {rows} record(s) but {} has {count} shape(s); the set is \
                 inconsistent (a file from another version of the layer?)",
                shp.display()
            ),
        ));
    }
    check_index(&files.shp, &files.shx)?;
    let scan = scan_table(&files.dbf)?;
    Ok(ShapeSet {
        shapes,
        table,
        deleted: scan.deleted,
        overflow: scan.text,
    })
}

/// A message for a Shapefile reader error, naming the file a missing member would have.
pub fn shapefile_error(path: &Path, e: shapefile::Error) -> String {
    match e {
        shapefile::Error::MissingDbf => format!(
            "the .dbf file ({}) is missing",
            path.with_extension("dbf").display()
        ),
        shapefile::Error::MissingIndexFile => {
            format!(
                "the .shx file ({}) is missing",
                path.with_extension("shx").display()
            )
        }
        other => super::set_errors::shp_message(&other),
    }
}
