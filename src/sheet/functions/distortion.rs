//! Worksheet functions of distortion and slew limits (`src/distortion`), prefix `DISTORTION.`.
//!
//! The amplifier is the power series y = a1·x + a2·x² + a3·x³ of
//! [`crate::distortion::PowerSeries`], in a loop with a linear feedback factor β.
//! Each function converts its arguments, calls the core and converts the result;
//! formulas, units and sources are documented on the core functions.

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::distortion::{self as nl, AmplitudeAt, PowerSeries};
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use alloc::vec;
use alloc::vec::Vec;

const A1: Param = req("a1", "small-signal gain of the amplifier", "V/V", "not 0");
const A2: Param = req("a2", "second-order coefficient", "V/V²", "any finite");
const A3: Param = req("a3", "third-order coefficient", "V/V³", "any finite");
const BETA: Param = req("beta", "feedback factor", "V/V", "1 + a1·β > 0");
const SLEW: Param = req(
    "slew_rate",
    "slew rate in V/s (1 V/µs is 1e6)",
    "V/s",
    "> 0",
);

/// Core parameter names that the worksheet spells differently.
const NAMES: &[(&str, &str)] = &[("amplitude_at", "at"), ("frequency_hz", "frequency")];

fn core_err(a: &Args<'_>, e: crate::Error) -> Value {
    Value::Error(super::core_error(a.spec.name, e, NAMES))
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

fn series(a: &Args<'_>) -> Result<PowerSeries, CellError> {
    PowerSeries::new(a.number(0)?, a.number(1)?, a.number(2)?)
        .map_err(|e| super::core_error(a.spec.name, e, NAMES))
}

fn closed_series(a: &Args<'_>) -> Value {
    let open = tri!(series(a));
    match nl::closed_loop_series(&open, tri!(a.number(3))) {
        Ok(b) => row(vec![Value::num(b.a1), Value::num(b.a2), Value::num(b.a3)]),
        Err(e) => core_err(a, e),
    }
}

fn harmonics(a: &Args<'_>) -> Value {
    let open = tri!(series(a));
    let at = match tri!(a.text(5)).parse::<AmplitudeAt>() {
        Ok(at) => at,
        Err(e) => return core_err(a, e),
    };
    match nl::feedback_distortion(&open, tri!(a.number(3)), tri!(a.number(4)), at) {
        Ok(d) => row(vec![
            Value::num(d.open.hd2),
            Value::num(d.open.hd3),
            Value::num(d.closed.hd2),
            Value::num(d.closed.hd3),
        ]),
        Err(e) => core_err(a, e),
    }
}

fn full_power(a: &Args<'_>) -> Value {
    match nl::full_power_bandwidth(tri!(a.number(0)), tri!(a.number(1))) {
        Ok(f) => with_unit(f, Some(Unit::Hertz)),
        Err(e) => core_err(a, e),
    }
}

fn max_amplitude(a: &Args<'_>) -> Value {
    match nl::max_undistorted_amplitude(tri!(a.number(0)), tri!(a.number(1))) {
        Ok(v) => with_unit(v, Some(Unit::Volt)),
        Err(e) => core_err(a, e),
    }
}

fn slew_needed(a: &Args<'_>) -> Value {
    match nl::required_slew_rate(tri!(a.number(0)), tri!(a.number(1))) {
        Ok(x) => Value::num(x),
        Err(e) => core_err(a, e),
    }
}

/// The distortion area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "DISTORTION.SERIES",
        area: "distortion",
        summary: "Closed-loop power series b1, b2, b3 of an amplifier a1·x + a2·x² + a3·x³ under feedback β",
        params: &[A1, A2, A3, BETA],
        repeats: false,
        result_unit: "V/V; V/V²; V/V³",
        spill: &["b1 = a1/D", "b2 = a2/D³", "b3 = (a3·D − 2·a2²·β)/D⁵"],
        example: Example {
            formula: "=DISTORTION.SERIES(1000; 200; -50; 0.099)",
            expected: Expected::Numbers(&[10.0, 0.0002, -1.292e-6]),
            source: "series reversion of y = a1·u + a2·u² + a3·u³, u = x − β·y, D = 100 (closed form; tests/reference/data/distortion_series.json checks it symbolically; tests/reference/sheet_catalog.py)",
            tolerance: &[],
        },
        eval: closed_series,
    },
    FunctionSpec {
        name: "DISTORTION.HD",
        area: "distortion",
        summary: "Second and third harmonic distortion without and with feedback at one amplitude (fractions)",
        params: &[
            A1,
            A2,
            A3,
            BETA,
            req("amplitude", "peak amplitude, at the input or the output", "V", "> 0"),
            req("at", "where the amplitude is quoted: \"input\" or \"output\"", "text", "input, output"),
        ],
        repeats: false,
        result_unit: "1",
        spill: &["HD2 open loop", "HD3 open loop", "HD2 closed loop", "HD3 closed loop"],
        example: Example {
            formula: "=DISTORTION.HD(1000; 200; -50; 0.099; 1 V; \"output\")",
            expected: Expected::Numbers(&[
                0.0001,
                1.25e-8,
                1e-6,
                3.23e-10,
            ]),
            source: "HD2 = |a2|·X/(2|a1|), HD3 = |a3|·X²/(4|a1|) with X = Y/|a1|, of the open and the closed-loop series (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[],
        },
        eval: harmonics,
    },
    FunctionSpec {
        name: "DISTORTION.FPBW",
        area: "distortion",
        summary: "Full-power bandwidth SR/(2π·V_peak): the highest frequency a sine of that peak passes without slewing",
        params: &[SLEW, req("v_peak", "rated peak output", "V", "> 0")],
        repeats: false,
        result_unit: "Hz",
        spill: &[],
        example: Example {
            formula: "=DISTORTION.FPBW(0.5e6; 10 V)",
            expected: Expected::Numbers(&[7957.7471545947665]),
            source: "0.5 V/µs / (2π·10 V) = 7.958 kHz (closed form)",
            tolerance: &[],
        },
        eval: full_power,
    },
    FunctionSpec {
        name: "DISTORTION.MAXAMP",
        area: "distortion",
        summary: "Largest peak amplitude a sine at a frequency has before it slews: SR/(2π·f)",
        params: &[SLEW, req("frequency", "signal frequency", "Hz", "> 0")],
        repeats: false,
        result_unit: "V",
        spill: &[],
        example: Example {
            formula: "=DISTORTION.MAXAMP(13e6; 100 kHz)",
            expected: Expected::Numbers(&[20.690142601946395]),
            source: "13 V/µs / (2π·100 kHz) = 20.69 V (closed form)",
            tolerance: &[],
        },
        eval: max_amplitude,
    },
    FunctionSpec {
        name: "DISTORTION.SLEWRATE",
        area: "distortion",
        summary: "Slew rate a sine of a peak amplitude at a frequency needs: 2π·f·V_peak",
        params: &[req("v_peak", "peak amplitude", "V", "> 0"), req("frequency", "signal frequency", "Hz", "> 0")],
        repeats: false,
        result_unit: "V/s",
        spill: &[],
        example: Example {
            formula: "=DISTORTION.SLEWRATE(10 V; 20 kHz)",
            expected: Expected::Numbers(&[1256637.0614359174]),
            source: "2π·20 kHz·10 V = 1.2566 V/µs (closed form)",
            tolerance: &[],
        },
        eval: slew_needed,
    },
];
