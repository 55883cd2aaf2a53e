//! Facts of the trade, and the closed forms against the general numeric path.
//!
//! Each expected value names its source beside it. The general path (polynomial
//! roots, refined crossings, state-space step response) and the closed forms of
//! src/freq/closed_forms.rs are independent computations; they must agree.

use core::f64::consts::PI;
use loopwright::freq::closed_forms::{overshoot_from_zeta, peaking_from_q};
use loopwright::freq::{
    closed_loop_bandwidth, closed_loop_gain_at, closed_loop_poles, gain_bandwidth,
    single_pole_high_cutoff, stability_margins, step_response, two_pole_response, FeedbackLoop,
    TransferModel, Verdict,
};

fn two_pole(t0: f64, f1: f64, f2: f64) -> FeedbackLoop {
    FeedbackLoop::with_constant_beta(TransferModel::constant(t0).pole(f1).pole(f2), 1.0).unwrap()
}

#[test]
fn three_equal_poles_go_unstable_at_a_loop_gain_of_8() {
    // Common practice, no source: three equal real poles, DC loop gain 8 is the
    // edge of stability, oscillating at √3 times the pole frequency.
    let l = |t0: f64| {
        FeedbackLoop::with_constant_beta(
            TransferModel::constant(t0).pole(2e4).pole(2e4).pole(2e4),
            1.0,
        )
        .unwrap()
    };
    assert_eq!(closed_loop_poles(&l(7.9)).unwrap().verdict, Verdict::Stable);
    assert_eq!(
        closed_loop_poles(&l(8.0)).unwrap().verdict,
        Verdict::Marginal
    );
    assert_eq!(
        closed_loop_poles(&l(8.1)).unwrap().verdict,
        Verdict::Unstable
    );
    let m = stability_margins(&l(8.0)).unwrap();
    assert!(m.gain_margin_db.unwrap().abs() < 1e-9);
    assert!((m.phase_crossover_hz.unwrap() / (2e4 * 3f64.sqrt()) - 1.0).abs() < 1e-11);
    // The gain margin at any T0 is 20·log10(8/T0).
    for t0 in [0.5, 2.0, 5.0, 20.0] {
        let gm = stability_margins(&l(t0)).unwrap().gain_margin_db.unwrap();
        assert!((gm - 20.0 * (8.0 / t0).log10()).abs() < 1e-9, "T0 = {t0}");
    }
}

#[test]
fn second_order_overshoot_is_exp_of_minus_pi_zeta_over_sqrt() {
    // Common practice, no source: a second-order step overshoots by
    // exp(−πζ/√(1−ζ²)). Two real poles with T0 set for each ζ; the general path
    // (state-space step, refined peak) against the formula.
    let (f1, f2): (f64, f64) = (1e3, 2e5);
    for zeta in [0.1, 0.2, 0.4, 0.6, 0.8, 0.95] {
        let t0 = ((f1 + f2) / (2.0 * zeta)).powi(2) / (f1 * f2) - 1.0;
        let s = step_response(&two_pole(t0, f1, f2), 0.02, 1000).unwrap();
        let want = 100.0 * (-PI * zeta / (1.0 - zeta * zeta).sqrt()).exp();
        assert!(
            (s.overshoot_percent - want).abs() < 1e-7 * want.max(1.0),
            "ζ = {zeta}: {} vs {want}",
            s.overshoot_percent
        );
        assert!((overshoot_from_zeta(zeta) * 100.0 - want).abs() < 1e-12);
    }
}

#[test]
fn maximally_flat_at_q_of_one_over_root_two() {
    // Common practice, no source: Q = 1/√2 (Butterworth) is the largest Q without
    // peaking, and its −3 dB frequency is the natural frequency f0.
    let (f1, f2) = (500.0, 3e5);
    let r = two_pole_response(f1, f2, 1.0).unwrap();
    let t0 = r.maximally_flat_loop_gain;
    let l = two_pole(t0, f1, f2);
    let p = closed_loop_poles(&l).unwrap();
    assert!((p.poles[0].q.unwrap() - 0.5f64.sqrt()).abs() < 1e-12);
    let b = closed_loop_bandwidth(&l).unwrap();
    assert!(b.peaking_db < 1e-9, "peaking {}", b.peaking_db);
    let f0 = ((1.0 + t0) * f1 * f2).sqrt();
    assert!((b.high_hz.unwrap() / f0 - 1.0).abs() < 1e-10);
    // A little more loop gain and it peaks.
    let b = closed_loop_bandwidth(&two_pole(t0 * 1.2, f1, f2)).unwrap();
    assert!(b.peaking_db > 0.0 && b.peak_hz.is_some());
}

#[test]
fn closed_loop_gain_at_crossover_is_about_1_3_at_45_and_1_0_at_60_degrees() {
    // Textbook table (Sedra & Smith, Microelectronic Circuits, 7th ed., section
    // 10.10; from memory): |Af(fc)| over its low-frequency value is about 1.3 at
    // 45° of phase margin and about 1.0 at 60°. Exactly 1/(2·sin(PM/2)) for a
    // large loop gain. Two poles, β found for each margin by the general path.
    let a = TransferModel::constant(1e5).pole(10.0).pole(1e5);
    for (pm, about) in [(45.0, 1.3), (60.0, 1.0)] {
        let c = loopwright::freq::max_beta_for_margin(&a, pm, 1.0).unwrap();
        let l = FeedbackLoop::with_constant_beta(a.clone(), c.value).unwrap();
        let fc = c.crossover_hz.unwrap();
        let ratio = closed_loop_gain_at(&l, fc).unwrap().norm() / c.closed_loop_gain;
        assert!((ratio - about).abs() < 0.01, "PM {pm}: {ratio}");
        let exact = 1.0 / (2.0 * (pm / 2.0).to_radians().sin());
        assert!((ratio - exact).abs() < 2e-4, "PM {pm}: {ratio} vs {exact}");
    }
}

#[test]
fn forty_five_degrees_of_margin_peaks_by_about_2_4_db() {
    // Common practice, no source (a trade figure quoted widely): 45° of phase
    // margin gives about 2.4 dB of closed-loop peaking in a two-pole loop with a
    // large loop gain.
    let a = TransferModel::constant(1e5).pole(10.0).pole(1e5);
    let c = loopwright::freq::max_beta_for_margin(&a, 45.0, 1.0).unwrap();
    let b = closed_loop_bandwidth(&FeedbackLoop::with_constant_beta(a, c.value).unwrap()).unwrap();
    assert!((b.peaking_db - 2.4).abs() < 0.15, "{}", b.peaking_db);
}

#[test]
fn gain_times_bandwidth_is_constant_for_a_single_pole() {
    // Common practice, no source: with one pole, Af0·fHf = A0·fH for every β.
    let (a0, fh) = (2e5, 8.0);
    let gbw = gain_bandwidth(a0, fh).unwrap();
    for beta in [1e-4, 1e-3, 0.01, 0.1, 1.0] {
        let l =
            FeedbackLoop::with_constant_beta(TransferModel::constant(a0).pole(fh), beta).unwrap();
        let b = closed_loop_bandwidth(&l).unwrap();
        let product = b.midband_gain * b.high_hz.unwrap();
        assert!((product / gbw - 1.0).abs() < 1e-10, "β = {beta}");
        assert!(
            (b.high_hz.unwrap() / single_pole_high_cutoff(fh, a0, beta).unwrap() - 1.0).abs()
                < 1e-10
        );
    }
}

#[test]
fn two_pole_closed_forms_agree_with_the_general_path() {
    // closed_forms::two_pole_response against roots, bandwidth search and step.
    for &(t0, f1, f2) in &[
        (10.0, 1e3, 1e5),
        (99.0, 1e2, 1e6),
        (999.0, 1e3, 1e6),
        (3.0, 5e3, 5e3),
        (5e4, 10.0, 1e7),
    ] {
        let r = two_pole_response(f1, f2, t0).unwrap();
        let l = two_pole(t0, f1, f2);
        let p = closed_loop_poles(&l).unwrap();
        // f0 = √(w1·w2) and Q = √(w1·w2)/(w1 + w2) hold for a real pair too.
        let (w1, w2) = (p.poles[0].natural_hz, p.poles[1].natural_hz);
        assert!(
            ((w1 * w2).sqrt() / r.natural_hz - 1.0).abs() < 1e-12,
            "f0 at T0 = {t0}"
        );
        let q = if p.poles[0].im != 0.0 {
            p.poles[0].q.unwrap()
        } else {
            (w1 * w2).sqrt() / (w1 + w2)
        };
        assert!(
            (q / r.q - 1.0).abs() < 1e-10,
            "Q at T0 = {t0}: {q} vs {}",
            r.q
        );
        let b = closed_loop_bandwidth(&l).unwrap();
        assert!(
            (b.peaking_db - r.peaking_db).abs() < 1e-9,
            "peaking at T0 = {t0}"
        );
        if let (Some(a), Some(bq)) = (b.peak_hz, r.peak_hz) {
            assert!((a / bq - 1.0).abs() < 1e-6);
        }
        let s = step_response(&l, 0.02, 500).unwrap();
        assert!(
            (s.overshoot_percent - r.overshoot_percent).abs() < 1e-7 * r.overshoot_percent.max(1.0),
            "overshoot at T0 = {t0}"
        );
    }
    // And the pure formulas against each other: peaking from Q at Q = 1.
    let (db, _) = peaking_from_q(1.0);
    assert!((db - 20.0 * (2.0 / 3f64.sqrt()).log10()).abs() < 1e-12);
}
