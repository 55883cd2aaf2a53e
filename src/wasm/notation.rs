//! The JS boundary of the one reader and the one display of values
//! ([`crate::notation`]): convert, call, convert.

use super::{scalar, throw};
use crate::notation::{self, ReadOptions, Unit};
use crate::Error;
use alloc::string::String;
use wasm_bindgen::prelude::*;

/// Bit of `flags`: a trailing `%` is allowed.
pub const ALLOW_PERCENT: u32 = 1;
/// Bit of `flags`: `dB` is allowed.
pub const ALLOW_DECIBELS: u32 = 2;

/// The reader's options from the flags and the declared unit (`""` for none).
fn options(flags: u32, unit: &str) -> crate::Result<ReadOptions> {
    let unit = match unit {
        "" => None,
        word => Some(Unit::from_word(word).ok_or(Error::UnknownName {
            param: "unit",
            expected: "Ω ohm ohms V A W S Hz F H s dB",
        })?),
    };
    if flags & !(ALLOW_PERCENT | ALLOW_DECIBELS) != 0 {
        return Err(Error::OutOfDomain {
            param: "flags",
            requirement: "must combine 1 (percent) and 2 (decibels) only",
        });
    }
    Ok(ReadOptions {
        percent: flags & ALLOW_PERCENT != 0,
        decibels: flags & ALLOW_DECIBELS != 0,
        unit,
    })
}

/// Internal, for the entry module's `parseValue(text, options)`: read one value
/// with `flags` (1 percent, 2 dB) and a declared unit (`""` for none); NaN with
/// the error kept on failure (see [`scalar`]).
#[wasm_bindgen(js_name = readValue)]
pub fn read_value(text: &str, flags: u32, unit: &str) -> f64 {
    scalar(options(flags, unit).and_then(|o| notation::read(text, &o).map(|r| r.value)))
}

/// Internal, for the entry module's `parseList(text, options)`: the values of a
/// list separated by `,` or `;`, as a `Float64Array`.
#[wasm_bindgen(js_name = readList)]
pub fn read_list(text: &str, flags: u32, unit: &str) -> Result<js_sys::Float64Array, JsValue> {
    let o = throw(options(flags, unit))?;
    let items = throw(notation::read_list(text, &o))?;
    let values: alloc::vec::Vec<f64> = items.iter().map(|r| r.value).collect();
    Ok(js_sys::Float64Array::from(values.as_slice()))
}

/// The display of a value: `digits` significant digits, an SI prefix on the unit,
/// the unit after a space (`"4.7 kΩ"`); no prefix on `%`, ppm, dB, degrees.
#[wasm_bindgen(js_name = formatValue)]
pub fn format_value(value: f64, unit: &str, digits: u32) -> Result<String, JsValue> {
    throw(notation::format_value(value, unit, digits))
}

/// The shortest text that reads back to the same double, with the unit after a
/// space (for CSV and the clipboard).
#[wasm_bindgen(js_name = formatFull)]
pub fn format_full(value: f64, unit: &str) -> Result<String, JsValue> {
    throw(notation::format_full(value, unit))
}

/// The display without an SI prefix, for a value already in the unit shown
/// (`"99.9"`, `"4.12 nV/√Hz"`).
#[wasm_bindgen(js_name = formatPlain)]
pub fn format_plain(value: f64, unit: &str, digits: u32) -> Result<String, JsValue> {
    throw(notation::format_plain(value, unit, digits))
}
