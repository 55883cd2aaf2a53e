// Helpers shared by the browser tests (tests/wasm_*.rs): reading fields of the
// plain JS objects the bindings return, and checking thrown LoopwrightErrors.
// Included with `#[path = "support/js.rs"] mod js;`.
#![allow(dead_code)]

use js_sys::{Float64Array, Reflect};
use wasm_bindgen::{JsCast, JsValue};

pub fn field(obj: &JsValue, name: &str) -> JsValue {
    Reflect::get(obj, &name.into()).unwrap()
}

pub fn num(obj: &JsValue, name: &str) -> f64 {
    field(obj, name)
        .as_f64()
        .unwrap_or_else(|| panic!("{name} is not a number"))
}

pub fn text(obj: &JsValue, name: &str) -> String {
    field(obj, name)
        .as_string()
        .unwrap_or_else(|| panic!("{name} is not a string"))
}

/// A field that must be a Float64Array, as a Vec.
pub fn typed(obj: &JsValue, name: &str) -> Vec<f64> {
    let v = field(obj, name);
    assert!(
        v.is_instance_of::<Float64Array>(),
        "{name} is a Float64Array"
    );
    v.unchecked_into::<Float64Array>().to_vec()
}

/// The result is a thrown JS `Error` named LoopwrightError with this `code` and
/// `param`, whose message names the parameter (`param: reason`).
pub fn assert_thrown(
    r: Result<impl core::fmt::Debug, JsValue>,
    code: &str,
    param: &str,
) -> JsValue {
    let e = r.expect_err("expected a thrown error");
    assert!(
        e.is_instance_of::<js_sys::Error>(),
        "thrown value is a JS Error"
    );
    assert_eq!(text(&e, "name"), "LoopwrightError");
    assert_eq!(text(&e, "code"), code);
    assert_eq!(text(&e, "param"), param);
    assert!(
        text(&e, "message").contains(&format!("{param}: ")),
        "the message names {param}"
    );
    e
}

/// What the entry module (facade/loopwright.js) does with a scalar export's number:
/// NaN means the call failed and its LoopwrightError waits in `takeError()`.
pub fn checked(x: f64) -> Result<f64, JsValue> {
    if x.is_nan() {
        Err(loopwright::wasm::take_error())
    } else {
        Ok(x)
    }
}

/// A plain JS object with these fields (an options object for an export that takes one).
pub fn object(fields: &[(&str, JsValue)]) -> JsValue {
    let o = js_sys::Object::new();
    for (name, value) in fields {
        Reflect::set(&o, &(*name).into(), value).unwrap();
    }
    o.into()
}
