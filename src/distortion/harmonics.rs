//! Harmonics of the closed loop by direct numeric solution and a short DFT: the
//! check path for the series results of [`super::leading_order`].
//!
//! The input is one period of x_k = X·cos(2π·k/N), k = 0…N−1. Each sample's output
//! y_k solves y = A(x − β·y) ([`super::LoopSolver`]). The harmonics come from a
//! direct (naive) discrete Fourier transform evaluated only at the bins needed:
//!
//!   Y_h = Σ_k y_k·e^(−j·2π·h·k/N),  amplitude of harmonic h ≥ 1: 2·|Y_h|/N,
//!   DC: Y_0/N.
//!
//! The twiddle angle uses the exact integer h·k mod N, so no phase error builds up
//! with k. The sum is accumulated sample by sample, so nothing is stored: O(N·H)
//! work for H harmonics, which for N ≤ 4096 and H = 5 costs less than the
//! solves. The output of a cubic in a loop is not band-limited; harmonic m aliases
//! onto bin m mod N, so N must be well above the highest harmonic of interest.
//! At the default N = 64, the first alias onto the 5th bin is harmonic 59, far
//! below rounding for the weakly nonlinear amplitudes this path checks.

use super::newton::LoopSolver;
use super::series::PowerSeries;
use crate::check;
use crate::error::{Error, Result};
use core::f64::consts::PI;

/// Default number of samples per period.
pub const DEFAULT_SAMPLES: usize = 64;
/// Fewest samples per period (keeps the 5th harmonic clear of the Nyquist bin).
pub const MIN_SAMPLES: usize = 16;
/// Most samples per period.
pub const MAX_SAMPLES: usize = 4096;
/// Harmonics reported, fundamental included.
pub const HARMONICS: usize = 5;

/// Amplitudes (peak) of the output's DC and first five harmonics, and the
/// distortion ratios they give.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Spectrum {
    /// Peak input amplitude X.
    pub input_amplitude: f64,
    /// DC shift of the output (signed).
    pub dc: f64,
    /// Peak amplitudes of harmonics 1…5 (index 0 is the fundamental).
    pub harmonics: [f64; HARMONICS],
    /// Second harmonic / fundamental.
    pub hd2: f64,
    /// Third harmonic / fundamental.
    pub hd3: f64,
    /// √(Σ harmonics 2…5 squared) / fundamental.
    pub thd: f64,
    /// Samples per period used.
    pub samples: usize,
}

/// The short DFT of one period of `n` samples at bins 0…HARMONICS, each sample
/// given by `sample(k)`; returns (DC, peak amplitudes of bins 1…HARMONICS).
///
/// # Errors
/// Whatever `sample` returns; [`Error::TooLarge`] / [`Error::OutOfDomain`] on
/// `samples` outside MIN_SAMPLES…MAX_SAMPLES.
pub fn short_dft<F>(n: usize, mut sample: F) -> Result<(f64, [f64; HARMONICS])>
where
    F: FnMut(usize) -> Result<f64>,
{
    if n > MAX_SAMPLES {
        return Err(Error::TooLarge {
            param: "samples",
            limit: MAX_SAMPLES as u64,
        });
    }
    if n < MIN_SAMPLES {
        return Err(Error::OutOfDomain {
            param: "samples",
            requirement: "must be at least 16",
        });
    }
    let mut re = [0.0f64; HARMONICS + 1];
    let mut im = [0.0f64; HARMONICS + 1];
    for k in 0..n {
        let y = sample(k)?;
        for (h, (r, i)) in re.iter_mut().zip(im.iter_mut()).enumerate() {
            let phase = 2.0 * PI * ((h * k) % n) as f64 / n as f64;
            *r += y * crate::float::cos(phase);
            *i -= y * crate::float::sin(phase);
        }
    }
    let nf = n as f64;
    let mut amps = [0.0f64; HARMONICS];
    for (h, a) in amps.iter_mut().enumerate() {
        *a = 2.0 * libm::hypot(re[h + 1], im[h + 1]) / nf;
    }
    Ok((re[0] / nf, amps))
}

/// The output spectrum of `open` in a loop with feedback factor `beta`, driven by
/// a cosine of peak `amplitude` at its input, from the numeric solve and the
/// short DFT. `beta = 0` gives the open-loop spectrum.
///
/// # Errors
/// `amplitude` not finite or not positive; `samples` outside 16…4096;
/// `beta` as in [`super::closed_loop_series`]; [`Error::NoConvergence`] on
/// `amplitude` when the peak input lies past the fold of the closed-loop curve.
///
/// # Example
/// ```
/// use loopwright::distortion::{closed_loop_spectrum, PowerSeries};
/// let amp = PowerSeries::new(1000.0, 100.0, -200.0).unwrap();
/// let s = closed_loop_spectrum(&amp, 0.009, 1e-3, 64).unwrap();
/// // Gain ≈ 1000/10 = 100: the fundamental is about 0.1 V.
/// assert!((s.harmonics[0] - 0.1).abs() < 1e-5);
/// assert_eq!(closed_loop_spectrum(&amp, 0.009, 10.0, 64).unwrap_err().param(), "amplitude");
/// ```
pub fn closed_loop_spectrum(
    open: &PowerSeries,
    beta: f64,
    amplitude: f64,
    samples: usize,
) -> Result<Spectrum> {
    let solver = LoopSolver::new(open, beta)?;
    let x_peak = check::positive("amplitude", amplitude)?;
    if x_peak >= solver.max_input_amplitude() {
        return Err(Error::NoConvergence {
            param: "amplitude",
            reason: "the peak input lies past the fold of the closed-loop transfer curve, where the cubic model has no solution on the branch through zero",
        });
    }
    let n = samples;
    let (dc, harmonics) = short_dft(n, |k| {
        let x = x_peak * crate::float::cos(2.0 * PI * k as f64 / n as f64);
        solver.output_named(x, "amplitude")
    })?;
    let fundamental = harmonics[0];
    if fundamental <= 0.0 {
        return Err(Error::Singular {
            param: "amplitude",
            reason: "the output has no fundamental",
        });
    }
    let mut sum = 0.0;
    for h in &harmonics[1..] {
        sum += h * h;
    }
    Ok(Spectrum {
        input_amplitude: x_peak,
        dc,
        harmonics,
        hd2: harmonics[1] / fundamental,
        hd3: harmonics[2] / fundamental,
        thd: crate::float::sqrt(sum) / fundamental,
        samples: n,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn open_loop_cubic_has_its_exact_harmonics() {
        // Trigonometric identities cos²θ = (1 + cos 2θ)/2, cos³θ = (3cos θ + cos 3θ)/4:
        // y = a1x + a2x² + a3x³ has DC a2X²/2, fundamental a1X + 3a3X³/4, 2nd a2X²/2,
        // 3rd a3X³/4 and nothing above.
        let amp = PowerSeries::new(10.0, 3.0, -2.0).unwrap();
        let x = 0.5;
        let s = closed_loop_spectrum(&amp, 0.0, x, 32).unwrap();
        assert!((s.dc - 3.0 * x * x / 2.0).abs() < 1e-14);
        assert!((s.harmonics[0] - (10.0 * x - 1.5 * x * x * x)).abs() < 1e-13);
        assert!((s.harmonics[1] - 3.0 * x * x / 2.0).abs() < 1e-14);
        assert!((s.harmonics[2] - 2.0 * x * x * x / 4.0).abs() < 1e-14);
        assert!(s.harmonics[3] < 1e-14 && s.harmonics[4] < 1e-14);
    }

    #[test]
    fn dft_of_a_pure_tone_lands_in_one_bin() {
        // Identity (orthogonality of the DFT basis): a tone at bin 3 of 50 with an
        // offset has its amplitude in bin 3, its offset in DC, nothing elsewhere.
        let (dc, a) = short_dft(50, |k| {
            Ok(0.3 + 2.0 * (2.0 * PI * 3.0 * k as f64 / 50.0 + 0.4).sin())
        })
        .unwrap();
        assert!((dc - 0.3).abs() < 1e-14);
        assert!((a[2] - 2.0).abs() < 1e-13);
        assert!(a[0] < 1e-13 && a[1] < 1e-13 && a[3] < 1e-13 && a[4] < 1e-13);
    }

    #[test]
    fn sample_count_is_bounded() {
        assert_eq!(short_dft(8, |_| Ok(0.0)).unwrap_err().param(), "samples");
        assert_eq!(
            short_dft(MAX_SAMPLES + 1, |_| Ok(0.0)).unwrap_err().code(),
            "too_large"
        );
    }

    #[test]
    fn past_the_fold_is_a_typed_error() {
        let amp = PowerSeries::new(100.0, 0.0, -100.0).unwrap();
        let e = closed_loop_spectrum(&amp, 0.1, 5.0, 64).unwrap_err();
        assert_eq!((e.code(), e.param()), ("no_convergence", "amplitude"));
    }
}
