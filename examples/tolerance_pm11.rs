//! A native timing loop of the benchmark case `tolerance_pm_11node_1e4`
//! (bench/tolerance_cases.mjs): 10 000 Monte Carlo trials of the phase margin
//! of the 11-node circuit bench/tolerance_circuit_11.json, for profiling with
//! callgrind. Run: `cargo run --release --example tolerance_pm11 [trials]`.
use loopwright::circuit::json::read_circuit;
use loopwright::stage::Spread;
use loopwright::tolerance::{
    monte_carlo, AmplifierSpread, CircuitPorts, Figure, Limit, MonteCarloOptions, TolStage,
};

fn main() {
    let trials = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(10_000);
    let c = read_circuit(include_str!("../bench/tolerance_circuit_11.json")).unwrap();
    let ports = CircuitPorts {
        input: "Vs".into(),
        output: "n8".into(),
        output_minus: None,
        output_element: None,
        controlled: None,
    };
    let amp = AmplifierSpread {
        gbw_hz: Some(Spread {
            min: 7e6,
            typ: 1e7,
            max: 1.3e7,
        }),
        ro: None,
    };
    let ts = TolStage::from_circuit(&c, ports, &[("U1".into(), amp)], [25.0, 25.0]).unwrap();
    let spec = [Limit {
        figure: Figure::PhaseMarginDeg,
        lower: Some(65.5),
        upper: None,
    }];
    let t = std::time::Instant::now();
    let mc = monte_carlo(
        &ts,
        &spec,
        MonteCarloOptions {
            seed: 1,
            trials,
            bins: 20,
            keep_failures: 0,
        },
    )
    .unwrap();
    let s = mc.limits[0].stats.as_ref().unwrap();
    println!(
        "{} parts, {trials} trials in {:.3} s: PM nominal {:.3}°, mean {:.3}°, sd {:.3}°, yield {:.4}, undefined {}",
        ts.varied.len(),
        t.elapsed().as_secs_f64(),
        mc.limits[0].nominal[0],
        s.mean,
        s.sd,
        mc.yield_fraction,
        mc.limits[0].undefined
    );
}
