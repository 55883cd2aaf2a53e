//! The characteristic polynomial 1 + A(s)·β(s) = 0 and the closed-loop transfer
//! function, as real polynomials in the frequency-normalised variable p = s/ωn.
//!
//! Each model becomes k·N(p)/D(p) with every factor written so that it is 1 at
//! p = 0 (a pole at fp gives 1 + p·ωn/ωp), which keeps the coefficients of poles
//! spread over many decades within a few orders of ωn. ωn is the geometric mean of
//! all corner frequencies (2π·f), so the roots in p cluster around magnitude 1.
//! A delay τ is replaced by the diagonal Padé approximant of order m:
//! exp(−sτ) ≈ Pm(−sτ)/Pm(sτ), Pm(x) = Σ_k (2m−k)!·m! / ((2m)!·k!·(m−k)!)·x^k.
//!
//! Characteristic polynomial: C(p) = DA·Dβ + kA·kβ·NA·Nβ.
//! Closed-loop gain: Af = A/(1 + Aβ) = kA·NA·Dβ / C.
//! Coefficients are stored lowest power first.
//!
//! Source: Padé coefficients from G. A. Baker & P. Graves-Morris, *Padé
//! Approximants*, 2nd ed., 1996 (from memory).

use super::model::{FeedbackLoop, TransferModel};
use crate::error::{Error, Result};
use alloc::vec;
use alloc::vec::Vec;
use core::f64::consts::TAU;

/// A real polynomial, coefficients lowest power first.
pub type Coeffs = Vec<f64>;

/// Product of two polynomials.
pub fn multiply(a: &[f64], b: &[f64]) -> Coeffs {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    let mut out = vec![0.0; a.len() + b.len() - 1];
    for (i, &x) in a.iter().enumerate() {
        for (j, &y) in b.iter().enumerate() {
            if let Some(o) = out.get_mut(i + j) {
                *o += x * y;
            }
        }
    }
    out
}

/// Sum of two polynomials, the second scaled by `k`.
fn add_scaled(a: &[f64], b: &[f64], k: f64) -> Coeffs {
    let n = a.len().max(b.len());
    (0..n)
        .map(|i| a.get(i).copied().unwrap_or(0.0) + k * b.get(i).copied().unwrap_or(0.0))
        .collect()
}

/// Drop highest-power coefficients that are exactly zero.
pub fn trim(mut c: Coeffs) -> Coeffs {
    while c.len() > 1 && c.last() == Some(&0.0) {
        c.pop();
    }
    c
}

/// Evaluate at a complex point (Horner).
pub fn eval(c: &[f64], z: num_complex::Complex64) -> num_complex::Complex64 {
    c.iter()
        .rev()
        .fold(num_complex::Complex64::new(0.0, 0.0), |acc, &a| acc * z + a)
}

/// Padé polynomial Pm(x) coefficients, lowest power first.
fn pade(m: u32) -> Coeffs {
    let m = m as usize;
    let mut c = Vec::with_capacity(m + 1);
    let mut ck = 1.0;
    for k in 0..=m {
        c.push(ck);
        // c_{k+1}/c_k = (m − k)/((2m − k)(k + 1))
        ck *= (m - k) as f64 / ((2 * m - k) as f64 * (k + 1) as f64);
    }
    c
}

/// One model as k·N(p)/D(p) in p = s/ωn.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Rational {
    pub k: f64,
    pub num: Coeffs,
    pub den: Coeffs,
}

pub(crate) fn rational(m: &TransferModel, wn: f64, pade_order: u32) -> Rational {
    let mut num: Coeffs = vec![1.0];
    let mut den: Coeffs = vec![1.0];
    let r = |f: f64| wn / (TAU * f);
    for &p in &m.poles_hz {
        den = multiply(&den, &[1.0, r(p)]);
    }
    for &z in &m.zeros_hz {
        num = multiply(&num, &[1.0, r(z)]);
    }
    for &z in &m.rhp_zeros_hz {
        num = multiply(&num, &[1.0, -r(z)]);
    }
    for &p in &m.rhp_poles_hz {
        den = multiply(&den, &[1.0, -r(p)]);
    }
    for c in &m.complex_poles {
        let x = r(c.freq_hz);
        den = multiply(&den, &[1.0, x / c.q, x * x]);
    }
    for c in &m.complex_zeros {
        let x = r(c.freq_hz);
        num = multiply(&num, &[1.0, x / c.q, x * x]);
    }
    let mut k = m.gain;
    for _ in 0..m.origin_poles {
        // ω1/s = (ω1/ωn)/p with ω1 = 2π·1 Hz.
        den = multiply(&den, &[0.0, 1.0]);
        k *= TAU / wn;
    }
    for &fl in &m.low_cuts_hz {
        let x = r(fl);
        num = multiply(&num, &[0.0, x]);
        den = multiply(&den, &[1.0, x]);
    }
    if m.delay_s > 0.0 {
        let x = wn * m.delay_s;
        let c = pade(pade_order);
        let mut xp = 1.0;
        let (mut pn, mut pd) = (Vec::with_capacity(c.len()), Vec::with_capacity(c.len()));
        for (i, &ci) in c.iter().enumerate() {
            let sign = if i % 2 == 0 { 1.0 } else { -1.0 };
            pn.push(sign * ci * xp);
            pd.push(ci * xp);
            xp *= x;
        }
        num = multiply(&num, &pn);
        den = multiply(&den, &pd);
    }
    Rational { k, num, den }
}

/// The normalising angular frequency ωn, rad/s: geometric mean of the corners,
/// or where integrators alone give |T| = 1, or 2π·1 Hz.
pub(crate) fn normalising_omega(l: &FeedbackLoop) -> f64 {
    let corners = l.corners_hz();
    if !corners.is_empty() {
        let mean_ln =
            corners.iter().map(|&f| libm::log(TAU * f)).sum::<f64>() / corners.len() as f64;
        return libm::exp(mean_ln);
    }
    let k = l.amplifier().origin_poles;
    if k > 0 {
        let g = libm::fabs(l.amplifier().gain * l.feedback().gain);
        let w = TAU * libm::pow(g, 1.0 / f64::from(k));
        if w.is_finite() && w > 0.0 {
            return w;
        }
    }
    TAU
}

/// The characteristic polynomial of a loop in the normalised variable.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct CharacteristicPolynomial {
    /// ωn, rad/s: the roots in s are ωn times the roots in p.
    pub omega_n: f64,
    /// Coefficients of C(p), lowest power first; the closed-loop poles are its roots.
    pub coeffs: Vec<f64>,
}

/// Characteristic polynomial C(p) = DA·Dβ + kA·kβ·NA·Nβ with p = s/ωn.
///
/// # Errors
/// [`Error::Overflow`] when a coefficient overflows; [`Error::Singular`] when
/// the polynomial is identically zero (1 + T ≡ 0).
///
/// # Example
/// ```
/// use loopwright::freq::{characteristic_polynomial, FeedbackLoop, TransferModel};
/// // T = 9/(1 + s/ω0), ω0 = 2π·1 kHz, and ωn = ω0: C(p) = (1 + p) + 9 = 10 + p.
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(9.0).pole(1e3), 1.0).unwrap();
/// let c = characteristic_polynomial(&l).unwrap();
/// assert!((c.coeffs[0] - 10.0).abs() < 1e-12 && (c.coeffs[1] - 1.0).abs() < 1e-12);
/// ```
pub fn characteristic_polynomial(l: &FeedbackLoop) -> Result<CharacteristicPolynomial> {
    let wn = normalising_omega(l);
    let a = rational(l.amplifier(), wn, l.pade_order());
    let b = rational(l.feedback(), wn, l.pade_order());
    let c = trim(add_scaled(
        &multiply(&a.den, &b.den),
        &multiply(&a.num, &b.num),
        a.k * b.k,
    ));
    check_coeffs("characteristic_polynomial", &c)?;
    Ok(CharacteristicPolynomial {
        omega_n: wn,
        coeffs: c,
    })
}

/// The closed-loop gain as a rational function in the normalised variable.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ClosedLoopTransfer {
    /// ωn, rad/s: p = s/ωn.
    pub omega_n: f64,
    /// Numerator kA·NA(p)·Dβ(p), lowest power first, in the unit of A.
    pub numerator: Vec<f64>,
    /// Denominator C(p), the characteristic polynomial, lowest power first.
    pub denominator: Vec<f64>,
}

/// Closed-loop gain Af(p) = kA·NA·Dβ / C(p) with p = s/ωn (a delay by its Padé
/// approximant), for export or for an independent check of the step response.
///
/// # Errors
/// As [`characteristic_polynomial`].
///
/// # Example
/// ```
/// use loopwright::freq::{closed_loop_transfer, FeedbackLoop, TransferModel};
/// // 9/(1 + s/ω0) with β = 1 and ωn = ω0: Af = 9/(10 + p).
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(9.0).pole(1e3), 1.0).unwrap();
/// let t = closed_loop_transfer(&l).unwrap();
/// assert!((t.numerator[0] - 9.0).abs() < 1e-12 && (t.denominator[0] - 10.0).abs() < 1e-12);
/// ```
pub fn closed_loop_transfer(l: &FeedbackLoop) -> Result<ClosedLoopTransfer> {
    let (numerator, denominator, omega_n) = closed_loop_rational(l)?;
    Ok(ClosedLoopTransfer {
        omega_n,
        numerator,
        denominator,
    })
}

/// Closed-loop Af(p) = kA·NA·Dβ / C(p): (numerator, denominator, ωn).
pub(crate) fn closed_loop_rational(l: &FeedbackLoop) -> Result<(Coeffs, Coeffs, f64)> {
    let cp = characteristic_polynomial(l)?;
    let wn = cp.omega_n;
    let a = rational(l.amplifier(), wn, l.pade_order());
    let b = rational(l.feedback(), wn, l.pade_order());
    let num: Coeffs = multiply(&a.num, &b.den)
        .into_iter()
        .map(|x| x * a.k)
        .collect();
    check_coeffs("closed_loop_gain", &num)?;
    Ok((trim(num), cp.coeffs, wn))
}

fn check_coeffs(what: &'static str, c: &[f64]) -> Result<()> {
    if c.iter().any(|x| !x.is_finite()) {
        return Err(Error::Overflow { param: what });
    }
    if c.iter().all(|&x| x == 0.0) {
        return Err(Error::Singular {
            param: what,
            reason: "1 + A·β is identically zero",
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::response::{loop_log, model_log};
    use num_complex::Complex64;

    #[test]
    fn pade_first_order() {
        // P1(x) = 1 + x/2; P2(x) = 1 + x/2 + x²/12 (Baker & Graves-Morris, from memory).
        assert_eq!(pade(1), vec![1.0, 0.5]);
        let p2 = pade(2);
        assert!((p2[2] - 1.0 / 12.0).abs() < 1e-16);
    }

    #[test]
    fn rational_matches_the_factor_evaluation_on_the_axis() {
        let m = TransferModel::constant(-3e4)
            .pole(12.0)
            .zero(3e5)
            .rhp_zero(4e6)
            .complex_pole(2e6, 3.0)
            .integrator()
            .low_cut(0.5);
        let wn = 2e4;
        let r = rational(&m, wn, 4);
        for &f in &[0.1, 10.0, 1e4, 3e6] {
            let p = Complex64::new(0.0, TAU * f / wn);
            let got = eval(&r.num, p) / eval(&r.den, p) * r.k;
            let want = model_log(&m, f).complex();
            assert!((got - want).norm() <= 1e-9 * want.norm(), "f = {f}");
        }
    }

    #[test]
    fn characteristic_polynomial_vanishes_where_t_is_minus_one() {
        // Roots of C are where T(s) = −1; check C(p)/(DA·Dβ) = 1 + T on the axis.
        let a = TransferModel::constant(1e4).pole(10.0).pole(1e5).zero(1e6);
        let l = FeedbackLoop::new(a, TransferModel::constant(0.1).pole(1e7)).unwrap();
        let c = characteristic_polynomial(&l).unwrap();
        let ra = rational(l.amplifier(), c.omega_n, 6);
        let rb = rational(l.feedback(), c.omega_n, 6);
        for &f in &[1.0, 1e3, 1e6] {
            let p = Complex64::new(0.0, TAU * f / c.omega_n);
            let lhs = eval(&c.coeffs, p) / (eval(&ra.den, p) * eval(&rb.den, p));
            let rhs = Complex64::new(1.0, 0.0) + loop_log(&l, f).complex();
            assert!((lhs - rhs).norm() <= 1e-9 * rhs.norm());
        }
    }
}
