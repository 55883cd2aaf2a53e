//! Distortion of a stage at a signal level and frequency: the amplifier's
//! nonlinearity, given by its open-loop HD2 and HD3 at an output amplitude (the
//! power series of [`crate::distortion::series_from_distortion`]), inside the
//! stage's own loop.
//!
//! The feedback factor is the stage's: β = T(0)/A0, with T the return ratio of
//! the stage's full circuit (so the source, the load and the amplifier's input
//! and output resistances load it as they do the loop), read at 10⁻⁶ of the
//! dominant pole. The loop gain over frequency is then the dominant-pole model of
//! [`crate::distortion::feedback_distortion_at`] (T(f) = A0·β/(1 + j·f/fp)): the
//! further poles of the amplifier and the network's capacitors are not in it, so
//! the result holds for signal frequencies well below the crossover.

use super::loop_gain::loop_gain;
use super::Stage;
use crate::circuit::CircuitResult;
use crate::distortion::{
    feedback_distortion_at, series_from_distortion, AmplitudeAt, FrequencyDistortion,
};

/// The amplifier's open-loop distortion as a datasheet or a measurement gives
/// it: signed HD2 and HD3 (fractions of the fundamental) at the open-loop output
/// peak `amplitude`, V.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OpenLoopDistortion {
    /// Second harmonic, a signed fraction.
    pub hd2: f64,
    /// Third harmonic, a signed fraction.
    pub hd3: f64,
    /// The open-loop output peak at which they hold, V.
    pub amplitude: f64,
}

/// HD2 and HD3 of `stage` with and without its feedback at the output peak
/// `level` (V) and the signal frequency `frequency_hz` (Hz; 0 for the static
/// result), the amplifier's nonlinearity from `open` (see the module doc).
///
/// # Errors
/// The stage's (its circuit, its amplifier); `hd2`, `hd3`, `amplitude`, `level`
/// (not finite or ≤ 0) or `frequency_hz` out of their domain, named as in
/// [`crate::distortion::series_from_distortion`] and
/// [`crate::distortion::feedback_distortion_at`].
///
/// # Example
/// ```
/// use loopwright::stage::distortion::{stage_distortion_at, OpenLoopDistortion};
/// use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
/// let s = Stage {
///     kind: StageKind::NonInverting,
///     amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e6),
///     point: SpreadPoint::Typ,
///     parts: StageParts { rf: Some(9e3), rg: Some(1e3), ..StageParts::default() },
/// };
/// let open = OpenLoopDistortion { hd2: 0.01, hd3: 0.001, amplitude: 1.0 };
/// let d = stage_distortion_at(&s, &open, 1.0, 0.0).unwrap();
/// // β = 0.1: the DC loop gain is 1e4.
/// assert!((d.dc_loop_gain / 1e4 - 1.0).abs() < 1e-9);
/// ```
pub fn stage_distortion_at(
    stage: &Stage,
    open: &OpenLoopDistortion,
    level: f64,
    frequency_hz: f64,
) -> CircuitResult<FrequencyDistortion> {
    let level = crate::check::positive("level", level)?;
    let a0 = stage.amplifier.a0.at(stage.point);
    let pole = stage.amplifier.dominant_pole_at(stage.point)?;
    let sc = stage.circuit()?;
    let t = loop_gain(&sc.circuit, sc.amplifier, &[pole * 1e-6])?;
    let beta = t.re[0] / a0;
    let series =
        series_from_distortion(a0, open.hd2, open.hd3, open.amplitude, AmplitudeAt::Output)?;
    Ok(feedback_distortion_at(
        &series,
        beta,
        pole,
        frequency_hz,
        level,
        AmplitudeAt::Output,
    )?)
}
