//! Closed forms for one- and two-pole loops.
//!
//! Single pole, A(s) = A0/(1 + s/ωH), constant β:
//! Af(s) = [A0/(1 + A0β)] / (1 + s/(ωH·(1 + A0β))), so
//! fHf = fH·(1 + A0·β) and the gain–bandwidth product A0·fH = Af0·fHf is kept.
//! Low cut, A(s) = AM·s/(s + ωL): fLf = fL/(1 + AM·β).
//!
//! Two poles, T(s) = T0/((1 + s/ω1)(1 + s/ω2)): the closed loop is second order
//! with ω0 = √((1 + T0)·ω1·ω2), Q = √((1 + T0)·ω1·ω2)/(ω1 + ω2), ζ = 1/(2Q).
//! Maximally flat (Butterworth) at Q = 1/√2, i.e. 1 + T0 = (f1 + f2)²/(2·f1·f2).
//! For Q > 1/√2: peaking Mp = Q/√(1 − 1/(4Q²)) at f0·√(1 − 1/(2Q²)).
//! For ζ < 1: step overshoot = exp(−π·ζ/√(1 − ζ²)).
//!
//! Source: Sedra & Smith, *Microelectronic Circuits*, 7th ed., sections 10.4 and
//! 10.8–10.9 (from memory); the second-order response in Franklin, Powell &
//! Emami-Naeini, 7th ed., section 3.3 (from memory).

use crate::check;
use crate::error::{Error, Result};
use core::f64::consts::PI;

fn feedback(a0: f64, beta: f64, a_name: &'static str) -> Result<f64> {
    let a0 = check::positive(a_name, a0)?;
    let beta = check::non_negative("beta", beta)?;
    check::result("feedback_amount", 1.0 + a0 * beta)
}

/// Closed-loop upper −3 dB frequency of a single-pole amplifier:
/// fHf = fH·(1 + A0·β), Hz.
///
/// # Errors
/// `f_h` or `a0` not > 0, `beta` negative or not finite.
///
/// # Example
/// ```
/// use loopwright::freq::closed_forms::single_pole_high_cutoff;
/// assert!((single_pole_high_cutoff(10.0, 1e5, 0.01).unwrap() - 10_010.0).abs() < 1e-9);
/// assert_eq!(single_pole_high_cutoff(-10.0, 1e5, 0.01).unwrap_err().param(), "f_h");
/// ```
pub fn single_pole_high_cutoff(f_h: f64, a0: f64, beta: f64) -> Result<f64> {
    let f = check::positive("f_h", f_h)?;
    let d = feedback(a0, beta, "a0")?;
    check::result("f_hf", f * d)
}

/// Closed-loop lower −3 dB frequency of a single low cut: fLf = fL/(1 + AM·β), Hz.
///
/// # Errors
/// `f_l` or `am` not > 0, `beta` negative or not finite.
///
/// # Example
/// ```
/// use loopwright::freq::closed_forms::single_pole_low_cutoff;
/// assert!((single_pole_low_cutoff(100.0, 1e3, 0.099).unwrap() - 1.0).abs() < 1e-12);
/// assert_eq!(single_pole_low_cutoff(100.0, 0.0, 0.1).unwrap_err().param(), "am");
/// ```
pub fn single_pole_low_cutoff(f_l: f64, am: f64, beta: f64) -> Result<f64> {
    let f = check::positive("f_l", f_l)?;
    let d = feedback(am, beta, "am")?;
    check::result("f_lf", f / d)
}

/// Gain–bandwidth product A0·fH, Hz (in the unit of A times Hz); the same for the
/// open and the closed loop of a single-pole amplifier.
///
/// # Errors
/// `a0` or `f_h` not > 0.
///
/// # Example
/// ```
/// use loopwright::freq::closed_forms::gain_bandwidth;
/// assert_eq!(gain_bandwidth(1e5, 10.0).unwrap(), 1e6);
/// assert!(gain_bandwidth(1e5, f64::NAN).is_err());
/// ```
pub fn gain_bandwidth(a0: f64, f_h: f64) -> Result<f64> {
    let a0 = check::positive("a0", a0)?;
    let f = check::positive("f_h", f_h)?;
    check::result("gain_bandwidth", a0 * f)
}

/// The dominant pole of a single-pole amplifier given by its gain–bandwidth
/// product: fH = GBW/A0, Hz (the inverse of [`gain_bandwidth`]; a datasheet gives
/// GBW, the pole follows from the DC gain).
///
/// # Errors
/// `gbw_hz` or `a0` not > 0.
///
/// # Example
/// ```
/// use loopwright::freq::closed_forms::pole_for_gbw;
/// assert_eq!(pole_for_gbw(1e6, 1e5).unwrap(), 10.0);
/// assert_eq!(pole_for_gbw(0.0, 1e5).unwrap_err().param(), "gbw_hz");
/// ```
pub fn pole_for_gbw(gbw_hz: f64, a0: f64) -> Result<f64> {
    let gbw = check::positive("gbw_hz", gbw_hz)?;
    let a0 = check::positive("a0", a0)?;
    check::result("pole_for_gbw", gbw / a0)
}

/// The closed loop of a two-pole amplifier in closed form.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct TwoPoleResponse {
    /// Natural frequency f0 = √((1 + T0)·f1·f2), Hz.
    pub natural_hz: f64,
    /// Quality factor Q.
    pub q: f64,
    /// Damping ratio ζ = 1/(2Q).
    pub zeta: f64,
    /// Peaking of |Af| over its DC value, dB (0 for Q ≤ 1/√2).
    pub peaking_db: f64,
    /// Frequency of the peak, Hz; `None` for Q ≤ 1/√2.
    pub peak_hz: Option<f64>,
    /// Step overshoot, % (0 for ζ ≥ 1).
    pub overshoot_percent: f64,
    /// DC loop gain T0 that makes this pole pair maximally flat (Q = 1/√2).
    pub maximally_flat_loop_gain: f64,
}

/// Q, ζ, peaking and overshoot of the closed loop of T = T0/((1 + s/ω1)(1 + s/ω2)).
///
/// # Errors
/// `f1`, `f2` not > 0; `t0` not > −1 (the DC return difference must be positive).
///
/// # Example
/// ```
/// use loopwright::freq::closed_forms::two_pole_response;
/// // Maximally flat: Q = 1/√2, no peaking.
/// let t0 = (1e3f64 + 1e5).powi(2) / (2.0 * 1e3 * 1e5) - 1.0;
/// let r = two_pole_response(1e3, 1e5, t0).unwrap();
/// assert!((r.q - 0.5f64.sqrt()).abs() < 1e-12 && r.peaking_db == 0.0);
/// assert_eq!(two_pole_response(1e3, 1e5, -2.0).unwrap_err().param(), "t0");
/// ```
pub fn two_pole_response(f1: f64, f2: f64, t0: f64) -> Result<TwoPoleResponse> {
    let f1 = check::positive("f1", f1)?;
    let f2 = check::positive("f2", f2)?;
    let t0 = check::finite("t0", t0)?;
    if t0 <= -1.0 {
        return Err(Error::OutOfDomain {
            param: "t0",
            requirement: "must be greater than −1",
        });
    }
    let f0 = check::result("natural_hz", crate::float::sqrt((1.0 + t0) * f1 * f2))?;
    let q = f0 / (f1 + f2);
    let (peaking_db, peak_hz) = peaking_from_q(q);
    let zeta = 1.0 / (2.0 * q);
    Ok(TwoPoleResponse {
        natural_hz: f0,
        q,
        zeta,
        peaking_db,
        peak_hz: peak_hz.map(|r| r * f0),
        overshoot_percent: overshoot_from_zeta(zeta) * 100.0,
        maximally_flat_loop_gain: (f1 + f2) * (f1 + f2) / (2.0 * f1 * f2) - 1.0,
    })
}

/// Peaking of a second-order low-pass in dB, and the peak frequency as a fraction
/// of f0: Mp = Q/√(1 − 1/(4Q²)) at √(1 − 1/(2Q²)); (0, None) for Q ≤ 1/√2.
/// Any Q is accepted (no error): Q ≤ 1/√2, including zero or negative, has no
/// peaking.
///
/// # Example
/// ```
/// use loopwright::freq::closed_forms::peaking_from_q;
/// let (db, at) = peaking_from_q(1.0); // 1.25 dB at f0/√2
/// assert!((db - 1.2494).abs() < 1e-4 && (at.unwrap() - 0.5f64.sqrt()).abs() < 1e-12);
/// assert_eq!(peaking_from_q(0.5), (0.0, None));
/// ```
pub fn peaking_from_q(q: f64) -> (f64, Option<f64>) {
    // Q ≤ 1/√2, with a few ulps of slack so that Q = 1/√2 itself counts as flat.
    if q * q <= 0.5 * (1.0 + 8.0 * f64::EPSILON) {
        return (0.0, None);
    }
    let mp = q / crate::float::sqrt(1.0 - 1.0 / (4.0 * q * q));
    (
        20.0 * libm::log10(mp),
        Some(crate::float::sqrt(1.0 - 1.0 / (2.0 * q * q))),
    )
}

/// Step overshoot of a second-order system as a fraction: exp(−πζ/√(1 − ζ²)),
/// 0 for ζ ≥ 1. Any ζ < 1 is accepted (ζ ≤ 0 gives ≥ 100 %, the undamped and
/// growing cases).
///
/// # Example
/// ```
/// use loopwright::freq::closed_forms::overshoot_from_zeta;
/// assert!((overshoot_from_zeta(0.5) - 0.163).abs() < 1e-3); // 16.3 %
/// assert_eq!(overshoot_from_zeta(1.2), 0.0);
/// ```
pub fn overshoot_from_zeta(zeta: f64) -> f64 {
    if zeta >= 1.0 {
        return 0.0;
    }
    libm::exp(-PI * zeta / crate::float::sqrt(1.0 - zeta * zeta))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gain_bandwidth_is_kept_under_feedback() {
        // Af0·fHf = A0/(1+A0β)·fH(1+A0β) = A0·fH.
        let (a0, fh, beta) = (2e5, 5.0, 0.1);
        let af0 = a0 / (1.0 + a0 * beta);
        let fhf = single_pole_high_cutoff(fh, a0, beta).unwrap();
        assert!((af0 * fhf - gain_bandwidth(a0, fh).unwrap()).abs() < 1e-6);
    }

    #[test]
    fn max_flat_q_has_no_peaking_and_4_3_percent_overshoot() {
        // Common practice, no source: Q = 1/√2 is maximally flat (no peaking), and
        // its step overshoot is about 4.3 %.
        let (db, f) = peaking_from_q(crate::float::sqrt(0.5));
        assert_eq!((db, f), (0.0, None));
        assert!((overshoot_from_zeta(crate::float::sqrt(0.5)) * 100.0 - 4.32).abs() < 0.01);
    }

    #[test]
    fn q_of_one_peaks_by_1_25_db() {
        // Mp = 1/√(3/4) = 1.1547 → 1.249 dB (from the formula above).
        let (db, f) = peaking_from_q(1.0);
        assert!((db - 20.0 * libm::log10(2.0 / crate::float::sqrt(3.0))).abs() < 1e-12);
        assert!((f.unwrap() - crate::float::sqrt(0.5)).abs() < 1e-12);
    }
}
