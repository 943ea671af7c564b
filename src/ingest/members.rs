//! Member names given twice anywhere inside a JSON value: in a property's object, a geometry's
//! foreign member, a collection's `crs`, a shard summary's rows. Readers disagree on which value of
//! a repeated name wins (RFC 8259 §4: the names within an object should be unique), so every JSON
//! reader refuses it.
//!
//! The walk is iterative over the text of a value already checked to be JSON, so a value nested
//! deeper than any parser's recursion limit is still checked, without a stack overflow.

use std::borrow::Cow;
use std::collections::HashSet;

/// The first member name that appears twice in one object anywhere inside the JSON `text`, with
/// a message naming it; `Ok` when every object's names are unique. `text` must be valid JSON.
pub fn unique(text: &str) -> Result<(), String> {
    let b = text.as_bytes();
    // One entry per open object (its names so far) or array (None).
    let mut stack: Vec<Option<HashSet<Cow<str>>>> = Vec::new();
    let mut expect_key = false;
    let mut i = 0;
    while i < b.len() {
        match b[i] {
            b'"' => {
                let start = i + 1;
                i += 1;
                while i < b.len() && b[i] != b'"' {
                    i += if b[i] == b'\\' { 2 } else { 1 };
                }
                if expect_key && let Some(Some(names)) = stack.last_mut() {
                    let raw = &text[start..i.min(b.len())];
                    // An escaped spelling ("\u0061") is the same name as the plain one.
                    let name: Cow<str> = if raw.contains('\\') {
                        Cow::Owned(
                            serde_json::from_str(&format!("\"{raw}\""))
                                .map_err(|e| e.to_string())?,
                        )
                    } else {
                        Cow::Borrowed(raw)
                    };
                    if let Some(name) = names.replace(name) {
                        return Err(format!(
                            "the member \"{name}\" appears twice in one object (RFC 8259 §4: \
                             names must be unique)"
                        ));
                    }
                }
                expect_key = false;
            }
            b'{' => {
                stack.push(Some(HashSet::new()));
                expect_key = true;
            }
            b'[' => {
                stack.push(None);
                expect_key = false;
            }
            b'}' | b']' => {
                stack.pop();
                expect_key = false;
            }
            b',' => expect_key = matches!(stack.last(), Some(Some(_))),
            b':' => expect_key = false,
            _ => {}
        }
        i += 1;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_twice_at_any_depth() {
        assert!(unique(r#"{"a":1,"b":{"c":[{"d":1,"e":2}],"d":3}}"#).is_ok());
        assert!(unique(r#"[1,"a","a",{"a":"a"}]"#).is_ok());
        let twice = unique(r#"{"a":{"b":[{"c":1,"c":2}]}}"#).unwrap_err();
        assert!(twice.contains("\"c\""), "{twice}");
        assert!(unique(r#"{"a":{"x":1},"b":{"x":1,"y":{"x":2}}}"#).is_ok());
        // "\u0061" is "a" written with an escape.
        assert!(unique(r#"{"o":{"a":1,"\u0061":2}}"#).is_err());
        assert!(unique(r#"{"k\"":1,"k":2}"#).is_ok());
        let deep = format!(
            "{}{{\"a\":1,\"a\":2}}{}",
            "[".repeat(100_000),
            "]".repeat(100_000)
        );
        assert!(unique(&deep).is_err());
    }
}
