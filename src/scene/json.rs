//! Reading scene JSON: a strict parse (duplicate keys refused), then a
//! `serde_json::Value` read with errors that name the key path and value.

use std::cell::RefCell;
use std::fmt;

use serde::de::{self, DeserializeSeed, Deserializer, MapAccess, SeqAccess, Visitor};
use serde_json::{Map, Number, Value};

use crate::error::{Error, Result};

/// Parses JSON text into a document. A UTF-8 byte-order mark at the start is
/// skipped; a key given twice in one object is refused, naming its path
/// (serde_json alone would keep the last value silently). Numbers parse
/// exactly as `serde_json` parses them (shortest round trip).
pub fn parse(text: &str) -> Result<Value> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let duplicate = RefCell::new(None);
    let mut de = serde_json::Deserializer::from_str(text);
    let parsed = Strict {
        path: String::new(),
        duplicate: &duplicate,
    }
    .deserialize(&mut de)
    .and_then(|v| de.end().map(|()| v));
    parsed.map_err(|e| match duplicate.take() {
        Some(path) => Error::invalid(
            path,
            format!("(given again at line {}, column {})", e.line(), e.column()),
            "duplicate key: each key may appear once in an object",
        ),
        None => Error::Syntax {
            line: e.line(),
            column: e.column(),
            message: e
                .to_string()
                .split(" at line")
                .next()
                .unwrap_or_default()
                .to_string(),
        },
    })
}

/// Builds a [`Value`] like serde_json's own, tracking the key path so that a
/// duplicate key can be named.
struct Strict<'a> {
    path: String,
    duplicate: &'a RefCell<Option<String>>,
}

impl<'de> DeserializeSeed<'de> for Strict<'_> {
    type Value = Value;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<Value, D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for Strict<'_> {
    type Value = Value;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a JSON value")
    }

    fn visit_bool<E>(self, b: bool) -> std::result::Result<Value, E> {
        Ok(Value::Bool(b))
    }

    fn visit_i64<E>(self, n: i64) -> std::result::Result<Value, E> {
        Ok(Value::from(n))
    }

    fn visit_u64<E>(self, n: u64) -> std::result::Result<Value, E> {
        Ok(Value::from(n))
    }

    fn visit_f64<E>(self, x: f64) -> std::result::Result<Value, E> {
        Ok(Number::from_f64(x).map_or(Value::Null, Value::Number))
    }

    fn visit_str<E>(self, s: &str) -> std::result::Result<Value, E> {
        Ok(Value::String(s.to_string()))
    }

    fn visit_string<E>(self, s: String) -> std::result::Result<Value, E> {
        Ok(Value::String(s))
    }

    fn visit_unit<E>(self) -> std::result::Result<Value, E> {
        Ok(Value::Null)
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> std::result::Result<Value, A::Error> {
        let mut items = Vec::new();
        loop {
            let seed = Strict {
                path: format!("{}[{}]", self.path, items.len()),
                duplicate: self.duplicate,
            };
            match seq.next_element_seed(seed)? {
                Some(v) => items.push(v),
                None => return Ok(Value::Array(items)),
            }
        }
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<Value, A::Error> {
        let mut out = Map::new();
        while let Some(key) = map.next_key::<String>()? {
            let path = join(&self.path, &key);
            if out.contains_key(&key) {
                *self.duplicate.borrow_mut() = Some(path);
                return Err(de::Error::custom(format!("duplicate key `{key}`")));
            }
            let value = map.next_value_seed(Strict {
                path,
                duplicate: self.duplicate,
            })?;
            out.insert(key, value);
        }
        Ok(Value::Object(out))
    }
}

/// An object together with its path in the document.
pub struct Obj<'a> {
    pub map: &'a Map<String, Value>,
    pub path: String,
}

/// `parent.key`, or `key` at the top level; a key that is empty or starts or
/// ends with white space is written quoted (`""`, `" glass"`).
pub fn join(parent: &str, key: &str) -> String {
    let quoted;
    let key = if key.is_empty() || key.trim() != key {
        quoted = Value::from(key).to_string();
        &quoted
    } else {
        key
    };
    if parent.is_empty() {
        key.to_string()
    } else {
        format!("{parent}.{key}")
    }
}

/// A JSON value printed compactly for an error message.
pub fn show(v: &Value) -> String {
    let s = v.to_string();
    if s.chars().count() > 60 {
        format!("{}…", s.chars().take(57).collect::<String>())
    } else {
        s
    }
}

impl<'a> Obj<'a> {
    /// Views `v` as an object, or says that `path` should be one.
    pub fn new(v: &'a Value, path: impl Into<String>) -> Result<Self> {
        let path = path.into();
        match v {
            Value::Object(map) => Ok(Obj { map, path }),
            other => {
                let key = if path.is_empty() { "(document)" } else { &path };
                Err(Error::invalid(key, show(other), "expected a JSON object"))
            }
        }
    }

    /// Path of a key in this object.
    pub fn key(&self, key: &str) -> String {
        join(&self.path, key)
    }

    /// Refuses keys not in `allowed` (catches typos such as `thickness`).
    pub fn only(&self, allowed: &[&str]) -> Result<()> {
        match self.map.keys().find(|k| !allowed.contains(&k.as_str())) {
            Some(k) => Err(Error::invalid(
                self.key(k),
                show(&self.map[k]),
                format!("unknown key (expected one of: {})", allowed.join(", ")),
            )),
            None => Ok(()),
        }
    }

    /// The raw value of an optional key.
    pub fn get(&self, key: &str) -> Option<&'a Value> {
        self.map.get(key)
    }

    /// An optional finite number.
    pub fn f64(&self, key: &str) -> Result<Option<f64>> {
        self.get(key).map(|v| number(v, &self.key(key))).transpose()
    }

    /// A required finite number.
    pub fn req_f64(&self, key: &str) -> Result<f64> {
        self.f64(key)?.ok_or_else(|| self.missing(key, "a number"))
    }

    /// An optional string.
    pub fn str(&self, key: &str) -> Result<Option<&'a str>> {
        match self.get(key) {
            None => Ok(None),
            Some(Value::String(s)) => Ok(Some(s)),
            Some(other) => Err(Error::invalid(
                self.key(key),
                show(other),
                "expected a string",
            )),
        }
    }

    /// An optional non-negative whole number.
    pub fn u64(&self, key: &str) -> Result<Option<u64>> {
        match self.get(key) {
            None => Ok(None),
            Some(v) => match v.as_u64() {
                Some(n) => Ok(Some(n)),
                None => Err(Error::invalid(
                    self.key(key),
                    show(v),
                    "expected a whole number ≥ 0",
                )),
            },
        }
    }

    /// The error for a required key that is absent.
    pub fn missing(&self, key: &str, what: &str) -> Error {
        Error::invalid(self.key(key), "(missing)", format!("required: {what}"))
    }
}

/// A finite JSON number.
pub fn number(v: &Value, path: &str) -> Result<f64> {
    match v.as_f64() {
        Some(x) if x.is_finite() => Ok(x),
        _ => Err(Error::invalid(path, show(v), "expected a finite number")),
    }
}

/// A two-element array `[lo, hi]` of numbers.
pub fn pair(v: &Value, path: &str) -> Result<(f64, f64)> {
    match v.as_array().map(Vec::as_slice) {
        Some([a, b]) => Ok((
            number(a, &format!("{path}[0]"))?,
            number(b, &format!("{path}[1]"))?,
        )),
        _ => Err(Error::invalid(
            path,
            show(v),
            "expected two numbers [low, high]",
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn duplicate_keys_are_named_with_their_path() {
        let err = parse(r#"{"stack": [{"material": "a", "thickness_nm": 1, "thickness_nm": 2}]}"#)
            .unwrap_err()
            .to_string();
        assert!(err.starts_with("stack[0].thickness_nm = "), "{err}");
        assert!(err.contains("duplicate key"), "{err}");
        let err = parse("{\"a\": 1,\n \"a\": 1}").unwrap_err().to_string();
        assert!(err.contains("a = (given again at line 2"), "{err}");
    }

    #[test]
    fn parse_matches_serde_json_and_skips_a_bom() {
        let text = r#"{"z": [1, -2, 0.1, 1e300, 5e-324, true, null, "s"], "a": {"b": {}}}"#;
        let strict = parse(&format!("\u{feff}{text}")).unwrap();
        assert_eq!(strict, serde_json::from_str::<Value>(text).unwrap());
        let keys: Vec<&String> = strict.as_object().unwrap().keys().collect();
        assert_eq!(keys, ["z", "a"], "key order is kept");
        assert!(matches!(parse("{\"a\": 1} x"), Err(Error::Syntax { .. })));
        assert!(matches!(
            parse("\u{feff}\u{feff}{}"),
            Err(Error::Syntax { .. })
        ));
    }
}
