//! The feedback relations against sources outside the project:
//! - closed forms derived by sympy (tests/reference/feedback_inverse_sympy.py,
//!   committed data in tests/reference/data/feedback_inverse.json);
//! - textbook worked examples and summary tables, named beside each check.

use loopwright::feedback::*;
use serde::Deserialize;

/// Tolerance against sympy's exact rational evaluation (a few roundings in f64).
const SYMPY_REL: f64 = 1e-12;

#[derive(Deserialize)]
struct Case {
    a: f64,
    target_gain: f64,
    gain_error: f64,
    feedback_amount: f64,
    beta: f64,
    beta_for_gain: f64,
    ideal_beta: f64,
    min_open_loop_gain: f64,
    max_closed_loop_gain: f64,
    beta_for_feedback_amount: f64,
    closed_loop_gain: f64,
    sensitivity: f64,
}

#[derive(Deserialize)]
struct Reference {
    cases: Vec<Case>,
}

fn assert_rel(what: &str, case: usize, got: f64, want: f64, rel: f64) {
    assert!(
        (got - want).abs() <= rel * want.abs().max(f64::MIN_POSITIVE),
        "{what}, case {case}: loopwright {got:e}, reference {want:e}"
    );
}

#[test]
fn inverse_design_matches_sympy_closed_forms() {
    let text = include_str!("reference/data/feedback_inverse.json");
    let reference: Reference = serde_json::from_str(text).unwrap();
    assert!(reference.cases.len() >= 8);
    for (i, c) in reference.cases.iter().enumerate() {
        assert_rel(
            "beta_for_gain",
            i,
            beta_for_gain(c.a, c.target_gain).unwrap(),
            c.beta_for_gain,
            SYMPY_REL,
        );
        assert_rel(
            "ideal_beta",
            i,
            ideal_beta(c.target_gain).unwrap(),
            c.ideal_beta,
            SYMPY_REL,
        );
        assert_rel(
            "min_open_loop_gain",
            i,
            min_open_loop_gain(c.beta, c.gain_error).unwrap(),
            c.min_open_loop_gain,
            SYMPY_REL,
        );
        let ceiling = max_closed_loop_gain(c.a, c.feedback_amount).unwrap();
        assert_rel(
            "max_closed_loop_gain",
            i,
            ceiling.closed_loop_gain,
            c.max_closed_loop_gain,
            SYMPY_REL,
        );
        if c.beta_for_feedback_amount == 0.0 {
            assert_eq!(ceiling.beta, 0.0, "beta_for_feedback_amount, case {i}");
        } else {
            assert_rel(
                "beta_for_feedback_amount",
                i,
                ceiling.beta,
                c.beta_for_feedback_amount,
                SYMPY_REL,
            );
        }
        assert_rel(
            "closed_loop_gain",
            i,
            closed_loop_gain(c.a, c.beta).unwrap(),
            c.closed_loop_gain,
            SYMPY_REL,
        );
        assert_rel(
            "sensitivity",
            i,
            gain_sensitivity(c.a, c.beta).unwrap(),
            c.sensitivity,
            SYMPY_REL,
        );
    }
}

#[test]
fn series_shunt_noninverting_op_amp_example() {
    // Sedra & Smith, Microelectronic Circuits, 7th ed., Example 10.1 (from memory):
    // a non-inverting op-amp stage with A = 10⁴ V/V designed for a closed-loop gain of
    // 10. Answers: β = R1/(R1 + R2) = 0.0999, R2/R1 = 9.01, amount of feedback 60 dB;
    // with vs = 0.01 V: vo = 0.1 V, vf = 9.99 mV, vi = 10 µV; when A drops by 20 %
    // the closed-loop gain drops by only about 0.025 %.
    let beta = beta_for_gain(1e4, 10.0).unwrap();
    assert!((beta - 0.0999).abs() < 1e-15);
    assert!(((1.0 / beta - 1.0) - 9.01).abs() < 1e-3, "R2/R1");
    assert!((feedback_amount_db(1e4, beta).unwrap() - 60.0).abs() < 1e-9);
    let af = closed_loop_gain(1e4, beta).unwrap();
    let (vs, vo) = (0.01, af * 0.01);
    assert!((vo - 0.1).abs() < 1e-12);
    assert!((beta * vo - 0.00999).abs() < 1e-15, "vf");
    assert!(((vs - beta * vo) - 1e-5).abs() < 1e-15, "vi");
    let drop = 1.0 - closed_loop_gain(0.8e4, beta).unwrap() / af;
    assert!(
        (drop * 100.0 - 0.025).abs() < 0.0005,
        "drop {}",
        drop * 100.0
    );
    // The same drop from the sensitivity 1/D to first order: 20 % / 1000 = 0.02 %
    // (the textbook quotes the first-order figure alongside the exact one).
    assert!((gain_sensitivity(1e4, beta).unwrap() * 20.0 - 0.02).abs() < 1e-12);
}

#[test]
fn summary_table_of_the_four_ideal_structures() {
    // Sedra & Smith, Microelectronic Circuits, 7th ed., Table 10.1 "Summary of the
    // parameters and formulas for the ideal feedback-amplifier structure" (from
    // memory): A and β units, Rif = Ri(1+Aβ) for series mixing and Ri/(1+Aβ) for
    // shunt mixing, Rof = Ro/(1+Aβ) for voltage sampling and Ro(1+Aβ) for current
    // sampling. Each topology with its textbook-style figures: the loop gain is
    // A·β = 10⁴·0.0999 = 999, so D = 1000, in that topology's units.
    let rows = [
        // topology, A, β, Ri, Ro, Rif, Rof
        (Topology::SeriesShunt, 1e4, 0.0999, 1e5, 1e3, 1e8, 1.0),
        (Topology::ShuntSeries, 1e4, 0.0999, 1e5, 1e3, 1e2, 1e6),
        (Topology::SeriesSeries, 1e4, 0.0999, 1e5, 1e3, 1e8, 1e6),
        (Topology::ShuntShunt, 1e4, 0.0999, 1e5, 1e3, 1e2, 1.0),
    ];
    for (t, a, beta, ri, ro, rif, rof) in rows {
        let (gotif, gotof) = resistances_with_feedback(t, ri, ro, a, beta).unwrap();
        assert!((gotif / rif - 1.0).abs() < 1e-12, "{t} Rif {gotif}");
        assert!((gotof / rof - 1.0).abs() < 1e-12, "{t} Rof {gotof}");
        let s = summarize(t, a, beta).unwrap();
        assert!((s.closed_loop_gain - 10.0).abs() < 1e-12, "{t} Af");
        assert_eq!((s.gain_unit, s.beta_unit), (t.gain_unit(), t.beta_unit()));
    }
}

#[test]
fn desensitivity_rule_of_thumb() {
    // Common practice, no source: 40 dB of loop gain turns a ±50 % open-loop gain
    // spread into roughly ±0.5 % of closed-loop gain.
    let beta = beta_for_gain(1e4, 100.0).unwrap();
    let s = gain_spread(beta, 0.5e4, 1e4, 1.5e4).unwrap();
    assert!(s.low_percent > -1.0 && s.high_percent < 0.5, "{s:?}");
    assert!((s.sensitivity - 0.01).abs() < 1e-12);
}
