//! Dense complex LU factorization with partial (row) pivoting, and the solve.
//!
//! Doolittle elimination P·A = L·U, choosing at each step the row with the
//! largest |a_ik| in the column (Golub & Van Loan, *Matrix Computations*, 4th ed.,
//! algorithm 3.4.1, from memory). Written here rather than taken from a crate: the
//! matrices are at most 128 × 128, the code is about sixty lines, works in
//! `no_std` with `alloc`, and reports *which* unknown has no pivot so the caller
//! can name the node or element — the general crates (nalgebra, faer) are far
//! larger in wasm and only say "singular".

use alloc::vec::Vec;
use num_complex::Complex64;

/// |re| + |im|: the magnitude used for pivoting and scaling, as LAPACK's
/// complex routines do (within √2 of |z|, and no square root or hypot call).
fn abs1(z: Complex64) -> f64 {
    libm::fabs(z.re) + libm::fabs(z.im)
}

/// A power of two within a factor 2 of 1/m (so scaling by it is exact), read
/// from the exponent bits; 1 for zero, subnormal or non-finite m.
fn inverse_power_of_two(m: f64) -> f64 {
    let biased = ((m.to_bits() >> 52) & 0x7ff) as i64;
    if biased == 0 || biased == 0x7ff {
        return 1.0;
    }
    // m = 1.f × 2^(biased − 1023); 1/m ≈ 2^(1023 − biased), clamped to normal range.
    let e = (2046 - biased).clamp(1, 2046) as u64;
    f64::from_bits(e << 52)
}

/// A pivot counts as zero when |pivot| ≤ PIVOT_TOL × (largest |entry| the
/// column had before elimination): the column was cancelled to rounding level.
const PIVOT_TOL: f64 = 1e-13;

/// An LU factorization of a square matrix, row-major.
#[derive(Debug, Clone)]
pub struct Lu {
    n: usize,
    a: Vec<Complex64>,
    perm: Vec<usize>,
    row_scale: Vec<f64>,
    col_scale: Vec<f64>,
}

/// The factorization failed at this column: no usable pivot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct NoPivot {
    /// The unknown (column) without a pivot.
    pub column: usize,
}

impl Lu {
    /// Factor the n × n row-major matrix `a` (length n², checked by the caller).
    ///
    /// The matrix is first equilibrated by powers of two — each row, then each
    /// column, scaled to a largest entry near 1 — because nodal matrices mix
    /// conductances of 1e-9 S with gains of 1e6 and more; the scaling is exact and
    /// undone in [`Lu::solve`].
    pub fn factor(n: usize, mut a: Vec<Complex64>) -> Result<Lu, NoPivot> {
        if a.len() != n * n {
            return Err(NoPivot { column: 0 });
        }
        let mut row_scale = alloc::vec![1.0f64; n];
        for (row, rs) in a.chunks_exact_mut(n).zip(row_scale.iter_mut()) {
            *rs = inverse_power_of_two(row.iter().map(|&z| abs1(z)).fold(0.0, f64::max));
            row.iter_mut().for_each(|z| *z *= *rs);
        }
        let mut col_max = alloc::vec![0.0f64; n];
        for row in a.chunks_exact(n) {
            for (m, &z) in col_max.iter_mut().zip(row) {
                *m = m.max(abs1(z));
            }
        }
        let col_scale: Vec<f64> = col_max.iter().map(|&m| inverse_power_of_two(m)).collect();
        // After column scaling each column's largest entry is col_max·col_scale.
        let scale: Vec<f64> = col_max.iter().zip(&col_scale).map(|(m, c)| m * c).collect();
        for row in a.chunks_exact_mut(n) {
            for (z, &c) in row.iter_mut().zip(&col_scale) {
                *z *= c;
            }
        }
        let mut perm: Vec<usize> = (0..n).collect();
        for k in 0..n {
            let mut best = k;
            let mut best_mag = abs1(a[k * n + k]);
            for r in k + 1..n {
                let m = abs1(a[r * n + k]);
                if m > best_mag {
                    best = r;
                    best_mag = m;
                }
            }
            if best_mag <= PIVOT_TOL * scale[k] || !best_mag.is_finite() {
                return Err(NoPivot { column: k });
            }
            if best != k {
                for c in 0..n {
                    a.swap(k * n + c, best * n + c);
                }
                perm.swap(k, best);
            }
            let inv_pivot = Complex64::new(1.0, 0.0) / a[k * n + k];
            // Rows k and below, split so row k can be read while the others change.
            let (upper, lower) = a.split_at_mut((k + 1) * n);
            let pivot_row = &upper[k * n + k + 1..(k + 1) * n];
            for row in lower.chunks_exact_mut(n) {
                let f = row[k] * inv_pivot;
                if f == Complex64::new(0.0, 0.0) {
                    continue;
                }
                row[k] = f;
                for (x, &u) in row[k + 1..].iter_mut().zip(pivot_row) {
                    *x -= f * u;
                }
            }
        }
        Ok(Lu {
            n,
            a,
            perm,
            row_scale,
            col_scale,
        })
    }

    /// Solve A·x = b for one right-hand side (length n), returning x.
    pub fn solve(&self, b: &[Complex64]) -> Vec<Complex64> {
        let n = self.n;
        // Solve (R·A·C)·y = R·b, then x = C·y.
        let mut x: Vec<Complex64> = self
            .perm
            .iter()
            .map(|&p| {
                b.get(p).copied().unwrap_or_default()
                    * self.row_scale.get(p).copied().unwrap_or(1.0)
            })
            .collect();
        let rows = self.a.chunks_exact(n);
        for (r, row) in rows.clone().enumerate() {
            let s: Complex64 = row[..r].iter().zip(&x[..r]).map(|(a, b)| a * b).sum();
            x[r] -= s;
        }
        for (r, row) in rows.enumerate().rev() {
            let s: Complex64 = row[r + 1..]
                .iter()
                .zip(&x[r + 1..])
                .map(|(a, b)| a * b)
                .sum();
            x[r] = (x[r] - s) / row[r];
        }
        for (xi, &c) in x.iter_mut().zip(&self.col_scale) {
            *xi *= c;
        }
        x
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    #[test]
    fn solves_a_system_that_needs_pivoting() {
        // A has a zero in the (0,0) place, so elimination without row exchange fails.
        let a = alloc::vec![
            c(0.0, 0.0),
            c(2.0, 1.0),
            c(1.0, 0.0),
            c(3.0, -1.0),
            c(1.0, 0.0),
            c(0.0, 2.0),
            c(1.0, 1.0),
            c(0.0, 0.0),
            c(4.0, 0.0)
        ];
        let x_true = [c(1.0, -1.0), c(0.5, 2.0), c(-3.0, 0.25)];
        let b: Vec<Complex64> = (0..3)
            .map(|r| (0..3).map(|k| a[r * 3 + k] * x_true[k]).sum())
            .collect();
        let lu = Lu::factor(3, a).unwrap();
        let x = lu.solve(&b);
        for k in 0..3 {
            // Identity: A·x = b recovers the x that built b, to rounding.
            assert!((x[k] - x_true[k]).norm() < 1e-14, "x[{k}]");
        }
    }

    #[test]
    fn names_the_column_without_a_pivot() {
        // Second column is twice the first: no pivot for column 1.
        let a = alloc::vec![c(1.0, 0.0), c(2.0, 0.0), c(3.0, 0.0), c(6.0, 0.0)];
        assert_eq!(Lu::factor(2, a).unwrap_err(), NoPivot { column: 1 });
        assert_eq!(
            Lu::factor(2, alloc::vec![c(1.0, 0.0)]).unwrap_err(),
            NoPivot { column: 0 }
        );
    }
}
