//! Worksheet functions of the tolerance area (`src/tolerance`), prefix
//! `TOLERANCE.`: the worst case, the Monte Carlo yield and the sensitivities
//! of one figure of a stage described in cells, and the yield and worst case
//! of a whole spec, several limits judged together (`TOLERANCE.SPECYIELD`,
//! `TOLERANCE.SPECWORST`; `docs/tolerance.md`).
//!
//! A spec is one row per limit, `figure | frequency | lower | upper`: a range
//! of four columns or a text of rows separated by `;`, cells by `|`
//! (`"gainDb | 1k | 33.5813 | 33.6681; bandwidthHz | | 200k"`); an empty lower
//! or upper leaves that side open, and a trial passes the spec when every
//! figure is within its limit at every temperature.
//!
//! The stage is the argument of the `STAGE.` functions (a range of name/value
//! pairs or a text `"name=value, …"`). The spreads are a text of
//! `part=spread` items separated by commas, each spread read by
//! [`crate::notation::read_spread`]: `"rf=1%, rg=0.1% normal 3σ 25ppm/K,
//! cf=9p..11p, gbw=8M/10M/13M, ro=40…70"`. Parts: the stage's `rf`, `rg`,
//! `cf`, `rs`, `cs`, `rl`, `cl`, `riso` (any tolerance and a tempco); the
//! amplifier's `a0`, `gbw` (or `gbwHz`) and `ro` (min…max, min/typ/max with
//! typ the stage's own figure, or ± %; no tempco). An `a0` spread replaces the
//! stage's `a0Min`/`a0Max`. The figure is one of `gainDb`, `phaseDeg` (at the
//! frequency argument), `bandwidthHz`, `peakingDb`, `phaseMarginDeg`,
//! `gainMarginDb`, `inputImpedanceOhm`, `outputImpedanceOhm` (at the
//! frequency), or a name with its value: `"gainErrorPercent 48"` (at the
//! frequency, against the target gain), `"outputNoiseRms 10…20k"`,
//! `"inputNoiseRms 10…20k"` (over the band, Hz), `"settlingTimeS 0.1%"`.
//! The optional temperature is one temperature or a range `"0…70"` (°C;
//! left out, 25 °C, the reference of the parts' values), read by
//! [`crate::notation::read_range`].

use super::stage::{circuit_fail, stage_of};
use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::circuit::tolerance::Tolerance;
use crate::circuit::CircuitError;
use crate::notation::{read, read_range, read_spread, ReadOptions, TypedTolerance};
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use crate::stage::{Spread, SpreadPoint, Stage};
use crate::tolerance::parts::{slot_value, NAMES, REFERENCE_C};
use crate::tolerance::spec::MAX_LIMITS;
use crate::tolerance::{
    monte_carlo, sensitivity, worst_case, AmplifierSpread, Figure, Limit, MonteCarloOptions,
    PartSpread, TolStage, DEFAULT_MAX_CORNERS,
};
use alloc::format;
use alloc::string::{String, ToString};
use alloc::vec;
use alloc::vec::Vec;

const STAGE: Param = req(
    "stage",
    "the stage: a range of name/value pairs, or a text \"name=value, …\" (as STAGE.)",
    "text",
    "kind and amplifier figures required",
);
const SPREADS: Param = req(
    "spreads",
    "the parts' spreads: a text \"rf=1%, rg=0.1% normal 3σ 25ppm/K, cf=9p…11p, gbw=8M/10M/13M, ro=40…70\" (± % uniform unless normal or kσ; min…max; min/typ/max; ppm/K)",
    "text",
    "parts rf rg cf rs cs rl cl riso a0 gbw ro; 0 … 100 %; min ≤ typ ≤ max",
);
const FIGURE: Param = req(
    "figure",
    "the figure: gainDb, phaseDeg, bandwidthHz, peakingDb, phaseMarginDeg, gainMarginDb, inputImpedanceOhm, outputImpedanceOhm; \"gainErrorPercent 48\" (against a target gain), \"outputNoiseRms 10…20k\" or \"inputNoiseRms 10…20k\" (over a band, Hz), \"settlingTimeS 0.1%\" (to a band)",
    "text",
    "one of the names",
);
const FREQUENCY: Param = req(
    "frequency",
    "frequency of gainDb, phaseDeg, gainErrorPercent and the impedances (ignored by the others)",
    "Hz",
    "≥ 0",
);
const LOWER: Param = req(
    "lower",
    "lowest acceptable value of the figure",
    "1",
    "≤ upper",
);
const UPPER: Param = req(
    "upper",
    "highest acceptable value of the figure",
    "1",
    "≥ lower",
);
const TRIALS: Param = req("trials", "Monte Carlo trials", "1", "2 … 100000");
const SEED: Param = req("seed", "seed of the generator", "1", "0 … 2^53 − 1, whole");
const TEMPERATURE: Param = Param {
    name: "temperature",
    summary: "temperature or range, °C: a number, a text \"0…70\" (or \"0..70\") or two cells; left out, 25 °C",
    unit: "°C",
    optional: true,
    default: None,
    range: "-273.15 … 1000, low ≤ high",
};
const WORST: &[Param] = &[STAGE, SPREADS, FIGURE, FREQUENCY, TEMPERATURE];
const YIELD: &[Param] = &[
    STAGE,
    SPREADS,
    FIGURE,
    FREQUENCY,
    LOWER,
    UPPER,
    TRIALS,
    SEED,
    TEMPERATURE,
];
const SPEC: Param = req(
    "spec",
    "the limits, one row per limit: a range of four columns figure | frequency | lower | upper (the figure as TOLERANCE.YIELD's; frequency in Hz, empty 0; an empty lower or upper leaves that side open), or a text \"gainDb | 1k | 33.5 | 33.7; phaseMarginDeg | | 60\"",
    "text",
    "1 … 32 rows with a figure; lower ≤ upper; empty rows skipped",
);
const SPEC_YIELD: &[Param] = &[STAGE, SPREADS, SPEC, TRIALS, SEED, TEMPERATURE];
const SPEC_WORST: &[Param] = &[STAGE, SPREADS, SPEC, TEMPERATURE];
const MONTE: &[Param] = &[STAGE, SPREADS, FIGURE, FREQUENCY, TRIALS, SEED, TEMPERATURE];
/// The amplifier figures a spread may be given for, with their names in the
/// error messages.
const AMPLIFIER_PARTS: &str = "a0, gbw, ro";

fn fail(a: &Args<'_>, what: &str) -> CellError {
    CellError::new(ErrorKind::Value, format!("{}: {what}", a.spec.name))
}

/// A core error about the spreads or the temperature, naming the argument and
/// the part; the stage's own errors as `STAGE.` shows them.
fn tol_fail(a: &Args<'_>, e: CircuitError) -> CellError {
    let arg = match e.error.param() {
        "part" | "tolerance" | "tempco" | "gbwHz" | "ro" | "a0" => "spreads",
        "temperature" => "temperature",
        "lower" | "upper" => "limits",
        "freqHz" => "frequency",
        "target" | "bandHz" | "band" => "figure",
        _ => return circuit_fail(a, e),
    };
    let kind = match e.error {
        crate::Error::UnknownName { .. } | crate::Error::OutOfDomain { .. } => ErrorKind::Value,
        _ => ErrorKind::Num,
    };
    let text = e.to_string();
    // The argument itself (temperature, frequency) is named once.
    let text = match (arg, e.name.is_empty()) {
        ("temperature" | "frequency", true) => text
            .strip_prefix(e.error.param())
            .and_then(|t| t.strip_prefix(": "))
            .map_or(text.clone(), String::from),
        _ => text,
    };
    CellError::new(kind, format!("{}: {arg}: {text}", a.spec.name))
}

/// A reader's error as "column n: why" (its parameter is the whole text).
fn syntax(e: crate::Error) -> String {
    match e {
        crate::Error::Syntax { column, reason, .. } => format!("column {column}: {reason}"),
        other => other.to_string(),
    }
}

/// What the spreads argument (argument 1) gives: the stage with its A0
/// spread, the parts' spreads and the amplifier's.
struct Spreads {
    stage: Stage,
    parts: Vec<PartSpread>,
    amplifier: AmplifierSpread,
}

/// An amplifier figure's spread from its typed tolerance, typ = the model's `typ`.
fn amplifier_spread(
    a: &Args<'_>,
    name: &str,
    t: Option<TypedTolerance>,
    typ: f64,
) -> Result<Spread, CellError> {
    let s = match t {
        Some(TypedTolerance::Uniform { percent }) => {
            if !(0.0..100.0).contains(&percent) {
                return Err(fail(
                    a,
                    &format!("spreads: {name}: a tolerance must be from 0 to below 100 %"),
                ));
            }
            Spread {
                min: typ * (1.0 - percent / 100.0),
                typ,
                max: typ * (1.0 + percent / 100.0),
            }
        }
        Some(TypedTolerance::Range { min, max }) => Spread { min, typ, max },
        Some(TypedTolerance::MinTypMax { min, typ: t, max }) => {
            if (t - typ).abs() > 1e-12 * typ.abs() {
                return Err(fail(
                    a,
                    &format!("spreads: {name}: typ must be the stage's own figure ({typ})"),
                ));
            }
            Spread { min, typ, max }
        }
        Some(TypedTolerance::Normal { .. }) | None => {
            return Err(fail(
                a,
                &format!(
                    "spreads: {name}: an amplifier figure takes min…max, min/typ/max or ± % (drawn as its datasheet spread), without a tempco"
                ),
            ))
        }
    };
    if !(s.min <= s.typ && s.typ <= s.max) || s.min <= 0.0 {
        return Err(fail(
            a,
            &format!("spreads: {name}: must be above zero and in order min ≤ typ ≤ max"),
        ));
    }
    Ok(s)
}

/// The spreads argument (argument 1) over the stage of argument 0.
fn spreads(a: &Args<'_>) -> Result<Spreads, CellError> {
    let mut stage = stage_of(a)?;
    let text = a.text(1)?;
    let mut parts = Vec::new();
    let mut amplifier = AmplifierSpread::default();
    let mut a0_given = false;
    for item in text.split(',').filter(|i| !i.trim().is_empty()) {
        let Some((name, value)) = item.split_once('=') else {
            return Err(fail(
                a,
                &format!("spreads: \"{}\" is not part=spread", item.trim()),
            ));
        };
        let name = name.trim().to_ascii_lowercase();
        let typed = read_spread(value).map_err(|e| {
            fail(
                a,
                &format!("spreads: {name}: \"{}\": {}", value.trim(), syntax(e)),
            )
        })?;
        if let Some(k) = NAMES.iter().position(|(p, _)| *p == name) {
            let (part, _) = NAMES[k];
            // min…max takes the part's own value as typ (a part the stage
            // lacks is refused by the analysis, naming it).
            let own = slot_value(&stage.parts, k).unwrap_or(1.0);
            let tolerance = typed.tolerance.map(|t| match t {
                TypedTolerance::Uniform { percent } => Tolerance::Uniform { percent },
                TypedTolerance::Normal { percent, sigmas } => Tolerance::Normal { percent, sigmas },
                TypedTolerance::Range { min, max } => Tolerance::Limits { min, typ: own, max },
                TypedTolerance::MinTypMax { min, typ, max } => Tolerance::Limits { min, typ, max },
            });
            parts.push(PartSpread {
                part,
                tolerance,
                tempco_ppm: typed.tempco_ppm,
            });
            continue;
        }
        let unknown = || {
            fail(
                a,
                &format!(
                    "spreads: unknown part \"{name}\"; the parts are {}, {AMPLIFIER_PARTS}",
                    crate::tolerance::parts::PART_NAMES
                ),
            )
        };
        if !matches!(name.as_str(), "a0" | "gbw" | "gbwhz" | "ro") {
            return Err(unknown());
        }
        if typed.tempco_ppm.is_some() {
            return Err(fail(
                a,
                &format!("spreads: {name}: an amplifier figure takes no tempco here"),
            ));
        }
        let model = &stage.amplifier;
        let twice = || {
            fail(
                a,
                &format!("spreads: {name}: given twice; give each part once"),
            )
        };
        match name.as_str() {
            "a0" => {
                if a0_given {
                    return Err(twice());
                }
                a0_given = true;
                let typ = model.a0.typ;
                stage.amplifier.a0 = amplifier_spread(a, "a0", typed.tolerance, typ)?;
            }
            "gbw" | "gbwhz" => {
                if amplifier.gbw_hz.is_some() {
                    return Err(twice());
                }
                let typ = model
                    .gbw_at(SpreadPoint::Typ)
                    .map_err(|e| fail(a, &format!("spreads: gbw: {e}")))?;
                amplifier.gbw_hz = Some(amplifier_spread(a, "gbw", typed.tolerance, typ)?);
            }
            "ro" => {
                if amplifier.ro.is_some() {
                    return Err(twice());
                }
                amplifier.ro = Some(amplifier_spread(a, "ro", typed.tolerance, model.ro)?);
            }
            _ => return Err(unknown()),
        }
    }
    Ok(Spreads {
        stage,
        parts,
        amplifier,
    })
}

/// The temperature argument `i`: a number, a text "low…high" or two cells; °C.
fn temperature(a: &Args<'_>, i: usize) -> Result<[f64; 2], CellError> {
    let bad = |what: &str| fail(a, &format!("temperature: {what}"));
    match a.get(i) {
        Value::Empty => Ok([REFERENCE_C, REFERENCE_C]),
        Value::Number(t, _) => Ok([*t, *t]),
        Value::Text(t) => read_range(t, &ReadOptions::VALUE)
            .map_err(|e| bad(&format!("\"{}\": {}", t.trim(), syntax(e)))),
        Value::Array(arr) => {
            let mut v = Vec::new();
            for item in arr.items() {
                match item {
                    Value::Number(x, _) => v.push(*x),
                    Value::Empty => {}
                    Value::Error(e) => return Err(e.clone()),
                    _ => return Err(bad("a range of two numbers, low and high")),
                }
            }
            match v.as_slice() {
                [t] => Ok([*t, *t]),
                [lo, hi] => Ok([*lo, *hi]),
                _ => Err(bad("a range of two numbers, low and high")),
            }
        }
        Value::Error(e) => Err(e.clone()),
        Value::Bool(_) => Err(bad("a number, a text \"low…high\" or two cells")),
    }
}

/// The figure of arguments 2 and 3 ([`figure_of`]).
fn figure(a: &Args<'_>) -> Result<Figure, CellError> {
    let text = a.text(2)?;
    let f = a.number(3)?;
    figure_of(&text, f).map_err(|why| fail(a, &format!("figure: {why}")))
}

/// A figure from its text and frequency (Hz): a name, and for some a value
/// after it (`"gainErrorPercent 48"`: the target gain; `"outputNoiseRms
/// 10…20k"`: the band, Hz; `"settlingTimeS 0.1%"`: the band, a fraction). The
/// one reader of a figure for the single-figure functions and the spec rows
/// of `TOLERANCE.SPECYIELD`; the error is the reason, without the argument.
fn figure_of(text: &str, f: f64) -> Result<Figure, String> {
    let text = text.trim();
    let (name, rest) = text
        .split_once(char::is_whitespace)
        .map_or((text, ""), |(n, r)| (n, r.trim()));
    let needs = |what: &str| format!("{name} needs {what} after its name");
    let bad = |e: crate::Error| format!("\"{rest}\": {}", syntax(e));
    let plain = |fig: Figure| {
        if rest.is_empty() {
            Ok(fig)
        } else {
            Err(format!("{name} takes nothing after its name (\"{rest}\")"))
        }
    };
    match name {
        "gainDb" => plain(Figure::GainDb { freq_hz: f }),
        "phaseDeg" => plain(Figure::PhaseDeg { freq_hz: f }),
        "bandwidthHz" => plain(Figure::BandwidthHz),
        "peakingDb" => plain(Figure::PeakingDb),
        "phaseMarginDeg" => plain(Figure::PhaseMarginDeg),
        "gainMarginDb" => plain(Figure::GainMarginDb),
        "inputImpedanceOhm" => plain(Figure::InputImpedanceOhm { freq_hz: f }),
        "outputImpedanceOhm" => plain(Figure::OutputImpedanceOhm { freq_hz: f }),
        "gainErrorPercent" if rest.is_empty() => {
            Err(needs("the target gain (\"gainErrorPercent 48\")"))
        }
        "gainErrorPercent" => Ok(Figure::GainErrorPercent {
            freq_hz: f,
            target: read(rest, &ReadOptions::VALUE).map_err(bad)?.value,
        }),
        "outputNoiseRms" | "inputNoiseRms" => {
            if rest.is_empty() {
                return Err(needs("the band in Hz (\"outputNoiseRms 10…20k\")"));
            }
            let band_hz = read_range(rest, &ReadOptions::VALUE).map_err(bad)?;
            Ok(if name == "outputNoiseRms" {
                Figure::OutputNoiseRms { band_hz }
            } else {
                Figure::InputNoiseRms { band_hz }
            })
        }
        "settlingTimeS" if rest.is_empty() => {
            Err(needs("the settling band (\"settlingTimeS 0.1%\")"))
        }
        "settlingTimeS" => Ok(Figure::SettlingTimeS {
            band: read(rest, &ReadOptions::CELL).map_err(bad)?.value,
        }),
        other => Err(format!(
            "unknown figure \"{other}\"; the figures are {}",
            crate::tolerance::FIGURE_NAMES
        )),
    }
}

/// The stage under its spreads at the temperature of argument `t_arg`.
fn tol_stage(a: &Args<'_>, t_arg: usize) -> Result<TolStage, CellError> {
    let s = spreads(a)?;
    let t = temperature(a, t_arg)?;
    TolStage::new(&s.stage, &s.parts, s.amplifier, t).map_err(|e| tol_fail(a, e))
}

fn open_limit(a: &Args<'_>) -> Result<Limit, CellError> {
    Ok(Limit {
        figure: figure(a)?,
        lower: None,
        upper: None,
    })
}

fn row(items: Vec<Value>) -> Value {
    Array::row(items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

fn worst(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a, 4));
    let limit = tri!(open_limit(a));
    match worst_case(&ts, &[limit], DEFAULT_MAX_CORNERS) {
        Ok(w) => {
            let f = &w.figures[0];
            row(vec![
                Value::num(f.min.value),
                Value::num(f.nominal),
                Value::num(f.max.value),
            ])
        }
        Err(e) => Value::Error(tol_fail(a, e)),
    }
}

fn yield_fraction(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a, 8));
    let figure = tri!(figure(a));
    let limit = Limit {
        figure,
        lower: Some(tri!(a.number(4))),
        upper: Some(tri!(a.number(5))),
    };
    let o = tri!(run_options(a, 6));
    match monte_carlo(&ts, &[limit], o) {
        Ok(mc) => Value::num(mc.yield_fraction),
        Err(e) => Value::Error(tol_fail(a, e)),
    }
}

/// The trials and seed arguments `i`, `i + 1`.
fn run_options(a: &Args<'_>, i: usize) -> Result<MonteCarloOptions, CellError> {
    let trials = crate::network::montecarlo::count_from_number(
        "trials",
        a.number(i)?,
        crate::tolerance::MAX_TRIALS,
    )
    .map_err(|e| fail(a, &e.to_string()))?;
    let seed =
        crate::network::seed_from_number(a.number(i + 1)?).map_err(|e| fail(a, &e.to_string()))?;
    Ok(MonteCarloOptions {
        seed,
        trials,
        bins: 1,
        keep_failures: 0,
    })
}

fn distribution(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a, 6));
    let limit = tri!(open_limit(a));
    let o = tri!(run_options(a, 4));
    let mc = match monte_carlo(&ts, &[limit], o) {
        Ok(mc) => mc,
        Err(e) => return Value::Error(tol_fail(a, e)),
    };
    let Some(l) = mc.limits.first() else {
        return Value::error(ErrorKind::Value, "empty result");
    };
    if l.undefined > 0 {
        return Value::error(
            ErrorKind::Num,
            format!(
                "{}: figure: not defined in {} of {} trials (no crossover or −3 dB point there); give TOLERANCE.YIELD limits to count them as failures",
                a.spec.name, l.undefined, mc.trials
            ),
        );
    }
    match &l.stats {
        Some(st) => {
            let mut items = vec![Value::num(st.mean), Value::num(st.sd)];
            items.extend(st.percentiles.iter().map(|p| Value::num(p.value)));
            row(items)
        }
        None => Value::error(ErrorKind::Num, format!("{}: too few trials", a.spec.name)),
    }
}

/// The unit of a varied quantity's value, from its name (`Rf` Ω, `Cl` F,
/// `U1.gbwHz` Hz, `U1.ro` Ω, `U1.a0` none).
fn unit_of(name: &str) -> Option<Unit> {
    match name {
        "U1.ro" => Some(Unit::Ohm),
        "U1.gbwHz" => Some(Unit::Hertz),
        n if n.starts_with('R') => Some(Unit::Ohm),
        n if n.starts_with('C') => Some(Unit::Farad),
        _ => None,
    }
}

fn tagged(x: f64, unit: Option<Unit>) -> Value {
    match Value::num(x) {
        Value::Number(v, _) => Value::Number(v, unit),
        other => other,
    }
}

fn sensitivities(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a, 4));
    let limit = tri!(open_limit(a));
    if ts.varied.is_empty() {
        return Value::error(
            ErrorKind::NotAvailable,
            format!("{}: spreads: no part varies", a.spec.name),
        );
    }
    let s = match sensitivity(&ts, &[limit]) {
        Ok(s) => s,
        Err(e) => return Value::Error(tol_fail(a, e)),
    };
    let f = &s.figures[0];
    let mut items = Vec::with_capacity(f.parts.len() * SENSITIVITY_COLUMNS.len());
    for (p, v) in f.parts.iter().zip(&ts.varied) {
        items.extend([
            tagged(v.nominal, unit_of(&v.name)),
            Value::num(p.per_unit),
            p.normalised.map_or_else(
                || {
                    Value::error(
                        ErrorKind::NotAvailable,
                        "the figure is 0 at nominal: no normalised sensitivity",
                    )
                },
                Value::num,
            ),
            Value::num(p.variance_share),
            Value::Bool(f.tighten_first.as_deref() == Some(p.part.as_str())),
        ]);
    }
    let rows = u32::try_from(f.parts.len()).unwrap_or(u32::MAX);
    let cols = u32::try_from(SENSITIVITY_COLUMNS.len()).unwrap_or(u32::MAX);
    Array::new(rows, cols, items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

const SENSITIVITY_COLUMNS: &[&str] = &[
    "nominal value (one row per varied part, in the order rf, rg, cf, rs, cs, rl, cl, riso, a0, gbw, ro)",
    "x·∂F/∂x (the figure's change per unit relative change of the part, in the figure's unit)",
    "(x/F)·∂F/∂x, normalised",
    "variance share, 0 … 1",
    "tighten first (TRUE on the largest share)",
];

fn tighten(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a, 4));
    let limit = tri!(open_limit(a));
    match sensitivity(&ts, &[limit]) {
        Ok(s) => match s.tighten_first {
            Some(p) => Value::Text(String::from(p.as_str())),
            None => Value::error(
                ErrorKind::NotAvailable,
                format!("{}: no part moves the figure", a.spec.name),
            ),
        },
        Err(e) => Value::Error(tol_fail(a, e)),
    }
}

/// The columns of a spec row, left to right.
const SPEC_COLUMNS: [&str; 4] = ["figure", "frequency", "lower", "upper"];

/// The rows of the spec argument `i` as cells: a range of four columns, or a
/// text of rows separated by `;` (or line breaks) with the four cells of a
/// row separated by `|` (a row may stop early: the cells left out are empty),
/// each number cell read by [`crate::notation::read`].
fn spec_cells(a: &Args<'_>, i: usize) -> Result<Vec<[Value; 4]>, CellError> {
    let bad = |what: &str| fail(a, &format!("spec: {what}"));
    match a.get(i) {
        Value::Array(arr) if arr.cols() == 4 => Ok((0..arr.rows())
            .map(|r| [arr.get(r, 0), arr.get(r, 1), arr.get(r, 2), arr.get(r, 3)])
            .collect()),
        Value::Array(arr) => Err(bad(&format!(
            "a range of four columns, figure | frequency | lower | upper, one row per limit; this one has {} column{}",
            arr.cols(),
            if arr.cols() == 1 { "" } else { "s" }
        ))),
        Value::Text(t) => {
            let mut rows = Vec::new();
            for (r, line) in t.split([';', '\n']).enumerate() {
                let cells: Vec<&str> = line.split('|').map(str::trim).collect();
                if cells.len() > 4 {
                    return Err(bad(&format!(
                        "row {}: {} cells; a row has four, figure | frequency | lower | upper",
                        r + 1,
                        cells.len()
                    )));
                }
                let mut row = [Value::Empty, Value::Empty, Value::Empty, Value::Empty];
                for (c, cell) in cells.iter().enumerate() {
                    row[c] = match (c, cell.is_empty()) {
                        (_, true) => Value::Empty,
                        (0, false) => Value::Text((*cell).into()),
                        _ => match read(cell, &ReadOptions::VALUE) {
                            Ok(x) => Value::num(x.value),
                            Err(e) => {
                                return Err(bad(&format!(
                                    "row {}: {}: \"{cell}\": {}",
                                    r + 1,
                                    SPEC_COLUMNS[c],
                                    syntax(e)
                                )))
                            }
                        },
                    };
                }
                rows.push(row);
            }
            Ok(rows)
        }
        Value::Error(e) => Err(e.clone()),
        _ => Err(bad(
            "a range of four columns (figure | frequency | lower | upper) or a text \"figure | frequency | lower | upper; …\"",
        )),
    }
}

/// The spec argument `i`: one limit per row of figure | frequency | lower |
/// upper ([`spec_cells`]). The figure is read as the single-figure functions
/// read it ([`figure_of`]); an empty frequency is 0 Hz (figures without one
/// ignore it); an empty lower or upper cell leaves that side open. Empty rows
/// are skipped, and a first row whose figure cell is the caption `figure`.
/// At most [`MAX_LIMITS`] limits. Every error names the row (counted in the
/// range, from 1) and the column.
fn spec_of(a: &Args<'_>, i: usize) -> Result<Vec<Limit>, CellError> {
    let bad = |what: &str| fail(a, &format!("spec: {what}"));
    let rows = spec_cells(a, i)?;
    let mut spec = Vec::new();
    for (r, cells) in rows.iter().enumerate() {
        let at = r + 1;
        if cells.iter().all(|c| matches!(c, Value::Empty)) {
            continue;
        }
        let text = match &cells[0] {
            Value::Text(t) if r == 0 && t.trim().eq_ignore_ascii_case("figure") => continue,
            Value::Text(t) => t,
            Value::Error(e) => return Err(e.clone()),
            _ => {
                return Err(bad(&format!(
                    "row {at}: figure: a text naming the figure (\"gainDb\", \"phaseMarginDeg\", …)"
                )))
            }
        };
        let mut numbers = [None; 3];
        for (k, cell) in cells[1..].iter().enumerate() {
            numbers[k] = match cell {
                Value::Number(x, _) => Some(*x),
                Value::Empty => None,
                Value::Error(e) => return Err(e.clone()),
                other => {
                    return Err(bad(&format!(
                        "row {at}: {}: a number{}, not {}",
                        SPEC_COLUMNS[k + 1],
                        if k == 0 {
                            " in Hz (empty: 0)"
                        } else {
                            " (empty: that side open)"
                        },
                        match other {
                            Value::Text(t) => format!("the text \"{t}\""),
                            _ => String::from("a truth value"),
                        }
                    )))
                }
            };
        }
        let [freq, lower, upper] = numbers;
        let figure = figure_of(text, freq.unwrap_or(0.0))
            .map_err(|why| bad(&format!("row {at}: figure: {why}")))?;
        figure
            .validate()
            .map_err(|e| bad(&format!("row {at}: figure: {e}")))?;
        if let (Some(lo), Some(hi)) = (lower, upper) {
            if lo > hi {
                return Err(bad(&format!(
                    "row {at}: lower ({lo}) is above upper ({hi})"
                )));
            }
        }
        if spec.len() == MAX_LIMITS {
            return Err(bad(&format!(
                "at most {MAX_LIMITS} limits (rows with a figure); row {at} is one more"
            )));
        }
        spec.push(Limit {
            figure,
            lower,
            upper,
        });
    }
    if spec.is_empty() {
        return Err(bad(
            "no limit: give one row per limit, figure | frequency | lower | upper",
        ));
    }
    Ok(spec)
}

/// What each column of `TOLERANCE.SPECYIELD` holds.
const SPEC_YIELD_COLUMNS: &[&str] = &[
    "yield, 0 … 1 (first row: every limit together; then one row per limit, in the spec's order)",
    "trials failing (a figure that cannot be computed in a trial fails its limit)",
    "nominal: the figure at nominal parts (the low end of the temperature range); first row #N/A",
    "mean of the figure over the trials and temperatures; first row #N/A",
    "lowest value seen; first row #N/A",
    "highest value seen; first row #N/A",
];

fn spec_yield(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a, 5));
    let spec = tri!(spec_of(a, 2));
    let o = tri!(run_options(a, 3));
    let mc = match monte_carlo(&ts, &spec, o) {
        Ok(mc) => mc,
        Err(e) => return Value::Error(tol_fail(a, e)),
    };
    let n = mc.trials as f64;
    let na = |what: &str| Value::error(ErrorKind::NotAvailable, what);
    let together = "every limit together: no single figure";
    let mut items = vec![
        Value::num(mc.yield_fraction),
        Value::num(mc.failed_count as f64),
        na(together),
        na(together),
        na(together),
        na(together),
    ];
    for l in &mc.limits {
        // yield_fraction is passing/trials: the count back, exactly.
        let failing = n - libm::round(l.yield_fraction * n);
        items.extend([
            Value::num(l.yield_fraction),
            Value::num(failing),
            l.nominal
                .first()
                .map_or_else(|| na("no temperature"), |x| Value::num(*x)),
        ]);
        match &l.stats {
            Some(st) => items.extend([Value::num(st.mean), Value::num(st.min), Value::num(st.max)]),
            None => {
                let none = "the figure could be computed in fewer than 2 trials";
                items.extend([na(none), na(none), na(none)]);
            }
        }
    }
    let rows = u32::try_from(mc.limits.len() + 1).unwrap_or(u32::MAX);
    let cols = u32::try_from(SPEC_YIELD_COLUMNS.len()).unwrap_or(u32::MAX);
    Array::new(rows, cols, items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

/// What each column of `TOLERANCE.SPECWORST` holds.
const SPEC_WORST_COLUMNS: &[&str] = &[
    "lowest value (one row per limit after the first, in the spec's order); first row #N/A",
    "nominal: the figure at nominal parts (the low end of the temperature range); first row #N/A",
    "highest value; first row #N/A",
    "meets: TRUE when lowest and highest are within the limit (first row: every limit)",
];

fn spec_worst(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a, 3));
    let spec = tri!(spec_of(a, 2));
    let w = match worst_case(&ts, &spec, DEFAULT_MAX_CORNERS) {
        Ok(w) => w,
        Err(e) => return Value::Error(tol_fail(a, e)),
    };
    let na = || {
        Value::error(
            ErrorKind::NotAvailable,
            "every limit together: no single figure",
        )
    };
    let mut items = vec![na(), na(), na(), Value::Bool(w.meets)];
    for f in &w.figures {
        items.extend([
            Value::num(f.min.value),
            Value::num(f.nominal),
            Value::num(f.max.value),
            Value::Bool(f.meets),
        ]);
    }
    let rows = u32::try_from(w.figures.len() + 1).unwrap_or(u32::MAX);
    let cols = u32::try_from(SPEC_WORST_COLUMNS.len()).unwrap_or(u32::MAX);
    Array::new(rows, cols, items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

/// The examples' stage: gain 48 (47k/1k), A0 50k … 200k … 1M, GBW 10 MHz.
macro_rules! gain48 {
    () => {
        "\"kind=non-inverting, a0=200k, a0Min=50k, a0Max=1M, gbwHz=10M, rf=47k, rg=1k\""
    };
}

/// The tolerance area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "TOLERANCE.WORSTCASE",
        area: "tolerance",
        summary: "Worst case of a stage figure over its parts' tolerances, tempcos, the amplifier's spreads and a temperature range: lowest, nominal, highest",
        params: WORST,
        repeats: false,
        result_unit: "the figure's unit",
        spill: &["lowest value", "value at nominal parts (the low end of the temperature range)", "highest value"],
        example: Example {
            formula: concat!("=TOLERANCE.WORSTCASE(", gain48!(), "; \"rf=1% 25ppm/K, rg=1% normal 3σ -25ppm/K\"; \"gainDb\"; 20 kHz; \"0…70\")"),
            expected: Expected::Numbers(&[33.397813294148236, 33.572386555375424, 33.77207907014538]),
            source: "20·log10|A/(1 + A·Rg/(Rf + Rg))| with A = A0/(1 + j·f·A0/GBW) at all 16 corners of Rf, Rg, A0 and 0, 70 °C (Rf, Rg drifted by ±25 ppm/K from 25 °C), by mpmath (tests/reference/sheet_catalog.py)",
            tolerance: &[1e-9, 1e-9, 1e-9],
        },
        eval: worst,
    },
    FunctionSpec {
        name: "TOLERANCE.YIELD",
        area: "tolerance",
        summary: "Seeded Monte Carlo yield of a stage figure over its parts' tolerances, tempcos, the amplifier's spreads and a temperature range: the share of trials within the limits",
        params: YIELD,
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=TOLERANCE.YIELD(\"kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k\"; \"rf=1%, rg=1%\"; \"gainDb\"; 0; 33.5813; 33.6681; 20000; 1)",
            expected: Expected::Numbers(&[0.44518771230688964]),
            source: "exact share of the square of Rf, Rg uniform over ±1 % with 20·log10(1 + Rf/Rg) within the limits, by mpmath (tests/reference/sheet_catalog.py); the seeded sample agrees within 4 standard errors",
            tolerance: &[0.03157522432108086],
        },
        eval: yield_fraction,
    },
    FunctionSpec {
        name: "TOLERANCE.SENSITIVITY",
        area: "tolerance",
        summary: "Sensitivity of a stage figure to each varied part at nominal: per unit change, normalised, share of the figure's variance, and the part to tighten first",
        params: WORST,
        repeats: false,
        result_unit: "the part's unit; the figure's unit; 1; 1; 1",
        spill: SENSITIVITY_COLUMNS,
        example: Example {
            formula: "=TOLERANCE.SENSITIVITY(\"kind=non-inverting, a0=200k, gbwHz=10M, rf=47k, rg=1k\"; \"rf=1%, rg=1% normal 3σ\"; \"gainDb\"; 20 kHz)",
            expected: Expected::Numbers(&[
                47000.0, 8.42528276105614, 0.2508800076696381, 0.7550328746044591, 1.0,
                1000.0, -8.42528276105614, -0.2508800076696381, 0.24496712539554086, 0.0,
            ]),
            source: "x·∂F/∂x of 20·log10|A/(1 + A·Rg/(Rf + Rg))|, A = A0/(1 + j·f·A0/GBW), by mpmath's derivative; shares from the parts' standard deviations (uniform 2·1 %/√12, normal 1 %/3 truncated at 3 σ by quadrature), by mpmath (tests/reference/sheet_catalog.py)",
            tolerance: &[0.0, 1e-6, 1e-6, 1e-6, 0.0, 0.0, 1e-6, 1e-6, 1e-6, 0.0],
        },
        eval: sensitivities,
    },
    FunctionSpec {
        name: "TOLERANCE.MONTECARLO",
        area: "tolerance",
        summary: "Seeded Monte Carlo distribution of a stage figure over its parts' spreads, the amplifier's and a temperature range: mean, standard deviation, percentiles",
        params: MONTE,
        repeats: false,
        result_unit: "the figure's unit",
        spill: &["mean", "standard deviation", "0.1 %", "1 %", "5 %", "50 %", "95 %", "99 %", "99.9 %"],
        example: Example {
            formula: "=TOLERANCE.MONTECARLO(\"kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k\"; \"rf=1%, rg=1%\"; \"gainDb\"; 0; 20000; 1)",
            expected: Expected::Numbers(&[
                33.624830654060396, 0.06944407586473278, 33.462360367991735, 33.47880345316607,
                33.50852957021138, 33.624824747511745, 33.741153063970344, 33.77089829180124,
                33.787353809962326,
            ]),
            source: "exact distribution of 20·log10(1 + Rf/Rg), Rf and Rg uniform over ±1 %: mean and sd by mpmath quadrature, percentiles by root-finding on the exact share (tests/reference/sheet_catalog.py); the seeded sample agrees within 5 standard errors of each statistic",
            tolerance: &[
                7.30180286443405e-05, 0.02091673621176311, 0.00012697384773502249,
                0.0001263435861350394, 0.00012366372954012044, 8.942643225718844e-05,
                0.00012288115074623437, 0.00012534045544742689, 0.0001258526691092626,
            ],
        },
        eval: distribution,
    },
    FunctionSpec {
        name: "TOLERANCE.TIGHTEN",
        area: "tolerance",
        summary: "The part to tighten first: the one with the largest share of a stage figure's variance (Rf, Rg, …, U1.a0, U1.gbwHz, U1.ro)",
        params: WORST,
        repeats: false,
        result_unit: "text",
        spill: &[],
        example: Example {
            formula: "=TOLERANCE.TIGHTEN(\"kind=non-inverting, a0=200k, gbwHz=10M, rf=47k, rg=1k\"; \"rf=0.1%, rg=0.1%, gbw=5M…20M\"; \"gainDb\"; 100 kHz)",
            expected: Expected::Text("U1.gbwHz"),
            source: "|G| = 1/√((β + 1/A0)² + (f/GBW)²), β = 1/48: d ln|G|/d ln GBW = 0.19 times the GBW's relative sd ln(4)/6 ≈ 0.23 outweighs d ln|G|/d ln Rf = 0.79 times 0.2 %/√12 (arithmetic)",
            tolerance: &[],
        },
        eval: tighten,
    },
    FunctionSpec {
        name: "TOLERANCE.SPECYIELD",
        area: "tolerance",
        summary: "Seeded Monte Carlo yield of a stage against a whole spec (several figures' limits judged together, one row per limit in cells): the yield of every limit together and of each, the trials failing, and each figure's nominal, mean, lowest and highest value seen",
        params: SPEC_YIELD,
        repeats: false,
        result_unit: "1; 1; the figure's unit; the figure's unit; the figure's unit; the figure's unit",
        spill: SPEC_YIELD_COLUMNS,
        example: Example {
            formula: "=TOLERANCE.SPECYIELD(\"kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k\"; \"rf=1%, rg=1%\"; \"gainDb | 0 | 33.5813 | 33.6681; bandwidthHz | | 208k\"; 20000; 1)",
            expected: Expected::Numbers(&[0.3015732270004882, 13968.535459990237, f64::NAN, f64::NAN, f64::NAN, f64::NAN, 0.44518771230688964, 11096.245753862207, 33.62482474709482, 33.624830654060396, 33.45475607219038, 33.794964304078746, 0.5784230154145673, 8431.539691708653, 208333.33334333333, 208339.8501479063, 204292.1997523731, 212452.6714345814]),
            source: "both limits on F = 20·log10(1 + Rf/Rg) (the bandwidth GBW·(β + 1/A0) ≥ 208 kHz is |G(0)| ≤ 1/0.0208): the exact shares of the square of Rf, Rg uniform over ±1 % within each limit and within both, by mpmath; means by quadrature; lowest and highest seen are the square's corners (tests/reference/sheet_catalog.py); the seeded sample agrees within 4 standard errors (5 for the means), the extremes within the gap 20000 draws leave; NaN marks the first row's #N/A cells",
            tolerance: &[0.04304364504440137, 0.018585786570230415, 0.0, 0.0, 0.0, 0.0, 0.03157522432108086, 0.025336320396808346, 1e-12, 7.30180286443405e-05, 0.00018891607516435534, 0.0001871673145133307, 0.024146859629453052, 0.03313060216841625, 1e-09, 0.0002826684675504447, 0.0007284937608376595, 0.0007273684863010181],
        },
        eval: spec_yield,
    },
    FunctionSpec {
        name: "TOLERANCE.SPECWORST",
        area: "tolerance",
        summary: "Worst case of a stage against a whole spec (several figures' limits, one row per limit in cells): each figure's lowest, nominal and highest value over the parts' spreads and a temperature range, and whether it meets its limit; first row: every limit",
        params: SPEC_WORST,
        repeats: false,
        result_unit: "the figure's unit; the figure's unit; the figure's unit; 1",
        spill: SPEC_WORST_COLUMNS,
        example: Example {
            formula: "=TOLERANCE.SPECWORST(\"kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k\"; \"rf=1%, rg=1%\"; \"gainDb | 0 | 33.4 | 33.8; bandwidthHz | | 208k\")",
            expected: Expected::Numbers(&[f64::NAN, f64::NAN, f64::NAN, 0.0, 33.45475607178154, 33.62482474709482, 33.79496430365358, 1.0, 204292.1997623731, 208333.33334333333, 212452.6714445814, 0.0]),
            source: "|G(0)| = 1/(β + 1/A0) and the bandwidth GBW·(β + 1/A0), β = Rg/(Rf + Rg), monotonic in β: the extremes at the corners Rf +1 %, Rg −1 % and the reverse, by mpmath (tests/reference/sheet_catalog.py); the gain within 33.4 … 33.8 dB at both, the bandwidth below 208 kHz at one, so the spec fails; NaN marks the first row's #N/A cells",
            tolerance: &[0.0, 0.0, 0.0, 0.0, 1e-12, 1e-12, 1e-12, 0.0, 1e-09, 1e-09, 1e-09, 0.0],
        },
        eval: spec_worst,
    },
];
