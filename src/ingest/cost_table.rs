//! Damage categories and road-class rates from a TOML cost table.
//!
//! ```toml
//! [categories]          # damage category → factor, or "closed" for impassable
//! intact = 0
//! debris = 0.3
//! washed-out = 1.0
//! collapsed = "closed"
//!
//! [classes]             # optional: repair effort per metre by road class (a multiplier)
//! field = "highway"
//! motorway = 3.0
//! track = 0.5
//! default = 1.0
//! ```

use super::damage::{Damage, check_factor};
use std::collections::BTreeMap;

/// Categories and class rates.
#[derive(Debug, Clone, PartialEq)]
pub struct CostTable {
    /// Damage by category name (compared case-insensitively).
    pub categories: BTreeMap<String, Damage>,
    /// Field holding the road class, when class rates apply.
    pub class_field: Option<String>,
    /// Rate by class value.
    pub class_rates: BTreeMap<String, f64>,
    /// Rate for classes not listed.
    pub class_default: f64,
}

impl Default for CostTable {
    /// The documented default table (see docs/outputs.md, "Damage model").
    fn default() -> Self {
        let mut c = BTreeMap::new();
        for (k, v) in [
            ("intact", Damage::Factor(0.0)),
            ("none", Damage::Factor(0.0)),
            ("light", Damage::Factor(0.1)),
            ("debris", Damage::Factor(0.3)),
            ("moderate", Damage::Factor(0.5)),
            ("severe", Damage::Factor(0.8)),
            ("washed-out", Damage::Factor(1.0)),
            ("destroyed", Damage::Factor(1.0)),
            ("collapsed", Damage::Closed),
            ("closed", Damage::Closed),
            ("impassable", Damage::Closed),
        ] {
            c.insert(k.to_string(), v);
        }
        CostTable {
            categories: c,
            class_field: None,
            class_rates: BTreeMap::new(),
            class_default: 1.0,
        }
    }
}

impl CostTable {
    /// Reads a cost table file (the documented default when `path` is `None`); the error names
    /// the file and the key.
    pub fn from_file(path: Option<&std::path::Path>) -> Result<CostTable, String> {
        let Some(p) = path else {
            return Ok(CostTable::default());
        };
        let text = super::limits::read_small_text(p)
            .map_err(|e| format!("{}: cannot read: {e}", p.display()))?;
        CostTable::from_toml(&text).map_err(|e| format!("{}: {e}", p.display()))
    }

    /// Parses a cost table; the error names the key.
    pub fn from_toml(text: &str) -> Result<CostTable, String> {
        let doc: toml::Table = text
            .parse()
            .map_err(|e: toml::de::Error| format!("not valid TOML: {e}"))?;
        let mut t = CostTable {
            categories: BTreeMap::new(),
            ..Default::default()
        };
        for k in doc.keys() {
            if k != "categories" && k != "classes" {
                return Err(format!(
                    "unknown table [{k}]; a cost table has [categories] and [classes]"
                ));
            }
        }
        if let Some(cats) = doc.get("categories") {
            let cats = cats.as_table().ok_or("[categories] must be a table")?;
            for (k, v) in cats {
                let d = match v {
                    toml::Value::String(s) if s.eq_ignore_ascii_case("closed") => Damage::Closed,
                    toml::Value::Integer(i) => {
                        check_factor(*i as f64).map_err(|m| format!("category {k:?}: {m}"))?
                    }
                    toml::Value::Float(f) => {
                        check_factor(*f).map_err(|m| format!("category {k:?}: {m}"))?
                    }
                    other => {
                        return Err(format!(
                            "category {k:?}: {} is neither a factor nor \"closed\"",
                            super::limits::excerpt(&other.to_string())
                        ));
                    }
                };
                if t.categories.insert(k.to_lowercase(), d).is_some() {
                    return Err(format!(
                        "category {k:?} is given twice (names differing only in letter case are the same category)"
                    ));
                }
            }
        } else {
            t.categories = CostTable::default().categories;
        }
        if let Some(cl) = doc.get("classes") {
            let cl = cl.as_table().ok_or("[classes] must be a table")?;
            for (k, v) in cl {
                match (k.as_str(), v) {
                    ("field", toml::Value::String(s)) => t.class_field = Some(s.clone()),
                    (_, toml::Value::Integer(_) | toml::Value::Float(_)) => {
                        let r = v
                            .as_float()
                            .or(v.as_integer().map(|i| i as f64))
                            .unwrap_or(f64::NAN);
                        if !(r.is_finite() && (0.0..=super::damage::MAX_FACTOR).contains(&r)) {
                            return Err(format!(
                                "class rate {k:?} = {} is not a rate from 0 to 1000",
                                crate::decimal::shown(r)
                            ));
                        }
                        if k == "default" {
                            t.class_default = r;
                        } else if t.class_rates.insert(k.to_lowercase(), r).is_some() {
                            return Err(format!(
                                "class {k:?} is given twice (names differing only in letter case are the same class)"
                            ));
                        }
                    }
                    _ => {
                        return Err(format!(
                            "[classes] {k:?}: expected a rate (or field = \"NAME\")"
                        ));
                    }
                }
            }
            if t.class_field.is_none() {
                return Err(
                    "[classes] needs field = \"NAME\" (the road property holding the class)".into(),
                );
            }
        }
        Ok(t)
    }

    /// Damage of a category (the same value: equal numbers, or text ignoring letter case), or an
    /// error listing the known ones.
    pub fn category(&self, name: &str) -> Result<Damage, String> {
        self.categories
            .iter()
            .find(|(k, _)| super::value::same(k, name))
            .map(|(_, d)| *d)
            .ok_or_else(|| {
                format!(
                    "unknown damage category {name:?}; known categories: {}",
                    super::limits::listed(&self.categories.keys().collect::<Vec<_>>())
                )
            })
    }

    /// Rate of a road class: the listed class equal to the stored value (by value for numbers,
    /// ignoring letter case for text), else the default rate.
    pub fn rate(&self, class: Option<&serde_json::Value>) -> f64 {
        class
            .and_then(|c| {
                self.class_rates
                    .iter()
                    .find(|(k, _)| super::value::matches(c, k))
            })
            .map(|(_, r)| *r)
            .unwrap_or(self.class_default)
    }
}

/// Keeps or drops features by the values of a field (`FIELD=v1,v2`).
#[derive(Debug, Clone, PartialEq)]
pub struct RoadFilter {
    /// The field.
    pub field: String,
    /// The values.
    pub values: Vec<String>,
    /// True: keep only features with one of the values; false: drop them.
    pub keep: bool,
}

impl RoadFilter {
    /// Parses `FIELD=v1,v2`.
    pub fn parse(s: &str, keep: bool) -> Result<RoadFilter, String> {
        let (f, v) = s
            .split_once('=')
            .ok_or_else(|| format!("{s:?} is not FIELD=value1,value2"))?;
        if f.trim().is_empty() {
            return Err(format!("{s:?} names no field"));
        }
        Ok(RoadFilter {
            field: f.trim().to_string(),
            values: v.split(',').map(|x| x.trim().to_string()).collect(),
            keep,
        })
    }

    /// True when a feature with this value passes; values compare by value for numbers and
    /// ignoring letter case for text.
    pub fn passes(&self, value: Option<&serde_json::Value>) -> bool {
        let hit = value.is_some_and(|v| self.values.iter().any(|x| super::value::matches(v, x)));
        hit == self.keep
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_tables_and_filters() {
        let t = CostTable::from_toml(
            "[categories]\nintact = 0\ndebris = 0.3\ncollapsed = \"closed\"\n[classes]\nfield = \"highway\"\nmotorway = 3\ndefault = 1.5\n",
        )
        .unwrap();
        assert_eq!(t.category("Debris"), Ok(Damage::Factor(0.3)));
        assert_eq!(t.category("collapsed"), Ok(Damage::Closed));
        let e = t.category("gone").unwrap_err();
        assert!(e.contains("collapsed, debris, intact"), "{e}");
        assert_eq!(t.rate(Some(&"motorway".into())), 3.0);
        assert_eq!(t.rate(Some(&"track".into())), 1.5);
        assert!(CostTable::from_toml("[classes]\nmotorway = 2\n").is_err());
        assert!(CostTable::from_toml("[categories]\nx = \"big\"\n").is_err());
        let f = RoadFilter::parse("highway=footway,path", false).unwrap();
        assert!(!f.passes(Some(&"path".into())));
        assert!(f.passes(Some(&"primary".into())));
        assert!(f.passes(None));
    }
}
