//! Worksheet functions of the loaded feedback circuit (`src/circuit`), prefix `CIRCUIT.`: the two-port method beside the exact (nodal)
//! solution of a template stage at DC.
//!
//! A stage is written `topology; gain; ri; ro; rf; rg; rs; rl`: the topology name
//! (as for `FEEDBACK.` functions), the basic amplifier's open-circuit gain in the
//! topology's unit with the sign that gives negative feedback, its input and
//! output resistance, the feedback network's return resistor `rf` and foot
//! resistor `rg`, the source and the load resistance — the template of
//! [`crate::circuit::templates`] without capacitors. Each function converts its
//! arguments, calls the core and converts the result.

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::circuit::templates::{AmplifierModel, FeedbackNetwork, StageSpec};
use crate::circuit::twoport::{analyze, Compared, TwoPortAnalysis};
use crate::feedback::Topology;
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use alloc::string::ToString;
use alloc::vec;
use alloc::vec::Vec;

const STAGE: &[Param] = &[
    req(
        "topology",
        "topology name, e.g. \"series-shunt\"",
        "text",
        "series-shunt, shunt-series, series-series, shunt-shunt or their voltage-/current- names",
    ),
    req(
        "gain",
        "open-circuit gain of the basic amplifier, signed as it acts",
        "V/V, V/A, A/V or A/A by topology",
        "not 0; see the template table",
    ),
    req("ri", "amplifier input resistance", "Ω", "> 0"),
    req("ro", "amplifier output resistance", "Ω", "> 0"),
    req(
        "rf",
        "feedback resistor returning the signal to the input",
        "Ω",
        "> 0 (0 allowed for series-series)",
    ),
    req(
        "rg",
        "feedback network foot or current-sense resistor",
        "Ω",
        "> 0 (must be 0 for shunt-shunt)",
    ),
    req("rs", "source resistance", "Ω", "> 0"),
    req("rl", "load resistance", "Ω", "> 0"),
];

/// The DC two-port analysis of the stage in arguments 0…7.
fn analysis(a: &Args<'_>) -> Result<TwoPortAnalysis, CellError> {
    let name = a.text(0)?;
    let topology = name
        .parse::<Topology>()
        .map_err(|e| CellError::from_core(a.spec.name, e))?;
    let spec = StageSpec {
        topology,
        amplifier: AmplifierModel {
            ri: a.number(2)?,
            ro: a.number(3)?,
            gain: a.number(1)?,
            ci: 0.0,
            co: 0.0,
        },
        network: FeedbackNetwork {
            rf: a.number(4)?,
            rg: a.number(5)?,
            cf: 0.0,
        },
        rs: a.number(6)?,
        rl: a.number(7)?,
    };
    analyze(&spec, 0.0).map_err(|e| {
        // The circuit error names the element at fault; keep it in the sentence.
        let mut detail = alloc::string::String::from(a.spec.name);
        detail.push_str(": ");
        detail.push_str(&e.to_string());
        let kind = match e.error {
            crate::Error::UnknownName { .. } => ErrorKind::Value,
            _ => ErrorKind::Num,
        };
        CellError::new(kind, detail)
    })
}

fn with_unit(x: f64, unit: Option<Unit>) -> Value {
    match Value::num(x) {
        Value::Number(v, _) => Value::Number(v, unit),
        other => other,
    }
}

/// Exact, two-port and relative error of a DC result (real at DC).
fn compared(c: &Compared, unit: Option<Unit>) -> Value {
    let items: Vec<Value> = vec![
        with_unit(c.exact.re, unit),
        with_unit(c.two_port.re, unit),
        Value::num(c.relative_error),
    ];
    Array::row(items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

fn gain(a: &Args<'_>) -> Value {
    compared(&tri!(analysis(a)).af, None)
}

fn r_in(a: &Args<'_>) -> Value {
    compared(&tri!(analysis(a)).rin, Some(Unit::Ohm))
}

fn r_out(a: &Args<'_>) -> Value {
    compared(&tri!(analysis(a)).rout, Some(Unit::Ohm))
}

fn ideal(a: &Args<'_>) -> Value {
    let r = tri!(analysis(a));
    let items = vec![Value::num(r.ideal_af.re), Value::num(r.ideal_af_error)];
    Array::row(items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

const COMPARED: &[&str] = &[
    "exact (nodal solution)",
    "two-port method",
    "relative error |two-port − exact|/|exact|",
];
const WORKED: &str = "series-shunt stage a = 10⁴, Ri = 100 kΩ, Ro = 1 kΩ, Rf = 1 MΩ, Rg = 1 kΩ, Rs = 10 kΩ, RL = 2 kΩ: tests/reference/data/circuit_sympy.json (sympy closed forms from Kirchhoff's current law, worked non-inverting case)";

/// The circuit area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "CIRCUIT.GAIN",
        area: "circuit",
        summary: "Closed-loop gain of a loaded template stage at DC: exact, by the two-port method, and their difference",
        params: STAGE,
        repeats: false,
        result_unit: "the topology's gain unit; the topology's gain unit; 1",
        spill: COMPARED,
        example: Example {
            formula: "=CIRCUIT.GAIN(\"series-shunt\"; 10k; 100k; 1k; 1M; 1k; 10k; 2k)",
            expected: Expected::Numbers(&[857.9196015344847, 857.9196014119784, 1.4279464102746882e-10]),
            source: WORKED,
            tolerance: &[1e-10, 1e-10, 1e-5],
        },
        eval: gain,
    },
    FunctionSpec {
        name: "CIRCUIT.RIN",
        area: "circuit",
        summary: "Input resistance the source sees (after Rs) at DC: exact, by the two-port method, and their difference",
        params: STAGE,
        repeats: false,
        result_unit: "Ω; Ω; 1",
        spill: COMPARED,
        example: Example {
            formula: "=CIRCUIT.RIN(\"series-shunt\"; 10k; 100k; 1k; 1M; 1k; 10k; 2k)",
            expected: Expected::Numbers(&[766556.4059900166, 766556.4053251242, 8.673758184346108e-10]),
            source: WORKED,
            tolerance: &[1e-10, 1e-10, 1e-5],
        },
        eval: r_in,
    },
    FunctionSpec {
        name: "CIRCUIT.ROUT",
        area: "circuit",
        summary: "Output resistance the load sees at DC: exact, by the two-port method, and their difference",
        params: STAGE,
        repeats: false,
        result_unit: "Ω; Ω; 1",
        spill: COMPARED,
        example: Example {
            formula: "=CIRCUIT.ROUT(\"series-shunt\"; 10k; 100k; 1k; 1M; 1k; 10k; 2k)",
            expected: Expected::Numbers(&[99.9891110769145, 99.9891111668059, 8.990119026093292e-10]),
            source: WORKED,
            tolerance: &[1e-10, 1e-10, 1e-5],
        },
        eval: r_out,
    },
    FunctionSpec {
        name: "CIRCUIT.IDEAL",
        area: "circuit",
        summary: "Ideal closed-loop gain 1/β of the stage's feedback network, and how far the exact gain is from it",
        params: STAGE,
        repeats: false,
        result_unit: "the topology's gain unit; 1",
        spill: &["ideal gain 1/β", "relative error |1/β − Af|/|Af|"],
        example: Example {
            formula: "=CIRCUIT.IDEAL(\"series-shunt\"; 10k; 100k; 1k; 1M; 1k; 10k; 2k)",
            expected: Expected::Numbers(&[1001.0, 0.16677599883438965]),
            source: "1/β = 1 + Rf/Rg = 1001; Af from tests/reference/data/circuit_sympy.json (worked non-inverting case)",
            tolerance: &[1e-12, 1e-10],
        },
        eval: ideal,
    },
];
