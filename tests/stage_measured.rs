//! A measured loop (src/stage/measured.rs): CSV rows of frequency, magnitude
//! and phase read as a loop gain, through the same margin and Nyquist engine.

use loopwright::freq::{nyquist, stability_margins, FeedbackLoop, TransferModel, Verdict};
use loopwright::stage::measured::{
    measured_margins, measured_nyquist, MagnitudeScale, MeasuredLoop,
};
use std::fmt::Write;

/// Sampled at 200 points per decade, the piecewise-linear interpolant of dB and
/// phase in ln f differs from the loop by at most h²/8 times the curvature,
/// h = ln 10/200 = 0.0115: below 1e-4 rad of phase and 1e-4 of ln|T| near
/// the crossings of these loops (second derivatives below 1 per unit ln f²).
/// Margins then agree within 0.01° (dB) and crossings within 1e-3 relative.
const SAMPLED_MARGIN: f64 = 1e-2;
const SAMPLED_FREQ_REL: f64 = 1e-3;

/// The loop's CSV at 200 points per decade from 1 Hz to 1 GHz, phase wrapped
/// into (−180°, 180°] as an analyser writes it.
fn sampled_csv(l: &FeedbackLoop, scale: MagnitudeScale) -> String {
    let mut s = String::from("frequency,magnitude,phase\n");
    for i in 0..=1800 {
        let f = 10f64.powf(i as f64 / 200.0);
        let t = loopwright::freq::loop_gain_at(l, f).unwrap();
        let m = match scale {
            MagnitudeScale::Decibels => 20.0 * t.norm().log10(),
            MagnitudeScale::Ratio => t.norm(),
        };
        writeln!(s, "{f:e},{m:e},{:e}", t.arg().to_degrees()).unwrap();
    }
    s
}

fn three_pole(gain: f64) -> FeedbackLoop {
    let a = TransferModel::constant(gain).pole(1e2).pole(1e5).pole(1e6);
    FeedbackLoop::with_constant_beta(a, 1.0).unwrap()
}

#[test]
fn a_sampled_loop_gives_the_margins_of_the_loop() {
    // The oracle is the same loop as a pole list, whose margins
    // tests/freq_reference.rs checks against python-control.
    for (gain, scale) in [
        (1e3, MagnitudeScale::Decibels),
        (1e3, MagnitudeScale::Ratio),
        (2e4, MagnitudeScale::Decibels),
    ] {
        let l = three_pole(gain);
        let want = stability_margins(&l).unwrap();
        let m = MeasuredLoop::from_csv(&sampled_csv(&l, scale), scale).unwrap();
        let got = measured_margins(&m, 0).unwrap();
        assert_eq!(got.closed_loop, want.closed_loop, "{gain}");
        assert_eq!(got.gain_crossings.len(), want.gain_crossings.len());
        assert_eq!(got.phase_crossings.len(), want.phase_crossings.len());
        let pairs = got
            .gain_crossings
            .iter()
            .zip(&want.gain_crossings)
            .chain(got.phase_crossings.iter().zip(&want.phase_crossings));
        for (g, w) in pairs {
            assert!(
                (g.freq_hz / w.freq_hz - 1.0).abs() < SAMPLED_FREQ_REL,
                "{g:?} {w:?}"
            );
            assert!((g.margin - w.margin).abs() < SAMPLED_MARGIN, "{g:?} {w:?}");
        }
        // Signed alike: the Nyquist verdict of the samples equals the poles'.
        let (a, b) = (
            got.phase_margin_deg.unwrap(),
            want.phase_margin_deg.unwrap(),
        );
        assert!((a - b).abs() < SAMPLED_MARGIN, "{a} {b}");
        let n = measured_nyquist(&m, 0).unwrap();
        let exact = nyquist(&l).unwrap();
        assert_eq!(n.encirclements.clockwise, exact.encirclements.clockwise);
        assert!((n.least_distance.distance - exact.least_distance.distance).abs() < 1e-3);
    }
    // DC loop gain 2e4 over poles at 100 Hz, 100 kHz, 1 MHz is unstable.
    assert_eq!(
        stability_margins(&three_pole(2e4)).unwrap().closed_loop,
        Verdict::Unstable
    );
}

#[test]
fn two_rows_interpolate_linearly_in_log_frequency() {
    // 20 dB at 1 kHz, −20 dB at 10 kHz, linear in log f: 0 dB at √(1k·10k) =
    // 3162.28 Hz, where the phase, linear in log f from −90° to −130°, is
    // −110°: PM = 70° (arithmetic on the stated interpolation).
    let m = MeasuredLoop::from_csv(
        "1 kHz, 20 dB, -90\n10k,-20,-130\n",
        MagnitudeScale::Decibels,
    )
    .unwrap();
    let got = measured_margins(&m, 0).unwrap();
    assert_eq!(got.gain_crossings.len(), 1);
    assert!((got.crossover_hz.unwrap() - 1e3 * 10f64.sqrt()).abs() < 1e-6);
    assert!(
        (got.phase_margin_deg.unwrap() - 70.0).abs() < 1e-9,
        "{got:?}"
    );
    assert_eq!(got.closed_loop, Verdict::Stable);
    // The same rows as ratios, the phase written wrapped (+230° is −130°).
    let r = MeasuredLoop::from_csv(
        "f,|T|,deg\n1000,10,-90\n10000,0.1,230\n",
        MagnitudeScale::Ratio,
    )
    .unwrap();
    let again = measured_margins(&r, 0).unwrap();
    assert!((again.phase_margin_deg.unwrap() - 70.0).abs() < 1e-9);
}

#[test]
fn bad_rows_are_reported_by_line_and_nothing_is_dropped() {
    let text = "frequency,magnitude,phase\n\
                10,40,-90\n\
                \n\
                100,abc,-91\n\
                1000,20\n\
                5,10,-100\n\
                2000,\"5\"x,-120\n\
                -3,0,-150\n\
                4000,0,-1e999\n";
    let e = MeasuredLoop::from_csv(text, MagnitudeScale::Decibels).unwrap_err();
    let rows: Vec<(u64, &str)> = e.rows.iter().map(|r| (r.line, r.error.param())).collect();
    assert_eq!(
        rows,
        [
            (4, "magnitude"),
            (5, "row"),
            (6, "frequency"),
            (7, "row"),
            (8, "frequency"),
            (9, "phase")
        ]
    );
    assert_eq!(e.error.param(), "magnitude");
    // Ratios must be positive.
    let e = MeasuredLoop::from_csv("1,0,-90\n2,1,-90\n", MagnitudeScale::Ratio).unwrap_err();
    assert_eq!((e.rows[0].line, e.rows[0].error.param()), (1, "magnitude"));
    // dB is not a ratio.
    let e = MeasuredLoop::from_csv("1,3 dB,-90\n2,1,-90\n", MagnitudeScale::Ratio).unwrap_err();
    assert_eq!(e.rows[0].error.param(), "magnitude");
    // Too few rows: an error about the whole text.
    let e = MeasuredLoop::from_csv("f,m,p\n1,0,-90\n", MagnitudeScale::Decibels).unwrap_err();
    assert!(e.rows.is_empty());
    assert_eq!(e.error.param(), "rows");
    // Arrays of different lengths.
    let e = MeasuredLoop::from_points(&[1.0, 2.0], &[0.0], &[0.0, 0.0], MagnitudeScale::Decibels)
        .unwrap_err();
    assert_eq!(e.param(), "rows");
}

#[test]
fn a_sampled_integrator_loop_is_closed_around_the_origin() {
    // T = 1000·(2π·1 Hz)/s · 1/(1 + s/(2π·100 kHz)): stable (both closed-loop
    // roots in the left half plane, common practice, no source); the first
    // rows show −20 dB/decade and −90°, so one integrator is passed on the
    // right and −1 is not encircled.
    let a = TransferModel::constant(1e3).integrator().pole(1e5);
    let l = FeedbackLoop::with_constant_beta(a, 1.0).unwrap();
    let m = MeasuredLoop::from_csv(
        &sampled_csv(&l, MagnitudeScale::Decibels),
        MagnitudeScale::Decibels,
    )
    .unwrap();
    let n = measured_nyquist(&m, 0).unwrap();
    assert_eq!(n.encirclements.origin_poles, 1);
    assert_eq!(n.encirclements.clockwise, 0);
    assert_eq!(n.encirclements.verdict, Verdict::Stable);
    let want = stability_margins(&l).unwrap().phase_margin_deg.unwrap();
    let got = measured_margins(&m, 0).unwrap().phase_margin_deg.unwrap();
    assert!((got - want).abs() < SAMPLED_MARGIN, "{got} {want}");
}
