//! `stage::closed_loop::gain_within_band`: the frequency up to which a closed-loop
//! gain stays within its tolerance. The expected values are closed forms of
//! first-order networks: |G| = 1/√(1 + (f/fc)²) for the RC low pass and
//! (f/fc)/√(1 + (f/fc)²) for the CR high pass (the single-time-constant networks
//! of Sedra & Smith, *Microelectronic Circuits*, 7th ed., §1.6 and App. E, from
//! memory), solved for the band edge by hand.

use loopwright::circuit::{blackman::Output, Circuit};
use loopwright::stage::closed_loop::{gain_sweep, gain_within_band};
use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};

const R: f64 = 1e3;
const C: f64 = 1e-6;

fn fc() -> f64 {
    1.0 / (2.0 * core::f64::consts::PI * R * C)
}

fn low_pass() -> Circuit {
    let mut c = Circuit::new();
    c.voltage_source("V1", "in", "0", 1.0).unwrap();
    c.resistor("R1", "in", "out", R).unwrap();
    c.capacitor("C1", "out", "0", C).unwrap();
    c
}

#[test]
fn low_pass_leaves_at_the_closed_form_edge() {
    // |G| = 1 − t at f = fc·√(1/(1 − t)² − 1).
    for t in [0.001, 0.005, 0.01, 0.1] {
        let w = gain_within_band(
            &low_pass(),
            "V1",
            Output::Voltage("out", "0"),
            1.0,
            t,
            0.1,
            1e7,
        )
        .unwrap();
        assert_eq!(w.status, "leaves");
        let expected = fc() * (1.0 / (1.0 - t) / (1.0 - t) - 1.0).sqrt();
        assert!(
            (w.limit_hz / expected - 1.0).abs() < 1e-8,
            "t = {t}: {} against {expected}",
            w.limit_hz
        );
        assert!((w.gain_at_start - 1.0).abs() < 1e-6);
    }
}

#[test]
fn a_high_pass_is_outside_at_the_start_and_a_divider_within_to_the_end() {
    // CR high pass, fc = 159 Hz: at 1 Hz |G| = 0.0063, far below 1 − 1 %.
    let mut c = Circuit::new();
    c.voltage_source("V1", "in", "0", 1.0).unwrap();
    c.capacitor("C1", "in", "out", C).unwrap();
    c.resistor("R1", "out", "0", R).unwrap();
    let w = gain_within_band(&c, "V1", Output::Voltage("out", "0"), 1.0, 0.01, 1.0, 1e6).unwrap();
    assert_eq!(w.status, "outside-at-start");
    assert_eq!(w.limit_hz, 1.0);
    let f = 1.0 / fc();
    assert!((w.gain_at_start / (f / (1.0 + f * f).sqrt()) - 1.0).abs() < 1e-9);
    // A resistive divider of 1/2 never leaves 0.5 ± 0.1 %.
    let mut d = Circuit::new();
    d.voltage_source("V1", "in", "0", 1.0).unwrap();
    d.resistor("R1", "in", "out", R).unwrap();
    d.resistor("R2", "out", "0", R).unwrap();
    let w = gain_within_band(&d, "V1", Output::Voltage("out", "0"), 0.5, 0.001, 1.0, 1e9).unwrap();
    assert_eq!(w.status, "within-to-end");
    assert_eq!(w.limit_hz, 1e9);
}

#[test]
fn a_stage_sits_on_its_band_edge_at_the_limit() {
    // Gain 10 from a 1 MHz amplifier: the band edge 10·(1 − 0.5 %) is met at the limit,
    // and every point of a fine grid below it is inside.
    let s = Stage {
        kind: StageKind::NonInverting,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e6),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(9e3),
            rg: Some(1e3),
            ..StageParts::default()
        },
    }
    .circuit()
    .unwrap();
    let out = Output::Voltage("out", "0");
    let w = gain_within_band(&s.circuit, "Vs", out, 10.0, 0.005, 1.0, 1e9).unwrap();
    assert_eq!(w.status, "leaves");
    let at = gain_sweep(&s.circuit, "Vs", out, &[w.limit_hz]).unwrap();
    let g = at.re[0].hypot(at.im[0]);
    assert!((g / (10.0 * 0.995) - 1.0).abs() < 1e-8, "|G| = {g}");
    let below: Vec<f64> = (0..200)
        .map(|k| w.limit_hz * (k as f64 + 0.5) / 200.0)
        .collect();
    let g = gain_sweep(&s.circuit, "Vs", out, &below).unwrap();
    for (re, im) in g.re.iter().zip(&g.im) {
        let m = re.hypot(*im);
        assert!((9.95..=10.05).contains(&m), "{m}");
    }
}

#[test]
fn bad_limits_are_errors_naming_the_parameter() {
    let c = low_pass();
    let out = Output::Voltage("out", "0");
    let param = |r: Result<_, loopwright::circuit::CircuitError>| r.unwrap_err().error.param();
    assert_eq!(
        param(gain_within_band(&c, "V1", out, 1.0, 1.0, 1.0, 10.0)),
        "tolerance"
    );
    assert_eq!(
        param(gain_within_band(&c, "V1", out, 1.0, 0.0, 1.0, 10.0)),
        "tolerance"
    );
    assert_eq!(
        param(gain_within_band(&c, "V1", out, -1.0, 0.1, 1.0, 10.0)),
        "target"
    );
    assert_eq!(
        param(gain_within_band(&c, "V1", out, f64::NAN, 0.1, 1.0, 10.0)),
        "target"
    );
    assert_eq!(
        param(gain_within_band(&c, "V1", out, 1.0, 0.1, 10.0, 10.0)),
        "to_hz"
    );
    assert_eq!(
        param(gain_within_band(&c, "V1", out, 1.0, 0.1, 0.0, 10.0)),
        "from_hz"
    );
    assert!(gain_within_band(&c, "R1", out, 1.0, 0.1, 1.0, 10.0).is_err());
}
