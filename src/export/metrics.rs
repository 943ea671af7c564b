//! Text widths for laying out the picture's labels and legend: the advance widths of DejaVu Sans
//! and DejaVu Sans Bold (the fonts compiled into the program, `src/export/fonts/`), read from their
//! `hmtx` tables for the printable ASCII characters. Any other character counts as one em, wider
//! than any letter the fonts draw, so an estimate never falls short.

/// Font units per em of both fonts (their `head` table).
const UNITS_PER_EM: f64 = 2048.0;

/// Advance widths of the characters U+0020 to U+007E, DejaVu Sans.
const REGULAR: [u16; 95] = [
    651, 821, 942, 1716, 1303, 1946, 1597, 563, 799, 799, 1024, 1716, 651, 739, 651, 690, 1303,
    1303, 1303, 1303, 1303, 1303, 1303, 1303, 1303, 1303, 690, 690, 1716, 1716, 1716, 1087, 2048,
    1401, 1405, 1430, 1577, 1294, 1178, 1587, 1540, 604, 604, 1343, 1141, 1767, 1532, 1612, 1235,
    1612, 1423, 1300, 1251, 1499, 1401, 2025, 1403, 1251, 1403, 799, 690, 799, 1716, 1024, 1024,
    1255, 1300, 1126, 1300, 1260, 721, 1300, 1298, 569, 569, 1186, 569, 1995, 1298, 1253, 1300,
    1300, 842, 1067, 803, 1298, 1212, 1675, 1212, 1212, 1075, 1303, 690, 1303, 1716,
];

/// Advance widths of the characters U+0020 to U+007E, DejaVu Sans Bold.
const BOLD: [u16; 95] = [
    713, 934, 1067, 1716, 1425, 2052, 1786, 627, 936, 936, 1071, 1716, 778, 850, 778, 748, 1425,
    1425, 1425, 1425, 1425, 1425, 1425, 1425, 1425, 1425, 819, 819, 1716, 1716, 1716, 1188, 2048,
    1585, 1561, 1503, 1700, 1399, 1399, 1681, 1714, 762, 762, 1587, 1305, 2038, 1714, 1741, 1501,
    1741, 1577, 1475, 1397, 1663, 1585, 2259, 1579, 1483, 1485, 936, 748, 936, 1716, 1024, 1024,
    1382, 1466, 1214, 1466, 1389, 891, 1466, 1458, 702, 702, 1362, 702, 2134, 1458, 1407, 1466,
    1466, 1010, 1219, 979, 1458, 1335, 1892, 1321, 1335, 1192, 1458, 748, 1458, 1716,
];

/// Width in pixels of `text` set in DejaVu Sans (bold when `bold`) at `size` pixels.
pub fn text_width(text: &str, size: f64, bold: bool) -> f64 {
    let table = if bold { &BOLD } else { &REGULAR };
    let units: f64 = text
        .chars()
        .map(|c| match c as u32 {
            0x20..=0x7e => f64::from(table[(c as u32 - 0x20) as usize]),
            _ => UNITS_PER_EM,
        })
        .sum();
    units / UNITS_PER_EM * size
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Width of `text` as resvg lays it out with the embedded fonts (the ink's extent).
    fn drawn_width(text: &str, bold: bool) -> f64 {
        let svg = format!(
            r#"<svg xmlns="http://www.w3.org/2000/svg" width="4000" height="100"><text x="10" y="50" font-size="20" font-weight="{}">{}</text></svg>"#,
            if bold { "bold" } else { "normal" },
            crate::export::text::xml(text)
        );
        let tree = crate::export::raster::parse_overlay(svg.as_bytes()).expect("svg");
        f64::from(tree.root().abs_bounding_box().width())
    }

    #[test]
    fn estimates_cover_the_drawn_text() {
        // The drawn ink of each sample lies within the estimate and close to it (the advance adds
        // side bearings, a pixel or two at 20 px).
        for bold in [false, true] {
            for t in [
                "repairs not scheduled by day (no --crew-capacity)",
                "WWWW mmmm iiii",
                "Hub: Central depot 12",
                "days 7–12",
            ] {
                let (est, ink) = (text_width(t, 20.0, bold), drawn_width(t, bold));
                assert!(
                    ink <= est + 0.5,
                    "{t:?} bold={bold}: ink {ink} > estimate {est}"
                );
                let ascii = t.is_ascii();
                if ascii {
                    assert!(est - ink < 8.0, "{t:?}: estimate {est} far above ink {ink}");
                }
            }
        }
    }
}
