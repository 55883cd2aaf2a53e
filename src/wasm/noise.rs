//! JS bindings for the noise of op-amp stages.
//!
//! The stage exports take one options object (`NoiseOptions` in the `.d.ts`): a
//! stage as `kind` (`"non-inverting"` or `"inverting"`), resistors `rFeedback,
//! rGain, rPlus` in Ω and `temperatureK`; the amplifier as `voltageDensity`
//! (V/√Hz), `voltageCornerHz`, `currentDensity` (A/√Hz), `currentCornerHz`; the
//! loop as `gbwHz` and `extraPolesHz` (0 to 2 values); and the band or frequency of
//! the export.

use super::options::{core_error, error_at, read};
use super::options::{Fields, FromOptions};
use super::{scalar, to_js, typed_arrays};
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
/** A stage, its amplifier's noise and its loop (`stageNoiseContributions`, `integratedNoise`, `noiseDensitySweep`). */
export interface NoiseOptions {
  kind: "non-inverting" | "inverting";
  /** Feedback resistor, output to inverting input, Ω. */
  rFeedback: number;
  /** Inverting input to ground (inverting stage: input resistor plus source), Ω. */
  rGain: number;
  /** Resistance at the non-inverting input, Ω. Default 0. */
  rPlus?: number;
  /** Resistor temperature, K. Default 300. */
  temperatureK?: number;
  /** Amplifier white voltage noise, V/√Hz. */
  voltageDensity: number;
  /** 1/f corner of the voltage noise, Hz (0: none). Default 0. */
  voltageCornerHz?: number;
  /** Amplifier white current noise, A/√Hz. Default 0. */
  currentDensity?: number;
  /** 1/f corner of the current noise, Hz (0: none). Default 0. */
  currentCornerHz?: number;
  /** Gain-bandwidth product, Hz (integratedNoise, noiseDensitySweep). */
  gbwHz?: number;
  /** Up to two extra open-loop poles, Hz. Default []. */
  extraPolesHz?: number[];
  /** stageNoiseContributions: the frequency, Hz. */
  frequencyHz?: number;
  /** integratedNoise: the band, Hz; fHigh left out (or Infinity) for no upper edge. */
  fLow?: number; fHigh?: number;
  /** noiseDensitySweep: span, Hz, and points (2 … 2000, default 200). */
  fStart?: number; fStop?: number; points?: number;
}
"#;

/// A stage, its amplifier's noise and its loop, as the noise exports read them
/// (defaults in the `.d.ts`).
struct NoiseOptions {
    kind: String,
    r_feedback: f64,
    r_gain: f64,
    r_plus: f64,
    temperature_k: f64,
    voltage_density: f64,
    voltage_corner_hz: f64,
    current_density: f64,
    current_corner_hz: f64,
    /// Needed by the integrated noise and the sweep.
    gbw_hz: Option<f64>,
    extra_poles_hz: Vec<f64>,
    /// `stageNoiseContributions`.
    frequency_hz: Option<f64>,
    /// `integratedNoise`: the band.
    f_low: Option<f64>,
    f_high: Option<f64>,
    /// `noiseDensitySweep`: the span and points.
    f_start: Option<f64>,
    f_stop: Option<f64>,
    points: f64,
}

impl FromOptions for NoiseOptions {
    const FIELDS: &'static [&'static str] = &[
        "kind",
        "rFeedback",
        "rGain",
        "rPlus",
        "temperatureK",
        "voltageDensity",
        "voltageCornerHz",
        "currentDensity",
        "currentCornerHz",
        "gbwHz",
        "extraPolesHz",
        "frequencyHz",
        "fLow",
        "fHigh",
        "fStart",
        "fStop",
        "points",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        NoiseOptions {
            kind: f.text("kind"),
            r_feedback: f.num("rFeedback"),
            r_gain: f.num("rGain"),
            r_plus: f.num_or("rPlus", 0.0),
            temperature_k: f.num_or("temperatureK", default_temperature()),
            voltage_density: f.num("voltageDensity"),
            voltage_corner_hz: f.num_or("voltageCornerHz", 0.0),
            current_density: f.num_or("currentDensity", 0.0),
            current_corner_hz: f.num_or("currentCornerHz", 0.0),
            gbw_hz: f.opt_num("gbwHz"),
            extra_poles_hz: f.nums("extraPolesHz"),
            frequency_hz: f.opt_num("frequencyHz"),
            f_low: f.opt_num("fLow"),
            f_high: f.opt_num("fHigh"),
            f_start: f.opt_num("fStart"),
            f_stop: f.opt_num("fStop"),
            points: f.num_or("points", default_points()),
        }
    }
}

fn default_temperature() -> f64 {
    300.0
}

fn default_points() -> f64 {
    200.0
}

fn named(e: crate::Error) -> JsValue {
    core_error(e, &[])
}

/// A field an export needs that the options left out.
fn needed(value: Option<f64>, param: &'static str) -> Result<f64, JsValue> {
    value.ok_or_else(|| core_error(crate::Error::Missing { param }, &[]))
}

/// Refuse a field of [`NoiseOptions`] that belongs to another export.
fn not_here(fields: &[(bool, &str)], export: &str) -> Result<(), JsValue> {
    match fields.iter().find(|(given, _)| *given) {
        Some(&(_, name)) => Err(error_at(
            name,
            crate::Error::UnknownField {
                param: "",
                expected: "",
            },
            Some(alloc::format!(
                "{name}: unknown field; {export} does not take it"
            )),
        )),
        None => Ok(()),
    }
}

impl NoiseOptions {
    fn stage(&self) -> Result<(Stage, AmplifierNoise), JsValue> {
        let kind: StageKind = self.kind.parse().map_err(named)?;
        let stage = Stage::new(
            kind,
            self.r_feedback,
            self.r_gain,
            self.r_plus,
            self.temperature_k,
        )
        .map_err(named)?;
        let amp = AmplifierNoise::new(
            self.voltage_density,
            self.voltage_corner_hz,
            self.current_density,
            self.current_corner_hz,
        )
        .map_err(named)?;
        Ok((stage, amp))
    }

    fn response(&self, stage: &Stage) -> Result<ClosedLoopResponse, JsValue> {
        let gbw = needed(self.gbw_hz, "gbw_hz")?;
        ClosedLoopResponse::new(stage.noise_gain(), gbw, &self.extra_poles_hz).map_err(named)
    }
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
pub fn stage_noise_contributions(
    #[wasm_bindgen(unchecked_param_type = "NoiseOptions & { frequencyHz: number }")]
    options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: NoiseOptions = read("", &options)?;
    not_here(
        &[
            (o.gbw_hz.is_some(), "gbwHz"),
            (!o.extra_poles_hz.is_empty(), "extraPolesHz"),
            (o.f_low.is_some(), "fLow"),
            (o.f_high.is_some(), "fHigh"),
            (o.f_start.is_some(), "fStart"),
            (o.f_stop.is_some(), "fStop"),
        ],
        "stageNoiseContributions",
    )?;
    let (s, amp) = o.stage()?;
    let f = needed(o.frequency_hz, "frequency_hz")?;
    to_js(&nz::noise_contributions(&s, &amp, f).map_err(named)?)
}

/// rms noise over the band `fLow` … `fHigh` (left out or Infinity: unbounded):
/// `{outputRms, inputReferredRms, fLow, fHigh (null when unbounded), noiseGain,
/// signalGain, loopCrossoverHz, bandwidthHz, noiseBandwidthHz (∫|H|² df over the
/// same band), singlePoleNoiseBandwidthHz, singlePoleEstimateRms, relativeError}`.
#[wasm_bindgen(js_name = integratedNoise, unchecked_return_type = "IntegratedNoise")]
pub fn integrated_noise(
    #[wasm_bindgen(
        unchecked_param_type = "NoiseOptions & { gbwHz: number; fLow: number; fHigh?: number }"
    )]
    options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: NoiseOptions = read("", &options)?;
    not_here(
        &[
            (o.frequency_hz.is_some(), "frequencyHz"),
            (o.f_start.is_some(), "fStart"),
            (o.f_stop.is_some(), "fStop"),
        ],
        "integratedNoise",
    )?;
    let (s, amp) = o.stage()?;
    let h = o.response(&s)?;
    let f_low = needed(o.f_low, "f_low")?;
    let f_high = o.f_high.unwrap_or(f64::INFINITY);
    to_js(&nz::integrated_output_noise(&s, &amp, &h, f_low, f_high).map_err(named)?)
}

/// Output and input-referred density over `points` log-spaced frequencies from
/// `fStart` to `fStop`: Float64Arrays `frequencies, outputDensity,
/// inputReferredDensity`.
#[wasm_bindgen(js_name = noiseDensitySweep, unchecked_return_type = "NoiseSweep")]
pub fn noise_density_sweep(
    #[wasm_bindgen(
        unchecked_param_type = "NoiseOptions & { gbwHz: number; fStart: number; fStop: number }"
    )]
    options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: NoiseOptions = read("", &options)?;
    not_here(
        &[
            (o.frequency_hz.is_some(), "frequencyHz"),
            (o.f_low.is_some(), "fLow"),
            (o.f_high.is_some(), "fHigh"),
        ],
        "noiseDensitySweep",
    )?;
    let (s, amp) = o.stage()?;
    let h = o.response(&s)?;
    let points = crate::network::montecarlo::count_from_number(
        "points",
        o.points,
        nz::integrated::MAX_SWEEP_POINTS,
    )
    .map_err(named)?;
    let w = nz::output_noise_sweep(
        &s,
        &amp,
        &h,
        needed(o.f_start, "f_start")?,
        needed(o.f_stop, "f_stop")?,
        points,
    )
    .map_err(named)?;
    Ok(typed_arrays(&[
        ("frequencies", &w.frequencies),
        ("outputDensity", &w.output_density),
        ("inputReferredDensity", &w.input_referred_density),
    ]))
}

// The noise of a whole circuit needs the circuit solver: full module only.
#[cfg(feature = "wasm")]
pub mod circuit;
