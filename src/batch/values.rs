//! Manifest values: TOML values and CSV cells checked against the kind of value their key takes.

use std::path::{Path, PathBuf};

/// The kind of value a manifest key takes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// Non-empty text (a TOML integer is taken as its digits).
    Text,
    /// Text; an empty string clears a default.
    OptText,
    /// A number.
    Number,
    /// `true` or `false`.
    Bool,
    /// A file path, relative to the manifest's folder.
    Path,
    /// A file path relative to the manifest's folder; an empty string clears a default.
    OptPath,
    /// One of the listed words.
    Choice(&'static [&'static str]),
    /// `FIELD=V1,V2` filters: a string or an array of strings (in CSV, separated by `;`).
    Filters,
    /// One or more file paths: a string or an array of strings (in CSV, separated by `;`).
    Paths,
}

/// A value read for a key, already checked against the key's kind.
#[derive(Debug, Clone, PartialEq)]
pub enum Value {
    /// Text (also a chosen word).
    Text(String),
    /// A number.
    Number(f64),
    /// A switch.
    Bool(bool),
    /// A path, joined to the manifest's folder.
    Path(PathBuf),
    /// Given empty: the optional setting is cleared.
    Unset,
    /// Filter texts, `FIELD=V1,V2` each.
    Filters(Vec<String>),
    /// Paths, each joined to the manifest's folder (at least one).
    Paths(Vec<PathBuf>),
}

fn bug() -> String {
    "internal error (a bug): the value does not fit its key".into()
}

impl Value {
    /// The text of a text value.
    pub fn text(&self) -> Result<String, String> {
        match self {
            Value::Text(s) => Ok(s.clone()),
            _ => Err(bug()),
        }
    }

    /// The text of an optional text value (`None` when cleared).
    pub fn opt_text(&self) -> Result<Option<String>, String> {
        match self {
            Value::Unset => Ok(None),
            v => v.text().map(Some),
        }
    }

    /// The number of a number value.
    pub fn number(&self) -> Result<f64, String> {
        match self {
            Value::Number(x) => Ok(*x),
            _ => Err(bug()),
        }
    }

    /// The switch of a true/false value.
    pub fn flag(&self) -> Result<bool, String> {
        match self {
            Value::Bool(b) => Ok(*b),
            _ => Err(bug()),
        }
    }

    /// The path of a path value.
    pub fn path(&self) -> Result<PathBuf, String> {
        match self {
            Value::Path(p) => Ok(p.clone()),
            _ => Err(bug()),
        }
    }

    /// The path of an optional path value (`None` when cleared).
    pub fn opt_path(&self) -> Result<Option<PathBuf>, String> {
        match self {
            Value::Unset => Ok(None),
            v => v.path().map(Some),
        }
    }

    /// The paths of a paths value (one or more).
    pub fn paths(&self) -> Result<Vec<PathBuf>, String> {
        match self {
            Value::Paths(p) if !p.is_empty() => Ok(p.clone()),
            Value::Path(p) => Ok(vec![p.clone()]),
            _ => Err(bug()),
        }
    }

    /// The filter texts of a filters value (empty when cleared).
    pub fn filters(&self) -> Result<Vec<String>, String> {
        match self {
            Value::Filters(f) => Ok(f.clone()),
            Value::Unset => Ok(Vec::new()),
            _ => Err(bug()),
        }
    }
}

/// Reads text given for a key (a TOML string or a CSV cell), joining paths to `base`.
fn from_text(kind: Kind, s: &str, base: &Path) -> Result<Value, String> {
    let t = s.trim();
    match kind {
        Kind::Text if t.is_empty() => Err("must not be empty".into()),
        Kind::Text => Ok(Value::Text(t.to_string())),
        Kind::OptText | Kind::OptPath if t.is_empty() => Ok(Value::Unset),
        Kind::OptText => Ok(Value::Text(t.to_string())),
        Kind::Path if t.is_empty() => Err("must be a path".into()),
        Kind::Path | Kind::OptPath => Ok(Value::Path(base.join(t))),
        Kind::Choice(words) if words.contains(&t) => Ok(Value::Text(t.to_string())),
        Kind::Choice(words) => Err(format!("is {t:?}; use {}", words.join(", "))),
        Kind::Filters if t.is_empty() => Ok(Value::Unset),
        Kind::Filters => Ok(Value::Filters(vec![t.to_string()])),
        Kind::Paths if t.is_empty() => Err("must be a path".into()),
        Kind::Paths => Ok(Value::Paths(vec![base.join(t)])),
        Kind::Number => Err(format!("must be a number, found text {t:?}")),
        Kind::Bool => Err(format!("must be true or false, found text {t:?}")),
    }
}

/// Reads a TOML value for a key of `kind`; paths are joined to `base` (the manifest's folder).
pub fn from_toml(kind: Kind, v: &toml::Value, base: &Path) -> Result<Value, String> {
    use toml::Value as T;
    match (kind, v) {
        (_, T::String(s)) => from_text(kind, s, base),
        (Kind::Number, T::Integer(i)) => Ok(Value::Number(*i as f64)),
        (Kind::Number, T::Float(f)) => Ok(Value::Number(*f)),
        // A number or switch for a text key is the text the same value has on the command line
        // (`closed_value = 99` is `--closed-value 99`); comparisons then follow the typing rule
        // (`crate::ingest::value`), so 99, 99.0 and "99" mean the same.
        (Kind::Text | Kind::OptText, T::Integer(i)) => Ok(Value::Text(i.to_string())),
        (Kind::Text | Kind::OptText, T::Float(f)) if f.is_finite() => {
            Ok(Value::Text(f.to_string()))
        }
        (Kind::Text | Kind::OptText, T::Boolean(b)) => Ok(Value::Text(b.to_string())),
        (Kind::Bool, T::Boolean(b)) => Ok(Value::Bool(*b)),
        (Kind::Filters, T::Array(items)) => items
            .iter()
            .map(|i| match i {
                T::String(s) if !s.trim().is_empty() => Ok(s.trim().to_string()),
                other => Err(format!("holds {other}; give FIELD=V1,V2 strings")),
            })
            .collect::<Result<Vec<_>, _>>()
            .map(Value::Filters),
        (Kind::Paths, T::Array(items)) if !items.is_empty() => items
            .iter()
            .map(|i| match i {
                T::String(s) if !s.trim().is_empty() => Ok(base.join(s.trim())),
                other => Err(format!("holds {other}; give paths as strings")),
            })
            .collect::<Result<Vec<_>, _>>()
            .map(Value::Paths),
        (kind, other) => Err(format!("must be {}, found {other}", describe(kind))),
    }
}

/// Reads a non-empty CSV cell for a key of `kind`; paths are joined to `base`. A number cell is
/// read as the command line reads the flag (Rust's decimal syntax), so a cell means what the same
/// text after the flag means.
pub fn from_cell(kind: Kind, cell: &str, base: &Path) -> Result<Value, String> {
    let t = cell.trim();
    match kind {
        Kind::Number => t
            .parse::<f64>()
            .map(Value::Number)
            .map_err(|_| format!("must be a number, found {t:?}")),
        Kind::Bool if t.eq_ignore_ascii_case("true") => Ok(Value::Bool(true)),
        Kind::Bool if t.eq_ignore_ascii_case("false") => Ok(Value::Bool(false)),
        Kind::Bool => Err(format!("must be true or false, found {t:?}")),
        Kind::Filters => Ok(Value::Filters(
            t.split(';')
                .map(str::trim)
                .filter(|f| !f.is_empty())
                .map(str::to_string)
                .collect(),
        )),
        Kind::Paths => {
            let ps: Vec<PathBuf> = t
                .split(';')
                .map(str::trim)
                .filter(|p| !p.is_empty())
                .map(|p| base.join(p))
                .collect();
            if ps.is_empty() {
                Err("must be a path".into())
            } else {
                Ok(Value::Paths(ps))
            }
        }
        _ => from_text(kind, t, base),
    }
}

/// The kind of value in words, for messages.
pub fn describe(kind: Kind) -> String {
    match kind {
        Kind::Text | Kind::OptText => "text".into(),
        Kind::Number => "a number".into(),
        Kind::Bool => "true or false".into(),
        Kind::Path | Kind::OptPath => "a path (text)".into(),
        Kind::Choice(words) => format!("one of {}", words.join(", ")),
        Kind::Filters => "FIELD=V1,V2 text or an array of such".into(),
        Kind::Paths => "a path (text) or an array of paths".into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kinds_are_checked() {
        let b = Path::new("m");
        let t = |s: &str| toml::Value::String(s.into());
        assert_eq!(
            from_toml(Kind::Number, &toml::Value::Integer(2), b),
            Ok(Value::Number(2.0))
        );
        assert!(from_toml(Kind::Number, &t("2"), b).is_err());
        assert!(from_toml(Kind::Bool, &toml::Value::Integer(1), b).is_err());
        assert_eq!(from_toml(Kind::OptPath, &t(""), b), Ok(Value::Unset));
        assert_eq!(
            from_toml(Kind::Path, &t("x.geojson"), b),
            Ok(Value::Path(b.join("x.geojson")))
        );
        assert!(from_toml(Kind::Choice(&["a", "b"]), &t("c"), b).is_err());
        // Text keys keep what was written: "1.50" stays "1.50".
        assert_eq!(
            from_cell(Kind::Text, "1.50", b),
            Ok(Value::Text("1.50".into()))
        );
        assert_eq!(from_cell(Kind::Number, "1.50", b), Ok(Value::Number(1.5)));
        assert!(from_cell(Kind::Number, "abc", b).is_err());
        assert_eq!(
            from_cell(Kind::Filters, "highway=a,b; surface=x", b),
            Ok(Value::Filters(vec![
                "highway=a,b".into(),
                "surface=x".into()
            ]))
        );
    }
}
