//! Zip archives made by the tests themselves (deflated members, folders as given in the names),
//! and the byte surgery that makes hostile ones from them.

use std::io::Write;
use std::path::{Path, PathBuf};

/// Writes a zip at `dir/name` holding `entries` (member name, content), every member deflated.
pub fn zip_of(dir: &Path, name: &str, entries: &[(&str, Vec<u8>)]) -> PathBuf {
    let p = dir.join(name);
    let mut w = zip::ZipWriter::new(std::fs::File::create(&p).unwrap());
    let opts = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated);
    for (n, bytes) in entries {
        if n.ends_with('/') {
            w.add_directory(*n, opts).unwrap();
        } else {
            w.start_file(*n, opts).unwrap();
            w.write_all(bytes).unwrap();
        }
    }
    w.finish().unwrap();
    p
}

/// The members of the Shapefile set `shp` (its .shp, .shx, .dbf and, if present, .prj), named
/// `folder` + file name.
pub fn set_entries(shp: &Path, folder: &str) -> Vec<(String, Vec<u8>)> {
    ["shp", "shx", "dbf", "prj"]
        .iter()
        .map(|e| shp.with_extension(e))
        .filter(|p| p.exists())
        .map(|p| {
            let n = p.file_name().unwrap().to_string_lossy();
            (format!("{folder}{n}"), std::fs::read(&p).unwrap())
        })
        .collect()
}

/// `zip_of` for owned entries.
pub fn zip_owned(dir: &Path, name: &str, entries: &[(String, Vec<u8>)]) -> PathBuf {
    let e: Vec<(&str, Vec<u8>)> = entries
        .iter()
        .map(|(n, b)| (n.as_str(), b.clone()))
        .collect();
    zip_of(dir, name, &e)
}

/// Sets the uncompressed size that the local and central headers of member `member` declare
/// (APPNOTE 6.3 §4.3.7 and §4.3.12: in a local header the 4-byte little-endian size sits at 22,
/// the name length at 26 and the name at 30; in a central directory header at 24, 28 and 46).
pub fn declare_size(zip: &Path, member: &str, size: u32) {
    let mut b = std::fs::read(zip).unwrap();
    let mut patched = 0;
    for (sig, size_at, len_at, name_at) in
        [(b"PK\x03\x04", 22, 26, 30), (b"PK\x01\x02", 24, 28, 46)]
    {
        let mut i = 0;
        while let Some(k) = b[i..].windows(4).position(|w| w == sig) {
            let at = i + k;
            let n = u16::from_le_bytes([b[at + len_at], b[at + len_at + 1]]) as usize;
            if b.get(at + name_at..at + name_at + n) == Some(member.as_bytes()) {
                b[at + size_at..at + size_at + 4].copy_from_slice(&size.to_le_bytes());
                patched += 1;
            }
            i = at + 4;
        }
    }
    assert_eq!(patched, 2, "member {member} found in both headers");
    std::fs::write(zip, b).unwrap();
}
