//! The closed-loop response that shapes a stage's output noise: a self-contained
//! model from the op-amp's gain–bandwidth product, the noise gain, and up to two
//! extra open-loop poles.
//!
//! The op-amp's open-loop gain is modelled as an integrator with up to two more
//! real poles, A(s) = ω_t/s · 1/((1 + s/ω2)(1 + s/ω3)), ω_t = 2π·GBW. With β = 1/NG
//! the loop gain is T = A·β and every noise source of the stage reaches the output
//! through its ideal gain times
//!
//!   H(f) = T/(1 + T) = 1 / (1 + (jf/f_c)(1 + jf/f2)(1 + jf/f3)),  f_c = GBW/NG,
//!
//! (Asymptotic-gain view: the op-amp stage has no direct feedthrough). Without
//! extra poles |H|² = 1/(1 + (f/f_c)²), a single pole at f_c whose noise bandwidth
//! is π/2·f_c. With one extra pole the closed loop is a second-order low-pass,
//! always stable. With two, the characteristic polynomial
//! s³/(ω2ω3) + s²(1/ω2 + 1/ω3) + s + ω_c is stable exactly when f2 + f3 > f_c
//! (Routh–Hurwitz); otherwise the response does not decay and the noise integral
//! does not exist, which is reported as [`Error::Oscillation`] on `extra_poles_hz`.
//!
//! This model stands alone on purpose; a general frequency-response model can
//! replace it later behind the same [`ClosedLoopResponse::magnitude_squared`].
//! The finite DC gain of the op-amp is left out (H(0) = 1): its effect on noise
//! is a gain error of order 1/(A0·β).
//!
//! Source: single-pole closed-loop bandwidth GBW/NG and noise bandwidth π/2·f_c:
//! Analog Devices, *Op Amp Applications Handbook*, 2005, ch. 1 (from memory);
//! Routh–Hurwitz for a cubic: Ogata, *Modern Control Engineering*, 5th ed.,
//! section 5-6 (from memory).

use crate::check;
use crate::error::{Error, Result};
use core::f64::consts::PI;
use num_complex::Complex64;

/// Most extra open-loop poles.
pub const MAX_EXTRA_POLES: usize = 2;

/// Grid density of the −3 dB search, points per decade.
const SEARCH_PER_DECADE: f64 = 64.0;

/// The closed-loop noise-shaping response of one stage.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ClosedLoopResponse {
    noise_gain: f64,
    gbw_hz: f64,
    poles: [f64; MAX_EXTRA_POLES],
    pole_count: usize,
}

impl ClosedLoopResponse {
    /// The response for a noise gain, a gain–bandwidth product and up to two
    /// extra open-loop poles.
    ///
    /// `noise_gain` > 0 (V/V, 1/β), `gbw_hz` > 0 (Hz), each extra pole > 0 (Hz).
    ///
    /// # Errors
    /// Non-finite or non-positive values; [`Error::TooLarge`] on more than two
    /// extra poles; [`Error::Oscillation`] on `extra_poles_hz` when the closed loop
    /// is unstable or marginal (f2 + f3 ≤ GBW/NG).
    ///
    /// # Example
    /// ```
    /// use loopwright::noise::ClosedLoopResponse;
    /// let h = ClosedLoopResponse::new(10.0, 1e6, &[]).unwrap();
    /// assert_eq!(h.loop_crossover_hz(), 1e5);
    /// assert!((h.magnitude_squared(1e5) - 0.5).abs() < 1e-15);
    /// // Two extra poles at 40 kHz and 50 kHz below f_c = 100 kHz: unstable.
    /// assert_eq!(ClosedLoopResponse::new(10.0, 1e6, &[4e4, 5e4]).unwrap_err().code(), "oscillation");
    /// ```
    pub fn new(noise_gain: f64, gbw_hz: f64, extra_poles_hz: &[f64]) -> Result<Self> {
        let noise_gain = check::positive("noise_gain", noise_gain)?;
        let gbw_hz = check::positive("gbw_hz", gbw_hz)?;
        if extra_poles_hz.len() > MAX_EXTRA_POLES {
            return Err(Error::TooLarge {
                param: "extra_poles_hz",
                limit: MAX_EXTRA_POLES as u64,
            });
        }
        let mut poles = [0.0; MAX_EXTRA_POLES];
        for (slot, &p) in poles.iter_mut().zip(extra_poles_hz) {
            *slot = check::positive("extra_poles_hz", p)?;
        }
        let h = ClosedLoopResponse {
            noise_gain,
            gbw_hz,
            poles,
            pole_count: extra_poles_hz.len(),
        };
        let fc = h.loop_crossover_hz();
        if !fc.is_finite() || fc <= 0.0 {
            return Err(Error::OutOfDomain {
                param: "noise_gain",
                requirement: "must give a finite, positive GBW/noise_gain",
            });
        }
        if h.pole_count == MAX_EXTRA_POLES && poles[0] + poles[1] <= fc {
            return Err(Error::Oscillation {
                param: "extra_poles_hz",
            });
        }
        Ok(h)
    }

    /// The extra poles in use, Hz.
    pub fn extra_poles_hz(&self) -> &[f64] {
        &self.poles[..self.pole_count]
    }

    /// Noise gain NG.
    pub fn noise_gain(&self) -> f64 {
        self.noise_gain
    }

    /// Gain–bandwidth product, Hz.
    pub fn gbw_hz(&self) -> f64 {
        self.gbw_hz
    }

    /// f_c = GBW/NG, the loop-gain crossover and, without extra poles, the
    /// closed-loop −3 dB frequency, Hz.
    pub fn loop_crossover_hz(&self) -> f64 {
        self.gbw_hz / self.noise_gain
    }

    /// H(f) = T/(1 + T) at `f` Hz (complex, H(0) = 1).
    pub fn response(&self, f: f64) -> Complex64 {
        let jf = Complex64::new(0.0, f);
        let mut inv_t = jf / self.loop_crossover_hz();
        for &p in self.extra_poles_hz() {
            inv_t *= Complex64::new(1.0, 0.0) + jf / p;
        }
        Complex64::new(1.0, 0.0) / (Complex64::new(1.0, 0.0) + inv_t)
    }

    /// |H(f)|², computed without forming H.
    pub fn magnitude_squared(&self, f: f64) -> f64 {
        let jf = Complex64::new(0.0, f);
        let mut inv_t = jf / self.loop_crossover_hz();
        for &p in self.extra_poles_hz() {
            inv_t *= Complex64::new(1.0, 0.0) + jf / p;
        }
        1.0 / (Complex64::new(1.0, 0.0) + inv_t).norm_sqr()
    }

    /// Noise bandwidth of a single pole at f_c: π/2·f_c, Hz. Exact for no extra
    /// pole and, by the second-order identity ∫|H|² = π/2·f0·Q with
    /// f0·Q = f_c, for one extra pole too.
    pub fn single_pole_noise_bandwidth_hz(&self) -> f64 {
        0.5 * PI * self.loop_crossover_hz()
    }

    /// The highest frequency where |H|² ≥ 1/2 (the −3 dB bandwidth, above any
    /// peaking), Hz: a log-spaced scan refined by bisection.
    ///
    /// # Errors
    /// [`Error::NoConvergence`] when no crossing is found in the scanned range
    /// (10⁻³·f_c … 10³·the highest pole or f_c); not expected for a stable model.
    pub fn bandwidth_hz(&self) -> Result<f64> {
        let fc = self.loop_crossover_hz();
        if self.pole_count == 0 {
            return Ok(fc);
        }
        let mut top = fc;
        for &p in self.extra_poles_hz() {
            if p > top {
                top = p;
            }
        }
        let lo = fc * 1e-3;
        let hi = top * 1e3;
        let decades = libm::log10(hi / lo);
        let steps = (decades * SEARCH_PER_DECADE) as usize + 1;
        let at = |i: usize| lo * libm::pow(10.0, decades * i as f64 / steps as f64);
        let mut last_above: Option<usize> = None;
        for i in 0..=steps {
            if self.magnitude_squared(at(i)) >= 0.5 {
                last_above = Some(i);
            }
        }
        let i = match last_above {
            Some(i) if i < steps => i,
            _ => {
                return Err(Error::NoConvergence {
                    param: "bandwidth_hz",
                    reason: "no −3 dB crossing in the scanned range",
                })
            }
        };
        let (mut a, mut b) = (at(i), at(i + 1));
        for _ in 0..200 {
            let m = 0.5 * (a + b);
            if self.magnitude_squared(m) >= 0.5 {
                a = m;
            } else {
                b = m;
            }
            if b - a <= 4.0 * f64::EPSILON * b {
                break;
            }
        }
        Ok(0.5 * (a + b))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn single_pole_is_down_3_db_at_gbw_over_noise_gain() {
        // Common practice, no source: closed-loop bandwidth = GBW / noise gain.
        let h = ClosedLoopResponse::new(100.0, 10e6, &[]).unwrap();
        assert_eq!(h.bandwidth_hz().unwrap(), 1e5);
        assert!((h.magnitude_squared(1e5) - 0.5).abs() < 1e-15);
        assert!((h.response(0.0) - Complex64::new(1.0, 0.0)).norm() < 1e-15);
    }

    #[test]
    fn one_extra_pole_at_twice_fc_peaks_like_a_q_of_0_707() {
        // H = ωcω2/(s² + ω2s + ωcω2), Q = √(fc/f2): f2 = 2·fc gives Q = 1/√2,
        // maximally flat, so −3 dB at f0 = √(fc·f2) = √2·fc.
        let h = ClosedLoopResponse::new(1.0, 1e6, &[2e6]).unwrap();
        let bw = h.bandwidth_hz().unwrap();
        assert!((bw / (2f64.sqrt() * 1e6) - 1.0).abs() < 1e-9, "{bw}");
    }

    #[test]
    fn routh_boundary_is_the_sum_of_the_extra_poles() {
        // Stable just above f2 + f3 = fc, refused at and below it.
        assert!(ClosedLoopResponse::new(1.0, 1e6, &[0.5e6, 0.5001e6]).is_ok());
        assert_eq!(
            ClosedLoopResponse::new(1.0, 1e6, &[0.5e6, 0.5e6])
                .unwrap_err()
                .param(),
            "extra_poles_hz"
        );
        // The marginal loop has a closed-loop pole on the jω axis at √(f2·f3):
        // 1 + 1/T vanishes there.
        let inv = |f: f64| {
            let jf = Complex64::new(0.0, f);
            Complex64::new(1.0, 0.0)
                + jf / 1e6
                    * (Complex64::new(1.0, 0.0) + jf / 0.5e6)
                    * (Complex64::new(1.0, 0.0) + jf / 0.5e6)
        };
        assert!(inv(0.5e6).norm() < 1e-12);
    }

    #[test]
    fn bad_inputs_are_named() {
        assert_eq!(
            ClosedLoopResponse::new(0.0, 1e6, &[]).unwrap_err().param(),
            "noise_gain"
        );
        assert_eq!(
            ClosedLoopResponse::new(1.0, f64::NAN, &[])
                .unwrap_err()
                .param(),
            "gbw_hz"
        );
        assert_eq!(
            ClosedLoopResponse::new(1.0, 1e6, &[-1e6])
                .unwrap_err()
                .param(),
            "extra_poles_hz"
        );
        assert_eq!(
            ClosedLoopResponse::new(1.0, 1e6, &[1e7, 1e7, 1e7])
                .unwrap_err()
                .code(),
            "too_large"
        );
    }
}
