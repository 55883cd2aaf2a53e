//! Roots of a real polynomial: Aberth–Ehrlich simultaneous iteration, with
//! Laguerre's method plus deflation as the fallback and as the slow reference.
//!
//! Aberth–Ehrlich updates every approximation z_i at once by
//! w_i = r_i / (1 − r_i·Σ_{j≠i} 1/(z_i − z_j)), r_i = P(z_i)/P'(z_i), which
//! converges cubically for simple roots and keeps converging (linearly) for
//! repeated and clustered roots, where the attainable accuracy is about
//! ε^(1/m) for a root of multiplicity m. Start points come from the Newton
//! polygon of the coefficients, so roots spread over many decades start on the
//! right circles. For |z| > 1 the polynomial is evaluated in reversed form at 1/z
//! to avoid overflow. An approximation stops when P(z) is within a few rounding
//! errors of zero (backward-error test).
//!
//! Sources: O. Aberth, "Iteration methods for finding all zeros of a polynomial
//! simultaneously", Math. Comp. 27 (1973); D. A. Bini, "Numerical computation of
//! polynomial zeros by means of Aberth's method", Numer. Algorithms 13 (1996)
//! (start points and stopping rule); Press et al., *Numerical Recipes*, 3rd ed.,
//! section 9.5 (Laguerre). All from memory.

use crate::error::{Error, Result};
use crate::float::modulus;
use alloc::vec;
use alloc::vec::Vec;
use num_complex::Complex64;

const MAX_ITER: usize = 600;
/// Rounding-error multiple in the backward-error stopping test.
const STOP_FACTOR: f64 = 16.0;
/// Extra iterations a root takes once at rounding-error level.
const QUIET_ITERS: u32 = 12;

/// P(z)/P'(z) and whether P(z) is at rounding-error level, for coefficients
/// `c` lowest power first (degree n = c.len() − 1 ≥ 1).
fn newton_ratio(c: &[f64], z: Complex64) -> (Complex64, bool) {
    let n = c.len() - 1;
    let eps = f64::EPSILON;
    if modulus(z) <= 1.0 {
        let (mut p, mut dp) = (Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0));
        let mut bound = 0.0;
        let az = modulus(z);
        for &a in c.iter().rev() {
            dp = dp * z + p;
            p = p * z + a;
            bound = bound * az + libm::fabs(a);
        }
        (p / dp, modulus(p) <= STOP_FACTOR * (n as f64) * eps * bound)
    } else {
        // P(z) = z^n·Q(y), y = 1/z, Q(y) = Σ a_k y^(n−k); P'/P = n·y − y²·Q'/Q.
        let y = z.inv();
        let ay = modulus(y);
        let (mut q, mut dq) = (Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0));
        let mut bound = 0.0;
        for &a in c.iter() {
            dq = dq * y + q;
            q = q * y + a;
            bound = bound * ay + libm::fabs(a);
        }
        let small = modulus(q) <= STOP_FACTOR * (n as f64) * eps * bound;
        let dlog = y * (n as f64) - y * y * dq / q;
        (dlog.inv(), small)
    }
}

/// Start points from the upper convex hull of (k, ln|a_k|) (Bini 1996).
fn start_points(c: &[f64]) -> Vec<Complex64> {
    let n = c.len() - 1;
    let pts: Vec<(usize, f64)> = c
        .iter()
        .enumerate()
        .filter(|(_, a)| **a != 0.0)
        .map(|(k, a)| (k, libm::log(libm::fabs(*a))))
        .collect();
    // Upper hull, monotone chain.
    let mut hull: Vec<(usize, f64)> = Vec::new();
    for &p in &pts {
        while hull.len() >= 2 {
            let (a, b) = (hull[hull.len() - 2], hull[hull.len() - 1]);
            let cross =
                (b.0 as f64 - a.0 as f64) * (p.1 - a.1) - (b.1 - a.1) * (p.0 as f64 - a.0 as f64);
            if cross >= 0.0 {
                hull.pop();
            } else {
                break;
            }
        }
        hull.push(p);
    }
    let mut z = Vec::with_capacity(n);
    const SIGMA: f64 = 0.7;
    for w in hull.windows(2) {
        let (k0, l0) = w[0];
        let (k1, l1) = w[1];
        let m = k1 - k0;
        let u = libm::exp((l0 - l1) / m as f64);
        for j in 0..m {
            let ang = core::f64::consts::TAU * j as f64 / m as f64
                + SIGMA * (k0 as f64 + 1.0) / n as f64
                + 0.4;
            z.push(Complex64::from_polar(u, ang));
        }
    }
    // Degenerate hull (cannot happen with a nonzero leading and trailing
    // coefficient, kept for safety): fill on the unit circle.
    while z.len() < n {
        let j = z.len();
        z.push(Complex64::from_polar(
            1.0,
            core::f64::consts::TAU * j as f64 / n as f64 + 0.4,
        ));
    }
    z.truncate(n);
    z
}

/// Aberth–Ehrlich iteration; `None` when it does not converge.
fn aberth(c: &[f64]) -> Option<Vec<Complex64>> {
    let n = c.len() - 1;
    let mut z = start_points(c);
    let mut done = vec![false; n];
    // Iterations spent at rounding-error level; a root stops after a few, so that
    // the members of a cluster settle symmetrically around it.
    let mut quiet = vec![0u32; n];
    for _ in 0..MAX_ITER {
        let mut all = true;
        for i in 0..n {
            if done[i] {
                continue;
            }
            let zi = z[i];
            let (ratio, small) = newton_ratio(c, zi);
            all = false;
            if small {
                quiet[i] += 1;
                if quiet[i] > QUIET_ITERS {
                    done[i] = true;
                    continue;
                }
            }
            let converged_before = small && quiet[i] > 1;
            let mut sum = Complex64::new(0.0, 0.0);
            for (j, &zj) in z.iter().enumerate() {
                if j != i {
                    sum += (zi - zj).inv();
                }
            }
            let w = ratio / (Complex64::new(1.0, 0.0) - ratio * sum);
            if w.re.is_finite() && w.im.is_finite() {
                z[i] = zi - w;
                // A simple root: at rounding level and the correction has
                // stopped mattering.
                if modulus(w) <= 8.0 * f64::EPSILON * modulus(zi)
                    || (converged_before && modulus(w) <= 1e-12 * modulus(zi))
                {
                    done[i] = true;
                }
            } else {
                // P'(z) = 0 or coincident approximations: nudge and try again.
                z[i] = zi * Complex64::new(1.0 + 1e-7, 1e-7) + Complex64::new(1e-12, 0.0);
            }
        }
        if all {
            return Some(z);
        }
    }
    None
}

/// Relative distance under which approximations count as one cluster.
const CLUSTER_TOL: f64 = 0.05;

/// Re-centre each unresolved cluster of m ≥ 2 approximations on the root of the (m−1)-th
/// derivative of P near it: for a root of multiplicity m that point is the root
/// itself and is well conditioned, while the members of the cluster are only
/// known to about ε^(1/m). The spread of the members is kept.
fn recentre_clusters(c: &[f64], z: &mut [Complex64]) {
    let n = z.len();
    let mut label: Vec<usize> = (0..n).collect();
    // Connected components under the closeness relation (n ≤ 64, so O(n³) is fine).
    for _ in 0..n {
        for i in 0..n {
            for j in 0..n {
                let scale = modulus(z[i]).max(modulus(z[j]));
                if modulus(z[i] - z[j]) <= CLUSTER_TOL * scale && label[j] < label[i] {
                    label[i] = label[j];
                }
            }
        }
    }
    for root in 0..n {
        let members: Vec<usize> = (0..n).filter(|&i| label[i] == root).collect();
        let m = members.len();
        if m < 2 {
            continue;
        }
        let centre = members.iter().map(|&i| z[i]).sum::<Complex64>() / m as f64;
        let radius = members
            .iter()
            .map(|&i| modulus(z[i] - centre))
            .fold(0.0, f64::max);
        // Only a cluster that the arithmetic cannot resolve: P at its centre is at
        // rounding-error level. Well separated close roots are left alone.
        if !newton_ratio(c, centre).1 {
            continue;
        }
        // (m−1)-th derivative, coefficients lowest power first.
        let mut d: Vec<f64> = c.to_vec();
        for _ in 0..m - 1 {
            d = d
                .iter()
                .enumerate()
                .skip(1)
                .map(|(k, a)| a * k as f64)
                .collect();
        }
        if d.len() < 2 {
            continue;
        }
        let dd: Vec<f64> = d
            .iter()
            .enumerate()
            .skip(1)
            .map(|(k, a)| a * k as f64)
            .collect();
        let mut x = centre;
        for _ in 0..30 {
            let step = super::poly::eval(&d, x) / super::poly::eval(&dd, x);
            if !(step.re.is_finite() && step.im.is_finite()) {
                break;
            }
            x -= step;
            if modulus(step) <= 4.0 * f64::EPSILON * modulus(x) {
                break;
            }
        }
        if modulus(x - centre) <= 2.0 * radius + f64::EPSILON * modulus(centre) {
            let shift = x - centre;
            for &i in &members {
                z[i] += shift;
            }
        }
    }
}

/// Laguerre's method on one polynomial from a start point.
fn laguerre(c: &[Complex64], mut x: Complex64) -> Complex64 {
    let n = (c.len() - 1) as f64;
    const FRAC: [f64; 8] = [0.5, 0.25, 0.75, 0.13, 0.38, 0.62, 0.88, 1.0];
    for it in 1..=800 {
        let (mut b, mut d, mut f) = (
            c[c.len() - 1],
            Complex64::new(0.0, 0.0),
            Complex64::new(0.0, 0.0),
        );
        let mut err = modulus(b);
        let abx = modulus(x);
        for j in (0..c.len() - 1).rev() {
            f = x * f + d;
            d = x * d + b;
            b = x * b + c[j];
            err = modulus(b) + abx * err;
        }
        err *= f64::EPSILON;
        if modulus(b) <= err {
            return x;
        }
        let g = d / b;
        let g2 = g * g;
        let h = g2 - f * 2.0 / b;
        let sq = ((h * n - g2) * (n - 1.0)).sqrt();
        let (gp, gm) = (g + sq, g - sq);
        let den = if modulus(gp) > modulus(gm) { gp } else { gm };
        let dx = if modulus(den) > 0.0 {
            Complex64::new(n, 0.0) / den
        } else {
            Complex64::from_polar(1.0 + abx, it as f64)
        };
        let x1 = x - dx;
        if x1 == x {
            return x;
        }
        if it % 10 != 0 {
            x = x1;
        } else {
            x -= dx * FRAC[(it / 10) % 8];
        }
    }
    x
}

/// All roots by Laguerre's method with deflation, each polished on the full
/// polynomial. Slow but independent of [`roots`]; used as its fallback.
///
/// # Errors
/// As [`roots`].
///
/// # Example
/// ```
/// use loopwright::freq::roots::roots_laguerre;
/// let r = roots_laguerre(&[5.0, 2.0, 1.0]).unwrap(); // z² + 2z + 5: −1 ± 2j
/// assert!(r.iter().all(|z| (z.re + 1.0).abs() < 1e-12 && (z.im.abs() - 2.0).abs() < 1e-12));
/// assert!(roots_laguerre(&[0.0]).is_err());
/// ```
pub fn roots_laguerre(c: &[f64]) -> Result<Vec<Complex64>> {
    let c = prepare(c)?;
    let (zeros, c) = split_zero_roots(&c);
    let full: Vec<Complex64> = c.iter().map(|&a| Complex64::new(a, 0.0)).collect();
    let mut work = full.clone();
    let mut out = zeros;
    while work.len() > 1 {
        let r = laguerre(&work, Complex64::new(0.0, 0.0));
        let r = laguerre(&full, r);
        // Synthetic division by (z − r).
        let m = work.len() - 1;
        let mut q = vec![Complex64::new(0.0, 0.0); m];
        let mut carry = work[m];
        for k in (0..m).rev() {
            q[k] = carry;
            carry = work[k] + carry * r;
        }
        work = q;
        out.push(r);
    }
    finish(out)
}

fn prepare(c: &[f64]) -> Result<Vec<f64>> {
    if c.iter().any(|x| !x.is_finite()) {
        return Err(Error::NotFinite { param: "coeffs" });
    }
    let mut c = c.to_vec();
    while c.last() == Some(&0.0) {
        c.pop();
    }
    if c.is_empty() {
        return Err(Error::Singular {
            param: "coeffs",
            reason: "the polynomial is identically zero",
        });
    }
    Ok(c)
}

/// Exact roots at zero (trailing zero coefficients) and the rest.
fn split_zero_roots(c: &[f64]) -> (Vec<Complex64>, Vec<f64>) {
    let k = c.iter().take_while(|&&a| a == 0.0).count();
    (
        vec![Complex64::new(0.0, 0.0); k],
        c.get(k..).map(|s| s.to_vec()).unwrap_or_default(),
    )
}

/// Make near-real roots exactly real and pair conjugates, then sort by modulus
/// and imaginary part.
fn finish(mut z: Vec<Complex64>) -> Result<Vec<Complex64>> {
    for r in z.iter_mut() {
        if !(r.re.is_finite() && r.im.is_finite()) {
            return Err(Error::NoConvergence {
                param: "coeffs",
                reason: "a root left the floating-point range",
            });
        }
        if libm::fabs(r.im) <= 1e-12 * modulus(*r) {
            r.im = 0.0;
        }
    }
    // Replace each member of a conjugate pair by the average of it and its
    // partner's conjugate, so pairs are exact conjugates.
    let n = z.len();
    let mut used = vec![false; n];
    for i in 0..n {
        if used[i] || z[i].im == 0.0 {
            continue;
        }
        let mut best: Option<usize> = None;
        for j in 0..n {
            if j != i && !used[j] && z[j].im != 0.0 && z[j].im.signum() != z[i].im.signum() {
                let d = modulus(z[j].conj() - z[i]);
                if best.map_or(true, |b: usize| d < modulus(z[b].conj() - z[i])) {
                    best = Some(j);
                }
            }
        }
        if let Some(j) = best {
            let m = (z[i] + z[j].conj()) * 0.5;
            let m = if m.im < 0.0 { m.conj() } else { m };
            z[i] = m;
            z[j] = m.conj();
            used[i] = true;
            used[j] = true;
        }
    }
    // Non-real roots of a real polynomial come in pairs, so a root left without a
    // partner is a real root blurred by rounding (a member of a cluster).
    for (r, u) in z.iter_mut().zip(&used) {
        if !u {
            r.im = 0.0;
        }
    }
    crate::sort::sort_by(&mut z, |a, b| {
        modulus(*a)
            .total_cmp(&modulus(*b))
            .then(a.im.total_cmp(&b.im))
    });
    Ok(z)
}

/// All complex roots of the real polynomial Σ c_k·z^k (coefficients lowest power
/// first), by Aberth–Ehrlich, falling back to Laguerre with deflation.
///
/// Roots are sorted by modulus; complex roots come as exact conjugate pairs.
///
/// # Errors
/// `coeffs` with a non-finite entry ([`Error::NotFinite`]), identically zero
/// ([`Error::Singular`]); [`Error::NoConvergence`] if neither method converges.
///
/// # Example
/// ```
/// use loopwright::freq::polynomial_roots;
/// // (z − 1)³ = z³ − 3z² + 3z − 1: a triple root, found to about ε^(1/3).
/// let r = polynomial_roots(&[-1.0, 3.0, -3.0, 1.0]).unwrap();
/// assert!(r.iter().all(|z| (z - 1.0).norm() < 1e-4));
/// assert!(polynomial_roots(&[f64::NAN, 1.0]).is_err());
/// ```
pub fn roots(coeffs: &[f64]) -> Result<Vec<Complex64>> {
    let c = prepare(coeffs)?;
    let (mut zeros, c) = split_zero_roots(&c);
    if c.len() <= 1 {
        return finish(zeros);
    }
    if c.len() == 2 {
        zeros.push(Complex64::new(-c[0] / c[1], 0.0));
        return finish(zeros);
    }
    match aberth(&c) {
        Some(mut z) => {
            recentre_clusters(&c, &mut z);
            zeros.extend(z);
            finish(zeros)
        }
        None => {
            let mut z = roots_laguerre(&c)?;
            zeros.append(&mut z);
            finish(zeros)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn from_roots(r: &[f64]) -> Vec<f64> {
        r.iter().fold(vec![1.0], |acc, &x| {
            super::super::poly::multiply(&acc, &[-x, 1.0])
        })
    }

    #[test]
    fn simple_real_roots() {
        let c = from_roots(&[-1.0, -2.0, -3.0]);
        let r = roots(&c).unwrap();
        for (got, want) in r.iter().zip([-1.0, -2.0, -3.0]) {
            assert!((got - want).norm() < 1e-13, "{got} vs {want}");
            assert_eq!(got.im, 0.0);
        }
    }

    #[test]
    fn roots_over_twelve_decades() {
        let want = [-1e-6, -1e-2, -1.0, -1e3, -1e6];
        let r = roots(&from_roots(&want)).unwrap();
        for (got, w) in r.iter().zip(want.iter()) {
            assert!((got - w).norm() <= 1e-10 * w.abs(), "{got} vs {w}");
        }
    }

    #[test]
    fn repeated_roots_and_clusters() {
        // (z + 2)^4 (z + 2.001): multiplicity 4 next to a close simple root; a
        // five-fold cluster is only determined to about (32·ε)^(1/5) ≈ 1e-3.
        let c = from_roots(&[-2.0, -2.0, -2.0, -2.0, -2.001]);
        let r = roots(&c).unwrap();
        assert_eq!(r.len(), 5);
        for z in &r {
            assert!((z + 2.0).norm() < 1e-2, "{z}");
        }
        // The centroid of a cluster is well conditioned even where its members
        // are not: (4·2 + 2.001)/5.
        let centroid = r.iter().sum::<Complex64>() / 5.0;
        assert!((centroid + 2.0002).norm() < 1e-9, "{centroid}");
        // Reproduce the polynomial from the roots (to the cluster's ~1e-3).
        let mut back = vec![Complex64::new(1.0, 0.0)];
        for z in &r {
            let mut nb = vec![Complex64::new(0.0, 0.0); back.len() + 1];
            for (i, b) in back.iter().enumerate() {
                nb[i] -= b * z;
                nb[i + 1] += b;
            }
            back = nb;
        }
        for (b, a) in back.iter().zip(&c) {
            assert!((b - a).norm() <= 1e-3 * (1.0 + a.abs()), "{b} vs {a}");
        }
    }

    #[test]
    fn complex_pairs_are_exact_conjugates() {
        // z² + 2z + 5: −1 ± 2j.
        let r = roots(&[5.0, 2.0, 1.0]).unwrap();
        assert_eq!(r[0], r[1].conj());
        assert!((r[0] - Complex64::new(-1.0, -2.0)).norm() < 1e-14);
    }

    #[test]
    fn laguerre_agrees_with_aberth() {
        let c = [3.0, -1.0, 4.0, 1.0, -5.0, 9.0, 2.0];
        let a = roots(&c).unwrap();
        let b = roots_laguerre(&c).unwrap();
        for z in &a {
            let nearest = b
                .iter()
                .map(|w| (w - z).norm())
                .fold(f64::INFINITY, f64::min);
            assert!(nearest < 1e-10 * (1.0 + z.norm()), "{z}");
        }
    }

    #[test]
    fn zero_roots_and_bad_input() {
        let r = roots(&[0.0, 0.0, 2.0, 1.0]).unwrap();
        assert_eq!(r.iter().filter(|z| z.norm() == 0.0).count(), 2);
        assert!((r[2] + 2.0).norm() < 1e-15);
        assert_eq!(roots(&[0.0, 0.0]).unwrap_err().code(), "singular");
        assert_eq!(roots(&[1.0, f64::INFINITY]).unwrap_err().param(), "coeffs");
        assert!(roots(&[4.0]).unwrap().is_empty());
    }
}
