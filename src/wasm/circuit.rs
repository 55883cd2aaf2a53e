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
/** Internal (`circuitTwoPortPacked`, not in the entry module): a TwoPortAnalysis's text and its 49 numbers in order. */
export interface PackedTwoPort { topology: Topology; gainUnit: TwoPortAnalysis["gainUnit"]; kind: TwoPortKind; values: Float64Array; }
/** Blackman's formula Z0·(1 + Tshort)/(1 + Topen) beside the port impedance solved directly, Ω. */
export interface BlackmanImpedance { z0: Complex; tShort: Complex; tOpen: Complex; blackman: Complex; exact: Complex; relativeError: number; }
/** The asymptotic-gain decomposition G∞·T/(1 + T) + G0/(1 + T) beside the transfer solved directly. */
export interface AsymptoticGain { gInf: Complex; g0: Complex; t: Complex; af: Complex; exact: Complex; relativeError: number; }
/** A template stage (options of `circuitTemplate`): resistances in Ω, capacitances in F. */
export interface TemplateOptions {
  topology: TopologyName;
  ri: number; ro: number;
  /** Amplifier gain of the topology's kind (V/V, V/A, A/V, A/A), signed. */
  gain: number;
  /** Default 0 (none). */
  ci?: number;
  /** Default 0 (none). */
  co?: number;
  rf: number; rg: number;
  /** Default 0 (none). */
  cf?: number;
  rs: number; rl: number;
}
/** A template stage at a frequency (options of `circuitTwoPort` and `circuitStageViews`). */
export interface TemplateAtOptions extends TemplateOptions {
  /** Hz; default 0 (the midband/DC solution). */
  frequencyHz?: number;
}
/** Options of `circuitSweep`: V(plus) − V(minus) per unit of `source`. */
export interface CircuitSweepOptions {
  /** The circuit document's JSON text. */
  circuit: string; source: string; plus: string; minus: string;
  frequencies: readonly number[] | Float64Array;
}
/** Options of `circuitBlackman`. */
export interface CircuitBlackmanOptions {
  circuit: string; controlled: string; plus: string; minus: string;
  /** Hz; default 0. */
  frequencyHz?: number;
}
/** Options of `circuitAsymptoticGain`. */
export interface CircuitAsymptoticGainOptions {
  circuit: string; controlled: string; source: string; plus: string; minus: string;
  /** Hz; default 0. */
  frequencyHz?: number;
}
/** Options of `circuitAsymptoticGainCurrent`. */
export interface CircuitAsymptoticGainCurrentOptions {
  circuit: string; controlled: string; source: string; element: string;
  /** Hz; default 0. */
  frequencyHz?: number;
}
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
    let param = super::options::caller_name(e.error.param(), &[]);
    let _ = js_sys::Reflect::set(obj, &"param".into(), &param.as_str().into());
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

/// The options of `circuitTemplate`: a template stage (see the templates table in
/// the Rust docs). `topology` by either naming family; `ri`, `ro`, `rf`, `rg`, `rs`,
/// `rl` in Ω; `gain` of the topology's kind (V/V, V/A, A/V, A/A, signed); `ci`,
/// `co`, `cf` in F (default 0 = none).
struct TemplateOptions {
    topology: alloc::string::String,
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
}

impl super::options::FromOptions for TemplateOptions {
    const FIELDS: &'static [&'static str] = &[
        "topology", "ri", "ro", "gain", "ci", "co", "rf", "rg", "cf", "rs", "rl",
    ];
    fn from_fields(f: &mut super::options::Fields) -> Self {
        TemplateOptions {
            topology: f.text("topology"),
            ri: f.num("ri"),
            ro: f.num("ro"),
            gain: f.num("gain"),
            ci: f.num_or("ci", 0.0),
            co: f.num_or("co", 0.0),
            rf: f.num("rf"),
            rg: f.num("rg"),
            cf: f.num_or("cf", 0.0),
            rs: f.num("rs"),
            rl: f.num("rl"),
        }
    }
}

/// The options of `circuitTwoPort` and `circuitStageViews`: a template stage and the
/// frequency (Hz, default 0 = the midband/DC solution).
struct TemplateAtOptions {
    topology: alloc::string::String,
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
}

impl super::options::FromOptions for TemplateAtOptions {
    const FIELDS: &'static [&'static str] = &[
        "topology",
        "ri",
        "ro",
        "gain",
        "ci",
        "co",
        "rf",
        "rg",
        "cf",
        "rs",
        "rl",
        "frequencyHz",
    ];
    fn from_fields(f: &mut super::options::Fields) -> Self {
        TemplateAtOptions {
            topology: f.text("topology"),
            ri: f.num("ri"),
            ro: f.num("ro"),
            gain: f.num("gain"),
            ci: f.num_or("ci", TemplateAtOptions::NO_CAPACITANCE),
            co: f.num_or("co", TemplateAtOptions::NO_CAPACITANCE),
            rf: f.num("rf"),
            rg: f.num("rg"),
            cf: f.num_or("cf", TemplateAtOptions::NO_CAPACITANCE),
            rs: f.num("rs"),
            rl: f.num("rl"),
            frequency_hz: f.num_or("frequencyHz", TemplateAtOptions::MIDBAND_HZ),
        }
    }
}

impl TemplateAtOptions {
    /// ci, co and cf left out: no capacitance (F).
    const NO_CAPACITANCE: f64 = 0.0;
    /// frequencyHz left out: the midband (DC) solution (Hz).
    const MIDBAND_HZ: f64 = 0.0;

    fn split(self) -> (TemplateOptions, f64) {
        let t = TemplateOptions {
            topology: self.topology,
            ri: self.ri,
            ro: self.ro,
            gain: self.gain,
            ci: self.ci,
            co: self.co,
            rf: self.rf,
            rg: self.rg,
            cf: self.cf,
            rs: self.rs,
            rl: self.rl,
        };
        (t, self.frequency_hz)
    }
}

fn spec(o: &TemplateOptions) -> Result<StageSpec, JsValue> {
    let t: Topology = throw(o.topology.parse().map_err(CircuitError::from))?;
    Ok(StageSpec {
        topology: t,
        amplifier: AmplifierModel {
            ri: o.ri,
            ro: o.ro,
            gain: o.gain,
            ci: o.ci,
            co: o.co,
        },
        network: FeedbackNetwork {
            rf: o.rf,
            rg: o.rg,
            cf: o.cf,
        },
        rs: o.rs,
        rl: o.rl,
    })
}

/// The stage spec and frequency of a `TemplateAtOptions` object.
fn spec_at(options: &JsValue) -> Result<(StageSpec, f64), JsValue> {
    let (t, f) = super::options::read::<TemplateAtOptions>("", options)?.split();
    Ok((spec(&t)?, f))
}

/// The options of the functions that probe a port of a circuit document.
struct ProbeOptions {
    circuit: alloc::string::String,
    controlled: Option<alloc::string::String>,
    source: Option<alloc::string::String>,
    plus: Option<alloc::string::String>,
    minus: Option<alloc::string::String>,
    element: Option<alloc::string::String>,
    frequency_hz: f64,
    frequencies: Option<alloc::vec::Vec<f64>>,
}

impl super::options::FromOptions for ProbeOptions {
    const FIELDS: &'static [&'static str] = &[
        "circuit",
        "controlled",
        "source",
        "plus",
        "minus",
        "element",
        "frequencyHz",
        "frequencies",
    ];
    fn from_fields(f: &mut super::options::Fields) -> Self {
        ProbeOptions {
            circuit: f.text("circuit"),
            controlled: f.opt_text("controlled"),
            source: f.opt_text("source"),
            plus: f.opt_text("plus"),
            minus: f.opt_text("minus"),
            element: f.opt_text("element"),
            frequency_hz: f.num_or("frequencyHz", 0.0),
            frequencies: f.opt_nums("frequencies"),
        }
    }
}

/// A required text field of a probe: a JS `missing` error naming it when absent.
fn field<'a>(value: &'a Option<alloc::string::String>, name: &str) -> Result<&'a str, JsValue> {
    value
        .as_deref()
        .ok_or_else(|| super::options::error_at(name, crate::Error::Missing { param: "" }, None))
}

/// A probe's options, with the fields a function does not use refused by name.
fn probe(options: &JsValue, unused: &[&str]) -> Result<ProbeOptions, JsValue> {
    let o: ProbeOptions = super::options::read("", options)?;
    let given = [
        ("controlled", o.controlled.is_some()),
        ("source", o.source.is_some()),
        ("plus", o.plus.is_some()),
        ("minus", o.minus.is_some()),
        ("element", o.element.is_some()),
        ("frequencyHz", o.frequency_hz != 0.0),
        ("frequencies", o.frequencies.is_some()),
    ];
    for (name, present) in given {
        if present && unused.contains(&name) {
            return Err(super::options::error_at(
                name,
                crate::Error::UnknownField {
                    param: "",
                    expected: "",
                },
                Some(alloc::format!(
                    "{name}: unknown field; this function does not take it"
                )),
            ));
        }
    }
    Ok(o)
}

/// Read a circuit document and write it back in canonical form (values as
/// numbers, compact JSON): the round trip of the format.
#[wasm_bindgen(js_name = circuitNormalize)]
pub fn circuit_normalize(json: &str) -> Result<String, JsValue> {
    Ok(write_circuit(&circuit(json)?))
}

/// The circuit document of a template stage, from `{topology, ri, ro, gain, ci, co,
/// rf, rg, cf, rs, rl}` (see `TemplateOptions`).
#[wasm_bindgen(js_name = circuitTemplate)]
pub fn circuit_template(
    #[wasm_bindgen(unchecked_param_type = "TemplateOptions")] options: JsValue,
) -> Result<String, JsValue> {
    let o: TemplateOptions = super::options::read("", &options)?;
    Ok(write_circuit(&throw(build(&spec(&o)?))?.circuit))
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

/// V(plus) − V(minus) per unit of `source` over `frequencies` (Hz), from `{circuit,
/// source, plus, minus, frequencies}`: `{re: Float64Array, im: Float64Array}`.
#[wasm_bindgen(js_name = circuitSweep, unchecked_return_type = "ComplexSweep")]
pub fn circuit_sweep(
    #[wasm_bindgen(unchecked_param_type = "CircuitSweepOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o = probe(&options, &["controlled", "element", "frequencyHz"])?;
    let frequencies = o.frequencies.as_deref().ok_or_else(|| {
        super::options::error_at("frequencies", crate::Error::Missing { param: "" }, None)
    })?;
    let h = throw(core::voltage_transfer_sweep(
        &circuit(&o.circuit)?,
        field(&o.source, "source")?,
        field(&o.plus, "plus")?,
        field(&o.minus, "minus")?,
        frequencies,
    ))?;
    let re: alloc::vec::Vec<f64> = h.iter().map(|z| z.re).collect();
    let im: alloc::vec::Vec<f64> = h.iter().map(|z| z.im).collect();
    Ok(typed_arrays(&[("re", &re), ("im", &im)]))
}

/// The two-port method beside the exact solution and the ideal 1/β, for a
/// template stage at a frequency (`TemplateAtOptions`):
/// `{topology, frequencyHz, gainUnit, parameters: {kind, p11..p22}, a, beta, loopGain,
/// feedbackAmount, ri, ro, af, rif, rof, rin, rout, idealAf, idealAfError}`, where
/// each of af…rout is `{twoPort, exact, relativeError}` and complex values are
/// `{re, im}`.
#[wasm_bindgen(js_name = circuitTwoPort, unchecked_return_type = "TwoPortAnalysis")]
pub fn circuit_two_port(
    #[wasm_bindgen(unchecked_param_type = "TemplateAtOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let (s, frequency_hz) = spec_at(&options)?;
    to_js(&throw(twoport::analyze(&s, frequency_hz))?)
}

/// `circuitTwoPort` with its options at fixed places, for the entry module
/// (facade/loopwright.js), which passes a regular options object's fields here
/// (every field known and of its kind, every required one given; `undefined` for
/// an optional one left out, which takes the default of [`TemplateAtOptions`]) and
/// any other object to `circuitTwoPort`, whose reader reports what is wrong. Reading
/// the object here cost about 3 calls into JS per field (`src/wasm/options.rs`).
/// Internal: not exported by the entry module. The result crosses packed:
/// `{topology, gainUnit, kind, values}`, `values` a `Float64Array` of every number
/// of the `circuitTwoPort` result in its order (frequencyHz, p11…p22 as re, im, a,
/// beta, loopGain, feedbackAmount, ri, ro, then af, rif, rof, rin, rout each as
/// twoPort re, im, exact re, im, relativeError, then idealAf, idealAfError: 49),
/// each checked finite here ([`super::finite_numbers`]; a non-finite one
/// is the `overflow` error with the path `circuitTwoPort` would give). The entry
/// module builds the object around them: building it here took one call into JS
/// per field and per object (about 75), a quarter of the call.
#[wasm_bindgen(js_name = circuitTwoPortPacked, unchecked_return_type = "PackedTwoPort")]
#[allow(clippy::too_many_arguments)]
pub fn circuit_two_port_packed(
    topology: alloc::string::String,
    ri: f64,
    ro: f64,
    gain: f64,
    ci: Option<f64>,
    co: Option<f64>,
    rf: f64,
    rg: f64,
    cf: Option<f64>,
    rs: f64,
    rl: f64,
    frequency_hz: Option<f64>,
) -> Result<JsValue, JsValue> {
    let none = TemplateAtOptions::NO_CAPACITANCE;
    let o = TemplateOptions {
        topology,
        ri,
        ro,
        gain,
        ci: ci.unwrap_or(none),
        co: co.unwrap_or(none),
        rf,
        rg,
        cf: cf.unwrap_or(none),
        rs,
        rl,
    };
    let f = frequency_hz.unwrap_or(TemplateAtOptions::MIDBAND_HZ);
    let r = throw(twoport::analyze(&spec(&o)?, f))?;
    let values = super::finite_numbers(&r)?;
    let out = js_sys::Object::new();
    let set = |key: &str, v: JsValue| {
        // Reflect::set only fails on frozen or proxy objects; this one is fresh.
        let _ = js_sys::Reflect::set(&out, &key.into(), &v);
    };
    set("topology", r.topology.name().into());
    set("gainUnit", r.gain_unit.into());
    set("kind", r.parameters.kind.letter().into());
    set(
        "values",
        js_sys::Float64Array::from(values.as_slice()).into(),
    );
    Ok(out.into())
}

/// Blackman's Rin and Rout and the asymptotic-gain Af of a template stage at a
/// frequency (`TemplateAtOptions`): `{gain: {gInf, g0, t, af, exact, relativeError},
/// input: {z0, tShort, tOpen, blackman, exact, relativeError}, output: {…}}`.
#[wasm_bindgen(js_name = circuitStageViews, unchecked_return_type = "StageViews")]
pub fn circuit_stage_views(
    #[wasm_bindgen(unchecked_param_type = "TemplateAtOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let (s, frequency_hz) = spec_at(&options)?;
    to_js(&throw(blackman::stage_views(&s, frequency_hz))?)
}

/// Blackman's formula at the port (plus, minus) of a circuit document, with
/// respect to the controlled source `controlled`: `{circuit, controlled, plus, minus,
/// frequencyHz}`.
#[wasm_bindgen(js_name = circuitBlackman, unchecked_return_type = "BlackmanImpedance")]
pub fn circuit_blackman(
    #[wasm_bindgen(unchecked_param_type = "CircuitBlackmanOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o = probe(&options, &["source", "element", "frequencies"])?;
    to_js(&throw(blackman::blackman_impedance(
        &circuit(&o.circuit)?,
        field(&o.controlled, "controlled")?,
        field(&o.plus, "plus")?,
        field(&o.minus, "minus")?,
        o.frequency_hz,
    ))?)
}

/// The asymptotic-gain decomposition of the transfer from `source` to the
/// voltage V(plus) − V(minus), with respect to `controlled`: `{circuit, controlled,
/// source, plus, minus, frequencyHz}`.
#[wasm_bindgen(js_name = circuitAsymptoticGain, unchecked_return_type = "AsymptoticGain")]
pub fn circuit_asymptotic_gain(
    #[wasm_bindgen(unchecked_param_type = "CircuitAsymptoticGainOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o = probe(&options, &["element", "frequencies"])?;
    let out = Output::Voltage(field(&o.plus, "plus")?, field(&o.minus, "minus")?);
    to_js(&throw(blackman::asymptotic_gain(
        &circuit(&o.circuit)?,
        field(&o.controlled, "controlled")?,
        field(&o.source, "source")?,
        out,
        o.frequency_hz,
    ))?)
}

/// The same, to the current of `element`: `{circuit, controlled, source, element,
/// frequencyHz}`.
#[wasm_bindgen(js_name = circuitAsymptoticGainCurrent, unchecked_return_type = "AsymptoticGain")]
pub fn circuit_asymptotic_gain_current(
    #[wasm_bindgen(unchecked_param_type = "CircuitAsymptoticGainCurrentOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o = probe(&options, &["plus", "minus", "frequencies"])?;
    let out = Output::Current(field(&o.element, "element")?);
    to_js(&throw(blackman::asymptotic_gain(
        &circuit(&o.circuit)?,
        field(&o.controlled, "controlled")?,
        field(&o.source, "source")?,
        out,
        o.frequency_hz,
    ))?)
}
