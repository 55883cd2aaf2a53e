//! JS bindings for distortion under feedback and slew-rate limits.
//!
//! A power-series amplifier is passed as its three coefficients `a1, a2, a3`;
//! amplitudes are peak values; `amplitudeAt` is `"input"` or `"output"`.

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
export interface ValiditySweep {
  amplitudes: Float64Array; seriesHd2: Float64Array; seriesHd3: Float64Array; numericHd2: Float64Array; numericHd3: Float64Array;
  foldAmplitude: number | null; hd3LimitAmplitude: number | null; hd3HoldsThroughout: boolean;
}
"#;

fn series(a1: f64, a2: f64, a3: f64) -> Result<PowerSeries, JsValue> {
    throw(PowerSeries::new(a1, a2, a3))
}

fn amplitude_at(name: &str) -> Result<AmplitudeAt, JsValue> {
    throw(name.parse())
}

fn option_number(x: Option<f64>) -> JsValue {
    x.map_or(JsValue::NULL, JsValue::from)
}

/// Closed-loop coefficients under feedback β: `{a1, a2, a3}` holding b1, b2, b3.
#[wasm_bindgen(js_name = closedLoopSeries, unchecked_return_type = "PowerSeries")]
pub fn closed_loop_series(a1: f64, a2: f64, a3: f64, beta: f64) -> Result<JsValue, JsValue> {
    to_js(&throw(nl::closed_loop_series(&series(a1, a2, a3)?, beta))?)
}

/// Coefficients `{a1, a2, a3}` from signed HD2 and HD3 (fractions) measured at a
/// peak amplitude at the `"input"` or `"output"`.
#[wasm_bindgen(js_name = seriesFromDistortion, unchecked_return_type = "PowerSeries")]
pub fn series_from_distortion(
    a1: f64,
    hd2: f64,
    hd3: f64,
    amplitude: f64,
    amplitude_at_name: &str,
) -> Result<JsValue, JsValue> {
    to_js(&throw(nl::series_from_distortion(
        a1,
        hd2,
        hd3,
        amplitude,
        amplitude_at(amplitude_at_name)?,
    ))?)
}

/// Leading-order distortion `{inputAmplitude, outputAmplitude, hd2, hd3}`.
#[wasm_bindgen(js_name = harmonicDistortion, unchecked_return_type = "Distortion")]
pub fn harmonic_distortion(
    a1: f64,
    a2: f64,
    a3: f64,
    amplitude: f64,
    amplitude_at_name: &str,
) -> Result<JsValue, JsValue> {
    to_js(&throw(nl::harmonic_distortion(
        &series(a1, a2, a3)?,
        amplitude,
        amplitude_at(amplitude_at_name)?,
    ))?)
}

/// Open and closed loop at the same amplitude: `{closedSeries, feedbackAmount,
/// amplitudeAt, open, closed, hd2Ratio, hd3Ratio}` (ratios `null` when the open-loop
/// figure is zero).
#[wasm_bindgen(js_name = feedbackDistortion, unchecked_return_type = "FeedbackDistortion")]
pub fn feedback_distortion(
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude: f64,
    amplitude_at_name: &str,
) -> Result<JsValue, JsValue> {
    to_js(&throw(nl::feedback_distortion(
        &series(a1, a2, a3)?,
        beta,
        amplitude,
        amplitude_at(amplitude_at_name)?,
    ))?)
}

/// The closed-loop output y solving y = A(x − β·y) at input x.
#[wasm_bindgen(js_name = closedLoopOutput)]
pub fn closed_loop_output(a1: f64, a2: f64, a3: f64, beta: f64, x: f64) -> f64 {
    scalar(
        PowerSeries::new(a1, a2, a3)
            .and_then(|s| nl::LoopSolver::new(&s, beta))
            .and_then(|solver| solver.output(x)),
    )
}

/// Numeric spectrum of the closed loop for a cosine input of peak `amplitude`:
/// `{inputAmplitude, dc, harmonics: [5], hd2, hd3, thd, samples}`.
#[wasm_bindgen(js_name = closedLoopSpectrum, unchecked_return_type = "Spectrum")]
pub fn closed_loop_spectrum(
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude: f64,
    samples: u32,
) -> Result<JsValue, JsValue> {
    to_js(&throw(nl::closed_loop_spectrum(
        &series(a1, a2, a3)?,
        beta,
        amplitude,
        samples as usize,
    ))?)
}

/// Series against numeric at one input amplitude: `{inputAmplitude, seriesHd2,
/// seriesHd3, numericHd2, numericHd3, hd2Difference, hd3Difference}`.
#[wasm_bindgen(js_name = seriesCheck, unchecked_return_type = "SeriesCheck")]
pub fn series_check(
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude: f64,
    samples: u32,
) -> Result<JsValue, JsValue> {
    to_js(&throw(nl::series_check(
        &series(a1, a2, a3)?,
        beta,
        amplitude,
        samples as usize,
    ))?)
}

/// Series against numeric over log-spaced input amplitudes: Float64Arrays
/// `amplitudes, seriesHd2, seriesHd3, numericHd2, numericHd3`, and `foldAmplitude`,
/// `hd3LimitAmplitude` (numbers or `null`), `hd3HoldsThroughout`.
#[wasm_bindgen(js_name = seriesValiditySweep, unchecked_return_type = "ValiditySweep")]
#[allow(clippy::too_many_arguments)]
pub fn series_validity_sweep(
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude_min: f64,
    amplitude_max: f64,
    points: u32,
    tolerance: f64,
    samples: u32,
) -> Result<JsValue, JsValue> {
    let s = throw(nl::series_validity_sweep(
        &series(a1, a2, a3)?,
        beta,
        amplitude_min,
        amplitude_max,
        points as usize,
        tolerance,
        samples as usize,
    ))?;
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
