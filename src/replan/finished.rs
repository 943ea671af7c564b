//! The work-order sheet as crews hand it back: `work_order` and `status` read from a CSV a
//! spreadsheet has touched (byte-order mark, `,` `;` or tab, the `'` reknit put before formula
//! characters), every other column ignored.

use super::ReplanError;
use crate::export::text::csv_text;
use std::path::Path;

/// Spellings of "done" in the `status` column (any case): what crews and spreadsheets write for a
/// ticked box. Common practice, no source.
pub const DONE: &[&str] = &["done", "yes", "y", "true", "1", "x"];

/// The spelling of "started".
pub const STARTED: &str = "started";

/// One row that reports work: its line in the file (the header is line 1), key and state.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Row {
    /// Line number in the file (the header is 1).
    pub line: usize,
    /// The work-order key.
    pub work_order: String,
    /// True for done, false for started.
    pub done: bool,
}

fn bad(path: &Path, line: usize, message: String) -> ReplanError {
    ReplanError::Finished {
        path: path.to_path_buf(),
        line,
        message,
    }
}

/// A cell as written by the crew: spaces trimmed, reknit's `'` prefix removed.
fn cell(s: &str) -> &str {
    csv_text(s.trim()).trim()
}

/// The columns `work_order` and `status` of a header split by `sep`, when it has both.
fn columns(text: &str, sep: u8) -> Option<(usize, usize)> {
    let mut r = csv::ReaderBuilder::new()
        .delimiter(sep)
        .has_headers(false)
        .flexible(true)
        .from_reader(text.as_bytes());
    let head = r.records().next()?.ok()?;
    let find = |name: &str| head.iter().position(|h| cell(h).eq_ignore_ascii_case(name));
    Some((find("work_order")?, find("status")?))
}

/// Reads the rows that report work (a blank status reports none); any other status, a row
/// without a key, or one key reported twice differently is an error naming the line.
pub fn read(path: &Path, text: &str) -> Result<Vec<Row>, ReplanError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let Some((sep, (key_col, status_col))) = [b',', b';', b'\t']
        .into_iter()
        .find_map(|s| columns(text, s).map(|c| (s, c)))
    else {
        return Err(bad(
            path,
            1,
            "the header has no `work_order` and `status` columns (separated by `,`, `;` or tab): \
             give the work-orders.csv of the previous plan"
                .into(),
        ));
    };
    let mut r = csv::ReaderBuilder::new()
        .delimiter(sep)
        .flexible(true)
        .from_reader(text.as_bytes());
    let mut rows: Vec<Row> = Vec::new();
    // Lines counted from byte offsets as the reader splits records (CRLF, LF or CR; a quoted
    // cell may span lines; the header is line 1).
    let line_at = |byte: u64| crate::ingest::csv_lines::line_at(text.as_bytes(), byte) as usize;
    for rec in r.records() {
        let rec = rec.map_err(|e| {
            let line = e.position().map_or(0, |p| line_at(p.byte()));
            bad(path, line, format!("not readable as CSV: {e}"))
        })?;
        let line = rec.position().map_or(0, |p| line_at(p.byte()));
        let status = cell(rec.get(status_col).unwrap_or(""));
        let key = cell(rec.get(key_col).unwrap_or(""));
        let done = match status.to_lowercase().as_str() {
            "" => continue,
            s if DONE.contains(&s) => true,
            STARTED => false,
            _ => {
                return Err(bad(
                    path,
                    line,
                    format!(
                        "status \"{}\" is neither done (also yes, y, true, 1, x) nor started; \
                         leave it blank for work not begun",
                        crate::export::text::terminal(status)
                    ),
                ));
            }
        };
        if key.is_empty() {
            return Err(bad(
                path,
                line,
                "the status is set but `work_order` is empty".into(),
            ));
        }
        if let Some(before) = rows.iter().find(|r| r.work_order == key) {
            if before.done != done {
                return Err(bad(
                    path,
                    line,
                    format!(
                        "work order {key} is also on line {} with another status",
                        before.line
                    ),
                ));
            }
            continue;
        }
        rows.push(Row {
            line,
            work_order: key.to_string(),
            done,
        });
    }
    Ok(rows)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn semicolons_byte_order_mark_and_prefix_are_read() {
        let t = "\u{feff}order;work_order;status\r\n1;'-WO-a-0-5;Done\r\n2;WO-b-0-3;\r\n3;WO-c-0-9; started \r\n";
        let rows = read(Path::new("w.csv"), t).unwrap();
        assert_eq!(rows.len(), 2);
        assert_eq!(rows[0].work_order, "-WO-a-0-5");
        assert!(rows[0].done);
        assert_eq!((rows[1].line, rows[1].done), (4, false));
    }

    #[test]
    fn old_mac_line_ends_name_their_line() {
        let e = read(
            Path::new("w.csv"),
            "work_order,status\rWO-a,done\rWO-b,half\r",
        )
        .unwrap_err();
        assert!(e.to_string().contains("line 3"), "{e}");
    }

    #[test]
    fn tabs_and_every_spelling_of_done() {
        let mut t = String::from("work_order\tstatus\n");
        for (i, s) in DONE.iter().enumerate() {
            t.push_str(&format!("WO-{i}\t{}\n", s.to_uppercase()));
        }
        assert!(read(Path::new("w.tsv"), &t).unwrap().iter().all(|r| r.done));
    }

    #[test]
    fn an_unknown_status_names_its_line() {
        let e = read(
            Path::new("w.csv"),
            "work_order,status\nWO-a,done\nWO-b,half\n",
        )
        .unwrap_err();
        let m = e.to_string();
        assert!(
            m.contains("w.csv") && m.contains("line 3") && m.contains("half"),
            "{m}"
        );
    }
}
