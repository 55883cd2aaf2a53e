//! JS bindings for distortion under feedback and slew-rate limits.
//!
//! A power-series amplifier is given by its three coefficients `a1, a2, a3`;
//! amplitudes are peak values; `amplitudeAt` is `"input"` or `"output"`. The
//! exports with more than four inputs take one options object (camelCase fields,
//! defaults in the `.d.ts`).

use super::options::{core_error, read};
use super::options::{Fields, FromOptions};
use super::{scalar, throw, to_js, typed_arrays};
use crate::distortion::{self as nl, AmplitudeAt, PowerSeries};
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const TYPES: &str = r#"
/** Coefficients of y = a1·x + a2·x² + a3·x³. */
export interface PowerSeries { a1: number; a2: number; a3: number; }
export interface Distortion { inputAmplitude: number; outputAmplitude: number; hd2: number; hd3: number; }
export interface FeedbackDistortion {
  closedSeries: PowerSeries; feedbackAmount: number; amplitudeAt: "input" | "output";
  open: Distortion; closed: Distortion; hd2Ratio: number | null; hd3Ratio: number | null;
}
export interface Spectrum { inputAmplitude: number; dc: number; harmonics: number[]; hd2: number; hd3: number; thd: number; samples: number; }
export interface SeriesCheck {
  inputAmplitude: number; seriesHd2: number; seriesHd3: number; numericHd2: number; numericHd3: number;
  hd2Difference: number; hd3Difference: number;
}
/** The amplifier y = a1·x + a2·x² + a3·x³ in a loop with feedback factor beta. */
export interface LoopSeriesOptions { a1: number; a2: number; a3: number; beta: number; }
/** Options of `feedbackDistortion` and `harmonicDistortion` (no beta). */
export interface DistortionOptions {
  a1: number; a2: number; a3: number; beta?: number;
  /** Peak amplitude at the `amplitudeAt` port. */
  amplitude: number;
  /** Default "output". */
  amplitudeAt?: "input" | "output";
}
/** Options of `distortionAtFrequency`: the amplifier's dominant pole and the signal frequency. */
export interface FrequencyDistortionOptions extends LoopSeriesOptions {
  amplitude: number;
  /** Default "output". */
  amplitudeAt?: "input" | "output";
  /** Dominant pole of the amplifier, Hz. */
  poleHz: number;
  /** Signal frequency, Hz (0: the static result). */
  frequencyHz: number;
}
export interface LoopGainAt { frequencyHz: number; magnitude: number; phaseDeg: number; }
export interface FrequencyDistortion {
  frequencyHz: number; poleHz: number; dcLoopGain: number;
  /** The loop gain at f, 2f and 3f. */
  loopGains: LoopGainAt[];
  amplitudeAt: "input" | "output";
  open: Distortion; closed: Distortion; closedAtDc: Distortion;
  hd2Ratio: number | null; hd3Ratio: number | null;
}
/** Options of `seriesFromDistortion`: measured signed HD2, HD3 (fractions) at a peak amplitude. */
export interface MeasuredDistortionOptions { a1: number; hd2: number; hd3: number; amplitude: number; amplitudeAt?: "input" | "output"; }
/** Options of `closedLoopSpectrum` and `seriesCheck`. */
export interface SpectrumOptions extends LoopSeriesOptions {
  /** Peak input amplitude. */
  amplitude: number;
  /** Samples per period of the DFT. Default 64. */
  samples?: number;
}
/** Options of `seriesValiditySweep`. */
export interface ValiditySweepOptions extends LoopSeriesOptions {
  amplitudeMin: number; amplitudeMax: number;
  /** Default 60. */
  points?: number;
  /** Relative difference at which the series stops holding. Default 0.1. */
  tolerance?: number;
  /** Samples per period. Default 256. */
  samples?: number;
}
export interface ValiditySweep {
  amplitudes: Float64Array; seriesHd2: Float64Array; seriesHd3: Float64Array; numericHd2: Float64Array; numericHd3: Float64Array;
  foldAmplitude: number | null; hd3LimitAmplitude: number | null; hd3HoldsThroughout: boolean;
  /** Numeric HD2/HD3 below this fraction are rounding noise of the numeric path, not results. */
  numericFloor: number;
}
"#;

fn series(a1: f64, a2: f64, a3: f64) -> Result<PowerSeries, JsValue> {
    throw(PowerSeries::new(a1, a2, a3))
}

fn option_number(x: Option<f64>) -> JsValue {
    x.map_or(JsValue::NULL, JsValue::from)
}

/// Closed-loop coefficients under feedback β: `{a1, a2, a3}` holding b1, b2, b3.
#[wasm_bindgen(js_name = closedLoopSeries, unchecked_return_type = "PowerSeries")]
pub fn closed_loop_series(a1: f64, a2: f64, a3: f64, beta: f64) -> Result<JsValue, JsValue> {
    to_js(&throw(nl::closed_loop_series(&series(a1, a2, a3)?, beta))?)
}

fn named(e: crate::Error) -> JsValue {
    core_error(e, &[])
}

fn default_output() -> String {
    "output".into()
}

/// Options of `seriesFromDistortion`.
struct MeasuredOptions {
    a1: f64,
    hd2: f64,
    hd3: f64,
    amplitude: f64,
    amplitude_at: String,
}

impl FromOptions for MeasuredOptions {
    const FIELDS: &'static [&'static str] = &["a1", "hd2", "hd3", "amplitude", "amplitudeAt"];
    fn from_fields(f: &mut Fields) -> Self {
        MeasuredOptions {
            a1: f.num("a1"),
            hd2: f.num("hd2"),
            hd3: f.num("hd3"),
            amplitude: f.num("amplitude"),
            amplitude_at: f.text_or("amplitudeAt", default_output),
        }
    }
}

/// Coefficients `{a1, a2, a3}` from signed HD2 and HD3 (fractions) measured at a
/// peak amplitude at the `"input"` or `"output"`.
#[wasm_bindgen(js_name = seriesFromDistortion, unchecked_return_type = "PowerSeries")]
pub fn series_from_distortion(
    #[wasm_bindgen(unchecked_param_type = "MeasuredDistortionOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: MeasuredOptions = read("", &options)?;
    let at: AmplitudeAt = o.amplitude_at.parse().map_err(named)?;
    to_js(&nl::series_from_distortion(o.a1, o.hd2, o.hd3, o.amplitude, at).map_err(named)?)
}

/// Options of `harmonicDistortion` and `feedbackDistortion`.
struct DistortionOptions {
    a1: f64,
    a2: f64,
    a3: f64,
    beta: Option<f64>,
    amplitude: f64,
    amplitude_at: String,
}

impl FromOptions for DistortionOptions {
    const FIELDS: &'static [&'static str] = &["a1", "a2", "a3", "beta", "amplitude", "amplitudeAt"];
    fn from_fields(f: &mut Fields) -> Self {
        DistortionOptions {
            a1: f.num("a1"),
            a2: f.num("a2"),
            a3: f.num("a3"),
            beta: f.opt_num("beta"),
            amplitude: f.num("amplitude"),
            amplitude_at: f.text_or("amplitudeAt", default_output),
        }
    }
}

impl DistortionOptions {
    fn parts(&self) -> Result<(PowerSeries, AmplitudeAt), JsValue> {
        Ok((
            PowerSeries::new(self.a1, self.a2, self.a3).map_err(named)?,
            self.amplitude_at.parse().map_err(named)?,
        ))
    }
}

/// Leading-order distortion `{inputAmplitude, outputAmplitude, hd2, hd3}` of the
/// amplifier alone.
#[wasm_bindgen(js_name = harmonicDistortion, unchecked_return_type = "Distortion")]
pub fn harmonic_distortion(
    #[wasm_bindgen(unchecked_param_type = "Omit<DistortionOptions, \"beta\">")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: DistortionOptions = read("", &options)?;
    if o.beta.is_some() {
        return Err(super::options::error_at(
            "beta",
            crate::Error::UnknownField {
                param: "",
                expected: "",
            },
            Some("beta: unknown field; harmonicDistortion is the amplifier alone".into()),
        ));
    }
    let (amp, at) = o.parts()?;
    to_js(&nl::harmonic_distortion(&amp, o.amplitude, at).map_err(named)?)
}

/// Open and closed loop at the same amplitude with the DC loop gain (valid below
/// the amplifier's dominant pole; `distortionAtFrequency` takes the signal
/// frequency): `{closedSeries, feedbackAmount, amplitudeAt, open, closed,
/// hd2Ratio, hd3Ratio}` (ratios `null` when the open-loop figure is zero).
#[wasm_bindgen(js_name = feedbackDistortion, unchecked_return_type = "FeedbackDistortion")]
pub fn feedback_distortion(
    #[wasm_bindgen(unchecked_param_type = "DistortionOptions & { beta: number }")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: DistortionOptions = read("", &options)?;
    let (amp, at) = o.parts()?;
    let beta = o
        .beta
        .ok_or_else(|| named(crate::Error::Missing { param: "beta" }))?;
    to_js(&nl::feedback_distortion(&amp, beta, o.amplitude, at).map_err(named)?)
}

/// Options of `distortionAtFrequency`.
struct FrequencyOptions {
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude: f64,
    amplitude_at: String,
    pole_hz: f64,
    frequency_hz: f64,
}

impl FromOptions for FrequencyOptions {
    const FIELDS: &'static [&'static str] = &[
        "a1",
        "a2",
        "a3",
        "beta",
        "amplitude",
        "amplitudeAt",
        "poleHz",
        "frequencyHz",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        FrequencyOptions {
            a1: f.num("a1"),
            a2: f.num("a2"),
            a3: f.num("a3"),
            beta: f.num("beta"),
            amplitude: f.num("amplitude"),
            amplitude_at: f.text_or("amplitudeAt", default_output),
            pole_hz: f.num("poleHz"),
            frequency_hz: f.num("frequencyHz"),
        }
    }
}

/// Distortion under feedback at a signal frequency, with the loop gain of a
/// dominant-pole amplifier taken at f, 2f and 3f: `{frequencyHz, poleHz,
/// dcLoopGain, loopGains: [{frequencyHz, magnitude, phaseDeg}] (f, 2f, 3f),
/// amplitudeAt, open, closed, closedAtDc, hd2Ratio, hd3Ratio}`.
#[wasm_bindgen(js_name = distortionAtFrequency, unchecked_return_type = "FrequencyDistortion")]
pub fn distortion_at_frequency(
    #[wasm_bindgen(unchecked_param_type = "FrequencyDistortionOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: FrequencyOptions = read("", &options)?;
    let amp = PowerSeries::new(o.a1, o.a2, o.a3).map_err(named)?;
    let at: AmplitudeAt = o.amplitude_at.parse().map_err(named)?;
    to_js(
        &nl::feedback_distortion_at(&amp, o.beta, o.pole_hz, o.frequency_hz, o.amplitude, at)
            .map_err(named)?,
    )
}

/// Internal, for the entry module (which exports `closedLoopOutput({a1, a2, a3, beta, x})`):
/// the closed-loop output y solving y = A(x − β·y) at input x, as a bare f64 (see `scalar` in `src/wasm/mod.rs`).
#[wasm_bindgen(js_name = closedLoopOutputAt)]
pub fn closed_loop_output(a1: f64, a2: f64, a3: f64, beta: f64, x: f64) -> f64 {
    scalar(
        PowerSeries::new(a1, a2, a3)
            .and_then(|s| nl::LoopSolver::new(&s, beta))
            .and_then(|solver| solver.output(x)),
    )
}

/// Options of `closedLoopSpectrum` and `seriesCheck`.
struct SpectrumOptions {
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude: f64,
    samples: f64,
}

impl FromOptions for SpectrumOptions {
    const FIELDS: &'static [&'static str] = &["a1", "a2", "a3", "beta", "amplitude", "samples"];
    fn from_fields(f: &mut Fields) -> Self {
        SpectrumOptions {
            a1: f.num("a1"),
            a2: f.num("a2"),
            a3: f.num("a3"),
            beta: f.num("beta"),
            amplitude: f.num("amplitude"),
            samples: f.num_or("samples", default_samples()),
        }
    }
}

fn default_samples() -> f64 {
    64.0
}

fn samples(x: f64) -> Result<usize, JsValue> {
    crate::network::montecarlo::count_from_number("samples", x, nl::MAX_SAMPLES).map_err(named)
}

/// Numeric spectrum of the closed loop for a cosine input of peak `amplitude`:
/// `{inputAmplitude, dc, harmonics: [5], hd2, hd3, thd, samples}`.
#[wasm_bindgen(js_name = closedLoopSpectrum, unchecked_return_type = "Spectrum")]
pub fn closed_loop_spectrum(
    #[wasm_bindgen(unchecked_param_type = "SpectrumOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: SpectrumOptions = read("", &options)?;
    let amp = series(o.a1, o.a2, o.a3)?;
    to_js(&throw(nl::closed_loop_spectrum(
        &amp,
        o.beta,
        o.amplitude,
        samples(o.samples)?,
    ))?)
}

/// Series against numeric at one input amplitude: `{inputAmplitude, seriesHd2,
/// seriesHd3, numericHd2, numericHd3, hd2Difference, hd3Difference}`.
#[wasm_bindgen(js_name = seriesCheck, unchecked_return_type = "SeriesCheck")]
pub fn series_check(
    #[wasm_bindgen(unchecked_param_type = "SpectrumOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: SpectrumOptions = read("", &options)?;
    let amp = series(o.a1, o.a2, o.a3)?;
    to_js(&throw(nl::series_check(
        &amp,
        o.beta,
        o.amplitude,
        samples(o.samples)?,
    ))?)
}

/// Options of `seriesValiditySweep`.
struct SweepOptions {
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude_min: f64,
    amplitude_max: f64,
    points: f64,
    tolerance: f64,
    samples: f64,
}

impl FromOptions for SweepOptions {
    const FIELDS: &'static [&'static str] = &[
        "a1",
        "a2",
        "a3",
        "beta",
        "amplitudeMin",
        "amplitudeMax",
        "points",
        "tolerance",
        "samples",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        SweepOptions {
            a1: f.num("a1"),
            a2: f.num("a2"),
            a3: f.num("a3"),
            beta: f.num("beta"),
            amplitude_min: f.num("amplitudeMin"),
            amplitude_max: f.num("amplitudeMax"),
            points: f.num_or("points", default_points()),
            tolerance: f.num_or("tolerance", default_tolerance()),
            samples: f.num_or("samples", default_sweep_samples()),
        }
    }
}

fn default_points() -> f64 {
    60.0
}
fn default_tolerance() -> f64 {
    0.1
}
fn default_sweep_samples() -> f64 {
    256.0
}

/// Series against numeric over log-spaced input amplitudes: Float64Arrays
/// `amplitudes, seriesHd2, seriesHd3, numericHd2, numericHd3`, and `foldAmplitude`,
/// `hd3LimitAmplitude` (numbers or `null`), `hd3HoldsThroughout`, `numericFloor`
/// (numeric values below it are rounding noise).
#[wasm_bindgen(js_name = seriesValiditySweep, unchecked_return_type = "ValiditySweep")]
pub fn series_validity_sweep(
    #[wasm_bindgen(unchecked_param_type = "ValiditySweepOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: SweepOptions = read("", &options)?;
    let points =
        crate::network::montecarlo::count_from_number("points", o.points, nl::MAX_SWEEP_POINTS)
            .map_err(named)?;
    let s = nl::series_validity_sweep(
        &series(o.a1, o.a2, o.a3)?,
        o.beta,
        o.amplitude_min,
        o.amplitude_max,
        points,
        o.tolerance,
        samples(o.samples)?,
    )
    .map_err(named)?;
    let obj = typed_arrays(&[
        ("amplitudes", &s.amplitudes),
        ("seriesHd2", &s.series_hd2),
        ("seriesHd3", &s.series_hd3),
        ("numericHd2", &s.numeric_hd2),
        ("numericHd3", &s.numeric_hd3),
    ]);
    js_sys::Reflect::set(
        &obj,
        &"foldAmplitude".into(),
        &option_number(s.fold_amplitude),
    )?;
    js_sys::Reflect::set(
        &obj,
        &"hd3LimitAmplitude".into(),
        &option_number(s.hd3_limit_amplitude),
    )?;
    js_sys::Reflect::set(
        &obj,
        &"hd3HoldsThroughout".into(),
        &s.hd3_holds_throughout.into(),
    )?;
    js_sys::Reflect::set(&obj, &"numericFloor".into(), &s.numeric_floor.into())?;
    Ok(obj)
}

/// Full-power bandwidth SR/(2π·Vpeak), Hz; slew rate in V/s.
#[wasm_bindgen(js_name = fullPowerBandwidth)]
pub fn full_power_bandwidth(slew_rate: f64, v_peak: f64) -> f64 {
    scalar(nl::full_power_bandwidth(slew_rate, v_peak))
}

/// Largest undistorted peak amplitude SR/(2π·f), V; slew rate in V/s.
#[wasm_bindgen(js_name = maxUndistortedAmplitude)]
pub fn max_undistorted_amplitude(slew_rate: f64, frequency_hz: f64) -> f64 {
    scalar(nl::max_undistorted_amplitude(slew_rate, frequency_hz))
}

/// Slew rate needed for a sine of peak `vPeak` at `frequencyHz`, V/s.
#[wasm_bindgen(js_name = requiredSlewRate)]
pub fn required_slew_rate(v_peak: f64, frequency_hz: f64) -> f64 {
    scalar(nl::required_slew_rate(v_peak, frequency_hz))
}
