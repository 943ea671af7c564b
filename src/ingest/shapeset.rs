//! Integrity of a Shapefile set: records flagged deleted in the `.dbf`, and a `.shx` index that
//! must agree with the `.shp` record headers.
//!
//! Layouts (ESRI Shapefile Technical Description, 1998; dBASE III file format, common practice):
//! a `.shp` and `.shx` start with a 100-byte header; each `.shp` record has an 8-byte header
//! (record number, content length in 16-bit words, big-endian); each `.shx` record is 8 bytes
//! (offset and content length in 16-bit words, big-endian). A `.dbf` header gives the record count
//! (u32 at byte 4), the header length (u16 at 8) and the record length (u16 at 10), little-endian;
//! each record starts with a flag byte, `*` (0x2A) for a deleted record.

use super::IngestError;
use std::path::Path;

fn refuse(path: &Path, message: String) -> IngestError {
    IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(message),
    }
}

/// The deletion flag of every record of a `.dbf`, in file order (true: flagged deleted).
pub fn deleted_records(dbf: &Path) -> Result<Vec<bool>, IngestError> {
    let bytes = std::fs::read(dbf).map_err(|source| IngestError::Io {
        path: dbf.to_path_buf(),
        source,
    })?;
    if bytes.len() < 32 {
        return Err(refuse(
            dbf,
            "not a dBASE table: shorter than its header".into(),
        ));
    }
    let count = u32::from_le_bytes([bytes[4], bytes[5], bytes[6], bytes[7]]) as usize;
    let header = u16::from_le_bytes([bytes[8], bytes[9]]) as usize;
    let record = u16::from_le_bytes([bytes[10], bytes[11]]) as usize;
    let needed = (record as u128) * (count as u128) + header as u128;
    if record == 0 || needed > bytes.len() as u128 {
        return Err(refuse(
            dbf,
            format!(
                "the dBASE table declares {count} record(s) of {record} bytes after a {header}-byte \
                 header, more than its {} bytes hold (truncated?)",
                bytes.len()
            ),
        ));
    }
    Ok((0..count)
        .map(|i| bytes[header + i * record] == b'*')
        .collect())
}

/// Refuses a `.shx` whose record offsets or lengths disagree with the `.shp` record headers
/// (shapes read through it would repeat or go missing); the message names the first record off.
pub fn check_index(shp: &Path, shx: &Path) -> Result<(), IngestError> {
    let read = |p: &Path| {
        std::fs::read(p).map_err(|source| IngestError::Io {
            path: p.to_path_buf(),
            source,
        })
    };
    let (s, x) = (read(shp)?, read(shx)?);
    if x.len() < 100 || (x.len() - 100) % 8 != 0 {
        return Err(refuse(
            shx,
            format!(
                "the index is {} bytes: not a 100-byte header followed by 8-byte records",
                x.len()
            ),
        ));
    }
    let be = |b: &[u8], at: usize| i32::from_be_bytes([b[at], b[at + 1], b[at + 2], b[at + 3]]);
    let mut at = 100usize;
    for (i, entry) in x[100..].chunks_exact(8).enumerate() {
        let (offset, length) = (be(entry, 0) as i64 * 2, be(entry, 4) as i64 * 2);
        let actual = (at + 8 <= s.len()).then(|| (at as i64, be(&s, at + 4) as i64 * 2));
        if actual != Some((offset, length)) {
            let found = match actual {
                Some((o, l)) => format!("the .shp has record {} at byte {o} ({l} bytes)", i + 1),
                None => format!("the .shp ends at byte {}", s.len()),
            };
            return Err(refuse(
                shx,
                format!(
                    "feature {i}: the index places record {} at byte {offset} ({length} bytes) but \
                     {found}; the index does not belong to {} (rebuild it)",
                    i + 1,
                    shp.display()
                ),
            ));
        }
        at += 8 + length.max(0) as usize;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_flags_and_refuses_a_short_table() {
        let d = tempfile::tempdir().unwrap();
        let p = d.path().join("t.dbf");
        // Header of 33 bytes (32 + terminator), two 2-byte records: the second flagged deleted.
        let mut b = vec![0u8; 33];
        b[4] = 2;
        b[8] = 33;
        b[10] = 2;
        b.extend_from_slice(b" a*b");
        std::fs::write(&p, &b).unwrap();
        assert_eq!(deleted_records(&p).unwrap(), vec![false, true]);
        std::fs::write(&p, &b[..35]).unwrap();
        assert!(deleted_records(&p).is_err());
    }
}
