//! Bridges, culverts and tunnels: read from the road layer so every repair and planned road on a
//! structure can be flagged for inspection before use.
//!
//! With `--structure-field NAME` only that field is read. Otherwise the fields `bridge`, `tunnel`,
//! `culvert` and `structure` are read, each also as `BRIDGE`, `Bridge`, `is_bridge`, `IS_BRIDGE`
//! and so on (OpenStreetMap writes `bridge=yes`, `viaduct`, `aqueduct`, … and `tunnel=yes`,
//! `culvert`, `building_passage`, …). Any value counts as a structure except an empty one and `no`,
//! `false`, `0`, `n`, `f`, `none` (any letter case) or a JSON `false`/`0`/null: an unknown value is
//! flagged rather than assumed safe.

use super::geojson::RawFeature;
use serde_json::Value;

/// The fields read when no `--structure-field` is given, with the kind each flags.
pub const FIELDS: &[(&str, &str)] = &[
    ("bridge", "bridge"),
    ("BRIDGE", "bridge"),
    ("Bridge", "bridge"),
    ("is_bridge", "bridge"),
    ("IS_BRIDGE", "bridge"),
    ("tunnel", "tunnel"),
    ("TUNNEL", "tunnel"),
    ("Tunnel", "tunnel"),
    ("is_tunnel", "tunnel"),
    ("IS_TUNNEL", "tunnel"),
    ("culvert", "culvert"),
    ("CULVERT", "culvert"),
    ("Culvert", "culvert"),
    ("is_culvert", "culvert"),
    ("IS_CULVERT", "culvert"),
    ("structure", "structure"),
    ("STRUCTURE", "structure"),
    ("Structure", "structure"),
];

/// Values that say "no structure here".
const NONE_VALUES: &[&str] = &["", "no", "false", "0", "n", "f", "none"];

/// Values that say "yes" without naming the kind.
const YES_VALUES: &[&str] = &["yes", "true", "1", "y", "t"];

/// The property names to keep while reading for the structure rule in force.
pub fn wanted(field: Option<&str>) -> Vec<String> {
    match field {
        Some(f) => vec![f.to_string()],
        None => FIELDS.iter().map(|(f, _)| f.to_string()).collect(),
    }
}

/// The structure a value names, if any: `None` for the "no" values.
fn value_text(v: &Value) -> Option<String> {
    let t = match v {
        Value::Null => return None,
        Value::Bool(b) => return b.then(|| "yes".to_string()),
        Value::Number(n) => n.to_string(),
        Value::String(s) => s.trim().to_string(),
        other => other.to_string(),
    };
    let lower = t.to_lowercase();
    let zero = lower.parse::<f64>().is_ok_and(|x| x == 0.0);
    (!NONE_VALUES.contains(&lower.as_str()) && !zero).then_some(lower)
}

/// The kind of structure a feature lies on (`bridge`, `tunnel`, `culvert`, or the value of a
/// structure field), or `None`; several kinds are joined with `+`.
pub fn of(f: &RawFeature, field: Option<&str>) -> Option<Box<str>> {
    let mut kinds: Vec<String> = Vec::new();
    let mut add = |k: String| {
        if !kinds.contains(&k) {
            kinds.push(k);
        }
    };
    match field {
        Some(name) => {
            if let Some(t) = f.prop(name).and_then(value_text) {
                add(if YES_VALUES.contains(&t.as_str()) {
                    "structure".to_string()
                } else {
                    t
                });
            }
        }
        None => {
            for (name, kind) in FIELDS {
                let Some(t) = f.prop(name).and_then(value_text) else {
                    continue;
                };
                add(match *kind {
                    // OpenStreetMap tags a culvert as tunnel=culvert.
                    "tunnel" if t == "culvert" => "culvert".to_string(),
                    "structure" if !YES_VALUES.contains(&t.as_str()) => t,
                    k => k.to_string(),
                });
            }
        }
    }
    (!kinds.is_empty()).then(|| kinds.join("+").into_boxed_str())
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn feature(props: &[(&str, Value)]) -> RawFeature {
        RawFeature {
            props: props
                .iter()
                .map(|(k, v)| (k.to_string(), v.clone()))
                .collect(),
            ..Default::default()
        }
    }

    #[test]
    fn osm_tags_and_common_fields_are_read() {
        // OpenStreetMap tagging (wiki Key:bridge, Key:tunnel), from memory.
        let cases = [
            (vec![("bridge", json!("yes"))], Some("bridge")),
            (vec![("bridge", json!("viaduct"))], Some("bridge")),
            (vec![("bridge", json!("no"))], None),
            (vec![("tunnel", json!("culvert"))], Some("culvert")),
            (vec![("tunnel", json!("building_passage"))], Some("tunnel")),
            (vec![("IS_BRIDGE", json!(1))], Some("bridge")),
            (vec![("is_bridge", json!(0))], None),
            (vec![("is_culvert", json!(true))], Some("culvert")),
            (vec![("is_tunnel", json!(false))], None),
            (
                vec![("structure", json!("Retaining wall"))],
                Some("retaining wall"),
            ),
            (vec![("structure", json!("N"))], None),
            (
                vec![("bridge", json!("yes")), ("tunnel", json!("yes"))],
                Some("bridge+tunnel"),
            ),
            (vec![("layer", json!("1"))], None),
        ];
        for (props, want) in cases {
            assert_eq!(of(&feature(&props), None).as_deref(), want, "{props:?}");
        }
    }

    #[test]
    fn a_named_field_is_the_only_one_read() {
        let f = feature(&[("bridge", json!("yes")), ("kind", json!("Culvert"))]);
        assert_eq!(of(&f, Some("kind")).as_deref(), Some("culvert"));
        let f = feature(&[("bridge", json!("yes")), ("kind", json!("yes"))]);
        assert_eq!(of(&f, Some("kind")).as_deref(), Some("structure"));
        let f = feature(&[("bridge", json!("yes"))]);
        assert_eq!(of(&f, Some("kind")), None);
    }
}
