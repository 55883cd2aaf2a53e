//! Worksheet functions of the feedback relations (`src/feedback`).
//! Each one converts its arguments, calls the core function and converts the
//! result; the formulas, units and sources are documented on the core functions.

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::feedback::{self as fb, FeedbackSense, Topology};
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use alloc::string::String;
use alloc::vec;
use num_complex::Complex64;

const A: Param = req(
    "a",
    "open-loop gain",
    "V/V, A/A, A/V or V/A by topology",
    "not 0",
);
const BETA: Param = req(
    "beta",
    "feedback factor",
    "reciprocal of a's unit",
    "any finite",
);
const A_BETA: &[Param] = &[A, BETA];
const TOPOLOGY: Param = req(
    "topology",
    "topology name, e.g. \"series-shunt\" or \"voltage-series\"",
    "text",
    "series-shunt, shunt-series, series-series, shunt-shunt or their voltage-/current- names",
);

fn topology(a: &Args<'_>, i: usize) -> Result<Topology, CellError> {
    let name = a.text(i)?;
    name.parse::<Topology>()
        .map_err(|e| CellError::from_core(a.spec.name, e))
}

fn core_err(a: &Args<'_>, e: crate::Error) -> Value {
    Value::Error(CellError::from_core(a.spec.name, e))
}

fn ohms(x: f64) -> Value {
    match Value::num(x) {
        Value::Number(v, _) => Value::Number(v, Some(Unit::Ohm)),
        other => other,
    }
}

fn row(items: alloc::vec::Vec<Value>) -> Value {
    Array::row(items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

fn gain(a: &Args<'_>) -> Value {
    a.core(fb::closed_loop_gain(tri!(a.number(0)), tri!(a.number(1))))
}

fn loop_gain(a: &Args<'_>) -> Value {
    a.core(fb::loop_gain(tri!(a.number(0)), tri!(a.number(1))))
}

fn amount(a: &Args<'_>) -> Value {
    a.core(fb::feedback_amount(tri!(a.number(0)), tri!(a.number(1))))
}

fn amount_db(a: &Args<'_>) -> Value {
    match fb::feedback_amount_db(tri!(a.number(0)), tri!(a.number(1))) {
        Ok(x) => Value::Number(x, Some(Unit::Decibel)),
        Err(e) => core_err(a, e),
    }
}

fn sensitivity(a: &Args<'_>) -> Value {
    a.core(fb::gain_sensitivity(tri!(a.number(0)), tri!(a.number(1))))
}

fn sense(a: &Args<'_>) -> Value {
    let (x, beta) = (tri!(a.number(0)), tri!(a.number(1)));
    let t = match fb::loop_gain(x, beta) {
        Ok(t) => t,
        Err(e) => return core_err(a, e),
    };
    let word = match fb::real_feedback_sense(t) {
        FeedbackSense::Negative => "negative",
        FeedbackSense::Neutral => "neutral",
        FeedbackSense::Positive => "positive",
        FeedbackSense::Oscillation => "oscillation",
        FeedbackSense::Latching => "latching",
    };
    Value::Text(String::from(word))
}

fn beta(a: &Args<'_>) -> Value {
    a.core(fb::beta_for_gain(tri!(a.number(0)), tri!(a.number(1))))
}

fn min_gain(a: &Args<'_>) -> Value {
    a.core(fb::min_open_loop_gain(tri!(a.number(0)), tri!(a.number(1))))
}

fn ceiling(a: &Args<'_>) -> Value {
    match fb::max_closed_loop_gain(tri!(a.number(0)), tri!(a.number(1))) {
        Ok(c) => row(vec![Value::num(c.closed_loop_gain), Value::num(c.beta)]),
        Err(e) => core_err(a, e),
    }
}

fn spread(a: &Args<'_>) -> Value {
    let r = fb::gain_spread(
        tri!(a.number(0)),
        tri!(a.number(1)),
        tri!(a.number(2)),
        tri!(a.number(3)),
    );
    match r {
        Ok(s) => row(vec![
            Value::num(s.at_min),
            Value::num(s.at_typ),
            Value::num(s.at_max),
            Value::num(s.low_percent),
            Value::num(s.high_percent),
            Value::num(s.spread_percent),
            Value::num(s.spread_ppm),
            Value::num(s.sensitivity),
            Value::Bool(s.positive_feedback),
        ]),
        Err(e) => core_err(a, e),
    }
}

fn z_in(a: &Args<'_>) -> Value {
    let t = tri!(topology(a, 0));
    match fb::resistances_with_feedback(
        t,
        tri!(a.number(1)),
        0.0,
        tri!(a.number(2)),
        tri!(a.number(3)),
    ) {
        Ok((rin, _)) => ohms(rin),
        Err(e) => core_err(a, e),
    }
}

fn z_out(a: &Args<'_>) -> Value {
    let t = tri!(topology(a, 0));
    match fb::resistances_with_feedback(
        t,
        0.0,
        tri!(a.number(1)),
        tri!(a.number(2)),
        tri!(a.number(3)),
    ) {
        Ok((_, rout)) => ohms(rout),
        Err(e) => core_err(a, e),
    }
}

fn impedances(a: &Args<'_>) -> Value {
    let t = tri!(topology(a, 0));
    let c = |i: usize| -> Result<Complex64, CellError> {
        Ok(Complex64::new(a.number(i)?, a.number(i + 1)?))
    };
    let (zi, zo, x, b) = (tri!(c(1)), tri!(c(3)), tri!(c(5)), tri!(c(7)));
    match fb::impedances_with_feedback(t, zi, zo, x, b) {
        Ok(z) => row(vec![
            ohms(z.input.re),
            ohms(z.input.im),
            ohms(z.output.re),
            ohms(z.output.im),
        ]),
        Err(e) => core_err(a, e),
    }
}

fn phasor(a: &Args<'_>) -> Value {
    let x = Complex64::new(tri!(a.number(0)), tri!(a.number(1)));
    let b = Complex64::new(tri!(a.number(2)), tri!(a.number(3)));
    match fb::loop_phasors(x, b) {
        Ok(p) => row(vec![
            Value::num(p.closed_loop_gain.norm()),
            Value::num(
                crate::float::atan2(p.closed_loop_gain.im, p.closed_loop_gain.re).to_degrees(),
            ),
            Value::num(p.loop_gain.norm()),
            Value::num(crate::float::atan2(p.loop_gain.im, p.loop_gain.re).to_degrees()),
            Value::Number(p.feedback_amount_db, Some(Unit::Decibel)),
        ]),
        Err(e) => core_err(a, e),
    }
}

fn summary(a: &Args<'_>) -> Value {
    let t = tri!(topology(a, 0));
    match fb::summarize(t, tri!(a.number(1)), tri!(a.number(2))) {
        Ok(s) => {
            let na = || {
                Value::error(
                    ErrorKind::NotAvailable,
                    "FEEDBACK.SUMMARY: no ideal gain without feedback (beta = 0)",
                )
            };
            row(vec![
                Value::num(s.closed_loop_gain),
                Value::num(s.loop_gain),
                Value::num(s.feedback_amount),
                Value::Number(s.feedback_amount_db, Some(Unit::Decibel)),
                Value::num(s.sensitivity),
                s.ideal_gain.map_or_else(na, Value::num),
                s.gain_error.map_or_else(na, Value::num),
            ])
        }
        Err(e) => core_err(a, e),
    }
}

fn gain_unit(a: &Args<'_>) -> Value {
    Value::Text(String::from(tri!(topology(a, 0)).gain_unit()))
}

fn beta_unit(a: &Args<'_>) -> Value {
    Value::Text(String::from(tri!(topology(a, 0)).beta_unit()))
}

/// The feedback area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "FEEDBACK.GAIN",
        area: "feedback",
        summary: "Closed-loop gain Af = A/(1 + A·β)",
        params: A_BETA,
        repeats: false,
        result_unit: "as a",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.GAIN(100k; 0.01)",
            expected: Expected::Numbers(&[99.900_099_900_099_9]),
            source: "100000/(1 + 1000) = 99.9000999…",
            tolerance: &[],
        },
        eval: gain,
    },
    FunctionSpec {
        name: "FEEDBACK.LOOPGAIN",
        area: "feedback",
        summary: "Loop gain T = A·β",
        params: A_BETA,
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example { formula: "=FEEDBACK.LOOPGAIN(100k; 0.01)", expected: Expected::Numbers(&[1000.0]), source: "100000·0.01", tolerance: &[] },
        eval: loop_gain,
    },
    FunctionSpec {
        name: "FEEDBACK.AMOUNT",
        area: "feedback",
        summary: "Amount of feedback (return difference) D = 1 + A·β",
        params: A_BETA,
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example { formula: "=FEEDBACK.AMOUNT(100k; 0.01)", expected: Expected::Numbers(&[1001.0]), source: "1 + 1000", tolerance: &[] },
        eval: amount,
    },
    FunctionSpec {
        name: "FEEDBACK.AMOUNTDB",
        area: "feedback",
        summary: "Amount of feedback in dB, 20·log10|1 + A·β|",
        params: A_BETA,
        repeats: false,
        result_unit: "dB",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.AMOUNTDB(100k; 0.01)",
            expected: Expected::Numbers(&[60.008_681_549_586_38]),
            source: "20·log10(1001) = 60.00868…",
            tolerance: &[],
        },
        eval: amount_db,
    },
    FunctionSpec {
        name: "FEEDBACK.SENSITIVITY",
        area: "feedback",
        summary: "Gain sensitivity (dAf/Af)/(dA/A) = 1/(1 + A·β)",
        params: A_BETA,
        repeats: false,
        result_unit: "1",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.SENSITIVITY(100k; 0.01)",
            expected: Expected::Numbers(&[0.000_999_000_999_000_999]),
            source: "1/1001",
            tolerance: &[],
        },
        eval: sensitivity,
    },
    FunctionSpec {
        name: "FEEDBACK.SENSE",
        area: "feedback",
        summary: "The loop's sense from D = 1 + A·β: negative (D > 1), neutral (D = 1), positive (0 < D < 1), oscillation (D = 0) or latching (D < 0, loop gain below −1)",
        params: A_BETA,
        repeats: false,
        result_unit: "text",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.SENSE(100; -0.005)",
            expected: Expected::Text("positive"),
            source: "T = -0.5, so D = 0.5, between 0 and 1",
            tolerance: &[],
        },
        eval: sense,
    },
    FunctionSpec {
        name: "FEEDBACK.BETA",
        area: "feedback",
        summary: "Feedback factor for a target closed-loop gain: β = 1/Af − 1/A",
        params: &[A, req("target_gain", "closed-loop gain wanted", "as a", "same sign as a, |target| <= |a|, not 0")],
        repeats: false,
        result_unit: "reciprocal of a's unit",
        spill: &[],
        example: Example { formula: "=FEEDBACK.BETA(100k; 100)", expected: Expected::Numbers(&[0.00999]), source: "1/100 − 1/100000", tolerance: &[] },
        eval: beta,
    },
    FunctionSpec {
        name: "FEEDBACK.MINGAIN",
        area: "feedback",
        summary: "Least open-loop gain keeping the gain error against 1/β within a fraction: A = (1 − ε)/(ε·β)",
        params: &[BETA, req("gain_error", "allowed gain error as a fraction (0.001 for 0.1 %)", "1", "0 < ε < 1")],
        repeats: false,
        result_unit: "reciprocal of beta's unit",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.MINGAIN(0.01; 0.1%)",
            expected: Expected::Numbers(&[99_899.999_999_999_99]),
            source: "(1 − 0.001)/(0.001·0.01) = 99900 (to rounding)",
            tolerance: &[],
        },
        eval: min_gain,
    },
    FunctionSpec {
        name: "FEEDBACK.CEILING",
        area: "feedback",
        summary: "Largest closed-loop gain that still has a required amount of feedback D, and the β giving it",
        params: &[A, req("feedback_amount", "required D = 1 + A·β", "1", ">= 1")],
        repeats: false,
        result_unit: "as a; reciprocal of a's unit",
        spill: &["closed-loop gain A/D", "beta (D − 1)/A"],
        example: Example {
            formula: "=FEEDBACK.CEILING(100k; 100)",
            expected: Expected::Numbers(&[1000.0, 0.00099]),
            source: "100000/100 and 99/100000",
            tolerance: &[],
        },
        eval: ceiling,
    },
    FunctionSpec {
        name: "FEEDBACK.SPREAD",
        area: "feedback",
        summary: "Closed-loop gain over an open-loop gain range (min, typ, max) and its spread",
        params: &[
            BETA,
            req("a_min", "smallest open-loop gain", "as a", "same sign as a_max, not 0"),
            req("a_typ", "typical open-loop gain", "as a", "a_min <= a_typ <= a_max"),
            req("a_max", "largest open-loop gain", "as a", "not 0"),
        ],
        repeats: false,
        result_unit: "as a; as a; as a; %; %; %; ppm; 1; TRUE/FALSE",
        spill: &[
            "Af at a_min",
            "Af at a_typ",
            "Af at a_max",
            "lowest Af relative to typical, %",
            "highest Af relative to typical, %",
            "spread, %",
            "spread, ppm",
            "sensitivity at a_typ",
            "positive feedback anywhere in the range",
        ],
        example: Example {
            formula: "=FEEDBACK.SPREAD(0.01; 50k; 100k; 200k)",
            expected: Expected::Numbers(&[
                99.800_399_201_596_8,
                99.900_099_900_099_9,
                99.950_024_987_506_25,
                -0.099_800_399_201_602_34,
                0.049_975_012_493_756_944,
                0.149_775_411_695_359_3,
                1_497.754_116_953_593,
                0.000_999_000_999_000_999,
                0.0,
            ]),
            source: "Af = A/(1 + A/100) at 50k, 100k, 200k; tests/reference/sheet_catalog.py (mpmath, 40 digits)",
            tolerance: &[],
        },
        eval: spread,
    },
    FunctionSpec {
        name: "FEEDBACK.ZIN",
        area: "feedback",
        summary: "Input resistance with feedback: multiplied by D for series mixing, divided for shunt mixing",
        params: &[TOPOLOGY, req("zi", "input resistance of the loaded open-loop circuit", "Ω", ">= 0"), A, BETA],
        repeats: false,
        result_unit: "Ω",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.ZIN(\"series-shunt\"; 1MΩ; 100k; 0.01)",
            expected: Expected::Numbers(&[1.001e9]),
            source: "1 MΩ · 1001",
            tolerance: &[],
        },
        eval: z_in,
    },
    FunctionSpec {
        name: "FEEDBACK.ZOUT",
        area: "feedback",
        summary: "Output resistance with feedback: divided by D for voltage sampling, multiplied for current sampling",
        params: &[TOPOLOGY, req("zo", "output resistance of the loaded open-loop circuit", "Ω", ">= 0"), A, BETA],
        repeats: false,
        result_unit: "Ω",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.ZOUT(\"voltage-series\"; 75 ohm; 100k; 0.01)",
            expected: Expected::Numbers(&[0.074_925_074_925_074_93]),
            source: "75 Ω / 1001",
            tolerance: &[],
        },
        eval: z_out,
    },
    FunctionSpec {
        name: "FEEDBACK.IMPEDANCES",
        area: "feedback",
        summary: "Complex input and output impedance with feedback, for complex A and β at one frequency",
        params: &[
            TOPOLOGY,
            req("zi_re", "input resistance of the loaded open-loop circuit", "Ω", ">= 0"),
            req("zi_im", "input reactance", "Ω", "any finite"),
            req("zo_re", "output resistance of the loaded open-loop circuit", "Ω", ">= 0"),
            req("zo_im", "output reactance", "Ω", "any finite"),
            req("a_re", "real part of A", "as a", "A not 0"),
            req("a_im", "imaginary part of A", "as a", "any finite"),
            req("beta_re", "real part of β", "reciprocal of a's unit", "any finite"),
            req("beta_im", "imaginary part of β", "reciprocal of a's unit", "any finite"),
        ],
        repeats: false,
        result_unit: "Ω",
        spill: &["Re Zin", "Im Zin", "Re Zout", "Im Zout"],
        example: Example {
            formula: "=FEEDBACK.IMPEDANCES(\"series-series\"; 1k; -1k; 10; 0; 0; 10; 0.1; 0)",
            expected: Expected::Numbers(&[2000.0, 0.0, 10.0, 10.0]),
            source: "T = j, D = 1 + j: Zin = (1k − j1k)(1 + j) = 2 kΩ, Zout = 10(1 + j) Ω (hand calculation)",
            tolerance: &[],
        },
        eval: impedances,
    },
    FunctionSpec {
        name: "FEEDBACK.PHASOR",
        area: "feedback",
        summary: "Closed-loop gain, loop gain and amount of feedback for complex A and β",
        params: &[
            req("a_re", "real part of A", "as a", "A not 0"),
            req("a_im", "imaginary part of A", "as a", "any finite"),
            req("beta_re", "real part of β", "reciprocal of a's unit", "any finite"),
            req("beta_im", "imaginary part of β", "reciprocal of a's unit", "any finite"),
        ],
        repeats: false,
        result_unit: "as a; degrees; 1; degrees; dB",
        spill: &["|Af|", "phase of Af, degrees", "|T|", "phase of T, degrees", "|D| in dB"],
        example: Example {
            formula: "=FEEDBACK.PHASOR(0; 100; 0.01; 0)",
            expected: Expected::Numbers(&[70.710_678_118_654_76, 45.0, 1.0, 90.0, 3.010_299_956_639_812]),
            source: "T = j, D = 1 + j, Af = 100j/(1 + j) = 50 + 50j: |Af| = 50√2, 45°; |D| = √2 = 3.0103 dB",
            tolerance: &[],
        },
        eval: phasor,
    },
    FunctionSpec {
        name: "FEEDBACK.SUMMARY",
        area: "feedback",
        summary: "Every feedback relation of one stage at once",
        params: &[TOPOLOGY, A, BETA],
        repeats: false,
        result_unit: "as a; 1; 1; dB; 1; as a; 1",
        spill: &[
            "closed-loop gain",
            "loop gain",
            "amount of feedback D",
            "D in dB",
            "sensitivity 1/D",
            "ideal gain 1/β (#N/A when β = 0)",
            "gain error Af·β − 1 (#N/A when β = 0)",
        ],
        example: Example {
            formula: "=FEEDBACK.SUMMARY(\"series-shunt\"; 100k; 0.01)",
            expected: Expected::Numbers(&[
                99.900_099_900_099_9,
                1000.0,
                1001.0,
                60.008_681_549_586_38,
                0.000_999_000_999_000_999,
                100.0,
                -0.000_999_000_999_000_999,
            ]),
            source: "as FEEDBACK.GAIN, FEEDBACK.LOOPGAIN, FEEDBACK.AMOUNT, FEEDBACK.AMOUNTDB, FEEDBACK.SENSITIVITY; 1/0.01; −1/1001",
            tolerance: &[],
        },
        eval: summary,
    },
    FunctionSpec {
        name: "FEEDBACK.GAINUNIT",
        area: "feedback",
        summary: "The unit of the open-loop and closed-loop gain of a topology",
        params: &[TOPOLOGY],
        repeats: false,
        result_unit: "text",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.GAINUNIT(\"shunt-shunt\")",
            expected: Expected::Text("V/A"),
            source: "a transresistance amplifier (common practice, no source)",
            tolerance: &[],
        },
        eval: gain_unit,
    },
    FunctionSpec {
        name: "FEEDBACK.BETAUNIT",
        area: "feedback",
        summary: "The unit of the feedback factor of a topology",
        params: &[TOPOLOGY],
        repeats: false,
        result_unit: "text",
        spill: &[],
        example: Example {
            formula: "=FEEDBACK.BETAUNIT(\"current-series\")",
            expected: Expected::Text("V/A"),
            source: "series-series feedback senses current and returns a voltage (common practice, no source)",
            tolerance: &[],
        },
        eval: beta_unit,
    },
];
