//! Worksheet functions of noise (`src/noise`), prefix `NOISE.`.
//!
//! A stage is written `kind; rf; rg; rp; en; en_corner; in; in_corner;
//! temperature`: non-inverting or inverting, the feedback resistor, the resistor
//! from the inverting input to ground (for an inverting stage, its input resistor
//! plus the source resistance), the resistance at the non-inverting input, the
//! amplifier's white voltage and current noise densities with their 1/f corners
//! (0 for none) and the resistor temperature in kelvin — see
//! [`crate::noise::Stage`] and [`crate::noise::AmplifierNoise`]. Each function
//! converts its arguments, calls the core and converts the result.
//!
//! `NOISE.CIRCUIT.DENSITY` and `NOISE.CIRCUIT.TOTAL` take a circuit document
//! (`docs/circuit.md`) as text — typically a cell holding the JSON — and a node
//! whose voltage noise they compute ([`crate::noise::circuit`]).

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::noise::{self as nz, AmplifierNoise, ClosedLoopResponse, Stage, StageKind};
use crate::sheet::errors::{CellError, ErrorKind};
use crate::sheet::value::{Array, Unit, Value};
use alloc::vec;
use alloc::vec::Vec;

const P_KIND: Param = req(
    "kind",
    "\"non-inverting\" or \"inverting\"",
    "text",
    "non-inverting, inverting",
);
const P_RF: Param = req(
    "rf",
    "feedback resistor, output to inverting input",
    "Ω",
    ">= 0 (> 0 for inverting)",
);
const P_RG: Param = req(
    "rg",
    "inverting input to ground (inverting: input resistor plus source)",
    "Ω",
    "> 0",
);
const P_RP: Param = req("rp", "resistance at the non-inverting input", "Ω", ">= 0");
const P_EN: Param = req(
    "en",
    "amplifier white voltage noise density",
    "V/√Hz",
    ">= 0",
);
const P_ENC: Param = req(
    "en_corner",
    "1/f corner of the voltage noise (0: none)",
    "Hz",
    ">= 0",
);
const P_IN: Param = req(
    "in",
    "amplifier white current noise density",
    "A/√Hz",
    ">= 0",
);
const P_INC: Param = req(
    "in_corner",
    "1/f corner of the current noise (0: none)",
    "Hz",
    ">= 0",
);
const P_TEMP: Param = req("temperature", "resistor temperature", "K", "> 0");

/// Core parameter names that the worksheet spells differently.
const NAMES: &[(&str, &str)] = &[
    ("r_feedback", "rf"),
    ("r_gain", "rg"),
    ("r_plus", "rp"),
    ("voltage_density", "en"),
    ("voltage_corner_hz", "en_corner"),
    ("current_density", "in"),
    ("current_corner_hz", "in_corner"),
    ("temperature_k", "temperature"),
    ("frequency_hz", "frequency"),
    ("gbw_hz", "gbw"),
    ("resistance_ohm", "r"),
];

fn core_err(a: &Args<'_>, e: crate::Error) -> Value {
    Value::Error(super::core_error(a.spec.name, e, NAMES))
}

fn from_core<T>(a: &Args<'_>, r: crate::Result<T>) -> Result<T, CellError> {
    r.map_err(|e| super::core_error(a.spec.name, e, NAMES))
}

fn with_unit(x: f64, unit: Unit) -> Value {
    match Value::num(x) {
        Value::Number(v, _) => Value::Number(v, Some(unit)),
        other => other,
    }
}

fn row(items: Vec<Value>) -> Value {
    Array::row(items).map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::Array,
    )
}

/// The stage and amplifier of arguments 0…8.
fn stage(a: &Args<'_>) -> Result<(Stage, AmplifierNoise), CellError> {
    let kind = from_core(a, a.text(0)?.parse::<StageKind>())?;
    let stage = from_core(
        a,
        Stage::new(kind, a.number(1)?, a.number(2)?, a.number(3)?, a.number(8)?),
    )?;
    let amp = from_core(
        a,
        AmplifierNoise::new(a.number(4)?, a.number(5)?, a.number(6)?, a.number(7)?),
    )?;
    Ok((stage, amp))
}

fn thermal(a: &Args<'_>) -> Value {
    match nz::thermal_noise_density(tri!(a.number(0)), tri!(a.number(1))) {
        Ok(x) => Value::num(x),
        Err(e) => core_err(a, e),
    }
}

fn at_frequency(a: &Args<'_>) -> Value {
    let (s, amp) = tri!(stage(a));
    match nz::noise_contributions(&s, &amp, tri!(a.number(9))) {
        Ok(n) => row(vec![
            Value::num(n.total),
            Value::num(n.input_referred),
            Value::num(n.r_feedback),
            Value::num(n.r_gain),
            Value::num(n.r_plus),
            Value::num(n.amplifier_voltage),
            Value::num(n.amplifier_current_plus),
            Value::num(n.amplifier_current_minus),
        ]),
        Err(e) => core_err(a, e),
    }
}

fn integrated(a: &Args<'_>) -> Value {
    let (s, amp) = tri!(stage(a));
    let gbw = tri!(a.number(9));
    let f_low = tri!(a.number(10));
    // Left out (or an empty cell): the whole band.
    let f_high = match a.get(11) {
        Value::Empty => f64::INFINITY,
        _ => tri!(a.number(11)),
    };
    let h = tri!(from_core(
        a,
        ClosedLoopResponse::new(s.noise_gain(), gbw, &[])
    ));
    match nz::integrated_output_noise(&s, &amp, &h, f_low, f_high) {
        Ok(n) => row(vec![
            with_unit(n.output_rms, Unit::Volt),
            with_unit(n.input_referred_rms, Unit::Volt),
            with_unit(n.noise_bandwidth_hz, Unit::Hertz),
        ]),
        Err(e) => core_err(a, e),
    }
}

/// Core parameter names of the circuit noise analysis, as the worksheet spells them.
const CIRCUIT_NAMES: &[(&str, &str)] = &[
    ("temperature_k", "temperature"),
    ("frequencies_hz", "frequency"),
    ("band_hz", "f_low"),
];

/// The circuit document in argument 0, the node in 1, the temperature at `t`
/// (left out: 300 K), analysed by `run`.
fn circuit_noise<T>(
    a: &Args<'_>,
    t: usize,
    run: impl FnOnce(
        &crate::circuit::Circuit,
        &crate::noise::circuit::NoiseSetup,
    ) -> crate::circuit::CircuitResult<T>,
) -> Result<T, CellError> {
    let json = a.text(0)?;
    let node = a.text(1)?;
    let temperature = match a.get(t) {
        Value::Empty => 300.0,
        _ => a.number(t)?,
    };
    let name = a.spec.name;
    let fail = |e: crate::circuit::CircuitError| {
        let mut c = super::core_error(name, e.error, CIRCUIT_NAMES);
        if !e.name.is_empty() {
            // Keep the node or element at fault in the sentence.
            c.detail = alloc::format!("{} ({})", c.detail, e.name.as_str());
        }
        c
    };
    let c = crate::circuit::json::read_circuit(&json).map_err(fail)?;
    let setup = crate::noise::circuit::NoiseSetup::at_node(&node, temperature);
    run(&c, &setup).map_err(fail)
}

fn circuit_density(a: &Args<'_>) -> Value {
    let f = tri!(a.number(2));
    let d = tri!(circuit_noise(a, 3, |c, s| {
        crate::noise::circuit::noise_densities(c, s, &[f])
    }));
    d.total.first().copied().map_or_else(
        || Value::error(ErrorKind::Value, "empty result"),
        Value::num,
    )
}

fn circuit_total(a: &Args<'_>) -> Value {
    let band = [tri!(a.number(2)), tri!(a.number(3))];
    let n = tri!(circuit_noise(a, 4, |c, s| {
        crate::noise::circuit::band_noise(c, s, band)
    }));
    with_unit(n.total_rms, Unit::Volt)
}

const P_CIRCUIT: Param = req(
    "circuit",
    "circuit document (JSON text, docs/circuit.md), e.g. a cell holding it",
    "text",
    "a loopwright-circuit document",
);
const P_NODE: Param = req(
    "output",
    "node whose voltage noise (against ground) is computed",
    "text",
    "a node of the circuit",
);
const P_TEMP_300: Param = Param {
    name: "temperature",
    summary: "temperature of every resistor; left out, 300 K",
    unit: "K",
    optional: true,
    default: Some(300.0),
    range: "> 0",
};

/// The noise area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "NOISE.THERMAL",
        area: "noise",
        summary: "Thermal (Johnson) noise voltage density of a resistor, √(4kTR)",
        params: &[req("r", "resistance", "Ω", ">= 0"), P_TEMP],
        repeats: false,
        result_unit: "V/√Hz",
        spill: &[],
        example: Example {
            formula: "=NOISE.THERMAL(1kΩ; 300)",
            expected: Expected::Numbers(&[4.070354775692163e-9]),
            source: "√(4·1.380649e-23 J/K·300 K·1 kΩ) = 4.07 nV/√Hz (Johnson–Nyquist; k exact in the 2019 SI)",
            tolerance: &[],
        },
        eval: thermal,
    },
    FunctionSpec {
        name: "NOISE.STAGE",
        area: "noise",
        summary: "Output noise density of an op-amp stage at a frequency (flat part of the response), input-referred, and each source's share",
        params: &[P_KIND, P_RF, P_RG, P_RP, P_EN, P_ENC, P_IN, P_INC, P_TEMP, req("frequency", "frequency", "Hz", "> 0 with a 1/f corner, else >= 0")],
        repeats: false,
        result_unit: "V/√Hz",
        spill: &[
            "total at the output",
            "input-referred (total / |signal gain|)",
            "from Rf",
            "from Rg",
            "from Rp",
            "from the voltage noise",
            "from the current noise through Rp",
            "from the current noise through Rf",
        ],
        example: Example {
            formula: "=NOISE.STAGE(\"non-inverting\"; 9k; 1k; 50; 4n; 10; 0.5p; 200; 300; 1 kHz)",
            expected: Expected::Numbers(&[
                5.669492799184068e-8,
                5.669492799184068e-9,
                1.221106432707649e-8,
                3.663319298122947e-8,
                9.101589970988585e-9,
                4.019950248448356e-8,
                2.7386127875258303e-10,
                4.929503017546495e-9,
            ]),
            source: "each source through its gain (√(4kTRf), √(4kTRg)·Rf/Rg, √(4kTRp)·NG, en(f)·NG, in(f)·Rp·NG, in(f)·Rf with NG = 10 and e(f)² = e²(1 + fc/f)), summed in quadrature (closed form; tests/reference/sheet_catalog.py)",
            tolerance: &[],
        },
        eval: at_frequency,
    },
    FunctionSpec {
        name: "NOISE.TOTAL",
        area: "noise",
        summary: "rms output and input-referred noise of a stage integrated over a band, the op-amp modelled by its gain–bandwidth product",
        params: &[
            P_KIND,
            P_RF,
            P_RG,
            P_RP,
            P_EN,
            P_ENC,
            P_IN,
            P_INC,
            P_TEMP,
            req("gbw", "op-amp gain–bandwidth product", "Hz", "> 0"),
            req("f_low", "lower band edge", "Hz", ">= 0 (> 0 with a 1/f corner)"),
            Param {
                name: "f_high",
                summary: "upper band edge; left out, the whole band",
                unit: "Hz",
                optional: true,
                default: None,
                range: "> f_low",
            },
        ],
        repeats: false,
        result_unit: "V; V; Hz",
        spill: &["output noise, V rms", "input-referred noise, V rms", "noise bandwidth, Hz"],
        example: Example {
            formula: "=NOISE.TOTAL(\"non-inverting\"; 9k; 1k; 0; 10n; 0; 0; 0; 300; 1 MHz; 0)",
            expected: Expected::Numbers(&[4.248550236959128e-5, 4.248550236959127e-6, 157079.63267948967]),
            source: "white noise through the single closed-loop pole at GBW/NG = 100 kHz: rms = e_out·√(π/2·100 kHz), e_out² = 4kT(Rf + Rg·(Rf/Rg)²) + (en·NG)² (closed form; tests/reference/sheet_catalog.py); the core integrates to 1e-10",
            tolerance: &[1e-9, 1e-9, 1e-12],
        },
        eval: integrated,
    },
    FunctionSpec {
        name: "NOISE.CIRCUIT.DENSITY",
        area: "noise",
        summary: "Output noise density of a circuit document at a node and frequency: every resistor's 4kTR and each amplifier's voltage and current noise through the real network",
        params: &[P_CIRCUIT, P_NODE, req("frequency", "frequency", "Hz", "> 0"), P_TEMP_300],
        repeats: false,
        result_unit: "V/√Hz",
        spill: &[],
        example: Example {
            formula: "=NOISE.CIRCUIT.DENSITY(\"{\"\"format\"\":\"\"loopwright-circuit\"\",\"\"version\"\":1,\"\"elements\"\":[{\"\"name\"\":\"\"R1\"\",\"\"kind\"\":\"\"resistor\"\",\"\"nodes\"\":[\"\"a\"\",\"\"0\"\"],\"\"value\"\":1000},{\"\"name\"\":\"\"C1\"\",\"\"kind\"\":\"\"capacitor\"\",\"\"nodes\"\":[\"\"a\"\",\"\"0\"\"],\"\"value\"\":1e-6}]}\"; \"a\"; 1 kHz)",
            expected: Expected::Numbers(&[6.39765035175364e-10]),
            source: "1 kΩ ‖ 1 µF at 1 kHz: √(4kTR)/√(1 + (2πfRC)²) (Johnson–Nyquist through the RC's impedance; tests/reference/sheet_catalog.py)",
            tolerance: &[1e-12],
        },
        eval: circuit_density,
    },
    FunctionSpec {
        name: "NOISE.CIRCUIT.TOTAL",
        area: "noise",
        summary: "rms output noise of a circuit document at a node over a band [f_low, f_high]",
        params: &[
            P_CIRCUIT,
            P_NODE,
            req("f_low", "lower band edge", "Hz", ">= 0 (> 0 with a 1/f corner)"),
            req("f_high", "upper band edge", "Hz", "> f_low, finite"),
            P_TEMP_300,
        ],
        repeats: false,
        result_unit: "V",
        spill: &[],
        example: Example {
            formula: "=NOISE.CIRCUIT.TOTAL(\"{\"\"format\"\":\"\"loopwright-circuit\"\",\"\"version\"\":1,\"\"elements\"\":[{\"\"name\"\":\"\"R1\"\",\"\"kind\"\":\"\"resistor\"\",\"\"nodes\"\":[\"\"a\"\",\"\"0\"\"],\"\"value\"\":1000},{\"\"name\"\":\"\"C1\"\",\"\"kind\"\":\"\"capacitor\"\",\"\"nodes\"\":[\"\"a\"\",\"\"0\"\"],\"\"value\"\":1e-6}]}\"; \"a\"; 0; 1 MHz)",
            expected: Expected::Numbers(&[6.435469938575519e-8]),
            source: "1 kΩ ‖ 1 µF over 0…1 MHz: √(4kTR·fc·atan(1 MHz/fc)), fc = 1/(2πRC) (the single pole's noise bandwidth; tests/reference/sheet_catalog.py); the core integrates to 1e-9",
            tolerance: &[1e-8],
        },
        eval: circuit_total,
    },
];
