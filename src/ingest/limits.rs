//! Limits every reader works within, and what a file's first bytes say about its format.
//!
//! Text inputs may begin with a UTF-8 byte-order mark (RFC 8259 §8.1 lets a parser ignore it);
//! UTF-16 text, archives, OpenStreetMap extracts and other binary formats are named and refused
//! with how to convert them. Each limit is documented in docs/bad-inputs.md.

use std::io::{self, Read};
use std::path::Path;

/// Largest small text file (cost table, manifest, shard or batch summary, `.prj`): 16 MiB.
pub const MAX_SMALL_FILE: u64 = 16 << 20;
/// Largest single JSON string (a name, an id, a property): 64 MiB.
pub const MAX_STRING: usize = 64 << 20;
/// Largest single JSON number or literal outside an array or object: 4 KiB.
pub const MAX_SCALAR: usize = 4 << 10;
/// Largest single GeoJSON feature (or other top-level member value): 1 GiB.
pub const MAX_FEATURE: usize = 1 << 30;
/// Largest member of a zip archive once inflated (a Shapefile's `.shp`, `.shx` or `.dbf`): 1 GiB;
/// sidecar texts (`.prj`, `.cpg`) are held to [`MAX_SMALL_FILE`].
pub const MAX_ZIP_MEMBER: u64 = 1 << 30;
/// Largest Shapefile set inside a zip archive, its `.shp`, `.shx` and `.dbf` inflated together:
/// 1 GiB (all of it is held in memory at once). A larger set is read from its unzipped files.
pub const MAX_ZIP_SET: u64 = 1 << 30;
/// Largest single CSV row: 1 MiB.
pub const MAX_CSV_ROW: usize = 1 << 20;

/// Items a message lists before it says how many more there are.
pub const LISTED: usize = 20;

/// At most [`LISTED`] of `items`, comma-separated, then "and K more": every message that lists
/// what an input holds stays one short line, however much it holds.
pub fn listed<S: AsRef<str>>(items: &[S]) -> String {
    let shown: Vec<&str> = items.iter().take(LISTED).map(AsRef::as_ref).collect();
    match items.len().saturating_sub(LISTED) {
        0 => shown.join(", "),
        more => format!("{} and {more} more", shown.join(", ")),
    }
}

/// Characters of a value a message quotes before it cuts the rest.
pub const QUOTED: usize = 60;

/// `text` for a message: whole when at most [`QUOTED`] characters, else its first [`QUOTED`] and
/// how many characters there are, so a value of megabytes never fills a screen.
pub fn excerpt(text: &str) -> String {
    match text.char_indices().nth(QUOTED) {
        None => text.to_string(),
        Some((at, _)) => format!("{}… ({} characters)", &text[..at], text.chars().count()),
    }
}

/// The UTF-8 encoding of U+FEFF, written by some editors and spreadsheets at the start of a file.
pub const UTF8_BOM: &[u8] = b"\xEF\xBB\xBF";

/// Looks at the first bytes of a text input: the length of a UTF-8 byte-order mark to skip, or a
/// message naming the format the file is in and how to convert it.
pub fn sniff(head: &[u8]) -> Result<usize, String> {
    if head.starts_with(UTF8_BOM) {
        return Ok(UTF8_BOM.len());
    }
    let convert = "convert it to UTF-8 first (e.g. iconv -f UTF-16 -t UTF-8 in > out)";
    if head.starts_with(b"\xFF\xFE") || head.starts_with(b"\xFE\xFF") {
        return Err(format!(
            "the text is UTF-16 (it starts with a UTF-16 byte-order mark); reknit reads UTF-8 (RFC 8259 §8.1): {convert}"
        ));
    }
    if head.len() >= 4 && ((head[0] == 0 && head[1] != 0) || (head[0] != 0 && head[1] == 0)) {
        let printable = |b: u8| b.is_ascii_graphic() || b.is_ascii_whitespace();
        if (printable(head[0]) || printable(head[1])) && (head[2] == 0) == (head[0] == 0) {
            return Err(format!(
                "the text looks like UTF-16 (every other byte is zero); reknit reads UTF-8: {convert}"
            ));
        }
    }
    let formats: [(&[u8], &str); 5] = [
        (
            b"PK\x03\x04",
            "a ZIP archive; a road layer zipped as one Shapefile set is read from a .zip name, other archives: unpack them first (unzip FILE)",
        ),
        (
            b"\x1F\x8B",
            "gzip-compressed; unpack it first (gunzip FILE)",
        ),
        (
            b"SQLite format 3\0",
            "an SQLite database (GeoPackage?); convert the layer: ogr2ogr -f GeoJSON out.geojson in.gpkg LAYER",
        ),
        (
            b"<?xml",
            "XML (OpenStreetMap XML, GML or KML?); convert it: ogr2ogr -f GeoJSON out.geojson IN lines",
        ),
        (b"%PDF", "a PDF document, not a data layer"),
    ];
    for (magic, what) in formats {
        if head.starts_with(magic) {
            return Err(format!("the file is {what}"));
        }
    }
    // An OpenStreetMap PBF extract starts with a length and a BlobHeader naming "OSMHeader".
    if head.len() > 8 && head[..4] == [0, 0, 0, head[3]] && find(&head[4..head.len().min(40)]) {
        return Err(
            "the file is an OpenStreetMap PBF extract; convert the roads to GeoJSON: \
                    ogr2ogr -f GeoJSON out.geojson in.osm.pbf lines"
                .into(),
        );
    }
    Ok(0)
}

fn find(h: &[u8]) -> bool {
    h.windows(9).any(|w| w == b"OSMHeader")
}

/// Reads a small text file whole: at most [`MAX_SMALL_FILE`] bytes, a byte-order mark skipped,
/// other formats named, UTF-8 required. Errors carry a plain message (the caller names the file).
pub fn read_small_text(path: &Path) -> io::Result<String> {
    regular_file(path)?;
    let f = std::fs::File::open(path)?;
    let mut bytes = Vec::new();
    f.take(MAX_SMALL_FILE + 1).read_to_end(&mut bytes)?;
    small_text(bytes)
}

/// Small text already in memory (a member of an archive) under the rules of [`read_small_text`]:
/// at most [`MAX_SMALL_FILE`] bytes, a byte-order mark skipped, other formats named, UTF-8.
pub fn small_text(mut bytes: Vec<u8>) -> io::Result<String> {
    if bytes.len() as u64 > MAX_SMALL_FILE {
        return Err(io::Error::other(format!(
            "larger than {} MiB, the limit for this kind of file",
            MAX_SMALL_FILE >> 20
        )));
    }
    let skip = sniff(&bytes[..bytes.len().min(64)]).map_err(io::Error::other)?;
    bytes.drain(..skip);
    String::from_utf8(bytes).map_err(|e| {
        io::Error::other(format!(
            "not UTF-8 text (byte {} is not part of a UTF-8 character)",
            e.utf8_error().valid_up_to() + skip
        ))
    })
}

/// Refuses a path that is not a regular file (after following links), naming what it is: a named
/// pipe would block the open until some writer appears, a socket cannot be read as a file, and a
/// device or folder has no end or no text. Checked before opening, so nothing ever waits.
pub fn regular_file(path: &Path) -> io::Result<()> {
    use std::os::unix::fs::FileTypeExt;
    let t = std::fs::metadata(path)?.file_type();
    let kind = if t.is_file() {
        return Ok(());
    } else if t.is_dir() {
        "a directory"
    } else if t.is_fifo() {
        "a named pipe (FIFO)"
    } else if t.is_socket() {
        "a socket"
    } else if t.is_block_device() {
        "a block device"
    } else if t.is_char_device() {
        "a character device"
    } else {
        "not a file"
    };
    Err(io::Error::other(format!(
        "is {kind}, not a regular file; reknit reads its inputs from regular files only (save \
         the data to a file first)"
    )))
}

/// A reader that fails once more than `max` bytes pass without a line break (CSV rows).
pub struct LineLimit<R> {
    inner: R,
    run: usize,
    max: usize,
}

impl<R> LineLimit<R> {
    /// Wraps `inner`, refusing rows longer than `max` bytes.
    pub fn new(inner: R, max: usize) -> Self {
        LineLimit { inner, run: 0, max }
    }
}

impl<R: Read> Read for LineLimit<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        for &b in &buf[..n] {
            // CR alone ends a row too (old Mac line ends), as the CSV reader splits them.
            self.run = if b == b'\n' || b == b'\r' {
                0
            } else {
                self.run + 1
            };
            if self.run > self.max {
                return Err(io::Error::new(
                    io::ErrorKind::InvalidData,
                    format!(
                        "a row longer than {} MiB (the limit) without a line break",
                        self.max >> 20
                    ),
                ));
            }
        }
        Ok(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn long_lists_are_cut() {
        let items: Vec<String> = (0..60_000).map(|i| format!("set{i}.shp")).collect();
        let m = listed(&items);
        assert!(m.ends_with("set19.shp and 59980 more"), "{m}");
        assert_eq!(listed(&items[..2]), "set0.shp, set1.shp");
        assert_eq!(excerpt("short"), "short");
        let long = "é".repeat(100_000);
        let cut = excerpt(&long);
        assert!(
            cut.ends_with("… (100000 characters)") && cut.chars().count() < 90,
            "{cut}"
        );
    }

    #[test]
    fn bom_is_skipped_and_utf16_named() {
        // RFC 8259 §8.1: a parser may ignore a leading U+FEFF.
        assert_eq!(sniff(b"\xEF\xBB\xBF{}"), Ok(3));
        assert_eq!(sniff(b"{\"type\":1}"), Ok(0));
        assert!(sniff(b"\xFF\xFE{\0").unwrap_err().contains("UTF-16"));
        assert!(sniff(b"{\0\"\0t\0").unwrap_err().contains("UTF-16"));
        assert!(sniff(b"PK\x03\x04rest").unwrap_err().contains("ZIP"));
    }

    #[test]
    fn osm_pbf_is_named() {
        let mut head = vec![0, 0, 0, 13, 0x0a, 9];
        head.extend_from_slice(b"OSMHeader\x18\x7f");
        assert!(sniff(&head).unwrap_err().contains("ogr2ogr"));
    }

    #[test]
    fn long_rows_stop() {
        let mut r = LineLimit::new(std::io::repeat(b'a'), 100);
        let mut buf = [0u8; 64];
        assert!((0..10).any(|_| r.read(&mut buf).is_err()));
    }
}
