//! A streaming scanner that cuts a JSON text into complete values without parsing them.
//!
//! The GeoJSON reader uses it to find each feature's bytes in a refillable buffer and hands only
//! those bytes to serde_json, which parses slices several times faster than byte-by-byte readers.
//! Nesting is counted, not recursed, so no input can exhaust the stack here.

use std::io::{self, Read};

const CHUNK: usize = 1 << 20;

/// Reads a JSON text in chunks and yields complete values as slices.
pub struct Scanner<R> {
    r: R,
    buf: Vec<u8>,
    /// Bytes read per refill ([`CHUNK`]; smaller in tests, so values straddle refills).
    chunk: usize,
    pos: usize,
    eof: bool,
    /// 1-based line of `buf[pos]`.
    line: usize,
    /// 1-based column of `buf[pos]`.
    col: usize,
}

/// Where a value starts in the text, for messages.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Position {
    /// 1-based line.
    pub line: usize,
    /// 1-based column.
    pub column: usize,
}

impl<R: Read> Scanner<R> {
    /// A scanner over `r`.
    pub fn new(r: R) -> Self {
        Self::with_chunk(r, CHUNK)
    }

    /// A scanner over `r` reading `chunk` bytes per refill.
    fn with_chunk(r: R, chunk: usize) -> Self {
        Scanner {
            r,
            buf: Vec::with_capacity(chunk),
            chunk: chunk.max(1),
            pos: 0,
            eof: false,
            line: 1,
            col: 1,
        }
    }

    /// Position of the next unread byte.
    pub fn position(&self) -> Position {
        Position {
            line: self.line,
            column: self.col,
        }
    }

    /// Reads more input; false at end of input.
    fn fill(&mut self) -> io::Result<bool> {
        if self.eof {
            return Ok(false);
        }
        if self.pos > 0 {
            self.buf.drain(..self.pos);
            self.pos = 0;
        }
        let old = self.buf.len();
        self.buf.resize(old + self.chunk, 0);
        let n = loop {
            match self.r.read(&mut self.buf[old..]) {
                Ok(n) => break n,
                Err(e) if e.kind() == io::ErrorKind::Interrupted => continue,
                Err(e) => {
                    self.buf.truncate(old);
                    return Err(e);
                }
            }
        };
        self.buf.truncate(old + n);
        if n == 0 {
            self.eof = true;
        }
        Ok(n > 0)
    }

    /// Moves past `n` bytes, counting lines and (UTF-8 characters) columns: counts over whole
    /// slices, which the compiler turns into wide loops, not a branch per byte.
    fn advance(&mut self, n: usize) {
        let s = &self.buf[self.pos..self.pos + n];
        let chars = |s: &[u8]| s.iter().filter(|&&b| b & 0xC0 != 0x80).count();
        match s.iter().rposition(|&b| b == b'\n') {
            Some(last) => {
                self.line += s.iter().filter(|&&b| b == b'\n').count();
                self.col = 1 + chars(&s[last + 1..]);
            }
            None => self.col += chars(s),
        }
        self.pos += n;
    }

    /// Skips white space and returns the next byte without consuming it (`None` at end of input).
    pub fn peek(&mut self) -> io::Result<Option<u8>> {
        loop {
            while self.pos < self.buf.len() {
                let b = self.buf[self.pos];
                if matches!(b, b' ' | b'\t' | b'\r' | b'\n') {
                    self.advance(1);
                } else {
                    return Ok(Some(b));
                }
            }
            if !self.fill()? {
                return Ok(None);
            }
        }
    }

    /// Consumes one byte (after [`peek`](Self::peek) returned it).
    pub fn bump(&mut self) {
        self.advance(1);
    }

    /// Finds the complete JSON value starting at the next non-space byte and returns its bytes and
    /// start position; `Ok(None)` when the input ends before the value does.
    pub fn value(&mut self) -> io::Result<Option<(&[u8], Position)>> {
        if self.peek()?.is_none() {
            return Ok(None);
        }
        let start = self.position();
        // Every offset kept across `fill` is relative to `self.pos`: a refill moves the unread
        // bytes to the front of the buffer, so absolute indices would point at the wrong bytes.
        let mut i = self.pos;
        let mut depth = 0usize;
        let mut in_str = false;
        let mut escape = false;
        let mut str_start = 0usize;
        loop {
            while i < self.buf.len() {
                let b = self.buf[i];
                i += 1;
                if in_str {
                    if escape {
                        escape = false;
                    } else if b == b'\\' {
                        escape = true;
                    } else if b == b'"' {
                        in_str = false;
                        if depth == 0 {
                            return Ok(Some(self.take(i, start)));
                        }
                    }
                    continue;
                }
                match b {
                    b'"' => {
                        in_str = true;
                        str_start = i - self.pos;
                    }
                    b'{' | b'[' => depth += 1,
                    b'}' | b']' => {
                        if depth == 0 {
                            // The end of an enclosing container: the scalar before it is complete.
                            return Ok(Some(self.take(i - 1, start)));
                        }
                        depth -= 1;
                        if depth == 0 {
                            return Ok(Some(self.take(i, start)));
                        }
                    }
                    b',' | b' ' | b'\t' | b'\r' | b'\n' if depth == 0 => {
                        return Ok(Some(self.take(i - 1, start)));
                    }
                    _ => {}
                }
            }
            let consumed = i - self.pos;
            self.check_size(consumed, in_str.then(|| consumed - str_start), depth)?;
            if !self.fill()? {
                if depth == 0 && !in_str && i > self.pos {
                    // A scalar running to the end of the input.
                    let end = self.buf.len();
                    return Ok(Some(self.take(end, start)));
                }
                return Ok(None);
            }
            i = self.pos + consumed;
        }
    }

    /// Refuses a value that has grown beyond the limits before more input is read for it.
    fn check_size(&self, value: usize, string: Option<usize>, depth: usize) -> io::Result<()> {
        use super::limits::{MAX_FEATURE, MAX_SCALAR, MAX_STRING};
        let too_long = |what: &str, limit: usize| {
            let p = self.position();
            Err(io::Error::new(
                io::ErrorKind::InvalidData,
                format!(
                    "{what} longer than {} (the limit), in the value starting at line {} column {}",
                    size(limit),
                    p.line,
                    p.column
                ),
            ))
        };
        match string {
            Some(n) if n > MAX_STRING => too_long("a single string", MAX_STRING),
            None if depth == 0 && value > MAX_SCALAR => {
                too_long("a single number or word", MAX_SCALAR)
            }
            _ if value > MAX_FEATURE => too_long("a single value (feature)", MAX_FEATURE),
            _ => Ok(()),
        }
    }

    fn take(&mut self, end: usize, start: Position) -> (&[u8], Position) {
        let begin = self.pos;
        self.advance(end - begin);
        (&self.buf[begin..end], start)
    }

    /// Reads the rest of the input (so a fingerprinting reader sees all of it) and returns the reader.
    pub fn into_inner(self) -> R {
        self.r
    }
}

/// A byte count in KiB, MiB or GiB.
fn size(n: usize) -> String {
    match n {
        n if n >= 1 << 30 => format!("{} GiB", n >> 30),
        n if n >= 1 << 20 => format!("{} MiB", n >> 20),
        n => format!("{} KiB", n >> 10),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cuts_values_across_chunks() {
        let big = format!("[{}]", "1,".repeat(CHUNK) + "2");
        let text = format!(r#"  {{"a":"x\"}}"}} {big} 12 "s" "#);
        let mut s = Scanner::new(text.as_bytes());
        let (v, p) = s.value().unwrap().unwrap();
        assert_eq!(v, br#"{"a":"x\"}"}"#);
        assert_eq!(p, Position { line: 1, column: 3 });
        let (v, _) = s.value().unwrap().unwrap();
        assert_eq!(v.len(), big.len());
        assert_eq!(s.value().unwrap().unwrap().0, b"12");
        assert_eq!(s.value().unwrap().unwrap().0, b"\"s\"");
        assert!(s.value().unwrap().is_none());
    }

    #[test]
    fn scalar_before_closing_bracket() {
        let mut s = Scanner::new(&b"true]"[..]);
        assert_eq!(s.value().unwrap().unwrap().0, b"true");
        assert_eq!(s.peek().unwrap(), Some(b']'));
    }

    #[test]
    fn unterminated_value_is_none() {
        let mut s = Scanner::new(&b"{\"a\": [1, 2"[..]);
        assert!(s.value().unwrap().is_none());
    }

    #[test]
    fn endless_words_and_strings_stop() {
        let mut s = Scanner::new(std::io::repeat(0));
        assert!(s.value().unwrap_err().to_string().contains("4 KiB"));
        let mut s = Scanner::new(std::io::Read::chain(&b"[\""[..], std::io::repeat(b'a')));
        assert!(s.value().unwrap_err().to_string().contains("64 MiB"));
    }

    /// Long strings, numbers, keys and skipped values straddling many refills of a small buffer
    /// come out whole, for every chunk size from 1 byte up.
    #[test]
    fn values_straddle_refills() {
        let long = "é".repeat(300);
        let num = format!("-{}.{}e-7", "9".repeat(200), "1".repeat(100));
        let text = format!(
            "{{\"type\":\"FeatureCollection\",\"{long}\":[\"{long}\",{num}],\"features\":[{{\"properties\":{{\"name\":\"{long}\\\"{long}\",\"d\":{num}}}}}]}} {num} \"{long}\""
        );
        let want: Vec<Vec<u8>> = {
            let mut s = Scanner::new(text.as_bytes());
            std::iter::from_fn(|| s.value().unwrap().map(|(v, _)| v.to_vec())).collect()
        };
        assert_eq!(want.len(), 3);
        assert_eq!(want[1], num.as_bytes());
        for chunk in [1, 2, 3, 7, 64, 333, 1000] {
            let mut s = Scanner::with_chunk(text.as_bytes(), chunk);
            // Walk into the collection and cut each member value too, as the GeoJSON reader does.
            assert_eq!(s.peek().unwrap(), Some(b'{'));
            s.bump();
            let mut members = Vec::new();
            loop {
                let (k, _) = s.value().unwrap().unwrap();
                let k = k.to_vec();
                assert_eq!(s.peek().unwrap(), Some(b':'));
                s.bump();
                let (v, _) = s.value().unwrap().unwrap();
                members.push((k, v.to_vec()));
                match s.peek().unwrap() {
                    Some(b',') => s.bump(),
                    _ => break,
                }
            }
            assert_eq!(members.len(), 3, "chunk {chunk}");
            assert_eq!(members[1].0, format!("\"{long}\"").as_bytes());
            assert!(
                members[2]
                    .1
                    .ends_with(format!("\"d\":{num}}}}}]").as_bytes())
            );
            s.bump();
            assert_eq!(s.value().unwrap().unwrap().0, want[1], "chunk {chunk}");
            assert_eq!(s.value().unwrap().unwrap().0, want[2], "chunk {chunk}");
            assert!(s.value().unwrap().is_none());
            // The whole text as one value, too.
            let mut s = Scanner::with_chunk(text.as_bytes(), chunk);
            assert_eq!(s.value().unwrap().unwrap().0, want[0], "chunk {chunk}");
        }
    }

    #[test]
    fn columns_count_characters_not_bytes() {
        // Each value's start, counted character by character as a reference.
        let text = "[\"é\"]\n  \"aü\u{1F600}\" \n\n\t{\"k\":\"ñ\n\"}  7";
        let mut s = Scanner::new(text.as_bytes());
        let mut starts = Vec::new();
        while let Some((v, p)) = s.value().unwrap() {
            starts.push((String::from_utf8(v.to_vec()).unwrap(), p));
        }
        let reference = |value: &str| {
            let at = text.find(value).unwrap();
            let before = &text[..at];
            let line = before.matches('\n').count() + 1;
            let column = before.rsplit('\n').next().unwrap().chars().count() + 1;
            Position { line, column }
        };
        assert_eq!(starts.len(), 4);
        for (v, p) in starts {
            assert_eq!(p, reference(&v), "{v}");
        }
    }

    #[test]
    fn tracks_lines() {
        let mut s = Scanner::new(&b"\n\n  [1]"[..]);
        let (_, p) = s.value().unwrap().unwrap();
        assert_eq!(p, Position { line: 3, column: 3 });
    }
}
