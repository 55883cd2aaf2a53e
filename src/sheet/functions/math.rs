//! The common numeric functions: SUM MIN MAX AVERAGE ABS SQRT EXP LN LOG10 PI
//! ROUND, with OpenFormula's meaning (ODF 1.2 part 2, §6.16 "Mathematical
//! Functions" and §6.18 "Statistical Functions", from memory).

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::sheet::errors::ErrorKind;
use crate::sheet::value::Value;

const VALUES: &[Param] = &[Param {
    name: "values",
    summary: "numbers, cells or ranges",
    unit: "any",
    optional: false,
    default: None,
    range: "any",
}];
const X: &[Param] = &[req("x", "a number", "any", "any")];

fn sum(a: &Args<'_>) -> Value {
    let xs = tri!(a.numbers());
    Value::num(xs.iter().sum())
}

fn min(a: &Args<'_>) -> Value {
    let xs = tri!(a.numbers());
    // OpenFormula: MIN of no numbers is 0.
    Value::num(xs.iter().copied().reduce(f64::min).unwrap_or(0.0))
}

fn max(a: &Args<'_>) -> Value {
    let xs = tri!(a.numbers());
    Value::num(xs.iter().copied().reduce(f64::max).unwrap_or(0.0))
}

fn average(a: &Args<'_>) -> Value {
    let xs = tri!(a.numbers());
    if xs.is_empty() {
        return Value::error(ErrorKind::DivZero, "AVERAGE: no numbers to average");
    }
    // Mean of the values divided first, so large values do not overflow the sum.
    let n = xs.len() as f64;
    Value::num(xs.iter().map(|x| x / n).sum())
}

fn abs(a: &Args<'_>) -> Value {
    Value::num(libm::fabs(tri!(a.number(0))))
}

fn sqrt(a: &Args<'_>) -> Value {
    let x = tri!(a.number(0));
    if x < 0.0 {
        return Value::error(ErrorKind::Num, "SQRT: x: must be zero or greater");
    }
    Value::num(crate::float::sqrt(x))
}

fn exp(a: &Args<'_>) -> Value {
    Value::num(libm::exp(tri!(a.number(0))))
}

fn ln(a: &Args<'_>) -> Value {
    let x = tri!(a.number(0));
    if x <= 0.0 {
        return Value::error(ErrorKind::Num, "LN: x: must be greater than zero");
    }
    Value::num(libm::log(x))
}

fn log10(a: &Args<'_>) -> Value {
    let x = tri!(a.number(0));
    if x <= 0.0 {
        return Value::error(ErrorKind::Num, "LOG10: x: must be greater than zero");
    }
    Value::num(libm::log10(x))
}

fn pi(_: &Args<'_>) -> Value {
    Value::num(core::f64::consts::PI)
}

/// Round half away from zero at `digits` decimals. The product x·10^digits is
/// rounded up when it lies within a few ulps of the half-way point, so that
/// decimal inputs such as 2.675 (stored as 2.67499999…) round as written.
pub fn round_half_away(x: f64, digits: i32) -> f64 {
    let f = libm::pow(10.0, f64::from(digits));
    let y = x * f;
    if !y.is_finite() {
        return x;
    }
    let t = crate::float::trunc(y);
    let frac = libm::fabs(y - t);
    let r = if frac + 8.0 * f64::EPSILON * libm::fabs(y) >= 0.5 {
        t + libm::copysign(1.0, y)
    } else {
        t
    };
    r / f
}

fn round(a: &Args<'_>) -> Value {
    let x = tri!(a.number(0));
    let d = crate::float::trunc(tri!(a.number(1)));
    if !(-15.0..=15.0).contains(&d) {
        return Value::error(ErrorKind::Num, "ROUND: digits: must be between -15 and 15");
    }
    // d is an integer in −15…15, so the cast is exact.
    Value::num(round_half_away(x, d as i32))
}

/// The math area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "SUM",
        area: "math",
        summary: "Sum of the numbers; text and empty cells inside ranges are skipped",
        params: VALUES,
        repeats: true,
        result_unit: "as the values",
        spill: &[],
        example: Example {
            formula: "=SUM(1; 2.5; 4k7)",
            expected: Expected::Numbers(&[4703.5]),
            source: "1 + 2.5 + 4700",
            tolerance: &[],
        },
        eval: sum,
    },
    FunctionSpec {
        name: "MIN",
        area: "math",
        summary: "Smallest of the numbers (0 when there are none)",
        params: VALUES,
        repeats: true,
        result_unit: "as the values",
        spill: &[],
        example: Example {
            formula: "=MIN(3; -2; 7)",
            expected: Expected::Numbers(&[-2.0]),
            source: "by inspection",
            tolerance: &[],
        },
        eval: min,
    },
    FunctionSpec {
        name: "MAX",
        area: "math",
        summary: "Largest of the numbers (0 when there are none)",
        params: VALUES,
        repeats: true,
        result_unit: "as the values",
        spill: &[],
        example: Example {
            formula: "=MAX(3; -2; 7)",
            expected: Expected::Numbers(&[7.0]),
            source: "by inspection",
            tolerance: &[],
        },
        eval: max,
    },
    FunctionSpec {
        name: "AVERAGE",
        area: "math",
        summary: "Arithmetic mean of the numbers; #DIV/0! when there are none",
        params: VALUES,
        repeats: true,
        result_unit: "as the values",
        spill: &[],
        example: Example {
            formula: "=AVERAGE(1; 2; 6)",
            expected: Expected::Numbers(&[3.0]),
            source: "(1 + 2 + 6)/3",
            tolerance: &[],
        },
        eval: average,
    },
    FunctionSpec {
        name: "ABS",
        area: "math",
        summary: "Absolute value",
        params: X,
        repeats: false,
        result_unit: "as x",
        spill: &[],
        example: Example {
            formula: "=ABS(-2.5)",
            expected: Expected::Numbers(&[2.5]),
            source: "by definition",
            tolerance: &[],
        },
        eval: abs,
    },
    FunctionSpec {
        name: "SQRT",
        area: "math",
        summary: "Square root",
        params: &[req("x", "a number", "any", ">= 0")],
        repeats: false,
        result_unit: "square root of x's unit",
        spill: &[],
        example: Example {
            formula: "=SQRT(2)",
            expected: Expected::Numbers(&[core::f64::consts::SQRT_2]),
            source: "√2 = 1.41421356…",
            tolerance: &[],
        },
        eval: sqrt,
    },
    FunctionSpec {
        name: "EXP",
        area: "math",
        summary: "e raised to x",
        params: &[req(
            "x",
            "exponent",
            "1",
            "any; overflow above about 709.78 gives #NUM!",
        )],
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=EXP(1)",
            expected: Expected::Numbers(&[core::f64::consts::E]),
            source: "e = 2.71828182…",
            tolerance: &[],
        },
        eval: exp,
    },
    FunctionSpec {
        name: "LN",
        area: "math",
        summary: "Natural logarithm",
        params: &[req("x", "a number", "1", "> 0")],
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=LN(10)",
            expected: Expected::Numbers(&[core::f64::consts::LN_10]),
            source: "ln 10 = 2.30258509…",
            tolerance: &[],
        },
        eval: ln,
    },
    FunctionSpec {
        name: "LOG10",
        area: "math",
        summary: "Base-10 logarithm",
        params: &[req("x", "a number", "1", "> 0")],
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=LOG10(1k)",
            expected: Expected::Numbers(&[3.0]),
            source: "log10(1000) = 3",
            tolerance: &[],
        },
        eval: log10,
    },
    FunctionSpec {
        name: "PI",
        area: "math",
        summary: "The number π",
        params: &[],
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=PI()",
            expected: Expected::Numbers(&[core::f64::consts::PI]),
            source: "π = 3.14159265…",
            tolerance: &[],
        },
        eval: pi,
    },
    FunctionSpec {
        name: "ROUND",
        area: "math",
        summary:
            "Round half away from zero to a number of decimals (negative: to tens, hundreds, …)",
        params: &[
            req("x", "the number to round", "any", "any"),
            Param {
                name: "digits",
                summary: "decimals to keep",
                unit: "1",
                optional: true,
                default: Some(0.0),
                range: "-15 to 15, truncated to an integer",
            },
        ],
        repeats: false,
        result_unit: "as x",
        spill: &[],
        example: Example {
            formula: "=ROUND(2.675; 2)",
            expected: Expected::Numbers(&[2.68]),
            source: "OpenFormula ROUND rounds half away from zero (§6.16, from memory)",
            tolerance: &[],
        },
        eval: round,
    },
];

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounding_half_away_from_zero() {
        // OpenFormula §6.16 ROUND (from memory): halves round away from zero.
        assert_eq!(round_half_away(2.5, 0), 3.0);
        assert_eq!(round_half_away(-2.5, 0), -3.0);
        assert_eq!(round_half_away(2.675, 2), 2.68);
        assert_eq!(round_half_away(1.005, 2), 1.01);
        assert_eq!(round_half_away(2.4999, 0), 2.0);
        assert_eq!(round_half_away(1234.5, -2), 1200.0);
        assert_eq!(round_half_away(1e300, 15), 1e300);
    }
}
