//! Eigenvalues of a real general (non-symmetric) matrix: balancing, reduction
//! to upper Hessenberg form by stabilised elimination, and the shifted QR
//! iteration with Francis double shifts.
//!
//! Source: the EISPACK routines balanc, elmhes and hqr as given in Press,
//! Teukolsky, Vetterling & Flannery, *Numerical Recipes in C*, 2nd ed.,
//! sections 11.5–11.6 (from memory); Wilkinson & Reinsch, *Handbook for
//! Automatic Computation*, vol. II, 1971. Written here because the nodal
//! matrices are small (≤ a few hundred unknowns), the core is `no_std`, and
//! the general crates are far larger in wasm.

use crate::error::{Error, Result};
use alloc::vec::Vec;
use num_complex::Complex64;

/// Most QR iterations per eigenvalue before giving up.
const MAX_ITERATIONS: u32 = 60;

/// A square matrix with 1-based indices (row i, column j at `a[i·(n+1) + j]`),
/// as the classic routines are written.
struct Square {
    n: usize,
    a: Vec<f64>,
}

impl Square {
    fn at(&self, i: usize, j: usize) -> f64 {
        self.a.get(i * (self.n + 1) + j).copied().unwrap_or(0.0)
    }
    fn set(&mut self, i: usize, j: usize, v: f64) {
        let n = self.n;
        if let Some(x) = self.a.get_mut(i * (n + 1) + j) {
            *x = v;
        }
    }
    fn swap(&mut self, (i1, j1): (usize, usize), (i2, j2): (usize, usize)) {
        let (x, y) = (self.at(i1, j1), self.at(i2, j2));
        self.set(i1, j1, y);
        self.set(i2, j2, x);
    }
}

/// Scale rows and columns by powers of two so that each row and its column
/// have similar norms (the eigenvalues do not change; their accuracy improves).
fn balance(m: &mut Square) {
    const RADIX: f64 = 2.0;
    let n = m.n;
    let mut done = false;
    while !done {
        done = true;
        for i in 1..=n {
            let (mut c, mut r) = (0.0, 0.0);
            for j in (1..=n).filter(|&j| j != i) {
                c += libm::fabs(m.at(j, i));
                r += libm::fabs(m.at(i, j));
            }
            if c == 0.0 || r == 0.0 {
                continue;
            }
            let s = c + r;
            let mut f = 1.0;
            let mut g = r / RADIX;
            while c < g {
                f *= RADIX;
                c *= RADIX * RADIX;
            }
            g = r * RADIX;
            while c > g {
                f /= RADIX;
                c /= RADIX * RADIX;
            }
            if (c + r) / f < 0.95 * s {
                done = false;
                for j in 1..=n {
                    m.set(i, j, m.at(i, j) / f);
                    m.set(j, i, m.at(j, i) * f);
                }
            }
        }
    }
}

/// Reduce to upper Hessenberg form by elimination with pivoting (similarity).
fn hessenberg(m: &mut Square) {
    let n = m.n;
    for k in 2..n {
        let (mut x, mut piv) = (0.0, k);
        for j in k..=n {
            if libm::fabs(m.at(j, k - 1)) > libm::fabs(x) {
                x = m.at(j, k - 1);
                piv = j;
            }
        }
        if piv != k {
            for j in (k - 1)..=n {
                m.swap((piv, j), (k, j));
            }
            for j in 1..=n {
                m.swap((j, piv), (j, k));
            }
        }
        if x != 0.0 {
            for i in (k + 1)..=n {
                let mut y = m.at(i, k - 1);
                if y != 0.0 {
                    y /= x;
                    m.set(i, k - 1, 0.0);
                    for j in k..=n {
                        m.set(i, j, m.at(i, j) - y * m.at(k, j));
                    }
                    for j in 1..=n {
                        m.set(j, k, m.at(j, k) + y * m.at(j, i));
                    }
                }
            }
        }
    }
}

fn sign(a: f64, b: f64) -> f64 {
    if b >= 0.0 {
        libm::fabs(a)
    } else {
        -libm::fabs(a)
    }
}

/// The eigenvalues of the n × n row-major real matrix `a`.
///
/// # Errors
/// [`Error::NoConvergence`] (param `poles`) when the QR iteration does not
/// settle an eigenvalue within its iteration limit; a matrix of the wrong size.
pub fn eigenvalues(n: usize, a: &[f64]) -> Result<Vec<Complex64>> {
    if a.len() != n * n {
        return Err(Error::OutOfDomain {
            param: "matrix",
            requirement: "must be n × n",
        });
    }
    let mut m = Square {
        n,
        a: alloc::vec![0.0; (n + 1) * (n + 1)],
    };
    for i in 0..n {
        for j in 0..n {
            m.set(i + 1, j + 1, a.get(i * n + j).copied().unwrap_or(0.0));
        }
    }
    balance(&mut m);
    hessenberg(&mut m);
    hqr(&mut m)
}

#[allow(clippy::many_single_char_names)]
fn hqr(m: &mut Square) -> Result<Vec<Complex64>> {
    let n = m.n;
    let mut wr = alloc::vec![0.0; n + 1];
    let mut wi = alloc::vec![0.0; n + 1];
    let mut anorm = 0.0;
    for i in 1..=n {
        for j in i.saturating_sub(1).max(1)..=n {
            anorm += libm::fabs(m.at(i, j));
        }
    }
    let mut nn = n;
    let mut t = 0.0;
    while nn >= 1 {
        let mut its = 0;
        loop {
            let mut l = nn;
            while l >= 2 {
                let mut s = libm::fabs(m.at(l - 1, l - 1)) + libm::fabs(m.at(l, l));
                if s == 0.0 {
                    s = anorm;
                }
                if libm::fabs(m.at(l, l - 1)) + s == s {
                    m.set(l, l - 1, 0.0);
                    break;
                }
                l -= 1;
            }
            let mut x = m.at(nn, nn);
            if l == nn {
                wr[nn] = x + t;
                wi[nn] = 0.0;
                nn -= 1;
                break;
            }
            let mut y = m.at(nn - 1, nn - 1);
            let mut w = m.at(nn, nn - 1) * m.at(nn - 1, nn);
            if l == nn - 1 {
                let p = 0.5 * (y - x);
                let q = p * p + w;
                let mut z = libm::sqrt(libm::fabs(q));
                x += t;
                if q >= 0.0 {
                    z = p + sign(z, p);
                    wr[nn - 1] = x + z;
                    wr[nn] = if z != 0.0 { x - w / z } else { x + z };
                    wi[nn - 1] = 0.0;
                    wi[nn] = 0.0;
                } else {
                    wr[nn - 1] = x + p;
                    wr[nn] = x + p;
                    wi[nn - 1] = -z;
                    wi[nn] = z;
                }
                nn = nn.saturating_sub(2);
                break;
            }
            if its == MAX_ITERATIONS {
                return Err(Error::NoConvergence {
                    param: "poles",
                    reason: "the QR iteration for the eigenvalues did not settle",
                });
            }
            if its == 10 || its == 20 || its == 40 {
                // Exceptional shift.
                t += x;
                for i in 1..=nn {
                    m.set(i, i, m.at(i, i) - x);
                }
                let s = libm::fabs(m.at(nn, nn - 1)) + libm::fabs(m.at(nn - 1, nn - 2));
                x = 0.75 * s;
                y = x;
                w = -0.4375 * s * s;
            }
            its += 1;
            let (mut p, mut q, mut r);
            let mut mm = nn - 2;
            loop {
                let z = m.at(mm, mm);
                let r1 = x - z;
                let s1 = y - z;
                p = (r1 * s1 - w) / m.at(mm + 1, mm) + m.at(mm, mm + 1);
                q = m.at(mm + 1, mm + 1) - z - r1 - s1;
                r = m.at(mm + 2, mm + 1);
                let s = libm::fabs(p) + libm::fabs(q) + libm::fabs(r);
                p /= s;
                q /= s;
                r /= s;
                if mm == l {
                    break;
                }
                let u = libm::fabs(m.at(mm, mm - 1)) * (libm::fabs(q) + libm::fabs(r));
                let v = libm::fabs(p)
                    * (libm::fabs(m.at(mm - 1, mm - 1))
                        + libm::fabs(z)
                        + libm::fabs(m.at(mm + 1, mm + 1)));
                if u + v == v {
                    break;
                }
                mm -= 1;
            }
            for i in (mm + 2)..=nn {
                m.set(i, i - 2, 0.0);
                if i != mm + 2 {
                    m.set(i, i - 3, 0.0);
                }
            }
            double_shift_sweep(m, (l, mm, nn), (&mut p, &mut q, &mut r));
        }
    }
    Ok((1..=n).map(|i| Complex64::new(wr[i], wi[i])).collect())
}

/// One implicit double-shift QR sweep on rows and columns l..nn, starting at mm.
#[allow(clippy::many_single_char_names)]
fn double_shift_sweep(
    m: &mut Square,
    (l, mm, nn): (usize, usize, usize),
    (p, q, r): (&mut f64, &mut f64, &mut f64),
) {
    let mut x = 0.0;
    for k in mm..nn {
        if k != mm {
            *p = m.at(k, k - 1);
            *q = m.at(k + 1, k - 1);
            *r = if k != nn - 1 { m.at(k + 2, k - 1) } else { 0.0 };
            x = libm::fabs(*p) + libm::fabs(*q) + libm::fabs(*r);
            if x != 0.0 {
                *p /= x;
                *q /= x;
                *r /= x;
            }
        }
        let s = sign(libm::sqrt(*p * *p + *q * *q + *r * *r), *p);
        if s == 0.0 {
            continue;
        }
        if k == mm {
            if l != mm {
                m.set(k, k - 1, -m.at(k, k - 1));
            }
        } else {
            m.set(k, k - 1, -s * x);
        }
        *p += s;
        let xx = *p / s;
        let y = *q / s;
        let z = *r / s;
        *q /= *p;
        *r /= *p;
        for j in k..=nn {
            let mut pp = m.at(k, j) + *q * m.at(k + 1, j);
            if k != nn - 1 {
                pp += *r * m.at(k + 2, j);
                m.set(k + 2, j, m.at(k + 2, j) - pp * z);
            }
            m.set(k + 1, j, m.at(k + 1, j) - pp * y);
            m.set(k, j, m.at(k, j) - pp * xx);
        }
        let mmin = if nn < k + 3 { nn } else { k + 3 };
        for i in l..=mmin {
            let mut pp = xx * m.at(i, k) + y * m.at(i, k + 1);
            if k != nn - 1 {
                pp += z * m.at(i, k + 2);
                m.set(i, k + 2, m.at(i, k + 2) - pp * *r);
            }
            m.set(i, k + 1, m.at(i, k + 1) - pp * *q);
            m.set(i, k, m.at(i, k) - pp);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sorted(mut v: Vec<Complex64>) -> Vec<Complex64> {
        crate::sort::sort_by(&mut v, |a, b| {
            a.re.total_cmp(&b.re).then(a.im.total_cmp(&b.im))
        });
        v
    }

    #[test]
    fn companion_matrix_gives_the_polynomial_roots() {
        // (x − 1)(x − 2)(x² + 2x + 5): roots 1, 2, −1 ± 2j. Companion matrix of
        // x⁴ − x³ + x² − 11x + 10 (expanded by hand), first row −coefficients.
        let a = [
            1.0, -1.0, 11.0, -10.0, //
            1.0, 0.0, 0.0, 0.0, //
            0.0, 1.0, 0.0, 0.0, //
            0.0, 0.0, 1.0, 0.0,
        ];
        let e = sorted(eigenvalues(4, &a).unwrap());
        let want = [
            Complex64::new(-1.0, -2.0),
            Complex64::new(-1.0, 2.0),
            Complex64::new(1.0, 0.0),
            Complex64::new(2.0, 0.0),
        ];
        for (g, w) in e.iter().zip(want) {
            assert!((g - w).norm() < 1e-12, "{g} vs {w}");
        }
    }

    #[test]
    fn triangular_and_tiny_matrices() {
        // Identity: the eigenvalues of a triangular matrix are its diagonal.
        let a = [3.0, 7.0, -1.0, 0.0, -2.0, 5.0, 0.0, 0.0, 0.5];
        let e = sorted(eigenvalues(3, &a).unwrap());
        let re: Vec<f64> = e.iter().map(|z| z.re).collect();
        assert_eq!(re, [-2.0, 0.5, 3.0]);
        assert_eq!(eigenvalues(1, &[4.0]).unwrap(), [Complex64::new(4.0, 0.0)]);
        assert!(eigenvalues(0, &[]).unwrap().is_empty());
        assert!(eigenvalues(2, &[1.0]).is_err());
    }
}
