//! One typing rule for attribute values, whichever reader produced them (GeoJSON properties,
//! dBASE fields, CSV cells).
//!
//! Values keep the text they were written with, so ids stay exactly as written ("007" is not
//! "7"); comparisons with what a user types (filters, class rates, the closed value) are by value
//! when both sides are numbers (a stored 3, 3.0 or "3" all match `3`), a stored true/false (a
//! GeoJSON boolean, a dBASE logical field) matches the spellings of [`truth`], and otherwise by
//! text, ignoring letter case.

use serde_json::Value;

/// The number a text spells, when it is plainly a decimal number (digits, sign, point, exponent;
/// not `inf` or `NaN`).
pub fn number(text: &str) -> Option<f64> {
    let t = text.trim();
    let plain = !t.is_empty()
        && t.bytes().any(|b| b.is_ascii_digit())
        && t.bytes()
            .all(|b| b.is_ascii_digit() || matches!(b, b'+' | b'-' | b'.' | b'e' | b'E'));
    plain
        .then(|| t.parse::<f64>().ok())
        .flatten()
        .filter(|x| x.is_finite())
}

/// The value of a text cell (CSV): a number only when writing that number back gives the same
/// text, so "007", "+1" and digits beyond what a double holds stay text.
pub fn cell(text: &str) -> Value {
    let t = text.trim();
    if let Ok(i) = t.parse::<i64>()
        && i.to_string() == t
    {
        return Value::from(i);
    }
    if let Some(x) = number(t)
        && let Some(n) = serde_json::Number::from_f64(x)
        && n.to_string() == t
    {
        return Value::Number(n);
    }
    Value::from(t)
}

/// A value as id or label text, as written: numbers in their own spelling, text trimmed; `None`
/// for null, empty text and anything else.
pub fn text(v: &Value) -> Option<String> {
    match v {
        Value::String(s) if !s.trim().is_empty() => Some(s.trim().to_string()),
        Value::Number(n) => Some(n.to_string()),
        _ => None,
    }
}

/// True when a stored value equals what a user typed: by value when both are numbers, else as
/// text ignoring letter case and surrounding spaces.
pub fn matches(v: &Value, user: &str) -> bool {
    let stored = match v {
        Value::Number(n) => n.to_string(),
        Value::String(s) => s.clone(),
        Value::Bool(b) => return truth(user) == Some(*b),
        _ => return false,
    };
    same(&stored, user)
}

/// The switch a user's text names, ignoring letter case: `true`, `yes`, `t`, `y`, `1` or `false`,
/// `no`, `f`, `n`, `0` (the spellings of a dBASE logical field and of common switches).
pub fn truth(user: &str) -> Option<bool> {
    match user.trim().to_ascii_lowercase().as_str() {
        "true" | "yes" | "t" | "y" | "1" => Some(true),
        "false" | "no" | "f" | "n" | "0" => Some(false),
        _ => None,
    }
}

/// True when two texts name the same value: equal numbers, or equal text ignoring letter case.
pub fn same(a: &str, b: &str) -> bool {
    match (number(a), number(b)) {
        (Some(x), Some(y)) => x == y,
        _ => a.trim().to_lowercase() == b.trim().to_lowercase(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn ids_keep_their_text_and_numbers_compare_by_value() {
        assert_eq!(cell("007"), json!("007"));
        assert_eq!(cell("+1"), json!("+1"));
        assert_eq!(cell("12345678901234567"), json!(12345678901234567_i64));
        assert_eq!(
            text(&cell("12345678901234567")).unwrap(),
            "12345678901234567"
        );
        assert_eq!(
            cell("123456789012345678901"),
            json!("123456789012345678901")
        );
        assert_eq!(cell("1.5"), json!(1.5));
        assert_eq!(cell("7"), json!(7));
        assert_eq!(cell("+41 79 555 01 02"), json!("+41 79 555 01 02"));
        assert_ne!(text(&cell("007")), text(&cell("7")));
        assert!(matches(&json!(3), "3"));
        assert!(matches(&json!(3.0), "3"));
        assert!(matches(&json!("3"), "3.0"));
        assert!(matches(&json!(99), "99"));
        assert!(matches(&json!("Primary"), "primary"));
        assert!(!matches(&json!(3), "4"));
        assert!(!matches(&json!(null), "null"));
        for (user, b) in [("true", true), ("Yes", true), ("1", true), ("T", true)] {
            assert!(
                matches(&json!(b), user) && !matches(&json!(!b), user),
                "{user}"
            );
        }
        for user in ["false", "NO", "0", "f", "n"] {
            assert!(matches(&json!(false), user) && !matches(&json!(true), user));
        }
        assert!(!matches(&json!(true), "maybe"));
        assert_eq!(number("inf"), None);
        assert_eq!(number("NaN"), None);
    }
}
