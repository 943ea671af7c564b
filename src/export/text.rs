//! Text from the inputs on its way out: one function per kind of output, used by every writer.
//!
//! Control characters (U+0000–U+001F, U+007F–U+009F) never abort a run: they are replaced with
//! U+FFFD in SVG, HTML and CSV, and shown escaped on the terminal. A free-text CSV cell that
//! begins with `=`, `+`, `-`, `@`, a tab or a carriage return gets a leading `'`, so a spreadsheet
//! shows it as text instead of running it as a formula; a cell that begins with `'` itself gets
//! one more, so [`csv_text`] can remove the prefix again without ambiguity.

use std::borrow::Cow;

/// What replaces a control character in a file.
const REPLACEMENT: char = '\u{FFFD}';

/// Characters that make a spreadsheet read a cell as a formula when they come first.
const FORMULA_START: [char; 6] = ['=', '+', '-', '@', '\t', '\r'];

/// A free-text CSV cell (a road name, an id, a site list): prefixed with `'` when it begins like a
/// formula or with `'`, control characters replaced. Never used for numeric columns.
pub fn csv_cell(s: &str) -> Cow<'_, str> {
    let guard = s.starts_with(FORMULA_START) || s.starts_with('\'');
    if !guard && !s.chars().any(char::is_control) {
        return Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 1);
    if guard {
        out.push('\'');
    }
    out.extend(
        s.chars()
            .map(|c| if c.is_control() { REPLACEMENT } else { c }),
    );
    Cow::Owned(out)
}

/// The text of a cell written by [`csv_cell`]: the `'` it added removed (the one before a formula
/// character, a replaced tab or carriage return, or another `'`). Every reader of reknit's own
/// CSV files goes through it; numeric cells pass unchanged.
pub fn csv_text(cell: &str) -> &str {
    match cell.strip_prefix('\'') {
        Some(rest) if rest.starts_with(FORMULA_START) || rest.starts_with(['\'', REPLACEMENT]) => {
            rest
        }
        _ => cell,
    }
}

/// Text for XML (SVG) content or attribute values: markup characters escaped, control
/// characters replaced (XML 1.0 §2.2 allows none but tab, line feed and carriage return).
pub fn xml(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c if c.is_control() => out.push(REPLACEMENT),
            c => out.push(c),
        }
    }
    out
}

/// Text for HTML content or attribute values (escaped as for XML; HTML treats control
/// characters as parse errors, so they are replaced too).
pub fn html(s: &str) -> String {
    xml(s)
}

/// Text from the inputs for the map page's data: control characters replaced, as in the other
/// outputs. The page shows it only as text (never as markup), and [`script_json`] makes the data
/// safe inside its script element.
pub fn plain(s: &str) -> Cow<'_, str> {
    if !s.chars().any(char::is_control) {
        return Cow::Borrowed(s);
    }
    Cow::Owned(
        s.chars()
            .map(|c| if c.is_control() { REPLACEMENT } else { c })
            .collect(),
    )
}

/// JSON text made safe inside an HTML `<script>` element: `<`, `>` and `&` (which can only occur
/// inside JSON strings) and the line separators U+2028 and U+2029 become `\u` escapes, so no
/// name can close the element, open a comment or end a line of the script. The value is unchanged
/// for any JSON parser (RFC 8259 §7: any character may be escaped).
pub fn script_json(json: &str) -> String {
    let mut out = String::with_capacity(json.len() + 16);
    for c in json.chars() {
        match c {
            '<' => out.push_str("\\u003c"),
            '>' => out.push_str("\\u003e"),
            '&' => out.push_str("\\u0026"),
            '\u{2028}' => out.push_str("\\u2028"),
            '\u{2029}' => out.push_str("\\u2029"),
            c => out.push(c),
        }
    }
    out
}

/// Text for the terminal: control characters other than the line feed shown as `\u{…}` escapes,
/// so no name can move the cursor, clear the screen or change colours.
pub fn terminal(s: &str) -> Cow<'_, str> {
    if !s.chars().any(|c| c.is_control() && c != '\n') {
        return Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        if c.is_control() && c != '\n' {
            out.extend(c.escape_unicode());
        } else {
            out.push(c);
        }
    }
    Cow::Owned(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formula_cells_are_neutralised_and_read_back() {
        // OWASP "CSV Injection": cells starting with = + - @ tab or CR get a leading quote.
        for s in [
            "=1+2", "+1", "-2", "@SUM(A1)", "\tx", "\rx", "'=x", "'quoted", "'", "''",
        ] {
            let cell = csv_cell(s);
            assert!(cell.starts_with('\''), "{s:?} → {cell:?}");
            // Read back: the original, with only control characters replaced.
            let replaced: String = s
                .chars()
                .map(|c| if c.is_control() { REPLACEMENT } else { c })
                .collect();
            assert_eq!(csv_text(&cell), replaced, "{s:?} → {cell:?}");
        }
        // Every other leading character class passes both ways unchanged.
        for s in ["Main Street", "7", "0.5", "", "\u{FFFD}x", "é", " =x", "#1"] {
            assert_eq!(csv_cell(s), s);
            assert_eq!(csv_text(s), s);
        }
        // A control character elsewhere is replaced and read back replaced.
        assert_eq!(csv_text(&csv_cell("a\u{1}=")), "a\u{FFFD}=");
    }

    #[test]
    fn control_characters_are_replaced_or_escaped() {
        assert_eq!(xml("a\u{1}<b>"), "a\u{FFFD}&lt;b&gt;");
        assert_eq!(csv_cell("a\u{7}b"), "a\u{FFFD}b");
        assert_eq!(terminal("a\u{1b}[2Jb\nc"), "a\\u{1b}[2Jb\nc");
    }

    #[test]
    fn script_json_cannot_close_the_script_and_reads_back_whole() {
        let name = "</script><script>alert('x')</script> \"quoted\" <!-- & \u{2028}\u{2029}";
        let json = serde_json::to_string(&serde_json::json!({ "road": name })).unwrap();
        let safe = script_json(&json);
        for banned in ["<", ">", "&", "\u{2028}", "\u{2029}"] {
            assert!(!safe.contains(banned), "{banned:?} left in {safe}");
        }
        // Any JSON parser reads the same value back (RFC 8259 §7).
        let back: serde_json::Value = serde_json::from_str(&safe).unwrap();
        assert_eq!(back["road"], name);
        assert_eq!(plain("a\u{1b}[2Jb"), "a\u{FFFD}[2Jb");
        assert_eq!(plain("</script>"), "</script>");
    }
}
