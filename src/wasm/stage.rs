//! JS bindings of the stage area: the circuit a stage document writes, the
//! amplifier's open-loop gain, and the loop gain, closed-loop gain, port
//! impedance and poles of any circuit (`docs/stage.md`).
//!
//! Wherever a circuit is taken (`circuit` of the options), a **stage document**
//! is taken too: the field holds a circuit document (version 1 or 2) or a stage
//! document, as an object or as its JSON text, told apart by `format`
//! (`"loopwright-circuit"` or `"loopwright-stage"`). A stage stands for the
//! circuit it writes (`Stage::circuit`), and gives the defaults of the names:
//! the amplifier `U1` to break, its source as input, its output (node `out`, or
//! the current of `Rl` for the current-output kinds), and its `input` and
//! `output` ports. `spreadPoint` overrides the stage's point of the A0 spread.
//!
//! Errors are `LoopwrightError`s with `code`, `param` (the caller's path:
//! `circuit.parts.rf`, `circuit.amplifier.gbwHz`, `amplifier.a0`,
//! `frequenciesHz`) and `subject` (the node or element at fault, or `""`).

use super::options::{self, caller_name, error_at, Fields, FromOptions};
use super::{to_js, typed_arrays};
use crate::circuit::blackman::Output;
use crate::circuit::json::{read_circuit, write_circuit};
use crate::circuit::{Circuit, CircuitError, ElementKind};
use crate::error::Error;
use crate::json::{Json, Members};
use crate::stage::amplifier_json::read_amplifier;
use crate::stage::closed_loop::{gain_sweep, gain_within_band, impedance_sweep, ImpedanceSweep};
use crate::stage::design::{
    dominant_pole_for_margin, feedback_capacitor_for_margin, isolation_resistor_for_margin,
    max_beta_for_margin, max_load_capacitance_for_margin,
};
use crate::stage::distortion::{stage_distortion_at, OpenLoopDistortion};
use crate::stage::document_json::read_stage;
use crate::stage::loop_gain::{loop_gain, ResponseSweep};
use crate::stage::margins::circuit_margins_with_density;
use crate::stage::nyquist::circuit_nyquist_with_density;
use crate::stage::open_loop::open_loop_sweep;
use crate::stage::poles::circuit_poles;
use crate::stage::step::{circuit_step, StepOutput};
use crate::stage::{SpreadPoint, Stage, StageCircuit};
use alloc::string::String;
use alloc::vec::Vec;
use serde::Serialize;
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const STAGE_TYPES: &str = r#"
/** A value of an amplifier figure or a part: a number, or a value text such as "10M", "3p", "4k7". */
export type StageValue = number | string;
/** The point of the A0 spread an analysis uses. */
export type SpreadPointName = "min" | "typ" | "max";
/** A complex pole or zero pair: natural frequency (Hz) and Q (> 0). */
export interface FrequencyQ { freqHz: StageValue; q: StageValue; }
/** A noise density (V/√Hz or A/√Hz) and its 1/f corner (Hz, default 0). */
export interface NoiseDensityFigure { density: StageValue; cornerHz?: StageValue; }
/**
 * An amplifier from its datasheet figures (docs/stage.md): the `amplifier` of a stage
 * document and the `model` of a circuit's amplifier element. Give `gbwHz` or
 * `dominantPoleHz` (or both, agreeing within 15 % at typical A0).
 */
export interface AmplifierModel {
  /** Open-loop gain, V/V: one number, or {typ, min?, max?} (min and max default to typ). */
  a0: StageValue | { typ: StageValue; min?: StageValue; max?: StageValue };
  gbwHz?: StageValue;
  dominantPoleHz?: StageValue;
  /** What stays fixed across the A0 spread; default "hold-gbw". */
  hold?: "hold-gbw" | "hold-pole";
  polesHz?: StageValue[];
  zerosHz?: StageValue[];
  rhpZerosHz?: StageValue[];
  complexPoles?: FrequencyQ[];
  complexZeros?: FrequencyQ[];
  /** Differential input resistance, Ω (default: none). */
  rd?: StageValue;
  /** Differential input capacitance, F (default 0). */
  cd?: StageValue;
  /** Common-mode input resistance of each input, Ω (default: none). */
  rcm?: StageValue;
  /** Common-mode input capacitance of each input, F (default 0). */
  ccm?: StageValue;
  /** Output resistance, Ω (default 0). */
  ro?: StageValue;
  /** V/s. */
  slewRate?: StageValue;
  swing?: { lowV: StageValue; highV: StageValue };
  voltageNoise?: NoiseDensityFigure;
  currentNoise?: NoiseDensityFigure;
}
/** A tolerance of a circuit element (version 2, docs/circuit.md). */
export type ElementTolerance =
  | { distribution: "uniform"; percent: number }
  | { distribution: "normal"; percent: number; sigmas: number }
  | { distribution: "limits"; min: StageValue; typ?: StageValue; max: StageValue };
/** The amplifier element of a circuit document version 2: output `nodes[0]` against `nodes[1]`, driven by V(control[0]) − V(control[1]). */
export interface AmplifierElement {
  name: string;
  kind: "amplifier";
  nodes: [string, string];
  control: [string, string];
  model: AmplifierModel;
  /** Default "typ". */
  spreadPoint?: SpreadPointName;
}
/** Version 2 adds to every element but an amplifier a tolerance and a temperature coefficient (ppm/K). */
export type CircuitElementV2 = (CircuitElement & { tolerance?: ElementTolerance; tempco?: number }) | AmplifierElement;
/** The circuit document version 2 (docs/circuit.md): version 1 plus the amplifier element. */
export interface CircuitDocumentV2 {
  format: "loopwright-circuit";
  version: 2;
  nodes?: string[];
  elements: CircuitElementV2[];
}
/** The common stages (docs/stage.md). */
export type StageKind = "non-inverting" | "inverting" | "transimpedance" | "transconductance" | "current-amplifier";
/** Part values of a stage, Ω and F; a part left out is not there, a part given is > 0. */
export interface StageParts {
  rf?: StageValue; rg?: StageValue; cf?: StageValue; rs?: StageValue;
  cs?: StageValue; rl?: StageValue; cl?: StageValue; riso?: StageValue;
}
/** The stage document version 1 (docs/stage.md). */
export interface StageDocument {
  format: "loopwright-stage";
  version: 1;
  kind: StageKind;
  amplifier: AmplifierModel;
  /** Default "typ". */
  spreadPoint?: SpreadPointName;
  parts?: StageParts;
}
/** Where a circuit is taken: a circuit or stage document, as an object or its JSON text. */
export type CircuitInput = CircuitDocument | CircuitDocumentV2 | StageDocument | string;
/** What `stageCircuit` gives: the circuit's JSON text and the names the stage uses in it. */
export interface StageCircuitResult {
  /** The circuit document (version 2) as JSON text. */
  circuit: string;
  /** The independent source: "Vs" (1 V) or "Is" (1 A). */
  source: string;
  /** The amplifier element: "U1". */
  amplifier: string;
  /** The node the source drives. */
  input: string;
  /** The output node. */
  output: string;
  /** Unit of output per source: "V/V", "V/A", "A/V" or "A/A". */
  gainUnit: string;
  /** For current-output stages, the element whose current is the output ("Rl"); else null. */
  outputCurrent: string | null;
}
/** A complex response over frequency: dB, unwrapped degrees and rectangular parts. */
export interface ResponseSweep {
  freqHz: Float64Array; magnitudeDb: Float64Array; phaseDeg: Float64Array; re: Float64Array; im: Float64Array;
}
/** A port impedance over frequency, Ω and unwrapped degrees. */
export interface ImpedanceSweep {
  freqHz: Float64Array; magnitudeOhm: Float64Array; phaseDeg: Float64Array; re: Float64Array; im: Float64Array;
}
/** The poles of a circuit, rad/s, sorted by natural frequency, and the verdict. */
export interface CircuitPoles {
  poles: { re: number; im: number; naturalHz: number; zeta: number; q: number | null }[];
  verdict: "stable" | "marginal" | "unstable";
  /** The shift σ (rad/s) used in the eigenvalue solve. */
  shift: number;
}
/** Options of `amplifierOpenLoop`. */
export interface AmplifierOpenLoopOptions {
  amplifier: AmplifierModel;
  frequenciesHz: readonly number[] | Float64Array;
  /** Default "typ". */
  spreadPoint?: SpreadPointName;
}
/** Options of `circuitLoopGain`: the return ratio at `controlled`. */
export interface CircuitLoopGainOptions {
  circuit: CircuitInput;
  /** The amplifier or controlled source to break; default: the stage's "U1", or a circuit's only amplifier element. */
  controlled?: string;
  frequenciesHz: readonly number[] | Float64Array;
  /** A stage document's point of the A0 spread (default: the document's). */
  spreadPoint?: SpreadPointName;
}
/** Options of `circuitGain`: output per unit of `input`. */
export interface CircuitGainOptions {
  circuit: CircuitInput;
  /** The independent source; default: the stage's source. */
  input?: string;
  /** The output node (voltage against `outputMinus`); default: the stage's output. */
  output?: string;
  /** Default "0". */
  outputMinus?: string;
  /** The element whose current is the output, instead of `output`. */
  outputElement?: string;
  frequenciesHz: readonly number[] | Float64Array;
  spreadPoint?: SpreadPointName;
}
/** Options of `circuitImpedance`: the impedance at a port, sources at zero. */
export interface CircuitImpedanceOptions {
  circuit: CircuitInput;
  /** A node name (against `minus`), or for a stage "input" or "output" (default "output"). */
  port?: string;
  /** Default "0". */
  minus?: string;
  frequenciesHz: readonly number[] | Float64Array;
  spreadPoint?: SpreadPointName;
}
/** Options of `circuitMargins` and `circuitNyquist`: the loop broken at `controlled`. */
export interface CircuitLoopOptions {
  circuit: CircuitInput;
  /** Default: the stage's "U1", or a circuit's only amplifier element. */
  controlled?: string;
  /** Search-grid density, points per decade, 4 … 2000; default 40. */
  pointsPerDecade?: number;
  spreadPoint?: SpreadPointName;
}
/** The Nyquist reading of a loop gain: the curve (ω ≥ 0), the least |1 + T| and the encirclements of −1. */
export interface NyquistData {
  curve: { freqHz: number[]; re: number[]; im: number[] };
  leastDistance: { distance: number; freqHz: number };
  encirclements: {
    /** N: clockwise encirclements of −1 (negative: counter-clockwise). */
    clockwise: number;
    /** P: poles of T in the right half plane. */
    openLoopRhpPoles: number;
    /** Poles of T at the origin, passed on the right. */
    originPoles: number;
    /** Z = N + P. */
    closedLoopRhpPoles: number;
    verdict: "stable" | "marginal" | "unstable";
  };
}
/** Which part `stageDesign` chooses. */
export type DesignPartName = "cf" | "riso" | "cl" | "dominantPoleHz" | "rg";
/** Options of `stageDesign`: the part value that gives a target phase margin. */
export interface StageDesignOptions {
  /** A stage document (object or JSON text). */
  stage: StageDocument | string;
  /** "cf": feedback capacitor; "riso": isolation resistor (for the load `cl`); "cl": largest load capacitance; "dominantPoleHz": highest dominant pole; "rg": largest β (smallest noise gain). */
  part: DesignPartName;
  /** Degrees, 0 < target < 180. */
  targetPhaseMarginDeg: number;
  /** For "riso": the load capacitance, F (default: the stage's `cl`). */
  cl?: number;
  spreadPoint?: SpreadPointName;
}
/** What a design helper found: the value, the margin and crossover it gives, every feasible interval. */
export interface StageDesign {
  part: "cf" | "riso" | "cl" | "dominantPoleHz" | "rg";
  /** F, Ω or Hz. */
  value: number;
  phaseMarginDeg: number;
  crossoverHz: number | null;
  /** For "rg": the β that results. */
  beta: number | null;
  /** The intervals of the searched range where the target is met. */
  feasible: [number, number][];
  /** The answer is at the end of the searched range. */
  atRangeEnd: boolean;
}
/** Options of `circuitStep`: a unit step of the source `input`, read at `output` (a node) or as the current of the resistor `outputElement`. */
export interface CircuitStepOptions {
  circuit: CircuitInput;
  /** Default: the stage's source. */
  input?: string;
  /** Default: the stage's output node. */
  output?: string;
  /** Default "0". */
  outputMinus?: string;
  /** A resistor whose current is the output (default for the current-output stages: "Rl"). */
  outputElement?: string;
  /** Settling band as a fraction, 0 < band < 0.5; default 0.01. */
  settleBand?: number;
  /** Samples of the waveform, default 400. */
  points?: number;
  spreadPoint?: SpreadPointName;
}
/** Options of `circuitGainWithin`: the band where |G| stays inside targetGain·(1 ± tolerance). */
export interface CircuitGainWithinOptions {
  circuit: CircuitInput;
  /** Default: the stage's source. */
  input?: string;
  /** Default: the stage's output (node, or the current of "Rl"). */
  output?: string;
  outputMinus?: string;
  outputElement?: string;
  /** The specified gain's magnitude, in the unit of the gain (> 0). */
  targetGain: number;
  /** The gain tolerance as a fraction, 0 < tolerance < 1 (0.005 for ±0.5 %). */
  tolerance: number;
  /** Scan range, Hz; default 1 Hz … 1 GHz. */
  fromHz?: number;
  toHz?: number;
  spreadPoint?: SpreadPointName;
}
/** Where |G| leaves its tolerance band. */
export interface GainWithin {
  /** Hz: the highest frequency up to which |G| stays in the band (fromHz when outside there, toHz when it never leaves). */
  limitHz: number;
  status: "leaves" | "within-to-end" | "outside-at-start";
  /** |G| at fromHz. */
  gainAtStart: number;
}
/** Options of `stageDistortion`: the amplifier's open-loop HD2 and HD3 inside the stage's loop. */
export interface StageDistortionOptions {
  /** A stage document (object or JSON text). */
  stage: StageDocument | string;
  /** The amplifier's open-loop second and third harmonic, signed fractions of the fundamental. */
  hd2: number;
  hd3: number;
  /** The open-loop output peak at which hd2 and hd3 hold, V. */
  amplitude: number;
  /** The stage's output peak, V. */
  level: number;
  /** The signal frequency, Hz (0: the static result). */
  frequencyHz: number;
  spreadPoint?: SpreadPointName;
}
/** Options of `circuitPoles`. */
export interface CircuitPolesOptions { circuit: CircuitInput; spreadPoint?: SpreadPointName; }
"#;

// The sections of a stage document a core parameter name may live in: the
// names the document readers accept (src/stage/document_json.rs, amplifier_json.rs).
use crate::stage::amplifier_json::MODEL_KEYS;
use crate::stage::document_json::PART_KEYS;

/// `base.rest`, or `rest` when `base` is empty.
fn join(base: &str, rest: &str) -> String {
    if base.is_empty() {
        String::from(rest)
    } else if rest.is_empty() {
        String::from(base)
    } else {
        alloc::format!("{base}.{rest}")
    }
}

/// A `LoopwrightError` at `param` with the `subject` field of circuit errors.
pub(super) fn thrown(
    param: &str,
    error: Error,
    subject: &str,
    sentence: Option<String>,
) -> JsValue {
    let err = error_at(param, error, sentence);
    // Reflect::set only fails on frozen or proxy objects; a fresh Error is neither.
    let _ = js_sys::Reflect::set(&err, &"subject".into(), &subject.into());
    err
}

/// A circuit or analysis error under the caller's names (`frequencies` is
/// the caller's `frequenciesHz`), with its subject.
fn analysis_error(e: CircuitError) -> JsValue {
    let renames = [
        ("frequencies", "frequenciesHz"),
        ("frequency", "frequenciesHz"),
    ];
    let param = caller_name(e.error.param(), &renames);
    thrown(&param, e.error, e.name.as_str(), None)
}

/// Where in a model or stage object the unknown key `key` is: the first
/// object holding it, searched from the top (`parts.rx`, `amplifier.swing.mid`).
fn key_path(doc: &Json, key: &str) -> String {
    let mut queue: Vec<(String, &Json)> = alloc::vec![(String::new(), doc)];
    let mut i = 0;
    while let Some((path, v)) = queue.get(i).cloned() {
        i += 1;
        match v {
            Json::Object(o) if o.has(key) => return join(&path, key),
            Json::Object(o) => queue.extend(o.iter().map(|(k, x)| (join(&path, k), x))),
            Json::Array(items) => queue.extend(
                items
                    .iter()
                    .enumerate()
                    .map(|(j, x)| (alloc::format!("{path}[{j}]"), x)),
            ),
            _ => {}
        }
    }
    String::from(key)
}

/// A stage or amplifier-model error under the caller's path: `base` + the
/// section (`parts.`, `amplifier.`, when `sections`) + the core's field name;
/// an unknown field is `unknown_field` at the path of the key.
fn model_error(e: CircuitError, base: &str, doc: &Json, sections: bool) -> JsValue {
    let p = e.error.param();
    if p == "field" {
        let path = join(base, &key_path(doc, e.name.as_str()));
        let expected = match e.error {
            Error::UnknownName { expected, .. } => expected,
            _ => "",
        };
        let sentence = alloc::format!("{path}: unknown field; expected one of {expected}");
        let error = Error::UnknownField {
            param: "",
            expected: "",
        };
        return thrown(&path, error, "", Some(sentence));
    }
    let section = if !sections {
        ""
    } else if PART_KEYS.contains(&p) {
        "parts"
    } else if MODEL_KEYS.contains(&p) {
        "amplifier"
    } else {
        ""
    };
    let field = if p == "json" || p.is_empty() { "" } else { p };
    let path = join(&join(base, section), field);
    let path = if path.is_empty() { "stage" } else { &path };
    thrown(path, e.error, e.name.as_str(), None)
}

/// A circuit given to an analysis: the circuit itself, or the stage's.
pub(super) enum Document {
    Circuit(Circuit),
    Stage(StageCircuit, alloc::boxed::Box<Stage>),
}

impl Document {
    fn circuit(&self) -> &Circuit {
        match self {
            Document::Circuit(c) => c,
            Document::Stage(s, _) => &s.circuit,
        }
    }

    fn stage(&self) -> Option<&StageCircuit> {
        match self {
            Document::Circuit(_) => None,
            Document::Stage(s, _) => Some(s),
        }
    }
}

/// The output a response is read at, from the caller's `output` (a node, against
/// `outputMinus`, ground by default) or `outputElement` (the current in an
/// element), never both; with neither, the stage's own output (its output current
/// for a transconductance or current stage).
fn chosen_output<'a>(
    output: &'a Option<String>,
    output_element: &'a Option<String>,
    output_minus: Option<&'a str>,
    stage: Option<&'a StageCircuit>,
) -> Result<Output<'a>, JsValue> {
    let minus = output_minus.unwrap_or("0");
    Ok(match (output, output_element) {
        (Some(_), Some(_)) => {
            let error = Error::OutOfDomain {
                param: "",
                requirement: "give output or outputElement, not both",
            };
            return Err(thrown("outputElement", error, "", None));
        }
        (Some(node), None) => Output::Voltage(node, minus),
        (None, Some(element)) => Output::Current(element),
        (None, None) => match stage {
            Some(StageCircuit {
                output_current: Some(element),
                ..
            }) => Output::Current(element),
            Some(s) => Output::Voltage(s.output, minus),
            None => return Err(thrown("output", Error::Missing { param: "" }, "", None)),
        },
    })
}

/// The spread point named by `spreadPoint`, if given.
fn spread_point(name: Option<&str>) -> Result<Option<SpreadPoint>, JsValue> {
    name.map(|n| SpreadPoint::from_name("spreadPoint", n))
        .transpose()
        .map_err(|e| thrown("spreadPoint", e, "", None))
}

/// Read the document in field `field` (a circuit or stage document, an object
/// or its JSON text), the stage at `point` when given.
pub(super) fn document(v: Json, field: &str, point: Option<&str>) -> Result<Document, JsValue> {
    let point = spread_point(point)?;
    let (text, doc) = match v {
        Json::String(text) => match crate::json::parse(&text) {
            Ok(doc) => (text, doc),
            // Not JSON: the circuit reader names the line and column.
            Err(_) => {
                return Err(match read_circuit(&text) {
                    Err(e) => analysis_error(e),
                    Ok(_) => thrown(field, Error::Missing { param: "" }, "", None),
                })
            }
        },
        Json::Object(_) => (v.to_text(), v),
        _ => {
            let error = Error::WrongType {
                param: "",
                expected: "a circuit or stage document, or its JSON text",
            };
            return Err(thrown(field, error, "", None));
        }
    };
    let format = doc.as_object().and_then(|o| o.field("format"));
    if format.and_then(Json::as_str) == Some("loopwright-stage") {
        let mut stage = read_stage(&text).map_err(|e| model_error(e, field, &doc, true))?;
        if let Some(p) = point {
            stage.point = p;
        }
        let sc = stage
            .circuit()
            .map_err(|e| model_error(e, field, &doc, true))?;
        return Ok(Document::Stage(sc, alloc::boxed::Box::new(stage)));
    }
    if point.is_some() {
        let error = Error::OutOfDomain {
            param: "",
            requirement: "applies to a stage document; a circuit's amplifier element carries its own spreadPoint",
        };
        return Err(thrown("spreadPoint", error, "", None));
    }
    read_circuit(&text)
        .map(Document::Circuit)
        .map_err(analysis_error)
}

/// A name the options leave out: the stage's default, or `missing` naming it.
fn name_or<'a>(
    given: &'a Option<String>,
    default: Option<&'a str>,
    param: &str,
) -> Result<&'a str, JsValue> {
    given
        .as_deref()
        .or(default)
        .ok_or_else(|| thrown(param, Error::Missing { param: "" }, "", None))
}

/// The name of the only amplifier element of a circuit, if it has exactly one.
fn only_amplifier(c: &Circuit) -> Option<String> {
    let mut amps = c
        .elements()
        .iter()
        .filter(|e| e.kind() == ElementKind::Amplifier);
    match (amps.next(), amps.next()) {
        (Some(a), None) => Some(String::from(a.name().as_str())),
        _ => None,
    }
}

fn response_js(s: &ResponseSweep) -> JsValue {
    typed_arrays(&[
        ("freqHz", &s.freq_hz),
        ("magnitudeDb", &s.magnitude_db),
        ("phaseDeg", &s.phase_deg),
        ("re", &s.re),
        ("im", &s.im),
    ])
}

fn impedance_js(s: &ImpedanceSweep) -> JsValue {
    typed_arrays(&[
        ("freqHz", &s.freq_hz),
        ("magnitudeOhm", &s.magnitude_ohm),
        ("phaseDeg", &s.phase_deg),
        ("re", &s.re),
        ("im", &s.im),
    ])
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct StageCircuitOut<'a> {
    circuit: String,
    source: &'a str,
    amplifier: &'a str,
    input: &'a str,
    output: &'a str,
    gain_unit: &'a str,
    output_current: Option<&'a str>,
}

/// The circuit a stage document writes (`docs/stage.md`), as JSON text, with the
/// names the stage uses in it: `{circuit, source, amplifier, input, output,
/// gainUnit, outputCurrent}`. `stage` is the document object or its JSON text.
#[wasm_bindgen(js_name = stageCircuit, unchecked_return_type = "StageCircuitResult")]
pub fn stage_circuit(
    #[wasm_bindgen(unchecked_param_type = "StageDocument | string")] stage: JsValue,
) -> Result<JsValue, JsValue> {
    let v = match stage.as_string() {
        Some(text) => Json::String(text),
        None => options::read_document("stage", &stage)?,
    };
    if v.as_str().is_some_and(|t| !t.trim_start().starts_with('{')) {
        let error = Error::OutOfDomain {
            param: "",
            requirement: "must be a stage document or its JSON text",
        };
        return Err(thrown("stage", error, "", None));
    }
    let Document::Stage(sc, _) = document(v, "", None)? else {
        let error = Error::UnknownName {
            param: "",
            expected: "loopwright-stage",
        };
        return Err(thrown("format", error, "", None));
    };
    to_js(&StageCircuitOut {
        circuit: write_circuit(&sc.circuit),
        source: sc.source,
        amplifier: sc.amplifier,
        input: sc.input,
        output: sc.output,
        gain_unit: sc.gain_unit,
        output_current: sc.output_current,
    })
}

/// Options of `amplifierOpenLoop` (defaults in the `.d.ts`).
struct OpenLoopOptions {
    amplifier: Json,
    frequencies_hz: Vec<f64>,
    spread_point: Option<String>,
}

impl FromOptions for OpenLoopOptions {
    const FIELDS: &'static [&'static str] = &["amplifier", "frequenciesHz", "spreadPoint"];
    fn from_fields(f: &mut Fields) -> Self {
        OpenLoopOptions {
            amplifier: f.document("amplifier"),
            frequencies_hz: f.req_nums("frequenciesHz"),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The amplifier's open-loop gain A(jω) over `frequenciesHz` (Hz), from
/// `{amplifier, frequenciesHz, spreadPoint}`: `{freqHz, magnitudeDb, phaseDeg, re,
/// im}` as `Float64Array`s (dB, unwrapped degrees).
#[wasm_bindgen(js_name = amplifierOpenLoop, unchecked_return_type = "ResponseSweep")]
pub fn amplifier_open_loop(
    #[wasm_bindgen(unchecked_param_type = "AmplifierOpenLoopOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: OpenLoopOptions = options::read("", &options)?;
    let point = spread_point(o.spread_point.as_deref())?.unwrap_or(SpreadPoint::Typ);
    let a = read_amplifier(&o.amplifier)
        .map_err(|e| model_error(e, "amplifier", &o.amplifier, false))?;
    let s = open_loop_sweep(&a, point, &o.frequencies_hz).map_err(analysis_error)?;
    Ok(response_js(&s))
}

/// Options of `circuitLoopGain`.
struct LoopGainOptions {
    circuit: Json,
    controlled: Option<String>,
    frequencies_hz: Vec<f64>,
    spread_point: Option<String>,
}

impl FromOptions for LoopGainOptions {
    const FIELDS: &'static [&'static str] =
        &["circuit", "controlled", "frequenciesHz", "spreadPoint"];
    fn from_fields(f: &mut Fields) -> Self {
        LoopGainOptions {
            circuit: f.document("circuit"),
            controlled: f.opt_text("controlled"),
            frequencies_hz: f.req_nums("frequenciesHz"),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The return ratio T(jω) at an amplifier or controlled source of a circuit (or
/// stage), from `{circuit, controlled, frequenciesHz, spreadPoint}`: `{freqHz,
/// magnitudeDb, phaseDeg, re, im}` as `Float64Array`s. T > 0 at low frequency for
/// negative feedback.
#[wasm_bindgen(js_name = circuitLoopGain, unchecked_return_type = "ResponseSweep")]
pub fn circuit_loop_gain(
    #[wasm_bindgen(unchecked_param_type = "CircuitLoopGainOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: LoopGainOptions = options::read("", &options)?;
    let d = document(o.circuit, "circuit", o.spread_point.as_deref())?;
    let c = d.circuit();
    let only = only_amplifier(c);
    let default = d.stage().map(|s| s.amplifier).or(only.as_deref());
    let controlled = name_or(&o.controlled, default, "controlled")?;
    let s = loop_gain(c, controlled, &o.frequencies_hz).map_err(analysis_error)?;
    Ok(response_js(&s))
}

/// Options of `circuitGain`.
struct GainOptions {
    circuit: Json,
    input: Option<String>,
    output: Option<String>,
    output_minus: Option<String>,
    output_element: Option<String>,
    frequencies_hz: Vec<f64>,
    spread_point: Option<String>,
}

impl FromOptions for GainOptions {
    const FIELDS: &'static [&'static str] = &[
        "circuit",
        "input",
        "output",
        "outputMinus",
        "outputElement",
        "frequenciesHz",
        "spreadPoint",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        GainOptions {
            circuit: f.document("circuit"),
            input: f.opt_text("input"),
            output: f.opt_text("output"),
            output_minus: f.opt_text("outputMinus"),
            output_element: f.opt_text("outputElement"),
            frequencies_hz: f.req_nums("frequenciesHz"),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The closed-loop gain of a circuit (or stage) over frequency: the output (a
/// node voltage against `outputMinus`, or the current of `outputElement`) per
/// unit of the source `input`, from `{circuit, input, output, outputMinus,
/// outputElement, frequenciesHz, spreadPoint}`: `{freqHz, magnitudeDb, phaseDeg,
/// re, im}`.
#[wasm_bindgen(js_name = circuitGain, unchecked_return_type = "ResponseSweep")]
pub fn circuit_gain(
    #[wasm_bindgen(unchecked_param_type = "CircuitGainOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: GainOptions = options::read("", &options)?;
    let d = document(o.circuit, "circuit", o.spread_point.as_deref())?;
    let stage = d.stage();
    let input = name_or(&o.input, stage.map(|s| s.source), "input")?;
    let output = chosen_output(
        &o.output,
        &o.output_element,
        o.output_minus.as_deref(),
        stage,
    )?;
    let s = gain_sweep(d.circuit(), input, output, &o.frequencies_hz).map_err(analysis_error)?;
    Ok(response_js(&s))
}

/// Options of `circuitImpedance`.
struct ImpedanceOptions {
    circuit: Json,
    port: Option<String>,
    minus: Option<String>,
    frequencies_hz: Vec<f64>,
    spread_point: Option<String>,
}

impl FromOptions for ImpedanceOptions {
    const FIELDS: &'static [&'static str] =
        &["circuit", "port", "minus", "frequenciesHz", "spreadPoint"];
    fn from_fields(f: &mut Fields) -> Self {
        ImpedanceOptions {
            circuit: f.document("circuit"),
            port: f.opt_text("port"),
            minus: f.opt_text("minus"),
            frequencies_hz: f.req_nums("frequenciesHz"),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The impedance at a port of a circuit (or stage) over frequency, independent
/// sources at zero, from `{circuit, port, minus, frequenciesHz, spreadPoint}`:
/// `{freqHz, magnitudeOhm, phaseDeg, re, im}` (Ω). For a stage, `port` `"input"`
/// is the impedance its source sees (source and series Rs removed) and
/// `"output"` (the default) the impedance at its output node.
#[wasm_bindgen(js_name = circuitImpedance, unchecked_return_type = "ImpedanceSweep")]
pub fn circuit_impedance(
    #[wasm_bindgen(unchecked_param_type = "CircuitImpedanceOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: ImpedanceOptions = options::read("", &options)?;
    let d = document(o.circuit, "circuit", o.spread_point.as_deref())?;
    let minus = o.minus.as_deref().unwrap_or("0");
    let f = &o.frequencies_hz;
    let s = match (d.stage(), o.port.as_deref()) {
        (Some(sc), Some("input")) => {
            let c = sc.input_impedance_circuit().map_err(analysis_error)?;
            impedance_sweep(&c, sc.input, minus, f)
        }
        (Some(sc), None | Some("output")) => impedance_sweep(&sc.circuit, sc.output, minus, f),
        (_, Some(node)) => impedance_sweep(d.circuit(), node, minus, f),
        (None, None) => return Err(thrown("port", Error::Missing { param: "" }, "", None)),
    }
    .map_err(analysis_error)?;
    Ok(impedance_js(&s))
}

/// Options of `circuitPoles`.
struct PolesOptions {
    circuit: Json,
    spread_point: Option<String>,
}

impl FromOptions for PolesOptions {
    const FIELDS: &'static [&'static str] = &["circuit", "spreadPoint"];
    fn from_fields(f: &mut Fields) -> Self {
        PolesOptions {
            circuit: f.document("circuit"),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The closed-loop poles of a circuit (or stage) from its nodal matrices, and
/// the verdict, from `{circuit, spreadPoint}`: `{poles: [{re, im, naturalHz,
/// zeta, q}], verdict, shift}` (rad/s, Hz).
#[wasm_bindgen(js_name = circuitPoles, unchecked_return_type = "CircuitPoles")]
pub fn circuit_poles_js(
    #[wasm_bindgen(unchecked_param_type = "CircuitPolesOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: PolesOptions = options::read("", &options)?;
    let d = document(o.circuit, "circuit", o.spread_point.as_deref())?;
    to_js(&circuit_poles(d.circuit()).map_err(analysis_error)?)
}

/// Options of `circuitMargins` and `circuitNyquist`.
struct LoopOptions {
    circuit: Json,
    controlled: Option<String>,
    points_per_decade: u32,
    spread_point: Option<String>,
}

impl FromOptions for LoopOptions {
    const FIELDS: &'static [&'static str] =
        &["circuit", "controlled", "pointsPerDecade", "spreadPoint"];
    fn from_fields(f: &mut Fields) -> Self {
        LoopOptions {
            circuit: f.document("circuit"),
            controlled: f.opt_text("controlled"),
            points_per_decade: f.whole_or("pointsPerDecade", default_density()),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The margin engine's grid density when `pointsPerDecade` is left out.
fn default_density() -> u32 {
    crate::freq::crossings::DEFAULT_POINTS_PER_DECADE
}

/// The circuit and the element to break of a `LoopOptions` object.
fn opened_loop(options: &JsValue) -> Result<(Document, String, u32), JsValue> {
    let o: LoopOptions = options::read("", options)?;
    let d = document(o.circuit, "circuit", o.spread_point.as_deref())?;
    let only = only_amplifier(d.circuit());
    let default = d.stage().map(|s| s.amplifier).or(only.as_deref());
    let controlled = String::from(name_or(&o.controlled, default, "controlled")?);
    Ok((d, controlled, o.points_per_decade))
}

/// The stability margins of a circuit's (or stage's) loop through the margin
/// engine of the pole-list loops, from `{circuit, controlled, pointsPerDecade,
/// spreadPoint}`: `{phaseMarginDeg, crossoverHz, gainMarginDb, phaseCrossoverHz,
/// gainCrossings, phaseCrossings, validity, closedLoop}`.
#[wasm_bindgen(js_name = circuitMargins, unchecked_return_type = "StabilityMargins")]
pub fn circuit_margins_js(
    #[wasm_bindgen(unchecked_param_type = "CircuitLoopOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let (d, controlled, density) = opened_loop(&options)?;
    let m =
        circuit_margins_with_density(d.circuit(), &controlled, density).map_err(analysis_error)?;
    to_js(&m)
}

/// The Nyquist reading of a circuit's (or stage's) loop gain, from the options of
/// `circuitMargins`: `{curve: {freqHz, re, im}, leastDistance: {distance, freqHz},
/// encirclements: {clockwise, openLoopRhpPoles, originPoles, closedLoopRhpPoles,
/// verdict}}`.
#[wasm_bindgen(js_name = circuitNyquist, unchecked_return_type = "NyquistData")]
pub fn circuit_nyquist_js(
    #[wasm_bindgen(unchecked_param_type = "CircuitLoopOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let (d, controlled, density) = opened_loop(&options)?;
    let n =
        circuit_nyquist_with_density(d.circuit(), &controlled, density).map_err(analysis_error)?;
    to_js(&n)
}

/// Options of `stageDesign`.
struct DesignOptions {
    stage: Json,
    part: String,
    target_phase_margin_deg: f64,
    cl: Option<f64>,
    spread_point: Option<String>,
}

impl FromOptions for DesignOptions {
    const FIELDS: &'static [&'static str] =
        &["stage", "part", "targetPhaseMarginDeg", "cl", "spreadPoint"];
    fn from_fields(f: &mut Fields) -> Self {
        DesignOptions {
            stage: f.document("stage"),
            part: f.text("part"),
            target_phase_margin_deg: f.num("targetPhaseMarginDeg"),
            cl: f.opt_num("cl"),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The part value of a stage that gives a target phase margin, from `{stage, part,
/// targetPhaseMarginDeg, cl, spreadPoint}`: `{part, value, phaseMarginDeg,
/// crossoverHz, beta, feasible, atRangeEnd}`. Each helper scans the part's range and
/// refines every boundary (the margin need not be monotonic in the part).
#[wasm_bindgen(js_name = stageDesign, unchecked_return_type = "StageDesign")]
pub fn stage_design(
    #[wasm_bindgen(unchecked_param_type = "StageDesignOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: DesignOptions = options::read("", &options)?;
    let Document::Stage(_, stage) = document(o.stage, "stage", o.spread_point.as_deref())? else {
        let error = Error::UnknownName {
            param: "",
            expected: "loopwright-stage",
        };
        return Err(thrown("stage.format", error, "", None));
    };
    let target = o.target_phase_margin_deg;
    let renames = [("target_pm_deg", "targetPhaseMarginDeg")];
    let design = match o.part.as_str() {
        "cf" => feedback_capacitor_for_margin(&stage, target),
        "riso" => {
            let cl =
                o.cl.or(stage.parts.cl)
                    .ok_or_else(|| thrown("cl", Error::Missing { param: "" }, "", None))?;
            isolation_resistor_for_margin(&stage, cl, target)
        }
        "cl" => max_load_capacitance_for_margin(&stage, target),
        "dominantPoleHz" => dominant_pole_for_margin(&stage, target),
        "rg" => max_beta_for_margin(&stage, target),
        _ => {
            let error = Error::UnknownName {
                param: "",
                expected: "cf, riso, cl, dominantPoleHz, rg",
            };
            return Err(thrown("part", error, "", None));
        }
    }
    .map_err(|e| {
        let param = caller_name(e.error.param(), &renames);
        thrown(&param, e.error, e.name.as_str(), None)
    })?;
    to_js(&design)
}

/// Options of `circuitStep`.
struct StepOptions {
    circuit: Json,
    input: Option<String>,
    output: Option<String>,
    output_minus: Option<String>,
    output_element: Option<String>,
    settle_band: f64,
    points: u32,
    spread_point: Option<String>,
}

impl FromOptions for StepOptions {
    const FIELDS: &'static [&'static str] = &[
        "circuit",
        "input",
        "output",
        "outputMinus",
        "outputElement",
        "settleBand",
        "points",
        "spreadPoint",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        StepOptions {
            circuit: f.document("circuit"),
            input: f.opt_text("input"),
            output: f.opt_text("output"),
            output_minus: f.opt_text("outputMinus"),
            output_element: f.opt_text("outputElement"),
            settle_band: f.num_or("settleBand", 0.01),
            points: f.whole_or("points", 400),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The step response of a circuit (or stage) by residues at its poles
/// (`stage::step::circuit_step`, docs/stage.md), from `{circuit, input, output,
/// outputMinus, outputElement, settleBand, points, spreadPoint}`: `{finalValue,
/// overshootPercent, peakTimeS, undershootPercent, riseTimeS, settlingTimeS,
/// settleBand, timeS, output}` (s, % of the final value; `timeS` and `output` as
/// `Float64Array`s).
#[wasm_bindgen(js_name = circuitStep, unchecked_return_type = "StepResponse")]
pub fn circuit_step_js(
    #[wasm_bindgen(unchecked_param_type = "CircuitStepOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: StepOptions = options::read("", &options)?;
    let d = document(o.circuit, "circuit", o.spread_point.as_deref())?;
    let stage = d.stage();
    let input = name_or(&o.input, stage.map(|s| s.source), "input")?;
    let output = match chosen_output(
        &o.output,
        &o.output_element,
        o.output_minus.as_deref(),
        stage,
    )? {
        Output::Voltage(node, minus) => StepOutput::Voltage(node, minus),
        Output::Current(element) => StepOutput::ResistorCurrent(element),
    };
    let renames = [("settle_band", "settleBand"), ("points", "points")];
    let s = circuit_step(d.circuit(), input, output, o.settle_band, o.points as usize).map_err(
        |e| {
            let param = caller_name(e.error.param(), &renames);
            thrown(&param, e.error, e.name.as_str(), None)
        },
    )?;
    #[derive(Serialize)]
    #[serde(rename_all = "camelCase")]
    struct Metrics {
        final_value: f64,
        overshoot_percent: f64,
        peak_time_s: Option<f64>,
        undershoot_percent: f64,
        rise_time_s: f64,
        settling_time_s: f64,
        settle_band: f64,
    }
    let obj = to_js(&Metrics {
        final_value: s.final_value,
        overshoot_percent: s.overshoot_percent,
        peak_time_s: s.peak_time_s,
        undershoot_percent: s.undershoot_percent,
        rise_time_s: s.rise_time_s,
        settling_time_s: s.settling_time_s,
        settle_band: s.settle_band,
    })?;
    super::set_typed_arrays(
        &obj,
        &[
            ("timeS", &s.waveform.time_s),
            ("output", &s.waveform.output),
        ],
    );
    Ok(obj)
}

/// Options of `circuitGainWithin`.
struct WithinOptions {
    circuit: Json,
    input: Option<String>,
    output: Option<String>,
    output_minus: Option<String>,
    output_element: Option<String>,
    target_gain: f64,
    tolerance: f64,
    from_hz: f64,
    to_hz: f64,
    spread_point: Option<String>,
}

impl FromOptions for WithinOptions {
    const FIELDS: &'static [&'static str] = &[
        "circuit",
        "input",
        "output",
        "outputMinus",
        "outputElement",
        "targetGain",
        "tolerance",
        "fromHz",
        "toHz",
        "spreadPoint",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        WithinOptions {
            circuit: f.document("circuit"),
            input: f.opt_text("input"),
            output: f.opt_text("output"),
            output_minus: f.opt_text("outputMinus"),
            output_element: f.opt_text("outputElement"),
            target_gain: f.num("targetGain"),
            tolerance: f.num("tolerance"),
            from_hz: f.num_or("fromHz", 1.0),
            to_hz: f.num_or("toHz", 1e9),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// The frequency up to which a circuit's (or stage's) closed-loop gain stays
/// within its tolerance (`stage::closed_loop::gain_within_band`), from
/// `{circuit, input, output, outputMinus, outputElement, targetGain, tolerance,
/// fromHz, toHz, spreadPoint}`: `{limitHz, status, gainAtStart}`.
#[wasm_bindgen(js_name = circuitGainWithin, unchecked_return_type = "GainWithin")]
pub fn circuit_gain_within(
    #[wasm_bindgen(unchecked_param_type = "CircuitGainWithinOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: WithinOptions = options::read("", &options)?;
    let d = document(o.circuit, "circuit", o.spread_point.as_deref())?;
    let stage = d.stage();
    let input = name_or(&o.input, stage.map(|s| s.source), "input")?;
    let output = chosen_output(
        &o.output,
        &o.output_element,
        o.output_minus.as_deref(),
        stage,
    )?;
    let renames = [
        ("target", "targetGain"),
        ("from_hz", "fromHz"),
        ("to_hz", "toHz"),
    ];
    let w = gain_within_band(
        d.circuit(),
        input,
        output,
        o.target_gain,
        o.tolerance,
        o.from_hz,
        o.to_hz,
    )
    .map_err(|e| {
        let param = caller_name(e.error.param(), &renames);
        thrown(&param, e.error, e.name.as_str(), None)
    })?;
    to_js(&w)
}

/// Options of `stageDistortion`.
struct StageDistortionOptions {
    stage: Json,
    hd2: f64,
    hd3: f64,
    amplitude: f64,
    level: f64,
    frequency_hz: f64,
    spread_point: Option<String>,
}

impl FromOptions for StageDistortionOptions {
    const FIELDS: &'static [&'static str] = &[
        "stage",
        "hd2",
        "hd3",
        "amplitude",
        "level",
        "frequencyHz",
        "spreadPoint",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        StageDistortionOptions {
            stage: f.document("stage"),
            hd2: f.num("hd2"),
            hd3: f.num("hd3"),
            amplitude: f.num("amplitude"),
            level: f.num("level"),
            frequency_hz: f.num("frequencyHz"),
            spread_point: f.opt_text("spreadPoint"),
        }
    }
}

/// HD2 and HD3 of a stage at an output level and a signal frequency, the
/// amplifier's nonlinearity from its open-loop figures
/// (`stage::distortion::stage_distortion_at`), from `{stage, hd2, hd3,
/// amplitude, level, frequencyHz, spreadPoint}`: the object of
/// `distortionAtFrequency`.
#[wasm_bindgen(js_name = stageDistortion, unchecked_return_type = "FrequencyDistortion")]
pub fn stage_distortion(
    #[wasm_bindgen(unchecked_param_type = "StageDistortionOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: StageDistortionOptions = options::read("", &options)?;
    let Document::Stage(_, stage) = document(o.stage, "stage", o.spread_point.as_deref())? else {
        let error = Error::UnknownName {
            param: "",
            expected: "loopwright-stage",
        };
        return Err(thrown("stage.format", error, "", None));
    };
    let open = OpenLoopDistortion {
        hd2: o.hd2,
        hd3: o.hd3,
        amplitude: o.amplitude,
    };
    let renames = [("frequency_hz", "frequencyHz")];
    let d = stage_distortion_at(&stage, &open, o.level, o.frequency_hz).map_err(|e| {
        let param = caller_name(e.error.param(), &renames);
        thrown(&param, e.error, e.name.as_str(), None)
    })?;
    to_js(&d)
}
