//! JS bindings for the feedback relations.

use super::{scalar, throw, to_js, write_scratch};
use crate::feedback::{self as fb, Topology};
use alloc::string::String;
use num_complex::Complex64;
use serde::Serialize;
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const FEEDBACK_TYPES: &str = r#"
/** Topology name in either family, case-insensitive: series-shunt, shunt-series, series-series, shunt-shunt, voltage-series, current-shunt, current-series, voltage-shunt, voltage, current, transconductance, transresistance. */
export type TopologyName = string;
/** The canonical mixing-sampling name. */
export type Topology = "series-shunt" | "shunt-series" | "series-series" | "shunt-shunt";
/** Kind of feedback by |D|. */
export type FeedbackSense = "negative" | "neutral" | "positive" | "oscillation" | "latching";
/** A complex value with its polar form; phase in degrees. */
export interface Phasor { re: number; im: number; magnitude: number; phaseDeg: number; }
export interface FeedbackSummary {
  topology: Topology;
  gainUnit: "V/V" | "A/A" | "A/V" | "V/A";
  betaUnit: "V/V" | "A/A" | "V/A" | "A/V";
  closedLoopGain: number;
  loopGain: number;
  feedbackAmount: number;
  feedbackAmountDb: number;
  sensitivity: number;
  /** 1/β, or null when β = 0. */
  idealGain: number | null;
  /** Af·β − 1, or null when β = 0. */
  gainError: number | null;
  sense: FeedbackSense;
}
export interface LoopPhasorsResult {
  loopGain: Phasor;
  feedbackAmount: Phasor;
  closedLoopGain: Phasor;
  feedbackAmountDb: number;
  sense: FeedbackSense;
}
/** Options of `impedancesWithFeedback`: impedances in Ω; gains of the topology's kind. */
export interface ImpedanceOptions {
  topology: TopologyName;
  /** Input impedance without feedback, real part, Ω. */
  ziRe: number;
  /** Default 0. */
  ziIm?: number;
  /** Output impedance without feedback, real part, Ω. */
  zoRe: number;
  /** Default 0. */
  zoIm?: number;
  /** Open-loop gain A, real part. */
  aRe: number;
  /** Default 0. */
  aIm?: number;
  /** Feedback factor β, real part. */
  betaRe: number;
  /** Default 0. */
  betaIm?: number;
}
export interface FeedbackImpedances { input: Phasor; output: Phasor; feedbackAmount: Phasor; }
export interface GainCeiling { closedLoopGain: number; beta: number; }
export interface GainSpread {
  atMin: number; atTyp: number; atMax: number;
  lowPercent: number; highPercent: number;
  spreadPercent: number; spreadPpm: number;
  sensitivity: number; positiveFeedback: boolean;
}
export interface TopologyInfo {
  name: Topology;
  samplingMixingName: "voltage-series" | "current-shunt" | "current-series" | "voltage-shunt";
  amplifierKind: "voltage" | "current" | "transconductance" | "transresistance";
  mixing: "series" | "shunt";
  sampling: "voltage" | "current";
  gainUnit: string;
  betaUnit: string;
}
"#;

fn topology(name: &str) -> Result<Topology, JsValue> {
    throw(name.parse())
}

/// A complex number as a JS object, with its polar form for display.
#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct Phasor {
    re: f64,
    im: f64,
    magnitude: f64,
    phase_deg: f64,
}

impl From<Complex64> for Phasor {
    fn from(z: Complex64) -> Self {
        Phasor {
            re: z.re,
            im: z.im,
            magnitude: z.norm(),
            phase_deg: z.arg().to_degrees(),
        }
    }
}

/// Closed-loop gain Af = A/(1 + Aβ).
#[wasm_bindgen(js_name = closedLoopGain)]
pub fn closed_loop_gain(a: f64, beta: f64) -> f64 {
    scalar(fb::closed_loop_gain(a, beta))
}

/// Loop gain T = Aβ.
#[wasm_bindgen(js_name = loopGain)]
pub fn loop_gain(a: f64, beta: f64) -> f64 {
    scalar(fb::loop_gain(a, beta))
}

/// Amount of feedback D = 1 + Aβ.
#[wasm_bindgen(js_name = feedbackAmount)]
pub fn feedback_amount(a: f64, beta: f64) -> f64 {
    scalar(fb::feedback_amount(a, beta))
}

/// Amount of feedback in dB, 20·log10|1 + Aβ|.
#[wasm_bindgen(js_name = feedbackAmountDb)]
pub fn feedback_amount_db(a: f64, beta: f64) -> f64 {
    scalar(fb::feedback_amount_db(a, beta))
}

/// Gain sensitivity 1/(1 + Aβ).
#[wasm_bindgen(js_name = gainSensitivity)]
pub fn gain_sensitivity(a: f64, beta: f64) -> f64 {
    scalar(fb::gain_sensitivity(a, beta))
}

/// All feedback relations of one stage: `{topology, gainUnit, betaUnit,
/// closedLoopGain, loopGain, feedbackAmount, feedbackAmountDb, sensitivity,
/// idealGain, gainError, sense}`.
#[wasm_bindgen(js_name = summarizeFeedback, unchecked_return_type = "FeedbackSummary")]
pub fn summarize_feedback(
    #[wasm_bindgen(unchecked_param_type = "TopologyName")] topology_name: &str,
    a: f64,
    beta: f64,
) -> Result<JsValue, JsValue> {
    to_js(&throw(fb::summarize(topology(topology_name)?, a, beta))?)
}

/// The kinds of feedback in the order `summarizeFeedbackPacked` numbers them.
const SENSES: [fb::FeedbackSense; 5] = [
    fb::FeedbackSense::Negative,
    fb::FeedbackSense::Neutral,
    fb::FeedbackSense::Positive,
    fb::FeedbackSense::Oscillation,
    fb::FeedbackSense::Latching,
];

/// Internal, for the entry module's `summarizeFeedback`: the index of a topology
/// name (either family, any case) in catalog order, or NaN with the error kept
/// (see `scalar` in mod.rs).
#[wasm_bindgen(js_name = topologyIndex)]
pub fn topology_index(
    #[wasm_bindgen(unchecked_param_type = "TopologyName")] topology_name: &str,
) -> f64 {
    scalar(
        topology_name
            .parse::<Topology>()
            .map(|t| Topology::ALL.iter().position(|&x| x == t).unwrap_or(0) as f64),
    )
}

/// Internal, for the entry module: the numbers of `summarizeFeedback` for the
/// topology at `topologyIndex` (catalog order), written to the scratch area
/// (`scratchView()`) as `[closedLoopGain, loopGain, feedbackAmount, feedbackAmountDb,
/// sensitivity, idealGain, gainError, sense]` — NaN where the object has null,
/// `sense` as an index into `feedbackLabels().senses`. Returns 0, or NaN with the
/// error kept (see `scalar`). The entry module builds the object in JS:
/// serde-wasm-bindgen crosses the boundary once per field.
#[wasm_bindgen(js_name = summarizeFeedbackPacked)]
pub fn summarize_feedback_packed(topology_index: u32, a: f64, beta: f64) -> f64 {
    let topology =
        Topology::ALL
            .get(topology_index as usize)
            .copied()
            .ok_or(crate::Error::OutOfDomain {
                param: "topology",
                requirement: "must be an index of one of the four topologies (0 to 3)",
            });
    scalar(topology.and_then(|t| fb::summarize(t, a, beta)).map(|s| {
        let sense = SENSES.iter().position(|&x| x == s.sense).unwrap_or(0) as f64;
        write_scratch(&[
            s.closed_loop_gain,
            s.loop_gain,
            s.feedback_amount,
            s.feedback_amount_db,
            s.sensitivity,
            s.ideal_gain.unwrap_or(f64::NAN),
            s.gain_error.unwrap_or(f64::NAN),
            sense,
        ]);
        0.0
    }))
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct TopologyLabels {
    topology: Topology,
    gain_unit: &'static str,
    beta_unit: &'static str,
}

#[derive(Serialize)]
struct FeedbackLabels {
    topologies: [TopologyLabels; 4],
    senses: [fb::FeedbackSense; 5],
}

/// Internal, for the entry module: the strings `summarizeFeedbackPacked` leaves
/// out, `{topologies: [{topology, gainUnit, betaUnit}] (catalog order), senses}`,
/// serialised from the same types as `summarizeFeedback`'s object.
#[wasm_bindgen(js_name = feedbackLabels)]
pub fn feedback_labels() -> Result<JsValue, JsValue> {
    let topologies = Topology::ALL.map(|t| TopologyLabels {
        topology: t,
        gain_unit: t.gain_unit(),
        beta_unit: t.beta_unit(),
    });
    to_js(&FeedbackLabels {
        topologies,
        senses: SENSES,
    })
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct PhasorResult {
    loop_gain: Phasor,
    feedback_amount: Phasor,
    closed_loop_gain: Phasor,
    feedback_amount_db: f64,
    sense: fb::FeedbackSense,
}

/// Phasor forms: `{loopGain, feedbackAmount, closedLoopGain}` each as
/// `{re, im, magnitude, phaseDeg}`, plus `feedbackAmountDb` and `sense`.
#[wasm_bindgen(js_name = loopPhasors, unchecked_return_type = "LoopPhasorsResult")]
pub fn loop_phasors(a_re: f64, a_im: f64, beta_re: f64, beta_im: f64) -> Result<JsValue, JsValue> {
    let p = throw(fb::loop_phasors(
        Complex64::new(a_re, a_im),
        Complex64::new(beta_re, beta_im),
    ))?;
    to_js(&PhasorResult {
        loop_gain: p.loop_gain.into(),
        feedback_amount: p.feedback_amount.into(),
        closed_loop_gain: p.closed_loop_gain.into(),
        feedback_amount_db: p.feedback_amount_db,
        sense: p.sense,
    })
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct ImpedanceResult {
    input: Phasor,
    output: Phasor,
    feedback_amount: Phasor,
}

/// The options of `impedancesWithFeedback`: impedances in Ω, the gains of the
/// topology's kind; imaginary parts default to 0.
struct ImpedanceOptions {
    topology: String,
    zi_re: f64,
    zi_im: f64,
    zo_re: f64,
    zo_im: f64,
    a_re: f64,
    a_im: f64,
    beta_re: f64,
    beta_im: f64,
}

impl super::options::FromOptions for ImpedanceOptions {
    const FIELDS: &'static [&'static str] = &[
        "topology", "ziRe", "ziIm", "zoRe", "zoIm", "aRe", "aIm", "betaRe", "betaIm",
    ];
    fn from_fields(f: &mut super::options::Fields) -> Self {
        ImpedanceOptions {
            topology: f.text("topology"),
            zi_re: f.num("ziRe"),
            zi_im: f.num_or("ziIm", 0.0),
            zo_re: f.num("zoRe"),
            zo_im: f.num_or("zoIm", 0.0),
            a_re: f.num("aRe"),
            a_im: f.num_or("aIm", 0.0),
            beta_re: f.num("betaRe"),
            beta_im: f.num_or("betaIm", 0.0),
        }
    }
}

/// Input and output impedance with feedback, from one options object `{topology,
/// ziRe, ziIm, zoRe, zoIm, aRe, aIm, betaRe, betaIm}`: `{input, output,
/// feedbackAmount}` each as `{re, im, magnitude, phaseDeg}`; impedances in Ω.
#[wasm_bindgen(js_name = impedancesWithFeedback, unchecked_return_type = "FeedbackImpedances")]
pub fn impedances_with_feedback(
    #[wasm_bindgen(unchecked_param_type = "ImpedanceOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: ImpedanceOptions = super::options::read("", &options)?;
    // The core names a complex input by its letter; the caller wrote its parts.
    const RENAMES: [(&str, &str); 4] = [
        ("zi", "ziRe"),
        ("zo", "zoRe"),
        ("a", "aRe"),
        ("beta", "betaRe"),
    ];
    let z = fb::impedances_with_feedback(
        topology(&o.topology)?,
        Complex64::new(o.zi_re, o.zi_im),
        Complex64::new(o.zo_re, o.zo_im),
        Complex64::new(o.a_re, o.a_im),
        Complex64::new(o.beta_re, o.beta_im),
    )
    .map_err(|e| super::options::core_error(e, &RENAMES))?;
    to_js(&ImpedanceResult {
        input: z.input.into(),
        output: z.output.into(),
        feedback_amount: z.feedback_amount.into(),
    })
}

/// β for a target closed-loop gain: 1/Af − 1/A.
#[wasm_bindgen(js_name = betaForGain)]
pub fn beta_for_gain(a: f64, target_gain: f64) -> f64 {
    scalar(fb::beta_for_gain(a, target_gain))
}

/// Ideal β for a target closed-loop gain: 1/Af.
#[wasm_bindgen(js_name = idealBeta)]
pub fn ideal_beta(target_gain: f64) -> f64 {
    scalar(fb::ideal_beta(target_gain))
}

/// Least open-loop gain for a gain error (fraction) against 1/β.
#[wasm_bindgen(js_name = minOpenLoopGain)]
pub fn min_open_loop_gain(beta: f64, gain_error: f64) -> f64 {
    scalar(fb::min_open_loop_gain(beta, gain_error))
}

/// Largest closed-loop gain with at least D of feedback: `{closedLoopGain, beta}`.
#[wasm_bindgen(js_name = maxClosedLoopGain, unchecked_return_type = "GainCeiling")]
pub fn max_closed_loop_gain(a: f64, feedback_amount: f64) -> Result<JsValue, JsValue> {
    to_js(&throw(fb::max_closed_loop_gain(a, feedback_amount))?)
}

/// Closed-loop gain over an open-loop gain range: `{atMin, atTyp, atMax,
/// lowPercent, highPercent, spreadPercent, spreadPpm, sensitivity,
/// positiveFeedback}`.
#[wasm_bindgen(js_name = gainSpread, unchecked_return_type = "GainSpread")]
pub fn gain_spread(beta: f64, a_min: f64, a_typ: f64, a_max: f64) -> Result<JsValue, JsValue> {
    to_js(&throw(fb::gain_spread(beta, a_min, a_typ, a_max))?)
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct TopologyInfo {
    name: &'static str,
    sampling_mixing_name: &'static str,
    amplifier_kind: &'static str,
    mixing: fb::Mixing,
    sampling: fb::Sampling,
    gain_unit: &'static str,
    beta_unit: &'static str,
}

/// What a topology name means: `{name, samplingMixingName, amplifierKind,
/// mixing, sampling, gainUnit, betaUnit}`.
#[wasm_bindgen(js_name = topologyInfo, unchecked_return_type = "TopologyInfo")]
pub fn topology_info(
    #[wasm_bindgen(unchecked_param_type = "TopologyName")] topology_name: &str,
) -> Result<JsValue, JsValue> {
    let t = topology(topology_name)?;
    to_js(&TopologyInfo {
        name: t.name(),
        sampling_mixing_name: t.sampling_mixing_name(),
        amplifier_kind: t.amplifier_kind(),
        mixing: t.mixing(),
        sampling: t.sampling(),
        gain_unit: t.gain_unit(),
        beta_unit: t.beta_unit(),
    })
}
