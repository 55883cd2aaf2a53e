//! JS bindings of the noise of any circuit (`crate::noise::circuit`), full
//! module only: `circuitNoise` (densities over frequency) and
//! `circuitNoiseIntegral` (rms over a band). Both take one options object
//! (`CircuitNoiseOptions` in the `.d.ts`); errors are `LoopwrightError`s with
//! `code`, `param` and `subject` (the node or element at fault), as the
//! circuit exports throw them.

use crate::circuit::json::read_circuit;
use crate::circuit::CircuitError;
use crate::noise::circuit::{
    band_noise, noise_densities, CurrentSourceNoise, NoiseOutput, NoiseSetup, SourceNoiseKind,
};
use crate::stage::NoiseDensity;
use crate::wasm::options::{caller_name, core_error, error_at, read, Fields, FromOptions, Plain};
use crate::wasm::{set_typed_arrays, to_js, typed_arrays};
use alloc::string::String;
use alloc::vec::Vec;
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const TYPES: &str = r#"
/** The output of a circuit noise analysis: a node's voltage, a voltage between two nodes, or an element's current. */
export type CircuitNoiseOutput = string | { plus: string; minus: string } | { element: string };
/** Noise given to a current source: shot noise of its own current, or a density with a 1/f corner. */
export interface CurrentSourceNoiseOption {
  element: string;
  /** true: √(2q·|I|) A/√Hz. */
  shot?: boolean;
  /** A/√Hz, ≥ 0 (when not shot). */
  density?: number;
  /** Hz, ≥ 0. Default 0. */
  cornerHz?: number;
}
/** Options of `circuitNoise` and `circuitNoiseIntegral` (docs/noise.md, "Noise of any circuit"). */
export interface CircuitNoiseOptions {
  /** The circuit document's JSON text (docs/circuit.md). */
  circuit: string;
  /** A node name (its voltage against ground), {plus, minus}, or {element} (its current). */
  output: CircuitNoiseOutput;
  /** Temperature of every resistor, K. Default 300. */
  temperatureK?: number;
  /** The independent source carrying the signal: signal gain and input-referred figures. Default none. */
  inputSource?: string;
  /** The amplifier whose voltage-noise transfer is the noise gain. Default: the first amplifier. */
  amplifier?: string;
  /** Noise of current sources (a photodiode's shot noise). Default []. */
  currentNoise?: CurrentSourceNoiseOption[];
}
export interface CircuitNoiseDensityOptions extends CircuitNoiseOptions {
  /** Each > 0, at most 100 000. */
  frequenciesHz: readonly number[] | Float64Array;
}
export interface CircuitNoiseIntegralOptions extends CircuitNoiseOptions {
  /** [fLow, fHigh], 0 ≤ fLow < fHigh < ∞ (fLow > 0 with a 1/f corner). */
  bandHz: readonly number[] | Float64Array;
  /** rms of the signal, at the input source when one is named (times |signal gain| at signalFrequencyHz), else at the output. */
  signalRms?: number;
  /** Hz; needed with signalRms and inputSource. */
  signalFrequencyHz?: number;
}
export type NoiseSourceKind = "thermal" | "amplifier-voltage" | "amplifier-current" | "current-source";
export interface CircuitNoiseDensities {
  frequenciesHz: Float64Array;
  /** Total output density, V/√Hz (A/√Hz to a current output). */
  total: Float64Array;
  /** Each source's output density, by name (resistors by name; U1.en, U1.in+, U1.in-; current sources by name). */
  sources: Record<string, Float64Array>;
  /** Each source's share of the output power, 0…1. */
  shares: Record<string, Float64Array>;
  kinds: Record<string, NoiseSourceKind>;
  /** |signal gain| and total/|signal gain|; empty without inputSource. */
  signalGain: Float64Array;
  inputReferred: Float64Array;
  /** |noise gain| of the amplifier; empty without one. */
  noiseGain: Float64Array;
  noiseGainPeak: { frequencyHz: number; value: number; overLowest: number } | null;
}
export interface CircuitNoiseBand {
  bandHz: [number, number];
  totalRms: number;
  sources: { name: string; kind: NoiseSourceKind; rms: number; share: number }[];
  inputReferredRms: number | null;
  /** 20·log10(signal / noise), dB, when signalRms is given; else null. */
  snrDb: number | null;
  evaluations: number;
}
"#;

/// The `output` option: a node name, `{plus, minus}` or `{element}`.
enum OutputOption {
    Node(String),
    Pair {
        plus: String,
        minus: String,
    },
    Element {
        element: String,
    },
    /// An object that names neither shape (refused when the setup is built).
    Neither,
}

/// The object form of `output`, before it is told which of the two it is.
#[derive(Default)]
struct OutputObject {
    plus: Option<String>,
    minus: Option<String>,
    element: Option<String>,
}

impl FromOptions for OutputObject {
    const FIELDS: &'static [&'static str] = &["plus", "minus", "element"];
    fn from_fields(f: &mut Fields) -> Self {
        OutputObject {
            plus: f.opt_text("plus"),
            minus: f.opt_text("minus"),
            element: f.opt_text("element"),
        }
    }
}

impl OutputOption {
    /// The required field `key` of `f`: a string, or an object `{plus, minus}` or
    /// `{element}` (its unknown fields and wrong kinds named by their path).
    fn field(f: &mut Fields, key: &str) -> OutputOption {
        match f.raw(key) {
            Some((_, Plain::Text(node))) => OutputOption::Node(node),
            Some((at, value @ Plain::Map(_))) => {
                let path = f.key_path(key);
                match f.nested(at, path, value).unwrap_or_default() {
                    OutputObject {
                        plus: Some(plus),
                        minus: Some(minus),
                        element: None,
                    } => OutputOption::Pair { plus, minus },
                    OutputObject {
                        plus: None,
                        minus: None,
                        element: Some(element),
                    } => OutputOption::Element { element },
                    _ => OutputOption::Neither,
                }
            }
            Some((at, other)) => {
                f.refuse(key, at, &other, "a node name or an object");
                OutputOption::Neither
            }
            None => {
                f.missing(key);
                OutputOption::Neither
            }
        }
    }
}

/// One entry of `currentNoise` (defaults in the `.d.ts`).
struct CurrentNoiseOption {
    element: String,
    shot: bool,
    density: Option<f64>,
    corner_hz: f64,
}

impl FromOptions for CurrentNoiseOption {
    const FIELDS: &'static [&'static str] = &["element", "shot", "density", "cornerHz"];
    fn from_fields(f: &mut Fields) -> Self {
        CurrentNoiseOption {
            element: f.text("element"),
            shot: f.flag_or("shot", false),
            density: f.opt_num("density"),
            corner_hz: f.num_or("cornerHz", 0.0),
        }
    }
}

/// Both exports' options (defaults in the `.d.ts`); the fields of the other
/// export are refused.
struct Options {
    circuit: String,
    output: OutputOption,
    temperature_k: f64,
    input_source: Option<String>,
    amplifier: Option<String>,
    current_noise: Vec<CurrentNoiseOption>,
    frequencies_hz: Option<Vec<f64>>,
    band_hz: Option<Vec<f64>>,
    signal_rms: Option<f64>,
    signal_frequency_hz: Option<f64>,
}

impl FromOptions for Options {
    const FIELDS: &'static [&'static str] = &[
        "circuit",
        "output",
        "temperatureK",
        "inputSource",
        "amplifier",
        "currentNoise",
        "frequenciesHz",
        "bandHz",
        "signalRms",
        "signalFrequencyHz",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        Options {
            circuit: f.text("circuit"),
            output: OutputOption::field(f, "output"),
            temperature_k: f.num_or("temperatureK", default_temperature()),
            input_source: f.opt_text("inputSource"),
            amplifier: f.opt_text("amplifier"),
            current_noise: f.objects("currentNoise"),
            frequencies_hz: f.opt_nums("frequenciesHz"),
            band_hz: f.opt_nums("bandHz"),
            signal_rms: f.opt_num("signalRms"),
            signal_frequency_hz: f.opt_num("signalFrequencyHz"),
        }
    }
}

fn default_temperature() -> f64 {
    300.0
}

fn refuse(param: &str, e: crate::Error) -> JsValue {
    error_at(param, e, None)
}

fn not_here(given: bool, name: &str, export: &str) -> Result<(), JsValue> {
    if given {
        Err(error_at(
            name,
            crate::Error::UnknownField {
                param: "",
                expected: "",
            },
            Some(alloc::format!(
                "{name}: unknown field; {export} does not take it"
            )),
        ))
    } else {
        Ok(())
    }
}

impl Options {
    fn setup(&self) -> Result<NoiseSetup, JsValue> {
        let output = match &self.output {
            OutputOption::Node(n) => NoiseOutput::node(n),
            OutputOption::Pair { plus, minus } => NoiseOutput::Voltage {
                plus: plus.clone(),
                minus: minus.clone(),
            },
            OutputOption::Element { element } => NoiseOutput::Current {
                element: element.clone(),
            },
            OutputOption::Neither => {
                return Err(refuse(
                    "output",
                    crate::Error::OutOfDomain {
                        param: "",
                        requirement: "must be a node name, {plus, minus} or {element}",
                    },
                ))
            }
        };
        let mut current_noise = Vec::with_capacity(self.current_noise.len());
        for (i, x) in self.current_noise.iter().enumerate() {
            let kind = match (x.shot, x.density) {
                (true, None) => SourceNoiseKind::Shot,
                (false, Some(d)) => SourceNoiseKind::Density(NoiseDensity {
                    density: d,
                    corner_hz: x.corner_hz,
                }),
                _ => {
                    return Err(refuse(
                        &alloc::format!("currentNoise[{i}]"),
                        crate::Error::OutOfDomain {
                            param: "",
                            requirement: "give either shot: true or a density",
                        },
                    ))
                }
            };
            current_noise.push(CurrentSourceNoise {
                element: x.element.clone(),
                kind,
            });
        }
        Ok(NoiseSetup {
            output,
            temperature_k: self.temperature_k,
            input_source: self.input_source.clone(),
            amplifier: self.amplifier.clone(),
            current_noise,
        })
    }
}

/// A circuit error as the circuit exports throw it (`code`, `param`, `subject`),
/// its message naming the field as the caller wrote it:
/// `subject: temperatureK: reason`.
fn circuit_error(e: CircuitError) -> JsValue {
    let param = caller_name(e.error.param(), &[]);
    let message = if e.name.is_empty() {
        alloc::format!("{param}: {}", e.error.reason())
    } else {
        alloc::format!("{}: {param}: {}", e.name.as_str(), e.error.reason())
    };
    let err = error_at(&param, e.error, Some(message));
    // Reflect::set only fails on frozen or proxy objects; a fresh Error is neither.
    let _ = js_sys::Reflect::set(&err, &"subject".into(), &e.name.as_str().into());
    err
}

fn throw<T>(r: crate::circuit::CircuitResult<T>) -> Result<T, JsValue> {
    r.map_err(circuit_error)
}

/// Noise densities of a circuit over frequency (`CircuitNoiseDensityOptions`):
/// the total, each source's density and share by name, the signal gain and
/// input-referred density, the noise gain and its peak, as typed arrays.
#[wasm_bindgen(js_name = circuitNoise, unchecked_return_type = "CircuitNoiseDensities")]
pub fn circuit_noise(
    #[wasm_bindgen(unchecked_param_type = "CircuitNoiseDensityOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: Options = read("", &options)?;
    let export = "circuitNoise";
    not_here(o.band_hz.is_some(), "bandHz", export)?;
    not_here(o.signal_rms.is_some(), "signalRms", export)?;
    not_here(o.signal_frequency_hz.is_some(), "signalFrequencyHz", export)?;
    let freqs = o.frequencies_hz.as_deref().ok_or_else(|| {
        core_error(
            crate::Error::Missing {
                param: "frequencies_hz",
            },
            &[],
        )
    })?;
    let c = throw(read_circuit(&o.circuit))?;
    let d = throw(noise_densities(&c, &o.setup()?, freqs))?;
    let out = typed_arrays(&[
        ("frequenciesHz", &d.frequencies_hz),
        ("total", &d.total),
        ("signalGain", &d.signal_gain),
        ("inputReferred", &d.input_referred),
        ("noiseGain", &d.noise_gain),
    ]);
    let sources: JsValue = js_sys::Object::new().into();
    let shares: JsValue = js_sys::Object::new().into();
    let kinds = js_sys::Object::new();
    for s in &d.sources {
        set_typed_arrays(&sources, &[(s.name.as_str(), &s.density)]);
        set_typed_arrays(&shares, &[(s.name.as_str(), &s.share)]);
        let _ = js_sys::Reflect::set(&kinds, &s.name.as_str().into(), &to_js(&s.kind)?);
    }
    // Reflect::set only fails on frozen or proxy objects; ours are fresh.
    let _ = js_sys::Reflect::set(&out, &"sources".into(), &sources);
    let _ = js_sys::Reflect::set(&out, &"shares".into(), &shares);
    let _ = js_sys::Reflect::set(&out, &"kinds".into(), &kinds);
    let _ = js_sys::Reflect::set(&out, &"noiseGainPeak".into(), &to_js(&d.noise_gain_peak)?);
    Ok(out)
}

#[derive(serde::Serialize)]
#[serde(rename_all = "camelCase")]
struct BandResult {
    #[serde(flatten)]
    band: crate::noise::circuit::BandNoise,
    snr_db: Option<f64>,
}

/// rms noise of a circuit over a band (`CircuitNoiseIntegralOptions`): the
/// total, each source's rms and share, the input-referred rms and, for a given
/// signal level, the SNR.
#[wasm_bindgen(js_name = circuitNoiseIntegral, unchecked_return_type = "CircuitNoiseBand")]
pub fn circuit_noise_integral(
    #[wasm_bindgen(unchecked_param_type = "CircuitNoiseIntegralOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: Options = read("", &options)?;
    not_here(
        o.frequencies_hz.is_some(),
        "frequenciesHz",
        "circuitNoiseIntegral",
    )?;
    let band = match o.band_hz.as_deref() {
        Some(&[lo, hi]) => [lo, hi],
        Some(_) => {
            return Err(refuse(
                "bandHz",
                crate::Error::OutOfDomain {
                    param: "",
                    requirement: "must be two frequencies, [fLow, fHigh]",
                },
            ))
        }
        None => return Err(core_error(crate::Error::Missing { param: "band_hz" }, &[])),
    };
    let c = throw(read_circuit(&o.circuit))?;
    let setup = o.setup()?;
    let band = throw(band_noise(&c, &setup, band))?;
    let snr_db = match o.signal_rms {
        None => {
            not_here(
                o.signal_frequency_hz.is_some(),
                "signalFrequencyHz",
                "circuitNoiseIntegral without signalRms",
            )?;
            None
        }
        Some(s) => Some(signal_snr(&c, &setup, &band, s, o.signal_frequency_hz)?),
    };
    to_js(&BandResult { band, snr_db })
}

/// The SNR for a signal of rms `s`: at the input source times |G(f)| when one
/// is named, else at the output.
fn signal_snr(
    c: &crate::circuit::Circuit,
    setup: &NoiseSetup,
    band: &crate::noise::circuit::BandNoise,
    s: f64,
    frequency: Option<f64>,
) -> Result<f64, JsValue> {
    let at_output = match &setup.input_source {
        None => s,
        Some(_) => {
            let f = frequency.ok_or_else(|| {
                core_error(
                    crate::Error::Missing {
                        param: "signal_frequency_hz",
                    },
                    &[],
                )
            })?;
            let d = throw(noise_densities(c, setup, &[f]).map_err(|mut e| {
                if e.error.param() == "frequencies_hz" {
                    e.error = crate::Error::OutOfDomain {
                        param: "signal_frequency_hz",
                        requirement: "must be finite and greater than zero",
                    };
                }
                e
            }))?;
            let g = d.signal_gain.first().copied().unwrap_or(0.0);
            crate::check::positive("signal_rms", s).map_err(|e| core_error(e, &[]))? * g
        }
    };
    band.snr_db(at_output).map_err(|e| core_error(e, &[]))
}
