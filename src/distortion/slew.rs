//! Slew-rate limits of a sine-wave output.
//!
//! A sine of peak V and frequency f has a largest rate of change 2π·f·V, so an
//! amplifier with slew rate SR reproduces it undistorted only while 2π·f·V ≤ SR:
//!
//! - full-power bandwidth f_FP = SR / (2π·V_peak),
//! - the largest undistorted peak amplitude at f: V_max = SR / (2π·f),
//! - the slew rate needed for V_peak at f: SR = 2π·f·V_peak.
//!
//! Source: Sedra & Smith, *Microelectronic Circuits*, 7th ed., section on op-amp
//! large-signal operation (from memory). SR in V/s (1 V/µs = 10⁶ V/s).

use crate::check;
use crate::error::Result;
use core::f64::consts::PI;

/// Full-power bandwidth f = SR / (2π·V_peak), Hz.
///
/// `slew_rate` in V/s, `v_peak` the rated peak output in V.
///
/// # Errors
/// Either argument not finite or not greater than zero.
///
/// # Example
/// ```
/// use loopwright::distortion::full_power_bandwidth;
/// // 0.5 V/µs at 10 V peak: 7.96 kHz.
/// assert!((full_power_bandwidth(0.5e6, 10.0).unwrap() - 7957.747).abs() < 1e-3);
/// assert_eq!(full_power_bandwidth(0.5e6, 0.0).unwrap_err().param(), "v_peak");
/// ```
pub fn full_power_bandwidth(slew_rate: f64, v_peak: f64) -> Result<f64> {
    let sr = check::positive("slew_rate", slew_rate)?;
    let v = check::positive("v_peak", v_peak)?;
    check::result("full_power_bandwidth", sr / (2.0 * PI * v))
}

/// Largest undistorted peak amplitude at frequency f: V = SR / (2π·f), V.
///
/// # Errors
/// Either argument not finite or not greater than zero.
///
/// # Example
/// ```
/// use loopwright::distortion::max_undistorted_amplitude;
/// // 13 V/µs at 100 kHz: 20.7 V peak.
/// assert!((max_undistorted_amplitude(13e6, 1e5).unwrap() - 20.690_142).abs() < 1e-5);
/// assert_eq!(max_undistorted_amplitude(-1.0, 1e5).unwrap_err().param(), "slew_rate");
/// ```
pub fn max_undistorted_amplitude(slew_rate: f64, frequency_hz: f64) -> Result<f64> {
    let sr = check::positive("slew_rate", slew_rate)?;
    let f = check::positive("frequency_hz", frequency_hz)?;
    check::result("max_undistorted_amplitude", sr / (2.0 * PI * f))
}

/// Slew rate needed for a sine of peak `v_peak` at `frequency_hz`: 2π·f·V, V/s.
///
/// # Errors
/// Either argument not finite or not greater than zero; overflow.
///
/// # Example
/// ```
/// use loopwright::distortion::required_slew_rate;
/// // 10 V peak at 20 kHz needs 1.257 V/µs.
/// assert!((required_slew_rate(10.0, 2e4).unwrap() - 1.256_637e6).abs() < 1.0);
/// assert!(required_slew_rate(f64::NAN, 2e4).is_err());
/// ```
pub fn required_slew_rate(v_peak: f64, frequency_hz: f64) -> Result<f64> {
    let v = check::positive("v_peak", v_peak)?;
    let f = check::positive("frequency_hz", frequency_hz)?;
    check::result("slew_rate", 2.0 * PI * f * v)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_three_forms_are_one_relation() {
        // Identity: SR = 2π·f·V in all three arrangements.
        let sr = required_slew_rate(7.5, 3.3e4).unwrap();
        assert!((full_power_bandwidth(sr, 7.5).unwrap() / 3.3e4 - 1.0).abs() < 1e-15);
        assert!((max_undistorted_amplitude(sr, 3.3e4).unwrap() / 7.5 - 1.0).abs() < 1e-15);
    }

    #[test]
    fn classic_741_figure() {
        // Common practice, no source: a 0.5 V/µs op-amp at 10 V peak has a
        // full-power bandwidth of about 8 kHz.
        let f = full_power_bandwidth(0.5e6, 10.0).unwrap();
        assert!((f - 8.0e3).abs() < 0.05e3);
    }

    #[test]
    fn bad_inputs_are_named() {
        assert_eq!(
            full_power_bandwidth(f64::INFINITY, 1.0)
                .unwrap_err()
                .param(),
            "slew_rate"
        );
        assert_eq!(
            max_undistorted_amplitude(1e6, 0.0).unwrap_err().param(),
            "frequency_hz"
        );
        assert_eq!(
            required_slew_rate(1.0, -5.0).unwrap_err().param(),
            "frequency_hz"
        );
    }
}
