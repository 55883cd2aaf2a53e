//! The JSON value tree the reader builds.

use alloc::string::String;
use alloc::vec::Vec;

/// A JSON number: its value, and whether its text was a whole number.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Number {
    /// The nearest `f64` to the text (correctly rounded).
    pub value: f64,
    /// The number when its text was a non-negative whole number without
    /// fraction or exponent that fits a `u64` (`1`, not `1.0`, `1e0` or `-1`).
    pub whole: Option<u64>,
}

/// A parsed JSON value. Object members keep their order and duplicates, so the
/// caller can refuse duplicates.
#[derive(Debug, Clone, PartialEq)]
pub enum Json {
    /// `null`
    Null,
    /// `true` / `false`
    Bool(bool),
    /// A number.
    Number(Number),
    /// A string.
    String(String),
    /// An array.
    Array(Vec<Json>),
    /// An object, members in order.
    Object(Vec<(String, Json)>),
}

impl From<f64> for Json {
    fn from(value: f64) -> Json {
        Json::Number(Number { value, whole: None })
    }
}

impl From<&str> for Json {
    fn from(s: &str) -> Json {
        Json::String(String::from(s))
    }
}

impl Json {
    /// A whole number, written in digits.
    pub fn whole(n: u64) -> Json {
        Json::Number(Number {
            value: n as f64,
            whole: Some(n),
        })
    }

    /// An object with its members in code-point order of their names.
    pub fn sorted_object(mut members: Vec<(String, Json)>) -> Json {
        crate::sort::sort_by(&mut members, |a, b| a.0.cmp(&b.0));
        Json::Object(members)
    }

    /// The compact JSON text of the value, members in the tree's order.
    pub fn to_text(&self) -> String {
        let mut w = super::JsonWriter::new();
        w.value(self);
        w.finish()
    }

    /// The text of a string.
    pub fn as_str(&self) -> Option<&str> {
        match self {
            Json::String(s) => Some(s),
            _ => None,
        }
    }

    /// The value of a number.
    pub fn as_f64(&self) -> Option<f64> {
        match self {
            Json::Number(n) => Some(n.value),
            _ => None,
        }
    }

    /// A number written as a non-negative whole number (see [`Number::whole`]).
    pub fn as_u64(&self) -> Option<u64> {
        match self {
            Json::Number(n) => n.whole,
            _ => None,
        }
    }

    /// The items of an array.
    pub fn as_array(&self) -> Option<&[Json]> {
        match self {
            Json::Array(a) => Some(a),
            _ => None,
        }
    }

    /// The members of an object, in order.
    pub fn as_object(&self) -> Option<&[(String, Json)]> {
        match self {
            Json::Object(m) => Some(m),
            _ => None,
        }
    }
}

/// Looking up the members of an object by name.
pub trait Members {
    /// The value of the first member named `key`.
    fn field(&self, key: &str) -> Option<&Json>;
    /// Whether a member is named `key`.
    fn has(&self, key: &str) -> bool {
        self.field(key).is_some()
    }
    /// The name of the first member that appears a second time. Quadratic in
    /// the number of distinct names before the first repeat: meant for objects
    /// whose names were first checked against a short list of known ones (the
    /// circuit and stage readers), not for open-ended maps such as a sheet's cells.
    fn repeated(&self) -> Option<&str>;
}

impl Members for [(String, Json)] {
    fn field(&self, key: &str) -> Option<&Json> {
        self.iter().find(|(k, _)| k == key).map(|(_, v)| v)
    }

    fn repeated(&self) -> Option<&str> {
        // Documents have a handful of members per object: a quadratic scan is
        // cheaper than a set, in time and in code size.
        self.iter()
            .enumerate()
            .find(|(i, (k, _))| self.iter().take(*i).any(|(j, _)| j == k))
            .map(|(_, (k, _))| k.as_str())
    }
}
