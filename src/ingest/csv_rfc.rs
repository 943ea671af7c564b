//! The quoting rules of RFC 4180 (§2.5–2.7), checked as a CSV file is read, and the one rule for
//! decimal marks, for every CSV input.
//!
//! A field in quotes ends at a quote followed by a separator, a line end or the end of the file
//! (a quote inside it is written twice); a field not starting with a quote holds none. A lenient
//! reader would take an unclosed quote as one field running to the end of the file, or glue the
//! text after a closing quote to the field: the row's fields would shift and a coordinate could be
//! read from the wrong column, so each is refused naming its line.
//!
//! Decimal marks: in a file separated by a semicolon or a tab a number may be written with a
//! decimal comma (`12,5`), and there a point is what such spreadsheets write between thousands
//! (`10.000` is ten thousand). So such a file writes every number it is read for with one mark: a
//! file holding both `10.000` and `50,0` is refused, naming both cells, rather than guessed.

use std::io::{self, Read};

#[derive(Debug, Clone, Copy, PartialEq)]
enum State {
    /// At the start of a field.
    Start,
    /// Inside a field that did not start with a quote.
    Plain,
    /// Inside a quoted field.
    Quoted,
    /// Just after a quote inside a quoted field: its end, or the first of a doubled quote.
    QuoteSeen,
}

/// A reader that refuses CSV text breaking RFC 4180's quoting rules, with the line concerned.
pub struct QuoteCheck<R> {
    inner: R,
    delimiter: u8,
    state: State,
    /// Line of the byte being looked at (CRLF, LF or CR ends a line).
    lines: super::csv_lines::LineCount,
    /// Line where the open quoted field started.
    opened: u64,
}

impl<R> QuoteCheck<R> {
    /// Wraps `inner`, a CSV text separated by `delimiter`.
    pub fn new(inner: R, delimiter: u8) -> Self {
        QuoteCheck {
            inner,
            delimiter,
            state: State::Start,
            lines: Default::default(),
            opened: 0,
        }
    }

    fn step(&mut self, b: u8) -> Result<(), String> {
        use State::*;
        let end = b == self.delimiter || b == b'\n' || b == b'\r';
        self.state = match (self.state, b) {
            (Start, b'"') => {
                self.opened = self.lines.line();
                Quoted
            }
            (Start | Plain, _) if end => Start,
            (Plain, b'"') => {
                return Err(format!(
                    "line {}: a quote inside a field that does not start with one; a field \
                     holding quotes is enclosed in quotes, each quote inside written twice \
                     (RFC 4180 §2.5–2.7)",
                    self.lines.line()
                ));
            }
            (Start | Plain, _) => Plain,
            (Quoted, b'"') => QuoteSeen,
            (Quoted, _) => Quoted,
            (QuoteSeen, b'"') => Quoted,
            (QuoteSeen, _) if end => Start,
            (QuoteSeen, _) => {
                return Err(format!(
                    "line {}: text after the closing quote of a field (a quoted field opened on \
                     line {}); a quote inside a quoted field is written twice (RFC 4180 §2.7)",
                    self.lines.line(),
                    self.opened
                ));
            }
        };
        self.lines.step(b);
        Ok(())
    }
}

impl<R: Read> Read for QuoteCheck<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        let bad = |m: String| io::Error::new(io::ErrorKind::InvalidData, m);
        for &b in &buf[..n] {
            self.step(b).map_err(bad)?;
        }
        if n == 0 && !buf.is_empty() && self.state == State::Quoted {
            return Err(bad(format!(
                "line {}: a quoted field opened here is never closed (no closing quote before \
                 the end of the file); close it, or write a quote inside it twice (RFC 4180 \
                 §2.5–2.7)",
                self.opened
            )));
        }
        Ok(n)
    }
}

/// The decimal mark of a CSV file's numbers: `Ok(true)` for a comma. `cells` are (line, column,
/// text) of every cell read as a number. In a comma-separated file (`comma_separated`) the mark
/// is a point; otherwise a comma when any cell holds one, and then a cell with a point is refused
/// (it may be a thousands separator), naming both cells.
pub fn decimal_mark<'a>(
    comma_separated: bool,
    cells: impl Iterator<Item = (u64, &'a str, &'a str)>,
) -> Result<bool, String> {
    if comma_separated {
        return Ok(false);
    }
    let (mut point, mut comma) = (None, None);
    for (line, column, text) in cells {
        let t = text.trim();
        if point.is_none() && t.contains('.') && !t.contains(',') {
            point = Some((line, column, t));
        }
        if comma.is_none() && t.contains(',') && !t.contains('.') {
            comma = Some((line, column, t));
        }
    }
    use super::limits::excerpt;
    match (point, comma) {
        (Some((pl, pc, pt)), Some((cl, cc, ct))) => Err(format!(
            "line {pl}, column {pc}: {pt:?} has a decimal point, while line {cl}, column {cc}: \
             {ct:?} has a decimal comma; in a file separated by a semicolon or a tab a point may \
             be a thousands separator ({pt:?} could mean {}), so every number must use the same \
             decimal mark",
            excerpt(&pt.replace('.', "")),
            pc = excerpt(pc),
            pt = excerpt(pt),
            cc = excerpt(cc),
            ct = excerpt(ct),
        )),
        (_, comma) => Ok(comma.is_some()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn check(text: &str, delimiter: u8) -> Result<String, String> {
        let mut out = String::new();
        QuoteCheck::new(text.as_bytes(), delimiter)
            .read_to_string(&mut out)
            .map(|_| out)
            .map_err(|e| e.to_string())
    }

    #[test]
    fn rfc_4180_quoting() {
        // RFC 4180 §2.6–2.7: separators, line breaks and doubled quotes inside quotes.
        assert!(check("a,\"b,\nc\"\"d\",e\r\n\"\",x\n", b',').is_ok());
        let open = check("id,name\nA,\"oops,10\nB,x\n", b',').unwrap_err();
        assert!(
            open.contains("line 2") && open.contains("never closed"),
            "{open}"
        );
        // Old Mac line ends (CR alone) count lines as LF does.
        let open = check("id,name\rA,x\rB,\"oops,10\rC,x\r", b',').unwrap_err();
        assert!(open.contains("line 3"), "{open}");
        let after = check("a,\"b\"c,d\n", b',').unwrap_err();
        assert!(after.contains("after the closing quote"), "{after}");
        let inside = check("a;b\"c;d\n", b';').unwrap_err();
        assert!(inside.contains("does not start with one"), "{inside}");
        // A quote is only special at a field's start for the file's own separator.
        assert!(check("a;\"b,c\";d\n", b';').is_ok());
        assert!(check("a,\"b;c\"\n", b',').is_ok());
    }

    #[test]
    fn one_decimal_mark_per_file() {
        let cells = |v: &[&'static str]| {
            v.iter()
                .enumerate()
                .map(|(i, t)| (i as u64 + 2, "lon", *t))
                .collect::<Vec<_>>()
        };
        assert_eq!(
            decimal_mark(false, cells(&["10,5", "11"]).into_iter()),
            Ok(true)
        );
        assert_eq!(
            decimal_mark(false, cells(&["10.5", "11"]).into_iter()),
            Ok(false)
        );
        let e = decimal_mark(false, cells(&["10.000", "50,0"]).into_iter()).unwrap_err();
        assert!(e.contains("10000") && e.contains("line 2"), "{e}");
        assert_eq!(
            decimal_mark(true, cells(&["10.000", "50,0"]).into_iter()),
            Ok(false)
        );
    }
}
