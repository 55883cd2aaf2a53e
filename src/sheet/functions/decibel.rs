//! Decibel conversions for voltage (field) and power ratios:
//! dB = 20·log10|ratio| for voltage or current ratios, 10·log10(ratio) for power
//! ratios, and their inverses. Source: IEC 60027-3 level conventions, in every
//! text on the decibel (from memory).

use super::{req, tri, Args, Example, Expected, FunctionSpec};
use crate::sheet::errors::ErrorKind;
use crate::sheet::value::{Unit, Value};

fn tagged(x: f64, unit: Option<Unit>) -> Value {
    match Value::num(x) {
        Value::Number(v, _) => Value::Number(v, unit),
        other => other,
    }
}

fn voltage(a: &Args<'_>) -> Value {
    let r = tri!(a.number(0));
    if r == 0.0 {
        return Value::error(ErrorKind::Num, "DB.VOLTAGE: ratio: must not be zero");
    }
    tagged(20.0 * libm::log10(libm::fabs(r)), Some(Unit::Decibel))
}

fn power(a: &Args<'_>) -> Value {
    let r = tri!(a.number(0));
    if r <= 0.0 {
        return Value::error(ErrorKind::Num, "DB.POWER: ratio: must be greater than zero");
    }
    tagged(10.0 * libm::log10(r), Some(Unit::Decibel))
}

fn voltage_ratio(a: &Args<'_>) -> Value {
    let db = tri!(a.number(0));
    Value::num(libm::pow(10.0, db / 20.0))
}

fn power_ratio(a: &Args<'_>) -> Value {
    let db = tri!(a.number(0));
    Value::num(libm::pow(10.0, db / 10.0))
}

/// The decibel area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "DB.VOLTAGE",
        area: "decibel",
        summary: "A voltage or current ratio in dB: 20·log10|ratio| (an inverting gain counts by its size)",
        params: &[req("ratio", "voltage or current ratio", "1", "not 0")],
        repeats: false,
        result_unit: "dB",
        spill: &[],
        example: Example { formula: "=DB.VOLTAGE(10)", expected: Expected::Numbers(&[20.0]), source: "20·log10(10) = 20", tolerance: &[] },
        eval: voltage,
    },
    FunctionSpec {
        name: "DB.POWER",
        area: "decibel",
        summary: "A power ratio in dB: 10·log10(ratio)",
        params: &[req("ratio", "power ratio", "1", "> 0")],
        repeats: false,
        result_unit: "dB",
        spill: &[],
        example: Example { formula: "=DB.POWER(100)", expected: Expected::Numbers(&[20.0]), source: "10·log10(100) = 20", tolerance: &[] },
        eval: power,
    },
    FunctionSpec {
        name: "DB.VOLTAGERATIO",
        area: "decibel",
        summary: "The voltage or current ratio of a level in dB: 10^(dB/20)",
        params: &[req("level", "level", "dB", "any; above about 6000 dB overflows")],
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example { formula: "=DB.VOLTAGERATIO(40dB)", expected: Expected::Numbers(&[100.0]), source: "10^(40/20) = 100", tolerance: &[] },
        eval: voltage_ratio,
    },
    FunctionSpec {
        name: "DB.POWERRATIO",
        area: "decibel",
        summary: "The power ratio of a level in dB: 10^(dB/10)",
        params: &[req("level", "level", "dB", "any; above about 3000 dB overflows")],
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example { formula: "=DB.POWERRATIO(30 dB)", expected: Expected::Numbers(&[1000.0]), source: "10^(30/10) = 1000", tolerance: &[] },
        eval: power_ratio,
    },
];
