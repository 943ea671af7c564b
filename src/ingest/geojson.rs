//! Streaming reader for GeoJSON FeatureCollections (RFC 7946).
//!
//! A [`Scanner`] cuts the text into top-level members and single features; each feature's bytes are
//! parsed on their own and handed to a callback, so the raw text and the parsed layer are never both
//! in memory. Members may come in any order (a `bbox` before `features` is fine), and only the
//! properties a caller asks for are kept.

#[path = "geojson_batches.rs"]
mod batches;
#[cfg(test)]
#[path = "geojson_grammar.rs"]
mod grammar;

use super::coords::{Coords, CoordsSeed};
use super::scan::{Position, Scanner};
use serde::de::{self, DeserializeSeed, IgnoredAny, MapAccess, Visitor};
use serde_json::Value;
use serde_json::value::RawValue;
use std::fmt;
use std::io::Read;

/// Pass this as the only wanted property name to keep every property.
pub const ALL_PROPERTIES: &str = "*";

/// One feature as read: geometry type and coordinates, its `id` member and the wanted properties.
#[derive(Debug, Default)]
pub struct RawFeature {
    /// The geometry's `type`, or `None` for a null geometry.
    pub geometry_type: Option<String>,
    /// The geometry's coordinates (empty for a null geometry or a GeometryCollection).
    pub coords: Coords,
    /// The feature's `id` member, when present.
    pub id: Option<Value>,
    /// Wanted properties in the order they appear in the file.
    pub props: Vec<(String, Value)>,
    /// Whether the feature had a `properties` object at all.
    pub has_properties: bool,
    /// Every property name, collected for the first feature only (for messages about field names).
    pub keys: Vec<String>,
}

impl RawFeature {
    /// The value of a kept property, if the feature has it.
    pub fn prop(&self, key: &str) -> Option<&Value> {
        self.props.iter().find(|(k, _)| k == key).map(|(_, v)| v)
    }
}

/// What a failed read was about: malformed JSON, or the caller's callback refusing a feature.
#[derive(Debug)]
pub enum ReadFailure<E> {
    /// The text is not the expected JSON; `feature` is the index being read when it failed.
    Syntax {
        /// Parser message with line and column.
        message: String,
        /// Index of the feature being parsed, when inside `features`.
        feature: Option<usize>,
    },
    /// The document is JSON but not a FeatureCollection.
    NotCollection(String),
    /// An I/O error while reading.
    Io(std::io::Error),
    /// The callback's own error.
    Callback(E),
}

/// Top-level members other than `features` that a caller may need.
#[derive(Debug, Default)]
pub struct CollectionInfo {
    /// The legacy `crs` member (GeoJSON 2008), when present.
    pub crs: Option<Value>,
    /// Number of entries in `features`.
    pub features: usize,
}

/// Reads a FeatureCollection from `reader`, calling `sink(index, feature)` for each feature in order.
///
/// `wanted` lists the property names to keep (others are skipped without being stored).
pub fn read_collection<R, E, F>(
    reader: R,
    wanted: &[String],
    mut sink: F,
) -> Result<CollectionInfo, ReadFailure<E>>
where
    R: Read,
    F: FnMut(usize, RawFeature) -> Result<(), E>,
{
    let mut sc = Scanner::new(reader);
    let mut info = CollectionInfo::default();
    let io = |e| io_fail::<E>(e, None);
    let eof = |sc: &Scanner<R>, feature| ReadFailure::Syntax {
        message: at("unexpected end of file", sc.position()),
        feature,
    };
    match sc.peek().map_err(io)? {
        Some(b'{') => sc.bump(),
        Some(_) => {
            let Some((text, pos)) = sc.value().map_err(io)? else {
                return Err(eof(&sc, None));
            };
            return Err(match serde_json::from_slice::<Value>(text) {
                Ok(v) => ReadFailure::NotCollection(format!(
                    "it is {}, expected a FeatureCollection object",
                    json_kind(&v)
                )),
                Err(e) => syntax(&e, pos, None),
            });
        }
        None => {
            return Err(ReadFailure::Syntax {
                message: "the file is empty".into(),
                feature: None,
            });
        }
    }
    let mut kind: Option<String> = None;
    let mut top = std::collections::HashSet::new();
    loop {
        match sc.peek().map_err(io)? {
            Some(b'}') => {
                sc.bump();
                break;
            }
            Some(b'"') => {}
            Some(_) => return Err(unexpected(&sc, "a member name or '}'")),
            None => return Err(eof(&sc, None)),
        }
        let Some((text, pos)) = sc.value().map_err(io)? else {
            return Err(eof(&sc, None));
        };
        let key: String = serde_json::from_slice(text).map_err(|e| syntax(&e, pos, None))?;
        if !top.insert(key.clone()) {
            return Err(ReadFailure::Syntax {
                message: at(
                    &format!(
                        "the member \"{key}\" appears twice in the collection (RFC 8259 §4: names must be unique)"
                    ),
                    pos,
                ),
                feature: None,
            });
        }
        match sc.peek().map_err(io)? {
            Some(b':') => sc.bump(),
            Some(_) => return Err(unexpected(&sc, "':'")),
            None => return Err(eof(&sc, None)),
        }
        if key == "features" {
            read_features(&mut sc, wanted, &mut sink, &mut info)?;
        } else {
            let Some((text, pos)) = sc.value().map_err(io)? else {
                return Err(eof(&sc, None));
            };
            match key.as_str() {
                "type" => {
                    let t: Value =
                        serde_json::from_slice(text).map_err(|e| syntax(&e, pos, None))?;
                    match t.as_str() {
                        Some("FeatureCollection") => kind = Some("FeatureCollection".into()),
                        _ => {
                            return Err(ReadFailure::NotCollection(format!(
                                "its \"type\" is {t}, expected \"FeatureCollection\""
                            )));
                        }
                    }
                }
                "crs" => {
                    info.crs =
                        Some(serde_json::from_slice(text).map_err(|e| syntax(&e, pos, None))?)
                }
                _ => {
                    serde_json::from_slice::<IgnoredAny>(text)
                        .map_err(|e| syntax(&e, pos, None))?;
                }
            }
            // Valid JSON by now; a name twice inside it is refused as in a feature.
            if let Err(m) = std::str::from_utf8(text)
                .map_err(|e| e.to_string())
                .and_then(super::members::unique)
            {
                return Err(ReadFailure::Syntax {
                    message: format!("inside \"{key}\": {m}"),
                    feature: None,
                });
            }
        }
        match sc.peek().map_err(io)? {
            Some(b',') => {
                sc.bump();
                if sc.peek().map_err(io)? == Some(b'}') {
                    return Err(ReadFailure::Syntax {
                        message: at(TRAILING_COMMA, sc.position()),
                        feature: None,
                    });
                }
            }
            Some(b'}') => {}
            Some(_) => return Err(unexpected(&sc, "',' or '}'")),
            None => return Err(eof(&sc, None)),
        }
    }
    if sc.peek().map_err(io)?.is_some() {
        return Err(unexpected(&sc, "the end of the file"));
    }
    match kind {
        Some(_) => Ok(info),
        None => Err(ReadFailure::NotCollection(
            "it has no \"type\" member (expected \"FeatureCollection\")".into(),
        )),
    }
}

fn read_features<R, E, F>(
    sc: &mut Scanner<R>,
    wanted: &[String],
    sink: &mut F,
    info: &mut CollectionInfo,
) -> Result<(), ReadFailure<E>>
where
    R: Read,
    F: FnMut(usize, RawFeature) -> Result<(), E>,
{
    let io = |e| io_fail::<E>(e, None);
    match sc.peek().map_err(io)? {
        Some(b'[') => sc.bump(),
        Some(_) => return Err(unexpected(sc, "an array of features")),
        None => return Err(unexpected(sc, "an array of features")),
    }
    info.features = batches::read_features(sc, wanted, sink, info.features)?;
    Ok(())
}

/// A read error; a value beyond the scanner's size limits (invalid data) is reported as malformed.
fn io_fail<E>(e: std::io::Error, feature: Option<usize>) -> ReadFailure<E> {
    if e.kind() == std::io::ErrorKind::InvalidData {
        ReadFailure::Syntax {
            message: e.to_string(),
            feature,
        }
    } else {
        ReadFailure::Io(e)
    }
}

/// The message for a comma before a closing bracket: JSON has none (RFC 8259 §4, §5), and a
/// reader that allowed it would accept files other tools refuse.
pub(super) const TRAILING_COMMA: &str = "a comma right before the closing bracket (a trailing comma is not JSON, RFC 8259 §4 and §5); \
     remove it";

fn at(msg: &str, p: Position) -> String {
    format!("{msg} at line {} column {}", p.line, p.column)
}

fn unexpected<R: Read, E>(sc: &Scanner<R>, what: &str) -> ReadFailure<E> {
    ReadFailure::Syntax {
        message: at(&format!("expected {what}"), sc.position()),
        feature: None,
    }
}

/// A serde_json error on a slice that started at `start`, with the position made absolute.
fn syntax<E>(e: &serde_json::Error, start: Position, feature: Option<usize>) -> ReadFailure<E> {
    let text = e.to_string();
    let msg = text
        .rsplit_once(" at line ")
        .map_or(text.as_str(), |(m, _)| m);
    let (line, column) = if e.line() <= 1 {
        (start.line, start.column + e.column().saturating_sub(1))
    } else {
        (start.line + e.line() - 1, e.column())
    };
    ReadFailure::Syntax {
        message: format!("{msg} at line {line} column {column}"),
        feature,
    }
}

fn json_kind(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "a boolean",
        Value::Number(_) => "a number",
        Value::String(_) => "a string",
        Value::Array(_) => "an array",
        Value::Object(_) => "an object without \"{\" at the start",
    }
}

struct FeatureSeed<'a> {
    wanted: &'a [String],
    collect_keys: bool,
}

impl<'de> DeserializeSeed<'de> for FeatureSeed<'_> {
    type Value = RawFeature;
    fn deserialize<D: de::Deserializer<'de>>(self, d: D) -> Result<RawFeature, D::Error> {
        d.deserialize_map(self)
    }
}

impl<'de> Visitor<'de> for FeatureSeed<'_> {
    type Value = RawFeature;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a GeoJSON Feature object")
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<RawFeature, A::Error> {
        let mut f = RawFeature::default();
        let mut kind: Option<String> = None;
        let mut seen = Members::default();
        while let Some(key) = map.next_key::<String>()? {
            seen.check::<A::Error>(&key)?;
            match key.as_str() {
                "type" => kind = Some(map.next_value()?),
                "geometry" => {
                    f.geometry_type = map.next_value_seed(GeometrySeed {
                        coords: &mut f.coords,
                    })?
                }
                "properties" => {
                    f.has_properties = map.next_value_seed(PropsSeed {
                        wanted: self.wanted,
                        out: &mut f.props,
                        keys: self.collect_keys.then_some(&mut f.keys),
                    })?
                }
                "id" => f.id = Some(as_written(&map.next_value::<Box<RawValue>>()?, "id")?),
                _ => checked(&mut map, &key)?,
            }
        }
        match kind.as_deref() {
            Some("Feature") => Ok(f),
            Some(other) => Err(de::Error::custom(format!(
                "expected \"type\": \"Feature\", found \"{other}\""
            ))),
            None => Err(de::Error::custom("a feature has no \"type\" member")),
        }
    }
}

/// The member names of one object seen so far; a name given twice is refused, since readers
/// disagree on which value wins (RFC 8259 §4: the names within an object should be unique).
#[derive(Default)]
pub(crate) struct Members(std::collections::HashSet<String>);

impl Members {
    /// Records `key`, or fails when the object already had it.
    pub(crate) fn check<E: de::Error>(&mut self, key: &str) -> Result<(), E> {
        if self.0.insert(key.to_string()) {
            Ok(())
        } else {
            Err(E::custom(format_args!(
                "the member \"{key}\" appears twice in one object (RFC 8259 §4: names must be unique)"
            )))
        }
    }
}

struct GeometrySeed<'a> {
    coords: &'a mut Coords,
}

impl<'de> DeserializeSeed<'de> for GeometrySeed<'_> {
    type Value = Option<String>;
    fn deserialize<D: de::Deserializer<'de>>(self, d: D) -> Result<Option<String>, D::Error> {
        d.deserialize_option(self)
    }
}

impl<'de> Visitor<'de> for GeometrySeed<'_> {
    type Value = Option<String>;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a GeoJSON geometry object or null")
    }
    fn visit_none<E: de::Error>(self) -> Result<Option<String>, E> {
        Ok(None)
    }
    fn visit_unit<E: de::Error>(self) -> Result<Option<String>, E> {
        Ok(None)
    }
    fn visit_some<D: de::Deserializer<'de>>(self, d: D) -> Result<Option<String>, D::Error> {
        d.deserialize_map(self)
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Option<String>, A::Error> {
        let mut kind: Option<String> = None;
        let mut seen = Members::default();
        while let Some(key) = map.next_key::<String>()? {
            seen.check::<A::Error>(&key)?;
            match key.as_str() {
                "type" => kind = Some(map.next_value()?),
                "coordinates" => map.next_value_seed(CoordsSeed(&mut *self.coords))?,
                _ => checked(&mut map, &format!("geometry\" member \"{key}"))?,
            }
        }
        match kind {
            Some(k) => Ok(Some(k)),
            None => Err(de::Error::custom("a geometry has no \"type\" member")),
        }
    }
}

/// A property or id value under the typing rule (`super::value`): a number whose spelling a double
/// would not reproduce (`1.50`, `1e2`, digits beyond a 64-bit integer) is kept as its text.
/// `member` names the value in messages.
fn as_written<E: de::Error>(raw: &RawValue, member: &str) -> Result<Value, E> {
    let text = raw.get();
    unique_in(text, member)?;
    let v: Value = serde_json::from_str(text).map_err(E::custom)?;
    Ok(match &v {
        Value::Number(n) if n.to_string() != text => Value::from(text),
        _ => v,
    })
}

/// Skips the value of `member`, refusing a name given twice in any object inside it.
fn checked<'de, A: MapAccess<'de>>(map: &mut A, member: &str) -> Result<(), A::Error> {
    let raw = map.next_value::<&'de RawValue>()?;
    unique_in(raw.get(), member)
}

/// Refuses a name given twice in any object inside the JSON `text` of `member`.
fn unique_in<E: de::Error>(text: &str, member: &str) -> Result<(), E> {
    super::members::unique(text).map_err(|m| E::custom(format_args!("inside \"{member}\": {m}")))
}

struct PropsSeed<'a> {
    wanted: &'a [String],
    out: &'a mut Vec<(String, Value)>,
    keys: Option<&'a mut Vec<String>>,
}

impl<'de> DeserializeSeed<'de> for PropsSeed<'_> {
    type Value = bool;
    fn deserialize<D: de::Deserializer<'de>>(self, d: D) -> Result<bool, D::Error> {
        d.deserialize_option(self)
    }
}

impl<'de> Visitor<'de> for PropsSeed<'_> {
    type Value = bool;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a properties object or null")
    }
    fn visit_none<E: de::Error>(self) -> Result<bool, E> {
        Ok(false)
    }
    fn visit_unit<E: de::Error>(self) -> Result<bool, E> {
        Ok(false)
    }
    fn visit_some<D: de::Deserializer<'de>>(self, d: D) -> Result<bool, D::Error> {
        d.deserialize_map(self)
    }
    fn visit_map<A: MapAccess<'de>>(mut self, mut map: A) -> Result<bool, A::Error> {
        let mut seen = Members::default();
        while let Some(key) = map.next_key::<String>()? {
            seen.check::<A::Error>(&key)?;
            if let Some(k) = self.keys.as_mut() {
                k.push(key.clone());
            }
            if self.wanted.contains(&key)
                || self.wanted.first().is_some_and(|w| w == ALL_PROPERTIES)
            {
                let v = as_written(&map.next_value::<Box<RawValue>>()?, &key)?;
                self.out.push((key, v));
            } else {
                checked(&mut map, &key)?;
            }
        }
        Ok(true)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(s: &str, wanted: &[&str]) -> Result<Vec<RawFeature>, ReadFailure<String>> {
        let wanted: Vec<String> = wanted.iter().map(|s| s.to_string()).collect();
        let mut v = Vec::new();
        read_collection(s.as_bytes(), &wanted, |_, f| {
            v.push(f);
            Ok::<(), String>(())
        })?;
        Ok(v)
    }

    #[test]
    fn members_in_any_order() {
        // RFC 7946 §7: members of an object are unordered; bbox first is legal.
        let s = r#"{"bbox":[0,0,1,1],"features":[{"properties":{"a":1,"b":"x"},
            "geometry":{"coordinates":[[0,0],[1,1]],"type":"LineString"},"type":"Feature","id":7}],
            "type":"FeatureCollection"}"#;
        let f = read(s, &["b"]).unwrap();
        assert_eq!(f.len(), 1);
        assert_eq!(f[0].geometry_type.as_deref(), Some("LineString"));
        assert_eq!(f[0].coords.pos.len(), 2);
        assert_eq!(f[0].prop("b"), Some(&Value::from("x")));
        assert_eq!(f[0].prop("a"), None);
        assert_eq!(f[0].id, Some(Value::from(7)));
    }

    #[test]
    fn null_geometry_and_properties() {
        let s = r#"{"type":"FeatureCollection","features":[{"type":"Feature","geometry":null,"properties":null}]}"#;
        let f = read(s, &[]).unwrap();
        assert!(f[0].geometry_type.is_none());
        assert!(!f[0].has_properties);
    }

    #[test]
    fn not_a_collection() {
        for s in [
            r#"{"type":"Feature","geometry":null,"properties":{}}"#,
            r#"[1,2]"#,
            r#"{"features":[]}"#,
        ] {
            match read(s, &[]) {
                Err(ReadFailure::NotCollection(_)) => {}
                other => panic!("{s}: {other:?}"),
            }
        }
    }

    #[test]
    fn syntax_error_names_feature() {
        let s = r#"{"type":"FeatureCollection","features":[{"type":"Feature","geometry":null},{"type":"Feature","geometry":{"type":"LineString","coordinates":[[0,0],[1,]]}}]}"#;
        match read(s, &[]) {
            Err(ReadFailure::Syntax { feature, .. }) => assert_eq!(feature, Some(1)),
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn callback_error_stops() {
        let s = r#"{"type":"FeatureCollection","features":[{"type":"Feature","geometry":null},{"type":"Feature","geometry":null}]}"#;
        let mut n = 0;
        let r = read_collection(s.as_bytes(), &[], |i, _| {
            n += 1;
            if i == 0 { Err("stop") } else { Ok(()) }
        });
        assert!(matches!(r, Err(ReadFailure::Callback("stop"))));
        assert_eq!(n, 1);
    }
}
