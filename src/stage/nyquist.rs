//! The Nyquist reading of a circuit's loop: the curve of its return ratio,
//! the least distance from −1 and the encirclement count, through the same
//! engine as the pole-list loops ([`crate::freq::nyquist_of`]).
//!
//! P, the poles of T in the right half plane, are the opened circuit's
//! (the reference source replaced by a test source, every independent source
//! at zero; [`super::poles::circuit_poles`]); the amplifier models have none.
//! A pole of T at s = 0 is recognised from the slope of |T| at the low end of
//! the grid and passed on the right (see [`crate::freq::nyquist`]). The
//! verdict Z = N + P agrees with the closed circuit's poles (property test
//! `tests/stage_loop.rs`).

use super::margins::{rhp_count, setup, CircuitLoop};
use crate::circuit::{Circuit, CircuitResult};
use crate::freq::crossings::DEFAULT_POINTS_PER_DECADE;
use crate::freq::{nyquist_of, Nyquist};

/// The Nyquist reading of the loop of `c` broken at `controlled`.
///
/// # Errors
/// As [`super::margins::circuit_margins`]; more than
/// [`crate::freq::nyquist::MAX_NYQUIST_POINTS`] curve points (param
/// `nyquist_points`).
///
/// # Example
/// ```
/// use loopwright::stage::nyquist::circuit_nyquist;
/// use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
/// use loopwright::freq::Verdict;
/// let s = Stage {
///     kind: StageKind::NonInverting,
///     amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e6).with_pole(1e6),
///     point: SpreadPoint::Typ,
///     parts: StageParts { rf: Some(9e3), rg: Some(1e3), ..StageParts::default() },
/// }.circuit().unwrap();
/// let n = circuit_nyquist(&s.circuit, "U1").unwrap();
/// assert_eq!(n.encirclements.clockwise, 0);
/// assert_eq!(n.encirclements.verdict, Verdict::Stable);
/// assert!(n.least_distance.distance > 0.5);
/// ```
pub fn circuit_nyquist(c: &Circuit, controlled: &str) -> CircuitResult<Nyquist> {
    circuit_nyquist_with_density(c, controlled, DEFAULT_POINTS_PER_DECADE)
}

/// [`circuit_nyquist`] with a chosen grid density, points per decade (4…2000).
///
/// # Errors
/// As [`circuit_nyquist`].
pub fn circuit_nyquist_with_density(
    c: &Circuit,
    controlled: &str,
    points_per_decade: u32,
) -> CircuitResult<Nyquist> {
    let s = setup(c, controlled)?;
    let l = CircuitLoop::new(c, &s)?;
    let r = nyquist_of(&l, points_per_decade, rhp_count(&s.open));
    l.finish(r)
}
