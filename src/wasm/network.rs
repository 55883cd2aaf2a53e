//! JS bindings for feedback-network synthesis and tolerance.

use super::{scalar, throw, to_js};
use crate::network::montecarlo::count_from_number;
use crate::network::{
    self as nw, Distribution, Metric, MonteCarloSpec, PairSpec, Stage, StageSpec,
};
use wasm_bindgen::prelude::*;

#[wasm_bindgen(typescript_custom_section)]
const TYPES: &str = r#"
export type SeriesName = "E3" | "E6" | "E12" | "E24" | "E48" | "E96" | "E192";
export interface StandardNeighbours { series: SeriesName; down: number; up: number; nearest: number; error: number; tolerance: number; }
/** One leg of a network: a single standard value, or two in series or parallel. */
export interface ResistorLeg { value: number; first: number; second: number | null; joint: "single" | "series" | "parallel"; }
export interface PairCandidate { r1: number; r2: ResistorLeg; achieved: number; error: number; total: number; }
export interface PairResult {
  network: "non-inverting" | "inverting" | "divider";
  target: number; idealRatio: number; candidates: PairCandidate[]; meetsMaxError: boolean;
}
export interface SingleCandidate { leg: ResistorLeg; error: number; }
export type End = "low" | "high";
export interface Corner { r1: End; r2: End; openLoopGain: End; }
export interface Extremes { nominal: number; min: number; max: number; minCorner: Corner; maxCorner: Corner; lowPercent: number; highPercent: number; }
export interface WorstCase { gain: Extremes; inputImpedance: Extremes; outputImpedance: Extremes; bandwidthHz: Extremes; }
export interface Percentile { percent: number; value: number; }
export interface SampleStats {
  count: number; mean: number; sd: number; min: number; max: number;
  percentiles: Percentile[]; yieldFraction: number | null;
  histogram: { edges: number[]; counts: number[] };
}
export interface MonteCarloResult {
  metric: "gain" | "input-impedance" | "output-impedance" | "bandwidth";
  seed: number; nominal: number; stats: SampleStats;
}
"#;

/// The series' values from `low` to `high` inclusive (Float64Array).
#[wasm_bindgen(js_name = seriesValues)]
pub fn series_values(series: &str, low: f64, high: f64) -> Result<Box<[f64]>, JsValue> {
    Ok(throw(nw::series_values(throw(series.parse())?, low, high))?.into_boxed_slice())
}

/// The standard value next to `value`; `rounding` is nearest, up, down, above
/// or below.
#[wasm_bindgen(js_name = standardValue)]
pub fn standard_value(series: &str, value: f64, rounding: &str) -> f64 {
    scalar(
        series
            .parse()
            .and_then(|s| nw::standard_value(s, value, rounding.parse()?)),
    )
}

/// `{series, down, up, nearest, error, tolerance}` around a value.
#[wasm_bindgen(js_name = standardNeighbours, unchecked_return_type = "StandardNeighbours")]
pub fn standard_neighbours(series: &str, value: f64) -> Result<JsValue, JsValue> {
    to_js(&throw(nw::neighbours(throw(series.parse())?, value))?)
}

/// The customary tolerance of a series, as a fraction.
#[wasm_bindgen(js_name = seriesTolerance)]
pub fn series_tolerance(series: &str) -> f64 {
    scalar(series.parse::<nw::Series>().map(|s| s.tolerance()))
}

/// Parse `4k7`, `2R2`, `4.7 kΩ`, `100nF`… to a number.
#[wasm_bindgen(js_name = parseValue)]
pub fn parse_value(text: &str) -> f64 {
    scalar(nw::parse_value(text))
}

/// A value with an SI prefix, e.g. `"4.7 k"`.
#[wasm_bindgen(js_name = formatSi)]
pub fn format_si(value: f64, digits: u32) -> Result<String, JsValue> {
    throw(nw::format_si(value, digits))
}

/// A resistance in the IEC 60062 letter code, e.g. `"4k7"`.
#[wasm_bindgen(js_name = letterCode)]
pub fn letter_code(value: f64, digits: u32) -> Result<String, JsValue> {
    throw(nw::letter_code(value, digits))
}

/// Ranked resistor pairs: `{network, target, idealRatio, meetsMaxError,
/// candidates: [{r1, r2: {value, first, second, joint}, achieved, error, total}]}`.
/// `network` is non-inverting, inverting or divider; `combine` none, series,
/// parallel or either; `fixedR1` and `maxError` may be undefined.
#[wasm_bindgen(js_name = bestPairs, unchecked_return_type = "PairResult")]
#[allow(clippy::too_many_arguments)]
pub fn best_pairs(
    network: &str,
    target: f64,
    series: &str,
    total_min: f64,
    total_max: f64,
    fixed_r1: Option<f64>,
    max_error: Option<f64>,
    combine: &str,
    count: f64,
) -> Result<JsValue, JsValue> {
    let spec = PairSpec {
        network: throw(network.parse())?,
        target,
        series: throw(series.parse())?,
        total_min,
        total_max,
        fixed_r1,
        max_error,
        combine: throw(combine.parse())?,
        count: throw(count_from_number("count", count, nw::MAX_CANDIDATES))?,
    };
    to_js(&throw(nw::best_pairs(&spec))?)
}

/// One resistance (transresistance or sense resistor): `[{leg, error}]`.
#[wasm_bindgen(js_name = singleResistor, unchecked_return_type = "SingleCandidate[]")]
pub fn single_resistor(
    target: f64,
    series: &str,
    max_error: Option<f64>,
    combine: &str,
) -> Result<JsValue, JsValue> {
    to_js(&throw(nw::single_resistor(
        target,
        throw(series.parse())?,
        max_error,
        throw(combine.parse())?,
    ))?)
}

#[allow(clippy::too_many_arguments)]
fn stage_spec(
    stage: &str,
    r1: f64,
    r2: f64,
    tol_r1: f64,
    tol_r2: f64,
    a_min: f64,
    a_typ: f64,
    a_max: f64,
    ri: f64,
    ro: f64,
    pole_hz: f64,
) -> Result<StageSpec, JsValue> {
    let stage: Stage = throw(stage.parse())?;
    Ok(StageSpec {
        stage,
        r1,
        r2,
        tol_r1,
        tol_r2,
        a_min,
        a_typ,
        a_max,
        ri,
        ro,
        pole_hz,
    })
}

/// Worst case of an op-amp stage: `{gain, inputImpedance, outputImpedance,
/// bandwidthHz}`, each `{nominal, min, max, minCorner, maxCorner, lowPercent,
/// highPercent}` with corners `{r1, r2, openLoopGain}` of "low"/"high".
#[wasm_bindgen(js_name = worstCase, unchecked_return_type = "WorstCase")]
#[allow(clippy::too_many_arguments)]
pub fn worst_case(
    stage: &str,
    r1: f64,
    r2: f64,
    tol_r1: f64,
    tol_r2: f64,
    a_min: f64,
    a_typ: f64,
    a_max: f64,
    ri: f64,
    ro: f64,
    pole_hz: f64,
) -> Result<JsValue, JsValue> {
    let spec = stage_spec(
        stage, r1, r2, tol_r1, tol_r2, a_min, a_typ, a_max, ri, ro, pole_hz,
    )?;
    to_js(&throw(nw::worst_case(&spec))?)
}

/// Monte Carlo of one quantity (`metric`: gain, input-impedance,
/// output-impedance, bandwidth) of an op-amp stage. Distributions are "uniform"
/// or "normal" (tolerance = k·σ; `k` for the resistors, `kGain` for the gain).
/// `seed` is a whole number 0 … 2⁵³ − 1. Returns `{metric, seed, nominal, stats:
/// {count, mean, sd, min, max, percentiles: [{percent, value}], yieldFraction,
/// histogram: {edges, counts}}}`.
#[wasm_bindgen(js_name = monteCarlo, unchecked_return_type = "MonteCarloResult")]
#[allow(clippy::too_many_arguments)]
pub fn monte_carlo(
    stage: &str,
    r1: f64,
    r2: f64,
    tol_r1: f64,
    tol_r2: f64,
    a_min: f64,
    a_typ: f64,
    a_max: f64,
    ri: f64,
    ro: f64,
    pole_hz: f64,
    resistor_distribution: &str,
    k: f64,
    gain_distribution: &str,
    k_gain: f64,
    metric: &str,
    trials: f64,
    seed: f64,
    lower: Option<f64>,
    upper: Option<f64>,
    bins: f64,
) -> Result<JsValue, JsValue> {
    let spec = MonteCarloSpec {
        stage: stage_spec(
            stage, r1, r2, tol_r1, tol_r2, a_min, a_typ, a_max, ri, ro, pole_hz,
        )?,
        resistors: throw(Distribution::from_name(resistor_distribution, k, "k"))?,
        open_loop_gain: throw(Distribution::from_name(gain_distribution, k_gain, "k_gain"))?,
        metric: throw(metric.parse::<Metric>())?,
        trials: throw(count_from_number("trials", trials, nw::MAX_TRIALS))?,
        seed: throw(nw::seed_from_number(seed))?,
        lower,
        upper,
        bins: throw(count_from_number("bins", bins, nw::MAX_BINS))?,
    };
    to_js(&throw(nw::monte_carlo(&spec))?)
}
