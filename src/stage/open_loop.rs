//! The amplifier's open-loop gain A(jω) swept over frequency, as the same
//! [`ResponseSweep`] the loop gain and the closed-loop gain use.

use super::amplifier::Amplifier;
use super::loop_gain::ResponseSweep;
use super::spread::SpreadPoint;
use crate::circuit::mna::MAX_SWEEP;
use crate::circuit::{CircuitError, CircuitResult};
use crate::error::Error;
use alloc::vec::Vec;

/// A(jω) = A0(point) / (1 + jf/fp) · (further poles, zeros and pairs) at each
/// frequency (Hz), with the magnitude in dB and the phase unwrapped (degrees);
/// see [`Amplifier::open_loop_gain`] for the factors.
///
/// # Errors
/// More than [`MAX_SWEEP`] frequencies (param `frequencies`); every error of
/// [`Amplifier::validate`]; a negative or non-finite frequency (`frequency`).
///
/// # Example
/// ```
/// use loopwright::stage::open_loop::open_loop_sweep;
/// use loopwright::stage::{Amplifier, Spread, SpreadPoint};
/// // A0 = 1e5, GBW = 1 MHz: the dominant pole at 10 Hz, 97 dB and −45° there.
/// let a = Amplifier::from_gbw(Spread::fixed(1e5), 1e6);
/// let s = open_loop_sweep(&a, SpreadPoint::Typ, &[10.0]).unwrap();
/// assert!((s.magnitude_db[0] - (100.0 - 10.0 * 2f64.log10())).abs() < 1e-9);
/// assert!((s.phase_deg[0] + 45.0).abs() < 1e-9);
/// assert_eq!(open_loop_sweep(&a, SpreadPoint::Typ, &[-1.0]).unwrap_err().error.param(), "frequency");
/// ```
pub fn open_loop_sweep(
    a: &Amplifier,
    point: SpreadPoint,
    frequencies_hz: &[f64],
) -> CircuitResult<ResponseSweep> {
    if frequencies_hz.len() > MAX_SWEEP {
        return Err(CircuitError::from(Error::TooLarge {
            param: "frequencies",
            limit: MAX_SWEEP as u64,
        }));
    }
    a.validate()?;
    let h = frequencies_hz
        .iter()
        .map(|&f| a.open_loop_gain(f, point))
        .collect::<crate::Result<Vec<_>>>()?;
    ResponseSweep::from_samples("openLoopGain", frequencies_hz, &h)
}
