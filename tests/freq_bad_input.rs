//! Bad input to the frequency-response engine, as the issue lists it: each gets a
//! typed error naming the parameter, never a panic, NaN or infinity.

use loopwright::freq::{
    closed_loop_bandwidth, closed_loop_sweep, dominant_pole_for_margin, log_frequencies,
    loop_gain_sweep, max_beta_for_margin, stability_margins, step_response, step_waveform,
    two_pole_response, FeedbackLoop, TransferModel, MAX_SWEEP_POINTS,
};

fn amp() -> TransferModel {
    TransferModel::constant(1e5).pole(10.0).pole(1e6)
}

fn err(a: TransferModel, b: TransferModel) -> (String, String) {
    let e = FeedbackLoop::new(a, b).unwrap_err();
    (e.code().to_string(), e.param().to_string())
}

fn pair(c: &str, p: &str) -> (String, String) {
    (c.to_string(), p.to_string())
}

#[test]
fn pole_and_zero_frequencies_must_be_positive_except_explicit_origin_poles() {
    let b = TransferModel::constant(0.1);
    for f in [0.0, -10.0] {
        assert_eq!(
            err(amp().pole(f), b.clone()),
            pair("out_of_domain", "a.poles_hz")
        );
        assert_eq!(
            err(amp().zero(f), b.clone()),
            pair("out_of_domain", "a.zeros_hz")
        );
        assert_eq!(
            err(amp().rhp_zero(f), b.clone()),
            pair("out_of_domain", "a.rhp_zeros_hz")
        );
        assert_eq!(
            err(amp().low_cut(f), b.clone()),
            pair("out_of_domain", "a.low_cuts_hz")
        );
        assert_eq!(
            err(amp(), b.clone().pole(f)),
            pair("out_of_domain", "beta.poles_hz")
        );
    }
    // The explicit way to put a pole at the origin is accepted.
    assert!(FeedbackLoop::new(amp().integrator(), b).is_ok());
}

#[test]
fn q_must_be_positive() {
    let b = TransferModel::constant(0.1);
    for q in [0.0, -0.7] {
        assert_eq!(
            err(amp().complex_pole(1e5, q), b.clone()),
            pair("out_of_domain", "a.complex_poles")
        );
        assert_eq!(
            err(amp().complex_zero(1e5, q), b.clone()),
            pair("out_of_domain", "a.complex_zeros")
        );
    }
}

#[test]
fn improper_models_are_refused() {
    // Three zeros over two poles in A, or a loop A·β with more zeros than poles.
    assert_eq!(
        err(
            amp().zero(1.0).zero(2.0).zero(3.0),
            TransferModel::constant(0.1)
        ),
        pair("out_of_domain", "a.zeros_hz")
    );
    let b = TransferModel::constant(0.1).zero(1e3).zero(1e4).zero(1e5);
    assert_eq!(err(amp(), b), pair("out_of_domain", "beta.zeros_hz"));
}

#[test]
fn non_finite_numbers_are_refused_by_name() {
    let b = TransferModel::constant(0.1);
    assert_eq!(
        err(TransferModel::constant(f64::NAN), b.clone()),
        pair("not_finite", "a.gain")
    );
    assert_eq!(
        err(amp().pole(f64::INFINITY), b.clone()),
        pair("not_finite", "a.poles_hz")
    );
    assert_eq!(
        err(amp().delay(f64::NAN), b.clone()),
        pair("not_finite", "a.delay_s")
    );
    assert_eq!(
        err(amp(), TransferModel::constant(f64::NEG_INFINITY)),
        pair("not_finite", "beta.gain")
    );
    let l = FeedbackLoop::new(amp(), b).unwrap();
    assert_eq!(
        step_response(&l, f64::NAN, 100).unwrap_err().param(),
        "settle_band"
    );
    assert_eq!(
        step_waveform(&l, f64::INFINITY, 100).unwrap_err().param(),
        "duration_s"
    );
    assert_eq!(
        two_pole_response(f64::NAN, 1.0, 1.0).unwrap_err().param(),
        "f1"
    );
    assert_eq!(
        dominant_pole_for_margin(&amp(), 0.1, f64::NAN)
            .unwrap_err()
            .param(),
        "target_pm_deg"
    );
    assert_eq!(
        max_beta_for_margin(&amp(), 45.0, f64::NAN)
            .unwrap_err()
            .param(),
        "beta_limit"
    );
}

#[test]
fn sweep_limits_are_stated_and_enforced() {
    let l = FeedbackLoop::new(amp(), TransferModel::constant(0.1)).unwrap();
    assert_eq!(MAX_SWEEP_POINTS, 100_000);
    let e = loop_gain_sweep(&l, 1e3, 1e3, 100).unwrap_err();
    assert_eq!((e.code(), e.param()), ("out_of_domain", "stop_hz"));
    let e = closed_loop_sweep(&l, 1e4, 1e3, 100).unwrap_err();
    assert_eq!((e.code(), e.param()), ("out_of_domain", "stop_hz"));
    let e = loop_gain_sweep(&l, 1.0, 1e6, MAX_SWEEP_POINTS + 1).unwrap_err();
    assert_eq!((e.code(), e.param()), ("too_large", "points"));
    assert_eq!(
        log_frequencies(0.0, 1.0, 10).unwrap_err().param(),
        "start_hz"
    );
    assert!(loop_gain_sweep(&l, 1.0, 1e6, MAX_SWEEP_POINTS).is_ok());
}

#[test]
fn open_loop_unstable_models_flag_their_margins_and_the_poles_decide() {
    // An amplifier with a right-half-plane pole, held stable by the loop: the
    // Bode margins are computed but flagged, the pole verdict is the authority.
    let a = TransferModel::constant(-10.0).rhp_pole(1e3).pole(1e5);
    let l = FeedbackLoop::with_constant_beta(a, 1.0).unwrap();
    let m = stability_margins(&l).unwrap();
    assert_eq!(
        m.validity,
        loopwright::freq::MarginValidity::OpenLoopUnstable
    );
    let p = loopwright::freq::closed_loop_poles(&l).unwrap();
    assert_eq!(p.verdict, loopwright::freq::Verdict::Stable);
    // A bandwidth still exists; the results never hold NaN.
    let b = closed_loop_bandwidth(&l).unwrap();
    assert!(b.midband_gain.is_finite() && b.peaking_db.is_finite());
}

#[test]
fn the_largest_models_are_handled() {
    // 32 poles over 8 decades, 8 complex pairs, a delay with a 10th-order Padé
    // approximant, and a β with its own poles: order 32 + 16 + 10 + 4 = 62.
    let mut a = TransferModel::constant(1e6).delay(1e-7);
    for i in 0..32 {
        a = a.pole(10f64.powf(i as f64 / 4.0));
    }
    for i in 0..8 {
        a = a.complex_pole(1e5 * (1.0 + i as f64), 0.5 + i as f64);
    }
    let b = TransferModel::constant(1e-3)
        .pole(1e6)
        .pole(2e6)
        .pole(3e6)
        .pole(4e6);
    let l = FeedbackLoop::with_pade_order(a, b, 10).unwrap();
    let p = loopwright::freq::closed_loop_poles(&l).unwrap();
    assert_eq!(p.poles.len(), 62);
    assert!(p.poles.iter().all(|q| q.re.is_finite() && q.im.is_finite()));
    let m = stability_margins(&l).unwrap();
    assert!(m.phase_margin_deg.map_or(true, f64::is_finite));
    let s = loop_gain_sweep(&l, 1e-3, 1e12, 2000).unwrap();
    assert!(s.phase_deg.iter().all(|x| x.is_finite()));
    // Past the order limit (64) the loop is refused with the limit stated:
    // 32 poles + 16 pairs in A is 64, one more pole in β is 65.
    let big = (0..32).fold(TransferModel::constant(1.0), |m, i| m.pole(1.0 + i as f64));
    let big = (0..16).fold(big, |m, i| m.complex_pole(1e3 + i as f64, 1.0));
    let e = FeedbackLoop::new(big, TransferModel::constant(1.0).pole(1e6)).unwrap_err();
    assert_eq!((e.code(), e.param()), ("too_large", "beta"));
    assert_eq!(e.to_string(), "beta: too large; the limit is 64");
}

#[test]
fn step_response_of_a_large_stable_loop() {
    // 12 poles and a delay (Padé 6): order 18; the state-space step still settles.
    let mut a = TransferModel::constant(1e4).pole(10.0).delay(2e-7);
    for i in 0..11 {
        a = a.pole(1e6 * (2.0 + i as f64));
    }
    let l = FeedbackLoop::with_constant_beta(a, 0.01).unwrap();
    // The margins say stable (PM > 0, GM > 0 on an open-loop-stable loop), and
    // so do the poles.
    let m = stability_margins(&l).unwrap();
    assert!(m.phase_margin_deg.unwrap() > 0.0 && m.gain_margin_db.unwrap() > 0.0);
    assert_eq!(
        loopwright::freq::closed_loop_poles(&l).unwrap().verdict,
        loopwright::freq::Verdict::Stable
    );
    let s = step_response(&l, 0.01, 500).unwrap();
    assert!(s.settling_time_s > s.rise_time_s && s.overshoot_percent.is_finite());
    // Final value A0/(1 + A0·β), the feedback equation.
    assert!((s.final_value - 1e4 / (1.0 + 1e4 * 0.01)).abs() < 1e-9);
}
