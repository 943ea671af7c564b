//! Point layers from CSV: a header line, then one row per feature with longitude and latitude
//! (or x and y) columns, for sites and damage reports alike.
//!
//! The separator is a comma, a semicolon or a tab: told from the header line, or given with the
//! layer's option ([`super::sites_csv::detect`]). Quoting follows RFC 4180 ([`super::csv_rfc`]).
//! In a file separated by a semicolon or a tab, the numbers read (coordinates, and the columns of
//! [`PointSpec::number_columns`]) may use a decimal comma, one mark for the whole file.

use super::IngestError;
use super::csv_lines::LineTable;
use super::csv_rfc::{QuoteCheck, decimal_mark};
use super::limits::{excerpt, listed};
use super::points::{LAT_COLUMNS, LON_COLUMNS, PointFeature, PointSpec, feature_err};
use super::sites_csv::{DELIMITERS, delimiter_name, detect, number};
use serde_json::Map;
use std::io::BufRead;
use std::path::Path;

/// Reads the rows of a CSV point layer (positions in the layer's CRS, converted by the caller).
pub(super) fn read<R: BufRead>(
    mut reader: R,
    path: &Path,
    spec: &PointSpec,
) -> Result<Vec<PointFeature>, IngestError> {
    let refuse = |m: String| IngestError::Io {
        path: path.to_path_buf(),
        source: std::io::Error::other(m),
    };
    let delimiter = match spec.delimiter {
        Some(d) => d,
        None => {
            let head = reader.fill_buf().map_err(|e| refuse(e.to_string()))?;
            let line_end = head
                .iter()
                .position(|&b| b == b'\n' || b == b'\r')
                .unwrap_or(head.len());
            detect(&head[..line_end], spec.kind.delimiter_flag)
                .map_err(|m| refuse(format!("line 1: {m}")))?
        }
    };
    let sep = delimiter_name(delimiter);
    let mut rdr = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .flexible(false)
        .from_reader(LineTable::new(super::limits::LineLimit::new(
            QuoteCheck::new(reader, delimiter),
            super::limits::MAX_CSV_ROW,
        )));
    // Lines as the reader splits records (CRLF, LF or CR), not as `csv` counts them (LF only).
    let line_of = |rdr: &csv::Reader<_>, p: Option<&csv::Position>| {
        p.map_or(0, |p| {
            LineTable::line_at(csv::Reader::get_ref(rdr), p.byte())
        })
    };
    let csv_err = |e: csv::Error, line: u64| {
        // Not `Syntax`, whose message says GeoJSON.
        refuse(match e.kind() {
            csv::ErrorKind::UnequalLengths {
                expected_len, len, ..
            } => format!(
                "line {line} has {len} field(s) where the header has {expected_len} (separated by \
                 {sep}): a row with a separator of another kind, or a missing or extra field"
            ),
            // The quoting check and the row limit say where.
            csv::ErrorKind::Io(io) => format!("not valid CSV: {io}"),
            _ => format!("not valid CSV at line {line}: {e}"),
        })
    };
    let headers = match rdr.headers() {
        Ok(h) => h.clone(),
        Err(e) => {
            let line = line_of(&rdr, e.position());
            return Err(csv_err(e, line));
        }
    };
    if headers.len() == 1 {
        one_column(&headers[0], delimiter, spec).map_err(refuse)?;
    }
    // A column name given twice: the position would come from one column and the attribute
    // written from the other, so the file is refused rather than one read silently.
    for (i, h) in headers.iter().enumerate() {
        if let Some(j) = headers.iter().take(i).position(|g| g.trim() == h.trim()) {
            return Err(feature_err(
                path,
                0,
                Some(h.trim()),
                format!(
                    "the header names the column {:?} twice (columns {} and {}): rename one",
                    excerpt(h.trim()),
                    j + 1,
                    i + 1
                ),
            ));
        }
    }
    let find = |given: &Option<String>, defaults: &[&str], what: &str| {
        let names: Vec<&str> = match given {
            Some(g) => vec![g.as_str()],
            None => defaults.to_vec(),
        };
        names
            .iter()
            .find_map(|n| headers.iter().position(|h| h.trim() == *n))
            .ok_or_else(|| {
                feature_err(
                    path,
                    0,
                    Some(&names.join("|")),
                    format!(
                        "no {what} column (give its name with {}); the columns are: {}",
                        spec.column_flags,
                        listed(&headers.iter().map(excerpt).collect::<Vec<_>>())
                    ),
                )
            })
    };
    let lon_i = find(&spec.lon_column, LON_COLUMNS, "longitude (or x)")?;
    let lat_i = find(&spec.lat_column, LAT_COLUMNS, "latitude (or y)")?;
    let numeric: Vec<bool> = headers
        .iter()
        .enumerate()
        .map(|(i, h)| i == lon_i || i == lat_i || spec.number_columns.iter().any(|c| c == h.trim()))
        .collect();
    let mut rows = Vec::new();
    loop {
        let mut rec = csv::StringRecord::new();
        match rdr.read_record(&mut rec) {
            Ok(true) => rows.push((line_of(&rdr, rec.position()), rec)),
            Ok(false) => break,
            Err(e) => {
                let line = line_of(&rdr, e.position());
                return Err(csv_err(e, line));
            }
        }
    }
    let cells = rows.iter().flat_map(|(line, rec)| {
        rec.iter()
            .zip(headers.iter())
            .zip(&numeric)
            .filter(|(_, n)| **n)
            .map(move |((v, h), _)| (*line, h, v))
    });
    let decimal_comma = decimal_mark(delimiter == b',', cells).map_err(refuse)?;
    let mut out = Vec::with_capacity(rows.len());
    for (index, (line, rec)) in rows.into_iter().enumerate() {
        let num = |i: usize| -> Result<f64, IngestError> {
            let v = rec.get(i).unwrap_or("").trim();
            number(v, decimal_comma).ok_or_else(|| {
                let hint = if v.contains(',') && v.contains('.') {
                    " (both a point and a comma: write one decimal mark only)"
                } else if delimiter == b',' && v.contains(',') {
                    " (a decimal comma is read only in files separated by a semicolon or a tab)"
                } else {
                    ""
                };
                feature_err(
                    path,
                    index,
                    Some(&headers[i]),
                    format!("line {line}: {:?} is not a number{hint}", excerpt(v)),
                )
            })
        };
        let pos = [num(lon_i)?, num(lat_i)?];
        let mut attributes = Map::new();
        for (i, (h, v)) in headers.iter().zip(rec.iter()).enumerate() {
            // Numbers written with a decimal comma are typed as the same cells written with a
            // point.
            let value = match number(v, decimal_comma) {
                Some(_) if decimal_comma && numeric[i] && v.contains(',') => {
                    super::value::cell(&v.replacen(',', ".", 1))
                }
                _ => super::value::cell(v),
            };
            attributes.insert(h.to_string(), value);
        }
        out.push(PointFeature {
            index,
            pos,
            outline: None,
            attributes,
            member_id: None,
        });
    }
    Ok(out)
}

/// Refuses a header read as one column when it holds another separator: the right option when
/// reknit reads that separator, else the advice to save the file again.
fn one_column(header: &str, delimiter: u8, spec: &PointSpec) -> Result<(), String> {
    let sep = delimiter_name(delimiter);
    if let Some((c, name)) = DELIMITERS
        .iter()
        .find(|(c, _)| *c != delimiter && header.contains(*c as char))
    {
        let given = match spec.delimiter {
            Some(_) => format!(" (as {} says)", spec.kind.delimiter_flag),
            None => String::new(),
        };
        let shown = if *c == b'\t' {
            "tab".into()
        } else {
            (*c as char).to_string()
        };
        return Err(format!(
            "the header is one column holding a {name}, and the columns are read as separated \
             by a {sep}{given}: give {} {shown}, or leave the option out (the separator is told \
             from the header line)",
            spec.kind.delimiter_flag
        ));
    }
    if let Some(other) = ['|'].iter().find(|c| header.contains(**c)) {
        return Err(format!(
            "the header is one column holding {other:?}, and the columns are separated by {sep}: \
             reknit reads CSV separated by a comma, a semicolon or a tab ({}); save it again \
             with one of those",
            spec.kind.delimiter_flag
        ));
    }
    Ok(())
}
