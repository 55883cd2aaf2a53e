//! `stage::distortion::stage_distortion_at`: the amplifier's open-loop HD2 and HD3
//! inside the stage's own loop. Expected values are hand closed forms: the
//! feedback factor of the loaded non-inverting network by Kirchhoff's laws, and
//! the reduction of second-harmonic distortion at a given output level by the
//! amount of feedback 1 + T (Sedra & Smith, *Microelectronic Circuits*, 7th ed.,
//! §11.1, "reduction in nonlinear distortion"; from memory), with HD2 ∝ output
//! level for a second-order term (HD2 = a2·Y/(2·a1²), Y the output peak; common
//! practice, no source).

use loopwright::stage::distortion::{stage_distortion_at, OpenLoopDistortion};
use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};

fn stage(rd: Option<f64>, rs: Option<f64>) -> Stage {
    Stage {
        kind: StageKind::NonInverting,
        amplifier: Amplifier::from_gbw(Spread::fixed(2e5), 4e6).with_input(rd, 0.0, None, 0.0),
        point: SpreadPoint::Typ,
        parts: StageParts {
            rf: Some(47e3),
            rg: Some(1e3),
            rs,
            ..StageParts::default()
        },
    }
}

const OPEN: OpenLoopDistortion = OpenLoopDistortion {
    hd2: 0.02,
    hd3: 0.005,
    amplitude: 2.0,
};

#[test]
fn the_feedback_factor_is_the_loaded_networks() {
    // Unloaded: β = Rg/(Rf + Rg) = 1/48.
    let d = stage_distortion_at(&stage(None, None), &OPEN, 1.0, 0.0).unwrap();
    assert!(
        (d.dc_loop_gain / (2e5 / 48.0) - 1.0).abs() < 1e-9,
        "{}",
        d.dc_loop_gain
    );
    // Rd = 20 kΩ between the inputs and Rs = 5 kΩ to the (zeroed) source: with
    // the output at 1 V, v(fb) = Rp/(Rf + Rp), Rp = Rg ‖ (Rd + Rs), and the
    // difference the amplifier sees is v(fb)·Rd/(Rd + Rs).
    let (rf, rg, rd, rs) = (47e3, 1e3, 20e3, 5e3);
    let rp = 1.0 / (1.0 / rg + 1.0 / (rd + rs));
    let beta = rp / (rf + rp) * rd / (rd + rs);
    let d = stage_distortion_at(&stage(Some(rd), Some(rs)), &OPEN, 1.0, 0.0).unwrap();
    assert!(
        (d.dc_loop_gain / (2e5 * beta) - 1.0).abs() < 1e-9,
        "{}",
        d.dc_loop_gain
    );
}

#[test]
fn feedback_divides_hd2_at_the_same_output_by_one_plus_t() {
    // At 1 V out the open amplifier's HD2 is 2 % · 1 V / 2 V = 1 %; with T0 = 4167
    // the stage's is 1 %/(1 + T0) to leading order.
    let d = stage_distortion_at(&stage(None, None), &OPEN, 1.0, 0.0).unwrap();
    let t0 = 2e5 / 48.0;
    let expected = 0.01 / (1.0 + t0);
    assert!(
        (d.closed_at_dc.hd2.abs() / expected - 1.0).abs() < 1e-3,
        "{}",
        d.closed_at_dc.hd2
    );
    assert!(
        (d.open.hd2.abs() / 0.01 - 1.0).abs() < 1e-3,
        "{}",
        d.open.hd2
    );
    // At 10 kHz the loop gain is down to about GBW·β/f = 8.3: far less reduction.
    let d = stage_distortion_at(&stage(None, None), &OPEN, 1.0, 10e3).unwrap();
    assert!(d.closed.hd2.abs() > 100.0 * d.closed_at_dc.hd2.abs());
}

#[test]
fn bad_figures_are_errors_naming_the_parameter() {
    let s = stage(None, None);
    let param = |open: OpenLoopDistortion, level: f64, f: f64| {
        stage_distortion_at(&s, &open, level, f)
            .unwrap_err()
            .error
            .param()
    };
    assert_eq!(
        param(
            OpenLoopDistortion {
                amplitude: 0.0,
                ..OPEN
            },
            1.0,
            0.0
        ),
        "amplitude"
    );
    assert_eq!(
        param(
            OpenLoopDistortion {
                hd2: f64::NAN,
                ..OPEN
            },
            1.0,
            0.0
        ),
        "hd2"
    );
    assert_eq!(param(OPEN, 1.0, -1.0), "frequency_hz");
    assert_eq!(param(OPEN, 0.0, 1e3), "level");
}
