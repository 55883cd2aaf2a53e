//! Properties of the noise area over seeded random stages: closed forms of the
//! single-pole and two-pole noise bandwidth, additivity of the integral over
//! adjacent bands, and the inverting/non-inverting relation.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::noise::{
    integrated_output_noise, noise_contributions, AmplifierNoise, ClosedLoopResponse, Stage,
    StageKind,
};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};
use std::f64::consts::FRAC_PI_2;

/// Cases per property.
const CASES: u32 = 48;

fn runner(seed: u8) -> TestRunner {
    TestRunner::new_with_rng(
        Config {
            cases: CASES,
            failure_persistence: None,
            ..Config::default()
        },
        TestRng::from_seed(RngAlgorithm::ChaCha, &[seed; 32]),
    )
}

/// Stage resistors 10 Ω … 100 kΩ, gains 1 … 1000, 250 … 400 K; amplifier
/// 0.5 … 50 nV/√Hz and 10 fA … 10 pA/√Hz; GBW 100 kHz … 300 MHz.
fn stage_amp_gbw() -> impl Strategy<Value = (Stage, AmplifierNoise, f64)> {
    (
        1.0f64..5.0,
        -1.0f64..3.0,
        prop_oneof![Just(0.0), 1.0f64..5.0],
        250.0f64..400.0,
        -9.3f64..-7.3,
        -14.0f64..-11.0,
        5.0f64..8.5,
    )
        .prop_map(|(lg_rg, lg_ratio, lg_rp, t, lg_en, lg_in, lg_gbw)| {
            let rg = 10f64.powf(lg_rg);
            let rp = if lg_rp == 0.0 { 0.0 } else { 10f64.powf(lg_rp) };
            let stage = Stage::new(
                StageKind::NonInverting,
                rg * 10f64.powf(lg_ratio),
                rg,
                rp,
                t,
            )
            .unwrap();
            let amp = AmplifierNoise::new(10f64.powf(lg_en), 0.0, 10f64.powf(lg_in), 0.0).unwrap();
            (stage, amp, 10f64.powf(lg_gbw))
        })
}

#[test]
fn white_noise_through_one_pole_is_the_pi_over_2_bandwidth() {
    // Common practice (single-pole noise bandwidth π/2·f_−3dB): with white sources,
    // rms² = S₀·π/2·GBW/NG exactly.
    runner(21)
        .run(&stage_amp_gbw(), |(stage, amp, gbw)| {
            let h = ClosedLoopResponse::new(stage.noise_gain(), gbw, &[]).unwrap();
            let n = integrated_output_noise(&stage, &amp, &h, 0.0, f64::INFINITY).unwrap();
            let s0 = noise_contributions(&stage, &amp, 1.0).unwrap().total;
            let expected = s0 * (FRAC_PI_2 * gbw / stage.noise_gain()).sqrt();
            prop_assert!(
                (n.output_rms / expected - 1.0).abs() < 1e-9,
                "{} vs {expected}",
                n.output_rms
            );
            Ok(())
        })
        .unwrap();
}

#[test]
fn a_second_pole_leaves_the_noise_bandwidth_at_pi_over_2_fc() {
    // Second-order identity: ∫|H|² df = π/2·f0·Q and f0·Q = f_c for this loop
    // (see src/noise/response.rs), for any second pole.
    runner(22)
        .run(
            &(stage_amp_gbw(), -1.0f64..2.0),
            |((stage, _, gbw), lg_p)| {
                let fc = gbw / stage.noise_gain();
                let h = ClosedLoopResponse::new(stage.noise_gain(), gbw, &[fc * 10f64.powf(lg_p)])
                    .unwrap();
                let amp = AmplifierNoise::new(1e-9, 0.0, 0.0, 0.0).unwrap();
                let n = integrated_output_noise(&stage, &amp, &h, 0.0, f64::INFINITY).unwrap();
                prop_assert!(
                    (n.noise_bandwidth_hz / (FRAC_PI_2 * fc) - 1.0).abs() < 1e-9,
                    "{}",
                    n.noise_bandwidth_hz
                );
                Ok(())
            },
        )
        .unwrap();
}

#[test]
fn power_adds_over_adjacent_bands() {
    // Identity: ∫ₐᶜ = ∫ₐᵇ + ∫ᵇᶜ, with 1/f corners and two extra poles.
    runner(23)
        .run(
            &(stage_amp_gbw(), 0.0f64..3.0, -3.0f64..1.0),
            |((stage, amp, gbw), lg_corner, lg_split)| {
                let amp = AmplifierNoise {
                    voltage_corner_hz: 10f64.powf(lg_corner),
                    current_corner_hz: 100.0,
                    ..amp
                };
                let fc = gbw / stage.noise_gain();
                let h = ClosedLoopResponse::new(stage.noise_gain(), gbw, &[2.0 * fc, 5.0 * fc])
                    .unwrap();
                let b = fc * 10f64.powf(lg_split);
                let whole = integrated_output_noise(&stage, &amp, &h, 0.1, f64::INFINITY)
                    .unwrap()
                    .output_rms;
                let low = integrated_output_noise(&stage, &amp, &h, 0.1, b)
                    .unwrap()
                    .output_rms;
                let high = integrated_output_noise(&stage, &amp, &h, b, f64::INFINITY)
                    .unwrap()
                    .output_rms;
                let sum = (low * low + high * high).sqrt();
                prop_assert!((sum / whole - 1.0).abs() < 1e-9, "{sum} vs {whole}");
                Ok(())
            },
        )
        .unwrap();
}

#[test]
fn inverting_stage_refers_the_same_noise_to_a_smaller_gain() {
    // Same resistors: the same output noise; input-referred noise scaled by
    // NG/(NG − 1) = (1 + R_f/R_g)/(R_f/R_g).
    runner(24)
        .run(&stage_amp_gbw(), |(stage, amp, gbw)| {
            let inv = Stage {
                kind: StageKind::Inverting,
                ..stage
            };
            let h = ClosedLoopResponse::new(stage.noise_gain(), gbw, &[]).unwrap();
            let a = integrated_output_noise(&stage, &amp, &h, 1.0, 1e4).unwrap();
            let b = integrated_output_noise(&inv, &amp, &h, 1.0, 1e4).unwrap();
            prop_assert_eq!(a.output_rms, b.output_rms);
            let ratio = stage.noise_gain() / (stage.noise_gain() - 1.0);
            prop_assert!((b.input_referred_rms / a.input_referred_rms / ratio - 1.0).abs() < 1e-12);
            Ok(())
        })
        .unwrap();
}
