//! Worksheet functions of the stage area (`src/stage`), prefix `STAGE.`: the
//! closed-loop gain, loop gain, impedances and poles of a stage described in
//! cells.
//!
//! A stage is one argument, written either way an engineer keeps it:
//! - a range of name/value pairs, two columns (names left, values right) or
//!   two rows (names above), e.g. `kind | non-inverting`, `a0 | 200k`,
//!   `gbwHz | 10M`, `rf | 9k`, `rg | 1k`;
//! - a text of `name=value` items separated by commas:
//!   `"kind=non-inverting, a0=200k, gbwHz=10M, rf=9k, rg=1k"`.
//!
//! The names are the fields of the stage document (`docs/stage.md`), in any
//! case: `kind`, `spreadPoint`; the amplifier's `a0` (and `a0Min`, `a0Max` for
//! its spread), `gbwHz` (or `gbw`), `dominantPoleHz`, `hold`, `polesHz` (or
//! `poles`), `zerosHz`, `rhpZerosHz` (lists: values separated by spaces),
//! `rd`, `cd`, `rcm`, `ccm`, `ro`, `slewRate`; the parts `rf`, `rg`, `cf`,
//! `rs`, `cs`, `rl`, `cl`, `riso`. Values are numbers or value texts (`4k7`,
//! `2p2`). The pairs become a stage document read by
//! [`crate::stage::read_stage`], so every check and every error is the
//! document's, naming the field. Each function converts, calls the core and
//! converts the result.

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::circuit::blackman::Output;
use crate::circuit::CircuitError;
use crate::json::Json;
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use crate::stage::closed_loop::{gain_sweep, impedance_sweep};
use crate::stage::document_pairs::{document_from_pairs, PAIR_NAMES};
use crate::stage::loop_gain::{loop_gain, ResponseSweep};
use crate::stage::margins::circuit_margins;
use crate::stage::poles::circuit_poles;
use crate::stage::{read_stage, StageCircuit};
use alloc::format;
use alloc::string::{String, ToString};
use alloc::vec;
use alloc::vec::Vec;

const STAGE: Param = req(
    "stage",
    "the stage: a range of name/value pairs, or a text \"name=value, …\" (fields of docs/stage.md)",
    "text",
    "kind and amplifier figures required; parts as the kind needs",
);
const FREQUENCY: Param = req("frequency", "frequency", "Hz", "≥ 0");
const AT: &[Param] = &[STAGE, FREQUENCY];
const ONLY: &[Param] = &[STAGE];

fn fail(a: &Args<'_>, kind: ErrorKind, what: &str) -> CellError {
    CellError::new(kind, format!("{}: stage: {what}", a.spec.name))
}

/// A cell's value as a JSON value of the document: numbers as numbers, text
/// as text (value texts are read by the document reader).
fn json_of(a: &Args<'_>, name: &str, v: &Value) -> Result<Json, CellError> {
    match v {
        Value::Number(x, _) => Ok(Json::from(*x)),
        Value::Text(t) => Ok(Json::from(t.trim())),
        Value::Error(e) => Err(e.clone()),
        _ => Err(fail(
            a,
            ErrorKind::Value,
            &format!("{name}: needs a number or a text"),
        )),
    }
}

/// The name/value pairs of the stage argument: a two-column or two-row range,
/// or a text of `name=value` items.
fn pairs(a: &Args<'_>) -> Result<Vec<(String, Value)>, CellError> {
    match a.get(0) {
        Value::Array(arr) => {
            let (rows, cols) = (arr.rows(), arr.cols());
            let pair = |i: u32| {
                if cols == 2 {
                    (arr.get(i, 0), arr.get(i, 1))
                } else {
                    (arr.get(0, i), arr.get(1, i))
                }
            };
            let count = match (rows, cols) {
                (_, 2) => rows,
                (2, _) => cols,
                _ => {
                    return Err(fail(
                        a,
                        ErrorKind::Value,
                        "a range of name/value pairs has two columns (or two rows)",
                    ))
                }
            };
            let mut out = Vec::new();
            for i in 0..count {
                match pair(i) {
                    (Value::Empty, Value::Empty) => {}
                    (Value::Text(name), value) => out.push((String::from(name.trim()), value)),
                    (Value::Error(e), _) => return Err(e),
                    _ => {
                        return Err(fail(
                            a,
                            ErrorKind::Value,
                            &format!("pair {}: the name must be a text", i + 1),
                        ))
                    }
                }
            }
            Ok(out)
        }
        Value::Text(t) => t
            .split(',')
            .filter(|item| !item.trim().is_empty())
            .map(|item| match item.split_once('=') {
                Some((n, v)) => Ok((String::from(n.trim()), Value::Text(v.trim().into()))),
                None => Err(fail(
                    a,
                    ErrorKind::Value,
                    &format!("\"{}\" is not name=value", item.trim()),
                )),
            })
            .collect(),
        Value::Error(e) => Err(e.clone()),
        _ => Err(fail(
            a,
            ErrorKind::Value,
            "a range of name/value pairs or a text \"name=value, …\"",
        )),
    }
}

/// The stage document the pairs describe (`crate::stage::document_pairs`).
fn document(a: &Args<'_>) -> Result<Json, CellError> {
    let pairs = pairs(a)?;
    let mut values = Vec::with_capacity(pairs.len());
    for (name, value) in &pairs {
        values.push((name.as_str(), json_of(a, name, value)?));
    }
    document_from_pairs(values).map_err(|e| circuit_fail(a, e))
}

/// A circuit error as an error value naming the field or element.
pub(super) fn circuit_fail(a: &Args<'_>, e: CircuitError) -> CellError {
    let kind = match e.error {
        crate::Error::UnknownName { .. } | crate::Error::OutOfDomain { .. } => ErrorKind::Value,
        _ => ErrorKind::Num,
    };
    let param = e.error.param();
    let sentence = e.to_string();
    let detail = match (&e.error, param, e.name.as_str()) {
        (crate::Error::UnknownName { .. }, "field", name) => format!(
            "{}: stage: unknown name \"{name}\"; the names are {PAIR_NAMES}",
            a.spec.name
        ),
        _ => format!("{}: stage: {sentence}", a.spec.name),
    };
    CellError::new(kind, detail)
}

/// The stage of the stage argument (argument 0).
pub(super) fn stage_of(a: &Args<'_>) -> Result<crate::stage::Stage, CellError> {
    let doc = document(a)?;
    read_stage(&doc.to_text()).map_err(|e| circuit_fail(a, e))
}

/// The circuit the stage argument writes.
fn stage_circuit(a: &Args<'_>) -> Result<StageCircuit, CellError> {
    stage_of(a)?.circuit().map_err(|e| circuit_fail(a, e))
}

/// The frequency argument (Hz, ≥ 0, checked by the core).
fn frequency(a: &Args<'_>) -> Result<[f64; 1], CellError> {
    Ok([a.number(1)?])
}

fn tagged(x: f64, unit: Option<Unit>) -> Value {
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

/// The one point of a sweep as [first, phase °]: `first` from (magnitude, dB).
fn point(s: &ResponseSweep, db: bool, unit: Option<Unit>) -> Value {
    match (s.re.first(), s.im.first(), s.magnitude_db.first()) {
        (Some(&re), Some(&im), Some(&m)) => {
            let phase = crate::float::atan2(im, re).to_degrees();
            let first = if db {
                tagged(m, Some(Unit::Decibel))
            } else {
                tagged(libm::hypot(re, im), unit)
            };
            row(vec![first, Value::num(phase)])
        }
        _ => Value::error(ErrorKind::Value, "empty result"),
    }
}

fn gain(a: &Args<'_>) -> Value {
    let sc = tri!(stage_circuit(a));
    let f = tri!(frequency(a));
    let output = match sc.output_current {
        Some(e) => Output::Current(e),
        None => Output::Voltage(sc.output, "0"),
    };
    match gain_sweep(&sc.circuit, sc.source, output, &f) {
        Ok(s) => point(&s, false, None),
        Err(e) => Value::Error(circuit_fail(a, e)),
    }
}

fn loop_gain_at(a: &Args<'_>) -> Value {
    let sc = tri!(stage_circuit(a));
    let f = tri!(frequency(a));
    match loop_gain(&sc.circuit, sc.amplifier, &f) {
        Ok(s) => point(&s, true, None),
        Err(e) => Value::Error(circuit_fail(a, e)),
    }
}

fn impedance(a: &Args<'_>, input: bool) -> Value {
    let sc = tri!(stage_circuit(a));
    let f = tri!(frequency(a));
    let r = if input {
        sc.input_impedance_circuit()
            .and_then(|c| impedance_sweep(&c, sc.input, "0", &f))
    } else {
        impedance_sweep(&sc.circuit, sc.output, "0", &f)
    };
    match r {
        Ok(z) => match (z.re.first(), z.im.first()) {
            (Some(&re), Some(&im)) => row(vec![
                tagged(libm::hypot(re, im), Some(Unit::Ohm)),
                Value::num(crate::float::atan2(im, re).to_degrees()),
            ]),
            _ => Value::error(ErrorKind::Value, "empty result"),
        },
        Err(e) => Value::Error(circuit_fail(a, e)),
    }
}

fn z_in(a: &Args<'_>) -> Value {
    impedance(a, true)
}

fn z_out(a: &Args<'_>) -> Value {
    impedance(a, false)
}

fn poles(a: &Args<'_>) -> Value {
    let sc = tri!(stage_circuit(a));
    match circuit_poles(&sc.circuit) {
        Ok(p) => {
            let tau = core::f64::consts::TAU;
            let mut items = Vec::with_capacity(p.poles.len() * 4);
            for pole in &p.poles {
                items.push(tagged(pole.re / tau, Some(Unit::Hertz)));
                items.push(tagged(pole.im / tau, Some(Unit::Hertz)));
                items.push(tagged(pole.natural_hz, Some(Unit::Hertz)));
                items.push(Value::num(pole.zeta));
            }
            let rows = u32::try_from(p.poles.len()).unwrap_or(u32::MAX);
            Array::new(rows, 4, items).map_or_else(
                || Value::error(ErrorKind::Value, "STAGE.POLES: the circuit has no poles"),
                Value::Array,
            )
        }
        Err(e) => Value::Error(circuit_fail(a, e)),
    }
}

fn margin(a: &Args<'_>) -> Value {
    let sc = tri!(stage_circuit(a));
    match circuit_margins(&sc.circuit, sc.amplifier) {
        Ok(m) => match (m.phase_margin_deg, m.crossover_hz) {
            (Some(pm), Some(fc)) => row(vec![Value::num(pm), tagged(fc, Some(Unit::Hertz))]),
            _ => Value::error(
                ErrorKind::Num,
                "STAGE.MARGIN: the loop gain never crosses 1, so there is no phase margin",
            ),
        },
        Err(e) => Value::Error(circuit_fail(a, e)),
    }
}

/// The stage of the gain, loop gain, output impedance and pole examples:
/// tests/reference/data/stage_sympy.json, "capacitive load with isolation".
macro_rules! load_stage {
    () => {
        "\"kind=non-inverting, a0=1e5, gbwHz=5M, ro=50, rf=1k, rg=1k, rl=10k, cl=10n, riso=20\""
    };
}
/// The stage of the input impedance example: "feedback capacitor".
macro_rules! cf_stage {
    () => {
        "\"kind=non-inverting, a0=200k, gbwHz=10M, polesHz=30M, cd=3p, ro=50, rf=10k, rg=1k, cf=4p7, rs=50, rl=2k\""
    };
}
const SOURCE: &str = "tests/reference/data/stage_sympy.json (sympy exact loop gain, mpmath closed-loop solve, numpy impedances, sympy poles) via tests/reference/sheet_catalog.py";

/// The stage area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "STAGE.GAIN",
        area: "stage",
        summary: "Closed-loop gain of a stage at a frequency: magnitude (the stage's gain unit) and phase",
        params: AT,
        repeats: false,
        result_unit: "V/V, V/A, A/V or A/A by kind; °",
        spill: &["magnitude of the gain", "phase, degrees (−180 … 180)"],
        example: Example {
            formula: concat!("=STAGE.GAIN(", load_stage!(), "; 1 MHz)"),
            expected: Expected::Numbers(&[1.0878513328420045, -114.75471303323161]),
            source: SOURCE,
            tolerance: &[1e-12],
        },
        eval: gain,
    },
    FunctionSpec {
        name: "STAGE.LOOPGAIN",
        area: "stage",
        summary: "Loop gain T of a stage at a frequency (the return ratio at its amplifier): magnitude in dB and phase",
        params: AT,
        repeats: false,
        result_unit: "dB; °",
        spill: &["|T|, dB", "phase of T, degrees (−180 … 180)"],
        example: Example {
            formula: concat!("=STAGE.LOOPGAIN(", load_stage!(), "; 1 MHz)"),
            expected: Expected::Numbers(&[-1.076670779404268, -115.4496079609703]),
            source: SOURCE,
            tolerance: &[1e-12],
        },
        eval: loop_gain_at,
    },
    FunctionSpec {
        name: "STAGE.ZIN",
        area: "stage",
        summary: "Input impedance a stage's source sees (after its Rs) at a frequency: magnitude and phase",
        params: AT,
        repeats: false,
        result_unit: "Ω; °",
        spill: &["|Zin|, Ω", "phase, degrees"],
        example: Example {
            formula: concat!("=STAGE.ZIN(", cf_stage!(), "; 1 MHz)"),
            expected: Expected::Numbers(&[79200.42577622039, -126.08713967427853]),
            source: SOURCE,
            tolerance: &[1e-9],
        },
        eval: z_in,
    },
    FunctionSpec {
        name: "STAGE.ZOUT",
        area: "stage",
        summary: "Output impedance of a stage at its output node at a frequency: magnitude and phase",
        params: AT,
        repeats: false,
        result_unit: "Ω; °",
        spill: &["|Zout|, Ω", "phase, degrees"],
        example: Example {
            formula: concat!("=STAGE.ZOUT(", load_stage!(), "; 1 MHz)"),
            expected: Expected::Numbers(&[18.805174104638777, -60.1016419489494]),
            source: SOURCE,
            tolerance: &[1e-9],
        },
        eval: z_out,
    },
    FunctionSpec {
        name: "STAGE.POLES",
        area: "stage",
        summary: "Closed-loop poles of a stage's circuit, one row each (sorted by natural frequency), in Hz: σ/2π, ω/2π, |s|/2π and ζ",
        params: ONLY,
        repeats: false,
        result_unit: "Hz; Hz; Hz; 1",
        spill: &["real part σ/2π, Hz", "imaginary part ω/2π, Hz", "natural frequency, Hz", "damping ratio ζ"],
        example: Example {
            formula: concat!("=STAGE.POLES(", load_stage!(), ")"),
            expected: Expected::Numbers(&[-471128.4461120501, -586137.8898345653, 752010.3979571506, 0.6264919306859038, -471128.4461120501, 586137.8898345653, 752010.3979571506, 0.6264919306859038]),
            source: SOURCE,
            tolerance: &[1e-10],
        },
        eval: poles,
    },
    FunctionSpec {
        name: "STAGE.MARGIN",
        area: "stage",
        summary: "Phase margin of a stage's loop (the worst over its unity-gain crossings, negative when the closed loop is unstable) and the crossover frequency",
        params: ONLY,
        repeats: false,
        result_unit: "°; Hz",
        spill: &["phase margin, degrees", "crossover frequency, Hz"],
        example: Example {
            formula: concat!("=STAGE.MARGIN(", load_stage!(), ")"),
            expected: Expected::Numbers(&[63.1792935032739, 912546.7970320007]),
            source: "tests/reference/data/stage_loop.json (python-control crossings polished on sympy's exact loop gain, tests/reference/stage_loop.py) via tests/reference/sheet_catalog.py",
            tolerance: &[1e-8, 1e-9],
        },
        eval: margin,
    },
];
