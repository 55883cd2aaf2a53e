//! The nonlinear area against its committed reference data:
//! - closed-loop series b1, b2, b3 and the equal-output distortion ratios against
//!   sympy's order-by-order series reversion (tests/reference/distortion_series_sympy.py);
//! - the numeric closed-loop spectrum (guarded Newton + short DFT) against
//!   scipy.optimize.brentq + numpy.fft (tests/reference/distortion_harmonics.py),
//!   including amplitudes near the fold where the series no longer holds, and
//!   amplitudes past the fold that must be refused.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::distortion::{
    closed_loop_series, closed_loop_spectrum, feedback_distortion, AmplitudeAt, LoopSolver,
    PowerSeries,
};
use serde::Deserialize;

/// b1, b2, b3 from the closed forms against sympy's exact solution: a few ulps,
/// more where a3·D and 2·a2²·β nearly cancel in b3 (none of the seeded cases do
/// by more than three digits).
const SERIES_REL: f64 = 1e-12;
/// Harmonic amplitudes against numpy's FFT, relative to the fundamental: both
/// solves converge to rounding; the DFT sums differ in order.
const HARMONIC_REL_TO_FUNDAMENTAL: f64 = 1e-11;
/// HD2, HD3 against the oracle, relative.
const HD_REL: f64 = 1e-8;
/// Fold amplitude against numpy.roots, relative.
const FOLD_REL: f64 = 1e-12;

#[derive(Deserialize)]
struct SeriesFile {
    cases: Vec<SeriesCase>,
}

#[derive(Deserialize)]
struct SeriesCase {
    name: String,
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    b1: f64,
    b2: f64,
    b3: f64,
    hd2_ratio_output: f64,
    hd3_ratio_output: f64,
}

#[derive(Deserialize)]
struct HarmonicsFile {
    cases: Vec<HarmonicCase>,
    refused: Vec<RefusedCase>,
}

#[derive(Deserialize)]
struct HarmonicCase {
    name: String,
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude: f64,
    samples: usize,
    fold_amplitude: f64,
    dc: f64,
    harmonics: Vec<f64>,
    hd2: f64,
    hd3: f64,
}

#[derive(Deserialize)]
struct RefusedCase {
    name: String,
    a1: f64,
    a2: f64,
    a3: f64,
    beta: f64,
    amplitude: f64,
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

fn load<T: for<'de> Deserialize<'de>>(file: &str) -> T {
    let path = format!("{}/tests/reference/data/{file}", env!("CARGO_MANIFEST_DIR"));
    serde_json::from_str(&std::fs::read_to_string(&path).expect("reference data present"))
        .expect("valid JSON")
}

#[test]
fn closed_loop_series_matches_sympy_reversion() {
    let data: SeriesFile = load("distortion_series.json");
    assert_eq!(data.cases.len(), 40);
    for c in &data.cases {
        let amp = PowerSeries::new(c.a1, c.a2, c.a3).unwrap();
        let b = closed_loop_series(&amp, c.beta).unwrap();
        for (what, got, want) in [("b1", b.a1, c.b1), ("b2", b.a2, c.b2), ("b3", b.a3, c.b3)] {
            assert!(
                rel(got, want) < SERIES_REL,
                "{}: {what} = {got}, sympy {want}",
                c.name
            );
        }
        let f = feedback_distortion(&amp, c.beta, 1.0, AmplitudeAt::Output).unwrap();
        let r2 = f.hd2_ratio.unwrap();
        let r3 = f.hd3_ratio.unwrap();
        assert!(
            rel(r2, c.hd2_ratio_output.abs()) < SERIES_REL,
            "{}: hd2 ratio {r2} vs {}",
            c.name,
            c.hd2_ratio_output
        );
        assert!(
            rel(r3, c.hd3_ratio_output.abs()) < SERIES_REL,
            "{}: hd3 ratio {r3} vs {}",
            c.name,
            c.hd3_ratio_output
        );
    }
}

#[test]
fn numeric_spectrum_matches_scipy_and_numpy() {
    let data: HarmonicsFile = load("distortion_harmonics.json");
    assert_eq!(data.cases.len(), 24);
    for c in &data.cases {
        let amp = PowerSeries::new(c.a1, c.a2, c.a3).unwrap();
        let solver = LoopSolver::new(&amp, c.beta).unwrap();
        assert!(
            rel(solver.max_input_amplitude(), c.fold_amplitude) < FOLD_REL,
            "{}: fold",
            c.name
        );
        let s = closed_loop_spectrum(&amp, c.beta, c.amplitude, c.samples).unwrap();
        let scale = c.harmonics[0];
        for (h, (got, want)) in s.harmonics.iter().zip(&c.harmonics).enumerate() {
            assert!(
                (got - want).abs() <= HARMONIC_REL_TO_FUNDAMENTAL * scale,
                "{}: harmonic {} = {got}, numpy {want}",
                c.name,
                h + 1
            );
        }
        assert!(
            (s.dc - c.dc).abs() <= HARMONIC_REL_TO_FUNDAMENTAL * scale,
            "{}: dc {} vs {}",
            c.name,
            s.dc,
            c.dc
        );
        assert!(
            rel(s.hd2, c.hd2) < HD_REL,
            "{}: hd2 {} vs {}",
            c.name,
            s.hd2,
            c.hd2
        );
        assert!(
            rel(s.hd3, c.hd3) < HD_REL,
            "{}: hd3 {} vs {}",
            c.name,
            s.hd3,
            c.hd3
        );
    }
}

#[test]
fn amplitudes_past_the_fold_are_refused() {
    let data: HarmonicsFile = load("distortion_harmonics.json");
    for c in &data.refused {
        let amp = PowerSeries::new(c.a1, c.a2, c.a3).unwrap();
        let e = closed_loop_spectrum(&amp, c.beta, c.amplitude, 64).unwrap_err();
        assert_eq!(
            (e.code(), e.param()),
            ("no_convergence", "amplitude"),
            "{}",
            c.name
        );
    }
}

#[test]
fn near_the_fold_the_series_no_longer_holds() {
    // The oracle's strongly nonlinear points (95 % of the fold amplitude) differ
    // from the leading-order series by far more than the small ones (1 %).
    let data: HarmonicsFile = load("distortion_harmonics.json");
    for pair in data.cases.chunks(4) {
        let (small, large) = (&pair[0], &pair[3]);
        let amp = PowerSeries::new(small.a1, small.a2, small.a3).unwrap();
        let b = closed_loop_series(&amp, small.beta).unwrap();
        let series_hd3 = |x: f64| b.a3.abs() * x * x / (4.0 * b.a1.abs());
        let d_small = rel(series_hd3(small.amplitude), small.hd3);
        let d_large = rel(series_hd3(large.amplitude), large.hd3);
        assert!(d_small < 0.01, "{}: {d_small}", small.name);
        assert!(
            d_large > 10.0 * d_small,
            "{}: {d_large} vs {d_small}",
            large.name
        );
    }
}
