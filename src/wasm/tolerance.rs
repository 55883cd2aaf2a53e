//! JS binding of the tolerance area (`docs/tolerance.md`): a stage document,
//! its parts' spreads, the amplifier's spreads, a temperature range and a spec
//! in one options object; worst case, Monte Carlo and sensitivities out.
//!
//! Errors are `LoopwrightError`s whose `param` is the caller's path
//! (`parts[1].tolerance`, `spec[0].upper`, `temperatureC`, `trials`) and whose
//! `subject` is the stage element at fault (`Rf`), or `""`.

use super::options::{self, Fields, FromOptions, Plain};
use super::stage::{document, thrown, Document};
use super::to_js;
use crate::circuit::json::read_circuit;
use crate::circuit::tolerance::Tolerance;
use crate::circuit::CircuitError;
use crate::error::Error;
use crate::json::Json;
use crate::stage::Spread;
use crate::tolerance::montecarlo::MonteCarlo;
use crate::tolerance::parts::Varied;
use crate::tolerance::sensitivity::Sensitivity;
use crate::tolerance::worstcase::WorstCase;
use crate::tolerance::{
    monte_carlo, sensitivity, validate_spec, worst_case, AmplifierSpread, CircuitPorts, Figure,
    Limit, MonteCarloOptions, PartSpread, TolStage, DEFAULT_MAX_CORNERS,
};
use alloc::string::String;
use alloc::vec::Vec;
use serde::Serialize;
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const TOLERANCE_TYPES: &str = r#"
/** A part's tolerance (docs/circuit.md): uniform ±percent, normal ±percent at `sigmas` σ, or limits. */
export type PartTolerance =
  | { distribution: "uniform"; percent: number }
  | { distribution: "normal"; percent: number; sigmas: number }
  | { distribution: "limits"; min: number; typ: number; max: number };
/** The spread of one stage part (`rf`, `rg`, `cf`, `rs`, `cs`, `rl`, `cl`, `riso`). */
export interface PartSpreadOptions { part: string; tolerance?: PartTolerance; tempcoPpm?: number; }
/** A datasheet figure as min/typ/max. */
export interface MinTypMax { min: number; typ: number; max: number; }
/** One amplifier's spreads beyond A0: min/typ/max with typ the model's own figure. */
export interface AmplifierSpreadOptions { gbwHz?: MinTypMax; ro?: MinTypMax; }
/**
 * One limit of a spec (docs/tolerance.md): the figure, its settings, and the
 * limits (either may be left out). `freqHz` for gainDb, phaseDeg, gainErrorPercent,
 * inputImpedanceOhm, outputImpedanceOhm; `target` for gainErrorPercent; `bandHz`
 * for outputNoiseRms, inputNoiseRms; `band` for settlingTimeS.
 */
export interface ToleranceLimit {
  figure: "gainDb" | "phaseDeg" | "gainErrorPercent" | "bandwidthHz" | "peakingDb" | "phaseMarginDeg" | "gainMarginDb" | "inputImpedanceOhm" | "outputImpedanceOhm" | "outputNoiseRms" | "inputNoiseRms" | "settlingTimeS";
  freqHz?: number; target?: number; bandHz?: [number, number]; band?: number;
  lower?: number; upper?: number;
}
/**
 * Options of `stageTolerance`: a stage document with `parts`, or a circuit
 * document (its elements carry their own `tolerance` and `tempco`) with the
 * names its figures are read at, as `circuitGain` and `circuitLoopGain` take them.
 */
export interface StageToleranceOptions {
  /** A stage document (docs/stage.md), object or JSON text; or give `circuit`. */
  stage?: object | string;
  /** A circuit document, version 2 (docs/circuit.md), object or JSON text; or give `stage`. */
  circuit?: object | string;
  /** Circuit only: the independent source the gain is per unit of (required). */
  input?: string;
  /** Circuit only: the output node (required unless `outputElement` is given). */
  output?: string;
  /** Circuit only: the node the output is read against (default ground "0"). */
  outputMinus?: string;
  /** Circuit only: the element whose current is the output, in place of `output` (the gain in A/V or A/A). */
  outputElement?: string;
  /** Circuit only: the amplifier whose loop gives the margins (default: the only amplifier element). */
  controlled?: string;
  /** Stage only: part spreads; parts left out are exact. */
  parts?: PartSpreadOptions[];
  /**
   * The amplifier's GBW and output resistance spreads (A0's is in the model):
   * `{gbwHz, ro}` for a stage's amplifier or a circuit's `controlled` (or only)
   * amplifier, or by amplifier element name, `{U1: {gbwHz}, U2: {gbwHz, ro}}`.
   */
  amplifierSpread?: AmplifierSpreadOptions | { [amplifier: string]: AmplifierSpreadOptions };
  /** Temperature range, °C (default [25, 25]). */
  temperatureC?: [number, number];
  spec: ToleranceLimit[];
  /** Which analyses (default all three). */
  analyses?: ("worstCase" | "monteCarlo" | "sensitivity")[];
  /** Monte Carlo seed, 0 … 2^53 − 1 (default 1). */
  seed?: number;
  /** Monte Carlo trials, 2 … 100000 (default 10000). */
  trials?: number;
  /** Histogram bins (default 20). */
  bins?: number;
  /** Failed trials kept, 0 … 1000 (default 20). */
  keepFailures?: number;
  /** Largest corner count enumerated exactly (default 256, at most 65536). */
  maxCorners?: number;
}
/** A varied quantity: its name (`Rf`, `U1.a0`), nominal, extremes at 25 °C, tempco. */
export interface ToleranceVaried { name: string; nominal: number; low: number; high: number; tempcoPpm: number; }
/** A limit as the analyses report it: the figure's name and settings, and the limits. */
export interface ToleranceLimitOut { figure: { figure: string; [setting: string]: unknown }; lower: number | null; upper: number | null; }
/** An extreme: the figure's value, the part values (in `parts` order) and the temperature. */
export interface ToleranceExtreme { value: number; values: number[]; temperatureC: number; }
export interface ToleranceWorstCase {
  method: "corners" | "sensitivity-guided";
  parts: string[];
  evaluations: number;
  figures: { limit: ToleranceLimitOut; nominal: number; min: ToleranceExtreme; max: ToleranceExtreme; searched: string[]; meets: boolean }[];
  meets: boolean;
}
export interface ToleranceMonteCarlo {
  seed: number;
  trials: number;
  temperaturesC: number[];
  yieldFraction: number;
  limits: { limit: ToleranceLimitOut; nominal: number[]; yieldFraction: number; undefined: number; stats: MonteCarloStats | null }[];
  failedCount: number;
  failed: { trial: number; values: number[]; figures: (number | null)[][]; failedLimits: number[] }[];
}
/** Statistics of a figure's trials (as the network Monte Carlo's). */
export interface MonteCarloStats {
  count: number; mean: number; sd: number; min: number; max: number;
  percentiles: { percent: number; value: number }[];
  yieldFraction: number | null;
  histogram: { edges: number[]; counts: number[] };
}
export interface ToleranceSensitivity {
  temperatureC: number;
  figures: {
    limit: ToleranceLimitOut; nominal: number; sd: number;
    parts: { part: string; perUnit: number; normalised: number | null; varianceShare: number }[];
    tightenFirst: string | null;
  }[];
  tightenFirst: string | null;
}
/** The result of `stageTolerance`; an analysis not asked for is null. */
export interface StageTolerance {
  parts: ToleranceVaried[];
  temperaturesC: number[];
  worstCase: ToleranceWorstCase | null;
  monteCarlo: ToleranceMonteCarlo | null;
  sensitivity: ToleranceSensitivity | null;
}
"#;

struct TolOptions {
    stage: Option<Json>,
    circuit: Option<Json>,
    input: Option<String>,
    output: Option<String>,
    output_minus: Option<String>,
    output_element: Option<String>,
    controlled: Option<String>,
    parts: Vec<PartOptions>,
    amplifier_spread: Option<AmpSpreadForm>,
    temperature_c: Option<Vec<f64>>,
    spec: Vec<LimitOptions>,
    analyses: Option<Vec<String>>,
    seed: f64,
    trials: f64,
    bins: f64,
    keep_failures: f64,
    max_corners: f64,
}

impl FromOptions for TolOptions {
    const FIELDS: &'static [&'static str] = &[
        "stage",
        "circuit",
        "input",
        "output",
        "outputMinus",
        "outputElement",
        "controlled",
        "parts",
        "amplifierSpread",
        "temperatureC",
        "spec",
        "analyses",
        "seed",
        "trials",
        "bins",
        "keepFailures",
        "maxCorners",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        // `stage` is required unless `circuit` is given.
        let circuit = f.raw_present("circuit").then(|| f.document("circuit"));
        let stage = (circuit.is_none() || f.raw_present("stage")).then(|| f.document("stage"));
        TolOptions {
            stage,
            circuit,
            input: f.opt_text("input"),
            output: f.opt_text("output"),
            output_minus: f.opt_text("outputMinus"),
            output_element: f.opt_text("outputElement"),
            controlled: f.opt_text("controlled"),
            parts: f.objects("parts"),
            amplifier_spread: amplifier_spread_form(f),
            temperature_c: f.opt_nums("temperatureC"),
            spec: f.objects("spec"),
            analyses: texts(f, "analyses"),
            seed: f.num_or("seed", 1.0),
            trials: f.num_or("trials", 10_000.0),
            bins: f.num_or("bins", 20.0),
            keep_failures: f.num_or("keepFailures", 20.0),
            max_corners: f.num_or("maxCorners", DEFAULT_MAX_CORNERS as f64),
        }
    }
}

/// A list of names, `None` when left out.
fn texts(f: &mut Fields, key: &str) -> Option<Vec<String>> {
    let (at, v) = f.raw(key)?;
    let items = match v {
        Plain::List(items) => items,
        other => {
            f.refuse(key, at, &other, "a list of names");
            return None;
        }
    };
    let mut out = Vec::with_capacity(items.len());
    for item in items {
        match item {
            Plain::Text(t) => out.push(t),
            other => {
                f.refuse(key, at, &other, "a list of names");
                return None;
            }
        }
    }
    Some(out)
}

fn optional<T: FromOptions>(f: &mut Fields, key: &str) -> Option<T> {
    let (at, v) = f.raw(key)?;
    let path = f.key_path(key);
    f.nested(at, path, v)
}

#[derive(Default)]
struct PartOptions {
    part: String,
    tolerance: Option<TolOptionsObj>,
    tempco_ppm: Option<f64>,
}

impl FromOptions for PartOptions {
    const FIELDS: &'static [&'static str] = &["part", "tolerance", "tempcoPpm"];
    fn from_fields(f: &mut Fields) -> Self {
        PartOptions {
            part: f.text("part"),
            tolerance: optional(f, "tolerance"),
            tempco_ppm: f.opt_num("tempcoPpm"),
        }
    }
}

#[derive(Default)]
struct TolOptionsObj {
    distribution: String,
    percent: Option<f64>,
    sigmas: Option<f64>,
    min: Option<f64>,
    typ: Option<f64>,
    max: Option<f64>,
}

impl FromOptions for TolOptionsObj {
    const FIELDS: &'static [&'static str] =
        &["distribution", "percent", "sigmas", "min", "typ", "max"];
    fn from_fields(f: &mut Fields) -> Self {
        TolOptionsObj {
            distribution: f.text("distribution"),
            percent: f.opt_num("percent"),
            sigmas: f.opt_num("sigmas"),
            min: f.opt_num("min"),
            typ: f.opt_num("typ"),
            max: f.opt_num("max"),
        }
    }
}

#[derive(Default)]
struct AmpSpreadOptions {
    gbw_hz: Option<MinTypMaxOptions>,
    ro: Option<MinTypMaxOptions>,
}

impl FromOptions for AmpSpreadOptions {
    const FIELDS: &'static [&'static str] = &["gbwHz", "ro"];
    fn from_fields(f: &mut Fields) -> Self {
        AmpSpreadOptions {
            gbw_hz: optional(f, "gbwHz"),
            ro: optional(f, "ro"),
        }
    }
}

/// `amplifierSpread` as given: one amplifier's `{gbwHz, ro}`, or by
/// amplifier element name `{U1: {gbwHz, ro}, U2: {…}}` (in the caller's order).
enum AmpSpreadForm {
    One(AmpSpreadOptions),
    Each(Vec<(String, AmpSpreadOptions)>),
}

/// Read `amplifierSpread`: an object with `gbwHz` or `ro` (or none at all) is
/// one amplifier's spreads; any other object holds one such per amplifier,
/// each read at `amplifierSpread.<name>`.
fn amplifier_spread_form(f: &mut Fields) -> Option<AmpSpreadForm> {
    let (at, v) = f.raw("amplifierSpread")?;
    let path = f.key_path("amplifierSpread");
    let per_amplifier = match &v {
        Plain::Map(entries) => {
            !entries.is_empty()
                && !entries
                    .iter()
                    .any(|(k, _)| AmpSpreadOptions::FIELDS.contains(&k.as_str()))
        }
        _ => false,
    };
    if !per_amplifier {
        return f.nested(at, path, v).map(AmpSpreadForm::One);
    }
    let Plain::Map(entries) = v else {
        return None;
    };
    let mut out = Vec::with_capacity(entries.len());
    for (name, item) in entries {
        let item_path = alloc::format!("{path}.{name}");
        out.push((name, f.nested(at, item_path, item)?));
    }
    Some(AmpSpreadForm::Each(out))
}

#[derive(Default)]
struct MinTypMaxOptions {
    min: f64,
    typ: f64,
    max: f64,
}

impl FromOptions for MinTypMaxOptions {
    const FIELDS: &'static [&'static str] = &["min", "typ", "max"];
    fn from_fields(f: &mut Fields) -> Self {
        MinTypMaxOptions {
            min: f.num("min"),
            typ: f.num("typ"),
            max: f.num("max"),
        }
    }
}

#[derive(Default)]
struct LimitOptions {
    figure: String,
    freq_hz: Option<f64>,
    target: Option<f64>,
    band_hz: Option<Vec<f64>>,
    band: Option<f64>,
    lower: Option<f64>,
    upper: Option<f64>,
}

impl FromOptions for LimitOptions {
    const FIELDS: &'static [&'static str] = &[
        "figure", "freqHz", "target", "bandHz", "band", "lower", "upper",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        LimitOptions {
            figure: f.text("figure"),
            freq_hz: f.opt_num("freqHz"),
            target: f.opt_num("target"),
            band_hz: f.opt_nums("bandHz"),
            band: f.opt_num("band"),
            lower: f.opt_num("lower"),
            upper: f.opt_num("upper"),
        }
    }
}

const PARTS: [&str; 8] = ["rf", "rg", "cf", "rs", "cs", "rl", "cl", "riso"];

fn missing(path: String) -> JsValue {
    thrown(&path, Error::Missing { param: "" }, "", None)
}

fn limit_of(k: usize, l: &LimitOptions) -> Result<Limit, JsValue> {
    let at = |field: &str| alloc::format!("spec[{k}].{field}");
    let freq = || l.freq_hz.ok_or_else(|| missing(at("freqHz")));
    let figure = match l.figure.as_str() {
        "gainDb" => Figure::GainDb { freq_hz: freq()? },
        "phaseDeg" => Figure::PhaseDeg { freq_hz: freq()? },
        "gainErrorPercent" => Figure::GainErrorPercent {
            freq_hz: freq()?,
            target: l.target.ok_or_else(|| missing(at("target")))?,
        },
        "bandwidthHz" => Figure::BandwidthHz,
        "peakingDb" => Figure::PeakingDb,
        "phaseMarginDeg" => Figure::PhaseMarginDeg,
        "gainMarginDb" => Figure::GainMarginDb,
        "inputImpedanceOhm" => Figure::InputImpedanceOhm { freq_hz: freq()? },
        "outputImpedanceOhm" => Figure::OutputImpedanceOhm { freq_hz: freq()? },
        "outputNoiseRms" | "inputNoiseRms" => {
            let b = l.band_hz.as_deref().ok_or_else(|| missing(at("bandHz")))?;
            let [lo, hi] = <[f64; 2]>::try_from(b).map_err(|_| {
                let e = Error::OutOfDomain {
                    param: "",
                    requirement: "must be a list of two frequencies [low, high]",
                };
                thrown(&at("bandHz"), e, "", None)
            })?;
            if l.figure == "outputNoiseRms" {
                Figure::OutputNoiseRms { band_hz: [lo, hi] }
            } else {
                Figure::InputNoiseRms { band_hz: [lo, hi] }
            }
        }
        "settlingTimeS" => Figure::SettlingTimeS {
            band: l.band.ok_or_else(|| missing(at("band")))?,
        },
        _ => {
            let e = Error::UnknownName {
                param: "",
                expected: crate::tolerance::FIGURE_NAMES,
            };
            return Err(thrown(&at("figure"), e, "", None));
        }
    };
    let limit = Limit {
        figure,
        lower: l.lower,
        upper: l.upper,
    };
    validate_spec(&[limit]).map_err(|e| thrown(&at(e.param()), e, "", None))?;
    Ok(limit)
}

fn tolerance_of(k: usize, t: &TolOptionsObj) -> Result<Tolerance, JsValue> {
    let at = |field: &str| alloc::format!("parts[{k}].tolerance.{field}");
    let need = |v: Option<f64>, field: &str| v.ok_or_else(|| missing(at(field)));
    Ok(match t.distribution.as_str() {
        "uniform" => Tolerance::Uniform {
            percent: need(t.percent, "percent")?,
        },
        "normal" => Tolerance::Normal {
            percent: need(t.percent, "percent")?,
            sigmas: need(t.sigmas, "sigmas")?,
        },
        "limits" => Tolerance::Limits {
            min: need(t.min, "min")?,
            typ: need(t.typ, "typ")?,
            max: need(t.max, "max")?,
        },
        _ => {
            let e = Error::UnknownName {
                param: "",
                expected: crate::circuit::tolerance::DISTRIBUTION_NAMES,
            };
            return Err(thrown(&at("distribution"), e, "", None));
        }
    })
}

fn whole(param: &str, x: f64, limit: usize) -> Result<usize, JsValue> {
    crate::network::montecarlo::count_from_number("", x, limit)
        .map_err(|e| thrown(param, e, "", None))
}

#[derive(Serialize)]
#[serde(rename_all = "camelCase")]
struct ToleranceOut {
    parts: Vec<Varied>,
    temperatures_c: Vec<f64>,
    worst_case: Option<WorstCase>,
    monte_carlo: Option<MonteCarlo>,
    sensitivity: Option<Sensitivity>,
}

/// A core error of the analyses under the caller's names.
fn analysis(e: CircuitError, parts: &[PartOptions], amp: Option<&AmpSpreadForm>) -> JsValue {
    let subject = e.name.as_str();
    let param = match e.error.param() {
        "tolerance" | "tempco" | "part" => {
            let field = match e.error.param() {
                "tempco" => "tempcoPpm",
                p => p,
            };
            let lower = subject.to_ascii_lowercase();
            match parts.iter().position(|p| p.part == lower) {
                Some(i) => alloc::format!("parts[{i}].{field}"),
                None => String::from("parts"),
            }
        }
        "temperature" => String::from("temperatureC"),
        p @ ("gbwHz" | "ro") => amplifier_path(amp, subject, p),
        "maxCorners" | "trials" | "bins" | "keepFailures" => String::from(e.error.param()),
        p => alloc::format!("stage.{p}"),
    };
    thrown(&param, e.error, subject, None)
}

/// A core error of the analyses of a circuit document under the caller's
/// names: an element's spread as `circuit.elements[i].tolerance` (or
/// `.tempco`), the ports and settings as given.
fn circuit_analysis(
    e: CircuitError,
    c: &crate::circuit::Circuit,
    amp: Option<&AmpSpreadForm>,
) -> JsValue {
    let subject = e.name.as_str();
    let param = match e.error.param() {
        p @ ("tolerance" | "tempco") => match c.element_index(subject) {
            Ok(i) => alloc::format!("circuit.elements[{i}].{p}"),
            Err(_) => String::from("circuit"),
        },
        "temperature" => String::from("temperatureC"),
        p @ ("gbwHz" | "ro") => amplifier_path(amp, subject, p),
        "amplifierSpread" => match amp {
            Some(AmpSpreadForm::Each(_)) => alloc::format!("amplifierSpread.{subject}"),
            _ => String::from("amplifierSpread"),
        },
        p @ ("input" | "output" | "outputMinus" | "outputElement" | "controlled" | "maxCorners"
        | "trials" | "bins" | "keepFailures") => String::from(p),
        p => alloc::format!("circuit.{p}"),
    };
    thrown(&param, e.error, subject, None)
}

/// The caller's path of an amplifier spread the core refused (param `p`,
/// `gbwHz` or `ro`, of the amplifier `subject`): `amplifierSpread.gbwHz.min`
/// (one amplifier's form) or `amplifierSpread.U2.gbwHz.min` (by name), the
/// last key the first of min, typ, max at fault: not a positive number, then
/// min above typ, typ above max, else typ (not the model's own figure).
fn amplifier_path(amp: Option<&AmpSpreadForm>, subject: &str, p: &str) -> String {
    // A stage's amplifier spreads are refused unnamed: its one amplifier, U1.
    let subject = if subject.is_empty() { "U1" } else { subject };
    let (base, given) = match amp {
        Some(AmpSpreadForm::Each(list)) => (
            alloc::format!("amplifierSpread.{subject}.{p}"),
            list.iter().find(|(n, _)| n == subject).map(|(_, a)| a),
        ),
        Some(AmpSpreadForm::One(a)) => (alloc::format!("amplifierSpread.{p}"), Some(a)),
        None => (alloc::format!("amplifierSpread.{p}"), None),
    };
    let spread = given.and_then(|a| {
        if p == "ro" {
            a.ro.as_ref()
        } else {
            a.gbw_hz.as_ref()
        }
    });
    let Some(s) = spread else { return base };
    let bad = |x: f64| !(x.is_finite() && x > 0.0);
    let field = if bad(s.min) {
        "min"
    } else if bad(s.typ) {
        "typ"
    } else if bad(s.max) {
        "max"
    } else if s.min > s.typ {
        "min"
    } else if s.typ > s.max {
        "max"
    } else {
        "typ"
    };
    alloc::format!("{base}.{field}")
}

/// The circuit document in `circuit` (an object or its JSON text), its
/// errors under the caller's path: `circuit.elements[i].tolerance` for the
/// element at fault, `circuit.format` for a stage document.
fn circuit_document(doc: Json) -> Result<crate::circuit::Circuit, JsValue> {
    use crate::json::Members;
    let (text, tree) = match doc {
        Json::String(text) => {
            let tree = crate::json::parse(&text).ok();
            (text, tree)
        }
        Json::Object(_) => (doc.to_text(), Some(doc)),
        _ => {
            let error = Error::WrongType {
                param: "",
                expected: "a circuit document, or its JSON text",
            };
            return Err(thrown("circuit", error, "", None));
        }
    };
    let members = tree.as_ref().and_then(Json::as_object);
    if members
        .and_then(|m| m.field("format"))
        .and_then(Json::as_str)
        == Some("loopwright-stage")
    {
        let error = Error::UnknownName {
            param: "",
            expected: "loopwright-circuit (a stage document goes in stage)",
        };
        return Err(thrown("circuit.format", error, "", None));
    }
    read_circuit(&text).map_err(|e| {
        let subject = e.name.as_str();
        let index = members
            .and_then(|m| m.field("elements"))
            .and_then(Json::as_array)
            .and_then(|els| {
                els.iter().position(|el| {
                    el.as_object()
                        .and_then(|o| o.field("name"))
                        .and_then(Json::as_str)
                        == Some(subject)
                })
            });
        let p = e.error.param();
        let param = match (index, p) {
            (_, "" | "json") => String::from("circuit"),
            (Some(i), p) => alloc::format!("circuit.elements[{i}].{p}"),
            (None, p) => alloc::format!("circuit.{p}"),
        };
        thrown(&param, e.error, subject, None)
    })
}

/// The subject of a `{circuit, input, output, outputMinus, controlled}` call:
/// the circuit's own element spreads, `amplifierSpread` on the loop's amplifier.
fn circuit_subject(
    o: &TolOptions,
    doc: Json,
    temperature_c: [f64; 2],
) -> Result<(TolStage, crate::circuit::Circuit), JsValue> {
    if !o.parts.is_empty() {
        let e = Error::OutOfDomain {
            param: "",
            requirement:
                "belongs to a stage; a circuit's elements carry their own tolerance and tempco",
        };
        return Err(thrown("parts", e, "", None));
    }
    let c = circuit_document(doc)?;
    let need = |v: &Option<String>, field: &str| {
        v.clone()
            .ok_or_else(|| thrown(field, Error::Missing { param: "" }, "", None))
    };
    let output = match (&o.output, &o.output_element) {
        (Some(_), Some(_)) => {
            let e = Error::OutOfDomain {
                param: "",
                requirement: "give output (and outputMinus) or outputElement, not both",
            };
            return Err(thrown("outputElement", e, "", None));
        }
        (None, Some(_)) => String::new(),
        (output, None) => need(output, "output")?,
    };
    let ports = CircuitPorts {
        input: need(&o.input, "input")?,
        output,
        output_minus: o.output_minus.clone(),
        output_element: o.output_element.clone(),
        controlled: o.controlled.clone(),
    };
    let target = ports
        .controlled
        .clone()
        .or_else(|| crate::tolerance::parts::only_amplifier(&c));
    let amplifiers = match (&o.amplifier_spread, target) {
        (None, _) => Vec::new(),
        (Some(AmpSpreadForm::Each(list)), _) => list
            .iter()
            .map(|(name, a)| (name.clone(), spreads_of(a)))
            .collect(),
        (Some(AmpSpreadForm::One(a)), Some(name)) => alloc::vec![(name, spreads_of(a))],
        (Some(AmpSpreadForm::One(_)), None) => {
            let e = Error::OutOfDomain {
                param: "",
                requirement: "applies to the controlled amplifier: name it in controlled, or give the spreads by amplifier ({U1: {gbwHz}, U2: {…}})",
            };
            return Err(thrown("amplifierSpread", e, "", None));
        }
    };
    let ts = TolStage::from_circuit(&c, ports, &amplifiers, temperature_c)
        .map_err(|e| circuit_analysis(e, &c, o.amplifier_spread.as_ref()))?;
    Ok((ts, c))
}

/// Whole-stage tolerance against a spec (docs/tolerance.md), of a stage
/// document from `{stage, parts, amplifierSpread, temperatureC, spec, analyses,
/// seed, trials, bins, keepFailures, maxCorners}`, or of a circuit document
/// from `{circuit, input, output, outputMinus, controlled, amplifierSpread,
/// temperatureC, spec, …}` (its elements' own `tolerance` and `tempco`, its
/// amplifiers' min/typ/max A0): `{parts, temperaturesC, worstCase,
/// monteCarlo, sensitivity}` (an analysis not asked for is `null`).
#[wasm_bindgen(js_name = stageTolerance, unchecked_return_type = "StageTolerance")]
pub fn stage_tolerance(
    #[wasm_bindgen(unchecked_param_type = "StageToleranceOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let mut o: TolOptions = options::read("", &options)?;
    if o.circuit.is_some() && o.stage.is_some() {
        let e = Error::OutOfDomain {
            param: "",
            requirement: "give stage or circuit, not both",
        };
        return Err(thrown("circuit", e, "", None));
    }
    let Some(stage_doc) = o.stage.take() else {
        return circuit_tolerance(o);
    };
    let Document::Stage(_, stage) = document(stage_doc, "stage", None)? else {
        let error = Error::UnknownName {
            param: "",
            expected: "loopwright-stage",
        };
        return Err(thrown("stage.format", error, "", None));
    };
    let mut spreads = Vec::with_capacity(o.parts.len());
    for (k, p) in o.parts.iter().enumerate() {
        let Some(part) = PARTS.iter().find(|n| **n == p.part) else {
            let e = Error::UnknownName {
                param: "",
                expected: crate::tolerance::parts::PART_NAMES,
            };
            return Err(thrown(&alloc::format!("parts[{k}].part"), e, "", None));
        };
        spreads.push(PartSpread {
            part,
            tolerance: p
                .tolerance
                .as_ref()
                .map(|t| tolerance_of(k, t))
                .transpose()?,
            tempco_ppm: p.tempco_ppm,
        });
    }
    let amp = stage_amplifier_spread(&o)?;
    let temperature_c = temperatures(&o)?;
    let spec = spec_of(&o)?;
    let given = o.amplifier_spread.as_ref();
    let ts = TolStage::new(&stage, &spreads, amp, temperature_c)
        .map_err(|e| analysis(e, &o.parts, given))?;
    run(&o, &ts, &spec, |e| analysis(e, &o.parts, given))
}

/// The circuit-document form of [`stage_tolerance`].
fn circuit_tolerance(mut o: TolOptions) -> Result<JsValue, JsValue> {
    let doc = o.circuit.take().unwrap_or(Json::Null);
    let temperature_c = temperatures(&o)?;
    let spec = spec_of(&o)?;
    let (ts, c) = circuit_subject(&o, doc, temperature_c)?;
    run(&o, &ts, &spec, |e| {
        circuit_analysis(e, &c, o.amplifier_spread.as_ref())
    })
}

/// One amplifier's spreads as the core takes them.
fn spreads_of(a: &AmpSpreadOptions) -> AmplifierSpread {
    let spread = |m: &Option<MinTypMaxOptions>| {
        m.as_ref().map(|m| Spread {
            min: m.min,
            typ: m.typ,
            max: m.max,
        })
    };
    AmplifierSpread {
        gbw_hz: spread(&a.gbw_hz),
        ro: spread(&a.ro),
    }
}

/// A stage's amplifier spreads: `{gbwHz, ro}`, or by name with the stage's
/// one amplifier `U1` alone (`{U1: {gbwHz, ro}}`).
fn stage_amplifier_spread(o: &TolOptions) -> Result<AmplifierSpread, JsValue> {
    match &o.amplifier_spread {
        None => Ok(AmplifierSpread::default()),
        Some(AmpSpreadForm::One(a)) => Ok(spreads_of(a)),
        Some(AmpSpreadForm::Each(list)) => {
            let mut out = AmplifierSpread::default();
            for (name, a) in list {
                if name != "U1" {
                    let e = Error::UnknownName {
                        param: "",
                        expected: "U1 (a stage has one amplifier), or gbwHz, ro",
                    };
                    return Err(thrown(
                        &alloc::format!("amplifierSpread.{name}"),
                        e,
                        name,
                        None,
                    ));
                }
                out = spreads_of(a);
            }
            Ok(out)
        }
    }
}

fn temperatures(o: &TolOptions) -> Result<[f64; 2], JsValue> {
    match o.temperature_c.as_deref() {
        None => Ok([25.0, 25.0]),
        Some(&[lo, hi]) => Ok([lo, hi]),
        Some(_) => {
            let e = Error::OutOfDomain {
                param: "",
                requirement: "must be a list of two temperatures [low, high]",
            };
            Err(thrown("temperatureC", e, "", None))
        }
    }
}

fn spec_of(o: &TolOptions) -> Result<Vec<Limit>, JsValue> {
    if o.spec.is_empty() {
        let e = Error::OutOfDomain {
            param: "",
            requirement: "must hold at least one limit",
        };
        return Err(thrown("spec", e, "", None));
    }
    o.spec
        .iter()
        .enumerate()
        .map(|(k, l)| limit_of(k, l))
        .collect()
}

/// The analyses asked for, on either subject.
fn run(
    o: &TolOptions,
    ts: &TolStage,
    spec: &[Limit],
    analysis: impl Fn(CircuitError) -> JsValue,
) -> Result<JsValue, JsValue> {
    let wants = |name: &str| {
        o.analyses
            .as_ref()
            .map_or(true, |a| a.iter().any(|x| x == name))
    };
    for (k, a) in o.analyses.iter().flatten().enumerate() {
        if !["worstCase", "monteCarlo", "sensitivity"].contains(&a.as_str()) {
            let e = Error::UnknownName {
                param: "",
                expected: "worstCase, monteCarlo, sensitivity",
            };
            return Err(thrown(&alloc::format!("analyses[{k}]"), e, "", None));
        }
    }
    // The analyses' own limits: usize::MAX here (2^32 − 1 in wasm) named a limit
    // that is not one (`trials: 2**53` said "the limit is 4294967295").
    let max_corners = whole("maxCorners", o.max_corners, crate::tolerance::MAX_CORNERS)?;
    let worst = wants("worstCase")
        .then(|| worst_case(ts, spec, max_corners))
        .transpose()
        .map_err(&analysis)?;
    let mc = if wants("monteCarlo") {
        let seed =
            crate::network::seed_from_number(o.seed).map_err(|e| thrown("seed", e, "", None))?;
        let options = MonteCarloOptions {
            seed,
            trials: whole("trials", o.trials, crate::tolerance::MAX_TRIALS)?,
            bins: whole("bins", o.bins, crate::network::montecarlo::MAX_BINS)?,
            keep_failures: whole(
                "keepFailures",
                o.keep_failures,
                crate::tolerance::montecarlo::MAX_KEPT_FAILURES,
            )?,
        };
        Some(monte_carlo(ts, spec, options).map_err(&analysis)?)
    } else {
        None
    };
    let sens = wants("sensitivity")
        .then(|| sensitivity(ts, spec))
        .transpose()
        .map_err(&analysis)?;
    to_js(&ToleranceOut {
        parts: ts.varied.clone(),
        temperatures_c: ts.temperatures(),
        worst_case: worst,
        monte_carlo: mc,
        sensitivity: sens,
    })
}
