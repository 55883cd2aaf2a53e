//! The stage noise of `loopwright::noise` (resistive non-inverting and
//! inverting stages over a GBW model with up to two extra poles) is a special
//! case of the circuit analysis: the equivalent circuit — the stage's
//! resistors around an amplifier element of the same GBW and extra poles —
//! gives the same densities, source by source, and the same band integral.
//!
//! The stage model's amplifier is an integrator ω_t/s (A0 → ∞); the circuit's
//! has A0 = 10¹² (dominant pole GBW/10¹² ≤ 10⁻⁴ Hz), which moves a density
//! at f ≥ 10 Hz by about fp/f + NG/A0 ≤ 10⁻⁵ relative. STAGE_REL states that.

use loopwright::circuit::Circuit;
use loopwright::noise::circuit::{band_noise, noise_densities, NoiseSetup};
use loopwright::noise::{
    integrated_output_noise, noise_contributions, AmplifierNoise, ClosedLoopResponse, Stage,
    StageKind,
};
use loopwright::stage::{Amplifier, NoiseDensity, Spread, SpreadPoint};

/// Agreement of densities and band integrals (see the module docs): the finite
/// A0 of the circuit's amplifier, plus the band quadratures' 1e-9 and 1e-10.
const STAGE_REL: f64 = 1e-5;

fn equivalent_circuit(stage: &Stage, amp: &AmplifierNoise, gbw: f64, poles: &[f64]) -> Circuit {
    let mut a = Amplifier::from_gbw(Spread::fixed(1e12), gbw);
    a.poles_hz = poles.to_vec();
    a.voltage_noise = Some(NoiseDensity {
        density: amp.voltage_density,
        corner_hz: amp.voltage_corner_hz,
    });
    a.current_noise = Some(NoiseDensity {
        density: amp.current_density,
        corner_hz: amp.current_corner_hz,
    });
    let mut c = Circuit::new();
    c.voltage_source("Vs", "src", "0", 0.0).unwrap();
    let (plus_drive, minus_drive) = match stage.kind {
        StageKind::NonInverting => ("src", "0"),
        StageKind::Inverting => ("0", "src"),
    };
    if stage.r_plus > 0.0 {
        c.resistor("Rp", plus_drive, "p", stage.r_plus).unwrap();
    } else {
        c.resistor("Rp0", plus_drive, "p", 1e-6).unwrap();
    }
    c.resistor("Rg", minus_drive, "n", stage.r_gain).unwrap();
    c.resistor("Rf", "out", "n", stage.r_feedback).unwrap();
    c.amplifier("U1", "out", "0", "p", "n", a, SpreadPoint::Typ)
        .unwrap();
    c
}

fn grid() -> Vec<(Stage, AmplifierNoise, f64, Vec<f64>)> {
    let mut out = Vec::new();
    for kind in [StageKind::NonInverting, StageKind::Inverting] {
        for (rf, rg) in [(9e3, 1e3), (100e3, 1e3), (1e3, 1e3), (47e3, 2.2e3)] {
            for rp in [0.0, 50.0, 10e3] {
                for (gbw, poles) in [(1e6, vec![]), (10e6, vec![50e6]), (50e6, vec![80e6, 200e6])] {
                    let s = Stage::new(kind, rf, rg, rp, 300.0).unwrap();
                    let a = AmplifierNoise::new(4e-9, 20.0, 0.8e-12, 300.0).unwrap();
                    out.push((s, a, gbw, poles));
                }
            }
        }
    }
    out
}

#[test]
fn stage_noise_is_the_circuit_analysis_of_the_equivalent_circuit() {
    let freqs = [10.0, 1e3, 1e5, 3e6];
    for (stage, amp, gbw, poles) in grid() {
        let c = equivalent_circuit(&stage, &amp, gbw, &poles);
        let mut setup = NoiseSetup::at_node("out", stage.temperature_k);
        setup.input_source = Some("Vs".into());
        let d = noise_densities(&c, &setup, &freqs).unwrap();
        let h = ClosedLoopResponse::new(stage.noise_gain(), gbw, &poles).unwrap();
        for (i, &f) in freqs.iter().enumerate() {
            let old = noise_contributions(&stage, &amp, f).unwrap();
            let m = h.magnitude_squared(f).sqrt();
            let by_name = |n: &str| {
                d.sources
                    .iter()
                    .find(|s| s.name == n)
                    .map_or(0.0, |s| s.density[i])
            };
            let pairs = [
                ("Rf", old.r_feedback),
                ("Rg", old.r_gain),
                ("Rp", old.r_plus),
                ("U1.en", old.amplifier_voltage),
                ("U1.in+", old.amplifier_current_plus),
                ("U1.in-", old.amplifier_current_minus),
            ];
            // The stand-in 1 µΩ for R_p = 0 carries the + input's current
            // noise to 1e-9 of the total: each source is compared within
            // STAGE_REL of itself plus STAGE_REL of the total.
            let total = old.total * m;
            for (name, want) in pairs {
                let got = by_name(name);
                assert!(
                    (got - want * m).abs() <= STAGE_REL * (want * m + total),
                    "{stage:?} gbw {gbw} {poles:?} {name} at {f} Hz: {got:e} vs {:e}",
                    want * m
                );
            }
            assert!(
                (d.total[i] / total - 1.0).abs() < STAGE_REL,
                "{stage:?} total"
            );
            assert!(
                (d.signal_gain[i] / (stage.signal_gain().abs() * m) - 1.0).abs() < STAGE_REL,
                "{stage:?} signal gain"
            );
        }
    }
}

#[test]
fn band_integrals_agree_with_the_stage_integral() {
    for (stage, amp, gbw, poles) in grid().into_iter().step_by(5) {
        let c = equivalent_circuit(&stage, &amp, gbw, &poles);
        let setup = NoiseSetup::at_node("out", stage.temperature_k);
        let h = ClosedLoopResponse::new(stage.noise_gain(), gbw, &poles).unwrap();
        let old = integrated_output_noise(&stage, &amp, &h, 20.0, 2e6).unwrap();
        let new = band_noise(&c, &setup, [20.0, 2e6]).unwrap();
        assert!(
            (new.total_rms / old.output_rms - 1.0).abs() < STAGE_REL,
            "{stage:?} {gbw} {poles:?}: {:e} vs {:e}",
            new.total_rms,
            old.output_rms
        );
    }
}
