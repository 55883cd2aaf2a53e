//! JS bindings for feedback-network synthesis and tolerance.

use super::options::{core_error, read};
use super::options::{Fields, FromOptions};
use super::{scalar, throw, to_js};
use crate::network::montecarlo::count_from_number;
use crate::network::{
    self as nw, ChooseSpec, Distribution, GainDistribution, Metric, MonteCarloSpec, PairSpec,
    StageSpec,
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
/** Options of `bestPairs`. */
export interface BestPairsOptions {
  network: "non-inverting" | "inverting" | "divider";
  /** Gain (V/V) or divider ratio. */
  target: number;
  series: SeriesName;
  /** Least and largest R1 + R2, Ω. */
  totalMin: number; totalMax: number;
  /** R1 when already chosen, Ω. Default: none (searched). */
  fixedR1?: number;
  /** Largest acceptable |error| (fraction): candidates within it rank first, fewest parts first. Default: none. */
  maxError?: number;
  /** Two-resistor R2 legs searched as well, ranked with the single ones. Default "none". */
  combine?: "none" | "series" | "parallel" | "either";
  /** Candidates returned, 1 … 100. Default 10. */
  count?: number;
}
/** Options of `chooseParts`. */
export interface ChoosePartsOptions {
  network: "non-inverting" | "inverting" | "divider";
  /** Gain (V/V) or divider ratio. */
  target: number;
  /** Relative half-width of the window target·(1 ± tolerance), 0 < tolerance < 1 (0.005 for ±0.5 %). Or give lower and upper. */
  tolerance?: number;
  /** The window's own ends, in the network's quantity (with the target's sign), instead of tolerance. */
  lower?: number; upper?: number;
  /** The amplifier's open-loop gain A, V/V, for the amplifier networks. Default: none (ideal). */
  openLoopGain?: number;
  /** Series tried. Default ["E6", "E12", "E24", "E48", "E96", "E192"]. */
  series?: SeriesName[];
  /** Tolerance grades tried, fractions, 1 … 8 of them. Default [0.05, 0.02, 0.01, 0.005, 0.0025, 0.001]. */
  grades?: number[];
  /** Two-part R2 legs tried besides one resistor. Default "either". */
  combine?: "none" | "series" | "parallel" | "either";
  /** Least and largest R1 + R2, Ω. Default 1 k … 1 M. */
  totalMin?: number; totalMax?: number;
  /** Yield a choice must reach, 0 < minYield ≤ 1. Default 0.99. */
  minYield?: number;
  /** Monte Carlo trials for a two-part leg, 1000 … 200 000. Default 20 000. */
  trials?: number;
  /** Whole number 0 … 2^53 − 1. Default 1. */
  seed?: number;
}
export interface PartChoice {
  series: SeriesName; grade: number; r1: number; r2: ResistorLeg; parts: number;
  nominal: number; nominalError: number; worstLow: number; worstHigh: number;
  yield: number; yieldStdError: number; method: "exact" | "monte-carlo"; costRank: number; meets: boolean;
}
export interface ChoosePartsResult {
  network: "non-inverting" | "inverting" | "divider"; target: number; low: number; high: number;
  idealRatio: number; sensitivityR2: number; minYield: number;
  choices: PartChoice[]; recommended: PartChoice | null;
}
/** An op-amp stage with its tolerances (`worstCase`, `monteCarlo`). */
export interface StageOptions {
  stage: "non-inverting" | "inverting";
  /** Nominal R1 (to ground, or from the input) and R2 (feedback), Ω. */
  r1: number; r2: number;
  /** Tolerances as fractions (0.01 for 1 %), 0 < tol < 1. */
  tolR1: number; tolR2: number;
  /** Least, typical and largest open-loop gain, V/V. */
  aMin: number; aTyp: number; aMax: number;
  /** Amplifier input and output resistance, Ω. */
  ri: number; ro: number;
  /** Dominant pole of the typical amplifier (A = aTyp), Hz. */
  poleHz?: number;
  /** Or the gain-bandwidth product, Hz, instead of poleHz: the pole is gbwHz/aTyp. One of the two is given. */
  gbwHz?: number;
  /** What the spread of A holds: "gbw" (the gain-bandwidth product aTyp·poleHz, the pole moving to GBW/A) or "pole". Default "gbw". */
  hold?: "gbw" | "pole";
}
/** Options of `monteCarlo`: a stage and how to draw it. */
export interface MonteCarloOptions extends StageOptions {
  /** Resistor spread. Default "uniform". */
  resistorDistribution?: "uniform" | "normal";
  /** Standard deviations per tolerance for "normal" resistors. Default 3. */
  k?: number;
  /** Open-loop gain spread between aMin and aMax. Default "log-normal" (median aTyp). */
  gainDistribution?: "log-normal" | "log-triangular" | "log-uniform" | "uniform";
  /** Standard deviations from aTyp to each limit for "log-normal". Default 3. */
  kGain?: number;
  /** Default "gain". */
  metric?: "gain" | "input-impedance" | "output-impedance" | "bandwidth";
  /** 2 … 1 000 000. Default 10 000. */
  trials?: number;
  /** Whole number 0 … 2^53 − 1. Default 1. */
  seed?: number;
  /** Spec limits for the yield, in the metric's unit. Default: none. */
  lower?: number; upper?: number;
  /** Histogram bins, 1 … 1000. Default 40. */
  bins?: number;
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

/// Options of `bestPairs` (defaults in the `.d.ts`).
struct PairOptions {
    network: String,
    target: f64,
    series: String,
    total_min: f64,
    total_max: f64,
    fixed_r1: Option<f64>,
    max_error: Option<f64>,
    combine: String,
    count: f64,
}

impl FromOptions for PairOptions {
    const FIELDS: &'static [&'static str] = &[
        "network", "target", "series", "totalMin", "totalMax", "fixedR1", "maxError", "combine",
        "count",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        PairOptions {
            network: f.text("network"),
            target: f.num("target"),
            series: f.text("series"),
            total_min: f.num("totalMin"),
            total_max: f.num("totalMax"),
            fixed_r1: f.opt_num("fixedR1"),
            max_error: f.opt_num("maxError"),
            combine: f.text_or("combine", default_combine),
            count: f.num_or("count", default_count()),
        }
    }
}

fn default_combine() -> String {
    "none".into()
}

fn default_count() -> f64 {
    10.0
}

/// Core names that the caller spells differently (beyond snake → camel case).
const RENAMES: &[(&str, &str)] = &[
    ("distribution", "resistorDistribution"),
    ("fixed_r1", "fixedR1"),
    ("tol_r1", "tolR1"),
    ("tol_r2", "tolR2"),
];

/// Ranked resistor pairs for a gain or divider ratio: `{network, target,
/// idealRatio, meetsMaxError, candidates: [{r1, r2: {value, first, second, joint},
/// achieved, error, total}]}`. Two-part R2 legs are searched whenever `combine`
/// asks for them and ranked with the single resistors.
#[wasm_bindgen(js_name = bestPairs, unchecked_return_type = "PairResult")]
pub fn best_pairs(
    #[wasm_bindgen(unchecked_param_type = "BestPairsOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: PairOptions = read("", &options)?;
    let named = |e| core_error(e, RENAMES);
    let spec = PairSpec {
        network: o.network.parse().map_err(named)?,
        target: o.target,
        series: o.series.parse().map_err(named)?,
        total_min: o.total_min,
        total_max: o.total_max,
        fixed_r1: o.fixed_r1,
        max_error: o.max_error,
        combine: o.combine.parse().map_err(named)?,
        count: count_from_number("count", o.count, nw::MAX_CANDIDATES).map_err(named)?,
    };
    to_js(&nw::best_pairs(&spec).map_err(named)?)
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

/// The stage fields shared by `worstCase` and `monteCarlo` (defaults in the `.d.ts`).
struct StageOptions {
    stage: String,
    r1: f64,
    r2: f64,
    tol_r1: f64,
    tol_r2: f64,
    a_min: f64,
    a_typ: f64,
    a_max: f64,
    ri: f64,
    ro: f64,
    /// The dominant pole at aTyp, Hz; or, instead, `gbw_hz`.
    pole_hz: Option<f64>,
    /// The gain–bandwidth product, Hz: the pole is GBW/aTyp.
    gbw_hz: Option<f64>,
    hold: String,
}

impl FromOptions for StageOptions {
    const FIELDS: &'static [&'static str] = &[
        "stage", "r1", "r2", "tolR1", "tolR2", "aMin", "aTyp", "aMax", "ri", "ro", "poleHz",
        "gbwHz", "hold",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        StageOptions {
            stage: f.text("stage"),
            r1: f.num("r1"),
            r2: f.num("r2"),
            tol_r1: f.num("tolR1"),
            tol_r2: f.num("tolR2"),
            a_min: f.num("aMin"),
            a_typ: f.num("aTyp"),
            a_max: f.num("aMax"),
            ri: f.num("ri"),
            ro: f.num("ro"),
            pole_hz: f.opt_num("poleHz"),
            gbw_hz: f.opt_num("gbwHz"),
            hold: f.text_or("hold", default_hold),
        }
    }
}

fn default_hold() -> String {
    "gbw".into()
}

impl StageOptions {
    /// The pole from `poleHz`, or from `gbwHz` by the core; exactly one is given.
    fn pole(&self) -> Result<f64, JsValue> {
        match (self.pole_hz, self.gbw_hz) {
            (Some(p), None) => Ok(p),
            (None, Some(g)) => crate::freq::pole_for_gbw(g, self.a_typ)
                .map_err(|e| core_error(e, &[("a0", "aTyp")])),
            _ => throw(Err(crate::Error::OutOfDomain {
                param: "poleHz",
                requirement:
                    "give the pole (poleHz) or the gain-bandwidth product (gbwHz), one of them",
            })),
        }
    }

    fn spec(&self) -> Result<StageSpec, JsValue> {
        let named = |e| core_error(e, RENAMES);
        Ok(StageSpec {
            stage: self.stage.parse().map_err(named)?,
            r1: self.r1,
            r2: self.r2,
            tol_r1: self.tol_r1,
            tol_r2: self.tol_r2,
            a_min: self.a_min,
            a_typ: self.a_typ,
            a_max: self.a_max,
            ri: self.ri,
            ro: self.ro,
            pole_hz: self.pole()?,
            hold: self.hold.parse().map_err(named)?,
        })
    }
}

/// Worst case of an op-amp stage: `{gain, inputImpedance, outputImpedance,
/// bandwidthHz}`, each `{nominal, min, max, minCorner, maxCorner, lowPercent,
/// highPercent}` with corners `{r1, r2, openLoopGain}` of "low"/"high". The spread
/// of A holds the gain-bandwidth product unless `hold` is "pole".
#[wasm_bindgen(js_name = worstCase, unchecked_return_type = "WorstCase")]
pub fn worst_case(
    #[wasm_bindgen(unchecked_param_type = "StageOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: StageOptions = read("", &options)?;
    to_js(&nw::worst_case(&o.spec()?).map_err(|e| core_error(e, RENAMES))?)
}

/// Options of `monteCarlo`: the stage fields and the draw (defaults in the `.d.ts`).
struct MonteCarloOptions {
    stage: String,
    r1: f64,
    r2: f64,
    tol_r1: f64,
    tol_r2: f64,
    a_min: f64,
    a_typ: f64,
    a_max: f64,
    ri: f64,
    ro: f64,
    pole_hz: Option<f64>,
    gbw_hz: Option<f64>,
    hold: String,
    resistor_distribution: String,
    k: f64,
    gain_distribution: String,
    k_gain: f64,
    metric: String,
    trials: f64,
    seed: f64,
    lower: Option<f64>,
    upper: Option<f64>,
    bins: f64,
}

impl FromOptions for MonteCarloOptions {
    const FIELDS: &'static [&'static str] = &[
        "stage",
        "r1",
        "r2",
        "tolR1",
        "tolR2",
        "aMin",
        "aTyp",
        "aMax",
        "ri",
        "ro",
        "poleHz",
        "gbwHz",
        "hold",
        "resistorDistribution",
        "k",
        "gainDistribution",
        "kGain",
        "metric",
        "trials",
        "seed",
        "lower",
        "upper",
        "bins",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        MonteCarloOptions {
            stage: f.text("stage"),
            r1: f.num("r1"),
            r2: f.num("r2"),
            tol_r1: f.num("tolR1"),
            tol_r2: f.num("tolR2"),
            a_min: f.num("aMin"),
            a_typ: f.num("aTyp"),
            a_max: f.num("aMax"),
            ri: f.num("ri"),
            ro: f.num("ro"),
            pole_hz: f.opt_num("poleHz"),
            gbw_hz: f.opt_num("gbwHz"),
            hold: f.text_or("hold", default_hold),
            resistor_distribution: f.text_or("resistorDistribution", default_resistors),
            k: f.num_or("k", default_k()),
            gain_distribution: f.text_or("gainDistribution", default_gain_distribution),
            k_gain: f.num_or("kGain", default_k()),
            metric: f.text_or("metric", default_metric),
            trials: f.num_or("trials", default_trials()),
            seed: f.num_or("seed", default_seed()),
            lower: f.opt_num("lower"),
            upper: f.opt_num("upper"),
            bins: f.num_or("bins", default_bins()),
        }
    }
}

fn default_resistors() -> String {
    "uniform".into()
}
fn default_k() -> f64 {
    3.0
}
fn default_gain_distribution() -> String {
    "log-normal".into()
}
fn default_metric() -> String {
    "gain".into()
}
fn default_trials() -> f64 {
    10_000.0
}
fn default_seed() -> f64 {
    1.0
}
fn default_bins() -> f64 {
    40.0
}

/// Monte Carlo of one quantity (`metric`: gain, input-impedance,
/// output-impedance, bandwidth) of an op-amp stage, seeded and reproducible.
/// Resistors "uniform" or "normal" (tolerance = k·σ); the open-loop gain
/// "log-normal" (median aTyp, the limits kGain σ out on their sides), "log-triangular",
/// "log-uniform" or "uniform". Returns `{metric, seed, nominal, stats: {count, mean,
/// sd, min, max, percentiles: [{percent, value}], yieldFraction, histogram: {edges,
/// counts}}}`.
#[wasm_bindgen(js_name = monteCarlo, unchecked_return_type = "MonteCarloResult")]
pub fn monte_carlo(
    #[wasm_bindgen(unchecked_param_type = "MonteCarloOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: MonteCarloOptions = read("", &options)?;
    let named = |e| core_error(e, RENAMES);
    let stage = StageOptions {
        stage: o.stage,
        r1: o.r1,
        r2: o.r2,
        tol_r1: o.tol_r1,
        tol_r2: o.tol_r2,
        a_min: o.a_min,
        a_typ: o.a_typ,
        a_max: o.a_max,
        ri: o.ri,
        ro: o.ro,
        pole_hz: o.pole_hz,
        gbw_hz: o.gbw_hz,
        hold: o.hold,
    };
    let spec = MonteCarloSpec {
        stage: stage.spec()?,
        resistors: Distribution::from_name(&o.resistor_distribution, o.k, "k").map_err(named)?,
        open_loop_gain: GainDistribution::from_name(&o.gain_distribution, o.k_gain, "k_gain")
            .map_err(named)?,
        metric: o.metric.parse::<Metric>().map_err(named)?,
        trials: count_from_number("trials", o.trials, nw::MAX_TRIALS).map_err(named)?,
        seed: nw::seed_from_number(o.seed).map_err(named)?,
        lower: o.lower,
        upper: o.upper,
        bins: count_from_number("bins", o.bins, nw::MAX_BINS).map_err(named)?,
    };
    to_js(&nw::monte_carlo(&spec).map_err(named)?)
}

/// Options of `chooseParts` (defaults in the `.d.ts`).
struct ChooseOptions {
    network: String,
    target: f64,
    tolerance: Option<f64>,
    lower: Option<f64>,
    upper: Option<f64>,
    open_loop_gain: Option<f64>,
    series: Vec<String>,
    grades: Vec<f64>,
    combine: String,
    total_min: f64,
    total_max: f64,
    min_yield: f64,
    trials: f64,
    seed: f64,
}

impl FromOptions for ChooseOptions {
    const FIELDS: &'static [&'static str] = &[
        "network",
        "target",
        "tolerance",
        "lower",
        "upper",
        "openLoopGain",
        "series",
        "grades",
        "combine",
        "totalMin",
        "totalMax",
        "minYield",
        "trials",
        "seed",
    ];
    fn from_fields(f: &mut Fields) -> Self {
        let series = if f.raw_present("series") {
            f.texts("series")
        } else {
            nw::DEFAULT_SERIES.iter().map(|s| s.name().into()).collect()
        };
        let grades = if f.raw_present("grades") {
            f.nums("grades")
        } else {
            nw::DEFAULT_GRADES.to_vec()
        };
        ChooseOptions {
            network: f.text("network"),
            target: f.num("target"),
            tolerance: f.opt_num("tolerance"),
            lower: f.opt_num("lower"),
            upper: f.opt_num("upper"),
            open_loop_gain: f.opt_num("openLoopGain"),
            series,
            grades,
            combine: f.text_or("combine", default_choose_combine),
            total_min: f.num_or("totalMin", 1e3),
            total_max: f.num_or("totalMax", 1e6),
            min_yield: f.num_or("minYield", 0.99),
            trials: f.num_or("trials", 20_000.0),
            seed: f.num_or("seed", default_seed()),
        }
    }
}

fn default_choose_combine() -> String {
    "either".into()
}

/// Series, tolerance grade and R2 leg build ranked against a gain or ratio with a
/// tolerance: `{network, target, low, high, idealRatio, sensitivityR2, minYield,
/// choices: [{series, grade, r1, r2, parts, nominal, nominalError, worstLow,
/// worstHigh, yield, yieldStdError, method, costRank, meets}], recommended}`. The
/// choices meeting `minYield` come first in cost order (looser grade, fewer parts,
/// coarser series); `recommended` is null when none meets the spec.
#[wasm_bindgen(js_name = chooseParts, unchecked_return_type = "ChoosePartsResult")]
pub fn choose_parts(
    #[wasm_bindgen(unchecked_param_type = "ChoosePartsOptions")] options: JsValue,
) -> Result<JsValue, JsValue> {
    let o: ChooseOptions = read("", &options)?;
    let named = |e| core_error(e, RENAMES);
    let mut series = alloc::vec::Vec::with_capacity(o.series.len());
    for (i, name) in o.series.iter().enumerate() {
        series.push(
            name.parse::<nw::Series>()
                .map_err(|e| super::options::error_at(&alloc::format!("series[{i}]"), e, None))?,
        );
    }
    // The window: tolerance, or lower and upper together.
    let missing = |param| throw(Err(crate::Error::Missing { param }));
    let (tolerance, limits) = match (o.tolerance, o.lower, o.upper) {
        (_, Some(l), Some(u)) => (f64::NAN, Some((l, u))),
        (_, Some(_), None) => return missing("upper"),
        (_, None, Some(_)) => return missing("lower"),
        (Some(t), None, None) => (t, None),
        (None, None, None) => return missing("tolerance"),
    };
    let spec = ChooseSpec {
        network: o.network.parse().map_err(named)?,
        target: o.target,
        tolerance,
        limits,
        open_loop_gain: o.open_loop_gain,
        series,
        grades: o.grades,
        combine: o.combine.parse().map_err(named)?,
        total_min: o.total_min,
        total_max: o.total_max,
        min_yield: o.min_yield,
        trials: count_from_number("trials", o.trials, nw::choose::MAX_TRIALS).map_err(named)?,
        seed: nw::seed_from_number(o.seed).map_err(named)?,
    };
    to_js(&nw::choose_parts(&spec).map_err(named)?)
}
