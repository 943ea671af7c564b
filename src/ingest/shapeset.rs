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
use super::set_files::Member;
use std::path::Path;

fn refuse(path: &Path, message: String) -> IngestError {
    IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(message),
    }
}

/// What a scan of a `.dbf` finds beside the values the table reader gives.
#[derive(Debug, Default)]
pub struct TableScan {
    /// The deletion flag of every record, in file order (true: flagged deleted).
    pub deleted: Vec<bool>,
    /// The table's bytes and the place of each numeric and logical field, for
    /// [`NumericText::value`].
    pub text: NumericText,
}

/// Scans a `.dbf` for deletion flags and keeps its bytes, so numeric and logical fields can be
/// read as written.
pub fn scan_table(table: &Member) -> Result<TableScan, IngestError> {
    let (dbf, bytes) = (table.path.as_path(), table.bytes.clone());
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
    // Field descriptors: 32 bytes each from byte 32 up to the 0x0D terminator.
    let mut fields = Vec::new();
    let mut offset = 1usize;
    let mut at = 32usize;
    while at + 32 <= header && bytes[at] != 0x0D {
        let d = &bytes[at..at + 32];
        let name_end = d[..11].iter().position(|&b| b == 0).unwrap_or(11);
        let len = d[16] as usize;
        if matches!(d[11], b'N' | b'F' | b'L') && offset + len <= record {
            fields.push(RawField {
                name: String::from_utf8_lossy(&d[..name_end]).into_owned(),
                logical: d[11] == b'L',
                offset,
                len,
            });
        }
        offset += len;
        at += 32;
    }
    let deleted = (0..count)
        .map(|i| bytes[header + i * record] == b'*')
        .collect();
    Ok(TableScan {
        deleted,
        text: NumericText {
            dbf: dbf.to_path_buf(),
            bytes,
            header,
            record,
            fields,
        },
    })
}

/// Where a numeric or logical field sits in each record.
#[derive(Debug, Clone)]
struct RawField {
    name: String,
    logical: bool,
    offset: usize,
    len: usize,
}

/// A `.dbf`'s numeric and logical fields as written, read under the typing rule
/// (`super::value`) rather than through the table reader's doubles and guesses.
#[derive(Debug, Clone, Default)]
pub struct NumericText {
    /// The table.
    pub dbf: std::path::PathBuf,
    bytes: super::set_files::Shared,
    header: usize,
    record: usize,
    fields: Vec<RawField>,
}

impl NumericText {
    /// The text record `feature`'s numeric or logical `field` holds as written, trimmed and cut
    /// for a message ([`super::limits::excerpt`]); `None` for other fields.
    pub fn written(&self, feature: usize, field: &str) -> Option<String> {
        let f = self.fields.iter().find(|f| f.name == field)?;
        let at = self.header + feature * self.record + f.offset;
        let raw = self.bytes.get(at..at + f.len)?.trim_ascii();
        Some(super::limits::excerpt(&String::from_utf8_lossy(raw)))
    }

    /// The value of record `feature`'s `field` under the typing rule: a numeric field keeps the
    /// text it was written with when a number would not reproduce it ("007", "+1", "3.50", more
    /// digits than a double holds), and its overflow marker (all `*`) is refused; a logical field
    /// is `true` for T/t/Y/y, `false` for F/f/N/n, missing for `?` or blank, and refused
    /// otherwise; every other field is the table reader's value.
    pub fn value(
        &self,
        feature: usize,
        field: &str,
        v: &shapefile::dbase::FieldValue,
    ) -> Result<serde_json::Value, IngestError> {
        use serde_json::Value;
        let Some(f) = self.fields.iter().find(|f| f.name == field) else {
            return Ok(super::shapefile::field_json(v));
        };
        let at = self.header + feature * self.record + f.offset;
        let raw = self.bytes[at..at + f.len].trim_ascii();
        let refuse = |message: String| IngestError::Feature {
            path: self.dbf.clone(),
            feature,
            field: Some(field.into()),
            message,
        };
        if f.logical {
            return match raw {
                [] | b"?" => Ok(Value::Null),
                [b'T' | b't' | b'Y' | b'y'] => Ok(Value::Bool(true)),
                [b'F' | b'f' | b'N' | b'n'] => Ok(Value::Bool(false)),
                other => Err(refuse(format!(
                    "holds {:?}, not a dBASE logical value (T, Y, F, N, or ? for unknown)",
                    String::from_utf8_lossy(other)
                ))),
            };
        }
        if !raw.is_empty() && raw.iter().all(|&b| b == b'*') {
            return Err(refuse(
                "holds the dBASE overflow marker (all '*'): the number was too wide for its \
                 field when the table was written, so its value is lost; fix or widen the field"
                    .into(),
            ));
        }
        Ok(match std::str::from_utf8(raw) {
            Ok("") => Value::Null,
            Ok(t) if super::value::number(t).is_some() => super::value::cell(t),
            _ => super::shapefile::field_json(v),
        })
    }
}

/// Refuses a `.shx` whose record offsets or lengths disagree with the `.shp` record headers
/// (shapes read through it would repeat or go missing); the message names the first record off.
pub fn check_index(shapes: &Member, index: &Member) -> Result<(), IngestError> {
    let (shp, shx) = (shapes.path.as_path(), index.path.as_path());
    let (s, x) = (&shapes.bytes[..], &index.bytes[..]);
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
        let actual = (at + 8 <= s.len()).then(|| (at as i64, be(s, at + 4) as i64 * 2));
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
        let table = |b: &[u8]| Member {
            path: "t.dbf".into(),
            bytes: b.into(),
        };
        // Header of 33 bytes (32 + terminator), two 2-byte records: the second flagged deleted.
        let mut b = vec![0u8; 33];
        b[4] = 2;
        b[8] = 33;
        b[10] = 2;
        b.extend_from_slice(b" a*b");
        assert_eq!(scan_table(&table(&b)).unwrap().deleted, vec![false, true]);
        assert!(scan_table(&table(&b[..35])).is_err());
    }
}
