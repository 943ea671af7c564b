//! Plain messages for the errors of the Shapefile and dBASE readers: no reader's own wording or
//! debugging dump reaches the analyst, and a field's error names the field.

use shapefile::dbase;
use std::path::Path;

/// What went wrong reading record `index` of a set: the field concerned (for an attribute) and a
/// plain message naming the file, quoting the value as written when the field is numeric or
/// logical (`numbers`). `fields` are the .dbf's field names in table order.
pub fn record(
    shp: &Path,
    fields: &[String],
    numbers: &super::shapeset::NumericText,
    index: usize,
    e: shapefile::Error,
) -> (Option<String>, String) {
    match e {
        shapefile::Error::DbaseError(e) => {
            let field = e.field_index().and_then(|i| fields.get(i.0).cloned());
            let dbf = shp.with_extension("dbf");
            let what = match &field {
                Some(f) => match numbers.written(index, f) {
                    Some(v) => format!("{:?}: {}", v, dbf_value(&e)),
                    None => dbf_value(&e),
                },
                None => dbf_table(&e),
            };
            (field, format!("{}: {what}", dbf.display()))
        }
        other => (
            Some("geometry".into()),
            format!("{}: {}", shp.display(), shp_message(&other)),
        ),
    }
}

/// What is wrong with a field's value, by the dBASE reader's error.
fn dbf_value(e: &dbase::Error) -> String {
    use dbase::ErrorKind as K;
    match e.kind() {
        K::ParseFloatError(_) | K::ParseIntError(_) => "the value is not a number, though the \
             field's type is numeric (text in a Numeric field?); correct the value, or make the \
             field a text field"
            .into(),
        K::InvalidDate(_) => "the value is not a date of the form YYYYMMDD".into(),
        K::InvalidTime(_) => "the value is not a valid time".into(),
        K::StringDecodeError(_) => {
            "the text cannot be decoded in the table's code page (check its .cpg file)".into()
        }
        _ => dbf_table(e),
    }
}

/// What is wrong with a .dbf as a whole (or a record of it), by the dBASE reader's error.
pub fn dbf_table(e: &dbase::Error) -> String {
    use dbase::ErrorKind as K;
    match e.kind() {
        K::IoError(io) if io.kind() == std::io::ErrorKind::UnexpectedEof => {
            "the file ends before its header or records are complete (truncated, or its header \
             declares the wrong lengths)"
                .into()
        }
        K::IoError(io) => format!("cannot be read ({})", io.kind()),
        K::InvalidFieldType(c) => {
            format!("a field has the type code {c:?}, which is not a dBASE field type")
        }
        K::MissingMemoFile | K::ErrorOpeningMemoFile(_) => {
            "a Memo field needs its .dbt file, which is missing or unreadable".into()
        }
        K::UnsupportedCodePage(_) => "its code page is not supported".into(),
        K::InvalidFile(what) => format!("not a valid dBASE table ({what})"),
        K::ParseFloatError(_) | K::ParseIntError(_) => "a numeric value is not a number".into(),
        K::InvalidDate(_) | K::InvalidTime(_) => "a date or time value is not valid".into(),
        K::StringDecodeError(_) => "a text cannot be decoded in the table's code page".into(),
        _ => "not a readable dBASE table".into(),
    }
}

/// What is wrong with a .shp or .shx, by the Shapefile reader's error (never its debugging form).
pub fn shp_message(e: &shapefile::Error) -> String {
    use shapefile::Error as E;
    match e {
        E::IoError(io) if io.kind() == std::io::ErrorKind::UnexpectedEof => {
            "the file ends before its header or a record is complete (empty or truncated)".into()
        }
        E::IoError(io) => format!("cannot be read ({})", io.kind()),
        E::InvalidFileCode(c) => format!(
            "not a Shapefile: its file code is {c}, not 9994 (ESRI Shapefile Technical \
             Description, 1998)"
        ),
        E::InvalidShapeType(c) => format!("shape type code {c} is not an ESRI shape type"),
        E::InvalidPatchType(c) => format!("patch type code {c} is not an ESRI patch type"),
        E::MismatchShapeType { requested, actual } => {
            format!("a record holds a {actual} in a layer of {requested}s")
        }
        E::InvalidShapeRecordSize => "a record's declared size does not match its contents".into(),
        E::AllocationLimitExceeded { requested_bytes } => format!(
            "a record declares counts needing {requested_bytes} bytes, more than the file holds"
        ),
        E::DbaseError(d) => dbf_table(d),
        E::MissingDbf => "the .dbf file is missing".into(),
        E::MissingIndexFile => "the .shx file is missing".into(),
        #[allow(unreachable_patterns)]
        _ => "not a readable Shapefile".into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn messages_carry_no_debugging_dump() {
        let eof = || std::io::Error::from(std::io::ErrorKind::UnexpectedEof);
        let p = Path::new("a/roads.shp");
        let (field, m) = record(
            p,
            &[],
            &Default::default(),
            0,
            shapefile::Error::IoError(eof()),
        );
        assert_eq!(field.as_deref(), Some("geometry"));
        assert!(m.starts_with("a/roads.shp: the file ends"), "{m}");
        for e in [
            shapefile::Error::InvalidFileCode(7),
            shapefile::Error::InvalidShapeType(99),
            shapefile::Error::InvalidShapeRecordSize,
        ] {
            let m = shp_message(&e);
            assert!(!m.contains("Error") && !m.contains('{'), "{m}");
        }
    }
}
