//! Facts of the trade, identities and bad input of the circuit noise analysis
//! (`loopwright::noise::circuit`).

use loopwright::circuit::json::read_circuit;
use loopwright::circuit::Circuit;
use loopwright::noise::circuit::{
    band_noise, noise_densities, CurrentSourceNoise, NoiseOutput, NoiseSetup, SourceNoiseKind,
};
use loopwright::stage::{Amplifier, NoiseDensity, Spread, SpreadPoint};
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};
use std::f64::consts::PI;

fn runner(cases: u32) -> TestRunner {
    // Explicit seed: the same cases on every run.
    TestRunner::new_with_rng(
        Config {
            cases,
            ..Config::default()
        },
        TestRng::from_seed(RngAlgorithm::ChaCha, &[19u8; 32]),
    )
}

/// A transimpedance stage: sensor capacitance `cs` and current source Ipd at
/// the inverting input, Rf ‖ Cf in feedback, an amplifier of `gbw`.
fn transimpedance(cs: f64, cf: f64, gbw: f64) -> Circuit {
    let mut c = Circuit::new();
    c.current_source("Ipd", "0", "inv", 1e-7).unwrap();
    c.capacitor("Cs", "inv", "0", cs).unwrap();
    c.resistor("Rf", "out", "inv", 1e6).unwrap();
    c.capacitor("Cf", "out", "inv", cf).unwrap();
    let mut a = Amplifier::from_gbw(Spread::fixed(1e6), gbw);
    a.voltage_noise = Some(NoiseDensity {
        density: 5e-9,
        corner_hz: 0.0,
    });
    c.amplifier("U1", "out", "0", "0", "inv", a, SpreadPoint::Typ)
        .unwrap();
    c
}

#[test]
fn one_kilohm_at_300_kelvin_is_4_07_nv() {
    // Fact of the trade: √(4kTR) for 1 kΩ at 300 K ≈ 4.07 nV/√Hz (any
    // low-noise design text, e.g. Motchenbacher & Connelly, 1993, from memory).
    let mut c = Circuit::new();
    c.resistor("R1", "a", "0", 1e3).unwrap();
    let d = noise_densities(&c, &NoiseSetup::at_node("a", 300.0), &[1.0, 1e6]).unwrap();
    for v in d.total {
        assert!((v - 4.07e-9).abs() < 0.005e-9, "{v:e}");
    }
}

#[test]
fn noise_bandwidth_of_a_single_pole_is_pi_over_two_times_f3db() {
    // Fact of the trade: a single pole's noise bandwidth is π/2·f−3dB (common
    // practice, no source). R ‖ C to ground: N² = 4kTR·NBW; over 0…10⁹·fc the
    // band misses fc/10⁹ of it (∫ above 10⁹fc of 1/(1+(f/fc)²) ≈ fc·10⁻⁹).
    let (r, cap) = (10e3, 1e-9);
    let fc = 1.0 / (2.0 * PI * r * cap);
    let mut c = Circuit::new();
    c.resistor("R1", "a", "0", r).unwrap();
    c.capacitor("C1", "a", "0", cap).unwrap();
    let n = band_noise(&c, &NoiseSetup::at_node("a", 300.0), [0.0, 1e9 * fc]).unwrap();
    let nbw = n.total_rms.powi(2) / (4.0 * 1.380649e-23 * 300.0 * r);
    assert!(
        (nbw / (PI / 2.0 * fc) - 1.0).abs() < 1e-6,
        "{nbw} vs {}",
        PI / 2.0 * fc
    );
}

#[test]
fn transimpedance_noise_gain_rises_to_one_plus_cin_over_cf() {
    // Fact of the trade: above the feedback pole 1/(2π·Rf·Cf) and below the
    // loop's crossover, a transimpedance stage's noise gain is 1 + Cin/Cf
    // (e.g. J. Graeme, *Photodiode Amplifiers*, 1996, from memory). Cs = 100 pF,
    // Cf = 2 pF: 51. At 2 MHz the feedback pole (80 kHz) leaves (0.08/2)²/2 of
    // it and a 100 GHz GBW a loop error 1/T ≈ 51·2 MHz/100 GHz ≈ 0.1 %: 0.5 %.
    let c = transimpedance(100e-12, 2e-12, 100e9);
    let mut setup = NoiseSetup::at_node("out", 300.0);
    setup.input_source = Some("Ipd".into());
    let d = noise_densities(&c, &setup, &[1.0, 2e6]).unwrap();
    assert!((d.noise_gain[0] - 1.0).abs() < 1e-3, "{}", d.noise_gain[0]);
    assert!(
        (d.noise_gain[1] / 51.0 - 1.0).abs() < 5e-3,
        "{}",
        d.noise_gain[1]
    );
    // With a real amplifier (20 MHz) the noise gain peaks below its crossover
    // and falls away: the peak is found between the two ends.
    let c = transimpedance(100e-12, 2e-12, 20e6);
    let f: Vec<f64> = (0..=70).map(|k| 10f64.powf(k as f64 / 10.0)).collect();
    let d = noise_densities(&c, &setup, &f).unwrap();
    let peak = d.noise_gain_peak.unwrap();
    assert!(
        peak.frequency_hz > 1e4 && peak.frequency_hz < 1e7,
        "{peak:?}"
    );
    assert!(peak.over_lowest > 30.0 && peak.value < 60.0, "{peak:?}");
    // Low-frequency transimpedance gain Rf (definition of the stage).
    assert!((d.signal_gain[0] / 1e6 - 1.0).abs() < 1e-4);
}

#[test]
fn shot_noise_of_a_photodiode_is_2qi() {
    // Schottky's shot noise √(2qI) (from memory): 100 nA gives 178.98 fA/√Hz;
    // at low frequency it reaches the output through Rf = 1 MΩ.
    let c = transimpedance(100e-12, 2e-12, 20e6);
    let mut setup = NoiseSetup::at_node("out", 300.0);
    setup.current_noise.push(CurrentSourceNoise {
        element: "Ipd".into(),
        kind: SourceNoiseKind::Shot,
    });
    let d = noise_densities(&c, &setup, &[1.0]).unwrap();
    let ipd = d.sources.iter().find(|s| s.name == "Ipd").unwrap();
    let want = (2.0 * 1.602176634e-19 * 1e-7f64).sqrt() * 1e6;
    assert!(
        (ipd.density[0] / want - 1.0).abs() < 1e-4,
        "{:e}",
        ipd.density[0]
    );
}

/// A random resistive ladder driving a non-inverting amplifier (Ro = 0, no
/// input parts: its gain block does not depend on the impedances) with a
/// resistive feedback divider and capacitors at the ladder nodes.
fn ladder(rs: &[f64], cs: &[f64], rf: f64, rg: f64, k: f64) -> Circuit {
    let mut c = Circuit::new();
    c.voltage_source("Vs", "n0", "0", 0.0).unwrap();
    for (i, (&r, &cap)) in rs.iter().zip(cs).enumerate() {
        let (a, b) = (format!("n{i}"), format!("n{}", i + 1));
        c.resistor(&format!("R{i}"), &a, &b, r * k).unwrap();
        c.capacitor(&format!("C{i}"), &b, "0", cap / k).unwrap();
    }
    let top = format!("n{}", rs.len());
    let mut a = Amplifier::from_gbw(Spread::fixed(1e6), 10e6);
    a.voltage_noise = Some(NoiseDensity {
        density: 3e-9,
        corner_hz: 10.0,
    });
    a.current_noise = Some(NoiseDensity {
        density: 1e-12,
        corner_hz: 0.0,
    });
    c.amplifier("U1", "out", "0", &top, "fb", a, SpreadPoint::Typ)
        .unwrap();
    c.resistor("Rf", "out", "fb", rf * k).unwrap();
    c.resistor("Rg", "fb", "0", rg * k).unwrap();
    c
}

fn decade(lo: f64, hi: f64) -> impl Strategy<Value = f64> {
    (lo.log10()..hi.log10()).prop_map(|e| 10f64.powf(e))
}

#[test]
fn contributions_add_in_power_and_resistor_noise_scales_as_root_k() {
    // Identities: uncorrelated sources add in power (Σ dₖ² = total², shares sum
    // to 1); scaling every R by k and every C by 1/k keeps every voltage
    // ratio of the network (each RC product is unchanged), so each resistor's
    // noise voltage √(4kTR) and its output density scale by √k, the
    // amplifier's voltage noise stays and its current noise, flowing into
    // impedances k times larger, scales by k.
    let strategy = (
        proptest::collection::vec(decade(10.0, 1e5), 1..5),
        proptest::collection::vec(decade(1e-12, 1e-7), 5),
        decade(100.0, 1e5),
        decade(100.0, 1e5),
        decade(0.01, 100.0),
    );
    runner(48)
        .run(&strategy, |(rs, cs, rf, rg, k)| {
            let f = [3.0, 1e3, 2e5];
            let setup = NoiseSetup::at_node("out", 300.0);
            let base = noise_densities(&ladder(&rs, &cs, rf, rg, 1.0), &setup, &f).unwrap();
            let scaled = noise_densities(&ladder(&rs, &cs, rf, rg, k), &setup, &f).unwrap();
            for (i, fi) in f.iter().enumerate() {
                let power: f64 = base.sources.iter().map(|s| s.density[i].powi(2)).sum();
                let share: f64 = base.sources.iter().map(|s| s.share[i]).sum();
                prop_assert!((power.sqrt() / base.total[i] - 1.0).abs() < 1e-12);
                prop_assert!((share - 1.0).abs() < 1e-12);
                for (a, b) in base.sources.iter().zip(&scaled.sources) {
                    let want = if a.name.starts_with('R') {
                        a.density[i] * k.sqrt()
                    } else if a.name == "U1.en" {
                        a.density[i]
                    } else {
                        // Current noise into impedances scaled by k.
                        a.density[i] * k
                    };
                    prop_assert!(
                        (b.density[i] - want).abs() <= 1e-9 * want + 1e-30,
                        "{} at {} Hz: {:e} vs {want:e}",
                        a.name,
                        fi,
                        b.density[i]
                    );
                }
            }
            Ok(())
        })
        .unwrap();
}

#[test]
fn bad_input_is_a_typed_error_naming_the_field() {
    let c = transimpedance(100e-12, 2e-12, 20e6);
    let f = [1e3];
    let setup = NoiseSetup::at_node("out", 300.0);
    let err = |s: &NoiseSetup| noise_densities(&c, s, &f).unwrap_err();
    let e = err(&NoiseSetup::at_node("out", -1.0));
    assert_eq!(
        (e.error.code(), e.error.param()),
        ("out_of_domain", "temperature_k")
    );
    let e = err(&NoiseSetup::at_node("nowhere", 300.0));
    assert_eq!(
        (e.error.code(), e.error.param(), e.name.as_str()),
        ("unknown_name", "output", "nowhere")
    );
    let mut s = setup.clone();
    s.output = NoiseOutput::Current {
        element: "Ipd".into(),
    };
    assert_eq!(err(&s).error.param(), "output");
    let mut s = setup.clone();
    s.current_noise.push(CurrentSourceNoise {
        element: "Ipd".into(),
        kind: SourceNoiseKind::Density(NoiseDensity {
            density: -1e-12,
            corner_hz: 0.0,
        }),
    });
    let e = err(&s);
    assert_eq!((e.error.param(), e.name.as_str()), ("current_noise", "Ipd"));
    let mut s = setup.clone();
    s.current_noise.push(CurrentSourceNoise {
        element: "Rf".into(),
        kind: SourceNoiseKind::Shot,
    });
    assert_eq!(err(&s).error.param(), "current_noise");
    let mut s = setup.clone();
    s.input_source = Some("Rf".into());
    assert_eq!(err(&s).error.param(), "input_source");
    let mut s = setup.clone();
    s.amplifier = Some("Rf".into());
    assert_eq!(err(&s).error.param(), "amplifier");
    for bad in [[10.0, 1.0], [-1.0, 10.0], [1.0, f64::INFINITY], [5.0, 5.0]] {
        let e = band_noise(&c, &setup, bad).unwrap_err();
        assert_eq!(e.error.param(), "band_hz", "{bad:?}");
    }
    // A band too narrow for log pieces is integrated in f: no failure.
    let tiny = band_noise(&c, &setup, [0.0, 1e-300]).unwrap();
    assert!(tiny.total_rms > 0.0 && tiny.total_rms < 1e-150);
    for bad in [0.0, -3.0, f64::NAN] {
        let e = noise_densities(&c, &setup, &[bad]).unwrap_err();
        assert_eq!(e.error.param(), "frequencies_hz", "{bad}");
    }
    assert_eq!(
        noise_densities(&c, &setup, &[]).unwrap_err().error.param(),
        "frequencies_hz"
    );
    // A 1/f corner and a band from 0 Hz: the integral does not exist.
    let flicker = read_circuit(
        r#"{"format":"loopwright-circuit","version":2,"elements":[
        {"name":"U1","kind":"amplifier","nodes":["out","0"],"control":["0","out"],
         "model":{"a0":1e5,"gbwHz":1e6,"voltageNoise":{"density":1e-9,"cornerHz":10}}}]}"#,
    )
    .unwrap();
    let e = band_noise(&flicker, &NoiseSetup::at_node("out", 300.0), [0.0, 1e3]).unwrap_err();
    assert_eq!(e.error.param(), "band_hz");
    // A negative density in the document is refused when it is read.
    let e = read_circuit(
        r#"{"format":"loopwright-circuit","version":2,"elements":[
        {"name":"U1","kind":"amplifier","nodes":["out","0"],"control":["0","out"],
         "model":{"a0":1e5,"gbwHz":1e6,"voltageNoise":{"density":-1e-9,"cornerHz":10}}}]}"#,
    )
    .unwrap_err();
    assert_eq!(e.error.param(), "voltageNoise");
}
