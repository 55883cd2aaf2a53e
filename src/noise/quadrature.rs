//! Adaptive Gauss–Kronrod quadrature on a finite interval, without allocation.
//!
//! Each subinterval is integrated by the 15-point Kronrod rule, and the embedded
//! 7-point Gauss rule gives its error estimate |K15 − G7|. The subinterval with the
//! largest estimate is halved until the summed estimate meets the tolerance
//! (globally adaptive, as QUADPACK's QAG: Piessens, de Doncker-Kapenga, Überhuber &
//! Kahaner, *QUADPACK*, Springer 1983, from memory). The subintervals live in a
//! fixed array of [`MAX_INTERVALS`]; running out is [`Error::NoConvergence`].
//! Nodes and weights are the published G7/K15 values (ibid.).
//!
//! The Kronrod nodes exclude the ends of the interval, so an integrand singular
//! at an end (after a change of variable) is never evaluated there.

// The nodes and weights are kept to the digits they are published with.
#![allow(clippy::excessive_precision)]

use crate::error::{Error, Result};

/// Most subintervals of one integral.
pub const MAX_INTERVALS: usize = 512;

/// Kronrod abscissae on [−1, 1], the non-negative half (last is the centre).
const XGK: [f64; 8] = [
    0.991_455_371_120_812_639_206_854_697_526_329,
    0.949_107_912_342_758_524_526_189_684_047_851,
    0.864_864_423_359_769_072_789_712_788_640_926,
    0.741_531_185_599_394_439_863_864_773_280_788,
    0.586_087_235_467_691_130_294_144_845_693_013,
    0.405_845_151_377_397_166_906_606_412_076_961,
    0.207_784_955_007_898_467_600_689_403_773_245,
    0.0,
];
/// Kronrod weights, matching [`XGK`].
const WGK: [f64; 8] = [
    0.022_935_322_010_529_224_963_732_008_058_970,
    0.063_092_092_629_978_553_290_700_663_189_204,
    0.104_790_010_322_250_183_839_876_322_541_518,
    0.140_653_259_715_525_918_745_189_590_510_238,
    0.169_004_726_639_267_902_826_583_426_598_550,
    0.190_350_578_064_785_409_913_256_402_421_014,
    0.204_432_940_075_298_892_414_161_999_234_649,
    0.209_482_141_084_727_828_012_999_174_891_714,
];
/// Gauss weights of the 7-point rule, at XGK[1], XGK[3], XGK[5] and the centre.
const WG: [f64; 4] = [
    0.129_484_966_168_869_693_270_611_432_679_082,
    0.279_705_391_489_276_667_901_467_771_423_780,
    0.381_830_050_505_118_944_950_369_775_488_975,
    0.417_959_183_673_469_387_755_102_040_816_327,
];

/// An integral and its error estimate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quadrature {
    /// The integral.
    pub value: f64,
    /// Estimated absolute error.
    pub error: f64,
    /// Integrand evaluations used.
    pub evaluations: usize,
}

/// One K15/G7 pass on [a, b]: (K15, |K15 − G7|).
fn kronrod<F: FnMut(f64) -> f64>(f: &mut F, a: f64, b: f64) -> Result<(f64, f64)> {
    let c = 0.5 * (a + b);
    let h = 0.5 * (b - a);
    let fc = f(c);
    let mut k = WGK[7] * fc;
    let mut g = WG[3] * fc;
    for i in 0..7 {
        let dx = h * XGK[i];
        let pair = f(c - dx) + f(c + dx);
        k += WGK[i] * pair;
        if i % 2 == 1 {
            g += WG[i / 2] * pair;
        }
    }
    let (k, g) = (k * h, g * h);
    if !k.is_finite() || !g.is_finite() {
        return Err(Error::Overflow { param: "integrand" });
    }
    Ok((k, libm::fabs(k - g)))
}

/// ∫ₐᵇ f(x) dx to a relative tolerance `rel_tol` (or absolute `abs_tol`,
/// whichever is looser), for finite a < b.
///
/// # Errors
/// [`Error::Overflow`] on `integrand` when f returns a non-finite value;
/// [`Error::NoConvergence`] on `integrand` when the tolerance is not met within
/// [`MAX_INTERVALS`] subintervals.
pub fn integrate<F: FnMut(f64) -> f64>(
    mut f: F,
    a: f64,
    b: f64,
    rel_tol: f64,
    abs_tol: f64,
) -> Result<Quadrature> {
    let mut lo = [0.0f64; MAX_INTERVALS];
    let mut hi = [0.0f64; MAX_INTERVALS];
    let mut val = [0.0f64; MAX_INTERVALS];
    let mut err = [0.0f64; MAX_INTERVALS];
    let (v, e) = kronrod(&mut f, a, b)?;
    lo[0] = a;
    hi[0] = b;
    val[0] = v;
    err[0] = e;
    let mut n = 1usize;
    let mut evaluations = 15usize;
    loop {
        let total: f64 = val[..n].iter().sum();
        let total_err: f64 = err[..n].iter().sum();
        let target = if rel_tol * libm::fabs(total) > abs_tol {
            rel_tol * libm::fabs(total)
        } else {
            abs_tol
        };
        if total_err <= target {
            return Ok(Quadrature {
                value: total,
                error: total_err,
                evaluations,
            });
        }
        if n == MAX_INTERVALS {
            return Err(Error::NoConvergence {
                param: "integrand",
                reason: "the adaptive quadrature ran out of subintervals",
            });
        }
        // Halve the worst subinterval.
        let mut worst = 0;
        for i in 1..n {
            if err[i] > err[worst] {
                worst = i;
            }
        }
        let (a0, b0) = (lo[worst], hi[worst]);
        let m = 0.5 * (a0 + b0);
        if !(a0 < m && m < b0) {
            return Err(Error::NoConvergence {
                param: "integrand",
                reason: "a subinterval shrank to the floating-point resolution",
            });
        }
        let (v1, e1) = kronrod(&mut f, a0, m)?;
        let (v2, e2) = kronrod(&mut f, m, b0)?;
        evaluations += 30;
        hi[worst] = m;
        val[worst] = v1;
        err[worst] = e1;
        lo[n] = m;
        hi[n] = b0;
        val[n] = v2;
        err[n] = e2;
        n += 1;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn polynomials_up_to_degree_22_are_exact_in_one_pass() {
        // K15 integrates polynomials of degree ≤ 22 exactly: ∫₀¹ x²¹ dx = 1/22.
        let q = integrate(|x| x.powi(21), 0.0, 1.0, 1e-14, 0.0).unwrap();
        assert!((q.value - 1.0 / 22.0).abs() < 1e-15);
    }

    #[test]
    fn lorentzian_integrates_to_its_arctangent() {
        // ∫₀ᵇ dx/(1 + x²) = atan b: the single-pole |H|² over a finite band.
        let q = integrate(|x| 1.0 / (1.0 + x * x), 0.0, 50.0, 1e-12, 0.0).unwrap();
        assert!((q.value - 50f64.atan()).abs() < 1e-11);
        assert!(q.evaluations > 15);
    }

    #[test]
    fn end_singularity_is_never_evaluated() {
        // ∫₀¹ x^(−1/2) dx = [2√x]₀¹ = 2 (calculus), singular at 0.
        let q = integrate(|x| 1.0 / x.sqrt(), 0.0, 1.0, 1e-8, 0.0).unwrap();
        assert!((q.value - 2.0).abs() < 1e-7);
    }

    #[test]
    fn non_finite_integrand_is_an_error() {
        assert_eq!(
            integrate(|_| f64::NAN, 0.0, 1.0, 1e-8, 0.0)
                .unwrap_err()
                .param(),
            "integrand"
        );
    }
}
