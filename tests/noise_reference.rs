//! The noise area against scipy (tests/reference/noise_stage.py): source
//! densities, output density after the closed-loop roll-off, rms output and
//! input-referred noise by scipy.integrate.quad, the noise bandwidth, the −3 dB
//! bandwidth, and refusal of the loops numpy.roots finds unstable.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::noise::{
    integrated_output_noise, noise_contributions, output_noise_density, AmplifierNoise,
    ClosedLoopResponse, Stage,
};
use serde::Deserialize;
use std::collections::BTreeMap;

/// Densities: the same closed-form sums in a different order, a few ulps.
const DENSITY_REL: f64 = 1e-13;
/// Integrals: both quadratures are asked for 1e-10 (ours) and 1e-12 (quad);
/// the largest difference seen is about 6e-15.
const INTEGRAL_REL: f64 = 1e-10;
/// −3 dB bandwidth: both bisect/brentq to rounding on the same |H|².
const BANDWIDTH_REL: f64 = 1e-10;

#[derive(Deserialize)]
struct File {
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    kind: String,
    r_feedback: f64,
    r_gain: f64,
    r_plus: f64,
    temperature_k: f64,
    voltage_density: f64,
    voltage_corner_hz: f64,
    current_density: f64,
    current_corner_hz: f64,
    gbw_hz: f64,
    extra_poles_hz: Vec<f64>,
    f_low: f64,
    f_high: Option<f64>,
    noise_gain: f64,
    signal_gain: f64,
    unstable: bool,
    output_rms: Option<f64>,
    input_referred_rms: Option<f64>,
    noise_bandwidth_hz: Option<f64>,
    bandwidth_hz: Option<f64>,
    #[serde(default)]
    density_points: Vec<DensityPoint>,
}

#[derive(Deserialize)]
struct DensityPoint {
    frequency_hz: f64,
    contributions: BTreeMap<String, f64>,
    total: f64,
    input_referred: f64,
    output_density: f64,
}

fn rel(a: f64, b: f64) -> f64 {
    if b == 0.0 {
        a.abs()
    } else {
        (a - b).abs() / b.abs()
    }
}

#[test]
fn stage_noise_matches_scipy() {
    let path = format!(
        "{}/tests/reference/data/noise_stage.json",
        env!("CARGO_MANIFEST_DIR")
    );
    let data: File = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    assert_eq!(data.cases.len(), 21);
    let mut unstable_seen = 0;
    for c in &data.cases {
        let n = &c.name;
        let stage = Stage::new(
            c.kind.parse().unwrap(),
            c.r_feedback,
            c.r_gain,
            c.r_plus,
            c.temperature_k,
        )
        .unwrap();
        assert!(
            rel(stage.noise_gain(), c.noise_gain) < DENSITY_REL,
            "{n}: noise gain"
        );
        assert!(
            rel(stage.signal_gain(), c.signal_gain) < DENSITY_REL,
            "{n}: signal gain"
        );
        let amp = AmplifierNoise::new(
            c.voltage_density,
            c.voltage_corner_hz,
            c.current_density,
            c.current_corner_hz,
        )
        .unwrap();
        let response = ClosedLoopResponse::new(stage.noise_gain(), c.gbw_hz, &c.extra_poles_hz);
        if c.unstable {
            let e = response.unwrap_err();
            assert_eq!(
                (e.code(), e.param()),
                ("oscillation", "extra_poles_hz"),
                "{n}"
            );
            unstable_seen += 1;
            continue;
        }
        let h = response.unwrap_or_else(|e| panic!("{n}: {e}"));
        for p in &c.density_points {
            let d = noise_contributions(&stage, &amp, p.frequency_hz).unwrap();
            let f = p.frequency_hz;
            for (key, got) in [
                ("r_feedback", d.r_feedback),
                ("r_gain", d.r_gain),
                ("r_plus", d.r_plus),
                ("amplifier_voltage", d.amplifier_voltage),
                ("amplifier_current_plus", d.amplifier_current_plus),
                ("amplifier_current_minus", d.amplifier_current_minus),
            ] {
                let want = p.contributions[key];
                assert!(
                    rel(got, want) < DENSITY_REL,
                    "{n} at {f} Hz: {key} = {got}, scipy script {want}"
                );
            }
            assert!(rel(d.total, p.total) < DENSITY_REL, "{n} at {f} Hz: total");
            assert!(
                rel(d.input_referred, p.input_referred) < DENSITY_REL,
                "{n} at {f} Hz: input-referred"
            );
            let od = output_noise_density(&stage, &amp, &h, f).unwrap();
            assert!(
                rel(od, p.output_density) < DENSITY_REL,
                "{n} at {f} Hz: output density {od} vs {}",
                p.output_density
            );
        }
        let r =
            integrated_output_noise(&stage, &amp, &h, c.f_low, c.f_high.unwrap_or(f64::INFINITY))
                .unwrap_or_else(|e| panic!("{n}: {e}"));
        let want = c.output_rms.unwrap();
        assert!(
            rel(r.output_rms, want) < INTEGRAL_REL,
            "{n}: output rms {} vs scipy {want}",
            r.output_rms
        );
        assert!(
            rel(r.input_referred_rms, c.input_referred_rms.unwrap()) < INTEGRAL_REL,
            "{n}: input-referred rms"
        );
        assert!(
            rel(r.noise_bandwidth_hz, c.noise_bandwidth_hz.unwrap()) < INTEGRAL_REL,
            "{n}: noise bandwidth"
        );
        assert!(
            rel(r.bandwidth_hz, c.bandwidth_hz.unwrap()) < BANDWIDTH_REL,
            "{n}: -3 dB bandwidth {} vs {:?}",
            r.bandwidth_hz,
            c.bandwidth_hz
        );
        assert!(
            r.relative_error < INTEGRAL_REL,
            "{n}: error estimate {}",
            r.relative_error
        );
    }
    assert_eq!(unstable_seen, 1);
}

#[test]
fn single_pole_white_noise_uses_the_pi_over_2_noise_bandwidth() {
    // The π/2 noise-bandwidth factor for one pole (common practice, e.g.
    // Motchenbacher & Connelly, Low-Noise Electronic System Design, 1993, from
    // memory): 10 nV/√Hz at NG = 10 and GBW = 1 MHz gives
    // 100 nV/√Hz · √(π/2 · 100 kHz) = 39.63 µV rms from the amplifier, and with the
    // 4kTR of 9 kΩ and of 1 kΩ (gain 9) at 300 K, 42.49 µV rms in all.
    let stage = Stage::new("non-inverting".parse().unwrap(), 9e3, 1e3, 0.0, 300.0).unwrap();
    let amp = AmplifierNoise::new(10e-9, 0.0, 0.0, 0.0).unwrap();
    let h = ClosedLoopResponse::new(10.0, 1e6, &[]).unwrap();
    let r = integrated_output_noise(&stage, &amp, &h, 0.0, f64::INFINITY).unwrap();
    let resistors = 4.0 * 1.380649e-23 * 300.0 * (9e3 + 1e3 * 81.0);
    let expected =
        ((100e-9f64).powi(2) + resistors).sqrt() * (std::f64::consts::FRAC_PI_2 * 1e5).sqrt();
    assert!(
        rel(r.output_rms, expected) < 1e-9,
        "{} vs {expected}",
        r.output_rms
    );
    assert!(
        (r.output_rms * 1e6 - 42.49).abs() < 0.005,
        "{}",
        r.output_rms
    );
}
