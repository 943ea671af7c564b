//! The cautions band of the picture: a framed box inside the picture's edge, below the map, that
//! carries the short caution paragraph (the same text as the line printed at the end of a run) and
//! the data's attribution. It is part of the map image itself, so a cropped or forwarded picture
//! keeps it.

use super::text::xml;
use std::io::{self, Write};

/// Characters per line of the attribution on a band 1,536 px wide (DejaVu Sans at 12 px averages
/// under 7.5 px a character; common practice, no source: measured on the caution text).
const LINE_CHARS: usize = 190;

const LINE_H: f64 = 17.0;
/// Font size of the caution text.
const FONT: f64 = 13.0;

/// `text` broken at spaces into lines no wider than `width` pixels at the caution's font size
/// (a longer word stands alone), measured with the picture's font metrics.
pub fn wrap_px(text: &str, width: f64) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    let mut cur = String::new();
    for word in text.split_whitespace() {
        let wider = format!("{cur} {word}");
        if !cur.is_empty() && super::metrics::text_width(&wider, FONT, false) > width {
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

/// Height of a band `width` pixels wide: the caution's lines and one attribution line.
pub fn height(width: f64, caution: &str) -> f64 {
    (wrap_px(caution, width - 24.0).len() as f64 + 1.0) * LINE_H + 16.0
}

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
    let lines = wrap_px(caution, width - 24.0);
    let band_h = height(width, caution);
    writeln!(
        w,
        r##"<g id="cautions-band"><rect x="{x}" y="{y}" width="{width}" height="{band_h}" fill="#fff4ec" stroke="#8c2d04" stroke-width="2"/>"##
    )?;
    write!(
        w,
        r##"<text id="caution" x="{0}" y="{1}" font-size="13" fill="#5a1d02">"##,
        x + 12.0,
        y + 20.0
    )?;
    for (i, line) in lines.iter().enumerate() {
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
        let chars = (LINE_CHARS as f64 * (width - 24.0) / 1536.0) as usize;
        let mut line = wrap(a, chars.max(20))
            .into_iter()
            .next()
            .unwrap_or_default();
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
            y + 20.0 + LINE_H * lines.len() as f64,
            xml(&line)
        )?;
    }
    writeln!(w, "</g>")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_short_caution_is_wrapped_whole_within_the_band() {
        for width in [700.0, 1100.0, 1600.0] {
            let lines = wrap_px(crate::cautions::SHORT, width - 24.0);
            assert_eq!(lines.join(" "), crate::cautions::SHORT);
            assert!(
                lines
                    .iter()
                    .all(|l| crate::export::metrics::text_width(l, FONT, false) <= width - 24.0)
            );
            assert!(height(width, crate::cautions::SHORT) >= (lines.len() + 1) as f64 * LINE_H);
        }
    }
}
