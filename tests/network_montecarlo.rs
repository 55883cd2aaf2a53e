//! Monte Carlo against first-order error propagation, uniform percentiles against
//! their exact values, and the native half of the native == wasm check.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::network::{
    monte_carlo, monte_carlo_samples, Distribution, GainDistribution, Hold, Metric, MonteCarloSpec,
    Stage, StageSpec,
};
use serde::Deserialize;

include!("fixtures/network_montecarlo.rs");

fn spec_from(input: &McInput) -> MonteCarloSpec {
    MonteCarloSpec {
        stage: StageSpec {
            stage: input.stage.parse().unwrap(),
            r1: input.r1,
            r2: input.r2,
            tol_r1: input.tol_r1,
            tol_r2: input.tol_r2,
            a_min: input.a_min,
            a_typ: input.a_typ,
            a_max: input.a_max,
            ri: input.ri,
            ro: input.ro,
            pole_hz: input.pole_hz,
            hold: Hold::GainBandwidth,
        },
        resistors: Distribution::from_name(input.resistor_distribution, input.k, "k").unwrap(),
        open_loop_gain: GainDistribution::from_name(
            input.gain_distribution,
            input.k_gain,
            "k_gain",
        )
        .unwrap(),
        metric: input.metric.parse().unwrap(),
        trials: input.trials as usize,
        seed: input.seed,
        lower: input.lower,
        upper: input.upper,
        bins: input.bins as usize,
    }
}

#[test]
#[ignore = "prints the fixture's EXPECTED block; run by hand when the sampling changes on purpose"]
fn print_expected() {
    println!("pub const EXPECTED: [McExpected; {}] = [", INPUTS.len());
    for input in &INPUTS {
        let r = monte_carlo(&spec_from(input)).unwrap();
        let p: Vec<String> = r
            .stats
            .percentiles
            .iter()
            .map(|p| format!("0x{:016x}", p.value.to_bits()))
            .collect();
        let y = r.stats.yield_fraction.map_or("None".to_string(), |y| {
            format!("Some(0x{:016x})", y.to_bits())
        });
        println!(
            "    McExpected {{ mean: 0x{:016x}, sd: 0x{:016x}, percentiles: [{}], yield_fraction: {}, first_bin: {} }},",
            r.stats.mean.to_bits(),
            r.stats.sd.to_bits(),
            p.join(", "),
            y,
            r.stats.histogram.counts[0]
        );
    }
    println!("];");
}

#[test]
fn native_results_equal_the_committed_bits() {
    // Source: the native build itself, committed in tests/fixtures (see there); the
    // browser test asserts the same bits.
    for (i, (input, want)) in INPUTS.iter().zip(&EXPECTED).enumerate() {
        let r = monte_carlo(&spec_from(input)).unwrap();
        assert_eq!(
            r.stats.mean.to_bits(),
            want.mean,
            "case {i} mean {}",
            r.stats.mean
        );
        assert_eq!(r.stats.sd.to_bits(), want.sd, "case {i} sd {}", r.stats.sd);
        for (j, p) in r.stats.percentiles.iter().enumerate() {
            assert_eq!(
                p.value.to_bits(),
                want.percentiles[j],
                "case {i} p{}",
                p.percent
            );
        }
        assert_eq!(
            r.stats.yield_fraction.map(f64::to_bits),
            want.yield_fraction,
            "case {i} yield"
        );
        assert_eq!(
            r.stats.histogram.counts[0], want.first_bin,
            "case {i} first bin"
        );
    }
}

fn base(kind: Stage) -> StageSpec {
    StageSpec {
        stage: kind,
        r1: 3.6e3,
        r2: 100e3,
        tol_r1: 1e-4,
        tol_r2: 1e-4,
        a_min: 999.0,
        a_typ: 1000.0,
        a_max: 1001.0,
        ri: 1e6,
        ro: 50.0,
        pole_hz: 100.0,
        hold: Hold::GainBandwidth,
    }
}

/// ∂Af/∂(R1, R2, A) at (R1, R2, A), by hand from the closed forms (see
/// tests/network_worstcase.rs for the derivation).
fn gain_partials(kind: Stage, r1: f64, r2: f64, a: f64) -> [f64; 3] {
    match kind {
        Stage::NonInverting => {
            let beta = r1 / (r1 + r2);
            let d = 1.0 + a * beta;
            let daf_dbeta = -a * a / (d * d);
            let s2 = (r1 + r2) * (r1 + r2);
            [daf_dbeta * r2 / s2, -daf_dbeta * r1 / s2, 1.0 / (d * d)]
        }
        Stage::Inverting => {
            let n = r1 + r2 + a * r1;
            [
                a * r2 * (1.0 + a) / (n * n),
                -a * (r1 + a * r1) / (n * n),
                -r2 * (r1 + r2) / (n * n),
            ]
        }
    }
}

fn closed_form_gain(kind: Stage, r1: f64, r2: f64, a: f64) -> f64 {
    match kind {
        Stage::NonInverting => a / (1.0 + a * r1 / (r1 + r2)),
        Stage::Inverting => -a * r2 / (r1 + r2 + a * r1),
    }
}

#[test]
fn mean_and_sd_match_first_order_propagation() {
    // First-order propagation: mean ≈ f(x̄), sd ≈ √Σ(∂f/∂xᵢ·σᵢ)², with σ = tol/√3
    // (uniform) or tol/k (normal) for the resistors and (a_max − a_min)/√12 or
    // (a_max − a_min)/(2k) for A. Statistical bound, n = 200 000 trials:
    // |mean − f| ≤ 5·sd/√n; |sd/sd₁ − 1| ≤ 5/√(2n) (the standard error of a sample
    // sd for kurtosis ≤ 3, which covers sums of normal and uniform terms). The
    // second-order terms are below 1e-3 of either bound at these tolerances.
    let n = 200_000usize;
    for kind in [Stage::NonInverting, Stage::Inverting] {
        for (resistors, gain) in [
            (Distribution::Uniform, GainDistribution::Uniform),
            (
                Distribution::Normal { k: 3.0 },
                GainDistribution::LogNormal { k: 3.0 },
            ),
            (Distribution::Normal { k: 2.0 }, GainDistribution::Uniform),
            (Distribution::Uniform, GainDistribution::LogTriangular),
            (Distribution::Uniform, GainDistribution::LogUniform),
        ] {
            let s = base(kind);
            let spec = MonteCarloSpec {
                stage: s,
                resistors,
                open_loop_gain: gain,
                metric: Metric::Gain,
                trials: n,
                seed: 2026,
                lower: None,
                upper: None,
                bins: 50,
            };
            let r = monte_carlo(&spec).unwrap();
            let a_mid = 0.5 * (s.a_min + s.a_max);
            let sigma_r = |tol: f64, nominal: f64| match resistors {
                Distribution::Uniform => tol * nominal / 3f64.sqrt(),
                Distribution::Normal { k } => tol * nominal / k,
            };
            // Standard deviations of A: uniform (b − a)/√12; on ln A (here a_typ
            // is the centre and the spread 0.1 %, so σ_A = a_typ·σ_ln to first
            // order) a normal truncated at ±k has variance
            // 1 − 2k·φ(k)/(2Φ(k) − 1); a triangular on [l, h] with mode m,
            // (l² + m² + h² − lm − lh − mh)/18 (Evans, Hastings & Peacock,
            // *Statistical Distributions*, 3rd ed., ch. 40, from memory).
            let (l, m, h) = (s.a_min.ln(), s.a_typ.ln(), s.a_max.ln());
            let sigma_a = match gain {
                GainDistribution::Uniform => (s.a_max - s.a_min) / 12f64.sqrt(),
                GainDistribution::LogUniform => s.a_typ * (h - l) / 12f64.sqrt(),
                GainDistribution::LogTriangular => {
                    s.a_typ * ((l * l + m * m + h * h - l * m - l * h - m * h) / 18.0).sqrt()
                }
                GainDistribution::LogNormal { k } => {
                    let phi = (-0.5 * k * k).exp() / (2.0 * std::f64::consts::PI).sqrt();
                    let inside = libm::erf(k / 2f64.sqrt());
                    s.a_typ * (h - l) / (2.0 * k) * (1.0 - 2.0 * k * phi / inside).sqrt()
                }
            };
            let [d1, d2, da] = gain_partials(kind, s.r1, s.r2, a_mid);
            let sd1 = ((d1 * sigma_r(s.tol_r1, s.r1)).powi(2)
                + (d2 * sigma_r(s.tol_r2, s.r2)).powi(2)
                + (da * sigma_a).powi(2))
            .sqrt();
            let f0 = closed_form_gain(kind, s.r1, s.r2, a_mid);
            let mean_bound = 5.0 * sd1 / (n as f64).sqrt();
            assert!(
                (r.stats.mean - f0).abs() <= mean_bound,
                "{kind:?} {resistors:?}: mean {} vs {f0}, bound {mean_bound:e}",
                r.stats.mean
            );
            let sd_bound = 5.0 / (2.0 * n as f64).sqrt();
            assert!(
                (r.stats.sd / sd1 - 1.0).abs() <= sd_bound,
                "{kind:?} {resistors:?}: sd {} vs {sd1}",
                r.stats.sd
            );
        }
    }
}

#[test]
fn uniform_percentiles_and_yield_match_exact_values() {
    // Input impedance of the non-inverting stage, Zin = ri·(1 + A·β), is linear in
    // A; with the resistor tolerances at 1e-12 it is uniform on
    // [ri(1 + a_min·β), ri(1 + a_max·β)], whose p-quantile is exact:
    // lo + p·(hi − lo). The sample quantile has standard error √(p(1 − p)/n)·(hi − lo)
    // (asymptotic normality of sample quantiles; density 1/(hi − lo)); bound 5 of those.
    let n = 200_000usize;
    let mut s = base(Stage::NonInverting);
    (s.tol_r1, s.tol_r2, s.a_min, s.a_max) = (1e-12, 1e-12, 1e3, 3e3);
    let beta = s.r1 / (s.r1 + s.r2);
    let (lo, hi) = (s.ri * (1.0 + s.a_min * beta), s.ri * (1.0 + s.a_max * beta));
    let q = |p: f64| lo + p * (hi - lo);
    let spec = MonteCarloSpec {
        stage: s,
        resistors: Distribution::Uniform,
        open_loop_gain: GainDistribution::Uniform,
        metric: Metric::InputImpedance,
        trials: n,
        seed: 99,
        lower: Some(q(0.25)),
        upper: Some(q(0.75)),
        bins: 20,
    };
    let r = monte_carlo(&spec).unwrap();
    for p in r.stats.percentiles {
        let f = p.percent / 100.0;
        let bound = 5.0 * (f * (1.0 - f) / n as f64).sqrt() * (hi - lo);
        assert!(
            (p.value - q(f)).abs() <= bound,
            "p{}: {} vs exact {}",
            p.percent,
            p.value,
            q(f)
        );
    }
    // Yield within the quartiles: exactly 1/2, binomial standard error √(1/(4n)).
    let y = r.stats.yield_fraction.unwrap();
    assert!(
        (y - 0.5).abs() <= 5.0 * (0.25 / n as f64).sqrt(),
        "yield {y}"
    );
    // Histogram of a uniform: every one of 20 bins holds n/20 ± 5·√(n·p(1 − p)).
    for &c in &r.stats.histogram.counts {
        let expect = n as f64 / 20.0;
        assert!(
            (f64::from(c) - expect).abs() <= 5.0 * (expect * 0.95).sqrt(),
            "bin count {c}"
        );
    }
    // Mean and sd of a uniform: (lo + hi)/2 and (hi − lo)/√12.
    assert!((r.stats.mean - 0.5 * (lo + hi)).abs() <= 5.0 * (hi - lo) / (12.0 * n as f64).sqrt());
    assert!(
        (r.stats.sd / ((hi - lo) / 12f64.sqrt()) - 1.0).abs()
            <= 5.0 * (0.8 / (4.0 * n as f64)).sqrt()
    );
}

#[derive(Deserialize)]
struct GainCase {
    distribution: String,
    mean: f64,
    sd: f64,
    quantiles: Vec<(f64, f64)>,
}

#[derive(Deserialize)]
struct GainFile {
    a_min: f64,
    a_typ: f64,
    a_max: f64,
    k: f64,
    nominal: f64,
    cases: Vec<GainCase>,
}

#[test]
fn gain_distributions_match_their_exact_moments_and_quantiles() {
    // Issue 15, item 6: gain 100 (β = 1/100), A = 1e4 / 2e4 / 1e6. Before, A was
    // uniform on [a_min, a_max]: mean 99.954 against a nominal of 99.502. Oracle:
    // tests/reference/network_montecarlo_gain.py (scipy quad and the exact
    // quantiles of each distribution). Resistors at 1e-9: their share is ~1e-9.
    // Bounds, 5 standard errors each (a normal statistic strays that far with
    // probability 6e-7; the seed is fixed, so the run is reproducible):
    // mean, sd/√n; sd, σ·√((κ − 1)/(4n)) with the kurtosis κ ≤ 9; quantiles, the
    // share of draws at or below the exact quantile q_p is p within √(p(1 − p)/n).
    const Z: f64 = 5.0;
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/network_montecarlo_gain.json"
    );
    let data: GainFile = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    let n = 200_000usize;
    let stage = StageSpec {
        stage: Stage::NonInverting,
        r1: 1e3,
        r2: 99e3,
        tol_r1: 1e-9,
        tol_r2: 1e-9,
        a_min: data.a_min,
        a_typ: data.a_typ,
        a_max: data.a_max,
        ri: 1e6,
        ro: 75.0,
        pole_hz: 10.0,
        hold: Hold::GainBandwidth,
    };
    assert_eq!(data.cases.len(), 4);
    for case in &data.cases {
        let spec = MonteCarloSpec {
            stage,
            resistors: Distribution::Uniform,
            open_loop_gain: GainDistribution::from_name(&case.distribution, data.k, "k_gain")
                .unwrap(),
            metric: Metric::Gain,
            trials: n,
            seed: 15,
            lower: None,
            upper: None,
            bins: 10,
        };
        let r = monte_carlo(&spec).unwrap();
        assert!((r.nominal / data.nominal - 1.0).abs() < 1e-12);
        let se_mean = case.sd / (n as f64).sqrt();
        assert!(
            (r.stats.mean - case.mean).abs() < Z * se_mean,
            "{}: mean {} vs {}",
            case.distribution,
            r.stats.mean,
            case.mean
        );
        let se_sd = case.sd * (8.0 / (4.0 * n as f64)).sqrt();
        assert!(
            (r.stats.sd - case.sd).abs() < Z * se_sd,
            "{}: sd {} vs {}",
            case.distribution,
            r.stats.sd,
            case.sd
        );
        let samples = monte_carlo_samples(&spec).unwrap();
        for &(p, q) in &case.quantiles {
            let share = samples.iter().filter(|&&x| x <= q).count() as f64 / n as f64;
            assert!(
                (share - p).abs() < Z * (p * (1.0 - p) / n as f64).sqrt(),
                "{}: share below q{p} = {share}",
                case.distribution
            );
        }
    }
    // The default honours typical: its median is the nominal gain.
    let default = data
        .cases
        .iter()
        .find(|c| c.distribution == "log-normal")
        .unwrap();
    assert!((default.quantiles[1].1 / data.nominal - 1.0).abs() < 1e-12);
    assert_eq!(
        GainDistribution::default(),
        GainDistribution::LogNormal { k: 3.0 }
    );
}
