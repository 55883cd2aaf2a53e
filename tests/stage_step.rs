//! The step response of a stage's circuit (src/stage/step.rs) against
//! tests/reference/stage_step.py: scipy.signal.step of sympy's exact
//! closed-loop transfer on 400 001 points → tests/reference/data/stage_step.json.

use loopwright::stage::read_stage;
use loopwright::stage::step::{circuit_step, StepOutput};
use serde::Deserialize;

/// Times: the reference locates crossings by linear interpolation between
/// samples 2.5e-6 of the span apart (error below about 1e-6 of the span, a
/// few 1e-6 relative); loopwright refines on the exact response. 1e-4
/// relative leaves room.
const TIME_REL: f64 = 1e-4;
/// Overshoot, percentage points: the reference takes the largest sample,
/// which misses the true peak by at most the curvature times (step/2)²,
/// below 1e-6 of the final value here.
const OVERSHOOT_ABS: f64 = 1e-3;
/// Final value H(0): both exact, the nodal DC solve against sympy's ratio.
const FINAL_REL: f64 = 1e-9;

#[derive(Deserialize)]
struct Case {
    label: String,
    stage: serde_json::Value,
    final_value: f64,
    rise_time_s: f64,
    settling_time_s: f64,
    overshoot_percent: f64,
}

#[derive(Deserialize)]
struct Reference {
    settle_band: f64,
    cases: Vec<Case>,
}

#[test]
fn six_stage_steps_match_scipy() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/stage_step.json"
    );
    let r: Reference = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    assert_eq!(r.cases.len(), 6);
    for c in &r.cases {
        let b = read_stage(&c.stage.to_string()).unwrap().circuit().unwrap();
        let s = circuit_step(
            &b.circuit,
            b.source,
            StepOutput::Voltage("out", "0"),
            r.settle_band,
            200,
        )
        .unwrap();
        let rel = |a: f64, b: f64| (a - b).abs() / b.abs();
        println!(
            "{}: final {:.1e}, rise {:.1e}, settle {:.1e}, overshoot {:.1e} points",
            c.label,
            rel(s.final_value, c.final_value),
            rel(s.rise_time_s, c.rise_time_s),
            rel(s.settling_time_s, c.settling_time_s),
            (s.overshoot_percent - c.overshoot_percent).abs()
        );
        assert!(rel(s.final_value, c.final_value) < FINAL_REL, "{}", c.label);
        assert!(
            rel(s.rise_time_s, c.rise_time_s) < TIME_REL,
            "{}: {s:?}",
            c.label
        );
        assert!(
            rel(s.settling_time_s, c.settling_time_s) < TIME_REL,
            "{}",
            c.label
        );
        assert!(
            (s.overshoot_percent - c.overshoot_percent).abs() < OVERSHOOT_ABS,
            "{}",
            c.label
        );
        assert_eq!(s.waveform.output.len(), 200);
    }
}

#[test]
fn bad_requests_are_typed_errors() {
    use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
    let s = Stage {
        kind: StageKind::NonInverting,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e6),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(9e3),
            rg: Some(1e3),
            cl: Some(1e-9),
            ..StageParts::default()
        },
    }
    .circuit()
    .unwrap();
    let c = &s.circuit;
    let v = StepOutput::Voltage("out", "0");
    assert_eq!(
        circuit_step(c, "Vs", v, 0.6, 10).unwrap_err().error.param(),
        "settle_band"
    );
    assert_eq!(
        circuit_step(c, "Vs", v, 0.02, 1).unwrap_err().error.param(),
        "points"
    );
    assert_eq!(
        circuit_step(c, "Rf", v, 0.02, 10)
            .unwrap_err()
            .error
            .param(),
        "source"
    );
    let e = circuit_step(c, "Vs", StepOutput::ResistorCurrent("Cl"), 0.02, 10).unwrap_err();
    assert_eq!(e.error.param(), "output");
    // The current through Rg is V(fb)/Rg: its final value is 1 V·(1/1 kΩ)·A0β/(1 + A0β)
    // of the non-inverting divider (V(fb) → Vs), about 1 mA.
    let i = circuit_step(c, "Vs", StepOutput::ResistorCurrent("Rg"), 0.02, 10).unwrap();
    let a0b = 1e5 * 0.1;
    assert!((i.final_value - 1e-3 * a0b / (1.0 + a0b)).abs() < 1e-12);
}
