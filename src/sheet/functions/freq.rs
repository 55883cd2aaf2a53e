//! Worksheet functions of frequency response and stability (`src/freq`), prefix `FREQ.`.
//!
//! A loop in a formula is written as its open-loop DC gain `a0`, a constant
//! feedback factor `beta`, then the amplifier's real pole frequencies in Hz as the
//! last, repeating arguments: `FREQ.PM(a0; beta; pole; pole; …)`. Each pole
//! argument is a number or a range of cells (`B2:B4`, empty cells skipped), so
//! `FREQ.PM(100k; 0.1; 10 Hz; 1 MHz)` and `FREQ.PM(A1; A2; B1:B6)` both work;
//! every item must be a number (a range with no numbers leaves a flat
//! amplifier). The model is A(s) = a0/Π(1 + s/2πfₖ), the model of
//! [`crate::freq::TransferModel`] with real poles only. Each function converts
//! its arguments, calls the core and converts the result; the formulas, units and
//! sources are documented on the core functions.

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::freq::{self, FeedbackLoop, TransferModel};
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use alloc::format;
use alloc::vec;
use alloc::vec::Vec;

const A0: Param = req(
    "a0",
    "open-loop DC gain",
    "V/V",
    "not 0 (with beta > 0, a negative a0 is positive feedback)",
);
const POLES: Param = req(
    "poles",
    "the amplifier's real pole frequencies, each argument a number or a range (empty cells skipped)",
    "Hz",
    "each > 0; at most 64 poles",
);
const BETA: Param = req("beta", "feedback factor", "V/V", "not 0");
const LOOP: &[Param] = &[A0, BETA, POLES];

/// `2π`, to turn rad/s into Hz.
const TAU: f64 = core::f64::consts::TAU;

/// Core parameter names that the worksheet spells differently.
const NAMES: &[(&str, &str)] = &[
    ("a.gain", "a0"),
    ("a.poles_hz", "poles"),
    ("beta.gain", "beta"),
    ("target_pm_deg", "target_pm"),
];

fn core_err(a: &Args<'_>, e: crate::Error) -> Value {
    Value::Error(super::core_error(a.spec.name, e, NAMES))
}

fn tagged(x: f64, unit: Unit) -> Value {
    match Value::num(x) {
        Value::Number(v, _) => Value::Number(v, Some(unit)),
        other => other,
    }
}

fn hz(x: f64) -> Value {
    tagged(x, Unit::Hertz)
}

fn db(x: f64) -> Value {
    tagged(x, Unit::Decibel)
}

fn row(items: Vec<Value>) -> Value {
    Array::row(items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

fn not_available(a: &Args<'_>, what: &str) -> Value {
    Value::error(
        ErrorKind::NotAvailable,
        format!("{}: {}", a.spec.name, what),
    )
}

/// Arguments `first`… as a list of pole frequencies: each a number or a range
/// (empty cells in a range skipped).
pub(crate) fn pole_list(a: &Args<'_>, first: usize) -> Result<Vec<f64>, CellError> {
    let mut out = Vec::new();
    for i in first..a.len() {
        match a.get(i) {
            Value::Array(arr) => {
                for item in arr.items() {
                    match item {
                        Value::Number(x, _) => out.push(*x),
                        Value::Empty => {}
                        Value::Error(e) => return Err(e.clone()),
                        _ => {
                            return Err(CellError::new(
                                ErrorKind::Value,
                                format!(
                                    "{}: poles: every item must be a pole frequency in Hz",
                                    a.spec.name
                                ),
                            ))
                        }
                    }
                }
            }
            Value::Empty => {}
            _ => out.push(a.number(i)?),
        }
    }
    Ok(out)
}

/// The amplifier model from argument 0 (a0) and arguments `first`… (poles).
fn amplifier(a: &Args<'_>, first: usize) -> Result<TransferModel, CellError> {
    let a0 = a.number(0)?;
    let poles = pole_list(a, first)?;
    Ok(poles
        .into_iter()
        .fold(TransferModel::constant(a0), TransferModel::pole))
}

/// The validated loop from arguments 0 (a0), 1 (beta), `first`… (poles).
fn feedback_loop(a: &Args<'_>, first: usize) -> Result<FeedbackLoop, CellError> {
    let amp = amplifier(a, first)?;
    let beta = a.number(1)?;
    FeedbackLoop::with_constant_beta(amp, beta)
        .map_err(|e| super::core_error(a.spec.name, e, NAMES))
}

fn phase_margin(a: &Args<'_>) -> Value {
    let l = tri!(feedback_loop(a, 2));
    match freq::stability_margins(&l) {
        Ok(m) => match (m.phase_margin_deg, m.crossover_hz) {
            (Some(pm), Some(fc)) => row(vec![Value::num(pm), hz(fc)]),
            _ => not_available(a, "the loop gain never crosses 1, so there is no phase margin (the loop is not limited by it)"),
        },
        Err(e) => core_err(a, e),
    }
}

fn gain_margin(a: &Args<'_>) -> Value {
    let l = tri!(feedback_loop(a, 2));
    match freq::stability_margins(&l) {
        Ok(m) => match (m.gain_margin_db, m.phase_crossover_hz) {
            (Some(gm), Some(f)) => row(vec![db(gm), hz(f)]),
            _ => not_available(
                a,
                "the loop phase never reaches −180°, so there is no gain margin (unbounded)",
            ),
        },
        Err(e) => core_err(a, e),
    }
}

fn bandwidth(a: &Args<'_>) -> Value {
    let l = tri!(feedback_loop(a, 2));
    match freq::closed_loop_bandwidth(&l) {
        Ok(b) => b.high_hz.map_or_else(
            || {
                not_available(
                    a,
                    "the closed-loop gain stays above −3 dB in the whole range",
                )
            },
            hz,
        ),
        Err(e) => core_err(a, e),
    }
}

fn peaking(a: &Args<'_>) -> Value {
    let l = tri!(feedback_loop(a, 2));
    match freq::closed_loop_bandwidth(&l) {
        Ok(b) => {
            let at = b
                .peak_hz
                .map_or_else(|| not_available(a, "no peaking, so no peak frequency"), hz);
            row(vec![db(b.peaking_db), at])
        }
        Err(e) => core_err(a, e),
    }
}

fn step(a: &Args<'_>) -> Value {
    let l = tri!(feedback_loop(a, 3));
    let band = tri!(a.number(2));
    match freq::step_response(&l, band, 2) {
        Ok(s) => row(vec![
            Value::num(s.overshoot_percent),
            Value::num(s.rise_time_s),
            Value::num(s.settling_time_s),
        ]),
        Err(e) => core_err(a, e),
    }
}

fn poles(a: &Args<'_>) -> Value {
    let l = tri!(feedback_loop(a, 2));
    match freq::closed_loop_poles(&l) {
        Ok(p) => {
            let mut items = Vec::with_capacity(p.poles.len() * 4);
            for pole in &p.poles {
                items.push(hz(pole.re / TAU));
                items.push(hz(pole.im / TAU));
                items.push(hz(pole.natural_hz));
                items.push(Value::num(pole.zeta));
            }
            let rows = u32::try_from(p.poles.len()).unwrap_or(u32::MAX);
            Array::new(rows, 4, items).map_or_else(
                || Value::error(ErrorKind::Value, "FREQ.POLES: the closed loop has no poles"),
                Value::Array,
            )
        }
        Err(e) => core_err(a, e),
    }
}

fn extend(a: &Args<'_>) -> Value {
    match freq::single_pole_high_cutoff(tri!(a.number(0)), tri!(a.number(1)), tri!(a.number(2))) {
        Ok(f) => hz(f),
        Err(e) => core_err(a, e),
    }
}

fn low_cut(a: &Args<'_>) -> Value {
    match freq::single_pole_low_cutoff(tri!(a.number(0)), tri!(a.number(1)), tri!(a.number(2))) {
        Ok(f) => hz(f),
        Err(e) => core_err(a, e),
    }
}

fn gbw(a: &Args<'_>) -> Value {
    match freq::gain_bandwidth(tri!(a.number(0)), tri!(a.number(1))) {
        Ok(f) => hz(f),
        Err(e) => core_err(a, e),
    }
}

fn two_pole(a: &Args<'_>) -> Value {
    match freq::two_pole_response(tri!(a.number(0)), tri!(a.number(1)), tri!(a.number(2))) {
        Ok(r) => row(vec![
            hz(r.natural_hz),
            Value::num(r.q),
            Value::num(r.zeta),
            db(r.peaking_db),
            Value::num(r.overshoot_percent),
            Value::num(r.maximally_flat_loop_gain),
        ]),
        Err(e) => core_err(a, e),
    }
}

fn dominant(a: &Args<'_>) -> Value {
    let amp = tri!(amplifier(a, 3));
    match freq::dominant_pole_for_margin(&amp, tri!(a.number(1)), tri!(a.number(2))) {
        Ok(c) => {
            let fc = c
                .crossover_hz
                .map_or_else(|| not_available(a, "no crossover with this pole"), hz);
            row(vec![hz(c.value), fc])
        }
        Err(e) => core_err(a, e),
    }
}

fn max_beta(a: &Args<'_>) -> Value {
    let amp = tri!(amplifier(a, 3));
    match freq::max_beta_for_margin(&amp, tri!(a.number(1)), tri!(a.number(2))) {
        Ok(c) => {
            let fc = c
                .crossover_hz
                .map_or_else(|| not_available(a, "no crossover at this beta"), hz);
            row(vec![
                Value::num(c.value),
                Value::num(c.closed_loop_gain),
                fc,
            ])
        }
        Err(e) => core_err(a, e),
    }
}

const TARGET_PM: Param = req(
    "target_pm",
    "phase margin wanted, degrees",
    "°",
    "0 < target < 180",
);

/// The frequency area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "FREQ.PM",
        area: "freq",
        summary: "Phase margin of the loop a0/Π(1 + jf/fₖ)·β and the crossover frequency where |T| = 1",
        params: LOOP,
        repeats: true,
        result_unit: "degrees; Hz",
        spill: &["phase margin, degrees (worst crossover)", "crossover frequency, Hz"],
        example: Example {
            formula: "=FREQ.PM(1000; 0.1; 1 kHz; 100 kHz)",
            expected: Expected::Numbers(&[52.55773904488178, 78610.53548759002]),
            source: "two poles, T0 = 100: fc² solves (1 + fc²/f1²)(1 + fc²/f2²) = T0², PM = 180° − atan(fc/f1) − atan(fc/f2) (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[1e-10],
        },
        eval: phase_margin,
    },
    FunctionSpec {
        name: "FREQ.GM",
        area: "freq",
        summary: "Gain margin of the loop (how far |T| is below 1 where its phase reaches −180°) and that frequency",
        params: LOOP,
        repeats: true,
        result_unit: "dB; Hz",
        spill: &["gain margin, dB (#N/A without a −180° crossing)", "phase crossover frequency, Hz"],
        example: Example {
            formula: "=FREQ.GM(4; 1; 1k; 1k; 1k)",
            expected: Expected::Numbers(&[6.020599913279624, 1732.0508075688772]),
            source: "three equal poles: −180° at f = √3·fp where |T| = T0/8, GM = 20·log10(8/4) (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[1e-10],
        },
        eval: gain_margin,
    },
    FunctionSpec {
        name: "FREQ.BANDWIDTH",
        area: "freq",
        summary: "Closed-loop upper −3 dB frequency (relative to the DC closed-loop gain)",
        params: LOOP,
        repeats: true,
        result_unit: "Hz",
        spill: &[],
        example: Example {
            formula: "=FREQ.BANDWIDTH(1000; 0.1; 1k; 100k)",
            expected: Expected::Numbers(&[127550.5763123802]),
            source: "second-order low-pass with f0 = √(101·f1·f2), Q = f0/(f1 + f2): f3dB = f0·√(1 − 1/(2Q²) + √((1 − 1/(2Q²))² + 1)) (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[1e-10],
        },
        eval: bandwidth,
    },
    FunctionSpec {
        name: "FREQ.PEAKING",
        area: "freq",
        summary: "Closed-loop gain peaking above the DC value, and the frequency of the peak",
        params: LOOP,
        repeats: true,
        result_unit: "dB; Hz",
        spill: &["peaking, dB (0 without a peak)", "peak frequency, Hz (#N/A without a peak)"],
        example: Example {
            formula: "=FREQ.PEAKING(1000; 0.1; 1k; 100k)",
            expected: Expected::Numbers(&[1.2206742922089018, 70707.14249635606]),
            source: "second-order low-pass: Mp = Q/√(1 − 1/(4Q²)) at f0·√(1 − 1/(2Q²)) (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[1e-6],
        },
        eval: peaking,
    },
    FunctionSpec {
        name: "FREQ.STEP",
        area: "freq",
        summary: "Closed-loop step response: overshoot, 10–90 % rise time and settling time into a band",
        params: &[
            A0,
            BETA,
            req("settle_band", "settling band as a fraction of the final value (0.02 for 2 %)", "1", "0 < band < 0.5"),
            POLES,
        ],
        repeats: true,
        result_unit: "%; s; s",
        spill: &["overshoot, %", "rise time 10–90 %, s", "settling time, s"],
        example: Example {
            formula: "=FREQ.STEP(100k; 0.01; 2%; 10 Hz)",
            expected: Expected::Numbers(&[0.0, 3.493498027632965e-5, 6.219958030001018e-5]),
            source: "one closed-loop pole at 10·1001 Hz, τ = 1/(2π·10010 Hz): no overshoot, rise ln 9·τ, 2 % settling ln 50·τ (closed form; also tests/reference/data/freq_loops.json case \"one pole\")",
            tolerance: &[1e-9],
        },
        eval: step,
    },
    FunctionSpec {
        name: "FREQ.POLES",
        area: "freq",
        summary: "Closed-loop poles, one row each (sorted by natural frequency), in Hz: σ/2π, ω/2π, |s|/2π and ζ",
        params: LOOP,
        repeats: true,
        result_unit: "Hz; Hz; Hz; 1",
        spill: &["real part σ/2π, Hz", "imaginary part ω/2π, Hz", "natural frequency, Hz", "damping ratio ζ"],
        example: Example {
            formula: "=FREQ.POLES(1000; 0.1; 1k; 100k)",
            expected: Expected::Numbers(&[
                -50500.0,
                -86889.29738466068,
                100498.7562112089,
                0.5024937810560445,
                -50500.0,
                86889.29738466068,
                100498.7562112089,
                0.5024937810560445,
            ]),
            source: "roots of s² + (f1 + f2)s + 101·f1·f2 (in Hz): −50.5 kHz ± j√(101·10⁸ − 50500²) (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[1e-12],
        },
        eval: poles,
    },
    FunctionSpec {
        name: "FREQ.EXTEND",
        area: "freq",
        summary: "Closed-loop upper cutoff of a single-pole amplifier: fH·(1 + A0·β)",
        params: &[
            req("f_h", "open-loop upper cutoff (the pole)", "Hz", "> 0"),
            A0,
            req("beta", "feedback factor", "V/V", ">= 0"),
        ],
        repeats: false,
        result_unit: "Hz",
        spill: &[],
        example: Example {
            formula: "=FREQ.EXTEND(10 Hz; 100k; 0.01)",
            expected: Expected::Numbers(&[10010.0]),
            source: "10 Hz · (1 + 1000)",
            tolerance: &[],
        },
        eval: extend,
    },
    FunctionSpec {
        name: "FREQ.LOWCUT",
        area: "freq",
        summary: "Closed-loop lower cutoff of a single low cut: fL/(1 + AM·β)",
        params: &[
            req("f_l", "open-loop lower cutoff", "Hz", "> 0"),
            req("am", "midband open-loop gain", "V/V", "> 0"),
            req("beta", "feedback factor", "V/V", ">= 0"),
        ],
        repeats: false,
        result_unit: "Hz",
        spill: &[],
        example: Example {
            formula: "=FREQ.LOWCUT(100 Hz; 1000; 0.099)",
            expected: Expected::Numbers(&[1.0]),
            source: "100 Hz / (1 + 99)",
            tolerance: &[],
        },
        eval: low_cut,
    },
    FunctionSpec {
        name: "FREQ.GBW",
        area: "freq",
        summary: "Gain–bandwidth product A0·fH of a single-pole amplifier",
        params: &[A0, req("f_h", "open-loop pole", "Hz", "> 0")],
        repeats: false,
        result_unit: "Hz",
        spill: &[],
        example: Example { formula: "=FREQ.GBW(100k; 10 Hz)", expected: Expected::Numbers(&[1000000.0]), source: "100000 · 10 Hz", tolerance: &[] },
        eval: gbw,
    },
    FunctionSpec {
        name: "FREQ.TWOPOLE",
        area: "freq",
        summary: "Closed loop of a two-pole loop gain T0/((1 + jf/f1)(1 + jf/f2)): f0, Q, ζ, peaking, overshoot, maximally flat T0",
        params: &[
            req("f1", "first pole", "Hz", "> 0"),
            req("f2", "second pole", "Hz", "> 0"),
            req("t0", "DC loop gain A0·β", "1", "> −1"),
        ],
        repeats: false,
        result_unit: "Hz; 1; 1; dB; %; 1",
        spill: &[
            "natural frequency f0, Hz",
            "Q",
            "damping ratio ζ",
            "peaking, dB",
            "step overshoot, %",
            "loop gain T0 for Q = 1/√2",
        ],
        example: Example {
            formula: "=FREQ.TWOPOLE(1k; 100k; 100)",
            expected: Expected::Numbers(&[
                100498.7562112089,
                0.9950371902099892,
                0.5024937810560445,
                1.2206742922089018,
                16.107398362793724,
                50.005,
            ]),
            source: "f0 = √(101·f1·f2), Q = f0/(f1 + f2), ζ = 1/(2Q), Mp = Q/√(1 − 1/(4Q²)), overshoot exp(−πζ/√(1 − ζ²)), T0 = (f1 + f2)²/(2f1f2) − 1 (closed forms; tests/reference/sheet_catalog.py)",
            tolerance: &[],
        },
        eval: two_pole,
    },
    FunctionSpec {
        name: "FREQ.DOMINANT",
        area: "freq",
        summary: "Highest dominant-pole frequency that, added to the amplifier, gives a target phase margin",
        params: &[A0, BETA, TARGET_PM, POLES],
        repeats: true,
        result_unit: "Hz; Hz",
        spill: &["dominant pole, Hz", "crossover frequency, Hz"],
        example: Example {
            formula: "=FREQ.DOMINANT(100k; 1; 60; 1 MHz; 10 MHz)",
            expected: Expected::Numbers(&[5.748217922187234, 511163.10698197025]),
            source: "poles fd, 1 MHz, 10 MHz, T0 = 100000: the two equations |T(fc)| = 1 and Σ atan(fc/fk) = 120° in fd and fc, solved with mpmath findroot (tests/reference/sheet_catalog.py); the core bisects to 1e-10",
            tolerance: &[1e-8],
        },
        eval: dominant,
    },
    FunctionSpec {
        name: "FREQ.MAXBETA",
        area: "freq",
        summary: "Largest constant feedback factor that keeps a target phase margin, with the closed-loop gain and crossover",
        params: &[
            A0,
            TARGET_PM,
            req("beta_limit", "largest β to consider (1 for a passive divider)", "V/V", "> 0"),
            POLES,
        ],
        repeats: true,
        result_unit: "V/V; V/V; Hz",
        spill: &["largest beta", "closed-loop gain a0/(1 + a0·β)", "crossover frequency, Hz"],
        example: Example {
            formula: "=FREQ.MAXBETA(1000; 60; 1; 1k; 100k)",
            expected: Expected::Numbers(&[0.06995107333338217, 14.09421948137752, 59979.61042445264]),
            source: "two poles: 60° at fc = tan(120° − atan(fc/f1))·f2, β = √((1 + fc²/f1²)(1 + fc²/f2²))/a0 (closed form; tests/reference/sheet_catalog.py); the core bisects to 1e-10",
            tolerance: &[1e-8],
        },
        eval: max_beta,
    },
];

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::string::String;

    fn args<'a>(name: &str, values: &'a [Value]) -> Args<'a> {
        let spec = FUNCTIONS.iter().find(|f| f.name == name).unwrap();
        Args { spec, values }
    }

    #[test]
    fn poles_come_from_numbers_and_ranges_with_empty_cells_skipped() {
        let range = Value::Array(
            Array::new(3, 1, vec![Value::num(10.0), Value::Empty, Value::num(1e6)]).unwrap(),
        );
        let values = [Value::num(1e5), Value::num(1.0), range, Value::num(2e7)];
        assert_eq!(
            pole_list(&args("FREQ.PM", &values), 2).unwrap(),
            vec![10.0, 1e6, 2e7]
        );
        let text = Value::Array(
            Array::row(vec![Value::num(10.0), Value::Text(String::from("x"))]).unwrap(),
        );
        let values = [Value::num(1e5), Value::num(1.0), text];
        let e = pole_list(&args("FREQ.PM", &values), 2).unwrap_err();
        assert_eq!(e.kind, ErrorKind::Value);
        assert!(e.detail.starts_with("FREQ.PM: poles:"), "{}", e.detail);
    }

    #[test]
    fn the_loop_reads_a0_beta_and_the_poles_in_that_order() {
        let values = [Value::num(1e5), Value::num(0.01), Value::num(10.0)];
        let l = feedback_loop(&args("FREQ.BANDWIDTH", &values), 2).unwrap();
        assert_eq!((l.amplifier().gain, l.feedback().gain), (1e5, 0.01));
        assert_eq!(l.amplifier().poles_hz, vec![10.0]);
    }
}
