//! The cautions band of the picture: a framed box inside the picture's edge, below the map, that
//! carries the short caution paragraph (the same text as the line printed at the end of a run) and
//! the data's attribution. It is part of the map image itself, so a cropped or forwarded picture
//! keeps it.

use super::text::xml;
use std::io::{self, Write};

/// Characters per line: DejaVu Sans at 13 px averages under 7.5 px a character, so 190 fit the
/// band's 1,536 px of text width (common practice, no source: measured on the caution text).
const LINE_CHARS: usize = 190;

/// Lines of caution text the band has room for.
pub const CAUTION_LINES: usize = 3;

/// Height of the band in pixels: three caution lines and one attribution line.
pub const HEIGHT: f64 = 84.0;

const LINE_H: f64 = 17.0;

/// `text` broken at spaces into lines of at most `width` characters (a longer word stands alone).
pub fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    let mut cur = String::new();
    for word in text.split_whitespace() {
        if !cur.is_empty() && cur.chars().count() + 1 + word.chars().count() > width {
            lines.push(std::mem::take(&mut cur));
        }
        if !cur.is_empty() {
            cur.push(' ');
        }
        cur.push_str(word);
    }
    if !cur.is_empty() {
        lines.push(cur);
    }
    lines
}

/// Writes the band with its top-left corner at (`x`, `y`) and the given width.
pub fn write_band<W: Write>(
    w: &mut W,
    (x, y, width): (f64, f64, f64),
    caution: &str,
    attribution: Option<&str>,
) -> io::Result<()> {
    writeln!(
        w,
        r##"<g id="cautions-band"><rect x="{x}" y="{y}" width="{width}" height="{HEIGHT}" fill="#fff4ec" stroke="#8c2d04" stroke-width="2"/>"##
    )?;
    write!(
        w,
        r##"<text id="caution" x="{0}" y="{1}" font-size="13" fill="#5a1d02">"##,
        x + 12.0,
        y + 20.0
    )?;
    for (i, line) in wrap(caution, LINE_CHARS)
        .iter()
        .take(CAUTION_LINES)
        .enumerate()
    {
        let dy = if i == 0 { 0.0 } else { LINE_H };
        write!(
            w,
            r#"<tspan x="{}" dy="{dy}">{}</tspan>"#,
            x + 12.0,
            xml(line)
        )?;
    }
    writeln!(w, "</text>")?;
    if let Some(a) = attribution {
        // A long attribution is cut on the picture only; summary.json, the layers and the report
        // carry it whole.
        let mut line = wrap(a, LINE_CHARS).into_iter().next().unwrap_or_default();
        if line.chars().count()
            < a.split_whitespace()
                .collect::<Vec<_>>()
                .join(" ")
                .chars()
                .count()
        {
            line.push_str(" …");
        }
        writeln!(
            w,
            r##"<text id="attribution" x="{}" y="{}" font-size="12" fill="#333333">{}</text>"##,
            x + 12.0,
            y + 20.0 + LINE_H * CAUTION_LINES as f64,
            xml(&line)
        )?;
    }
    writeln!(w, "</g>")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_short_caution_fits_the_band() {
        let lines = wrap(crate::cautions::SHORT, LINE_CHARS);
        assert!(lines.len() <= CAUTION_LINES, "{lines:?}");
        assert_eq!(lines.join(" "), crate::cautions::SHORT);
        assert!(lines.iter().all(|l| l.chars().count() <= LINE_CHARS));
    }
}
