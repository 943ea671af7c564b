//! Line numbers of CSV text counted as a CSV reader splits records: a line ends at CRLF, at LF, or
//! at CR alone (files saved by old Mac software). The `csv` crate splits records at all three but
//! counts only LF in its positions, so a CR-only file would put every problem on line 1; every
//! CSV reader of reknit numbers its lines here instead.

use std::io::{self, Read};

/// Counts line ends byte by byte: CRLF, LF and a lone CR each end one line.
#[derive(Debug, Clone, Copy)]
pub struct LineCount {
    line: u64,
    after_cr: bool,
}

impl Default for LineCount {
    fn default() -> Self {
        LineCount {
            line: 1,
            after_cr: false,
        }
    }
}

impl LineCount {
    /// Takes the next byte; true when it is (part of) a line end.
    pub fn step(&mut self, b: u8) -> bool {
        let end = match b {
            b'\r' => {
                self.line += 1;
                true
            }
            // The LF of a CRLF ends the line its CR already ended.
            b'\n' => {
                if !self.after_cr {
                    self.line += 1;
                }
                true
            }
            _ => false,
        };
        self.after_cr = b == b'\r';
        end
    }

    /// The 1-based number of the line the next byte belongs to.
    pub fn line(&self) -> u64 {
        self.line
    }
}

/// The line of the record a CSV reader places at byte offset `byte` of `text`: a reader's record
/// offset may point at line ends before the record (the LF of a CRLF, blank lines it skips), so
/// those are passed first.
pub fn line_at(text: &[u8], byte: u64) -> u64 {
    let mut at = (byte as usize).min(text.len());
    while at < text.len() && matches!(text[at], b'\r' | b'\n') {
        at += 1;
    }
    let mut count = LineCount::default();
    text[..at].iter().for_each(|&b| {
        count.step(b);
    });
    count.line()
}

/// A reader that notes where each non-blank line starts, so that the line of a record read from
/// it can be told from the record's byte offset ([`LineTable::line_at`]) without keeping the text.
pub struct LineTable<R> {
    inner: R,
    count: LineCount,
    offset: u64,
    at_start: bool,
    /// (offset, line) of the first byte of each non-blank line, in order.
    starts: Vec<(u64, u64)>,
}

impl<R> LineTable<R> {
    /// Wraps `inner`.
    pub fn new(inner: R) -> Self {
        LineTable {
            inner,
            count: LineCount::default(),
            offset: 0,
            at_start: true,
            starts: Vec::new(),
        }
    }

    /// The line of the record whose reader offset is `byte`: the first non-blank line starting
    /// at or after it (a record starts at a line start; only line ends lie between).
    pub fn line_at(&self, byte: u64) -> u64 {
        let i = self.starts.partition_point(|&(s, _)| s < byte);
        self.starts.get(i).map_or(self.count.line(), |&(_, l)| l)
    }
}

impl<R: Read> Read for LineTable<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        for &b in &buf[..n] {
            let line = self.count.line();
            let end = self.count.step(b);
            if self.at_start && !end {
                self.starts.push((self.offset, line));
            }
            self.at_start = end;
            self.offset += 1;
        }
        Ok(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// (line, first field) of every record, lines from the table.
    fn records(text: &str) -> Vec<(u64, String)> {
        let mut r = csv::ReaderBuilder::new()
            .has_headers(false)
            .from_reader(LineTable::new(text.as_bytes()));
        let mut out = Vec::new();
        let mut rec = csv::StringRecord::new();
        while r.read_record(&mut rec).unwrap() {
            let byte = rec.position().unwrap().byte();
            out.push((r.get_ref().line_at(byte), rec[0].to_string()));
            assert_eq!(line_at(text.as_bytes(), byte), out.last().unwrap().0);
        }
        out
    }

    #[test]
    fn every_line_end_counts_once() {
        let want = |v: &[(u64, &str)]| {
            v.iter()
                .map(|(l, s)| (*l, s.to_string()))
                .collect::<Vec<_>>()
        };
        let lines = want(&[(1, "h"), (2, "a"), (3, "b")]);
        assert_eq!(records("h,x\na,1\nb,2\n"), lines);
        assert_eq!(records("h,x\r\na,1\r\nb,2\r\n"), lines);
        // Old Mac line ends: CR alone.
        assert_eq!(records("h,x\ra,1\rb,2\r"), lines);
        // Blank lines are skipped by the reader and counted here; a quoted field spans lines.
        assert_eq!(
            records("h,x\r\n\r\na,1\n\nb,\"2\r3\"\rc,4"),
            want(&[(1, "h"), (3, "a"), (5, "b"), (7, "c")])
        );
    }
}
