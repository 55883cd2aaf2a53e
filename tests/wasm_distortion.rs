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

/// A plain JS object of number fields, plus `extra` fields of any value.
fn obj(nums: &[(&str, f64)], extra: &[(&str, JsValue)]) -> JsValue {
    let o = js_sys::Object::new();
    for (k, v) in nums {
        js_sys::Reflect::set(&o, &(*k).into(), &(*v).into()).unwrap();
    }
    for (k, v) in extra {
        js_sys::Reflect::set(&o, &(*k).into(), v).unwrap();
    }
    o.into()
}

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
    let f = distortion::feedback_distortion(obj(
        &[
            ("a1", 1000.0),
            ("a2", 0.0),
            ("a3", -100.0),
            ("beta", 0.099),
            ("amplitude", 1.0),
        ],
        &[("amplitudeAt", "output".into())],
    ))
    .unwrap();
    assert!((num(&f, "hd3Ratio") - 0.01).abs() < 1e-15);
    assert!(field(&f, "hd2Ratio").is_null());
    assert_eq!(field(&f, "amplitudeAt").as_string().unwrap(), "output");
    assert!((num(&field(&f, "closedSeries"), "a1") - 10.0).abs() < 1e-12);
    let open = field(&f, "open");
    assert!((num(&open, "outputAmplitude") - 1.0).abs() < 1e-15);
}

#[wasm_bindgen_test]
fn distortion_at_a_signal_frequency_uses_the_loop_gain_there() {
    // Issue 15, item 11: a1·β = 4167 with a 12 Hz pole is |T| ≈ 50 at 1 kHz
    // (4167/√(1 + (1000/12)²) = 49.997, closed form); the time-domain oracle is in
    // tests/distortion_reference.rs.
    let r = distortion::distortion_at_frequency(obj(
        &[
            ("a1", 4.167e5),
            ("a2", 1e8),
            ("a3", -2e12),
            ("beta", 0.01),
            ("amplitude", 1.0),
            ("poleHz", 12.0),
            ("frequencyHz", 1e3),
        ],
        &[],
    ))
    .unwrap();
    let gains = js_sys::Array::from(&field(&r, "loopGains"));
    assert_eq!(gains.length(), 3);
    let t1 = gains.get(0);
    let want = 4167.0 / (1.0 + (1000.0f64 / 12.0).powi(2)).sqrt();
    assert!((num(&t1, "magnitude") / want - 1.0).abs() < 1e-12);
    assert!((num(&t1, "phaseDeg") + (1000.0f64 / 12.0).atan().to_degrees()).abs() < 1e-9);
    assert!(num(&field(&r, "closed"), "hd2") > 40.0 * num(&field(&r, "closedAtDc"), "hd2"));
    let e = distortion::distortion_at_frequency(obj(
        &[
            ("a1", 1e3),
            ("a2", 0.0),
            ("a3", 0.0),
            ("beta", 0.01),
            ("amplitude", 1.0),
        ],
        &[("frequencyHz", 1e3.into()), ("poleHz", (-1.0).into())],
    ))
    .unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("out_of_domain".into(), "poleHz".into())
    );
}

#[wasm_bindgen_test]
fn numeric_path_agrees_with_the_series_at_small_amplitude() {
    let loop_at = |amplitude: f64, samples: f64| {
        obj(
            &[
                ("a1", 1000.0),
                ("a2", 100.0),
                ("a3", -200.0),
                ("beta", 0.009),
                ("amplitude", amplitude),
                ("samples", samples),
            ],
            &[],
        )
    };
    let c = distortion::series_check(loop_at(1e-3, 64.0)).unwrap();
    assert!(num(&c, "hd2Difference") < 1e-3 && num(&c, "hd3Difference") < 1e-3);
    let s = distortion::closed_loop_spectrum(loop_at(1e-3, 64.0)).unwrap();
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
    let s = distortion::series_validity_sweep(obj(
        &[
            ("a1", 100.0),
            ("a2", 0.0),
            ("a3", -100.0),
            ("beta", 0.1),
            ("amplitudeMin", 1e-3),
            ("amplitudeMax", 10.0),
            ("points", 30.0),
            ("tolerance", 0.1),
            ("samples", 64.0),
        ],
        &[],
    ))
    .unwrap();
    let amps: Float64Array = field(&s, "amplitudes").dyn_into().unwrap();
    let hd3: Float64Array = field(&s, "numericHd3").dyn_into().unwrap();
    assert!(amps.length() > 2 && amps.length() < 30);
    assert_eq!(hd3.length(), amps.length());
    let fold = num(&s, "foldAmplitude");
    assert!(amps.to_vec().iter().all(|&x| x < fold));
    assert!(num(&s, "hd3LimitAmplitude") < fold);
    assert_eq!(field(&s, "hd3HoldsThroughout").as_bool(), Some(false));
    // The core's stated rounding floor of the numeric path (src/distortion/validity.rs).
    assert_eq!(num(&s, "numericFloor"), 1e-12);
}

#[wasm_bindgen_test]
fn distortion_errors_are_thrown_with_code_and_param() {
    let spectrum = |amplitude: f64, samples: f64| {
        distortion::closed_loop_spectrum(obj(
            &[
                ("a1", 100.0),
                ("a2", 0.0),
                ("a3", -100.0),
                ("beta", 0.1),
                ("amplitude", amplitude),
                ("samples", samples),
            ],
            &[],
        ))
    };
    let e = spectrum(5.0, 64.0).unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("no_convergence".into(), "amplitude".into())
    );
    let e = distortion::feedback_distortion(obj(
        &[
            ("a1", 100.0),
            ("a2", 1.0),
            ("a3", 1.0),
            ("beta", 0.01),
            ("amplitude", 1.0),
        ],
        &[("amplitudeAt", "peak".into())],
    ))
    .unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("unknown_name".into(), "amplitudeAt".into())
    );
    // Loop gain −10 (D = −9): latching, refused by the shared classification.
    let e = distortion::feedback_distortion(obj(
        &[
            ("a1", 1e5),
            ("a2", 1.0),
            ("a3", 1.0),
            ("beta", -1e-4),
            ("amplitude", 1.0),
        ],
        &[],
    ))
    .unwrap_err();
    assert_eq!(error_code_param(e), ("out_of_domain".into(), "beta".into()));
    let e = distortion::closed_loop_series(f64::NAN, 1.0, 1.0, 0.1).unwrap_err();
    assert_eq!(error_code_param(e), ("not_finite".into(), "a1".into()));
    let e = spectrum(0.1, 100_000.0).unwrap_err();
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
    let r = noise::integrated_noise(obj(
        &[
            ("rFeedback", 9e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", 10e-9),
            ("voltageCornerHz", 0.0),
            ("currentDensity", 0.0),
            ("currentCornerHz", 0.0),
            ("gbwHz", 1e6),
            ("fLow", 0.0),
        ],
        &[("kind", "non-inverting".into())],
    ))
    .unwrap();
    assert!((num(&r, "outputRms") * 1e6 - 42.49).abs() < 0.005);
    assert!((num(&r, "outputRms") / num(&r, "singlePoleEstimateRms") - 1.0).abs() < 1e-9);
    assert!((num(&r, "noiseBandwidthHz") / (std::f64::consts::FRAC_PI_2 * 1e5) - 1.0).abs() < 1e-9);
    assert!(field(&r, "fHigh").is_null());
    // Issue 15, item 10: with an upper edge the noise bandwidth is that of the
    // band, fc·atan(B/fc) (integral of the Lorentzian), not π/2·fc.
    let band = noise::integrated_noise(obj(
        &[
            ("rFeedback", 9e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", 10e-9),
            ("voltageCornerHz", 0.0),
            ("currentDensity", 0.0),
            ("currentCornerHz", 0.0),
            ("gbwHz", 1e6),
            ("fLow", 0.0),
            ("fHigh", 1e4),
        ],
        &[("kind", "non-inverting".into())],
    ))
    .unwrap();
    assert!((num(&band, "noiseBandwidthHz") / (1e5 * 0.1f64.atan()) - 1.0).abs() < 1e-9);
    assert_eq!(num(&band, "fHigh"), 1e4);
    let c = noise::stage_noise_contributions(obj(
        &[
            ("rFeedback", 10e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", 5e-9),
            ("voltageCornerHz", 0.0),
            ("currentDensity", 1e-12),
            ("currentCornerHz", 0.0),
            ("frequencyHz", 1e3),
        ],
        &[("kind", "inverting".into())],
    ))
    .unwrap();
    assert_eq!(num(&c, "signalGain"), -10.0);
    assert!((num(&c, "amplifierCurrentMinus") - 1e-12 * 10e3).abs() < 1e-24);
}

#[wasm_bindgen_test]
fn noise_sweep_and_errors() {
    let poles: JsValue = js_sys::Array::of1(&2e6.into()).into();
    let w = noise::noise_density_sweep(obj(
        &[
            ("rFeedback", 10e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", 5e-9),
            ("voltageCornerHz", 5.0),
            ("currentDensity", 1e-12),
            ("currentCornerHz", 50.0),
            ("gbwHz", 5e6),
            ("fStart", 1.0),
            ("fStop", 1e7),
            ("points", 71.0),
        ],
        &[("kind", "inverting".into()), ("extraPolesHz", poles)],
    ))
    .unwrap();
    let f: Float64Array = field(&w, "frequencies").dyn_into().unwrap();
    let d: Float64Array = field(&w, "outputDensity").dyn_into().unwrap();
    assert_eq!((f.length(), d.length()), (71, 71));
    // Above the closed-loop bandwidth the density falls.
    assert!(d.get_index(70) < d.get_index(40));
    let poles: JsValue = js_sys::Array::of2(&3e6.into(), &4e6.into()).into();
    let e = noise::integrated_noise(obj(
        &[
            ("rFeedback", 1e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", 5e-9),
            ("voltageCornerHz", 0.0),
            ("currentDensity", 0.0),
            ("currentCornerHz", 0.0),
            ("gbwHz", 20e6),
            ("fLow", 0.0),
        ],
        &[("kind", "inverting".into()), ("extraPolesHz", poles)],
    ))
    .unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("oscillation".into(), "extraPolesHz".into())
    );
    let e = noise::integrated_noise(obj(
        &[
            ("rFeedback", 1e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", -5e-9),
            ("voltageCornerHz", 0.0),
            ("currentDensity", 0.0),
            ("currentCornerHz", 0.0),
            ("gbwHz", 20e6),
            ("fLow", 0.0),
            ("fHigh", 1e3),
        ],
        &[("kind", "inverting".into())],
    ))
    .unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("out_of_domain".into(), "voltageDensity".into())
    );
    // A field of another export is refused by name.
    let e = noise::integrated_noise(obj(
        &[
            ("rFeedback", 1e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", 5e-9),
            ("voltageCornerHz", 0.0),
            ("currentDensity", 0.0),
            ("currentCornerHz", 0.0),
            ("gbwHz", 20e6),
            ("fLow", 0.0),
            ("fStop", 1e3),
        ],
        &[("kind", "inverting".into())],
    ))
    .unwrap_err();
    assert_eq!(
        error_code_param(e),
        ("unknown_field".into(), "fStop".into())
    );
    let e = noise::integrated_noise(obj(
        &[
            ("rFeedback", 1e3),
            ("rGain", 1e3),
            ("rPlus", 0.0),
            ("temperatureK", 300.0),
            ("voltageDensity", 5e-9),
            ("voltageCornerHz", 0.0),
            ("currentDensity", 0.0),
            ("currentCornerHz", 0.0),
            ("gbwHz", 20e6),
            ("fLow", 0.0),
            ("fHigh", 1e3),
        ],
        &[("kind", "buffer".into())],
    ))
    .unwrap_err();
    assert_eq!(error_code_param(e), ("unknown_name".into(), "kind".into()));
}
