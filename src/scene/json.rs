//! Reading a `serde_json::Value` with errors that name the key path and value.

use serde_json::{Map, Value};

use crate::error::{Error, Result};

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
