//! Streaming reader for GeoJSON FeatureCollections (RFC 7946).
//!
//! Features are handed to a callback one at a time as they are parsed, so the raw text and the parsed
//! layer are never both in memory. Members may come in any order (a `bbox` before `features` is fine),
//! and only the properties a caller asks for are kept.

use super::coords::{Coords, CoordsSeed};
use serde::de::{self, DeserializeSeed, IgnoredAny, MapAccess, SeqAccess, Visitor};
use serde_json::Value;
use std::fmt;
use std::io::Read;

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
    let mut state = State {
        kind: None,
        info: CollectionInfo::default(),
        current: None,
        failure: None,
    };
    let mut de = serde_json::Deserializer::from_reader(reader);
    let res = {
        let visitor = CollectionVisitor {
            wanted,
            sink: &mut sink,
            state: &mut state,
        };
        serde::Deserializer::deserialize_any(&mut de, visitor).and_then(|_| de.end())
    };
    if let Some(e) = state.failure.take() {
        return Err(ReadFailure::Callback(e));
    }
    if let Err(e) = res {
        if e.is_io() {
            return Err(ReadFailure::Io(std::io::Error::other(e.to_string())));
        }
        if let Some(msg) = e.to_string().strip_prefix(NOT_COLLECTION) {
            let msg = msg.split(" at line ").next().unwrap_or(msg);
            return Err(ReadFailure::NotCollection(msg.to_string()));
        }
        return Err(ReadFailure::Syntax {
            message: e.to_string(),
            feature: state.current,
        });
    }
    match state.kind.as_deref() {
        Some("FeatureCollection") => Ok(state.info),
        Some(other) => Err(ReadFailure::NotCollection(format!(
            "its \"type\" is \"{other}\", expected \"FeatureCollection\""
        ))),
        None => Err(ReadFailure::NotCollection(
            "it has no \"type\" member (expected \"FeatureCollection\")".into(),
        )),
    }
}

const NOT_COLLECTION: &str = "\u{1}not-a-collection:";
const CALLBACK_ABORT: &str = "\u{1}callback-abort";

struct State<E> {
    kind: Option<String>,
    info: CollectionInfo,
    current: Option<usize>,
    failure: Option<E>,
}

struct CollectionVisitor<'a, E, F> {
    wanted: &'a [String],
    sink: &'a mut F,
    state: &'a mut State<E>,
}

impl<'de, E, F> Visitor<'de> for CollectionVisitor<'_, E, F>
where
    F: FnMut(usize, RawFeature) -> Result<(), E>,
{
    type Value = ();
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a GeoJSON FeatureCollection object")
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<(), A::Error> {
        while let Some(key) = map.next_key::<String>()? {
            match key.as_str() {
                "type" => {
                    let t: String = map.next_value()?;
                    if t != "FeatureCollection" {
                        return Err(de::Error::custom(format!(
                            "{NOT_COLLECTION}its \"type\" is \"{t}\", expected \"FeatureCollection\""
                        )));
                    }
                    self.state.kind = Some(t);
                }
                "features" => map.next_value_seed(FeaturesSeed {
                    wanted: self.wanted,
                    sink: &mut *self.sink,
                    state: &mut *self.state,
                })?,
                "crs" => self.state.info.crs = Some(map.next_value()?),
                _ => {
                    map.next_value::<IgnoredAny>()?;
                }
            }
        }
        Ok(())
    }
    fn visit_seq<A: SeqAccess<'de>>(self, _seq: A) -> Result<(), A::Error> {
        Err(not_object("an array"))
    }
    fn visit_str<E2: de::Error>(self, _v: &str) -> Result<(), E2> {
        Err(not_object("a string"))
    }
    fn visit_bool<E2: de::Error>(self, _v: bool) -> Result<(), E2> {
        Err(not_object("a boolean"))
    }
    fn visit_f64<E2: de::Error>(self, _v: f64) -> Result<(), E2> {
        Err(not_object("a number"))
    }
    fn visit_i64<E2: de::Error>(self, _v: i64) -> Result<(), E2> {
        Err(not_object("a number"))
    }
    fn visit_u64<E2: de::Error>(self, _v: u64) -> Result<(), E2> {
        Err(not_object("a number"))
    }
    fn visit_unit<E2: de::Error>(self) -> Result<(), E2> {
        Err(not_object("null"))
    }
}

// A scalar or array at the top level is "not a FeatureCollection", not a syntax error.
fn not_object<E2: de::Error>(what: &str) -> E2 {
    de::Error::custom(format!(
        "{NOT_COLLECTION}it is {what}, expected a FeatureCollection object"
    ))
}

struct FeaturesSeed<'a, E, F> {
    wanted: &'a [String],
    sink: &'a mut F,
    state: &'a mut State<E>,
}

impl<'de, E, F> DeserializeSeed<'de> for FeaturesSeed<'_, E, F>
where
    F: FnMut(usize, RawFeature) -> Result<(), E>,
{
    type Value = ();
    fn deserialize<D: de::Deserializer<'de>>(self, d: D) -> Result<(), D::Error> {
        d.deserialize_seq(self)
    }
}

impl<'de, E, F> Visitor<'de> for FeaturesSeed<'_, E, F>
where
    F: FnMut(usize, RawFeature) -> Result<(), E>,
{
    type Value = ();
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("an array of features")
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<(), A::Error> {
        let mut index = self.state.info.features;
        loop {
            self.state.current = Some(index);
            let Some(feature) = seq.next_element_seed(FeatureSeed {
                wanted: self.wanted,
            })?
            else {
                break;
            };
            if let Err(e) = (self.sink)(index, feature) {
                self.state.failure = Some(e);
                return Err(de::Error::custom(CALLBACK_ABORT));
            }
            index += 1;
        }
        self.state.current = None;
        self.state.info.features = index;
        Ok(())
    }
}

struct FeatureSeed<'a> {
    wanted: &'a [String],
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
        while let Some(key) = map.next_key::<String>()? {
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
                    })?
                }
                "id" => f.id = Some(map.next_value()?),
                _ => {
                    map.next_value::<IgnoredAny>()?;
                }
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
        while let Some(key) = map.next_key::<String>()? {
            match key.as_str() {
                "type" => kind = Some(map.next_value()?),
                "coordinates" => map.next_value_seed(CoordsSeed(&mut *self.coords))?,
                _ => {
                    map.next_value::<IgnoredAny>()?;
                }
            }
        }
        match kind {
            Some(k) => Ok(Some(k)),
            None => Err(de::Error::custom("a geometry has no \"type\" member")),
        }
    }
}

struct PropsSeed<'a> {
    wanted: &'a [String],
    out: &'a mut Vec<(String, Value)>,
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
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<bool, A::Error> {
        while let Some(key) = map.next_key::<String>()? {
            if self.wanted.iter().any(|w| *w == key) {
                let v: Value = map.next_value()?;
                self.out.push((key, v));
            } else {
                map.next_value::<IgnoredAny>()?;
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
