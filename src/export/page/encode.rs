//! The map page's data text: coordinates quantised to whole steps of [`RESOLUTION_M`] metres in the
//! picture's local frame and written as offsets from the previous point (small integers, so a large
//! network stays a few bytes a point), and text from the inputs written as JSON strings with its
//! control characters replaced. The text passes through
//! [`script_json`](crate::export::text::script_json) on its way out, so nothing in it can end the
//! script element.

use crate::export::text::{plain, script_json};
use std::io::{self, Write};

/// The grid step of the page's coordinates, metres: finer than any road's width, so the page
/// shows no error a reader could see (common practice, no source).
pub const RESOLUTION_M: f64 = 0.5;

/// A point in metres east and north of the district's south-west corner, as whole grid steps.
pub fn quantise((x, y): (f64, f64)) -> (i64, i64) {
    (
        (x / RESOLUTION_M).round() as i64,
        (y / RESOLUTION_M).round() as i64,
    )
}

/// Text waiting in a streaming [`Json`] before it goes to its writer.
const SPILL_AT: usize = 1 << 20;

/// The JSON text of the page's data: built in one string ([`Json::default`], [`Json::finish`]),
/// or passed on to a writer a megabyte at a time ([`Json::streaming`], [`Json::end`]), so a
/// national network's page never holds its data text whole.
#[derive(Default)]
pub struct Json<'w> {
    buf: String,
    out: Option<&'w mut dyn Write>,
    failed: Option<io::Error>,
}

impl<'w> Json<'w> {
    /// A text passed on to `out` as it is made (see [`Json::end`]).
    pub fn streaming(out: &'w mut dyn Write) -> Json<'w> {
        Json {
            buf: String::new(),
            out: Some(out),
            failed: None,
        }
    }

    /// Passes the text made so far on to the writer, when there is one and the text is long:
    /// a spill always holds whole characters, so escaping it alone escapes the whole text.
    fn spill(&mut self, at: usize) {
        if self.buf.len() < at {
            return;
        }
        if let Some(out) = self.out.as_mut() {
            if self.failed.is_none()
                && let Err(e) = out.write_all(escaped(&self.buf).as_bytes())
            {
                self.failed = Some(e);
            }
            self.buf.clear();
        }
    }

    /// Writes what is left of a streaming text; the first write error, if any.
    pub fn end(mut self) -> io::Result<()> {
        self.spill(0);
        self.failed.map_or(Ok(()), Err)
    }

    /// Appends JSON syntax or a number written by the caller.
    pub fn raw(&mut self, s: &str) -> &mut Self {
        self.buf.push_str(s);
        self.spill(SPILL_AT);
        self
    }

    /// Appends a whole number.
    pub fn int(&mut self, v: i64) -> &mut Self {
        use std::fmt::Write;
        // Writing into a String cannot fail.
        let _ = write!(self.buf, "{v}");
        self
    }

    /// Appends a number with at most `decimals` decimals (never `-0`).
    pub fn num(&mut self, v: f64, decimals: usize) -> &mut Self {
        crate::decimal::push_decimal(&mut self.buf, v, decimals, true);
        self
    }

    /// Appends a JSON string holding `s`, control characters replaced.
    pub fn str(&mut self, s: &str) -> &mut Self {
        // A string always serialises.
        self.buf
            .push_str(&serde_json::to_string(plain(s).as_ref()).unwrap_or_default());
        self
    }

    /// Appends `"key":`.
    pub fn key(&mut self, k: &str) -> &mut Self {
        self.str(k).raw(":")
    }

    /// Appends a JSON array of strings.
    pub fn strs<'s>(&mut self, items: impl IntoIterator<Item = &'s str>) -> &mut Self {
        self.raw("[");
        for (i, s) in items.into_iter().enumerate() {
            if i > 0 {
                self.raw(",");
            }
            self.str(s);
        }
        self.raw("]")
    }

    /// Appends one feature: `[meta…, x0, y0, dx1, dy1, …]`, the first point in grid steps and
    /// every later one as its offset from the one before.
    pub fn feature(&mut self, meta: &[i64], pts: impl IntoIterator<Item = (f64, f64)>) {
        self.raw("[");
        let mut first = true;
        for &m in meta {
            if !first {
                self.raw(",");
            }
            self.int(m);
            first = false;
        }
        let mut prev = (0, 0);
        for p in pts {
            let q = quantise(p);
            if !first {
                self.raw(",");
            }
            self.int(q.0 - prev.0).raw(",").int(q.1 - prev.1);
            prev = q;
            first = false;
        }
        self.raw("]");
    }

    /// The text, safe inside a `<script>` element (of a text built in one string).
    pub fn finish(self) -> String {
        escaped(&self.buf).into_owned()
    }
}

/// `text` made safe inside a `<script>` element; most text has nothing to escape and is kept.
fn escaped(text: &str) -> std::borrow::Cow<'_, str> {
    if text.contains(['<', '>', '&', '\u{2028}', '\u{2029}']) {
        std::borrow::Cow::Owned(script_json(text))
    } else {
        std::borrow::Cow::Borrowed(text)
    }
}

/// The points of a feature written by [`Json::feature`], in metres (the page's decoder does the
/// same in script).
pub fn decode(flat: &[i64], meta: usize) -> Vec<(f64, f64)> {
    let (mut x, mut y) = (0i64, 0i64);
    flat[meta..]
        .chunks(2)
        .map(|c| {
            x += c[0];
            y += c[1];
            (x as f64 * RESOLUTION_M, y as f64 * RESOLUTION_M)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quantised_lines_read_back_within_half_a_step() {
        let mut rng = crate::rng::Rng::new(7);
        for _ in 0..200 {
            let n = 1 + rng.below(40) as usize;
            // Points across a district up to 300 km wide, some of them repeated.
            let pts: Vec<(f64, f64)> = (0..n)
                .map(|_| (rng.unit() * 300_000.0, rng.unit() * 300_000.0))
                .collect();
            let mut j = Json::default();
            j.feature(&[3, -1], pts.iter().copied());
            let text = j.finish();
            let flat: Vec<i64> = serde_json::from_str(&text).unwrap();
            assert_eq!(&flat[..2], &[3, -1]);
            let back = decode(&flat, 2);
            assert_eq!(back.len(), pts.len());
            for (a, b) in pts.iter().zip(&back) {
                // Rounding to the nearest step: the error is at most half a step on each axis.
                assert!(
                    (a.0 - b.0).abs() <= RESOLUTION_M / 2.0 + 1e-9,
                    "{a:?} {b:?}"
                );
                assert!(
                    (a.1 - b.1).abs() <= RESOLUTION_M / 2.0 + 1e-9,
                    "{a:?} {b:?}"
                );
                assert_eq!(
                    quantise(*a),
                    quantise(*b),
                    "a point read back quantises the same"
                );
            }
        }
    }

    #[test]
    fn offsets_stay_small_on_a_road() {
        // A road of 1 m steps: after the first point every number is one or two characters.
        let pts: Vec<(f64, f64)> = (0..100).map(|i| (20_000.0 + i as f64, 5_000.0)).collect();
        let mut j = Json::default();
        j.feature(&[], pts);
        let text = j.finish();
        assert!(text.len() < 16 + 100 * 4, "{} bytes", text.len());
    }

    #[test]
    fn a_streamed_text_is_the_text_built_whole() {
        let make = |j: &mut Json| {
            j.raw("[");
            for i in 0..200_000 {
                if i > 0 {
                    j.raw(",");
                }
                j.str(if i % 3 == 0 { "a<b&c\u{2028}" } else { "plain" });
                j.feature(&[i], [(i as f64, 2.0 * i as f64)]);
            }
            j.raw("]");
        };
        let mut whole = Json::default();
        make(&mut whole);
        let whole = whole.finish();
        let mut out = Vec::new();
        let mut j = Json::streaming(&mut out);
        make(&mut j);
        j.end().unwrap();
        assert!(whole.len() > 2 * SPILL_AT, "the text spills more than once");
        assert_eq!(String::from_utf8(out).unwrap(), whole);
    }

    #[test]
    fn strings_are_plain_and_script_safe() {
        let mut j = Json::default();
        j.raw("{").key("road").str("</script>\"x\"\u{1}").raw("}");
        let text = j.finish();
        assert!(!text.contains('<') && !text.contains('\u{1}'));
        let v: serde_json::Value = serde_json::from_str(&text).unwrap();
        assert_eq!(v["road"], "</script>\"x\"\u{FFFD}");
    }
}
