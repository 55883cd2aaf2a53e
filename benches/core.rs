//! Native benchmarks of the core (divan): the same work as the wasm cases of
//! `make bench`, without the JS boundary, so the two can be told apart.
//! Run with `cargo bench --bench core` (part of `make bench`). Figures only.

use divan::black_box;
use loopwright::feedback::{closed_loop_gain, summarize, Topology};
use loopwright::freq::{
    closed_loop_poles, loop_gain_sweep, stability_margins, FeedbackLoop, TransferModel,
};
use loopwright::network::{
    best_pairs, monte_carlo, Combine, Distribution, GainDistribution, Hold, Metric, MonteCarloSpec,
    Network, PairSpec, Series, Stage, StageSpec,
};

fn main() {
    divan::main();
}

/// The loop of the freq cases in bench/cases.mjs and bench/peers.py.
fn freq_loop() -> FeedbackLoop {
    let mut a = TransferModel::constant(1e5);
    for p in [10.0, 1e5, 1e6, 3e6, 1e7, 3e7] {
        a = a.pole(p);
    }
    for z in [2e6, 5e7] {
        a = a.zero(z);
    }
    FeedbackLoop::with_constant_beta(a, 0.1).expect("a valid loop")
}

#[divan::bench]
fn feedback_closed_loop_gain() -> f64 {
    closed_loop_gain(black_box(1e5), black_box(0.00999)).unwrap_or(0.0)
}

#[divan::bench]
fn feedback_summary() -> f64 {
    summarize(Topology::SeriesShunt, black_box(1e5), black_box(0.00999))
        .map_or(0.0, |s| s.closed_loop_gain)
}

#[divan::bench]
fn freq_sweep_10k(bencher: divan::Bencher) {
    let l = freq_loop();
    bencher.bench(|| loop_gain_sweep(black_box(&l), 1.0, 1e9, 10_000).map(|s| s.phase_deg.len()));
}

#[divan::bench]
fn freq_margins_and_poles(bencher: divan::Bencher) {
    let l = freq_loop();
    bencher.bench(|| {
        (
            stability_margins(black_box(&l)).is_ok(),
            closed_loop_poles(black_box(&l)).is_ok(),
        )
    });
}

#[divan::bench(sample_count = 10, sample_size = 1)]
fn network_monte_carlo_1e6() -> bool {
    let spec = MonteCarloSpec {
        stage: StageSpec {
            stage: Stage::Inverting,
            r1: 10e3,
            r2: 47e3,
            tol_r1: 0.01,
            tol_r2: 0.01,
            a_min: 5e4,
            a_typ: 1e5,
            a_max: 2e5,
            ri: 1e6,
            ro: 75.0,
            pole_hz: 5.0,
            hold: Hold::GainBandwidth,
        },
        resistors: Distribution::Uniform,
        open_loop_gain: GainDistribution::Uniform,
        metric: Metric::Gain,
        trials: 1_000_000,
        seed: 42,
        lower: Some(-4.72),
        upper: Some(-4.68),
        bins: 50,
    };
    monte_carlo(black_box(&spec)).is_ok()
}

#[divan::bench]
fn network_best_pairs_e192() -> bool {
    let spec = PairSpec {
        network: Network::NonInverting,
        target: 7.77,
        series: Series::E192,
        total_min: 1e3,
        total_max: 1e6,
        fixed_r1: None,
        max_error: None,
        combine: Combine::None,
        count: 10,
    };
    best_pairs(black_box(&spec)).is_ok()
}

/// A transimpedance front end of our own: a 20 MHz amplifier with a further
/// pole, input capacitances and Ro; Rf = 100 kΩ ‖ 1.5 pF, a 20 pF photodiode,
/// an isolation resistor into a 1 nF load (11 elements, 5 nodes, 2 states).
fn stage_document() -> loopwright::stage::Stage {
    use loopwright::stage::{Amplifier, Spread, SpreadPoint, StageKind, StageParts};
    loopwright::stage::Stage {
        kind: StageKind::Transimpedance,
        amplifier: Amplifier::from_gbw(Spread::fixed(1e6), 2e7)
            .with_pole(8e7)
            .with_input(Some(1e12), 4e-12, Some(1e12), 3e-12)
            .with_ro(40.0),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(1e5),
            cf: Some(1.5e-12),
            cs: Some(20e-12),
            rs: Some(1e9),
            rl: Some(2e3),
            cl: Some(1e-9),
            riso: Some(20.0),
            ..StageParts::default()
        },
    }
}

fn stage_circuit() -> loopwright::circuit::Circuit {
    stage_document().circuit().expect("a valid stage").circuit
}

/// Loop gain at 1 000 frequencies plus every margin of the stage (the issue's
/// "under 3 ms" row).
#[divan::bench]
fn stage_loop_gain_1000_and_margins(bencher: divan::Bencher) {
    let c = stage_circuit();
    let f = loopwright::freq::log_frequencies(1.0, 1e9, 1000).expect("valid frequencies");
    bencher.bench(|| {
        let t = loopwright::stage::loop_gain::loop_gain(black_box(&c), "U1", &f);
        let m = loopwright::stage::margins::circuit_margins(black_box(&c), "U1");
        (t.map(|t| t.re.len()), m.map(|m| m.phase_margin_deg))
    });
}

/// Each design helper on the stage above at 60° (the "under 50 ms" rows).
#[divan::bench(args = ["cf", "riso", "cl", "dominant-pole", "beta"])]
fn stage_design_helper(bencher: divan::Bencher, which: &str) {
    use loopwright::stage::design as d;
    use loopwright::stage::StageKind;
    let s = stage_document();
    // β needs a divider: the same amplifier as a non-inverting gain of 2.
    let mut divider = s.clone();
    divider.kind = StageKind::NonInverting;
    divider.parts.rg = Some(1e5);
    divider.parts.cs = None;
    divider.parts.cf = None;
    bencher.bench(|| {
        let s = black_box(&s);
        match which {
            "cf" => d::feedback_capacitor_for_margin(s, 60.0),
            "riso" => d::isolation_resistor_for_margin(s, 1e-9, 60.0),
            "cl" => d::max_load_capacitance_for_margin(s, 60.0),
            "dominant-pole" => d::dominant_pole_for_margin(s, 60.0),
            _ => d::max_beta_for_margin(black_box(&divider), 60.0),
        }
        .map(|a| a.value)
    });
}

#[divan::bench]
fn stage_loop_gain_1000(bencher: divan::Bencher) {
    let c = stage_circuit();
    let f = loopwright::freq::log_frequencies(1.0, 1e9, 1000).expect("valid frequencies");
    bencher.bench(|| {
        loopwright::stage::loop_gain::loop_gain(black_box(&c), "U1", &f).map(|t| t.re.len())
    });
}

#[divan::bench]
fn stage_circuit_poles(bencher: divan::Bencher) {
    let c = stage_circuit();
    bencher.bench(|| loopwright::stage::poles::circuit_poles(black_box(&c)).map(|p| p.poles.len()));
}

/// The circuit document of [`stage_circuit`] (version 2: an amplifier element).
fn circuit_document() -> String {
    loopwright::circuit::json::write_circuit(&stage_circuit())
}

/// A sheet document of 10 000 inputs: numbers with prefixes and formulas over
/// the column beside them (the shape of the 10 000-cell recalculation case).
fn sheet_document() -> String {
    let mut s = loopwright::sheet::Sheet::new();
    let mut edits: Vec<(loopwright::sheet::CellRef, String)> = Vec::new();
    for row in 0..5000u32 {
        edits.push((
            loopwright::sheet::CellRef { row, col: 0 },
            format!("{}k7", row % 97 + 1),
        ));
        edits.push((
            loopwright::sheet::CellRef { row, col: 1 },
            format!("=FEEDBACK.GAIN(A{}; 0.01)*2", row + 1),
        ));
    }
    let borrowed: Vec<_> = edits.iter().map(|(c, t)| (*c, t.as_str())).collect();
    s.set_many(&borrowed).expect("a valid sheet");
    s.save_document()
}

#[divan::bench]
fn document_circuit_read(bencher: divan::Bencher) {
    let text = circuit_document();
    bencher.bench(|| loopwright::circuit::json::read_circuit(black_box(&text)).is_ok());
}

#[divan::bench]
fn document_circuit_write(bencher: divan::Bencher) {
    let c = stage_circuit();
    bencher.bench(|| loopwright::circuit::json::write_circuit(black_box(&c)).len());
}

/// The JSON reading alone, by the crate's reader.
#[divan::bench]
fn document_circuit_parse_json(bencher: divan::Bencher) {
    let text = circuit_document();
    bencher.bench(|| loopwright::json::parse(black_box(&text)).is_ok());
}

/// The same text by serde_json (float_roundtrip, as the documents used before
/// `src/json/`), for comparison.
#[divan::bench]
fn document_circuit_parse_serde_json(bencher: divan::Bencher) {
    let text = circuit_document();
    bencher.bench(|| serde_json::from_str::<serde_json::Value>(black_box(&text)).is_ok());
}

#[divan::bench(sample_count = 20)]
fn document_sheet_read_10k(bencher: divan::Bencher) {
    let text = sheet_document();
    bencher.bench(|| loopwright::sheet::from_document(black_box(&text)).map(|c| c.cells.len()));
}

#[divan::bench(sample_count = 20)]
fn document_sheet_parse_json_10k(bencher: divan::Bencher) {
    let text = sheet_document();
    bencher.bench(|| loopwright::json::parse(black_box(&text)).is_ok());
}

#[divan::bench(sample_count = 20)]
fn document_sheet_parse_serde_json_10k(bencher: divan::Bencher) {
    let text = sheet_document();
    bencher.bench(|| serde_json::from_str::<serde_json::Value>(black_box(&text)).is_ok());
}

/// The ladder of the circuit_sweep_1000 case of bench/circuit_cases.mjs (an
/// op-amp as a VCVS with Ri and Ro driving six RC sections, Rf/Rg fed back from
/// the end: 11 nodes, 13 unknowns), swept at 1 000 log-spaced frequencies.
#[divan::bench]
fn circuit_sweep_1000(bencher: divan::Bencher) {
    let mut c = loopwright::circuit::Circuit::new();
    let ok = [
        c.voltage_source("Vs", "s", "0", 1.0),
        c.resistor("Rs", "s", "in", 1e3),
        c.resistor("Ri", "in", "fb", 1e6),
        c.vcvs("A", "a", "0", "in", "fb", 1e5),
        c.resistor("Ro", "a", "n1", 75.0),
        c.resistor("Rf", "n7", "fb", 9e3),
        c.resistor("Rg", "fb", "0", 1e3),
    ];
    assert!(ok.iter().all(Result::is_ok));
    for k in 1..=6 {
        let (a, b) = (format!("n{k}"), format!("n{}", k + 1));
        assert!(c.resistor(&format!("R{k}"), &a, &b, 1e3).is_ok());
        assert!(c.capacitor(&format!("C{k}"), &b, "0", 1e-9).is_ok());
    }
    let f = loopwright::freq::log_frequencies(10.0, 1e7, 1000).expect("valid frequencies");
    bencher.bench(|| {
        loopwright::circuit::voltage_transfer_sweep(black_box(&c), "Vs", "n7", "0", &f)
            .map(|h| h.len())
    });
}

/// The noise case of bench/noise_cases.mjs (bench/noise_circuit_11.json: 11
/// nodes, 13 noise sources), every contribution at 1 000 log-spaced frequencies.
#[divan::bench]
fn noise_circuit_1000(bencher: divan::Bencher) {
    use loopwright::noise::circuit::{noise_densities, NoiseSetup};
    let c = loopwright::circuit::json::read_circuit(include_str!("../bench/noise_circuit_11.json"))
        .expect("the bench circuit");
    let mut setup = NoiseSetup::at_node("x", 300.0);
    setup.input_source = Some("Vs".into());
    let f = loopwright::freq::log_frequencies(10.0, 1e7, 1000).expect("valid frequencies");
    bencher.bench(|| noise_densities(black_box(&c), &setup, &f).map(|d| d.total.len()));
}
