//! The one reader of JS options objects.
//!
//! An export with more than four inputs takes one options object with camelCase
//! fields; its Rust side is a serde struct with
//! `#[serde(rename_all = "camelCase", deny_unknown_fields)]` (fields with a default
//! carry `#[serde(default)]` or `#[serde(default = "…")]`, stated in the `.d.ts`).
//! [`read`] turns such an object into the struct, and every way it can fail into a
//! thrown `LoopwrightError` whose `param` is the name the caller used, with its path:
//!
//! | what is wrong                       | `code`          | `param`                  |
//! |-------------------------------------|-----------------|--------------------------|
//! | a required field is left out        | `missing`       | `gain`, `amplifier.gain` |
//! | a field the struct does not have    | `unknown_field` | `polez`, `amplifier.polez` |
//! | a value of the wrong kind           | `wrong_type`    | `amplifier.polesHz[2]`   |
//! | a name that is not one of a list    | `unknown_name`  | `kind`                   |
//! | not an object at all                | `wrong_type`    | the options' own name    |
//!
//! The entry module (`facade/loopwright.js`) has already copied the object into
//! plain data (no getters, no Proxy, no prototype tricks) before the wasm is entered,
//! so reading it here runs no caller code. After reading, the core checks the values
//! and names them by its own (snake_case) parameter names; [`core_error`] turns those
//! into the caller's names (`tol_r1` → `tolR1`) so that `param` always names what the
//! caller wrote.

use crate::Error;
use alloc::string::{String, ToString};
use serde::de::DeserializeOwned;
use serde_path_to_error::Segment;
use wasm_bindgen::prelude::*;
use wasm_bindgen::JsCast;

/// Read the options object `value` into `T`.
///
/// `name` is what the caller calls the object: `""` for the single options object of
/// an export (its fields are the parameters, so `param` is `polesHz`), or the
/// parameter's name for an object passed among other arguments (`amplifier`, giving
/// `amplifier.polesHz`).
///
/// # Errors
/// A `LoopwrightError` with `code` `missing`, `unknown_field`, `wrong_type` or
/// `unknown_name` and `param` the path of the field at fault (see the module docs).
pub(crate) fn read<T: DeserializeOwned>(name: &str, value: &JsValue) -> Result<T, JsValue> {
    if !value.is_object() || js_sys::Array::is_array(value) {
        let param = if name.is_empty() { "options" } else { name };
        return Err(error_at(
            param,
            Error::WrongType {
                param: "",
                expected: "an options object",
            },
            None,
        ));
    }
    let plain = Plain::from_js(value);
    serde_path_to_error::deserialize(plain).map_err(|e| {
        let path = path_text(name, e.path());
        refusal(&path, &e.inner().to_string())
    })
}

/// The copied options object as Rust data, read from the JS value with calls that
/// cannot throw on plain data (type tests, array indexing, `Object.entries`).
///
/// Why not serde-wasm-bindgen's deserializer: for a list field it asks any value for
/// its iterator with `Reflect.get`, which throws a `TypeError` on a number or a
/// string; each such caught exception left about 10 bytes of the module's memory
/// behind (10.3 MiB per million calls of `loopAt({gain: 1e5, polesHz: '10'}, …)`).
enum Plain {
    Null,
    Bool(bool),
    Number(f64),
    Text(String),
    List(alloc::vec::Vec<Plain>),
    Map(alloc::vec::Vec<(String, Plain)>),
    /// Anything else (a function, a symbol, a BigInt): refused as the wrong type.
    Other,
}

impl Plain {
    fn from_js(v: &JsValue) -> Plain {
        if v.is_null() || v.is_undefined() {
            Plain::Null
        } else if let Some(b) = v.as_bool() {
            Plain::Bool(b)
        } else if let Some(x) = v.as_f64() {
            Plain::Number(x)
        } else if let Some(t) = v.as_string() {
            Plain::Text(t)
        } else if let Some(list) = v.dyn_ref::<js_sys::Array>() {
            Plain::List(list.iter().map(|x| Plain::from_js(&x)).collect())
        } else if let Some(list) = v.dyn_ref::<js_sys::Float64Array>() {
            Plain::List(list.to_vec().into_iter().map(Plain::Number).collect())
        } else if v.is_object() && !v.is_function() {
            let entries = js_sys::Object::entries(v.unchecked_ref());
            Plain::Map(
                entries
                    .iter()
                    .filter_map(|pair| {
                        let pair: js_sys::Array = pair.unchecked_into();
                        let value = pair.get(1);
                        // A field set to undefined counts as left out (its default).
                        if value.is_undefined() {
                            return None;
                        }
                        Some((pair.get(0).as_string()?, Plain::from_js(&value)))
                    })
                    .collect(),
            )
        } else {
            Plain::Other
        }
    }

    fn unexpected(&self) -> serde::de::Unexpected<'_> {
        use serde::de::Unexpected as U;
        match self {
            Plain::Null => U::Unit,
            Plain::Bool(b) => U::Bool(*b),
            Plain::Number(x) => U::Float(*x),
            Plain::Text(t) => U::Str(t),
            Plain::List(_) => U::Seq,
            Plain::Map(_) => U::Map,
            Plain::Other => U::Other("a function, symbol or BigInt"),
        }
    }
}

type DeError = serde::de::value::Error;

impl<'de> serde::de::IntoDeserializer<'de, DeError> for Plain {
    type Deserializer = Plain;
    fn into_deserializer(self) -> Plain {
        self
    }
}

impl<'de> serde::Deserializer<'de> for Plain {
    type Error = DeError;

    fn deserialize_any<V: serde::de::Visitor<'de>>(self, visitor: V) -> Result<V::Value, DeError> {
        use serde::de::value::{MapDeserializer, SeqDeserializer};
        match self {
            Plain::Null => visitor.visit_unit(),
            Plain::Bool(b) => visitor.visit_bool(b),
            // Whole numbers as integers, so that a count field (u32) takes `3`; an
            // f64 field takes integers too.
            Plain::Number(x)
                if x.fract() == 0.0 && (0.0..9.007_199_254_740_992e15).contains(&x) =>
            {
                visitor.visit_u64(x as u64)
            }
            Plain::Number(x) => visitor.visit_f64(x),
            Plain::Text(t) => visitor.visit_string(t),
            Plain::List(items) => {
                let mut seq = SeqDeserializer::new(items.into_iter());
                let value = visitor.visit_seq(&mut seq)?;
                seq.end()?;
                Ok(value)
            }
            Plain::Map(entries) => {
                let mut map = MapDeserializer::new(entries.into_iter());
                let value = visitor.visit_map(&mut map)?;
                map.end()?;
                Ok(value)
            }
            other => Err(serde::de::Error::invalid_type(other.unexpected(), &visitor)),
        }
    }

    fn deserialize_option<V: serde::de::Visitor<'de>>(
        self,
        visitor: V,
    ) -> Result<V::Value, DeError> {
        match self {
            Plain::Null => visitor.visit_none(),
            other => visitor.visit_some(other),
        }
    }

    fn deserialize_enum<V: serde::de::Visitor<'de>>(
        self,
        _name: &'static str,
        _variants: &'static [&'static str],
        visitor: V,
    ) -> Result<V::Value, DeError> {
        match self {
            Plain::Text(t) => visitor.visit_enum(serde::de::value::StringDeserializer::new(t)),
            other => Err(serde::de::Error::invalid_type(other.unexpected(), &visitor)),
        }
    }

    serde::forward_to_deserialize_any! {
        bool i8 i16 i32 i64 i128 u8 u16 u32 u64 u128 f32 f64 char str string
        bytes byte_buf unit unit_struct newtype_struct seq tuple
        tuple_struct map struct identifier ignored_any
    }
}

/// The caller's path of a field: `name` joined with the segments serde walked
/// (`amplifier` + `polesHz`, `[2]` → `amplifier.polesHz[2]`).
fn path_text(name: &str, path: &serde_path_to_error::Path) -> String {
    let mut out = String::from(name);
    for segment in path.iter() {
        match segment {
            Segment::Seq { index } => {
                out.push('[');
                out.push_str(&index.to_string());
                out.push(']');
            }
            Segment::Map { key } => push_key(&mut out, key),
            Segment::Enum { variant } => push_key(&mut out, variant),
            Segment::Unknown => {}
        }
    }
    out
}

fn push_key(out: &mut String, key: &str) {
    if !out.is_empty() {
        out.push('.');
    }
    out.push_str(key);
}

/// The text between the first pair of backticks of a serde message.
fn quoted(message: &str) -> Option<&str> {
    let start = message.find('`')? + 1;
    let len = message[start..].find('`')?;
    Some(&message[start..start + len])
}

/// The JS error for a serde failure at `path`. serde's messages are the standard
/// ones of `serde::de::Error` ("missing field `x`", "unknown field `x`, expected …",
/// "invalid type: string \"10\", expected f64", "unknown variant `x`, expected …").
fn refusal(path: &str, message: &str) -> JsValue {
    let detail = message.replace('`', "");
    if message.starts_with("missing field") {
        let field = quoted(message).unwrap_or("");
        let mut full = String::from(path);
        push_key(&mut full, field);
        return error_at(&full, Error::Missing { param: "" }, None);
    }
    if message.starts_with("unknown field") {
        let field = quoted(message).unwrap_or("");
        // serde_path_to_error has already walked into the unknown key.
        let mut full = String::from(path);
        if !(full == field || full.ends_with(&alloc::format!(".{field}"))) {
            push_key(&mut full, field);
        }
        let expected = detail.split_once(", ").map_or("", |(_, rest)| rest);
        let sentence = alloc::format!("{full}: unknown field; {expected}");
        return error_at(
            &full,
            Error::UnknownField {
                param: "",
                expected: "",
            },
            Some(sentence),
        );
    }
    let param = if path.is_empty() { "options" } else { path };
    if message.starts_with("unknown variant") {
        let sentence = alloc::format!("{param}: unknown name {detail}");
        return error_at(
            param,
            Error::UnknownName {
                param: "",
                expected: "",
            },
            Some(sentence),
        );
    }
    let error = Error::WrongType {
        param: "",
        expected: expected_kind(message),
    };
    let got = message
        .strip_prefix("invalid type: ")
        .or_else(|| message.strip_prefix("invalid value: "))
        .and_then(|rest| rest.rsplit_once(", expected"))
        .map(|(got, _)| got);
    let sentence = match got {
        Some(got) => alloc::format!("{param}: {}, not {got}", error.reason()),
        None => alloc::format!("{param}: {} ({detail})", error.reason()),
    };
    error_at(param, error, Some(sentence))
}

/// What a field must be, from the `expected …` of a serde message (the Rust type
/// names become words a JS caller knows).
fn expected_kind(message: &str) -> &'static str {
    let expected = message.rsplit_once("expected ").map_or("", |(_, e)| e);
    if expected.starts_with("a number or") {
        "a number or a model object"
    } else if expected.starts_with("f64") || expected.starts_with("f32") {
        "a number"
    } else if ["u8", "u16", "u32", "u64", "usize", "i32", "i64"]
        .iter()
        .any(|t| expected.starts_with(t))
    {
        "a whole number"
    } else if expected.contains("sequence") || expected.contains("array") {
        "a list"
    } else if expected.starts_with("struct") || expected.contains("map") {
        "an object"
    } else if expected.contains("bool") {
        "true or false"
    } else if expected.contains("string") || expected.contains("variant") {
        "a string"
    } else {
        "a value of another kind"
    }
}

/// A thrown `LoopwrightError` with `code` of `e`, `param` `param` (which may be a
/// path built at run time, unlike the core error's `&'static str`), and message
/// `sentence`, or `"{param}: {reason}"` when `None`.
pub(crate) fn error_at(param: &str, e: Error, sentence: Option<String>) -> JsValue {
    let message = sentence.unwrap_or_else(|| alloc::format!("{param}: {}", e.reason()));
    let err = js_sys::Error::new(&message);
    err.set_name("LoopwrightError");
    let obj: &js_sys::Object = err.as_ref();
    // Reflect::set only fails on frozen or proxy objects; a fresh Error is neither.
    let _ = js_sys::Reflect::set(obj, &"code".into(), &e.code().into());
    let _ = js_sys::Reflect::set(obj, &"param".into(), &param.into());
    if let Some(column) = e.column() {
        let _ = js_sys::Reflect::set(obj, &"column".into(), &column.into());
    }
    err.into()
}

/// A core error about values read from an options object, under the caller's name:
/// the core's snake_case parameter name in camelCase (`tol_r1` → `tolR1`,
/// `a.poles_hz` → `a.polesHz`), after `renames` (core name → caller's name, for the
/// names that differ by more than case, such as `a` → `amplifier`; a rename of the
/// first dotted part applies to the rest too).
pub(crate) fn core_error(e: Error, renames: &[(&str, &str)]) -> JsValue {
    error_at(&caller_name(e.param(), renames), e, None)
}

/// `core_error`'s name mapping (kept apart so it is testable natively).
pub(crate) fn caller_name(param: &str, renames: &[(&str, &str)]) -> String {
    if let Some((_, to)) = renames.iter().find(|(from, _)| *from == param) {
        return String::from(*to);
    }
    let (head, tail) = match param.split_once('.') {
        Some((h, t)) => (h, Some(t)),
        None => (param, None),
    };
    let mut out = match renames.iter().find(|(from, _)| *from == head) {
        Some((_, to)) => String::from(*to),
        None => camel(head),
    };
    if let Some(t) = tail {
        out.push('.');
        out.push_str(&camel(t));
    }
    out
}

/// snake_case → camelCase (`poles_hz` → `polesHz`; dots and brackets kept).
fn camel(name: &str) -> String {
    let mut out = String::with_capacity(name.len());
    let mut upper = false;
    for c in name.chars() {
        if c == '_' {
            upper = !out.is_empty();
        } else if upper {
            out.extend(c.to_uppercase());
            upper = false;
        } else {
            out.push(c);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn core_names_become_the_callers_names() {
        assert_eq!(caller_name("tol_r1", &[]), "tolR1");
        assert_eq!(
            caller_name("a.poles_hz", &[("a", "amplifier")]),
            "amplifier.polesHz"
        );
        assert_eq!(caller_name("a", &[("a", "amplifier")]), "amplifier");
        assert_eq!(caller_name("beta", &[]), "beta");
        assert_eq!(caller_name("k_gain", &[("k_gain", "kGain")]), "kGain");
        assert_eq!(caller_name("f_high", &[]), "fHigh");
    }

    #[test]
    fn serde_messages_map_to_words() {
        assert_eq!(
            expected_kind("invalid type: string \"10\", expected f64"),
            "a number"
        );
        assert_eq!(
            expected_kind("invalid type: number, expected a sequence"),
            "a list"
        );
        assert_eq!(
            expected_kind("invalid type: string, expected u32"),
            "a whole number"
        );
        assert_eq!(quoted("missing field `gain`"), Some("gain"));
    }
}
