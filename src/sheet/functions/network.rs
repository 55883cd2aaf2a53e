//! Worksheet functions of feedback networks and tolerances (`src/network`), prefix `NETWORK.`: standard values of the IEC 60063 series, the
//! best resistor pairs for a gain or ratio, and the worst case and Monte Carlo
//! spread of an op-amp stage. Each function converts its arguments, calls the
//! core and converts the result; formulas, units and sources are documented on
//! the core functions.
//!
//! The stage of `NETWORK.WORSTCASE`, `NETWORK.MONTECARLO` and `NETWORK.YIELD` is written as
//! `stage; metric; r1; r2; tolerance; a_min; a_typ; a_max; ri; ro; pole` (both
//! resistors share the tolerance) — see [`crate::network::StageSpec`]; `pole` is
//! the dominant pole of the typical amplifier, and the spread of A keeps the
//! gain–bandwidth product a_typ·pole ([`crate::network::Hold::GainBandwidth`]).
//! `NETWORK.MONTECARLO` and `NETWORK.YIELD` take the open-loop gain's distribution as an
//! optional last argument (log-normal when left out, see
//! [`crate::network::GainDistribution`]).
//!
//! `NETWORK.CHOOSE` ranks series, tolerance grades and leg builds against a gain
//! or ratio with a tolerance ([`crate::network::choose_parts`]); its series are
//! one text ("E96, E192") and its grades a number or a range of numbers.

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::network::{
    self as net, best_pairs, choose_parts, monte_carlo, standard_value, ChooseSpec, Combine,
    Distribution, GainDistribution, Hold, Joint, Metric, MonteCarloSpec, Network, PairSpec,
    Rounding, Series, Stage, StageSpec,
};
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use alloc::vec;
use alloc::vec::Vec;

/// Core parameter names that the worksheet spells differently.
const NAMES: &[(&str, &str)] = &[
    ("tol_r1", "tolerance"),
    ("tol_r2", "tolerance"),
    ("pole_hz", "pole"),
];

fn core_err(a: &Args<'_>, e: crate::Error) -> Value {
    Value::Error(super::core_error(a.spec.name, e, NAMES))
}

fn from_core<T>(a: &Args<'_>, r: crate::Result<T>) -> Result<T, CellError> {
    r.map_err(|e| super::core_error(a.spec.name, e, NAMES))
}

fn with_unit(x: f64, unit: Option<Unit>) -> Value {
    match Value::num(x) {
        Value::Number(v, _) => Value::Number(v, unit),
        other => other,
    }
}

fn row(items: Vec<Value>) -> Value {
    Array::row(items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

fn series(a: &Args<'_>, i: usize) -> Result<Series, CellError> {
    let name = a.text(i)?;
    from_core(a, name.trim().parse::<Series>())
}

/// The unit the value argument was written with (`4k7Ω` keeps its Ω).
fn unit_of(v: &Value) -> Option<Unit> {
    match v {
        Value::Number(_, u) => *u,
        _ => None,
    }
}

fn rounded(a: &Args<'_>, rounding: Rounding) -> Value {
    let s = tri!(series(a, 1));
    match standard_value(s, tri!(a.number(0)), rounding) {
        Ok(x) => with_unit(x, unit_of(a.get(0))),
        Err(e) => core_err(a, e),
    }
}

fn nearest(a: &Args<'_>) -> Value {
    rounded(a, Rounding::Nearest)
}

fn up(a: &Args<'_>) -> Value {
    rounded(a, Rounding::Up)
}

fn down(a: &Args<'_>) -> Value {
    rounded(a, Rounding::Down)
}

fn tolerance(a: &Args<'_>) -> Value {
    Value::num(tri!(series(a, 0)).tolerance())
}

fn pair(a: &Args<'_>) -> Value {
    let network = tri!(from_core(a, tri!(a.text(0)).parse::<Network>()));
    let mut spec = PairSpec::new(
        network,
        tri!(a.number(1)),
        tri!(series(a, 2)),
        tri!(a.number(3)),
        tri!(a.number(4)),
    );
    let count = tri!(a.number(5));
    spec.count = tri!(from_core(
        a,
        net::montecarlo::count_from_number("count", count, net::MAX_CANDIDATES)
    ));
    // Left out (or an empty cell): no maximum error, single resistors.
    spec.max_error = match a.get(6) {
        Value::Empty => None,
        _ => Some(tri!(a.number(6))),
    };
    spec.combine = match a.get(7) {
        Value::Empty => Combine::None,
        _ => tri!(from_core(a, tri!(a.text(7)).parse::<Combine>())),
    };
    match best_pairs(&spec) {
        Ok(r) => {
            let mut items = Vec::with_capacity(r.candidates.len() * 6);
            for c in &r.candidates {
                items.push(with_unit(c.r1, Some(Unit::Ohm)));
                items.push(with_unit(c.r2.value, Some(Unit::Ohm)));
                items.push(Value::num(c.achieved));
                items.push(Value::num(c.error));
                let (first, second) = match c.r2.joint {
                    Joint::Single => (c.r2.value, 0.0),
                    Joint::Series | Joint::Parallel => (c.r2.first, c.r2.second.unwrap_or(0.0)),
                };
                items.push(with_unit(first, Some(Unit::Ohm)));
                items.push(with_unit(second, Some(Unit::Ohm)));
            }
            let rows = u32::try_from(r.candidates.len()).unwrap_or(u32::MAX);
            Array::new(rows, 6, items).map_or_else(
                || {
                    Value::error(
                        ErrorKind::NotAvailable,
                        "NETWORK.PAIR: no pair fits the total-resistance range",
                    )
                },
                Value::Array,
            )
        }
        Err(e) => core_err(a, e),
    }
}

/// The stage of arguments 0…10: stage; metric; r1; r2; tolerance; a_min; a_typ;
/// a_max; ri; ro; pole.
fn stage(a: &Args<'_>) -> Result<(StageSpec, Metric), CellError> {
    let kind = from_core(a, a.text(0)?.parse::<Stage>())?;
    let metric = from_core(a, a.text(1)?.parse::<Metric>())?;
    let tol = a.number(4)?;
    let spec = StageSpec {
        stage: kind,
        r1: a.number(2)?,
        r2: a.number(3)?,
        tol_r1: tol,
        tol_r2: tol,
        a_min: a.number(5)?,
        a_typ: a.number(6)?,
        a_max: a.number(7)?,
        ri: a.number(8)?,
        ro: a.number(9)?,
        pole_hz: a.number(10)?,
        hold: Hold::GainBandwidth,
    };
    Ok((spec, metric))
}

fn metric_unit(m: Metric) -> Option<Unit> {
    match m {
        Metric::Gain => None,
        Metric::InputImpedance | Metric::OutputImpedance => Some(Unit::Ohm),
        Metric::Bandwidth => Some(Unit::Hertz),
    }
}

fn worst(a: &Args<'_>) -> Value {
    let (spec, metric) = tri!(stage(a));
    match net::worst_case(&spec) {
        Ok(w) => {
            let e = match metric {
                Metric::Gain => w.gain,
                Metric::InputImpedance => w.input_impedance,
                Metric::OutputImpedance => w.output_impedance,
                Metric::Bandwidth => w.bandwidth_hz,
            };
            let u = metric_unit(metric);
            row(vec![
                with_unit(e.nominal, u),
                with_unit(e.min, u),
                with_unit(e.max, u),
                Value::num(e.low_percent),
                Value::num(e.high_percent),
            ])
        }
        Err(e) => core_err(a, e),
    }
}

/// The Monte Carlo run of arguments 0…13 (the stage, trials, seed, distribution)
/// with spec limits `lower`/`upper` and the gain distribution at argument
/// `gain_at` (log-triangular when left out).
fn run(
    a: &Args<'_>,
    lower: Option<f64>,
    upper: Option<f64>,
    gain_at: usize,
) -> Result<(net::MonteCarloResult, Metric), CellError> {
    let (stage, metric) = stage(a)?;
    let trials = from_core(
        a,
        net::montecarlo::count_from_number("trials", a.number(11)?, net::MAX_TRIALS),
    )?;
    let seed = from_core(a, net::seed_from_number(a.number(12)?))?;
    let dist = from_core(a, Distribution::from_name(&a.text(13)?, 3.0, "k"))?;
    let gain = match a.get(gain_at) {
        Value::Empty => GainDistribution::default(),
        _ => from_core(
            a,
            GainDistribution::from_name(&a.text(gain_at)?, 3.0, "k_gain"),
        )?,
    };
    let spec = MonteCarloSpec {
        stage,
        resistors: dist,
        open_loop_gain: gain,
        metric,
        trials,
        seed,
        lower,
        upper,
        bins: 1,
    };
    Ok((from_core(a, monte_carlo(&spec))?, metric))
}

fn montecarlo(a: &Args<'_>) -> Value {
    let (r, metric) = tri!(run(a, None, None, 14));
    let u = metric_unit(metric);
    let mut items = vec![with_unit(r.stats.mean, u), with_unit(r.stats.sd, u)];
    items.extend(r.stats.percentiles.iter().map(|p| with_unit(p.value, u)));
    row(items)
}

fn yield_fraction(a: &Args<'_>) -> Value {
    let (lower, upper) = (tri!(a.number(14)), tri!(a.number(15)));
    let (r, _) = tri!(run(a, Some(lower), Some(upper), 16));
    r.stats.yield_fraction.map_or_else(
        || Value::error(ErrorKind::NotAvailable, "NETWORK.YIELD: no spec limits"),
        Value::num,
    )
}

/// The series of a text argument: names separated by commas or spaces.
fn series_list(a: &Args<'_>, i: usize) -> Result<Vec<Series>, CellError> {
    let text = a.text(i)?;
    let mut out = Vec::new();
    for name in text.split(|c: char| c == ',' || c == ';' || c.is_whitespace()) {
        if !name.is_empty() {
            out.push(from_core(a, name.parse::<Series>())?);
        }
    }
    Ok(out)
}

/// A number, or every number of a range or array, as a list.
fn number_list(a: &Args<'_>, i: usize) -> Result<Vec<f64>, CellError> {
    match a.get(i) {
        Value::Array(arr) => {
            let mut out = Vec::new();
            for item in arr.items() {
                match item {
                    Value::Number(x, _) => out.push(*x),
                    Value::Error(e) => return Err(e.clone()),
                    Value::Empty => {}
                    _ => {
                        return Err(super::core_error(
                            a.spec.name,
                            crate::Error::WrongType {
                                param: "grades",
                                expected: "numbers",
                            },
                            NAMES,
                        ))
                    }
                }
            }
            Ok(out)
        }
        _ => Ok(vec![a.number(i)?]),
    }
}

fn choose(a: &Args<'_>) -> Value {
    let network = tri!(from_core(a, tri!(a.text(0)).parse::<Network>()));
    let mut spec = ChooseSpec::new(network, tri!(a.number(1)), tri!(a.number(2)));
    spec.series = tri!(series_list(a, 3));
    spec.grades = tri!(number_list(a, 4));
    let given = |i: usize| !matches!(a.get(i), Value::Empty);
    if given(5) {
        spec.combine = tri!(from_core(a, tri!(a.text(5)).parse::<Combine>()));
    }
    if given(6) {
        spec.min_yield = tri!(a.number(6));
    }
    if given(7) {
        spec.total_min = tri!(a.number(7));
    }
    if given(8) {
        spec.total_max = tri!(a.number(8));
    }
    if given(9) {
        spec.open_loop_gain = Some(tri!(a.number(9)));
    }
    match choose_parts(&spec) {
        Ok(r) => {
            let mut items = Vec::with_capacity(r.choices.len() * CHOOSE_COLUMNS.len());
            for c in &r.choices {
                let second = c.r2.second.unwrap_or(0.0);
                items.extend([
                    Value::num(c.series.len() as f64),
                    Value::num(c.grade),
                    Value::num(c.parts as f64),
                    with_unit(c.r1, Some(Unit::Ohm)),
                    with_unit(c.r2.first, Some(Unit::Ohm)),
                    with_unit(second, Some(Unit::Ohm)),
                    Value::num(c.nominal_error),
                    Value::num(c.yield_),
                    Value::num(c.yield_std_error),
                    Value::num(c.worst_low),
                    Value::num(c.worst_high),
                    Value::num(c.cost_rank as f64),
                    Value::Bool(c.meets),
                ]);
            }
            let rows = u32::try_from(r.choices.len()).unwrap_or(u32::MAX);
            let cols = u32::try_from(CHOOSE_COLUMNS.len()).unwrap_or(u32::MAX);
            Array::new(rows, cols, items).map_or_else(
                || {
                    Value::error(
                        ErrorKind::NotAvailable,
                        "NETWORK.CHOOSE: no pair fits the total-resistance range",
                    )
                },
                Value::Array,
            )
        }
        Err(e) => core_err(a, e),
    }
}

const CHOOSE_COLUMNS: &[&str] = &[
    "series: values per decade (96 for E96)",
    "tolerance grade",
    "parts (2, or 3 with a two-part R2)",
    "R1, Ω",
    "R2 first part, Ω",
    "R2 second part, Ω (0 when single)",
    "nominal error, value/target − 1",
    "yield",
    "yield standard error (0 when exact)",
    "worst-case low",
    "worst-case high",
    "cost rank (1 cheapest)",
    "meets the minimum yield",
];

const VALUE: Param = req(
    "value",
    "a resistance, capacitance or inductance",
    "any (kept on the result)",
    "1e-15 … 1e15",
);
const SERIES: Param = req(
    "series",
    "standard series name, e.g. \"E24\"",
    "text",
    "E3, E6, E12, E24, E48, E96, E192",
);
const P_STAGE: Param = req(
    "stage",
    "\"non-inverting\" or \"inverting\"",
    "text",
    "non-inverting, inverting",
);
const P_METRIC: Param = req(
    "metric",
    "which quantity",
    "text",
    "gain, input-impedance, output-impedance, bandwidth",
);
const P_R1: Param = req(
    "r1",
    "nominal R1 (to ground, or from the input)",
    "Ω",
    "> 0",
);
const P_R2: Param = req("r2", "nominal R2 (output to inverting input)", "Ω", "> 0");
const P_TOL: Param = req(
    "tolerance",
    "tolerance of R1 and R2 as a fraction (1% or 0.01)",
    "1",
    "0 < tol < 1",
);
const P_AMIN: Param = req("a_min", "least open-loop gain", "V/V", "> 0");
const P_ATYP: Param = req(
    "a_typ",
    "typical open-loop gain",
    "V/V",
    "a_min <= a_typ <= a_max",
);
const P_AMAX: Param = req("a_max", "largest open-loop gain", "V/V", ">= a_typ");
const P_RI: Param = req("ri", "amplifier input resistance", "Ω", "> 0");
const P_RO: Param = req("ro", "amplifier output resistance", "Ω", ">= 0");
const P_POLE: Param = req(
    "pole",
    "open-loop dominant pole at a_typ (the spread of A keeps a_typ·pole)",
    "Hz",
    "> 0",
);
const P_TRIALS: Param = req("trials", "number of trials", "1", "2 … 1000000");
const P_SEED: Param = req(
    "seed",
    "generator seed (same seed, same result)",
    "1",
    "whole number 0 … 2^53 − 1",
);
const P_DIST: Param = req(
    "distribution",
    "resistors: \"uniform\" over the band, or \"normal\" with the band at 3 σ",
    "text",
    "uniform, normal",
);
const P_GAIN_DIST: Param = Param {
    name: "gain_distribution",
    summary: "open-loop gain between a_min and a_max: \"log-normal\" (median a_typ, a_min and a_max 3 σ out on their sides), \"log-triangular\" (mode at a_typ), \"log-uniform\" or \"uniform\"; left out, log-normal",
    unit: "text",
    optional: true,
    default: None,
    range: "log-normal, log-triangular, log-uniform, uniform",
};
const STAGE: &[Param] = &[
    P_STAGE, P_METRIC, P_R1, P_R2, P_TOL, P_AMIN, P_ATYP, P_AMAX, P_RI, P_RO, P_POLE,
];
const MC: &[Param] = &[
    P_STAGE,
    P_METRIC,
    P_R1,
    P_R2,
    P_TOL,
    P_AMIN,
    P_ATYP,
    P_AMAX,
    P_RI,
    P_RO,
    P_POLE,
    P_TRIALS,
    P_SEED,
    P_DIST,
    P_GAIN_DIST,
];
const YIELD: &[Param] = &[
    P_STAGE,
    P_METRIC,
    P_R1,
    P_R2,
    P_TOL,
    P_AMIN,
    P_ATYP,
    P_AMAX,
    P_RI,
    P_RO,
    P_POLE,
    P_TRIALS,
    P_SEED,
    P_DIST,
    req(
        "lower",
        "lower spec limit, in the metric's unit",
        "as metric",
        "finite",
    ),
    req(
        "upper",
        "upper spec limit, in the metric's unit",
        "as metric",
        ">= lower",
    ),
    P_GAIN_DIST,
];

/// The network area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "NETWORK.NEAREST",
        area: "network",
        summary: "Nearest standard value of a series (the lower one on a tie, compared linearly)",
        params: &[VALUE, SERIES],
        repeats: false,
        result_unit: "as value",
        spill: &[],
        example: Example {
            formula: "=NETWORK.NEAREST(5k; \"E12\")",
            expected: Expected::Numbers(&[4700.0]),
            source: "E12 decade 1.0 1.2 1.5 1.8 2.2 2.7 3.3 3.9 4.7 5.6 6.8 8.2 (IEC 60063): 5000 − 4700 < 5600 − 5000",
            tolerance: &[],
        },
        eval: nearest,
    },
    FunctionSpec {
        name: "NETWORK.UP",
        area: "network",
        summary: "Smallest standard value of a series at or above a value",
        params: &[VALUE, SERIES],
        repeats: false,
        result_unit: "as value",
        spill: &[],
        example: Example {
            formula: "=NETWORK.UP(12345; \"E96\")",
            expected: Expected::Numbers(&[12400.0]),
            source: "E96 (IEC 60063) has 121 and 124 around 123.45; also tests/reference/data/network_eseries.json (eseries package)",
            tolerance: &[],
        },
        eval: up,
    },
    FunctionSpec {
        name: "NETWORK.DOWN",
        area: "network",
        summary: "Largest standard value of a series at or below a value",
        params: &[VALUE, SERIES],
        repeats: false,
        result_unit: "as value",
        spill: &[],
        example: Example {
            formula: "=NETWORK.DOWN(12345; \"E96\")",
            expected: Expected::Numbers(&[12100.0]),
            source: "E96 (IEC 60063) has 121 and 124 around 123.45; also tests/reference/data/network_eseries.json (eseries package)",
            tolerance: &[],
        },
        eval: down,
    },
    FunctionSpec {
        name: "NETWORK.TOLERANCE",
        area: "network",
        summary: "The customary tolerance of a standard series, as a fraction",
        params: &[SERIES],
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=NETWORK.TOLERANCE(\"E96\")",
            expected: Expected::Numbers(&[0.01]),
            source: "E96 is the 1 % series (IEC 60063, from memory)",
            tolerance: &[],
        },
        eval: tolerance,
    },
    FunctionSpec {
        name: "NETWORK.PAIR",
        area: "network",
        summary: "Best standard-value pairs R1, R2 for a gain or divider ratio, one row per candidate, smallest error first",
        params: &[
            req("network", "\"non-inverting\" (1 + R2/R1), \"inverting\" (−R2/R1) or \"divider\" (R1/(R1 + R2))", "text", "non-inverting, inverting, divider"),
            req("target", "gain or ratio wanted", "V/V", "non-inverting >= 1; inverting not 0; divider 0 … 1"),
            SERIES,
            req("total_min", "least R1 + R2", "Ω", "> 0"),
            req("total_max", "largest R1 + R2", "Ω", ">= total_min"),
            req("count", "how many candidates", "1", "1 … 100"),
            Param {
                name: "max_error",
                summary: "largest acceptable |error| (1% or 0.01): candidates within it rank first, fewest parts first; left out, none",
                unit: "1",
                optional: true,
                default: None,
                range: "> 0",
            },
            Param {
                name: "combine",
                summary: "two-resistor R2 legs searched as well: \"series\", \"parallel\" or \"either\"; left out, \"none\"",
                unit: "text",
                optional: true,
                default: None,
                range: "none, series, parallel, either",
            },
        ],
        repeats: false,
        result_unit: "Ω; Ω; V/V; 1; Ω; Ω",
        spill: &["R1, Ω", "R2, Ω", "gain or ratio achieved", "error achieved/target − 1", "R2 first part, Ω (R2 itself when single)", "R2 second part, Ω (0 when single)"],
        example: Example {
            formula: "=NETWORK.PAIR(\"non-inverting\"; 7.5; \"E12\"; 10k; 100k; 3)",
            expected: Expected::Numbers(&[
                1500.0,
                10000.0,
                7.666666666666667,
                0.022222222222222365,
                10000.0,
                0.0,
                1800.0,
                12000.0,
                7.666666666666667,
                0.022222222222222365,
                12000.0,
                0.0,
                2700.0,
                18000.0,
                7.666666666666667,
                0.022222222222222365,
                18000.0,
                0.0,
            ]),
            source: "every E12 pair in range enumerated from the eseries package's E12 values, the best R2 for each R1, ranked by |error|, then R1 + R2, then R1 (tests/reference/sheet_catalog.py)",
            tolerance: &[],
        },
        eval: pair,
    },
    FunctionSpec {
        name: "NETWORK.WORSTCASE",
        area: "network",
        summary: "Nominal and extreme values of a stage quantity over the resistor tolerance and the open-loop gain range",
        params: STAGE,
        repeats: false,
        result_unit: "as metric; as metric; as metric; %; %",
        spill: &["nominal", "minimum", "maximum", "minimum relative to nominal, %", "maximum relative to nominal, %"],
        example: Example {
            formula: "=NETWORK.WORSTCASE(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 50k; 100k; 200k; 1M; 50; 10 Hz)",
            expected: Expected::Numbers(&[
                9.99900009999,
                9.819853209032997,
                10.18129986109798,
                -1.7916480564609882,
                1.8231799108409026,
            ]),
            source: "Af = A/(1 + A·R1/(R1 + R2)) is monotonic in R1, R2 and A, so its extremes are at the corners (R1 ± 1 %, R2 ∓ 1 %, A at its ends) (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[],
        },
        eval: worst,
    },
    FunctionSpec {
        name: "NETWORK.MONTECARLO",
        area: "network",
        summary: "Seeded Monte Carlo of a stage quantity: mean, standard deviation and the 0.1 … 99.9 % percentiles",
        params: MC,
        repeats: false,
        result_unit: "as metric",
        spill: &["mean", "standard deviation", "0.1 %", "1 %", "5 %", "50 %", "95 %", "99 %", "99.9 %"],
        example: Example {
            formula: "=NETWORK.MONTECARLO(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 100k; 100k; 100k; 1M; 50; 10 Hz; 200000; 1; \"uniform\")",
            expected: Expected::Numbers(&[
                9.999300004005326,
                0.07347452719677093,
                9.82871033574128,
                9.845801040604032,
                9.876779781903046,
                9.99900009999,
                10.122902559409631,
                10.154852309511313,
                10.172574143889793,
            ]),
            source: "exact moments and quantiles of Af = 1/(β + 1/A), β = R1/(R1 + R2), for R1, R2 uniform over ±1 %, by mpmath quadrature (tests/reference/sheet_catalog.py); the seeded sample agrees within 5 standard errors",
            tolerance: &[
                8.215276937426977e-5,
                0.006615321509871733,
                0.0001415899928813279,
                0.0001414405886325451,
                0.0001382846656579829,
                0.00010061299768772176,
                0.0001391643273319624,
                0.0001420776578161323,
                0.0001429081153663566,
            ],
        },
        eval: montecarlo,
    },
    FunctionSpec {
        name: "NETWORK.YIELD",
        area: "network",
        summary: "Seeded Monte Carlo yield: the share of trials with the stage quantity within spec limits",
        params: YIELD,
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=NETWORK.YIELD(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 100k; 100k; 100k; 1M; 50; 10 Hz; 200000; 1; \"uniform\"; 9.9; 10.05)",
            expected: Expected::Numbers(&[0.6428192969979213]),
            source: "exact P(9.9 <= Af <= 10.05) for R1, R2 uniform over ±1 %, by mpmath quadrature (tests/reference/sheet_catalog.py); the seeded sample agrees within 5 standard errors",
            tolerance: &[0.00833402017772508],
        },
        eval: yield_fraction,
    },
    FunctionSpec {
        name: "NETWORK.CHOOSE",
        area: "network",
        summary: "Series, tolerance grade and R2 build ranked against a gain or ratio with a tolerance: those reaching the minimum yield first, cheapest first; then the rest by yield",
        params: &[
            req("network", "\"non-inverting\" (1 + R2/R1), \"inverting\" (−R2/R1) or \"divider\" (R1/(R1 + R2))", "text", "non-inverting, inverting, divider"),
            req("target", "gain or ratio wanted", "V/V", "non-inverting >= 1; inverting not 0; divider 0 … 1"),
            req("tolerance", "the spec: target·(1 ± tolerance) (0.5% or 0.005)", "1", "0 < tolerance < 1"),
            req("series", "series tried, e.g. \"E96, E192\"", "text", "E3, E6, E12, E24, E48, E96, E192"),
            req("grades", "tolerance grades tried: a number or a range (1% or 0.01)", "1", "1 … 8 values, each 0 … 1"),
            Param {
                name: "combine",
                summary: "two-part R2 legs tried as well: \"none\", \"series\", \"parallel\" or \"either\"; left out, \"either\"",
                unit: "text",
                optional: true,
                default: None,
                range: "none, series, parallel, either",
            },
            Param {
                name: "min_yield",
                summary: "yield a choice must reach; left out, 0.99",
                unit: "1",
                optional: true,
                default: None,
                range: "0 < min_yield <= 1",
            },
            Param {
                name: "total_min",
                summary: "least R1 + R2; left out, 1 kΩ",
                unit: "Ω",
                optional: true,
                default: None,
                range: "> 0",
            },
            Param {
                name: "total_max",
                summary: "largest R1 + R2; left out, 1 MΩ",
                unit: "Ω",
                optional: true,
                default: None,
                range: ">= total_min",
            },
            Param {
                name: "open_loop_gain",
                summary: "the amplifier's open-loop gain A; left out, ideal",
                unit: "V/V",
                optional: true,
                default: None,
                range: "> the window's upper end",
            },
        ],
        repeats: false,
        result_unit: "1; 1; 1; Ω; Ω; Ω; 1; 1; 1; as target; as target; 1; truth value",
        spill: CHOOSE_COLUMNS,
        example: Example {
            formula: "=NETWORK.CHOOSE(\"non-inverting\"; 48; 0.5%; \"E96, E192\"; 0.25%; \"none\"; 0.99; 10k; 1M)",
            expected: Expected::Numbers(&[
                192.0,
                0.0025,
                2.0,
                1000.0,
                47000.0,
                0.0,
                0.0,
                1.0,
                0.0,
                47.76558603491272,
                48.235588972431074,
                2.0,
                1.0,
                96.0,
                0.0025,
                2.0,
                243.0,
                11500.0,
                0.0,
                0.006772976680384124,
                0.20481562911693135,
                0.0,
                48.08906745481974,
                48.56232144146374,
                1.0,
                0.0,
            ]),
            source: "every E96 and E192 pair in 10 k … 1 MΩ enumerated from the eseries package, the five nearest 48 ranked as NETWORK.PAIR, the highest exact yield of two uniform ±0.25 % parts by mpmath quadrature, the worst case at the four corners (tests/reference/sheet_catalog.py)",
            tolerance: &[],
        },
        eval: choose,
    },
];
