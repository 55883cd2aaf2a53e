//! The one reader of JS options objects.
//!
//! An export with more than four inputs takes one options object with camelCase
//! fields; its Rust side is a struct implementing [`FromOptions`], which reads each
//! field through [`Fields`] by its camelCase name (defaults stated in the `.d.ts`).
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
use alloc::vec::Vec;
use serde::de::Unexpected;
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
/// A `LoopwrightError` with `code` `missing`, `unknown_field` or `wrong_type` and
/// `param` the path of the field at fault (see the module docs).
pub(crate) fn read<T: FromOptions>(name: &str, value: &JsValue) -> Result<T, JsValue> {
    let mut fields = Fields::top(name, value, T::FIELDS)?;
    let t = T::from_fields(&mut fields);
    fields.finish()?;
    Ok(t)
}

/// A struct read from an options object by [`read`], or nested in one
/// ([`Fields::object`], [`Fields::objects`]).
///
/// Written by hand rather than derived with serde: one derived deserializer per
/// struct, monomorphised over the path-tracking wrappers, cost the lite module about
/// 50 KB gzipped (docs/wasm-size.md); these readers share one non-generic core.
pub(crate) trait FromOptions: Sized {
    /// The caller's field names, in the order [`Self::from_fields`] reads them (the
    /// order of the `.d.ts`); any other field is refused.
    const FIELDS: &'static [&'static str];
    /// Read every field, in the order of [`Self::FIELDS`]. A field that fails to read
    /// gives a placeholder and records its error in `fields`, which [`read`] returns.
    fn from_fields(fields: &mut Fields) -> Self;
}

/// The fields of one options object as they are read, and the first failure.
///
/// Which failure is reported is the one a reader going through the object's own
/// entries in order would meet first (the entry order of the JS object): a value of
/// the wrong kind or an unknown field at its entry, then the missing fields in the
/// order of [`FromOptions::FIELDS`].
pub(crate) struct Fields {
    /// The caller's path of this object: `""` at the top, `amplifier`, `complexPoles[1]`.
    path: String,
    entries: Vec<(String, Plain)>,
    names: &'static [&'static str],
    /// The first failure so far: its place, the path of the field, what is wrong.
    failure: Option<(usize, String, Failure)>,
    /// Missing fields found so far (they rank after every entry, in reading order).
    missing: usize,
}

impl Fields {
    /// The fields of the object `value` named `name`.
    fn top(name: &str, value: &JsValue, names: &'static [&'static str]) -> Result<Fields, JsValue> {
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
        // An object that is not a list: its entries, read at once. The same as
        // `Plain::from_js`, whose tests for the other kinds would all fail here
        // (a call into JS each), but for a Float64Array, which it reads as a list.
        let plain = if value.is_instance_of::<js_sys::Float64Array>() {
            Plain::from_js(value)
        } else {
            Plain::Map(map_entries(value.unchecked_ref()))
        };
        Fields::of(String::from(name), plain, names)
            .map_err(|(path, failure)| refusal(&path, failure))
    }

    /// The fields of `value` at `path`, or the path and message of a value that is
    /// not an object.
    fn of(
        path: String,
        value: Plain,
        names: &'static [&'static str],
    ) -> Result<Fields, (String, Failure)> {
        match value {
            Plain::Map(entries) => Ok(Fields {
                path,
                entries,
                names,
                failure: None,
                missing: 0,
            }),
            other => Err((path, wrong(&other, "an object"))),
        }
    }

    /// Refuse the first field not in the struct's list; the error, if any.
    fn finish(mut self) -> Result<(), JsValue> {
        self.check_unknown();
        match self.failure {
            Some((_, path, failure)) => Err(refusal(&path, failure)),
            None => Ok(()),
        }
    }

    fn check_unknown(&mut self) {
        let names = self.names;
        let unknown = self
            .entries
            .iter()
            .position(|(key, _)| !names.contains(&key.as_str()));
        if let Some(at) = unknown {
            let path = self.key_path(&self.entries[at].0);
            self.fail(at, path, Failure::Unknown(names));
        }
    }

    /// Keep the failure at `at` if it comes before the one kept so far.
    fn fail(&mut self, at: usize, path: String, failure: Failure) {
        if self
            .failure
            .as_ref()
            .map_or(true, |(first, _, _)| at < *first)
        {
            self.failure = Some((at, path, failure));
        }
    }

    /// The caller's path of the field `key` of this object (`amplifier.polesHz`).
    pub(crate) fn key_path(&self, key: &str) -> String {
        let mut out = self.path.clone();
        push_key(&mut out, key);
        out
    }

    /// The entry `key` and its place, if the object has it.
    fn take(&mut self, key: &str) -> Option<(usize, Plain)> {
        let at = self.entries.iter().position(|(k, _)| k == key)?;
        Some((at, core::mem::replace(&mut self.entries[at].1, Plain::Null)))
    }

    /// A required field left out: its error, ranked after every entry.
    fn left_out(&mut self, key: &str) {
        let at = self.entries.len() + self.missing;
        self.missing += 1;
        let path = self.key_path(key);
        self.fail(at, path, Failure::Missing);
    }

    /// The field `key` converted: `None` when absent (or `null` if `null_is_absent`),
    /// `Some(None)` when it failed (the failure is recorded).
    fn value<T>(
        &mut self,
        key: &str,
        null_is_absent: bool,
        convert: fn(Plain) -> Result<T, (String, Failure)>,
    ) -> Option<Option<T>> {
        let (at, v) = self.take(key)?;
        if null_is_absent && matches!(v, Plain::Null) {
            return None;
        }
        match convert(v) {
            Ok(t) => Some(Some(t)),
            Err((suffix, failure)) => {
                let mut path = self.key_path(key);
                path.push_str(&suffix);
                self.fail(at, path, failure);
                Some(None)
            }
        }
    }

    fn required<T>(
        &mut self,
        key: &str,
        convert: fn(Plain) -> Result<T, (String, Failure)>,
    ) -> Option<T> {
        match self.value(key, false, convert) {
            Some(v) => v,
            None => {
                self.left_out(key);
                None
            }
        }
    }

    /// A required number.
    pub(crate) fn num(&mut self, key: &str) -> f64 {
        self.required(key, number).unwrap_or(0.0)
    }

    /// A number, `default` when left out.
    pub(crate) fn num_or(&mut self, key: &str, default: f64) -> f64 {
        self.value(key, false, number)
            .map_or(default, |v| v.unwrap_or(default))
    }

    /// A number that may be left out or `null`.
    pub(crate) fn opt_num(&mut self, key: &str) -> Option<f64> {
        self.value(key, true, number).flatten()
    }

    /// A whole number (0 … 2³² − 1), `default` when left out.
    pub(crate) fn whole_or(&mut self, key: &str, default: u32) -> u32 {
        self.value(key, false, whole)
            .map_or(default, |v| v.unwrap_or(default))
    }

    /// A whole number that may be left out or `null`.
    pub(crate) fn opt_whole(&mut self, key: &str) -> Option<u32> {
        self.value(key, true, whole).flatten()
    }

    /// true or false, `default` when left out.
    pub(crate) fn flag_or(&mut self, key: &str, default: bool) -> bool {
        self.value(key, false, flag)
            .map_or(default, |v| v.unwrap_or(default))
    }

    /// A required string.
    pub(crate) fn text(&mut self, key: &str) -> String {
        self.required(key, text).unwrap_or_default()
    }

    /// A string, `default()` when left out.
    pub(crate) fn text_or(&mut self, key: &str, default: fn() -> String) -> String {
        match self.value(key, false, text) {
            Some(v) => v.unwrap_or_default(),
            None => default(),
        }
    }

    #[cfg(feature = "wasm")] // the circuit probes; not in the lite module
    /// A string that may be left out or `null`.
    pub(crate) fn opt_text(&mut self, key: &str) -> Option<String> {
        self.value(key, true, text).flatten()
    }

    /// Whether `key` is given and not `null` (for a list whose default is not empty).
    pub(crate) fn raw_present(&self, key: &str) -> bool {
        self.entries
            .iter()
            .any(|(k, v)| k == key && !matches!(v, Plain::Null))
    }

    /// A list of strings, empty when left out.
    pub(crate) fn texts(&mut self, key: &str) -> Vec<String> {
        self.value(key, false, strings)
            .flatten()
            .unwrap_or_default()
    }

    /// A list of numbers, empty when left out.
    pub(crate) fn nums(&mut self, key: &str) -> Vec<f64> {
        self.value(key, false, numbers)
            .flatten()
            .unwrap_or_default()
    }

    #[cfg(feature = "wasm")] // the circuit probes; not in the lite module
    /// A list of numbers that may be left out or `null`.
    pub(crate) fn opt_nums(&mut self, key: &str) -> Option<Vec<f64>> {
        self.value(key, true, numbers).flatten()
    }

    #[cfg(feature = "wasm")] // the stage and circuit-noise options; not in the lite module
    /// A required list of numbers.
    pub(crate) fn req_nums(&mut self, key: &str) -> Vec<f64> {
        self.required(key, numbers).unwrap_or_default()
    }

    #[cfg(feature = "wasm")] // the stage documents; not in the lite module
    /// A required field holding a document of any shape (an object, or its JSON
    /// text as a string), as the documents' own JSON tree ([`crate::json::Json`]).
    /// `null` is kept as `Json::Null` for the document reader to refuse.
    pub(crate) fn document(&mut self, key: &str) -> crate::json::Json {
        self.required(key, json_tree)
            .unwrap_or(crate::json::Json::Null)
    }

    /// The raw value of `key` and its place, for a field of more than one kind
    /// (read it with [`Fields::nested`] or record its failure with [`Fields::refuse`]).
    pub(crate) fn raw(&mut self, key: &str) -> Option<(usize, Plain)> {
        self.take(key)
    }

    /// A required field found to be of the wrong kind: `expected` is what it must be.
    pub(crate) fn refuse(&mut self, key: &str, at: usize, value: &Plain, expected: &'static str) {
        let path = self.key_path(key);
        self.fail(at, path, wrong(value, expected));
    }

    /// A required field left out, for a field read with [`Fields::raw`].
    pub(crate) fn missing(&mut self, key: &str) {
        self.left_out(key);
    }

    /// A required nested object.
    pub(crate) fn object<T: FromOptions + Default>(&mut self, key: &str) -> T {
        match self.take(key) {
            Some((at, v)) => {
                let path = self.key_path(key);
                self.nested(at, path, v).unwrap_or_default()
            }
            None => {
                self.left_out(key);
                T::default()
            }
        }
    }

    /// A list of nested objects, empty when left out.
    pub(crate) fn objects<T: FromOptions>(&mut self, key: &str) -> Vec<T> {
        let Some((at, v)) = self.take(key) else {
            return Vec::new();
        };
        let items = match v {
            Plain::List(items) => items,
            other => {
                self.refuse(key, at, &other, "a list");
                return Vec::new();
            }
        };
        let mut out = Vec::with_capacity(items.len());
        for (i, item) in items.into_iter().enumerate() {
            let path = alloc::format!("{}[{i}]", self.key_path(key));
            match self.nested(at, path, item) {
                Some(t) => out.push(t),
                // The first element that fails is the one reported.
                None => break,
            }
        }
        out
    }

    /// `value`, found at entry `at`, read as a `T` at `path`; `None` when it failed
    /// (the failure is recorded at `at`).
    pub(crate) fn nested<T: FromOptions>(
        &mut self,
        at: usize,
        path: String,
        value: Plain,
    ) -> Option<T> {
        let mut inner = match Fields::of(path, value, T::FIELDS) {
            Ok(inner) => inner,
            Err((path, failure)) => {
                self.fail(at, path, failure);
                return None;
            }
        };
        let t = T::from_fields(&mut inner);
        inner.check_unknown();
        match inner.failure {
            Some((_, path, failure)) => {
                self.fail(at, path, failure);
                None
            }
            None => Some(t),
        }
    }
}

/// What is wrong with a field.
enum Failure {
    /// A required field is left out.
    Missing,
    /// A field the struct does not have; the names it has.
    Unknown(&'static [&'static str]),
    /// A value of the wrong kind: what it must be, in the caller's words (`a number`),
    /// and what it is, in serde's words (`string "10"`, ``floating point `1.5` ``).
    WrongType(&'static str, String),
}

/// `value` is not `expected` (`a number`, `a whole number`, `a list`, …).
fn wrong(value: &Plain, expected: &'static str) -> Failure {
    Failure::WrongType(expected, value.unexpected().to_string())
}

/// A number field.
fn number(v: Plain) -> Result<f64, (String, Failure)> {
    match v {
        Plain::Number(x) => Ok(x),
        other => Err((String::new(), wrong(&other, "a number"))),
    }
}

/// A whole-number field (`u32`): a fraction, a negative number or a string is of the
/// wrong kind, a whole number past 2³² − 1 out of range.
fn whole(v: Plain) -> Result<u32, (String, Failure)> {
    match v {
        Plain::Number(x) if is_whole(x) => u32::try_from(x as u64)
            .map_err(|_| (String::new(), wrong(&Plain::Number(x), "a whole number"))),
        other => Err((String::new(), wrong(&other, "a whole number"))),
    }
}

fn flag(v: Plain) -> Result<bool, (String, Failure)> {
    match v {
        Plain::Bool(b) => Ok(b),
        other => Err((String::new(), wrong(&other, "true or false"))),
    }
}

fn text(v: Plain) -> Result<String, (String, Failure)> {
    match v {
        Plain::Text(t) => Ok(t),
        other => Err((String::new(), wrong(&other, "a string"))),
    }
}

/// A list of strings: an element of the wrong kind is named by its index.
fn strings(v: Plain) -> Result<Vec<String>, (String, Failure)> {
    let items = match v {
        Plain::List(items) => items,
        other => return Err((String::new(), wrong(&other, "a list"))),
    };
    let mut out = Vec::with_capacity(items.len());
    for (i, item) in items.into_iter().enumerate() {
        match item {
            Plain::Text(t) => out.push(t),
            other => return Err((alloc::format!("[{i}]"), wrong(&other, "a string"))),
        }
    }
    Ok(out)
}

/// A list of numbers: an element of the wrong kind is named by its index.
fn numbers(v: Plain) -> Result<Vec<f64>, (String, Failure)> {
    let items = match v {
        Plain::List(items) => items,
        other => return Err((String::new(), wrong(&other, "a list"))),
    };
    let mut out = Vec::with_capacity(items.len());
    for (i, item) in items.into_iter().enumerate() {
        match item {
            Plain::Number(x) => out.push(x),
            other => return Err((alloc::format!("[{i}]"), wrong(&other, "a number"))),
        }
    }
    Ok(out)
}

/// A document of any shape as the documents' JSON tree, the way `JSON.stringify`
/// would write it and `crate::json::parse` read it back: a whole number from 0 to
/// 2⁵³ keeps its digits ([`crate::json::Number::whole`]), a number that is not
/// finite becomes `null` (JSON has no NaN or infinity), members keep their order.
/// A function, symbol or BigInt is of the wrong kind, named by its path.
#[cfg(feature = "wasm")]
fn json_tree(v: Plain) -> Result<crate::json::Json, (String, Failure)> {
    use crate::json::{Json, Number};
    Ok(match v {
        Plain::Null => Json::Null,
        Plain::Bool(b) => Json::Bool(b),
        Plain::Number(x) if !x.is_finite() => Json::Null,
        Plain::Number(x) => Json::Number(Number {
            value: x,
            whole: is_whole(x).then_some(x as u64),
        }),
        Plain::Text(t) => Json::String(t),
        Plain::List(items) => {
            let mut out = Vec::with_capacity(items.len());
            for (i, item) in items.into_iter().enumerate() {
                out.push(
                    json_tree(item)
                        .map_err(|(suffix, failure)| (alloc::format!("[{i}]{suffix}"), failure))?,
                );
            }
            Json::Array(out)
        }
        Plain::Map(entries) => {
            let mut out = Vec::with_capacity(entries.len());
            for (key, item) in entries {
                match json_tree(item) {
                    Ok(x) => out.push((key, x)),
                    Err((suffix, failure)) => {
                        return Err((alloc::format!(".{key}{suffix}"), failure))
                    }
                }
            }
            Json::Object(out)
        }
        other @ Plain::Other => return Err((String::new(), wrong(&other, "a JSON value"))),
    })
}

/// The argument `value` named `name`, a document object, as the documents' JSON
/// tree (see [`Fields::document`]).
///
/// # Errors
/// `wrong_type` at `name` when `value` is not an object, or at the path of a
/// value inside that JSON cannot hold.
#[cfg(feature = "wasm")]
pub(crate) fn read_document(name: &str, value: &JsValue) -> Result<crate::json::Json, JsValue> {
    if !value.is_object() || js_sys::Array::is_array(value) {
        let e = Error::WrongType {
            param: "",
            expected: "an options object",
        };
        return Err(error_at(name, e, None));
    }
    json_tree(Plain::from_js(value)).map_err(|(suffix, failure)| {
        let mut path = String::from(name);
        path.push_str(&suffix);
        refusal(&path, failure)
    })
}

/// A whole number in the range where an f64 holds every integer exactly (the
/// numbers a count field takes, and which messages show as integers).
fn is_whole(x: f64) -> bool {
    x.fract() == 0.0 && (0.0..9.007_199_254_740_992e15).contains(&x)
}

/// The copied options object as Rust data, read from the JS value with calls that
/// cannot throw on plain data (type tests, array indexing, `Object.entries`).
///
/// Why not serde-wasm-bindgen's deserializer: for a list field it asks any value for
/// its iterator with `Reflect.get`, which throws a `TypeError` on a number or a
/// string; each such caught exception left about 10 bytes of the module's memory
/// behind (10.3 MiB per million calls of `loopAt({gain: 1e5, polesHz: '10'}, …)`).
pub(crate) enum Plain {
    Null,
    Bool(bool),
    Number(f64),
    Text(String),
    List(Vec<Plain>),
    Map(Vec<(String, Plain)>),
    /// Anything else (a function, a symbol, a BigInt): refused as the wrong type.
    Other,
}

impl Plain {
    /// Each test is a call into JS, so the common kinds are tested first (a number
    /// field costs one call).
    fn from_js(v: &JsValue) -> Plain {
        if let Some(x) = v.as_f64() {
            Plain::Number(x)
        } else if let Some(t) = v.as_string() {
            Plain::Text(t)
        } else if v.is_null() || v.is_undefined() {
            Plain::Null
        } else if let Some(b) = v.as_bool() {
            Plain::Bool(b)
        } else if let Some(list) = v.dyn_ref::<js_sys::Array>() {
            Plain::List(list.iter().map(|x| Plain::from_js(&x)).collect())
        } else if let Some(list) = v.dyn_ref::<js_sys::Float64Array>() {
            Plain::List(list.to_vec().into_iter().map(Plain::Number).collect())
        } else if v.is_object() && !v.is_function() {
            Plain::Map(map_entries(v.unchecked_ref()))
        } else {
            Plain::Other
        }
    }

    /// What the value is, in serde's words (a whole number is an integer).
    fn unexpected(&self) -> Unexpected<'_> {
        match self {
            Plain::Null => Unexpected::Unit,
            Plain::Bool(b) => Unexpected::Bool(*b),
            Plain::Number(x) if is_whole(*x) => Unexpected::Unsigned(*x as u64),
            Plain::Number(x) => Unexpected::Float(*x),
            Plain::Text(t) => Unexpected::Str(t),
            Plain::List(_) => Unexpected::Seq,
            Plain::Map(_) => Unexpected::Map,
            Plain::Other => Unexpected::Other("a function, symbol or BigInt"),
        }
    }
}

/// The entries of an object, in the order of its own keys; a field set to
/// undefined counts as left out (its default).
///
/// Each call into JS costs more than the reading itself, so the keys cross as
/// one string (`Object.keys(o).join("\0")`, split here) and a number field as
/// one read of its value: about 3 calls per field instead of 7 with
/// `Object.entries`. A key that itself holds a NUL is read one by one.
fn map_entries(o: &js_sys::Object) -> Vec<(String, Plain)> {
    let keys = js_sys::Object::keys(o);
    let values = js_sys::Object::values(o);
    let n = keys.length();
    let joined = if n == 0 {
        String::new()
    } else {
        String::from(keys.join("\0"))
    };
    let split: Vec<&str> = if n == 0 {
        Vec::new()
    } else {
        joined.split('\0').collect()
    };
    let whole = split.len() == n as usize && values.length() == n;
    let mut out = Vec::with_capacity(n as usize);
    for i in 0..n {
        let key = match split.get(i as usize) {
            Some(k) if whole => String::from(*k),
            _ => match keys.get(i).as_string() {
                Some(k) => k,
                None => continue,
            },
        };
        let value = if whole {
            values.get(i)
        } else {
            js_sys::Reflect::get(o, &key.as_str().into()).unwrap_or(JsValue::UNDEFINED)
        };
        let plain = match value.as_f64() {
            Some(x) => Plain::Number(x),
            None if value.is_undefined() => continue,
            None => Plain::from_js(&value),
        };
        out.push((key, plain));
    }
    out
}

fn push_key(out: &mut String, key: &str) {
    if !out.is_empty() {
        out.push('.');
    }
    out.push_str(key);
}

/// The JS error for `failure` at `path` (the caller's path of the field).
fn refusal(path: &str, failure: Failure) -> JsValue {
    let param = if path.is_empty() { "options" } else { path };
    match failure {
        Failure::Missing => error_at(param, Error::Missing { param: "" }, None),
        Failure::Unknown(names) => {
            let sentence = alloc::format!("{param}: unknown field; {}", one_of(names));
            let e = Error::UnknownField {
                param: "",
                expected: "",
            };
            error_at(param, e, Some(sentence))
        }
        Failure::WrongType(expected, got) => {
            let e = Error::WrongType {
                param: "",
                expected,
            };
            let sentence = alloc::format!("{param}: {}, not {got}", e.reason());
            error_at(param, e, Some(sentence))
        }
    }
}

/// The fields a struct has, as a sentence: `expected gain`, `expected a or b`,
/// `expected one of a, b, c` (serde's wording, without its backticks).
fn one_of(names: &[&str]) -> String {
    match names {
        [] => String::from("there are no fields"),
        [one] => alloc::format!("expected {one}"),
        [a, b] => alloc::format!("expected {a} or {b}"),
        _ => alloc::format!("expected one of {}", names.join(", ")),
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
///
/// The names are the core's parameter names, Rust identifiers in ASCII, so the
/// letter after `_` is made upper case by ASCII rules (`char::to_uppercase` would
/// bring the standard library's Unicode case table, about 12 KB, into the module).
fn camel(name: &str) -> String {
    let mut out = String::with_capacity(name.len());
    let mut upper = false;
    for c in name.chars() {
        if c == '_' {
            upper = !out.is_empty();
        } else if upper {
            out.push(c.to_ascii_uppercase());
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
    fn an_unknown_field_names_the_fields_there_are() {
        assert_eq!(one_of(&["gain"]), "expected gain");
        assert_eq!(one_of(&["freqHz", "q"]), "expected freqHz or q");
        assert_eq!(
            one_of(&["gain", "polesHz", "zerosHz"]),
            "expected one of gain, polesHz, zerosHz"
        );
    }

    /// A document object becomes the tree `crate::json::parse` builds from the text
    /// `JSON.stringify` writes of it (the JS object `{"a": [1, 2.5, -3, NaN], "b":
    /// {"c": "x"}}` stringifies to `{"a":[1,2.5,-3,null],"b":{"c":"x"}}`: MDN,
    /// JSON.stringify, "NaN and Infinity are serialized as null").
    #[cfg(feature = "wasm")]
    #[test]
    fn a_document_object_becomes_the_tree_of_its_json_text() {
        let plain = Plain::Map(alloc::vec![
            (
                String::from("a"),
                Plain::List(alloc::vec![
                    Plain::Number(1.0),
                    Plain::Number(2.5),
                    Plain::Number(-3.0),
                    Plain::Number(f64::NAN),
                ]),
            ),
            (
                String::from("b"),
                Plain::Map(alloc::vec![(String::from("c"), Plain::Text("x".into()))]),
            ),
        ]);
        let tree = json_tree(plain).ok().expect("a plain object converts");
        let text = r#"{"a":[1,2.5,-3,null],"b":{"c":"x"}}"#;
        assert_eq!(tree, crate::json::parse(text).unwrap());
        assert_eq!(tree.to_text(), text);
    }

    #[cfg(feature = "wasm")]
    #[test]
    fn a_value_json_cannot_hold_is_named_by_its_path() {
        let plain = Plain::Map(alloc::vec![(
            String::from("amplifier"),
            Plain::Map(alloc::vec![(
                String::from("polesHz"),
                Plain::List(alloc::vec![Plain::Number(1.0), Plain::Other]),
            )]),
        )]);
        match json_tree(plain) {
            Err((path, Failure::WrongType(expected, _))) => {
                assert_eq!(path, ".amplifier.polesHz[1]");
                assert_eq!(expected, "a JSON value");
            }
            _ => panic!("a function inside a document is refused"),
        }
    }
}
