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

/// The power of two nearest to 1/m (exact scaling, no rounding), or 1 for m = 0.
fn inverse_power_of_two(m: f64) -> f64 {
    if m > 0.0 && m.is_finite() {
        libm::exp2(-libm::round(libm::log2(m)))
    } else {
        1.0
    }
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
        for (r, rs) in row_scale.iter_mut().enumerate() {
            let m = (0..n).map(|c| a[r * n + c].norm()).fold(0.0, f64::max);
            *rs = inverse_power_of_two(m);
            for c in 0..n {
                a[r * n + c] *= *rs;
            }
        }
        let mut col_scale = alloc::vec![1.0f64; n];
        for (c, cs) in col_scale.iter_mut().enumerate() {
            let m = (0..n).map(|r| a[r * n + c].norm()).fold(0.0, f64::max);
            *cs = inverse_power_of_two(m);
            for r in 0..n {
                a[r * n + c] *= *cs;
            }
        }
        let mut scale = alloc::vec![0.0f64; n];
        for r in 0..n {
            for (c, s) in scale.iter_mut().enumerate() {
                *s = s.max(a[r * n + c].norm());
            }
        }
        let mut perm: Vec<usize> = (0..n).collect();
        for k in 0..n {
            let mut best = k;
            let mut best_mag = a[k * n + k].norm();
            for r in k + 1..n {
                let m = a[r * n + k].norm();
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
            let pivot = a[k * n + k];
            for r in k + 1..n {
                let f = a[r * n + k] / pivot;
                if f == Complex64::new(0.0, 0.0) {
                    continue;
                }
                a[r * n + k] = f;
                for c in k + 1..n {
                    let u = a[k * n + c];
                    a[r * n + c] -= f * u;
                }
            }
        }
        Ok(Lu { n, a, perm, row_scale, col_scale })
    }

    /// Solve A·x = b for one right-hand side (length n), returning x.
    #[allow(clippy::needless_range_loop)]
    pub fn solve(&self, b: &[Complex64]) -> Vec<Complex64> {
        let n = self.n;
        // Solve (R·A·C)·y = R·b, then x = C·y.
        let mut x: Vec<Complex64> = self
            .perm
            .iter()
            .map(|&p| b.get(p).copied().unwrap_or_default() * self.row_scale.get(p).copied().unwrap_or(1.0))
            .collect();
        for r in 0..n {
            let mut s = x[r];
            for c in 0..r {
                s -= self.a[r * n + c] * x[c];
            }
            x[r] = s;
        }
        for r in (0..n).rev() {
            let mut s = x[r];
            for c in r + 1..n {
                s -= self.a[r * n + c] * x[c];
            }
            x[r] = s / self.a[r * n + r];
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
        let a = alloc::vec![c(0.0, 0.0), c(2.0, 1.0), c(1.0, 0.0), c(3.0, -1.0), c(1.0, 0.0), c(0.0, 2.0), c(1.0, 1.0), c(0.0, 0.0), c(4.0, 0.0)];
        let x_true = [c(1.0, -1.0), c(0.5, 2.0), c(-3.0, 0.25)];
        let b: Vec<Complex64> = (0..3).map(|r| (0..3).map(|k| a[r * 3 + k] * x_true[k]).sum()).collect();
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
        assert_eq!(Lu::factor(2, alloc::vec![c(1.0, 0.0)]).unwrap_err(), NoPivot { column: 0 });
    }
}
