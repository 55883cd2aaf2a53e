//! The thin wasm-bindgen boundary: the only code that knows about JS.
//!
//! Each exported function converts its arguments, calls the pure core and converts
//! the result: numbers stay `f64`, structured results become plain JS objects via
//! serde-wasm-bindgen, sweeps become typed arrays, and every [`crate::Error`] is
//! thrown as a JS `Error` with `code` and `param` fields. JS names are camelCase.
//! One file per area (the table in DEVELOPERS.md).
//!
//! Scalar functions (one `f64` out) are the exception to "thrown by the glue": they
//! return a bare `f64` — the answer, or NaN with the error kept aside — and the
//! package's entry module (`facade/loopwright.js`) throws that kept error. See
//! [`scalar`] for why.

// The circuit solver and the worksheet are in the full module only (feature `wasm`);
// without them the module is the "lite" one (feature `wasm-lite`), less than half
// the size.
#[cfg(feature = "wasm")]
pub mod batch;
#[cfg(feature = "wasm")]
pub mod circuit;
pub mod distortion;
pub mod feedback;
#[cfg(feature = "wasm")]
mod finite;
pub mod freq;
pub mod network;
pub mod noise;
pub mod notation;
pub(crate) mod options;
#[cfg(feature = "wasm")]
pub mod sheet;
#[cfg(feature = "wasm")]
pub mod stage;
#[cfg(feature = "wasm")]
pub mod tolerance;

use crate::Error;
use wasm_bindgen::prelude::*;
use wasm_bindgen::JsCast;

#[wasm_bindgen(typescript_custom_section)]
const ERROR_TYPES: &str = r#"
/** Machine-readable reason of a thrown LoopwrightError. */
export type ErrorCode =
  | "not_finite" | "out_of_domain" | "unreachable" | "oscillation" | "unknown_name"
  | "too_large" | "overflow" | "no_convergence" | "singular" | "syntax"
  | "wrong_type" | "missing" | "unknown_field"
  | "bad_document";
/**
 * What every loopwright function throws on bad input: `param` names the argument or
 * options field at fault as the caller wrote it (`targetGain`, `amplifier.polesHz[2]`).
 */
export interface LoopwrightError extends Error {
  name: "LoopwrightError";
  code: ErrorCode;
  param: string;
  /** For `syntax`: the 1-based character column where the text stopped reading. */
  column?: number;
}
/**
 * What `Worksheet.loadDocument` throws for a refused document (the sheet stays as it
 * was): `param` is "document"; `reason` is the sentence that names the place in the
 * document and the problem ("the input of B3 must be a string"), without the prefix
 * of `message`.
 */
export interface DocumentError extends LoopwrightError {
  code: "bad_document";
  param: "document";
  reason: string;
}
"#;

/// A JS `Error` whose message is the core error's sentence, with `name`
/// `"LoopwrightError"` and the fields `code` and `param`.
///
/// `param` is the name the JS caller uses: the core's snake_case name in camelCase
/// (`target_gain` → `targetGain`, `a.poles_hz` → `a.polesHz`); see
/// [`options::core_error`] for exports whose names differ by more than case.
pub(crate) fn js_error(e: Error) -> JsValue {
    options::core_error(e, &[])
}

/// Serialize a result struct into a plain JS object (maps as objects, `None` as
/// `null`), or throw a serialization failure as an error on `result`.
pub(crate) fn to_js<T: serde::Serialize>(value: &T) -> Result<JsValue, JsValue> {
    let ser = serde_wasm_bindgen::Serializer::new()
        .serialize_maps_as_objects(true)
        .serialize_missing_as_null(true);
    value
        .serialize(&ser)
        .map_err(|e| JsValue::from(js_sys::Error::new(&alloc::format!("result: {e}"))))
}

/// Every number of `value` in serialization order ([`finite::finite_numbers`]), or
/// the `overflow` error naming the first that is not finite, with the path and
/// sentence of the entry module's check (`facade/guard.js`, `finite`), which then
/// need not walk the result.
#[cfg(feature = "wasm")]
pub(crate) fn finite_numbers<T: serde::Serialize>(
    value: &T,
) -> Result<alloc::vec::Vec<f64>, JsValue> {
    finite::finite_numbers(value).map_err(|path| {
        let param = path.strip_prefix('.').unwrap_or(&path);
        let param = if param.is_empty() { "result" } else { param };
        options::error_at(param, crate::Error::Overflow { param: "" }, None)
    })
}

/// Set each named field of `obj` to a `Float64Array` copy of the slice (how sweeps
/// cross the boundary).
pub(crate) fn set_typed_arrays(obj: &JsValue, fields: &[(&str, &[f64])]) {
    for (name, values) in fields {
        // Reflect::set only fails on frozen or proxy objects; ours are fresh.
        let _ = js_sys::Reflect::set(
            obj,
            &(*name).into(),
            &js_sys::Float64Array::from(*values).into(),
        );
    }
}

/// A fresh object whose named fields are `Float64Array`s.
pub(crate) fn typed_arrays(fields: &[(&str, &[f64])]) -> JsValue {
    let obj: JsValue = js_sys::Object::new().into();
    set_typed_arrays(&obj, fields);
    obj
}

std::thread_local! {
    /// The error of the last scalar call that failed, until `takeError()` takes it.
    static PENDING_ERROR: core::cell::RefCell<Option<JsValue>> = const { core::cell::RefCell::new(None) };
}

/// How a scalar result crosses the boundary: the value itself, or NaN with the error
/// kept for [`take_error`].
///
/// NaN is free as a sentinel because no core function returns NaN as an answer
/// (`check::result` turns any non-finite result into a typed error). The entry
/// module `facade/loopwright.js` wraps every scalar export: on NaN it throws the kept
/// `LoopwrightError`, so a JS caller sees the same contract as everywhere else.
/// Why not `Result<f64, JsValue>`: its glue returns an array per call, which made a
/// scalar call 4.5x slower than the same formula written inline in JS (bench/).
///
/// Inlined, with the error path kept out of line: the lite module is built for size
/// (`opt-level = "s"`, docs/wasm-size.md), where this call would otherwise cost a
/// scalar export a fifth of its time.
#[inline(always)]
pub(crate) fn scalar(r: crate::Result<f64>) -> f64 {
    match r {
        Ok(x) => x,
        Err(e) => keep_error(e),
    }
}

/// The error path of [`scalar`]: keep the error for `takeError`, return NaN.
#[cold]
#[inline(never)]
fn keep_error(e: Error) -> f64 {
    let err = js_error(e);
    PENDING_ERROR.with(|slot| *slot.borrow_mut() = Some(err));
    f64::NAN
}

/// Internal: the `LoopwrightError` of the last scalar call that returned NaN, or
/// `undefined`; taking it clears it. Called by the package's entry module only.
#[wasm_bindgen(js_name = takeError)]
pub fn take_error() -> JsValue {
    PENDING_ERROR
        .with(|slot| slot.borrow_mut().take())
        .unwrap_or(JsValue::UNDEFINED)
}

/// How many numbers the scratch area holds.
pub(crate) const SCRATCH_LEN: usize = 16;

std::thread_local! {
    /// Numbers a call leaves for the entry module to read in place (see [`scratch_view`]).
    static SCRATCH: core::cell::Cell<[f64; SCRATCH_LEN]> = const { core::cell::Cell::new([0.0; SCRATCH_LEN]) };
}

/// Put `values` at the start of the scratch area (at most [`SCRATCH_LEN`] of them).
pub(crate) fn write_scratch(values: &[f64]) {
    SCRATCH.with(|cell| {
        let mut area = cell.get();
        for (slot, v) in area.iter_mut().zip(values) {
            *slot = *v;
        }
        cell.set(area);
    });
}

/// Internal, for the entry module: a `Float64Array` over the scratch area in the
/// module's memory, through which small fixed-size results are read without a new
/// object per call. It goes stale (length 0) when the memory grows; ask again then.
#[wasm_bindgen(js_name = scratchView)]
pub fn scratch_view() -> js_sys::Float64Array {
    SCRATCH.with(|cell| memory_view(cell.as_ptr() as usize, SCRATCH_LEN))
}

/// A `Float64Array` over `len` numbers at byte `address` of the module's memory (no
/// copy); it goes stale (length 0) when the memory grows.
pub(crate) fn memory_view(address: usize, len: usize) -> js_sys::Float64Array {
    let memory: js_sys::WebAssembly::Memory = wasm_bindgen::memory().unchecked_into();
    js_sys::Float64Array::new_with_byte_offset_and_length(
        &memory.buffer(),
        address as u32,
        len as u32,
    )
}

/// Map a core result into a thrown JS error.
pub(crate) fn throw<T>(r: crate::Result<T>) -> Result<T, JsValue> {
    r.map_err(js_error)
}

/// The crate version, as in Cargo.toml.
#[wasm_bindgen(js_name = version)]
pub fn version() -> String {
    env!("CARGO_PKG_VERSION").into()
}
