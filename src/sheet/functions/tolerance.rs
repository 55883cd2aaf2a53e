//! Worksheet functions of the tolerance area (`src/tolerance`), prefix
//! `TOLERANCE.`: the worst case and the Monte Carlo yield of one figure of a
//! stage described in cells (`docs/tolerance.md`).
//!
//! The stage is the argument of the `STAGE.` functions (a range of name/value
//! pairs or a text `"name=value, …"`). The spreads are a text of
//! `part=percent` items, each part uniform within ±percent of its value:
//! `"rf=1%, rg=0.1%"` (the `%` may be left out); the amplifier's A0 spread is
//! the stage's `a0Min`/`a0Max`. The figure is one of `gainDb`, `phaseDeg`
//! (at the frequency argument), `bandwidthHz`, `peakingDb`, `phaseMarginDeg`,
//! `gainMarginDb`, `inputImpedanceOhm`, `outputImpedanceOhm` (at the frequency).

use super::stage::{circuit_fail, stage_of};
use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::circuit::tolerance::Tolerance;
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Value};
use crate::tolerance::{
    monte_carlo, worst_case, AmplifierSpread, Figure, Limit, MonteCarloOptions, PartSpread,
    TolStage, DEFAULT_MAX_CORNERS,
};
use alloc::format;
use alloc::string::ToString;
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
    "the parts' tolerances: a text \"rf=1%, rg=1%\" (uniform ±percent)",
    "text",
    "parts of the stage, 0 … 100 %",
);
const FIGURE: Param = req(
    "figure",
    "the figure: gainDb, phaseDeg, bandwidthHz, peakingDb, phaseMarginDeg, gainMarginDb, inputImpedanceOhm, outputImpedanceOhm",
    "text",
    "one of the names",
);
const FREQUENCY: Param = req(
    "frequency",
    "frequency of gainDb, phaseDeg and the impedances (ignored by the others)",
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
const WORST: &[Param] = &[STAGE, SPREADS, FIGURE, FREQUENCY];
const YIELD: &[Param] = &[
    STAGE, SPREADS, FIGURE, FREQUENCY, LOWER, UPPER, TRIALS, SEED,
];
const PARTS: [&str; 8] = ["rf", "rg", "cf", "rs", "cs", "rl", "cl", "riso"];

fn fail(a: &Args<'_>, what: &str) -> CellError {
    CellError::new(ErrorKind::Value, format!("{}: {what}", a.spec.name))
}

/// The spreads argument (argument 1).
fn spreads(a: &Args<'_>) -> Result<Vec<PartSpread>, CellError> {
    let text = a.text(1)?;
    let mut out = Vec::new();
    for item in text.split(',').filter(|i| !i.trim().is_empty()) {
        let Some((name, value)) = item.split_once('=') else {
            return Err(fail(
                a,
                &format!("spreads: \"{}\" is not part=percent", item.trim()),
            ));
        };
        let name = name.trim().to_ascii_lowercase();
        let Some(part) = PARTS.iter().find(|p| **p == name) else {
            return Err(fail(
                a,
                &format!("spreads: unknown part \"{name}\"; the parts are rf, rg, cf, rs, cs, rl, cl, riso"),
            ));
        };
        let v = value.trim().trim_end_matches('%').trim();
        let percent = crate::notation::parse_value(v).map_err(|_| {
            fail(
                a,
                &format!("spreads: \"{}\" is not a percentage", value.trim()),
            )
        })?;
        out.push(PartSpread {
            part,
            tolerance: Some(Tolerance::Uniform { percent }),
            tempco_ppm: None,
        });
    }
    Ok(out)
}

/// The figure of arguments 2 and 3.
fn figure(a: &Args<'_>) -> Result<Figure, CellError> {
    let name = a.text(2)?;
    let f = a.number(3)?;
    Ok(match name.trim() {
        "gainDb" => Figure::GainDb { freq_hz: f },
        "phaseDeg" => Figure::PhaseDeg { freq_hz: f },
        "bandwidthHz" => Figure::BandwidthHz,
        "peakingDb" => Figure::PeakingDb,
        "phaseMarginDeg" => Figure::PhaseMarginDeg,
        "gainMarginDb" => Figure::GainMarginDb,
        "inputImpedanceOhm" => Figure::InputImpedanceOhm { freq_hz: f },
        "outputImpedanceOhm" => Figure::OutputImpedanceOhm { freq_hz: f },
        other => {
            return Err(fail(
                a,
                &format!(
                    "figure: unknown figure \"{other}\"; see the function's help for the names"
                ),
            ))
        }
    })
}

fn tol_stage(a: &Args<'_>) -> Result<TolStage, CellError> {
    let stage = stage_of(a)?;
    let spreads = spreads(a)?;
    TolStage::new(&stage, &spreads, AmplifierSpread::default(), [25.0, 25.0])
        .map_err(|e| circuit_fail(a, e))
}

fn worst(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a));
    let figure = tri!(figure(a));
    let limit = Limit {
        figure,
        lower: None,
        upper: None,
    };
    match worst_case(&ts, &[limit], DEFAULT_MAX_CORNERS) {
        Ok(w) => {
            let f = &w.figures[0];
            Array::row(vec![
                Value::num(f.min.value),
                Value::num(f.nominal),
                Value::num(f.max.value),
            ])
            .map_or_else(
                || Value::error(ErrorKind::Value, "empty result"),
                Value::Array,
            )
        }
        Err(e) => Value::Error(circuit_fail(a, e)),
    }
}

fn yield_fraction(a: &Args<'_>) -> Value {
    let ts = tri!(tol_stage(a));
    let figure = tri!(figure(a));
    let limit = Limit {
        figure,
        lower: Some(tri!(a.number(4))),
        upper: Some(tri!(a.number(5))),
    };
    let trials = tri!(crate::network::montecarlo::count_from_number(
        "trials",
        tri!(a.number(6)),
        crate::tolerance::MAX_TRIALS
    )
    .map_err(|e| fail(a, &e.to_string())));
    let seed =
        tri!(crate::network::seed_from_number(tri!(a.number(7)))
            .map_err(|e| fail(a, &e.to_string())));
    let o = MonteCarloOptions {
        seed,
        trials,
        bins: 1,
        keep_failures: 0,
    };
    match monte_carlo(&ts, &[limit], o) {
        Ok(mc) => Value::num(mc.yield_fraction),
        Err(e) => Value::Error(circuit_fail(a, e)),
    }
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
        summary: "Worst case of a stage figure over its parts' tolerances and the A0 spread: lowest, nominal, highest",
        params: WORST,
        repeats: false,
        result_unit: "the figure's unit",
        spill: &["lowest value", "value at nominal parts", "highest value"],
        example: Example {
            formula: concat!("=TOLERANCE.WORSTCASE(", gain48!(), "; \"rf=1%, rg=1%\"; \"gainDb\"; 20 kHz)"),
            expected: Expected::Numbers(&[33.408336888786756, 33.58291814208909, 33.75311767551777]),
            source: "20·log10|A/(1 + A·Rg/(Rf + Rg))| with A = A0/(1 + j·f·A0/GBW) at all 8 corners of Rf, Rg, A0, by mpmath (tests/reference/sheet_catalog.py)",
            tolerance: &[1e-9, 1e-9, 1e-9],
        },
        eval: worst,
    },
    FunctionSpec {
        name: "TOLERANCE.YIELD",
        area: "tolerance",
        summary: "Seeded Monte Carlo yield of a stage figure over its parts' tolerances and the A0 spread: the share of trials within the limits",
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
];
