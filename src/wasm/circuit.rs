//! JS bindings for loading-aware circuit analysis.
//!
//! Circuits cross the boundary as the JSON text of `docs/circuit.md`.
//! Errors are thrown as JS `Error`s named `LoopwrightError` with `code`, `param`
//! and `subject` (the node or element at fault, or `""`).

use super::{to_js, typed_arrays};
use crate::circuit::blackman::{self, Output};
use crate::circuit::json::{read_circuit, write_circuit};
use crate::circuit::templates::{build, AmplifierModel, FeedbackNetwork, StageSpec};
use crate::circuit::{self as core, twoport, CircuitError};
use crate::feedback::Topology;
use num_complex::Complex64;
use serde::Serialize;
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const CIRCUIT_TYPES: &str = r#"
/** An element value: a number, or a schematic text such as "4k7", "100n" or "4.7 kΩ". */
export type CircuitValue = number | string;
/** What every element of a circuit document has; its current flows from nodes[0] through it to nodes[1]. */
export interface CircuitElementBase { name: string; nodes: [string, string]; value: CircuitValue; }
export interface TwoTerminalElement extends CircuitElementBase {
  kind: "resistor" | "capacitor" | "inductor" | "voltage-source" | "current-source";
}
/** vcvs (V/V) or vccs (A/V), controlled by V(control[0]) − V(control[1]). */
export interface VoltageControlledElement extends CircuitElementBase { kind: "vcvs" | "vccs"; control: [string, string]; }
/** ccvs (V/A) or cccs (A/A), controlled by the current of `controlElement`. */
export interface CurrentControlledElement extends CircuitElementBase { kind: "ccvs" | "cccs"; controlElement: string; }
/** A fixed complex admittance value + j·valueIm, S. */
export interface AdmittanceElement extends CircuitElementBase { kind: "admittance"; valueIm?: CircuitValue; }
export type CircuitElement = TwoTerminalElement | VoltageControlledElement | CurrentControlledElement | AdmittanceElement;
/** The circuit document (docs/circuit.md); the functions take and give its JSON text. */
export interface CircuitDocument {
  format: "loopwright-circuit";
  version: 1;
  /** Every node besides ground, when declared. */
  nodes?: string[];
  elements: CircuitElement[];
}
/** What a circuit function throws: a LoopwrightError that also names the node or element at fault ("" when none). */
export interface CircuitError extends LoopwrightError { subject: string; }
/** A complex value in rectangular form (V, A, Ω or a ratio, as the field says). */
export interface Complex { re: number; im: number; }
/** A node voltage against ground (V) or an element current (A). */
export interface NamedComplex { name: string; re: number; im: number; }
export interface CircuitSolution {
  frequencyHz: number;
  /** Ground first, at 0. */
  nodeVoltages: NamedComplex[];
  /** From each element's node a through it to its node b. */
  elementCurrents: NamedComplex[];
}
/** A transfer over frequency, one entry per requested frequency. */
export interface ComplexSweep { re: Float64Array; im: Float64Array; }
/** Which two-port parameter set the topology calls for. */
export type TwoPortKind = "h" | "y" | "z" | "g";
export interface TwoPortParameters { kind: TwoPortKind; p11: Complex; p12: Complex; p21: Complex; p22: Complex; }
/** The two-port method's value beside the exact (MNA) one. */
export interface MethodComparison { twoPort: Complex; exact: Complex; relativeError: number; }
export interface TwoPortAnalysis {
  topology: Topology;
  frequencyHz: number;
  gainUnit: "V/V" | "A/A" | "A/V" | "V/A";
  parameters: TwoPortParameters;
  a: Complex;
  beta: Complex;
  loopGain: Complex;
  feedbackAmount: Complex;
  /** Loaded basic amplifier, including Rs, Ω. */
  ri: Complex;
  /** Loaded basic amplifier, including Rl, Ω. */
  ro: Complex;
  af: MethodComparison;
  rif: MethodComparison;
  rof: MethodComparison;
  /** Seen by the source, Ω. */
  rin: MethodComparison;
  /** Seen by the load, Ω. */
  rout: MethodComparison;
  /** 1/β. */
  idealAf: Complex;
  idealAfError: number;
}
/** Blackman's formula Z0·(1 + Tshort)/(1 + Topen) beside the port impedance solved directly, Ω. */
export interface BlackmanImpedance { z0: Complex; tShort: Complex; tOpen: Complex; blackman: Complex; exact: Complex; relativeError: number; }
/** The asymptotic-gain decomposition G∞·T/(1 + T) + G0/(1 + T) beside the transfer solved directly. */
export interface AsymptoticGain { gInf: Complex; g0: Complex; t: Complex; af: Complex; exact: Complex; relativeError: number; }
export interface StageViews { gain: AsymptoticGain; input: BlackmanImpedance; output: BlackmanImpedance; }
"#;

/// A JS error for a circuit error: message `subject: param: reason`, fields
/// `code`, `param`, `subject`.
fn circuit_error(e: CircuitError) -> JsValue {
    let err = js_sys::Error::new(&alloc::format!("{e}"));
    err.set_name("LoopwrightError");
    let obj: &js_sys::Object = err.as_ref();
    // Reflect::set only fails on frozen or proxy objects; a fresh Error is neither.
    let _ = js_sys::Reflect::set(obj, &"code".into(), &e.error.code().into());
    let _ = js_sys::Reflect::set(obj, &"param".into(), &e.error.param().into());
    let _ = js_sys::Reflect::set(obj, &"subject".into(), &e.name.as_str().into());
    err.into()
}

fn throw<T>(r: Result<T, CircuitError>) -> Result<T, JsValue> {
    r.map_err(circuit_error)
}

fn circuit(json: &str) -> Result<core::Circuit, JsValue> {
    throw(read_circuit(json))
}

#[derive(Serialize)]
struct Cx {
    re: f64,
    im: f64,
}

impl From<Complex64> for Cx {
    fn from(z: Complex64) -> Self {
        Cx { re: z.re, im: z.im }
    }
}

#[allow(clippy::too_many_arguments)]
fn spec(
    topology: &str,
    ri: f64,
    ro: f64,
    gain: f64,
    ci: f64,
    co: f64,
    rf: f64,
    rg: f64,
    cf: f64,
    rs: f64,
    rl: f64,
) -> Result<StageSpec, JsValue> {
    let t: Topology = throw(topology.parse().map_err(CircuitError::from))?;
    Ok(StageSpec {
        topology: t,
        amplifier: AmplifierModel {
            ri,
            ro,
            gain,
            ci,
            co,
        },
        network: FeedbackNetwork { rf, rg, cf },
        rs,
        rl,
    })
}

/// Read a circuit document and write it back in canonical form (values as
/// numbers, compact JSON): the round trip of the format.
#[wasm_bindgen(js_name = circuitNormalize)]
pub fn circuit_normalize(json: &str) -> Result<String, JsValue> {
    Ok(write_circuit(&circuit(json)?))
}

/// The circuit document of a template stage (see the templates table in the
/// Rust docs): `topology` by either naming family; `ri`, `ro`, `rf`, `rg`, `rs`,
/// `rl` in Ω; `gain` of the topology's kind (V/V, V/A, A/V, A/A, signed);
/// `ci`, `co`, `cf` in F (0 = none).
#[wasm_bindgen(js_name = circuitTemplate)]
#[allow(clippy::too_many_arguments)]
pub fn circuit_template(
    #[wasm_bindgen(unchecked_param_type = "TopologyName")] topology: &str,
    ri: f64,
    ro: f64,
    gain: f64,
    ci: f64,
    co: f64,
    rf: f64,
    rg: f64,
    cf: f64,
    rs: f64,
    rl: f64,
) -> Result<String, JsValue> {
    let s = spec(topology, ri, ro, gain, ci, co, rf, rg, cf, rs, rl)?;
    Ok(write_circuit(&throw(build(&s))?.circuit))
}

/// Exact solution at one frequency: `{frequencyHz, nodeVoltages: [{name, re,
/// im}], elementCurrents: [{name, re, im}]}` (V and A).
#[wasm_bindgen(js_name = circuitSolve, unchecked_return_type = "CircuitSolution")]
pub fn circuit_solve(json: &str, frequency_hz: f64) -> Result<JsValue, JsValue> {
    to_js(&throw(core::solve(&circuit(json)?, frequency_hz))?)
}

/// Impedance between two nodes seen by a test source, independent sources
/// zeroed: `{re, im}` in Ω.
#[wasm_bindgen(js_name = circuitPortImpedance, unchecked_return_type = "Complex")]
pub fn circuit_port_impedance(
    json: &str,
    plus: &str,
    minus: &str,
    frequency_hz: f64,
) -> Result<JsValue, JsValue> {
    to_js(&Cx::from(throw(core::port_impedance(
        &circuit(json)?,
        plus,
        minus,
        frequency_hz,
    ))?))
}

/// V(plus) − V(minus) per unit of `source` over `frequencies` (Hz):
/// `{re: Float64Array, im: Float64Array}`.
#[wasm_bindgen(js_name = circuitSweep, unchecked_return_type = "ComplexSweep")]
pub fn circuit_sweep(
    json: &str,
    source: &str,
    plus: &str,
    minus: &str,
    frequencies: &[f64],
) -> Result<JsValue, JsValue> {
    let h = throw(core::voltage_transfer_sweep(
        &circuit(json)?,
        source,
        plus,
        minus,
        frequencies,
    ))?;
    let re: alloc::vec::Vec<f64> = h.iter().map(|z| z.re).collect();
    let im: alloc::vec::Vec<f64> = h.iter().map(|z| z.im).collect();
    Ok(typed_arrays(&[("re", &re), ("im", &im)]))
}

/// The two-port method beside the exact solution and the ideal 1/β, for a
/// template stage (arguments as [`circuit_template`]) at `frequencyHz`:
/// `{topology, frequencyHz, gainUnit, parameters: {kind, p11..p22}, a, beta, loopGain,
/// feedbackAmount, ri, ro, af, rif, rof, rin, rout, idealAf, idealAfError}`, where
/// each of af…rout is `{twoPort, exact, relativeError}` and complex values are
/// `{re, im}`.
#[wasm_bindgen(js_name = circuitTwoPort, unchecked_return_type = "TwoPortAnalysis")]
#[allow(clippy::too_many_arguments)]
pub fn circuit_two_port(
    #[wasm_bindgen(unchecked_param_type = "TopologyName")] topology: &str,
    ri: f64,
    ro: f64,
    gain: f64,
    ci: f64,
    co: f64,
    rf: f64,
    rg: f64,
    cf: f64,
    rs: f64,
    rl: f64,
    frequency_hz: f64,
) -> Result<JsValue, JsValue> {
    let s = spec(topology, ri, ro, gain, ci, co, rf, rg, cf, rs, rl)?;
    to_js(&throw(twoport::analyze(&s, frequency_hz))?)
}

/// Blackman's Rin and Rout and the asymptotic-gain Af of a template stage:
/// `{gain: {gInf, g0, t, af, exact, relativeError}, input: {z0, tShort, tOpen,
/// blackman, exact, relativeError}, output: {…}}`.
#[wasm_bindgen(js_name = circuitStageViews, unchecked_return_type = "StageViews")]
#[allow(clippy::too_many_arguments)]
pub fn circuit_stage_views(
    #[wasm_bindgen(unchecked_param_type = "TopologyName")] topology: &str,
    ri: f64,
    ro: f64,
    gain: f64,
    ci: f64,
    co: f64,
    rf: f64,
    rg: f64,
    cf: f64,
    rs: f64,
    rl: f64,
    frequency_hz: f64,
) -> Result<JsValue, JsValue> {
    let s = spec(topology, ri, ro, gain, ci, co, rf, rg, cf, rs, rl)?;
    to_js(&throw(blackman::stage_views(&s, frequency_hz))?)
}

/// Blackman's formula at the port (plus, minus) of a circuit document, with
/// respect to the controlled source `controlled`.
#[wasm_bindgen(js_name = circuitBlackman, unchecked_return_type = "BlackmanImpedance")]
pub fn circuit_blackman(
    json: &str,
    controlled: &str,
    plus: &str,
    minus: &str,
    frequency_hz: f64,
) -> Result<JsValue, JsValue> {
    to_js(&throw(blackman::blackman_impedance(
        &circuit(json)?,
        controlled,
        plus,
        minus,
        frequency_hz,
    ))?)
}

/// The asymptotic-gain decomposition of the transfer from `source` to the
/// voltage V(plus) − V(minus), with respect to `controlled`.
#[wasm_bindgen(js_name = circuitAsymptoticGain, unchecked_return_type = "AsymptoticGain")]
pub fn circuit_asymptotic_gain(
    json: &str,
    controlled: &str,
    source: &str,
    plus: &str,
    minus: &str,
    frequency_hz: f64,
) -> Result<JsValue, JsValue> {
    let out = Output::Voltage(plus, minus);
    to_js(&throw(blackman::asymptotic_gain(
        &circuit(json)?,
        controlled,
        source,
        out,
        frequency_hz,
    ))?)
}

/// The same, to the current of `element`.
#[wasm_bindgen(js_name = circuitAsymptoticGainCurrent, unchecked_return_type = "AsymptoticGain")]
pub fn circuit_asymptotic_gain_current(
    json: &str,
    controlled: &str,
    source: &str,
    element: &str,
    frequency_hz: f64,
) -> Result<JsValue, JsValue> {
    let out = Output::Current(element);
    to_js(&throw(blackman::asymptotic_gain(
        &circuit(json)?,
        controlled,
        source,
        out,
        frequency_hz,
    ))?)
}
