//! Browser tests of the distortion and noise JS API (src/wasm/distortion.rs,
//! src/wasm/noise.rs): values, structured results, typed arrays and thrown errors.
#![cfg(target_arch = "wasm32")]

use js_sys::Float64Array;
use loopwright::wasm::{distortion, noise};
use wasm_bindgen::{JsCast, JsValue};
use wasm_bindgen_test::*;

wasm_bindgen_test_configure!(run_in_browser);

#[path = "support/js.rs"]
mod js;
use js::{checked, field, num};

fn error_code_param(e: JsValue) -> (String, String) {
    (
        field(&e, "code").as_string().unwrap(),
        field(&e, "param").as_string().unwrap(),
    )
}

#[wasm_bindgen_test]
fn closed_loop_series_and_ratios() {
    // b1 = a1/D, b2 = a2/D³ (Gray, Hurst, Lewis & Meyer, 5th ed., ch. 8, from memory).
    let b = distortion::closed_loop_series(1000.0, 200.0, -50.0, 0.099).unwrap();
    assert!((num(&b, "a1") - 10.0).abs() < 1e-12);
    assert!((num(&b, "a2") - 2e-4).abs() < 1e-18);
    let f = distortion::feedback_distortion(1000.0, 0.0, -100.0, 0.099, 1.0, "output").unwrap();
    assert!((num(&f, "hd3Ratio") - 0.01).abs() < 1e-15);
    assert!(field(&f, "hd2Ratio").is_null());
    assert_eq!(field(&f, "amplitudeAt").as_string().unwrap(), "output");
    assert!((num(&field(&f, "closedSeries"), "a1") - 10.0).abs() < 1e-12);
    let open = field(&f, "open");
    assert!((num(&open, "outputAmplitude") - 1.0).abs() < 1e-15);
}

#[wasm_bindgen_test]
fn numeric_path_agrees_with_the_series_at_small_amplitude() {
    let c = distortion::series_check(1000.0, 100.0, -200.0, 0.009, 1e-3, 64).unwrap();
    assert!(num(&c, "hd2Difference") < 1e-3 && num(&c, "hd3Difference") < 1e-3);
    let s = distortion::closed_loop_spectrum(1000.0, 100.0, -200.0, 0.009, 1e-3, 64).unwrap();
    let harmonics: js_sys::Array = field(&s, "harmonics").dyn_into().unwrap();
    assert_eq!(harmonics.length(), 5);
    assert!((harmonics.get(0).as_f64().unwrap() - 0.1).abs() < 1e-5);
    let y = checked(distortion::closed_loop_output(
        1000.0, 0.0, -1000.0, 0.01, 0.05,
    ))
    .unwrap();
    // The loop equation y = A(x − β·y) holds at the answer.
    let u = 0.05 - 0.01 * y;
    assert!((y - (1000.0 * u - 1000.0 * u * u * u)).abs() < 1e-12);
}

#[wasm_bindgen_test]
fn validity_sweep_returns_typed_arrays_and_the_fold() {
    let s = distortion::series_validity_sweep(100.0, 0.0, -100.0, 0.1, 1e-3, 10.0, 30, 0.1, 64)
        .unwrap();
    let amps: Float64Array = field(&s, "amplitudes").dyn_into().unwrap();
    let hd3: Float64Array = field(&s, "numericHd3").dyn_into().unwrap();
    assert!(amps.length() > 2 && amps.length() < 30);
    assert_eq!(hd3.length(), amps.length());
    let fold = num(&s, "foldAmplitude");
    assert!(amps.to_vec().iter().all(|&x| x < fold));
    assert!(num(&s, "hd3LimitAmplitude") < fold);
    assert_eq!(field(&s, "hd3HoldsThroughout").as_bool(), Some(false));
}

#[wasm_bindgen_test]
fn distortion_errors_are_thrown_with_code_and_param() {
    let e = distortion::closed_loop_spectrum(100.0, 0.0, -100.0, 0.1, 5.0, 64).unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("no_convergence".into(), "amplitude".into())
    );
    let e = distortion::feedback_distortion(100.0, 1.0, 1.0, 0.01, 1.0, "peak").unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("unknown_name".into(), "amplitudeAt".into())
    );
    let e = distortion::closed_loop_series(f64::NAN, 1.0, 1.0, 0.1).unwrap_err();
    assert_eq!(error_code_param(e), ("not_finite".into(), "a1".into()));
    let e = distortion::closed_loop_spectrum(100.0, 0.0, -100.0, 0.1, 0.1, 100_000).unwrap_err();
    assert_eq!(error_code_param(e), ("too_large".into(), "samples".into()));
}

#[wasm_bindgen_test]
fn slew_rate_limits() {
    // Common practice, no source: 0.5 V/µs at 10 V peak gives about 8 kHz.
    let f = checked(distortion::full_power_bandwidth(0.5e6, 10.0)).unwrap();
    assert!((f - 7957.747).abs() < 1e-3);
    let v = checked(distortion::max_undistorted_amplitude(0.5e6, f)).unwrap();
    assert!((v - 10.0).abs() < 1e-12);
    assert!((checked(distortion::required_slew_rate(10.0, f)).unwrap() - 0.5e6).abs() < 1e-6);
    let e = checked(distortion::full_power_bandwidth(0.5e6, -1.0)).unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("out_of_domain".into(), "vPeak".into())
    );
}

#[wasm_bindgen_test]
fn thermal_noise_of_one_kilohm() {
    // Common practice, no source: 1 kΩ at 300 K ≈ 4.07 nV/√Hz.
    let e = checked(noise::thermal_noise_density(1e3, 300.0)).unwrap();
    assert!((e * 1e9 - 4.07).abs() < 0.005);
    let err = checked(noise::thermal_noise_density(1e3, -1.0)).unwrap_err();
    assert_eq!(
        error_code_param(err),
        ("out_of_domain".into(), "temperatureK".into())
    );
}

#[wasm_bindgen_test]
fn stage_noise_integrates_over_the_single_pole_noise_bandwidth() {
    // π/2·f_c noise bandwidth for one pole: 10 nV/√Hz, NG = 10, GBW = 1 MHz,
    // plus 4kTR of 9 kΩ and 1 kΩ: 42.49 µV rms (see tests/noise_reference.rs).
    let r = noise::integrated_noise(
        "non-inverting",
        9e3,
        1e3,
        0.0,
        300.0,
        10e-9,
        0.0,
        0.0,
        0.0,
        1e6,
        &[],
        0.0,
        f64::INFINITY,
    )
    .unwrap();
    assert!((num(&r, "outputRms") * 1e6 - 42.49).abs() < 0.005);
    assert!((num(&r, "outputRms") / num(&r, "singlePoleEstimateRms") - 1.0).abs() < 1e-9);
    assert!((num(&r, "noiseBandwidthHz") / (std::f64::consts::FRAC_PI_2 * 1e5) - 1.0).abs() < 1e-9);
    assert!(field(&r, "fHigh").is_null());
    let c = noise::stage_noise_contributions(
        "inverting",
        10e3,
        1e3,
        0.0,
        300.0,
        5e-9,
        0.0,
        1e-12,
        0.0,
        1e3,
    )
    .unwrap();
    assert_eq!(num(&c, "signalGain"), -10.0);
    assert!((num(&c, "amplifierCurrentMinus") - 1e-12 * 10e3).abs() < 1e-24);
}

#[wasm_bindgen_test]
fn noise_sweep_and_errors() {
    let w = noise::noise_density_sweep(
        "inverting",
        10e3,
        1e3,
        0.0,
        300.0,
        5e-9,
        5.0,
        1e-12,
        50.0,
        5e6,
        &[2e6],
        1.0,
        1e7,
        71,
    )
    .unwrap();
    let f: Float64Array = field(&w, "frequencies").dyn_into().unwrap();
    let d: Float64Array = field(&w, "outputDensity").dyn_into().unwrap();
    assert_eq!((f.length(), d.length()), (71, 71));
    // Above the closed-loop bandwidth the density falls.
    assert!(d.get_index(70) < d.get_index(40));
    let e = noise::integrated_noise(
        "inverting",
        1e3,
        1e3,
        0.0,
        300.0,
        5e-9,
        0.0,
        0.0,
        0.0,
        20e6,
        &[3e6, 4e6],
        0.0,
        f64::INFINITY,
    )
    .unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("oscillation".into(), "extraPolesHz".into())
    );
    let e = noise::integrated_noise(
        "inverting",
        1e3,
        1e3,
        0.0,
        300.0,
        -5e-9,
        0.0,
        0.0,
        0.0,
        20e6,
        &[],
        0.0,
        1e3,
    )
    .unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("out_of_domain".into(), "voltageDensity".into())
    );
    let e = noise::integrated_noise(
        "buffer",
        1e3,
        1e3,
        0.0,
        300.0,
        5e-9,
        0.0,
        0.0,
        0.0,
        20e6,
        &[],
        0.0,
        1e3,
    )
    .unwrap_err();
    assert_eq!(error_code_param(e), ("unknown_name".into(), "kind".into()));
}
