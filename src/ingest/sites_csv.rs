//! CSV separators and numbers, for every CSV point layer ([`super::csv_points`]).
//!
//! The separator is a comma, a semicolon or a tab: told from the header line (the one of the
//! three it holds outside quotes), or given with the layer's option (`--sites-delimiter`,
//! `--damage-points-delimiter`). A header holding more than one of them is refused. With a
//! semicolon or a tab, a number may be written with a decimal comma ("12,5" is 12.5, as
//! spreadsheets in much of Europe export it), one decimal mark per file ([`super::csv_rfc`]). A
//! number with both a point and a comma ("1.234,5") is refused rather than guessed.

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
/// a comma when it holds none (one column). The error names those it holds when several, and the
/// layer's option that says which (`flag`).
pub fn detect(header: &[u8], flag: &str) -> Result<u8, String> {
    let mut quoted = false;
    let mut seen = [false; 3];
    for &b in header {
        match b {
            b'"' => quoted = !quoted,
            b'\n' | b'\r' if !quoted => break,
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
             columns with {flag}",
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn separators_are_told_from_the_header() {
        assert_eq!(detect(b"id,lon,lat", "--sites-delimiter"), Ok(b','));
        assert_eq!(detect(b"id;lon;lat\r", "--sites-delimiter"), Ok(b';'));
        assert_eq!(detect(b"id\tlon\tlat", "--sites-delimiter"), Ok(b'\t'));
        // A separator inside quotes is part of a name.
        assert_eq!(detect(b"\"a,b\";lon;lat", "--sites-delimiter"), Ok(b';'));
        assert_eq!(detect(b"lon", "--sites-delimiter"), Ok(b','));
        assert!(
            detect(b"id,lon;lat", "--sites-delimiter")
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
