//! The circuit noise analysis (adjoint, one solve per frequency) against the
//! numpy superposition oracle `tests/reference/noise_circuit.py` (its own
//! stamps from the same JSON, one solve per source per frequency, scipy quad
//! for the band integrals), on the nine circuits of its data files.

use loopwright::circuit::json::read_circuit;
use loopwright::noise::circuit::{
    band_noise, noise_densities, CurrentSourceNoise, NoiseOutput, NoiseSetup, SourceNoiseKind,
};
use loopwright::stage::NoiseDensity;
use serde_json::Value;

/// Densities and gains: both sides solve the same linear systems exactly up to
/// rounding (LU with pivoting against LAPACK); 1e-8 leaves room for the
/// conditioning of systems with A0 = 10⁶ beside 1 GΩ resistors.
const DENSITY_REL: f64 = 1e-8;
/// Band integrals: our adaptive Gauss–Kronrod stops at 1e-9 per piece
/// (`band::REL_TOL`), scipy's quad at 1e-12; 1e-6 covers both estimates.
const BAND_REL: f64 = 1e-6;

fn cases() -> Vec<Value> {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/data");
    let mut paths: Vec<_> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| {
            p.file_name()
                .unwrap()
                .to_str()
                .unwrap()
                .starts_with("noise_circuit_")
        })
        .collect();
    paths.sort();
    paths
        .iter()
        .map(|p| serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap())
        .collect()
}

fn numbers(v: &Value) -> Vec<f64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

fn setup(case: &Value) -> NoiseSetup {
    let out = &case["output"];
    let output = match out.get("node") {
        Some(n) => NoiseOutput::node(n.as_str().unwrap()),
        None => NoiseOutput::Current {
            element: out["element"].as_str().unwrap().into(),
        },
    };
    let current_noise = case["currentNoise"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| CurrentSourceNoise {
            element: x["element"].as_str().unwrap().into(),
            kind: if x.get("shot").is_some() {
                SourceNoiseKind::Shot
            } else {
                SourceNoiseKind::Density(NoiseDensity {
                    density: x["density"].as_f64().unwrap(),
                    corner_hz: x["cornerHz"].as_f64().unwrap_or(0.0),
                })
            },
        })
        .collect();
    NoiseSetup {
        output,
        temperature_k: case["temperatureK"].as_f64().unwrap(),
        input_source: Some(case["inputSource"].as_str().unwrap().into()),
        amplifier: None,
        current_noise,
    }
}

fn close(got: f64, want: f64, rel: f64, what: &str) {
    let ok = (got - want).abs() <= rel * want.abs() || (want == 0.0 && got.abs() < 1e-30);
    assert!(ok, "{what}: {got:e} vs {want:e}");
}

#[test]
fn at_least_eight_circuits_are_compared() {
    // The brief's list: resistive stages, a feedback capacitor, a photodiode
    // transimpedance stage, an RC input filter, 1/f corners, a current output,
    // two amplifiers.
    assert!(cases().len() >= 8);
}

#[test]
fn densities_contributions_and_gains_match_superposition() {
    for case in cases() {
        let name = case["name"].as_str().unwrap();
        let c = read_circuit(&case["circuit"].to_string()).unwrap();
        let freqs = numbers(&case["frequenciesHz"]);
        let d = noise_densities(&c, &setup(&case), &freqs).unwrap();
        let want_sources = case["sources"].as_object().unwrap();
        assert_eq!(d.sources.len(), want_sources.len(), "{name}: sources");
        let totals = numbers(&case["total"]);
        for s in &d.sources {
            // Oracle: numpy, one solve per source (noise_circuit.py). A
            // contribution whose transfer cancels (Rref of the matched
            // difference stage, 1e-17 of the total) is rounding on both sides:
            // each is compared within DENSITY_REL of the total as well.
            let want = numbers(&want_sources[&s.name]);
            for (i, (&g, &w)) in s.density.iter().zip(&want).enumerate() {
                assert!(
                    (g - w).abs() <= DENSITY_REL * (w + totals[i]),
                    "{name} {} [{i}]: {g:e} vs {w:e}",
                    s.name
                );
            }
        }
        for (key, got) in [
            ("total", &d.total),
            ("signalGain", &d.signal_gain),
            ("inputReferred", &d.input_referred),
            ("noiseGain", &d.noise_gain),
        ] {
            let want = numbers(&case[key]);
            assert_eq!(got.len(), want.len(), "{name} {key}");
            for (i, (&g, &w)) in got.iter().zip(&want).enumerate() {
                close(g, w, DENSITY_REL, &format!("{name} {key}[{i}]"));
            }
        }
    }
}

#[test]
fn band_integrals_match_scipy_quad() {
    for case in cases() {
        let name = case["name"].as_str().unwrap();
        let c = read_circuit(&case["circuit"].to_string()).unwrap();
        let band = numbers(&case["bandHz"]);
        let n = band_noise(&c, &setup(&case), [band[0], band[1]]).unwrap();
        // Oracle: scipy.integrate.quad (noise_circuit.py).
        close(
            n.total_rms,
            case["bandTotalRms"].as_f64().unwrap(),
            BAND_REL,
            &format!("{name} total"),
        );
        close(
            n.input_referred_rms.unwrap(),
            case["bandInputReferredRms"].as_f64().unwrap(),
            BAND_REL,
            &format!("{name} input-referred"),
        );
        for s in &n.sources {
            let want = case["bandSourceRms"][&s.name].as_f64().unwrap();
            // A source far below the total is integrated to an absolute
            // tolerance of REL_TOL × the total (band.rs): compare it so.
            let slack = BAND_REL * n.total_rms;
            assert!(
                (s.rms - want).abs() <= BAND_REL * want + slack * slack / want.max(1e-300),
                "{name} {}: {:e} vs {want:e}",
                s.name,
                s.rms
            );
        }
    }
}

#[test]
fn transimpedance_table_beside_numpy() {
    // The photodiode transimpedance stage of noise_circuit.py: our densities and
    // band contributions printed beside numpy's (`cargo test --test
    // noise_circuit_reference transimpedance -- --nocapture`), each within the
    // tolerances above.
    let case = cases()
        .into_iter()
        .find(|c| c["name"] == "transimpedance")
        .unwrap();
    let c = read_circuit(&case["circuit"].to_string()).unwrap();
    let freqs = numbers(&case["frequenciesHz"]);
    let d = noise_densities(&c, &setup(&case), &freqs).unwrap();
    let want_total = numbers(&case["total"]);
    let ng = numbers(&case["noiseGain"]);
    println!("f (Hz)      total ours   total numpy  |NG| ours  |NG| numpy   shares (ours): Rf, U1.en, Ipd");
    for i in (0..freqs.len()).step_by(4) {
        let share = |n: &str| {
            d.sources
                .iter()
                .find(|s| s.name == n)
                .map_or(0.0, |s| s.share[i])
        };
        println!(
            "{:<10.3e}  {:.5e}  {:.5e}  {:9.4}  {:9.4}   {:5.1} % {:5.1} % {:5.1} %",
            freqs[i],
            d.total[i],
            want_total[i],
            d.noise_gain[i],
            ng[i],
            100.0 * share("Rf"),
            100.0 * share("U1.en"),
            100.0 * share("Ipd")
        );
        close(d.total[i], want_total[i], DENSITY_REL, "total");
        close(d.noise_gain[i], ng[i], DENSITY_REL, "noise gain");
    }
    let band = numbers(&case["bandHz"]);
    let n = band_noise(&c, &setup(&case), [band[0], band[1]]).unwrap();
    let want = case["bandTotalRms"].as_f64().unwrap();
    println!(
        "band {}…{} Hz: total {:.6e} V rms (numpy {:.6e}), {} solves",
        band[0], band[1], n.total_rms, want, n.evaluations
    );
    close(n.total_rms, want, BAND_REL, "band total");
    for s in &n.sources {
        let w = case["bandSourceRms"][&s.name].as_f64().unwrap();
        println!(
            "  {:<7} {:.6e} V rms (numpy {:.6e})  share {:6.2} %",
            s.name,
            s.rms,
            w,
            100.0 * s.share
        );
    }
    let peak = d.noise_gain_peak.unwrap();
    println!(
        "noise gain peak {:.3} at {:.4e} Hz, {:.2}× its value at {} Hz",
        peak.value, peak.frequency_hz, peak.over_lowest, freqs[0]
    );
}
