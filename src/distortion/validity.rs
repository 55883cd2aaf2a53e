//! Where the series result holds: the leading-order closed-loop HD2 and HD3 of
//! [`super::feedback_distortion`] beside the numeric spectrum of
//! [`super::closed_loop_spectrum`], at one amplitude or over a sweep.
//!
//! At small amplitude the two agree with a relative difference of order X² (the
//! next terms of the closed-loop series); it grows with amplitude until the curve
//! folds. Below about HD = 1e-12 the numeric path's rounding floor dominates.

use super::harmonics::closed_loop_spectrum;
use super::leading_order::{harmonic_distortion, AmplitudeAt};
use super::newton::LoopSolver;
use super::series::{closed_loop_series, PowerSeries};
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;

/// Most points of a sweep.
pub const MAX_SWEEP_POINTS: usize = 512;

/// The rounding floor of the numeric path, as a fraction of the fundamental: a
/// numeric HD2 or HD3 below it is rounding noise of the solve and the DFT, not a
/// result (module doc; a linear amplifier, whose true harmonics are 0, gives
/// values below it: the test `linear_amplifier_stays_under_the_floor`).
pub const NUMERIC_HD_FLOOR: f64 = 1e-12;

/// Relative difference |a − b| / max(|a|, |b|), 0 when both are 0; in [0, 1] for
/// values of one sign.
pub fn relative_difference(a: f64, b: f64) -> f64 {
    let m = if libm::fabs(a) > libm::fabs(b) {
        libm::fabs(a)
    } else {
        libm::fabs(b)
    };
    if m == 0.0 {
        0.0
    } else {
        libm::fabs(a - b) / m
    }
}

/// Series and numeric closed-loop distortion at one input amplitude.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct SeriesCheck {
    /// Peak input amplitude X.
    pub input_amplitude: f64,
    /// Leading-order HD2 from b1, b2.
    pub series_hd2: f64,
    /// Leading-order HD3 from b1, b3.
    pub series_hd3: f64,
    /// HD2 from the numeric solve and DFT.
    pub numeric_hd2: f64,
    /// HD3 from the numeric solve and DFT.
    pub numeric_hd3: f64,
    /// [`relative_difference`] of the two HD2 values.
    pub hd2_difference: f64,
    /// [`relative_difference`] of the two HD3 values.
    pub hd3_difference: f64,
}

/// The closed-loop HD2 and HD3 of `open` under `beta` at input amplitude
/// `amplitude`, by the series and by the numeric path, and how far apart they are.
///
/// # Errors
/// As [`closed_loop_series`] and [`closed_loop_spectrum`].
///
/// # Example
/// ```
/// use loopwright::distortion::{series_check, PowerSeries};
/// let amp = PowerSeries::new(1000.0, 100.0, -200.0).unwrap();
/// let c = series_check(&amp, 0.009, 1e-3, 64).unwrap();
/// assert!(c.hd2_difference < 1e-3 && c.hd3_difference < 1e-3);
/// assert_eq!(series_check(&amp, 0.009, f64::NAN, 64).unwrap_err().param(), "amplitude");
/// ```
pub fn series_check(
    open: &PowerSeries,
    beta: f64,
    amplitude: f64,
    samples: usize,
) -> Result<SeriesCheck> {
    let closed = closed_loop_series(open, beta)?;
    let series = harmonic_distortion(&closed, amplitude, AmplitudeAt::Input)?;
    let numeric = closed_loop_spectrum(open, beta, amplitude, samples)?;
    Ok(SeriesCheck {
        input_amplitude: series.input_amplitude,
        series_hd2: series.hd2,
        series_hd3: series.hd3,
        numeric_hd2: numeric.hd2,
        numeric_hd3: numeric.hd3,
        hd2_difference: relative_difference(series.hd2, numeric.hd2),
        hd3_difference: relative_difference(series.hd3, numeric.hd3),
    })
}

/// Series against numeric distortion over log-spaced input amplitudes.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ValiditySweep {
    /// Peak input amplitudes actually solved (the sweep stops before the fold).
    pub amplitudes: Vec<f64>,
    /// Leading-order series HD2 at each amplitude.
    pub series_hd2: Vec<f64>,
    /// Leading-order series HD3.
    pub series_hd3: Vec<f64>,
    /// Numeric HD2.
    pub numeric_hd2: Vec<f64>,
    /// Numeric HD3.
    pub numeric_hd3: Vec<f64>,
    /// The peak input amplitude at which the closed-loop curve folds, if it does.
    pub fold_amplitude: Option<f64>,
    /// The largest swept amplitude below the first one where the HD3 values
    /// differ by more than `tolerance`; `None` when even the first point does, or
    /// all points agree ([`Self::hd3_holds_throughout`]).
    pub hd3_limit_amplitude: Option<f64>,
    /// True when every swept point agrees within `tolerance` on HD3.
    pub hd3_holds_throughout: bool,
    /// [`NUMERIC_HD_FLOOR`]: numeric values below it are rounding noise.
    pub numeric_floor: f64,
}

/// Sweep the input amplitude from `amplitude_min` to `amplitude_max` in `points`
/// log-spaced steps, comparing the series HD2/HD3 with the numeric ones, and find
/// where HD3 first differs by more than `tolerance` (a fraction, e.g. 0.1).
///
/// Points at or past the fold of the closed-loop curve are left out, and the fold
/// amplitude is reported instead.
///
/// # Errors
/// Amplitudes not finite or not positive, `amplitude_max ≤ amplitude_min`;
/// `points` outside 2…512; `tolerance` outside (0, 1); as [`series_check`].
///
/// # Example
/// ```
/// use loopwright::distortion::{series_validity_sweep, PowerSeries};
/// let amp = PowerSeries::new(100.0, 0.0, -100.0).unwrap();
/// let s = series_validity_sweep(&amp, 0.1, 1e-3, 10.0, 30, 0.1, 64).unwrap();
/// assert!(s.fold_amplitude.is_some() && s.hd3_limit_amplitude.is_some());
/// assert_eq!(series_validity_sweep(&amp, 0.1, 1e-3, 10.0, 1, 0.1, 64).unwrap_err().param(), "points");
/// ```
pub fn series_validity_sweep(
    open: &PowerSeries,
    beta: f64,
    amplitude_min: f64,
    amplitude_max: f64,
    points: usize,
    tolerance: f64,
    samples: usize,
) -> Result<ValiditySweep> {
    let lo = check::positive("amplitude_min", amplitude_min)?;
    let hi = check::positive("amplitude_max", amplitude_max)?;
    if hi <= lo {
        return Err(Error::OutOfDomain {
            param: "amplitude_max",
            requirement: "must be greater than amplitude_min",
        });
    }
    if points > MAX_SWEEP_POINTS {
        return Err(Error::TooLarge {
            param: "points",
            limit: MAX_SWEEP_POINTS as u64,
        });
    }
    if points < 2 {
        return Err(Error::OutOfDomain {
            param: "points",
            requirement: "must be at least 2",
        });
    }
    let tol = check::finite("tolerance", tolerance)?;
    if !(tol > 0.0 && tol < 1.0) {
        return Err(Error::OutOfDomain {
            param: "tolerance",
            requirement: "must be a fraction greater than 0 and less than 1",
        });
    }
    let solver = LoopSolver::new(open, beta)?;
    let fold = solver.max_input_amplitude();
    let mut out = ValiditySweep {
        amplitudes: Vec::with_capacity(points),
        series_hd2: Vec::with_capacity(points),
        series_hd3: Vec::with_capacity(points),
        numeric_hd2: Vec::with_capacity(points),
        numeric_hd3: Vec::with_capacity(points),
        fold_amplitude: if fold.is_finite() { Some(fold) } else { None },
        hd3_limit_amplitude: None,
        hd3_holds_throughout: true,
        numeric_floor: NUMERIC_HD_FLOOR,
    };
    let ratio = hi / lo;
    let mut previous: Option<f64> = None;
    let mut limit_found = false;
    for i in 0..points {
        let x = lo * libm::pow(ratio, i as f64 / (points - 1) as f64);
        if x >= fold {
            break;
        }
        let c = series_check(open, beta, x, samples)?;
        out.amplitudes.push(x);
        out.series_hd2.push(c.series_hd2);
        out.series_hd3.push(c.series_hd3);
        out.numeric_hd2.push(c.numeric_hd2);
        out.numeric_hd3.push(c.numeric_hd3);
        if !limit_found && c.hd3_difference > tol {
            limit_found = true;
            out.hd3_holds_throughout = false;
            out.hd3_limit_amplitude = previous;
        }
        previous = Some(x);
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn linear_amplifier_stays_under_the_floor() {
        // A linear amplifier has no harmonics at all (a2 = a3 = 0): every numeric
        // HD the sweep reports is rounding noise, and must sit under the floor it
        // reports (common practice, no source: a double-precision solve and DFT).
        let amp = PowerSeries::new(1e4, 0.0, 0.0).unwrap();
        let s = series_validity_sweep(&amp, 0.01, 1e-4, 1.0, 12, 0.1, 256).unwrap();
        assert_eq!(s.numeric_floor, NUMERIC_HD_FLOOR);
        assert!(!s.amplitudes.is_empty());
        for (h2, h3) in s.numeric_hd2.iter().zip(&s.numeric_hd3) {
            assert!(
                h2.abs() < s.numeric_floor && h3.abs() < s.numeric_floor,
                "{h2} {h3}"
            );
        }
    }

    #[test]
    fn difference_is_symmetric_and_bounded() {
        assert_eq!(relative_difference(0.0, 0.0), 0.0);
        assert_eq!(relative_difference(1.0, 0.0), 1.0);
        assert_eq!(relative_difference(2.0, 1.0), relative_difference(1.0, 2.0));
    }

    #[test]
    fn agreement_improves_as_the_square_of_amplitude() {
        // The next term of HD3 is O(X²) relative: a 10× smaller amplitude cuts the
        // difference about 100×.
        let amp = PowerSeries::new(500.0, 50.0, -300.0).unwrap();
        let a = series_check(&amp, 0.018, 5e-2, 64).unwrap();
        let b = series_check(&amp, 0.018, 5e-3, 64).unwrap();
        let r = a.hd3_difference / b.hd3_difference;
        assert!(r > 70.0 && r < 130.0, "ratio {r}");
    }

    #[test]
    fn sweep_stops_before_the_fold_and_finds_the_limit() {
        let amp = PowerSeries::new(100.0, 0.0, -100.0).unwrap();
        let s = series_validity_sweep(&amp, 0.1, 1e-3, 10.0, 40, 0.1, 64).unwrap();
        let fold = s.fold_amplitude.unwrap();
        assert!(s.amplitudes.iter().all(|&x| x < fold));
        assert!(s.amplitudes.len() < 40);
        let limit = s.hd3_limit_amplitude.unwrap();
        assert!(limit > 1e-3 && limit < fold);
        assert!(!s.hd3_holds_throughout);
    }

    #[test]
    fn bad_sweep_arguments_are_named() {
        let amp = PowerSeries::new(100.0, 0.0, -100.0).unwrap();
        assert_eq!(
            series_validity_sweep(&amp, 0.1, 1.0, 0.5, 10, 0.1, 64)
                .unwrap_err()
                .param(),
            "amplitude_max"
        );
        assert_eq!(
            series_validity_sweep(&amp, 0.1, 0.1, 0.5, 10_000, 0.1, 64)
                .unwrap_err()
                .code(),
            "too_large"
        );
        assert_eq!(
            series_validity_sweep(&amp, 0.1, 0.1, 0.5, 10, 1.5, 64)
                .unwrap_err()
                .param(),
            "tolerance"
        );
    }
}
