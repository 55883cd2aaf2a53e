//! JS bindings for frequency response, bandwidth and stability.
//!
//! A model is a plain object `{gain, polesHz, zerosHz, rhpZerosHz, rhpPolesHz,
//! complexPoles: [{freqHz, q}], complexZeros, originPoles, lowCutsHz, delayS}`;
//! every field but `gain` may be left out. The amplifier object may also carry
//! `padeOrder` (1…10, default 6) for a delay in pole and step computations. β is
//! either a number (a frequency-independent feedback factor) or such an object.
//! Sweeps come back as objects of `Float64Array`s.

use super::options::{Fields, FromOptions, Plain};
use super::{scalar, set_typed_arrays, to_js, typed_arrays};
use crate::error::Error;
use crate::freq::{self as fq, ComplexPair, FeedbackLoop, TransferModel};
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const FREQ_TYPES: &str = r#"
/** A complex pole or zero pair by its natural frequency (Hz) and Q. */
export interface ComplexPairInput { freqHz: number; q: number; }
/** A list of frequencies: a plain array or a Float64Array. */
export type HzList = readonly number[] | Float64Array;
/**
 * A transfer function as gain, poles and zeros (frequencies in Hz, delay in s).
 * Every field but `gain` may be left out; an unknown field is rejected.
 */
export interface TransferModelInput {
  /** Midband (or DC) gain, signed. */
  gain: number;
  polesHz?: HzList;
  zerosHz?: HzList;
  rhpZerosHz?: HzList;
  rhpPolesHz?: HzList;
  complexPoles?: readonly ComplexPairInput[];
  complexZeros?: readonly ComplexPairInput[];
  /** Integrators (poles at s = 0). */
  originPoles?: number;
  /** Low cuts: a zero at the origin with a pole at each frequency. */
  lowCutsHz?: HzList;
  delayS?: number;
}
/** The amplifier A; it may also set the Padé order (1…10, default 6) used for a delay in the whole loop. */
export interface AmplifierModelInput extends TransferModelInput { padeOrder?: number; }
/** β: a frequency-independent number, or a transfer model (without `padeOrder`). */
export type FeedbackInput = number | TransferModelInput;
/** Options of `loopGainSweep` and `closedLoopSweep`: log-spaced from `startHz` to `stopHz`. */
export interface SweepOptions {
  amplifier: AmplifierModelInput;
  beta: FeedbackInput;
  startHz: number;
  stopHz: number;
  /** Number of frequencies, 2 … 100 000; default 200 (for `loopGainSweepInto` and `closedLoopSweepInto`, the length of their arrays). */
  points?: number;
}
/** A log-spaced frequency sweep; phase continuous, in degrees. */
export interface FrequencySweep { freqHz: Float64Array; magnitudeDb: Float64Array; phaseDeg: Float64Array; }
/** Loop gain T and closed-loop gain Af at one frequency (principal phase). */
export interface LoopPoint { loopGain: Phasor; closedLoopGain: Phasor; }
/** Whether the margins decide stability for this loop. */
export type MarginValidity = "meaningful" | "open-loop-unstable" | "positive-feedback";
/**
 * One crossover and its distance to −1, ≥ 0: phase margin 180° − |∠T| (deg) at a unity-gain
 * crossing, gain margin |20·log10|T|| (dB) at a −180° crossing. `rising`: |T| rises through 1
 * there (unity-gain crossing), or |T| > 1 there so the margin is a gain reduction (−180° crossing).
 */
export interface MarginCrossing { freqHz: number; margin: number; rising: boolean; }
export interface StabilityMargins {
  /** Worst phase margin, deg, negative when the closed loop is unstable; null when |T| never reaches 1. */
  phaseMarginDeg: number | null;
  crossoverHz: number | null;
  /** Worst gain margin, dB, negative when the closed loop is unstable; null when the phase never reaches −180°. */
  gainMarginDb: number | null;
  phaseCrossoverHz: number | null;
  gainCrossings: MarginCrossing[];
  phaseCrossings: MarginCrossing[];
  validity: MarginValidity;
  /** The closed-loop verdict from the poles, which signs the worst margins. */
  closedLoop: StabilityVerdict;
  /** The poles themselves, when asked for with `{ closedLoopPoles: true }`. */
  closedLoopPoles?: ClosedLoopPoles;
}
/** Options of `stabilityMargins`: `closedLoopPoles` (default false) adds the poles that sign the margins to the result. */
export interface MarginOptions { closedLoopPoles?: boolean; }
export type StabilityVerdict = "stable" | "marginal" | "unstable";
/** A closed-loop pole in rad/s with its natural frequency (Hz), damping and Q (null for a real pole). */
export interface ClosedLoopPole { re: number; im: number; naturalHz: number; zeta: number; q: number | null; }
export interface ClosedLoopPoles {
  poles: ClosedLoopPole[];
  verdict: StabilityVerdict;
  /** Least damping ratio among the poles, or null when there are none. */
  minZeta: number | null;
  padeOrder: number;
}
/** Af as a rational function of p = s/ωn, coefficients lowest power first. */
export interface ClosedLoopTransfer { omegaN: number; numerator: number[]; denominator: number[]; }
export interface ClosedLoopBandwidth {
  midbandGain: number;
  highHz: number | null;
  lowHz: number | null;
  bandwidthHz: number | null;
  peakingDb: number;
  peakHz: number | null;
}
/** Step metrics: times in s, overshoot in percent of the final value. */
export interface StepMetrics {
  finalValue: number;
  overshootPercent: number;
  peakTimeS: number | null;
  undershootPercent: number;
  riseTimeS: number;
  settlingTimeS: number;
  settleBand: number;
}
export interface StepWaveform { timeS: Float64Array; output: Float64Array; }
export interface StepResponse extends StepMetrics, StepWaveform {}
/** The step part of `analyzeLoop`: the waveform in plain arrays. */
export interface LoopStep extends StepMetrics { waveform: { timeS: number[]; output: number[] }; }
export interface LoopAnalysis {
  margins: StabilityMargins;
  poles: ClosedLoopPoles;
  bandwidth: ClosedLoopBandwidth | null;
  /** Why `bandwidth` is null. */
  bandwidthNote: string | null;
  step: LoopStep | null;
  /** Why `step` is null. */
  stepNote: string | null;
}
/** A compensation value (a pole in Hz, or β) and the loop it gives. */
export interface CompensationResult {
  value: number;
  phaseMarginDeg: number | null;
  crossoverHz: number | null;
  closedLoopGain: number;
  /** Lower end of the interval, containing `value`, where the target holds (below it the margin misses again). */
  holdsFrom: number;
}
export interface TwoPoleResponse {
  naturalHz: number;
  q: number;
  zeta: number;
  peakingDb: number;
  /** null when the response does not peak. */
  peakHz: number | null;
  overshootPercent: number;
  maximallyFlatLoopGain: number;
}
"#;

struct JsPair {
    freq_hz: f64,
    q: f64,
}

impl FromOptions for JsPair {
    const FIELDS: &'static [&'static str] = &["freqHz", "q"];
    fn from_fields(f: &mut Fields) -> Self {
        JsPair {
            freq_hz: f.num("freqHz"),
            q: f.num("q"),
        }
    }
}

/// A transfer model as the caller writes it; every field but `gain` may be left out.
#[derive(Default)]
struct JsModel {
    gain: f64,
    poles_hz: Vec<f64>,
    zeros_hz: Vec<f64>,
    rhp_zeros_hz: Vec<f64>,
    rhp_poles_hz: Vec<f64>,
    complex_poles: Vec<JsPair>,
    complex_zeros: Vec<JsPair>,
    origin_poles: u32,
    low_cuts_hz: Vec<f64>,
    delay_s: f64,
    pade_order: Option<u32>,
}

impl FromOptions for JsModel {
    const FIELDS: &'static [&'static str] = &[
        "gain",
        "polesHz",
        "zerosHz",
        "rhpZerosHz",
        "rhpPolesHz",
        "complexPoles",
        "complexZeros",
        "originPoles",
        "lowCutsHz",
        "delayS",
        "padeOrder",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        JsModel {
            gain: f.num("gain"),
            poles_hz: f.nums("polesHz"),
            zeros_hz: f.nums("zerosHz"),
            rhp_zeros_hz: f.nums("rhpZerosHz"),
            rhp_poles_hz: f.nums("rhpPolesHz"),
            complex_poles: f.objects("complexPoles"),
            complex_zeros: f.objects("complexZeros"),
            origin_poles: f.whole_or("originPoles", 0),
            low_cuts_hz: f.nums("lowCutsHz"),
            delay_s: f.num_or("delayS", 0.0),
            pade_order: f.opt_whole("padeOrder"),
        }
    }
}

fn pairs(v: Vec<JsPair>) -> Vec<ComplexPair> {
    v.into_iter()
        .map(|p| ComplexPair {
            freq_hz: p.freq_hz,
            q: p.q,
        })
        .collect()
}

/// The core names the amplifier `a`; the JS caller calls it `amplifier`, which also
/// carries the loop's Padé order.
const RENAMES: [(&str, &str); 2] = [("a", "amplifier"), ("pade_order", "amplifier.padeOrder")];

/// A core error under the caller's names (`a.poles_hz` → `amplifier.polesHz`).
fn throw<T>(r: crate::Result<T>) -> Result<T, JsValue> {
    r.map_err(|e| super::options::core_error(e, &RENAMES))
}

impl JsModel {
    /// The core's model, and the Padé order it asks for.
    fn into_core(self) -> (TransferModel, Option<u32>) {
        (
            TransferModel {
                gain: self.gain,
                poles_hz: self.poles_hz,
                zeros_hz: self.zeros_hz,
                rhp_zeros_hz: self.rhp_zeros_hz,
                rhp_poles_hz: self.rhp_poles_hz,
                complex_poles: pairs(self.complex_poles),
                complex_zeros: pairs(self.complex_zeros),
                origin_poles: self.origin_poles,
                low_cuts_hz: self.low_cuts_hz,
                delay_s: self.delay_s,
            },
            self.pade_order,
        )
    }
}

/// β as the caller gives it: a number, or a transfer model object.
enum JsBeta {
    Constant(f64),
    Model(JsModel),
}

impl JsBeta {
    /// The required field `key` of `f` as β: a number or a model object.
    fn field(f: &mut Fields, key: &str) -> JsBeta {
        match f.raw(key) {
            Some((_, Plain::Number(x))) => JsBeta::Constant(x),
            Some((at, value @ Plain::Map(_))) => {
                let path = f.key_path(key);
                f.nested(at, path, value)
                    .map_or(JsBeta::Constant(0.0), JsBeta::Model)
            }
            Some((at, other)) => {
                f.refuse(key, at, &other, "a number or a model object");
                JsBeta::Constant(0.0)
            }
            None => {
                f.missing(key);
                JsBeta::Constant(0.0)
            }
        }
    }
}

/// The loop of an amplifier model and β, the Padé order from the amplifier.
fn loop_of(amplifier: JsModel, beta: JsBeta) -> Result<FeedbackLoop, JsValue> {
    let (am, pade) = amplifier.into_core();
    let bm = match beta {
        JsBeta::Constant(b) => TransferModel::constant(b),
        JsBeta::Model(m) => match m.into_core() {
            (m, None) => m,
            (_, Some(_)) => {
                return Err(super::js_error(Error::OutOfDomain {
                    param: "beta.pade_order",
                    requirement:
                        "belongs on the amplifier object, which sets it for the whole loop",
                }))
            }
        },
    };
    throw(FeedbackLoop::with_pade_order(
        am,
        bm,
        pade.unwrap_or(crate::freq::model::DEFAULT_PADE_ORDER),
    ))
}

/// Read a model object named `param` (`amplifier`) through the options reader: a
/// missing `gain`, an unknown field or a value of the wrong kind is an error whose
/// `param` is the field's path (`amplifier.polesHz[2]`).
fn model(param: &str, v: &JsValue) -> Result<(TransferModel, Option<u32>), JsValue> {
    Ok(super::options::read::<JsModel>(param, v)?.into_core())
}

/// The loop of the positional `amplifier` and `beta` arguments.
fn feedback_loop(a: &JsValue, beta: &JsValue) -> Result<FeedbackLoop, JsValue> {
    let amplifier: JsModel = super::options::read("amplifier", a)?;
    let beta: JsBeta = match beta.as_f64() {
        Some(b) => JsBeta::Constant(b),
        None => JsBeta::Model(super::options::read("beta", beta)?),
    };
    loop_of(amplifier, beta)
}

/// The options of `loopGainSweep` and `closedLoopSweep`.
struct SweepOptions {
    amplifier: JsModel,
    beta: JsBeta,
    start_hz: f64,
    stop_hz: f64,
    /// `None` when left out: [`DEFAULT_SWEEP_POINTS`], or the length of the
    /// caller's arrays for the `…Into` forms.
    points: Option<u32>,
}

/// Points of a sweep when `points` is left out.
const DEFAULT_SWEEP_POINTS: u32 = 200;

impl FromOptions for SweepOptions {
    const FIELDS: &'static [&'static str] = &["amplifier", "beta", "startHz", "stopHz", "points"];
    fn from_fields(f: &mut Fields) -> Self {
        SweepOptions {
            amplifier: f.object("amplifier"),
            beta: JsBeta::field(f, "beta"),
            start_hz: f.num("startHz"),
            stop_hz: f.num("stopHz"),
            points: f.opt_whole("points"),
        }
    }
}

/// Which sweep a call makes.
#[derive(Clone, Copy)]
enum SweepKind {
    /// T = A·β ([`fq::loop_gain_sweep`]).
    LoopGain,
    /// Af = A/(1 + A·β) ([`fq::closed_loop_sweep`]).
    ClosedLoop,
}

/// The sweep `kind` of the options object: its loop and range read (errors under the
/// caller's field names), then swept.
///
/// `into_length`: the length of the caller's arrays for the `…Into` forms, which
/// `points` must equal when given and stands for when left out (an error on the
/// count then names `into.freqHz`, the place the count came from).
fn sweep(
    options: &JsValue,
    kind: SweepKind,
    into_length: Option<u32>,
) -> Result<fq::Sweep, JsValue> {
    let o: SweepOptions = super::options::read("", options)?;
    let given = o.points;
    let l = loop_of(o.amplifier, o.beta)?;
    let points = match (given, into_length) {
        (Some(p), Some(n)) if p != n => {
            let e = Error::OutOfDomain {
                param: "",
                requirement: "must hold as many numbers as `points`",
            };
            let sentence = alloc::format!("into.freqHz: holds {n} numbers, but `points` is {p}");
            return Err(super::options::error_at("into.freqHz", e, Some(sentence)));
        }
        (Some(p), _) => p,
        (None, Some(n)) => n,
        (None, None) => DEFAULT_SWEEP_POINTS,
    };
    let s = match kind {
        SweepKind::LoopGain => fq::loop_gain_sweep(&l, o.start_hz, o.stop_hz, points as usize),
        SweepKind::ClosedLoop => fq::closed_loop_sweep(&l, o.start_hz, o.stop_hz, points as usize),
    };
    let renames: &[(&str, &str)] = match (given, into_length) {
        (None, Some(_)) => &[("points", "into.freqHz")],
        _ => &[],
    };
    s.map_err(|e| super::options::core_error(e, renames))
}

/// The three arrays of a sweep as `{freqHz, magnitudeDb, phaseDeg}`.
fn sweep_arrays(s: &fq::Sweep) -> JsValue {
    typed_arrays(&[
        ("freqHz", &s.freq_hz),
        ("magnitudeDb", &s.magnitude_db),
        ("phaseDeg", &s.phase_deg),
    ])
}

/// Loop-gain sweep T = A·β from `{amplifier, beta, startHz, stopHz, points}`:
/// `{freqHz, magnitudeDb, phaseDeg}` as `Float64Array`s, phase continuous; at most
/// 100 000 points (default 200).
#[wasm_bindgen(js_name = loopGainSweep, unchecked_return_type = "FrequencySweep")]
pub fn loop_gain_sweep(
    #[wasm_bindgen(unchecked_param_type = "SweepOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    Ok(sweep_arrays(&sweep(&options, SweepKind::LoopGain, None)?))
}

/// Closed-loop sweep Af = A/(1 + Aβ) from the options of `loopGainSweep`:
/// `{freqHz, magnitudeDb, phaseDeg}` as `Float64Array`s.
#[wasm_bindgen(js_name = closedLoopSweep, unchecked_return_type = "FrequencySweep")]
pub fn closed_loop_sweep(
    #[wasm_bindgen(unchecked_param_type = "SweepOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    Ok(sweep_arrays(&sweep(&options, SweepKind::ClosedLoop, None)?))
}

std::thread_local! {
    /// The last sweep of the `…Into` forms, kept in the module's memory until the
    /// entry module has copied it into the caller's arrays ([`held_sweep_view`]).
    static HELD_SWEEP: core::cell::RefCell<fq::Sweep> = core::cell::RefCell::new(fq::Sweep::default());
}

/// Internal, for the entry module's `loopGainSweepInto` and `closedLoopSweepInto`:
/// the sweep of `loopGainSweep` (`closedLoop` false) or `closedLoopSweep` (true),
/// kept in the module's memory instead of copied into three new `Float64Array`s,
/// with `points` defaulting to `length`, the length of the caller's arrays. Returns
/// the number of points; the entry module then copies each array out through
/// [`held_sweep_view`]. (Three fresh 80 kB arrays cost Node 10–90 µs a call for a
/// 10 000-point sweep, bench/RESULTS.md.)
#[wasm_bindgen(js_name = sweepHeld)]
pub fn sweep_held(options: JsValue, closed_loop: bool, length: u32) -> Result<u32, JsValue> {
    let kind = if closed_loop {
        SweepKind::ClosedLoop
    } else {
        SweepKind::LoopGain
    };
    let s = sweep(&options, kind, Some(length))?;
    let n = s.freq_hz.len() as u32;
    HELD_SWEEP.with(|held| *held.borrow_mut() = s);
    Ok(n)
}

/// Internal: a `Float64Array` over one array of the held sweep in the module's
/// memory — 0 frequencies (Hz), 1 magnitudes (dB), 2 phases (deg) — to be copied out
/// at once: it goes stale when the memory grows.
#[wasm_bindgen(js_name = heldSweepView)]
pub fn held_sweep_view(which: u32) -> js_sys::Float64Array {
    HELD_SWEEP.with(|held| {
        let s = held.borrow();
        let values: &[f64] = match which {
            0 => &s.freq_hz,
            1 => &s.magnitude_db,
            _ => &s.phase_deg,
        };
        super::memory_view(values.as_ptr() as usize, values.len())
    })
}

#[derive(serde::Serialize)]
#[serde(rename_all = "camelCase")]
struct Phasor {
    re: f64,
    im: f64,
    magnitude: f64,
    phase_deg: f64,
}

/// Loop gain and closed-loop gain at one frequency: `{loopGain, closedLoopGain}`,
/// each `{re, im, magnitude, phaseDeg}` (principal phase).
#[wasm_bindgen(js_name = loopAt, unchecked_return_type = "LoopPoint")]
pub fn loop_at(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
    f_hz: f64,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    let t = throw(fq::loop_gain_at(&l, f_hz))?;
    let af = throw(fq::closed_loop_gain_at(&l, f_hz))?;
    #[derive(serde::Serialize)]
    #[serde(rename_all = "camelCase")]
    struct At {
        loop_gain: Phasor,
        closed_loop_gain: Phasor,
    }
    let p = |z: num_complex::Complex64| Phasor {
        re: z.re,
        im: z.im,
        magnitude: z.norm(),
        phase_deg: z.arg().to_degrees(),
    };
    to_js(&At {
        loop_gain: p(t),
        closed_loop_gain: p(af),
    })
}

/// Stability margins: `{phaseMarginDeg, crossoverHz, gainMarginDb,
/// phaseCrossoverHz, gainCrossings, phaseCrossings, validity, closedLoop}`; a margin
/// is `null` when unbounded (no crossover of that kind). With `{closedLoopPoles:
/// true}` the result also carries `closedLoopPoles` (as `closedLoopPoles()` returns
/// them): the margins are signed by those poles, so asking here computes them once.
#[wasm_bindgen(js_name = stabilityMargins, unchecked_return_type = "StabilityMargins")]
pub fn stability_margins(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
    #[wasm_bindgen(unchecked_param_type = "MarginOptions | undefined")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    let with_poles = !options.is_undefined()
        && super::options::read::<MarginOptions>("", &options)?.closed_loop_poles;
    if !with_poles {
        return to_js(&throw(fq::stability_margins(&l))?);
    }
    let (m, p) = throw(fq::margins_and_poles(&l))?;
    let obj = to_js(&m)?;
    js_sys::Reflect::set(&obj, &"closedLoopPoles".into(), &to_js(&p)?)?;
    Ok(obj)
}

/// The options of `stabilityMargins` (its third argument, which may be left out).
struct MarginOptions {
    closed_loop_poles: bool,
}

impl FromOptions for MarginOptions {
    const FIELDS: &'static [&'static str] = &["closedLoopPoles"];
    fn from_fields(f: &mut Fields) -> Self {
        MarginOptions {
            closed_loop_poles: f.flag_or("closedLoopPoles", false),
        }
    }
}

/// Closed-loop poles: `{poles: [{re, im, naturalHz, zeta, q}], verdict, minZeta,
/// padeOrder}`; `verdict` is `"stable"`, `"marginal"` or `"unstable"`.
#[wasm_bindgen(js_name = closedLoopPoles, unchecked_return_type = "ClosedLoopPoles")]
pub fn closed_loop_poles(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    to_js(&throw(fq::closed_loop_poles(&l))?)
}

/// The closed-loop gain as a rational function of p = s/ωn: `{omegaN, numerator,
/// denominator}`, coefficients lowest power first (a delay by its Padé approximant).
#[wasm_bindgen(js_name = closedLoopTransfer, unchecked_return_type = "ClosedLoopTransfer")]
pub fn closed_loop_transfer(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    to_js(&throw(fq::closed_loop_transfer(&l))?)
}

/// Closed-loop −3 dB bandwidth and peaking: `{midbandGain, highHz, lowHz,
/// bandwidthHz, peakingDb, peakHz}`.
#[wasm_bindgen(js_name = closedLoopBandwidth, unchecked_return_type = "ClosedLoopBandwidth")]
pub fn closed_loop_bandwidth(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    to_js(&throw(fq::closed_loop_bandwidth(&l))?)
}

/// Step response: `{finalValue, overshootPercent, peakTimeS, undershootPercent,
/// riseTimeS, settlingTimeS, settleBand, timeS, output}` with `timeS` and
/// `output` as `Float64Array`s of `points` samples.
#[wasm_bindgen(js_name = stepResponse, unchecked_return_type = "StepResponse")]
pub fn step_response(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
    settle_band: f64,
    points: usize,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    let s = throw(fq::step_response(&l, settle_band, points))?;
    #[derive(serde::Serialize)]
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
    set_typed_arrays(
        &obj,
        &[
            ("timeS", &s.waveform.time_s),
            ("output", &s.waveform.output),
        ],
    );
    Ok(obj)
}

/// Everything about one loop: `{margins, poles, bandwidth, bandwidthNote, step,
/// stepNote}` (the objects of `stabilityMargins`, `closedLoopPoles`,
/// `closedLoopBandwidth` and `stepResponse`, with the step waveform as
/// `step.waveform = {timeS, output}` in plain arrays); a part that does not exist
/// for this loop is `null` with its note.
#[wasm_bindgen(js_name = analyzeLoop, unchecked_return_type = "LoopAnalysis")]
pub fn analyze_loop(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
    settle_band: f64,
    points: usize,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    to_js(&throw(fq::analyze_loop(&l, settle_band, points))?)
}

/// Step waveform over a chosen duration (any loop): `{timeS, output}` as
/// `Float64Array`s.
#[wasm_bindgen(js_name = stepWaveform, unchecked_return_type = "StepWaveform")]
pub fn step_waveform(
    #[wasm_bindgen(unchecked_param_type = "AmplifierModelInput")] amplifier: JsValue,
    #[wasm_bindgen(unchecked_param_type = "FeedbackInput")] beta: JsValue,
    duration_s: f64,
    points: usize,
) -> Result<JsValue, JsValue> {
    let l = feedback_loop(&amplifier, &beta)?;
    let w = throw(fq::step_waveform(&l, duration_s, points))?;
    Ok(typed_arrays(&[("timeS", &w.time_s), ("output", &w.output)]))
}

/// The dominant pole (Hz) that gives a target phase margin at a constant β:
/// `{value, phaseMarginDeg, crossoverHz, closedLoopGain}`.
#[wasm_bindgen(js_name = dominantPoleForMargin, unchecked_return_type = "CompensationResult")]
pub fn dominant_pole_for_margin(
    #[wasm_bindgen(unchecked_param_type = "TransferModelInput")] amplifier: JsValue,
    beta: f64,
    target_pm_deg: f64,
) -> Result<JsValue, JsValue> {
    let (am, _) = model("amplifier", &amplifier)?;
    to_js(&throw(fq::dominant_pole_for_margin(
        &am,
        beta,
        target_pm_deg,
    ))?)
}

/// The largest constant β (up to `betaLimit`) that keeps a target phase margin:
/// `{value, phaseMarginDeg, crossoverHz, closedLoopGain}`.
#[wasm_bindgen(js_name = maxBetaForMargin, unchecked_return_type = "CompensationResult")]
pub fn max_beta_for_margin(
    #[wasm_bindgen(unchecked_param_type = "TransferModelInput")] amplifier: JsValue,
    target_pm_deg: f64,
    beta_limit: f64,
) -> Result<JsValue, JsValue> {
    let (am, _) = model("amplifier", &amplifier)?;
    to_js(&throw(fq::max_beta_for_margin(
        &am,
        target_pm_deg,
        beta_limit,
    ))?)
}

/// Two-pole closed loop in closed form: `{naturalHz, q, zeta, peakingDb, peakHz,
/// overshootPercent, maximallyFlatLoopGain}`.
#[wasm_bindgen(js_name = twoPoleResponse, unchecked_return_type = "TwoPoleResponse")]
pub fn two_pole_response(f1: f64, f2: f64, t0: f64) -> Result<JsValue, JsValue> {
    to_js(&throw(fq::two_pole_response(f1, f2, t0))?)
}

/// Single-pole closed-loop upper −3 dB frequency fH·(1 + A0·β), Hz.
#[wasm_bindgen(js_name = singlePoleHighCutoff)]
pub fn single_pole_high_cutoff(f_h: f64, a0: f64, beta: f64) -> f64 {
    scalar(fq::single_pole_high_cutoff(f_h, a0, beta))
}

/// Single low cut closed-loop lower −3 dB frequency fL/(1 + AM·β), Hz.
#[wasm_bindgen(js_name = singlePoleLowCutoff)]
pub fn single_pole_low_cutoff(f_l: f64, am: f64, beta: f64) -> f64 {
    scalar(fq::single_pole_low_cutoff(f_l, am, beta))
}

/// Gain–bandwidth product A0·fH.
#[wasm_bindgen(js_name = gainBandwidth)]
pub fn gain_bandwidth(a0: f64, f_h: f64) -> f64 {
    scalar(fq::gain_bandwidth(a0, f_h))
}
