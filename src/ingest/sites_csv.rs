//! Sites from CSV: a header line, then one row per site with longitude and latitude columns.
//!
//! The separator is a comma, a semicolon or a tab: told from the header line (the one of the
//! three it holds outside quotes), or given with `--sites-delimiter`. A header holding more than
//! one of them is refused (say which with `--sites-delimiter`). With a semicolon or a tab, a
//! number may be written with a decimal comma ("12,5" is 12.5, as spreadsheets in much of Europe
//! export it): in coordinates and the priority. A number with both a point and a comma ("1.234,5")
//! is refused rather than guessed. A UTF-8 byte-order mark is skipped; fields may be quoted ("…",
//! a quote inside written twice), so a name may hold the separator.

use super::IngestError;
use super::sites::{LAT_COLUMNS, LON_COLUMNS, Site, SiteDefaults, SiteSettings, feature_err};
use serde_json::Map;
use std::io::BufRead;
use std::path::Path;

/// The separators told from a header line, with their names for messages.
pub const DELIMITERS: &[(u8, &str)] = &[(b',', "comma"), (b';', "semicolon"), (b'\t', "tab")];

/// The separator a `--sites-delimiter` value names: `,`, `;`, `tab` (or a tab character),
/// `comma` or `semicolon`.
pub fn parse_delimiter(text: &str) -> Result<u8, String> {
    match text {
        "," | "comma" => Ok(b','),
        ";" | "semicolon" => Ok(b';'),
        "\t" | "tab" | "\\t" => Ok(b'\t'),
        _ => Err(format!(
            "\"{text}\" is not a CSV separator reknit reads: use , ; or tab"
        )),
    }
}

/// The name of a separator for messages and settings.
pub fn delimiter_name(d: u8) -> &'static str {
    DELIMITERS
        .iter()
        .find(|(c, _)| *c == d)
        .map_or("?", |(_, n)| n)
}

/// The separator of a header line: the one of comma, semicolon and tab it holds outside quotes;
/// a comma when it holds none (one column). The error names those it holds when several.
pub fn detect(header: &[u8]) -> Result<u8, String> {
    let mut quoted = false;
    let mut seen = [false; 3];
    for &b in header {
        match b {
            b'"' => quoted = !quoted,
            b'\n' if !quoted => break,
            _ if !quoted => {
                if let Some(i) = DELIMITERS.iter().position(|(c, _)| *c == b) {
                    seen[i] = true;
                }
            }
            _ => {}
        }
    }
    let found: Vec<&str> = DELIMITERS
        .iter()
        .zip(seen)
        .filter(|(_, s)| *s)
        .map(|((_, n), _)| *n)
        .collect();
    match found.as_slice() {
        [] => Ok(b','),
        [_] => Ok(DELIMITERS[seen.iter().position(|s| *s).unwrap()].0),
        _ => Err(format!(
            "the header line holds several separators ({}); say which one separates the \
             columns with --sites-delimiter",
            found.join(", ")
        )),
    }
}

/// The number a cell spells; with `decimal_comma`, one comma between digits and no point is the
/// decimal mark.
pub fn number(cell: &str, decimal_comma: bool) -> Option<f64> {
    let t = cell.trim();
    if decimal_comma && t.matches(',').count() == 1 && !t.contains('.') {
        let (a, b) = t.split_once(',').unwrap();
        let digit_before = a.ends_with(|c: char| c.is_ascii_digit());
        let digit_after = b.starts_with(|c: char| c.is_ascii_digit());
        if !(digit_before && digit_after) {
            return None;
        }
        return super::value::number(&format!("{a}.{b}"));
    }
    super::value::number(t)
}

/// Reads CSV sites (coordinates in the layer's CRS, converted by the caller).
pub(super) fn read_csv<R: BufRead>(
    mut reader: R,
    path: &Path,
    s: &SiteSettings,
) -> Result<(Vec<Site>, SiteDefaults), IngestError> {
    let io = |e: std::io::Error| IngestError::Io {
        path: path.to_path_buf(),
        source: e,
    };
    let refuse = |m: String| io(std::io::Error::other(m));
    let delimiter = match s.delimiter {
        Some(d) => d,
        None => {
            let head = reader.fill_buf().map_err(io)?;
            let line_end = head.iter().position(|&b| b == b'\n').unwrap_or(head.len());
            detect(&head[..line_end]).map_err(|m| refuse(format!("line 1: {m}")))?
        }
    };
    let sep = delimiter_name(delimiter);
    let decimal_comma = delimiter != b',';
    let mut defaults = SiteDefaults::default();
    let mut rdr = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .flexible(false)
        .from_reader(super::limits::LineLimit::new(
            reader,
            super::limits::MAX_CSV_ROW,
        ));
    let csv_err = |e: csv::Error| {
        let line = e.position().map(|p| p.line()).unwrap_or(0);
        // Not `Syntax`, whose message says GeoJSON.
        let message = match e.kind() {
            csv::ErrorKind::UnequalLengths {
                expected_len, len, ..
            } => format!(
                "line {line} has {len} field(s) where the header has {expected_len} (separated by \
                 {sep}): a row with a separator of another kind, or a missing or extra field"
            ),
            _ => format!("not valid CSV at line {line}: {e}"),
        };
        refuse(message)
    };
    let headers = rdr.headers().map_err(csv_err)?.clone();
    if headers.len() == 1
        && let Some(other) = ['|', ';', '\t', ',']
            .iter()
            .find(|c| headers[0].contains(**c))
    {
        return Err(refuse(format!(
            "the header is one column holding {other:?}, and the columns are separated by {sep}: \
             reknit reads CSV separated by a comma, a semicolon or a tab (--sites-delimiter); save \
             it again with one of those"
        )));
    }
    // A column name given twice: the position would come from one column and the attribute
    // written from the other, so the file is refused rather than one read silently.
    for (i, h) in headers.iter().enumerate() {
        if let Some(j) = headers.iter().take(i).position(|g| g.trim() == h.trim()) {
            return Err(IngestError::Feature {
                path: path.to_path_buf(),
                feature: 0,
                field: Some(h.trim().to_string()),
                message: format!(
                    "the header names the column {:?} twice (columns {} and {}): rename one",
                    h.trim(),
                    j + 1,
                    i + 1
                ),
            });
        }
    }
    let find =
        |given: &Option<String>, defaults: &[&str], what: &str| -> Result<usize, IngestError> {
            let names: Vec<&str> = match given {
                Some(g) => vec![g.as_str()],
                None => defaults.to_vec(),
            };
            names
                .iter()
                .find_map(|n| headers.iter().position(|h| h.trim() == *n))
                .ok_or_else(|| IngestError::Feature {
                    path: path.to_path_buf(),
                    feature: 0,
                    field: Some(names.join("|")),
                    message: format!(
                        "no {what} column; the columns are: {}",
                        headers.iter().collect::<Vec<_>>().join(", ")
                    ),
                })
        };
    let lon_i = find(&s.lon_column, LON_COLUMNS, "longitude")?;
    let lat_i = find(&s.lat_column, LAT_COLUMNS, "latitude")?;
    let priority = s.priority_field.as_deref().unwrap_or("priority");
    let mut sites = Vec::new();
    for (index, rec) in rdr.records().enumerate() {
        let rec = rec.map_err(csv_err)?;
        let line = rec.position().map_or(0, |p| p.line());
        let num = |i: usize| -> Result<f64, IngestError> {
            let v = rec.get(i).unwrap_or("").trim();
            number(v, decimal_comma).ok_or_else(|| {
                let hint = if decimal_comma && v.contains(',') && v.contains('.') {
                    " (both a point and a comma: write one decimal mark only)"
                } else if !decimal_comma && v.contains(',') {
                    " (a decimal comma is read only in files separated by a semicolon or a tab)"
                } else {
                    ""
                };
                feature_err(
                    path,
                    index,
                    Some(&headers[i]),
                    format!("line {line}: {v:?} is not a number{hint}"),
                )
            })
        };
        let pos = [num(lon_i)?, num(lat_i)?];
        let mut attributes = Map::new();
        for (i, (h, v)) in headers.iter().zip(rec.iter()).enumerate() {
            let read_as_number = i == lon_i || i == lat_i || h.trim() == priority;
            // Coordinates and the priority written with a decimal comma are typed as the same
            // cells written with a point.
            let value = match number(v, decimal_comma) {
                Some(_) if decimal_comma && read_as_number && v.contains(',') => {
                    super::value::cell(&v.replacen(',', ".", 1))
                }
                _ => super::value::cell(v),
            };
            attributes.insert(h.to_string(), value);
        }
        sites.push(super::sites::make_site(
            path,
            index,
            pos,
            attributes,
            None,
            s,
            &mut defaults,
        )?);
    }
    Ok((sites, defaults))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn separators_are_told_from_the_header() {
        assert_eq!(detect(b"id,lon,lat"), Ok(b','));
        assert_eq!(detect(b"id;lon;lat\r"), Ok(b';'));
        assert_eq!(detect(b"id\tlon\tlat"), Ok(b'\t'));
        // A separator inside quotes is part of a name.
        assert_eq!(detect(b"\"a,b\";lon;lat"), Ok(b';'));
        assert_eq!(detect(b"lon"), Ok(b','));
        assert!(
            detect(b"id,lon;lat")
                .unwrap_err()
                .contains("comma, semicolon")
        );
    }

    #[test]
    fn decimal_commas_only_beside_other_separators() {
        assert_eq!(number("12,5", true), Some(12.5));
        assert_eq!(number("-0,25", true), Some(-0.25));
        assert_eq!(number("12.5", true), Some(12.5));
        assert_eq!(number("12,5", false), None);
        assert_eq!(number("1.234,5", true), None);
        assert_eq!(number("1,2,3", true), None);
        assert_eq!(number(",5", true), None);
        assert_eq!(parse_delimiter("tab"), Ok(b'\t'));
        assert!(parse_delimiter("|").is_err());
    }
}
