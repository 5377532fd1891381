//! Repeated keys in one JSON object.
//!
//! RFC 8259 §4 says the names within an object SHOULD be unique and that
//! readers differ when they are not. The GeoJSON reader refuses a repeat
//! of a member it knows (`coordinates`, `features`), but a property map
//! keeps the last value silently, so `{"year": 2023, "year": 2024}` would
//! answer `--where year=2023` with nothing and `--where year=2024` with
//! every feature. This pass finds the first repeat anywhere in the text,
//! with its line and column, so the reader can refuse it.

use serde::de::{self, Deserializer, MapAccess, SeqAccess, Visitor};

/// The first key that appears twice in one object, as (key, line,
/// column); `None` when every object's keys are distinct (or the text is
/// not JSON at all: the caller's own parse reports that).
pub fn first_repeated_key(text: &str) -> Option<(String, usize, usize)> {
    match serde_json::from_str::<Walk>(text) {
        Ok(Walk) => None,
        Err(e) => {
            let message = e.to_string();
            let key = message.strip_prefix(REPEATED)?.split('`').next()?;
            Some((key.to_string(), e.line(), e.column()))
        }
    }
}

const REPEATED: &str = "repeated key `";

/// A visitor that walks any JSON value and keeps nothing but each
/// object's key set while it is open.
struct Walk;

impl<'de> de::Deserialize<'de> for Walk {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_any(Walk)
    }
}

impl<'de> Visitor<'de> for Walk {
    type Value = Walk;

    fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
        f.write_str("any JSON value")
    }

    fn visit_bool<E>(self, _: bool) -> Result<Walk, E> {
        Ok(Walk)
    }
    fn visit_i64<E>(self, _: i64) -> Result<Walk, E> {
        Ok(Walk)
    }
    fn visit_u64<E>(self, _: u64) -> Result<Walk, E> {
        Ok(Walk)
    }
    fn visit_f64<E>(self, _: f64) -> Result<Walk, E> {
        Ok(Walk)
    }
    fn visit_str<E>(self, _: &str) -> Result<Walk, E> {
        Ok(Walk)
    }
    fn visit_unit<E>(self) -> Result<Walk, E> {
        Ok(Walk)
    }
    fn visit_none<E>(self) -> Result<Walk, E> {
        Ok(Walk)
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Walk, A::Error> {
        while seq.next_element::<Walk>()?.is_some() {}
        Ok(Walk)
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Walk, A::Error> {
        let mut seen = std::collections::HashSet::new();
        while let Some(key) = map.next_key::<String>()? {
            if seen.contains(&key) {
                return Err(de::Error::custom(format!("{REPEATED}{key}`")));
            }
            map.next_value::<Walk>()?;
            seen.insert(key);
        }
        Ok(Walk)
    }
}

#[cfg(test)]
mod tests {
    use super::first_repeated_key;

    /// A repeat in a nested property map is found with its key and place
    /// (line 3, column 37: the closing quote of the second `year`); the
    /// same key in two different objects is not a repeat; escapes are
    /// compared decoded.
    #[test]
    fn finds_the_first_repeated_key_with_its_place() {
        let text = "{\"type\":\"FeatureCollection\",\"features\":[\n{\"properties\":{\"year\":2023},\n \"x\":1,\"properties2\":{\"year\":1,\"year\":2}}]}";
        assert_eq!(first_repeated_key(text), Some(("year".to_string(), 3, 37)));
        assert_eq!(first_repeated_key(r#"[{"a":1},{"a":2}]"#), None);
        assert_eq!(
            first_repeated_key(r#"{"a":1,"\u0061":2}"#).map(|k| k.0),
            Some("a".to_string())
        );
        assert_eq!(first_repeated_key("not json"), None);
    }
}
