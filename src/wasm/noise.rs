//! JS bindings for the noise of op-amp stages.
//!
//! A stage is given as `kind` (`"non-inverting"` or `"inverting"`), resistors
//! `rFeedback, rGain, rPlus` in Ω and `temperatureK`; the amplifier as
//! `voltageDensity` (V/√Hz), `voltageCornerHz`, `currentDensity` (A/√Hz),
//! `currentCornerHz`; the loop as `gbwHz` and `extraPolesHz` (0 to 2 values).

use super::{scalar, throw, to_js, typed_arrays};
use crate::noise::{self as nz, AmplifierNoise, ClosedLoopResponse, Stage, StageKind};
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const TYPES: &str = r#"
export interface NoiseContributions {
  frequencyHz: number; noiseGain: number; signalGain: number;
  rFeedback: number; rGain: number; rPlus: number;
  amplifierVoltage: number; amplifierCurrentPlus: number; amplifierCurrentMinus: number;
  total: number; inputReferred: number;
}
export interface IntegratedNoise {
  outputRms: number; inputReferredRms: number; fLow: number; fHigh: number | null;
  noiseGain: number; signalGain: number; loopCrossoverHz: number; bandwidthHz: number;
  noiseBandwidthHz: number; singlePoleNoiseBandwidthHz: number; singlePoleEstimateRms: number; relativeError: number;
}
export interface NoiseSweep { frequencies: Float64Array; outputDensity: Float64Array; inputReferredDensity: Float64Array; }
"#;

fn stage(
    kind: &str,
    r_feedback: f64,
    r_gain: f64,
    r_plus: f64,
    temperature_k: f64,
) -> Result<Stage, JsValue> {
    let kind: StageKind = throw(kind.parse())?;
    throw(Stage::new(kind, r_feedback, r_gain, r_plus, temperature_k))
}

/// Thermal noise density √(4kTR), V/√Hz.
#[wasm_bindgen(js_name = thermalNoiseDensity)]
pub fn thermal_noise_density(resistance_ohm: f64, temperature_k: f64) -> f64 {
    scalar(nz::thermal_noise_density(resistance_ohm, temperature_k))
}

/// Thermal noise current density √(4kT/R), A/√Hz.
#[wasm_bindgen(js_name = thermalNoiseCurrentDensity)]
pub fn thermal_noise_current_density(resistance_ohm: f64, temperature_k: f64) -> f64 {
    scalar(nz::thermal_noise_current_density(
        resistance_ohm,
        temperature_k,
    ))
}

/// Each source's output noise density at `frequencyHz` (flat part of the
/// response): `{frequencyHz, noiseGain, signalGain, rFeedback, rGain, rPlus,
/// amplifierVoltage, amplifierCurrentPlus, amplifierCurrentMinus, total,
/// inputReferred}`, V/√Hz.
#[wasm_bindgen(js_name = stageNoiseContributions, unchecked_return_type = "NoiseContributions")]
#[allow(clippy::too_many_arguments)]
pub fn stage_noise_contributions(
    kind: &str,
    r_feedback: f64,
    r_gain: f64,
    r_plus: f64,
    temperature_k: f64,
    voltage_density: f64,
    voltage_corner_hz: f64,
    current_density: f64,
    current_corner_hz: f64,
    frequency_hz: f64,
) -> Result<JsValue, JsValue> {
    let s = stage(kind, r_feedback, r_gain, r_plus, temperature_k)?;
    let amp = throw(AmplifierNoise::new(
        voltage_density,
        voltage_corner_hz,
        current_density,
        current_corner_hz,
    ))?;
    to_js(&throw(nz::noise_contributions(&s, &amp, frequency_hz))?)
}

/// rms noise over `fLow`…`fHigh` (Infinity allowed): `{outputRms, inputReferredRms,
/// fLow, fHigh (null when unbounded), noiseGain, signalGain, loopCrossoverHz,
/// bandwidthHz, noiseBandwidthHz, singlePoleNoiseBandwidthHz,
/// singlePoleEstimateRms, relativeError}`.
#[wasm_bindgen(js_name = integratedNoise, unchecked_return_type = "IntegratedNoise")]
#[allow(clippy::too_many_arguments)]
pub fn integrated_noise(
    kind: &str,
    r_feedback: f64,
    r_gain: f64,
    r_plus: f64,
    temperature_k: f64,
    voltage_density: f64,
    voltage_corner_hz: f64,
    current_density: f64,
    current_corner_hz: f64,
    gbw_hz: f64,
    extra_poles_hz: &[f64],
    f_low: f64,
    f_high: f64,
) -> Result<JsValue, JsValue> {
    let s = stage(kind, r_feedback, r_gain, r_plus, temperature_k)?;
    let amp = throw(AmplifierNoise::new(
        voltage_density,
        voltage_corner_hz,
        current_density,
        current_corner_hz,
    ))?;
    let h = throw(ClosedLoopResponse::new(
        s.noise_gain(),
        gbw_hz,
        extra_poles_hz,
    ))?;
    to_js(&throw(nz::integrated_output_noise(
        &s, &amp, &h, f_low, f_high,
    ))?)
}

/// Output and input-referred density over log-spaced frequencies: Float64Arrays
/// `frequencies, outputDensity, inputReferredDensity`.
#[wasm_bindgen(js_name = noiseDensitySweep, unchecked_return_type = "NoiseSweep")]
#[allow(clippy::too_many_arguments)]
pub fn noise_density_sweep(
    kind: &str,
    r_feedback: f64,
    r_gain: f64,
    r_plus: f64,
    temperature_k: f64,
    voltage_density: f64,
    voltage_corner_hz: f64,
    current_density: f64,
    current_corner_hz: f64,
    gbw_hz: f64,
    extra_poles_hz: &[f64],
    f_start: f64,
    f_stop: f64,
    points: u32,
) -> Result<JsValue, JsValue> {
    let s = stage(kind, r_feedback, r_gain, r_plus, temperature_k)?;
    let amp = throw(AmplifierNoise::new(
        voltage_density,
        voltage_corner_hz,
        current_density,
        current_corner_hz,
    ))?;
    let h = throw(ClosedLoopResponse::new(
        s.noise_gain(),
        gbw_hz,
        extra_poles_hz,
    ))?;
    let w = throw(nz::output_noise_sweep(
        &s,
        &amp,
        &h,
        f_start,
        f_stop,
        points as usize,
    ))?;
    Ok(typed_arrays(&[
        ("frequencies", &w.frequencies),
        ("outputDensity", &w.output_density),
        ("inputReferredDensity", &w.input_referred_density),
    ]))
}
